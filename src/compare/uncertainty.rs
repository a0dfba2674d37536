//! Monte Carlo uncertainty of each variant's yield over stochastic weather and uncertain
//! parameters, plus a model-form term sized from the validation against published devices.
//!
//! Flow: [`run_uncertainty`] fits one [`VariantResponse`] per variant
//! ([`super::response::fit_responses`]: average-day simulations at seven clearness levels and at
//! the low and high value of every parameter), then draws `samples` years. Sample *i* takes
//! its daily clearness from the site's stochastic generator (ChaCha20, `seed`, stream *i* —
//! the same years `size` simulates) and its parameter values and model-form factors from a
//! second ChaCha20 generator (`seed` ⊕ [`PARAMETER_KEY`], stream *i*), so a sample is the same
//! whatever the number of threads or samples. Samples run in parallel (rayon) and are
//! collected and reduced in sample order.
//!
//! Every draw is shared by all variants of the sample (the same dust, wind and workmanship
//! on the same site: common random numbers, so differences between variants are not
//! blurred by independent draws); the model-form factor is drawn per variant.

use rand::{RngExt, SeedableRng};
use rand_chacha::ChaCha20Rng;
use rand_distr::StandardNormal;
use rayon::prelude::*;
use serde::Serialize;
use std::sync::atomic::{AtomicU64, Ordering};

use super::evaluate::Skipped;
use super::response::{VariantResponse, fit_responses};
use super::sensitivity::{SensitivityReport, sensitivity_from};
use crate::design::{
    DAYS_IN_MONTH, DesignErrors, DesignIssue, LoadedDesign, Sink, Variant, VariantKind,
};
use crate::error::Error;
use crate::stills::SiteWeather;

/// Spread of the model-form factor on yield, σ of ln(factor) [-]: the validation constant
/// [`crate::calibrate::validation::MODEL_FORM_RELATIVE_SD`], referenced rather than copied.
///
/// That constant is the root-mean-square of ln(model ÷ published) over the published devices
/// the default model is compared with, i.e. the standard deviation of ln(factor) of a
/// log-normal factor with median 1 — so it is used as σ(ln) unchanged: factor = exp(σ·z)
/// ([`model_form_factor`]). The factor's relative standard deviation (coefficient of
/// variation) is then √(exp(σ²) − 1), which equals σ to first order (0.153 → 0.154).
/// It is [`UncertaintyOptions::model_form_sd`], so a caller can replace it.
pub const DEFAULT_MODEL_FORM_SD: f64 = crate::calibrate::validation::MODEL_FORM_RELATIVE_SD;

/// Where [`DEFAULT_MODEL_FORM_SD`] comes from, as the output names it.
pub const MODEL_FORM_SOURCE: &str = "the default model's scatter against published devices \
     (the root-mean-square of ln(model / published) over the validation devices, docs/calibrate.md), \
     used as sigma of ln(factor) of a log-normal factor with median 1";

/// The multiplicative model-form factor at standard normal deviate `z`: exp(σ·z), median 1,
/// σ = `sd_ln` [-] the standard deviation of ln(factor); `z` is truncated at
/// ±[`Z_TRUNCATION`] like every other draw. Its coefficient of variation is
/// √(exp(σ²) − 1) (untruncated; a log-normal's textbook moments — from memory).
pub fn model_form_factor(sd_ln: f64, z: f64) -> f64 {
    (sd_ln * z.clamp(-Z_TRUNCATION, Z_TRUNCATION)).exp()
}

/// Default number of Monte Carlo samples.
pub const DEFAULT_SAMPLES: u32 = 1000;

/// Most samples accepted.
pub const MAX_SAMPLES: u32 = 1_000_000;

/// Standard normal quantile of 0.9 (the P90; P10 is its negative): 1.281 551 6 (any
/// statistics table, e.g. Abramowitz & Stegun 1964, Table 26.1 — from memory).
pub const Z_P90: f64 = 1.281_551_565_545;

/// Draws are truncated at ±3 standard deviations so that no sample leaves the range where the
/// fitted factors were made (common practice, no source; 0.27 % of a normal lies beyond).
pub const Z_TRUNCATION: f64 = 3.0;

/// XOR-ed into the seed of the parameter generator so that its stream never coincides with
/// the weather generator's stream of the same seed (an arbitrary odd constant, the 64-bit
/// golden ratio).
pub const PARAMETER_KEY: u64 = 0x9E37_79B9_7F4A_7C15;

/// What an uncertain parameter changes.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash, Serialize)]
#[serde(rename_all = "kebab-case")]
pub enum ParameterKind {
    /// Long-wave emissivity of the cover material (an offset on the library value).
    CoverEmissivity,
    /// Sunlight the cover lets through relative to the model (dust, condensate film, ageing):
    /// a multiplier on the single-slope `soiling_transmittance`, and on the sunlight reaching
    /// the other kinds (which model a clean cover).
    CoverTransmittance,
    /// Fraction of condensate reaching the trough (an offset on `collection_efficiency`).
    CollectionEfficiency,
    /// Fraction of vapour lost through gaps (an offset on `vapour_leakage`).
    VapourLeakage,
    /// Wind at the still relative to the site series (a multiplier on every hour's wind).
    Wind,
    /// Insulation quality: a multiplier on the conductivity of every insulation material.
    InsulationConductivity,
    /// Solar absorptance of the absorbing surface (liner, absorber or wick cloth; an offset).
    Absorptance,
    /// Free convection of a multi-effect still's computed air sink (a multiplier on
    /// `sink_convection_factor`).
    AirSinkConvection,
}

/// How a drawn value acts on the design.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize)]
#[serde(rename_all = "kebab-case")]
pub enum Effect {
    /// Added to the design or library value (nominal 0).
    Offset,
    /// Multiplies the design, library or weather value (nominal 1).
    Multiplier,
}

/// The shape of a parameter's distribution.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize)]
#[serde(rename_all = "kebab-case")]
pub enum Shape {
    /// Normal about the nominal value with standard deviation `spread`.
    Normal,
    /// Lognormal multiplier exp(`spread`·z), median 1 (multipliers only).
    LogNormal,
}

impl ParameterKind {
    /// Every kind, in the order of the default parameter list.
    pub const ALL: [ParameterKind; 8] = [
        ParameterKind::CoverEmissivity,
        ParameterKind::CoverTransmittance,
        ParameterKind::CollectionEfficiency,
        ParameterKind::VapourLeakage,
        ParameterKind::Wind,
        ParameterKind::InsulationConductivity,
        ParameterKind::Absorptance,
        ParameterKind::AirSinkConvection,
    ];

    /// Short key.
    pub fn key(self) -> &'static str {
        match self {
            ParameterKind::CoverEmissivity => "cover-emissivity",
            ParameterKind::CoverTransmittance => "cover-transmittance",
            ParameterKind::CollectionEfficiency => "collection-efficiency",
            ParameterKind::VapourLeakage => "vapour-leakage",
            ParameterKind::Wind => "wind",
            ParameterKind::InsulationConductivity => "insulation-conductivity",
            ParameterKind::Absorptance => "absorptance",
            ParameterKind::AirSinkConvection => "air-sink-convection",
        }
    }

    /// How a drawn value acts.
    pub fn effect(self) -> Effect {
        match self {
            ParameterKind::CoverEmissivity
            | ParameterKind::CollectionEfficiency
            | ParameterKind::VapourLeakage
            | ParameterKind::Absorptance => Effect::Offset,
            ParameterKind::CoverTransmittance
            | ParameterKind::Wind
            | ParameterKind::InsulationConductivity
            | ParameterKind::AirSinkConvection => Effect::Multiplier,
        }
    }

    /// Whether the parameter changes anything in `variant`: vapour leakage is not modelled
    /// in the multi-effect still, insulation quality needs at least one insulation layer, and
    /// the air-sink convection needs a multi-effect still whose air sink is computed (no
    /// `sink_coefficient_w_m2_k` set); every other parameter applies to every kind.
    pub fn applies_to(self, variant: &Variant) -> bool {
        match self {
            ParameterKind::VapourLeakage => !matches!(variant.kind, VariantKind::MultiEffect(_)),
            ParameterKind::InsulationConductivity => !insulation_layers(variant).is_empty(),
            ParameterKind::AirSinkConvection => matches!(
                &variant.kind,
                VariantKind::MultiEffect(k)
                    if k.sink == Sink::AirFins && k.sink_coefficient_w_m2_k.is_none()
            ),
            _ => true,
        }
    }

    /// The default distribution and its source.
    pub fn default_parameter(self) -> UncertainParameter {
        let (shape, spread, source) = match self {
            ParameterKind::CoverEmissivity => (
                Shape::Normal,
                0.03,
                "from memory: handbook long-wave emissivities of window glass lie between \
                 about 0.84 and 0.94 (Duffie & Beckman 2013 use 0.88), and plastics vary more",
            ),
            ParameterKind::CoverTransmittance => (
                Shape::Normal,
                0.03,
                "common practice, no source: dust and condensate films between cleanings \
                 take a few per cent off a cover's transmittance",
            ),
            ParameterKind::CollectionEfficiency => (
                Shape::Normal,
                0.05,
                "common practice, no source: drip-back and trough losses vary with cover \
                 tilt, wetting and workmanship by several per cent of the condensate",
            ),
            ParameterKind::VapourLeakage => (
                Shape::Normal,
                0.02,
                "common practice, no source: seals of site-built stills leak a few per cent \
                 of the vapour, more as they age",
            ),
            ParameterKind::Wind => (
                Shape::LogNormal,
                0.2,
                "common practice, no source: wind at a still near the ground differs from \
                 the site series by shelter and exposure by tens of per cent",
            ),
            ParameterKind::InsulationConductivity => (
                Shape::LogNormal,
                0.3,
                "common practice, no source: loose-fill and board insulation conduct \
                 markedly more when damp, compacted or badly fitted",
            ),
            ParameterKind::Absorptance => (
                Shape::Normal,
                0.03,
                "from memory: black paints and liners have solar absorptances of about \
                 0.90–0.97, lowered by fading and salt deposits",
            ),
            ParameterKind::AirSinkConvection => (
                Shape::LogNormal,
                0.3,
                "common practice, no source: free-convection relations for fin arrays meet \
                 tests within some tens of per cent where they were fitted, and a stack's sink \
                 runs outside that (channels as long as the slope, shallow tilts)",
            ),
        };
        UncertainParameter {
            kind: self,
            shape,
            spread,
            source: source.to_owned(),
        }
    }
}

/// The insulation layers of a variant (empty when it has none).
fn insulation_layers(variant: &Variant) -> Vec<&crate::design::Layer> {
    match &variant.kind {
        VariantKind::SingleSlope(k) => k.base_insulation.iter().chain(&k.side_insulation).collect(),
        VariantKind::DoubleSlope(k) => k.base_insulation.iter().chain(&k.side_insulation).collect(),
        VariantKind::Stepped(k) => k.base_insulation.iter().chain(&k.side_insulation).collect(),
        VariantKind::Wick(k) => k.backing_insulation.iter().collect(),
        VariantKind::MultiEffect(k) => k.side_insulation.iter().collect(),
    }
}

/// One uncertain parameter: what it changes and its distribution.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct UncertainParameter {
    /// What it changes.
    pub kind: ParameterKind,
    /// Distribution shape.
    pub shape: Shape,
    /// Standard deviation of an offset [-], relative standard deviation of a normal
    /// multiplier [-], or σ of ln(multiplier) for a lognormal one [-]; 0 switches it off.
    pub spread: f64,
    /// Where the default spread comes from.
    pub source: String,
}

impl UncertainParameter {
    /// The nominal value: 0 for an offset, 1 for a multiplier.
    pub fn nominal(&self) -> f64 {
        match self.kind.effect() {
            Effect::Offset => 0.0,
            Effect::Multiplier => 1.0,
        }
    }

    /// The value at standard normal deviate `z` (truncated at ±[`Z_TRUNCATION`]).
    /// A normal multiplier is kept at 0.05 or more.
    pub fn value(&self, z: f64) -> f64 {
        let z = z.clamp(-Z_TRUNCATION, Z_TRUNCATION);
        match (self.kind.effect(), self.shape) {
            (Effect::Offset, _) => self.spread * z,
            (Effect::Multiplier, Shape::Normal) => (1.0 + self.spread * z).max(0.05),
            (Effect::Multiplier, Shape::LogNormal) => (self.spread * z).exp(),
        }
    }

    /// The low value used for sensitivity and factor fitting: the P10 of the distribution.
    pub fn low(&self) -> f64 {
        self.value(-Z_P90)
    }

    /// The high value: the P90 of the distribution.
    pub fn high(&self) -> f64 {
        self.value(Z_P90)
    }

    /// The distribution in words, e.g. `normal offset, SD 0.03`.
    pub fn describe(&self) -> String {
        match (self.kind.effect(), self.shape) {
            (Effect::Offset, _) => format!("normal offset, SD {}", self.spread),
            (Effect::Multiplier, Shape::Normal) => {
                format!("normal multiplier, mean 1, SD {}", self.spread)
            }
            (Effect::Multiplier, Shape::LogNormal) => {
                format!("lognormal multiplier, median 1, σ(ln) {}", self.spread)
            }
        }
    }
}

/// The default parameter list: every [`ParameterKind`] with its default distribution.
pub fn default_parameters() -> Vec<UncertainParameter> {
    ParameterKind::ALL
        .iter()
        .map(|k| k.default_parameter())
        .collect()
}

/// Apply parameter values to clones of the design and weather for variant `index`.
///
/// Returns the perturbed design (the variant and its library) and weather. Offsets are
/// clamped into the ranges the design file allows (collection efficiency 0.05…1, leakage
/// 0…0.45, emissivity and absorptance 0.05…1); a parameter that does not apply to the
/// variant's kind ([`ParameterKind::applies_to`]) is ignored.
pub fn perturbed(
    loaded: &LoadedDesign,
    index: usize,
    weather: &SiteWeather,
    values: &[(ParameterKind, f64)],
) -> Result<(LoadedDesign, SiteWeather), Error> {
    let mut design = loaded.clone();
    let mut weather = weather.clone();
    let Some(variant) = design.design.variants.get(index).cloned() else {
        return Err(Error::Design(DesignErrors(vec![DesignIssue {
            file: loaded.source.clone(),
            line_col: None,
            path: "variant".into(),
            message: format!("no variant number {}", index + 1),
        }])));
    };
    let mut v = variant;
    let offset = |x: &mut f64, dx: f64, lo: f64, hi: f64| *x = (*x + dx).clamp(lo, hi);
    for &(kind, x) in values {
        if !kind.applies_to(&v) {
            continue;
        }
        match kind {
            ParameterKind::CoverEmissivity => {
                let id = v.cover.clone();
                if let Some(c) = item_mut(&mut design, &id).and_then(|i| i.cover.as_mut()) {
                    offset(&mut c.emissivity, x, 0.05, 1.0);
                }
            }
            ParameterKind::CoverTransmittance => match &mut v.kind {
                VariantKind::SingleSlope(k) => {
                    k.soiling_transmittance = (k.soiling_transmittance * x).clamp(0.01, 1.0);
                }
                _ => {
                    let m = x.max(0.0);
                    for h in &mut weather.series.hours {
                        h.ghi_w_m2 *= m;
                        h.dhi_w_m2 *= m;
                        h.dni_w_m2 *= m;
                        if let Some(p) = h.measured_poa_w_m2.as_mut() {
                            *p *= m;
                        }
                    }
                }
            },
            ParameterKind::CollectionEfficiency => {
                let c = match &mut v.kind {
                    VariantKind::SingleSlope(k) => &mut k.collection_efficiency,
                    VariantKind::DoubleSlope(k) => &mut k.collection_efficiency,
                    VariantKind::Wick(k) => &mut k.collection_efficiency,
                    VariantKind::Stepped(k) => &mut k.collection_efficiency,
                    VariantKind::MultiEffect(k) => &mut k.collection_efficiency,
                };
                offset(c, x, 0.05, 1.0);
            }
            ParameterKind::VapourLeakage => {
                let l = match &mut v.kind {
                    VariantKind::SingleSlope(k) => Some(&mut k.vapour_leakage),
                    VariantKind::DoubleSlope(k) => Some(&mut k.vapour_leakage),
                    VariantKind::Wick(k) => Some(&mut k.vapour_leakage),
                    VariantKind::Stepped(k) => Some(&mut k.vapour_leakage),
                    VariantKind::MultiEffect(_) => None,
                };
                if let Some(l) = l {
                    offset(l, x, 0.0, 0.45);
                }
            }
            ParameterKind::Wind => {
                let m = x.max(0.0);
                for h in &mut weather.series.hours {
                    h.wind_m_s *= m;
                }
            }
            ParameterKind::InsulationConductivity => {
                let ids: Vec<String> = insulation_layers(&v)
                    .iter()
                    .map(|l| l.material.clone())
                    .collect();
                let mut seen: Vec<&String> = Vec::new();
                for id in &ids {
                    if seen.contains(&id) {
                        continue;
                    }
                    seen.push(id);
                    if let Some(p) = item_mut(&mut design, id).and_then(|i| i.insulation.as_mut()) {
                        p.conductivity_w_m_k *= x.max(0.01);
                    }
                }
            }
            ParameterKind::AirSinkConvection => {
                if let VariantKind::MultiEffect(k) = &mut v.kind {
                    k.sink_convection_factor = (k.sink_convection_factor * x).clamp(0.2, 5.0);
                }
            }
            ParameterKind::Absorptance => {
                let (id, wick) = match &v.kind {
                    VariantKind::SingleSlope(k) => (k.liner.clone(), false),
                    VariantKind::DoubleSlope(k) => (k.liner.clone(), false),
                    VariantKind::Stepped(k) => (k.liner.clone(), false),
                    VariantKind::MultiEffect(k) => (k.absorber.clone(), false),
                    VariantKind::Wick(k) => (k.cloth.clone(), true),
                };
                if let Some(item) = item_mut(&mut design, &id) {
                    if wick {
                        if let Some(w) = item.wick.as_mut() {
                            offset(&mut w.absorptance, x, 0.05, 1.0);
                        }
                    } else if let Some(s) = item.liner.as_mut().or(item.paint.as_mut()) {
                        offset(&mut s.absorptance, x, 0.05, 1.0);
                    }
                }
            }
        }
    }
    if let Some(slot) = design.design.variants.get_mut(index) {
        *slot = v;
    }
    Ok((design, weather))
}

fn item_mut<'a>(design: &'a mut LoadedDesign, id: &str) -> Option<&'a mut crate::design::Item> {
    design.library.items.iter_mut().find(|i| i.id == id)
}

/// How to run the Monte Carlo.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct UncertaintyOptions {
    /// Number of samples (years), 1…[`MAX_SAMPLES`].
    pub samples: u32,
    /// Seed of both generators.
    pub seed: u64,
    /// Spread of the multiplicative model-form factor on yield, σ of ln(factor) [-]; the
    /// factor is lognormal, exp(sd·z), median 1 ([`model_form_factor`]). Default
    /// [`DEFAULT_MODEL_FORM_SD`], from the validation against published devices.
    pub model_form_sd: f64,
    /// The uncertain parameters (default [`default_parameters`]).
    pub parameters: Vec<UncertainParameter>,
    /// Draw each sample's weather from the stochastic generator (true), or use the monthly
    /// average days for every sample (false).
    pub stochastic_weather: bool,
}

impl Default for UncertaintyOptions {
    fn default() -> Self {
        Self {
            samples: DEFAULT_SAMPLES,
            seed: 1,
            model_form_sd: DEFAULT_MODEL_FORM_SD,
            parameters: default_parameters(),
            stochastic_weather: true,
        }
    }
}

impl UncertaintyOptions {
    /// Check the options; the error names the option and the allowed range.
    pub fn validate(&self) -> Result<(), (String, String)> {
        if self.samples == 0 || self.samples > MAX_SAMPLES {
            return Err((
                "--samples".into(),
                format!("between 1 and {MAX_SAMPLES} samples, got {}", self.samples),
            ));
        }
        if !(self.model_form_sd.is_finite() && (0.0..=1.0).contains(&self.model_form_sd)) {
            return Err((
                "model_form_sd".into(),
                format!("within 0…1, got {}", self.model_form_sd),
            ));
        }
        for p in &self.parameters {
            if !(p.spread.is_finite() && (0.0..=1.0).contains(&p.spread)) {
                return Err((
                    p.kind.key().into(),
                    format!("spread within 0…1, got {}", p.spread),
                ));
            }
        }
        Ok(())
    }
}

/// P10, P50 and P90 of a set of samples.
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
pub struct Percentiles {
    /// 10th percentile.
    pub p10: f64,
    /// Median.
    pub p50: f64,
    /// 90th percentile.
    pub p90: f64,
}

impl Percentiles {
    /// Percentiles of `values` (linear interpolation between order statistics, Hyndman &
    /// Fan 1996 definition 7, the default of R and NumPy — from memory). NaN-free input
    /// assumed; an empty set gives zeros.
    pub fn of(values: &[f64]) -> Self {
        let mut v = values.to_vec();
        v.sort_by(f64::total_cmp);
        Self {
            p10: quantile_sorted(&v, 0.1),
            p50: quantile_sorted(&v, 0.5),
            p90: quantile_sorted(&v, 0.9),
        }
    }

    /// Every figure times `k`.
    pub fn scaled(&self, k: f64) -> Self {
        Self {
            p10: self.p10 * k,
            p50: self.p50 * k,
            p90: self.p90 * k,
        }
    }
}

/// Quantile `q` (0…1) of ascending `sorted` values (Hyndman & Fan definition 7).
pub fn quantile_sorted(sorted: &[f64], q: f64) -> f64 {
    match sorted.len() {
        0 => 0.0,
        1 => sorted[0],
        n => {
            let h = (n - 1) as f64 * q.clamp(0.0, 1.0);
            let lo = h.floor() as usize;
            let hi = (lo + 1).min(n - 1);
            sorted[lo] + (h - lo as f64) * (sorted[hi] - sorted[lo])
        }
    }
}

/// The Monte Carlo figures of one variant.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct VariantUncertainty {
    /// Variant name.
    pub name: String,
    /// Kind name.
    pub kind: String,
    /// Footprint \[m²\].
    pub footprint_m2: f64,
    /// Parameters that apply to this variant (keys).
    pub parameters_applied: Vec<String>,
    /// Deterministic annual yield (monthly average days, nominal parameters) [L m⁻² year⁻¹].
    pub deterministic_annual_l_m2: f64,
    /// Deterministic mean daily output of the still [L day⁻¹].
    pub deterministic_mean_l_day: f64,
    /// Deterministic worst month (1…12).
    pub deterministic_worst_month: u32,
    /// Deterministic worst-month yield [L m⁻² day⁻¹].
    pub deterministic_worst_month_l_m2_day: f64,
    /// Deterministic worst-month output of the still [L day⁻¹].
    pub deterministic_worst_month_l_day: f64,
    /// Annual yield [L m⁻² year⁻¹].
    pub annual_l_m2: Percentiles,
    /// Mean daily output of the still over the year [L day⁻¹].
    pub mean_l_day: Percentiles,
    /// Yield of the worst month of each sample [L m⁻² day⁻¹].
    pub worst_month_l_m2_day: Percentiles,
    /// Output of the still in the worst month of each sample [L day⁻¹].
    pub worst_month_l_day: Percentiles,
    /// Fitting runs left out (a clearness level, or a parameter then treated as certain).
    pub notes: Vec<String>,
}

/// The whole Monte Carlo result.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct UncertaintyReport {
    /// Samples used.
    pub samples: u32,
    /// Seed.
    pub seed: u64,
    /// Model-form spread used, σ of ln(factor) [-].
    pub model_form_sd: f64,
    /// Where that spread comes from ([`MODEL_FORM_SOURCE`] for the default).
    pub model_form_source: String,
    /// Whether the weather was stochastic.
    pub stochastic_weather: bool,
    /// The parameters, with their low (P10) and high (P90) values.
    pub parameters: Vec<ParameterRow>,
    /// Variants with figures, in design order.
    pub variants: Vec<VariantUncertainty>,
    /// Variants left out, and why.
    pub skipped: Vec<Skipped>,
    /// Sensitivity of annual yield to each parameter, from the same fitted runs.
    pub sensitivity: SensitivityReport,
}

/// One parameter as the report lists it.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct ParameterRow {
    /// Key.
    pub key: String,
    /// How a value acts.
    pub effect: Effect,
    /// Distribution in words.
    pub distribution: String,
    /// Spread [-].
    pub spread: f64,
    /// Low value (P10) [-].
    pub low: f64,
    /// High value (P90) [-].
    pub high: f64,
    /// Where the spread comes from.
    pub source: String,
}

impl ParameterRow {
    /// The row of `p`.
    pub fn of(p: &UncertainParameter) -> Self {
        Self {
            key: p.kind.key().to_owned(),
            effect: p.kind.effect(),
            distribution: p.describe(),
            spread: p.spread,
            low: p.low(),
            high: p.high(),
            source: p.source.clone(),
        }
    }
}

pub(crate) fn option_error(loaded: &LoadedDesign, option: &str, message: String) -> Error {
    Error::Design(DesignErrors(vec![DesignIssue {
        file: loaded.source.clone(),
        line_col: None,
        path: option.into(),
        message,
    }]))
}

/// One sample's figures for one variant: (annual [L m⁻²], worst-month [L m⁻² day⁻¹]).
type SampleFigures = Vec<(f64, f64)>;

/// Progress callback: (steps done, steps in all). Steps are the fitting simulations, then
/// the samples.
pub type Progress<'a> = &'a (dyn Fn(u64, u64) + Sync);

/// Run the Monte Carlo for every variant of a design.
///
/// Errors: [`Error::Design`] (exit 2) for bad options (naming the option) or a site with a
/// weather file; [`Error::Model`] when no variant could be fitted. A variant whose fitting
/// runs fail is listed in [`UncertaintyReport::skipped`].
pub fn run_uncertainty(
    loaded: &LoadedDesign,
    opts: &UncertaintyOptions,
    progress: Option<Progress<'_>>,
) -> Result<UncertaintyReport, Error> {
    if let Err((option, message)) = opts.validate() {
        return Err(option_error(loaded, &option, message));
    }
    let fit = fit_responses(loaded, &opts.parameters, progress)?;
    let fit_steps = fit.steps;
    let total = fit_steps + u64::from(opts.samples);
    let done = AtomicU64::new(fit_steps);
    let responses = &fit.responses;
    let samples: Vec<Vec<(f64, f64)>> = (0..u64::from(opts.samples))
        .into_par_iter()
        .map(|i| {
            let s = sample(&fit.weather_model, responses, opts, i);
            let n = done.fetch_add(1, Ordering::Relaxed) + 1;
            if let Some(p) = progress {
                p(n, total);
            }
            s
        })
        .collect();
    let variants = responses
        .iter()
        .enumerate()
        .map(|(v, r)| reduce(r, &samples, v))
        .collect();
    Ok(UncertaintyReport {
        samples: opts.samples,
        seed: opts.seed,
        model_form_sd: opts.model_form_sd,
        model_form_source: model_form_source(opts.model_form_sd),
        stochastic_weather: opts.stochastic_weather,
        parameters: opts.parameters.iter().map(ParameterRow::of).collect(),
        variants,
        skipped: fit.skipped.clone(),
        sensitivity: sensitivity_from(responses, &opts.parameters),
    })
}

/// Where a model-form spread comes from: [`MODEL_FORM_SOURCE`] for the default, else the
/// caller.
pub fn model_form_source(sd_ln: f64) -> String {
    // Tolerance: the default is the same constant, so any difference beyond rounding is a
    // caller's own value.
    if (sd_ln - DEFAULT_MODEL_FORM_SD).abs() < 1e-12 {
        MODEL_FORM_SOURCE.to_owned()
    } else {
        "set by the caller (not the validation default)".to_owned()
    }
}

/// The parameter deviates and model-form deviates of sample `i`: one z per parameter (in
/// option order), then one per variant.
pub fn sample_deviates(
    seed: u64,
    i: u64,
    parameters: usize,
    variants: usize,
) -> (Vec<f64>, Vec<f64>) {
    let mut rng = ChaCha20Rng::seed_from_u64(seed ^ PARAMETER_KEY);
    rng.set_stream(i);
    let p = (0..parameters)
        .map(|_| rng.sample(StandardNormal))
        .collect();
    let v = (0..variants).map(|_| rng.sample(StandardNormal)).collect();
    (p, v)
}

fn sample(
    weather: &crate::climate::stochastic::StochasticModel,
    responses: &[VariantResponse],
    opts: &UncertaintyOptions,
    i: u64,
) -> SampleFigures {
    let (zp, zv) = sample_deviates(opts.seed, i, opts.parameters.len(), responses.len());
    let values: Vec<(ParameterKind, f64)> = opts
        .parameters
        .iter()
        .zip(&zp)
        .map(|(p, &z)| (p.kind, p.value(z)))
        .collect();
    let kts = opts
        .stochastic_weather
        .then(|| weather.daily_clearness(opts.seed, i));
    responses
        .iter()
        .zip(&zv)
        .map(|(r, &z)| {
            let model_form = model_form_factor(opts.model_form_sd, z);
            let factors: [f64; 12] =
                std::array::from_fn(|m| r.parameter_factor(m as u32 + 1, &values) * model_form);
            let months = match &kts {
                Some(kts) => r.month_means_l_m2_day(kts),
                None => r.nominal_month_l_m2_day,
            };
            let mut annual = 0.0;
            let mut worst = f64::INFINITY;
            for (m, (&y, days)) in months.iter().zip(DAYS_IN_MONTH).enumerate() {
                let y = y * factors[m];
                annual += y * f64::from(days);
                worst = worst.min(y);
            }
            (annual, worst)
        })
        .collect()
}

fn reduce(r: &VariantResponse, samples: &[SampleFigures], v: usize) -> VariantUncertainty {
    let annual: Vec<f64> = samples
        .iter()
        .filter_map(|s| s.get(v).map(|x| x.0))
        .collect();
    let worst: Vec<f64> = samples
        .iter()
        .filter_map(|s| s.get(v).map(|x| x.1))
        .collect();
    let fp = r.footprint_m2;
    let annual_p = Percentiles::of(&annual);
    let worst_p = Percentiles::of(&worst);
    VariantUncertainty {
        name: r.name.clone(),
        kind: r.kind.clone(),
        footprint_m2: fp,
        parameters_applied: r.factors.iter().map(|f| f.kind.key().to_owned()).collect(),
        deterministic_annual_l_m2: r.deterministic_annual_l_m2,
        deterministic_mean_l_day: r.deterministic_annual_l_m2 * fp / 365.0,
        deterministic_worst_month: r.deterministic_worst_month,
        deterministic_worst_month_l_m2_day: r.deterministic_worst_month_l_m2_day,
        deterministic_worst_month_l_day: r.deterministic_worst_month_l_m2_day * fp,
        annual_l_m2: annual_p,
        mean_l_day: annual_p.scaled(fp / 365.0),
        worst_month_l_m2_day: worst_p,
        worst_month_l_day: worst_p.scaled(fp),
        notes: r.notes.clone(),
    }
}
