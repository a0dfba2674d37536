//! The weather a design's stills run on: the design's `[site]` turned into the climate
//! module's inputs, and the resulting hourly series grouped by month.

use crate::climate::{self, WeatherSeries};
use crate::design::{Climate, DesignErrors, DesignIssue, LoadedDesign};
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

/// A climate error names the design file (and `site.climate.` fields) where the climate
/// module, which does not know the file, left them out.
fn in_design_file(loaded: &LoadedDesign, e: Error) -> Error {
    match e {
        Error::Design(DesignErrors(mut issues)) => {
            for i in &mut issues {
                if i.file.as_os_str().is_empty() {
                    i.file = loaded.source.clone();
                    if !i.path.starts_with("site") {
                        i.path = format!("site.climate.{}", i.path);
                    }
                }
            }
            Error::Design(DesignErrors(issues))
        }
        other => other,
    }
}

/// Every problem a run would find in a loaded (validated) design before it simulates: the
/// weather (a weather file's contents, the monthly means against the sun) and each variant's
/// model (geometry that does not fit, materials without the properties the kind needs).
/// `stillbench check` runs it so that it rejects what a run would reject.
///
/// Errors: all the bad-input problems found, together; another error as it came.
pub fn preflight(loaded: &LoadedDesign) -> Result<(), Error> {
    let weather = site_weather(loaded)?;
    let mut issues = Vec::new();
    for v in &loaded.design.variants {
        match super::build_model(loaded, v, &weather) {
            Ok(_) => {}
            Err(Error::Design(DesignErrors(found))) => issues.extend(found),
            Err(other) => return Err(other),
        }
    }
    if issues.is_empty() {
        Ok(())
    } else {
        Err(Error::Design(DesignErrors(issues)))
    }
}

/// Build the hourly weather of a loaded (validated) design with the climate module
/// ([`climate::site_weather`] on the design's [`design::Site::location`] and
/// [`design::Site::climate_source`]). A climate the climate module rejects is bad input
/// (exit code 2).
pub fn site_weather(loaded: &LoadedDesign) -> Result<SiteWeather, Error> {
    let site = &loaded.design.site;
    let location = site.location();
    let built = climate::site_weather(&location, &site.climate_source())
        .map_err(|e| in_design_file(loaded, e.into()))?;
    let series = built.series;
    let (average_days, dew_point_known) = match &site.climate {
        Climate::Monthly(m) => (true, !m.humidity_defaulted),
        Climate::WeatherFile(w) => (
            false,
            w.columns
                .as_ref()
                .is_none_or(|c| c.rh_percent.is_some() || c.dew_point_c.is_some()),
        ),
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
