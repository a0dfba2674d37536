//! Sensitivity of annual yield to each uncertain parameter: the yield at the parameter's low
//! (P10) and high (P90) value with every other parameter at nominal, per variant, ranked by
//! the swing between the two — the data of a tornado chart.
//!
//! The yields come from full simulations of the monthly average days (the same runs that
//! fit the response model's parameter factors, [`super::response::fit_responses`]), not from
//! the response model.

use serde::Serialize;

use super::evaluate::Skipped;
use super::response::{VariantResponse, fit_responses};
use super::uncertainty::{UncertainParameter, UncertaintyOptions, option_error};
use crate::design::LoadedDesign;
use crate::error::Error;

/// One bar of a tornado chart.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct SensitivityBar {
    /// Parameter key.
    pub parameter: String,
    /// Its low value (P10) [-].
    pub low_value: f64,
    /// Its high value (P90) [-].
    pub high_value: f64,
    /// Annual yield at the low value [L m⁻² year⁻¹].
    pub low_annual_l_m2: f64,
    /// Annual yield at the high value [L m⁻² year⁻¹].
    pub high_annual_l_m2: f64,
    /// high − low [L m⁻² year⁻¹] (its sign says which way the parameter pushes).
    pub change_l_m2: f64,
    /// |high − low| ÷ the nominal annual yield [-].
    pub swing_fraction: f64,
}

/// The tornado of one variant, largest swing first.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct VariantSensitivity {
    /// Variant name.
    pub name: String,
    /// Kind name.
    pub kind: String,
    /// Nominal annual yield [L m⁻² year⁻¹].
    pub nominal_annual_l_m2: f64,
    /// Bars, largest |change| first (ties in parameter order).
    pub bars: Vec<SensitivityBar>,
}

/// Sensitivity of every variant.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct SensitivityReport {
    /// Variants in design order.
    pub variants: Vec<VariantSensitivity>,
    /// Variants that could not be run, and why.
    pub skipped: Vec<Skipped>,
}

/// Sensitivity from fitted responses (their parameter factors hold the low and high runs).
pub fn sensitivity_from(
    responses: &[VariantResponse],
    parameters: &[UncertainParameter],
) -> SensitivityReport {
    let variants = responses
        .iter()
        .map(|r| {
            let nominal = r.deterministic_annual_l_m2;
            let mut bars: Vec<SensitivityBar> = parameters
                .iter()
                .filter_map(|p| r.factors.iter().find(|f| f.kind == p.kind))
                .map(|f| {
                    let change = f.high_annual_l_m2 - f.low_annual_l_m2;
                    SensitivityBar {
                        parameter: f.kind.key().to_owned(),
                        low_value: f.low,
                        high_value: f.high,
                        low_annual_l_m2: f.low_annual_l_m2,
                        high_annual_l_m2: f.high_annual_l_m2,
                        change_l_m2: change,
                        swing_fraction: if nominal > 0.0 {
                            change.abs() / nominal
                        } else {
                            0.0
                        },
                    }
                })
                .collect();
            // A stable sort keeps the parameter order among equal swings.
            bars.sort_by(|a, b| b.change_l_m2.abs().total_cmp(&a.change_l_m2.abs()));
            VariantSensitivity {
                name: r.name.clone(),
                kind: r.kind.clone(),
                nominal_annual_l_m2: nominal,
                bars,
            }
        })
        .collect();
    SensitivityReport {
        variants,
        skipped: Vec::new(),
    }
}

/// Sensitivity of every variant of a design to the parameters of `opts` (its samples and
/// seed are not used).
///
/// Errors as [`super::response::fit_responses`], and [`Error::Design`] for bad options.
pub fn sensitivity(
    loaded: &LoadedDesign,
    opts: &UncertaintyOptions,
) -> Result<SensitivityReport, Error> {
    if let Err((option, message)) = opts.validate() {
        return Err(option_error(loaded, &option, message));
    }
    let fit = fit_responses(loaded, &opts.parameters, None)?;
    let mut rep = sensitivity_from(&fit.responses, &opts.parameters);
    rep.skipped = fit.skipped;
    Ok(rep)
}
