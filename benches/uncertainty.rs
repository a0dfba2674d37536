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

/// `size` on the demo by the daily response model: 20 stochastic years × 5 variants, 200
/// people at 3 L (fitting of the clearness levels included).
#[divan::bench(sample_count = 5)]
fn size_demo_response(bencher: divan::Bencher) {
    use stillbench::compare::size::{SizeMethod, SizeOptions, size_design_by};
    let loaded = demo();
    let opts = SizeOptions {
        demand_l_day: 600.0,
        confidence: 0.9,
        years: 20,
        seed: 1,
    };
    let run = stillbench::stills::RunOptions::default();
    bencher.bench(|| {
        size_design_by(&loaded, &opts, &run, SizeMethod::Response).expect("the demo sizes")
    });
}
