//! Reading one TOML file with spans, and turning serde errors into [`DesignIssue`]s that name
//! the file, line, column and field path.

use std::collections::HashSet;
use std::ops::Range;
use std::path::{Path, PathBuf};

use serde::de::{DeserializeOwned, IntoDeserializer};
use toml::Spanned;
use toml::de::{DeTable, DeValue};

use super::DesignIssue;
use super::spans::{self, SpanIndex, line_col};

/// The most issues collected from one table before giving up on it; a guard against a
/// pathological file, far above what a person writes.
const MAX_RETRIES: usize = 200;

/// One file being read: its text, span index and the issues found so far.
pub(crate) struct Reader<'t> {
    pub file: PathBuf,
    pub text: &'t str,
    pub index: SpanIndex,
    pub issues: Vec<DesignIssue>,
    pub warnings: Vec<DesignIssue>,
}

/// Decode bytes as UTF-8, or describe where they are not.
pub(crate) fn decode(file: &Path, bytes: &[u8]) -> Result<String, DesignIssue> {
    match std::str::from_utf8(bytes) {
        Ok(s) => Ok(s.to_string()),
        Err(e) => {
            let valid = &bytes[..e.valid_up_to()];
            let text = String::from_utf8_lossy(valid);
            Err(DesignIssue {
                file: file.to_path_buf(),
                line_col: Some(line_col(&text, text.len())),
                path: String::new(),
                message: format!(
                    "the file is not valid UTF-8 (invalid byte at offset {}); save it as UTF-8 text",
                    e.valid_up_to()
                ),
            })
        }
    }
}

/// Parse `text` as TOML. Syntax errors are all reported.
pub(crate) fn parse_toml<'t>(
    file: &Path,
    text: &'t str,
) -> Result<Spanned<DeTable<'t>>, Vec<DesignIssue>> {
    let (doc, errors) = DeTable::parse_recoverable(text);
    if errors.is_empty() {
        return Ok(doc);
    }
    Err(errors
        .iter()
        .map(|e| DesignIssue {
            file: file.to_path_buf(),
            line_col: e.span().map(|s| line_col(text, s.start)),
            path: String::new(),
            message: format!(
                "TOML syntax error: {}",
                e.message().trim().replace('\n', "; ")
            ),
        })
        .collect())
}

/// Backticked names in a serde message after the word "expected".
fn expected_names(message: &str) -> Vec<&str> {
    let Some(pos) = message.find("expected") else {
        return Vec::new();
    };
    message[pos..].split('`').skip(1).step_by(2).collect()
}

/// Serde's type names in words a design-file writer knows.
fn plain_types(message: &str) -> String {
    message
        .replace("expected f64", "expected a number")
        .replace(
            "expected u32",
            "expected a whole number from 0 to 4294967295",
        )
        .replace("expected a boolean", "expected true or false")
}

/// The first backticked name in a serde message.
fn first_ticked(message: &str) -> Option<&str> {
    message.split('`').nth(1)
}

impl<'t> Reader<'t> {
    /// A reader for `text` (already parsed into `doc`).
    pub fn new(file: &Path, text: &'t str, doc: &DeTable<'_>) -> Self {
        Reader {
            file: file.to_path_buf(),
            text,
            index: SpanIndex::new(doc),
            issues: Vec::new(),
            warnings: Vec::new(),
        }
    }

    fn make(&self, span: Option<Range<usize>>, path: &str, message: String) -> DesignIssue {
        DesignIssue {
            file: self.file.clone(),
            line_col: span
                .filter(|s| !(s.start == 0 && s.end == 0))
                .map(|s| line_col(self.text, s.start)),
            path: path.to_string(),
            message,
        }
    }

    /// The best span for `path`: its value, else its key, else the nearest written parent.
    pub fn span_for(&self, path: &str) -> Option<Range<usize>> {
        let mut p = path;
        loop {
            if let Some(s) = self.index.value_span(p).or_else(|| self.index.key_span(p)) {
                return Some(s);
            }
            let cut = p.rfind(['.', '['])?;
            p = &p[..cut];
        }
    }

    /// Record an error at the value of `path`.
    pub fn error(&mut self, path: &str, message: String) {
        let issue = self.make(self.span_for(path), path, message);
        self.issues.push(issue);
    }

    /// Record an error at the key of `path` (for unknown or misplaced fields).
    pub fn error_at_key(&mut self, path: &str, message: String) {
        let span = self.index.key_span(path).or_else(|| self.span_for(path));
        let issue = self.make(span, path, message);
        self.issues.push(issue);
    }

    /// Record a warning at the value of `path`.
    pub fn warn(&mut self, path: &str, message: String) {
        let issue = self.make(self.span_for(path), path, message);
        self.warnings.push(issue);
    }

    /// Deserialize `value` (found at `path`) into `T`, recording every unknown field and every
    /// wrongly typed value: after each such error the offending key is dropped and the rest is
    /// read again, so one pass reports them all. `extra_fields` are further valid names for
    /// "did you mean" hints (fields of the same table read elsewhere).
    ///
    /// Returns `None` when `T` could not be built or a value had to be dropped for its type, so
    /// later checks of the same part do not report consequences of an error already reported.
    /// Unknown fields alone still return the value (with issues recorded).
    pub fn read<T: DeserializeOwned>(
        &mut self,
        value: &Spanned<DeValue<'_>>,
        path: &str,
        extra_fields: &[&str],
    ) -> Option<T> {
        let mut value = value.clone();
        // Fields already reported (dropped, or hinted at by a "did you mean"): a later
        // "missing field" for them would only repeat the same mistake.
        let mut reported: HashSet<String> = HashSet::new();
        let mut clean = true;
        for _ in 0..MAX_RETRIES {
            let err = match T::deserialize(value.clone().into_deserializer()) {
                Ok(t) => return clean.then_some(t),
                Err(e) => e,
            };
            let span = err.span();
            let at = span
                .as_ref()
                .and_then(|s| self.index.path_at(s))
                .map(str::to_string)
                .filter(|p| p.starts_with(path))
                .unwrap_or_else(|| path.to_string());
            let msg = err.message().trim().to_string();
            if msg.starts_with("missing field") {
                let field = first_ticked(&msg).unwrap_or("?");
                let full = spans::join(&at, field);
                if !reported.contains(&full) {
                    let issue = self.make(span, &full, format!("missing required field `{field}`"));
                    self.issues.push(issue);
                }
                return None;
            }
            // Dropping an unknown field changes no known value; dropping a mistyped one lets a
            // default stand in for it, which later checks must not see.
            if !msg.starts_with("unknown field") {
                clean = false;
            }
            let message = if msg.starts_with("unknown field") {
                let given = first_ticked(&msg).unwrap_or("?");
                let mut names = expected_names(&msg);
                names.extend_from_slice(extra_fields);
                match spans::did_you_mean(given, names.iter().copied()) {
                    Some(best) => {
                        let parent = at.rsplit_once('.').map_or("", |(p, _)| p);
                        reported.insert(spans::join(parent, best));
                        format!("unknown field `{given}`; did you mean `{best}`?")
                    }
                    None => format!(
                        "unknown field `{given}`; allowed here: {}",
                        names.join(", ")
                    ),
                }
            } else if msg.starts_with("unknown variant") {
                let given = first_ticked(&msg).unwrap_or("?");
                let names = expected_names(&msg);
                let hint = spans::hint(given, names.iter().copied());
                format!(
                    "`{given}` is not allowed; allowed: {}{hint}",
                    names
                        .iter()
                        .map(|n| format!("\"{n}\""))
                        .collect::<Vec<_>>()
                        .join(", ")
                )
            } else if msg.starts_with("invalid type") || msg.starts_with("invalid value") {
                plain_types(&msg)
            } else {
                format!("{msg} (got {})", self.snippet(span.as_ref()))
            };
            let issue = self.make(span.clone(), &at, message);
            self.issues.push(issue);
            let span = span?;
            let DeValue::Table(table) = value.get_mut() else {
                return None;
            };
            if !(spans::remove_key_at(table, &span) || remove_containing(table, &span)) {
                return None;
            }
            reported.insert(at);
        }
        None
    }

    /// The text at `span`, shortened for a message.
    fn snippet(&self, span: Option<&Range<usize>>) -> String {
        let Some(s) = span else {
            return "?".to_string();
        };
        let raw = self.text.get(s.clone()).unwrap_or("?");
        let one_line: String = raw.chars().take_while(|&c| c != '\n').take(40).collect();
        if one_line.len() < raw.len() {
            format!("{one_line}…")
        } else {
            one_line
        }
    }
}

/// Remove the key whose value contains `span` (the deepest one that is not a table), so a bad
/// array element drops its array.
fn remove_containing(table: &mut DeTable<'_>, span: &Range<usize>) -> bool {
    let mut target: Option<String> = None;
    for (k, v) in table.iter_mut() {
        let contains = v.span().start <= span.start && span.end <= v.span().end;
        match v.get_mut() {
            DeValue::Table(t) => {
                if remove_containing(t, span) {
                    return true;
                }
            }
            DeValue::Array(a) => {
                for e in a.iter_mut() {
                    if let DeValue::Table(t) = e.get_mut()
                        && remove_containing(t, span)
                    {
                        return true;
                    }
                }
                if contains {
                    target = Some(k.get_ref().to_string());
                    break;
                }
            }
            _ => {
                if contains {
                    target = Some(k.get_ref().to_string());
                    break;
                }
            }
        }
    }
    match target {
        Some(k) => table.remove(k.as_str()).is_some(),
        None => false,
    }
}
