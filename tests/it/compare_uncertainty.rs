//! Monte Carlo uncertainty, the daily response model and sensitivity: reproducibility on 1
//! and 2 threads, ordered percentiles, collapse to the deterministic result when nothing is
//! uncertain, the response model against full hour-by-hour simulation of held-back
//! stochastic years, physical signs of the sensitivity, and the command-line contract.
//! Few samples and variants keep the runtime small.

use assert_cmd::Command;
use stillbench::compare::uncertainty::{
    self, ParameterKind, Percentiles, UncertaintyOptions, perturbed, quantile_sorted,
};
use stillbench::compare::{fit_responses, run_uncertainty, sensitivity, validate_response};
use stillbench::design::{self, LoadedDesign, VariantKind};
use stillbench::stills::{self, RunOptions};

/// The demo design reduced to the variants of the given kinds.
fn demo_with(kinds: &[&str]) -> LoadedDesign {
    let mut loaded = design::load_demo().unwrap();
    loaded
        .design
        .variants
        .retain(|v| kinds.contains(&v.kind.name()));
    assert_eq!(loaded.design.variants.len(), kinds.len());
    loaded
}

fn quiet_options(samples: u32, seed: u64) -> UncertaintyOptions {
    UncertaintyOptions {
        samples,
        seed,
        ..UncertaintyOptions::default()
    }
}

#[test]
fn percentiles_follow_the_linear_definition() {
    // numpy 2.4.6, numpy.percentile(range(1, 11), [10, 50, 90]) (default "linear", Hyndman &
    // Fan definition 7) = [1.9, 5.5, 9.1]; exact decimal results, so 1e-12 covers rounding.
    let v: Vec<f64> = (1..=10).map(f64::from).collect();
    let p = Percentiles::of(&v);
    assert!((p.p10 - 1.9).abs() < 1e-12 && (p.p50 - 5.5).abs() < 1e-12);
    assert!((p.p90 - 9.1).abs() < 1e-12);
    // numpy.percentile([3, 1, 2], [10, 50, 90]) = [1.2, 2.0, 2.8]: unsorted input is sorted.
    let p = Percentiles::of(&[3.0, 1.0, 2.0]);
    assert!((p.p10 - 1.2).abs() < 1e-12 && (p.p50 - 2.0).abs() < 1e-12);
    assert!((p.p90 - 2.8).abs() < 1e-12);
    assert!((quantile_sorted(&[4.0], 0.9) - 4.0).abs() < 1e-12);
}

#[test]
fn parameter_low_and_high_are_p10_and_p90() {
    // Standard normal quantile of 0.9 = 1.2815516 (Abramowitz & Stegun Table 26.1, from memory).
    for p in uncertainty::default_parameters() {
        let lo = p.low();
        let hi = p.high();
        assert!(lo < p.nominal() && p.nominal() < hi, "{:?}", p.kind);
        match p.kind.effect() {
            uncertainty::Effect::Offset => {
                assert!((hi - 1.281_551_6 * p.spread).abs() < 1e-6);
            }
            uncertainty::Effect::Multiplier => assert!(lo > 0.0),
        }
        assert!(!p.source.is_empty());
    }
}

#[test]
fn a_draw_changes_a_clone_and_skips_what_does_not_apply() {
    let loaded = demo_with(&["single-slope", "multi-effect"]);
    let base = stills::site_weather(&loaded).unwrap();
    let values = [
        (ParameterKind::CollectionEfficiency, -0.1),
        (ParameterKind::VapourLeakage, 0.02),
        (ParameterKind::Wind, 1.5),
        (ParameterKind::CoverTransmittance, 0.9),
    ];
    let (d, w) = perturbed(&loaded, 0, &base, &values).unwrap();
    let VariantKind::SingleSlope(k0) = &loaded.design.variants[0].kind else {
        panic!("demo order changed")
    };
    let VariantKind::SingleSlope(k) = &d.design.variants[0].kind else {
        panic!("kind changed")
    };
    assert!((k.collection_efficiency - (k0.collection_efficiency - 0.1)).abs() < 1e-12);
    assert!((k.vapour_leakage - (k0.vapour_leakage + 0.02)).abs() < 1e-12);
    assert!((k.soiling_transmittance - k0.soiling_transmittance * 0.9).abs() < 1e-12);
    let noon = base
        .series
        .hours
        .iter()
        .position(|h| h.ghi_w_m2 > 100.0)
        .unwrap();
    assert!((w.series.hours[noon].wind_m_s - 1.5 * base.series.hours[noon].wind_m_s).abs() < 1e-9);
    // Single slope: transmittance through its soiling field, so the sunlight is unchanged.
    assert!((w.series.hours[noon].ghi_w_m2 - base.series.hours[noon].ghi_w_m2).abs() < 1e-9);
    // Multi-effect: no leakage field (ignored), transmittance through the sunlight.
    assert!(!ParameterKind::VapourLeakage.applies_to(&loaded.design.variants[1]));
    let (_, w1) = perturbed(&loaded, 1, &base, &values).unwrap();
    assert!((w1.series.hours[noon].ghi_w_m2 - 0.9 * base.series.hours[noon].ghi_w_m2).abs() < 1e-9);
    // The original is untouched.
    assert_eq!(
        loaded.design.variants[0],
        design::load_demo().unwrap().design.variants[0]
    );
}

#[test]
fn same_seed_same_figures_on_one_and_two_threads() {
    let loaded = demo_with(&["single-slope", "wick"]);
    let opts = quiet_options(64, 42);
    let run = |threads: usize| {
        rayon::ThreadPoolBuilder::new()
            .num_threads(threads)
            .build()
            .unwrap()
            .install(|| run_uncertainty(&loaded, &opts, None).unwrap())
    };
    let one = run(1);
    let two = run(2);
    // Bit-for-bit: the reduction is in sample order.
    assert_eq!(one, two);
    let other = run_uncertainty(&loaded, &quiet_options(64, 43), None).unwrap();
    assert_ne!(
        one.variants, other.variants,
        "another seed gives other figures"
    );
}

#[test]
fn percentiles_are_ordered_and_spread_collapses_when_nothing_is_uncertain() {
    let loaded = demo_with(&["single-slope", "double-slope"]);
    let rep = run_uncertainty(&loaded, &quiet_options(100, 7), None).unwrap();
    for v in &rep.variants {
        for p in [
            v.annual_l_m2,
            v.mean_l_day,
            v.worst_month_l_m2_day,
            v.worst_month_l_day,
        ] {
            assert!(p.p10 <= p.p50 && p.p50 <= p.p90, "{}: {p:?}", v.name);
        }
        assert!(
            v.annual_l_m2.p90 > v.annual_l_m2.p10,
            "{}: no spread at all",
            v.name
        );
    }
    // Every spread zero, no model-form term, average-day weather: every sample is the
    // deterministic result, which is the ordinary simulation's (compare's) figure.
    let mut opts = quiet_options(20, 7);
    opts.model_form_sd = 0.0;
    opts.stochastic_weather = false;
    for p in &mut opts.parameters {
        p.spread = 0.0;
    }
    let rep = run_uncertainty(&loaded, &opts, None).unwrap();
    let weather = stills::site_weather(&loaded).unwrap();
    for (v, variant) in rep.variants.iter().zip(&loaded.design.variants) {
        let sim =
            stills::simulate_variant(&loaded, variant, &weather, &RunOptions::default()).unwrap();
        // Same simulation, sums in another order: 1e-9 relative covers rounding.
        let tol = 1e-9 * sim.annual_l_m2;
        assert!((v.deterministic_annual_l_m2 - sim.annual_l_m2).abs() < tol);
        for x in [v.annual_l_m2.p10, v.annual_l_m2.p50, v.annual_l_m2.p90] {
            assert!(
                (x - sim.annual_l_m2).abs() < tol,
                "{}: {x} vs {}",
                v.name,
                sim.annual_l_m2
            );
        }
        let w = sim.worst_month.l_m2_day;
        for x in [v.worst_month_l_m2_day.p10, v.worst_month_l_m2_day.p90] {
            assert!((x - w).abs() < 1e-9 * w);
        }
    }
}

#[test]
fn response_model_matches_full_simulation_of_held_back_years() {
    // The requirement (issue 8, item 4): under 3 % on held-back data. Held-back years
    // come from seed 90210, never used for fitting (fitting uses no random years at all).
    let loaded = demo_with(&["single-slope", "double-slope"]);
    let params = uncertainty::default_parameters();
    let fit = fit_responses(&loaded, &params, None).unwrap();
    for r in &fit.responses {
        let c = validate_response(&loaded, &fit, r, 90_210, 2).unwrap();
        eprintln!("{c:?}");
        assert!(c.max_annual_rel_error < 0.03, "{c:?}");
        assert!(c.mean_month_rel_error < 0.03, "{c:?}");
        assert!(c.max_month_rel_error < 0.03, "{c:?}");
    }
}

#[test]
fn sensitivity_signs_are_physical() {
    let loaded = demo_with(&["single-slope", "wick"]);
    let rep = sensitivity(&loaded, &UncertaintyOptions::default()).unwrap();
    assert_eq!(rep.variants.len(), 2);
    for v in &rep.variants {
        let bar = |key: &str| v.bars.iter().find(|b| b.parameter == key).unwrap();
        // More sunlight through the cover, better collection, blacker absorber → more water.
        for key in [
            "cover-transmittance",
            "collection-efficiency",
            "absorptance",
        ] {
            assert!(
                bar(key).change_l_m2 > 0.0,
                "{}: {key} {:?}",
                v.name,
                bar(key)
            );
        }
        // More leakage, worse insulation → less water.
        for key in ["vapour-leakage", "insulation-conductivity"] {
            assert!(
                bar(key).change_l_m2 < 0.0,
                "{}: {key} {:?}",
                v.name,
                bar(key)
            );
        }
        for w in v.bars.windows(2) {
            assert!(
                w[0].change_l_m2.abs() >= w[1].change_l_m2.abs(),
                "ranked by swing"
            );
        }
    }
}

#[test]
fn cli_rejects_zero_samples_naming_the_option() {
    let out = Command::cargo_bin("stillbench")
        .unwrap()
        .args(["uncertainty", "--samples", "0"])
        .output()
        .unwrap();
    assert_eq!(out.status.code(), Some(2));
    assert!(String::from_utf8_lossy(&out.stderr).contains("--samples"));
}

#[test]
fn cli_json_quotes_the_same_figures_as_compare_for_the_same_seed() {
    let demo = concat!(env!("CARGO_MANIFEST_DIR"), "/designs/demo-coast.toml");
    let json = |args: &[&str]| -> serde_json::Value {
        let out = Command::cargo_bin("stillbench")
            .unwrap()
            .args(args)
            .output()
            .unwrap();
        assert!(
            out.status.success(),
            "{}",
            String::from_utf8_lossy(&out.stderr)
        );
        serde_json::from_slice(&out.stdout).unwrap()
    };
    let u = json(&[
        "uncertainty",
        demo,
        "--samples",
        "40",
        "--seed",
        "5",
        "--format",
        "json",
    ]);
    let c = json(&[
        "compare",
        demo,
        "--samples",
        "40",
        "--seed",
        "5",
        "--format",
        "json",
    ]);
    // Regression: every demo variant gets figures (tray-steps was once dropped when one of
    // its fitting runs settled slowly; such runs are now retried, or left out with a note).
    assert_eq!(
        u["variants"].as_array().map(Vec::len),
        Some(5),
        "{}",
        u["skipped"]
    );
    let uv = &u["variants"][0];
    let cv = c["uncertainty"]["variants"]
        .as_array()
        .unwrap()
        .iter()
        .find(|v| v["name"] == uv["name"])
        .unwrap();
    assert_eq!(uv["annual_l_m2"], cv["annual_l_m2"]);
    assert!(
        u["sensitivity"]["variants"][0]["bars"]
            .as_array()
            .is_some_and(|b| !b.is_empty())
    );
}
