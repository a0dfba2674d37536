//! `stillbench check [DESIGN] [--format text|json]`: validate a design file and summarise what
//! it describes; as JSON, the list of problems and warnings for editors and CI.

use std::path::PathBuf;

use anyhow::Context;
use serde::Serialize;
use stillbench::design::{self, DesignIssue, LoadedDesign};

/// Output formats of `check`.
#[derive(Debug, Clone, Copy, PartialEq, Eq, clap::ValueEnum)]
pub enum Format {
    /// The summary of the design (or every problem, on standard error).
    Text,
    /// One JSON document: every problem and warning (file, line, column, field, message,
    /// severity), written also when the design is refused (exit 2).
    Json,
}

/// Arguments of `check`.
#[derive(Debug, clap::Args)]
#[command(after_help = "Examples:
  stillbench check designs/demo-coast.toml
  stillbench check my-site.toml --format json     problems for an editor or CI (exit 2 if any)")]
pub struct CheckArgs {
    /// The design file (TOML). Without it, the built-in demo design is checked.
    pub design: Option<PathBuf>,
    /// Output format.
    #[arg(long, value_enum, default_value_t = Format::Text)]
    pub format: Format,
}

/// One problem or warning, as editors and CI read it.
#[derive(Debug, Serialize)]
struct Problem<'a> {
    /// `error` (the design is refused) or `warning` (allowed, probably not meant).
    severity: &'static str,
    file: String,
    /// 1-based; `null` when the problem has no place in the file (a missing file, say).
    line: Option<usize>,
    column: Option<usize>,
    /// Field path (`variant[2].cover_tilt_deg`), empty for whole-file problems.
    field: &'a str,
    message: &'a str,
}

impl<'a> Problem<'a> {
    fn of(severity: &'static str, i: &'a DesignIssue) -> Self {
        Self {
            severity,
            file: i.file.display().to_string(),
            line: i.line_col.map(|(l, _)| l),
            column: i.line_col.map(|(_, c)| c),
            field: &i.path,
            message: &i.message,
        }
    }
}

#[derive(Debug, Serialize)]
struct Doc<'a> {
    file: String,
    /// Whether a run would accept the design (no `error`).
    valid: bool,
    errors: usize,
    warnings: usize,
    problems: Vec<Problem<'a>>,
}

/// Run `check`: load and validate the design, build its weather and every variant's model as
/// a run would (so that `check` rejects what a run rejects), print its summary and any
/// warnings — or, as JSON, every problem and warning.
pub fn run(args: &CheckArgs) -> anyhow::Result<()> {
    let result = match &args.design {
        Some(path) => design::load_design(path),
        None => design::load_demo(),
    };
    // What a run would find beyond the file itself (the weather, each variant's model).
    let preflight = match &result {
        Ok(loaded) => stillbench::stills::preflight(loaded).err(),
        Err(_) => None,
    };
    let file = args
        .design
        .as_ref()
        .map_or_else(|| "(built-in demo)".to_owned(), |p| p.display().to_string());
    match args.format {
        Format::Text => {
            // The summary lists the warnings itself.
            let loaded: LoadedDesign = result.map_err(stillbench::Error::Design)?;
            if let Some(e) = preflight {
                return Err(e.into());
            }
            let mut out = std::io::stdout().lock();
            design::write_summary(&mut out, &loaded).context("writing the summary")?;
            Ok(())
        }
        Format::Json => {
            // A run's own problems: bad input keeps its places; another error (a model that
            // cannot be built) is one problem on the whole file.
            let run_issues: Vec<DesignIssue> = match &preflight {
                None => Vec::new(),
                Some(stillbench::Error::Design(e)) => e.0.clone(),
                Some(other) => vec![DesignIssue {
                    file: result
                        .as_ref()
                        .map(|l| l.source.clone())
                        .unwrap_or_default(),
                    line_col: None,
                    path: String::new(),
                    message: other.to_string(),
                }],
            };
            let (errors, warnings): (&[DesignIssue], &[DesignIssue]) = match &result {
                Ok(l) => (&run_issues, &l.warnings),
                Err(e) => (&e.0, &[]),
            };
            let problems: Vec<Problem<'_>> = errors
                .iter()
                .map(|i| Problem::of("error", i))
                .chain(warnings.iter().map(|i| Problem::of("warning", i)))
                .collect();
            let doc = Doc {
                file,
                valid: errors.is_empty(),
                errors: errors.len(),
                warnings: warnings.len(),
                problems,
            };
            let mut out = std::io::stdout().lock();
            stillbench::output::write_document(&mut out, &doc).context("writing JSON")?;
            drop(out);
            result
                .map(|_| ())
                .map_err(|e| stillbench::Error::Design(e).into())
        }
    }
}
