//! Parametric study of one variant: one or two numeric design fields stepped over a range
//! (a grid for two), each point validated like a user's file, simulated, and the point best
//! for the chosen target picked.
//!
//! The loop closes outside the pipeline: for each point the value is written into the design
//! file's TOML document (`variant[i].<field path>`), the document is serialised and loaded
//! again with [`crate::design::parse_design_str`], so an out-of-range value gets the usual
//! message naming the field and the allowed range. Every point is validated before any
//! simulation. The site does not change, so its weather is built once.

use std::fmt;
use std::path::Path;
use std::str::FromStr;

use serde::Serialize;

use crate::design::{DesignErrors, DesignIssue, LoadedDesign, spans};
use crate::error::Error;
use crate::stills::{self, RunOptions};

/// Most points a sweep may ask for (the product of the axis lengths). A single-slope year
/// takes a few tens of milliseconds, so 200 points stay within seconds.
pub const MAX_POINTS: usize = 200;

/// Points on an axis when `:STEP` is not given (ten equal intervals).
pub const DEFAULT_POINTS: usize = 11;

/// Most fields swept at once.
pub const MAX_PARAMS: usize = 2;

/// What the sweep maximises.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize)]
#[serde(rename_all = "kebab-case")]
pub enum Target {
    /// Annual distillate per m² of footprint [L m⁻² year⁻¹].
    Annual,
    /// Mean daily distillate per m² in the worst month [L m⁻² day⁻¹].
    WorstMonth,
}

impl Target {
    /// What the target is, with its unit.
    pub fn label(self) -> &'static str {
        match self {
            Target::Annual => "annual yield [L/m²/year]",
            Target::WorstMonth => "worst-month yield [L/m²/day]",
        }
    }
}

/// A sweep specification that cannot be run as given.
#[derive(Debug, Clone, PartialEq)]
pub struct BadSpec {
    /// The specification as given (`cover_tilt_deg=10..60:5`).
    pub spec: String,
    /// What is wrong and what is allowed.
    pub message: String,
}

impl fmt::Display for BadSpec {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        write!(f, "`{}`: {}", self.spec, self.message)
    }
}

impl std::error::Error for BadSpec {}

/// One field and its range, as the user wrote it: `FIELD=FROM..TO[:STEP]`.
#[derive(Debug, Clone, PartialEq)]
pub struct ParamSpec {
    /// Field path inside the variant, e.g. `cover_tilt_deg` or
    /// `base_insulation[1].thickness_mm` (list positions count from 1, as in messages).
    pub field: String,
    /// First value (in the field's own unit).
    pub from: f64,
    /// Last value.
    pub to: f64,
    /// Step; `None` for [`DEFAULT_POINTS`] equally spaced values.
    pub step: Option<f64>,
    /// The text it was parsed from.
    pub text: String,
}

impl FromStr for ParamSpec {
    type Err = BadSpec;

    fn from_str(s: &str) -> Result<Self, BadSpec> {
        let bad = |message: String| BadSpec {
            spec: s.to_owned(),
            message,
        };
        let form = "write FIELD=FROM..TO or FIELD=FROM..TO:STEP, e.g. cover_tilt_deg=10..60:5";
        let (field, range) = s
            .split_once('=')
            .ok_or_else(|| bad(format!("no `=`; {form}")))?;
        let field = field.trim();
        if field.is_empty() {
            return Err(bad(format!("no field name; {form}")));
        }
        let (span, step) = match range.split_once(':') {
            Some((span, step)) => (span, Some(step)),
            None => (range, None),
        };
        let (from, to) = span
            .split_once("..")
            .ok_or_else(|| bad(format!("no `..` between FROM and TO; {form}")))?;
        let number = |what: &str, t: &str| -> Result<f64, BadSpec> {
            let x: f64 = t
                .trim()
                .parse()
                .map_err(|_| bad(format!("{what} `{}` is not a number; {form}", t.trim())))?;
            if x.is_finite() {
                Ok(x)
            } else {
                Err(bad(format!("{what} must be a finite number")))
            }
        };
        let from = number("FROM", from)?;
        let to = number("TO", to)?;
        let step = step.map(|t| number("STEP", t)).transpose()?;
        if from >= to {
            return Err(bad(format!(
                "FROM ({from}) must be below TO ({to}); a sweep runs upwards"
            )));
        }
        if let Some(st) = step
            && st <= 0.0
        {
            return Err(bad(format!("STEP ({st}) must be above zero")));
        }
        Ok(ParamSpec {
            field: field.to_owned(),
            from,
            to,
            step,
            text: s.to_owned(),
        })
    }
}

impl ParamSpec {
    /// The values of this axis: FROM, FROM + STEP, … up to TO, with TO added when the steps
    /// do not land on it. Fails (before building the list) when there would be more than
    /// [`MAX_POINTS`].
    pub fn values(&self) -> Result<Vec<f64>, BadSpec> {
        let span = self.to - self.from;
        let step = self.step.unwrap_or(span / (DEFAULT_POINTS - 1) as f64);
        // A step landing within a millionth of a step of TO counts as landing on it.
        let intervals = (span / step * (1.0 + 1e-9)).floor();
        if !(intervals.is_finite() && intervals < MAX_POINTS as f64) {
            return Err(BadSpec {
                spec: self.text.clone(),
                message: format!(
                    "{:.0} points or more; at most {MAX_POINTS} per sweep — use a larger STEP",
                    intervals.min(1e12) + 1.0
                ),
            });
        }
        // `intervals` is a whole number in 0..MAX_POINTS (checked above).
        let n = intervals as usize;
        let mut v: Vec<f64> = (0..=n).map(|i| self.from + i as f64 * step).collect();
        if let Some(last) = v.last_mut()
            && (self.to - *last).abs() <= step * 1e-6
        {
            *last = self.to;
        } else {
            v.push(self.to);
        }
        Ok(v)
    }
}

/// One axis of a sweep: a field and its values.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct Axis {
    /// Field path inside the variant.
    pub field: String,
    /// Values in increasing order.
    pub values: Vec<f64>,
}

/// One point of a sweep.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct SweepPoint {
    /// The value of each axis at this point, in axis order.
    pub values: Vec<f64>,
    /// Annual distillate per m² of footprint [L m⁻² year⁻¹]; `None` when not simulated.
    pub annual_l_m2: Option<f64>,
    /// Mean daily distillate per m² in the worst month [L m⁻² day⁻¹].
    pub worst_month_l_m2_day: Option<f64>,
    /// The worst month, 1…12.
    pub worst_month: Option<u32>,
    /// Why the model could not give a trustworthy result at this point, if so.
    pub failed: Option<String>,
}

impl SweepPoint {
    /// The figure the target maximises, when the point was simulated.
    pub fn target_value(&self, target: Target) -> Option<f64> {
        match target {
            Target::Annual => self.annual_l_m2,
            Target::WorstMonth => self.worst_month_l_m2_day,
        }
    }
}

/// Where the optimum sits on the edge of an axis.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct EdgeNote {
    /// The field.
    pub field: String,
    /// `lower` or `upper`.
    pub end: &'static str,
    /// The edge value.
    pub value: f64,
}

/// A finished sweep.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct SweepResult {
    /// The variant swept.
    pub variant: String,
    /// What was maximised.
    pub target: Target,
    /// The axes (one or two).
    pub axes: Vec<Axis>,
    /// Every point; for two axes, the first axis varies slowest.
    pub points: Vec<SweepPoint>,
    /// Index into `points` of the best point, `None` when no point could be simulated.
    pub best: Option<usize>,
    /// Axes on whose edge the best point sits (the true optimum may lie outside the range).
    pub edges: Vec<EdgeNote>,
}

/// Why a sweep could not run.
#[derive(Debug)]
pub enum SweepError {
    /// A specification is malformed, names no numeric field, or asks for too many points.
    Spec(BadSpec),
    /// The design (or a point of it) failed validation, or a run failed for another reason
    /// than an untrustworthy model result.
    Run(Error),
}

impl fmt::Display for SweepError {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        match self {
            SweepError::Spec(b) => b.fmt(f),
            SweepError::Run(e) => e.fmt(f),
        }
    }
}

impl std::error::Error for SweepError {}

impl From<Error> for SweepError {
    fn from(e: Error) -> Self {
        SweepError::Run(e)
    }
}

/// One segment of a field path: a key, with a 1-based list position.
fn segments(path: &str) -> Option<Vec<(&str, Option<usize>)>> {
    path.split('.')
        .map(|seg| match seg.split_once('[') {
            Some((key, rest)) => {
                let n: usize = rest.strip_suffix(']')?.trim().parse().ok()?;
                (n >= 1 && !key.is_empty()).then_some((key, Some(n)))
            }
            None => (!seg.is_empty()).then_some((seg, None)),
        })
        .collect()
}

/// The value at `path` (as [`segments`]) inside `table`.
fn value_at_mut<'a>(table: &'a mut toml::Table, path: &str) -> Option<&'a mut toml::Value> {
    let segs = segments(path)?;
    let (last, parents) = segs.split_last()?;
    let mut t = table;
    for (key, idx) in parents {
        let v = t.get_mut(*key)?;
        let v = match idx {
            Some(n) => v.as_array_mut()?.get_mut(n - 1)?,
            None => v,
        };
        t = v.as_table_mut()?;
    }
    let v = t.get_mut(last.0)?;
    match last.1 {
        Some(n) => v.as_array_mut()?.get_mut(n - 1),
        None => Some(v),
    }
}

/// Every numeric field path of a variant table (1-based list positions).
pub fn numeric_fields(variant: &toml::Table) -> Vec<String> {
    fn walk(prefix: &str, v: &toml::Value, out: &mut Vec<String>) {
        match v {
            toml::Value::Integer(_) | toml::Value::Float(_) => out.push(prefix.to_owned()),
            toml::Value::Table(t) => {
                for (k, x) in t {
                    walk(&format!("{prefix}.{k}"), x, out);
                }
            }
            toml::Value::Array(a) => {
                for (i, x) in a.iter().enumerate() {
                    walk(&format!("{prefix}[{}]", i + 1), x, out);
                }
            }
            _ => {}
        }
    }
    let mut out = Vec::new();
    for (k, v) in variant {
        walk(k, v, &mut out);
    }
    out
}

/// Write `x` into `slot`: a TOML integer when the field is written as one and `x` is whole,
/// a float otherwise (the design reader takes either for a real-valued field).
fn set_number(slot: &mut toml::Value, x: f64) {
    let whole = x.fract().abs() < 1e-9 && x.abs() < 9.0e15;
    *slot = if whole && matches!(slot, toml::Value::Integer(_)) {
        // Whole and well inside i64 (checked above).
        toml::Value::Integer(x.round() as i64)
    } else {
        toml::Value::Float(x)
    };
}

/// The variant table of `doc` named `name`, and its 0-based index.
fn variant_table_mut<'a>(
    doc: &'a mut toml::Table,
    name: &str,
) -> Option<(usize, &'a mut toml::Table)> {
    doc.get_mut("variant")?
        .as_array_mut()?
        .iter_mut()
        .enumerate()
        .find_map(|(i, v)| {
            let t = v.as_table_mut()?;
            (t.get("name").and_then(toml::Value::as_str) == Some(name)).then_some((i, t))
        })
}

/// A design problem in the whole sweep's terms.
fn design_error(origin: &Path, path: String, message: String) -> Error {
    Error::Design(DesignErrors(vec![DesignIssue {
        file: origin.to_path_buf(),
        line_col: None,
        path,
        message,
    }]))
}

/// Check the specifications against the variant's fields and build the axes.
fn axes(variant: &toml::Table, specs: &[ParamSpec]) -> Result<Vec<Axis>, BadSpec> {
    let bad = |spec: &ParamSpec, message: String| BadSpec {
        spec: spec.text.clone(),
        message,
    };
    let fields = numeric_fields(variant);
    let mut out: Vec<Axis> = Vec::new();
    for spec in specs {
        if out.iter().any(|a| a.field == spec.field) {
            return Err(bad(spec, "this field is already swept".into()));
        }
        if !fields.contains(&spec.field) {
            let mut copy = variant.clone();
            let why = match value_at_mut(&mut copy, &spec.field) {
                Some(v) => format!("`{}` holds {}, not a number", spec.field, v.type_str()),
                None => format!(
                    "the variant has no numeric field `{}` written in the design file",
                    spec.field
                ),
            };
            let hint = match spans::did_you_mean(&spec.field, fields.iter().map(String::as_str)) {
                Some(m) => format!("; did you mean `{m}`?"),
                None if fields.is_empty() => String::new(),
                None => format!(" (its numeric fields: {})", fields.join(", ")),
            };
            return Err(bad(spec, format!("{why}{hint}")));
        }
        out.push(Axis {
            field: spec.field.clone(),
            values: spec.values()?,
        });
    }
    let total = out
        .iter()
        .try_fold(1usize, |acc, a| acc.checked_mul(a.values.len()));
    match total {
        Some(n) if n <= MAX_POINTS => Ok(out),
        _ => Err(BadSpec {
            spec: specs
                .iter()
                .map(|s| s.text.as_str())
                .collect::<Vec<_>>()
                .join(" "),
            message: format!(
                "the grid has {} points; at most {MAX_POINTS} per sweep — use larger steps",
                out.iter().map(|a| a.values.len()).product::<usize>()
            ),
        }),
    }
}

/// Every point's values, the first axis varying slowest.
fn grid(axes: &[Axis]) -> Vec<Vec<f64>> {
    axes.iter().fold(vec![Vec::new()], |acc, axis| {
        acc.iter()
            .flat_map(|prefix| {
                axis.values.iter().map(move |x| {
                    let mut p = prefix.clone();
                    p.push(*x);
                    p
                })
            })
            .collect()
    })
}

/// Sweep the fields of `specs` for variant `variant` of the design whose file text is `text`
/// (named `origin` in messages, relative paths resolved against `base_dir`), and pick the
/// point best for `target`.
///
/// Every point is loaded as a design file first; the first point that fails validation stops
/// the sweep with the usual design error (its path names the field, its message the allowed
/// range and the point) before anything is simulated. A point the model cannot simulate
/// trustworthily is kept with [`SweepPoint::failed`] set; ties keep the first point.
///
/// Errors: [`SweepError::Spec`] for more than [`MAX_PARAMS`] fields, an unknown or
/// non-numeric field, or too many points; [`SweepError::Run`] for a design that does not
/// parse or validate, an unknown variant, or a run failure other than an untrustworthy model
/// result.
pub fn sweep(
    text: &str,
    origin: &Path,
    base_dir: &Path,
    variant: &str,
    specs: &[ParamSpec],
    target: Target,
    opts: &RunOptions,
) -> Result<SweepResult, SweepError> {
    if specs.is_empty() || specs.len() > MAX_PARAMS {
        return Err(SweepError::Spec(BadSpec {
            spec: specs
                .iter()
                .map(|s| s.text.as_str())
                .collect::<Vec<_>>()
                .join(" "),
            message: format!(
                "give one or two fields to sweep (a grid for two), not {}",
                specs.len()
            ),
        }));
    }
    // The file as given must load on its own first: its own problems are reported as such.
    let base = crate::design::parse_design_str(text, origin, base_dir).map_err(Error::Design)?;
    let mut doc: toml::Table = text.parse().map_err(|e: toml::de::Error| {
        design_error(origin, String::new(), format!("not valid TOML: {e}"))
    })?;
    let Some((index, vtable)) = variant_table_mut(&mut doc, variant) else {
        let names: Vec<&str> = base
            .design
            .variants
            .iter()
            .map(|v| v.name.as_str())
            .collect();
        let hint = match spans::did_you_mean(variant, names.iter().copied()) {
            Some(m) => format!("did you mean `{m}`?"),
            None => format!("its variants: {}", names.join(", ")),
        };
        return Err(SweepError::Run(design_error(
            origin,
            "--variant".into(),
            format!("the design has no variant named `{variant}`; {hint}"),
        )));
    };
    let axes = axes(vtable, specs).map_err(SweepError::Spec)?;
    let points = grid(&axes);

    // Validate every point before simulating any.
    let mut loaded: Vec<LoadedDesign> = Vec::with_capacity(points.len());
    for p in &points {
        let mut d = doc.clone();
        for (axis, x) in axes.iter().zip(p) {
            let slot =
                variant_table_mut(&mut d, variant).and_then(|(_, t)| value_at_mut(t, &axis.field));
            // The field was found in `doc` when the axes were built.
            if let Some(slot) = slot {
                set_number(slot, *x);
            }
        }
        let at = axes
            .iter()
            .zip(p)
            .map(|(a, x)| format!("{}={x}", a.field))
            .collect::<Vec<_>>()
            .join(", ");
        let text = toml::to_string(&d).map_err(|e| Error::Model {
            variant: variant.to_owned(),
            at: format!(" at {at}"),
            reason: format!("could not write the swept design: {e}"),
        })?;
        match crate::design::parse_design_str(&text, origin, base_dir) {
            Ok(l) => loaded.push(l),
            Err(DesignErrors(issues)) => {
                // Lines of the rewritten text mean nothing to the user: name the point.
                let issues = issues
                    .into_iter()
                    .map(|i| DesignIssue {
                        file: origin.to_path_buf(),
                        line_col: None,
                        message: format!("{} (sweep point {at})", i.message),
                        path: i.path,
                    })
                    .collect();
                return Err(SweepError::Run(Error::Design(DesignErrors(issues))));
            }
        }
    }

    let weather = stills::site_weather(&base)?;
    let mut out = Vec::with_capacity(points.len());
    for (p, l) in points.into_iter().zip(&loaded) {
        let Some(v) = l.design.variants.get(index) else {
            return Err(SweepError::Run(design_error(
                origin,
                "--variant".into(),
                format!("variant `{variant}` vanished from a sweep point"),
            )));
        };
        let point = match stills::simulate_variant(l, v, &weather, opts) {
            Ok(r) => SweepPoint {
                values: p,
                annual_l_m2: Some(r.annual_l_m2),
                worst_month_l_m2_day: Some(r.worst_month.l_m2_day),
                worst_month: Some(r.worst_month.month),
                failed: None,
            },
            Err(Error::Model { reason, at, .. }) => SweepPoint {
                values: p,
                annual_l_m2: None,
                worst_month_l_m2_day: None,
                worst_month: None,
                failed: Some(format!("{reason}{at}")),
            },
            Err(e) => return Err(e.into()),
        };
        out.push(point);
    }
    let best = best_point(&out, target);
    let edges = best.map_or_else(Vec::new, |b| edge_notes(&axes, &out[b]));
    Ok(SweepResult {
        variant: variant.to_owned(),
        target,
        axes,
        points: out,
        best,
        edges,
    })
}

/// Index of the point with the highest target figure (the first among equals).
pub fn best_point(points: &[SweepPoint], target: Target) -> Option<usize> {
    let mut best: Option<(usize, f64)> = None;
    for (i, p) in points.iter().enumerate() {
        if let Some(y) = p.target_value(target).filter(|y| y.is_finite())
            && best.is_none_or(|(_, b)| y > b)
        {
            best = Some((i, y));
        }
    }
    best.map(|(i, _)| i)
}

/// The axes (with more than one value) on whose first or last value `best` sits.
pub fn edge_notes(axes: &[Axis], best: &SweepPoint) -> Vec<EdgeNote> {
    let mut out = Vec::new();
    for (a, x) in axes.iter().zip(&best.values) {
        let (Some(first), Some(last)) = (a.values.first(), a.values.last()) else {
            continue;
        };
        if a.values.len() < 2 {
            continue;
        }
        let tol = (last - first).abs() * 1e-9;
        if (x - first).abs() <= tol {
            out.push(EdgeNote {
                field: a.field.clone(),
                end: "lower",
                value: *first,
            });
        } else if (x - last).abs() <= tol {
            out.push(EdgeNote {
                field: a.field.clone(),
                end: "upper",
                value: *last,
            });
        }
    }
    out
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn spec_parses_and_steps_land_on_to() {
        let s: ParamSpec = "cover_tilt_deg=10..60:10".parse().unwrap();
        assert_eq!(s.values().unwrap().len(), 6);
        // 10..25:10 → 10, 20 and TO added: 25.
        let s: ParamSpec = "x=10..25:10".parse().unwrap();
        let v = s.values().unwrap();
        assert_eq!(v.len(), 3);
        assert!((v[2] - 25.0).abs() < 1e-12);
        // No step: DEFAULT_POINTS values; a step of 0.1 over 0..1 must not lose TO to rounding.
        let s: ParamSpec = "x=0..1".parse().unwrap();
        assert_eq!(s.values().unwrap().len(), DEFAULT_POINTS);
        let s: ParamSpec = "x=0..1:0.1".parse().unwrap();
        assert_eq!(s.values().unwrap().len(), 11);
    }

    #[test]
    fn bad_specs_are_refused() {
        for s in [
            "x",
            "=1..2",
            "x=1",
            "x=2..1",
            "x=1..1",
            "x=1..2:0",
            "x=1..2:-1",
            "x=a..2",
            "x=1..inf",
        ] {
            assert!(s.parse::<ParamSpec>().is_err(), "{s}");
        }
        let s: ParamSpec = "x=0..1000:1".parse().unwrap();
        assert!(s.values().is_err());
    }

    #[test]
    fn paths_reach_nested_numbers() {
        let mut t: toml::Table = "a = 1\nb = [ { c = 2.5 }, { c = 3 } ]\n[op]\nd = 4\n"
            .parse()
            .unwrap();
        let f = numeric_fields(&t);
        assert_eq!(f, vec!["a", "b[1].c", "b[2].c", "op.d"]);
        let v = value_at_mut(&mut t, "b[2].c").unwrap();
        set_number(v, 7.0);
        assert_eq!(v.as_integer(), Some(7));
        set_number(v, 7.5);
        assert_eq!(v.as_float(), Some(7.5));
        assert!(value_at_mut(&mut t, "b[3].c").is_none());
        assert!(value_at_mut(&mut t, "b[0].c").is_none());
    }
}
