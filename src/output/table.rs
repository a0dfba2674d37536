//! The one CSV writer: every `--format csv` output and every table the report exports is a
//! [`Table`] — a name, a header of column names (units in the names, `_l_m2_day`, `_c`, …) and
//! rows of values — written by the csv crate, strictly rectangular.
//!
//! A command whose result has several tables declares them in a [`TableSpec`] list; the user
//! picks one with `--table NAME` (the first is the default, `--table list` names them) or
//! writes them all, one file per table, with `--table all --out DIR` ([`write_tables_to_dir`]).

use std::io::{self, Write};
use std::path::{Path, PathBuf};

use serde::Serialize;
use serde_json::Value;

use crate::Error;

/// One table: the unit of CSV output.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct Table {
    /// Name (`monthly`, `hourly`, …): the `--table` key and the file stem of `--out DIR`.
    pub name: String,
    /// Column names with units.
    pub columns: Vec<String>,
    /// Rows, one value per column. Strings are written as they are, `null` as an empty
    /// field, numbers and booleans as JSON writes them.
    pub rows: Vec<Vec<Value>>,
}

/// A table a command can produce, for `--table list` and for checking `--table NAME` before
/// anything is computed.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub struct TableSpec {
    /// The `--table` key.
    pub name: &'static str,
    /// One line saying what a row is.
    pub about: &'static str,
}

impl Table {
    /// An empty table with these columns.
    pub fn new(name: &str, columns: &[&str]) -> Self {
        Self {
            name: name.into(),
            columns: columns.iter().map(|c| (*c).to_owned()).collect(),
            rows: Vec::new(),
        }
    }

    /// An empty table with owned column names (for headers built at run time).
    pub fn with_columns(name: &str, columns: Vec<String>) -> Self {
        Self {
            name: name.into(),
            columns,
            rows: Vec::new(),
        }
    }

    /// Add a row (its length is checked when the table is written).
    pub fn push(&mut self, row: Vec<Value>) {
        self.rows.push(row);
    }

    /// Write as CSV: the header, then one record per row. A row whose length differs from the
    /// header's is an error (the csv crate's strict mode), so the output is always one
    /// rectangular table.
    pub fn write_csv(&self, w: &mut (impl Write + ?Sized)) -> io::Result<()> {
        let mut out = csv::WriterBuilder::new().flexible(false).from_writer(w);
        out.write_record(&self.columns)?;
        for r in &self.rows {
            out.write_record(r.iter().map(field))?;
        }
        out.flush()
    }

    /// Write as one JSON document: `{"schema_version", "name", "columns", "rows"}`.
    pub fn write_json(&self, w: &mut (impl Write + ?Sized)) -> io::Result<()> {
        super::json::write_document(w, self)
    }
}

/// The CSV text of one value.
fn field(v: &Value) -> String {
    match v {
        Value::String(s) => s.clone(),
        Value::Null => String::new(),
        other => other.to_string(),
    }
}

/// A number rounded to `decimals` places (a JSON number; not finite → `null`, an empty CSV
/// field). For CSV columns whose last digits are noise.
pub fn num(x: f64, decimals: i32) -> Value {
    if !x.is_finite() {
        return Value::Null;
    }
    let scale = 10f64.powi(decimals.clamp(0, 15));
    let r = (x * scale).round() / scale;
    // −0.0 would print as "-0.0".
    serde_json::json!(if r == 0.0 { 0.0 } else { r })
}

/// A number in full precision (not finite → `null`).
pub fn full(x: f64) -> Value {
    if x.is_finite() {
        serde_json::json!(x)
    } else {
        Value::Null
    }
}

/// An optional number rounded to `decimals` places; `None` → `null` (an empty CSV field).
pub fn opt_num(x: Option<f64>, decimals: i32) -> Value {
    x.map_or(Value::Null, |x| num(x, decimals))
}

/// An optional number in full precision; `None` or not finite → `null`.
pub fn opt_full(x: Option<f64>) -> Value {
    x.map_or(Value::Null, full)
}

/// A text value.
pub fn text(s: impl Into<String>) -> Value {
    Value::String(s.into())
}

/// What `--table` asked for.
#[derive(Debug, Clone, PartialEq, Eq)]
pub enum TableChoice {
    /// `--table list`: name the tables.
    List,
    /// `--table all` (with `--out DIR`): every table, one file each.
    All,
    /// One table by name (no `--table`: the first of the command's list).
    One(&'static str),
}

/// Resolve `--table` against a command's tables: `None` is the first (the default), `list`
/// and `all` are themselves, and anything else must be one of the names (else the message
/// names them all).
pub fn choose_table(specs: &[TableSpec], asked: Option<&str>) -> Result<TableChoice, String> {
    match asked {
        None => specs
            .first()
            .map(|s| TableChoice::One(s.name))
            .ok_or_else(|| "this command has no CSV table".to_owned()),
        Some("list") => Ok(TableChoice::List),
        Some("all") => Ok(TableChoice::All),
        Some(name) => specs
            .iter()
            .find(|s| s.name == name)
            .map(|s| TableChoice::One(s.name))
            .ok_or_else(|| {
                format!(
                    "no table named `{name}`; the tables are: {} (or `list`, or `all` with --out DIR)",
                    specs.iter().map(|s| s.name).collect::<Vec<_>>().join(", ")
                )
            }),
    }
}

/// Write `--table list`: one line per table, name then what a row is; the first is the
/// default.
pub fn write_table_list(w: &mut (impl Write + ?Sized), specs: &[TableSpec]) -> io::Result<()> {
    let width = specs.iter().map(|s| s.name.len()).max().unwrap_or(0);
    for (i, s) in specs.iter().enumerate() {
        writeln!(
            w,
            "{:<width$}  {}{}",
            s.name,
            s.about,
            if i == 0 { " (default)" } else { "" }
        )?;
    }
    Ok(())
}

/// Write every table as `DIR/NAME.csv`, each file atomically (see [`super::write_atomic`]).
/// `DIR` is created if missing; files in it other than these are never touched. If any of
/// the files exists and `overwrite` is false nothing is written. Returns the files written.
pub fn write_tables_to_dir(
    dir: &Path,
    overwrite: bool,
    tables: &[Table],
) -> Result<Vec<PathBuf>, Error> {
    if dir.exists() && !dir.is_dir() {
        return Err(Error::Refused {
            path: dir.display().to_string(),
            reason: "with `--table all`, --out names a folder, and this is a file".into(),
        });
    }
    let paths: Vec<PathBuf> = tables
        .iter()
        .map(|t| dir.join(format!("{}.csv", t.name)))
        .collect();
    if !overwrite && let Some(p) = paths.iter().find(|p| p.exists()) {
        return Err(Error::Refused {
            path: p.display().to_string(),
            reason: "it already exists; pass --force to replace it".into(),
        });
    }
    std::fs::create_dir_all(dir).map_err(|source| Error::Io {
        path: dir.display().to_string(),
        source,
    })?;
    for (t, p) in tables.iter().zip(&paths) {
        super::write_atomic(p, overwrite, |w| t.write_csv(w))?;
    }
    Ok(paths)
}
