//! Sizing an array of identical stills to a daily water demand over stochastic weather years.
//!
//! For each variant, [`size_design`] simulates one still over `years` stochastic weather years
//! ([`StochasticModel`], a ChaCha stream per (seed, year)), then works out:
//!
//! * **units** — for every year the whole number of units whose worst month's *mean* daily
//!   output meets the demand, ⌈demand ÷ worst-month L/day of one unit⌉; the array size is the
//!   ⌈confidence · years⌉-th smallest of those (so at least the confidence fraction of the
//!   simulated years are met — an empirical quantile, [`order_statistic_index`]);
//! * **capital** — the array's capital with every unit's parts nested onto stock together
//!   (offcuts shared across units; [`crate::economics::cost_variant_for_units`]);
//! * **operator time** — the daily round plus units × each unit's tasks
//!   ([`crate::economics::operator`]);
//! * **land** — rows facing the equator, spaced so that no row shades the next at solar noon
//!   on the average day of the worst month ([`row_gap_m`]); land = units × length × row pitch;
//! * **storage** — a *low-output day* is a day when the sized array makes less than the
//!   demand; the tank must carry the deficit that builds up over runs of such days. Per year
//!   the sequent-peak storage ([`sequent_peak_storage_l`]) is the largest cumulative deficit
//!   (the tank refills on surplus days); the reported volume is the same order statistic
//!   over years as the units, so it suffices in at least the confidence fraction of years;
//! * **rain** — where the site gives monthly rainfall, the rain the covers would catch
//!   ([`rain_catch_l`]), reported apart and never added to the distillate.
//!
//! Years are simulated in parallel (rayon) but collected and reduced in year order (no
//! parallel float sums), so a seed gives the same figures on any number of threads.
//!
//! Two ways to get the years ([`SizeMethod`]): the daily **response model**
//! ([`super::response`], fitted from eight average-day runs per variant and validated against
//! full simulation of held-back stochastic years within 3 % for monthly means — see
//! `docs/compare.md`), which makes the many years cost milliseconds; or **full** hour-by-hour
//! simulation of every year ([`unit_years`], `size --full`), which takes seconds to tens of
//! seconds on the demo. Both read the same stochastic years (same seed, same daily clearness).

use rayon::prelude::*;
use serde::Serialize;

use super::evaluate::Skipped;
use super::response::{VariantResponse, fit_responses};
use crate::climate::stochastic::StochasticModel;
use crate::climate::{ClimateSource, StochasticSettings};
use crate::design::{
    Climate, DAYS_IN_MONTH, DesignErrors, DesignIssue, LoadedDesign, Variant, VariantKind,
};
use crate::economics;
use crate::error::Error;
use crate::physics::sun::{declination_cooper_rad, klein_recommended_day};
use crate::stills::{self, RunOptions, SiteWeather};

pub use crate::design::{DRINKING_AND_COOKING_L_PER_PERSON_DAY, DRINKING_L_PER_PERSON_DAY};

/// Runoff coefficient of a glass or plastic cover [-]: the share of the rain falling on the
/// cover's plan area that reaches a gutter (splash, wetting and first-flush losses).
/// Common practice, no source (0.8–0.9 is the usual figure for smooth roofs).
pub const COVER_RUNOFF_COEFFICIENT: f64 = 0.8;

/// Default number of stochastic years.
pub const DEFAULT_YEARS: u32 = 20;

/// Default confidence: the fraction of years in which the demand must be met.
pub const DEFAULT_CONFIDENCE: f64 = 0.9;

/// Most stochastic years accepted (each is a full hourly simulation of every variant).
pub const MAX_YEARS: u32 = 1000;

/// How `size` gets each variant's stochastic years.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize, Default)]
#[serde(rename_all = "kebab-case")]
pub enum SizeMethod {
    /// The validated daily response model ([`response_years`]): fast (the default of the
    /// command).
    #[default]
    Response,
    /// Full hour-by-hour simulation of every year ([`unit_years`]).
    Full,
}

/// What to size for.
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
pub struct SizeOptions {
    /// Demand [L day⁻¹], > 0.
    pub demand_l_day: f64,
    /// Fraction of years in which the demand must be met [-], in (0, 1).
    pub confidence: f64,
    /// Stochastic weather years, 1…[`MAX_YEARS`].
    pub years: u32,
    /// Seed of the weather generator.
    pub seed: u64,
}

impl SizeOptions {
    /// Check the options; the error names the option (`--demand`, `--confidence`, `--years`).
    pub fn validate(&self) -> Result<(), (String, String)> {
        if !(self.demand_l_day.is_finite() && self.demand_l_day > 0.0) {
            return Err((
                "--demand".into(),
                format!(
                    "the demand must be a positive number of litres a day, got {}",
                    self.demand_l_day
                ),
            ));
        }
        if !(self.confidence.is_finite() && self.confidence > 0.0 && self.confidence < 1.0) {
            return Err((
                "--confidence".into(),
                format!(
                    "the confidence must lie strictly between 0 and 1, got {}",
                    self.confidence
                ),
            ));
        }
        if self.years == 0 || self.years > MAX_YEARS {
            return Err((
                "--years".into(),
                format!("between 1 and {MAX_YEARS} years, got {}", self.years),
            ));
        }
        Ok(())
    }
}

/// One still over one stochastic year.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct UnitYear {
    /// Year index of the generator stream.
    pub year_index: u64,
    /// Distillate of one still on each of the 365 days [L day⁻¹].
    pub daily_l: Vec<f64>,
    /// Mean daily distillate of one still in each month [L day⁻¹].
    pub month_mean_l_day: [f64; 12],
}

impl UnitYear {
    /// Build from the 365 daily outputs of one still [L day⁻¹].
    pub fn from_daily(year_index: u64, daily_l: Vec<f64>) -> Self {
        let mut month_mean_l_day = [0.0; 12];
        let mut start = 0usize;
        for (m, days) in DAYS_IN_MONTH.iter().enumerate() {
            let end = (start + *days as usize).min(daily_l.len());
            let slice = daily_l.get(start..end).unwrap_or(&[]);
            month_mean_l_day[m] = if slice.is_empty() {
                0.0
            } else {
                slice.iter().sum::<f64>() / slice.len() as f64
            };
            start = end;
        }
        Self {
            year_index,
            daily_l,
            month_mean_l_day,
        }
    }

    /// The worst month (1…12) and its mean daily output [L day⁻¹]; the earlier month wins a tie.
    pub fn worst_month(&self) -> (u32, f64) {
        let mut worst = (1, self.month_mean_l_day[0]);
        for (m, &v) in self.month_mean_l_day.iter().enumerate().skip(1) {
            if v < worst.1 {
                worst = (m as u32 + 1, v);
            }
        }
        worst
    }
}

/// Whole units of output `unit_l_day` [L day⁻¹] needed for `demand_l_day` [L day⁻¹]:
/// ⌈demand ÷ unit⌉, or `None` when a unit makes nothing (or the count exceeds 10⁹).
pub fn units_for(demand_l_day: f64, unit_l_day: f64) -> Option<u64> {
    economics::operator::units_for_demand(demand_l_day, unit_l_day)
}

/// Index (0-based, into the ascending sort of `n` values) of the empirical quantile that at
/// least the `confidence` fraction of the values do not exceed: ⌈confidence · n⌉ − 1.
///
/// Notes: a tiny allowance (10⁻⁹) keeps 0.9 · 10 from rounding up to 10 in floating point.
pub fn order_statistic_index(n: usize, confidence: f64) -> usize {
    let k = (confidence * n as f64 - 1e-9).ceil().max(1.0) as usize;
    k.min(n.max(1)) - 1
}

/// Storage that carries a constant demand through every run of low-output days [L]: the
/// sequent-peak method (Thomas, 1963, as taught in reservoir design — from memory).
///
/// Deficit Kₜ = max(0, Kₜ₋₁ + demand − supplyₜ), K₀ = 0; storage = max Kₜ. A day is
/// *low-output* when supply < demand; surplus days refill the tank.
///
/// * `daily_supply_l` — supply on each day [L day⁻¹]
/// * `demand_l_day` — the demand [L day⁻¹]
///
/// Notes: the year is not wrapped (the tank is taken as full on 1 January), so a dry spell
/// spanning New Year is counted in the year it ends only from 1 January.
pub fn sequent_peak_storage_l(daily_supply_l: &[f64], demand_l_day: f64) -> f64 {
    let mut deficit = 0.0_f64;
    let mut most = 0.0_f64;
    for &s in daily_supply_l {
        deficit = (deficit + demand_l_day - s).max(0.0);
        most = most.max(deficit);
    }
    most
}

/// The longest run of consecutive low-output days (supply below the demand) [days].
pub fn longest_low_run_days(daily_supply_l: &[f64], demand_l_day: f64) -> u32 {
    let mut run = 0u32;
    let mut longest = 0u32;
    for &s in daily_supply_l {
        if s < demand_l_day {
            run += 1;
            longest = longest.max(run);
        } else {
            run = 0;
        }
    }
    longest
}

/// Solar elevation at solar noon [rad]: α = 90° − |φ − δ|.
///
/// Duffie & Beckman (2013), *Solar Engineering of Thermal Processes*, 4th ed., §1.6: at solar
/// noon the zenith angle is θz = |φ − δ| (from memory).
///
/// * `latitude_rad` — φ \[rad\], north positive
/// * `declination_rad` — δ \[rad\]
///
/// Valid for |φ| ≤ 90°; a value ≤ 0 means the sun does not rise that day.
pub fn noon_elevation_rad(latitude_rad: f64, declination_rad: f64) -> f64 {
    std::f64::consts::FRAC_PI_2 - (latitude_rad - declination_rad).abs()
}

/// Noon elevation on the average day of a month (Klein's recommended day, Cooper's
/// declination) [rad].
pub fn month_noon_elevation_rad(latitude_deg: f64, month: u32) -> f64 {
    let n = klein_recommended_day(month);
    noon_elevation_rad(latitude_deg.to_radians(), declination_cooper_rad(n))
}

/// Clear ground behind a row so that its top edge does not shade the next row at solar noon
/// [m]: the length of the noon shadow, h ÷ tan α.
///
/// Rule (common practice, no source): rows run east–west facing the equator; the shadow of
/// the row's highest edge at solar noon on the worst month's average day must end before the
/// next row begins. Rows are taken to stand on level ground, and the next row's lowest point
/// is taken at ground level (conservative).
///
/// * `height_m` — height of the row's highest edge above the ground \[m\]
/// * `noon_elevation_rad` — α \[rad\]
///
/// Returns `None` when the sun stays below the horizon at noon (α ≤ 0).
pub fn row_gap_m(height_m: f64, noon_elevation_rad: f64) -> Option<f64> {
    (noon_elevation_rad > 0.0).then(|| height_m.max(0.0) / noon_elevation_rad.tan())
}

/// Height of a still's highest edge above the basin floor or base \[m\], from its tilt and
/// plan depth (`width_m`, measured along the slope's fall):
///
/// * single slope and stepped: front wall + width · tan(tilt) (the back wall);
/// * double slope: side wall + (width/2) · tan(tilt) (the ridge);
/// * wick and multi-effect: width · tan(tilt) (a panel on the ground; the stand or stack
///   depth is not included).
pub fn row_height_m(variant: &Variant) -> f64 {
    let w = variant.width_m;
    let mm = match &variant.kind {
        VariantKind::SingleSlope(k) => k.back_wall_mm(w),
        VariantKind::DoubleSlope(k) => k.ridge_mm(w),
        VariantKind::Stepped(k) => k.back_wall_mm(w),
        VariantKind::Wick(k) => w * 1000.0 * k.cover_tilt_deg.to_radians().tan(),
        VariantKind::MultiEffect(k) => w * 1000.0 * k.glazing_tilt_deg.to_radians().tan(),
    };
    mm / 1000.0
}

/// Rain caught by covers of plan area `plan_m2` in a month [L]: area × rainfall × runoff
/// coefficient (1 mm on 1 m² is 1 L).
///
/// * `plan_m2` — cover plan area \[m²\]
/// * `rain_mm` — monthly rainfall \[mm\]
/// * `runoff` — runoff coefficient [-], e.g. [`COVER_RUNOFF_COEFFICIENT`]
pub fn rain_catch_l(plan_m2: f64, rain_mm: f64, runoff: f64) -> f64 {
    plan_m2 * rain_mm.max(0.0) * runoff
}

/// The site's stochastic weather generator (monthly climates only).
pub fn weather_model(loaded: &LoadedDesign) -> Result<StochasticModel, Error> {
    let site = &loaded.design.site;
    let ClimateSource::Monthly(means) = site.climate_source() else {
        return Err(design_error(
            loaded,
            "site.climate",
            "sizing draws stochastic years from monthly means; this site uses a weather \
             file (give `source = \"monthly\"` means to size)"
                .into(),
        ));
    };
    Ok(StochasticModel::new(
        &means,
        &site.location(),
        StochasticSettings::default(),
    )?)
}

fn design_error(loaded: &LoadedDesign, path: &str, message: String) -> Error {
    Error::Design(DesignErrors(vec![DesignIssue {
        file: loaded.source.clone(),
        line_col: None,
        path: path.into(),
        message,
    }]))
}

/// Simulate variant `index` over stochastic years `0..years` of `seed` (in parallel, results
/// in year order).
///
/// Each year is run once through (weather-file path) with hour-by-hour records, from which
/// the daily outputs are summed.
pub fn unit_years(
    loaded: &LoadedDesign,
    index: usize,
    model: &StochasticModel,
    base: &SiteWeather,
    seed: u64,
    years: u32,
    opts: &RunOptions,
) -> Result<Vec<UnitYear>, Error> {
    let Some(v) = loaded.design.variants.get(index) else {
        return Err(design_error(
            loaded,
            "variant",
            format!("no variant number {}", index + 1),
        ));
    };
    let mut opts = *opts;
    opts.hourly = true;
    // Years are independent: simulate them in parallel, collect in year order (rayon keeps
    // the order of an indexed iterator), and report the first failure in year order, so the
    // figures and the error do not depend on the thread count.
    let results: Vec<Result<UnitYear, Error>> = (0..u64::from(years))
        .into_par_iter()
        .map(|y| {
            let weather = SiteWeather {
                series: model.year(seed, y),
                average_days: false,
                ..base.clone()
            };
            let result = stills::simulate_variant(loaded, v, &weather, &opts)?;
            let mut daily = vec![0.0; 365];
            for h in result.hourly.iter().flatten() {
                let d = (h.day_of_year.clamp(1, 365) - 1) as usize;
                daily[d] += h.distillate_l;
            }
            Ok(UnitYear::from_daily(y, daily))
        })
        .collect();
    results.into_iter().collect()
}

/// One still over stochastic years `0..years` of `seed`, from its fitted daily response
/// model instead of hour-by-hour simulation: each day's yield is
/// [`VariantResponse::daily_l_m2`] of the day's clearness index (the same generator stream
/// [`unit_years`] simulates) times the footprint.
///
/// Notes: the response model ignores heat carried from one day to the next, so single days
/// scatter by 2–6 % RMS against full simulation while monthly means stay within 3 %; the
/// storage figure, which sums daily deficits, inherits that daily scatter.
pub fn response_years(
    model: &StochasticModel,
    response: &VariantResponse,
    seed: u64,
    years: u32,
) -> Vec<UnitYear> {
    let fp = response.footprint_m2;
    (0..u64::from(years))
        .map(|y| {
            let kts = model.daily_clearness(seed, y);
            let daily = response
                .daily_l_m2(&kts)
                .into_iter()
                .map(|l| l * fp)
                .collect();
            UnitYear::from_daily(y, daily)
        })
        .collect()
}

/// Fraction of `years` in which `units` stills meet `demand_l_day` in the worst month [-].
pub fn met_fraction(years: &[UnitYear], units: u64, demand_l_day: f64) -> f64 {
    if years.is_empty() {
        return 0.0;
    }
    let met = years
        .iter()
        .filter(|y| units as f64 * y.worst_month().1 >= demand_l_day)
        .count();
    met as f64 / years.len() as f64
}

/// Rain caught by the array's covers in one month.
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
pub struct RainMonth {
    /// Month 1…12.
    pub month: u32,
    /// Rainfall [mm].
    pub rain_mm: f64,
    /// Rain caught over the month [L].
    pub caught_l: f64,
    /// The same per day [L day⁻¹].
    pub caught_l_day: f64,
}

/// The sized array of one variant.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct VariantSize {
    /// Variant name.
    pub name: String,
    /// Kind name.
    pub kind: String,
    /// Whole units.
    pub units: u64,
    /// Footprint of one unit \[m²\].
    pub unit_footprint_m2: f64,
    /// Footprint of all units \[m²\].
    pub footprint_m2: f64,
    /// Capital of one unit: its share of the array's [currency].
    pub unit_capital: f64,
    /// Capital of the array, every unit's parts nested onto stock together [currency].
    pub capital: f64,
    /// The worst month of the year that set the size (1…12).
    pub worst_month: u32,
    /// Worst-month mean daily output of one unit in the year that set the size [L day⁻¹].
    pub unit_worst_month_l_day: f64,
    /// Worst-month mean daily output of the array in that year [L day⁻¹].
    pub array_worst_month_l_day: f64,
    /// Fraction of the simulated years the array meets [-].
    pub met_fraction: f64,
    /// Solar elevation at noon on the worst month's average day [deg].
    pub noon_elevation_deg: f64,
    /// Height of a row's highest edge \[m\].
    pub row_height_m: f64,
    /// Clear ground behind each row \[m\].
    pub row_gap_m: f64,
    /// Row pitch: plan depth + gap \[m\].
    pub row_pitch_m: f64,
    /// Land the array needs: units × length × pitch \[m²\].
    pub land_m2: f64,
    /// Storage that rides through low-output days at the confidence \[L\].
    pub storage_l: f64,
    /// Longest run of low-output days at the confidence [days].
    pub longest_low_run_days: u32,
    /// Rain the covers would catch, per month (empty when the site gives no rainfall).
    pub rain: Vec<RainMonth>,
    /// The operator's time to run the sized array [h day⁻¹]: the daily round plus units ×
    /// each unit's tasks ([`economics::operator`]).
    pub operator_h_per_day: f64,
}

/// The sizing of every variant.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct SizeReport {
    /// The options used.
    pub options: SizeOptions,
    /// How the years were obtained.
    pub method: SizeMethod,
    /// Currency of money figures.
    pub currency: String,
    /// Runoff coefficient used for rain [-].
    pub runoff_coefficient: f64,
    /// Variants sized, in design order.
    pub sized: Vec<VariantSize>,
    /// Variants that could not be sized, and why.
    pub skipped: Vec<Skipped>,
}

/// Size one variant from its simulated years.
pub fn size_from_years(
    loaded: &LoadedDesign,
    index: usize,
    years: &[UnitYear],
    opts: &SizeOptions,
) -> Result<Result<VariantSize, String>, Error> {
    let Some(v) = loaded.design.variants.get(index) else {
        return Err(design_error(
            loaded,
            "variant",
            format!("no variant number {}", index + 1),
        ));
    };
    if years.is_empty() {
        return Ok(Err("no years were simulated".into()));
    }
    let demand = opts.demand_l_day;
    // Per year: units needed; rank years by it (ties by year order, a stable sort).
    let mut need: Vec<(Option<u64>, usize)> = years
        .iter()
        .enumerate()
        .map(|(i, y)| (units_for(demand, y.worst_month().1), i))
        .collect();
    need.sort_by_key(|(n, _)| n.unwrap_or(u64::MAX));
    let k = order_statistic_index(need.len(), opts.confidence);
    let Some(&(Some(units), setting_year)) = need.get(k) else {
        return Ok(Err(format!(
            "in at least one year in {} its worst month makes no water, so no number of \
             units meets the demand at confidence {}",
            years.len(),
            opts.confidence
        )));
    };
    let (worst_month, unit_worst) = years[setting_year].worst_month();
    let units_f = units as f64;

    // Storage and low-output runs per year, same order statistic.
    let mut storage: Vec<f64> = Vec::with_capacity(years.len());
    let mut runs: Vec<u32> = Vec::with_capacity(years.len());
    for y in years {
        let supply: Vec<f64> = y.daily_l.iter().map(|d| d * units_f).collect();
        storage.push(sequent_peak_storage_l(&supply, demand));
        runs.push(longest_low_run_days(&supply, demand));
    }
    storage.sort_by(f64::total_cmp);
    runs.sort_unstable();

    // The capital of the sized array: every unit's parts nested onto stock together.
    let cost = economics::cost_variant_for_units(
        loaded,
        index,
        None,
        units,
        format!("{units} units sized"),
    )?;
    let site = &loaded.design.site;
    let alpha = month_noon_elevation_rad(site.latitude_deg, worst_month);
    let height = row_height_m(v);
    let Some(gap) = row_gap_m(height, alpha) else {
        return Ok(Err(format!(
            "the sun stays below the horizon at noon in month {worst_month}, so no row \
             spacing avoids shading"
        )));
    };
    let pitch = v.width_m + gap;
    let rain = match &site.climate {
        Climate::Monthly(m) => m
            .rain_mm
            .map(|r| {
                r.iter()
                    .zip(DAYS_IN_MONTH)
                    .enumerate()
                    .map(|(i, (&mm, days))| {
                        let caught =
                            rain_catch_l(units_f * v.footprint_m2(), mm, COVER_RUNOFF_COEFFICIENT);
                        RainMonth {
                            month: i as u32 + 1,
                            rain_mm: mm,
                            caught_l: caught,
                            caught_l_day: caught / f64::from(days),
                        }
                    })
                    .collect()
            })
            .unwrap_or_default(),
        Climate::WeatherFile(_) => Vec::new(),
    };
    Ok(Ok(VariantSize {
        name: v.name.clone(),
        kind: v.kind.name().to_owned(),
        units,
        unit_footprint_m2: v.footprint_m2(),
        footprint_m2: units_f * v.footprint_m2(),
        unit_capital: cost.cost.capital,
        capital: cost.cost.installation_capital,
        worst_month,
        unit_worst_month_l_day: unit_worst,
        array_worst_month_l_day: units_f * unit_worst,
        met_fraction: met_fraction(years, units, demand),
        noon_elevation_deg: alpha.to_degrees(),
        row_height_m: height,
        row_gap_m: gap,
        row_pitch_m: pitch,
        land_m2: units_f * v.length_m * pitch,
        storage_l: storage[k.min(storage.len() - 1)],
        longest_low_run_days: runs[k.min(runs.len() - 1)],
        rain,
        operator_h_per_day: cost.cost.operator.installation_h_per_day,
    }))
}

/// Size every variant of a design to the demand by full hour-by-hour simulation of every
/// year ([`SizeMethod::Full`]); see [`size_design_by`].
pub fn size_design(
    loaded: &LoadedDesign,
    opts: &SizeOptions,
    run: &RunOptions,
) -> Result<SizeReport, Error> {
    size_design_by(loaded, opts, run, SizeMethod::Full)
}

/// Size every variant of a design to the demand, getting the stochastic years by `method`.
///
/// `run` applies to full simulation; the response model is fitted with the default run
/// options (as the Monte Carlo fits it), at nominal parameters.
///
/// Errors: [`Error::Design`] (exit 2) for bad options (naming the option), a weather-file
/// site or a costing problem; [`Error::Model`] when no variant could be sized.
pub fn size_design_by(
    loaded: &LoadedDesign,
    opts: &SizeOptions,
    run: &RunOptions,
    method: SizeMethod,
) -> Result<SizeReport, Error> {
    if let Err((option, message)) = opts.validate() {
        return Err(design_error(loaded, &option, message));
    }
    let model = weather_model(loaded)?;
    let mut sized = Vec::new();
    let mut skipped = Vec::new();
    let mut all_years: Vec<Option<Vec<UnitYear>>> = Vec::new();
    match method {
        SizeMethod::Full => {
            let base = stills::site_weather(loaded)?;
            for (i, v) in loaded.design.variants.iter().enumerate() {
                match unit_years(loaded, i, &model, &base, opts.seed, opts.years, run) {
                    Ok(y) => all_years.push(Some(y)),
                    Err(Error::Model { reason, at, .. }) => {
                        skipped.push(Skipped {
                            name: v.name.clone(),
                            reason: format!("{reason}{at}"),
                        });
                        all_years.push(None);
                    }
                    Err(e) => return Err(e),
                }
            }
        }
        SizeMethod::Response => {
            // Only the clearness levels are needed: no uncertain parameters.
            let fit = match fit_responses(loaded, &[], None) {
                Ok(f) => f,
                Err(Error::Model {
                    variant, reason, ..
                }) => {
                    return Err(Error::Model {
                        variant,
                        at: String::new(),
                        reason: format!("no variant could be sized: {reason}"),
                    });
                }
                Err(e) => return Err(e),
            };
            skipped.extend(fit.skipped.iter().cloned());
            for i in 0..loaded.design.variants.len() {
                all_years.push(
                    fit.responses
                        .iter()
                        .find(|r| r.index == i)
                        .map(|r| response_years(&fit.weather_model, r, opts.seed, opts.years)),
                );
            }
        }
    }
    for (i, (v, years)) in loaded.design.variants.iter().zip(all_years).enumerate() {
        let Some(years) = years else {
            continue;
        };
        match size_from_years(loaded, i, &years, opts)? {
            Ok(s) => sized.push(s),
            Err(reason) => skipped.push(Skipped {
                name: v.name.clone(),
                reason,
            }),
        }
    }
    if sized.is_empty() {
        return Err(Skipped::none_left(&skipped, "sized"));
    }
    Ok(SizeReport {
        options: *opts,
        method,
        currency: loaded.design.project.currency.clone(),
        runoff_coefficient: COVER_RUNOFF_COEFFICIENT,
        sized,
        skipped,
    })
}
