//! Operating a basin still: feed modes, flushing, salt crust, scaling limits and the day's
//! operating record.
//!
//! The brine is a state of the network (water plus salt in the basin node). The still driver
//! ([`crate::stills`]) asks an [`Operator`] at the start of every control interval how much
//! feed and drain to set, advances the network over the interval, and books the result in an
//! [`OperationDay`]. Every basin-type still gets the same feed modes because feeding is the
//! driver's job, not the variant's.

mod controller;
pub mod render;
mod sweep;

use serde::Serialize;

pub use crate::design::{FeedMode, FlushMode, Operation};
pub use controller::{LevelController, Tuning, basin_process_gain, pi_gain_limit_l_h_mm};
pub use sweep::{DepthPoint, depth_sweep, with_depth};

use crate::network::SALT_SATURATION_G_KG;

/// Salinity at which calcium sulphate (gypsum) starts to scale in concentrating seawater
/// [g kg⁻¹]: about 3.5 × seawater's 35 g/kg. From memory (the marine evaporite sequence:
/// gypsum from a concentration factor of about 3.5–4, halite from about 10; e.g. Bąbel &
/// Schreiber (2014), *Geochemistry of evaporites and evolution of seawater*, Treatise on
/// Geochemistry 9:483). Holds for seawater-like feed; brackish well water can scale earlier.
pub const CASO4_SCALING_G_KG: f64 = 120.0;

/// Share of a scaling limit at which the tool warns that the brine approaches it [-].
/// Common practice, no source.
pub const SCALING_WARNING_SHARE: f64 = 0.8;

/// Salt beyond what the basin's water can hold in solution [kg]: the crust.
///
/// With `brine_kg` [kg] of brine holding `salt_kg` [kg] of salt, the water (brine − salt) can
/// dissolve up to water·S/(1000 − S) of salt at the saturation S = [`SALT_SATURATION_G_KG`]
/// (NaCl, REFERENCES.md §8 [M]); the rest lies on the liner.
///
/// Notes: the network keeps the crust inside its brine mass (it adds heat capacity as if
/// dissolved, a small error), caps the vapour-pressure lowering at saturation and drains
/// brine at the dissolved salinity, so a flush leaves the crust behind. The crust is not
/// given a lower solar absorptance: no source at hand says by how much a white salt crust
/// lowers a black liner's absorptance, so it is reported, not modelled.
pub fn crust_kg(brine_kg: f64, salt_kg: f64) -> f64 {
    crate::network::crust_kg(brine_kg, salt_kg)
}

/// Salinity of the liquid brine, the crust left out [g kg⁻¹]. Flushing and overflow drain
/// brine at this salinity: the crust stays on the liner.
pub fn dissolved_salinity_g_kg(brine_kg: f64, salt_kg: f64) -> f64 {
    crate::network::dissolved_salinity(brine_kg, salt_kg)
}

/// Depth of the liquid brine over a basin of `area_m2` [m²] [mm], at 1000 kg m⁻³ (the density
/// the basin builders use for the set depth; seawater's 1025 kg m⁻³ would make it 2.5 %
/// shallower).
pub fn depth_mm(brine_kg: f64, salt_kg: f64, area_m2: f64) -> f64 {
    (brine_kg - crust_kg(brine_kg, salt_kg)).max(0.0) / area_m2.max(1e-9)
}

/// Scaling warnings for a peak salinity [g kg⁻¹]: calcium sulphate at
/// [`CASO4_SCALING_G_KG`] and sodium chloride at [`SALT_SATURATION_G_KG`], each once the
/// brine reaches [`SCALING_WARNING_SHARE`] of the limit.
pub fn scaling_warnings(peak_salinity_g_kg: f64) -> Vec<String> {
    let mut out = Vec::new();
    for (what, limit) in [
        ("calcium sulphate (gypsum) scale", CASO4_SCALING_G_KG),
        ("sodium chloride crust", SALT_SATURATION_G_KG),
    ] {
        if peak_salinity_g_kg >= SCALING_WARNING_SHARE * limit {
            out.push(format!(
                "peak salinity {peak_salinity_g_kg:.0} g/kg is {:.0} % of the {limit:.0} g/kg where {what} forms; flush more",
                100.0 * peak_salinity_g_kg / limit
            ));
        }
    }
    out
}

/// What the operator sees at the start of a control interval.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct BasinView {
    /// Brine mass, crust included [kg].
    pub brine_kg: f64,
    /// Liquid brine, the crust left out [kg].
    pub liquid_kg: f64,
    /// Liquid depth [mm].
    pub depth_mm: f64,
    /// Salinity of the liquid [g kg⁻¹].
    pub salinity_g_kg: f64,
}

/// Feed and drain over one control interval [kg s⁻¹].
#[derive(Debug, Clone, Copy, Default, PartialEq)]
pub struct Action {
    /// Feed into the basin.
    pub feed_kg_s: f64,
    /// Brine drained (flush or overflow).
    pub drain_kg_s: f64,
}

/// An operator (person, valve or controller) acting on one basin.
#[derive(Debug, Clone, PartialEq)]
pub struct Operator {
    op: Operation,
    area_m2: f64,
    set_kg: f64,
    set_mm: f64,
    controller: Option<LevelController>,
    distillate_since_flush_kg: f64,
    refill_next: bool,
    clock_s: f64,
}

/// Mass of 1 L of feed [kg] (1 kg = 1 L throughout the tool's volumes).
const KG_PER_L: f64 = 1.0;

impl Operator {
    /// An operator running `op` on a basin of `area_m2` [m²] held at `set_kg` [kg].
    pub fn new(op: &Operation, area_m2: f64, set_kg: f64) -> Self {
        let controller = (op.feed == FeedMode::Controller)
            .then(|| LevelController::new(Tuning::resolve(op, area_m2), op.valve_max_l_h));
        Operator {
            op: op.clone(),
            area_m2,
            set_kg,
            set_mm: set_kg / area_m2.max(1e-9),
            controller,
            distillate_since_flush_kg: 0.0,
            refill_next: false,
            clock_s: 0.0,
        }
    }

    /// The operation it runs.
    pub fn operation(&self) -> &Operation {
        &self.op
    }
    /// Set depth [mm].
    pub fn set_depth_mm(&self) -> f64 {
        self.set_mm
    }
    /// The controller's tuning, for a controller feed.
    pub fn tuning(&self) -> Option<Tuning> {
        self.controller.as_ref().map(LevelController::tuning)
    }

    /// Whether this operator acts within the hour (so the hour is split into control
    /// intervals): always for a valve, controller or drip, and for a batch feed in an hour
    /// holding a refill.
    pub fn splits_hour(&self, start_h: f64, period_h: f64) -> bool {
        match self.op.feed {
            FeedMode::Batch => self
                .op
                .refill_hours
                .iter()
                .any(|&h| within(h, start_h, period_h)),
            _ => true,
        }
    }

    /// Book the distillate collected over the last interval [kg] (a ratio flush drains a
    /// multiple of it).
    pub fn collected(&mut self, distillate_kg: f64) {
        self.distillate_since_flush_kg += distillate_kg.max(0.0);
    }

    /// Decide feed and drain for the interval starting at solar hour `start_h` [h] and
    /// lasting `dt_s` [s], seeing `view`. Returns the action and whether a flush started.
    pub fn act(&mut self, start_h: f64, dt_s: f64, view: &BasinView) -> (Action, bool) {
        let op = &self.op;
        let dt_h = dt_s / 3600.0;
        // A flush never drains below 1.5 × the wetting depth, so the liner stays wet while it
        // refills (common practice, no source).
        // Only the liquid drains: a crust stays on the liner (the network drains brine at the
        // dissolved salinity), so the limit is on the liquid depth, not on the brine mass.
        let wet_kg = 1.5 * op.wetting_depth_mm * self.area_m2;
        let liquid_kg = view.liquid_kg;
        let above_wet = (liquid_kg - wet_kg).max(0.0);
        // Flush first: the brine goes out before fresh feed comes in.
        let flush_time = match op.feed {
            FeedMode::Batch => op.refill_hours.first().copied(),
            _ => Some(op.flush_hour),
        }
        .is_some_and(|h| within(h, start_h, dt_h));
        // With a valve, controller or drip the ratio flush is a steady bleed: each interval
        // drains (ratio − 1) × the distillate of the interval before, so the level stays in
        // hand; a batch feed flushes once a day before its first refill.
        let bleed = op.flush == FlushMode::Ratio && op.feed != FeedMode::Batch;
        let mut drain_kg = match op.flush {
            FlushMode::None => 0.0,
            FlushMode::Daily if flush_time => op.flush_l_day.unwrap_or(0.0) * KG_PER_L,
            FlushMode::Ratio if bleed || flush_time => {
                (op.flush_ratio - 1.0) * self.distillate_since_flush_kg
            }
            FlushMode::SalinityLimit => {
                let check_now = op.feed != FeedMode::Batch
                    || op.refill_hours.iter().any(|&h| within(h, start_h, dt_h));
                if check_now && view.salinity_g_kg >= op.flush_limit_g_kg.unwrap_or(f64::MAX) {
                    above_wet
                } else {
                    0.0
                }
            }
            _ => 0.0,
        };
        drain_kg = drain_kg.min(above_wet);
        let flushed = drain_kg > 0.0 && !bleed;
        if flush_time || drain_kg > 0.0 || bleed {
            self.distillate_since_flush_kg = 0.0;
        }
        let after_drain = liquid_kg - drain_kg;
        let mut feed_kg = 0.0;
        match op.feed {
            FeedMode::Batch => {
                let refill_now = op.refill_hours.iter().any(|&h| within(h, start_h, dt_h));
                if self.refill_next || (refill_now && !flushed) {
                    // Topped up to the set depth of liquid: a crust is not water, and
                    // counting it as such would shrink each refill until the basin is all
                    // crust.
                    feed_kg = (self.set_kg - liquid_kg).max(0.0);
                    self.refill_next = false;
                } else if refill_now && flushed {
                    self.refill_next = true;
                }
            }
            FeedMode::FloatValve => {
                // A float throttles the valve: full flow with the depth at the bottom of the
                // band, shut at the top, linear between (a proportional valve).
                let depth = view.depth_mm - drain_kg / self.area_m2;
                let opening =
                    ((self.set_mm + 0.5 * op.band_mm - depth) / op.band_mm).clamp(0.0, 1.0);
                feed_kg = opening * op.valve_max_l_h * KG_PER_L * dt_h;
            }
            FeedMode::Drip => {
                feed_kg = op.drip_l_h.unwrap_or(0.0) * KG_PER_L * dt_h;
                // Overflow lip at the set depth of liquid.
                drain_kg += (after_drain + feed_kg - self.set_kg).max(0.0);
            }
            FeedMode::Controller => {
                if let Some(c) = self.controller.as_mut() {
                    let q_l_h = c.step(self.clock_s, dt_s, self.set_mm - view.depth_mm);
                    feed_kg = q_l_h * KG_PER_L * dt_h;
                }
            }
        }
        self.clock_s += dt_s;
        (
            Action {
                feed_kg_s: feed_kg / dt_s,
                drain_kg_s: drain_kg / dt_s,
            },
            flushed,
        )
    }
}

/// Whether solar hour `h` falls in [`start_h`, `start_h + len_h`), on the 24-hour clock.
fn within(h: f64, start_h: f64, len_h: f64) -> bool {
    let d = (h - start_h).rem_euclid(24.0);
    d < len_h - 1e-9 || (h - start_h).abs() < 1e-9
}

/// The masses behind a day of operation [kg], for the water and salt balances.
#[derive(Debug, Clone, Copy, Default, PartialEq, Serialize)]
pub struct MassBalance {
    /// Brine fed.
    pub fed_kg: f64,
    /// Salt brought in with the feed.
    pub fed_salt_kg: f64,
    /// Brine drained (flush and overflow).
    pub flushed_kg: f64,
    /// Salt drained with it.
    pub flushed_salt_kg: f64,
    /// Distillate collected.
    pub distillate_kg: f64,
    /// Vapour leaked out of the still.
    pub leaked_kg: f64,
    /// Water (brine less salt) in the basin at the start and end of the day.
    pub water_start_kg: f64,
    /// See `water_start_kg`.
    pub water_end_kg: f64,
    /// Dissolved salt at the start and end of the day.
    pub dissolved_salt_start_kg: f64,
    /// See `dissolved_salt_start_kg`.
    pub dissolved_salt_end_kg: f64,
    /// Crust at the start and end of the day.
    pub crust_start_kg: f64,
    /// See `crust_start_kg`.
    pub crust_end_kg: f64,
}

impl MassBalance {
    /// Water in − (distillate + leaked vapour + water flushed + change of stored water),
    /// relative to the water fed (or 1 kg when nothing was fed) [-].
    pub fn water_residual(&self) -> f64 {
        let water_in = self.fed_kg - self.fed_salt_kg;
        let out = self.distillate_kg
            + self.leaked_kg
            + (self.flushed_kg - self.flushed_salt_kg)
            + (self.water_end_kg - self.water_start_kg);
        (water_in - out) / water_in.abs().max(1.0)
    }
    /// Salt in − (salt flushed + salt precipitated + change of dissolved salt), relative to
    /// the salt fed (or 1 g when none was fed) [-].
    pub fn salt_residual(&self) -> f64 {
        let out = self.flushed_salt_kg
            + (self.crust_end_kg - self.crust_start_kg)
            + (self.dissolved_salt_end_kg - self.dissolved_salt_start_kg);
        (self.fed_salt_kg - out) / self.fed_salt_kg.abs().max(1e-3)
    }
}

/// Depth error statistics against the set depth.
#[derive(Debug, Clone, Copy, Default, PartialEq, Serialize)]
pub struct DepthStats {
    /// Time-weighted mean of depth − set depth [mm].
    pub mean_error_mm: f64,
    /// Largest |depth − set depth| [mm].
    pub max_deviation_mm: f64,
    /// Share of the day within ±5 % of the set depth [-].
    pub within_5pct_share: f64,
    /// Share of daylight (sunlight entering) within ±1 mm of the set depth [-].
    pub daylight_within_1mm_share: f64,
}

/// Accumulates a day of operation.
#[derive(Debug, Clone, Default, PartialEq)]
pub(crate) struct DayLog {
    pub time_s: f64,
    pub error_mm_s: f64,
    pub max_dev_mm: f64,
    pub within_5pct_s: f64,
    pub daylight_s: f64,
    pub daylight_1mm_s: f64,
    pub dry_s: f64,
    pub min_depth_mm: f64,
    pub max_depth_mm: f64,
    pub peak_salinity: f64,
    pub salinity_s: f64,
    pub peak_crust_kg: f64,
    pub flushes: u32,
    pub dry_out_events: u32,
}

impl DayLog {
    pub(crate) fn new() -> Self {
        DayLog {
            min_depth_mm: f64::INFINITY,
            max_depth_mm: f64::NEG_INFINITY,
            ..DayLog::default()
        }
    }

    /// Book an interval of `dt_s` [s] over which the depth went from `d0` to `d1` [mm]
    /// (taken as linear), ending at salinity `s1` [g kg⁻¹] and crust `crust_kg`.
    #[allow(clippy::too_many_arguments)]
    pub(crate) fn book(
        &mut self,
        dt_s: f64,
        d0: f64,
        d1: f64,
        s1: f64,
        crust: f64,
        set_mm: f64,
        wet_mm: f64,
        daylight: bool,
    ) {
        self.time_s += dt_s;
        let e1 = d1 - set_mm;
        self.error_mm_s += 0.5 * ((d0 - set_mm) + e1) * dt_s;
        self.max_dev_mm = self.max_dev_mm.max(e1.abs()).max((d0 - set_mm).abs());
        if e1.abs() <= 0.05 * set_mm {
            self.within_5pct_s += dt_s;
        }
        if daylight {
            self.daylight_s += dt_s;
            if e1.abs() <= 1.0 {
                self.daylight_1mm_s += dt_s;
            }
        }
        // Time below the wetting depth, depth linear over the interval.
        self.dry_s += dt_s * share_below(d0, d1, wet_mm);
        self.min_depth_mm = self.min_depth_mm.min(d1).min(d0);
        self.max_depth_mm = self.max_depth_mm.max(d1).max(d0);
        self.peak_salinity = self.peak_salinity.max(s1);
        self.salinity_s += s1 * dt_s;
        self.peak_crust_kg = self.peak_crust_kg.max(crust);
    }

    pub(crate) fn stats(&self) -> DepthStats {
        let t = self.time_s.max(1e-9);
        DepthStats {
            mean_error_mm: self.error_mm_s / t,
            max_deviation_mm: self.max_dev_mm,
            within_5pct_share: self.within_5pct_s / t,
            daylight_within_1mm_share: if self.daylight_s > 0.0 {
                self.daylight_1mm_s / self.daylight_s
            } else {
                1.0
            },
        }
    }
}

/// Share of an interval during which a depth going linearly from `d0` to `d1` is below `w`.
fn share_below(d0: f64, d1: f64, w: f64) -> f64 {
    match (d0 < w, d1 < w) {
        (true, true) => 1.0,
        (false, false) => 0.0,
        (true, false) => (w - d0) / (d1 - d0),
        (false, true) => (d0 - w) / (d0 - d1),
    }
}

/// The operating record of one simulated day.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct OperationDay {
    /// Feed mode name.
    pub feed: &'static str,
    /// Flush mode name.
    pub flush: &'static str,
    /// Set depth [mm].
    pub set_depth_mm: f64,
    /// Minimum wetting depth [mm].
    pub wetting_depth_mm: f64,
    /// Feed over the day [L] (1 kg = 1 L).
    pub feed_l: f64,
    /// Brine flushed (and overflowed) over the day [L].
    pub flush_l: f64,
    /// Flushes started.
    pub flushes: u32,
    /// Hours with the depth below the wetting depth [h].
    pub dry_out_h: f64,
    /// Times the network's brine ran fully dry.
    pub dry_out_events: u32,
    /// Shallowest and deepest brine [mm].
    pub min_depth_mm: f64,
    /// See `min_depth_mm`.
    pub max_depth_mm: f64,
    /// Depth at the end of the day [mm].
    pub end_depth_mm: f64,
    /// Highest salinity of the liquid brine [g kg⁻¹].
    pub peak_salinity_g_kg: f64,
    /// Time-weighted mean salinity [g kg⁻¹].
    pub mean_salinity_g_kg: f64,
    /// Salinity at the end of the day [g kg⁻¹].
    pub end_salinity_g_kg: f64,
    /// Salt crust at the end of the day [kg].
    pub crust_kg: f64,
    /// Salt precipitated over the day (crust growth) [kg].
    pub precipitated_kg: f64,
    /// Depth error statistics against the set depth.
    pub depth: DepthStats,
    /// Scaling warnings.
    pub warnings: Vec<String>,
    /// The masses behind the balances.
    pub mass: MassBalance,
}

impl OperationDay {
    pub(crate) fn from_log(log: &DayLog, op: &Operator, mass: MassBalance, end: BasinView) -> Self {
        let o = op.operation();
        let peak = log.peak_salinity.max(end.salinity_g_kg);
        OperationDay {
            feed: o.feed.name(),
            flush: o.flush.name(),
            set_depth_mm: op.set_depth_mm(),
            wetting_depth_mm: o.wetting_depth_mm,
            feed_l: mass.fed_kg / KG_PER_L,
            flush_l: mass.flushed_kg / KG_PER_L,
            flushes: log.flushes,
            dry_out_h: log.dry_s / 3600.0,
            dry_out_events: log.dry_out_events,
            min_depth_mm: log.min_depth_mm.min(end.depth_mm),
            max_depth_mm: log.max_depth_mm.max(end.depth_mm),
            end_depth_mm: end.depth_mm,
            peak_salinity_g_kg: peak,
            mean_salinity_g_kg: if log.time_s > 0.0 {
                log.salinity_s / log.time_s
            } else {
                end.salinity_g_kg
            },
            end_salinity_g_kg: end.salinity_g_kg,
            crust_kg: mass.crust_end_kg,
            precipitated_kg: mass.crust_end_kg - mass.crust_start_kg,
            depth: log.stats(),
            warnings: scaling_warnings(peak),
            mass,
        }
    }
}
