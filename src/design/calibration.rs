//! `[variant.calibration]`: factors fitted to a pilot still (all optional, neutral by
//! default) and their provenance.
//!
//! The factors are applied by [`crate::stills::build_model`] to every kind; see
//! `docs/calibrate.md` for what each one multiplies and how the energy and water balances
//! stay closed.

use serde::{Deserialize, Serialize};

use super::measured::MeasuredColumns;

/// Allowed range of `distillate_factor` [-]: collection efficiency × (1 − leakage) lumped,
/// relative to the model's own collection. Below 0.2 the still is broken rather than
/// calibrated; above 1.5 the model's collection would be out by half (common practice, no
/// source).
pub const DISTILLATE_FACTOR_RANGE: (f64, f64) = (0.2, 1.5);
/// Allowed range of `cover_transmittance_factor` [-]: dust, ageing and condensate beyond the
/// model's optics (below 1), or a cleaner cover than the model assumes (up to 1.1). Common
/// practice, no source.
pub const COVER_TRANSMITTANCE_FACTOR_RANGE: (f64, f64) = (0.5, 1.1);
/// Allowed range of `cover_emissivity` [-]: thin plastic films sit near 0.2–0.5, glass near
/// 0.9 (from memory).
pub const COVER_EMISSIVITY_RANGE: (f64, f64) = (0.1, 1.0);
/// Allowed range of `base_loss_factor` [-]: wet or crushed insulation and thermal bridges can
/// multiply the base conductance several times (common practice, no source).
pub const BASE_LOSS_FACTOR_RANGE: (f64, f64) = (0.1, 10.0);

/// `[variant.calibration]` as written in the design file.
#[derive(Debug, Clone, Default, PartialEq, Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct Calibration {
    /// Multiplies the share of condensate collected (collection efficiency × (1 − leakage)
    /// lumped) [-], see [`DISTILLATE_FACTOR_RANGE`]; default 1.
    #[serde(default)]
    pub distillate_factor: Option<f64>,
    /// Multiplies the cover's solar transmittance [-], see
    /// [`COVER_TRANSMITTANCE_FACTOR_RANGE`]; default 1.
    #[serde(default)]
    pub cover_transmittance_factor: Option<f64>,
    /// Replaces the cover material's long-wave emissivity [-], see
    /// [`COVER_EMISSIVITY_RANGE`]; default: the material's.
    #[serde(default)]
    pub cover_emissivity: Option<f64>,
    /// Multiplies the base (and edge) loss conductance [-], see [`BASE_LOSS_FACTOR_RANGE`];
    /// default 1.
    #[serde(default)]
    pub base_loss_factor: Option<f64>,
    /// What the factors were fitted from (free text, e.g. the measured file).
    #[serde(default)]
    pub fitted_from: Option<String>,
    /// When they were fitted (free text, e.g. an ISO date).
    #[serde(default)]
    pub fitted_on: Option<String>,
    /// Free notes.
    #[serde(default)]
    pub note: Option<String>,
    /// `[variant.calibration.measured]`: the columns of the pilot's measured file.
    #[serde(default)]
    pub measured: Option<MeasuredColumns>,
}

/// The factors in force for one variant, resolved from [`Calibration`] (neutral where a
/// field is absent).
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
pub struct CalibrationFactors {
    /// Multiplies the share of condensate collected [-].
    pub distillate_factor: f64,
    /// Multiplies the cover's solar transmittance [-].
    pub cover_transmittance_factor: f64,
    /// Replaces the cover material's long-wave emissivity [-], when given.
    pub cover_emissivity: Option<f64>,
    /// Multiplies the base and edge loss conductances [-].
    pub base_loss_factor: f64,
}

impl Default for CalibrationFactors {
    /// Neutral: every factor 1, the material's emissivity.
    fn default() -> Self {
        CalibrationFactors {
            distillate_factor: 1.0,
            cover_transmittance_factor: 1.0,
            cover_emissivity: None,
            base_loss_factor: 1.0,
        }
    }
}

impl CalibrationFactors {
    /// Whether the factors change nothing (then the model is built exactly as without them).
    pub fn is_neutral(&self) -> bool {
        // Exact comparison on purpose: only the literal neutral values skip the wrapper.
        self.distillate_factor.to_bits() == 1f64.to_bits()
            && self.cover_transmittance_factor.to_bits() == 1f64.to_bits()
            && self.base_loss_factor.to_bits() == 1f64.to_bits()
            && self.cover_emissivity.is_none()
    }
}

impl Calibration {
    /// The factors in force (neutral where absent).
    pub fn factors(&self) -> CalibrationFactors {
        let d = CalibrationFactors::default();
        CalibrationFactors {
            distillate_factor: self.distillate_factor.unwrap_or(d.distillate_factor),
            cover_transmittance_factor: self
                .cover_transmittance_factor
                .unwrap_or(d.cover_transmittance_factor),
            cover_emissivity: self.cover_emissivity,
            base_loss_factor: self.base_loss_factor.unwrap_or(d.base_loss_factor),
        }
    }

    /// Every out-of-range value as (field inside `calibration`, message).
    pub fn problems(&self) -> Vec<(String, String)> {
        let mut out = Vec::new();
        let mut range = |field: &str, v: Option<f64>, (lo, hi): (f64, f64)| {
            if let Some(x) = v
                && !(x.is_finite() && x >= lo && x <= hi)
            {
                out.push((
                    field.to_owned(),
                    format!("{field} = {x} is outside [{lo}, {hi}]"),
                ));
            }
        };
        range(
            "distillate_factor",
            self.distillate_factor,
            DISTILLATE_FACTOR_RANGE,
        );
        range(
            "cover_transmittance_factor",
            self.cover_transmittance_factor,
            COVER_TRANSMITTANCE_FACTOR_RANGE,
        );
        range(
            "cover_emissivity",
            self.cover_emissivity,
            COVER_EMISSIVITY_RANGE,
        );
        range(
            "base_loss_factor",
            self.base_loss_factor,
            BASE_LOSS_FACTOR_RANGE,
        );
        if let Some(m) = &self.measured {
            for (f, msg) in m.problems() {
                out.push((format!("measured.{f}"), msg));
            }
        }
        out
    }
}
