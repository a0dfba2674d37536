//! Published devices the default model is compared with, and the model-form uncertainty
//! their spread gives.
//!
//! Each device is reconstructed as a design file in `tests/data/validation/` from what its
//! paper states; what the paper leaves unsaid is filled with the project's defaults and
//! listed in [`PublishedDevice::unsaid`]. The integration test `calibrate::published_*` runs
//! the default (uncalibrated) model on each and checks the daily yield within ±30 %, and
//! recomputes [`MODEL_FORM_RELATIVE_SD`] from the comparisons.

/// A published device and the figure the model is compared with.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct PublishedDevice {
    /// Short name.
    pub name: &'static str,
    /// Still kind as in design files.
    pub kind: &'static str,
    /// The publication, with where in it the figure is.
    pub source: &'static str,
    /// The published figure [L m⁻² day⁻¹] (per m² of basin or absorber).
    pub published_l_m2_day: f64,
    /// The conditions reconstructed from the paper.
    pub conditions: &'static str,
    /// What the paper leaves unsaid, and what was assumed.
    pub unsaid: &'static str,
    /// The reconstructed design, relative to `tests/data/validation/`.
    pub design_file: &'static str,
    /// The variant in it.
    pub variant: &'static str,
    /// The month compared (1…12), or 0 for the model's annual mean day.
    pub month: u32,
}

/// Relative standard deviation of the default model's daily yield against published devices
/// [-]: the root-mean-square of ln(model ÷ published) over [`published_devices`], as the
/// test `calibrate::published_devices_within_30_percent_and_model_form_constant` recomputes
/// it (to 0.005). For the Monte Carlo uncertainty: a log-normal factor on yield with this
/// spread.
///
/// Provisional: so far one device (a basin; the model reads 16.5 % high), so this is one
/// comparison's size, not a spread. Wick and multi-effect devices are still to be added.
pub const MODEL_FORM_RELATIVE_SD: f64 = 0.153;

/// The published devices.
pub fn published_devices() -> Vec<PublishedDevice> {
    vec![PublishedDevice {
        name: "conventional basin, Chennai",
        kind: "single-slope",
        source: "Sathyamurthy, Nagarajan, Edwin, Madhu, El-Agouz, Ahsan & Mageshbabu (2016), \
                 Int. J. Heat and Technology 34(4):597-603, abstract: conventional still \
                 without storage 1.9 kg/m2/day",
        published_l_m2_day: 1.9,
        conditions: "Chennai (13.1 N, 80.3 E); the model's annual mean day from monthly means \
                     of Chennai's climate (from memory)",
        unsaid: "test days, insolation, basin area, water depth, cover, insulation: 1 m2, 20 mm, \
                 4 mm glass at 13 deg facing south, black liner, 50 mm foam base, 25 mm sides",
        design_file: "basin-chennai.toml",
        variant: "conventional",
        month: 0,
    }]
}

/// Root-mean-square of ln(model ÷ published) over `(modelled, published)` pairs [-]; `NaN`
/// for none or for a non-positive figure.
pub fn model_form_relative_sd(pairs: &[(f64, f64)]) -> f64 {
    if pairs.is_empty() || pairs.iter().any(|(m, p)| *m <= 0.0 || *p <= 0.0) {
        return f64::NAN;
    }
    let s: f64 = pairs.iter().map(|(m, p)| (m / p).ln().powi(2)).sum();
    (s / pairs.len() as f64).sqrt()
}
