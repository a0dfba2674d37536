//! The design file: schema (serde), parsing with spans, validation with field-path errors.
//!
//! A design is read in two steps. First the TOML is parsed into a spanned tree, the tag
//! fields (`kind` of a variant, `source` of a climate) are read from it, and each part is
//! deserialized from its own sub-table, so every serde error keeps its position and unknown
//! fields are rejected. Then a validation pass checks every range, cross-field rule and
//! material reference. Every problem found is returned at once as [`DesignErrors`]; each names
//! the file, the 1-based line and column, the field path (array indices 1-based, e.g.
//! `variant[2].cover_tilt_deg`), the value given and what is allowed.
//!
//! The file format is documented in `docs/design-file.md`.

use std::fmt;
use std::path::{Path, PathBuf};

mod alternatives;
mod calibration;
mod climate_inputs;
mod costs;
mod library;
mod measured;
mod operation;
mod parse;
mod reader;
mod risks;
mod schema;
pub mod spans;
mod summary;
mod validate;

pub use alternatives::{Alternative, MAX_COST_PER_LITRE, MAX_LIST_ENTRIES};
pub use calibration::{
    BASE_LOSS_FACTOR_RANGE, COVER_EMISSIVITY_RANGE, COVER_TRANSMITTANCE_FACTOR_RANGE, Calibration,
    CalibrationFactors, DISTILLATE_FACTOR_RANGE,
};
pub use climate_inputs::EPW_WIND_HEIGHT_M;
pub use costs::{ComplexityWeights, Costs, LabourRates, OperatorTasks, PartItems, Substitutes};
pub use library::{
    Condensate, CoverProps, InsulationProps, Item, Library, LibraryHeader, PlateProps, ROLE_NAMES,
    Role, Stock, SurfaceProps, Unit, WickProps,
};
pub use measured::{DistillateCounting, DistillateUnit, MeasuredColumns};
pub use operation::{
    DEFAULT_BAND_MM, DEFAULT_CONTROL_INTERVAL_S, DEFAULT_DELAY_S, DEFAULT_FLUSH_HOUR,
    DEFAULT_FLUSH_RATIO, DEFAULT_REFILL_HOURS, DEFAULT_VALVE_MAX_L_H, DEFAULT_WETTING_DEPTH_MM,
    FeedMode, FlushMode, Operation, OperationIssue,
};
pub use risks::{
    DEFAULT_RISK_IDS, DEFAULT_RISK_SOURCE, Level, Risk, RiskEntry, RiskOrigin, default_risks,
    merged_risks,
};
pub use schema::{
    BasinKind, Climate, Columns, DAYS_IN_MONTH, DEFAULT_LITRES_PER_PERSON_DAY, DEFAULT_RH_PERCENT,
    DEFAULT_SOILING_TRANSMITTANCE, DEMAND_MAX_L_PER_DAY, DEMAND_MAX_L_PER_PERSON_DAY,
    DEMAND_MAX_PEOPLE, DRINKING_AND_COOKING_L_PER_PERSON_DAY, DRINKING_L_PER_PERSON_DAY, Demand,
    Design, DoubleSlope, GapFill, HorizonPoint, Humidity, InternalCorrelation, KIND_NAMES, Layer,
    LossSwitches, MIN_BRINE_DEPTH_MM, MonthlyClimate, MultiEffect, Period, Project,
    STEPPED_MIN_CLEARANCE_MM, SingleSlope, Sink, Site, Stepped, Variant, VariantKind, WeatherFile,
    WeatherFormat, Wick, demand_problems,
};
pub use summary::write_summary;
pub use validate::basin_of;

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

/// A design that parsed and validated, with its materials library.
#[derive(Debug, Clone, PartialEq)]
pub struct LoadedDesign {
    /// The design.
    pub design: Design,
    /// Its materials library.
    pub library: Library,
    /// The design file it came from.
    pub source: PathBuf,
    /// The materials library file it came from.
    pub library_path: PathBuf,
    /// Things that are allowed but probably not meant (e.g. a cover tilt below 10°).
    pub warnings: Vec<DesignIssue>,
}

/// The built-in demo design (an invented coastal site at 14° N with one variant of each kind).
pub const DEMO_DESIGN: &str = include_str!("../../designs/demo-coast.toml");

/// The materials library the demo design uses (invented demo prices).
pub const DEMO_LIBRARY: &str = include_str!("../../designs/materials/demo-market.toml");

/// Where the demo design claims to live, for messages.
const DEMO_DESIGN_PATH: &str = "designs/demo-coast.toml";
/// Where the demo library claims to live.
const DEMO_LIBRARY_PATH: &str = "designs/materials/demo-market.toml";

/// Read, parse and validate a design file and the materials library it names.
///
/// Relative paths inside the file are resolved against the file's directory. Invalid UTF-8,
/// an empty file, a missing or unreadable file: all are [`DesignErrors`].
pub fn load_design(path: &Path) -> Result<LoadedDesign, DesignErrors> {
    let whole = |message: String| {
        DesignErrors(vec![DesignIssue {
            file: path.to_path_buf(),
            line_col: None,
            path: String::new(),
            message,
        }])
    };
    let bytes =
        std::fs::read(path).map_err(|e| whole(format!("cannot read the design file: {e}")))?;
    let text = reader::decode(path, &bytes).map_err(|e| DesignErrors(vec![e]))?;
    let base = path.parent().unwrap_or(Path::new("."));
    parse_design_str(&text, path, base)
}

/// Parse and validate a design given as text. `origin` names it in messages; `base_dir` is
/// where its relative paths (materials library, weather file) are resolved.
pub fn parse_design_str(
    text: &str,
    origin: &Path,
    base_dir: &Path,
) -> Result<LoadedDesign, DesignErrors> {
    parse::parse_design(text, origin, base_dir, &parse::Disk)
}

/// Parse and validate a materials library given as bytes; `origin` names it in messages.
pub fn parse_library(bytes: &[u8], origin: &Path) -> Result<Library, DesignErrors> {
    parse::load_library(origin, bytes).map_err(DesignErrors)
}

/// The embedded designs' files: nothing is read from disk; the one file they may refer to is
/// the embedded demo materials library.
struct DemoFiles;

/// `path` with `.` and `name/..` pairs removed, lexically (no disk access).
fn lexical_normal(path: &Path) -> std::path::PathBuf {
    use std::path::Component;
    let mut out: Vec<Component> = Vec::new();
    for c in path.components() {
        match c {
            Component::CurDir => {}
            Component::ParentDir if matches!(out.last(), Some(Component::Normal(_))) => {
                out.pop();
            }
            c => out.push(c),
        }
    }
    out.iter().collect()
}

impl parse::Files for DemoFiles {
    fn read(&self, path: &Path) -> std::io::Result<Vec<u8>> {
        if self.is_file(path) {
            Ok(DEMO_LIBRARY.as_bytes().to_vec())
        } else {
            Err(std::io::Error::new(
                std::io::ErrorKind::NotFound,
                "a built-in design holds only the demo materials library",
            ))
        }
    }
    fn is_file(&self, path: &Path) -> bool {
        lexical_normal(path) == Path::new(DEMO_LIBRARY_PATH)
    }
}

/// A design built into the binary (`text`, named `path` in messages, e.g.
/// `designs/validation/basin-chennai.toml`), whose materials may only be the embedded demo
/// library (given relative to `path`'s folder as in the source tree). Reads nothing from disk.
pub fn load_embedded(text: &str, path: &str) -> Result<LoadedDesign, DesignErrors> {
    let origin = Path::new(path);
    let base = origin.parent().unwrap_or(Path::new(""));
    parse::parse_design(text, origin, base, &DemoFiles)
}

/// The built-in demo design, so commands run with no file given. Reads nothing from disk.
pub fn load_demo() -> Result<LoadedDesign, DesignErrors> {
    parse::parse_design(
        DEMO_DESIGN,
        Path::new(DEMO_DESIGN_PATH),
        Path::new("designs"),
        &DemoFiles,
    )
}
