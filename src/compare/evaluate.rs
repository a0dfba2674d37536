//! Running and costing every variant of a design, and turning each into the criterion
//! figures the ranking needs.

use serde::Serialize;

use super::rank::{Candidate, CriterionValues};
use crate::design::LoadedDesign;
use crate::economics::{self, VariantCost, YieldEstimate};
use crate::error::Error;
use crate::stills::{self, RunOptions, SiteWeather, VariantResult};

/// One variant simulated, costed and reduced to its criterion figures.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct Evaluation {
    /// Variant name.
    pub name: String,
    /// Kind name as in design files.
    pub kind: String,
    /// Footprint \[m²\].
    pub footprint_m2: f64,
    /// The criterion figures.
    pub values: CriterionValues,
    /// Worst month, 1…12.
    pub worst_month: u32,
    /// Distillate of the whole still on a mean day of the worst month [L day⁻¹].
    pub worst_month_l_day: f64,
    /// Capital cost [currency].
    pub capital: f64,
    /// Library items not sold locally.
    pub not_local: Vec<String>,
    /// The full simulation (for sizing and reports).
    #[serde(skip)]
    pub result: VariantResult,
    /// The full costing.
    #[serde(skip)]
    pub cost: VariantCost,
}

impl Evaluation {
    /// The row the ranking core takes.
    pub fn candidate(&self) -> Candidate {
        Candidate {
            name: self.name.clone(),
            values: self.values,
            not_local: self.not_local.clone(),
        }
    }
}

/// A variant left out of the ranking, and why.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct Skipped {
    /// Variant name.
    pub name: String,
    /// Why it has no figures.
    pub reason: String,
}

impl Skipped {
    /// The error when every variant was skipped: names the first one and why, and what could
    /// not be done (`doing`: "compared", "sized", "fitted").
    pub fn none_left(skipped: &[Skipped], doing: &str) -> Error {
        let (variant, reason) = skipped.first().map_or_else(
            || (String::new(), "the design has no variants".to_owned()),
            |s| (s.name.clone(), s.reason.clone()),
        );
        Error::Model {
            variant,
            at: String::new(),
            reason: format!("no variant could be {doing}: {reason}"),
        }
    }
}

/// Every variant of a design: the ones with figures and the ones without.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct DesignEvaluation {
    /// Currency of every money figure.
    pub currency: String,
    /// Variants with all five figures, in design order.
    pub evaluated: Vec<Evaluation>,
    /// Variants without, in design order.
    pub skipped: Vec<Skipped>,
}

impl DesignEvaluation {
    /// The ranking rows.
    pub fn candidates(&self) -> Vec<Candidate> {
        self.evaluated.iter().map(Evaluation::candidate).collect()
    }
}

/// Why a variant cannot be ranked, or its evaluation.
enum Outcome {
    Done(Box<Evaluation>),
    Skip(String),
}

/// Simulate and cost variant `index` (0-based).
///
/// Errors: [`Error::Design`] for a bad index or a costing problem (an item missing from the
/// library); [`Error::Model`] when the simulation cannot give a trustworthy result, or when a
/// figure is missing (no cost per litre, no water in the worst month).
pub fn evaluate_variant(
    loaded: &LoadedDesign,
    index: usize,
    weather: &SiteWeather,
    opts: &RunOptions,
) -> Result<Evaluation, Error> {
    match evaluate_one(loaded, index, weather, opts)? {
        Outcome::Done(e) => Ok(*e),
        Outcome::Skip(reason) => Err(Error::Model {
            variant: loaded
                .design
                .variants
                .get(index)
                .map_or_else(String::new, |v| v.name.clone()),
            at: String::new(),
            reason,
        }),
    }
}

fn evaluate_one(
    loaded: &LoadedDesign,
    index: usize,
    weather: &SiteWeather,
    opts: &RunOptions,
) -> Result<Outcome, Error> {
    // cost_variant reports a bad index as a design error.
    let Some(v) = loaded.design.variants.get(index) else {
        economics::cost_variant(loaded, index, None)?;
        return Ok(Outcome::Skip(format!("no variant number {}", index + 1)));
    };
    let result = match stills::simulate_variant(loaded, v, weather, opts) {
        Ok(r) => r,
        Err(Error::Model { reason, at, .. }) => return Ok(Outcome::Skip(format!("{reason}{at}"))),
        Err(e) => return Err(e),
    };
    let y = YieldEstimate::from_simulation(&result, loaded.design.costs.commissioning_kwh_m2_day);
    let cost = economics::cost_variant(loaded, index, Some(&y))?;
    let Some(cost_per_l) = cost.cost.cost_per_litre.filter(|c| c.is_finite()) else {
        let why = cost
            .cost
            .yield_note
            .clone()
            .unwrap_or_else(|| "no cost per litre".into());
        return Ok(Outcome::Skip(why));
    };
    let worst_l_day = result.worst_month.l_m2_day * result.footprint_m2;
    if !(worst_l_day > 0.0 && worst_l_day.is_finite()) {
        return Ok(Outcome::Skip(format!(
            "it makes no water on a mean day of its worst month (month {}), so capital per \
             litre a day of capacity has no value",
            result.worst_month.month
        )));
    }
    let values = CriterionValues {
        annual_l_m2: result.annual_l_m2,
        worst_month_l_m2_day: result.worst_month.l_m2_day,
        cost_per_l,
        capital_per_l_day: cost.cost.capital / worst_l_day,
        complexity_points: cost.complexity.score,
    };
    let mut not_local: Vec<String> = cost
        .bom
        .unavailable
        .iter()
        .map(|u| u.item.clone())
        .collect();
    not_local.sort();
    not_local.dedup();
    Ok(Outcome::Done(Box::new(Evaluation {
        name: v.name.clone(),
        kind: v.kind.name().to_owned(),
        footprint_m2: result.footprint_m2,
        values,
        worst_month: result.worst_month.month,
        worst_month_l_day: worst_l_day,
        capital: cost.cost.capital,
        not_local,
        result,
        cost,
    })))
}

/// Simulate and cost every variant. A variant the model cannot run trustworthily, or that
/// lacks a figure, is listed in [`DesignEvaluation::skipped`] with the reason; the others are
/// still evaluated (ranking is independent of which variants are present).
///
/// Errors: [`Error::Design`] for a costing problem; [`Error::Model`] (the first reason) when
/// no variant at all could be evaluated.
pub fn evaluate_design(
    loaded: &LoadedDesign,
    weather: &SiteWeather,
    opts: &RunOptions,
) -> Result<DesignEvaluation, Error> {
    let mut evaluated = Vec::new();
    let mut skipped = Vec::new();
    for (i, v) in loaded.design.variants.iter().enumerate() {
        match evaluate_one(loaded, i, weather, opts)? {
            Outcome::Done(e) => evaluated.push(*e),
            Outcome::Skip(reason) => skipped.push(Skipped {
                name: v.name.clone(),
                reason,
            }),
        }
    }
    if evaluated.is_empty() {
        return Err(Skipped::none_left(&skipped, "compared"));
    }
    Ok(DesignEvaluation {
        currency: loaded.design.project.currency.clone(),
        evaluated,
        skipped,
    })
}
