//! `stillbench compare [DESIGN] [--weights …] [--scales …] [--format text|json|csv]`: run and
//! cost every variant, rank them on fixed reference scales, show the Pareto front and explain
//! each place.

use std::io::Write;
use std::path::PathBuf;

use stillbench::compare::{self, Criterion, DesignEvaluation, Ranked, Scales, Weights};
use stillbench::design::{DesignErrors, DesignIssue};
use stillbench::output::table::{Table, TableChoice, TableSpec, full, text};
use stillbench::stills;

use super::export::{ExportArgs, Plan};

/// Output formats.
#[derive(Debug, Clone, Copy, PartialEq, Eq, clap::ValueEnum)]
pub enum Format {
    /// A readable ranking table, the Pareto front and a sentence per variant.
    Text,
    /// JSON: weights, scales, the ranking with every figure, the front, skipped variants.
    Json,
    /// CSV: one table — `ranking` (a row per ranked variant, the default) or, with
    /// --samples, `uncertainty` (a row per variant; `--table`).
    Csv,
}

fn parse_weights(s: &str) -> Result<Weights, String> {
    s.parse::<Weights>().map_err(|e| e.to_string())
}

/// Arguments of `compare`.
#[derive(Debug, clap::Args)]
#[command(
    after_help = "Criteria and their keys (for --weights and --scales):\n  \
    yield        annual distillate per m² of footprint [L/m²/year], reference 1825\n  \
    worst-month  mean daily distillate per m² in the worst month [L/m²/day], reference 5\n  \
    cost         cost per litre over the life [currency/L], reference 0.10 USD/L\n  \
    capital      capital per L/day of worst-month capacity [currency per L/day], reference 200 USD\n  \
    complexity   build-complexity score [points], reference 200\n\
    A design counting in another currency states its two money references in\n\
    [project.money_scales]: `per_usd` with `rate_date` and `source` (converting the USD\n\
    references above), or `cost_per_litre` and `capital_per_l_day` in its own currency.\n\
    A yield scores 1 at its reference and 0 at nothing; a cost scores 1 at nothing and 0 at its\n\
    reference (linear both ways). The score is the weighted mean, so adding or removing a\n\
    variant never reorders the others.\n\n\
    Examples:\n  stillbench compare designs/demo-coast.toml\n  \
    stillbench compare designs/demo-coast.toml --weights cost=4,complexity=0 --format csv\n  \
    stillbench compare designs/demo-coast.toml --samples 1000 --seed 7   (adds P10/P50/P90)"
)]
pub struct CompareArgs {
    /// The design file (TOML). Without it, the built-in demo design is compared.
    pub design: Option<PathBuf>,
    /// Weights as key=value pairs (yield, worst-month, cost, capital, complexity); unlisted
    /// keys keep their defaults: yield=1,worst-month=2,cost=2,capital=1,complexity=1.
    #[arg(long, value_name = "LIST", value_parser = parse_weights)]
    pub weights: Option<Weights>,
    /// Reference scales as key=value pairs, replacing the design's own (the defaults shown
    /// below, with the money references from `[project.money_scales]`); money in the
    /// design's currency.
    #[arg(long, value_name = "LIST")]
    pub scales: Option<String>,
    /// Monte Carlo samples for P10/P50/P90 of each variant's yield (as `stillbench
    /// uncertainty`, same figures for the same seed); 0 = off (the default, so `compare`
    /// stays a fraction of a second).
    #[arg(long, value_name = "N", default_value_t = 0)]
    pub samples: u32,
    /// Seed of the Monte Carlo (with --samples).
    #[arg(long, value_name = "S", default_value_t = 1)]
    pub seed: u64,
    /// Output format.
    #[arg(long, value_enum, default_value_t = Format::Text)]
    pub format: Format,
    /// Where the output goes, and which CSV table.
    #[command(flatten)]
    pub export: ExportArgs,
}

/// The CSV tables of `compare`.
pub const TABLES: [TableSpec; 2] = [
    TableSpec {
        name: "ranking",
        about: "one row per ranked variant: score, the five criteria, Pareto front, explanation",
    },
    TableSpec {
        name: "uncertainty",
        about: "one row per variant: P10/P50/P90 of the yield (with --samples)",
    },
];

fn bad_option(file: &std::path::Path, option: &str, message: String) -> anyhow::Error {
    stillbench::Error::Design(DesignErrors(vec![DesignIssue {
        file: file.to_path_buf(),
        line_col: None,
        path: option.into(),
        message,
    }]))
    .into()
}

/// The reference scales for a design: its own (`Scales::for_project`: the defaults, with the
/// money references from `[project.money_scales]`, which validation requires of a design in
/// another currency), then the `--scales` overrides; with the sentence saying where the
/// money references come from.
fn scales_for(
    file: &std::path::Path,
    given: Option<&str>,
    project: &stillbench::design::Project,
) -> anyhow::Result<(Scales, String)> {
    let base = Scales::for_project(project)
        .map_err(|e| bad_option(file, "project.money_scales", e.to_string()))?;
    let mut basis = base.money_basis(project);
    let Some(g) = given else {
        return Ok((base, basis));
    };
    let scales = base
        .with_overrides(g)
        .map_err(|e| bad_option(file, "--scales", e.to_string()))?;
    for c in [Criterion::CostPerLitre, Criterion::CapitalPerCapacity] {
        let (was, now) = (base.reference[c.index()], scales.reference[c.index()]);
        if was != now {
            basis.push_str(&format!(
                " For this run `--scales` replaces the {} reference by {}.",
                c.label(),
                compare::rank::figure(c, now, &scales.currency)
            ));
        }
    }
    Ok((scales, basis))
}

/// Everything the command prints.
#[derive(Debug, serde::Serialize)]
pub struct Report {
    /// Design title.
    pub design: String,
    /// Currency of every money figure.
    pub currency: String,
    /// Criterion keys in the order of every array below.
    pub criteria: Vec<&'static str>,
    /// Weights by criterion.
    pub weights: [f64; 5],
    /// Reference scales by criterion.
    pub scales: [f64; 5],
    /// Where the two money references come from (`[project.money_scales]` or the built-in USD
    /// references), and what `--scales` replaced.
    pub money_basis: String,
    /// Best first.
    pub ranking: Vec<Ranked>,
    /// Names on the Pareto front, best rank first.
    pub pareto_front: Vec<String>,
    /// Variants left out, with why.
    pub skipped: Vec<compare::Skipped>,
    /// Monte Carlo percentiles, when `--samples` is above 0.
    #[serde(skip_serializing_if = "Option::is_none")]
    pub uncertainty: Option<stillbench::compare::UncertaintyReport>,
}

/// Build the report from an evaluation.
pub fn report(
    title: &str,
    ev: &DesignEvaluation,
    weights: &Weights,
    scales: &Scales,
    money_basis: String,
) -> anyhow::Result<Report> {
    let ranking = compare::rank(&ev.candidates(), weights, scales)
        .map_err(|e| anyhow::anyhow!("ranking: {e}"))?;
    let pareto_front = ranking
        .iter()
        .filter(|r| r.pareto)
        .map(|r| r.name.clone())
        .collect();
    Ok(Report {
        design: title.to_owned(),
        currency: ev.currency.clone(),
        criteria: Criterion::ALL.iter().map(|c| c.key()).collect(),
        weights: weights.0,
        scales: scales.reference,
        money_basis,
        ranking,
        pareto_front,
        skipped: ev.skipped.clone(),
        uncertainty: None,
    })
}

/// Run `compare`.
pub fn run(args: &CompareArgs) -> anyhow::Result<()> {
    let loaded = super::load(args.design.as_deref())?;
    let plan = args
        .export
        .plan(&loaded.source, args.format == Format::Csv, &TABLES)?;
    if plan == Plan::Listed {
        return Ok(());
    }
    if args.samples == 0 && plan == Plan::Csv(TableChoice::One("uncertainty")) {
        return Err(bad_option(
            &loaded.source,
            "--table",
            "the `uncertainty` table needs the Monte Carlo: add `--samples N`".into(),
        ));
    }
    let (scales, money_basis) = scales_for(
        &loaded.source,
        args.scales.as_deref(),
        &loaded.design.project,
    )?;
    let weights = args.weights.unwrap_or_default();
    let weather = stills::site_weather(&loaded)?;
    let ev = compare::evaluate_design(&loaded, &weather, &stills::RunOptions::default())?;
    for s in &ev.skipped {
        eprintln!("note: `{}` is not ranked: {}", s.name, s.reason);
    }
    let mut rep = report(
        &loaded.design.project.title,
        &ev,
        &weights,
        &scales,
        money_basis,
    )?;
    if args.samples > 0 {
        let opts = compare::UncertaintyOptions {
            samples: args.samples,
            seed: args.seed,
            ..compare::UncertaintyOptions::default()
        };
        rep.uncertainty = Some(super::uncertainty::run_with_bar(&loaded, &opts)?);
    }
    let mut buf = Vec::new();
    match args.format {
        Format::Text => {
            write_text(&mut buf, &rep)?;
            stillbench::cautions::write_cautions(&mut buf)?;
        }
        Format::Json => stillbench::output::write_document(&mut buf, &rep)?,
        Format::Csv => return args.export.write_tables(&plan, &tables(&rep)),
    }
    args.export.write_document(&buf)
}

/// Write the report as text.
pub fn write_text(out: &mut impl Write, rep: &Report) -> std::io::Result<()> {
    let cur = &rep.currency;
    writeln!(out, "{}\n", rep.design)?;
    let total: f64 = rep.weights.iter().sum();
    let w: Vec<String> = Criterion::ALL
        .iter()
        .map(|c| {
            let x = rep.weights[c.index()];
            format!("{} {x} ({:.0} %)", c.key(), x / total * 100.0)
        })
        .collect();
    writeln!(out, "weights: {}", w.join(", "))?;
    writeln!(
        out,
        "reference scales (linear; a yield scores 1 at its reference, a cost 0 at its reference):"
    )?;
    for c in Criterion::ALL {
        writeln!(
            out,
            "  {:<44} {}",
            c.label(),
            compare::rank::figure(c, rep.scales[c.index()], cur)
        )?;
    }
    writeln!(out, "  {}", rep.money_basis)?;
    writeln!(out)?;
    writeln!(
        out,
        "rank  {:<20} {:>6}  {:>10}  {:>14}  {:>8}  {:>12}  {:>10}  front  flags",
        "variant",
        "score",
        "L/m²/year",
        "worst L/m²/day",
        format!("{cur}/L"),
        format!("{cur}/(L/day)"),
        "complexity"
    )?;
    for r in &rep.ranking {
        let v = &r.values;
        writeln!(
            out,
            "{:>4}  {:<20} {:>6.3}  {:>10.0}  {:>14.2}  {:>8.3}  {:>12.0}  {:>10.0}  {:<5}  {}",
            r.rank,
            r.name,
            r.score,
            v.annual_l_m2,
            v.worst_month_l_m2_day,
            v.cost_per_l,
            v.capital_per_l_day,
            v.complexity_points,
            if r.pareto { "yes" } else { "–" },
            if r.not_local.is_empty() {
                String::new()
            } else {
                format!("NOT LOCAL: {}", r.not_local.join(", "))
            }
        )?;
    }
    writeln!(
        out,
        "\nPareto front (no other variant at least as good on every criterion and better on one): {}",
        rep.pareto_front.join(", ")
    )?;
    writeln!(out, "\nWhy each variant stands where it does:")?;
    for r in &rep.ranking {
        writeln!(out, "  {} {}", r.name, r.explanation)?;
    }
    if !rep.skipped.is_empty() {
        writeln!(out, "\nNot ranked:")?;
        for s in &rep.skipped {
            writeln!(out, "  {}: {}", s.name, s.reason)?;
        }
    }
    if let Some(u) = &rep.uncertainty {
        writeln!(out)?;
        super::uncertainty::write_percentiles(out, u)?;
    }
    Ok(())
}

/// The tables of [`TABLES`]: the ranking, and the Monte Carlo percentiles (no rows without
/// --samples).
pub fn tables(rep: &Report) -> Vec<Table> {
    let mut t = Table::new(
        "ranking",
        &[
            "rank",
            "variant",
            "score",
            "annual_l_m2",
            "worst_month_l_m2_day",
            "cost_per_l",
            "capital_per_l_day",
            "complexity_points",
            "currency",
            "pareto",
            "not_local",
            "explanation",
        ],
    );
    for r in &rep.ranking {
        let v = &r.values;
        t.push(vec![
            serde_json::json!(r.rank),
            text(&r.name),
            full(r.score),
            full(v.annual_l_m2),
            full(v.worst_month_l_m2_day),
            full(v.cost_per_l),
            full(v.capital_per_l_day),
            full(v.complexity_points),
            text(&rep.currency),
            serde_json::json!(r.pareto),
            text(r.not_local.join(";")),
            text(&r.explanation),
        ]);
    }
    let unc =
        stillbench::compare::render::percentiles_table(rep.uncertainty.as_ref(), "uncertainty");
    vec![t, unc]
}
