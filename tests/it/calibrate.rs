//! Calibration factors in the model, measured pilot files, the calibration fit, and the
//! default model against published devices (issue 10).

use std::path::{Path, PathBuf};

use rand::SeedableRng;
use rand_chacha::ChaCha20Rng;
use rand_distr::{Distribution, Normal};
use rayon::prelude::*;
use stillbench::calibrate::validation::{
    self, MODEL_FORM_RELATIVE_SD, model_form_relative_sd, published_devices,
};
use stillbench::calibrate::{
    self, Calibrator, FitParam, FitSettings, MeasuredRecord, parse_measured_bytes,
};
use stillbench::design::{
    self, Calibration, CalibrationFactors, DistillateCounting, DistillateUnit, LoadedDesign,
    MeasuredColumns, Variant,
};
use stillbench::network::StepControl;
use stillbench::stills::{self, CalibratedModel, MonthResult, RunOptions, SiteWeather};

fn designs_dir() -> PathBuf {
    Path::new(env!("CARGO_MANIFEST_DIR")).join("designs")
}

fn data_dir() -> PathBuf {
    Path::new(env!("CARGO_MANIFEST_DIR")).join("tests/data")
}

fn demo() -> LoadedDesign {
    design::load_design(&designs_dir().join("demo-coast.toml")).unwrap()
}

fn with_cal(v: &Variant, c: Calibration) -> Variant {
    let mut v = v.clone();
    v.calibration = Some(c);
    v
}

/// One June day of `v` from the design's average-day climate.
fn one_day(loaded: &LoadedDesign, v: &Variant, weather: &SiteWeather) -> MonthResult {
    let m = stills::build_model(loaded, v, weather).unwrap().unwrap();
    stills::run_single_day(m.as_ref(), &v.name, weather, 6, &RunOptions::default()).unwrap()
}

// ---------------------------------------------------------------------------------------
// Factors in the model

#[test]
fn neutral_factors_change_nothing_bit_for_bit() {
    let loaded = demo();
    let weather = stills::site_weather(&loaded).unwrap();
    for v in &loaded.design.variants {
        let plain = one_day(&loaded, v, &weather);
        // The wrapper itself with neutral factors (the driver skips it when neutral).
        let m = stills::build_model(&loaded, v, &weather).unwrap().unwrap();
        let wrapped = CalibratedModel::new(m, CalibrationFactors::default());
        let w =
            stills::run_single_day(&wrapped, &v.name, &weather, 6, &RunOptions::default()).unwrap();
        // A table that spells out the neutral values and the material's own emissivity.
        let eps = loaded
            .library
            .get(&v.cover)
            .and_then(|i| i.cover)
            .unwrap()
            .emissivity;
        let spelled = with_cal(
            v,
            Calibration {
                distillate_factor: Some(1.0),
                cover_transmittance_factor: Some(1.0),
                cover_emissivity: Some(eps),
                base_loss_factor: Some(1.0),
                fitted_from: Some("nothing".into()),
                ..Calibration::default()
            },
        );
        let s = one_day(&loaded, &spelled, &weather);
        for other in [&w, &s] {
            assert_eq!(
                plain.l_m2_day.to_bits(),
                other.l_m2_day.to_bits(),
                "{}",
                v.name
            );
            assert_eq!(
                plain.max_brine_c.to_bits(),
                other.max_brine_c.to_bits(),
                "{}",
                v.name
            );
            assert_eq!(
                plain.energy.cover_to_sky_kwh.to_bits(),
                other.energy.cover_to_sky_kwh.to_bits(),
                "{}",
                v.name
            );
        }
    }
}

/// Each factor moves the yield the physical way in every kind, and the energy booked by
/// the network still closes within its 0.1 % bound (DESIGN.md).
#[test]
fn each_factor_moves_yield_the_physical_way_and_energy_closes() {
    let loaded = demo();
    let weather = stills::site_weather(&loaded).unwrap();
    for v in &loaded.design.variants {
        let base = one_day(&loaded, v, &weather);
        let eps = loaded
            .library
            .get(&v.cover)
            .and_then(|i| i.cover)
            .unwrap()
            .emissivity;
        let cases: [(&str, Calibration); 3] = [
            (
                "less collected",
                Calibration {
                    distillate_factor: Some(0.7),
                    ..Calibration::default()
                },
            ),
            (
                "dirtier cover",
                Calibration {
                    cover_transmittance_factor: Some(0.8),
                    ..Calibration::default()
                },
            ),
            (
                "leakier base",
                Calibration {
                    base_loss_factor: Some(4.0),
                    ..Calibration::default()
                },
            ),
        ];
        for (what, c) in cases {
            let r = one_day(&loaded, &with_cal(v, c), &weather);
            assert!(
                r.l_m2_day < base.l_m2_day,
                "{} {what}: {} not below {}",
                v.name,
                r.l_m2_day,
                base.l_m2_day
            );
            assert!(
                r.energy.residual_fraction.abs() <= 1e-3,
                "{} {what}: residual {}",
                v.name,
                r.energy.residual_fraction
            );
        }
        // A less emissive cover radiates less to the sky. Its effect on the yield has no fixed
        // sign: the brine also radiates less to the cover (ε_eff falls), keeping its heat.
        let low_eps = one_day(
            &loaded,
            &with_cal(
                v,
                Calibration {
                    cover_emissivity: Some((eps - 0.5).max(0.1)),
                    ..Calibration::default()
                },
            ),
            &weather,
        );
        assert!(
            low_eps.energy.cover_to_sky_kwh < base.energy.cover_to_sky_kwh,
            "{}",
            v.name
        );
        assert!(low_eps.energy.residual_fraction.abs() <= 1e-3);
        // Collection: with 0.7 of the collected share the distillate falls by about 30 %
        // (not exactly: the condensate dripping back cools the brine a little).
        let r = one_day(
            &loaded,
            &with_cal(
                v,
                Calibration {
                    distillate_factor: Some(0.7),
                    ..Calibration::default()
                },
            ),
            &weather,
        );
        let ratio = r.l_m2_day / base.l_m2_day;
        assert!((0.6..0.8).contains(&ratio), "{}: ratio {ratio}", v.name);
        // More transmittance, more yield.
        let up = one_day(
            &loaded,
            &with_cal(
                v,
                Calibration {
                    cover_transmittance_factor: Some(1.05),
                    ..Calibration::default()
                },
            ),
            &weather,
        );
        assert!(up.l_m2_day > base.l_m2_day, "{}", v.name);
        assert!(up.energy.residual_fraction.abs() <= 1e-3);
    }
}

#[test]
fn calibration_table_is_read_and_checked() {
    let text = design::DEMO_DESIGN.replace(
        "base_insulation = [ { material = \"polystyrene-foam\", thickness_mm = 50 } ]\n\
         side_insulation",
        "base_insulation = [ { material = \"polystyrene-foam\", thickness_mm = 50 } ]\n\
         calibration = { distillate_factor = 0.8, cover_emissivity = 0.85, fitted_from = \
         \"pilot.csv\", measured = { distillate_unit = \"L/m2\", distillate_counting = \
         \"cumulative\" } }\nside_insulation",
    );
    let loaded = design::parse_design_str(&text, Path::new("t.toml"), &designs_dir()).unwrap();
    let c = loaded.design.variants[0].calibration.clone().unwrap();
    assert_eq!(c.distillate_factor, Some(0.8));
    assert_eq!(c.fitted_from.as_deref(), Some("pilot.csv"));
    let m = c.measured.unwrap();
    assert_eq!(m.distillate_unit, DistillateUnit::LitrePerM2);
    assert_eq!(m.distillate_counting, DistillateCounting::Cumulative);
    assert_eq!(m.timestamp, "timestamp");

    let bad = text.replace("distillate_factor = 0.8", "distillate_factor = 3.0");
    let err = design::parse_design_str(&bad, Path::new("t.toml"), &designs_dir()).unwrap_err();
    let s = err.to_string();
    assert!(
        s.contains("variant[1].calibration.distillate_factor"),
        "{s}"
    );
    assert!(s.contains("[0.2, 1.5]"), "{s}");
    let unknown = text.replace("distillate_factor = 0.8", "distilate_factor = 0.8");
    assert!(design::parse_design_str(&unknown, Path::new("t.toml"), &designs_dir()).is_err());
}

// ---------------------------------------------------------------------------------------
// Measured files

/// A small pilot: the demo site (invented), a 1 m × 1 m single-slope still.
fn pilot_design(extra: &str) -> LoadedDesign {
    let demo = design::DEMO_DESIGN;
    let head = &demo[..demo.find("[[variant]]").unwrap()];
    let text = format!(
        "{head}[[variant]]\nname = \"pilot\"\nkind = \"single-slope\"\nwidth_m = 1.0\n\
         length_m = 1.0\ncover_azimuth_deg = 180\ncover = \"window-glass-4mm\"\n\
         liner = \"black-epdm\"\ncover_tilt_deg = 15\nbrine_depth_mm = 20\n\
         base_insulation = [ {{ material = \"polystyrene-foam\", thickness_mm = 50 }} ]\n\
         side_insulation = [ {{ material = \"polystyrene-foam\", thickness_mm = 25 }} ]\n{extra}\n"
    );
    design::parse_design_str(&text, Path::new("pilot.toml"), &designs_dir()).unwrap()
}

fn pilot_plane(loaded: &LoadedDesign) -> stillbench::climate::Plane {
    loaded.design.variants[0].cover_planes()[0].1
}

/// Global horizontal irradiance of an invented sunny spell at the demo site [W m⁻²]:
/// 900·sin(elevation)^1.2 times a day factor, the elevation from Cooper's declination and the
/// hour angle at the middle of the hour (clock time corrected for longitude only).
fn ghi(day: u32, hour_end: u32, day_factor: f64) -> f64 {
    let lat = 14.2f64.to_radians();
    let n = 59.0 + f64::from(day);
    let decl = (23.45f64 * (2.0 * std::f64::consts::PI * (284.0 + n) / 365.0).sin()).to_radians();
    let solar_h = f64::from(hour_end) - 0.5 + (-23.6 + 15.0) / 15.0;
    let w = ((solar_h - 12.0) * 15.0).to_radians();
    let s = lat.sin() * decl.sin() + lat.cos() * decl.cos() * w.cos();
    if s <= 0.0 {
        0.0
    } else {
        900.0 * s.powf(1.2) * day_factor
    }
}

/// CSV text of `days` hourly rows from 1 March (invented weather), distillate column from
/// `dist(row)`.
fn pilot_csv(days: u32, dist: &dyn Fn(usize) -> String) -> String {
    let mut s = String::from("timestamp,poa_w_m2,ghi_w_m2,t_air_c,wind_m_s,distillate\n");
    let mut row = 0;
    for d in 0..days {
        let f = 0.6 + 0.4 * ((f64::from(d) * 1.7).sin() * 0.5 + 0.5);
        for h in 1..=24u32 {
            let (dd, hh) = if h == 24 { (d + 1, 0) } else { (d, h) };
            let g = ghi(d, h, f);
            let t = 25.0 + 4.0 * ((f64::from(h) - 9.0) / 24.0 * 2.0 * std::f64::consts::PI).sin();
            s.push_str(&format!(
                "2026-03-{:02}T{:02}:00,{:.1},{:.1},{:.2},{:.2},{}\n",
                dd + 1,
                hh,
                1.03 * g,
                g,
                t,
                3.0 + (f64::from(h) * 0.5).sin(),
                dist(row)
            ));
            row += 1;
        }
    }
    s
}

fn read(
    loaded: &LoadedDesign,
    csv: &str,
    cols: &MeasuredColumns,
) -> Result<MeasuredRecord, stillbench::Error> {
    parse_measured_bytes(
        csv.as_bytes(),
        Path::new("pilot.csv"),
        cols,
        &loaded.design.site.location(),
        pilot_plane(loaded),
        1.0,
    )
}

#[test]
fn measured_file_hourly_interval_in_ml() {
    let loaded = pilot_design("");
    let csv = pilot_csv(2, &|r| format!("{}", 10 * (r % 24)));
    let rec = read(&loaded, &csv, &MeasuredColumns::default()).unwrap();
    assert_eq!(rec.hours.len(), 48);
    assert_eq!(rec.series.hours.len(), 48);
    // Row 5 (line 7) holds 50 mL = 0.05 kg.
    assert!((rec.hours[5].distillate_kg.unwrap() - 0.05).abs() < 1e-12);
    assert_eq!(rec.summary.hours_with_distillate, 48);
    assert!(rec.summary.gaps.is_empty() && rec.summary.rejected_rows.is_empty());
    // The measured plane irradiance rides on each record.
    assert!(
        rec.series
            .hours
            .iter()
            .any(|h| h.measured_poa_w_m2.is_some())
    );
}

#[test]
fn negative_distillate_is_rejected_with_its_line() {
    let loaded = pilot_design("");
    let csv = pilot_csv(2, &|r| if r == 10 { "-5".into() } else { "20".into() });
    let rec = read(&loaded, &csv, &MeasuredColumns::default()).unwrap();
    // Row index 10 is file line 12 (header = line 1).
    assert_eq!(rec.summary.negative_distillate.len(), 1);
    assert_eq!(rec.summary.negative_distillate[0].line, 12);
    assert_eq!(rec.hours[10].distillate_kg, None);
    assert_eq!(rec.summary.hours_with_distillate, 47);
    assert!(rec.summary.lines().iter().any(|l| l.contains("lines 12")));
}

#[test]
fn gaps_are_skipped_counted_and_never_filled_with_distillate() {
    let loaded = pilot_design("");
    let csv = pilot_csv(2, &|_| "20".into());
    // Drop rows 20 and 21 (lines 22, 23): a two-hour gap.
    let text: String = csv
        .lines()
        .enumerate()
        .filter(|(i, _)| *i != 21 && *i != 22)
        .map(|(_, l)| format!("{l}\n"))
        .collect();
    let rec = read(&loaded, &text, &MeasuredColumns::default()).unwrap();
    assert_eq!(rec.hours.len(), 48, "weather interpolated across the gap");
    assert_eq!(rec.summary.gaps.len(), 1);
    assert_eq!(
        rec.summary.gaps[0].line, 22,
        "the row after the gap, line 24 less the two dropped"
    );
    assert!((rec.summary.gaps[0].hours - 2.0).abs() < 1e-9);
    assert_eq!(rec.hours[20].distillate_kg, None);
    assert_eq!(rec.hours[21].distillate_kg, None);
    assert!(rec.hours[22].distillate_kg.is_some());
    assert_eq!(rec.summary.hours_with_distillate, 46);
    assert_eq!(rec.summary.hours_weather_filled, 2);
    // A gap longer than max_gap_h stops the reading, naming the line.
    let long: String = csv
        .lines()
        .enumerate()
        .filter(|(i, _)| !(21..=26).contains(i))
        .map(|(_, l)| format!("{l}\n"))
        .collect();
    let err = read(&loaded, &long, &MeasuredColumns::default()).unwrap_err();
    assert!(err.to_string().contains("pilot.csv"), "{err}");
}

#[test]
fn cumulative_counter_reset_starts_a_new_segment() {
    let loaded = pilot_design("");
    // A running total in litres that is emptied (reset to 0) at row 30 (line 32).
    let csv = pilot_csv(2, &|r| {
        let r = r as f64;
        if r < 30.0 {
            format!("{:.3}", 0.01 * r)
        } else {
            format!("{:.3}", 0.01 * (r - 30.0))
        }
    });
    let cols = MeasuredColumns {
        distillate_unit: DistillateUnit::Litre,
        distillate_counting: DistillateCounting::Cumulative,
        ..MeasuredColumns::default()
    };
    let rec = read(&loaded, &csv, &cols).unwrap();
    assert_eq!(rec.summary.counter_resets, vec![32]);
    assert_eq!(
        rec.hours[0].distillate_kg, None,
        "no reading before the first"
    );
    assert!((rec.hours[5].distillate_kg.unwrap() - 0.01).abs() < 1e-9);
    assert_eq!(
        rec.hours[30].distillate_kg, None,
        "the hour across the reset"
    );
    assert!((rec.hours[31].distillate_kg.unwrap() - 0.01).abs() < 1e-9);
    assert_eq!(rec.summary.hours_with_distillate, 46);
}

#[test]
fn irregular_sub_hourly_steps_are_shared_between_hours() {
    let loaded = pilot_design("");
    // 20-minute rows with 10 mL each, except two stamps shifted by 5 minutes.
    let mut s = String::from("timestamp,poa_w_m2,t_air_c,distillate\n");
    for k in 1..=(3 * 48) {
        let mut min = k * 20;
        if k == 40 || k == 41 {
            min += 5;
        }
        let (d, rem) = (min / 1440, min % 1440);
        let g = ghi(d, (rem / 60) + 1, 1.0);
        s.push_str(&format!(
            "2026-03-{:02} {:02}:{:02},{:.1},26,10\n",
            d + 1,
            rem / 60,
            rem % 60,
            g
        ));
    }
    let rec = read(&loaded, &s, &MeasuredColumns::default()).unwrap();
    assert_eq!(rec.summary.step_min, 20.0);
    // 25 min into the shifted stamp, 20 between the two, 15 out of it.
    assert_eq!(rec.summary.irregular_steps, 2);
    assert!(rec.summary.gaps.is_empty());
    // Every whole hour collects 30 mL, the shifted stamps included (shared by time).
    for h in &rec.hours {
        assert!((h.distillate_kg.unwrap() - 0.03).abs() < 1e-9, "{h:?}");
    }
}

#[test]
fn bad_rows_are_reported_with_lines() {
    let loaded = pilot_design("");
    let csv = pilot_csv(2, &|_| "20".into());
    let mut lines: Vec<String> = csv.lines().map(str::to_owned).collect();
    lines[5] = lines[5].replace(",20", ",abc"); // line 6
    lines[8] = "not-a-time,1,2,3,4,5".into(); // line 9
    let text = lines.join("\n") + "\n";
    let rec = read(&loaded, &text, &MeasuredColumns::default()).unwrap();
    let bad: Vec<usize> = rec.summary.rejected_rows.iter().map(|r| r.line).collect();
    assert_eq!(bad, vec![6, 9]);
    // A missing mapped column is an error naming it.
    let err = read(
        &loaded,
        &csv,
        &MeasuredColumns {
            brine_c: Some("t_brine".into()),
            ..MeasuredColumns::default()
        },
    )
    .unwrap_err();
    assert!(err.to_string().contains("t_brine"), "{err}");
}

// ---------------------------------------------------------------------------------------
// Synthetic pilot: generated with Kumar–Tiwari at a tighter step, fitted with Dunkle.

/// Parameters of the synthetic pilot (invented): what the generating model is run with.
const TRUE_VALUES: [f64; 4] = [0.85, 0.92, 0.75, 2.0];

fn truth_options() -> RunOptions {
    // A quarter of the default temperature change per step and steps of at most 10 min.
    RunOptions {
        control: StepControl {
            max_change_k: 0.5,
            max_step_s: 600.0,
            ..RunOptions::default().control
        },
        ..RunOptions::default()
    }
}

struct Synthetic {
    fit_design: LoadedDesign,
    record: MeasuredRecord,
    /// Noise-free hourly outputs of the generating model.
    truth: Vec<stills::HourRecord>,
}

fn synthetic() -> Synthetic {
    let gen_design = pilot_design("internal_correlation = \"kumar-tiwari\"");
    let fit_design = pilot_design("");
    let csv = pilot_csv(14, &|_| "0".into());
    let cols = MeasuredColumns {
        brine_c: None,
        ..MeasuredColumns::default()
    };
    let record = read(&fit_design, &csv, &cols).unwrap();
    let gen_cal = Calibrator::new(&gen_design, "pilot", &record, truth_options()).unwrap();
    let truth = gen_cal.simulate(&FitParam::ALL, &TRUE_VALUES).unwrap();
    Synthetic {
        fit_design,
        record,
        truth,
    }
}

/// The record with noise: hourly distillate σ = `rel` × the mean daylight hourly
/// distillate, temperatures σ = `t_k`.
fn noisy(s: &Synthetic, seed: u64, rel: f64, t_k: f64) -> MeasuredRecord {
    let mut rng = ChaCha20Rng::seed_from_u64(seed);
    let day: Vec<f64> = s
        .truth
        .iter()
        .map(|h| h.distillate_l)
        .filter(|d| *d > 1e-3)
        .collect();
    let mean = day.iter().sum::<f64>() / day.len() as f64;
    let nd = Normal::new(0.0, rel * mean).unwrap();
    let nt = Normal::new(0.0, t_k).unwrap();
    let mut rec = s.record.clone();
    for (m, h) in rec.hours.iter_mut().zip(&s.truth) {
        m.distillate_kg = Some(h.distillate_l + nd.sample(&mut rng));
        m.t_brine_c = Some(h.t_brine_c + nt.sample(&mut rng));
        m.t_cover_c = Some(h.t_cover_c + nt.sample(&mut rng));
        m.t_liner_c = Some(h.t_liner_c + nt.sample(&mut rng));
    }
    rec
}

/// Noise levels (relative hourly distillate σ, temperature σ [K]) of the three trials.
const NOISE: [(f64, f64); 3] = [(0.02, 0.1), (0.05, 0.3), (0.10, 0.6)];

#[test]
fn synthetic_pilot_recovers_its_parameters() {
    let s = synthetic();
    // What the test can fairly demand. The generating model uses Kumar–Tiwari inside, the
    // fitted one Dunkle, so no parameter set makes them agree: the lumped factors absorb the
    // difference, and as noise vanishes the estimator converges to the *pseudo-true* values
    // — the fitted model's best weighted least-squares match of the noise-free record. Under
    // such a model-form difference the best match depends on the weights, so the fits use
    // the known σ of each sensor (as a user with calibrated sensors would, `FitSettings::
    // sigma`) rather than weights re-estimated from each noisy record. Coverage is demanded
    // of the pseudo-true values, for every parameter; their distance from the generating
    // values (what a different correlation makes unrecoverable) is bounded separately
    // (see below) and printed.
    let clean = noisy(&s, 0, 0.0, 0.0);
    let cal = Calibrator::new(
        &s.fit_design,
        "pilot",
        &clean,
        calibrate::calibration_run_options(),
    )
    .unwrap();
    let day_mean = {
        let d: Vec<f64> = s
            .truth
            .iter()
            .map(|h| h.distillate_l)
            .filter(|d| *d > 1e-3)
            .collect();
        d.iter().sum::<f64>() / d.len() as f64
    };
    let mut report = Vec::new();
    let mut failures = Vec::new();
    for (level, (rel, t_k)) in NOISE.into_iter().enumerate() {
        let sigma = vec![
            (calibrate::Quantity::Distillate, rel * day_mean),
            (calibrate::Quantity::BrineTemperature, t_k),
            (calibrate::Quantity::CoverTemperature, t_k),
            (calibrate::Quantity::LinerTemperature, t_k),
        ];
        let settings = FitSettings {
            sigma: Some(sigma),
            ..FitSettings::default()
        };
        let star = calibrate::calibrate_with(&cal, &clean, &settings).unwrap();
        let star_v: Vec<f64> = star.parameters.iter().map(|p| p.value).collect();
        // Approximate recovery of the generating values: within 15 % for the distillate
        // factor, the transmittance and the emissivity, 40 % for the base-loss factor.
        // Measured: +8 %, +4 %, +6 %, +31 to +32 %. The base-loss factor absorbs most of the
        // model-form difference: Kumar–Tiwari evaporates less at the same temperatures, so
        // the generating still runs warmer and the Dunkle model matches its temperatures
        // with more heat lost through the base.
        for (j, p) in FitParam::ALL.iter().enumerate() {
            let off = (star_v[j] / TRUE_VALUES[j] - 1.0).abs();
            report.push(format!(
                "level {level}: {} pseudo-true {:.4} vs generating {:.4} ({:+.1} %)",
                p.name(),
                star_v[j],
                TRUE_VALUES[j],
                100.0 * (star_v[j] / TRUE_VALUES[j] - 1.0)
            ));
            let allowed = if *p == FitParam::BaseLossFactor {
                0.40
            } else {
                0.15
            };
            if off > allowed {
                failures.push(format!("{} off the generating value by {off:.3}", p.name()));
            }
        }
        report.push(format!(
            "level {level}: pseudo-true fit {} after {} runs",
            star.termination, star.model_runs
        ));
        let results: Vec<Vec<(f64, f64, f64)>> = (0..20u64)
            .into_par_iter()
            .map(|trial| {
                let rec = noisy(&s, 1000 * level as u64 + trial + 1, rel, t_k);
                let cal = Calibrator::new(
                    &s.fit_design,
                    "pilot",
                    &rec,
                    calibrate::calibration_run_options(),
                )
                .unwrap();
                let r = calibrate::calibrate_with(&cal, &rec, &settings).unwrap();
                r.parameters
                    .iter()
                    .map(|p| (p.value, p.ci_low, p.ci_high))
                    .collect()
            })
            .collect();
        for (j, p) in FitParam::ALL.iter().enumerate() {
            let inside = results
                .iter()
                .filter(|r| r[j].1 <= star_v[j] && star_v[j] <= r[j].2)
                .count();
            let widest = results
                .iter()
                .map(|r| (r[j].2 - r[j].1) / r[j].0)
                .fold(0.0, f64::max);
            let mean = results.iter().map(|r| r[j].0).sum::<f64>() / 20.0;
            let sd = (results.iter().map(|r| (r[j].0 - mean).powi(2)).sum::<f64>() / 19.0).sqrt();
            let half = results.iter().map(|r| (r[j].2 - r[j].1) / 2.0).sum::<f64>() / 20.0;
            report.push(format!(
                "   mean {mean:.5} sd {sd:.5} mean half-width {half:.5}"
            ));
            report.push(format!(
                "noise {rel}/{t_k} K: {} covered {inside}/20, widest interval {widest:.4} of value",
                p.name()
            ));
            if inside < 18 {
                failures.push(format!(
                    "{} level {level}: covered in {inside} of 20",
                    p.name()
                ));
            }
            if level == 0 && widest >= 0.10 {
                failures.push(format!("{}: interval {widest} of the value", p.name()));
            }
        }
    }
    eprintln!("{}", report.join("\n"));
    assert!(failures.is_empty(), "{failures:?}");
}

// ---------------------------------------------------------------------------------------
// Published devices (src/calibrate/validation.rs names each source and what was assumed).

/// (name, modelled, published, unit) for every published device: a daily yield
/// [L m⁻² day⁻¹] or, for a laboratory rate, an hourly one [L m⁻² h⁻¹].
fn published_comparisons() -> Vec<(String, f64, f64, &'static str)> {
    published_devices()
        .par_iter()
        .map(|d| {
            let modelled = validation::modelled_figure(d).unwrap();
            (d.name.to_owned(), modelled, d.published, d.basis.unit())
        })
        .collect()
}

#[test]
fn published_devices_within_30_percent_and_model_form_constant() {
    // Sources, conditions and what each paper leaves unsaid: src/calibrate/validation.rs and
    // the design files in designs/validation/ (built into the binary). The default model, no tuning per device.
    let devices = published_devices();
    // The issue asks for basin, wick and multi-effect devices.
    for kind in ["single-slope", "wick", "multi-effect"] {
        assert!(devices.iter().any(|d| d.kind == kind), "no {kind} device");
    }
    let c = published_comparisons();
    for (name, m, p, unit) in &c {
        eprintln!(
            "{name}: model {m:.3} {unit}, published {p:.3} ({:+.1} %)",
            100.0 * (m / p - 1.0)
        );
    }
    for (name, m, p, unit) in &c {
        // ±30 %: the acceptance for reconstructed devices (applied to the
        // multi-effect hourly rate too).
        assert!(
            (m / p - 1.0).abs() <= 0.30,
            "{name}: model {m} {unit}, published {p}"
        );
    }
    let pairs: Vec<(f64, f64)> = c.iter().map(|(_, m, p, _)| (*m, *p)).collect();
    let sd = model_form_relative_sd(&pairs);
    eprintln!(
        "model-form relative sd {sd:.4} over {} devices",
        pairs.len()
    );
    // The constant is this RMS of ln(model/published), rounded to 0.005.
    assert!(
        (sd - MODEL_FORM_RELATIVE_SD).abs() <= 0.005,
        "recomputed {sd}"
    );
}

#[test]
fn model_form_sd_is_the_rms_of_log_ratios() {
    // Arithmetic check of the definition: ln(1.2) = 0.18232, ln(0.8) = -0.22314 (computed
    // here); RMS = sqrt((0.18232² + 0.22314²)/2) = 0.20376.
    let sd = model_form_relative_sd(&[(1.2, 1.0), (0.8, 1.0)]);
    assert!((sd - 0.20376).abs() < 1e-5, "{sd}");
    assert!(model_form_relative_sd(&[]).is_nan());
    assert!(model_form_relative_sd(&[(0.0, 1.0)]).is_nan());
}

#[test]
fn a_missing_variant_is_a_model_error_not_a_panic() {
    let mut d = published_devices()[0];
    d.variant = "no-such-variant";
    let e = validation::modelled_figure(&d).unwrap_err();
    assert!(matches!(e, stillbench::Error::Model { .. }), "{e}");
}

// ---------------------------------------------------------------------------------------
// The command

#[test]
fn calibrate_command_writes_a_calibrated_design_and_charts() {
    let dir = tempfile::tempdir().unwrap();
    let demo = design::DEMO_DESIGN;
    let head = &demo[..demo.find("[[variant]]").unwrap()];
    let lib = designs_dir().join("materials/demo-market.toml");
    let head = head.replace(
        "materials = \"materials/demo-market.toml\"",
        &format!("materials = \"{}\"", lib.display()),
    );
    let text = format!(
        "{head}[[variant]]\n# the pilot built behind the school (comment kept)\nname = \"pilot\"\n\
         kind = \"single-slope\"\nwidth_m = 1.0\nlength_m = 1.0\ncover_azimuth_deg = 180\n\
         cover = \"window-glass-4mm\"\nliner = \"black-epdm\"\ncover_tilt_deg = 15\n\
         brine_depth_mm = 20\n\
         base_insulation = [ {{ material = \"polystyrene-foam\", thickness_mm = 50 }} ]\n\n\
         [variant.calibration.measured]\ndistillate = \"distillate_ml\"\nbrine_c = \"t_brine_c\"\n"
    );
    let design_path = dir.path().join("pilot.toml");
    std::fs::write(&design_path, &text).unwrap();
    let out = dir.path().join("pilot-calibrated.toml");
    let measured = data_dir().join("measured/pilot-demo.csv");
    let run_fit = |fit: &str, extra: &[&str]| {
        assert_cmd::Command::cargo_bin("stillbench")
            .unwrap()
            .arg("calibrate")
            .arg(&design_path)
            .args(["--variant", "pilot", "--measured"])
            .arg(&measured)
            .args(["--fit", fit, "--out"])
            .arg(&out)
            .args(extra)
            .output()
            .unwrap()
    };
    // On this invented record the two factors together push the transmittance factor to its
    // bound: the fit is shown but not written (exit 3), with what to fit instead.
    let both = "distillate_factor,cover_transmittance_factor";
    let refused = run_fit(both, &[]);
    let err = String::from_utf8_lossy(&refused.stderr);
    assert_eq!(refused.status.code(), Some(3), "{err}");
    assert!(
        err.contains("at a bound") && err.contains("fit distillate_factor instead"),
        "{err}"
    );
    assert!(String::from_utf8_lossy(&refused.stdout).contains("AT BOUND"));
    assert!(!out.exists(), "a refused fit writes nothing");
    let run = |extra: &[&str]| run_fit("distillate_factor", extra);
    let first = run(&[]);
    let stdout = String::from_utf8_lossy(&first.stdout);
    assert!(
        first.status.success(),
        "{stdout}\n{}",
        String::from_utf8_lossy(&first.stderr)
    );
    assert!(
        stdout.contains("distillate_factor") && stdout.contains("R²"),
        "{stdout}"
    );
    let written = std::fs::read_to_string(&out).unwrap();
    assert!(written.contains("# the pilot built behind the school (comment kept)"));
    assert!(written.contains("distillate_factor = "), "{written}");
    assert!(
        written.contains("fitted_from = \"pilot-demo.csv\""),
        "{written}"
    );
    // The new design loads and carries the factors.
    let reloaded = design::load_design(&out).unwrap();
    let c = reloaded.design.variants[0].calibration.clone().unwrap();
    assert!(c.distillate_factor.is_some());
    assert!(c.measured.is_some(), "the column mapping survives");
    for chart in ["pilot-calibrated.parity.svg", "pilot-calibrated.series.svg"] {
        let svg = std::fs::read_to_string(dir.path().join(chart)).unwrap();
        assert!(svg.starts_with("<svg") && svg.contains("circle"), "{chart}");
    }
    // Never over an existing file without --force (bad input: exit code 2).
    let again = run(&[]);
    assert_eq!(again.status.code(), Some(2));
    assert!(run(&["--force"]).status.success());
    // JSON carries the report.
    let json = run(&["--force", "--format", "json"]);
    let v: serde_json::Value = serde_json::from_slice(&json.stdout).unwrap();
    assert_eq!(v["parameters"].as_array().unwrap().len(), 1);
    // --force writes the refused fit, and says what it overrode.
    let forced = run_fit(both, &["--force"]);
    assert!(forced.status.success());
    assert!(String::from_utf8_lossy(&forced.stderr).contains("written with --force although"));
    // `check` shows the calibration the design now runs with and where it came from.
    let chk = assert_cmd::Command::cargo_bin("stillbench")
        .unwrap()
        .arg("check")
        .arg(&out)
        .output()
        .unwrap();
    let text = String::from_utf8_lossy(&chk.stdout);
    assert!(chk.status.success(), "{text}");
    assert!(
        text.contains("calibration: distillate_factor")
            && text.contains("fitted from pilot-demo.csv on"),
        "{text}"
    );
    // A measured file that is not there is bad input (exit 2) named once.
    let missing = assert_cmd::Command::cargo_bin("stillbench")
        .unwrap()
        .arg("calibrate")
        .arg(&design_path)
        .args(["--variant", "pilot", "--measured", "no-such-pilot.csv"])
        .output()
        .unwrap();
    let err = String::from_utf8_lossy(&missing.stderr);
    assert_eq!(missing.status.code(), Some(2), "{err}");
    assert!(
        err.contains("no-such-pilot.csv: --measured: cannot read the measured file: no such file"),
        "{err}"
    );
    assert_eq!(err.matches("no such file").count(), 1, "{err}");
}

#[test]
fn distillate_factor_is_bounded_where_it_acts() {
    // The collected share of every condensing surface is capped at 1, so the factor acts up
    // to 1 / (the smallest collected share): for the demo glass basin, whose kind collects
    // less than all it condenses, the ceiling lies between 1 and the file's 1.5.
    let loaded = demo();
    let weather = stillbench::stills::site_weather(&loaded).unwrap();
    let v = &loaded.design.variants[0];
    let hi = stillbench::stills::distillate_factor_upper(&loaded, v, &weather).unwrap();
    assert!(hi > 1.0 && hi < 1.5, "{hi}");
    // Yield rises with the factor all the way up to the ceiling.
    let at = |f: f64| {
        let c = Calibration {
            distillate_factor: Some(f),
            ..Calibration::default()
        };
        one_day(&loaded, &with_cal(v, c), &weather).l_day
    };
    assert!(at(hi) > at(0.5 * (1.0 + hi)) && at(0.5 * (1.0 + hi)) > at(1.0));
    // A design asking for more is refused, by `check` as by a run, naming the field.
    let c = Calibration {
        distillate_factor: Some(hi + 0.05),
        ..Calibration::default()
    };
    let e = stillbench::stills::build_model(&loaded, &with_cal(v, c), &weather).err();
    let msg = e.map(|e| e.to_string()).unwrap_or_default();
    assert!(
        msg.contains("variant[1].calibration.distillate_factor") && msg.contains("no effect above"),
        "{msg}"
    );
}

#[test]
fn student_t_quantile_matches_tables() {
    // Student t, two-sided 95 % (t₀.₉₇₅): 10 dof 2.228, 30 dof 2.042, 120 dof 1.980 (standard
    // tables, from memory); the Cornish–Fisher series is good to 1e-3 from 10 dof up.
    for (dof, table) in [(10, 2.228), (30, 2.042), (120, 1.980)] {
        let t = calibrate::student_t_975(dof);
        assert!((t - table).abs() < 1.5e-3, "{dof}: {t}");
    }
    assert!(calibrate::student_t_975(0).is_infinite());
}

#[test]
fn distillate_alone_cannot_separate_collection_from_transmittance() {
    // Without temperatures both factors only scale the distillate: the fit must say so.
    let s = synthetic();
    let mut rec = noisy(&s, 77, 0.05, 0.3);
    for h in &mut rec.hours {
        h.t_brine_c = None;
        h.t_cover_c = None;
        h.t_liner_c = None;
    }
    let cal = Calibrator::new(
        &s.fit_design,
        "pilot",
        &rec,
        calibrate::calibration_run_options(),
    )
    .unwrap();
    let r = calibrate::calibrate_with(
        &cal,
        &rec,
        &FitSettings {
            params: vec![
                FitParam::DistillateFactor,
                FitParam::CoverTransmittanceFactor,
            ],
            ..FitSettings::default()
        },
    )
    .unwrap();
    assert!(r.correlation[0][1].abs() > 0.95, "{:?}", r.correlation);
    assert!(
        r.warnings
            .iter()
            .any(|w| w.contains("not separately identifiable")),
        "{:?}",
        r.warnings
    );
    assert!(
        r.unfit.iter().any(|u| u.contains("fit only one of them")),
        "such a fit is not written without --force: {:?}",
        r.unfit
    );
    // Daily statistics are reported beside the hourly ones.
    assert!(
        r.statistics
            .iter()
            .any(|st| st.basis == "daily" && st.n >= 12)
    );
}

#[test]
fn write_back_adds_a_calibration_table_to_the_right_variant_and_keeps_the_rest() {
    // The demo design has no calibration table; write factors into its second variant.
    let report = calibrate::CalibrationReport {
        variant: "twin-roof".into(),
        measured_file: "pilot.csv".into(),
        hours: 0,
        parameters: vec![calibrate::FittedParameter {
            param: FitParam::DistillateFactor,
            name: "distillate_factor".into(),
            start: 1.0,
            value: 0.873_456_7,
            std_error: 0.01,
            ci_low: 0.85,
            ci_high: 0.89,
            bounds: (0.2, 1.5),
            at_bound: false,
        }],
        correlation: vec![vec![1.0]],
        statistics: Vec::new(),
        statistics_before: Vec::new(),
        sigma: Vec::new(),
        dof: 10,
        t_quantile: 2.228,
        model_runs: 0,
        termination: String::new(),
        warnings: Vec::new(),
        unfit: Vec::new(),
        data: calibrate::MeasuredSummary::default(),
        overlay: Vec::new(),
    };
    let text = calibrate::calibrated_design_text(
        design::DEMO_DESIGN,
        Path::new("demo-coast.toml"),
        &report,
        "pilot.csv",
        "2026-12-02",
    )
    .unwrap();
    assert!(
        text.contains("# Demo design: an INVENTED village"),
        "comments kept"
    );
    let loaded = design::parse_design_str(&text, Path::new("t.toml"), &designs_dir()).unwrap();
    let vs = &loaded.design.variants;
    assert!(vs[0].calibration.is_none());
    let c = vs[1].calibration.clone().unwrap();
    // Four significant digits.
    assert_eq!(c.distillate_factor, Some(0.8735));
    assert_eq!(c.fitted_on.as_deref(), Some("2026-12-02"));
    assert!(vs[2..].iter().all(|v| v.calibration.is_none()));
    // Every other value is as before.
    let before = design::load_demo().unwrap();
    assert_eq!(before.design.variants.len(), vs.len());
    assert_eq!(before.design.site, loaded.design.site);
}
