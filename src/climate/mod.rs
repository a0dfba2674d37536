//! Site climate: hourly weather for a site from 12 monthly means (average days), from an
//! hourly weather file (CSV or EPW) or from a stochastic sequence of daily clearness indices.
//!
//! Every source produces the same record, [`HourlyWeather`], collected in a
//! [`WeatherSeries`]; every later stage reads only that. Sun geometry is computed once per
//! site and day of the year ([`SunTable`]) and carried in each record, because later stages
//! run the still model many times over the same weather.
//!
//! Conventions:
//! * azimuths are measured clockwise from north (0 = north, π/2 = east, π = south), as in
//!   [`crate::physics::sun::SunPosition`]; a cover facing the equator in the northern
//!   hemisphere has azimuth π, in the southern hemisphere 0;
//! * synthetic series (average days, stochastic years) are laid out in *solar* time, one
//!   record per solar hour; weather-file series keep the file's clock and record the solar
//!   time of the middle of each period;
//! * irradiances are means over the record's period [W m⁻²].
//!
//! This module does not depend on the design file: it has its own plain input structs
//! ([`SiteLocation`], [`monthly::MonthlyMeans`], [`file::WeatherFileSpec`]).

pub mod export;
pub mod file;
pub mod horizon;
pub mod monthly;
pub mod stochastic;
mod sun_table;
pub mod temperature;

pub use file::{LoadedWeather, WeatherFileError, WeatherIssue, load_weather_file};
pub use horizon::Horizon;
pub use monthly::{Humidity, MonthlyMeans, average_days};
pub use stochastic::{StochasticSettings, stochastic_year};
pub use sun_table::{DaySun, HourSun, SunTable, cpr_raw_daily_sum};

use crate::physics::irradiance::{PlaneIrradiance, hay_davies, isotropic};
use crate::physics::sun::SunPosition;

/// Where the site is and what surrounds it.
#[derive(Debug, Clone, PartialEq)]
pub struct SiteLocation {
    /// Latitude \[deg\], north positive, within −90…90.
    pub latitude_deg: f64,
    /// Longitude \[deg\], east positive, within −180…180.
    pub longitude_deg: f64,
    /// Elevation above sea level \[m\].
    pub elevation_m: f64,
    /// Offset of the site's standard (not daylight-saving) time from UTC \[h\], east positive.
    pub utc_offset_h: f64,
    /// Ground albedo (solar reflectance of the foreground) [-], within 0…1.
    pub albedo: f64,
    /// Horizon profile: (azimuth \[deg\] clockwise from north, obstruction elevation \[deg\]).
    /// Empty means a free horizon. See [`Horizon`] for the interpolation.
    pub horizon: Vec<(f64, f64)>,
}

impl SiteLocation {
    /// Check every field and return the problems found (empty when valid).
    pub fn problems(&self) -> Vec<String> {
        let mut out = Vec::new();
        let mut check = |name: &str, v: f64, lo: f64, hi: f64| {
            if !v.is_finite() || v < lo || v > hi {
                out.push(format!("{name} = {v} is outside {lo}…{hi}"));
            }
        };
        check("latitude_deg", self.latitude_deg, -90.0, 90.0);
        check("longitude_deg", self.longitude_deg, -180.0, 180.0);
        check("elevation_m", self.elevation_m, -500.0, 9000.0);
        check("utc_offset_h", self.utc_offset_h, -12.0, 14.0);
        check("albedo", self.albedo, 0.0, 1.0);
        for (i, &(az, el)) in self.horizon.iter().enumerate() {
            check(&format!("horizon[{i}].azimuth_deg"), az, 0.0, 360.0);
            check(&format!("horizon[{i}].elevation_deg"), el, 0.0, 90.0);
        }
        out
    }

    /// Latitude \[rad\].
    pub fn latitude_rad(&self) -> f64 {
        self.latitude_deg.to_radians()
    }
}

/// A flat receiving surface (a still's cover, a pyranometer).
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Plane {
    /// Tilt from horizontal \[rad\], 0…π/2 for a cover.
    pub tilt_rad: f64,
    /// Azimuth the surface faces \[rad\], clockwise from north (π = facing south).
    pub azimuth_rad: f64,
}

impl Plane {
    /// A plane from tilt and azimuth in degrees.
    pub fn from_degrees(tilt_deg: f64, azimuth_deg: f64) -> Self {
        Self {
            tilt_rad: tilt_deg.to_radians(),
            azimuth_rad: azimuth_deg.to_radians(),
        }
    }

    /// The horizontal plane.
    pub fn horizontal() -> Self {
        Self {
            tilt_rad: 0.0,
            azimuth_rad: std::f64::consts::PI,
        }
    }

    /// True when two planes agree within 0.5° in tilt and azimuth (azimuth ignored when both
    /// are horizontal). Used to decide whether a measured plane-of-array column applies.
    pub fn same_as(&self, other: &Plane) -> bool {
        let tol = 0.5_f64.to_radians();
        if (self.tilt_rad - other.tilt_rad).abs() > tol {
            return false;
        }
        if self.tilt_rad.abs() < tol && other.tilt_rad.abs() < tol {
            return true;
        }
        let d = (self.azimuth_rad - other.azimuth_rad).rem_euclid(std::f64::consts::TAU);
        d.min(std::f64::consts::TAU - d) <= tol
    }
}

/// Sky-diffuse model for the transposition onto a tilted plane.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Default)]
pub enum SkyModel {
    /// Isotropic sky (Liu & Jordan).
    Isotropic,
    /// Hay–Davies: circumsolar part follows the beam (default).
    #[default]
    HayDavies,
}

/// One period of weather at the site, the record every later stage reads.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct HourlyWeather {
    /// Month 1…12.
    pub month: u32,
    /// Day of the year 1…366.
    pub day_of_year: u32,
    /// Solar time at the middle of the period \[h\], 0…24.
    pub hour_mid_solar_h: f64,
    /// Length of the period \[h\] (1 for hourly data).
    pub period_h: f64,
    /// Global horizontal irradiance, period mean [W m⁻²].
    pub ghi_w_m2: f64,
    /// Diffuse horizontal irradiance, period mean [W m⁻²].
    pub dhi_w_m2: f64,
    /// Direct normal irradiance, consistent with `ghi = dhi + dni·cos(zenith)` [W m⁻²].
    pub dni_w_m2: f64,
    /// Air temperature \[K\].
    pub t_air_k: f64,
    /// Dew-point temperature \[K\].
    pub t_dew_k: f64,
    /// Wind speed at `wind_height_m` [m s⁻¹].
    pub wind_m_s: f64,
    /// Height of the wind measurement above ground \[m\].
    pub wind_height_m: f64,
    /// Sun position used for this period: the middle of the part of the period when the sun
    /// is up (the middle of the period when it is down all period).
    pub sun: SunPosition,
    /// Extraterrestrial normal irradiance for the day [W m⁻²].
    pub dni_extra_w_m2: f64,
    /// Mean extraterrestrial irradiance on a horizontal surface over the period [W m⁻²].
    pub extra_horizontal_w_m2: f64,
    /// Fraction of the period's beam not blocked by the horizon profile [-], 0…1.
    pub beam_visible_fraction: f64,
    /// Measured plane-of-array irradiance, when the weather file gives it [W m⁻²].
    pub measured_poa_w_m2: Option<f64>,
}

impl HourlyWeather {
    /// True when the sun is above the horizon for some of the period.
    pub fn is_day(&self) -> bool {
        self.extra_horizontal_w_m2 > 0.0
    }
}

/// Where a weather series came from.
#[derive(Debug, Clone, PartialEq)]
pub enum WeatherSource {
    /// One average day per month built from monthly means (12 × 24 records).
    AverageDays,
    /// A weather file.
    File(std::path::PathBuf),
    /// A stochastic year.
    Stochastic {
        /// Seed of the generator.
        seed: u64,
        /// Index of the year in the sequence.
        year_index: u64,
    },
}

/// A sequence of weather records for one site, ordered in time.
#[derive(Debug, Clone, PartialEq)]
pub struct WeatherSeries {
    /// The records.
    pub hours: Vec<HourlyWeather>,
    /// Plane on which `measured_poa_w_m2` was measured, if any.
    pub poa_plane: Option<Plane>,
    /// Where the records came from.
    pub source: WeatherSource,
    /// Site albedo used for ground reflection [-].
    pub albedo: f64,
}

impl WeatherSeries {
    /// Irradiance on `plane` for every record, in order.
    ///
    /// Where the series carries a measured plane-of-array irradiance and `plane` is the plane
    /// it was measured on ([`Plane::same_as`]), the measurement replaces the transposed total:
    /// the transposed beam, sky and ground parts are scaled to sum to the measured value, so
    /// later stages still see a beam/diffuse split for the cover optics. When the transposition
    /// gives nothing but the sensor reads light, the measured value is booked as sky diffuse.
    pub fn plane_series(&self, plane: Plane, model: SkyModel) -> Vec<PlaneIrradiance> {
        let replace = self.poa_plane.is_some_and(|p| p.same_as(&plane));
        self.hours
            .iter()
            .map(|h| {
                let p = plane_irradiance(h, plane, self.albedo, model);
                match (replace, h.measured_poa_w_m2) {
                    (true, Some(measured)) => scale_to_measured(p, measured),
                    _ => p,
                }
            })
            .collect()
    }
}

fn scale_to_measured(p: PlaneIrradiance, measured_w_m2: f64) -> PlaneIrradiance {
    let measured = measured_w_m2.max(0.0);
    let total = p.beam_w_m2 + p.sky_diffuse_w_m2 + p.ground_w_m2;
    if total > 1e-9 {
        let f = measured / total;
        PlaneIrradiance {
            beam_w_m2: p.beam_w_m2 * f,
            sky_diffuse_w_m2: p.sky_diffuse_w_m2 * f,
            ground_w_m2: p.ground_w_m2 * f,
            cos_incidence: p.cos_incidence,
        }
    } else {
        PlaneIrradiance {
            beam_w_m2: 0.0,
            sky_diffuse_w_m2: measured,
            ground_w_m2: 0.0,
            cos_incidence: p.cos_incidence,
        }
    }
}

/// Irradiance on a plane for one weather record, by transposition of its GHI and DHI.
///
/// Uses [`crate::physics::irradiance::hay_davies`] or
/// [`crate::physics::irradiance::isotropic`], then multiplies the beam by the record's
/// `beam_visible_fraction` (the horizon profile blocks the beam; sky diffuse and ground
/// reflection are not reduced — a simplification, the obstruction's own sky view is
/// ignored). Parts are clamped at zero and a record with the sun down all period or no global
/// irradiance gives zero.
///
/// * `albedo` — ground reflectance [-]
pub fn plane_irradiance(
    hour: &HourlyWeather,
    plane: Plane,
    albedo: f64,
    model: SkyModel,
) -> PlaneIrradiance {
    let zero = PlaneIrradiance {
        beam_w_m2: 0.0,
        sky_diffuse_w_m2: 0.0,
        ground_w_m2: 0.0,
        cos_incidence: 0.0,
    };
    if !hour.is_day() || hour.ghi_w_m2 <= 0.0 {
        return zero;
    }
    let ghi = hour.ghi_w_m2;
    let dhi = hour.dhi_w_m2.clamp(0.0, ghi);
    let p = match model {
        SkyModel::Isotropic => isotropic(
            ghi,
            dhi,
            hour.sun,
            plane.tilt_rad,
            plane.azimuth_rad,
            albedo,
        ),
        SkyModel::HayDavies => hay_davies(
            ghi,
            dhi,
            hour.dni_extra_w_m2,
            hour.sun,
            plane.tilt_rad,
            plane.azimuth_rad,
            albedo,
        ),
    };
    let clean = |v: f64| if v.is_finite() { v.max(0.0) } else { 0.0 };
    PlaneIrradiance {
        beam_w_m2: clean(p.beam_w_m2) * hour.beam_visible_fraction.clamp(0.0, 1.0),
        sky_diffuse_w_m2: clean(p.sky_diffuse_w_m2),
        ground_w_m2: clean(p.ground_w_m2),
        cos_incidence: p.cos_incidence,
    }
}

/// Errors from building site climate (other than weather-file problems, which carry rows).
#[derive(Debug, thiserror::Error)]
#[non_exhaustive]
pub enum ClimateError {
    /// An input value is outside the range the method accepts.
    #[error("{field}: {message}")]
    BadInput {
        /// Which input, e.g. `monthly.ghi_kwh_m2_day[3]`.
        field: String,
        /// What is wrong and what is allowed.
        message: String,
    },
    /// A weather file is unusable; carries every problem with its line.
    #[error(transparent)]
    WeatherFile(#[from] WeatherFileError),
}

impl ClimateError {
    pub(crate) fn bad(field: impl Into<String>, message: impl Into<String>) -> Self {
        ClimateError::BadInput {
            field: field.into(),
            message: message.into(),
        }
    }
}

/// Month (1…12) of a day of the year in a non-leap year (day 366 counts as December).
pub fn month_of_day(day_of_year: u32) -> u32 {
    const END: [u32; 12] = [31, 59, 90, 120, 151, 181, 212, 243, 273, 304, 334, 365];
    END.iter()
        .position(|&e| day_of_year <= e)
        .map_or(12, |i| i as u32 + 1)
}

/// Number of days in each month of a non-leap year.
pub const DAYS_IN_MONTH: [u32; 12] = [31, 28, 31, 30, 31, 30, 31, 31, 30, 31, 30, 31];

/// Where a site's weather comes from.
#[derive(Debug, Clone, PartialEq)]
pub enum ClimateSource {
    /// Twelve monthly means → one average day per month.
    Monthly(Box<MonthlyMeans>),
    /// An hourly weather file.
    File(Box<file::WeatherFileSpec>),
}

/// Site weather ready for the later stages, with any warnings from reading it.
#[derive(Debug, Clone, PartialEq)]
pub struct SiteWeather {
    /// The hourly records.
    pub series: WeatherSeries,
    /// Warnings (repairs, assumptions) with their lines; empty for monthly means.
    pub warnings: Vec<WeatherIssue>,
}

/// Build the hourly weather of a site from its source.
pub fn site_weather(
    site: &SiteLocation,
    source: &ClimateSource,
) -> Result<SiteWeather, ClimateError> {
    match source {
        ClimateSource::Monthly(means) => {
            let table = SunTable::new(site)?;
            Ok(SiteWeather {
                series: average_days(means, site, &table)?,
                warnings: Vec::new(),
            })
        }
        ClimateSource::File(spec) => {
            let loaded = load_weather_file(spec, site)?;
            Ok(SiteWeather {
                series: loaded.series,
                warnings: loaded.warnings,
            })
        }
    }
}

/// Climate errors are bad input (exit code 2): each becomes a design issue naming the
/// weather file and line, or the input field.
impl From<ClimateError> for crate::Error {
    fn from(e: ClimateError) -> Self {
        use crate::design::{DesignErrors, DesignIssue};
        let issues = match e {
            ClimateError::BadInput { field, message } => vec![DesignIssue {
                file: std::path::PathBuf::new(),
                line_col: None,
                path: field,
                message,
            }],
            ClimateError::WeatherFile(w) => w
                .errors()
                .map(|i| DesignIssue {
                    file: w.path.clone(),
                    line_col: i.line.map(|l| (l, 1)),
                    path: String::new(),
                    message: i.kind.to_string(),
                })
                .collect(),
        };
        crate::Error::Design(DesignErrors(issues))
    }
}
