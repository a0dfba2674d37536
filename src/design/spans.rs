//! Where things are in a TOML text: byte offsets → line and column, field paths ↔ spans,
//! and "did you mean" hints.
//!
//! Field paths name a value the way a reader would point at it: table keys joined with dots,
//! array elements with **1-based** indices in brackets (`variant[2].cover_tilt_deg` is the
//! second `[[variant]]`; `site.climate.t_max_c[13]` is a thirteenth monthly value).

use std::ops::Range;

use toml::Spanned;
use toml::de::{DeTable, DeValue};

/// 1-based line and column of byte `offset` in `text`.
///
/// Columns count Unicode scalar values, not bytes, so a line holding `°` or `²` still points
/// at the right character. An offset past the end maps to the end; an offset inside a
/// multi-byte character maps to that character.
pub fn line_col(text: &str, offset: usize) -> (usize, usize) {
    let mut offset = offset.min(text.len());
    while offset > 0 && !text.is_char_boundary(offset) {
        offset -= 1;
    }
    let before = &text[..offset];
    let line = before.bytes().filter(|&b| b == b'\n').count() + 1;
    let line_start = before.rfind('\n').map_or(0, |i| i + 1);
    let col = before[line_start..].chars().count() + 1;
    (line, col)
}

/// The candidate closest to `given`, if one is close enough to be a plausible typo (and
/// `given` is not itself a candidate).
///
/// Closeness: Damerau–Levenshtein distance of at most 2, or a Jaro–Winkler similarity of at
/// least 0.85 (which catches a forgotten unit suffix such as `cover_tilt` for
/// `cover_tilt_deg`). Among acceptable candidates the most similar one wins.
pub fn did_you_mean<'a, I>(given: &str, candidates: I) -> Option<&'a str>
where
    I: IntoIterator<Item = &'a str>,
{
    let mut best: Option<(&'a str, f64)> = None;
    for cand in candidates {
        let dist = strsim::damerau_levenshtein(given, cand);
        let jw = strsim::jaro_winkler(given, cand);
        if dist == 0 {
            // The name is valid as given: nothing to suggest.
            return None;
        }
        let close = (dist <= 2 && cand.len() > 2) || jw >= 0.85;
        if close && best.is_none_or(|(_, b)| jw > b) {
            best = Some((cand, jw));
        }
    }
    best.map(|(c, _)| c)
}

/// Format a hint suffix: `; did you mean `x`?` or nothing.
pub(crate) fn hint<'a, I>(given: &str, candidates: I) -> String
where
    I: IntoIterator<Item = &'a str>,
{
    match did_you_mean(given, candidates) {
        Some(c) => format!("; did you mean `{c}`?"),
        None => String::new(),
    }
}

/// One value in a parsed document.
#[derive(Debug, Clone)]
struct Entry {
    path: String,
    depth: usize,
    key_span: Option<Range<usize>>,
    value_span: Range<usize>,
}

/// Every value of a parsed TOML document with its field path and spans.
#[derive(Debug, Clone, Default)]
pub struct SpanIndex {
    entries: Vec<Entry>,
}

/// Join a parent path and a key.
pub(crate) fn join(parent: &str, key: &str) -> String {
    if parent.is_empty() {
        key.to_string()
    } else {
        format!("{parent}.{key}")
    }
}

/// Join a parent path and a 0-based array index (shown 1-based).
pub(crate) fn index(parent: &str, i0: usize) -> String {
    format!("{parent}[{}]", i0 + 1)
}

impl SpanIndex {
    /// Index every value below `root`.
    pub fn new(root: &DeTable<'_>) -> Self {
        let mut index = SpanIndex::default();
        for (k, v) in root.iter() {
            index.walk(k.get_ref(), Some(k.span()), v, 1);
        }
        index
    }

    fn walk(
        &mut self,
        path: &str,
        key_span: Option<Range<usize>>,
        v: &Spanned<DeValue<'_>>,
        d: usize,
    ) {
        self.entries.push(Entry {
            path: path.to_string(),
            depth: d,
            key_span,
            value_span: v.span(),
        });
        match v.get_ref() {
            DeValue::Table(t) => {
                for (k, vv) in t.iter() {
                    self.walk(&join(path, k.get_ref()), Some(k.span()), vv, d + 1);
                }
            }
            DeValue::Array(a) => {
                for (i, vv) in a.iter().enumerate() {
                    self.walk(&index(path, i), None, vv, d + 1);
                }
            }
            _ => {}
        }
    }

    /// The span of the value at `path`, if the path was written in the file.
    pub fn value_span(&self, path: &str) -> Option<Range<usize>> {
        self.entries
            .iter()
            .find(|e| e.path == path)
            .map(|e| e.value_span.clone())
    }

    /// The span of the key of `path` (falls back to the value's span for array elements).
    pub fn key_span(&self, path: &str) -> Option<Range<usize>> {
        self.entries
            .iter()
            .find(|e| e.path == path)
            .map(|e| e.key_span.clone().unwrap_or_else(|| e.value_span.clone()))
    }

    /// The deepest field path whose key or value has exactly `span`, or else whose value
    /// contains it.
    pub fn path_at(&self, span: &Range<usize>) -> Option<&str> {
        let exact = self
            .entries
            .iter()
            .filter(|e| e.value_span == *span || e.key_span.as_ref() == Some(span))
            .max_by_key(|e| e.depth);
        if let Some(e) = exact {
            return Some(&e.path);
        }
        self.entries
            .iter()
            .filter(|e| e.value_span.start <= span.start && span.end <= e.value_span.end)
            .min_by_key(|e| (e.value_span.end - e.value_span.start, usize::MAX - e.depth))
            .map(|e| e.path.as_str())
    }
}

/// Remove, anywhere below `table`, the key whose key span is `span`. Returns whether one was
/// removed. Used to carry on after an unknown or mistyped field so every such field is reported.
pub(crate) fn remove_key_at(table: &mut DeTable<'_>, span: &Range<usize>) -> bool {
    let found = table
        .iter()
        .find(|(k, v)| k.span() == *span || v.span() == *span)
        .map(|(k, _)| k.get_ref().to_string());
    if let Some(key) = found {
        table.remove(key.as_str());
        return true;
    }
    for (_, v) in table.iter_mut() {
        if remove_in_value(v.get_mut(), span) {
            return true;
        }
    }
    false
}

fn remove_in_value(v: &mut DeValue<'_>, span: &Range<usize>) -> bool {
    match v {
        DeValue::Table(t) => remove_key_at(t, span),
        DeValue::Array(a) => a.iter_mut().any(|e| remove_in_value(e.get_mut(), span)),
        _ => false,
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn line_col_counts_from_one_and_in_characters() {
        let text = "a = 1\nbé = \"x\"\n";
        assert_eq!(line_col(text, 0), (1, 1));
        assert_eq!(line_col(text, 4), (1, 5));
        // "bé" is 3 bytes; the '=' after "bé " is the 4th character of line 2.
        let eq = text.rfind('=').unwrap_or(0);
        assert_eq!(line_col(text, eq), (2, 4));
        // Past the end and inside a multi-byte character: no panic, sensible answer.
        assert_eq!(line_col(text, 10_000), (3, 1));
        assert_eq!(line_col(text, 8), (2, 2));
    }

    #[test]
    fn did_you_mean_catches_typos_and_missing_suffixes() {
        let fields = ["cover_tilt_deg", "front_wall_mm", "brine_depth_mm"];
        assert_eq!(
            did_you_mean("cover_tlt_deg", fields),
            Some("cover_tilt_deg")
        );
        assert_eq!(did_you_mean("cover_tilt", fields), Some("cover_tilt_deg"));
        assert_eq!(
            did_you_mean("brine_depht_mm", fields),
            Some("brine_depth_mm")
        );
        assert_eq!(did_you_mean("colour", fields), None);
    }

    #[test]
    fn paths_are_one_based_and_found_from_spans() {
        let text = "[[variant]]\nname = \"a\"\n[[variant]]\nname = \"b\"\ntilt = [1, 2]\n";
        let doc = DeTable::parse(text).unwrap();
        let idx = SpanIndex::new(doc.get_ref());
        let span = idx.value_span("variant[2].tilt[2]").unwrap();
        assert_eq!(&text[span.clone()], "2");
        assert_eq!(idx.path_at(&span), Some("variant[2].tilt[2]"));
        let key = idx.key_span("variant[2].name").unwrap();
        assert_eq!(line_col(text, key.start), (4, 1));
    }
}
