//! Weighted least-squares fit of calibration factors to a measured record.
//!
//! The model runs over the measured period driven by the measured weather (the measured
//! plane-of-array irradiance on the cover's plane), after a spin-up of one copy of the first
//! day so the start state matters little. Residuals are (model − measurement) ÷ σ of their
//! group: hourly distillate, and brine, cover and liner temperatures when measured (the
//! model's temperature at the end of each hour against the hour's mean reading). The σ of
//! each group is first a guess (10 % of the mean hourly distillate; 1 K) and then, after a
//! first fit, the group's residual RMS, and the fit is repeated from there (iteratively
//! reweighted least squares), so each group counts by how well it can be matched.
//!
//! The minimiser is the Levenberg–Marquardt implementation of the `levenberg-marquardt`
//! crate (MINPACK's algorithm, Moré 1978); each bounded parameter p ∈ [lo, hi] is fitted
//! through the logistic map p = lo + (hi − lo)/(1 + e^(−x)), and the Jacobian in x is taken
//! by forward differences of whole model runs (run in parallel).
//!
//! Confidence intervals come from the Jacobian J in the parameters themselves at the
//! optimum (central differences): cov = s²(JᵀJ)⁻¹ with s² = Σr²/(n − k), and p ± t₀.₉₇₅,ₙ₋ₖ·√cov_jj
//! (Student t; Seber & Wild 1989, *Nonlinear Regression*, §5.1 — from memory). They assume
//! independent residuals: hour-to-hour correlated model error makes them too narrow, which
//! is why the report also gives the daily fit.

use std::sync::atomic::{AtomicUsize, Ordering};

use levenberg_marquardt::{LeastSquaresProblem, LevenbergMarquardt};
use nalgebra::DMatrix;
use nalgebra034::{DVector as LmVector, Dyn, Matrix as LmMatrix, U1, VecStorage};
use rayon::prelude::*;
use serde::Serialize;

use super::measured::MeasuredRecord;
use crate::climate::WeatherSeries;
use crate::design::{
    BASE_LOSS_FACTOR_RANGE, COVER_EMISSIVITY_RANGE, COVER_TRANSMITTANCE_FACTOR_RANGE, Calibration,
    DISTILLATE_FACTOR_RANGE, LoadedDesign, Variant,
};
use crate::error::Error;
use crate::stills::{HourRecord, RunOptions, SiteWeather, build_model, run_model_operated};

/// A parameter calibration can fit.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash, Serialize)]
#[serde(rename_all = "snake_case")]
pub enum FitParam {
    /// `distillate_factor`.
    DistillateFactor,
    /// `cover_transmittance_factor`.
    CoverTransmittanceFactor,
    /// `cover_emissivity`.
    CoverEmissivity,
    /// `base_loss_factor`.
    BaseLossFactor,
}

impl FitParam {
    /// Every parameter, in the default order.
    pub const ALL: [FitParam; 4] = [
        FitParam::DistillateFactor,
        FitParam::CoverTransmittanceFactor,
        FitParam::CoverEmissivity,
        FitParam::BaseLossFactor,
    ];

    /// The design-file name.
    pub fn name(self) -> &'static str {
        match self {
            FitParam::DistillateFactor => "distillate_factor",
            FitParam::CoverTransmittanceFactor => "cover_transmittance_factor",
            FitParam::CoverEmissivity => "cover_emissivity",
            FitParam::BaseLossFactor => "base_loss_factor",
        }
    }

    /// The parameter of a design-file name.
    pub fn parse(name: &str) -> Option<FitParam> {
        FitParam::ALL.into_iter().find(|p| p.name() == name.trim())
    }

    /// Bounds of the fit: the design file's allowed range.
    pub fn bounds(self) -> (f64, f64) {
        match self {
            FitParam::DistillateFactor => DISTILLATE_FACTOR_RANGE,
            FitParam::CoverTransmittanceFactor => COVER_TRANSMITTANCE_FACTOR_RANGE,
            FitParam::CoverEmissivity => COVER_EMISSIVITY_RANGE,
            FitParam::BaseLossFactor => BASE_LOSS_FACTOR_RANGE,
        }
    }

    /// The value in `cal`, if set.
    pub fn get(self, cal: &Calibration) -> Option<f64> {
        match self {
            FitParam::DistillateFactor => cal.distillate_factor,
            FitParam::CoverTransmittanceFactor => cal.cover_transmittance_factor,
            FitParam::CoverEmissivity => cal.cover_emissivity,
            FitParam::BaseLossFactor => cal.base_loss_factor,
        }
    }

    /// Set the value in `cal`.
    pub fn set(self, cal: &mut Calibration, v: f64) {
        match self {
            FitParam::DistillateFactor => cal.distillate_factor = Some(v),
            FitParam::CoverTransmittanceFactor => cal.cover_transmittance_factor = Some(v),
            FitParam::CoverEmissivity => cal.cover_emissivity = Some(v),
            FitParam::BaseLossFactor => cal.base_loss_factor = Some(v),
        }
    }
}

/// A measured quantity the fit compares.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize)]
#[serde(rename_all = "snake_case")]
pub enum Quantity {
    /// Hourly distillate [L].
    Distillate,
    /// Brine temperature [°C].
    BrineTemperature,
    /// Cover temperature [°C].
    CoverTemperature,
    /// Liner temperature [°C].
    LinerTemperature,
}

impl Quantity {
    /// Label for reports.
    pub fn label(self) -> &'static str {
        match self {
            Quantity::Distillate => "distillate",
            Quantity::BrineTemperature => "brine temperature",
            Quantity::CoverTemperature => "cover temperature",
            Quantity::LinerTemperature => "liner temperature",
        }
    }
    /// Unit for reports.
    pub fn unit(self) -> &'static str {
        match self {
            Quantity::Distillate => "L",
            _ => "°C",
        }
    }
    fn model(self, h: &HourRecord) -> f64 {
        match self {
            Quantity::Distillate => h.distillate_l,
            Quantity::BrineTemperature => h.t_brine_c,
            Quantity::CoverTemperature => h.t_cover_c,
            Quantity::LinerTemperature => h.t_liner_c,
        }
    }
}

/// The measurements of one quantity: (hour index, value).
#[derive(Debug, Clone)]
struct Group {
    quantity: Quantity,
    points: Vec<(usize, f64)>,
}

/// How to fit.
#[derive(Debug, Clone)]
pub struct FitSettings {
    /// Parameters to fit (default: all four).
    pub params: Vec<FitParam>,
    /// Run options of the model (default: [`calibration_run_options`]).
    pub run: RunOptions,
    /// Levenberg–Marquardt patience: at most about `patience × (k + 1)` model runs per pass.
    pub patience: usize,
    /// Known σ of the compared quantities (their weights); when `None` (the default) they
    /// are estimated from the residuals of a first fit.
    pub sigma: Option<Vec<(Quantity, f64)>>,
}

/// Run options of the model inside a fit: fixed 10-minute implicit steps (the adaptive step
/// control is switched off by a temperature-change limit no step reaches), so the model's
/// output is smooth in the parameters. With the adaptive control the number of steps jumps
/// as a parameter moves, which makes the finite-difference Jacobian noisy and scatters the
/// estimates more than their intervals say.
pub fn calibration_run_options() -> RunOptions {
    let d = RunOptions::default();
    RunOptions {
        control: crate::network::StepControl {
            initial_step_s: 600.0,
            max_step_s: 600.0,
            max_change_k: 100.0,
            ..d.control
        },
        ..d
    }
}

impl Default for FitSettings {
    fn default() -> Self {
        FitSettings {
            params: FitParam::ALL.to_vec(),
            run: calibration_run_options(),
            patience: 25,
            sigma: None,
        }
    }
}

/// The model over a measured record, ready to be run with trial parameters.
#[derive(Debug)]
pub struct Calibrator<'a> {
    loaded: &'a LoadedDesign,
    variant: Variant,
    weather: SiteWeather,
    spinup: usize,
    groups: Vec<Group>,
    run: RunOptions,
    runs: AtomicUsize,
    /// The highest `distillate_factor` that acts on this variant (the collected share of
    /// every condensing surface capped at 1), capped at the design file's range.
    distillate_upper: f64,
}

/// Reads one measured temperature of an hour.
type HourField = fn(&super::measured::MeasuredHour) -> Option<f64>;

/// Hours of the first day repeated before the record to settle the start state.
pub const SPINUP_HOURS: usize = 24;

impl<'a> Calibrator<'a> {
    /// The model of variant `variant_name` of `loaded` over `measured`.
    pub fn new(
        loaded: &'a LoadedDesign,
        variant_name: &str,
        measured: &MeasuredRecord,
        run: RunOptions,
    ) -> Result<Self, Error> {
        let variant = find_variant(loaded, variant_name)?.clone();
        let series = &measured.series;
        let spinup = SPINUP_HOURS.min(series.hours.len());
        let mut hours = series.hours[..spinup].to_vec();
        hours.extend_from_slice(&series.hours);
        let mut sum = [0.0; 12];
        let mut n = [0u32; 12];
        for h in &series.hours {
            let m = (h.month.clamp(1, 12) - 1) as usize;
            sum[m] += h.t_air_k;
            n[m] += 1;
        }
        let all = sum.iter().sum::<f64>() / f64::from(n.iter().sum::<u32>().max(1));
        let mut month_mean_air_k = [all; 12];
        for m in 0..12 {
            if n[m] > 0 {
                month_mean_air_k[m] = sum[m] / f64::from(n[m]);
            }
        }
        let site = &loaded.design.site;
        let weather = SiteWeather {
            series: WeatherSeries {
                hours,
                ..series.clone()
            },
            average_days: false,
            dew_point_known: measured.dew_point_known,
            month_mean_air_k,
            pressure_pa: crate::physics::humid_air::pressure_at_elevation_pa(site.elevation_m),
            feed_salinity_g_kg: site.feed_salinity_g_kg,
        };
        let mut groups = vec![Group {
            quantity: Quantity::Distillate,
            points: measured
                .hours
                .iter()
                .enumerate()
                .filter_map(|(i, h)| h.distillate_kg.map(|d| (i, d)))
                .collect(),
        }];
        let temps: [(Quantity, HourField); 3] = [
            (Quantity::BrineTemperature, |h| h.t_brine_c),
            (Quantity::CoverTemperature, |h| h.t_cover_c),
            (Quantity::LinerTemperature, |h| h.t_liner_c),
        ];
        for (q, get) in temps {
            let points: Vec<(usize, f64)> = measured
                .hours
                .iter()
                .enumerate()
                .filter_map(|(i, h)| get(h).map(|t| (i, t)))
                .collect();
            if !points.is_empty() {
                groups.push(Group {
                    quantity: q,
                    points,
                });
            }
        }
        let distillate_upper = crate::stills::distillate_factor_upper(loaded, &variant, &weather)?;
        Ok(Calibrator {
            loaded,
            variant,
            weather,
            distillate_upper,
            spinup,
            groups,
            run: RunOptions {
                hourly: true,
                ..run
            },
            runs: AtomicUsize::new(0),
        })
    }

    /// Bounds of the fit of `p` for this variant: the design file's range, with
    /// `distillate_factor` ending where it stops acting.
    pub fn bounds(&self, p: FitParam) -> (f64, f64) {
        let (lo, hi) = p.bounds();
        match p {
            FitParam::DistillateFactor => (lo, hi.min(self.distillate_upper)),
            _ => (lo, hi),
        }
    }

    /// The variant as in the design.
    pub fn variant(&self) -> &Variant {
        &self.variant
    }

    /// Model runs so far.
    pub fn runs(&self) -> usize {
        self.runs.load(Ordering::Relaxed)
    }

    /// The starting value of `p`: the design's calibrated value, else neutral (the cover
    /// material's emissivity).
    pub fn start_value(&self, p: FitParam) -> f64 {
        if let Some(v) = self.variant.calibration.as_ref().and_then(|c| p.get(c)) {
            return v;
        }
        match p {
            FitParam::CoverEmissivity => self
                .loaded
                .library
                .get(&self.variant.cover)
                .and_then(|i| i.cover)
                .map_or(0.9, |c| c.emissivity),
            _ => 1.0,
        }
    }

    /// The variant with `values` of `params` written into its calibration.
    pub fn variant_with(&self, params: &[FitParam], values: &[f64]) -> Variant {
        let mut v = self.variant.clone();
        let cal = v.calibration.get_or_insert_with(Calibration::default);
        for (p, x) in params.iter().zip(values) {
            p.set(cal, *x);
        }
        v
    }

    /// Run the model with `values` of `params`: one record per measured hour.
    pub fn simulate(&self, params: &[FitParam], values: &[f64]) -> Result<Vec<HourRecord>, Error> {
        self.runs.fetch_add(1, Ordering::Relaxed);
        let v = self.variant_with(params, values);
        let model = build_model(self.loaded, &v, &self.weather)?.ok_or_else(|| Error::Model {
            variant: v.name.clone(),
            at: String::new(),
            reason: format!("the {} kind is not modelled yet", v.kind.name()),
        })?;
        let result = run_model_operated(
            model.as_ref(),
            &v.name,
            v.kind.name(),
            &self.weather,
            &self.run,
            &v.operation.clone().unwrap_or_default(),
        )?;
        let mut hourly = result.hourly.unwrap_or_default();
        if hourly.len() != self.weather.series.hours.len() {
            return Err(Error::Model {
                variant: v.name.clone(),
                at: String::new(),
                reason: "the run did not return one record per measured hour".into(),
            });
        }
        Ok(hourly.split_off(self.spinup))
    }

    /// Weighted residuals of a run, group by group.
    fn residuals(&self, hours: &[HourRecord], sigma: &[f64]) -> Vec<f64> {
        let mut r = Vec::new();
        for (g, s) in self.groups.iter().zip(sigma) {
            for &(i, y) in &g.points {
                let m = hours.get(i).map_or(f64::NAN, |h| g.quantity.model(h));
                r.push((m - y) / s);
            }
        }
        r
    }

    fn eval(&self, params: &[FitParam], values: &[f64], sigma: &[f64]) -> Option<Vec<f64>> {
        let hours = self.simulate(params, values).ok()?;
        let r = self.residuals(&hours, sigma);
        r.iter().all(|x| x.is_finite()).then_some(r)
    }
}

fn find_variant<'a>(loaded: &'a LoadedDesign, name: &str) -> Result<&'a Variant, Error> {
    loaded
        .design
        .variants
        .iter()
        .find(|v| v.name == name)
        .ok_or_else(|| {
            let names: Vec<&str> = loaded
                .design
                .variants
                .iter()
                .map(|v| v.name.as_str())
                .collect();
            Error::Design(crate::design::DesignErrors(vec![
                crate::design::DesignIssue {
                    file: loaded.source.clone(),
                    line_col: None,
                    path: "variant".into(),
                    message: format!(
                        "no variant named `{name}`; the design has: {}",
                        names.join(", ")
                    ),
                },
            ]))
        })
}

fn to_p(x: f64, (lo, hi): (f64, f64)) -> f64 {
    lo + (hi - lo) / (1.0 + (-x).exp())
}

fn to_x(p: f64, (lo, hi): (f64, f64)) -> f64 {
    let margin = 1e-3 * (hi - lo);
    let s = ((p.clamp(lo + margin, hi - margin)) - lo) / (hi - lo);
    (s / (1.0 - s)).ln()
}

/// Forward-difference step in the logistic coordinate [-].
const LM_STEP_X: f64 = 1e-2;

struct LmProblem<'c, 'a> {
    cal: &'c Calibrator<'a>,
    params: &'c [FitParam],
    sigma: &'c [f64],
    x: LmVector<f64>,
    r: Option<Vec<f64>>,
}

impl LmProblem<'_, '_> {
    fn values(&self, x: &[f64]) -> Vec<f64> {
        self.params
            .iter()
            .zip(x)
            .map(|(p, xi)| to_p(*xi, self.cal.bounds(*p)))
            .collect()
    }
}

impl LeastSquaresProblem<f64, Dyn, Dyn> for LmProblem<'_, '_> {
    type ResidualStorage = VecStorage<f64, Dyn, U1>;
    type JacobianStorage = VecStorage<f64, Dyn, Dyn>;
    type ParameterStorage = VecStorage<f64, Dyn, U1>;

    fn set_params(&mut self, x: &LmVector<f64>) {
        self.x = x.clone();
        let v = self.values(x.as_slice());
        self.r = self.cal.eval(self.params, &v, self.sigma);
    }

    fn params(&self) -> LmVector<f64> {
        self.x.clone()
    }

    fn residuals(&self) -> Option<LmVector<f64>> {
        self.r.as_ref().map(|r| LmVector::from_column_slice(r))
    }

    fn jacobian(&self) -> Option<LmMatrix<f64, Dyn, Dyn, VecStorage<f64, Dyn, Dyn>>> {
        let r0 = self.r.as_ref()?;
        let k = self.params.len();
        let cols: Vec<Option<Vec<f64>>> = (0..k)
            .into_par_iter()
            .map(|j| {
                let mut x: Vec<f64> = self.x.iter().copied().collect();
                x[j] += LM_STEP_X;
                let r = self.cal.eval(self.params, &self.values(&x), self.sigma)?;
                Some(r.iter().zip(r0).map(|(a, b)| (a - b) / LM_STEP_X).collect())
            })
            .collect();
        let n = r0.len();
        let mut data = Vec::with_capacity(n * k);
        for c in cols {
            data.extend(c?);
        }
        Some(LmMatrix::<f64, Dyn, Dyn, _>::from_column_slice(n, k, &data))
    }
}

/// One fitted parameter.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct FittedParameter {
    /// The parameter.
    pub param: FitParam,
    /// Design-file name.
    pub name: String,
    /// Starting value.
    pub start: f64,
    /// Fitted value.
    pub value: f64,
    /// Standard error.
    pub std_error: f64,
    /// Lower end of the 95 % confidence interval.
    pub ci_low: f64,
    /// Upper end of the 95 % confidence interval.
    pub ci_high: f64,
    /// Bounds of the fit.
    pub bounds: (f64, f64),
    /// Whether the value lies within 1 % of the range from a bound.
    pub at_bound: bool,
}

/// Goodness of fit of one quantity on one time basis.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct FitStatistic {
    /// The quantity.
    pub quantity: Quantity,
    /// `hourly` or `daily`.
    pub basis: String,
    /// Points compared.
    pub n: usize,
    /// Root-mean-square error (model − measured).
    pub rmse: f64,
    /// Mean bias (model − measured).
    pub bias: f64,
    /// Coefficient of determination 1 − SS_res/SS_tot.
    pub r2: f64,
    /// Mean of the measurements.
    pub mean_measured: f64,
    /// Unit.
    pub unit: String,
}

/// One hour of the overlay: measured and modelled distillate [L].
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
pub struct OverlayPoint {
    /// Hours since the start of the record.
    pub hour: f64,
    /// Measured distillate over the hour [L], if known.
    pub measured_l: Option<f64>,
    /// Modelled distillate over the hour [L] (calibrated).
    pub modelled_l: f64,
}

/// Everything a calibration found: what `stillbench calibrate` prints and the report's
/// "model validation" section shows.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct CalibrationReport {
    /// Variant calibrated.
    pub variant: String,
    /// Measured file.
    pub measured_file: String,
    /// Hours on the measured grid.
    pub hours: usize,
    /// Fitted parameters.
    pub parameters: Vec<FittedParameter>,
    /// Correlation matrix of the fitted parameters, in `parameters` order.
    pub correlation: Vec<Vec<f64>>,
    /// Goodness of fit, hourly and daily, before (start values) and after.
    pub statistics: Vec<FitStatistic>,
    /// The same statistics with the starting values (the uncalibrated model).
    pub statistics_before: Vec<FitStatistic>,
    /// σ of each compared quantity used as its weight (the residual RMS of a first fit).
    pub sigma: Vec<(Quantity, f64)>,
    /// Degrees of freedom n − k.
    pub dof: usize,
    /// Student t quantile used for the 95 % intervals.
    pub t_quantile: f64,
    /// Model runs made.
    pub model_runs: usize,
    /// How the minimiser ended.
    pub termination: String,
    /// Parameters at a bound, non-identifiable pairs, a failed minimisation.
    pub warnings: Vec<String>,
    /// Why the fitted values cannot be stood behind (a parameter at a bound, parameters the
    /// data cannot tell apart), each with what to fit instead; empty for a usable fit.
    /// `stillbench calibrate` refuses to write such a fit unless forced.
    pub unfit: Vec<String>,
    /// What reading the measured file found and did.
    pub data: super::measured::MeasuredSummary,
    /// Measured and modelled hourly distillate, for the time-series overlay.
    pub overlay: Vec<OverlayPoint>,
}

/// Student t quantile t₀.₉₇₅ with `dof` degrees of freedom, by the Cornish–Fisher expansion
/// about the normal quantile (Abramowitz & Stegun 1964, eq. 26.7.5), to four terms.
/// Reads 2.2281 at 10 and 2.0423 at 30 degrees of freedom (table: 2.228, 2.042); below 3
/// degrees of freedom the expansion is poor, so 1 and 2 use the exact values 12.706 and
/// 4.303 (from memory).
pub fn student_t_975(dof: usize) -> f64 {
    match dof {
        0 => f64::INFINITY,
        1 => 12.706,
        2 => 4.303,
        _ => {
            let z: f64 = 1.959_963_984_540_054;
            let v = dof as f64;
            let (z3, z5, z7, z9) = (z.powi(3), z.powi(5), z.powi(7), z.powi(9));
            let g1 = (z3 + z) / 4.0;
            let g2 = (5.0 * z5 + 16.0 * z3 + 3.0 * z) / 96.0;
            let g3 = (3.0 * z7 + 19.0 * z5 + 17.0 * z3 - 15.0 * z) / 384.0;
            let g4 = (79.0 * z9 + 776.0 * z7 + 1482.0 * z5 - 1920.0 * z3 - 945.0 * z) / 92160.0;
            z + g1 / v + g2 / v.powi(2) + g3 / v.powi(3) + g4 / v.powi(4)
        }
    }
}

/// n, RMSE, bias, R² and mean of measured of (model, measured) pairs.
pub fn fit_statistics(pairs: &[(f64, f64)]) -> (usize, f64, f64, f64, f64) {
    let n = pairs.len();
    if n == 0 {
        return (0, f64::NAN, f64::NAN, f64::NAN, f64::NAN);
    }
    let nf = n as f64;
    let mean = pairs.iter().map(|p| p.1).sum::<f64>() / nf;
    let ss_res: f64 = pairs.iter().map(|(m, y)| (m - y).powi(2)).sum();
    let ss_tot: f64 = pairs.iter().map(|(_, y)| (y - mean).powi(2)).sum();
    let bias = pairs.iter().map(|(m, y)| m - y).sum::<f64>() / nf;
    let r2 = if ss_tot > 0.0 {
        1.0 - ss_res / ss_tot
    } else {
        f64::NAN
    };
    (n, (ss_res / nf).sqrt(), bias, r2, mean)
}

fn statistics(
    cal: &Calibrator<'_>,
    measured: &MeasuredRecord,
    hours: &[HourRecord],
) -> Vec<FitStatistic> {
    let mut out = Vec::new();
    let stat = |q: Quantity, basis: &str, pairs: &[(f64, f64)]| {
        let (n, rmse, bias, r2, mean) = fit_statistics(pairs);
        FitStatistic {
            quantity: q,
            basis: basis.to_owned(),
            n,
            rmse,
            bias,
            r2,
            mean_measured: mean,
            unit: q.unit().to_owned(),
        }
    };
    for g in &cal.groups {
        let pairs: Vec<(f64, f64)> = g
            .points
            .iter()
            .filter_map(|&(i, y)| hours.get(i).map(|h| (g.quantity.model(h), y)))
            .collect();
        out.push(stat(g.quantity, "hourly", &pairs));
    }
    // Daily distillate over the days whose every hour in the record is known, with at least
    // 20 hours of the day in the record.
    let recs = &measured.series.hours;
    let mut days: Vec<(u32, f64, f64, usize, bool)> = Vec::new();
    for (i, (m, h)) in measured.hours.iter().zip(recs).enumerate() {
        let model = hours.get(i).map_or(f64::NAN, |r| r.distillate_l);
        match days.last_mut() {
            Some(d) if d.0 == h.day_of_year => {
                d.1 += model;
                d.2 += m.distillate_kg.unwrap_or(0.0);
                d.3 += 1;
                d.4 &= m.distillate_kg.is_some();
            }
            _ => days.push((
                h.day_of_year,
                model,
                m.distillate_kg.unwrap_or(0.0),
                1,
                m.distillate_kg.is_some(),
            )),
        }
    }
    let daily: Vec<(f64, f64)> = days
        .iter()
        .filter(|d| d.4 && d.3 >= 20)
        .map(|d| (d.1, d.2))
        .collect();
    out.push(stat(Quantity::Distillate, "daily", &daily));
    out
}

/// Fit `settings.params` of variant `variant_name` to `measured`.
///
/// Errors: an unknown variant or parameter list ([`Error::Design`]), a model run that fails
/// at the start values ([`Error::Model`]).
pub fn calibrate(
    loaded: &LoadedDesign,
    variant_name: &str,
    measured: &MeasuredRecord,
    settings: &FitSettings,
) -> Result<CalibrationReport, Error> {
    let cal = Calibrator::new(loaded, variant_name, measured, settings.run)?;
    calibrate_with(&cal, measured, settings)
}

/// As [`calibrate`], with a [`Calibrator`] already set up (tests and benches reuse one).
pub fn calibrate_with(
    cal: &Calibrator<'_>,
    measured: &MeasuredRecord,
    settings: &FitSettings,
) -> Result<CalibrationReport, Error> {
    let mut params: Vec<FitParam> = Vec::new();
    for p in &settings.params {
        if !params.contains(p) {
            params.push(*p);
        }
    }
    let k = params.len();
    let start: Vec<f64> = params.iter().map(|p| cal.start_value(*p)).collect();
    let before = cal.simulate(&params, &start)?;
    let n: usize = cal.groups.iter().map(|g| g.points.len()).sum();
    let name = cal.variant.name.clone();
    if k == 0 || n <= k {
        return Err(Error::Model {
            variant: name,
            at: String::new(),
            reason: format!("{n} measurements cannot fit {k} parameters"),
        });
    }
    // First weights: 10 % of the mean measured hourly distillate, 1 K.
    let mut sigma: Vec<f64> = cal
        .groups
        .iter()
        .map(|g| match g.quantity {
            Quantity::Distillate => {
                let m = g.points.iter().map(|p| p.1.abs()).sum::<f64>() / g.points.len() as f64;
                (0.1 * m).max(1e-6)
            }
            _ => 1.0,
        })
        .collect();
    if let Some(known) = &settings.sigma {
        for (g, s) in cal.groups.iter().zip(sigma.iter_mut()) {
            if let Some((_, v)) = known.iter().find(|(q, _)| *q == g.quantity) {
                *s = *v;
            }
        }
    }
    let passes = if settings.sigma.is_some() { 1 } else { 2 };
    let mut x: Vec<f64> = params
        .iter()
        .zip(&start)
        .map(|(p, v)| to_x(*v, cal.bounds(*p)))
        .collect();
    let mut termination = String::new();
    let mut warnings = Vec::new();
    for pass in 0..passes {
        let mut problem = LmProblem {
            cal,
            params: &params,
            sigma: &sigma,
            x: LmVector::from_column_slice(&x),
            r: None,
        };
        let x0 = problem.x.clone();
        problem.set_params(&x0);
        if problem.r.is_none() {
            return Err(Error::Model {
                variant: name,
                at: String::new(),
                reason: "the model failed at the start values of the calibration".into(),
            });
        }
        let (solved, report) = LevenbergMarquardt::new()
            .with_patience(settings.patience)
            .with_ftol(1e-8)
            .with_xtol(1e-8)
            .minimize(problem);
        termination = termination_in_words(&report.termination);
        if !report.termination.was_successful() && pass + 1 == passes {
            warnings.push(format!(
                "the minimiser stopped without converging ({termination}); treat the values with \
                 care"
            ));
        }
        x = solved.x.iter().copied().collect();
        // Reweight: each group's residual RMS at this fit.
        let values: Vec<f64> = params
            .iter()
            .zip(&x)
            .map(|(p, xi)| to_p(*xi, cal.bounds(*p)))
            .collect();
        let hours = cal.simulate(&params, &values)?;
        if pass + 1 < passes {
            sigma = cal
                .groups
                .iter()
                .zip(&sigma)
                .map(|(g, s0)| {
                    let ss: f64 = g
                        .points
                        .iter()
                        .map(|&(i, y)| {
                            hours
                                .get(i)
                                .map_or(0.0, |h| (g.quantity.model(h) - y).powi(2))
                        })
                        .sum();
                    let rms = (ss / g.points.len() as f64).sqrt();
                    if rms.is_finite() && rms > 1e-3 * s0 {
                        rms
                    } else {
                        *s0
                    }
                })
                .collect();
        }
    }
    let values: Vec<f64> = params
        .iter()
        .zip(&x)
        .map(|(p, xi)| to_p(*xi, cal.bounds(*p)))
        .collect();
    let best = cal.simulate(&params, &values)?;
    let r0 = cal.residuals(&best, &sigma);
    // Jacobian in the parameters themselves, central differences (one-sided at a bound).
    let cols: Vec<Result<Vec<f64>, Error>> = (0..k)
        .into_par_iter()
        .map(|j| {
            let (lo, hi) = cal.bounds(params[j]);
            let h = 2e-3 * (hi - lo);
            let up = (values[j] + h).min(hi);
            let dn = (values[j] - h).max(lo);
            let mut vu = values.clone();
            vu[j] = up;
            let mut vd = values.clone();
            vd[j] = dn;
            let ru = cal.residuals(&cal.simulate(&params, &vu)?, &sigma);
            let rd = cal.residuals(&cal.simulate(&params, &vd)?, &sigma);
            Ok(ru
                .iter()
                .zip(&rd)
                .map(|(a, b)| (a - b) / (up - dn))
                .collect())
        })
        .collect();
    let mut jac = DMatrix::<f64>::zeros(r0.len(), k);
    for (j, c) in cols.into_iter().enumerate() {
        for (i, v) in c?.into_iter().enumerate() {
            jac[(i, j)] = v;
        }
    }
    let dof = n - k;
    let s2 = r0.iter().map(|r| r * r).sum::<f64>() / dof as f64;
    let jtj = jac.transpose() * &jac;
    let t = student_t_975(dof);
    let cov = jtj.clone().try_inverse().map(|m| m * s2);
    let mut unfit = Vec::new();
    let names = || {
        params
            .iter()
            .map(|p| p.name())
            .collect::<Vec<_>>()
            .join(", ")
    };
    if cov.is_none() {
        warnings.push(
            "JᵀJ is singular: the fitted parameters cannot be told apart from these data; no \
             intervals"
                .to_owned(),
        );
        unfit.push(format!(
            "{} cannot be told apart from these data (JᵀJ is singular); fit fewer of them \
             (`--fit distillate_factor` alone, say), or add measured temperatures",
            names()
        ));
    }
    let mut parameters = Vec::with_capacity(k);
    for j in 0..k {
        let (lo, hi) = cal.bounds(params[j]);
        let se = cov
            .as_ref()
            .map_or(f64::INFINITY, |c| c[(j, j)].max(0.0).sqrt());
        let v = values[j];
        let at_bound = v - lo < 0.01 * (hi - lo) || hi - v < 0.01 * (hi - lo);
        if at_bound {
            warnings.push(format!(
                "{} = {v:.4} is at a bound of [{lo:.3}, {hi:.3}]: the data push it beyond what \
                 the model allows; look for a cause the factors do not cover",
                params[j].name()
            ));
            let others: Vec<&str> = params
                .iter()
                .filter(|p| **p != params[j])
                .map(|p| p.name())
                .collect();
            unfit.push(format!(
                "{} = {v:.4} is at a bound of [{lo:.3}, {hi:.3}]; fit {} instead, and look \
                 for what the factors do not cover (leaks, a shaded or dirty cover, a wrong \
                 meter)",
                params[j].name(),
                if others.is_empty() {
                    "another parameter".to_owned()
                } else {
                    others.join(", ")
                }
            ));
        }
        parameters.push(FittedParameter {
            param: params[j],
            name: params[j].name().to_owned(),
            start: start[j],
            value: v,
            std_error: se,
            ci_low: v - t * se,
            ci_high: v + t * se,
            bounds: (lo, hi),
            at_bound,
        });
    }
    let mut correlation = vec![vec![f64::NAN; k]; k];
    if let Some(c) = &cov {
        for a in 0..k {
            for b in 0..k {
                let d = (c[(a, a)] * c[(b, b)]).sqrt();
                correlation[a][b] = if d > 0.0 { c[(a, b)] / d } else { f64::NAN };
            }
        }
        for a in 0..k {
            for b in a + 1..k {
                if correlation[a][b].abs() > 0.95 {
                    warnings.push(format!(
                        "{} and {} correlate at {:.3}: not separately identifiable from these \
                         data (fit one of them, or measure temperatures)",
                        params[a].name(),
                        params[b].name(),
                        correlation[a][b]
                    ));
                    unfit.push(format!(
                        "{} and {} correlate at {:.3}: the data cannot tell them apart; fit \
                         only one of them, or add measured temperatures",
                        params[a].name(),
                        params[b].name(),
                        correlation[a][b]
                    ));
                }
            }
        }
    }
    let overlay = best
        .iter()
        .zip(&measured.hours)
        .enumerate()
        .map(|(i, (m, h))| OverlayPoint {
            hour: i as f64,
            measured_l: h.distillate_kg,
            modelled_l: m.distillate_l,
        })
        .collect();
    Ok(CalibrationReport {
        variant: name,
        measured_file: measured.path.display().to_string(),
        hours: measured.hours.len(),
        statistics: statistics(cal, measured, &best),
        statistics_before: statistics(cal, measured, &before),
        parameters,
        correlation,
        sigma: cal
            .groups
            .iter()
            .zip(&sigma)
            .map(|(g, s)| (g.quantity, *s))
            .collect(),
        dof,
        t_quantile: t,
        model_runs: cal.runs(),
        termination,
        warnings,
        unfit,
        data: measured.summary.clone(),
        overlay,
    })
}

/// Why the minimiser stopped, in words for the output (never the Rust value).
fn termination_in_words(t: &levenberg_marquardt::TerminationReason) -> String {
    use levenberg_marquardt::TerminationReason as T;
    match t {
        T::Converged { ftol, xtol } => match (ftol, xtol) {
            (true, true) => "converged: the sum of squares and the parameters stopped changing",
            (true, false) => "converged: the sum of squares stopped changing",
            (false, true) => "converged: the parameters stopped changing",
            (false, false) => "converged",
        }
        .to_owned(),
        T::ResidualsZero => "converged: the residuals are zero".to_owned(),
        T::Orthogonal => {
            "converged: the residuals are orthogonal to the Jacobian's columns".to_owned()
        }
        T::LostPatience => "stopped: the evaluation budget ran out".to_owned(),
        T::NoImprovementPossible(why) => format!("stopped: no further improvement ({why})"),
        T::Numerical(why) => format!("stopped: a numerical problem ({why})"),
        T::User(why) => format!("stopped: {why}"),
        T::NoParameters => "stopped: nothing to fit".to_owned(),
        T::NoResiduals => "stopped: no measured values to fit".to_owned(),
        T::WrongDimensions(why) => format!("stopped: inconsistent sizes ({why})"),
    }
}
