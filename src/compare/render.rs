//! The CSV tables of `uncertainty`, `size` and `sweep` (and the uncertainty table of
//! `compare --samples`), built on the one CSV writer ([`crate::output::Table`]). Columns and
//! units are listed in `docs/output.md`.

use serde_json::json;

use super::size::SizeReport;
use super::sweep::SweepResult;
use super::uncertainty::{UncertaintyReport, Z_P90};
use crate::output::table::{Table, TableSpec, full, num, text};

/// The tables of `uncertainty`: `percentiles` (the default), `parameters`, `sensitivity`.
pub const UNCERTAINTY_TABLES: [TableSpec; 3] = [
    TableSpec {
        name: "percentiles",
        about: "one row per variant: deterministic yield and P10/P50/P90 of annual and worst-month yield",
    },
    TableSpec {
        name: "parameters",
        about: "one row per uncertain parameter (and the model-form factor): distribution, P10, P90, source",
    },
    TableSpec {
        name: "sensitivity",
        about: "one row per variant and parameter: annual yield at the parameter's P10 and P90",
    },
];

/// The percentile table: one row per variant (also `compare --samples --table uncertainty`);
/// without a report, the header alone.
pub fn percentiles_table(rep: Option<&UncertaintyReport>, name: &str) -> Table {
    let mut t = Table::new(
        name,
        &[
            "variant",
            "kind",
            "samples",
            "seed",
            "weather",
            "model_form_sd",
            "deterministic_annual_l_m2",
            "annual_l_m2_p10",
            "annual_l_m2_p50",
            "annual_l_m2_p90",
            "mean_l_day_p10",
            "mean_l_day_p50",
            "mean_l_day_p90",
            "deterministic_worst_month",
            "deterministic_worst_month_l_m2_day",
            "worst_month_l_m2_day_p10",
            "worst_month_l_m2_day_p50",
            "worst_month_l_m2_day_p90",
            "worst_month_l_day_p10",
            "worst_month_l_day_p50",
            "worst_month_l_day_p90",
            "notes",
        ],
    );
    let Some(rep) = rep else {
        return t;
    };
    for v in &rep.variants {
        let (a, l, w, wl) = (
            &v.annual_l_m2,
            &v.mean_l_day,
            &v.worst_month_l_m2_day,
            &v.worst_month_l_day,
        );
        t.push(vec![
            text(&v.name),
            text(&v.kind),
            json!(rep.samples),
            json!(rep.seed),
            text(if rep.stochastic_weather {
                "stochastic"
            } else {
                "average-day"
            }),
            full(rep.model_form_sd),
            full(v.deterministic_annual_l_m2),
            full(a.p10),
            full(a.p50),
            full(a.p90),
            full(l.p10),
            full(l.p50),
            full(l.p90),
            json!(v.deterministic_worst_month),
            full(v.deterministic_worst_month_l_m2_day),
            full(w.p10),
            full(w.p50),
            full(w.p90),
            full(wl.p10),
            full(wl.p50),
            full(wl.p90),
            text(v.notes.join("; ")),
        ]);
    }
    t
}

/// The parameter table: one row per uncertain parameter, and a last row for the model-form
/// factor.
pub fn parameters_table(rep: &UncertaintyReport) -> Table {
    let mut t = Table::new(
        "parameters",
        &[
            "parameter",
            "distribution",
            "spread",
            "p10",
            "p90",
            "source",
        ],
    );
    for p in &rep.parameters {
        t.push(vec![
            text(&p.key),
            text(&p.distribution),
            full(p.spread),
            full(p.low),
            full(p.high),
            text(&p.source),
        ]);
    }
    t.push(vec![
        text("model form (per variant)"),
        text(format!(
            "lognormal factor, median 1, sigma(ln) {:.3}",
            rep.model_form_sd
        )),
        full(rep.model_form_sd),
        full((-Z_P90 * rep.model_form_sd).exp()),
        full((Z_P90 * rep.model_form_sd).exp()),
        text(&rep.model_form_source),
    ]);
    t
}

/// The sensitivity table: one row per variant and parameter, largest swing first.
pub fn sensitivity_table(rep: &UncertaintyReport) -> Table {
    let mut t = Table::new(
        "sensitivity",
        &[
            "variant",
            "nominal_annual_l_m2",
            "parameter",
            "low_value",
            "high_value",
            "low_annual_l_m2",
            "high_annual_l_m2",
            "change_l_m2",
            "swing_fraction",
        ],
    );
    for v in &rep.sensitivity.variants {
        for b in &v.bars {
            t.push(vec![
                text(&v.name),
                full(v.nominal_annual_l_m2),
                text(&b.parameter),
                full(b.low_value),
                full(b.high_value),
                full(b.low_annual_l_m2),
                full(b.high_annual_l_m2),
                full(b.change_l_m2),
                full(b.swing_fraction),
            ]);
        }
    }
    t
}

/// Every table of [`UNCERTAINTY_TABLES`], in that order.
pub fn uncertainty_tables(rep: &UncertaintyReport) -> Vec<Table> {
    vec![
        percentiles_table(Some(rep), "percentiles"),
        parameters_table(rep),
        sensitivity_table(rep),
    ]
}

/// The tables of `size`: `sized` (the default) and `rain`.
pub const SIZE_TABLES: [TableSpec; 2] = [
    TableSpec {
        name: "sized",
        about: "one row per sized variant: units, capital, land, storage, operator time",
    },
    TableSpec {
        name: "rain",
        about: "one row per variant and month: rain the covers would catch (not distillate)",
    },
];

/// Every table of [`SIZE_TABLES`], in that order.
pub fn size_tables(rep: &SizeReport) -> Vec<Table> {
    let o = &rep.options;
    let mut sized = Table::new(
        "sized",
        &[
            "variant",
            "kind",
            "demand_l_day",
            "confidence",
            "years",
            "seed",
            "method",
            "units",
            "unit_footprint_m2",
            "footprint_m2",
            "unit_capital",
            "capital",
            "currency",
            "worst_month",
            "unit_worst_month_l_day",
            "array_worst_month_l_day",
            "met_fraction",
            "noon_elevation_deg",
            "row_height_m",
            "row_gap_m",
            "row_pitch_m",
            "land_m2",
            "storage_l",
            "longest_low_run_days",
            "operator_h_per_day",
        ],
    );
    let method = match rep.method {
        super::size::SizeMethod::Response => "response model",
        super::size::SizeMethod::Full => "full simulation",
    };
    for s in &rep.sized {
        sized.push(vec![
            text(&s.name),
            text(&s.kind),
            full(o.demand_l_day),
            full(o.confidence),
            json!(o.years),
            json!(o.seed),
            text(method),
            json!(s.units),
            full(s.unit_footprint_m2),
            full(s.footprint_m2),
            full(s.unit_capital),
            full(s.capital),
            text(&rep.currency),
            json!(s.worst_month),
            full(s.unit_worst_month_l_day),
            full(s.array_worst_month_l_day),
            full(s.met_fraction),
            full(s.noon_elevation_deg),
            full(s.row_height_m),
            full(s.row_gap_m),
            full(s.row_pitch_m),
            full(s.land_m2),
            full(s.storage_l),
            json!(s.longest_low_run_days),
            full(s.operator_h_per_day),
        ]);
    }
    let mut rain = Table::new(
        "rain",
        &[
            "variant",
            "month",
            "rain_mm",
            "caught_l",
            "caught_l_day",
            "runoff_coefficient",
        ],
    );
    for s in &rep.sized {
        for r in &s.rain {
            rain.push(vec![
                text(&s.name),
                json!(r.month),
                full(r.rain_mm),
                num(r.caught_l, 3),
                num(r.caught_l_day, 4),
                full(rep.runoff_coefficient),
            ]);
        }
    }
    vec![sized, rain]
}

/// The table of `sweep`.
pub const SWEEP_TABLES: [TableSpec; 1] = [TableSpec {
    name: "points",
    about: "one row per point: the field values, annual and worst-month yield, best, failure",
}];

/// The sweep as one table: a column per swept field (named as in the design file), then the
/// figures; `best` is true on the best point.
pub fn sweep_table(res: &SweepResult) -> Table {
    let mut columns: Vec<String> = res.axes.iter().map(|a| a.field.clone()).collect();
    columns.extend(
        [
            "annual_l_m2",
            "worst_month_l_m2_day",
            "worst_month",
            "best",
            "failed",
        ]
        .map(String::from),
    );
    let mut t = Table::with_columns("points", columns);
    for (i, p) in res.points.iter().enumerate() {
        let mut row: Vec<serde_json::Value> = p.values.iter().map(|x| full(*x)).collect();
        row.push(p.annual_l_m2.map_or(serde_json::Value::Null, full));
        row.push(p.worst_month_l_m2_day.map_or(serde_json::Value::Null, full));
        row.push(p.worst_month.map_or(serde_json::Value::Null, |m| json!(m)));
        row.push(json!(res.best == Some(i)));
        row.push(text(p.failed.as_deref().unwrap_or("")));
        t.push(row);
    }
    t
}
