//! Writing files so that nothing is lost: a file is written to a temporary name beside its
//! target and renamed into place only when complete, and an existing file is replaced only
//! when the caller says so.
//!
//! The output contract (docs/output.md) lives here too: [`json`] writes every JSON document
//! (one object with `schema_version`), [`table`] every CSV table (one rectangular table, the
//! csv crate).

pub mod json;
pub mod table;

pub use json::{SCHEMA_VERSION, write_document};
pub use table::{Table, TableChoice, TableSpec};

use std::fs;
use std::io::{self, BufWriter, Write};
use std::path::{Path, PathBuf};

use crate::Error;

/// Write `path` atomically: `fill` writes the content into a temporary file in the same
/// folder, which is flushed, synced and renamed over `path` only if `fill` succeeded.
///
/// An existing `path` is an error unless `overwrite` is true; the error tells the user to pass
/// `--force`. A failure at any point removes the temporary file and leaves any earlier file
/// untouched.
pub fn write_atomic<F>(path: &Path, overwrite: bool, fill: F) -> Result<(), Error>
where
    F: FnOnce(&mut dyn Write) -> io::Result<()>,
{
    let io_err = |source: io::Error| Error::Io {
        path: path.display().to_string(),
        source,
    };
    if path.exists() && !overwrite {
        return Err(Error::Refused {
            path: path.display().to_string(),
            reason: "it already exists; pass --force to replace it".into(),
        });
    }
    let tmp = temporary_sibling(path);
    let result = (|| {
        let file = fs::File::create(&tmp)?;
        let mut w = BufWriter::new(file);
        fill(&mut w)?;
        let file = w.into_inner().map_err(|e| e.into_error())?;
        file.sync_all()?;
        fs::rename(&tmp, path)
    })();
    if let Err(e) = result {
        // Best effort: the temporary file may not exist if creating it failed.
        let _ = fs::remove_file(&tmp);
        return Err(io_err(e));
    }
    Ok(())
}

/// A hidden temporary name beside `path`, unique to this process.
pub fn temporary_sibling(path: &Path) -> PathBuf {
    let name = path
        .file_name()
        .map(|n| n.to_string_lossy().into_owned())
        .unwrap_or_else(|| "output".into());
    path.with_file_name(format!(".{name}.tmp-{}", std::process::id()))
}

/// Escape text for XML, SVG or HTML content and attribute values (`& < > " '`); line breaks
/// are kept. The one escaper of the report, its charts, the drawings and the calibration
/// charts.
pub fn escape_markup(s: &str) -> String {
    let mut out = String::with_capacity(s.len());
    for c in s.chars() {
        match c {
            '&' => out.push_str("&amp;"),
            '<' => out.push_str("&lt;"),
            '>' => out.push_str("&gt;"),
            '"' => out.push_str("&quot;"),
            '\'' => out.push_str("&#39;"),
            c => out.push(c),
        }
    }
    out
}
