//! The thermal network every still variant builds, and the one solver that runs it.
//!
//! A variant describes its still as **nodes** (unknown temperature; fixed heat capacity and,
//! for brine or a wick, a water mass that changes), **boundaries** (ambient air, sky, ground,
//! feed water: temperatures given each step), **links** (fixed or temperature-dependent
//! conductance, radiation, and the humid enclosure that carries vapour and latent heat), and
//! per-node **sources** (absorbed sunlight). It builds a [`Network`] with
//! [`NetworkBuilder`] and hands it to [`Solver`] (one step) or [`Simulation`] (adaptive
//! steps with the energy balance booked); it holds no solver code of its own.
//!
//! ```
//! use std::sync::Arc;
//! use stillbench::network::*;
//!
//! let mut b = NetworkBuilder::new();
//! let air = b.boundary("ambient air");
//! let sky = b.boundary("sky");
//! let ground = b.boundary("ground");
//! let cover = b.node("cover", 7_500.0);
//! let brine = b.water_node("brine", 0.0, 0.01);
//! let liner = b.node("liner", 4_000.0);
//! b.conductance("cover to air", cover, air, 10.0, LossPath::CoverToAir);
//! b.radiation("cover to sky", cover, sky, 0.9, LossPath::CoverToSky);
//! b.enclosure("brine to cover", brine, cover, 1.0,
//!     Arc::new(FixedCoefficientEnclosure { h_convective_w_m2_k: 2.5,
//!         lewis_factor_k_pa: DUNKLE_LEWIS_FACTOR_K_PA }), 0.9, 0.02);
//! b.radiation("brine to cover radiation", brine, cover, 0.82, LossPath::Internal);
//! b.conductance("liner to brine", liner, brine, 150.0, LossPath::Internal);
//! b.conductance("base", liner, ground, 0.62, LossPath::Base);
//! let net = b.build().unwrap();
//!
//! let mut state = net.initial_state(298.15).unwrap();
//! state.set_brine(&net, brine, 20.0, 35.0).unwrap();
//! let mut inputs = net.inputs(298.15).unwrap();
//! inputs.set_boundary_k(&net, sky, 283.0).unwrap();
//! inputs.set_source_w(&net, brine, 250.0).unwrap();
//! inputs.set_source_w(&net, liner, 400.0).unwrap();
//!
//! let mut sim = Simulation::new(&net, state, SolverSettings::default(),
//!     StepControl::default()).unwrap();
//! sim.advance(&inputs, 3600.0).unwrap();
//! assert!(sim.balance().distillate_kg > 0.0);
//! sim.checked_balance().unwrap();
//! ```

mod balance;
mod band;
mod build;
mod drive;
mod models;
mod solver;
mod state;
mod table;

pub use balance::{BalanceError, EnergyBalance, MAX_BALANCE_RESIDUAL_FRACTION};
pub use build::{
    BoundaryId, End, Link, LinkId, LinkKind, LossPath, Network, NetworkBuilder, NetworkError, Node,
    NodeId,
};
pub use drive::{AdvanceError, AdvanceSummary, Simulation, StepControl};
pub use models::{
    ConductanceModel, CorrelationEnclosure, DUNKLE_LEWIS_FACTOR_K_PA, EnclosureFlux,
    EnclosureModel, FixedCoefficientEnclosure, LinkFlow, PowerLawConductance, SALT_SATURATION_G_KG,
    SeawaterProperties, SimpleWater, WaterProperties, supply_cap,
};
pub use solver::{
    FED_WICK_CAP_WIDTH_SHARE, FailReason, LinkRecord, NodeRecord, Solver, SolverSettings,
    StepEvent, StepOutcome, StepRecord,
};
pub use state::{Inputs, State, TEMPERATURE_RANGE_K};
pub(crate) use state::{crust_kg, dissolved_salinity};
