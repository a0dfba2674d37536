//! `stillbench size [DESIGN] --demand L_PER_DAY | --people N [--litres-per-person L]
//! [--confidence 0.9] [--years N] [--seed S] [--full] [--format text|json|csv]`: how many units of each
//! variant meet a daily demand in the worst month, in at least the confidence fraction of
//! stochastic weather years; their capital, land (rows spaced against noon shading), storage
//! for runs of low-output days, and the rain the covers would catch.

use std::path::PathBuf;

use stillbench::compare::size::{
    self, DEFAULT_CONFIDENCE, DEFAULT_YEARS, SizeMethod, SizeOptions, SizeReport,
};

use super::demand::DemandArgs;
use super::export::{ExportArgs, Plan};
use stillbench::compare::render;
use stillbench::stills;

/// Output formats.
#[derive(Debug, Clone, Copy, PartialEq, Eq, clap::ValueEnum)]
pub enum Format {
    /// A readable table per variant, rain apart, and the method.
    Text,
    /// JSON: the options and every figure per variant.
    Json,
    /// CSV: one table — `sized` (a row per sized variant, the default) or `rain` (a row per
    /// variant and month; `--table`).
    Csv,
}

/// Arguments of `size`.
#[derive(Debug, clap::Args)]
#[command(after_help = "Method:\n  \
    Each variant's output over --years stochastic weather years (seeded) comes from its daily\n  \
    response model (fitted from average-day simulations, validated within 3 % on monthly\n  \
    means against full simulation); --full simulates every year hour by hour instead.\n  \
    Units: in each year, ceil(demand / worst-month mean L/day of one unit); the array is the\n  \
    ceil(confidence x years)-th smallest, so at least that fraction of years is met.\n  \
    Land: rows face the equator, spaced so no row shades the next at solar noon on the\n  \
    worst month's average day: gap = row height / tan(noon sun elevation).\n  \
    Storage: a low-output day makes less than the demand; the tank carries the deficit that\n  \
    builds over runs of such days (sequent-peak), taken at the same confidence over years.\n  \
    Rain caught by the covers is shown apart and never added to the distillate.\n  \
    Parameter and model-form uncertainty: see `stillbench uncertainty`.\n\n\
    Per-person figures (Sphere Handbook 2018, water-supply standard 2.1; from memory):\n  \
    drinking only 3 L/person/day (the default), drinking and cooking 6 L/person/day.\n\n\
    Examples:\n  stillbench size designs/demo-coast.toml --demand 200\n  \
    stillbench size designs/demo-coast.toml --people 120 --litres-per-person 6 --format json")]
pub struct SizeArgs {
    /// The design file (TOML). Without it, the built-in demo design.
    pub design: Option<PathBuf>,
    /// The demand to size for.
    #[command(flatten)]
    pub need: DemandArgs,
    /// Fraction of years in which the demand must be met, strictly between 0 and 1.
    #[arg(long, default_value_t = DEFAULT_CONFIDENCE, allow_negative_numbers = true)]
    pub confidence: f64,
    /// Stochastic weather years simulated per variant.
    #[arg(long, default_value_t = DEFAULT_YEARS)]
    pub years: u32,
    /// Seed of the weather generator (the same seed gives the same figures).
    #[arg(long, default_value_t = 1)]
    pub seed: u64,
    /// Simulate every stochastic year hour by hour instead of using the validated daily
    /// response model (slower: tens of seconds on the demo).
    #[arg(long)]
    pub full: bool,
    /// Output format.
    #[arg(long, value_enum, default_value_t = Format::Text)]
    pub format: Format,
    /// Where the output goes, and which CSV table.
    #[command(flatten)]
    pub export: ExportArgs,
}

/// The demand [L/day] and a sentence saying where it came from: the report's resolution,
/// so that `size` and `report` take the same options within the design file's limits.
fn resolve_demand(
    args: &SizeArgs,
    loaded: &stillbench::design::LoadedDesign,
) -> anyhow::Result<(f64, String)> {
    let (total, _, _, from) = stillbench::report::resolve_demand(loaded, args.need.choice())?;
    Ok((total, format!("{total} L/day ({from})")))
}

/// Run `size`.
pub fn run(args: &SizeArgs) -> anyhow::Result<()> {
    let loaded = super::load(args.design.as_deref())?;
    let (demand_l_day, demand_note) = resolve_demand(args, &loaded)?;
    let plan = args.export.plan(
        &loaded.source,
        args.format == Format::Csv,
        &render::SIZE_TABLES,
    )?;
    if plan == Plan::Listed {
        return Ok(());
    }
    let opts = SizeOptions {
        demand_l_day,
        confidence: args.confidence,
        years: args.years,
        seed: args.seed,
    };
    let method = if args.full {
        SizeMethod::Full
    } else {
        SizeMethod::Response
    };
    let rep = size::size_design_by(&loaded, &opts, &stills::RunOptions::default(), method)?;
    for s in &rep.skipped {
        eprintln!("note: `{}` is not sized: {}", s.name, s.reason);
    }
    let mut buf = Vec::new();
    match args.format {
        Format::Text => {
            render::write_size_text(&mut buf, &loaded.design.project.title, &demand_note, &rep)?;
            stillbench::cautions::write_cautions(&mut buf)?;
        }
        Format::Json => {
            #[derive(serde::Serialize)]
            struct Doc<'a> {
                design: &'a str,
                demand: &'a str,
                #[serde(flatten)]
                report: &'a SizeReport,
            }
            stillbench::output::write_document(
                &mut buf,
                &Doc {
                    design: &loaded.design.project.title,
                    demand: &demand_note,
                    report: &rep,
                },
            )?;
        }
        Format::Csv => return args.export.write_tables(&plan, &render::size_tables(&rep)),
    }
    args.export.write_document(&buf)
}
