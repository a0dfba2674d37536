//! The double-slope basin still: energy closure, mirror symmetry of an east–west still, and
//! the shaded face condensing more. Each number names its source or is marked common
//! practice.

use std::path::{Path, PathBuf};

use proptest::prelude::*;
use stillbench::climate::{HourlyWeather, Plane, SkyModel, plane_irradiance};
use stillbench::design::{self, LoadedDesign, VariantKind};
use stillbench::network::{Simulation, SolverSettings, StepControl};
use stillbench::stills::{
    self, DoubleSlopeStill, HourContext, KindDetails, RunOptions, StillModel,
};

fn designs_dir() -> PathBuf {
    Path::new(env!("CARGO_MANIFEST_DIR")).join("designs")
}

/// The demo site (invented) with one double-slope variant.
fn design_with(width_m: f64, length_m: f64, azimuth_deg: f64, fields: &str) -> LoadedDesign {
    let demo = design::DEMO_DESIGN;
    let head = &demo[..demo.find("[[variant]]").unwrap()];
    let text = format!(
        "{head}[[variant]]\nname = \"test\"\nkind = \"double-slope\"\nwidth_m = {width_m}\n\
         length_m = {length_m}\ncover_azimuth_deg = {azimuth_deg}\ncover = \"window-glass-4mm\"\n\
         liner = \"black-epdm\"\n{fields}\n"
    );
    design::parse_design_str(&text, Path::new("test.toml"), &designs_dir()).unwrap()
}

#[test]
fn demo_months_close_their_energy_balance() {
    let loaded = design::load_demo().unwrap();
    let w = stills::site_weather(&loaded).unwrap();
    let v = loaded
        .design
        .variants
        .iter()
        .find(|v| v.kind.name() == "double-slope")
        .unwrap();
    let r = stills::simulate_variant(&loaded, v, &w, &RunOptions::default()).unwrap();
    assert!(matches!(r.details, KindDetails::DoubleSlope { .. }));
    for m in &r.months {
        // DESIGN.md "The shared model": residual below 0.1 % of the absorbed sunlight.
        assert!(m.energy.residual_fraction < 1e-3, "month {}", m.month);
        assert!(m.l_m2_day.is_finite() && m.l_m2_day > 0.0);
        // REFERENCES.md §8: yield below the single-effect ceiling.
        assert!(m.l_m2_day < m.ceiling_l_m2_day, "month {}", m.month);
    }
    // REFERENCES.md §8 [M]: basin stills give 2–5 L/m²/day at 25–45 % daily efficiency; the
    // demo's masonry double slope (3 cm brine, sawdust base) is held to 1.5–5 L/m²/day over
    // the year (a deep, heavy basin sits at the low end; common practice for the margin).
    eprintln!(
        "twin-roof: mean {:.2} L/m2/day, worst month {:.2}",
        r.mean_l_m2_day, r.worst_month.l_m2_day
    );
    assert!(
        (1.5..=5.0).contains(&r.mean_l_m2_day),
        "{}",
        r.mean_l_m2_day
    );
}

/// Weather symmetric about solar noon: April's average day at the demo site for the
/// morning hours, mirrored into the afternoon (solar hour h ↔ 24 − h, sun azimuth
/// γ ↔ 360° − γ, the same air, dew point, wind and irradiance).
fn symmetric_day(w: &stills::SiteWeather) -> Vec<HourlyWeather> {
    let april: Vec<HourlyWeather> = w
        .series
        .hours
        .iter()
        .filter(|h| h.month == 4)
        .copied()
        .collect();
    assert_eq!(april.len(), 24);
    let mut day = april.clone();
    for i in 0..12 {
        let mut m = april[i];
        m.hour_mid_solar_h = 24.0 - april[i].hour_mid_solar_h;
        m.sun.azimuth_rad =
            (std::f64::consts::TAU - april[i].sun.azimuth_rad).rem_euclid(std::f64::consts::TAU);
        day[23 - i] = m;
    }
    day
}

struct HourResult {
    t_brine_k: f64,
    t_near_k: f64,
    t_far_k: f64,
    near_kg_s: f64,
    far_kg_s: f64,
}

/// Zero heat capacity: each hour is the steady state under that hour's inputs
/// (`Simulation::settle`, a Δt = ∞ step), so nothing carries over from one hour to the next.
fn steady_hours(model: &DoubleSlopeStill, w: &stills::SiteWeather) -> Vec<HourResult> {
    let net = model.network();
    let link = |name: &str| net.links().iter().position(|l| l.name == name).unwrap();
    let (near_link, far_link) = (link("brine to cover"), link("brine to far cover"));
    let [near, far] = model.cover_nodes();
    let planes: Vec<Plane> = model.planes().iter().map(|(p, _)| *p).collect();
    symmetric_day(w)
        .iter()
        .map(|rec| {
            let poa: Vec<_> = planes
                .iter()
                .map(|p| plane_irradiance(rec, *p, w.series.albedo, SkyModel::HayDavies))
                .collect();
            let ctx = HourContext {
                weather: rec,
                poa: &poa,
                ground_k: w.month_mean_air_k[3],
                dew_point_known: w.dew_point_known,
                feed_salinity_g_kg: w.feed_salinity_g_kg,
            };
            let state = model
                .initial_state(rec.t_air_k, w.feed_salinity_g_kg)
                .unwrap();
            let mut inputs = net.inputs(rec.t_air_k).unwrap();
            model.hour_inputs(&ctx, &state, &mut inputs).unwrap();
            let mut sim = Simulation::new(
                net,
                state,
                SolverSettings::default(),
                StepControl::default(),
            )
            .unwrap();
            sim.settle(&inputs).unwrap();
            let s = sim.state();
            let r = sim.last_record();
            HourResult {
                t_brine_k: s.temperature_k(model.brine_node()).unwrap(),
                t_near_k: s.temperature_k(near).unwrap(),
                t_far_k: s.temperature_k(far).unwrap(),
                near_kg_s: r.links[near_link].condensation_kg_s,
                far_kg_s: r.links[far_link].condensation_kg_s,
            }
        })
        .collect()
}

fn east_west_still() -> (DoubleSlopeStill, stills::SiteWeather) {
    let loaded = design_with(
        1.4,
        3.0,
        90.0,
        "cover_tilt_deg = 20\nside_wall_mm = 150\nbrine_depth_mm = 30",
    );
    let w = stills::site_weather(&loaded).unwrap();
    let v = &loaded.design.variants[0];
    let VariantKind::DoubleSlope(k) = &v.kind else {
        panic!("not a double slope")
    };
    let model = DoubleSlopeStill::new(v, k, &loaded.library, w.pressure_pa).unwrap();
    (model, w)
}

#[test]
fn east_west_still_without_heat_capacity_is_mirror_symmetric_about_noon() {
    let (model, w) = east_west_still();
    let hours = steady_hours(&model, &w);
    let near = |a: f64, b: f64, scale: f64| (a - b).abs() <= 0.01 * scale.abs().max(1e-12);
    for i in 0..12 {
        let (a, b) = (&hours[i], &hours[23 - i]);
        let t_air = symmetric_day(&w)[i].t_air_k;
        // Issue 5: mirror-symmetric hourly results to 1 % — temperatures as rises above the
        // air, condensation on each face against the other face's mirror-hour value.
        assert!(
            near(
                a.t_brine_k - t_air,
                b.t_brine_k - t_air,
                a.t_brine_k - t_air + 0.1
            ),
            "hour {i}: brine {} vs {}",
            a.t_brine_k,
            b.t_brine_k
        );
        assert!(near(
            a.t_near_k - t_air,
            b.t_far_k - t_air,
            a.t_near_k - t_air + 0.1
        ));
        assert!(near(
            a.t_far_k - t_air,
            b.t_near_k - t_air,
            a.t_far_k - t_air + 0.1
        ));
        assert!(
            near(a.near_kg_s, b.far_kg_s, a.near_kg_s + 1e-9),
            "hour {i}"
        );
        assert!(near(a.far_kg_s, b.near_kg_s, a.far_kg_s + 1e-9), "hour {i}");
    }
    // The check is not empty: at 09:30 the east face is sunlit and the east–west
    // difference is large (more than 10 % between the faces' condensation).
    let morning = &hours[9];
    eprintln!(
        "09:30: east face {:.2} K, west face {:.2} K, condensing {:.3e} / {:.3e} kg/s",
        morning.t_near_k, morning.t_far_k, morning.near_kg_s, morning.far_kg_s
    );
    assert!(morning.far_kg_s > 1.1 * morning.near_kg_s);
}

#[test]
fn the_cooler_shaded_face_condenses_more() {
    // Issue 5: "the cooler, shaded cover condenses more". In the morning the west face is
    // shaded; in the afternoon the east face.
    let (model, w) = east_west_still();
    let hours = steady_hours(&model, &w);
    for i in [8, 9, 10] {
        let h = &hours[i];
        assert!(h.t_far_k < h.t_near_k, "hour {i}");
        assert!(h.far_kg_s > h.near_kg_s, "hour {i}");
        let p = &hours[23 - i];
        assert!(
            p.t_near_k < p.t_far_k && p.near_kg_s > p.far_kg_s,
            "hour {}",
            23 - i
        );
    }
}

proptest! {
    #![proptest_config(ProptestConfig { cases: 1000, ..ProptestConfig::default() })]

    /// Random valid designs, a day each: the energy closes to 0.1 % (DESIGN.md), no NaN,
    /// no negative yield, yield below the single-effect ceiling (REFERENCES.md §8).
    #[test]
    fn random_designs_close_their_energy_balance(
        width in 0.5f64..3.0,
        length in 0.5f64..5.0,
        azimuth in 0.0f64..360.0,
        tilt in 5.0f64..45.0,
        side_wall in 40.0f64..400.0,
        depth in 5.0f64..80.0,
        masonry in any::<bool>(),
        correlation in 0usize..3,
        insulation in 0.0f64..100.0,
        month in 1u32..=12,
    ) {
        prop_assume!(depth < side_wall - 10.0);
        let corr = ["dunkle", "kumar-tiwari", "inclined-enclosure"][correlation];
        let basin = if masonry { "masonry" } else { "metal-tray" };
        let base = if insulation > 1.0 {
            format!("base_insulation = [ {{ material = \"polystyrene-foam\", thickness_mm = {insulation:.1} }} ]")
        } else {
            String::new()
        };
        let loaded = design_with(
            width,
            length,
            azimuth,
            &format!(
                "cover_tilt_deg = {tilt}\nside_wall_mm = {side_wall}\nbrine_depth_mm = {depth}\n\
                 basin = \"{basin}\"\ninternal_correlation = \"{corr}\"\n{base}"
            ),
        );
        let w = stills::site_weather(&loaded).unwrap();
        let v = &loaded.design.variants[0];
        let model = stills::build_model(&loaded, v, &w).unwrap().unwrap();
        let m = stills::run_single_day(model.as_ref(), "p", &w, month, &RunOptions::default())
            .unwrap();
        prop_assert!(m.energy.residual_fraction.abs() < 1e-3);
        prop_assert!(m.l_m2_day.is_finite() && m.l_m2_day >= 0.0);
        prop_assert!(m.l_m2_day <= m.ceiling_l_m2_day);
    }
}
