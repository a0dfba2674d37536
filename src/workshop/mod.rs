//! What the workshop and the funder need beside the performance figures: the fabricator
//! sheet of one variant ([`sheet::workshop_sheet`]) with its dimensioned SVG drawing
//! ([`drawing::drawing`]), and the alternatives and risk tables ([`tables`]).
//!
//! Every context is plain `Serialize` data. The report renders the sheet through the
//! template `templates/workshop.md` under the key `workshop`; [`write_sheet_markdown`]
//! renders the same template on its own.

pub mod drawing;
pub mod sheet;
pub mod tables;

use std::io::{self, Write};

pub use drawing::{Dimension, Drawing, GENERAL_TOLERANCE, escape_xml};
pub use sheet::{
    ChecklistColumn, CommissioningPlan, CutRow, NeverSubstitute, QualityChecklist, WorkshopSheet,
    workshop_sheet,
};
pub use tables::{
    AlternativeRow, AlternativesTable, RiskTable, alternatives_table, risk_table,
    write_alternatives_markdown, write_risks_markdown,
};

/// The workshop template (Markdown with minijinja placeholders; context key `workshop`).
pub const WORKSHOP_TEMPLATE: &str = include_str!("../../templates/workshop.md");

/// The template's name, as the report's `{% include %}` names it.
pub const WORKSHOP_TEMPLATE_NAME: &str = "workshop.md";

/// Render the fabricator sheet as Markdown through [`WORKSHOP_TEMPLATE`].
///
/// Errors: an I/O error from `out`, or the template failing to render (reported as
/// [`io::ErrorKind::InvalidData`] with minijinja's message).
pub fn write_sheet_markdown(sheet: &WorkshopSheet, out: &mut impl Write) -> io::Result<()> {
    let mut env = minijinja::Environment::new();
    env.add_template(WORKSHOP_TEMPLATE_NAME, WORKSHOP_TEMPLATE)
        .map_err(|e| io::Error::new(io::ErrorKind::InvalidData, e.to_string()))?;
    let text = env
        .get_template(WORKSHOP_TEMPLATE_NAME)
        .and_then(|t| t.render(minijinja::context! { workshop => minijinja::Value::from(minijinja::value::Serde(sheet)) }))
        .map_err(|e| io::Error::new(io::ErrorKind::InvalidData, e.to_string()))?;
    out.write_all(text.as_bytes())
}
