//! Every table of the report as data, exported as CSV and JSON beside the report.

use serde_json::json;

use super::context::ReportContext;

/// One exported table: the shared CSV/JSON table of every command (docs/output.md).
pub use crate::output::Table;

/// The tables of a context: summary, need, climate, ranking, monthly yield, sizing, energy
/// balance, life-cycle cost, operation, day profile, environment, references (and the hooks'
/// tables when present).
pub fn tables(ctx: &ReportContext) -> Vec<Table> {
    let mut out = Vec::new();
    let s = &ctx.summary;
    let mut t = Table::new("summary", &["figure", "value", "unit"]);
    let cur = &ctx.meta.currency;
    for (k, v, u) in [
        ("recommended", json!(s.recommended), String::new()),
        ("kind", json!(s.kind), String::new()),
        ("score", json!(s.score), "-".into()),
        ("annual_l_m2", json!(s.annual_l_m2), "L/m²/year".into()),
        ("worst_month", json!(s.worst_month), "month".into()),
        (
            "worst_month_l_m2_day",
            json!(s.worst_month_l_m2_day),
            "L/m²/day".into(),
        ),
        ("cost_per_l", json!(s.cost_per_l), format!("{cur}/L")),
        (
            "capital_per_l_day",
            json!(s.capital_per_l_day),
            format!("{cur} per L/day"),
        ),
        (
            "complexity_points",
            json!(s.complexity_points),
            "points".into(),
        ),
        ("units", json!(s.sizing.units), "units".into()),
        ("footprint_m2", json!(s.sizing.footprint_m2), "m²".into()),
        ("land_m2", json!(s.sizing.land_m2), "m²".into()),
        ("capital", json!(s.sizing.capital), cur.clone()),
        (
            "operator_h_per_day",
            json!(s.sizing.operator_h_per_day),
            "h/day".into(),
        ),
        (
            "cost_per_person_year",
            json!(s.cost_per_person_year),
            format!("{cur}/person/year"),
        ),
    ] {
        t.rows.push(vec![json!(k), v, json!(u)]);
    }
    if let Some(u) = ctx
        .uncertainty
        .as_ref()
        .and_then(|u| u.variants.iter().find(|v| v.name == s.recommended))
    {
        for (i, p) in ["p10", "p50", "p90"].iter().enumerate() {
            t.rows.push(vec![
                json!(format!("annual_l_m2_{p}")),
                json!(u.annual_l_m2[i]),
                json!("L/m²/year"),
            ]);
        }
        for (i, p) in ["p10", "p50", "p90"].iter().enumerate() {
            t.rows.push(vec![
                json!(format!("worst_month_l_m2_day_{p}")),
                json!(u.worst_month_l_m2_day[i]),
                json!("L/m²/day"),
            ]);
        }
    }
    if let Some(c) = &s.confident {
        for (k, v, u) in [
            ("confidence", json!(c.confidence), "-".to_owned()),
            ("confidence_years", json!(c.years), "years".into()),
            ("confident_units", json!(c.units), "units".into()),
            ("confident_footprint_m2", json!(c.footprint_m2), "m²".into()),
            ("confident_land_m2", json!(c.land_m2), "m²".into()),
            ("confident_storage_l", json!(c.storage_l), "L".into()),
            ("confident_capital", json!(c.capital), cur.clone()),
            (
                "confident_operator_h_per_day",
                json!(c.operator_h_per_day),
                "h/day".into(),
            ),
        ] {
            t.rows.push(vec![json!(k), v, json!(u)]);
        }
    }
    out.push(t);

    let mut t = Table::new("need", &["use", "l_per_person_day", "source"]);
    for r in &ctx.need.minimums {
        t.rows.push(vec![
            json!(r.water_use),
            json!(r.l_per_person_day),
            json!(r.source),
        ]);
    }
    out.push(t);

    let mut t = Table::new(
        "climate",
        &["month", "ghi_kwh_m2_day", "t_max_c", "t_min_c", "rain_mm"],
    );
    for m in &ctx.site.months {
        t.rows.push(vec![
            json!(m.month),
            json!(m.ghi_kwh_m2_day),
            json!(m.t_max_c),
            json!(m.t_min_c),
            json!(m.rain_mm),
        ]);
    }
    out.push(t);

    let mut t = Table::new(
        "ranking",
        &[
            "rank",
            "variant",
            "score",
            "annual_l_m2",
            "worst_month_l_m2_day",
            "cost_per_l",
            "capital_per_l_day",
            "complexity_points",
            "pareto",
            "not_local",
            "explanation",
        ],
    );
    for r in &ctx.variants.ranking {
        let v = &r.values;
        t.rows.push(vec![
            json!(r.rank),
            json!(r.name),
            json!(r.score),
            json!(v.annual_l_m2),
            json!(v.worst_month_l_m2_day),
            json!(v.cost_per_l),
            json!(v.capital_per_l_day),
            json!(v.complexity_points),
            json!(r.pareto),
            json!(r.not_local.join(";")),
            json!(r.explanation),
        ]);
    }
    out.push(t);

    let mut cols = vec!["variant".to_owned(), "kind".to_owned()];
    cols.extend(
        super::build::MONTHS
            .iter()
            .map(|m| format!("{}_l_m2_day", m.to_lowercase())),
    );
    let mut t = Table {
        name: "monthly_yield".into(),
        columns: cols,
        rows: Vec::new(),
    };
    for m in &ctx.variants.monthly {
        let mut row = vec![json!(m.name), json!(m.kind)];
        row.extend(m.l_m2_day.iter().map(|x| json!(x)));
        t.rows.push(row);
    }
    out.push(t);

    let mut t = Table::new(
        "sizing",
        &[
            "variant",
            "units",
            "footprint_m2",
            "land_m2",
            "capital",
            "array_worst_month_l_day",
            "operator_h_per_day",
        ],
    );
    for r in &ctx.variants.sizing {
        t.rows.push(vec![
            json!(r.name),
            json!(r.units),
            json!(r.footprint_m2),
            json!(r.land_m2),
            json!(r.capital),
            json!(r.array_worst_month_l_day),
            json!(r.operator_h_per_day),
        ]);
    }
    out.push(t);

    let mut t = Table::new(
        "energy_balance",
        &[
            "variant",
            "kind",
            "energy_residual",
            "mean_l_m2_day",
            "ceiling_l_m2_day",
            "share_of_ceiling",
            "mean_efficiency",
        ],
    );
    for r in &ctx.justification.variants {
        t.rows.push(vec![
            json!(r.name),
            json!(r.kind),
            json!(r.energy_residual),
            json!(r.mean_l_m2_day),
            json!(r.ceiling_l_m2_day),
            json!(r.share_of_ceiling),
            json!(r.mean_efficiency),
        ]);
    }
    out.push(t);

    let mut t = Table::new(
        "life_cycle",
        &[
            "variant",
            "capital",
            "replacements_present_worth",
            "installation_units",
            "installation_operator_h_per_day",
            "unit_operator_h_per_year",
            "unit_operator_cost_per_year",
            "upkeep_per_year",
            "annualised",
            "life_years",
            "discount_rate",
            "cost_per_l",
            "cost_per_person_year",
        ],
    );
    for r in &ctx.life_cycle.variants {
        t.rows.push(vec![
            json!(r.name),
            json!(r.capital),
            json!(r.replacements_present_worth),
            json!(r.installation_units),
            json!(r.installation_operator_h_per_day),
            json!(r.operator_h_per_year),
            json!(r.operator_cost_per_year),
            json!(r.upkeep_per_year),
            json!(r.annualised),
            json!(r.life_years),
            json!(r.discount_rate),
            json!(r.cost_per_l),
            json!(r.cost_per_person_year),
        ]);
    }
    out.push(t);

    let mut t = Table::new(
        "operation",
        &[
            "variant",
            "feed",
            "flush",
            "set_depth_mm",
            "feed_l_day",
            "flush_l_day",
            "peak_salinity_g_kg",
            "dry_out_h",
        ],
    );
    for r in &ctx.operation.variants {
        t.rows.push(vec![
            json!(r.name),
            json!(r.feed),
            json!(r.flush),
            json!(r.set_depth_mm),
            json!(r.feed_l_day),
            json!(r.flush_l_day),
            json!(r.peak_salinity_g_kg),
            json!(r.dry_out_h),
        ]);
    }
    out.push(t);

    let mut t = Table::new(
        "day_profile",
        &["solar_hour_h", "depth_mm", "salinity_g_kg", "distillate_l"],
    );
    for h in &ctx.operation.profile {
        t.rows.push(vec![
            json!(h.solar_hour_h),
            json!(h.depth_mm),
            json!(h.salinity_g_kg),
            json!(h.distillate_l),
        ]);
    }
    out.push(t);

    let mut t = Table::new(
        "environment",
        &["variant", "units", "brine_l_day", "salt_kg_year"],
    );
    for r in &ctx.environment.variants {
        t.rows.push(vec![
            json!(r.name),
            json!(r.units),
            json!(r.brine_l_day),
            json!(r.salt_kg_year),
        ]);
    }
    out.push(t);

    if let Some(u) = &ctx.uncertainty {
        let mut t = Table::new(
            "uncertainty",
            &[
                "variant",
                "annual_p10",
                "annual_p50",
                "annual_p90",
                "worst_p10",
                "worst_p50",
                "worst_p90",
            ],
        );
        for r in &u.variants {
            let mut row = vec![json!(r.name)];
            row.extend(r.annual_l_m2.iter().map(|x| json!(x)));
            row.extend(r.worst_month_l_m2_day.iter().map(|x| json!(x)));
            t.rows.push(row);
        }
        out.push(t);
    }
    if let Some(s) = &ctx.sensitivity {
        let mut t = Table::new("sensitivity", &["parameter", "low", "high", "base"]);
        for b in &s.bars {
            t.rows.push(vec![
                json!(b.parameter),
                json!(b.low),
                json!(b.high),
                json!(s.base),
            ]);
        }
        out.push(t);
    }
    if let Some(a) = &ctx.alternatives {
        let mut t = Table::new(
            "alternatives",
            &[
                "name",
                "cost_per_l",
                "relative_to_still",
                "removes",
                "does_not_remove",
            ],
        );
        for r in &a.rows {
            t.rows.push(vec![
                json!(r.name),
                json!(r.cost_per_l),
                json!(r.relative_to_still),
                json!(r.removes),
                json!(r.does_not_remove),
            ]);
        }
        out.push(t);
    }
    if let Some(r) = &ctx.risks {
        let mut t = Table::new("risks", &["failure", "likelihood", "impact", "mitigation"]);
        for x in &r.rows {
            t.rows.push(vec![
                json!(x.failure),
                json!(x.likelihood),
                json!(x.impact),
                json!(x.mitigation),
            ]);
        }
        out.push(t);
    }
    if let Some(v) = &ctx.validation {
        let mut t = Table::new(
            "validation",
            &[
                "device",
                "source",
                "conditions",
                "published",
                "predicted",
                "unit",
                "error",
            ],
        );
        for x in &v.rows {
            t.rows.push(vec![
                json!(x.device),
                json!(x.source),
                json!(x.conditions),
                json!(x.published),
                json!(x.predicted),
                json!(x.unit),
                json!(x.error),
            ]);
        }
        out.push(t);
    }

    let mut t = Table::new("references", &["key", "citation"]);
    for r in &ctx.references {
        t.rows.push(vec![json!(r.key), json!(r.text)]);
    }
    out.push(t);
    out
}
