//! `stillbench operate [DESIGN]`: how each basin still is fed and flushed — depth and salinity
//! over the day, feed and flush volumes, dry-out hours, scaling warnings, controller
//! statistics — and the depth study (`--depth-sweep`).

use std::path::PathBuf;

use stillbench::design::{self, LoadedDesign, Variant};
use stillbench::operation::{self, render};
use stillbench::output::table::TableSpec;
use stillbench::stills::{self, RunOptions};

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
    let least = stillbench::design::MIN_BRINE_DEPTH_MM;
    if !(from.is_finite() && to.is_finite() && from >= least && to >= from && to <= 300.0) {
        return Err(format!(
            "{from}..{to} is out of range; allowed {least} <= FROM <= TO <= 300 mm (the design \
             file's range of brine_depth_mm)"
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
    let specs: &[TableSpec] = if ds.is_some() {
        &render::SWEEP_TABLES
    } else {
        &render::TABLES
    };
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
                render::write_sweep_text(&mut buf, title, &studies)?;
                stillbench::cautions::write_cautions(&mut buf)?;
            }
            Format::Json => render::write_sweep_json(&mut buf, title, &studies)?,
            Format::Csv => {
                return args
                    .export
                    .write_tables(&plan, &[render::sweep_table(&studies)]);
            }
        }
    } else {
        let opts = RunOptions {
            hourly: true,
            ..RunOptions::default()
        };
        let mut runs = Vec::new();
        for v in &modelled {
            let r = stills::simulate_variant(&loaded, v, &weather, &opts)?;
            let pm = args.month.unwrap_or_else(|| render::sunniest(&r));
            runs.push((*v, r, pm));
        }
        match args.format {
            Format::Text => {
                render::write_text(&mut buf, title, &runs)?;
                stillbench::cautions::write_cautions(&mut buf)?;
            }
            Format::Json => render::write_json(&mut buf, title, &runs)?,
            Format::Csv => return args.export.write_tables(&plan, &render::tables(&runs)),
        }
    }
    args.export.write_document(&buf)
}
