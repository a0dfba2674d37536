//! Monthly summaries and exports of a weather series (CSV, JSON, text table).
//!
//! Renderers take any [`std::io::Write`], so the command line prints them and tests render
//! into a `Vec<u8>`.

use super::{Plane, SkyModel, WeatherSeries, plane_irradiance};
use crate::physics::constants::ZERO_CELSIUS_K;
use std::collections::BTreeSet;
use std::io::{self, Write};

use serde_json::{Value, json};

use crate::output::table::{Table, TableSpec, num};

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

/// Column names of the hourly export before the plane columns (CSV header and JSON fields).
pub const HOURLY_COLUMNS: [&str; 15] = [
    "month",
    "day_of_year",
    "hour_mid_solar_h",
    "period_h",
    "ghi_w_m2",
    "dhi_w_m2",
    "dni_w_m2",
    "t_air_c",
    "t_dew_c",
    "wind_m_s",
    "wind_height_m",
    "sun_zenith_deg",
    "sun_azimuth_deg",
    "beam_visible_fraction",
    "measured_poa_w_m2",
];

/// Header of the hourly CSV export (before the `poa_<name>_w_m2` plane columns).
pub const HOURLY_CSV_HEADER: &str = "month,day_of_year,hour_mid_solar_h,period_h,ghi_w_m2,\
dhi_w_m2,dni_w_m2,t_air_c,t_dew_c,wind_m_s,wind_height_m,sun_zenith_deg,sun_azimuth_deg,\
beam_visible_fraction,measured_poa_w_m2";

/// The tables of `climate`: `hourly` (the default) and `monthly`.
pub const TABLES: [TableSpec; 2] = [
    TableSpec {
        name: "hourly",
        about: "one row per weather record, with the irradiance on every cover plane",
    },
    TableSpec {
        name: "monthly",
        about: "one row per month: irradiation on the horizontal and every cover plane, temperatures, wind",
    },
];

/// The name of a plane's column: `poa_<name>_w_m2` (hourly) or `poa_<name>_kwh_m2_day`
/// (monthly).
/// Spaces in the name (a double-slope still's `twin-roof E`) become `_`.
fn plane_column(name: &str, unit: &str) -> String {
    format!("poa_{}_{unit}", name.replace(char::is_whitespace, "_"))
}

/// The hourly series as a table (header [`HOURLY_COLUMNS`] then one `poa_<name>_w_m2` column
/// per plane, the total irradiance on that plane by `model`).
pub fn hourly_table(series: &WeatherSeries, planes: &[(String, Plane)], model: SkyModel) -> Table {
    let mut columns: Vec<String> = HOURLY_COLUMNS.iter().map(|c| (*c).to_owned()).collect();
    columns.extend(planes.iter().map(|(n, _)| plane_column(n, "w_m2")));
    let mut t = Table::with_columns("hourly", columns);
    for h in &series.hours {
        let mut row = vec![
            json!(h.month),
            json!(h.day_of_year),
            num(h.hour_mid_solar_h, 3),
            num(h.period_h, 4),
            num(h.ghi_w_m2, 2),
            num(h.dhi_w_m2, 2),
            num(h.dni_w_m2, 2),
            num(h.t_air_k - ZERO_CELSIUS_K, 2),
            num(h.t_dew_k - ZERO_CELSIUS_K, 2),
            num(h.wind_m_s, 2),
            num(h.wind_height_m, 1),
            num(h.sun.zenith_rad.to_degrees(), 3),
            num(h.sun.azimuth_rad.to_degrees(), 3),
            num(h.beam_visible_fraction, 3),
            h.measured_poa_w_m2.map_or(Value::Null, |p| num(p, 2)),
        ];
        for (_, plane) in planes {
            let p = plane_irradiance(h, *plane, series.albedo, model);
            row.push(num(p.beam_w_m2 + p.sky_diffuse_w_m2 + p.ground_w_m2, 2));
        }
        t.push(row);
    }
    t
}

/// The monthly summary as a table, one `poa_<name>_kwh_m2_day` column per plane.
pub fn monthly_csv_table(rows: &[MonthlyRow], plane_names: &[String]) -> Table {
    let mut columns: Vec<String> = ["month", "days", "ghi_kwh_m2_day"]
        .iter()
        .map(|c| (*c).to_owned())
        .collect();
    columns.extend(plane_names.iter().map(|n| plane_column(n, "kwh_m2_day")));
    columns.extend(
        ["t_max_c", "t_min_c", "t_mean_c", "wind_m_s"]
            .iter()
            .map(|c| (*c).to_owned()),
    );
    let mut t = Table::with_columns("monthly", columns);
    for r in rows {
        let mut row = vec![json!(r.month), json!(r.days), num(r.ghi_kwh_m2_day, 4)];
        row.extend(r.plane_kwh_m2_day.iter().map(|v| num(*v, 4)));
        row.extend([
            num(r.t_max_c, 2),
            num(r.t_min_c, 2),
            num(r.t_mean_c, 2),
            num(r.wind_m_s, 2),
        ]);
        t.push(row);
    }
    t
}

/// Write the hourly series as CSV (see [`hourly_table`]).
pub fn write_hourly_csv(
    w: &mut (impl Write + ?Sized),
    series: &WeatherSeries,
    planes: &[(String, Plane)],
    model: SkyModel,
) -> io::Result<()> {
    hourly_table(series, planes, model).write_csv(w)
}

/// Write the climate as one JSON document: `{"schema_version", "site", "planes": [names],
/// "monthly": [{"month", "days", "ghi_kwh_m2_day", "poa_<name>_kwh_m2_day", …}], "hours":
/// [{the hourly columns, "poa_<name>_w_m2", …}]}` — the fields of both CSV tables.
pub fn write_json(
    w: &mut (impl Write + ?Sized),
    site_name: &str,
    series: &WeatherSeries,
    planes: &[(String, Plane)],
    model: SkyModel,
) -> io::Result<()> {
    let names: Vec<String> = planes.iter().map(|(n, _)| n.clone()).collect();
    let plain: Vec<Plane> = planes.iter().map(|(_, p)| *p).collect();
    let monthly = monthly_csv_table(&monthly_table(series, &plain, model), &names);
    let hourly = hourly_table(series, planes, model);
    let objects = |t: &Table| -> Vec<serde_json::Map<String, Value>> {
        t.rows
            .iter()
            .map(|r| t.columns.iter().cloned().zip(r.iter().cloned()).collect())
            .collect()
    };
    #[derive(serde::Serialize)]
    struct Doc<'a> {
        site: &'a str,
        sky_model: &'a str,
        planes: &'a [String],
        monthly: Vec<serde_json::Map<String, Value>>,
        hours: Vec<serde_json::Map<String, Value>>,
    }
    crate::output::write_document(
        w,
        &Doc {
            site: site_name,
            sky_model: match model {
                SkyModel::HayDavies => "Hay-Davies",
                SkyModel::Isotropic => "isotropic",
            },
            planes: &names,
            monthly: objects(&monthly),
            hours: objects(&hourly),
        },
    )
}
