//! The operator's upkeep time for an installation of identical units: a daily round of the
//! installation plus per-unit and per-m² tasks (`[costs.operator]`, defaults common
//! practice, no source).
//!
//! The tasks of one unit follow from its kind and its `[variant.operation]`:
//!
//! * every unit: emptying its distillate bottle, cleaning its cover every
//!   `cover_clean_interval_days` (time ∝ cover area);
//! * a basin fed by hand (`feed = "batch"`): one fill per refill hour, and one flush by hand
//!   a day with a daily or ratio flush (done at the first refill), one every
//!   `salinity_flush_interval_days` with a salinity-limit flush, none with `flush = "none"`;
//! * a basin on a float valve, drip or controller: a feed check a day; its flush is the
//!   overflow or a bleed (ratio, daily) and needs no hands, except a salinity-limit drain;
//! * the self-feeding kinds (wick, multi-effect: fed continuously from a feed line): a feed
//!   check a day, no filling and no flushing (the run-off carries the salt).
//!
//! The installation's operator time a day is the round plus units × the unit tasks; a unit's
//! share, which its cost per litre carries, is that divided by the units.

use serde::Serialize;

use crate::design::{
    Costs, FeedMode, FlushMode, LoadedDesign, Operation, OperatorTasks, Variant, VariantKind,
};

/// One upkeep task of one unit.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct UnitTask {
    /// What is done.
    pub task: String,
    /// Minutes a day it takes for one unit, averaged over its interval [min day⁻¹].
    pub min_per_day: f64,
}

/// The operator time of an installation.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct OperatorTime {
    /// Units in the installation the time is worked out for.
    pub units: u64,
    /// Where the unit count comes from.
    pub units_basis: String,
    /// Whether the unit feeds itself (valve, drip, controller or feed line) rather than being
    /// filled by hand.
    pub self_feeding: bool,
    /// The daily round of the whole installation [min day⁻¹].
    pub round_min_per_day: f64,
    /// Tasks of one unit.
    pub unit_tasks: Vec<UnitTask>,
    /// Sum of the unit tasks [min day⁻¹ unit⁻¹].
    pub unit_min_per_day: f64,
    /// Operator time of the whole installation [h day⁻¹].
    pub installation_h_per_day: f64,
    /// One unit's share of it [h year⁻¹]: (round ÷ units + unit tasks) × 365.
    pub unit_share_h_per_year: f64,
}

/// Whether a unit of `v` feeds itself (no filling by hand).
pub fn self_feeding(v: &Variant) -> bool {
    match &v.kind {
        VariantKind::Wick(_) | VariantKind::MultiEffect(_) => true,
        _ => {
            v.operation
                .as_ref()
                .map_or(Operation::default().feed, |o| o.feed)
                != FeedMode::Batch
        }
    }
}

/// The tasks of one unit of `v` (see the module documentation).
pub fn unit_tasks(v: &Variant, t: &OperatorTasks) -> Vec<UnitTask> {
    let mut out = Vec::new();
    let flow_through = matches!(v.kind, VariantKind::Wick(_) | VariantKind::MultiEffect(_));
    let default_op = Operation::default();
    let op = v.operation.as_ref().unwrap_or(&default_op);
    if flow_through {
        out.push(UnitTask {
            task: "check the feed line and run-off".into(),
            min_per_day: t.feed_check_min_per_day,
        });
    } else {
        let hand = op.feed == FeedMode::Batch;
        if hand {
            let fills = op.refill_hours.len() as f64;
            out.push(UnitTask {
                task: format!("fill the basin by hand ({fills} a day)"),
                min_per_day: fills * t.fill_min,
            });
        } else {
            out.push(UnitTask {
                task: format!("check the {} feed", op.feed.name()),
                min_per_day: t.feed_check_min_per_day,
            });
        }
        let flushes_per_day = match op.flush {
            FlushMode::None => 0.0,
            FlushMode::Daily | FlushMode::Ratio if hand => 1.0,
            FlushMode::Daily | FlushMode::Ratio => 0.0,
            FlushMode::SalinityLimit => 1.0 / t.salinity_flush_interval_days,
        };
        if flushes_per_day > 0.0 {
            out.push(UnitTask {
                task: format!("flush the brine by hand ({})", op.flush.name()),
                min_per_day: flushes_per_day * t.flush_min,
            });
        }
    }
    out.push(UnitTask {
        task: "empty the distillate bottle".into(),
        min_per_day: t.bottle_min_per_day,
    });
    out.push(UnitTask {
        task: format!(
            "clean the cover ({:.2} m², every {} days)",
            v.cover_area_m2(),
            t.cover_clean_interval_days
        ),
        min_per_day: t.cover_clean_min_per_m2 * v.cover_area_m2() / t.cover_clean_interval_days,
    });
    out
}

/// The operator time of `units` units of `v` (`units` ≥ 1; 0 counts as 1).
pub fn operator_time(v: &Variant, c: &Costs, units: u64, units_basis: String) -> OperatorTime {
    let units = units.max(1);
    let tasks = unit_tasks(v, &c.operator);
    let unit_min: f64 = tasks.iter().map(|t| t.min_per_day).sum();
    let round = c.operator.round_min_per_day;
    let n = units as f64;
    OperatorTime {
        units,
        units_basis,
        self_feeding: self_feeding(v),
        round_min_per_day: round,
        unit_tasks: tasks,
        unit_min_per_day: unit_min,
        installation_h_per_day: (round + n * unit_min) / 60.0,
        unit_share_h_per_year: (round / n + unit_min) / 60.0 * 365.0,
    }
}

/// Units of an installation meeting `demand_l_day` [L day⁻¹] with units that each make
/// `unit_worst_month_l_day` [L day⁻¹] on a mean day of their worst month: ⌈demand ÷ unit⌉,
/// the mean-year rule of `size` and the report. `None` when a unit makes no water.
pub fn units_for_demand(demand_l_day: f64, unit_worst_month_l_day: f64) -> Option<u64> {
    if !(unit_worst_month_l_day > 0.0
        && unit_worst_month_l_day.is_finite()
        && demand_l_day.is_finite())
    {
        return None;
    }
    let n = (demand_l_day / unit_worst_month_l_day).ceil().max(1.0);
    (n <= 1e9).then_some(n as u64)
}

/// The installation a unit's cost is spread over: units for the design's `[project.demand]`
/// on the mean year (when the design has one and the unit makes water in its worst month),
/// else a single unit. Returns the units and a sentence saying where they come from.
pub fn installation_units(
    loaded: &LoadedDesign,
    unit_worst_month_l_day: Option<f64>,
) -> (u64, String) {
    let demand = loaded
        .design
        .project
        .demand
        .as_ref()
        .map(|d| d.total_litres_per_day());
    match (demand, unit_worst_month_l_day) {
        (Some(d), Some(w)) => match units_for_demand(d, w) {
            Some(n) => (
                n,
                format!(
                    "{n} units for the design's demand of {d} L/day on a mean day of the \
                     worst month"
                ),
            ),
            None => (1, "one unit (it makes no water in its worst month)".into()),
        },
        (None, _) => (
            1,
            "one unit (the design gives no [project.demand] to size an installation)".into(),
        ),
        (Some(_), None) => (
            1,
            "one unit (no yield modelled to size an installation)".into(),
        ),
    }
}
