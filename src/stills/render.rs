//! Writing simulation results as text, JSON or CSV tables (the contract in `docs/output.md`).
//! Every writer takes `impl Write`.

use std::io::{self, Write};

use serde::Serialize;
use serde_json::json;

use crate::output::table::{Table, TableSpec, num, text};

use super::VariantResult;

const MONTHS: [&str; 12] = [
    "Jan", "Feb", "Mar", "Apr", "May", "Jun", "Jul", "Aug", "Sep", "Oct", "Nov", "Dec",
];

fn month_name(m: u32) -> &'static str {
    MONTHS
        .get((m.clamp(1, 12) - 1) as usize)
        .copied()
        .unwrap_or("?")
}

/// A readable monthly table per variant, annual figures and the energy residual.
pub fn write_text(
    out: &mut impl Write,
    design_title: &str,
    results: &[VariantResult],
) -> io::Result<()> {
    writeln!(out, "{design_title}")?;
    for r in results {
        writeln!(out)?;
        writeln!(
            out,
            "{} ({}): footprint {:.2} m², cover {:.2} m², evaporating {:.2} m²",
            r.name, r.kind, r.footprint_m2, r.aperture_m2, r.evaporating_m2
        )?;
        writeln!(
            out,
            "month  L/m²/day  L/day  GHI kWh/m²  in through cover  efficiency  ceiling L/m²  night  brine max °C  cover max °C  days"
        )?;
        for m in &r.months {
            writeln!(
                out,
                "{:<5}  {:>8.2}  {:>5.1}  {:>10.2}  {:>16.2}  {:>9.1}%  {:>12.2}  {:>4.0}%  {:>12.1}  {:>12.1}  {:>4}",
                month_name(m.month),
                m.l_m2_day,
                m.l_day,
                m.insolation_kwh_m2_day,
                m.cover_insolation_kwh_m2_day,
                100.0 * m.efficiency,
                m.ceiling_l_m2_day,
                100.0 * m.night_share,
                m.max_brine_c,
                m.max_cover_c,
                m.days_to_periodic
            )?;
        }
        writeln!(
            out,
            "annual: {:.0} L ({:.0} L/m²), mean {:.2} L/m²/day, worst month {} at {:.2} L/m²/day",
            r.annual_l,
            r.annual_l_m2,
            r.mean_l_m2_day,
            month_name(r.worst_month.month),
            r.worst_month.l_m2_day
        )?;
        writeln!(
            out,
            "energy balance residual: {:.1e} of absorbed sunlight (largest month)",
            r.energy_residual
        )?;
        if let Some(hours) = &r.hourly {
            writeln!(
                out,
                "hourly: month day hour  air °C  cover °C  brine °C  liner °C  in W/m²  to air W  to sky W  base W  sides W  distillate L  depth mm  salinity g/kg"
            )?;
            for h in hours {
                writeln!(
                    out,
                    "        {:>5} {:>3} {:>4.1}  {:>6.1}  {:>8.1}  {:>8.1}  {:>8.1}  {:>7.0}  {:>8.0}  {:>8.0}  {:>6.0}  {:>7.0}  {:>12.3}  {:>8.2}  {:>13.1}",
                    h.month,
                    h.day_of_year,
                    h.solar_hour_h,
                    h.t_air_c,
                    h.t_cover_c,
                    h.t_brine_c,
                    h.t_liner_c,
                    h.entering_w_m2,
                    h.cover_to_air_w,
                    h.cover_to_sky_w,
                    h.base_w,
                    h.sides_w,
                    h.distillate_l,
                    h.depth_mm,
                    h.salinity_g_kg
                )?;
            }
        }
    }
    Ok(())
}

#[derive(Serialize)]
struct JsonOut<'a> {
    design: &'a str,
    variants: &'a [VariantResult],
}

/// The JSON contract (docs/output.md): `{"schema_version", "design", "variants":
/// [VariantResult …]}`.
pub fn write_json(
    out: &mut impl Write,
    design_title: &str,
    results: &[VariantResult],
) -> io::Result<()> {
    crate::output::write_document(
        out,
        &JsonOut {
            design: design_title,
            variants: results,
        },
    )
}

/// The CSV tables of `simulate`: `monthly` (the default) and `hourly`.
pub const TABLES: [TableSpec; 2] = [
    TableSpec {
        name: "monthly",
        about: "one row per variant and month",
    },
    TableSpec {
        name: "hourly",
        about: "one row per variant and hourly record (with --hourly)",
    },
];

/// The monthly table: one row per variant and month.
pub fn monthly_table(results: &[VariantResult]) -> Table {
    let mut t = Table::new(
        "monthly",
        &[
            "variant",
            "kind",
            "month",
            "l_m2_day",
            "l_day",
            "insolation_kwh_m2_day",
            "cover_insolation_kwh_m2_day",
            "poa_kwh_m2_day",
            "efficiency",
            "ceiling_l_m2_day",
            "night_share",
            "max_brine_c",
            "max_cover_c",
            "days_to_periodic",
            "cycle_days",
            "residual_fraction",
        ],
    );
    for r in results {
        for m in &r.months {
            t.push(vec![
                text(&r.name),
                text(&r.kind),
                json!(m.month),
                num(m.l_m2_day, 4),
                num(m.l_day, 4),
                num(m.insolation_kwh_m2_day, 4),
                num(m.cover_insolation_kwh_m2_day, 4),
                num(m.poa_kwh_m2_day, 4),
                num(m.efficiency, 5),
                num(m.ceiling_l_m2_day, 4),
                num(m.night_share, 4),
                num(m.max_brine_c, 2),
                num(m.max_cover_c, 2),
                json!(m.days_to_periodic),
                json!(m.cycle_days),
                text(format!("{:.3e}", m.energy.residual_fraction)),
            ]);
        }
    }
    t
}

/// The hourly table: one row per variant and hourly record (empty without hourly records).
pub fn hourly_table(results: &[VariantResult]) -> Table {
    let mut t = Table::new(
        "hourly",
        &[
            "variant",
            "month",
            "day_of_year",
            "solar_hour_h",
            "t_air_c",
            "t_cover_c",
            "t_brine_c",
            "t_liner_c",
            "entering_w_m2",
            "absorbed_w",
            "cover_to_air_w",
            "cover_to_sky_w",
            "base_w",
            "sides_w",
            "distillate_l",
            "depth_mm",
            "salinity_g_kg",
            "feed_l",
            "flush_l",
        ],
    );
    for r in results {
        for h in r.hourly.iter().flatten() {
            t.push(vec![
                text(&r.name),
                json!(h.month),
                json!(h.day_of_year),
                num(h.solar_hour_h, 2),
                num(h.t_air_c, 2),
                num(h.t_cover_c, 2),
                num(h.t_brine_c, 2),
                num(h.t_liner_c, 2),
                num(h.entering_w_m2, 1),
                num(h.absorbed_w, 1),
                num(h.cover_to_air_w, 1),
                num(h.cover_to_sky_w, 1),
                num(h.base_w, 1),
                num(h.sides_w, 1),
                num(h.distillate_l, 5),
                num(h.depth_mm, 3),
                num(h.salinity_g_kg, 2),
                num(h.feed_l, 4),
                num(h.flush_l, 4),
            ]);
        }
    }
    t
}

/// Every table of [`TABLES`], in that order.
pub fn tables(results: &[VariantResult]) -> Vec<Table> {
    vec![monthly_table(results), hourly_table(results)]
}
