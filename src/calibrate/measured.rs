//! Reading a pilot still's measured CSV file into hours the model can be compared with.
//!
//! The file has a timestamp, the plane-of-array irradiance measured in the plane of the
//! still's cover, the air temperature, optionally wind, global horizontal irradiance and
//! humidity, the distillate (per interval or as a running total, in mL, L, kg or L/m²) and
//! optionally brine, cover and liner temperatures; the columns and units come from
//! `[variant.calibration.measured]` ([`MeasuredColumns`]).
//!
//! What happens to the data (every case is reported in [`MeasuredSummary`], never silent):
//! * **Rows are put on an hourly grid.** Any step of an hour or less, regular or not, is
//!   accepted: each row covers the time from the row before it to its own stamp (for the
//!   `ending` convention), and a row that straddles the turn of an hour is shared between the
//!   two hours in proportion to the time. Weather is averaged over the hour by time; the
//!   distillate is summed. Steps that differ from the file's usual step by more than 10 %
//!   are counted as *irregular steps*.
//! * **Bad rows** (unreadable timestamp or number, a timestamp out of order or repeated) are
//!   rejected and listed with their 1-based file line (header = line 1).
//! * **Negative distillate** in an `interval` column, or a negative reading of a `cumulative`
//!   counter, rejects that row's distillate (listed with its line); its hour is not fitted.
//! * **A cumulative counter that drops** (a bottle emptied, a logger restarted) is a
//!   *reset*: the interval across the drop is unknown and not fitted, and counting goes on
//!   from the new reading as a new segment (listed with the line).
//! * **Gaps** (a step over 1.5 times the usual one, or rows without distillate) are never
//!   filled with distillate: an hour is fitted only when rows with distillate cover the
//!   whole of it. The weather across a gap of at most `max_gap_h` is interpolated linearly by
//!   the climate module's weather-file reader so the model can keep running; a longer gap is
//!   an error (split the record into separate files).
//!
//! The hourly weather then goes through the climate module's reader
//! ([`crate::climate::file::parse_weather_bytes`]), with its physical checks, sun positions and
//! the measured plane-of-array column on the cover's plane ([`crate::climate::file::PoaColumn`]).
//! Without a global horizontal column, the plane-of-array values stand in for it: they are
//! only used to split the measured total into beam and diffuse parts (by Erbs' correlation),
//! while the total on the cover stays the measured one.

use std::path::{Path, PathBuf};

use serde::Serialize;

use crate::climate::file::{
    Column, ColumnMap, FileFormat, GapFill, PeriodConvention, PoaColumn, WeatherFileSpec,
    parse_timestamp, parse_weather_bytes,
};
use crate::climate::{ClimateError, Plane, SiteLocation, WeatherSeries};
use crate::design::{DesignErrors, DesignIssue, DistillateCounting, MeasuredColumns, Period};
use crate::error::Error;

/// A step that differs from the file's usual step by more than this share counts as
/// irregular [-].
pub const IRREGULAR_STEP_SHARE: f64 = 0.1;
/// A step longer than this multiple of the usual step is a gap [-].
pub const GAP_STEP_MULTIPLE: f64 = 1.5;

/// One hour of measurements on the model's grid.
#[derive(Debug, Clone, Copy, Default, PartialEq, Serialize)]
pub struct MeasuredHour {
    /// Distillate collected over the hour [kg]; `None` when not known for the whole hour.
    pub distillate_kg: Option<f64>,
    /// Mean brine temperature [°C].
    pub t_brine_c: Option<f64>,
    /// Mean cover temperature [°C].
    pub t_cover_c: Option<f64>,
    /// Mean liner temperature [°C].
    pub t_liner_c: Option<f64>,
}

/// A gap in the record.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct Gap {
    /// File line of the row after the gap.
    pub line: usize,
    /// Length of the gap \[h\].
    pub hours: f64,
}

/// A row problem, with its 1-based file line.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct RowIssue {
    /// 1-based file line (header = 1).
    pub line: usize,
    /// What was wrong and what was done.
    pub message: String,
}

/// What reading the file found and did.
#[derive(Debug, Clone, Default, PartialEq, Serialize)]
pub struct MeasuredSummary {
    /// Data rows in the file.
    pub rows: usize,
    /// The file's usual step (the median step) [min].
    pub step_min: f64,
    /// Rows rejected whole (unreadable, out of order, repeated).
    pub rejected_rows: Vec<RowIssue>,
    /// Rows whose distillate was negative and was rejected.
    pub negative_distillate: Vec<RowIssue>,
    /// Lines at which a cumulative counter dropped and was restarted as a new segment.
    pub counter_resets: Vec<usize>,
    /// Gaps between rows.
    pub gaps: Vec<Gap>,
    /// Steps that differ from the usual step by more than [`IRREGULAR_STEP_SHARE`].
    pub irregular_steps: usize,
    /// Hours on the grid.
    pub hours: usize,
    /// Hours with distillate known for the whole hour (fitted).
    pub hours_with_distillate: usize,
    /// Hours whose weather the climate module interpolated across a gap.
    pub hours_weather_filled: usize,
    /// Warnings of the weather reader.
    pub weather_warnings: Vec<String>,
}

impl MeasuredSummary {
    /// One line per kind of event, for printing.
    pub fn lines(&self) -> Vec<String> {
        let lines = |v: &[usize]| {
            v.iter()
                .map(|l| l.to_string())
                .collect::<Vec<_>>()
                .join(", ")
        };
        let mut out = vec![format!(
            "{} rows, usual step {:.0} min, {} hours on the grid, {} with distillate fitted",
            self.rows, self.step_min, self.hours, self.hours_with_distillate
        )];
        if !self.rejected_rows.is_empty() {
            out.push(format!(
                "{} rows rejected: {}",
                self.rejected_rows.len(),
                self.rejected_rows
                    .iter()
                    .map(|r| format!("line {}: {}", r.line, r.message))
                    .collect::<Vec<_>>()
                    .join("; ")
            ));
        }
        if !self.negative_distillate.is_empty() {
            let l: Vec<usize> = self.negative_distillate.iter().map(|r| r.line).collect();
            out.push(format!(
                "negative distillate rejected on {} rows (lines {})",
                l.len(),
                lines(&l)
            ));
        }
        if !self.counter_resets.is_empty() {
            out.push(format!(
                "cumulative counter reset {} times (lines {}); each restarts a new segment and \
                 the interval across it is not fitted",
                self.counter_resets.len(),
                lines(&self.counter_resets)
            ));
        }
        if !self.gaps.is_empty() {
            let h: f64 = self.gaps.iter().map(|g| g.hours).sum();
            out.push(format!(
                "{} gaps ({h:.1} h) skipped, never filled with distillate (before lines {})",
                self.gaps.len(),
                lines(&self.gaps.iter().map(|g| g.line).collect::<Vec<_>>())
            ));
        }
        if self.irregular_steps > 0 {
            out.push(format!(
                "{} irregular steps, shared between hours by time",
                self.irregular_steps
            ));
        }
        if self.hours_weather_filled > 0 {
            out.push(format!(
                "weather interpolated over {} hours to keep the model running",
                self.hours_weather_filled
            ));
        }
        out.extend(self.weather_warnings.iter().cloned());
        out
    }
}

/// A measured record ready for calibration.
#[derive(Debug, Clone)]
pub struct MeasuredRecord {
    /// The file.
    pub path: PathBuf,
    /// Hourly weather (measured plane-of-array irradiance on the cover's plane).
    pub series: WeatherSeries,
    /// Whether humidity was measured (Berdahl–Martin sky) or not (Swinbank sky).
    pub dew_point_known: bool,
    /// The measurements, one per record of `series`.
    pub hours: Vec<MeasuredHour>,
    /// What reading found and did.
    pub summary: MeasuredSummary,
}

/// Read a measured file for a still of footprint `footprint_m2` \[m²\] whose cover lies in
/// `plane`, at `site`. Problems that stop the reading are [`Error::Design`] naming the file
/// and line.
pub fn load_measured(
    path: &Path,
    columns: &MeasuredColumns,
    site: &SiteLocation,
    plane: Plane,
    footprint_m2: f64,
) -> Result<MeasuredRecord, Error> {
    // The measured file is the user's input: a missing or unreadable one is bad input.
    let bytes = std::fs::read(path).map_err(|e| {
        Error::Design(crate::design::DesignErrors(vec![issue(
            path,
            None,
            "--measured",
            format!("cannot read the measured file: {}", io_reason(&e)),
        )]))
    })?;
    parse_measured_bytes(&bytes, path, columns, site, plane, footprint_m2)
}

/// What went wrong reading a file, in words (without the OS error number repeated).
fn io_reason(e: &std::io::Error) -> String {
    match e.kind() {
        std::io::ErrorKind::NotFound => "no such file".into(),
        std::io::ErrorKind::PermissionDenied => "permission denied".into(),
        std::io::ErrorKind::IsADirectory => "it is a folder, not a file".into(),
        _ => e.to_string(),
    }
}

fn issue(path: &Path, line: Option<usize>, field: &str, message: String) -> DesignIssue {
    DesignIssue {
        file: path.to_path_buf(),
        line_col: line.map(|l| (l, 1)),
        path: field.to_owned(),
        message,
    }
}

fn fail(path: &Path, line: Option<usize>, field: &str, message: String) -> Error {
    Error::Design(DesignErrors(vec![issue(path, line, field, message)]))
}

/// One parsed row.
#[derive(Debug, Clone)]
struct Row {
    line: usize,
    /// End of the row's interval, minutes of site standard time.
    end_min: i64,
    poa: Option<f64>,
    ghi: Option<f64>,
    t_air: Option<f64>,
    wind: Option<f64>,
    rh: Option<f64>,
    /// Raw distillate reading (column unit).
    distillate: Option<f64>,
    brine: Option<f64>,
    cover: Option<f64>,
    liner: Option<f64>,
}

/// Accumulator of one hour on the grid.
#[derive(Debug, Clone, Default)]
struct Bin {
    /// Minutes of the hour covered by rows.
    covered_min: f64,
    /// Minutes covered by rows with distillate known.
    distillate_min: f64,
    distillate_kg: f64,
    sums: [f64; 9],
    weights: [f64; 9],
    first_line: usize,
}

const POA: usize = 0;
const GHI: usize = 1;
const TAIR: usize = 2;
const WIND: usize = 3;
const RH: usize = 4;
const BRINE: usize = 5;
const COVER: usize = 6;
const LINER: usize = 7;

impl Bin {
    fn add(&mut self, k: usize, v: Option<f64>, minutes: f64) {
        if let Some(x) = v {
            self.sums[k] += x * minutes;
            self.weights[k] += minutes;
        }
    }
    fn mean(&self, k: usize) -> Option<f64> {
        (self.weights[k] > 0.0).then(|| self.sums[k] / self.weights[k])
    }
}

/// As [`load_measured`], from bytes in memory (`path` names them in messages).
pub fn parse_measured_bytes(
    bytes: &[u8],
    path: &Path,
    columns: &MeasuredColumns,
    site: &SiteLocation,
    plane: Plane,
    footprint_m2: f64,
) -> Result<MeasuredRecord, Error> {
    let text = std::str::from_utf8(bytes).map_err(|e| {
        let line = bytes[..e.valid_up_to()]
            .iter()
            .filter(|&&b| b == b'\n')
            .count()
            + 1;
        fail(path, Some(line), "", "the file is not UTF-8 text".into())
    })?;
    let mut rdr = csv::ReaderBuilder::new()
        .flexible(true)
        .trim(csv::Trim::All)
        .from_reader(text.as_bytes());
    let headers: Vec<String> = rdr
        .headers()
        .map_err(|e| fail(path, Some(1), "", format!("unreadable header: {e}")))?
        .iter()
        .map(|h| h.trim().to_lowercase())
        .collect();
    let find = |name: &str| {
        headers
            .iter()
            .position(|h| *h == name.trim().to_lowercase())
    };
    let need = |field: &str, name: &str| {
        find(name).ok_or_else(|| {
            fail(
                path,
                Some(1),
                field,
                format!("no column `{name}` in the header (mapped by `{field}`)"),
            )
        })
    };
    let optional = |field: &str, name: &Option<String>| -> Result<Option<usize>, Error> {
        match name {
            Some(n) => need(field, n).map(Some),
            None => Ok(None),
        }
    };
    let c_time = need("timestamp", &columns.timestamp)?;
    let c_poa = need("poa_w_m2", &columns.poa_w_m2)?;
    let c_tair = need("t_air_c", &columns.t_air_c)?;
    let c_dist = need("distillate", &columns.distillate)?;
    let c_ghi = optional("ghi_w_m2", &columns.ghi_w_m2)?;
    let c_wind = optional("wind_m_s", &columns.wind_m_s)?;
    let c_rh = optional("rh_percent", &columns.rh_percent)?;
    let c_brine = optional("brine_c", &columns.brine_c)?;
    let c_cover = optional("cover_c", &columns.cover_c)?;
    let c_liner = optional("liner_c", &columns.liner_c)?;

    let mut summary = MeasuredSummary::default();
    let naive_offset = columns.utc_offset_h.unwrap_or(site.utc_offset_h);
    let mut stamps: Vec<(usize, i64, csv::StringRecord)> = Vec::new();
    for rec in rdr.records() {
        summary.rows += 1;
        let rec = match rec {
            Ok(r) => r,
            Err(e) => {
                let line = e.position().map_or(summary.rows + 1, |p| p.line() as usize);
                summary.rejected_rows.push(RowIssue {
                    line,
                    message: format!("unreadable row ({e})"),
                });
                continue;
            }
        };
        let line = rec
            .position()
            .map_or(summary.rows + 1, |p| p.line() as usize);
        let Some(t) = rec
            .get(c_time)
            .and_then(|s| parse_timestamp(s, naive_offset, site.utc_offset_h))
        else {
            summary.rejected_rows.push(RowIssue {
                line,
                message: format!(
                    "unreadable timestamp `{}`",
                    rec.get(c_time).unwrap_or_default()
                ),
            });
            continue;
        };
        if let Some(&(_, prev, _)) = stamps.last()
            && t <= prev
        {
            summary.rejected_rows.push(RowIssue {
                line,
                message: if t == prev {
                    "repeated timestamp; row dropped".to_owned()
                } else {
                    "timestamp out of order; row dropped".to_owned()
                },
            });
            continue;
        }
        stamps.push((line, t, rec));
    }
    if stamps.len() < 2 {
        return Err(fail(
            path,
            None,
            "",
            "fewer than two readable rows: nothing to calibrate against".into(),
        ));
    }
    let mut steps: Vec<i64> = stamps.windows(2).map(|w| w[1].1 - w[0].1).collect();
    steps.sort_unstable();
    let step = steps[steps.len() / 2];
    summary.step_min = step as f64;
    if step > 60 {
        return Err(fail(
            path,
            None,
            "",
            format!("the usual step is {step} min; calibration needs hourly or finer records"),
        ));
    }
    let shift = match columns.period {
        Period::Ending => 0,
        Period::Beginning => step,
        Period::Centred => step / 2,
    };

    let mut rows: Vec<Row> = Vec::with_capacity(stamps.len());
    for (line, t, rec) in &stamps {
        let mut bad: Option<String> = None;
        let mut num = |c: Option<usize>, what: &str| -> Option<f64> {
            let s = c.and_then(|i| rec.get(i))?.trim();
            if s.is_empty() || s.eq_ignore_ascii_case("na") || s.eq_ignore_ascii_case("nan") {
                return None;
            }
            match s.parse::<f64>() {
                Ok(v) if v.is_finite() => Some(v),
                _ => {
                    bad.get_or_insert_with(|| format!("unreadable {what} `{s}`"));
                    None
                }
            }
        };
        let row = Row {
            line: *line,
            end_min: t + shift,
            poa: num(Some(c_poa), "plane-of-array irradiance"),
            ghi: num(c_ghi, "global horizontal irradiance"),
            t_air: num(Some(c_tair), "air temperature"),
            wind: num(c_wind, "wind speed"),
            rh: num(c_rh, "relative humidity"),
            distillate: num(Some(c_dist), "distillate"),
            brine: num(c_brine, "brine temperature"),
            cover: num(c_cover, "cover temperature"),
            liner: num(c_liner, "liner temperature"),
        };
        if let Some(m) = bad {
            summary.rejected_rows.push(RowIssue {
                line: *line,
                message: m,
            });
            continue;
        }
        rows.push(row);
    }
    summary.rejected_rows.sort_by_key(|r| r.line);
    if rows.len() < 2 {
        return Err(fail(
            path,
            None,
            "",
            "fewer than two usable rows: nothing to calibrate against".into(),
        ));
    }

    // Distillate of each row's interval [kg], and the interval's start.
    let unit = columns.distillate_unit.kg_per_unit(footprint_m2);
    let mut counter: Option<f64> = None;
    let mut intervals: Vec<(i64, Option<f64>)> = Vec::with_capacity(rows.len());
    for (i, r) in rows.iter().enumerate() {
        let dt = if i == 0 {
            step
        } else {
            r.end_min - rows[i - 1].end_min
        };
        let gap = i > 0 && (dt as f64) > GAP_STEP_MULTIPLE * step as f64;
        if gap {
            summary.gaps.push(Gap {
                line: r.line,
                hours: (dt - step) as f64 / 60.0,
            });
        } else if i > 0 && ((dt - step).abs() as f64) > IRREGULAR_STEP_SHARE * step as f64 {
            summary.irregular_steps += 1;
        }
        let start = if gap || i == 0 {
            r.end_min - step
        } else {
            rows[i - 1].end_min
        };
        let kg = match (columns.distillate_counting, r.distillate) {
            (_, None) => {
                if columns.distillate_counting == DistillateCounting::Cumulative {
                    // A missing reading breaks the chain: the next difference would span it.
                    counter = None;
                }
                None
            }
            (_, Some(v)) if v < 0.0 => {
                summary.negative_distillate.push(RowIssue {
                    line: r.line,
                    message: format!("distillate {v} is negative; rejected"),
                });
                if columns.distillate_counting == DistillateCounting::Cumulative {
                    counter = None;
                }
                None
            }
            (DistillateCounting::Interval, Some(v)) => Some(v * unit),
            (DistillateCounting::Cumulative, Some(v)) => {
                let out = match counter {
                    Some(c) if v < c => {
                        summary.counter_resets.push(r.line);
                        None
                    }
                    Some(c) if !gap => Some((v - c) * unit),
                    _ => None,
                };
                counter = Some(v);
                out
            }
        };
        intervals.push((start, kg));
    }

    // Share rows between hours.
    let first_h = (intervals[0].0).div_euclid(60);
    let last_end = rows.last().map_or(0, |r| r.end_min);
    let last_h = (last_end + 59).div_euclid(60);
    let n_bins = (last_h - first_h).max(1) as usize;
    let mut bins = vec![Bin::default(); n_bins];
    for (r, &(start, kg)) in rows.iter().zip(&intervals) {
        let len = (r.end_min - start) as f64;
        if len <= 0.0 {
            continue;
        }
        let mut a = start;
        while a < r.end_min {
            let h = a.div_euclid(60);
            let b = ((h + 1) * 60).min(r.end_min);
            let idx = (h - first_h) as usize;
            if let Some(bin) = bins.get_mut(idx) {
                let m = (b - a) as f64;
                if bin.covered_min == 0.0 {
                    bin.first_line = r.line;
                }
                bin.covered_min += m;
                if let Some(k) = kg {
                    bin.distillate_min += m;
                    bin.distillate_kg += k * m / len;
                }
                bin.add(POA, r.poa, m);
                bin.add(GHI, r.ghi.or(if c_ghi.is_none() { r.poa } else { None }), m);
                bin.add(TAIR, r.t_air, m);
                bin.add(WIND, r.wind, m);
                bin.add(RH, r.rh, m);
                bin.add(BRINE, r.brine, m);
                bin.add(COVER, r.cover, m);
                bin.add(LINER, r.liner, m);
            }
            a = b;
        }
    }
    // The first hour is only partly covered when the record starts within it: drop leading
    // and trailing hours without full cover of weather.
    let full = |b: &Bin| b.covered_min >= 60.0 - 1e-9;
    let lo = bins.iter().position(full).unwrap_or(0);
    let hi = bins.iter().rposition(full).map_or(n_bins, |i| i + 1);
    let bins = &bins[lo..hi.max(lo + 1)];
    let first_h = first_h + lo as i64;

    // The hourly weather as a canonical CSV for the climate module's reader.
    let mut csv_text = String::from("timestamp,ghi_w_m2,poa_w_m2,t_air_c");
    if c_wind.is_some() {
        csv_text.push_str(",wind_m_s");
    }
    if c_rh.is_some() {
        csv_text.push_str(",rh_percent");
    }
    csv_text.push('\n');
    let mut csv_bins: Vec<usize> = Vec::new();
    for (i, b) in bins.iter().enumerate() {
        let (Some(poa), Some(ghi), Some(t)) = (b.mean(POA), b.mean(GHI), b.mean(TAIR)) else {
            continue;
        };
        let end = (first_h + i as i64 + 1) * 60;
        let Some(stamp) = chrono::DateTime::from_timestamp(end * 60, 0) else {
            continue;
        };
        csv_text.push_str(&format!(
            "{},{ghi:.3},{poa:.3},{t:.3}",
            stamp.naive_utc().format("%Y-%m-%dT%H:%M")
        ));
        if c_wind.is_some() {
            csv_text.push_str(&format!(
                ",{}",
                b.mean(WIND).map_or(String::new(), |v| format!("{v:.3}"))
            ));
        }
        if c_rh.is_some() {
            csv_text.push_str(&format!(
                ",{}",
                b.mean(RH).map_or(String::new(), |v| format!("{v:.3}"))
            ));
        }
        csv_text.push('\n');
        csv_bins.push(i);
    }
    let mut map = ColumnMap {
        timestamp: "timestamp".into(),
        utc_offset_h: None,
        ghi: Column::named("ghi_w_m2"),
        t_air: Column::named("t_air_c"),
        poa: Some(PoaColumn {
            column: Column::named("poa_w_m2"),
            plane,
        }),
        ..ColumnMap::default()
    };
    if c_wind.is_some() {
        map.wind = Some(Column::named("wind_m_s"));
    }
    if c_rh.is_some() {
        map.relative_humidity = Some(Column::named("rh_percent"));
    }
    let spec = WeatherFileSpec {
        path: path.to_path_buf(),
        format: FileFormat::Csv,
        period: PeriodConvention::Ending,
        columns: map,
        gap_fill: GapFill::Linear {
            max_gap_h: columns.max_gap_h,
        },
        wind_height_m: columns.wind_height_m,
    };
    // Lines of the canonical text map back to the first file line of each hour.
    let original_line = |l: Option<usize>| -> Option<usize> {
        let l = l?;
        let k = l.checked_sub(2)?;
        csv_bins.get(k).map(|&i| bins[i].first_line)
    };
    let loaded = parse_weather_bytes(csv_text.as_bytes(), &spec, site).map_err(|e| match e {
        ClimateError::WeatherFile(w) => Error::Design(DesignErrors(
            w.errors()
                .map(|i| {
                    issue(
                        path,
                        original_line(i.line),
                        "weather",
                        format!("(hourly means) {}", i.kind),
                    )
                })
                .collect(),
        )),
        other => Error::from(other),
    })?;
    summary.weather_warnings = loaded
        .warnings
        .iter()
        .map(|w| match original_line(w.line) {
            Some(l) => format!("line {l} (hourly means): {}", w.kind),
            None => format!("(hourly means) {}", w.kind),
        })
        .collect();
    let series = loaded.series;
    if series.hours.len() != bins.len() {
        return Err(fail(
            path,
            None,
            "",
            format!(
                "the weather reader returned {} hours for {} on the grid",
                series.hours.len(),
                bins.len()
            ),
        ));
    }
    summary.hours = bins.len();
    summary.hours_weather_filled = bins
        .iter()
        .filter(|b| b.mean(POA).is_none() || b.mean(TAIR).is_none())
        .count();
    let hours: Vec<MeasuredHour> = bins
        .iter()
        .map(|b| MeasuredHour {
            distillate_kg: (b.distillate_min >= 60.0 - 1e-9).then_some(b.distillate_kg),
            t_brine_c: b.mean(BRINE),
            t_cover_c: b.mean(COVER),
            t_liner_c: b.mean(LINER),
        })
        .collect();
    summary.hours_with_distillate = hours.iter().filter(|h| h.distillate_kg.is_some()).count();
    if summary.hours_with_distillate == 0 {
        return Err(fail(
            path,
            None,
            "distillate",
            "no hour has its distillate known for the whole hour".into(),
        ));
    }
    Ok(MeasuredRecord {
        path: path.to_path_buf(),
        series,
        dew_point_known: c_rh.is_some(),
        hours,
        summary,
    })
}
