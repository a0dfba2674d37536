//! `stillbench sweep DESIGN --variant NAME --param FIELD=FROM..TO[:STEP] [--param …]
//! [--target annual|worst-month] [--format text|json|csv]`: a parametric study of one or two
//! numeric fields of one variant, and the point best for the target.

use std::path::PathBuf;

use stillbench::compare::sweep::{self, BadSpec, ParamSpec, SweepError, Target};
use stillbench::design::{DesignErrors, DesignIssue};
use stillbench::stills::RunOptions;

use super::export::{ExportArgs, Plan};
use stillbench::compare::render;

/// Output formats.
#[derive(Debug, Clone, Copy, PartialEq, Eq, clap::ValueEnum)]
pub enum Format {
    /// A table of points (and a grid for two fields) and the best point.
    Text,
    /// JSON: the axes, every point, the best point and edge notes.
    Json,
    /// CSV: one row per point.
    Csv,
}

/// The target, as typed.
#[derive(Debug, Clone, Copy, PartialEq, Eq, clap::ValueEnum)]
pub enum TargetArg {
    /// Annual distillate per m² of footprint.
    Annual,
    /// Mean daily distillate per m² in the worst month.
    WorstMonth,
}

/// Arguments of `sweep`.
#[derive(Debug, clap::Args)]
#[command(
    after_help = "FIELD is a numeric field of the variant as written in the design \
    file; list positions count from 1, e.g. base_insulation[1].thickness_mm or \
    operation.band_mm. Without :STEP, 11 equally spaced values. At most 200 points in all.\n\n\
    Examples:\n  \
    stillbench sweep designs/demo-highland-south.toml --variant north-basin \
    --param cover_tilt_deg=10..70:5 --target worst-month\n  \
    stillbench sweep designs/demo-highland-south.toml --variant north-basin \
    --param cover_tilt_deg=20..60:10 --param brine_depth_mm=10..50:10 --format csv"
)]
pub struct SweepArgs {
    /// The design file (TOML).
    pub design: PathBuf,
    /// The variant to study (its `name`).
    #[arg(long, value_name = "NAME")]
    pub variant: String,
    /// A field and its range, FIELD=FROM..TO[:STEP]; give it twice for a grid.
    #[arg(long = "param", value_name = "FIELD=FROM..TO[:STEP]", required = true)]
    pub params: Vec<String>,
    /// What to maximise.
    #[arg(long, value_enum, default_value_t = TargetArg::Annual)]
    pub target: TargetArg,
    /// Output format.
    #[arg(long, value_enum, default_value_t = Format::Text)]
    pub format: Format,
    /// Where the output goes (`--out`, `--force`); CSV has one table, `points`.
    #[command(flatten)]
    pub export: ExportArgs,
}

fn bad_param(file: &std::path::Path, b: &BadSpec) -> anyhow::Error {
    stillbench::Error::Design(DesignErrors(vec![DesignIssue {
        file: file.to_path_buf(),
        line_col: None,
        path: "--param".into(),
        message: b.to_string(),
    }]))
    .into()
}

/// Run `sweep`.
pub fn run(args: &SweepArgs) -> anyhow::Result<()> {
    let file = &args.design;
    let whole = |message: String| -> anyhow::Error {
        stillbench::Error::Design(DesignErrors(vec![DesignIssue {
            file: file.clone(),
            line_col: None,
            path: String::new(),
            message,
        }]))
        .into()
    };
    let plan = args
        .export
        .plan(file, args.format == Format::Csv, &render::SWEEP_TABLES)?;
    if plan == Plan::Listed {
        return Ok(());
    }
    let mut specs = Vec::with_capacity(args.params.len());
    for p in &args.params {
        specs.push(p.parse::<ParamSpec>().map_err(|b| bad_param(file, &b))?);
    }
    let bytes =
        std::fs::read(file).map_err(|e| whole(format!("cannot read the design file: {e}")))?;
    let text = String::from_utf8(bytes)
        .map_err(|e| whole(format!("the design file is not UTF-8 text: {e}")))?;
    let base = file.parent().unwrap_or(std::path::Path::new("."));
    let target = match args.target {
        TargetArg::Annual => Target::Annual,
        TargetArg::WorstMonth => Target::WorstMonth,
    };
    let res = match sweep::sweep(
        &text,
        file,
        base,
        &args.variant,
        &specs,
        target,
        &RunOptions::default(),
    ) {
        Ok(r) => r,
        Err(SweepError::Spec(b)) => return Err(bad_param(file, &b)),
        Err(SweepError::Run(e)) => return Err(e.into()),
    };
    let mut buf = Vec::new();
    match args.format {
        Format::Text => render::write_sweep_text(&mut buf, &res)?,
        Format::Json => stillbench::output::write_document(&mut buf, &res)?,
        Format::Csv => {}
    }
    if args.format == Format::Csv {
        args.export
            .write_tables(&plan, &[render::sweep_table(&res)])?;
    } else {
        args.export.write_document(&buf)?;
    }
    if res.best.is_none() {
        let reason = res
            .points
            .iter()
            .find_map(|p| p.failed.clone())
            .unwrap_or_default();
        return Err(stillbench::Error::Model {
            variant: res.variant.clone(),
            at: String::new(),
            reason: format!("no sweep point could be simulated trustworthily: {reason}"),
        }
        .into());
    }
    Ok(())
}
