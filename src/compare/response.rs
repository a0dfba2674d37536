//! A fast daily response model per variant and month, fitted from full simulations, so a
//! Monte Carlo of thousands of years costs milliseconds instead of hours.
//!
//! Why it can be simple: the site's stochastic years ([`StochasticModel`]) vary only the
//! daily clearness index; each month's air temperature profile, humidity and wind are the
//! month's means every day. So within a month the daily yield is a function of the day's
//! irradiation, plus the heat a still carries over from the days before.
//!
//! What is fitted, per variant ([`fit_responses`]):
//! * **clearness levels** — seven runs of periodic average days, one per month, built exactly
//!   as the stochastic generator builds a day (Klein's recommended day of the month,
//!   Collares-Pereira & Rabl hours, Erbs et al.'s *daily* diffuse fraction) but with the
//!   daily clearness index at seven evenly spaced points (0, 1/6, …, 1) of that month's Bendt
//!   et al. distribution ([`LEVELS`]). A day's yield is interpolated linearly in its
//!   irradiation between those points ([`VariantResponse::day_l_m2`]). Carry-over between days is
//!   not modelled; its effect on monthly means is what the validation measures.
//! * **parameter factors** — for each uncertain parameter that applies, one run of the
//!   ordinary monthly average days at its low (P10) and one at its high (P90) value. The
//!   factor of month *m* is yield ÷ nominal yield, interpolated piecewise-linearly between
//!   low, nominal and high and extrapolated linearly beyond (never below 0). Factors of
//!   different parameters multiply (no interactions).
//!
//! Cost: 1 + 7 + 2 × (parameters) periodic average-day runs per variant (about 22), run in
//! parallel; on the demo design about as long as 20 `compare` runs.
//!
//! [`validate_response`] compares the model with full hour-by-hour simulations of stochastic
//! years drawn with another seed: errors of monthly means, of the annual total, and the
//! daily RMS.

use rayon::prelude::*;
use serde::Serialize;
use std::sync::atomic::{AtomicU64, Ordering};

use super::evaluate::Skipped;
use super::size::{unit_years, weather_model};
use super::uncertainty::{ParameterKind, Progress, UncertainParameter, perturbed};
use crate::climate::monthly::push_synthetic_day;
use crate::climate::stochastic::{StochasticModel, erbs_daily_diffuse_fraction};
use crate::climate::{ClimateSource, SunTable, WeatherSeries, WeatherSource, month_of_day};
use crate::design::{DAYS_IN_MONTH, LoadedDesign};
use crate::error::Error;
use crate::physics::sun::klein_recommended_day;
use crate::stills::{self, RunOptions, SiteWeather};

/// Number of clearness levels fitted per month.
pub const N_LEVELS: usize = 7;

/// Cumulative probabilities of the clearness levels fitted per month [-]: 0, 1/6, …, 1.
/// Seven rather than five because linear interpolation between five levels left a worst
/// monthly error just above 3 % on the demo's single-slope still.
pub const LEVELS: [f64; N_LEVELS] = [0.0, 1.0 / 6.0, 1.0 / 3.0, 0.5, 2.0 / 3.0, 5.0 / 6.0, 1.0];

/// The fitted effect of one parameter on one variant.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct ParameterFactor {
    /// The parameter.
    pub kind: ParameterKind,
    /// Its low value [-].
    pub low: f64,
    /// Its nominal value [-].
    pub nominal: f64,
    /// Its high value [-].
    pub high: f64,
    /// Mean daily yield of each month at the low value [L m⁻² day⁻¹].
    pub low_month_l_m2_day: [f64; 12],
    /// The same at the high value [L m⁻² day⁻¹].
    pub high_month_l_m2_day: [f64; 12],
    /// Annual yield at the low value [L m⁻² year⁻¹].
    pub low_annual_l_m2: f64,
    /// Annual yield at the high value [L m⁻² year⁻¹].
    pub high_annual_l_m2: f64,
}

/// The response model of one variant.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct VariantResponse {
    /// Variant index in the design (0-based).
    pub index: usize,
    /// Variant name.
    pub name: String,
    /// Kind name.
    pub kind: String,
    /// Footprint \[m²\].
    pub footprint_m2: f64,
    /// Annual yield of the ordinary (deterministic) run [L m⁻² year⁻¹].
    pub deterministic_annual_l_m2: f64,
    /// Its worst month (1…12).
    pub deterministic_worst_month: u32,
    /// Its worst-month yield [L m⁻² day⁻¹].
    pub deterministic_worst_month_l_m2_day: f64,
    /// Mean daily yield of each month in the ordinary run [L m⁻² day⁻¹].
    pub nominal_month_l_m2_day: [f64; 12],
    /// Daily global horizontal irradiation of each month's clearness levels, ascending
    /// [J m⁻²] (a level whose run failed is left out, see `notes`).
    pub level_h_j_m2: [Vec<f64>; 12],
    /// Daily yield at each level [L m⁻² day⁻¹].
    pub level_l_m2_day: [Vec<f64>; 12],
    /// Extraterrestrial daily irradiation on a horizontal surface, day 1…365 [J m⁻²].
    #[serde(skip)]
    pub h0_j_m2: Vec<f64>,
    /// Fitted factors of the parameters that apply to this variant.
    pub factors: Vec<ParameterFactor>,
    /// Fitting runs that failed even with a longer run, and were left out.
    pub notes: Vec<String>,
}

/// Piecewise-linear interpolation through `(xs, ys)` (xs ascending), extrapolating the end
/// segments linearly.
fn interpolate(xs: &[f64], ys: &[f64], x: f64) -> f64 {
    let n = xs.len().min(ys.len());
    if n == 0 {
        return 0.0;
    }
    if n == 1 {
        return ys[0];
    }
    let mut k = 0;
    while k + 2 < n && x > xs[k + 1] {
        k += 1;
    }
    let dx = xs[k + 1] - xs[k];
    if dx.abs() < 1e-12 {
        return 0.5 * (ys[k] + ys[k + 1]);
    }
    ys[k] + (x - xs[k]) * (ys[k + 1] - ys[k]) / dx
}

impl VariantResponse {
    /// Predicted yield of a day of month `month` (1…12) with daily global horizontal
    /// irradiation `h_j_m2` [J m⁻²], at nominal parameters [L m⁻² day⁻¹] (never below 0).
    pub fn day_l_m2(&self, month: u32, h_j_m2: f64) -> f64 {
        let m = (month.clamp(1, 12) - 1) as usize;
        interpolate(&self.level_h_j_m2[m], &self.level_l_m2_day[m], h_j_m2).max(0.0)
    }

    /// Predicted daily yields of a year of daily clearness indices (365 values) [L m⁻² day⁻¹].
    pub fn daily_l_m2(&self, kts: &[f64]) -> Vec<f64> {
        kts.iter()
            .enumerate()
            .map(|(i, &kt)| {
                let n = i as u32 + 1;
                let h0 = self.h0_j_m2.get(i).copied().unwrap_or(0.0);
                self.day_l_m2(month_of_day(n.min(365)), kt * h0)
            })
            .collect()
    }

    /// Mean predicted yield of each month of a year of daily clearness indices
    /// [L m⁻² day⁻¹].
    pub fn month_means_l_m2_day(&self, kts: &[f64]) -> [f64; 12] {
        month_means(&self.daily_l_m2(kts))
    }

    /// The product of the fitted factors of month `month` (1…12) at the parameter values
    /// given (parameters that do not apply to this variant, or are not listed, count 1).
    pub fn parameter_factor(&self, month: u32, values: &[(ParameterKind, f64)]) -> f64 {
        let m = (month.clamp(1, 12) - 1) as usize;
        let nominal = self.nominal_month_l_m2_day[m];
        if nominal <= 0.0 {
            return 1.0;
        }
        let mut f = 1.0;
        for (kind, x) in values {
            if let Some(p) = self.factors.iter().find(|p| p.kind == *kind) {
                let xs = [p.low, p.nominal, p.high];
                let ys = [
                    p.low_month_l_m2_day[m] / nominal,
                    1.0,
                    p.high_month_l_m2_day[m] / nominal,
                ];
                f *= interpolate(&xs, &ys, *x).max(0.0);
            }
        }
        f
    }
}

/// Mean of each month of 365 daily values.
pub fn month_means(daily: &[f64]) -> [f64; 12] {
    let mut out = [0.0; 12];
    let mut start = 0usize;
    for (m, days) in DAYS_IN_MONTH.iter().enumerate() {
        let end = (start + *days as usize).min(daily.len());
        let s = daily.get(start..end).unwrap_or(&[]);
        out[m] = if s.is_empty() {
            0.0
        } else {
            s.iter().sum::<f64>() / s.len() as f64
        };
        start = end;
    }
    out
}

/// Responses of every variant that could be fitted, and what the fitting used.
#[derive(Debug, Clone)]
pub struct FittedResponses {
    /// In design order.
    pub responses: Vec<VariantResponse>,
    /// Variants that could not be fitted, and why.
    pub skipped: Vec<Skipped>,
    /// The site's stochastic weather generator.
    pub weather_model: StochasticModel,
    /// The ordinary site weather (monthly average days).
    pub base_weather: SiteWeather,
    /// Simulations run.
    pub steps: u64,
}

/// Twelve periodic days (one per month) at cumulative probability `p` of each month's daily
/// clearness distribution, built as the stochastic generator builds its days.
pub fn level_weather(
    loaded: &LoadedDesign,
    model: &StochasticModel,
    base: &SiteWeather,
    p: f64,
) -> Result<SiteWeather, Error> {
    let site = &loaded.design.site;
    let ClimateSource::Monthly(means) = site.climate_source() else {
        return Err(super::uncertainty::option_error(
            loaded,
            "site.climate",
            "uncertainty draws stochastic years from monthly means; this site uses a weather \
             file"
                .into(),
        ));
    };
    let table = SunTable::new(&site.location())?;
    let mut hours = Vec::with_capacity(12 * 24);
    for month in 1..=12u32 {
        let m = (month - 1) as usize;
        let day = table.day(klein_recommended_day(month));
        let kt = model.distribution(month).quantile(p);
        let h = kt * day.h0_j_m2;
        let hd = h * erbs_daily_diffuse_fraction(kt, day.sunset_hour_angle_rad);
        push_synthetic_day(day, month, h, hd, &means.average_day_air(m), &mut hours);
    }
    Ok(SiteWeather {
        series: WeatherSeries {
            hours,
            poa_plane: None,
            source: WeatherSource::AverageDays,
            albedo: base.series.albedo,
        },
        average_days: true,
        ..base.clone()
    })
}

/// One fitting simulation.
#[derive(Debug, Clone, Copy)]
enum Job {
    Nominal,
    Level(usize),
    Low(usize),
    High(usize),
}

/// Fit the response model of every variant of a design.
///
/// Errors: [`Error::Design`] for a weather-file site; [`Error::Model`] when no variant
/// could be fitted. `progress` is called with (runs done, runs in all).
pub fn fit_responses(
    loaded: &LoadedDesign,
    parameters: &[UncertainParameter],
    progress: Option<Progress<'_>>,
) -> Result<FittedResponses, Error> {
    let model = weather_model(loaded)?;
    let base = stills::site_weather(loaded)?;
    let table = SunTable::new(&loaded.design.site.location())?;
    let h0: Vec<f64> = (1..=365).map(|n| table.day(n).h0_j_m2).collect();
    let levels: Vec<SiteWeather> = LEVELS
        .iter()
        .map(|&p| level_weather(loaded, &model, &base, p))
        .collect::<Result<_, _>>()?;
    let opts = RunOptions::default();
    let long = RunOptions {
        max_days: 3 * opts.max_days,
        ..opts
    };
    let mut jobs: Vec<(usize, Job)> = Vec::new();
    for (i, v) in loaded.design.variants.iter().enumerate() {
        jobs.push((i, Job::Nominal));
        jobs.extend((0..LEVELS.len()).map(|l| (i, Job::Level(l))));
        for (k, p) in parameters.iter().enumerate() {
            if p.kind.applies_to(v) {
                jobs.push((i, Job::Low(k)));
                jobs.push((i, Job::High(k)));
            }
        }
    }
    // Steps: the fitting runs, then (in run_uncertainty) the samples; the caller's total is
    // only known there, so report the runs against their own count here.
    let total = jobs.len() as u64;
    let done = AtomicU64::new(0);
    let results: Vec<Result<[f64; 12], Error>> = jobs
        .par_iter()
        .map(|&(i, job)| {
            let r = match run_job(loaded, i, job, parameters, &base, &levels, &opts) {
                // A fitting run away from nominal may settle slowly (a nearly dark day, a
                // flush cycle): try once more with three times the days.
                Err(Error::Model { .. }) if !matches!(job, Job::Nominal) => {
                    run_job(loaded, i, job, parameters, &base, &levels, &long)
                }
                other => other,
            };
            let n = done.fetch_add(1, Ordering::Relaxed) + 1;
            if let Some(p) = progress {
                p(n, total);
            }
            r
        })
        .collect();
    let mut responses = Vec::new();
    let mut skipped = Vec::new();
    let mut at = 0usize;
    let mut results = results.into_iter();
    for (i, v) in loaded.design.variants.iter().enumerate() {
        let n = jobs[at..].iter().take_while(|(j, _)| *j == i).count();
        let kinds = &jobs[at..at + n];
        at += n;
        let mut nominal = None;
        let mut nominal_failure = None;
        let mut level_h: [Vec<f64>; 12] = std::array::from_fn(|_| Vec::new());
        let mut level_y: [Vec<f64>; 12] = std::array::from_fn(|_| Vec::new());
        let mut lows: Vec<(usize, [f64; 12])> = Vec::new();
        let mut highs: Vec<(usize, [f64; 12])> = Vec::new();
        let mut notes = Vec::new();
        // Take all n results, so the next variant starts in place.
        for (&(_, job), r) in kinds.iter().zip(results.by_ref().take(n)) {
            match (job, r) {
                (Job::Nominal, Ok(m)) => nominal = Some(m),
                (Job::Level(l), Ok(m)) => {
                    for month in 1..=12u32 {
                        let mi = (month - 1) as usize;
                        let day = table.day(klein_recommended_day(month));
                        let kt = model.distribution(month).quantile(LEVELS[l]);
                        level_h[mi].push(kt * day.h0_j_m2);
                        level_y[mi].push(m[mi]);
                    }
                }
                (Job::Low(k), Ok(m)) => lows.push((k, m)),
                (Job::High(k), Ok(m)) => highs.push((k, m)),
                (job, Err(Error::Model { reason, at, .. })) => {
                    let why = format!("{reason}{at}");
                    match job {
                        Job::Nominal => nominal_failure = Some(why),
                        Job::Level(l) => notes.push(format!(
                            "clearness level {:.0} % left out of the fit: {why}",
                            LEVELS[l] * 100.0
                        )),
                        Job::Low(k) | Job::High(k) => notes.push(format!(
                            "{} left out (treated as certain) for this variant: {why}",
                            parameters[k].kind.key()
                        )),
                    }
                }
                (_, Err(e)) => return Err(e),
            }
        }
        let Some(nominal) = nominal else {
            skipped.push(Skipped {
                name: v.name.clone(),
                reason: nominal_failure.unwrap_or_else(|| "no nominal run".into()),
            });
            continue;
        };
        if level_h[0].len() < 2 {
            skipped.push(Skipped {
                name: v.name.clone(),
                reason: format!(
                    "fewer than two clearness levels could be simulated: {}",
                    notes.join("; ")
                ),
            });
            continue;
        }
        let mut factors = Vec::new();
        for &(k, low) in &lows {
            let Some(&(_, high)) = highs.iter().find(|(kh, _)| *kh == k) else {
                continue;
            };
            let p = &parameters[k];
            factors.push(ParameterFactor {
                kind: p.kind,
                low: p.low(),
                nominal: p.nominal(),
                high: p.high(),
                low_month_l_m2_day: low,
                high_month_l_m2_day: high,
                low_annual_l_m2: annual(&low),
                high_annual_l_m2: annual(&high),
            });
        }
        let (worst_month, worst) =
            nominal
                .iter()
                .enumerate()
                .fold((1u32, f64::INFINITY), |acc, (mi, &y)| {
                    if y < acc.1 { (mi as u32 + 1, y) } else { acc }
                });
        responses.push(VariantResponse {
            index: i,
            name: v.name.clone(),
            kind: v.kind.name().to_owned(),
            footprint_m2: v.footprint_m2(),
            deterministic_annual_l_m2: annual(&nominal),
            deterministic_worst_month: worst_month,
            deterministic_worst_month_l_m2_day: worst,
            nominal_month_l_m2_day: nominal,
            level_h_j_m2: level_h,
            level_l_m2_day: level_y,
            h0_j_m2: h0.clone(),
            factors,
            notes,
        });
    }
    if responses.is_empty() {
        return Err(Skipped::none_left(&skipped, "fitted"));
    }
    Ok(FittedResponses {
        responses,
        skipped,
        weather_model: model,
        base_weather: base,
        steps: total,
    })
}

/// Annual total of monthly mean daily yields [L m⁻² year⁻¹].
fn annual(months: &[f64; 12]) -> f64 {
    months
        .iter()
        .zip(DAYS_IN_MONTH)
        .map(|(y, d)| y * f64::from(d))
        .sum()
}

fn run_job(
    loaded: &LoadedDesign,
    index: usize,
    job: Job,
    parameters: &[UncertainParameter],
    base: &SiteWeather,
    levels: &[SiteWeather],
    opts: &RunOptions,
) -> Result<[f64; 12], Error> {
    let (design, weather) = match job {
        Job::Nominal => (loaded.clone(), base.clone()),
        Job::Level(l) => (loaded.clone(), levels[l].clone()),
        Job::Low(k) | Job::High(k) => {
            let p = &parameters[k];
            let x = if matches!(job, Job::Low(_)) {
                p.low()
            } else {
                p.high()
            };
            perturbed(loaded, index, base, &[(p.kind, x)])?
        }
    };
    let Some(v) = design.design.variants.get(index) else {
        return Err(Error::Model {
            variant: String::new(),
            at: String::new(),
            reason: format!("no variant number {}", index + 1),
        });
    };
    let r = stills::simulate_variant(&design, v, &weather, opts)?;
    let mut out = [0.0; 12];
    for m in &r.months {
        let mi = (m.month.clamp(1, 12) - 1) as usize;
        out[mi] = m.l_m2_day;
    }
    Ok(out)
}

/// How well the response model reproduces full simulations of held-back stochastic years.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct ResponseCheck {
    /// Variant name.
    pub name: String,
    /// Seed of the held-back years.
    pub seed: u64,
    /// Years simulated.
    pub years: u32,
    /// Largest |relative error| of a monthly mean over every month and year [-].
    pub max_month_rel_error: f64,
    /// Mean |relative error| of the monthly means [-].
    pub mean_month_rel_error: f64,
    /// Largest |relative error| of an annual total [-].
    pub max_annual_rel_error: f64,
    /// Root-mean-square error of daily yields [L m⁻² day⁻¹].
    pub daily_rms_l_m2_day: f64,
    /// The same relative to the mean daily yield [-].
    pub daily_rms_rel: f64,
}

/// Compare `response` with full hour-by-hour simulations of `years` stochastic years of
/// `seed` (held back: use a seed other than the Monte Carlo's).
pub fn validate_response(
    loaded: &LoadedDesign,
    fitted: &FittedResponses,
    response: &VariantResponse,
    seed: u64,
    years: u32,
) -> Result<ResponseCheck, Error> {
    let sims = unit_years(
        loaded,
        response.index,
        &fitted.weather_model,
        &fitted.base_weather,
        seed,
        years,
        &RunOptions::default(),
    )?;
    let fp = response.footprint_m2;
    let mut max_month: f64 = 0.0;
    let mut sum_month = 0.0;
    let mut n_month = 0usize;
    let mut max_annual: f64 = 0.0;
    let mut sq = 0.0;
    let mut total = 0.0;
    let mut n_days = 0usize;
    for y in &sims {
        let kts = fitted.weather_model.daily_clearness(seed, y.year_index);
        let pred = response.daily_l_m2(&kts);
        let sim: Vec<f64> = y.daily_l.iter().map(|l| l / fp).collect();
        for (p, s) in pred.iter().zip(&sim) {
            sq += (p - s).powi(2);
            total += s;
            n_days += 1;
        }
        let pm = month_means(&pred);
        let sm = month_means(&sim);
        for (p, s) in pm.iter().zip(&sm) {
            if *s > 0.0 {
                let e = ((p - s) / s).abs();
                max_month = max_month.max(e);
                sum_month += e;
                n_month += 1;
            }
        }
        let (pa, sa): (f64, f64) = (pred.iter().sum(), sim.iter().sum());
        if sa > 0.0 {
            max_annual = max_annual.max(((pa - sa) / sa).abs());
        }
    }
    let rms = (sq / n_days.max(1) as f64).sqrt();
    let mean = total / n_days.max(1) as f64;
    Ok(ResponseCheck {
        name: response.name.clone(),
        seed,
        years,
        max_month_rel_error: max_month,
        mean_month_rel_error: sum_month / n_month.max(1) as f64,
        max_annual_rel_error: max_annual,
        daily_rms_l_m2_day: rms,
        daily_rms_rel: if mean > 0.0 { rms / mean } else { 0.0 },
    })
}
