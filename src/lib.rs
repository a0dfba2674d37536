//! stillbench — design, simulate, compare and cost solar water stills.
//!
//! The library holds everything a Rust user could call; the `stillbench` binary only parses
//! arguments, calls into this crate, prints and chooses an exit code. Data flows one way:
//! design file → [`design`] (parse + validate) → site climate → each still variant's thermal
//! network → solver → results → comparison → report. See `DEVELOPERS.md` for the map.
//!
//! Units are SI internally; every quantity carries its unit in its name (`_k`, `_pa`, `_w_m2`,
//! `_kg_s`, …). The glossary lives in `DEVELOPERS.md`.
#![deny(missing_docs)]
#![deny(clippy::float_cmp)]

pub mod calibrate;
pub mod cautions;
pub mod climate;
pub mod compare;
pub mod design;
pub mod economics;
pub mod error;
pub mod network;
pub mod operation;
pub mod output;
pub mod physics;
pub mod report;
pub mod stills;
pub mod workshop;

pub use error::{Error, ExitCode};

/// The version of stillbench, as recorded in reports for reproducibility.
pub const VERSION: &str = env!("CARGO_PKG_VERSION");
