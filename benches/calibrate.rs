//! Calibration of a two-week hourly pilot record (issue 10: under 5 s on this machine).
//!
//! The record is invented: the demo site, a 1 m² single-slope pilot, sunny days of varying
//! clearness, and distillate and temperatures from the model itself with known factors plus
//! a deterministic ripple, so the fit has work to do. All four default parameters are fitted
//! with the default settings (weights re-estimated after a first pass).

use std::path::Path;

use stillbench::calibrate::{self, Calibrator, FitParam, FitSettings, MeasuredRecord};
use stillbench::design::{self, LoadedDesign, MeasuredColumns};
use stillbench::stills::RunOptions;

fn main() {
    divan::main();
}

fn pilot() -> LoadedDesign {
    let demo = design::DEMO_DESIGN;
    let head = &demo[..demo.find("[[variant]]").unwrap_or(demo.len())];
    let text = format!(
        "{head}[[variant]]\nname = \"pilot\"\nkind = \"single-slope\"\nwidth_m = 1.0\n\
         length_m = 1.0\ncover_azimuth_deg = 180\ncover = \"window-glass-4mm\"\n\
         liner = \"black-epdm\"\ncover_tilt_deg = 15\nbrine_depth_mm = 20\n\
         base_insulation = [ {{ material = \"polystyrene-foam\", thickness_mm = 50 }} ]\n"
    );
    let dir = Path::new(env!("CARGO_MANIFEST_DIR")).join("designs");
    design::parse_design_str(&text, Path::new("pilot.toml"), &dir).expect("pilot design")
}

fn csv(days: u32) -> String {
    let mut s = String::from("timestamp,poa_w_m2,ghi_w_m2,t_air_c,wind_m_s,distillate\n");
    for d in 0..days {
        let f = 0.6 + 0.4 * ((f64::from(d) * 1.7).sin() * 0.5 + 0.5);
        for h in 1..=24u32 {
            let (dd, hh) = if h == 24 { (d + 1, 0) } else { (d, h) };
            let lat = 14.2f64.to_radians();
            let n = 59.0 + f64::from(d);
            let decl =
                (23.45f64 * (2.0 * std::f64::consts::PI * (284.0 + n) / 365.0).sin()).to_radians();
            let w = ((f64::from(h) - 0.5 - 0.573 - 12.0) * 15.0).to_radians();
            let el = lat.sin() * decl.sin() + lat.cos() * decl.cos() * w.cos();
            let g = if el > 0.0 {
                900.0 * el.powf(1.2) * f
            } else {
                0.0
            };
            let t = 25.0 + 4.0 * ((f64::from(h) - 9.0) / 24.0 * 2.0 * std::f64::consts::PI).sin();
            s.push_str(&format!(
                "2026-03-{:02}T{:02}:00,{:.1},{:.1},{t:.2},3.0,0\n",
                dd + 1,
                hh,
                1.03 * g,
                g
            ));
        }
    }
    s
}

fn record(loaded: &LoadedDesign) -> MeasuredRecord {
    let v = &loaded.design.variants[0];
    let mut rec = calibrate::parse_measured_bytes(
        csv(14).as_bytes(),
        Path::new("pilot.csv"),
        &MeasuredColumns::default(),
        &loaded.design.site.location(),
        v.cover_planes()[0].1,
        1.0,
    )
    .expect("record");
    let cal = Calibrator::new(loaded, "pilot", &rec, RunOptions::default()).expect("calibrator");
    let truth = cal
        .simulate(&FitParam::ALL, &[0.85, 0.92, 0.75, 2.0])
        .expect("truth");
    for (i, (m, h)) in rec.hours.iter_mut().zip(&truth).enumerate() {
        let ripple = ((i as f64) * 2.3).sin();
        m.distillate_kg = Some(h.distillate_l * (1.0 + 0.05 * ripple));
        m.t_brine_c = Some(h.t_brine_c + 0.3 * ripple);
        m.t_cover_c = Some(h.t_cover_c - 0.3 * ripple);
    }
    rec
}

#[divan::bench(sample_count = 5)]
fn two_week_hourly_record(bencher: divan::Bencher) {
    let loaded = pilot();
    let rec = record(&loaded);
    bencher.bench_local(|| {
        calibrate::calibrate(&loaded, "pilot", &rec, &FitSettings::default()).expect("fit")
    });
}
