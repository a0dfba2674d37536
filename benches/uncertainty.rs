//! The Monte Carlo of issue 8, item 4: 1,000 samples × the five variants of the demo design
//! (designs/demo-coast.toml, the built-in demo), fitting of the daily response model
//! included — the whole `stillbench uncertainty` run apart from loading and printing.
//! Target: under 10 s on the 2-core machine. Also the fitting alone, and the sampling alone
//! over a fitted model (what each extra 1,000 samples cost).
//!
//! Run with `cargo bench --bench uncertainty`.

use stillbench::compare::uncertainty::{UncertaintyOptions, run_uncertainty};
use stillbench::compare::{default_parameters, fit_responses};
use stillbench::design;

fn main() {
    divan::main();
}

fn demo() -> design::LoadedDesign {
    design::load_demo().expect("the demo design loads")
}

/// Fit plus 1,000 samples of all five demo variants.
#[divan::bench(sample_count = 5)]
fn monte_carlo_1000_samples_5_variants(bencher: divan::Bencher) {
    let loaded = demo();
    let opts = UncertaintyOptions {
        samples: 1000,
        seed: 1,
        ..UncertaintyOptions::default()
    };
    bencher.bench(|| run_uncertainty(&loaded, &opts, None).expect("the demo runs"));
}

/// The fitting runs alone (about 20 average-day simulations per variant).
#[divan::bench(sample_count = 5)]
fn fit_5_variants(bencher: divan::Bencher) {
    let loaded = demo();
    let params = default_parameters();
    bencher.bench(|| fit_responses(&loaded, &params, None).expect("the demo fits"));
}
