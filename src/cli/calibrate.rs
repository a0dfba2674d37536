//! `stillbench calibrate DESIGN --variant NAME --measured FILE`: fit calibration factors of
//! one variant to a pilot still's measured record and write them into a new design file.

use std::path::{Path, PathBuf};

use anyhow::Context;
use stillbench::calibrate::{self, FitParam, FitSettings};
use stillbench::design::MeasuredColumns;

/// Output format.
#[derive(Debug, Clone, Copy, PartialEq, Eq, clap::ValueEnum)]
pub enum Format {
    /// Plain text.
    Text,
    /// The full report as JSON.
    Json,
}

/// Arguments of `calibrate`.
#[derive(Debug, clap::Args)]
pub struct CalibrateArgs {
    /// The design file (TOML).
    pub design: PathBuf,
    /// The variant to calibrate.
    #[arg(long)]
    pub variant: String,
    /// The pilot still's measured CSV file (columns mapped by
    /// `[variant.calibration.measured]`).
    #[arg(long)]
    pub measured: PathBuf,
    /// Parameters to fit, comma-separated (default: distillate_factor,
    /// cover_transmittance_factor, cover_emissivity, base_loss_factor).
    #[arg(long, value_delimiter = ',')]
    pub fit: Vec<String>,
    /// Write the design with the fitted factors here (never over an existing file without
    /// `--force`). The charts go beside it as `<name>.parity.svg` and `<name>.series.svg`.
    #[arg(long)]
    pub out: Option<PathBuf>,
    /// Overwrite existing output files, and write the fit even when a parameter ended at a
    /// bound or the data cannot tell the parameters apart (refused otherwise, exit 3).
    #[arg(long)]
    pub force: bool,
    /// Output format.
    #[arg(long, value_enum, default_value_t = Format::Text)]
    pub format: Format,
}

fn beside(out: &Path, suffix: &str) -> PathBuf {
    let stem = out.file_stem().map_or_else(
        || "calibrated".to_owned(),
        |s| s.to_string_lossy().into_owned(),
    );
    out.with_file_name(format!("{stem}.{suffix}"))
}

/// Run `calibrate`.
pub fn run(args: &CalibrateArgs) -> anyhow::Result<()> {
    let loaded = super::load(Some(&args.design))?;
    let mut params = Vec::new();
    for name in &args.fit {
        let p = FitParam::parse(name).ok_or_else(|| {
            stillbench::Error::Design(stillbench::design::DesignErrors(vec![
                stillbench::design::DesignIssue {
                    file: PathBuf::from("--fit"),
                    line_col: None,
                    path: "fit".into(),
                    message: format!(
                        "unknown parameter `{name}`; choose from {}",
                        FitParam::ALL.map(FitParam::name).join(", ")
                    ),
                },
            ]))
        })?;
        params.push(p);
    }
    if params.is_empty() {
        params = FitParam::ALL.to_vec();
    }
    let variant = loaded
        .design
        .variants
        .iter()
        .find(|v| v.name == args.variant)
        .ok_or_else(|| {
            stillbench::Error::Design(stillbench::design::DesignErrors(vec![
                stillbench::design::DesignIssue {
                    file: args.design.clone(),
                    line_col: None,
                    path: "--variant".into(),
                    message: format!(
                        "no variant named `{}`; the design has: {}",
                        args.variant,
                        loaded
                            .design
                            .variants
                            .iter()
                            .map(|v| v.name.as_str())
                            .collect::<Vec<_>>()
                            .join(", ")
                    ),
                },
            ]))
        })?;
    let columns = variant
        .calibration
        .as_ref()
        .and_then(|c| c.measured.clone())
        .unwrap_or_else(MeasuredColumns::default);
    let plane = variant
        .cover_planes()
        .first()
        .map(|(_, p)| *p)
        .context("the variant has no cover plane")?;
    let footprint = variant.width_m * variant.length_m;
    let measured = calibrate::load_measured(
        &args.measured,
        &columns,
        &loaded.design.site.location(),
        plane,
        footprint,
    )?;
    let settings = FitSettings {
        params,
        ..FitSettings::default()
    };
    let report = calibrate::calibrate(&loaded, &args.variant, &measured, &settings)?;
    let refuse = args.out.is_some() && !report.unfit.is_empty() && !args.force;
    if refuse {
        print_report(args, &report, None)?;
        return Err(stillbench::Error::Model {
            variant: args.variant.clone(),
            at: String::new(),
            reason: format!(
                "the fit is not written: {} (pass --force to write it anyway)",
                report.unfit.join("; ")
            ),
        }
        .into());
    }
    if let Some(out) = &args.out {
        for u in &report.unfit {
            eprintln!("warning: written with --force although {u}");
        }
        if out.canonicalize().ok() == args.design.canonicalize().ok() && !args.force {
            return Err(stillbench::Error::Refused {
                path: out.display().to_string(),
                reason: "it is the original design; pass --force to overwrite it".into(),
            }
            .into());
        }
        let from = args
            .measured
            .file_name()
            .map_or_else(String::new, |s| s.to_string_lossy().into_owned());
        let on = chrono::Utc::now().date_naive().to_string();
        calibrate::write_calibrated_design(&args.design, out, &report, &from, &on, args.force)?;
        let parity = calibrate::report::parity_svg(&report);
        let series = calibrate::report::series_svg(&report);
        stillbench::output::write_atomic(&beside(out, "parity.svg"), args.force, |w| {
            w.write_all(parity.as_bytes())
        })?;
        stillbench::output::write_atomic(&beside(out, "series.svg"), args.force, |w| {
            w.write_all(series.as_bytes())
        })?;
    }
    print_report(args, &report, args.out.as_deref())
}

/// Print the calibration report; `written` is the design file written, if any.
fn print_report(
    args: &CalibrateArgs,
    report: &calibrate::CalibrationReport,
    written: Option<&Path>,
) -> anyhow::Result<()> {
    use std::io::Write;
    let mut stdout = std::io::stdout().lock();
    match args.format {
        Format::Text => {
            calibrate::report::write_text(report, &mut stdout).context("writing the report")?;
            if let Some(out) = written {
                writeln!(
                    stdout,
                    "\nWrote {} (and {}, {})",
                    out.display(),
                    beside(out, "parity.svg").display(),
                    beside(out, "series.svg").display()
                )?;
            }
        }
        Format::Json => {
            serde_json::to_writer_pretty(&mut stdout, report).context("writing JSON")?;
            writeln!(stdout)?;
        }
    }
    Ok(())
}
