//! `[[alternative]]`: other ways the community could get safe drinking water (boiling, trucked
//! water, filtration, rain catchment …), each with the user's cost per litre and what it does
//! and does not remove, so a report can set them beside a still.
//!
//! Optional; a design without them has none. Read like every other table (spans kept,
//! unknown fields rejected) and validated with errors naming the file, the field and the
//! allowed range.

use std::collections::HashMap;

use serde::de::DeserializeOwned;
use serde::{Deserialize, Serialize};
use toml::de::{DeTable, DeValue};

use super::reader::Reader;
use super::spans;
use super::validate::{B, range, text_len};

/// Highest cost per litre accepted [currency L⁻¹]: far above any water source, so a value
/// beyond it is a typing slip (e.g. a price per cubic metre).
pub const MAX_COST_PER_LITRE: f64 = 1.0e4;

/// Most entries in a `removes` or `does_not_remove` list.
pub const MAX_LIST_ENTRIES: usize = 20;

/// One `[[alternative]]` entry.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct Alternative {
    /// Name, 1–60 characters, unique among the alternatives.
    pub name: String,
    /// What a litre costs the household, in the design's currency, [0, 1e4].
    pub cost_per_litre: f64,
    /// What it removes or protects against (each entry 1–120 characters, at most 20).
    #[serde(default)]
    pub removes: Vec<String>,
    /// What it does not remove (each entry 1–120 characters, at most 20).
    #[serde(default)]
    pub does_not_remove: Vec<String>,
    /// Free notes (where the price comes from, who pays), at most 500 characters.
    #[serde(default)]
    pub notes: Option<String>,
}

/// Read a top-level array of tables (`[[key]]`) entry by entry; absent means empty.
///
/// Returns `None` when the value is not an array of tables or any entry could not be read
/// (the issues are recorded).
pub(super) fn read_table_array<T: DeserializeOwned>(
    r: &mut Reader<'_>,
    root: &DeTable<'_>,
    key: &str,
) -> Option<Vec<T>> {
    let Some(v) = root.get(key) else {
        return Some(Vec::new());
    };
    let DeValue::Array(items) = v.get_ref() else {
        r.error(
            key,
            format!(
                "expected an array of tables ([[{key}]]), got a {}",
                v.get_ref().type_str()
            ),
        );
        return None;
    };
    let mut out = Vec::with_capacity(items.len());
    let mut all_ok = true;
    for (i, item) in items.iter().enumerate() {
        let path = spans::index(key, i);
        if !matches!(item.get_ref(), DeValue::Table(_)) {
            r.error(
                &path,
                format!("expected a table, got a {}", item.get_ref().type_str()),
            );
            all_ok = false;
            continue;
        }
        match r.read::<T>(item, &path, &[]) {
            Some(t) => out.push(t),
            None => all_ok = false,
        }
    }
    all_ok.then_some(out)
}

/// A list of short texts: at most [`MAX_LIST_ENTRIES`] entries of 1–120 characters.
pub(super) fn text_list(r: &mut Reader<'_>, path: &str, list: &[String]) {
    if list.len() > MAX_LIST_ENTRIES {
        r.error(
            path,
            format!(
                "{} entries given; allowed at most {MAX_LIST_ENTRIES}",
                list.len()
            ),
        );
    }
    for (j, s) in list.iter().enumerate() {
        text_len(r, &spans::index(path, j), s, 120);
    }
}

/// Check every alternative: names, costs, lists, notes.
pub(super) fn validate(r: &mut Reader<'_>, alts: &[Alternative]) {
    let mut seen: HashMap<&str, usize> = HashMap::new();
    for (i, a) in alts.iter().enumerate() {
        let p = spans::index("alternative", i);
        text_len(r, &format!("{p}.name"), &a.name, 60);
        if let Some(first) = seen.get(a.name.trim()) {
            r.error(
                &format!("{p}.name"),
                format!(
                    "duplicate alternative name \"{}\" (already used by alternative[{}]); names \
                     must be unique",
                    a.name,
                    first + 1
                ),
            );
        } else {
            seen.insert(a.name.trim(), i);
        }
        range(
            r,
            &format!("{p}.cost_per_litre"),
            a.cost_per_litre,
            B::In(0.0),
            B::In(MAX_COST_PER_LITRE),
            "per litre in the project currency",
        );
        text_list(r, &format!("{p}.removes"), &a.removes);
        text_list(r, &format!("{p}.does_not_remove"), &a.does_not_remove);
        if let Some(n) = &a.notes {
            text_len(r, &format!("{p}.notes"), n, 500);
        }
    }
}
