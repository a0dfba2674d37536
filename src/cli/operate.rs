//! `stillbench operate [DESIGN]`: how each basin still is fed and flushed — depth and salinity
//! over the day, feed and flush volumes, dry-out hours, scaling warnings, controller
//! statistics — and the depth study (`--depth-sweep`).

use std::io::Write;
use std::path::PathBuf;

use serde::Serialize;
use stillbench::design::{self, LoadedDesign, Variant};
use stillbench::operation::{self, DepthPoint, Tuning};
use stillbench::output::table::{Table, TableSpec, num, text};
use stillbench::stills::{self, HourRecord, RunOptions, VariantResult};

use super::export::{ExportArgs, Plan};

/// Output formats of `operate`.
#[derive(Debug, Clone, Copy, PartialEq, Eq, clap::ValueEnum)]
pub enum Format {
    /// Readable tables.
    Text,
    /// One JSON document.
    Json,
    /// One table: a row per variant and month (`--table months`, the default) or per
    /// variant and hour of the day profile (`--table profile`); with --depth-sweep, a row
    /// per variant and depth.
    Csv,
}

/// Arguments of `operate`.
#[derive(Debug, clap::Args)]
#[command(after_help = "Examples:
  stillbench operate designs/demo-coast.toml
  stillbench operate designs/demo-coast.toml --variant glass-basin --month 4
  stillbench operate designs/demo-coast.toml --depth-sweep 5..100 --step 5
  stillbench operate designs/demo-coast.toml --format json

The feed and flush come from each variant's [variant.operation] table (see
docs/design-file.md); without one, the basin is topped up by hand at 08:00 and twice the
distillate is flushed. Dry-out hours count time with the brine below the wetting depth.")]
pub struct OperateArgs {
    /// The design file (TOML). Without it, the built-in demo design.
    pub design: Option<PathBuf>,
    /// Only the variant with this name.
    #[arg(long, value_name = "NAME")]
    pub variant: Option<String>,
    /// Output format.
    #[arg(long, value_enum, default_value_t = Format::Text)]
    pub format: Format,
    /// Month (1–12) whose day profile is shown; default the sunniest.
    #[arg(long, value_name = "MONTH", value_parser = clap::value_parser!(u32).range(1..=12))]
    pub month: Option<u32>,
    /// Depth study over set depths FROM..TO in millimetres, e.g. 5..100.
    #[arg(long, value_name = "FROM..TO")]
    pub depth_sweep: Option<String>,
    /// Step of the depth study [mm].
    #[arg(
        long,
        value_name = "MM",
        default_value_t = 5.0,
        requires = "depth_sweep"
    )]
    pub step: f64,
    /// Where the output goes, and which CSV table.
    #[command(flatten)]
    pub export: ExportArgs,
}

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

fn bad_input(loaded: &LoadedDesign, path: &str, message: String) -> anyhow::Error {
    stillbench::Error::Design(design::DesignErrors(vec![design::DesignIssue {
        file: loaded.source.clone(),
        line_col: None,
        path: path.to_owned(),
        message,
    }]))
    .into()
}

/// The depths of `FROM..TO` with `step` [mm].
fn depths(spec: &str, step: f64) -> Result<Vec<f64>, String> {
    let (a, b) = spec
        .split_once("..")
        .ok_or_else(|| format!("`{spec}` is not FROM..TO (e.g. 5..100)"))?;
    let parse = |s: &str| {
        s.trim()
            .parse::<f64>()
            .map_err(|_| format!("`{s}` is not a number of millimetres"))
    };
    let (from, to) = (parse(a)?, parse(b)?);
    if !(from.is_finite() && to.is_finite() && from > 0.0 && to >= from && to <= 300.0) {
        return Err(format!(
            "{from}..{to} is out of range; allowed 0 < FROM <= TO <= 300 mm"
        ));
    }
    if !(step.is_finite() && step > 0.0) {
        return Err(format!(
            "--step {step} must be a positive number of millimetres"
        ));
    }
    let n = ((to - from) / step + 1e-9).floor() as usize;
    if n > 200 {
        return Err(format!("{} depths is too many; allowed at most 201", n + 1));
    }
    Ok((0..=n).map(|i| from + step * i as f64).collect())
}

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
    operation: &'a Option<operation::OperationDay>,
}

fn controller_of(v: &Variant) -> Option<ControllerOut> {
    let op = v.operation.clone().unwrap_or_default();
    if op.feed != operation::FeedMode::Controller {
        return None;
    }
    let area = v.width_m * v.length_m;
    let t = Tuning::resolve(&op, area);
    Some(ControllerOut {
        gain_l_h_mm: t.gain_l_h_mm,
        reset_time_s: t.reset_time_s,
        delay_s: t.delay_s,
        effective_delay_s: t.effective_delay_s,
        gain_limit_l_h_mm: operation::pi_gain_limit_l_h_mm(
            area,
            t.effective_delay_s,
            t.reset_time_s,
        ),
    })
}

fn sunniest(r: &VariantResult) -> u32 {
    r.months
        .iter()
        .max_by(|a, b| a.insolation_kwh_m2_day.total_cmp(&b.insolation_kwh_m2_day))
        .map_or(1, |m| m.month)
}

fn write_text(
    out: &mut dyn Write,
    title: &str,
    runs: &[(&Variant, VariantResult, u32)],
) -> std::io::Result<()> {
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

fn months_table(runs: &[(&Variant, VariantResult, u32)]) -> Table {
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

fn profile_table(runs: &[(&Variant, VariantResult, u32)]) -> Table {
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

fn write_sweep_text(
    out: &mut dyn Write,
    title: &str,
    studies: &[(&Variant, Vec<DepthPoint>)],
) -> std::io::Result<()> {
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

fn sweep_table(studies: &[(&Variant, Vec<DepthPoint>)]) -> Table {
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

/// Run `operate`.
pub fn run(args: &OperateArgs) -> anyhow::Result<()> {
    let loaded = super::load(args.design.as_deref())?;
    let variants: Vec<&Variant> = loaded
        .design
        .variants
        .iter()
        .filter(|v| args.variant.as_deref().is_none_or(|n| n == v.name))
        .filter(|v| stillbench::design::basin_of(v).is_some())
        .collect();
    let modelled: Vec<&Variant> = variants
        .iter()
        .copied()
        .filter(|v| {
            let ok = stills::is_modelled(&v.kind);
            if !ok {
                eprintln!(
                    "note: variant `{}` ({}) is not modelled yet; skipped",
                    v.name,
                    v.kind.name()
                );
            }
            ok
        })
        .collect();
    if modelled.is_empty() {
        return Err(bad_input(
            &loaded,
            "--variant",
            format!(
                "no modelled basin-type variant{}",
                args.variant
                    .as_deref()
                    .map(|n| format!(" named `{n}`"))
                    .unwrap_or_default()
            ),
        ));
    }
    let ds = match &args.depth_sweep {
        Some(spec) => {
            Some(depths(spec, args.step).map_err(|m| bad_input(&loaded, "--depth-sweep", m))?)
        }
        None => None,
    };
    let specs: &[TableSpec] = if ds.is_some() { &SWEEP_TABLES } else { &TABLES };
    let plan = args
        .export
        .plan(&loaded.source, args.format == Format::Csv, specs)?;
    if plan == Plan::Listed {
        return Ok(());
    }
    let weather = stills::site_weather(&loaded)?;
    let title = loaded.design.project.title.as_str();
    let mut buf = Vec::new();
    if let Some(ds) = &ds {
        let opts = RunOptions::default();
        let mut studies = Vec::new();
        for v in &modelled {
            let points = operation::depth_sweep(&loaded, v, &weather, ds, &opts)?;
            studies.push((*v, points));
        }
        match args.format {
            Format::Text => {
                write_sweep_text(&mut buf, title, &studies)?;
                stillbench::cautions::write_cautions(&mut buf)?;
            }
            Format::Json => stillbench::output::write_document(
                &mut buf,
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
            )?,
            Format::Csv => return args.export.write_tables(&plan, &[sweep_table(&studies)]),
        }
    } else {
        let opts = RunOptions {
            hourly: true,
            ..RunOptions::default()
        };
        let mut runs = Vec::new();
        for v in &modelled {
            let r = stills::simulate_variant(&loaded, v, &weather, &opts)?;
            let pm = args.month.unwrap_or_else(|| sunniest(&r));
            runs.push((*v, r, pm));
        }
        match args.format {
            Format::Text => {
                write_text(&mut buf, title, &runs)?;
                stillbench::cautions::write_cautions(&mut buf)?;
            }
            Format::Json => {
                let out: Vec<VariantOut<'_>> = runs
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
                stillbench::output::write_document(
                    &mut buf,
                    &Doc {
                        design: title,
                        variants: out,
                    },
                )?;
            }
            Format::Csv => {
                return args
                    .export
                    .write_tables(&plan, &[months_table(&runs), profile_table(&runs)]);
            }
        }
    }
    args.export.write_document(&buf)
}
