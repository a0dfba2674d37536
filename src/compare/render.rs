//! The text and the CSV tables of `uncertainty`, `size` and `sweep` (and the uncertainty
//! table of `compare --samples`); CSV on the one CSV writer ([`crate::output::Table`]).
//! Columns and units are listed in `docs/output.md`. Every writer takes `impl Write`.

use std::io::Write;

use serde_json::json;

use super::Percentiles;
use super::size::{
    DRINKING_AND_COOKING_L_PER_PERSON_DAY, DRINKING_L_PER_PERSON_DAY, SizeMethod, SizeReport,
};
use super::sweep::{SweepResult, Target};
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

fn p3(p: &Percentiles, decimals: usize) -> String {
    format!(
        "{:.d$} / {:.d$} / {:.d$}",
        p.p10,
        p.p50,
        p.p90,
        d = decimals
    )
}

/// The percentile table (also printed by `compare --samples`).
pub fn write_percentiles(out: &mut impl Write, rep: &UncertaintyReport) -> std::io::Result<()> {
    writeln!(
        out,
        "Monte Carlo: {} samples, seed {}, {} weather, model-form SD {:.0} % (P10 / P50 / P90)",
        rep.samples,
        rep.seed,
        if rep.stochastic_weather {
            "stochastic"
        } else {
            "average-day"
        },
        rep.model_form_sd * 100.0
    )?;
    writeln!(
        out,
        "{:<16} {:>8} {:>22} {:>20} {:>8} {:>20} {:>20}",
        "variant",
        "det.",
        "L/m²/year",
        "L/day (year mean)",
        "det.",
        "worst month L/m²/day",
        "worst month L/day"
    )?;
    for v in &rep.variants {
        writeln!(
            out,
            "{:<16} {:>8.0} {:>22} {:>20} {:>8.2} {:>20} {:>20}",
            v.name,
            v.deterministic_annual_l_m2,
            p3(&v.annual_l_m2, 0),
            p3(&v.mean_l_day, 1),
            v.deterministic_worst_month_l_m2_day,
            p3(&v.worst_month_l_m2_day, 2),
            p3(&v.worst_month_l_day, 1)
        )?;
    }
    writeln!(
        out,
        "det. = deterministic (monthly average days, nominal parameters), as `simulate` and \
         `compare` report it."
    )?;
    for v in &rep.variants {
        for n in &v.notes {
            writeln!(out, "note: {}: {n}", v.name)?;
        }
    }
    Ok(())
}

/// Write the whole Monte Carlo report as text: percentiles, parameters, sensitivity.
pub fn write_uncertainty_text(
    out: &mut impl Write,
    rep: &UncertaintyReport,
) -> std::io::Result<()> {
    write_percentiles(out, rep)?;
    writeln!(out, "\nUncertain parameters (low = P10, high = P90):")?;
    writeln!(
        out,
        "  {:<24} {:<40} {:>8} {:>8}  source",
        "parameter", "distribution", "low", "high"
    )?;
    for p in &rep.parameters {
        writeln!(
            out,
            "  {:<24} {:<40} {:>8.3} {:>8.3}  {}",
            p.key, p.distribution, p.low, p.high, p.source
        )?;
    }
    writeln!(
        out,
        "  {:<24} {:<40} {:>8.3} {:>8.3}  {}",
        "model form (per variant)",
        format!("lognormal factor, median 1, σ(ln) {:.3}", rep.model_form_sd),
        (-Z_P90 * rep.model_form_sd).exp(),
        (Z_P90 * rep.model_form_sd).exp(),
        rep.model_form_source
    )?;
    writeln!(
        out,
        "  Offsets add to the design or library value; multipliers scale it. Vapour leakage does \
         not apply to a multi-effect still, insulation only where the variant has some."
    )?;
    writeln!(
        out,
        "\nSensitivity: annual yield at the parameter's low and high value, others nominal \
         [L/m²/year], largest swing first:"
    )?;
    for v in &rep.sensitivity.variants {
        writeln!(out, "  {} (nominal {:.0}):", v.name, v.nominal_annual_l_m2)?;
        for b in &v.bars {
            writeln!(
                out,
                "    {:<24} {:>7.0} → {:>7.0}  ({:+.0}, {:.1} %)",
                b.parameter,
                b.low_annual_l_m2,
                b.high_annual_l_m2,
                b.change_l_m2,
                b.swing_fraction * 100.0
            )?;
        }
    }
    if !rep.skipped.is_empty() {
        writeln!(out, "\nNo figures:")?;
        for s in &rep.skipped {
            writeln!(out, "  {}: {}", s.name, s.reason)?;
        }
    }
    writeln!(out)
}

/// Write the sizing as text: a row per variant, the rain apart, and what each column means.
pub fn write_size_text(
    out: &mut impl Write,
    title: &str,
    demand_note: &str,
    rep: &SizeReport,
) -> std::io::Result<()> {
    let o = &rep.options;
    let cur = &rep.currency;
    writeln!(out, "{title}\n")?;
    writeln!(out, "demand: {demand_note}")?;
    writeln!(
        out,
        "met in the worst month in at least {:.0} % of {} stochastic years (seed {}), {}",
        o.confidence * 100.0,
        o.years,
        o.seed,
        match rep.method {
            SizeMethod::Response => "from each variant's validated daily response model",
            SizeMethod::Full => "each year simulated hour by hour (--full)",
        }
    )?;
    writeln!(
        out,
        "per person (Sphere Handbook 2018, from memory): drinking {DRINKING_L_PER_PERSON_DAY} \
         L/day, drinking and cooking {DRINKING_AND_COOKING_L_PER_PERSON_DAY} L/day\n"
    )?;
    writeln!(
        out,
        "{:<20} {:>6} {:>10} {:>12} {:>6} {:>12} {:>6} {:>8} {:>9} {:>10} {:>10} {:>8} {:>8}",
        "variant",
        "units",
        "area m²",
        format!("capital {cur}"),
        "worst",
        "array L/day",
        "met %",
        "sun noon",
        "pitch m",
        "land m²",
        "storage L",
        "low days",
        "op h/day"
    )?;
    for s in &rep.sized {
        writeln!(
            out,
            "{:<20} {:>6} {:>10.1} {:>12.0} {:>6} {:>12.1} {:>6.0} {:>7.1}° {:>9.2} {:>10.1} {:>10.0} {:>8} {:>8.1}",
            s.name,
            s.units,
            s.footprint_m2,
            s.capital,
            s.worst_month,
            s.array_worst_month_l_day,
            s.met_fraction * 100.0,
            s.noon_elevation_deg,
            s.row_pitch_m,
            s.land_m2,
            s.storage_l,
            s.longest_low_run_days,
            s.operator_h_per_day
        )?;
    }
    let with_rain: Vec<_> = rep.sized.iter().filter(|s| !s.rain.is_empty()).collect();
    if !with_rain.is_empty() {
        writeln!(
            out,
            "\nRain the covers would catch (not distillate; runoff coefficient {}, common \
             practice), L/month:",
            rep.runoff_coefficient
        )?;
        write!(out, "{:<20}", "variant")?;
        for m in 1..=12 {
            write!(out, " {m:>7}")?;
        }
        writeln!(out)?;
        for s in with_rain {
            write!(out, "{:<20}", s.name)?;
            for r in &s.rain {
                write!(out, " {:>7.0}", r.caught_l)?;
            }
            writeln!(out)?;
        }
    }
    writeln!(
        out,
        "\nworst: the month that set the size; met %: share of the simulated years the array \
         meets;\nsun noon: sun elevation at noon on the worst month's average day; pitch: plan \
         depth + the\nnoon shadow of the row's top edge; land: units × length × pitch; storage: \
         the tank that\ncarries the deficit of low-output days (array output below the demand), \
         at the confidence;\nlow days: the longest run of low-output days, at the confidence;\nop h/day: \
         the operator's time a day for the array (a daily round plus each unit's tasks, \
         [costs.operator])."
    )?;
    if !rep.skipped.is_empty() {
        writeln!(out, "\nNot sized:")?;
        for s in &rep.skipped {
            writeln!(out, "  {}: {}", s.name, s.reason)?;
        }
    }
    Ok(())
}

fn fmt_opt(x: Option<f64>, width: usize, decimals: usize) -> String {
    x.map_or_else(
        || format!("{:>width$}", "–"),
        |v| format!("{v:>width$.decimals$}"),
    )
}

/// Write the sweep as text: a row per point (a grid for two fields) and the best point.
pub fn write_sweep_text(out: &mut impl Write, res: &SweepResult) -> std::io::Result<()> {
    writeln!(
        out,
        "sweep of `{}`, maximising {}\n",
        res.variant,
        res.target.label()
    )?;
    let mut head = String::new();
    for a in &res.axes {
        head.push_str(&format!("{:>w$}  ", a.field, w = a.field.len().max(8)));
    }
    writeln!(
        out,
        "{head}{:>10}  {:>14}  {:>11}  best  note",
        "L/m²/year", "worst L/m²/day", "worst month"
    )?;
    for (i, p) in res.points.iter().enumerate() {
        let mut row = String::new();
        for (a, x) in res.axes.iter().zip(&p.values) {
            row.push_str(&format!("{x:>w$}  ", w = a.field.len().max(8)));
        }
        writeln!(
            out,
            "{row}{}  {}  {:>11}  {:<4}  {}",
            fmt_opt(p.annual_l_m2, 10, 0),
            fmt_opt(p.worst_month_l_m2_day, 14, 3),
            p.worst_month.map_or_else(|| "–".into(), |m| m.to_string()),
            if res.best == Some(i) { "*" } else { "" },
            p.failed
                .as_deref()
                .map_or_else(String::new, |f| format!("not simulated: {f}"))
        )?;
    }
    if let [a, b] = res.axes.as_slice() {
        writeln!(
            out,
            "\n{} by {} (rows) and {} (columns):",
            res.target.label(),
            a.field,
            b.field
        )?;
        let mut line = format!("{:>12}", "");
        for y in &b.values {
            line.push_str(&format!("  {y:>9}"));
        }
        writeln!(out, "{line}")?;
        for (r, x) in a.values.iter().enumerate() {
            let mut line = format!("{x:>12}");
            for c in 0..b.values.len() {
                let v = res
                    .points
                    .get(r * b.values.len() + c)
                    .and_then(|p| p.target_value(res.target));
                let d = if res.target == Target::Annual { 0 } else { 3 };
                line.push_str(&format!("  {}", fmt_opt(v, 9, d)));
            }
            writeln!(out, "{line}")?;
        }
    }
    writeln!(out)?;
    match res.best.and_then(|b| res.points.get(b)) {
        Some(p) => {
            let at: Vec<String> = res
                .axes
                .iter()
                .zip(&p.values)
                .map(|(a, x)| format!("{} = {x}", a.field))
                .collect();
            writeln!(
                out,
                "best for {}: {} — {:.0} L/m²/year, worst month {:.3} L/m²/day (month {})",
                res.target.label(),
                at.join(", "),
                p.annual_l_m2.unwrap_or(f64::NAN),
                p.worst_month_l_m2_day.unwrap_or(f64::NAN),
                p.worst_month.unwrap_or(0)
            )?;
            for e in &res.edges {
                writeln!(
                    out,
                    "note: the best point is at the {} end of the {} range ({}); the optimum \
                     may lie beyond it — widen the range",
                    e.end, e.field, e.value
                )?;
            }
        }
        None => writeln!(out, "no point could be simulated trustworthily")?,
    }
    let failed = res.points.iter().filter(|p| p.failed.is_some()).count();
    if failed > 0 {
        writeln!(
            out,
            "{failed} of {} points not simulated (see the notes above)",
            res.points.len()
        )?;
    }
    Ok(())
}
