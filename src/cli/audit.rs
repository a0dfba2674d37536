//! `stillbench audit --site DESIGN --kind KIND --area M2 --litres-per-day L [--month M]
//! [--stages N] [--format text|json]`: the efficiency a claimed yield implies on a site, and
//! whether the claim is impossible, implausible or plausible.

use std::io::Write;
use std::path::PathBuf;

use anyhow::Context;
use clap::builder::PossibleValuesParser;
use stillbench::compare::{self, AuditError, Claim, ClaimField};
use stillbench::design::{DesignErrors, DesignIssue, KIND_NAMES};
use stillbench::stills;

/// Output formats.
#[derive(Debug, Clone, Copy, PartialEq, Eq, clap::ValueEnum)]
pub enum Format {
    /// The verdict and its reasoning.
    Text,
    /// JSON with every figure.
    Json,
}

/// Arguments of `audit`.
#[derive(Debug, clap::Args)]
#[command(
    after_help = "Classes: impossible — above the single-effect ceiling (sunlight entering \
    through the cover ÷ latent heat), or for a multi-effect still that ceiling × the gain output \
    ratio our model reaches with the stated stages; implausible — above 60 % of the ceiling \
    (well-built basins reach 25–45 %); plausible — otherwise.\n\n\
    Examples:\n  stillbench audit --site designs/demo-coast.toml --kind single-slope --area 2 \
    --litres-per-day 16\n  \
    stillbench audit --site designs/demo-coast.toml --kind multi-effect --stages 6 --area 1 \
    --litres-per-day 12 --month 12"
)]
pub struct AuditArgs {
    /// Design file whose site (climate) the claim is judged on, and whose first variant of the
    /// kind gives the cover. Without it, the built-in demo site.
    #[arg(long, value_name = "DESIGN")]
    pub site: Option<PathBuf>,
    /// Kind of still claimed.
    #[arg(long, value_parser = PossibleValuesParser::new(KIND_NAMES))]
    pub kind: String,
    /// Footprint the claim is for [m²].
    #[arg(long, value_name = "M2")]
    pub area: f64,
    /// Claimed distillate [L/day].
    #[arg(long, value_name = "L")]
    pub litres_per_day: f64,
    /// Month the claim is for (1–12); without it, the mean day of the year.
    #[arg(long, value_name = "M")]
    pub month: Option<u32>,
    /// Stages of a multi-effect still (default: the design's first multi-effect variant's).
    #[arg(long, value_name = "N")]
    pub stages: Option<u32>,
    /// Output format.
    #[arg(long, value_enum, default_value_t = Format::Text)]
    pub format: Format,
}

fn option_of(field: ClaimField) -> &'static str {
    match field {
        ClaimField::Kind => "--kind",
        ClaimField::Area => "--area",
        ClaimField::LitresPerDay => "--litres-per-day",
        ClaimField::Month => "--month",
        ClaimField::Stages => "--stages",
    }
}

/// Run `audit`.
pub fn run(args: &AuditArgs) -> anyhow::Result<()> {
    let loaded = super::load(args.site.as_deref())?;
    let weather = stills::site_weather(&loaded)?;
    let claim = Claim {
        kind: args.kind.clone(),
        area_m2: args.area,
        litres_per_day: args.litres_per_day,
        month: args.month,
        stages: args.stages,
    };
    let a = match compare::audit(&loaded, &weather, &claim, &stills::RunOptions::default()) {
        Ok(a) => a,
        Err(AuditError::BadClaim { field, message }) => {
            return Err(stillbench::Error::Design(DesignErrors(vec![DesignIssue {
                file: loaded.source.clone(),
                line_col: None,
                path: option_of(field).into(),
                message,
            }]))
            .into());
        }
        Err(AuditError::Run(e)) => return Err(e.into()),
        Err(e) => return Err(anyhow::anyhow!("{e}")),
    };
    let mut out = std::io::stdout().lock();
    match args.format {
        Format::Text => {
            writeln!(
                out,
                "{}: {} ({:.0} % efficiency, {:.0} % of the ceiling)",
                loaded.design.site.name,
                a.verdict.word().to_uppercase(),
                a.implied_efficiency * 100.0,
                a.fraction_of_ceiling * 100.0
            )?;
            for line in &a.reasoning {
                writeln!(out, "  - {line}")?;
            }
        }
        Format::Json => {
            #[derive(serde::Serialize)]
            struct Doc<'a> {
                site: &'a str,
                #[serde(flatten)]
                audit: &'a stillbench::compare::Audit,
            }
            stillbench::output::write_document(
                &mut out,
                &Doc {
                    site: &loaded.design.site.name,
                    audit: &a,
                },
            )
            .context("writing JSON")?;
        }
    }
    Ok(())
}
