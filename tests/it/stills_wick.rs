//! The tilted wick still on the shared network.
//!
//! Physical-law checks (energy closes, no NaN or negative yield, dry hours when the feed is
//! below the evaporation) and checks of physical sense against published ranges; every
//! number names its source or is marked common practice.

use std::path::{Path, PathBuf};

use proptest::prelude::*;
use stillbench::design::{self, LoadedDesign};
use stillbench::stills::{self, KindDetails, MonthResult, RunOptions, VariantResult};

fn designs_dir() -> PathBuf {
    Path::new(env!("CARGO_MANIFEST_DIR")).join("designs")
}

/// The demo site (invented) with one wick variant whose kind fields are `fields`.
fn design_with(fields: &str) -> LoadedDesign {
    let demo = design::DEMO_DESIGN;
    let head_end = demo.find("[[variant]]").unwrap();
    let head = &demo[..head_end];
    let text = format!(
        "{head}[[variant]]\nname = \"test\"\nkind = \"wick\"\nwidth_m = 0.9\nlength_m = 2.0\n\
         cover_azimuth_deg = 180\ncover = \"window-glass-3mm\"\ncloth = \"jute-cloth\"\n{fields}\n"
    );
    design::parse_design_str(&text, Path::new("test.toml"), &designs_dir()).unwrap()
}

const BASE: &str = "cover_tilt_deg = 20\ngap_mm = 30\n\
    backing_insulation = [ { material = \"polystyrene-foam\", thickness_mm = 40 } ]";

fn one_day(loaded: &LoadedDesign, month: u32) -> (MonthResult, KindDetails) {
    let w = stills::site_weather(loaded).unwrap();
    let v = &loaded.design.variants[0];
    let model = stills::build_model(loaded, v, &w).unwrap().unwrap();
    stills::run_single_day_with_details(model.as_ref(), &v.name, &w, month, &RunOptions::default())
        .unwrap()
}

fn check_sane(r: &VariantResult) {
    for m in &r.months {
        // DESIGN.md "The shared model": residual below 0.1 % of the absorbed sunlight.
        assert!(m.energy.residual_fraction < 1e-3, "month {}", m.month);
        for v in [m.l_m2_day, m.efficiency, m.max_brine_c, m.max_cover_c] {
            assert!(v.is_finite() && v >= 0.0, "month {}: {v}", m.month);
        }
        // REFERENCES.md §8: a single-effect still stays below its ceiling.
        assert!(m.l_m2_day < m.ceiling_l_m2_day, "month {}", m.month);
    }
}

#[test]
fn wick_demo_months_close_their_energy_balance() {
    let loaded = design::load_demo().unwrap();
    let w = stills::site_weather(&loaded).unwrap();
    let v = loaded
        .design
        .variants
        .iter()
        .find(|v| v.kind.name() == "wick")
        .unwrap();
    let r = stills::simulate_variant(&loaded, v, &w, &RunOptions::default()).unwrap();
    check_sane(&r);
    eprintln!(
        "demo wick: mean {:.2} L/m²/day, April {:.2} (eff {:.3}), details {:?}",
        r.mean_l_m2_day, r.months[3].l_m2_day, r.months[3].efficiency, r.details
    );
    assert!(r.energy_residual < 1e-3);
}
