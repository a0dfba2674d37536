//! Argument structs and command handlers. No physics here: each handler parses, calls the
//! library and prints.

use clap::{Parser, Subcommand};
use stillbench::ExitCode;

mod audit;
mod calibrate;
mod check;
mod climate;
mod compare;
mod cost;
mod demand;
mod export;
mod operate;
mod report;
mod simulate;
mod size;
mod sweep;
mod uncertainty;

/// Design, simulate and compare solar water stills for one site and the materials a local
/// workshop can get.
///
/// A design file (TOML) describes the site and its climate, the local materials and prices,
/// and one or more still variants (docs/design-file.md).
///
/// Exit codes: 0 success; 2 bad input (file, field or value — the message names them);
/// 3 the model could not give a trustworthy result for a valid design; 1 internal error.
#[derive(Debug, Parser)]
#[command(
    name = "stillbench",
    version,
    about,
    long_about,
    after_help = "A typical session:
  stillbench check designs/demo-coast.toml     is the file right? what does it describe?
  stillbench climate designs/demo-coast.toml   the sunlight and temperatures behind the yield
  stillbench compare designs/demo-coast.toml   which variant to build, and why
  stillbench cost designs/demo-coast.toml --variant glass-basin
                                               what to buy, cut and build, and what it costs
  stillbench operate designs/demo-coast.toml   how to feed and flush it"
)]
pub struct Cli {
    #[command(subcommand)]
    command: Command,
}

#[derive(Debug, Subcommand)]
enum Command {
    /// Validate a design file and summarise what it describes.
    Check(check::CheckArgs),
    /// Show the site's climate month by month and export hourly weather on every cover plane.
    Climate(climate::ClimateArgs),
    /// Predict each variant's distillate month by month from a physical heat-and-mass
    /// model (with no design, the built-in demo).
    Simulate(simulate::SimulateArgs),
    /// Bill of materials, cut list, build complexity and cost per litre of each variant.
    Cost(cost::CostArgs),
    /// Feed, brine depth, salinity and flushing of each basin still over the day, and a
    /// depth study (`--depth-sweep 5..100`).
    Operate(operate::OperateArgs),
    /// Rank the variants on yield, worst month, cost per litre, capital per L/day and build
    /// complexity with your weights; Pareto front and a sentence per variant.
    Compare(compare::CompareArgs),
    /// Check a claimed yield against the site's sunlight: impossible, implausible or
    /// plausible, with the reasoning.
    Audit(audit::AuditArgs),
    /// Step one or two numeric fields of a variant over a range and find the value best for
    /// the year or for the worst month.
    Sweep(sweep::SweepArgs),
    /// How many units of each variant meet a daily demand in the worst month, in most
    /// stochastic weather years; capital, land, storage, and rain the covers would catch.
    Size(size::SizeArgs),
    /// P10/P50/P90 of each variant's annual and worst-month yield over stochastic weather,
    /// uncertain parameters and model error; parameter table and sensitivity ranking
    Uncertainty(uncertainty::UncertaintyArgs),
    /// Fit a variant's calibration factors to a pilot still's measured record (confidence
    /// intervals, goodness of fit, charts) and write them into a new design file.
    Calibrate(calibrate::CalibrateArgs),
    /// Write the report: Markdown, a self-contained HTML page with charts, and every table as
    /// CSV and JSON, for a funder and a workshop.
    Report(report::ReportArgs),
    /// Print a shell completion script (bash, zsh, fish, powershell, elvish) to standard
    /// output.
    #[command(after_help = "Examples:
  stillbench completions bash > ~/.local/share/bash-completion/completions/stillbench
  stillbench completions zsh > ~/.zfunc/_stillbench      (with fpath+=~/.zfunc in .zshrc)
  stillbench completions fish > ~/.config/fish/completions/stillbench.fish
  stillbench completions powershell >> $PROFILE")]
    Completions {
        /// The shell.
        shell: clap_complete::Shell,
    },
    /// Print the manual page (roff, section 1) to standard output: stillbench's, or one
    /// command's (`stillbench-simulate(1)`, with every option).
    #[command(after_help = "Examples:
  stillbench man > stillbench.1 && man ./stillbench.1
  stillbench man simulate > stillbench-simulate.1
  stillbench man | gzip > /usr/local/share/man/man1/stillbench.1.gz")]
    Man {
        /// The command whose page to print (without it, the overview page).
        command: Option<String>,
    },
}

/// Parse, run, print errors, return the exit code.
pub fn main() -> std::process::ExitCode {
    let cli = Cli::parse();
    let result = match cli.command {
        Command::Check(args) => check::run(&args),
        Command::Climate(args) => climate::run(&args),
        Command::Simulate(args) => simulate::run(&args),
        Command::Cost(args) => cost::run(&args),
        Command::Operate(args) => operate::run(&args),
        Command::Compare(args) => compare::run(&args),
        Command::Audit(args) => audit::run(&args),
        Command::Sweep(args) => sweep::run(&args),
        Command::Size(args) => size::run(&args),
        Command::Uncertainty(args) => uncertainty::run(&args),
        Command::Calibrate(args) => calibrate::run(&args),
        Command::Report(args) => report::run(&args),
        Command::Completions { shell } => completions(shell),
        Command::Man { command } => man_page(command.as_deref()),
    };
    match result {
        Ok(()) => std::process::ExitCode::from(ExitCode::Success as u8),
        Err(err) if is_broken_pipe(&err) => {
            // The reader went away (e.g. `| head`): not an error of ours.
            std::process::ExitCode::from(ExitCode::Success as u8)
        }
        Err(err) => {
            let code = exit_code_of(&err);
            eprintln!("error: {err:#}");
            std::process::ExitCode::from(code as u8)
        }
    }
}

/// Write the completion script for `shell`, from the same definitions as `--help`.
fn completions(shell: clap_complete::Shell) -> anyhow::Result<()> {
    use clap::CommandFactory;
    let mut out = Vec::new();
    clap_complete::generate(shell, &mut Cli::command(), "stillbench", &mut out);
    write_stdout(&out)
}

/// Write the man page (roff) of stillbench or of one of its commands, from the same
/// definitions as `--help`.
fn man_page(command: Option<&str>) -> anyhow::Result<()> {
    use clap::CommandFactory;
    let cli = Cli::command();
    let page = match command {
        None => cli,
        Some(name) => {
            let names: Vec<String> = cli
                .get_subcommands()
                .map(|c| c.get_name().to_owned())
                .collect();
            let Some(sub) = cli.find_subcommand(name) else {
                return Err(
                    stillbench::Error::Design(stillbench::design::DesignErrors(vec![
                        stillbench::design::DesignIssue {
                            file: std::path::PathBuf::from("(command line)"),
                            line_col: None,
                            path: "man COMMAND".into(),
                            message: format!(
                                "no command named `{name}`; the commands are: {}",
                                names.join(", ")
                            ),
                        },
                    ]))
                    .into(),
                );
            };
            sub.clone()
                .display_name(format!("stillbench-{name}"))
                .bin_name(format!("stillbench {name}"))
                .version(stillbench::VERSION)
        }
    };
    let mut out = Vec::new();
    clap_mangen::Man::new(page).render(&mut out)?;
    write_stdout(&out)
}

fn write_stdout(bytes: &[u8]) -> anyhow::Result<()> {
    use std::io::Write;
    let mut out = std::io::stdout().lock();
    out.write_all(bytes)?;
    out.flush()?;
    Ok(())
}

/// Load a design file (or the built-in demo when `path` is `None`) and print its warnings.
fn load(path: Option<&std::path::Path>) -> anyhow::Result<stillbench::design::LoadedDesign> {
    let loaded = match path {
        Some(p) => stillbench::design::load_design(p),
        None => stillbench::design::load_demo(),
    }
    .map_err(stillbench::Error::Design)?;
    for w in &loaded.warnings {
        eprintln!("warning: {w}");
    }
    Ok(loaded)
}

/// Whether the error is standard output closing under us.
fn is_broken_pipe(err: &anyhow::Error) -> bool {
    err.chain().any(|e| {
        e.downcast_ref::<std::io::Error>()
            .is_some_and(|io| io.kind() == std::io::ErrorKind::BrokenPipe)
    })
}

/// The exit code of an error chain: a library error decides; anything else is internal.
fn exit_code_of(err: &anyhow::Error) -> ExitCode {
    err.chain()
        .find_map(|e| e.downcast_ref::<stillbench::Error>())
        .map(stillbench::Error::exit_code)
        .unwrap_or(ExitCode::Internal)
}
