//! Library-level errors and the process exit codes they map to (DESIGN.md, "Exit codes").

use crate::design::DesignErrors;

/// Process exit codes. They are part of the command-line contract and documented in README.md.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum ExitCode {
    /// 0 — success.
    Success = 0,
    /// 1 — an internal error (a bug in stillbench, or an I/O failure outside the user's input).
    Internal = 1,
    /// 2 — bad input: a file, field or value the user gave is wrong.
    BadInput = 2,
    /// 3 — the model could not produce a trustworthy result for a valid design
    /// (no convergence, energy residual over its bound).
    Untrustworthy = 3,
}

/// Every error the library reports to a caller.
#[derive(Debug, thiserror::Error)]
#[non_exhaustive]
pub enum Error {
    /// The design file (or a file it references) is invalid. Carries every problem found.
    #[error(transparent)]
    Design(#[from] DesignErrors),
    /// A valid design for which the model could not produce a trustworthy number.
    #[error("model could not give a trustworthy result for variant `{variant}`{at}: {reason}")]
    Model {
        /// The variant's name.
        variant: String,
        /// Where in time it happened (", month 6, hour 13.5"), or empty.
        at: String,
        /// Why (no convergence, energy residual …).
        reason: String,
    },
    /// The user asked for something the tool refuses to do as asked (e.g. overwrite a file
    /// without `--force`).
    #[error("refusing to write {path}: {reason}")]
    Refused {
        /// The file involved.
        path: String,
        /// Why, and how to proceed.
        reason: String,
    },
    /// Reading or writing a file failed.
    #[error("{path}: {source}")]
    Io {
        /// The file involved.
        path: String,
        /// The underlying error.
        source: std::io::Error,
    },
}

impl Error {
    /// The exit code this error maps to.
    pub fn exit_code(&self) -> ExitCode {
        match self {
            Error::Design(_) => ExitCode::BadInput,
            Error::Model { .. } => ExitCode::Untrustworthy,
            Error::Refused { .. } => ExitCode::BadInput,
            Error::Io { .. } => ExitCode::Internal,
        }
    }
}
