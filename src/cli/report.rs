//! `stillbench report [DESIGN] [--out DIR] [--force] [--templates DIR] [--seed S]
//! [--people N [--litres-per-person L] | --demand L_PER_DAY]`: the report for a funder and a
//! workshop — Markdown, a self-contained HTML page, charts, and every table as CSV and JSON.

use std::path::PathBuf;

use stillbench::compare::size::{DEFAULT_CONFIDENCE, DEFAULT_YEARS};
use stillbench::compare::uncertainty::DEFAULT_SAMPLES;
use stillbench::report::{self, ReportOptions, SheetChoice, Templates};

use super::demand::DemandArgs;

/// Arguments of `report`.
#[derive(Debug, clap::Args)]
#[command(
    after_help = "Writes into DIR (default reports/<design file name>/):\n  \
    report.md, report.html (self-contained: charts and styles inline, prints on A4 or Letter),\n  \
    charts/*.svg, tables/*.csv and tables/*.json.\n\
    The folder is built beside DIR and moved into place when complete; an existing report is\n\
    kept unless --force is given. Templates (Markdown with placeholders) can be copied from\n\
    the project's templates/ folder, edited and given with --templates.\n\
    SOURCE_DATE_EPOCH (seconds since 1970) fixes the date printed in the report.\n\n\
    The yield ranges (P10/P50/P90) and the tornado chart come from the same Monte Carlo as\n\
    `stillbench uncertainty` (--samples, --seed: same figures for the same values); the\n\
    recommended variant is also sized over --years stochastic weather years at --confidence\n\
    (as `stillbench size --full`, same seed). The workshop sheet is the recommended variant's unless\n\
    --sheet names others. The published-device comparisons are rerun from the reconstructed\n\
    designs built into stillbench (designs/validation/ in the source).\n\n\
    Examples:\n  stillbench report\n  stillbench report designs/demo-coast.toml --out reports/coast --force\n  \
    stillbench report designs/demo-coast.toml --people 200 --litres-per-person 3"
)]
pub struct ReportArgs {
    /// The design file (TOML). Without it, the built-in demo design.
    pub design: Option<PathBuf>,
    /// Folder to write the report into.
    #[arg(long, value_name = "DIR")]
    pub out: Option<PathBuf>,
    /// Replace an existing report folder.
    #[arg(long)]
    pub force: bool,
    /// Folder of templates replacing the built-in ones file by file.
    #[arg(long, value_name = "DIR")]
    pub templates: Option<PathBuf>,
    /// Seed recorded in the report and given to its stochastic parts (Monte Carlo and
    /// weather years).
    #[arg(long, default_value_t = 1)]
    pub seed: u64,
    /// Monte Carlo samples for the yield ranges and the tornado, 0…1000000 (0: none); the
    /// default is `stillbench uncertainty`'s.
    #[arg(long, value_name = "N", default_value_t = DEFAULT_SAMPLES)]
    pub samples: u32,
    /// Stochastic weather years over which the recommended variant is sized at --confidence
    /// (0: the mean year only); the default is `stillbench size`'s.
    #[arg(long, value_name = "N", default_value_t = DEFAULT_YEARS)]
    pub years: u32,
    /// Fraction of weather years in which the sized array must meet the demand.
    #[arg(long, value_name = "F", default_value_t = DEFAULT_CONFIDENCE)]
    pub confidence: f64,
    /// Variant whose workshop sheet to include (repeatable), or `all`; default the
    /// recommended variant's.
    #[arg(long, value_name = "NAME")]
    pub sheet: Vec<String>,
    /// The demand to size for (instead of the design's `[project.demand]`).
    #[command(flatten)]
    pub need: DemandArgs,
}

/// Run `report`.
pub fn run(args: &ReportArgs) -> anyhow::Result<()> {
    let templates = Templates::load(args.templates.as_deref())?;
    let loaded = super::load(args.design.as_deref())?;
    let out = args
        .out
        .clone()
        .unwrap_or_else(|| report::default_dir(&loaded));
    if out.exists() && !args.force {
        return Err(stillbench::Error::Refused {
            path: out.display().to_string(),
            reason: "a report is already there; pass --force to replace it".into(),
        }
        .into());
    }
    let demand = args.need.choice();
    let mut command = String::from("stillbench report");
    if let Some(d) = &args.design {
        command.push_str(&format!(" {}", d.display()));
    }
    command.push_str(&format!(" --seed {}", args.seed));
    command.push_str(&args.need.command_args());
    command.push_str(&format!(
        " --samples {} --years {} --confidence {}",
        args.samples, args.years, args.confidence
    ));
    for s in &args.sheet {
        command.push_str(&format!(" --sheet {s:?}"));
    }
    let sheets = if args.sheet.is_empty() {
        SheetChoice::Recommended
    } else if args.sheet.iter().any(|s| s == "all") {
        SheetChoice::All
    } else {
        SheetChoice::Named(args.sheet.clone())
    };
    let opts = ReportOptions {
        samples: args.samples,
        sizing_years: args.years,
        confidence: args.confidence,
        sheets,
        ..ReportOptions::quick(
            args.seed,
            demand,
            report::report_date(std::env::var("SOURCE_DATE_EPOCH").ok().as_deref()),
            command,
        )
    };
    let (design_bytes, library_bytes) = report::input_bytes(&loaded, args.design.is_none())?;
    let bar = super::uncertainty::progress_bar();
    let tick = |done: u64, total: u64| {
        bar.set_length(total);
        bar.set_position(done);
    };
    let built =
        report::build_context_with(&loaded, &design_bytes, &library_bytes, &opts, Some(&tick));
    bar.finish_and_clear();
    let mut ctx = built?;
    let charts = report::attach_charts(&mut ctx)?;
    let files = report::write_report(&ctx, &charts, &templates, &out, args.force)?;
    println!(
        "wrote {} files into {}: report.md, report.html, {} charts, {} tables (CSV and JSON)",
        files.len(),
        out.display(),
        charts.len(),
        files
            .iter()
            .filter(|f| f.extension().is_some_and(|e| e == "csv"))
            .count()
    );
    println!(
        "recommended: {} ({} units for {:.0} L/day in the mean year's worst month)",
        ctx.summary.recommended, ctx.summary.sizing.units, ctx.need.demand_l_day
    );
    if let Some(c) = &ctx.summary.confident {
        println!(
            "at confidence {}: {} units, storage {:.0} L ({} weather years, seed {})",
            c.confidence, c.units, c.storage_l, c.years, c.seed
        );
    }
    Ok(())
}
