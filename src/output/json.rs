//! The one JSON writer: every `--format json` output is one document, a JSON object whose
//! first field is `schema_version` ([`SCHEMA_VERSION`]), written by [`write_document`].

use std::io::{self, Write};

use serde::Serialize;

/// The version of the JSON output contract (docs/output.md). It goes up when a documented
/// field is renamed or removed or changes its meaning; added fields do not change it.
pub const SCHEMA_VERSION: u32 = 1;

#[derive(Serialize)]
struct Versioned<'a, T: ?Sized> {
    schema_version: u32,
    #[serde(flatten)]
    body: &'a T,
}

/// Write `body` (a struct or map; anything else is an error) as one pretty-printed JSON object
/// with `schema_version` first, and a final newline.
pub fn write_document<T: Serialize + ?Sized>(
    w: &mut (impl Write + ?Sized),
    body: &T,
) -> io::Result<()> {
    let doc = Versioned {
        schema_version: SCHEMA_VERSION,
        body,
    };
    serde_json::to_writer_pretty(&mut *w, &doc).map_err(io::Error::other)?;
    writeln!(w)
}

/// The document as a string (for tests and for callers that want the text).
pub fn to_document_string<T: Serialize + ?Sized>(body: &T) -> io::Result<String> {
    let mut buf = Vec::new();
    write_document(&mut buf, body)?;
    String::from_utf8(buf).map_err(io::Error::other)
}
