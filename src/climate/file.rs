//! Hourly (or sub-hourly) weather files: CSV with named columns, and EPW typical-year files.
//!
//! **Line numbers** in every issue are 1-based *file lines* as an editor shows them: in a CSV
//! file the header is line 1 and the first data row line 2; in an EPW file the first data
//! row is line 9. A problem about a missing period (a gap in the timestamps) names the lines
//! on both sides of the gap.
//!
//! What is checked, and what happens:
//! * text that is not UTF-8, an empty file, a missing column, a row with the wrong number of
//!   fields, an unreadable timestamp or number — an error;
//! * timestamps out of order or spaced irregularly — an error;
//! * duplicated timestamps — an error with [`GapFill::Stop`]; with [`GapFill::Linear`] the
//!   later row is dropped with a warning;
//! * physically impossible values — irradiance more negative than sensor noise
//!   ([`SENSOR_NOISE_W_M2`]), irradiance above noise while the sun is below the horizon for
//!   the whole period, irradiance above the extraterrestrial value, diffuse above global,
//!   temperatures, humidity or wind outside their ranges, dew point above air temperature —
//!   are reported and then treated as missing;
//! * missing values and missing periods are filled by linear interpolation when the design
//!   asks for it and the gap is short enough (a warning per gap), otherwise an error.
//!
//! The sun position of every record is taken at the middle of its period (the period's
//! convention — ending, beginning or centred at the stamp — comes from the design; EPW files
//! are always period-ending), and the night check uses the extraterrestrial irradiation over
//! the whole period, so the sunrise and sunset rows are not flagged.

use super::sun_table::period_geometry;
use super::{
    ClimateError, Horizon, HourlyWeather, Plane, SiteLocation, WeatherSeries, WeatherSource,
};
use crate::physics::constants::ZERO_CELSIUS_K;
use crate::physics::irradiance::erbs_diffuse_fraction;
use crate::physics::sun::{extraterrestrial_normal_w_m2, solar_time_hours};
use chrono::{DateTime, Datelike, NaiveDate, NaiveDateTime};
use std::collections::HashMap;
use std::fmt;
use std::path::{Path, PathBuf};

/// Irradiance a pyranometer may read below zero, or above zero at night, from thermal
/// offsets and noise before it counts as wrong [W m⁻²] (common practice, no source).
pub const SENSOR_NOISE_W_M2: f64 = 10.0;

/// Wind speed used when a file has no wind column [m s⁻¹]: 2 m/s, the value Allen et al.
/// (1998, FAO Irrigation and Drainage Paper 56, ch. 3) suggest where no wind data exist
/// (from memory).
pub const DEFAULT_WIND_M_S: f64 = 2.0;

/// Height of the wind speed in EPW files \[m\] (the format's convention of a standard 10 m
/// station mast; common practice, no source).
pub const EPW_WIND_HEIGHT_M: f64 = 10.0;

/// File formats understood.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum FileFormat {
    /// Comma-separated values with a header row and the columns named in a [`ColumnMap`].
    Csv,
    /// EnergyPlus weather format: 8 header lines, then 35 comma-separated fields per hour.
    Epw,
}

/// What time a value's timestamp refers to.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Default)]
pub enum PeriodConvention {
    /// The value is the mean over the period *ending* at the stamp (most loggers, EPW).
    #[default]
    Ending,
    /// The value is the mean over the period *beginning* at the stamp.
    Beginning,
    /// The stamp is the middle of the period.
    Centred,
}

/// What to do with missing or rejected values.
#[derive(Debug, Clone, Copy, PartialEq)]
pub enum GapFill {
    /// Any gap is an error.
    Stop,
    /// Interpolate linearly across gaps of at most `max_gap_h` hours; longer gaps are errors.
    Linear {
        /// Longest gap filled \[h\].
        max_gap_h: f64,
    },
}

/// Irradiance units in a CSV column.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Default)]
pub enum IrradianceUnit {
    /// W m⁻² (period mean).
    #[default]
    WM2,
    /// kW m⁻² (period mean).
    KwM2,
}

/// Temperature units in a CSV column.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Default)]
pub enum TemperatureUnit {
    /// Degrees Celsius.
    #[default]
    Celsius,
    /// Kelvin.
    Kelvin,
    /// Degrees Fahrenheit.
    Fahrenheit,
}

/// Speed units in a CSV column.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Default)]
pub enum SpeedUnit {
    /// m s⁻¹.
    #[default]
    MS,
    /// km h⁻¹.
    KmH,
    /// Knots.
    Knot,
}

/// Relative-humidity units in a CSV column.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Default)]
pub enum HumidityUnit {
    /// Percent, 0…100.
    #[default]
    Percent,
    /// Fraction, 0…1.
    Fraction,
}

/// A named CSV column and its unit.
#[derive(Debug, Clone, PartialEq)]
pub struct Column<U> {
    /// Header name (matched ignoring case and surrounding spaces).
    pub name: String,
    /// Unit of the values.
    pub unit: U,
}

impl<U: Default> Column<U> {
    /// A column in the default unit (W m⁻², °C, m s⁻¹, %).
    pub fn named(name: &str) -> Self {
        Self {
            name: name.to_string(),
            unit: U::default(),
        }
    }
}

/// A measured plane-of-array irradiance column and the plane of its sensor.
#[derive(Debug, Clone, PartialEq)]
pub struct PoaColumn {
    /// The column.
    pub column: Column<IrradianceUnit>,
    /// Plane the pyranometer was mounted in (normally the pilot still's cover).
    pub plane: Plane,
}

/// Which CSV columns hold what. EPW files ignore it.
#[derive(Debug, Clone, PartialEq)]
pub struct ColumnMap {
    /// Timestamp column: ISO 8601 / RFC 3339 (`2026-03-01T13:00:00+03:00`,
    /// `2026-03-01 13:00`, `2026-03-01T13:00Z`). Stamps without an offset are in
    /// `utc_offset_h`.
    pub timestamp: String,
    /// UTC offset of stamps that carry none \[h\]; `None` means the site's standard time.
    pub utc_offset_h: Option<f64>,
    /// Global horizontal irradiance (required).
    pub ghi: Column<IrradianceUnit>,
    /// Diffuse horizontal irradiance; estimated by Erbs et al.'s hourly correlation if absent.
    pub dhi: Option<Column<IrradianceUnit>>,
    /// Direct normal irradiance.
    pub dni: Option<Column<IrradianceUnit>>,
    /// Air temperature (required).
    pub t_air: Column<TemperatureUnit>,
    /// Wind speed; [`DEFAULT_WIND_M_S`] if absent.
    pub wind: Option<Column<SpeedUnit>>,
    /// Relative humidity.
    pub relative_humidity: Option<Column<HumidityUnit>>,
    /// Dew point (used instead of relative humidity when both are given).
    pub dew_point: Option<Column<TemperatureUnit>>,
    /// Measured plane-of-array irradiance.
    pub poa: Option<PoaColumn>,
}

impl Default for ColumnMap {
    fn default() -> Self {
        Self {
            timestamp: "timestamp".into(),
            utc_offset_h: None,
            ghi: Column::named("ghi_w_m2"),
            dhi: None,
            dni: None,
            t_air: Column::named("t_air_c"),
            wind: None,
            relative_humidity: None,
            dew_point: None,
            poa: None,
        }
    }
}

/// How to read one weather file.
#[derive(Debug, Clone, PartialEq)]
pub struct WeatherFileSpec {
    /// The file.
    pub path: PathBuf,
    /// Its format.
    pub format: FileFormat,
    /// What the timestamps refer to (ignored for EPW, which is period-ending).
    pub period: PeriodConvention,
    /// Column names and units (ignored for EPW).
    pub columns: ColumnMap,
    /// Gap handling.
    pub gap_fill: GapFill,
    /// Height of the wind measurement \[m\] (ignored for EPW: 10 m).
    pub wind_height_m: f64,
}

/// How serious an issue is.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Severity {
    /// The file cannot be used as it is.
    Error,
    /// Something was repaired or assumed; the file was used.
    Warning,
}

/// What is wrong at a line.
#[derive(Debug, Clone, PartialEq)]
#[non_exhaustive]
pub enum IssueKind {
    /// The file could not be read.
    Unreadable(String),
    /// The bytes are not UTF-8 text.
    NotText,
    /// No data rows.
    NoData,
    /// A named column is not in the header.
    MissingColumn {
        /// The name looked for.
        name: String,
        /// The header's names.
        available: Vec<String>,
    },
    /// The EPW header is malformed.
    BadHeader(String),
    /// A row has the wrong number of fields.
    FieldCount {
        /// Fields expected (at least).
        expected: usize,
        /// Fields found.
        found: usize,
    },
    /// A timestamp could not be read.
    BadTimestamp(String),
    /// A value could not be read as a number.
    BadNumber {
        /// Column.
        column: String,
        /// The text.
        text: String,
    },
    /// A timestamp repeats an earlier one.
    Duplicate {
        /// Line of the first occurrence.
        first_line: usize,
    },
    /// A timestamp is earlier than the one before.
    OutOfOrder {
        /// Line of the previous row.
        previous_line: usize,
    },
    /// Timestamps are not a whole number of steps apart.
    IrregularStep {
        /// The usual step \[min\].
        step_min: i64,
        /// The step found \[min\].
        found_min: i64,
    },
    /// A value is missing or was rejected and could not be filled.
    Gap {
        /// Column.
        column: String,
        /// Consecutive periods missing.
        periods: usize,
        /// Their duration \[h\].
        hours: f64,
    },
    /// Missing periods or values were filled by interpolation.
    Filled {
        /// Column (or "all" for missing periods).
        column: String,
        /// Consecutive periods filled.
        periods: usize,
    },
    /// Periods are missing between two lines.
    MissingPeriods {
        /// Line before the gap.
        after_line: usize,
        /// Periods missing.
        periods: usize,
    },
    /// Irradiance more negative than sensor noise.
    NegativeIrradiance {
        /// Column.
        column: String,
        /// Value [W m⁻²].
        value_w_m2: f64,
    },
    /// Irradiance while the sun is below the horizon for the whole period.
    NightIrradiance {
        /// Column.
        column: String,
        /// Value [W m⁻²].
        value_w_m2: f64,
    },
    /// Irradiance above what reaches the top of the atmosphere.
    AboveExtraterrestrial {
        /// Column.
        column: String,
        /// Value [W m⁻²].
        value_w_m2: f64,
        /// The limit [W m⁻²].
        limit_w_m2: f64,
    },
    /// Diffuse horizontal above global horizontal.
    DiffuseAboveGlobal {
        /// Diffuse [W m⁻²].
        dhi_w_m2: f64,
        /// Global [W m⁻²].
        ghi_w_m2: f64,
    },
    /// A value outside its physical range.
    OutOfRange {
        /// Column.
        column: String,
        /// Value (in SI / °C / %).
        value: f64,
        /// Allowed range.
        range: (f64, f64),
    },
    /// The EPW file's location differs from the design's site.
    SiteMismatch(String),
}

/// One problem found in a weather file.
#[derive(Debug, Clone, PartialEq)]
pub struct WeatherIssue {
    /// 1-based file line (None for whole-file problems).
    pub line: Option<usize>,
    /// Error or warning.
    pub severity: Severity,
    /// What is wrong.
    pub kind: IssueKind,
}

impl fmt::Display for IssueKind {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        use IssueKind::*;
        match self {
            Unreadable(e) => write!(f, "cannot read the file: {e}"),
            NotText => write!(f, "not UTF-8 text"),
            NoData => write!(f, "no data rows (at least two are needed)"),
            MissingColumn { name, available } => write!(
                f,
                "column `{name}` not found; the header has: {}",
                available.join(", ")
            ),
            BadHeader(s) => write!(f, "bad header: {s}"),
            FieldCount { expected, found } => {
                write!(f, "{found} fields, expected {expected}")
            }
            BadTimestamp(s) => write!(f, "cannot read timestamp `{s}`"),
            BadNumber { column, text } => write!(f, "{column}: `{text}` is not a number"),
            Duplicate { first_line } => {
                write!(f, "timestamp repeats the one on line {first_line}")
            }
            OutOfOrder { previous_line } => {
                write!(
                    f,
                    "timestamp is earlier than the one on line {previous_line}"
                )
            }
            IrregularStep {
                step_min,
                found_min,
            } => write!(
                f,
                "{found_min} min after the previous row, not a multiple of the {step_min} min step"
            ),
            Gap {
                column,
                periods,
                hours,
            } => write!(
                f,
                "{column}: {periods} period(s) ({hours:.2} h) missing or rejected and not filled"
            ),
            Filled { column, periods } => {
                write!(
                    f,
                    "{column}: {periods} period(s) filled by linear interpolation"
                )
            }
            MissingPeriods {
                after_line,
                periods,
            } => write!(f, "{periods} period(s) missing after line {after_line}"),
            NegativeIrradiance { column, value_w_m2 } => write!(
                f,
                "{column} = {value_w_m2} W/m² is below −{SENSOR_NOISE_W_M2} W/m² (sensor noise)"
            ),
            NightIrradiance { column, value_w_m2 } => write!(
                f,
                "{column} = {value_w_m2} W/m² while the sun is below the horizon for the whole period"
            ),
            AboveExtraterrestrial {
                column,
                value_w_m2,
                limit_w_m2,
            } => write!(
                f,
                "{column} = {value_w_m2} W/m² exceeds the extraterrestrial {limit_w_m2:.0} W/m²"
            ),
            DiffuseAboveGlobal { dhi_w_m2, ghi_w_m2 } => {
                write!(f, "diffuse {dhi_w_m2} W/m² exceeds global {ghi_w_m2} W/m²")
            }
            OutOfRange {
                column,
                value,
                range,
            } => write!(f, "{column} = {value} outside {}…{}", range.0, range.1),
            SiteMismatch(s) => write!(f, "{s}"),
        }
    }
}

impl fmt::Display for WeatherIssue {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        let sev = match self.severity {
            Severity::Error => "error",
            Severity::Warning => "warning",
        };
        match self.line {
            Some(l) => write!(f, "line {l}: {sev}: {}", self.kind),
            None => write!(f, "{sev}: {}", self.kind),
        }
    }
}

/// A weather file that cannot be used, with every problem found.
#[derive(Debug, Clone, PartialEq)]
pub struct WeatherFileError {
    /// The file.
    pub path: PathBuf,
    /// Every issue (errors and warnings), in file order where possible.
    pub issues: Vec<WeatherIssue>,
}

impl WeatherFileError {
    /// The issues that are errors.
    pub fn errors(&self) -> impl Iterator<Item = &WeatherIssue> {
        self.issues.iter().filter(|i| i.severity == Severity::Error)
    }
}

/// Most issues listed in an error message (all are kept in [`WeatherFileError::issues`]).
const MAX_LISTED: usize = 50;

impl fmt::Display for WeatherFileError {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        let n = self.errors().count();
        write!(f, "{}: {n} error(s) in weather file", self.path.display())?;
        for issue in self.errors().take(MAX_LISTED) {
            write!(f, "\n  {issue}")?;
        }
        if n > MAX_LISTED {
            write!(f, "\n  … and {} more", n - MAX_LISTED)?;
        }
        Ok(())
    }
}

impl std::error::Error for WeatherFileError {}

/// A weather file read successfully.
#[derive(Debug, Clone, PartialEq)]
pub struct LoadedWeather {
    /// The records.
    pub series: WeatherSeries,
    /// Repairs and assumptions made (never errors).
    pub warnings: Vec<WeatherIssue>,
    /// The file's time step \[h\].
    pub step_h: f64,
}

// Field slots of a parsed row.
const GHI: usize = 0;
const DHI: usize = 1;
const DNI: usize = 2;
const TAIR: usize = 3;
const WIND: usize = 4;
const RH: usize = 5;
const DEW: usize = 6;
const POA: usize = 7;
const NF: usize = 8;
const FIELD_NAMES: [&str; NF] = [
    "global horizontal",
    "diffuse horizontal",
    "direct normal",
    "air temperature",
    "wind speed",
    "relative humidity",
    "dew point",
    "plane-of-array",
];

/// One parsed row: time in minutes of the site's standard time, values in W m⁻², °C, m s⁻¹,
/// RH as a fraction.
#[derive(Debug, Clone)]
struct Row {
    line: Option<usize>,
    minute: i64,
    v: [Option<f64>; NF],
}

/// Everything parsed from a file before checks.
struct Parsed {
    rows: Vec<Row>,
    present: [bool; NF],
    period: PeriodConvention,
    wind_height_m: f64,
    poa_plane: Option<Plane>,
}

struct Issues(Vec<WeatherIssue>);

impl Issues {
    fn error(&mut self, line: Option<usize>, kind: IssueKind) {
        self.0.push(WeatherIssue {
            line,
            severity: Severity::Error,
            kind,
        });
    }
    fn warn(&mut self, line: Option<usize>, kind: IssueKind) {
        self.0.push(WeatherIssue {
            line,
            severity: Severity::Warning,
            kind,
        });
    }
    fn has_errors(&self) -> bool {
        self.0.iter().any(|i| i.severity == Severity::Error)
    }
}

/// Read and check a weather file for a site. Never panics on any file content.
///
/// Returns the series and the warnings, or every problem found with its line.
pub fn load_weather_file(
    spec: &WeatherFileSpec,
    site: &SiteLocation,
) -> Result<LoadedWeather, ClimateError> {
    if let Some(p) = site.problems().first() {
        return Err(ClimateError::bad("site", p.clone()));
    }
    let bytes = std::fs::read(&spec.path).map_err(|e| {
        file_error(
            &spec.path,
            vec![WeatherIssue {
                line: None,
                severity: Severity::Error,
                kind: IssueKind::Unreadable(e.to_string()),
            }],
        )
    })?;
    parse_weather_bytes(&bytes, spec, site)
}

fn file_error(path: &Path, issues: Vec<WeatherIssue>) -> ClimateError {
    ClimateError::WeatherFile(WeatherFileError {
        path: path.to_path_buf(),
        issues,
    })
}

/// As [`load_weather_file`], from bytes already in memory (`spec.path` names them in
/// messages).
pub fn parse_weather_bytes(
    bytes: &[u8],
    spec: &WeatherFileSpec,
    site: &SiteLocation,
) -> Result<LoadedWeather, ClimateError> {
    let mut issues = Issues(Vec::new());
    let text = match std::str::from_utf8(bytes) {
        Ok(t) => t,
        Err(e) => {
            let line = bytes[..e.valid_up_to()]
                .iter()
                .filter(|&&b| b == b'\n')
                .count()
                + 1;
            issues.error(Some(line), IssueKind::NotText);
            return Err(file_error(&spec.path, issues.0));
        }
    };
    let parsed = match spec.format {
        FileFormat::Csv => parse_csv(text, spec, site, &mut issues),
        FileFormat::Epw => parse_epw(text, site, &mut issues),
    };
    let parsed = match parsed {
        Some(p) if !issues.has_errors() => p,
        _ => return Err(file_error(&spec.path, issues.0)),
    };
    match build_series(parsed, spec, site, &mut issues) {
        Some(loaded) if !issues.has_errors() => Ok(LoadedWeather {
            warnings: issues.0,
            ..loaded
        }),
        _ => Err(file_error(&spec.path, issues.0)),
    }
}

fn minutes_of(t: NaiveDateTime) -> i64 {
    t.and_utc().timestamp().div_euclid(60)
}

fn offset_minutes(h: f64) -> i64 {
    (h * 60.0).round() as i64
}

/// Parse a timestamp into minutes of the site's standard time (RFC 3339 or with an offset;
/// a trailing `Z` is UTC; naive stamps are at `naive_offset_h`). Shared with the pilot-record
/// reader of `calibrate`.
pub(crate) fn parse_timestamp(s: &str, naive_offset_h: f64, site_offset_h: f64) -> Option<i64> {
    let s = s.trim();
    let site = offset_minutes(site_offset_h);
    if let Ok(t) = DateTime::parse_from_rfc3339(s) {
        return Some(minutes_of(t.naive_utc()) + site);
    }
    for fmt in [
        "%Y-%m-%d %H:%M:%S%:z",
        "%Y-%m-%d %H:%M%:z",
        "%Y-%m-%dT%H:%M%:z",
    ] {
        if let Ok(t) = DateTime::parse_from_str(s, fmt) {
            return Some(minutes_of(t.naive_utc()) + site);
        }
    }
    let (body, utc) = match s.strip_suffix('Z') {
        Some(b) => (b, true),
        None => (s, false),
    };
    let off = if utc {
        0
    } else {
        offset_minutes(naive_offset_h)
    };
    for fmt in [
        "%Y-%m-%dT%H:%M:%S",
        "%Y-%m-%d %H:%M:%S",
        "%Y-%m-%dT%H:%M",
        "%Y-%m-%d %H:%M",
    ] {
        if let Ok(t) = NaiveDateTime::parse_from_str(body, fmt) {
            return Some(minutes_of(t) - off + site);
        }
    }
    None
}

/// Parse a number; `Ok(None)` for an empty or "NA"/"NaN" cell.
fn parse_value(text: &str) -> Result<Option<f64>, ()> {
    let t = text.trim();
    if t.is_empty() || t.eq_ignore_ascii_case("na") || t.eq_ignore_ascii_case("nan") {
        return Ok(None);
    }
    match t.parse::<f64>() {
        Ok(v) if v.is_finite() => Ok(Some(v)),
        _ => Err(()),
    }
}

fn irr_si(v: f64, u: IrradianceUnit) -> f64 {
    match u {
        IrradianceUnit::WM2 => v,
        IrradianceUnit::KwM2 => v * 1000.0,
    }
}

fn temp_c(v: f64, u: TemperatureUnit) -> f64 {
    match u {
        TemperatureUnit::Celsius => v,
        TemperatureUnit::Kelvin => v - ZERO_CELSIUS_K,
        TemperatureUnit::Fahrenheit => (v - 32.0) * 5.0 / 9.0,
    }
}

fn speed_si(v: f64, u: SpeedUnit) -> f64 {
    match u {
        SpeedUnit::MS => v,
        SpeedUnit::KmH => v / 3.6,
        SpeedUnit::Knot => v * 1852.0 / 3600.0,
    }
}

fn rh_fraction(v: f64, u: HumidityUnit) -> f64 {
    match u {
        HumidityUnit::Percent => v / 100.0,
        HumidityUnit::Fraction => v,
    }
}

type Converter = Box<dyn Fn(f64) -> f64>;

fn parse_csv(
    text: &str,
    spec: &WeatherFileSpec,
    site: &SiteLocation,
    issues: &mut Issues,
) -> Option<Parsed> {
    let cm = &spec.columns;
    let mut reader = csv::ReaderBuilder::new()
        .flexible(true)
        .has_headers(true)
        .trim(csv::Trim::All)
        .from_reader(text.as_bytes());
    let header: Vec<String> = match reader.headers() {
        Ok(h) => h.iter().map(|s| s.trim().to_string()).collect(),
        Err(e) => {
            issues.error(Some(1), IssueKind::BadHeader(e.to_string()));
            return None;
        }
    };
    let find = |name: &str, issues: &mut Issues| -> Option<usize> {
        let want = name.trim().to_lowercase();
        let idx = header.iter().position(|h| h.to_lowercase() == want);
        if idx.is_none() {
            issues.error(
                Some(1),
                IssueKind::MissingColumn {
                    name: name.to_string(),
                    available: header.clone(),
                },
            );
        }
        idx
    };
    let ts_idx = find(&cm.timestamp, issues);
    let mut cols: [Option<(usize, Converter)>; NF] = Default::default();
    macro_rules! map {
        ($slot:expr, $col:expr, $conv:expr) => {
            if let Some(c) = $col {
                let unit = c.unit;
                if let Some(i) = find(&c.name, issues) {
                    cols[$slot] = Some((i, Box::new(move |v| $conv(v, unit))));
                }
            }
        };
    }
    map!(GHI, Some(&cm.ghi), irr_si);
    map!(DHI, cm.dhi.as_ref(), irr_si);
    map!(DNI, cm.dni.as_ref(), irr_si);
    map!(TAIR, Some(&cm.t_air), temp_c);
    map!(WIND, cm.wind.as_ref(), speed_si);
    map!(RH, cm.relative_humidity.as_ref(), rh_fraction);
    map!(DEW, cm.dew_point.as_ref(), temp_c);
    map!(POA, cm.poa.as_ref().map(|p| &p.column), irr_si);
    let ts_idx = ts_idx?;
    if issues.has_errors() {
        return None;
    }
    let names: Vec<String> = (0..NF)
        .map(|k| {
            cols[k]
                .as_ref()
                .and_then(|(i, _)| header.get(*i).cloned())
                .unwrap_or_default()
        })
        .collect();
    let naive_offset = cm.utc_offset_h.unwrap_or(site.utc_offset_h);
    let mut rows = Vec::new();
    for rec in reader.records() {
        let rec = match rec {
            Ok(r) => r,
            Err(e) => {
                let line = e.position().map(|p| p.line() as usize);
                issues.error(line, IssueKind::BadHeader(e.to_string()));
                continue;
            }
        };
        let line = rec.position().map(|p| p.line() as usize);
        if rec.len() == 1 && rec.get(0).is_some_and(|s| s.trim().is_empty()) {
            continue; // blank line
        }
        if rec.len() != header.len() {
            issues.error(
                line,
                IssueKind::FieldCount {
                    expected: header.len(),
                    found: rec.len(),
                },
            );
            continue;
        }
        let ts = rec.get(ts_idx).unwrap_or("");
        let Some(minute) = parse_timestamp(ts, naive_offset, site.utc_offset_h) else {
            issues.error(line, IssueKind::BadTimestamp(ts.to_string()));
            continue;
        };
        let mut v = [None; NF];
        let mut ok = true;
        for k in 0..NF {
            if let Some((i, conv)) = &cols[k] {
                let cell = rec.get(*i).unwrap_or("");
                match parse_value(cell) {
                    Ok(x) => v[k] = x.map(conv),
                    Err(()) => {
                        issues.error(
                            line,
                            IssueKind::BadNumber {
                                column: names[k].clone(),
                                text: cell.to_string(),
                            },
                        );
                        ok = false;
                    }
                }
            }
        }
        if ok {
            rows.push(Row { line, minute, v });
        }
    }
    let present = std::array::from_fn(|k| cols[k].is_some());
    Some(Parsed {
        rows,
        present,
        period: spec.period,
        wind_height_m: spec.wind_height_m,
        poa_plane: cm.poa.as_ref().map(|p| p.plane),
    })
}

/// Most records a file may expand to, counting missing periods.
const MAX_RECORDS: usize = 10_000_000;

/// Fields of an EPW data row (EnergyPlus Auxiliary Programs, "Weather Data Format").
const EPW_FIELDS: usize = 35;

fn parse_epw(text: &str, site: &SiteLocation, issues: &mut Issues) -> Option<Parsed> {
    let lines: Vec<&str> = text.lines().collect();
    if lines.len() <= 8 {
        issues.error(None, IssueKind::NoData);
        return None;
    }
    // LOCATION,City,State,Country,Source,WMO,Latitude,Longitude,TimeZone,Elevation
    let loc: Vec<&str> = lines[0].split(',').map(str::trim).collect();
    let num = |i: usize| loc.get(i).and_then(|s| s.parse::<f64>().ok());
    let (lat, lon, tz) = match (loc.first(), num(6), num(7), num(8)) {
        (Some(&"LOCATION"), Some(lat), Some(lon), Some(tz)) => (lat, lon, tz),
        _ => {
            issues.error(
                Some(1),
                IssueKind::BadHeader(
                    "line 1 must be LOCATION,city,region,country,source,station,latitude,\
                     longitude,time zone,elevation"
                        .into(),
                ),
            );
            return None;
        }
    };
    if (lat - site.latitude_deg).abs() > 0.5
        || (lon - site.longitude_deg).abs() > 0.5
        || (tz - site.utc_offset_h).abs() > 0.01
    {
        issues.warn(
            Some(1),
            IssueKind::SiteMismatch(format!(
                "the file is for {lat}°, {lon}° (UTC{tz:+}) but the site is at {}°, {}° \
                 (UTC{:+}); the site's values are used",
                site.latitude_deg, site.longitude_deg, site.utc_offset_h
            )),
        );
    }
    let leap = lines[8..].iter().any(|l| {
        let f: Vec<&str> = l.split(',').take(3).map(str::trim).collect();
        f.len() == 3 && f[1] == "2" && f[2] == "29"
    });
    let year = if leap { 2000 } else { 2001 };
    let tz_min = offset_minutes(tz);
    let site_min = offset_minutes(site.utc_offset_h);
    let mut rows = Vec::with_capacity(lines.len() - 8);
    for (i, raw) in lines.iter().enumerate().skip(8) {
        let line = Some(i + 1);
        if raw.trim().is_empty() {
            continue;
        }
        let f: Vec<&str> = raw.split(',').map(str::trim).collect();
        if f.len() < EPW_FIELDS {
            issues.error(
                line,
                IssueKind::FieldCount {
                    expected: EPW_FIELDS,
                    found: f.len(),
                },
            );
            continue;
        }
        let int = |k: usize| f[k].parse::<u32>().ok();
        let stamp = match (int(1), int(2), int(3)) {
            (Some(mo), Some(d), Some(h)) if h <= 24 => NaiveDate::from_ymd_opt(year, mo, d)
                .and_then(|date| date.and_hms_opt(0, 0, 0))
                .map(|t| minutes_of(t) + i64::from(h) * 60),
            _ => None,
        };
        let Some(minute) = stamp else {
            issues.error(line, IssueKind::BadTimestamp(f[..5].join(",")));
            continue;
        };
        // EPW missing-value codes: temperatures 99.9, humidity 999, radiation 9999, wind 999.
        let mut ok = true;
        let mut read = |k: usize, name: &str, missing: f64| -> Option<f64> {
            match f[k].parse::<f64>() {
                Ok(v) if v.is_finite() && v < missing => Some(v),
                Ok(v) if v.is_finite() => None,
                _ => {
                    issues.error(
                        line,
                        IssueKind::BadNumber {
                            column: name.into(),
                            text: f[k].to_string(),
                        },
                    );
                    ok = false;
                    None
                }
            }
        };
        let mut v = [None; NF];
        v[TAIR] = read(6, "dry bulb temperature", 99.9);
        v[DEW] = read(7, "dew point temperature", 99.9);
        v[RH] = read(8, "relative humidity", 999.0).map(|x| x / 100.0);
        v[GHI] = read(13, "global horizontal radiation", 9999.0);
        v[DNI] = read(14, "direct normal radiation", 9999.0);
        v[DHI] = read(15, "diffuse horizontal radiation", 9999.0);
        v[WIND] = read(21, "wind speed", 999.0);
        if ok {
            rows.push(Row {
                line,
                minute: minute - tz_min + site_min,
                v,
            });
        }
    }
    let mut present = [true; NF];
    present[POA] = false;
    Some(Parsed {
        rows,
        present,
        period: PeriodConvention::Ending,
        wind_height_m: EPW_WIND_HEIGHT_M,
        poa_plane: None,
    })
}

fn line_or_zero(l: Option<usize>) -> usize {
    l.unwrap_or(0)
}

fn build_series(
    parsed: Parsed,
    spec: &WeatherFileSpec,
    site: &SiteLocation,
    issues: &mut Issues,
) -> Option<LoadedWeather> {
    let Parsed {
        rows: input,
        present,
        period,
        wind_height_m,
        poa_plane,
    } = parsed;
    if input.len() < 2 {
        issues.error(None, IssueKind::NoData);
        return None;
    }
    // An optional column that is empty (or all missing codes) in every row counts as absent,
    // not as a gap; the required ones (global horizontal, air temperature) stay and fail.
    let mut present = present;
    for k in [DHI, DNI, WIND, RH, DEW, POA] {
        if present[k] && input.iter().all(|r| r.v[k].is_none()) {
            present[k] = false;
        }
    }
    let filling = matches!(spec.gap_fill, GapFill::Linear { .. });
    // Order and duplicates.
    let mut rows: Vec<Row> = Vec::with_capacity(input.len());
    let mut seen: HashMap<i64, usize> = HashMap::new();
    for row in input {
        if let Some(&first) = seen.get(&row.minute) {
            let kind = IssueKind::Duplicate { first_line: first };
            if filling {
                issues.warn(row.line, kind);
            } else {
                issues.error(row.line, kind);
            }
            continue;
        }
        if let Some(prev) = rows.last()
            && row.minute < prev.minute
        {
            issues.error(
                row.line,
                IssueKind::OutOfOrder {
                    previous_line: line_or_zero(prev.line),
                },
            );
            continue;
        }
        seen.insert(row.minute, line_or_zero(row.line));
        rows.push(row);
    }
    if issues.has_errors() || rows.len() < 2 {
        if rows.len() < 2 {
            issues.error(None, IssueKind::NoData);
        }
        return None;
    }
    // The step: the most common difference.
    let mut counts: HashMap<i64, usize> = HashMap::new();
    for w in rows.windows(2) {
        *counts.entry(w[1].minute - w[0].minute).or_default() += 1;
    }
    let step = counts
        .iter()
        .max_by(|a, b| a.1.cmp(b.1).then(b.0.cmp(a.0)))
        .map_or(60, |(&d, _)| d);
    if !(1..=180).contains(&step) {
        issues.error(
            None,
            IssueKind::IrregularStep {
                step_min: step,
                found_min: step,
            },
        );
        return None;
    }
    // Insert placeholder rows for missing periods.
    let mut full: Vec<Row> = Vec::with_capacity(rows.len());
    for row in rows {
        if let Some(prev) = full.last() {
            let d = row.minute - prev.minute;
            if d % step != 0 {
                issues.error(
                    row.line,
                    IssueKind::IrregularStep {
                        step_min: step,
                        found_min: d,
                    },
                );
            } else if d > step {
                let missing = (d / step - 1) as usize;
                // Bound the records made for missing periods (a year of minutes per gap,
                // ten million in all) so a corrupt stamp cannot exhaust memory.
                if missing > 366 * 24 * 60 || full.len() + missing > MAX_RECORDS {
                    issues.error(
                        row.line,
                        IssueKind::MissingPeriods {
                            after_line: line_or_zero(prev.line),
                            periods: missing,
                        },
                    );
                    return None;
                }
                let after = prev.line;
                let base = prev.minute;
                let kind = IssueKind::MissingPeriods {
                    after_line: line_or_zero(after),
                    periods: missing,
                };
                if filling {
                    issues.warn(row.line, kind);
                } else {
                    issues.error(row.line, kind);
                }
                for k in 1..=missing as i64 {
                    full.push(Row {
                        line: None,
                        minute: base + k * step,
                        v: [None; NF],
                    });
                }
            }
        }
        full.push(row);
    }
    if issues.has_errors() {
        return None;
    }
    let step_h = step as f64 / 60.0;
    let latitude_rad = site.latitude_rad();
    let horizon = Horizon::from_degrees(&site.horizon);
    // Geometry per row, at the middle of its period.
    let geo: Vec<_> = full
        .iter()
        .map(|r| {
            let mid_min = match period {
                PeriodConvention::Ending => r.minute * 2 - step,
                PeriodConvention::Beginning => r.minute * 2 + step,
                PeriodConvention::Centred => r.minute * 2,
            }; // in half-minutes
            row_geometry(mid_min, step, latitude_rad, site, &horizon)
        })
        .collect();
    // Physical checks: impossible values are rejected and become gaps; the report is an
    // error when gaps stop the run, a warning when they are filled.
    let reject = |issues: &mut Issues, line: Option<usize>, kind: IssueKind| {
        if filling {
            issues.warn(line, kind);
        } else {
            issues.error(line, kind);
        }
    };
    for (r, g) in full.iter_mut().zip(&geo) {
        let line = r.line;
        for k in [GHI, DHI, DNI, POA] {
            let Some(x) = r.v[k] else { continue };
            let name = FIELD_NAMES[k].to_string();
            if x < -SENSOR_NOISE_W_M2 {
                reject(
                    issues,
                    line,
                    IssueKind::NegativeIrradiance {
                        column: name,
                        value_w_m2: x,
                    },
                );
                r.v[k] = None;
                continue;
            }
            if g.extra_h_w_m2 <= 0.0 {
                if x > SENSOR_NOISE_W_M2 {
                    reject(
                        issues,
                        line,
                        IssueKind::NightIrradiance {
                            column: name,
                            value_w_m2: x,
                        },
                    );
                    r.v[k] = None;
                } else {
                    r.v[k] = Some(0.0);
                }
                continue;
            }
            let limit = match k {
                GHI | DHI => g.extra_h_w_m2 + SENSOR_NOISE_W_M2,
                // A tilted plane can receive at most the extraterrestrial normal beam plus
                // the sky and ground (bounded here by a further 20 %; common practice).
                POA => 1.2 * g.dni_extra_w_m2,
                _ => g.dni_extra_w_m2 + SENSOR_NOISE_W_M2,
            };
            if x > limit {
                reject(
                    issues,
                    line,
                    IssueKind::AboveExtraterrestrial {
                        column: name,
                        value_w_m2: x,
                        limit_w_m2: limit,
                    },
                );
                r.v[k] = None;
                continue;
            }
            r.v[k] = Some(x.max(0.0));
        }
        if let (Some(gh), Some(dh)) = (r.v[GHI], r.v[DHI])
            && dh > gh + SENSOR_NOISE_W_M2
        {
            reject(
                issues,
                line,
                IssueKind::DiffuseAboveGlobal {
                    dhi_w_m2: dh,
                    ghi_w_m2: gh,
                },
            );
            r.v[DHI] = None;
        }
        let ranges = [
            (TAIR, -90.0, 70.0),
            (WIND, 0.0, 75.0),
            (RH, 0.0, 1.05),
            (DEW, -100.0, 60.0),
        ];
        for (k, lo, hi) in ranges {
            if let Some(x) = r.v[k]
                && (x < lo || x > hi)
            {
                reject(
                    issues,
                    line,
                    IssueKind::OutOfRange {
                        column: FIELD_NAMES[k].to_string(),
                        value: x,
                        range: (lo, hi),
                    },
                );
                r.v[k] = None;
            }
        }
        if let (Some(t), Some(d)) = (r.v[TAIR], r.v[DEW])
            && d > t + 0.5
        {
            reject(
                issues,
                line,
                IssueKind::OutOfRange {
                    column: "dew point above air temperature".into(),
                    value: d,
                    range: (-100.0, t),
                },
            );
            r.v[DEW] = None;
        }
    }
    fill_gaps(&mut full, &present, spec.gap_fill, step_h, issues);
    if issues.has_errors() {
        return None;
    }
    Some(LoadedWeather {
        series: to_series(
            &full,
            &geo,
            &present,
            site,
            (wind_height_m, step_h),
            poa_plane,
            spec,
        ),
        warnings: Vec::new(),
        step_h,
    })
}

struct RowGeo {
    month: u32,
    day_of_year: u32,
    local_day: i64,
    solar_mid_h: f64,
    sun: crate::physics::sun::SunPosition,
    extra_h_w_m2: f64,
    dni_extra_w_m2: f64,
    visible: f64,
}

/// Geometry of a period whose middle is `mid_half_min` half-minutes of site standard time.
fn row_geometry(
    mid_half_min: i64,
    step_min: i64,
    latitude_rad: f64,
    site: &SiteLocation,
    horizon: &Horizon,
) -> RowGeo {
    let mid_min = mid_half_min as f64 / 2.0;
    let day = (mid_min / 1440.0).floor();
    let minute_of_day = mid_min - day * 1440.0;
    let date = DateTime::from_timestamp(day as i64 * 86_400, 0)
        .map(|d| d.naive_utc())
        .unwrap_or_default();
    let n = date.ordinal().min(365);
    let lst_h = minute_of_day / 60.0;
    let solar_h = solar_time_hours(lst_h, site.utc_offset_h, site.longitude_deg, n);
    let omega = (solar_h - 12.0) * 15.0_f64.to_radians();
    let half_rad = step_min as f64 / 60.0 * 7.5_f64.to_radians();
    let (sun, extra_h, visible) =
        period_geometry(latitude_rad, n, omega - half_rad, omega + half_rad, horizon);
    RowGeo {
        month: date.month().clamp(1, 12),
        day_of_year: date.ordinal(),
        local_day: day as i64,
        solar_mid_h: solar_h.rem_euclid(24.0),
        sun,
        extra_h_w_m2: extra_h,
        dni_extra_w_m2: extraterrestrial_normal_w_m2(n),
        visible,
    }
}

fn fill_gaps(
    rows: &mut [Row],
    present: &[bool; NF],
    rule: GapFill,
    step_h: f64,
    issues: &mut Issues,
) {
    for k in 0..NF {
        if !present[k] {
            continue;
        }
        let mut i = 0;
        while i < rows.len() {
            if rows[i].v[k].is_some() {
                i += 1;
                continue;
            }
            let start = i;
            while i < rows.len() && rows[i].v[k].is_none() {
                i += 1;
            }
            let n = i - start;
            let hours = n as f64 * step_h;
            let line = rows[start].line.or(rows.get(i).and_then(|r| r.line));
            let fillable = match rule {
                GapFill::Stop => false,
                GapFill::Linear { max_gap_h } => start > 0 && i < rows.len() && hours <= max_gap_h,
            };
            if !fillable {
                issues.error(
                    line,
                    IssueKind::Gap {
                        column: FIELD_NAMES[k].to_string(),
                        periods: n,
                        hours,
                    },
                );
                continue;
            }
            let (a, b) = (rows[start - 1].v[k], rows[i].v[k]);
            if let (Some(a), Some(b)) = (a, b) {
                for (j, row) in rows[start..i].iter_mut().enumerate() {
                    let w = (j + 1) as f64 / (n + 1) as f64;
                    row.v[k] = Some(a + (b - a) * w);
                }
            }
            issues.warn(
                line,
                IssueKind::Filled {
                    column: FIELD_NAMES[k].to_string(),
                    periods: n,
                },
            );
        }
    }
}

fn to_series(
    rows: &[Row],
    geo: &[RowGeo],
    present: &[bool; NF],
    site: &SiteLocation,
    (wind_height_m, step_h): (f64, f64),
    poa_plane: Option<Plane>,
    spec: &WeatherFileSpec,
) -> WeatherSeries {
    // Daily minimum air temperature per local day, for the dew-point default.
    let mut day_min: HashMap<i64, f64> = HashMap::new();
    for (r, g) in rows.iter().zip(geo) {
        if let Some(t) = r.v[TAIR] {
            let e = day_min.entry(g.local_day).or_insert(t);
            *e = e.min(t);
        }
    }
    let hours = rows
        .iter()
        .zip(geo)
        .map(|(r, g)| {
            let t_air_c = r.v[TAIR].unwrap_or(0.0);
            let cz = g.sun.zenith_rad.cos();
            let mut ghi = r.v[GHI].unwrap_or(0.0);
            if g.extra_h_w_m2 <= 0.0 {
                ghi = 0.0;
            }
            let (mut dhi, mut dni) = match (
                present[DHI].then_some(r.v[DHI]).flatten(),
                present[DNI].then_some(r.v[DNI]).flatten(),
            ) {
                (Some(d), Some(b)) => (d.min(ghi), b),
                (Some(d), None) => {
                    let d = d.min(ghi);
                    (d, if cz > 0.0 { (ghi - d) / cz } else { 0.0 })
                }
                (None, Some(b)) => {
                    let d = (ghi - b * cz.max(0.0)).max(0.0);
                    (d, b)
                }
                (None, None) => {
                    // Real periods, not average days: Erbs et al.'s hourly correlation applies.
                    let kt = if g.extra_h_w_m2 > 0.0 {
                        (ghi / g.extra_h_w_m2).clamp(0.0, 1.0)
                    } else {
                        0.0
                    };
                    let d = ghi * erbs_diffuse_fraction(kt).clamp(0.0, 1.0);
                    (d, if cz > 0.0 { (ghi - d) / cz } else { 0.0 })
                }
            };
            if ghi <= 0.0 {
                dhi = 0.0;
                dni = 0.0;
            }
            if dni > g.dni_extra_w_m2 {
                dni = g.dni_extra_w_m2;
                dhi = (ghi - dni * cz.max(0.0)).max(0.0);
            }
            let t_dew_c = if let Some(d) = r.v[DEW] {
                d
            } else if let Some(rh) = r.v[RH] {
                crate::physics::humid_air::dew_point_k(
                    t_air_c + ZERO_CELSIUS_K,
                    rh.clamp(0.01, 1.0),
                ) - ZERO_CELSIUS_K
            } else {
                day_min.get(&g.local_day).copied().unwrap_or(t_air_c)
            };
            HourlyWeather {
                month: g.month,
                day_of_year: g.day_of_year,
                hour_mid_solar_h: g.solar_mid_h,
                period_h: step_h,
                ghi_w_m2: ghi,
                dhi_w_m2: dhi.max(0.0),
                dni_w_m2: dni.max(0.0),
                t_air_k: t_air_c + ZERO_CELSIUS_K,
                t_dew_k: t_dew_c.min(t_air_c) + ZERO_CELSIUS_K,
                wind_m_s: r.v[WIND].unwrap_or(DEFAULT_WIND_M_S),
                wind_height_m,
                sun: g.sun,
                dni_extra_w_m2: g.dni_extra_w_m2,
                extra_horizontal_w_m2: g.extra_h_w_m2,
                beam_visible_fraction: g.visible,
                measured_poa_w_m2: r.v[POA],
            }
        })
        .collect();
    WeatherSeries {
        hours,
        poa_plane,
        source: WeatherSource::File(spec.path.clone()),
        albedo: site.albedo,
    }
}
