//! The design file: schema (serde), parsing with spans, validation with field-path errors.

use std::fmt;
use std::path::PathBuf;

/// One problem found in a design file or a file it references.
#[derive(Debug, Clone, PartialEq)]
pub struct DesignIssue {
    /// The file the problem is in.
    pub file: PathBuf,
    /// 1-based line and column of the offending value or key, where known.
    pub line_col: Option<(usize, usize)>,
    /// Field path, e.g. `variant[2].cover_tilt_deg` (empty for whole-file problems).
    pub path: String,
    /// What is wrong and what is allowed.
    pub message: String,
}

impl fmt::Display for DesignIssue {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        write!(f, "{}", self.file.display())?;
        if let Some((l, c)) = self.line_col {
            write!(f, ":{l}:{c}")?;
        }
        if self.path.is_empty() {
            write!(f, ": {}", self.message)
        } else {
            write!(f, ": {}: {}", self.path, self.message)
        }
    }
}

/// Every problem found in a design; never empty.
#[derive(Debug, Clone, PartialEq)]
pub struct DesignErrors(pub Vec<DesignIssue>);

impl fmt::Display for DesignErrors {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        for (i, issue) in self.0.iter().enumerate() {
            if i > 0 {
                writeln!(f)?;
            }
            write!(f, "{issue}")?;
        }
        Ok(())
    }
}

impl std::error::Error for DesignErrors {}
