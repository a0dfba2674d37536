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
pub struct ClimateArgs {
    /// The design file (TOML).
    pub design: PathBuf,
    /// Export the hourly series in this format.
    #[arg(long, value_enum)]
    pub format: Option<ExportFormat>,
    /// Write the export to this file instead of standard output.
    #[arg(long)]
    pub out: Option<PathBuf>,
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
    let mut sink: Box<dyn Write> = match &args.out {
        Some(path) => {
            render_monthly_table(out, &rows, &names)?;
            let file = std::fs::File::create(path).map_err(|source| stillbench::Error::Io {
                path: path.display().to_string(),
                source,
            })?;
            Box::new(std::io::BufWriter::new(file))
        }
        None => Box::new(&mut *out),
    };
    match format {
        ExportFormat::Csv => {
            write_hourly_csv(&mut sink, &weather.series, &inputs.planes, inputs.sky_model)?
        }
        ExportFormat::Json => write_hourly_json(&mut sink, &weather.series)?,
    }
    sink.flush()?;
    Ok(())
}
