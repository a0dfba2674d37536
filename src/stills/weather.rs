//! The weather a design's stills run on: the design's `[site]` turned into the climate
//! module's inputs, and the resulting hourly series grouped by month.

use crate::climate::file::{
    Column, ColumnMap, FileFormat, GapFill, PeriodConvention, WeatherFileSpec,
};
use crate::climate::{self, MonthlyMeans, SiteLocation, SunTable, WeatherSeries};
use crate::design::{self, Climate, DesignErrors, DesignIssue, LoadedDesign};
use crate::error::Error;

/// The site's weather, ready for every variant.
#[derive(Debug, Clone)]
pub struct SiteWeather {
    /// The hourly records (12 average days, or a weather file's records).
    pub series: WeatherSeries,
    /// True for 12 average days to be repeated until periodic; false for a weather file run
    /// once in order.
    pub average_days: bool,
    /// Whether the dew point comes from data (Berdahl–Martin sky) or not (Swinbank sky).
    pub dew_point_known: bool,
    /// Mean air temperature of each month [K], used as the ground temperature.
    pub month_mean_air_k: [f64; 12],
    /// Site pressure \[Pa\].
    pub pressure_pa: f64,
    /// Feed salinity [g kg⁻¹].
    pub feed_salinity_g_kg: f64,
}

fn bad_input(loaded: &LoadedDesign, message: String) -> Error {
    Error::Design(DesignErrors(vec![DesignIssue {
        file: loaded.source.clone(),
        line_col: None,
        path: "site.climate".to_owned(),
        message,
    }]))
}

/// The climate module's site record for a design's `[site]`.
pub fn site_location(site: &design::Site) -> SiteLocation {
    SiteLocation {
        latitude_deg: site.latitude_deg,
        longitude_deg: site.longitude_deg,
        elevation_m: site.elevation_m,
        utc_offset_h: site.utc_offset_h,
        albedo: site.albedo,
        horizon: site
            .horizon
            .iter()
            .map(|h| (h.azimuth_deg, h.elevation_deg))
            .collect(),
    }
}

/// Build the hourly weather of a loaded (validated) design.
///
/// Monthly climates give 12 average days (the climate module's average-day synthesis);
/// weather files are read with their columns as named in the design (default units, wind
/// at 10 m). A climate the climate module rejects is bad input (exit code 2).
pub fn site_weather(loaded: &LoadedDesign) -> Result<SiteWeather, Error> {
    let site = &loaded.design.site;
    let location = site_location(site);
    let (series, average_days, dew_point_known) = match &site.climate {
        Climate::Monthly(m) => {
            let table = SunTable::new(&location).map_err(|e| bad_input(loaded, e.to_string()))?;
            let humidity = match &m.humidity {
                design::Humidity::RelativePercent(rh) => climate::Humidity::RelativePercent(*rh),
                design::Humidity::DewPointC(dp) => climate::Humidity::DewPointC(*dp),
            };
            let means = MonthlyMeans {
                ghi_kwh_m2_day: m.ghi_kwh_m2_day,
                t_max_c: m.t_max_c,
                t_min_c: m.t_min_c,
                wind_m_s: m.wind_m_s,
                wind_height_m: m.wind_height_m,
                humidity,
                rain_mm: m.rain_mm,
            };
            let series = climate::average_days(&means, &location, &table)
                .map_err(|e| bad_input(loaded, e.to_string()))?;
            (series, true, !m.humidity_defaulted)
        }
        Climate::WeatherFile(w) => {
            let base = loaded
                .source
                .parent()
                .map(std::path::Path::to_path_buf)
                .unwrap_or_default();
            let mut columns = ColumnMap::default();
            if let Some(c) = &w.columns {
                columns.timestamp = c.timestamp.clone();
                columns.ghi = Column::named(&c.ghi_w_m2);
                columns.dhi = c.dhi_w_m2.as_deref().map(Column::named);
                columns.dni = c.dni_w_m2.as_deref().map(Column::named);
                columns.t_air = Column::named(&c.t_air_c);
                columns.wind = Some(Column::named(&c.wind_m_s));
                columns.relative_humidity = c.rh_percent.as_deref().map(Column::named);
            }
            let known = w.columns.as_ref().is_none_or(|c| c.rh_percent.is_some());
            let spec = WeatherFileSpec {
                path: base.join(&w.path),
                format: match w.format {
                    design::WeatherFormat::Csv => FileFormat::Csv,
                    design::WeatherFormat::Epw => FileFormat::Epw,
                },
                period: match w.period {
                    design::Period::Ending => PeriodConvention::Ending,
                    design::Period::Beginning => PeriodConvention::Beginning,
                    design::Period::Centred => PeriodConvention::Centred,
                },
                columns,
                gap_fill: match w.gap_fill {
                    design::GapFill::Stop => GapFill::Stop,
                    design::GapFill::Linear => GapFill::Linear {
                        max_gap_h: w.max_gap_h,
                    },
                },
                wind_height_m: 10.0,
            };
            let loaded_w = climate::load_weather_file(&spec, &location)
                .map_err(|e| bad_input(loaded, e.to_string()))?;
            (loaded_w.series, false, known)
        }
    };
    let mut sum = [0.0; 12];
    let mut n = [0u32; 12];
    for h in &series.hours {
        let m = (h.month.clamp(1, 12) - 1) as usize;
        sum[m] += h.t_air_k;
        n[m] += 1;
    }
    let mut month_mean_air_k = [0.0; 12];
    for m in 0..12 {
        if n[m] == 0 {
            return Err(bad_input(
                loaded,
                format!(
                    "the weather has no record in month {}; a simulation needs every month",
                    m + 1
                ),
            ));
        }
        month_mean_air_k[m] = sum[m] / f64::from(n[m]);
    }
    Ok(SiteWeather {
        series,
        average_days,
        dew_point_known,
        month_mean_air_k,
        pressure_pa: crate::physics::humid_air::pressure_at_elevation_pa(site.elevation_m),
        feed_salinity_g_kg: site.feed_salinity_g_kg,
    })
}
