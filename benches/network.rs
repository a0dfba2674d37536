//! Micro-benchmarks of the network solver: one implicit step of a basin-like network and of
//! multi-stage chains. Run with `cargo bench --bench network`.

use std::sync::Arc;

use divan::Bencher;
use stillbench::network::*;
use stillbench::physics::heat_transfer::{EnclosureAir, InternalCorrelation};

fn main() {
    divan::main();
}

/// Air in a still near 320 K (Incropera & DeWitt Table A.4, interpolated, from memory).
fn air(gap_m: f64) -> EnclosureAir {
    EnclosureAir {
        conductivity_w_m_k: 0.0278,
        kinematic_viscosity_m2_s: 17.9e-6,
        prandtl: 0.705,
        total_pressure_pa: 101_325.0,
        characteristic_length_m: gap_m,
    }
}

/// Cover, brine, liner under midday sun, 60 s step (invented values, as in the tests).
fn basin() -> (Network, State, Inputs) {
    let mut b = NetworkBuilder::new();
    let air_b = b.boundary("ambient air");
    let sky = b.boundary("sky");
    let ground = b.boundary("ground");
    let cover = b.node("cover", 6_300.0);
    let brine = b.water_node("brine", 0.0, 0.01);
    let liner = b.node("liner", 4_000.0);
    b.conductance("cover to air", cover, air_b, 8.8, LossPath::CoverToAir);
    b.radiation("cover to sky", cover, sky, 0.88, LossPath::CoverToSky);
    b.enclosure(
        "brine to cover",
        brine,
        cover,
        1.0,
        Arc::new(CorrelationEnclosure {
            correlation: InternalCorrelation::Dunkle,
            air: air(0.3),
        }),
        0.9,
        0.02,
    );
    b.radiation(
        "brine to cover, radiation",
        brine,
        cover,
        0.82,
        LossPath::Internal,
    );
    b.conductance("liner to brine", liner, brine, 150.0, LossPath::Internal);
    b.conductance("base", liner, ground, 0.62, LossPath::Base);
    let net = b.build().expect("basin network");
    let mut state = net.initial_state(318.0).expect("state");
    state.set_brine(&net, brine, 20.0, 35.0).expect("brine");
    state.set_temperature_k(&net, cover, 310.0).expect("cover");
    let mut inputs = net.inputs(303.0).expect("inputs");
    inputs.set_boundary_k(&net, sky, 288.0).expect("sky");
    inputs.set_source_w(&net, cover, 45.0).expect("sun");
    inputs.set_source_w(&net, brine, 270.0).expect("sun");
    inputs.set_source_w(&net, liner, 585.0).expect("sun");
    (net, state, inputs)
}

/// A multi-effect stack: absorber under glazing, then `stages` × (wick, plate) with the
/// plate of each stage heating the next stage's wick; the last plate rejects to air.
/// Nodes are numbered along the chain, so the Jacobian is banded.
fn stack(stages: usize) -> (Network, State, Inputs) {
    let mut b = NetworkBuilder::new();
    let air_b = b.boundary("ambient air");
    let sky = b.boundary("sky");
    let glazing = b.node("glazing", 2_000.0);
    let absorber = b.node("absorber", 1_500.0);
    b.conductance("glazing to air", glazing, air_b, 8.0, LossPath::CoverToAir);
    b.radiation("glazing to sky", glazing, sky, 0.85, LossPath::CoverToSky);
    b.conductance(
        "absorber to glazing",
        absorber,
        glazing,
        3.0,
        LossPath::Internal,
    );
    let mut prev = absorber;
    let mut wicks = Vec::new();
    for s in 0..stages {
        let wick = b.water_node(&format!("wick {s}"), 200.0, 0.001);
        let plate = b.node(&format!("plate {s}"), 900.0);
        b.conductance(
            &format!("contact {s}"),
            prev,
            wick,
            400.0,
            LossPath::Internal,
        );
        b.enclosure(
            &format!("gap {s}"),
            wick,
            plate,
            1.0,
            Arc::new(CorrelationEnclosure {
                correlation: InternalCorrelation::InclinedEnclosure { tilt_rad: 0.3 },
                air: air(0.004),
            }),
            0.95,
            0.0,
        );
        b.conductance(&format!("edge {s}"), plate, air_b, 0.3, LossPath::Edge);
        wicks.push(wick);
        prev = plate;
    }
    b.conductance("sink", prev, air_b, 40.0, LossPath::Other);
    let net = b.build().expect("stack network");
    let mut state = net.initial_state(320.0).expect("state");
    for (i, w) in wicks.iter().enumerate() {
        state
            .set_temperature_k(&net, *w, 345.0 - 2.5 * i as f64)
            .expect("wick temperature");
        state.set_brine(&net, *w, 0.3, 35.0).expect("brine");
    }
    let mut inputs = net.inputs(303.0).expect("inputs");
    inputs.set_boundary_k(&net, sky, 288.0).expect("sky");
    inputs.set_source_w(&net, absorber, 800.0).expect("sun");
    (net, state, inputs)
}

/// Time one step of `dt_s` from `state` after `warm_steps` steps of the same length, so a
/// warm start measures a step in the middle of a simulation (small change per step) and a
/// cold start the first step from an invented state.
fn bench_step(
    bencher: Bencher,
    (net, mut state, inputs): (Network, State, Inputs),
    dt_s: f64,
    warm_steps: usize,
) {
    let mut solver = Solver::new(&net, SolverSettings::default()).expect("solver");
    let mut rec = StepRecord::new(&net);
    for _ in 0..warm_steps {
        assert!(matches!(
            solver.step(&mut state, &inputs, dt_s, &mut rec),
            StepOutcome::Converged { .. }
        ));
    }
    // Check once that the benchmarked step converges, so a failure cannot look fast.
    let mut probe = state.clone();
    let outcome = solver.step(&mut probe, &inputs, dt_s, &mut rec);
    assert!(matches!(outcome, StepOutcome::Converged { .. }));
    bencher
        .with_inputs(|| state.clone())
        .bench_local_refs(|s| solver.step(s, &inputs, dt_s, &mut rec));
}

/// One 60 s implicit step of the 3-node basin in a running simulation (target < 2 µs).
#[divan::bench]
fn basin_step(bencher: Bencher) {
    bench_step(bencher, basin(), 60.0, 10);
}

/// The basin's first step from an invented state.
#[divan::bench]
fn basin_step_cold(bencher: Bencher) {
    bench_step(bencher, basin(), 60.0, 0);
}

/// The basin's steady state from the invented state (Δt = ∞, same Newton code).
#[divan::bench]
fn basin_steady_state(bencher: Bencher) {
    bench_step(bencher, basin(), f64::INFINITY, 0);
}

/// One 30 s step of a 10-stage stack in a running simulation: 22 unknowns, banded
/// (target < 10 µs).
#[divan::bench]
fn stack_10_stage_step(bencher: Bencher) {
    bench_step(bencher, stack(10), 30.0, 20);
}

/// The 10-stage stack's first step from an invented state.
#[divan::bench]
fn stack_10_stage_step_cold(bencher: Bencher) {
    bench_step(bencher, stack(10), 30.0, 0);
}

/// One 30 s step of a 3-stage stack (8 unknowns) in a running simulation.
#[divan::bench]
fn stack_3_stage_step(bencher: Bencher) {
    bench_step(bencher, stack(3), 30.0, 20);
}
