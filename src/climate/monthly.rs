//! Average days from 12 monthly means.

use super::sun_table::DaySun;
use super::temperature::{cesaraccio_air_temperature_c, profile_sun_times_h};
use super::{ClimateError, HourlyWeather, SiteLocation, SunTable, WeatherSeries, WeatherSource};
use crate::physics::constants::ZERO_CELSIUS_K;
use crate::physics::irradiance::erbs_monthly_diffuse_fraction;
use crate::physics::sun::klein_recommended_day;

/// Joules in one kilowatt-hour.
pub const J_PER_KWH: f64 = 3.6e6;

/// Humidity of the site's air, month by month.
#[derive(Debug, Clone, PartialEq, Default)]
pub enum Humidity {
    /// Monthly mean relative humidity [%], 0…100, applied at the day's mean temperature.
    RelativePercent([f64; 12]),
    /// Monthly mean dew point [°C].
    DewPointC([f64; 12]),
    /// No humidity data: the dew point is taken equal to the daily minimum air temperature
    /// (Allen, Pereira, Raes & Smith 1998, FAO Irrigation and Drainage Paper 56, ch. 3,
    /// eq. 48, "T_dew ≈ T_min"; from memory). Over-estimates the humidity of arid sites.
    #[default]
    Default,
}

/// The 12 monthly means a site's climate can be given as.
#[derive(Debug, Clone, PartialEq)]
pub struct MonthlyMeans {
    /// Monthly mean daily global horizontal irradiation [kWh m⁻² day⁻¹].
    pub ghi_kwh_m2_day: [f64; 12],
    /// Monthly mean daily maximum air temperature [°C].
    pub t_max_c: [f64; 12],
    /// Monthly mean daily minimum air temperature [°C].
    pub t_min_c: [f64; 12],
    /// Monthly mean wind speed [m s⁻¹] at `wind_height_m`.
    pub wind_m_s: [f64; 12],
    /// Height of the wind measurement above ground \[m\] (10 m at standard stations).
    pub wind_height_m: f64,
    /// Humidity.
    pub humidity: Humidity,
    /// Monthly rainfall \[mm\], when known (carried to the reports only).
    pub rain_mm: Option<[f64; 12]>,
}

/// Upper bound of the monthly clearness index accepted (no monthly mean exceeds this on
/// Earth; common practice, no source).
pub const KT_BAR_MAX: f64 = 0.85;

/// Daily extraterrestrial irradiation on a horizontal surface on Klein's recommended day of
/// each month at `latitude_deg`, January first [kWh m⁻² day⁻¹] (Duffie & Beckman eq. 1.10.3
/// via [`crate::physics::sun::daily_extraterrestrial_horizontal_j_m2`]; 0 in polar night).
pub fn monthly_extraterrestrial_kwh_m2_day(latitude_deg: f64) -> [f64; 12] {
    let lat = latitude_deg.to_radians();
    std::array::from_fn(|m| {
        crate::physics::sun::daily_extraterrestrial_horizontal_j_m2(
            lat,
            klein_recommended_day(m as u32 + 1),
        ) / J_PER_KWH
    })
}

impl MonthlyMeans {
    /// Check every value; returns the first problem with its field name.
    pub fn validate(&self, table: &SunTable) -> Result<(), ClimateError> {
        if !(self.wind_height_m.is_finite() && self.wind_height_m > 0.0) {
            return Err(ClimateError::bad(
                "site.climate.wind_height_m",
                format!("{} must be a positive height in metres", self.wind_height_m),
            ));
        }
        for m in 0..12 {
            let f = |name: &str| format!("site.climate.{name}[{}]", m + 1);
            let ghi = self.ghi_kwh_m2_day[m];
            if !(ghi.is_finite() && ghi >= 0.0) {
                return Err(ClimateError::bad(
                    f("ghi_kwh_m2_day"),
                    format!("{ghi} must be ≥ 0"),
                ));
            }
            let h0_kwh = table.day(klein_recommended_day(m as u32 + 1)).h0_j_m2 / J_PER_KWH;
            if ghi > KT_BAR_MAX * h0_kwh {
                return Err(ClimateError::bad(
                    f("ghi_kwh_m2_day"),
                    format!(
                        "{ghi} kWh/m²/day is more than {KT_BAR_MAX} of the extraterrestrial \
                         {h0_kwh:.2} kWh/m²/day at this latitude; check the units and the latitude"
                    ),
                ));
            }
            let (tx, tn) = (self.t_max_c[m], self.t_min_c[m]);
            if !(tx.is_finite() && tn.is_finite() && (-90.0..=60.0).contains(&tn) && tx <= 70.0) {
                return Err(ClimateError::bad(
                    f("t_min_c"),
                    format!("{tx}/{tn} °C outside −90…70 °C"),
                ));
            }
            if tx < tn {
                return Err(ClimateError::bad(
                    f("t_max_c"),
                    format!("maximum {tx} °C is below the minimum {tn} °C"),
                ));
            }
            let w = self.wind_m_s[m];
            if !(w.is_finite() && (0.0..=50.0).contains(&w)) {
                return Err(ClimateError::bad(
                    f("wind_m_s"),
                    format!("{w} outside 0…50 m/s"),
                ));
            }
            match &self.humidity {
                Humidity::RelativePercent(rh) => {
                    if !(rh[m].is_finite() && rh[m] > 0.0 && rh[m] <= 100.0) {
                        return Err(ClimateError::bad(
                            f("rh_percent"),
                            format!("{} outside 0…100 %", rh[m]),
                        ));
                    }
                }
                Humidity::DewPointC(td) => {
                    if !(td[m].is_finite() && td[m] <= tx) {
                        return Err(ClimateError::bad(
                            f("dew_point_c"),
                            format!("{} °C is above the daily maximum {tx} °C", td[m]),
                        ));
                    }
                }
                Humidity::Default => {}
            }
            if let Some(rain) = &self.rain_mm
                && !(rain[m].is_finite() && rain[m] >= 0.0)
            {
                return Err(ClimateError::bad(
                    f("rain_mm"),
                    format!("{} must be ≥ 0", rain[m]),
                ));
            }
        }
        Ok(())
    }

    /// Monthly mean clearness index K̄_T = H̄/H̄₀ with H̄₀ on Klein's recommended day [-].
    pub fn clearness_index(&self, table: &SunTable, month: u32) -> f64 {
        let m = (month.clamp(1, 12) - 1) as usize;
        let h0 = table.day(klein_recommended_day(m as u32 + 1)).h0_j_m2;
        if h0 > 0.0 {
            self.ghi_kwh_m2_day[m] * J_PER_KWH / h0
        } else {
            0.0
        }
    }

    /// The air of month `m`'s (0-based) average day, the same every day of the month (the
    /// next morning's minimum is this month's).
    pub(crate) fn average_day_air(&self, m: usize) -> DayAir {
        DayAir {
            t_min_c: self.t_min_c[m],
            t_max_c: self.t_max_c[m],
            t_min_next_c: self.t_min_c[m],
            t_dew_c: self.dew_point_c(m),
            wind_m_s: self.wind_m_s[m],
            wind_height_m: self.wind_height_m,
        }
    }

    /// Dew point [°C] of month `m` (0-based) for a day with these extremes.
    pub(crate) fn dew_point_c(&self, m: usize) -> f64 {
        let (tx, tn) = (self.t_max_c[m], self.t_min_c[m]);
        match &self.humidity {
            Humidity::DewPointC(td) => td[m],
            Humidity::Default => tn,
            Humidity::RelativePercent(rh) => {
                let t_mean_k = 0.5 * (tx + tn) + ZERO_CELSIUS_K;
                crate::physics::humid_air::dew_point_k(t_mean_k, rh[m] / 100.0) - ZERO_CELSIUS_K
            }
        }
    }
}

/// Temperatures and wind of one synthetic day.
#[derive(Debug, Clone, Copy)]
pub(crate) struct DayAir {
    pub t_min_c: f64,
    pub t_max_c: f64,
    pub t_min_next_c: f64,
    pub t_dew_c: f64,
    pub wind_m_s: f64,
    pub wind_height_m: f64,
}

/// Append the 24 solar hours of one synthetic day with daily global and diffuse irradiation
/// `h_j_m2`, `hd_j_m2` [J m⁻²] spread by the day's precomputed shares.
pub(crate) fn push_synthetic_day(
    day: &DaySun,
    month: u32,
    h_j_m2: f64,
    hd_j_m2: f64,
    air: &DayAir,
    out: &mut Vec<HourlyWeather>,
) {
    let (sunrise_h, sunset_h) = profile_sun_times_h(day.sunset_hour_angle_rad);
    for (i, hs) in day.hours.iter().enumerate() {
        let ghi = h_j_m2 * hs.global_share / 3600.0;
        let mut dhi = (hd_j_m2 * hs.diffuse_share / 3600.0).min(ghi);
        let cz = hs.sun.zenith_rad.cos();
        let mut dni = if cz > 0.0 && ghi > 0.0 {
            (ghi - dhi) / cz
        } else {
            0.0
        };
        if dni > day.dni_extra_w_m2 {
            // Near sunrise the lit-part mean can ask for more beam than the sun can give;
            // keep the global total and book the excess as diffuse.
            dni = day.dni_extra_w_m2;
            dhi = (ghi - dni * cz).max(0.0);
        }
        let hour_mid = i as f64 + 0.5;
        let t_air_c = cesaraccio_air_temperature_c(
            hour_mid,
            sunrise_h,
            sunset_h,
            air.t_min_c,
            air.t_max_c,
            air.t_min_next_c,
        );
        out.push(HourlyWeather {
            month,
            day_of_year: day.day_of_year,
            hour_mid_solar_h: hour_mid,
            period_h: 1.0,
            ghi_w_m2: ghi,
            dhi_w_m2: dhi,
            dni_w_m2: dni,
            t_air_k: t_air_c + ZERO_CELSIUS_K,
            t_dew_k: air.t_dew_c.min(t_air_c) + ZERO_CELSIUS_K,
            wind_m_s: air.wind_m_s,
            wind_height_m: air.wind_height_m,
            sun: hs.sun,
            dni_extra_w_m2: day.dni_extra_w_m2,
            extra_horizontal_w_m2: hs.extra_horizontal_w_m2,
            beam_visible_fraction: hs.beam_visible_fraction,
            measured_poa_w_m2: None,
        });
    }
}

/// The average day of each month (Klein's recommended days), 24 solar hours each, from
/// monthly means.
///
/// * global: the monthly mean daily irradiation spread over the hours by Collares-Pereira &
///   Rabl's r_t — integrated over each hour's lit part and **renormalised** so the day sums
///   to the monthly mean exactly (the raw ratio sums to within about 1 % of one, see
///   [`super::cpr_raw_daily_sum`]);
/// * diffuse: the daily diffuse fraction from Erbs et al.'s *monthly* correlation
///   ([`erbs_monthly_diffuse_fraction`], valid for K̄_T 0.3…0.8) spread by Liu & Jordan's
///   r_d, renormalised the same way; an hourly correlation applied to average-day hours
///   would be biased, because the average day is smoother than any real day;
/// * air temperature: [`cesaraccio_air_temperature_c`] between the monthly mean minimum at
///   sunrise and maximum in mid-afternoon, evaluated at the middle of each hour;
/// * wind constant at the monthly mean; dew point per [`Humidity`], never above the air.
///
/// Returns 12 × 24 records in month order.
pub fn average_days(
    means: &MonthlyMeans,
    site: &SiteLocation,
    table: &SunTable,
) -> Result<WeatherSeries, ClimateError> {
    means.validate(table)?;
    let mut hours = Vec::with_capacity(12 * 24);
    for m in 0..12_usize {
        let month = m as u32 + 1;
        let day = table.day(klein_recommended_day(month));
        let h = means.ghi_kwh_m2_day[m] * J_PER_KWH;
        let kt_bar = means.clearness_index(table, month);
        let hd = if h > 0.0 {
            h * erbs_monthly_diffuse_fraction(kt_bar, day.sunset_hour_angle_rad).clamp(0.0, 1.0)
        } else {
            0.0
        };
        if h > 0.0 && day.h0_j_m2 <= 0.0 {
            return Err(ClimateError::bad(
                format!("site.climate.ghi_kwh_m2_day[{month}]"),
                "irradiation given for a month of polar night".to_string(),
            ));
        }
        push_synthetic_day(day, month, h, hd, &means.average_day_air(m), &mut hours);
    }
    Ok(WeatherSeries {
        hours,
        poa_plane: None,
        source: WeatherSource::AverageDays,
        albedo: site.albedo,
    })
}
