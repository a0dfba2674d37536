//! `stillbench report [DESIGN] [--out DIR] [--force] [--templates DIR] [--seed S]
//! [--people N [--litres-per-person L] | --demand L_PER_DAY]`: the report for a funder and a
//! workshop — Markdown, a self-contained HTML page, charts, and every table as CSV and JSON.

use std::path::PathBuf;

use stillbench::design::DRINKING_L_PER_PERSON_DAY;
use stillbench::report::{self, DemandChoice, ReportOptions, Templates};

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
    /// Seed recorded in the report and given to its stochastic parts.
    #[arg(long, default_value_t = 1)]
    pub seed: u64,
    /// People served (instead of the design's demand).
    #[arg(long, value_name = "N", conflicts_with = "demand")]
    pub people: Option<u32>,
    /// Litres per person and day with --people; default 3 (drinking only).
    #[arg(
        long,
        value_name = "L",
        allow_negative_numbers = true,
        requires = "people"
    )]
    pub litres_per_person: Option<f64>,
    /// Daily demand [L/day] (instead of the design's demand).
    #[arg(long, value_name = "L_PER_DAY", allow_negative_numbers = true)]
    pub demand: Option<f64>,
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
    let demand = match (args.people, args.demand) {
        (Some(people), _) => DemandChoice::People {
            people,
            l_per_person_day: args.litres_per_person.unwrap_or(DRINKING_L_PER_PERSON_DAY),
        },
        (None, Some(d)) => DemandChoice::Total(d),
        (None, None) => DemandChoice::FromDesign,
    };
    let mut command = String::from("stillbench report");
    if let Some(d) = &args.design {
        command.push_str(&format!(" {}", d.display()));
    }
    command.push_str(&format!(" --seed {}", args.seed));
    if let Some(p) = args.people {
        command.push_str(&format!(" --people {p}"));
        if let Some(l) = args.litres_per_person {
            command.push_str(&format!(" --litres-per-person {l}"));
        }
    }
    if let Some(d) = args.demand {
        command.push_str(&format!(" --demand {d}"));
    }
    let opts = ReportOptions {
        seed: args.seed,
        demand,
        date: report::report_date(std::env::var("SOURCE_DATE_EPOCH").ok().as_deref()),
        command,
    };
    let (design_bytes, library_bytes) = report::input_bytes(&loaded, args.design.is_none())?;
    let mut ctx = report::build_context(&loaded, &design_bytes, &library_bytes, &opts)?;
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
        "recommended: {} ({} units for {:.0} L/day)",
        ctx.summary.recommended, ctx.summary.sizing.units, ctx.need.demand_l_day
    );
    Ok(())
}
