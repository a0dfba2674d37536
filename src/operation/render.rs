//! Writing `operate`'s results: text, one JSON document, CSV tables (docs/output.md). Every
//! writer takes `impl Write`.

use std::io::{self, Write};

use serde::Serialize;

use super::{DepthPoint, Tuning};
use crate::design::Variant;
use crate::output::table::{Table, TableSpec, num, text};
use crate::stills::{HourRecord, VariantResult};

/// One basin variant's run: the variant, its hourly simulation and the month whose day
/// profile is shown.
pub type Run<'a> = (&'a Variant, VariantResult, u32);

/// One basin variant's depth study.
pub type Study<'a> = (&'a Variant, Vec<DepthPoint>);

/// The CSV tables of `operate`.
pub const TABLES: [TableSpec; 2] = [
    TableSpec {
        name: "months",
        about: "one row per variant and month: feed, flush, dry-out, depth, salinity, control",
    },
    TableSpec {
        name: "profile",
        about: "one row per variant and hour of the profile month's day",
    },
];

/// The CSV table of `operate --depth-sweep`.
pub const SWEEP_TABLES: [TableSpec; 1] = [TableSpec {
    name: "depths",
    about: "one row per variant and set depth",
}];

#[derive(Serialize)]
struct VariantOut<'a> {
    name: &'a str,
    kind: &'a str,
    feed: &'static str,
    flush: &'static str,
    controller: Option<ControllerOut>,
    profile_month: u32,
    months: Vec<MonthOut<'a>>,
    profile: Vec<&'a HourRecord>,
}

#[derive(Serialize)]
struct ControllerOut {
    gain_l_h_mm: f64,
    reset_time_s: f64,
    delay_s: f64,
    effective_delay_s: f64,
    gain_limit_l_h_mm: f64,
}

#[derive(Serialize)]
struct MonthOut<'a> {
    month: u32,
    l_m2_day: f64,
    operation: &'a Option<super::OperationDay>,
}

fn controller_of(v: &Variant) -> Option<ControllerOut> {
    let op = v.operation.clone().unwrap_or_default();
    if op.feed != super::FeedMode::Controller {
        return None;
    }
    let area = v.width_m * v.length_m;
    let t = Tuning::resolve(&op, area);
    Some(ControllerOut {
        gain_l_h_mm: t.gain_l_h_mm,
        reset_time_s: t.reset_time_s,
        delay_s: t.delay_s,
        effective_delay_s: t.effective_delay_s,
        gain_limit_l_h_mm: super::pi_gain_limit_l_h_mm(area, t.effective_delay_s, t.reset_time_s),
    })
}

/// The month with the most sunlight on the horizontal (the default profile month).
pub fn sunniest(r: &VariantResult) -> u32 {
    r.months
        .iter()
        .max_by(|a, b| a.insolation_kwh_m2_day.total_cmp(&b.insolation_kwh_m2_day))
        .map_or(1, |m| m.month)
}

/// Write the runs as text: per variant the feed and flush, the controller, a row per month,
/// the profile month's day hour by hour, and the warnings.
pub fn write_text(out: &mut dyn Write, title: &str, runs: &[Run<'_>]) -> io::Result<()> {
    writeln!(out, "{title}")?;
    for (v, r, pm) in runs {
        let op = v.operation.clone().unwrap_or_default();
        writeln!(out)?;
        writeln!(
            out,
            "{} ({}): feed {}, flush {}, wetting depth {} mm",
            r.name,
            r.kind,
            op.feed.name(),
            op.flush.name(),
            op.wetting_depth_mm
        )?;
        if let Some(c) = controller_of(v) {
            writeln!(
                out,
                "controller: gain {:.2} L/h per mm, reset time {:.0} s, delay {:.0} s (effective {:.0} s); stability limit {:.2} L/h per mm",
                c.gain_l_h_mm, c.reset_time_s, c.delay_s, c.effective_delay_s, c.gain_limit_l_h_mm
            )?;
        }
        writeln!(
            out,
            "month  L/m²/day  feed L/day  flush L/day  dry-out h  depth min–max mm  peak g/kg  crust kg  mean err mm  max dev mm  ±5 %"
        )?;
        let mut warnings: Vec<String> = Vec::new();
        for m in &r.months {
            let Some(o) = &m.operation else { continue };
            writeln!(
                out,
                "{:<5}  {:>8.2}  {:>10.2}  {:>11.2}  {:>9.2}  {:>7.1} – {:>6.1}  {:>9.1}  {:>8.3}  {:>11.2}  {:>10.2}  {:>3.0}%",
                month_name(m.month),
                m.l_m2_day,
                o.feed_l,
                o.flush_l,
                o.dry_out_h,
                o.min_depth_mm,
                o.max_depth_mm,
                o.peak_salinity_g_kg,
                o.crust_kg,
                o.depth.mean_error_mm,
                o.depth.max_deviation_mm,
                100.0 * o.depth.within_5pct_share
            )?;
            for w in &o.warnings {
                warnings.push(format!("{}: {w}", month_name(m.month)));
            }
        }
        writeln!(
            out,
            "day profile, {} (sunniest unless --month): solar hour  depth mm  salinity g/kg  feed L  flush L  distillate L",
            month_name(*pm)
        )?;
        for h in r.hourly.iter().flatten().filter(|h| h.month == *pm) {
            writeln!(
                out,
                "  {:>5.1}  {:>8.2}  {:>13.1}  {:>6.2}  {:>7.2}  {:>12.3}",
                h.solar_hour_h, h.depth_mm, h.salinity_g_kg, h.feed_l, h.flush_l, h.distillate_l
            )?;
        }
        for w in warnings {
            writeln!(out, "warning: {w}")?;
        }
    }
    Ok(())
}

fn month_name(m: u32) -> &'static str {
    const N: [&str; 12] = [
        "Jan", "Feb", "Mar", "Apr", "May", "Jun", "Jul", "Aug", "Sep", "Oct", "Nov", "Dec",
    ];
    N[(m.clamp(1, 12) - 1) as usize]
}

/// The `months` table: one row per variant and month.
pub fn months_table(runs: &[Run<'_>]) -> Table {
    let mut t = Table::new(
        "months",
        &[
            "variant",
            "month",
            "l_m2_day",
            "feed",
            "flush",
            "feed_l_day",
            "flush_l_day",
            "dry_out_h",
            "min_depth_mm",
            "max_depth_mm",
            "peak_salinity_g_kg",
            "crust_kg",
            "mean_error_mm",
            "max_deviation_mm",
            "within_5pct_share",
        ],
    );
    for (_, r, _) in runs {
        for m in &r.months {
            let Some(o) = m.operation.as_ref() else {
                continue;
            };
            t.push(vec![
                text(&r.name),
                serde_json::json!(m.month),
                num(m.l_m2_day, 4),
                text(o.feed),
                text(o.flush),
                num(o.feed_l, 4),
                num(o.flush_l, 4),
                num(o.dry_out_h, 3),
                num(o.min_depth_mm, 3),
                num(o.max_depth_mm, 3),
                num(o.peak_salinity_g_kg, 2),
                num(o.crust_kg, 4),
                num(o.depth.mean_error_mm, 4),
                num(o.depth.max_deviation_mm, 4),
                num(o.depth.within_5pct_share, 4),
            ]);
        }
    }
    t
}

/// The `profile` table: one row per variant and hour of its profile month's day.
pub fn profile_table(runs: &[Run<'_>]) -> Table {
    let mut t = Table::new(
        "profile",
        &[
            "variant",
            "month",
            "solar_hour_h",
            "depth_mm",
            "salinity_g_kg",
            "feed_l",
            "flush_l",
            "distillate_l",
        ],
    );
    for (_, r, pm) in runs {
        for h in r.hourly.iter().flatten().filter(|h| h.month == *pm) {
            t.push(vec![
                text(&r.name),
                serde_json::json!(h.month),
                num(h.solar_hour_h, 2),
                num(h.depth_mm, 3),
                num(h.salinity_g_kg, 2),
                num(h.feed_l, 4),
                num(h.flush_l, 4),
                num(h.distillate_l, 5),
            ]);
        }
    }
    t
}

/// Write the depth studies as text, one table per variant.
pub fn write_sweep_text(out: &mut dyn Write, title: &str, studies: &[Study<'_>]) -> io::Result<()> {
    writeln!(out, "{title}")?;
    for (v, points) in studies {
        writeln!(out)?;
        writeln!(out, "depth study of {} ({})", v.name, v.kind.name())?;
        writeln!(
            out,
            "depth mm  L/m²/day  night  worst dry-out h/day (month)  peak g/kg  dry-out risk"
        )?;
        for p in points {
            match &p.refused {
                Some(why) => writeln!(out, "{:>8.1}  refused: {why}", p.depth_mm)?,
                None => writeln!(
                    out,
                    "{:>8.1}  {:>8.2}  {:>4.0}%  {:>20.2} ({})  {:>9.1}  {}",
                    p.depth_mm,
                    p.mean_l_m2_day,
                    100.0 * p.night_share,
                    p.worst_dry_out_h,
                    if p.worst_dry_out_h > 0.0 {
                        month_name(p.worst_dry_out_month)
                    } else {
                        "-"
                    },
                    p.peak_salinity_g_kg,
                    p.dry_out_risk
                )?,
            }
        }
    }
    Ok(())
}

#[derive(Serialize)]
struct SweepDoc<'a> {
    design: &'a str,
    variants: Vec<SweepOut<'a>>,
}

#[derive(Serialize)]
struct SweepOut<'a> {
    name: &'a str,
    kind: &'static str,
    points: &'a [DepthPoint],
}

/// The `depths` table: one row per variant and set depth.
pub fn sweep_table(studies: &[Study<'_>]) -> Table {
    let mut t = Table::new(
        "depths",
        &[
            "variant",
            "depth_mm",
            "l_m2_day",
            "night_share",
            "worst_dry_out_h",
            "worst_dry_out_month",
            "peak_salinity_g_kg",
            "dry_out_risk",
            "refused",
        ],
    );
    for (v, points) in studies {
        for p in points {
            t.push(vec![
                text(&v.name),
                num(p.depth_mm, 6),
                num(p.mean_l_m2_day, 4),
                num(p.night_share, 4),
                num(p.worst_dry_out_h, 3),
                serde_json::json!(p.worst_dry_out_month),
                num(p.peak_salinity_g_kg, 2),
                text(p.dry_out_risk),
                text(p.refused.clone().unwrap_or_default()),
            ]);
        }
    }
    t
}

/// Write the runs as one JSON document: `{"schema_version", "design", "variants": [...]}`.
pub fn write_json(out: &mut impl Write, title: &str, runs: &[Run<'_>]) -> io::Result<()> {
    let variants: Vec<VariantOut<'_>> = runs
        .iter()
        .map(|(v, r, pm)| VariantOut {
            name: &r.name,
            kind: &r.kind,
            feed: v.operation.clone().unwrap_or_default().feed.name(),
            flush: v.operation.clone().unwrap_or_default().flush.name(),
            controller: controller_of(v),
            profile_month: *pm,
            months: r
                .months
                .iter()
                .map(|m| MonthOut {
                    month: m.month,
                    l_m2_day: m.l_m2_day,
                    operation: &m.operation,
                })
                .collect(),
            profile: r
                .hourly
                .iter()
                .flatten()
                .filter(|h| h.month == *pm)
                .collect(),
        })
        .collect();
    #[derive(Serialize)]
    struct Doc<'a> {
        design: &'a str,
        variants: Vec<VariantOut<'a>>,
    }
    crate::output::write_document(
        out,
        &Doc {
            design: title,
            variants,
        },
    )
}

/// The tables of [`TABLES`], in that order.
pub fn tables(runs: &[Run<'_>]) -> Vec<Table> {
    vec![months_table(runs), profile_table(runs)]
}

/// Write the depth studies as one JSON document: `{"schema_version", "design", "variants":
/// [{"name", "kind", "points"}]}`.
pub fn write_sweep_json(
    out: &mut impl Write,
    title: &str,
    studies: &[Study<'_>],
) -> io::Result<()> {
    crate::output::write_document(
        out,
        &SweepDoc {
            design: title,
            variants: studies
                .iter()
                .map(|(v, points)| SweepOut {
                    name: &v.name,
                    kind: v.kind.name(),
                    points,
                })
                .collect(),
        },
    )
}
