//! `stillbench climate DESIGN`: print the site's monthly climate table and optionally export
//! the hourly series. The design file is read by the caller (the design module resolves the
//! `[site]` table into [`ClimateInputs`]); this handler only calls the library and prints.

use clap::{Args, ValueEnum};
use std::io::Write;
use std::path::PathBuf;
use stillbench::climate::export::{
    TABLES, hourly_table, monthly_csv_table, monthly_table, render_monthly_table, write_json,
};
use stillbench::climate::{ClimateSource, Plane, SiteLocation, SkyModel, site_weather};

use super::export::{ExportArgs, Plan};

/// Arguments of `stillbench climate`.
#[derive(Debug, Args)]
#[command(after_help = "Examples:
  stillbench climate designs/demo-coast.toml
      monthly table: irradiation on the horizontal and on every cover plane, temperatures, wind
  stillbench climate designs/demo-coast.toml --format csv --out coast-hourly.csv
      every hour of the average days (or of the weather file), with the irradiance on every
      cover plane, as CSV (--table monthly: the monthly table as CSV)
  stillbench climate designs/demo-coast.toml --format json
      one JSON document with both: the monthly table and every hour")]
pub struct ClimateArgs {
    /// The design file (TOML). Without it, the built-in demo design.
    pub design: Option<PathBuf>,
    /// Export format (without it, the monthly table as text).
    #[arg(long, value_enum)]
    pub format: Option<ExportFormat>,
    /// Where the output goes, and which CSV table. With --out and a format, the monthly
    /// table is also printed.
    #[command(flatten)]
    pub export: ExportArgs,
}

/// Run `stillbench climate`: read the design, resolve its site, print and export.
pub fn run(args: &ClimateArgs) -> anyhow::Result<()> {
    let loaded = super::load(args.design.as_deref())?;
    let plan = args.export.plan(
        &loaded.source,
        args.format == Some(ExportFormat::Csv),
        &TABLES,
    )?;
    if plan == Plan::Listed {
        return Ok(());
    }
    let design = &loaded.design;
    let inputs = ClimateInputs {
        site_name: design.site.name.clone(),
        site: design.site.location(),
        source: design.site.climate_source(),
        planes: design
            .variants
            .iter()
            .flat_map(|v| v.cover_planes())
            .collect(),
        sky_model: SkyModel::default(),
    };
    let weather = site_weather(&inputs.site, &inputs.source).map_err(stillbench::Error::from)?;
    for w in &weather.warnings {
        eprintln!("warning: {w}");
    }
    let planes: Vec<Plane> = inputs.planes.iter().map(|(_, p)| *p).collect();
    let names: Vec<String> = inputs.planes.iter().map(|(n, _)| n.clone()).collect();
    let rows = monthly_table(&weather.series, &planes, inputs.sky_model);
    let mut text = Vec::new();
    render_monthly_table(&mut text, &rows, &names)?;
    match args.format {
        None => args.export.write_document(&text),
        Some(format) => {
            if args.export.out.is_some() {
                let mut out = std::io::stdout().lock();
                out.write_all(&text)?;
            }
            match format {
                ExportFormat::Csv => args.export.write_tables(
                    &plan,
                    &[
                        hourly_table(&weather.series, &inputs.planes, inputs.sky_model),
                        monthly_csv_table(&rows, &names),
                    ],
                ),
                ExportFormat::Json => {
                    let mut buf = Vec::new();
                    write_json(
                        &mut buf,
                        &inputs.site_name,
                        &weather.series,
                        &inputs.planes,
                        inputs.sky_model,
                    )?;
                    args.export.write_document(&buf)
                }
            }
        }
    }
}

/// Export formats.
#[derive(Debug, Clone, Copy, PartialEq, Eq, ValueEnum)]
pub enum ExportFormat {
    /// One CSV table: `hourly` (a row per record, the default) or `monthly` (`--table`).
    Csv,
    /// One JSON document: the monthly table and every hourly record.
    Json,
}

/// What the design says about the site's climate, resolved into library types.
#[derive(Debug, Clone)]
pub struct ClimateInputs {
    /// The site's name.
    pub site_name: String,
    /// The site.
    pub site: SiteLocation,
    /// Monthly means or a weather file.
    pub source: ClimateSource,
    /// Each variant's cover planes, named for the table's columns.
    pub planes: Vec<(String, Plane)>,
    /// Sky model for the transposition.
    pub sky_model: SkyModel,
}
