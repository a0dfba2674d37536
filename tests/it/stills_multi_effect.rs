//! The multi-effect diffusion still on the shared network.
//!
//! Physical-law checks (energy closes, one stage below the single-effect ceiling, more
//! stages give more but less than in proportion, gain output ratio below the stage count)
//! and a published comparison (Chiavazzo et al. 2018); every number names its source or is
//! marked common practice.

use std::path::{Path, PathBuf};

use proptest::prelude::*;
use stillbench::design::{self, LoadedDesign};
use stillbench::network::{Simulation, SolverSettings, StepControl};
use stillbench::physics::irradiance::PlaneIrradiance;
use stillbench::stills::{self, HourContext, KindDetails, MonthResult, RunOptions};

fn designs_dir() -> PathBuf {
    Path::new(env!("CARGO_MANIFEST_DIR")).join("designs")
}

/// The demo site (invented) with one multi-effect variant whose kind fields are `fields`.
fn design_with(size_m: f64, fields: &str) -> LoadedDesign {
    let demo = design::DEMO_DESIGN;
    let head_end = demo.find("[[variant]]").unwrap();
    let head = &demo[..head_end];
    let text = format!(
        "{head}[[variant]]\nname = \"test\"\nkind = \"multi-effect\"\nwidth_m = {size_m}\n\
         length_m = {size_m}\ncover_azimuth_deg = 180\ncover = \"window-glass-3mm\"\n\
         plate = \"aluminium-plate\"\nabsorber = \"black-paint\"\nwick_cloth = \"cotton-cloth\"\n{fields}\n"
    );
    design::parse_design_str(&text, Path::new("test.toml"), &designs_dir()).unwrap()
}

fn stack(stages: u32, sink: &str) -> LoadedDesign {
    design_with(
        0.5,
        &format!(
            "glazing_tilt_deg = 15\nstages = {stages}\ngap_mm = 4\nsink = \"{sink}\"\n\
             feed_l_h_m2 = 0.5\nside_insulation = [ {{ material = \"polystyrene-foam\", thickness_mm = 30 }} ]"
        ),
    )
}

fn one_day(loaded: &LoadedDesign, month: u32) -> (MonthResult, KindDetails) {
    let w = stills::site_weather(loaded).unwrap();
    let v = &loaded.design.variants[0];
    let model = stills::build_model(loaded, v, &w).unwrap().unwrap();
    stills::run_single_day_with_details(model.as_ref(), &v.name, &w, month, &RunOptions::default())
        .unwrap()
}

fn gor_of(d: &KindDetails) -> f64 {
    match d {
        KindDetails::MultiEffect {
            gain_output_ratio, ..
        } => *gain_output_ratio,
        _ => panic!("multi-effect details expected"),
    }
}

#[test]
fn multi_effect_demo_months_close_their_energy_balance() {
    let loaded = design::load_demo().unwrap();
    let w = stills::site_weather(&loaded).unwrap();
    let v = loaded
        .design
        .variants
        .iter()
        .find(|v| v.kind.name() == "multi-effect")
        .unwrap();
    let r = stills::simulate_variant(&loaded, v, &w, &RunOptions::default()).unwrap();
    eprintln!(
        "demo ME: mean {:.2} L/m²/day, April {:.2} (eff {:.3}), details {:?}",
        r.mean_l_m2_day, r.months[3].l_m2_day, r.months[3].efficiency, r.details
    );
    // DESIGN.md: residual below 0.1 % of the absorbed sunlight, every month.
    assert!(r.energy_residual < 1e-3);
    for m in &r.months {
        assert!(m.energy.residual_fraction < 1e-3);
        assert!(m.l_m2_day.is_finite() && m.l_m2_day >= 0.0);
    }
}

#[test]
fn ten_stages_form_a_tridiagonal_network() {
    // The node order glazing, absorber, (wick, plate) × N joins only neighbours: a band of
    // half-width 1 (issue 5: solve the stage chain as a banded system).
    let loaded = stack(10, "water-body");
    let w = stills::site_weather(&loaded).unwrap();
    let model = stills::build_model(&loaded, &loaded.design.variants[0], &w)
        .unwrap()
        .unwrap();
    assert_eq!(model.network().bandwidth(), 1);
    assert_eq!(model.network().nodes().len(), 22);
}

#[test]
fn one_stage_is_bounded_by_the_single_effect_ceiling() {
    // DESIGN.md / REFERENCES.md §8: one effect cannot exceed entering sunlight ÷ h_fg.
    let (m, d) = one_day(&stack(1, "water-body"), 4);
    eprintln!(
        "one stage: {:.3} of ceiling {:.3} L/m²/day",
        m.l_m2_day, m.ceiling_l_m2_day
    );
    assert!(m.l_m2_day < m.ceiling_l_m2_day);
    // With one stage the gain output ratio is at most 1 (a physical law: each kilogram
    // needs its latent heat, and one effect gets it only once).
    assert!(gor_of(&d) < 1.0, "{}", gor_of(&d));
}

#[test]
fn yield_rises_with_stages_but_less_than_in_proportion() {
    // Issue 5 limits: yield rises with the stage count, less than in proportion, and the
    // gain output ratio stays below the number of stages.
    let runs: Vec<(u32, f64, f64)> = [1u32, 2, 4, 8]
        .iter()
        .map(|&n| {
            let (m, d) = one_day(&stack(n, "water-body"), 4);
            (n, m.l_m2_day, gor_of(&d))
        })
        .collect();
    let y1 = runs[0].1;
    for w in runs.windows(2) {
        assert!(w[1].1 > w[0].1, "{runs:?}");
    }
    for &(n, y, gor) in &runs {
        eprintln!("{n} stages: {y:.3} L/m²/day, GOR {gor:.3}");
        assert!(y < f64::from(n) * y1 || n == 1, "{runs:?}");
        assert!(gor < f64::from(n), "{runs:?}");
    }
}

/// A steady state under ~1 sun: the demo's April noon weather (invented) with the
/// plane-of-array irradiance set to 900 W/m² beam at normal incidence plus 100 W/m² diffuse.
#[derive(Debug, Clone, Copy)]
struct Steady {
    /// Distillate [L m⁻² h⁻¹] per m² footprint.
    rate_l_m2_h: f64,
    /// Absorber temperature [°C].
    absorber_c: f64,
    /// Last condensing plate temperature [°C].
    last_plate_c: f64,
    /// Heat into the sink per m² footprint [W m⁻²].
    sink_w_m2: f64,
}

fn steady(loaded: &LoadedDesign) -> Steady {
    let w = stills::site_weather(loaded).unwrap();
    let model = stills::build_model(loaded, &loaded.design.variants[0], &w)
        .unwrap()
        .unwrap();
    let net = model.network();
    let rec = w
        .series
        .hours
        .iter()
        .find(|h| h.month == 4 && (h.hour_mid_solar_h - 12.5).abs() < 0.6)
        .unwrap();
    let poa = [PlaneIrradiance {
        beam_w_m2: 900.0,
        sky_diffuse_w_m2: 100.0,
        ground_w_m2: 0.0,
        cos_incidence: 1.0,
    }];
    let ctx = HourContext {
        weather: rec,
        poa: &poa,
        ground_k: w.month_mean_air_k[3],
        dew_point_known: w.dew_point_known,
        feed_salinity_g_kg: w.feed_salinity_g_kg,
    };
    let mut state = model
        .initial_state(rec.t_air_k, w.feed_salinity_g_kg)
        .unwrap();
    let mut inputs = net.inputs(rec.t_air_k).unwrap();
    let mut record = None;
    // The outside and glazing-gap coefficients lag the state: repeat until they settle.
    for _ in 0..6 {
        model.hour_inputs(&ctx, &state, &mut inputs).unwrap();
        let mut sim = Simulation::new(
            net,
            state.clone(),
            SolverSettings::default(),
            StepControl::default(),
        )
        .unwrap();
        sim.settle(&inputs).unwrap();
        record = Some(sim.last_record().clone());
        state = sim.state().clone();
    }
    let record = record.unwrap();
    let fp = model.footprint_m2();
    let rate: f64 = record.links.iter().map(|l| l.collection_kg_s).sum();
    let node_c = |name: &str| state.temperature_k(net.node_id(name).unwrap()).unwrap() - 273.15;
    let n = net.nodes().len() / 2 - 1;
    let sink = net
        .links()
        .iter()
        .position(|l| l.name == "last plate to sink")
        .unwrap();
    Steady {
        rate_l_m2_h: rate * 3600.0 / fp,
        absorber_c: node_c("absorber"),
        last_plate_c: node_c(&format!("stage {n} plate")),
        sink_w_m2: record.links[sink].heat_w / fp,
    }
}

/// The Chiavazzo-like stack (see below) with the given sink and optional coefficient.
fn chiavazzo_like(sink: &str, coefficient_w_m2_k: Option<f64>) -> LoadedDesign {
    chiavazzo_with(sink, coefficient_w_m2_k, "")
}

/// The same with extra kind fields (`more`, TOML lines).
fn chiavazzo_with(sink: &str, coefficient_w_m2_k: Option<f64>, more: &str) -> LoadedDesign {
    tilted_chiavazzo(0.0, sink, coefficient_w_m2_k, more)
}

/// The same stack tilted `tilt_deg` from level.
fn tilted_chiavazzo(
    tilt_deg: f64,
    sink: &str,
    coefficient_w_m2_k: Option<f64>,
    more: &str,
) -> LoadedDesign {
    let extra = coefficient_w_m2_k
        .map(|h| format!("\nsink_coefficient_w_m2_k = {h}"))
        .unwrap_or_default()
        + more;
    design_with(
        0.25,
        &format!(
            "glazing_tilt_deg = {tilt_deg}\nstages = 10\ngap_mm = 3\nsink = \"{sink}\"{extra}\n\
             feed_l_h_m2 = 0.5\nside_insulation = [ {{ material = \"polystyrene-foam\", thickness_mm = 30 }} ]"
        ),
    )
}

#[test]
fn a_floating_ten_stage_stack_matches_chiavazzo_et_al() {
    // Chiavazzo et al. (2018), Nature Sustainability 1:763–772: a passive 10-stage device
    // floating on seawater gave "almost 3 L m⁻² h⁻¹" under one sun [S, abstract];
    // issue 5 asks for ±40 % → 1.8–4.2 L/m²/h.
    // Reconstructed: 10 stages, 3 mm gaps (they give "a few mm" [M]), last plate cooled by
    // the water it floats on (our water-body sink, 200 W/m²K default), ≈ 1 sun, flat (tilt
    // 0). Left unsaid or different (from memory): their stages separate evaporator and
    // condenser with a hydrophobic membrane, not an open air gap; their absorber was a
    // commercial solar absorber under a transparent insulation layer where ours is black
    // paint under 3 mm glass; their device was lab-sized (of order 0.1–0.2 m square) and
    // ours is 0.25 m square (the smallest size a design allows is just over 0.2 m), so edge
    // and frame losses weigh as much as theirs; feed by capillary wicks from the sea,
    // modelled as 0.5 L/h/m² per stage.
    let water = steady(&chiavazzo_like("water-body", None));
    let air = steady(&chiavazzo_like("air-fins", None));
    eprintln!("Chiavazzo-like stack, water body: {water:?}\nair fins: {air:?}");
    assert!((1.8..=4.2).contains(&water.rate_l_m2_h), "{water:?}");
    // The same level stack with the default finned air sink gives clearly less. Level, the
    // heated air cannot rise along the fins: it gathers under the plate and spills over the
    // edges (Incropera eq. 9.32, from memory), and the fins, closed at the top by the plate,
    // are not credited (Dayan et al. 2004 found fins add cooling there; not
    // taken). The sink gets ≈ 3 W/m²K, cannot shed the ≈ 200 W/m² the stack passes down
    // without rising tens of kelvin, and the edges, frame, glazing and warm drains take
    // the heat instead (mechanism in `water_body_plain_plate_and_fins_compared`).
    let drop = 1.0 - air.rate_l_m2_h / water.rate_l_m2_h;
    assert!(drop > 0.10, "{drop}");
    let plate_rise = air.last_plate_c - water.last_plate_c;
    let absorber_rise = air.absorber_c - water.absorber_c;
    assert!(plate_rise > 10.0, "{plate_rise}");
    // The cold stages hold most of the stack's resistance (a diffusion gap passes latent
    // heat in proportion to dp_sat/dT, which roughly doubles every 12 K: IAPWS-IF97 gives
    // 1.25 kPa/K at 65 °C against 0.245 at 30 °C, from memory), so the absorber rises by
    // less than half the last plate's rise.
    assert!(
        absorber_rise > 0.0 && absorber_rise < 0.5 * plate_rise,
        "{absorber_rise} vs {plate_rise}"
    );
}

#[test]
fn a_weaker_sink_costs_more_distillate_in_this_lossy_stack() {
    // Fixed sink coefficients set in the design (`sink_coefficient_w_m2_k`): 200 water body,
    // 25 fair fins, 8 a painted plain plate facing down in still air (Incropera et al., 6th
    // ed., eq. 9.32 convection ≈ 2–3 W/m²K plus ≈ 5 of radiation, from memory). With edge and
    // glazing losses growing with the stack's temperature the yield falls as the sink weakens
    // (a lossless stack could even gain, since warmer gaps carry more of their heat as
    // vapour: that is why this is not a law but a property of the lossy geometry), and the
    // last plate's rise above the sink is q/h by construction of the sink link.
    let runs: Vec<(f64, Steady)> = [200.0, 25.0, 8.0]
        .iter()
        .map(|&h| (h, steady(&chiavazzo_like("air-fins", Some(h)))))
        .collect();
    for (h, s) in &runs {
        eprintln!("h_sink {h}: {s:?}");
    }
    for w in runs.windows(2) {
        assert!(w[1].1.rate_l_m2_h < w[0].1.rate_l_m2_h, "{runs:?}");
        assert!(w[1].1.last_plate_c > w[0].1.last_plate_c, "{runs:?}");
    }
    // A plain plate costs clearly more than good fins: its rise q/h is about three times
    // theirs for a similar q, so the warm-stage losses grow by a multiple too.
    let base = runs[0].1.rate_l_m2_h;
    let fins = 1.0 - runs[1].1.rate_l_m2_h / base;
    let plain = 1.0 - runs[2].1.rate_l_m2_h / base;
    assert!(plain > 2.0 * fins, "fins {fins}, plain plate {plain}");
}

#[test]
fn the_result_says_what_the_sink_does() {
    // Issue 5: "the report says why". The day's details carry the sink heat, its day-mean
    // q/h rise, the absorber and last-plate peaks, and a note in words. The rise is
    // q ÷ (h × plate area) averaged over 24 h, so it must agree with the sink heat and the
    // coefficient (1e-9 relative: the same arithmetic done twice).
    let rises: Vec<(f64, f64)> = ["water-body", "air-fins"]
        .iter()
        .map(|sink| {
            let (_, d) = one_day(&chiavazzo_like(sink, None), 4);
            let KindDetails::MultiEffect {
                sink_coefficient_w_m2_k,
                sink_heat_kwh_m2_day,
                sink_rise_day_mean_k,
                absorber_max_c,
                last_plate_max_c,
                sink_note,
                glazing_gap_mm,
                ..
            } = d
            else {
                panic!("multi-effect details expected");
            };
            eprintln!(
                "{sink}: {sink_heat_kwh_m2_day:.2} kWh/m²/day, rise {sink_rise_day_mean_k:.2} K, \
                 absorber {absorber_max_c:.1} °C, last plate {last_plate_max_c:.1} °C\n{sink_note}"
            );
            // Tilt 0: plate area = footprint.
            let expect = sink_heat_kwh_m2_day * 3.6e6 / 86_400.0 / sink_coefficient_w_m2_k;
            assert!((sink_rise_day_mean_k / expect - 1.0).abs() < 1e-9);
            assert!(sink_heat_kwh_m2_day > 0.0);
            assert!(last_plate_max_c < absorber_max_c);
            assert!(
                sink_note.contains("q/h")
                    && sink_note.contains(sink.split('-').next().unwrap())
                    && sink_note.contains("coldest stages"),
                "{sink_note}"
            );
            // Default glazing gap (docs/design-file.md): 20 mm.
            assert!((glazing_gap_mm - 20.0).abs() < 1e-12);
            (sink_rise_day_mean_k, sink_coefficient_w_m2_k)
        })
        .collect();
    // Level, the fins are rated as a plate facing down (≈ 3 W/m²K) against the water
    // body's 200: the weak sink runs more than ten times as far above its sink even though
    // it takes less heat (the edges and glazing take more from the warmer stack).
    let ((r_water, h_water), (r_fins, h_fins)) = (rises[0], rises[1]);
    assert!(h_fins < 0.05 * h_water, "{rises:?}");
    assert!(r_fins > 10.0 * r_water, "{rises:?}");
}

#[test]
fn the_glazing_gap_is_a_validated_design_field() {
    // docs/design-file.md: glazing_gap_mm in [5, 100] mm.
    let demo = design::DEMO_DESIGN;
    let head = &demo[..demo.find("[[variant]]").unwrap()];
    let text = |gap: f64| {
        format!(
            "{head}[[variant]]\nname = \"test\"\nkind = \"multi-effect\"\nwidth_m = 0.5\n\
             length_m = 0.5\ncover_azimuth_deg = 180\ncover = \"window-glass-3mm\"\n\
             plate = \"aluminium-plate\"\nabsorber = \"black-paint\"\nwick_cloth = \"cotton-cloth\"\n\
             glazing_tilt_deg = 15\nstages = 3\nsink = \"air-fins\"\nglazing_gap_mm = {gap}\n"
        )
    };
    let err = design::parse_design_str(&text(2.0), Path::new("t.toml"), &designs_dir())
        .unwrap_err()
        .to_string();
    assert!(
        err.contains("glazing_gap_mm") && err.contains("[5, 100]"),
        "{err}"
    );
    let ok = design::parse_design_str(&text(40.0), Path::new("t.toml"), &designs_dir()).unwrap();
    let (m, d) = one_day(&ok, 4);
    assert!(m.energy.residual_fraction < 1e-3);
    assert!(
        matches!(d, KindDetails::MultiEffect { glazing_gap_mm, .. } if (glazing_gap_mm - 40.0).abs() < 1e-12)
    );
}

#[test]
fn the_sink_convection_factor_moves_the_yield_the_physical_way() {
    // docs/design-file.md: sink_convection_factor in [0.2, 5], multiplying the computed air
    // sink's convection. A stronger sink holds the stack cooler, so the edge, frame and
    // warm-drain losses fall and the yield rises (the mechanism of
    // `water_body_plain_plate_and_fins_compared`); the energy balance closes at every factor
    // (DESIGN.md, 0.1 %); the note says the factor was applied. Out of range is an error
    // naming the field and its range.
    let with = |f: f64| {
        tilted_chiavazzo(
            30.0,
            "air-fins",
            None,
            &format!("\nsink_convection_factor = {f}"),
        )
    };
    let rates: Vec<f64> = [0.5, 1.0, 2.0]
        .iter()
        .map(|&f| steady(&with(f)).rate_l_m2_h)
        .collect();
    eprintln!("air-sink factor 0.5, 1, 2: {rates:?} L/m²/h");
    assert!(rates[0] < rates[1] && rates[1] < rates[2], "{rates:?}");
    let (m, d) = one_day(&with(2.0), 4);
    assert!(m.energy.residual_fraction < 1e-3);
    let KindDetails::MultiEffect { sink_note, .. } = d else {
        panic!("multi-effect details expected");
    };
    assert!(
        sink_note.contains("× 2.00 as the design sets"),
        "{sink_note}"
    );
    let demo = design::DEMO_DESIGN;
    let head = &demo[..demo.find("[[variant]]").unwrap()];
    let text = format!(
        "{head}[[variant]]\nname = \"test\"\nkind = \"multi-effect\"\nwidth_m = 0.5\n\
         length_m = 0.5\ncover_azimuth_deg = 180\ncover = \"window-glass-3mm\"\n\
         plate = \"aluminium-plate\"\nabsorber = \"black-paint\"\nwick_cloth = \"cotton-cloth\"\n\
         glazing_tilt_deg = 15\nstages = 3\nsink = \"air-fins\"\nsink_convection_factor = 9\n"
    );
    let err = design::parse_design_str(&text, Path::new("t.toml"), &designs_dir())
        .unwrap_err()
        .to_string();
    assert!(
        err.contains("sink_convection_factor") && err.contains("[0.2, 5]"),
        "{err}"
    );
}

proptest! {
    #![proptest_config(ProptestConfig { cases: 1000, ..ProptestConfig::default() })]

    #[test]
    fn random_multi_effect_designs_close_their_energy_balance(
        stages in 1u32..=12,
        tilt in 0.0f64..45.0,
        gap in 1.0f64..20.0,
        feed in 0.05f64..5.0,
        insulation in 0.0f64..50.0,
        water_sink in any::<bool>(),
        month in 1u32..=12,
    ) {
        let sink = if water_sink { "water-body" } else { "air-fins" };
        let layers = if insulation > 1.0 {
            format!("side_insulation = [ {{ material = \"polystyrene-foam\", thickness_mm = {insulation} }} ]")
        } else {
            String::new()
        };
        let loaded = design_with(
            0.6,
            &format!("glazing_tilt_deg = {tilt}\nstages = {stages}\ngap_mm = {gap}\nsink = \"{sink}\"\nfeed_l_h_m2 = {feed}\n{layers}"),
        );
        let (m, d) = one_day(&loaded, month);
        // DESIGN.md: the energy balance closes to 0.1 % of the absorbed sunlight.
        prop_assert!(m.energy.residual_fraction < 1e-3);
        prop_assert!(m.l_m2_day.is_finite() && m.l_m2_day >= 0.0);
        // A physical law: the gain output ratio cannot exceed the number of effects.
        prop_assert!(gor_of(&d) < f64::from(stages));
    }
}

#[test]
fn a_stochastic_year_has_sane_dry_hours_and_closes_its_energy() {
    // Issue 5 follow-up: a stochastic year (weather-file path, hour by hour) of the demo's
    // 4-stage still once took ~270 solver steps per clear hour because the stage wicks dried
    // and re-wetted step after step; fed wicks now cap evaporation smoothly at their supply.
    let mut loaded = design::load_demo().unwrap();
    loaded
        .design
        .variants
        .retain(|v| v.kind.name() == "multi-effect");
    let base = stills::site_weather(&loaded).unwrap();
    let model = stillbench::compare::size::weather_model(&loaded).unwrap();
    let weather = stills::SiteWeather {
        series: model.year(1, 0),
        average_days: false,
        ..base.clone()
    };
    let v = &loaded.design.variants[0];
    let year = stills::simulate_variant(&loaded, v, &weather, &RunOptions::default()).unwrap();
    let avg = stills::simulate_variant(&loaded, v, &base, &RunOptions::default()).unwrap();
    let KindDetails::MultiEffect {
        stage_dry_hour_fraction: dry,
        gain_output_ratio,
        ..
    } = &year.details
    else {
        panic!("multi-effect details expected");
    };
    eprintln!(
        "stochastic year: {:.2} L/m²/day (average days {:.2}), residual {:.2e}, dry {dry:?}, \
         GOR {gain_output_ratio:.2}",
        year.mean_l_m2_day, avg.mean_l_m2_day, year.energy_residual
    );
    // DESIGN.md: energy closes to 0.1 % of the absorbed sunlight, every month.
    assert!(year.energy_residual < 1e-3);
    for m in &year.months {
        assert!(m.energy.residual_fraction < 1e-3, "{m:?}");
    }
    // Dry hours are sane: a wick only outruns its feed in sunshine, and the sun is up less
    // than half the hours of a year (at any latitude the year's daylight is 50 %, common
    // practice, no source), so no stage can be dry half the time; the first stage, the
    // hottest, dries at least as often as the last.
    assert_eq!(dry.len(), 4);
    for f in dry {
        assert!((0.0..0.5).contains(f), "{dry:?}");
    }
    assert!(dry[0] >= dry[3], "{dry:?}");
    // The demo's feed (0.4 L/h/m² per stage) is below the first stage's clear-noon
    // evaporation, so some hours must be dry (regression of the cap's purpose, not a
    // published value).
    assert!(dry[0] > 0.0, "{dry:?}");
    // The stochastic year draws its days around the same monthly means, so its yield lands
    // near the average-day year's (±25 %: the clearness spread and the yield's convexity in
    // sunlight move it by some per cent; common practice, no source).
    assert!(
        (year.mean_l_m2_day / avg.mean_l_m2_day - 1.0).abs() < 0.25,
        "{} vs {}",
        year.mean_l_m2_day,
        avg.mean_l_m2_day
    );
    assert!(*gain_output_ratio > 1.0 && *gain_output_ratio < 4.0);
}

#[test]
fn water_body_plain_plate_and_fins_compared() {
    // Issue 5: "the same still with an air-cooled sink gives clearly less, and the report
    // says why". The Chiavazzo-like stack under one sun (steady), with three sinks, level
    // and tilted 30°:
    // * water body: fixed 200 W/m²K (docs/design-file.md, Incropera eq. 9.32 in water);
    // * plain aluminium plate in still air: a plate facing down (eq. 9.32, 0.27 Ra^¼) when
    //   level, the underside of an inclined plate (eq. 9.24, 0.59 Ra^¼ on g·sin β) when
    //   tilted, ≈ 2–3 W/m²K, plus radiation at bare metal's emissivity 0.09 ≈ 0.6;
    // * the default fins (50 mm high, 20 mm apart, 1 mm thick, aluminium) running up the
    //   slope: level they are rated like the plain plate (the channels cannot vent; the
    //   cooling Dayan et al. 2004 found such arrays add is not taken); tilted, each
    //   channel by Bar-Cohen & Rohsenow with buoyancy g·sin β (Incropera eq. 9.45; the
    //   component of g along the channels is what Mehrtash & Tari 2013 found to hold down
    //   to 30° from level), on ≈ 4.8 m² of fin per m² of plate (all from memory).
    let run = |tilt: f64, sink: &str, more: &str| steady(&tilted_chiavazzo(tilt, sink, None, more));
    let plain_fields = "\nfin_height_mm = 0";
    let water = run(0.0, "water-body", "");
    let plain = run(0.0, "air-fins", plain_fields);
    let fins = run(0.0, "air-fins", "");
    let water30 = run(30.0, "water-body", "");
    let plain30 = run(30.0, "air-fins", plain_fields);
    let fins30 = run(30.0, "air-fins", "");
    let drop = |s: &Steady, w: &Steady| 1.0 - s.rate_l_m2_h / w.rate_l_m2_h;
    let rise = |s: &Steady, w: &Steady| s.last_plate_c - w.last_plate_c;
    eprintln!(
        "level: water body {water:?}\nplain plate {plain:?} (−{:.1} %, last plate +{:.1} K)\n\
         fins {fins:?} (−{:.1} %, last plate +{:.1} K)\n30°: water body {water30:?}\n\
         plain plate {plain30:?} (−{:.1} %, +{:.1} K)\nfins {fins30:?} (−{:.1} %, +{:.1} K)",
        100.0 * drop(&plain, &water),
        rise(&plain, &water),
        100.0 * drop(&fins, &water),
        rise(&fins, &water),
        100.0 * drop(&plain30, &water30),
        rise(&plain30, &water30),
        100.0 * drop(&fins30, &water30),
        rise(&fins30, &water30),
    );
    // Level: fins are worth nothing over the plain plate (the same rating, so the same
    // run to round-off), and both give clearly less than the water body.
    assert!((fins.rate_l_m2_h / plain.rate_l_m2_h - 1.0).abs() < 1e-9);
    assert!(drop(&plain, &water) > 0.10, "{plain:?}");
    // Tilted: the plain plate still costs clearly; the fins, now venting up the slope, win
    // back most of it. Mechanism: the plate's rise above the sink is q/h; finned, h is
    // several times the plain plate's, so the stack barely moves.
    assert!(drop(&plain30, &water30) > 0.10, "{plain30:?}");
    assert!(
        drop(&fins30, &water30) > 0.0 && drop(&fins30, &water30) < 0.5 * drop(&plain30, &water30),
        "{fins30:?} vs {plain30:?}"
    );
    assert!(rise(&plain30, &water30) > 1.5 * rise(&fins30, &water30));
    assert!(fins30.sink_w_m2 > plain30.sink_w_m2);
    // The report says why: the note names the sink's make-up, its parts and its flow.
    let note = |loaded: &LoadedDesign| {
        let (_, d) = one_day(loaded, 4);
        let KindDetails::MultiEffect { sink_note, .. } = d else {
            panic!("multi-effect details expected");
        };
        sink_note
    };
    let level_note = note(&chiavazzo_like("air-fins", None));
    assert!(
        level_note.contains("radiation")
            && level_note.contains("too close to level")
            && level_note.contains("add almost nothing")
            && level_note.contains("Tilted 30° over the same width"),
        "{level_note}"
    );
    let plain_note = note(&tilted_chiavazzo(30.0, "air-fins", None, plain_fields));
    assert!(
        plain_note.contains("plain plate") && plain_note.contains("rises up the"),
        "{plain_note}"
    );
    let fins_note = note(&tilted_chiavazzo(30.0, "air-fins", None, ""));
    assert!(
        fins_note.contains("fin channels")
            && !fins_note.contains("extrapolated")
            && !fins_note.contains("Tilted 30°"),
        "{fins_note}"
    );
}

mod air_sink {
    use stillbench::physics::humid_air;
    use stillbench::stills::multi_effect::{
        AirSink, AirSinkCoefficient, SinkFlow, downward_plate_nusselt, inclined_plate_nusselt,
        straight_fin_efficiency, vertical_channel_nusselt,
    };

    /// A vertical heat sink: fins on a vertical base, channels 50 mm long (the textbook
    /// case of Bar-Cohen & Rohsenow's relation).
    fn fins(spacing_m: f64) -> AirSink {
        AirSink {
            fin_height_m: 0.05,
            fin_spacing_m: spacing_m,
            fin_thickness_m: 0.0003,
            conductivity_w_m_k: 237.0,
            emissivity: 0.09,
            plate_length_m: 0.0625,
            slope_length_m: 0.05,
            tilt_rad: std::f64::consts::FRAC_PI_2,
            convection_factor: 1.0,
        }
    }

    /// The sink under a 0.5 m square stack tilted `tilt_deg`: default fins (50 mm high,
    /// 20 mm apart, 1 mm thick aluminium), or a plain plate with `fin_height_m = 0`.
    fn under_stack(tilt_deg: f64, fin_height_m: f64) -> AirSink {
        let tilt = tilt_deg.to_radians();
        let slope = 0.5 / tilt.cos();
        AirSink {
            fin_height_m,
            fin_spacing_m: 0.02,
            fin_thickness_m: 0.001,
            conductivity_w_m_k: 237.0,
            emissivity: 0.09,
            plate_length_m: slope * 0.5 / (2.0 * (slope + 0.5)),
            slope_length_m: slope,
            tilt_rad: tilt,
            convection_factor: 1.0,
        }
    }

    const RATING: (f64, f64, f64) = (313.15, 303.15, 101_325.0);

    fn rated(a: &AirSink) -> AirSinkCoefficient {
        a.coefficient(RATING.0, RATING.1, RATING.2)
    }

    /// Ra/L³ = g βΔT/(να) at the rating point, air properties at the film temperature [m⁻³].
    fn ra_per_m3() -> (f64, f64) {
        let (t_plate, t_air, p) = RATING;
        let t_film = 0.5 * (t_plate + t_air);
        let k = humid_air::dry_air_thermal_conductivity_w_m_k(t_film);
        let mu = humid_air::dry_air_viscosity_pa_s(t_film);
        let rho = p * 0.028_958_6 / (8.314_462_618 * t_film);
        let alpha = k / (rho * humid_air::DRY_AIR_SPECIFIC_HEAT_J_KG_K);
        (
            9.806_65 * (t_plate - t_air) / t_film / (mu / rho * alpha),
            k,
        )
    }

    #[test]
    fn fins_work_best_near_the_published_optimum_spacing() {
        // Incropera et al., 6th ed., eq. 9.47 (Bar-Cohen & Rohsenow, from memory): the
        // spacing that maximises heat from isothermal plates is S_opt = 2.71 (Ra_S/(S³L))^(−¼).
        // With thin, efficient fins our coefficient per m² of plate must peak near it: both
        // half and twice S_opt do worse; the sink quotes the same S_opt (1e-9: the same
        // formula, properties computed twice).
        let (r, _) = ra_per_m3();
        let s_opt = 2.71 * (r / 0.05).powf(-0.25);
        let h = |s: f64| rated(&fins(s)).convective_w_m2_k;
        eprintln!(
            "S_opt {:.2} mm: h {:.1}, half {:.1}, twice {:.1}",
            s_opt * 1e3,
            h(s_opt),
            h(0.5 * s_opt),
            h(2.0 * s_opt)
        );
        assert!((0.005..0.012).contains(&s_opt), "{s_opt}");
        assert!(h(s_opt) > h(0.5 * s_opt) && h(s_opt) > h(2.0 * s_opt));
        let quoted = rated(&fins(0.01)).best_spacing_m.unwrap();
        assert!((quoted / s_opt - 1.0).abs() < 1e-9, "{quoted} vs {s_opt}");
    }

    #[test]
    fn a_level_plate_spills_its_heat_over_the_edges() {
        // Level, there is no buoyancy along the plate: plain plate and fins are both rated
        // as a hot plate facing down, Nu = 0.27 Ra^¼ on L = A/P (Incropera eq. 9.32, from
        // memory), ≈ 1–4 W/m²K (common practice, no source), the fins not credited
        // (Dayan et al. 2004 found such arrays add cooling; not taken, conservative). Radiation at
        // ε = 0.09 is ε·4σT³ ≈ 0.09 × 6.3 ≈ 0.6 W/m²K near 35 °C (the formula by hand).
        let plain = rated(&under_stack(0.0, 0.0));
        let finned = rated(&under_stack(0.0, 0.05));
        assert_eq!(plain.flow, SinkFlow::UnderLevelPlate);
        assert_eq!(finned.flow, SinkFlow::UnderLevelPlate);
        assert_eq!(plain.convective_w_m2_k, finned.convective_w_m2_k);
        assert!(finned.best_spacing_m.is_none());
        let (r, k) = ra_per_m3();
        let l = 0.125;
        let by_hand = 0.27 * (r * l * l * l).powf(0.25) * k / l;
        assert!(
            (plain.convective_w_m2_k / by_hand - 1.0).abs() < 1e-9,
            "{plain:?}"
        );
        assert!((1.0..4.0).contains(&plain.convective_w_m2_k), "{plain:?}");
        assert!((plain.radiative_w_m2_k - 0.6).abs() < 0.05, "{plain:?}");
    }

    #[test]
    fn tilt_lets_the_fins_work() {
        // The buoyancy along the channels is g·sin β (Mehrtash & Tari 2013, Appl. Therm.
        // Eng. 51:1067–1075: the component of g along a plate-fin sink's channels holds for
        // sinks facing down to 60° from the vertical, from its abstract's −60°…+80° and our
        // reading of which side is face-down), so the fins' coefficient
        // grows with the tilt (channels held at 0.5 m) and, from a few degrees on, the flow
        // up the slope governs.
        let h: Vec<f64> = (0..=12)
            .map(|i| {
                let a = AirSink {
                    slope_length_m: 0.5,
                    ..under_stack(5.0 * f64::from(i), 0.05)
                };
                rated(&a).convective_w_m2_k
            })
            .collect();
        eprintln!("fins 0…60°: {h:.2?}");
        for w in h.windows(2) {
            assert!(w[1] >= w[0], "{h:?}");
        }
        let at = |deg: f64, fin: f64| rated(&under_stack(deg, fin));
        assert_eq!(at(10.0, 0.05).flow, SinkFlow::AlongSlope);
        // At 30° the fins (≈ 4.8 m² of fin per m² of plate) shed several times what the
        // plain plate does: ≥ 3× (common practice, no source: a fin array near its optimum
        // spacing).
        assert!(
            at(30.0, 0.05).convective_w_m2_k > 3.0 * at(30.0, 0.0).convective_w_m2_k,
            "{:?} vs {:?}",
            at(30.0, 0.05),
            at(30.0, 0.0)
        );
        // The plain plate tilted 60°: the underside of an inclined plate, Nu = 0.59 Ra^¼ on
        // the slope length with g·sin β (Incropera eq. 9.24, Table 9.1, §9.6.2, from memory).
        let plain60 = at(60.0, 0.0);
        let (r, k) = ra_per_m3();
        let slope = 1.0;
        let by_hand = 0.59 * (r * 60f64.to_radians().sin() * slope).powf(0.25) * k / slope;
        assert_eq!(plain60.flow, SinkFlow::AlongSlope);
        assert!((plain60.convective_w_m2_k / by_hand - 1.0).abs() < 1e-9);
        // Incropera eq. 9.24 at Ra = 10⁸: Nu = 0.59 × 100 = 59.
        assert!((inclined_plate_nusselt(1e8) - 59.0).abs() < 1e-9);
    }

    #[test]
    fn long_shallow_channels_choke() {
        // In the fully developed limit Nu_S = Ra_S (S/L)/24 (Elenbaas; Incropera eq. 9.45's
        // first term, from memory) the coefficient falls as 1/L: at 15° and 10 mm spacing a
        // 1 m slope sheds less per m² than a 0.25 m one, and the best spacing widens as
        // L^¼ (eq. 9.47).
        let with_slope = |slope: f64| AirSink {
            fin_spacing_m: 0.01,
            slope_length_m: slope,
            ..under_stack(15.0, 0.05)
        };
        let (short, long) = (rated(&with_slope(0.25)), rated(&with_slope(1.0)));
        assert!(long.convective_w_m2_k < short.convective_w_m2_k);
        let ratio = long.best_spacing_m.unwrap() / short.best_spacing_m.unwrap();
        assert!((ratio - 4f64.powf(0.25)).abs() < 1e-9, "{ratio}");
    }

    #[test]
    fn fin_efficiency_is_tanh_ml_over_ml() {
        // Incropera et al., 6th ed., eq. 3.89 (from memory): η = tanh(mL_c)/(mL_c),
        // m = (2h/(kt))^½. With h = 10, k = 200, t = 2 mm: m = √50; L_c = 1/m gives
        // η = tanh 1 = 0.761594 (the function's own value; 1e-9, round-off).
        let m = 50f64.sqrt();
        let l = 1.0 / m - 0.001;
        let eta = straight_fin_efficiency(10.0, 200.0, 0.002, l);
        assert!((eta - 0.761_594_155_955_764_9).abs() < 1e-9, "{eta}");
        // A short fin is fully effective (η ≈ 1 − (mL_c)²/3 = 1 − 1.7e-5 at L_c = t/2 = 1 mm);
        // a long one tends to 1/(mL_c).
        assert!((straight_fin_efficiency(10.0, 200.0, 0.002, 1e-9) - 1.0).abs() < 1e-4);
        let long = straight_fin_efficiency(10.0, 200.0, 0.002, 2.0);
        assert!((long * m * 2.001 - 1.0).abs() < 1e-6, "{long}");
    }

    #[test]
    fn channel_relation_meets_its_two_limits() {
        // Incropera et al., 6th ed., eq. 9.45 (Bar-Cohen & Rohsenow, from memory): narrow
        // channels tend to Elenbaas's fully developed Nu_S = Ra_S (S/L)/24; wide ones to the
        // isolated vertical plate, Nu_L = 0.59 Ra_L^¼ (eq. 9.24, Table 9.1 C = 0.59, n = ¼),
        // i.e. Nu_S = 0.59 (Ra_S S/L)^¼ since 1/√2.873 = 0.590. Tolerances: 0.1 % and 0.5 %,
        // the neglected term's share at these arguments.
        let (s, l) = (0.01, 0.05);
        let narrow_x = 1e-3;
        let nu = vertical_channel_nusselt(narrow_x * l / s, s, l);
        assert!((nu / (narrow_x / 24.0) - 1.0).abs() < 1e-3, "{nu}");
        let wide_x = 1e8;
        let nu = vertical_channel_nusselt(wide_x * l / s, s, l);
        assert!((nu / (0.59 * wide_x.powf(0.25)) - 1.0).abs() < 5e-3, "{nu}");
        // Incropera eq. 9.32 (from memory): Nu = 0.27 Ra^¼; Ra = 1e8 → 27.0.
        assert!((downward_plate_nusselt(1e8) - 27.0).abs() < 1e-9);
    }
}
