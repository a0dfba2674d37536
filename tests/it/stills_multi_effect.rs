//! The multi-effect diffusion still on the shared network.

use std::path::{Path, PathBuf};

use proptest::prelude::*;
use stillbench::design::{self, LoadedDesign};
use stillbench::stills::{self, KindDetails, MonthResult, RunOptions, VariantResult};

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
    assert!(r.energy_residual < 1e-3);
}
