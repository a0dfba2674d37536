//! Economics and build: quantities from geometry, a priced bill of materials, a cut list,
//! build complexity and steps, and cost per litre over the life.
//!
//! Flow: [`takeoff::takeoff`] turns a variant's geometry into needs (each with the formula it
//! came from) → [`bom::price`] picks library items, nests sheets and bars
//! ([`cutlist`]), converts units and prices each line → [`complexity`] scores the build and
//! writes the steps → [`cost::cost_variant`] adds labour, replacements, upkeep, the operator's time
//! ([`operator`]), salvage and,
//! when the simulation gives a yield, the cost per litre ([`finance`]).
//!
//! Errors a user can cause (an item missing from the library, a unit that cannot hold the
//! quantity) come back as [`crate::design::DesignErrors`] naming the item, the field and the
//! file.

pub mod bom;
pub mod complexity;
pub mod cost;
pub mod cutlist;
pub mod finance;
pub mod operator;
pub mod takeoff;

pub use cost::{
    SubstituteRun, VariantCost, YieldEstimate, cost_of, cost_of_units, cost_variant,
    cost_variant_for_units, substitute, substitutes,
};
pub use finance::{annualised_cost, capital_recovery_factor, cost_per_litre, sinking_fund_factor};
pub use operator::{OperatorTime, UnitTask, operator_time};
