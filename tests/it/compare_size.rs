//! Sizing to a demand: the pure pieces against outside values, the sized array of the demo's
//! single-slope still over a few stochastic years (more demand never fewer units; fresh years
//! meet the demand about as often as asked; one seed, one answer; rain kept apart), and the
//! command-line contract (exit 2 naming the option).

use assert_cmd::Command;
use stillbench::compare::size::{
    self, COVER_RUNOFF_COEFFICIENT, SizeMethod, SizeOptions, UnitYear, longest_low_run_days,
    month_noon_elevation_rad, noon_elevation_rad, order_statistic_index, rain_catch_l, row_gap_m,
    sequent_peak_storage_l, units_for,
};
use stillbench::design::{self, Climate, LoadedDesign};
use stillbench::stills::{self, RunOptions};

/// The demo design reduced to its single-slope variant.
fn demo_single_slope() -> LoadedDesign {
    let mut loaded = design::load_demo().unwrap();
    loaded
        .design
        .variants
        .retain(|v| v.kind.name() == "single-slope");
    assert_eq!(loaded.design.variants.len(), 1);
    loaded
}

fn years_of(loaded: &LoadedDesign, seed: u64, years: u32) -> Vec<UnitYear> {
    let model = size::weather_model(loaded).unwrap();
    let base = stills::site_weather(loaded).unwrap();
    size::unit_years(
        loaded,
        0,
        &model,
        &base,
        seed,
        years,
        &RunOptions::default(),
    )
    .unwrap()
}

fn opts(demand_l_day: f64, confidence: f64, years: u32, seed: u64) -> SizeOptions {
    SizeOptions {
        demand_l_day,
        confidence,
        years,
        seed,
    }
}

#[test]
fn order_statistic_is_the_ceiling_of_confidence_times_n() {
    // Definition of the empirical quantile (common practice, no source): the ⌈c·n⌉-th smallest
    // of n values is at least the values of a fraction c of them. Exact integers.
    assert_eq!(order_statistic_index(10, 0.9), 8);
    assert_eq!(order_statistic_index(20, 0.9), 17);
    assert_eq!(order_statistic_index(3, 0.5), 1);
    assert_eq!(order_statistic_index(1, 0.99), 0);
    assert_eq!(order_statistic_index(4, 0.01), 0);
}

#[test]
fn units_round_up_to_whole_stills() {
    // Arithmetic (common practice, no source): 100 L/day from 3 L/day stills needs 34.
    assert_eq!(units_for(100.0, 3.0), Some(34));
    assert_eq!(units_for(99.0, 3.0), Some(33));
    assert_eq!(units_for(1.0, 5.0), Some(1));
    assert_eq!(units_for(1.0, 0.0), None);
}

#[test]
fn sequent_peak_storage_matches_a_hand_worked_series() {
    // Sequent-peak method (Thomas 1963, from memory), worked by hand: demand 10 L/day,
    // supply 12, 4, 6, 15, 3, 10, 20 → deficits 0, 6, 10, 5, 12, 12, 2 → storage 12 L.
    // Low-output days (supply < 10): 4, 6 then 3 → longest run 2. Exact within 1e-12.
    let supply = [12.0, 4.0, 6.0, 15.0, 3.0, 10.0, 20.0];
    assert!((sequent_peak_storage_l(&supply, 10.0) - 12.0).abs() < 1e-12);
    assert_eq!(longest_low_run_days(&supply, 10.0), 2);
    // Supply always above demand: no tank.
    assert!(sequent_peak_storage_l(&[11.0; 30], 10.0).abs() < 1e-12);
}

#[test]
fn noon_elevation_matches_pvlib() {
    // pvlib 0.x solarposition.get_solarposition (NREL SPA), geometric elevation, maximum over
    // the day at 1-minute steps, longitude 0, year 2025 (generated on this machine):
    //   40° N, 10 Dec (Klein's December day, n = 344): 27.04°
    //   40° N, 11 Jun (n = 162): 73.12°
    //   10° S, 10 Dec: 77.04°
    // Tolerance 0.5°: Cooper's declination is good to about ±1° (D&B 2013 §1.6) and is within
    // 0.1° of the ephemeris on these days.
    let cases = [(40.0, 12, 27.04), (40.0, 6, 73.12), (-10.0, 12, 77.04)];
    for (lat, month, want_deg) in cases {
        let got = month_noon_elevation_rad(lat, month).to_degrees();
        assert!(
            (got - want_deg).abs() < 0.5,
            "lat {lat}, month {month}: {got} vs {want_deg}"
        );
    }
    // D&B §1.6 (from memory): at noon θz = |φ − δ|; at the equinox (δ = 0) on the equator
    // the sun is overhead. Exact within 1e-12.
    assert!((noon_elevation_rad(0.0, 0.0) - std::f64::consts::FRAC_PI_2).abs() < 1e-12);
}

#[test]
fn row_gap_grows_as_the_noon_sun_gets_lower() {
    // Geometry (common practice, no source): the noon shadow of a 1 m edge is 1/tan α; at
    // 45° it is 1 m (within 1e-12).
    let g45 = row_gap_m(1.0, 45_f64.to_radians()).unwrap();
    assert!((g45 - 1.0).abs() < 1e-12);
    // Lower sun → longer gap, over the whole range.
    let mut last = 0.0;
    for deg in (5..=90).rev().step_by(5) {
        let g = row_gap_m(0.8, f64::from(deg).to_radians()).unwrap();
        assert!(g >= last, "{deg}°: {g} < {last}");
        last = g;
    }
    // The same still at 40° N needs more ground behind it in December than in June.
    let dec = row_gap_m(0.8, month_noon_elevation_rad(40.0, 12)).unwrap();
    let jun = row_gap_m(0.8, month_noon_elevation_rad(40.0, 6)).unwrap();
    assert!(dec > 2.0 * jun, "{dec} vs {jun}");
    // Sun below the horizon at noon (polar night): no spacing exists.
    assert!(row_gap_m(0.8, month_noon_elevation_rad(80.0, 12)).is_none());
}

#[test]
fn rain_catch_is_area_times_rainfall_times_runoff() {
    // 1 mm of rain on 1 m² is 1 L (definition of the millimetre of rain): 2 m² × 10 mm × 0.8
    // = 16 L, within 1e-12.
    assert!((rain_catch_l(2.0, 10.0, 0.8) - 16.0).abs() < 1e-12);
    assert!(rain_catch_l(2.0, -1.0, 0.8).abs() < 1e-12);
}

#[test]
fn sizing_the_demo_single_slope() {
    let loaded = demo_single_slope();
    // Few years to keep the test fast; the properties below hold for any number.
    let years = years_of(&loaded, 7, 8);
    assert_eq!(years.len(), 8);
    for y in &years {
        assert_eq!(y.daily_l.len(), 365);
        assert!(y.daily_l.iter().all(|d| d.is_finite() && *d >= 0.0));
    }

    // The daily outputs summed from the hour-by-hour records agree with the simulation's own
    // monthly means for the same year (internal consistency, relative 1e-9).
    let model = size::weather_model(&loaded).unwrap();
    let base = stills::site_weather(&loaded).unwrap();
    let weather = stills::SiteWeather {
        series: model.year(7, 0),
        average_days: false,
        ..base
    };
    let v = &loaded.design.variants[0];
    let r = stills::simulate_variant(&loaded, v, &weather, &RunOptions::default()).unwrap();
    for (m, month) in r.months.iter().enumerate() {
        let ours = years[0].month_mean_l_day[m];
        assert!(
            (ours - month.l_day).abs() <= 1e-9 * month.l_day.abs().max(1.0),
            "month {}: {ours} vs {}",
            m + 1,
            month.l_day
        );
    }

    // More demand never needs fewer units (issue 8), nor a smaller tank or less land.
    let mut last: Option<size::VariantSize> = None;
    for demand in [5.0, 20.0, 50.0, 100.0, 137.0, 200.0, 400.0, 750.0] {
        let s = size::size_from_years(&loaded, 0, &years, &opts(demand, 0.8, 8, 7))
            .unwrap()
            .unwrap();
        // In-sample the array meets at least the confidence fraction (by construction).
        assert!(
            s.met_fraction >= 0.8 - 1e-12,
            "{demand}: {}",
            s.met_fraction
        );
        assert!(s.array_worst_month_l_day >= demand);
        if let Some(p) = &last {
            assert!(
                s.units >= p.units,
                "{demand} L/day: {} < {}",
                s.units,
                p.units
            );
            assert!(s.land_m2 >= p.land_m2);
            assert!(s.capital >= p.capital);
        }
        last = Some(s);
    }

    // Rain is reported apart: the demo coast gives rain_mm, so each month's catch is the
    // array's plan area × rain × the runoff coefficient (definition, within 1e-9 L), and
    // removing the rainfall changes no distillate figure.
    let with_rain = size::size_from_years(&loaded, 0, &years, &opts(200.0, 0.8, 8, 7))
        .unwrap()
        .unwrap();
    let Climate::Monthly(m) = &loaded.design.site.climate else {
        panic!("the demo has a monthly climate")
    };
    let rain = m.rain_mm.unwrap();
    assert_eq!(with_rain.rain.len(), 12);
    for (r, mm) in with_rain.rain.iter().zip(rain) {
        let want = with_rain.footprint_m2 * mm * COVER_RUNOFF_COEFFICIENT;
        assert!((r.caught_l - want).abs() < 1e-9);
    }
    let mut dry = loaded.clone();
    if let Climate::Monthly(m) = &mut dry.design.site.climate {
        m.rain_mm = None;
    }
    let without = size::size_from_years(&dry, 0, &years, &opts(200.0, 0.8, 8, 7))
        .unwrap()
        .unwrap();
    assert!(without.rain.is_empty());
    assert_eq!(without.units, with_rain.units);
    assert_eq!(
        without.array_worst_month_l_day.to_bits(),
        with_rain.array_worst_month_l_day.to_bits()
    );
    assert_eq!(without.storage_l.to_bits(), with_rain.storage_l.to_bits());
}

#[test]
fn the_sized_array_meets_fresh_years() {
    // Size on seed 11 and check on seed 12 (independent ChaCha streams). Sampling error:
    // the sizing fraction and the checking fraction are each binomial over n years with
    // p ≈ c, so their difference has variance ≈ 2·c(1 − c)/n; we allow two standard
    // deviations (≈ 95 %, normal approximation — common practice, no source):
    // c = 0.8, n = 10 → allowance 2·√(0.032) = 0.36, so at least 0.44 (5 of 10 years).
    let loaded = demo_single_slope();
    let c = 0.8;
    let n = 10;
    let sizing = years_of(&loaded, 11, n);
    let s = size::size_from_years(&loaded, 0, &sizing, &opts(100.0, c, n, 11))
        .unwrap()
        .unwrap();
    // The size is the smallest that works: one unit fewer misses the confidence in-sample.
    assert!(size::met_fraction(&sizing, s.units - 1, 100.0) < c);
    let fresh = years_of(&loaded, 12, n);
    let met = size::met_fraction(&fresh, s.units, 100.0);
    let allowance = 2.0 * (2.0 * c * (1.0 - c) / f64::from(n)).sqrt();
    assert!(
        met >= c - allowance,
        "{} units meet {met} of fresh years",
        s.units
    );
}

#[test]
fn response_model_sizing_meets_fresh_fully_simulated_years() {
    // `size` now takes its many years from the validated daily response model by default.
    // The same re-check as above, against full hour-by-hour simulation: size by the response
    // model on seed 11 (n = 10 years), then simulate fresh years of seed 12 in full. Same
    // allowance as `the_sized_array_meets_fresh_years` (two binomial standard deviations):
    // at least 0.44 of the fresh years. Single slope and wick: a thermal-mass kind and a
    // flow-through kind, both cheap to simulate in full.
    let mut loaded = design::load_demo().unwrap();
    loaded
        .design
        .variants
        .retain(|v| matches!(v.kind.name(), "single-slope" | "wick"));
    assert_eq!(loaded.design.variants.len(), 2);
    let (c, n, demand) = (0.8, 10, 100.0);
    let o = opts(demand, c, n, 11);
    let by_response =
        size::size_design_by(&loaded, &o, &RunOptions::default(), SizeMethod::Response).unwrap();
    assert_eq!(by_response.method, SizeMethod::Response);
    assert_eq!(by_response.sized.len(), 2, "{:?}", by_response.skipped);
    let model = size::weather_model(&loaded).unwrap();
    let base = stills::site_weather(&loaded).unwrap();
    for (i, s) in by_response.sized.iter().enumerate() {
        let full = |seed| {
            size::unit_years(&loaded, i, &model, &base, seed, n, &RunOptions::default()).unwrap()
        };
        let fresh = full(12);
        let met = size::met_fraction(&fresh, s.units, demand);
        let allowance = 2.0 * (2.0 * c * (1.0 - c) / f64::from(n)).sqrt();
        assert!(
            met >= c - allowance,
            "{}: {} units meet {met} of fresh years",
            s.name,
            s.units
        );
        // The same years sized by full simulation: the units agree within the response
        // model's validated 3 % on monthly means, plus one unit for rounding up.
        let by_full = size::size_from_years(&loaded, i, &full(11), &o)
            .unwrap()
            .unwrap();
        let (a, b) = (s.units as f64, by_full.units as f64);
        eprintln!("{}: response {a} units, full {b} units", s.name);
        assert!((a - b).abs() <= 0.03 * b + 1.0, "{}: {a} vs {b}", s.name);
    }
}

#[test]
fn one_seed_gives_one_answer() {
    // Reproducibility (issue 8): the same seed gives bit-identical figures; another seed
    // gives other weather.
    let loaded = demo_single_slope();
    let o = opts(100.0, 0.5, 2, 3);
    let a = size::size_design(&loaded, &o, &RunOptions::default()).unwrap();
    let b = size::size_design(&loaded, &o, &RunOptions::default()).unwrap();
    assert_eq!(
        serde_json::to_string(&a).unwrap(),
        serde_json::to_string(&b).unwrap()
    );
    // The same years on one thread and on two (rayon pools): bit-identical.
    let on = |threads: usize| {
        rayon::ThreadPoolBuilder::new()
            .num_threads(threads)
            .build()
            .unwrap()
            .install(|| years_of(&loaded, 3, 2))
    };
    assert_eq!(on(1), on(2));
    let y3 = years_of(&loaded, 3, 1);
    let y4 = years_of(&loaded, 4, 1);
    assert_ne!(y3[0].daily_l, y4[0].daily_l);
}

fn cli() -> Command {
    Command::cargo_bin("stillbench").unwrap()
}

fn demo_path() -> std::path::PathBuf {
    std::path::Path::new(env!("CARGO_MANIFEST_DIR")).join("designs/demo-coast.toml")
}

#[test]
fn bad_size_options_exit_2_naming_the_option() {
    let d = demo_path();
    for (args, option) in [
        (vec!["--demand", "0"], "--demand"),
        (vec!["--demand", "-5"], "--demand"),
        (
            vec!["--demand", "10", "--confidence", "1.5"],
            "--confidence",
        ),
        (vec!["--demand", "10", "--confidence", "0"], "--confidence"),
        (vec!["--people", "0"], "--people"),
        (vec!["--demand", "10", "--years", "0"], "--years"),
        (vec!["--demand", "10", "--years", "1001"], "--years"),
        (
            vec!["--people", "10", "--litres-per-person", "-1"],
            "--litres-per-person",
        ),
    ] {
        let out = cli().arg("size").arg(&d).args(&args).output().unwrap();
        assert_eq!(out.status.code(), Some(2), "{args:?}");
        let err = String::from_utf8_lossy(&out.stderr);
        assert!(err.contains(option), "{args:?}: {err}");
    }
}

#[test]
fn no_demand_anywhere_exits_2_naming_demand() {
    let text = std::fs::read_to_string(demo_path()).unwrap();
    let start = text.find("[project.demand]").unwrap();
    let end = text[start..].find("[site]").unwrap() + start;
    let stripped = format!("{}{}", &text[..start], &text[end..]);
    let dir = tempfile::tempdir().unwrap();
    let path = dir.path().join("no-demand.toml");
    // The materials path is relative to the design; point it at the repository's.
    let materials = std::path::Path::new(env!("CARGO_MANIFEST_DIR")).join("designs/materials");
    let stripped = stripped.replace(
        "materials = \"materials/",
        &format!("materials = \"{}/", materials.display()),
    );
    std::fs::write(&path, stripped).unwrap();
    let out = cli().arg("size").arg(&path).output().unwrap();
    assert_eq!(out.status.code(), Some(2));
    let err = String::from_utf8_lossy(&out.stderr);
    assert!(err.contains("--demand"), "{err}");
}

/// The demo coast design with only its first (single-slope) variant, written to a temporary
/// directory with the materials path made absolute.
fn one_variant_design(dir: &std::path::Path) -> std::path::PathBuf {
    let text = std::fs::read_to_string(demo_path()).unwrap();
    let first = text.find("[[variant]]").unwrap();
    let second = text[first + 1..].find("[[variant]]").unwrap() + first + 1;
    let materials = std::path::Path::new(env!("CARGO_MANIFEST_DIR")).join("designs/materials");
    let one = text[..second].replace(
        "materials = \"materials/",
        &format!("materials = \"{}/", materials.display()),
    );
    let path = dir.join("one.toml");
    std::fs::write(&path, one).unwrap();
    path
}

#[test]
fn size_command_json_and_csv() {
    let dir = tempfile::tempdir().unwrap();
    let path = one_variant_design(dir.path());
    let out = cli()
        .args(["size", "--people", "20", "--litres-per-person", "6"])
        .args(["--years", "2", "--confidence", "0.5", "--format", "json"])
        .arg(&path)
        .output()
        .unwrap();
    assert_eq!(
        out.status.code(),
        Some(0),
        "{}",
        String::from_utf8_lossy(&out.stderr)
    );
    let v: serde_json::Value = serde_json::from_slice(&out.stdout).unwrap();
    // The default method is the validated response model; --full simulates every year.
    assert_eq!(v["method"], "response");
    // 20 people × 6 L (arithmetic).
    assert!((v["options"]["demand_l_day"].as_f64().unwrap() - 120.0).abs() < 1e-12);
    let s = &v["sized"][0];
    assert_eq!(s["name"], "glass-basin");
    assert!(s["units"].as_u64().unwrap() >= 1);
    assert!(s["array_worst_month_l_day"].as_f64().unwrap() >= 120.0);
    // Rain sits in its own array, 12 months, apart from the distillate figures.
    assert_eq!(s["rain"].as_array().unwrap().len(), 12);
    let full = cli()
        .args([
            "size",
            "--demand",
            "120",
            "--years",
            "2",
            "--confidence",
            "0.5",
        ])
        .args(["--full", "--format", "json"])
        .arg(&path)
        .output()
        .unwrap();
    assert_eq!(full.status.code(), Some(0));
    let f: serde_json::Value = serde_json::from_slice(&full.stdout).unwrap();
    assert_eq!(f["method"], "full");
    assert!(f["sized"][0]["units"].as_u64().unwrap() >= 1);
    let csv = cli()
        .args([
            "size",
            "--demand",
            "120",
            "--years",
            "2",
            "--confidence",
            "0.5",
        ])
        .args(["--format", "csv"])
        .arg(&path)
        .output()
        .unwrap();
    assert_eq!(csv.status.code(), Some(0));
    let text = String::from_utf8(csv.stdout).unwrap();
    let lines: Vec<&str> = text.lines().collect();
    assert_eq!(lines.len(), 2, "{text}");
    assert!(lines[0].starts_with("variant,kind,demand_l_day"));
    assert!(!lines[0].contains("rain"));
    // Same seed, same demand: the CSV row carries the units the JSON gave.
    let units_col = lines[0].split(',').position(|c| c == "units").unwrap();
    assert_eq!(
        lines[1].split(',').nth(units_col).unwrap(),
        s["units"].as_u64().unwrap().to_string()
    );
}
