//! Writing simulation results as text, JSON (the documented contract in
//! `docs/simulate-output.md`) or CSV. Every writer takes `impl Write`.

use std::io::{self, Write};

use serde::Serialize;

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

/// The JSON contract: `{"design": …, "variants": [VariantResult …]}`.
pub fn write_json(
    out: &mut impl Write,
    design_title: &str,
    results: &[VariantResult],
) -> io::Result<()> {
    serde_json::to_writer_pretty(
        &mut *out,
        &JsonOut {
            design: design_title,
            variants: results,
        },
    )
    .map_err(io::Error::other)?;
    writeln!(out)
}

/// One CSV row per variant and month; with hourly records, a second table follows after a
/// blank line, one row per variant and hour.
pub fn write_csv(out: &mut impl Write, results: &[VariantResult]) -> io::Result<()> {
    let mut w = csv::Writer::from_writer(&mut *out);
    w.write_record([
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
    ])?;
    for r in results {
        for m in &r.months {
            w.write_record([
                r.name.clone(),
                r.kind.clone(),
                m.month.to_string(),
                format!("{:.4}", m.l_m2_day),
                format!("{:.4}", m.l_day),
                format!("{:.4}", m.insolation_kwh_m2_day),
                format!("{:.4}", m.cover_insolation_kwh_m2_day),
                format!("{:.4}", m.poa_kwh_m2_day),
                format!("{:.5}", m.efficiency),
                format!("{:.4}", m.ceiling_l_m2_day),
                format!("{:.4}", m.night_share),
                format!("{:.2}", m.max_brine_c),
                format!("{:.2}", m.max_cover_c),
                m.days_to_periodic.to_string(),
                m.cycle_days.to_string(),
                format!("{:.3e}", m.energy.residual_fraction),
            ])?;
        }
    }
    w.flush()?;
    drop(w);
    if results.iter().any(|r| r.hourly.is_some()) {
        writeln!(out)?;
        let mut w = csv::Writer::from_writer(&mut *out);
        w.write_record([
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
        ])?;
        for r in results {
            for h in r.hourly.iter().flatten() {
                w.write_record([
                    r.name.clone(),
                    h.month.to_string(),
                    h.day_of_year.to_string(),
                    format!("{:.2}", h.solar_hour_h),
                    format!("{:.2}", h.t_air_c),
                    format!("{:.2}", h.t_cover_c),
                    format!("{:.2}", h.t_brine_c),
                    format!("{:.2}", h.t_liner_c),
                    format!("{:.1}", h.entering_w_m2),
                    format!("{:.1}", h.absorbed_w),
                    format!("{:.1}", h.cover_to_air_w),
                    format!("{:.1}", h.cover_to_sky_w),
                    format!("{:.1}", h.base_w),
                    format!("{:.1}", h.sides_w),
                    format!("{:.5}", h.distillate_l),
                    format!("{:.3}", h.depth_mm),
                    format!("{:.2}", h.salinity_g_kg),
                    format!("{:.4}", h.feed_l),
                    format!("{:.4}", h.flush_l),
                ])?;
            }
        }
        w.flush()?;
    }
    Ok(())
}
