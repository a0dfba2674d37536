//! Monthly summaries and exports of a weather series (CSV, JSON, text table).
//!
//! Renderers take any [`std::io::Write`], so the command line prints them and tests render
//! into a `Vec<u8>`.

use super::{Plane, SkyModel, WeatherSeries, plane_irradiance};
use crate::physics::constants::ZERO_CELSIUS_K;
use std::collections::BTreeSet;
use std::io::{self, Write};

/// One month of a series, as the climate table shows it.
#[derive(Debug, Clone, PartialEq)]
pub struct MonthlyRow {
    /// Month 1…12.
    pub month: u32,
    /// Number of days of the series in this month.
    pub days: usize,
    /// Mean daily global horizontal irradiation [kWh m⁻² day⁻¹].
    pub ghi_kwh_m2_day: f64,
    /// Mean daily irradiation on each requested plane, in the order given [kWh m⁻² day⁻¹].
    pub plane_kwh_m2_day: Vec<f64>,
    /// Mean daily maximum air temperature [°C].
    pub t_max_c: f64,
    /// Mean daily minimum air temperature [°C].
    pub t_min_c: f64,
    /// Mean air temperature [°C].
    pub t_mean_c: f64,
    /// Mean wind speed at its measurement height [m s⁻¹].
    pub wind_m_s: f64,
}

/// Summarise a series month by month, with the irradiation on each plane.
///
/// Months absent from the series are left out. Daily sums use each record's period; days
/// are counted as the distinct days of the year present.
pub fn monthly_table(series: &WeatherSeries, planes: &[Plane], model: SkyModel) -> Vec<MonthlyRow> {
    let plane_values: Vec<Vec<f64>> = planes
        .iter()
        .map(|&p| {
            series
                .plane_series(p, model)
                .iter()
                .map(|x| x.beam_w_m2 + x.sky_diffuse_w_m2 + x.ground_w_m2)
                .collect()
        })
        .collect();
    let mut out = Vec::new();
    for month in 1..=12 {
        let idx: Vec<usize> = (0..series.hours.len())
            .filter(|&i| series.hours[i].month == month)
            .collect();
        if idx.is_empty() {
            continue;
        }
        let days: BTreeSet<u32> = idx.iter().map(|&i| series.hours[i].day_of_year).collect();
        let nd = days.len().max(1) as f64;
        let wh = |f: &dyn Fn(usize) -> f64| -> f64 {
            idx.iter()
                .map(|&i| f(i) * series.hours[i].period_h)
                .sum::<f64>()
                / nd
                / 1000.0
        };
        let ghi = wh(&|i| series.hours[i].ghi_w_m2);
        let plane_kwh_m2_day = plane_values.iter().map(|v| wh(&|i| v[i])).collect();
        let (mut tmax_sum, mut tmin_sum) = (0.0, 0.0);
        for d in &days {
            let temps = idx
                .iter()
                .filter(|&&i| series.hours[i].day_of_year == *d)
                .map(|&i| series.hours[i].t_air_k - ZERO_CELSIUS_K);
            let (lo, hi) = temps.fold((f64::INFINITY, f64::NEG_INFINITY), |(lo, hi), t| {
                (lo.min(t), hi.max(t))
            });
            tmax_sum += hi;
            tmin_sum += lo;
        }
        let n = idx.len() as f64;
        out.push(MonthlyRow {
            month,
            days: days.len(),
            ghi_kwh_m2_day: ghi,
            plane_kwh_m2_day,
            t_max_c: tmax_sum / nd,
            t_min_c: tmin_sum / nd,
            t_mean_c: idx
                .iter()
                .map(|&i| series.hours[i].t_air_k - ZERO_CELSIUS_K)
                .sum::<f64>()
                / n,
            wind_m_s: idx.iter().map(|&i| series.hours[i].wind_m_s).sum::<f64>() / n,
        });
    }
    out
}

const MONTHS: [&str; 12] = [
    "Jan", "Feb", "Mar", "Apr", "May", "Jun", "Jul", "Aug", "Sep", "Oct", "Nov", "Dec",
];

/// Print the monthly table as aligned text, one column per plane named in `plane_names`.
pub fn render_monthly_table(
    w: &mut impl Write,
    rows: &[MonthlyRow],
    plane_names: &[String],
) -> io::Result<()> {
    write!(w, "{:<5} {:>10}", "month", "GHI")?;
    for name in plane_names {
        write!(w, " {:>12}", truncate(name, 12))?;
    }
    writeln!(
        w,
        " {:>7} {:>7} {:>7} {:>6}",
        "Tmax", "Tmin", "Tmean", "wind"
    )?;
    write!(w, "{:<5} {:>10}", "", "kWh/m²/d")?;
    for _ in plane_names {
        write!(w, " {:>12}", "kWh/m²/d")?;
    }
    writeln!(w, " {:>7} {:>7} {:>7} {:>6}", "°C", "°C", "°C", "m/s")?;
    for r in rows {
        let name = MONTHS
            .get((r.month as usize).wrapping_sub(1))
            .unwrap_or(&"?");
        write!(w, "{name:<5} {:>10.2}", r.ghi_kwh_m2_day)?;
        for v in &r.plane_kwh_m2_day {
            write!(w, " {v:>12.2}")?;
        }
        writeln!(
            w,
            " {:>7.1} {:>7.1} {:>7.1} {:>6.1}",
            r.t_max_c, r.t_min_c, r.t_mean_c, r.wind_m_s
        )?;
    }
    Ok(())
}

fn truncate(s: &str, n: usize) -> String {
    s.chars().take(n).collect()
}

/// Header of the hourly CSV export.
pub const HOURLY_CSV_HEADER: &str = "month,day_of_year,hour_mid_solar_h,period_h,ghi_w_m2,\
dhi_w_m2,dni_w_m2,t_air_c,t_dew_c,wind_m_s,wind_height_m,sun_zenith_deg,sun_azimuth_deg,\
beam_visible_fraction,measured_poa_w_m2";

/// Write the hourly series as CSV (one row per record, header [`HOURLY_CSV_HEADER`]),
/// optionally with the irradiance on planes (`poa_<name>_w_m2` columns).
pub fn write_hourly_csv(
    w: &mut (impl Write + ?Sized),
    series: &WeatherSeries,
    planes: &[(String, Plane)],
    model: SkyModel,
) -> io::Result<()> {
    write!(w, "{HOURLY_CSV_HEADER}")?;
    for (name, _) in planes {
        write!(w, ",poa_{name}_w_m2")?;
    }
    writeln!(w)?;
    for (i, h) in series.hours.iter().enumerate() {
        write!(
            w,
            "{},{},{:.3},{:.4},{:.2},{:.2},{:.2},{:.2},{:.2},{:.2},{:.1},{:.3},{:.3},{:.3},",
            h.month,
            h.day_of_year,
            h.hour_mid_solar_h,
            h.period_h,
            h.ghi_w_m2,
            h.dhi_w_m2,
            h.dni_w_m2,
            h.t_air_k - ZERO_CELSIUS_K,
            h.t_dew_k - ZERO_CELSIUS_K,
            h.wind_m_s,
            h.wind_height_m,
            h.sun.zenith_rad.to_degrees(),
            h.sun.azimuth_rad.to_degrees(),
            h.beam_visible_fraction,
        )?;
        if let Some(p) = h.measured_poa_w_m2 {
            write!(w, "{p:.2}")?;
        }
        for (_, plane) in planes {
            let p = plane_irradiance(&series.hours[i], *plane, series.albedo, model);
            write!(
                w,
                ",{:.2}",
                p.beam_w_m2 + p.sky_diffuse_w_m2 + p.ground_w_m2
            )?;
        }
        writeln!(w)?;
    }
    Ok(())
}

/// Write the hourly series as a JSON array of objects with the CSV export's field names.
pub fn write_hourly_json(w: &mut (impl Write + ?Sized), series: &WeatherSeries) -> io::Result<()> {
    let rows: Vec<serde_json::Value> = series
        .hours
        .iter()
        .map(|h| {
            serde_json::json!({
                "month": h.month,
                "day_of_year": h.day_of_year,
                "hour_mid_solar_h": h.hour_mid_solar_h,
                "period_h": h.period_h,
                "ghi_w_m2": h.ghi_w_m2,
                "dhi_w_m2": h.dhi_w_m2,
                "dni_w_m2": h.dni_w_m2,
                "t_air_c": h.t_air_k - ZERO_CELSIUS_K,
                "t_dew_c": h.t_dew_k - ZERO_CELSIUS_K,
                "wind_m_s": h.wind_m_s,
                "wind_height_m": h.wind_height_m,
                "sun_zenith_deg": h.sun.zenith_rad.to_degrees(),
                "sun_azimuth_deg": h.sun.azimuth_rad.to_degrees(),
                "beam_visible_fraction": h.beam_visible_fraction,
                "measured_poa_w_m2": h.measured_poa_w_m2,
            })
        })
        .collect();
    serde_json::to_writer_pretty(&mut *w, &rows).map_err(io::Error::from)?;
    writeln!(w)
}
