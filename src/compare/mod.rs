//! Comparing variants: running and costing each one, ranking them on fixed reference scales,
//! the Pareto front, and the audit of a claimed yield.
//!
//! Flow: [`evaluate::evaluate_design`] simulates ([`crate::stills::simulate_variant`]) and
//! costs ([`crate::economics::cost_variant`]) every variant and reduces each to five
//! criterion figures → [`rank::rank`], a pure function over that table, scores them with the
//! user's [`Weights`] against fixed [`Scales`], marks the Pareto front and explains each
//! place. [`audit::audit`] checks a claimed yield against the site's sunlight.
//!
//! Sizing to a demand ([`size`]), parametric sweeps ([`sweep`]), Monte Carlo uncertainty
//! ([`uncertainty`], over the fitted daily [`response`] model) and [`sensitivity`] live here
//! too, each in its own module: they take an [`evaluate::Evaluation`] (which keeps the full
//! simulation and costing) or re-run the pipeline with a changed design value, and feed
//! their figures back through the same [`rank::Candidate`] table.

pub mod audit;
pub mod evaluate;
pub mod rank;
pub mod render;
pub mod response;
pub mod sensitivity;
pub mod size;
pub mod sweep;
pub mod uncertainty;

pub use audit::{Audit, AuditError, Claim, ClaimField, Verdict, audit};
pub use evaluate::{DesignEvaluation, Evaluation, Skipped, evaluate_design, evaluate_variant};
pub use rank::{
    BadList, Candidate, Criterion, CriterionValues, Direction, Ranked, Scales, Weights, dominates,
    pareto_front, rank,
};
pub use response::{
    FittedResponses, ResponseCheck, VariantResponse, fit_responses, validate_response,
};
pub use sensitivity::{SensitivityBar, SensitivityReport, VariantSensitivity, sensitivity};
pub use uncertainty::{
    ParameterKind, Percentiles, UncertainParameter, UncertaintyOptions, UncertaintyReport,
    VariantUncertainty, default_parameters, run_uncertainty,
};
