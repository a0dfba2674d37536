//! `stillbench cost [DESIGN] [--variant NAME] [--format text|json|csv] [--substitutes]`: bill
//! of materials, cut list, build complexity and cost summary of each variant.

use std::io::Write;
use std::path::PathBuf;

use serde_json::json;
use stillbench::design::{DesignErrors, DesignIssue, LoadedDesign, Variant};
use stillbench::economics::{self, SubstituteRun, VariantCost, YieldEstimate};
use stillbench::output::table::{Table, TableSpec, full, opt_full, text};
use stillbench::stills;

use super::export::{ExportArgs, Plan};

/// Output formats.
#[derive(Debug, Clone, Copy, PartialEq, Eq, clap::ValueEnum)]
pub enum Format {
    /// Plain text for reading.
    Text,
    /// One JSON document: every variant's cost (and its substitutes).
    Json,
    /// CSV: one table — `bom` (the bill of materials, the default), `summary`, `cuts` or
    /// `substitutes` (`--table`).
    Csv,
}

/// Arguments of `cost`.
#[derive(Debug, clap::Args)]
#[command(
    after_help = "Examples:\n  stillbench cost designs/demo-coast.toml\n  \
    stillbench cost designs/demo-coast.toml --variant glass-basin --format csv\n  \
    stillbench cost designs/demo-coast.toml --substitutes"
)]
pub struct CostArgs {
    /// The design file (TOML). Without it, the built-in demo design is costed.
    pub design: Option<PathBuf>,
    /// Cost only this variant.
    #[arg(long)]
    pub variant: Option<String>,
    /// Output format.
    #[arg(long, value_enum, default_value_t = Format::Text)]
    pub format: Format,
    /// Re-cost each variant with every locally sold substitute listed in [costs.substitutes].
    #[arg(long)]
    pub substitutes: bool,
    /// Where the output goes, and which CSV table.
    #[command(flatten)]
    pub export: ExportArgs,
}

/// The CSV tables of `cost`.
pub const TABLES: [TableSpec; 4] = [
    TableSpec {
        name: "bom",
        about: "one row per variant and bill-of-materials line",
    },
    TableSpec {
        name: "summary",
        about: "one row per variant: capital, running cost, life, cost per litre, complexity",
    },
    TableSpec {
        name: "cuts",
        about: "one row per variant and cut part: stock bought, used and wasted",
    },
    TableSpec {
        name: "substitutes",
        about: "one row per variant and locally sold substitute (with --substitutes)",
    },
];

/// The yield of a variant from the simulation, or `None` (with a note on standard error) for
/// a kind not modelled yet or a run that could not give a trustworthy result: no yield is ever
/// invented.
fn simulated_yield(
    loaded: &LoadedDesign,
    weather: &stills::SiteWeather,
    v: &Variant,
) -> Option<YieldEstimate> {
    if !stills::is_modelled(&v.kind) {
        return None;
    }
    match stills::simulate_variant(loaded, v, weather, &stills::RunOptions::default()) {
        Ok(r) => Some(YieldEstimate::from_simulation(
            &r,
            loaded.design.costs.commissioning_kwh_m2_day,
        )),
        Err(e) => {
            eprintln!("note: no yield for `{}`: {e}", v.name);
            None
        }
    }
}

/// Run `cost`.
pub fn run(args: &CostArgs) -> anyhow::Result<()> {
    let loaded = super::load(args.design.as_deref())?;
    let indices = select(&loaded, args.variant.as_deref())?;
    let plan = args
        .export
        .plan(&loaded.source, args.format == Format::Csv, &TABLES)?;
    if plan == Plan::Listed {
        return Ok(());
    }
    // The substitutes table asked for by name needs the substitutes.
    let with_substitutes = args.substitutes || ExportArgs::wants(&plan, "substitutes");
    let weather = stills::site_weather(&loaded)?;
    let yield_of = |v: &Variant| simulated_yield(&loaded, &weather, v);
    let mut reports = Vec::new();
    for i in indices {
        if with_substitutes {
            let (base, runs) =
                economics::substitutes(&loaded, i, &yield_of).map_err(stillbench::Error::Design)?;
            reports.push((base, runs));
        } else {
            let y = loaded.design.variants.get(i).and_then(yield_of);
            let r = economics::cost_variant(&loaded, i, y.as_ref())
                .map_err(stillbench::Error::Design)?;
            reports.push((r, Vec::new()));
        }
    }
    let mut buf = Vec::new();
    match args.format {
        Format::Text => {
            for (r, subs) in &reports {
                write_text(&mut buf, r, subs, with_substitutes)?;
            }
            stillbench::cautions::write_cautions(&mut buf)?;
        }
        Format::Json => {
            #[derive(serde::Serialize)]
            struct VariantOut<'a> {
                cost: &'a VariantCost,
                /// `null` without --substitutes, so "none listed" and "not asked" differ.
                substitutes: Option<&'a [SubstituteRun]>,
            }
            #[derive(serde::Serialize)]
            struct Doc<'a> {
                design: &'a str,
                currency: &'a str,
                variants: Vec<VariantOut<'a>>,
            }
            stillbench::output::write_document(
                &mut buf,
                &Doc {
                    design: &loaded.design.project.title,
                    currency: &loaded.design.project.currency,
                    variants: reports
                        .iter()
                        .map(|(r, subs)| VariantOut {
                            cost: r,
                            substitutes: with_substitutes.then_some(subs.as_slice()),
                        })
                        .collect(),
                },
            )?;
        }
        Format::Csv => return args.export.write_tables(&plan, &tables(&reports)),
    }
    args.export.write_document(&buf)
}

fn select(loaded: &LoadedDesign, name: Option<&str>) -> anyhow::Result<Vec<usize>> {
    let all = &loaded.design.variants;
    match name {
        None => Ok((0..all.len()).collect()),
        Some(n) => match all.iter().position(|v| v.name == n) {
            Some(i) => Ok(vec![i]),
            None => {
                let names: Vec<&str> = all.iter().map(|v| v.name.as_str()).collect();
                Err(stillbench::Error::Design(DesignErrors(vec![DesignIssue {
                    file: loaded.source.clone(),
                    line_col: None,
                    path: "--variant".into(),
                    message: format!("no variant named \"{n}\"; variants: {}", names.join(", ")),
                }]))
                .into())
            }
        },
    }
}

fn opt(v: Option<f64>, digits: usize) -> String {
    v.map_or_else(|| "–".to_string(), |x| format!("{x:.digits$}"))
}

/// Write one variant's report as text.
pub fn write_text(
    out: &mut impl Write,
    r: &VariantCost,
    subs: &[SubstituteRun],
    show_subs: bool,
) -> std::io::Result<()> {
    let cur = &r.cost.currency;
    writeln!(
        out,
        "== {} ({}) — footprint {:.2} m², cover {:.2} m²",
        r.variant, r.kind, r.footprint_m2, r.cover_area_m2
    )?;
    let units = r.bom.units;
    writeln!(
        out,
        "\nBill of materials ({cur}), one unit built alone{}:",
        if units > 1 {
            format!("; share: one unit's share of the {units} units' stock nested together")
        } else {
            String::new()
        }
    )?;
    for l in &r.bom.lines {
        let (g, gu) = l.amount.value_unit();
        writeln!(
            out,
            "  {:<28} {:<24} {:>9.3} {:<6} × {:>8.2} = {:>9.2}{}{}",
            l.part,
            l.item,
            l.quantity,
            l.unit,
            l.unit_price,
            l.cost,
            if units > 1 {
                format!("  share {:>8.2}", l.unit_share_cost)
            } else {
                String::new()
            },
            if l.local { "" } else { "  [NOT LOCAL]" }
        )?;
        writeln!(
            out,
            "      {g:.3} {gu} from {}; {}",
            l.formula, l.conversion
        )?;
    }
    if units > 1 {
        writeln!(
            out,
            "  materials total {:.2} {cur} alone; share {:.2} {cur} ({:.2} {cur} for {units} units)",
            r.bom.materials_cost(),
            r.bom.unit_share_materials_cost(),
            r.bom.installation_materials_cost()
        )?;
    } else {
        writeln!(out, "  materials total {:.2} {cur}", r.bom.materials_cost())?;
    }
    if !r.bom.unavailable.is_empty() {
        writeln!(out, "\nNot sold locally (costed with import):")?;
        for u in &r.bom.unavailable {
            writeln!(
                out,
                "  {} for the {}: lead time {} days, import adds {:.2} {cur}",
                u.item,
                u.part,
                opt(u.lead_time_days, 0),
                u.import_extra
            )?;
        }
    }
    if !r.bom.food_safety.is_empty() {
        writeln!(out, "\nFood safety:")?;
        for f in &r.bom.food_safety {
            writeln!(
                out,
                "  FLAG {} ({}, touches {}): {}",
                f.item,
                f.part,
                match f.contact {
                    stillbench::economics::takeoff::Contact::Dry => "nothing wet",
                    stillbench::economics::takeoff::Contact::Brine => "the hot brine",
                    stillbench::economics::takeoff::Contact::Vapour => "the hot vapour",
                    stillbench::economics::takeoff::Contact::Distillate => "the distillate",
                },
                f.reason
            )?;
        }
    }
    writeln!(out, "\nCut list (one unit):")?;
    for c in &r.bom.cuts {
        if let Some(p) = &c.sheets {
            writeln!(
                out,
                "  {} on {}: {} sheet(s), parts {:.3} m², bought {:.3} m², waste {:.3} m² ({:.0} %)",
                c.part,
                c.item,
                p.sheets.len(),
                p.parts_m2,
                p.stock_m2,
                p.waste_m2,
                p.waste_fraction() * 100.0
            )?;
            for (k, s) in p.sheets.iter().enumerate() {
                let parts: Vec<String> = s
                    .placements
                    .iter()
                    .map(|pl| format!("{} {:.3}×{:.3}", pl.label, pl.across_m, pl.along_m))
                    .collect();
                writeln!(
                    out,
                    "    sheet {} ({:.2}×{:.2} m{}): {}",
                    k + 1,
                    s.width_m,
                    s.length_m,
                    if s.roll { " off the roll" } else { "" },
                    parts.join(", ")
                )?;
            }
        }
        if let Some(b) = &c.bars {
            writeln!(
                out,
                "  {} on {}: {} bar(s), pieces {:.3} m, bought {:.3} m, waste {:.3} m",
                c.part,
                c.item,
                b.bars.len(),
                b.pieces_m,
                b.stock_m,
                b.waste_m
            )?;
        }
    }
    if units > 1 {
        writeln!(
            out,
            "\nStock for the installation ({units} units' parts nested together, offcuts shared; \
             batches of at most {} units):",
            economics::bom::NEST_BATCH_UNITS
        )?;
        for c in &r.bom.cuts {
            let n = &c.installation;
            let (what, unit) = if c.sheets.is_some() {
                ("sheet(s)", "m²")
            } else {
                ("bar(s)", "m")
            };
            writeln!(
                out,
                "  {} on {}: {} {what}, bought {:.1} {unit} (bought unit by unit: {:.1} {unit}), \
                 waste {:.0} %",
                c.part,
                c.item,
                n.pieces,
                n.stock,
                n.per_unit_stock,
                n.waste_fraction() * 100.0
            )?;
        }
    }
    writeln!(
        out,
        "  methods: sheets — {}; bars — {}",
        economics::cutlist::SHEET_METHOD,
        economics::cutlist::BAR_METHOD
    )?;
    for s in &r.bom.splits {
        writeln!(
            out,
            "  {} split {}×{} with glazing bars: {:.3} m of bar, shading {:.3} m²",
            s.pane, s.split.across_a, s.split.across_b, s.split.bar_m, s.split.shaded_m2
        )?;
    }
    let cx = &r.complexity;
    writeln!(out, "\nBuild complexity: score {:.1}", cx.score)?;
    for t in &cx.terms {
        writeln!(
            out,
            "  {:<42} {:>7.1} × {:>4.1} = {:>6.1}",
            t.what, t.count, t.weight, t.points
        )?;
    }
    writeln!(out, "  skills: {}", cx.skills.join(", "))?;
    writeln!(out, "  tools: {}", cx.tools.join(", "))?;
    for t in &cx.tolerances {
        writeln!(out, "  tolerance — {}: {}", t.name, t.value)?;
    }
    writeln!(out, "\nBuild steps:")?;
    for (k, s) in r.steps.iter().enumerate() {
        writeln!(out, "  {}. {s}", k + 1)?;
    }
    let c = &r.cost;
    writeln!(out, "\nCost summary ({cur}):")?;
    writeln!(
        out,
        "  materials {:.2}{} + labour {:.1} h = {:.2}",
        c.materials,
        if c.units > 1 {
            format!(
                " (one unit's share of the {} units' nested stock; {:.2} for a unit alone)",
                c.units, c.single_unit_materials
            )
        } else {
            String::new()
        },
        c.labour_h,
        c.labour_cost
    )?;
    writeln!(
        out,
        "  capital {:.2} per unit ({:.2} per m² of footprint){}",
        c.capital,
        c.capital_per_m2,
        if c.units > 1 {
            format!(
                "; {:.2} for the {} units (a unit alone {:.2})",
                c.installation_capital, c.units, c.single_unit_capital
            )
        } else {
            String::new()
        }
    )?;
    for rep in &c.replacements {
        writeln!(
            out,
            "  replace {} ({}) every {:.0} y: {} time(s) at {:.2}, present worth {:.2}",
            rep.part, rep.item, rep.lifetime_years, rep.count, rep.cost_each, rep.present_worth
        )?;
    }
    let op = &c.operator;
    writeln!(
        out,
        "  operator: {:.1} h/day for the installation ({}): a {:.0} min round + {:.1} min \
         per unit ({}); this unit's share {:.0} h/year = {:.2}/year",
        op.installation_h_per_day,
        op.units_basis,
        op.round_min_per_day,
        op.unit_min_per_day,
        op.unit_tasks
            .iter()
            .map(|t| format!("{} {:.2}", t.task, t.min_per_day))
            .collect::<Vec<_>>()
            .join("; "),
        c.operator_h_per_year,
        c.operator_cost_per_year
    )?;
    writeln!(
        out,
        "  upkeep (spares, repairs) {:.2}/year; running (upkeep + operator) {:.2}/year; \
         salvage {:.2}",
        c.upkeep_per_year, c.running_per_year, c.salvage
    )?;
    writeln!(
        out,
        "  life {:.0} y at {:.1} %: CRF {:.5}, SFF {:.5}; annualised {:.2}/year",
        c.life_years,
        c.discount_rate * 100.0,
        c.crf,
        c.sff,
        c.annualised
    )?;
    writeln!(
        out,
        "  yield loss {:.1} %/year",
        c.yield_loss_per_year * 100.0
    )?;
    match &c.yield_note {
        Some(note) => writeln!(out, "  cost per litre: {note}")?,
        None => writeln!(
            out,
            "  first-year {} L, levelised {} L/year: {} {cur}/L, {} {cur} per person per year",
            opt(c.first_year_litres, 0),
            opt(c.levelised_litres, 0),
            opt(c.cost_per_litre, 4),
            opt(c.cost_per_person_year, 2)
        )?,
    }
    if show_subs {
        writeln!(
            out,
            "\nSubstitutes (locally sold, from [costs.substitutes]):"
        )?;
        if subs.is_empty() {
            writeln!(out, "  none listed for the roles this variant uses")?;
        }
        for s in subs {
            writeln!(
                out,
                "  {} {} → {}: capital {:+.2}, annualised {:+.2}/year, life {:.0} → {:.0} y{}{}",
                s.role,
                s.replaces,
                s.item,
                s.capital_change,
                s.annualised_change,
                s.replaced_lifetime_years,
                s.lifetime_years,
                s.cover_transmittance_change
                    .map_or(String::new(), |d| format!(", normal transmittance {d:+.3}")),
                match (&s.note, s.yield_change_litres) {
                    (Some(n), _) => format!("; yield: {n}"),
                    (None, Some(d)) => format!("; yield {d:+.0} L/year"),
                    _ => String::new(),
                }
            )?;
            for f in &s.food_safety {
                writeln!(out, "      FLAG {f}")?;
            }
        }
    }
    writeln!(out)?;
    Ok(())
}

/// Every table of [`TABLES`], in that order.
fn tables(reports: &[(VariantCost, Vec<SubstituteRun>)]) -> Vec<Table> {
    let mut bom = Table::new(
        "bom",
        &[
            "variant",
            "part",
            "item",
            "formula",
            "geometric",
            "geometric_unit",
            "quantity",
            "unit",
            "unit_price",
            "cost",
            "currency",
            "local",
            "lifetime_years",
            "units",
            "installation_quantity",
            "unit_share_cost",
        ],
    );
    let mut summary = Table::new(
        "summary",
        &[
            "variant",
            "kind",
            "footprint_m2",
            "cover_area_m2",
            "currency",
            "materials",
            "labour_h",
            "labour_cost",
            "capital",
            "capital_per_m2",
            "replacements_present_worth",
            "operator_h_per_year",
            "operator_cost_per_year",
            "upkeep_per_year",
            "running_per_year",
            "salvage",
            "life_years",
            "discount_rate",
            "crf",
            "sff",
            "annualised_per_year",
            "yield_loss_per_year",
            "first_year_l",
            "levelised_l_year",
            "cost_per_l",
            "cost_per_person_year",
            "complexity_points",
            "all_local",
            "yield_note",
            "units",
            "single_unit_materials",
            "single_unit_capital",
            "installation_capital",
        ],
    );
    let mut cuts = Table::new(
        "cuts",
        &[
            "variant", "part", "item", "stock", "pieces", "used", "bought", "waste", "unit",
        ],
    );
    let mut substitutes = Table::new(
        "substitutes",
        &[
            "variant",
            "role",
            "replaces",
            "item",
            "currency",
            "capital_change",
            "annualised_change_per_year",
            "replaced_lifetime_years",
            "lifetime_years",
            "cover_transmittance_change",
            "yield_change_l_year",
            "cost_per_l_change",
            "food_safety",
            "note",
        ],
    );
    for (r, subs) in reports {
        let c = &r.cost;
        for l in &r.bom.lines {
            let (g, gu) = l.amount.value_unit();
            bom.push(vec![
                text(&r.variant),
                text(&l.part),
                text(&l.item),
                text(&l.formula),
                full(g),
                text(gu),
                full(l.quantity),
                text(l.unit.to_string()),
                full(l.unit_price),
                full(l.cost),
                text(&c.currency),
                json!(l.local),
                json!(l.lifetime_years),
                json!(r.bom.units),
                full(l.installation_quantity),
                full(l.unit_share_cost),
            ]);
        }
        summary.push(vec![
            text(&r.variant),
            text(r.kind),
            full(r.footprint_m2),
            full(r.cover_area_m2),
            text(&c.currency),
            full(c.materials),
            full(c.labour_h),
            full(c.labour_cost),
            full(c.capital),
            full(c.capital_per_m2),
            full(c.replacements_present_worth),
            full(c.operator_h_per_year),
            full(c.operator_cost_per_year),
            full(c.upkeep_per_year),
            full(c.running_per_year),
            full(c.salvage),
            full(c.life_years),
            full(c.discount_rate),
            full(c.crf),
            full(c.sff),
            full(c.annualised),
            full(c.yield_loss_per_year),
            opt_full(c.first_year_litres),
            opt_full(c.levelised_litres),
            opt_full(c.cost_per_litre),
            opt_full(c.cost_per_person_year),
            full(r.complexity.score),
            json!(r.all_local),
            text(c.yield_note.clone().unwrap_or_default()),
            json!(c.units),
            full(c.single_unit_materials),
            full(c.single_unit_capital),
            full(c.installation_capital),
        ]);
        for cut in &r.bom.cuts {
            if let Some(p) = &cut.sheets {
                cuts.push(vec![
                    text(&r.variant),
                    text(&cut.part),
                    text(&cut.item),
                    text("sheet"),
                    json!(p.sheets.len()),
                    full(p.parts_m2),
                    full(p.stock_m2),
                    full(p.waste_m2),
                    text("m2"),
                ]);
            }
            if let Some(b) = &cut.bars {
                cuts.push(vec![
                    text(&r.variant),
                    text(&cut.part),
                    text(&cut.item),
                    text("bar"),
                    json!(b.bars.len()),
                    full(b.pieces_m),
                    full(b.stock_m),
                    full(b.waste_m),
                    text("m"),
                ]);
            }
        }
        for s in subs {
            substitutes.push(vec![
                text(&r.variant),
                text(s.role),
                text(&s.replaces),
                text(&s.item),
                text(&c.currency),
                full(s.capital_change),
                full(s.annualised_change),
                full(s.replaced_lifetime_years),
                full(s.lifetime_years),
                opt_full(s.cover_transmittance_change),
                opt_full(s.yield_change_litres),
                opt_full(s.cost_per_litre_change),
                text(s.food_safety.join("; ")),
                text(s.note.clone().unwrap_or_default()),
            ]);
        }
    }
    vec![bom, summary, cuts, substitutes]
}
