//! Tables for the funder: the design's alternatives set beside a still's cost per litre, and
//! the risks (defaults merged with the design's own).

use std::io::{self, Write};

use serde::Serialize;

use crate::compare::Evaluation;
use crate::design::{Design, Risk, merged_risks};

/// What a solar still removes, for the still's row (common practice, no source: distillation
/// leaves behind what does not evaporate).
pub const STILL_REMOVES: [&str; 4] = [
    "salt and hardness",
    "metals, fluoride and arsenic",
    "most microbes and parasites",
    "non-volatile chemicals",
];

/// What a solar still does not remove, for the still's row (common practice, no source;
/// see the cautions: volatile contaminants carry over and the distillate is not sterile).
pub const STILL_DOES_NOT_REMOVE: [&str; 3] = [
    "volatile chemicals (fuel, solvents) that evaporate with the water",
    "recontamination after the outlet (open troughs, dirty containers)",
    "it adds no minerals: remineralise before drinking",
];

/// One row of the alternatives table.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct AlternativeRow {
    /// Name.
    pub name: String,
    /// Cost per litre [currency L⁻¹].
    pub cost_per_litre: f64,
    /// Cost per litre relative to the still's (1 = the same); `None` when the still's cost
    /// per litre is zero.
    pub relative_to_still: Option<f64>,
    /// What it removes.
    pub removes: Vec<String>,
    /// What it does not remove.
    pub does_not_remove: Vec<String>,
    /// Notes.
    pub notes: String,
    /// Whether this row is the still itself.
    pub is_still: bool,
}

/// The alternatives beside one still.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct AlternativesTable {
    /// Currency of every cost.
    pub currency: String,
    /// The still compared against.
    pub still: String,
    /// The still's cost per litre over its life [currency L⁻¹].
    pub still_cost_per_litre: f64,
    /// The still first, then the alternatives in file order.
    pub rows: Vec<AlternativeRow>,
}

/// Put the design's `[[alternative]]` entries beside the still of `eval`.
pub fn alternatives_table(design: &Design, eval: &Evaluation) -> AlternativesTable {
    let still = eval.values.cost_per_l;
    let rel = |c: f64| (still > 0.0 && still.is_finite()).then(|| c / still);
    let mut rows = vec![AlternativeRow {
        name: format!("solar still: {}", eval.name),
        cost_per_litre: still,
        relative_to_still: rel(still),
        removes: STILL_REMOVES.iter().map(|s| (*s).to_owned()).collect(),
        does_not_remove: STILL_DOES_NOT_REMOVE
            .iter()
            .map(|s| (*s).to_owned())
            .collect(),
        notes: format!(
            "cost per litre over the life of a {} still (capital, replacements, upkeep)",
            eval.kind
        ),
        is_still: true,
    }];
    for a in &design.alternatives {
        rows.push(AlternativeRow {
            name: a.name.clone(),
            cost_per_litre: a.cost_per_litre,
            relative_to_still: rel(a.cost_per_litre),
            removes: a.removes.clone(),
            does_not_remove: a.does_not_remove.clone(),
            notes: a.notes.clone().unwrap_or_default(),
            is_still: false,
        });
    }
    AlternativesTable {
        currency: eval.cost.cost.currency.clone(),
        still: eval.name.clone(),
        still_cost_per_litre: still,
        rows,
    }
}

/// The risk table of a design.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct RiskTable {
    /// Defaults (as overridden) first, then the design's own.
    pub rows: Vec<Risk>,
}

/// Merge the default risks with the design's `[[risk]]` entries.
pub fn risk_table(design: &Design) -> RiskTable {
    RiskTable {
        rows: merged_risks(&design.risks),
    }
}

/// Text for a Markdown table cell: no line breaks, `|` escaped, `<` written as `&lt;` so no
/// user text can open an HTML tag when the Markdown becomes HTML.
pub fn md_cell(s: &str) -> String {
    s.replace(['\n', '\r'], " ")
        .replace('<', "&lt;")
        .replace('|', "\\|")
}

/// Write the alternatives as a Markdown table.
pub fn write_alternatives_markdown(t: &AlternativesTable, out: &mut impl Write) -> io::Result<()> {
    writeln!(
        out,
        "| option | cost per litre ({}) | × the still | removes | does not remove | notes |",
        md_cell(&t.currency)
    )?;
    writeln!(out, "|---|---:|---:|---|---|---|")?;
    for r in &t.rows {
        let rel = r
            .relative_to_still
            .map_or_else(|| "–".to_owned(), |x| format!("{x:.2}"));
        let name = if r.is_still {
            format!("**{}**", md_cell(&r.name))
        } else {
            md_cell(&r.name)
        };
        writeln!(
            out,
            "| {name} | {:.4} | {rel} | {} | {} | {} |",
            r.cost_per_litre,
            md_cell(&r.removes.join("; ")),
            md_cell(&r.does_not_remove.join("; ")),
            md_cell(&r.notes)
        )?;
    }
    Ok(())
}

/// Write the risks as a Markdown table.
pub fn write_risks_markdown(t: &RiskTable, out: &mut impl Write) -> io::Result<()> {
    writeln!(
        out,
        "| failure mode | likelihood | impact | mitigation | source |"
    )?;
    writeln!(out, "|---|---|---|---|---|")?;
    for r in &t.rows {
        writeln!(
            out,
            "| {} | {} | {} | {} | {} |",
            md_cell(&r.failure_mode),
            r.likelihood.name(),
            r.impact.name(),
            md_cell(&r.mitigation),
            md_cell(&r.source)
        )?;
    }
    Ok(())
}
