//! `stillbench climate DESIGN`: print the site's monthly climate table and optionally export
//! the hourly series. The design file is read by the caller (the design module resolves the
//! `[site]` table into [`ClimateInputs`]); this handler only calls the library and prints.

use clap::{Args, ValueEnum};
use std::io::Write;
use std::path::PathBuf;
use stillbench::climate::export::{
    monthly_table, render_monthly_table, write_hourly_csv, write_hourly_json,
};
use stillbench::climate::{ClimateSource, Plane, SiteLocation, SkyModel, site_weather};

/// Arguments of `stillbench climate`.
#[derive(Debug, Args)]
#[command(after_help = "Examples:
  stillbench climate designs/demo-coast.toml
      monthly table: irradiation on the horizontal and on every cover plane, temperatures, wind
  stillbench climate designs/demo-coast.toml --format csv --out coast-hourly.csv
      also write every hour of the average days (or of the weather file) as CSV")]
pub struct ClimateArgs {
    /// The design file (TOML). Without it, the built-in demo design.
    pub design: Option<PathBuf>,
    /// Export the hourly series in this format (to standard output, or to --out).
    #[arg(long, value_enum)]
    pub format: Option<ExportFormat>,
    /// Write the hourly export to this file (atomically) instead of standard output.
    #[arg(long, requires = "format")]
    pub out: Option<PathBuf>,
    /// Replace an existing --out file.
    #[arg(long)]
    pub force: bool,
}

/// Run `stillbench climate`: read the design, resolve its site, print and export.
pub fn run(args: &ClimateArgs) -> anyhow::Result<()> {
    let loaded = super::load(args.design.as_deref())?;
    let design = &loaded.design;
    let inputs = ClimateInputs {
        site: design.site.location(),
        source: design.site.climate_source(),
        planes: design
            .variants
            .iter()
            .flat_map(|v| v.cover_planes())
            .collect(),
        sky_model: SkyModel::default(),
    };
    let stdout = std::io::stdout();
    let stderr = std::io::stderr();
    run_with(args, &inputs, &mut stdout.lock(), &mut stderr.lock())
}

/// Hourly export formats.
#[derive(Debug, Clone, Copy, PartialEq, Eq, ValueEnum)]
pub enum ExportFormat {
    /// Comma-separated values, one row per record.
    Csv,
    /// A JSON array of records.
    Json,
}

/// What the design says about the site's climate, resolved into library types.
#[derive(Debug, Clone)]
pub struct ClimateInputs {
    /// The site.
    pub site: SiteLocation,
    /// Monthly means or a weather file.
    pub source: ClimateSource,
    /// Each variant's cover planes, named for the table's columns.
    pub planes: Vec<(String, Plane)>,
    /// Sky model for the transposition.
    pub sky_model: SkyModel,
}

/// Print the monthly table (and warnings) to `out`, and the hourly export where asked.
pub fn run_with(
    args: &ClimateArgs,
    inputs: &ClimateInputs,
    out: &mut impl Write,
    err: &mut impl Write,
) -> anyhow::Result<()> {
    let weather = site_weather(&inputs.site, &inputs.source).map_err(stillbench::Error::from)?;
    for w in &weather.warnings {
        writeln!(err, "warning: {w}")?;
    }
    let planes: Vec<Plane> = inputs.planes.iter().map(|(_, p)| *p).collect();
    let names: Vec<String> = inputs.planes.iter().map(|(n, _)| n.clone()).collect();
    let rows = monthly_table(&weather.series, &planes, inputs.sky_model);
    let Some(format) = args.format else {
        render_monthly_table(out, &rows, &names)?;
        return Ok(());
    };
    let write_export = |w: &mut dyn Write| -> std::io::Result<()> {
        match format {
            ExportFormat::Csv => {
                write_hourly_csv(w, &weather.series, &inputs.planes, inputs.sky_model)
            }
            ExportFormat::Json => write_hourly_json(w, &weather.series),
        }
    };
    match &args.out {
        Some(path) => {
            render_monthly_table(out, &rows, &names)?;
            stillbench::output::write_atomic(path, args.force, write_export)?;
            writeln!(err, "wrote {}", path.display())?;
        }
        None => {
            write_export(out)?;
            out.flush()?;
        }
    }
    Ok(())
}
