//! The `[variant.operation]` table: how the operator feeds and flushes a basin still.
//!
//! The set depth is the variant's own brine depth (`brine_depth_mm`); this table says how it
//! is held. Every field is optional; the defaults reproduce a morning refill by hand with a
//! flush of twice the distillate.

use serde::{Deserialize, Serialize};

/// How feed water reaches the basin.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Default, Serialize, Deserialize)]
#[serde(rename_all = "kebab-case")]
pub enum FeedMode {
    /// The operator tops the basin up to the set depth by hand at the listed hours.
    #[default]
    Batch,
    /// A float valve: full flow with the depth at the bottom of its band, shut at the top,
    /// throttled linearly between (a float is a proportional valve).
    FloatValve,
    /// A steady drip at a set rate; brine above the set depth leaves over an overflow lip.
    Drip,
    /// A proportional–integral level controller driving a feed valve, with a transport delay
    /// from the feed tank to the far side of the basin.
    Controller,
}

impl FeedMode {
    /// The name as written in design files.
    pub fn name(self) -> &'static str {
        match self {
            FeedMode::Batch => "batch",
            FeedMode::FloatValve => "float-valve",
            FeedMode::Drip => "drip",
            FeedMode::Controller => "controller",
        }
    }
}

/// When brine is drained to carry the salt away.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Default, Serialize, Deserialize)]
#[serde(rename_all = "kebab-case")]
pub enum FlushMode {
    /// Never (salt builds up until it crusts).
    None,
    /// A fixed volume each day (`flush_l_day`).
    Daily,
    /// Drain (ratio − 1) × the distillate collected since the last flush, so that feed ÷
    /// distillate ≈ `flush_ratio` (default): once a day before the first refill of a batch
    /// feed, as a steady bleed (every control interval) with the other feed modes.
    #[default]
    Ratio,
    /// Drain the basin to 1.5 × the wetting depth whenever the salinity reaches
    /// `flush_limit_g_kg`.
    SalinityLimit,
}

impl FlushMode {
    /// The name as written in design files.
    pub fn name(self) -> &'static str {
        match self {
            FlushMode::None => "none",
            FlushMode::Daily => "daily",
            FlushMode::Ratio => "ratio",
            FlushMode::SalinityLimit => "salinity-limit",
        }
    }
}

/// Default hours (solar time) of a batch refill [h]: one refill at 08:00. Common practice, no
/// source.
pub const DEFAULT_REFILL_HOURS: [f64; 1] = [8.0];
/// Default float-valve band (bottom to top) [mm]. Common practice, no source.
pub const DEFAULT_BAND_MM: f64 = 2.0;
/// Default largest flow of a float valve or controller valve [L h⁻¹]: a small gravity valve
/// under a header tank. Common practice, no source.
pub const DEFAULT_VALVE_MAX_L_H: f64 = 10.0;
/// Default transport delay from the feed tank to the far side of the basin [s]. Common
/// practice, no source.
pub const DEFAULT_DELAY_S: f64 = 60.0;
/// Default feed ÷ distillate ratio of a ratio flush [-]: REFERENCES.md §8 quotes flushing at
/// 2–3× the distillate ([M, unsure]); 3 is the upper end.
pub const DEFAULT_FLUSH_RATIO: f64 = 3.0;
/// Default solar hour of the daily or ratio flush [h] (also the first refill of a batch
/// feed). Common practice, no source.
pub const DEFAULT_FLUSH_HOUR: f64 = 8.0;
/// Default minimum wetting depth [mm]: below it a real liner (never quite flat) shows dry
/// patches, so time below it counts as dry-out. Common practice, no source.
pub const DEFAULT_WETTING_DEPTH_MM: f64 = 2.0;
/// Default control interval [s]: the step at which a float valve or controller looks at the
/// depth and sets its flow (and the drip's overflow is worked out). Short against the
/// basin's hour-scale drift, long against the network's adaptive steps. Common practice, no
/// source.
pub const DEFAULT_CONTROL_INTERVAL_S: f64 = 300.0;

fn default_refill_hours() -> Vec<f64> {
    DEFAULT_REFILL_HOURS.to_vec()
}
fn default_band() -> f64 {
    DEFAULT_BAND_MM
}
fn default_valve() -> f64 {
    DEFAULT_VALVE_MAX_L_H
}
fn default_delay() -> f64 {
    DEFAULT_DELAY_S
}
fn default_ratio() -> f64 {
    DEFAULT_FLUSH_RATIO
}
fn default_flush_hour() -> f64 {
    DEFAULT_FLUSH_HOUR
}
fn default_wetting() -> f64 {
    DEFAULT_WETTING_DEPTH_MM
}
fn default_interval() -> f64 {
    DEFAULT_CONTROL_INTERVAL_S
}

/// `[variant.operation]`: feed and flush of a basin still.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct Operation {
    /// Feed mode; default `batch`.
    #[serde(default)]
    pub feed: FeedMode,
    /// Batch: solar hours of the refills [h], each in [0, 24); default `[8]`.
    #[serde(default = "default_refill_hours")]
    pub refill_hours: Vec<f64>,
    /// Float valve: band from closing to opening depth [mm], (0, 50]; default 2.
    #[serde(default = "default_band")]
    pub band_mm: f64,
    /// Drip: feed rate [L h⁻¹], [0, 100].
    #[serde(default)]
    pub drip_l_h: Option<f64>,
    /// Float valve and controller: largest valve flow [L h⁻¹], (0, 1000]; default 10.
    #[serde(default = "default_valve")]
    pub valve_max_l_h: f64,
    /// Controller: gain [L h⁻¹ per mm of depth error], > 0; default from the basin area and
    /// the delay (see the design-file reference).
    #[serde(default)]
    pub gain_l_h_mm: Option<f64>,
    /// Controller: reset (integral) time [s], > 0; default 8 × the effective delay.
    #[serde(default)]
    pub reset_time_s: Option<f64>,
    /// Controller: transport delay from the feed tank to the far side of the basin [s],
    /// [0, 3600]; default 60.
    #[serde(default = "default_delay")]
    pub delay_s: f64,
    /// Flush mode; default `ratio`.
    #[serde(default)]
    pub flush: FlushMode,
    /// Daily flush volume [L day⁻¹], [0, 1000].
    #[serde(default)]
    pub flush_l_day: Option<f64>,
    /// Feed ÷ distillate of a ratio flush [-], (1, 20]; default 3.
    #[serde(default = "default_ratio")]
    pub flush_ratio: f64,
    /// Salinity that triggers a flush [g kg⁻¹], (feed salinity, 264].
    #[serde(default)]
    pub flush_limit_g_kg: Option<f64>,
    /// Solar hour of a daily or ratio flush [h], [0, 24); default 8. A batch feed flushes at
    /// its first refill instead.
    #[serde(default = "default_flush_hour")]
    pub flush_hour: f64,
    /// Minimum wetting depth [mm], (0, 50]; default 2.
    #[serde(default = "default_wetting")]
    pub wetting_depth_mm: f64,
    /// Control interval [s], [30, 3600]; default 300.
    #[serde(default = "default_interval")]
    pub control_interval_s: f64,
}

impl Default for Operation {
    fn default() -> Self {
        Operation {
            feed: FeedMode::default(),
            refill_hours: default_refill_hours(),
            band_mm: DEFAULT_BAND_MM,
            drip_l_h: None,
            valve_max_l_h: DEFAULT_VALVE_MAX_L_H,
            gain_l_h_mm: None,
            reset_time_s: None,
            delay_s: DEFAULT_DELAY_S,
            flush: FlushMode::default(),
            flush_l_day: None,
            flush_ratio: DEFAULT_FLUSH_RATIO,
            flush_limit_g_kg: None,
            flush_hour: DEFAULT_FLUSH_HOUR,
            wetting_depth_mm: DEFAULT_WETTING_DEPTH_MM,
            control_interval_s: DEFAULT_CONTROL_INTERVAL_S,
        }
    }
}

/// One problem with an operation table: the field (relative to the table), the message and
/// whether it is an error (else a warning).
#[derive(Debug, Clone, PartialEq)]
pub struct OperationIssue {
    /// Field name inside `operation`, e.g. `gain_l_h_mm`.
    pub field: &'static str,
    /// What is wrong and what is allowed.
    pub message: String,
    /// An error (the design is refused) rather than a warning.
    pub error: bool,
}

fn in_range(v: f64, lo: f64, hi: f64, lo_open: bool) -> bool {
    v.is_finite() && (if lo_open { v > lo } else { v >= lo }) && v <= hi
}

impl Operation {
    /// Check every field against its range and against the basin it runs: `set_depth_mm`
    /// [mm] (the variant's brine depth), `basin_area_m2` [m²] (free surface) and
    /// `feed_salinity_g_kg` [g kg⁻¹]. Returns every problem found.
    pub fn check(
        &self,
        set_depth_mm: f64,
        basin_area_m2: f64,
        feed_salinity_g_kg: f64,
    ) -> Vec<OperationIssue> {
        let mut out = Vec::new();
        let mut err = |field, message: String| {
            out.push(OperationIssue {
                field,
                message,
                error: true,
            })
        };
        let r = |v: f64, lo, hi, open| in_range(v, lo, hi, open);
        if !r(self.wetting_depth_mm, 0.0, 50.0, true) {
            err(
                "wetting_depth_mm",
                format!(
                    "{} is out of range; allowed (0, 50] mm",
                    self.wetting_depth_mm
                ),
            );
        } else if set_depth_mm <= self.wetting_depth_mm {
            err(
                "wetting_depth_mm",
                format!(
                    "the set depth (brine_depth_mm = {set_depth_mm}) must lie above the wetting depth {} mm",
                    self.wetting_depth_mm
                ),
            );
        }
        if !r(self.control_interval_s, 30.0, 3600.0, false) {
            err(
                "control_interval_s",
                format!(
                    "{} is out of range; allowed [30, 3600] s",
                    self.control_interval_s
                ),
            );
        }
        if self.refill_hours.is_empty() && self.feed == FeedMode::Batch {
            err(
                "refill_hours",
                "a batch feed needs at least one refill hour in [0, 24)".into(),
            );
        }
        for h in &self.refill_hours {
            if !(h.is_finite() && (0.0..24.0).contains(h)) {
                err(
                    "refill_hours",
                    format!("{h} is out of range; allowed [0, 24) h solar time"),
                );
            }
        }
        if !r(self.band_mm, 0.0, 50.0, true) {
            err(
                "band_mm",
                format!("{} is out of range; allowed (0, 50] mm", self.band_mm),
            );
        } else if self.feed == FeedMode::FloatValve
            && set_depth_mm - 0.5 * self.band_mm <= self.wetting_depth_mm
        {
            err(
                "band_mm",
                format!(
                    "the valve opens at {} mm, at or below the wetting depth {} mm",
                    set_depth_mm - 0.5 * self.band_mm,
                    self.wetting_depth_mm
                ),
            );
        }
        if !r(self.valve_max_l_h, 0.0, 1000.0, true) {
            err(
                "valve_max_l_h",
                format!(
                    "{} is out of range; allowed (0, 1000] L/h",
                    self.valve_max_l_h
                ),
            );
        }
        match self.drip_l_h {
            Some(v) if !r(v, 0.0, 100.0, false) => err(
                "drip_l_h",
                format!("{v} is out of range; allowed [0, 100] L/h"),
            ),
            None if self.feed == FeedMode::Drip => {
                err("drip_l_h", "a drip feed needs its rate `drip_l_h`".into())
            }
            _ => {}
        }
        if !r(self.delay_s, 0.0, 3600.0, false) {
            err(
                "delay_s",
                format!("{} is out of range; allowed [0, 3600] s", self.delay_s),
            );
        }
        if let Some(g) = self.gain_l_h_mm
            && !r(g, 0.0, 1e4, true)
        {
            err(
                "gain_l_h_mm",
                format!("{g} is out of range; allowed (0, 10000] L/h per mm"),
            );
        }
        if let Some(ti) = self.reset_time_s
            && !r(ti, 0.0, 1e6, true)
        {
            err(
                "reset_time_s",
                format!("{ti} is out of range; allowed (0, 1e6] s"),
            );
        }
        if !r(self.flush_ratio, 1.0, 20.0, true) {
            err(
                "flush_ratio",
                format!("{} is out of range; allowed (1, 20]", self.flush_ratio),
            );
        }
        match self.flush_l_day {
            Some(v) if !r(v, 0.0, 1000.0, false) => err(
                "flush_l_day",
                format!("{v} is out of range; allowed [0, 1000] L/day"),
            ),
            None if self.flush == FlushMode::Daily => {
                err("flush_l_day", "a daily flush needs `flush_l_day`".into())
            }
            _ => {}
        }
        let sat = crate::network::SALT_SATURATION_G_KG;
        match self.flush_limit_g_kg {
            Some(v) if !(v.is_finite() && v > feed_salinity_g_kg && v <= sat) => err(
                "flush_limit_g_kg",
                format!(
                    "{v} is out of range; allowed ({feed_salinity_g_kg}, {sat}] g/kg (above the feed salinity, at most NaCl saturation)"
                ),
            ),
            None if self.flush == FlushMode::SalinityLimit => err(
                "flush_limit_g_kg",
                "a salinity-limit flush needs `flush_limit_g_kg`".into(),
            ),
            _ => {}
        }
        if !(self.flush_hour.is_finite() && (0.0..24.0).contains(&self.flush_hour)) {
            err(
                "flush_hour",
                format!(
                    "{} is out of range; allowed [0, 24) h solar time",
                    self.flush_hour
                ),
            );
        }
        let errors = out.iter().any(|i| i.error);
        if self.feed == FeedMode::Controller && !errors && basin_area_m2 > 0.0 {
            let tuning = crate::operation::Tuning::resolve(self, basin_area_m2);
            let limit = crate::operation::pi_gain_limit_l_h_mm(
                basin_area_m2,
                tuning.effective_delay_s,
                tuning.reset_time_s,
            );
            if tuning.gain_l_h_mm >= limit {
                out.push(OperationIssue {
                    field: "gain_l_h_mm",
                    message: format!(
                        "{:.3} L/h per mm makes the level loop unstable: with {:.0} m² of brine, {:.0} s effective delay and {:.0} s reset time the limit is {:.3} L/h per mm",
                        tuning.gain_l_h_mm,
                        basin_area_m2,
                        tuning.effective_delay_s,
                        tuning.reset_time_s,
                        limit
                    ),
                    error: true,
                });
            } else if tuning.gain_l_h_mm > 0.5 * limit {
                out.push(OperationIssue {
                    field: "gain_l_h_mm",
                    message: format!(
                        "{:.3} L/h per mm is more than half the stability limit {limit:.3} L/h per mm (gain margin below 2): the level will ring",
                        tuning.gain_l_h_mm
                    ),
                    error: false,
                });
            }
        }
        if self.feed != FeedMode::Drip && self.flush == FlushMode::None {
            out.push(OperationIssue {
                field: "flush",
                message: "no flushing: salt builds up until it crusts the liner".into(),
                error: false,
            });
        }
        out
    }
}
