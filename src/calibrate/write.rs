//! Writing fitted factors back into a copy of the design file, keeping its text (comments,
//! order, layout) and changing only the variant's `[variant.calibration]` values.

use std::path::Path;

use toml_edit::{DocumentMut, Item, Table, value};

use super::fit::CalibrationReport;
use crate::error::Error;

/// Values are written to this many significant digits (well inside any interval a pilot
/// record gives).
pub const SIGNIFICANT_DIGITS: i32 = 4;

fn round_sig(v: f64) -> f64 {
    if v == 0.0 || !v.is_finite() {
        return v;
    }
    let e = v.abs().log10().floor() as i32;
    let f = 10f64.powi(SIGNIFICANT_DIGITS - 1 - e);
    (v * f).round() / f
}

/// The design text `original` with the fitted values of `report` (and `fitted_from`,
/// `fitted_on`) set in the `[variant.calibration]` table of the variant it names. Everything
/// else is kept as written. `source` names the file in errors.
pub fn calibrated_design_text(
    original: &str,
    source: &Path,
    report: &CalibrationReport,
    fitted_from: &str,
    fitted_on: &str,
) -> Result<String, Error> {
    let refuse = |reason: String| Error::Refused {
        path: source.display().to_string(),
        reason,
    };
    let mut doc: DocumentMut = original
        .parse()
        .map_err(|e| refuse(format!("cannot edit the design text: {e}")))?;
    let variants = doc
        .get_mut("variant")
        .and_then(Item::as_array_of_tables_mut)
        .ok_or_else(|| {
            refuse("the design has no [[variant]] tables to write the factors into".into())
        })?;
    let table = variants
        .iter_mut()
        .find(|t| t.get("name").and_then(Item::as_str) == Some(report.variant.as_str()))
        .ok_or_else(|| refuse(format!("no [[variant]] named `{}`", report.variant)))?;
    if !table.contains_key("calibration") {
        let mut t = Table::new();
        t.set_implicit(false);
        table.insert("calibration", Item::Table(t));
    }
    let cal = table
        .get_mut("calibration")
        .and_then(Item::as_table_like_mut)
        .ok_or_else(|| refuse("`calibration` of the variant is not a table".into()))?;
    for p in &report.parameters {
        cal.insert(p.name.as_str(), value(round_sig(p.value)));
    }
    cal.insert("fitted_from", value(fitted_from));
    cal.insert("fitted_on", value(fitted_on));
    Ok(doc.to_string())
}

/// Write the calibrated copy of the design at `original` to `out`, atomically
/// ([`crate::output::write_atomic`]); an existing `out` (or `out` = the original) is refused
/// unless `force`.
pub fn write_calibrated_design(
    original: &Path,
    out: &Path,
    report: &CalibrationReport,
    fitted_from: &str,
    fitted_on: &str,
    force: bool,
) -> Result<(), Error> {
    let text = std::fs::read_to_string(original).map_err(|e| Error::Io {
        path: original.display().to_string(),
        source: e,
    })?;
    let new = calibrated_design_text(&text, original, report, fitted_from, fitted_on)?;
    crate::output::write_atomic(out, force, |w| w.write_all(new.as_bytes()))
}
