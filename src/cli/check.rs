//! `stillbench check DESIGN` (being written).

use std::path::PathBuf;

/// Arguments of `check`.
#[derive(Debug, clap::Args)]
pub struct CheckArgs {
    /// The design file (TOML).
    pub design: PathBuf,
}

/// Run `check`.
pub fn run(_args: &CheckArgs) -> anyhow::Result<()> {
    Ok(())
}
