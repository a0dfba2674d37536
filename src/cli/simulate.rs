//! `stillbench simulate [DESIGN]`: run every still variant over the site's weather and print
//! monthly and annual yields.

use std::path::PathBuf;

use anyhow::Context;
use stillbench::design::{self, LoadedDesign};
use stillbench::stills::{self, RunOptions, render};

use super::export::{ExportArgs, Plan};

/// Output formats of `simulate`.
#[derive(Debug, Clone, Copy, PartialEq, Eq, clap::ValueEnum)]
pub enum Format {
    /// A readable monthly table per variant.
    Text,
    /// One JSON document for scripts (docs/output.md).
    Json,
    /// One table: monthly rows (the default) or, with `--table hourly`, hourly rows.
    Csv,
}

/// Arguments of `simulate`.
#[derive(Debug, clap::Args)]
#[command(after_help = "Examples:
  stillbench simulate                                   the built-in demo design
  stillbench simulate designs/demo-coast.toml           every variant, monthly table
  stillbench simulate designs/demo-coast.toml --variant glass-basin --hourly
  stillbench simulate designs/demo-coast.toml --format json --out results.json
  stillbench simulate designs/demo-coast.toml --format csv --out results.csv --force
  stillbench simulate designs/demo-coast.toml --format csv --table hourly
  stillbench simulate designs/demo-coast.toml --format csv --hourly --table all --out results/

How it works: each variant becomes a small thermal network (cover, brine, liner, walls)
that is stepped through the weather with a heat-and-mass-transfer solver. With monthly
climate data each month's average day is repeated until the daily cycle repeats; the
table says how many days that took. Yields are per m² of footprint (plan area).
Efficiency is distillate × latent heat ÷ sunlight entering through the cover; the
ceiling is what that sunlight could evaporate at 100 %.

Variant kinds without a model yet are reported on stderr and skipped.")]
pub struct SimulateArgs {
    /// The design file (TOML). Without it, the built-in demo design is simulated.
    pub design: Option<PathBuf>,
    /// Simulate only the variant with this name.
    #[arg(long, value_name = "NAME")]
    pub variant: Option<String>,
    /// Output format.
    #[arg(long, value_enum, default_value_t = Format::Text)]
    pub format: Format,
    /// Add each hour's temperatures, heat flows and distillate (the last simulated day of
    /// each month, or every record of a weather file).
    #[arg(long)]
    pub hourly: bool,
    /// Where the output goes, and which CSV table.
    #[command(flatten)]
    pub export: ExportArgs,
}

/// Run `simulate`.
pub fn run(args: &SimulateArgs) -> anyhow::Result<()> {
    let loaded: LoadedDesign = match &args.design {
        Some(path) => design::load_design(path),
        None => design::load_demo(),
    }
    .map_err(stillbench::Error::Design)?;
    // Refuse before simulating, not after: the answer does not depend on the results.
    let plan = args
        .export
        .plan(&loaded.source, args.format == Format::Csv, &render::TABLES)?;
    if plan == Plan::Listed {
        return Ok(());
    }
    let variants: Vec<_> = loaded
        .design
        .variants
        .iter()
        .filter(|v| args.variant.as_deref().is_none_or(|n| n == v.name))
        .collect();
    if variants.is_empty() {
        let names: Vec<_> = loaded
            .design
            .variants
            .iter()
            .map(|v| v.name.as_str())
            .collect();
        return Err(
            stillbench::Error::Design(design::DesignErrors(vec![design::DesignIssue {
                file: loaded.source.clone(),
                line_col: None,
                path: "--variant".to_owned(),
                message: format!(
                    "no variant named `{}`; the design has: {}",
                    args.variant.as_deref().unwrap_or(""),
                    names.join(", ")
                ),
            }]))
            .into(),
        );
    }
    let weather = stills::site_weather(&loaded)?;
    let opts = RunOptions {
        // The hourly table asked for by name needs the hourly records.
        hourly: args.hourly || ExportArgs::wants(&plan, "hourly"),
        ..RunOptions::default()
    };
    let mut results = Vec::new();
    for v in variants {
        if !stills::is_modelled(&v.kind) {
            eprintln!(
                "note: variant `{}` ({}) is not modelled yet; skipped",
                v.name,
                v.kind.name()
            );
            continue;
        }
        results.push(stills::simulate_variant(&loaded, v, &weather, &opts)?);
    }
    if results.is_empty() {
        return Err(stillbench::Error::Model {
            variant: args.variant.clone().unwrap_or_else(|| "(all)".to_owned()),
            at: String::new(),
            reason: "no variant of a kind that is modelled yet (single-slope)".to_owned(),
        }
        .into());
    }
    for r in &results {
        for m in r.months.iter().filter(|m| m.max_brine_c < 0.0) {
            // Ice is not modelled: a month whose brine never rises above 0 °C is outside what
            // the model represents, and a frozen basin can crack.
            eprintln!(
                "warning: variant `{}`, month {}: the brine stays below 0 °C all day; freezing \
                 is not modelled, so treat this month's yield as unreliable and protect the \
                 still from frost (drain it or insulate it)",
                r.name, m.month
            );
        }
    }
    let title = loaded.design.project.title.as_str();
    let mut buf = Vec::new();
    match args.format {
        Format::Text => render::write_text(&mut buf, title, &results)
            .and_then(|()| stillbench::cautions::write_cautions(&mut buf)),
        Format::Json => render::write_json(&mut buf, title, &results),
        Format::Csv => return args.export.write_tables(&plan, &render::tables(&results)),
    }
    .context("formatting the results")?;
    args.export.write_document(&buf)
}
