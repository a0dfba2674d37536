//! `stillbench check [DESIGN]`: validate a design file and summarise what it describes.

use std::path::PathBuf;

use anyhow::Context;
use stillbench::design::{self, LoadedDesign};

/// Arguments of `check`.
#[derive(Debug, clap::Args)]
pub struct CheckArgs {
    /// The design file (TOML). Without it, the built-in demo design is checked.
    pub design: Option<PathBuf>,
}

/// Run `check`: load and validate the design, build its weather and every variant's model as
/// a run would (so that `check` rejects what a run rejects), print its summary and any
/// warnings.
pub fn run(args: &CheckArgs) -> anyhow::Result<()> {
    let loaded: LoadedDesign = match &args.design {
        Some(path) => design::load_design(path),
        None => design::load_demo(),
    }
    .map_err(stillbench::Error::Design)?;
    stillbench::stills::preflight(&loaded)?;
    let mut out = std::io::stdout().lock();
    design::write_summary(&mut out, &loaded).context("writing the summary")?;
    Ok(())
}
