//! Sun–earth geometry: declination, equation of time, extraterrestrial irradiance, sunset
//! hour angle, the sun's position from its hour angle, the angle of incidence on a tilted
//! plane, and a topocentric position from the NREL Solar Position Algorithm.
//!
//! Conventions used throughout this module:
//! * latitude φ positive north, longitude positive **east** (ISO 6709), both in degrees where
//!   the name ends in `_deg` and radians where it ends in `_rad`;
//! * hour angle ω zero at solar noon, negative in the morning, positive in the afternoon
//!   (15° per hour), as in Duffie & Beckman (2013) §1.6;
//! * azimuths (of the sun and of a surface) are measured **clockwise from north**, in
//!   [0, 2π): north 0, east π/2, south π, west 3π/2. Duffie & Beckman measure the azimuth γ
//!   from south, west positive; ours is γ + π.
//! * surface tilt β is the angle between the plane and the horizontal, 0 = horizontal,
//!   π/2 = vertical.
//!
//! Main reference: J. A. Duffie & W. A. Beckman, *Solar Engineering of Thermal Processes*,
//! 4th ed., Wiley (2013), chapter 1 — cited below as "D&B".

use std::f64::consts::{PI, TAU};

use crate::physics::constants::SOLAR_CONSTANT_W_M2;

/// Seconds in a day [s].
const SECONDS_PER_DAY_S: f64 = 86_400.0;

/// The sun's direction seen from a point on the ground.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct SunPosition {
    /// Zenith angle θz [rad], 0 overhead, π/2 on the horizon, > π/2 below it.
    pub zenith_rad: f64,
    /// Azimuth [rad], clockwise from north, in [0, 2π).
    pub azimuth_rad: f64,
}

impl SunPosition {
    /// Cosine of the zenith angle (the sun's height as a direction cosine) [-].
    pub fn cos_zenith(&self) -> f64 {
        self.zenith_rad.cos()
    }

    /// True when the sun's centre is above the horizon (θz < π/2).
    pub fn is_up(&self) -> bool {
        self.zenith_rad < PI / 2.0
    }
}

/// Errors from the solar-position functions that take user coordinates.
#[derive(Debug, Clone, PartialEq, thiserror::Error)]
#[non_exhaustive]
pub enum SunError {
    /// Latitude outside [-90°, 90°] or not finite.
    #[error("latitude {latitude_deg}° is outside -90° … 90°")]
    InvalidLatitude {
        /// The value given [°].
        latitude_deg: f64,
    },
    /// Longitude outside [-180°, 180°] or not finite.
    #[error("longitude {longitude_deg}° is outside -180° … 180°")]
    InvalidLongitude {
        /// The value given [°].
        longitude_deg: f64,
    },
    /// Site elevation not finite, or below the deepest dry land / above the highest peak.
    #[error("elevation {elevation_m} m is outside -500 m … 9000 m")]
    InvalidElevation {
        /// The value given [m].
        elevation_m: f64,
    },
    /// Air pressure not finite, not positive or above 2000 hPa.
    #[error("air pressure {pressure_hpa} hPa is outside 0 … 2000 hPa")]
    InvalidPressure {
        /// The value given [hPa].
        pressure_hpa: f64,
    },
    /// Air temperature not finite or outside the range of the refraction formula.
    #[error("air temperature {temperature_c} °C is outside -273 °C … 100 °C")]
    InvalidTemperature {
        /// The value given [°C].
        temperature_c: f64,
    },
    /// ΔT (TT − UT1) not finite or implausibly large.
    #[error("ΔT = {delta_t_s} s is not a plausible value (|ΔT| ≤ 1e5 s)")]
    InvalidDeltaT {
        /// The value given [s].
        delta_t_s: f64,
    },
    /// The date is outside the algorithm's range, or the computation failed.
    #[error("solar position algorithm failed: {0}")]
    Algorithm(String),
}

/// Day angle B = 2π(n − 1)/365 [rad] used by Spencer's series (D&B eq. 1.4.2).
///
/// * `day_of_year` — n, 1 = 1 January [-]
fn spencer_day_angle_rad(day_of_year: u32) -> f64 {
    TAU * (f64::from(day_of_year) - 1.0) / 365.0
}

/// Solar declination δ by Cooper's formula [rad].
///
/// P. I. Cooper (1969), "The absorption of radiation in solar stills", *Solar Energy* 12(3),
/// 333–346; as D&B eq. 1.6.1a: δ = 23.45° · sin(360° · (284 + n)/365).
///
/// * `day_of_year` — n [-], 1 … 365 (366 in a leap year)
///
/// Returns δ [rad], positive north. Accuracy about ±1° against an ephemeris (D&B §1.6).
///
/// *Notes*: none; any `day_of_year` is accepted (the formula is periodic).
pub fn declination_cooper_rad(day_of_year: u32) -> f64 {
    23.45_f64.to_radians() * (TAU * (284.0 + f64::from(day_of_year)) / 365.0).sin()
}

/// Solar declination δ by Spencer's Fourier series [rad].
///
/// J. W. Spencer (1971), "Fourier series representation of the position of the sun",
/// *Search* 2(5), 172; as D&B eq. 1.6.1b with B = (n − 1)·360°/365 (eq. 1.4.2):
/// δ = 0.006918 − 0.399912 cos B + 0.070257 sin B − 0.006758 cos 2B + 0.000907 sin 2B
/// − 0.002697 cos 3B + 0.00148 sin 3B  (radians; D&B print it multiplied by 180/π).
///
/// * `day_of_year` — n [-], 1 … 366
///
/// Returns δ [rad]. Spencer quotes a maximum error below 0.0006 rad (~0.035°).
///
/// *Notes*: none.
pub fn declination_spencer_rad(day_of_year: u32) -> f64 {
    let b = spencer_day_angle_rad(day_of_year);
    0.006918 - 0.399912 * b.cos() + 0.070257 * b.sin() - 0.006758 * (2.0 * b).cos()
        + 0.000907 * (2.0 * b).sin()
        - 0.002697 * (3.0 * b).cos()
        + 0.00148 * (3.0 * b).sin()
}

/// Equation of time E [min]: apparent solar time minus mean solar time.
///
/// Spencer (1971), as D&B eq. 1.5.3 with B = (n − 1)·360°/365:
/// E = 229.2 · (0.000075 + 0.001868 cos B − 0.032077 sin B − 0.014615 cos 2B − 0.04089 sin 2B).
///
/// * `day_of_year` — n [-], 1 … 366
///
/// Returns E [min], between about −14.6 (February) and +16.4 (November).
///
/// *Notes*: coefficients as printed by D&B. Some implementations use 0.0000075 for the
/// constant and 0.040849 for the sin 2B term; the two versions differ by less than 0.03 min.
pub fn equation_of_time_min(day_of_year: u32) -> f64 {
    let b = spencer_day_angle_rad(day_of_year);
    229.2
        * (0.000075 + 0.001868 * b.cos()
            - 0.032077 * b.sin()
            - 0.014615 * (2.0 * b).cos()
            - 0.04089 * (2.0 * b).sin())
}

/// Extraterrestrial irradiance on a plane normal to the sun, G_on [W m⁻²], Spencer's series.
///
/// Spencer (1971), as D&B eq. 1.4.1b:
/// G_on = G_sc (1.000110 + 0.034221 cos B + 0.001280 sin B + 0.000719 cos 2B + 0.000077 sin 2B),
/// with G_sc = 1367 W m⁻² (D&B §1.2) and B = (n − 1)·360°/365.
///
/// * `day_of_year` — n [-], 1 … 366
///
/// Returns G_on [W m⁻²], about 1322 (early July) … 1413 (early January).
///
/// *Notes*: none.
pub fn extraterrestrial_normal_w_m2(day_of_year: u32) -> f64 {
    let b = spencer_day_angle_rad(day_of_year);
    SOLAR_CONSTANT_W_M2
        * (1.000110
            + 0.034221 * b.cos()
            + 0.001280 * b.sin()
            + 0.000719 * (2.0 * b).cos()
            + 0.000077 * (2.0 * b).sin())
}

/// Extraterrestrial normal irradiance by the simple cosine form, G_on [W m⁻²].
///
/// D&B eq. 1.4.1a: G_on = G_sc (1 + 0.033 cos(360° n/365)), G_sc = 1367 W m⁻². This is the
/// form inside D&B eqs. 1.10.3 and 1.10.4 and their worked examples.
///
/// * `day_of_year` — n [-], 1 … 366
///
/// Returns G_on [W m⁻²]. Agrees with [`extraterrestrial_normal_w_m2`] within about 0.3 %.
///
/// *Notes*: none.
pub fn extraterrestrial_normal_cooper_w_m2(day_of_year: u32) -> f64 {
    SOLAR_CONSTANT_W_M2 * (1.0 + 0.033 * (TAU * f64::from(day_of_year) / 365.0).cos())
}

/// Sunset hour angle ω_s [rad] (sunrise is −ω_s).
///
/// D&B eq. 1.6.10: cos ω_s = −tan φ tan δ.
///
/// * `latitude_rad` — φ [rad], −π/2 … π/2
/// * `declination_rad` — δ [rad], about ±0.41
///
/// Returns ω_s [rad] in [0, π]: 0 in polar night (the sun never rises), π in polar day (it
/// never sets).
///
/// *Notes*: evaluated as −sin φ sin δ / (cos φ cos δ) with the quotient clamped to [−1, 1],
/// so the poles and the polar day/night cases give 0 or π instead of NaN. Exactly at a pole
/// with δ = 0 the sun circles on the horizon; π/2 is returned (half the day "up").
pub fn sunset_hour_angle_rad(latitude_rad: f64, declination_rad: f64) -> f64 {
    let num = -latitude_rad.sin() * declination_rad.sin();
    let den = latitude_rad.cos() * declination_rad.cos();
    if !(num.is_finite() && den.is_finite()) {
        return 0.0;
    }
    if den.abs() <= 1e-12 {
        return if num > 1e-12 {
            0.0
        } else if num < -1e-12 {
            PI
        } else {
            PI / 2.0
        };
    }
    (num / den).clamp(-1.0, 1.0).acos()
}

/// Daily extraterrestrial irradiation on a horizontal surface, H_0 [J m⁻²].
///
/// D&B eq. 1.10.3:
/// H_0 = (24·3600·G_sc/π)(1 + 0.033 cos(360° n/365)) · (cos φ cos δ sin ω_s + ω_s sin φ sin δ),
/// ω_s in radians, with δ from Cooper's formula ([`declination_cooper_rad`]) and ω_s from
/// [`sunset_hour_angle_rad`].
///
/// * `latitude_rad` — φ [rad], −π/2 … π/2
/// * `day_of_year` — n [-], 1 … 366
///
/// Returns H_0 [J m⁻²] ≥ 0 (0 in polar night).
///
/// *Notes*: Cooper's declination and the simple 1 + 0.033 cos form are used because they are
/// what D&B use with this equation (Ex. 1.10.1); Spencer's forms change H_0 by well under 1 %.
/// The result is floored at 0 against round-off.
pub fn daily_extraterrestrial_horizontal_j_m2(latitude_rad: f64, day_of_year: u32) -> f64 {
    let decl_rad = declination_cooper_rad(day_of_year);
    let ws_rad = sunset_hour_angle_rad(latitude_rad, decl_rad);
    let g_on_w_m2 = extraterrestrial_normal_cooper_w_m2(day_of_year);
    let shape = latitude_rad.cos() * decl_rad.cos() * ws_rad.sin()
        + ws_rad * latitude_rad.sin() * decl_rad.sin();
    (SECONDS_PER_DAY_S * g_on_w_m2 / PI * shape).max(0.0)
}

/// Extraterrestrial irradiation on a horizontal surface between two hour angles, I_0 [J m⁻²].
///
/// D&B eq. 1.10.4:
/// I_0 = (12·3600·G_on/π) · [cos φ cos δ (sin ω₂ − sin ω₁) + (ω₂ − ω₁) sin φ sin δ],
/// ω in radians, G_on = G_sc(1 + 0.033 cos(360° n/365)), δ from Cooper's formula.
///
/// * `latitude_rad` — φ [rad]
/// * `day_of_year` — n [-]
/// * `hour_angle_start_rad`, `hour_angle_end_rad` — ω₁, ω₂ [rad], −π … π, 15° per hour
///
/// Returns I_0 [J m⁻²] ≥ 0 over the part of [ω₁, ω₂] during which the sun is up.
///
/// *Notes*: D&B's equation assumes the whole interval lies between sunrise and sunset; here
/// the interval is first clipped to [−ω_s, ω_s], so an interval spanning sunrise or sunset
/// counts only the daylight part, and a night interval gives 0. The bounds may be given in
/// either order. Summing over consecutive intervals covering the day gives
/// [`daily_extraterrestrial_horizontal_j_m2`].
pub fn interval_extraterrestrial_horizontal_j_m2(
    latitude_rad: f64,
    day_of_year: u32,
    hour_angle_start_rad: f64,
    hour_angle_end_rad: f64,
) -> f64 {
    let decl_rad = declination_cooper_rad(day_of_year);
    let ws_rad = sunset_hour_angle_rad(latitude_rad, decl_rad);
    let lo = hour_angle_start_rad.min(hour_angle_end_rad).max(-ws_rad);
    let hi = hour_angle_start_rad.max(hour_angle_end_rad).min(ws_rad);
    if hi.is_nan() || lo.is_nan() || hi <= lo {
        return 0.0;
    }
    let g_on_w_m2 = extraterrestrial_normal_cooper_w_m2(day_of_year);
    let shape = latitude_rad.cos() * decl_rad.cos() * (hi.sin() - lo.sin())
        + (hi - lo) * latitude_rad.sin() * decl_rad.sin();
    (SECONDS_PER_DAY_S / 2.0 * g_on_w_m2 / PI * shape).max(0.0)
}

/// Klein's recommended average day of each month (the day whose extraterrestrial irradiation
/// is closest to the month's mean).
///
/// S. A. Klein (1977), "Calculation of monthly average insolation on tilted surfaces",
/// *Solar Energy* 19(4), 325–329; D&B Table 1.6.1 (non-leap year): 17 Jan, 16 Feb, 16 Mar,
/// 15 Apr, 15 May, 11 Jun, 17 Jul, 16 Aug, 15 Sep, 15 Oct, 14 Nov, 10 Dec.
///
/// * `month` — 1 = January … 12 = December
///
/// Returns the day of the year n [-] (non-leap year).
///
/// *Notes*: the table is undefined outside 1 … 12; a month below 1 is treated as January and
/// one above 12 as December, so the function never panics. Validate months upstream.
pub fn klein_recommended_day(month: u32) -> u32 {
    const DAYS: [u32; 12] = [17, 47, 75, 105, 135, 162, 198, 228, 258, 288, 318, 344];
    let index = month.clamp(1, 12) - 1;
    // `index` is in 0..12 by the clamp above.
    DAYS.get(index as usize).copied().unwrap_or(17)
}

/// Hour angle ω [rad] from apparent solar time [h]: ω = 15°·(t − 12).
///
/// D&B §1.6 (definition of ω). Morning negative, afternoon positive.
///
/// * `solar_time_h` — apparent solar time [h]
///
/// Returns ω [rad], not wrapped (t = 0 gives −π).
///
/// *Notes*: none.
pub fn hour_angle_rad(solar_time_h: f64) -> f64 {
    (15.0 * (solar_time_h - 12.0)).to_radians()
}

/// Sun position (zenith and azimuth) from latitude, declination and hour angle.
///
/// D&B eq. 1.6.5: cos θz = cos φ cos δ cos ω + sin φ sin δ, and eq. 1.6.6:
/// γs = sign(ω) |arccos((cos θz sin φ − sin δ)/(sin θz cos φ))| (from south, west positive).
///
/// * `latitude_rad` — φ [rad]
/// * `declination_rad` — δ [rad]
/// * `hour_angle_rad` — ω [rad], negative before solar noon
///
/// Returns the geometric (unrefracted) position; azimuth clockwise from north in [0, 2π).
///
/// *Notes*: computed from the sun's unit vector in east–north–up components
/// (e = −cos δ sin ω, n = cos φ sin δ − sin φ cos δ cos ω, u = eq. 1.6.5), with
/// θz = atan2(√(e² + n²), u) and azimuth = atan2(e, n). This is algebraically the same as
/// eqs. 1.6.5–1.6.6 but has no division, so it stays finite at the poles and with the sun
/// overhead (where the azimuth is undefined and 0 is returned).
pub fn sun_position_from_hour_angle(
    latitude_rad: f64,
    declination_rad: f64,
    hour_angle_rad: f64,
) -> SunPosition {
    let (sin_phi, cos_phi) = latitude_rad.sin_cos();
    let (sin_dec, cos_dec) = declination_rad.sin_cos();
    let (sin_w, cos_w) = hour_angle_rad.sin_cos();
    let east = -cos_dec * sin_w;
    let north = cos_phi * sin_dec - sin_phi * cos_dec * cos_w;
    let up = cos_phi * cos_dec * cos_w + sin_phi * sin_dec;
    let horizontal = east.hypot(north);
    let zenith_rad = horizontal.atan2(up);
    let azimuth_rad = if horizontal > 1e-15 {
        wrap_azimuth_rad(east.atan2(north))
    } else {
        0.0
    };
    SunPosition {
        zenith_rad,
        azimuth_rad,
    }
}

/// Wraps an angle into [0, 2π) [rad]; non-finite input gives 0.
fn wrap_azimuth_rad(angle_rad: f64) -> f64 {
    if !angle_rad.is_finite() {
        return 0.0;
    }
    let wrapped = angle_rad.rem_euclid(TAU);
    // rem_euclid can return exactly TAU for tiny negative inputs through rounding.
    if wrapped >= TAU { 0.0 } else { wrapped }
}

/// Cosine of the angle of incidence θ of beam radiation on a tilted plane [-].
///
/// D&B eq. 1.6.3 in its zenith form:
/// cos θ = cos θz cos β + sin θz sin β cos(γs − γ).
///
/// * `sun` — sun position (azimuth clockwise from north)
/// * `tilt_rad` — β [rad], 0 horizontal … π/2 vertical (up to π for a downward face)
/// * `surface_azimuth_rad` — γ [rad], direction the plane faces, clockwise from north
///
/// Returns cos θ in [−1, 1]; negative when the sun is behind the plane. Callers that need
/// the beam on the plane take max(cos θ, 0).
///
/// *Notes*: D&B measure both azimuths from south; only their difference enters, so the
/// north reference changes nothing. The result is clamped to [−1, 1] against round-off.
pub fn cos_incidence(sun: SunPosition, tilt_rad: f64, surface_azimuth_rad: f64) -> f64 {
    let (sin_z, cos_z) = sun.zenith_rad.sin_cos();
    let (sin_b, cos_b) = tilt_rad.sin_cos();
    let c = cos_z * cos_b + sin_z * sin_b * (sun.azimuth_rad - surface_azimuth_rad).cos();
    if c.is_nan() { 0.0 } else { c.clamp(-1.0, 1.0) }
}

/// Apparent solar time [h] from local standard (clock) time.
///
/// D&B eq. 1.5.2: solar time − standard time = 4(L_st − L_loc) + E [min], with D&B's
/// longitudes in degrees **west**. Here longitudes are **east-positive**, and the standard
/// meridian is taken from the time zone, L_st = 15°·(UTC offset), so
/// solar time = t_std + [4·(longitude_deg − 15·utc_offset_h) + E]/60.
///
/// * `local_standard_time_h` — clock time without daylight saving [h], e.g. 10.5 for 10:30
/// * `utc_offset_h` — the time zone's offset from UTC [h], east positive (UTC−7 → −7)
/// * `longitude_deg` — site longitude [°], east positive
/// * `day_of_year` — n [-], for the equation of time ([`equation_of_time_min`])
///
/// Returns apparent solar time [h], not wrapped into 0 … 24 (a site far from its standard
/// meridian may give slightly negative values or values past 24 near midnight).
///
/// *Notes*: the sign convention is the only departure from D&B (east-positive, as in ISO 6709
/// and the SPA); a site west of its standard meridian has a negative correction.
pub fn solar_time_hours(
    local_standard_time_h: f64,
    utc_offset_h: f64,
    longitude_deg: f64,
    day_of_year: u32,
) -> f64 {
    let standard_meridian_deg = 15.0 * utc_offset_h;
    let correction_min =
        4.0 * (longitude_deg - standard_meridian_deg) + equation_of_time_min(day_of_year);
    local_standard_time_h + correction_min / 60.0
}

/// Topocentric, refraction-corrected sun position from the NREL Solar Position Algorithm,
/// with ΔT estimated from the date.
///
/// I. Reda & A. Andreas (2004), "Solar position algorithm for solar radiation applications",
/// *Solar Energy* 76(5), 577–589, as implemented by the `solar-positioning` crate (0.7.2).
/// ΔT (TT − UT1) comes from that crate's polynomial estimate for the date; use
/// [`spa_sun_position_with_delta_t`] to give it explicitly.
///
/// * `utc` — instant [UTC]
/// * `latitude_deg` — [°], −90 … 90, north positive
/// * `longitude_deg` — [°], −180 … 180, east positive
/// * `elevation_m` — site height above sea level [m], −500 … 9000
/// * `pressure_hpa` — mean air pressure [hPa] for refraction, 0 … 2000
/// * `temperature_c` — mean air temperature [°C] for refraction, −273 … 100
///
/// Returns the position (zenith corrected for refraction while the sun is above −0.83337°,
/// as in the SPA) or a [`SunError`] for invalid input. The SPA's stated uncertainty is
/// ±0.0003° for years −2000 … 6000.
///
/// *Notes*: none beyond ΔT being estimated.
pub fn spa_sun_position(
    utc: chrono::DateTime<chrono::Utc>,
    latitude_deg: f64,
    longitude_deg: f64,
    elevation_m: f64,
    pressure_hpa: f64,
    temperature_c: f64,
) -> Result<SunPosition, SunError> {
    let delta_t_s = solar_positioning::delta_t::estimate_from_date_like(&utc)
        .map_err(|e| SunError::Algorithm(e.to_string()))?;
    spa_sun_position_with_delta_t(
        utc,
        latitude_deg,
        longitude_deg,
        elevation_m,
        pressure_hpa,
        temperature_c,
        delta_t_s,
    )
}

/// As [`spa_sun_position`], with ΔT = TT − UT1 [s] given explicitly (Reda & Andreas 2004
/// use 67 s for their 2003 example).
///
/// * `delta_t_s` — ΔT [s], |ΔT| ≤ 1e5
///
/// *Notes*: none.
pub fn spa_sun_position_with_delta_t(
    utc: chrono::DateTime<chrono::Utc>,
    latitude_deg: f64,
    longitude_deg: f64,
    elevation_m: f64,
    pressure_hpa: f64,
    temperature_c: f64,
    delta_t_s: f64,
) -> Result<SunPosition, SunError> {
    if !(-90.0..=90.0).contains(&latitude_deg) {
        return Err(SunError::InvalidLatitude { latitude_deg });
    }
    if !(-180.0..=180.0).contains(&longitude_deg) {
        return Err(SunError::InvalidLongitude { longitude_deg });
    }
    if !(-500.0..=9000.0).contains(&elevation_m) {
        return Err(SunError::InvalidElevation { elevation_m });
    }
    if !(pressure_hpa > 0.0 && pressure_hpa <= 2000.0) {
        return Err(SunError::InvalidPressure { pressure_hpa });
    }
    if !(temperature_c > -273.0 && temperature_c <= 100.0) {
        return Err(SunError::InvalidTemperature { temperature_c });
    }
    if !(delta_t_s.is_finite() && delta_t_s.abs() <= 1e5) {
        return Err(SunError::InvalidDeltaT { delta_t_s });
    }
    let refraction = solar_positioning::RefractionCorrection::new(pressure_hpa, temperature_c)
        .map_err(|e| SunError::Algorithm(e.to_string()))?;
    let location = solar_positioning::Location {
        latitude: latitude_deg,
        longitude: longitude_deg,
    };
    let position = solar_positioning::SolarPositions::new()
        .at(&utc, location, elevation_m, delta_t_s, Some(refraction))
        .map_err(|e| SunError::Algorithm(e.to_string()))?;
    Ok(SunPosition {
        zenith_rad: position.zenith_angle().to_radians(),
        azimuth_rad: wrap_azimuth_rad(position.azimuth().to_radians()),
    })
}

#[cfg(test)]
mod tests {
    use super::*;

    // D&B Ex. 1.10.1 (43° N, 15 April, n = 105): ωs = 98.9°, H0 = 33.8 MJ/m² (from memory);
    // the fuller check lives in tests/it/physics_sun.rs. Here: the interval form summed over
    // the day must reproduce the daily form (both are D&B's; identity up to round-off).
    #[test]
    fn hourly_extraterrestrial_sums_to_daily() {
        let phi = 43.0_f64.to_radians();
        let daily = daily_extraterrestrial_horizontal_j_m2(phi, 105);
        let sum: f64 = (0..24)
            .map(|h| {
                let w1 = hour_angle_rad(f64::from(h));
                let w2 = hour_angle_rad(f64::from(h + 1));
                interval_extraterrestrial_horizontal_j_m2(phi, 105, w1, w2)
            })
            .sum();
        assert!((sum - daily).abs() < 1e-6 * daily, "{sum} vs {daily}");
    }

    #[test]
    fn polar_cases_are_finite() {
        let half_pi = PI / 2.0;
        assert!(sunset_hour_angle_rad(half_pi, 0.4).is_finite());
        assert!((sunset_hour_angle_rad(half_pi, 0.4) - PI).abs() < 1e-12);
        assert!(sunset_hour_angle_rad(half_pi, -0.4).abs() < 1e-12);
        assert!((sunset_hour_angle_rad(half_pi, 0.0) - half_pi).abs() < 1e-12);
        let p = sun_position_from_hour_angle(half_pi, 0.3, 1.0);
        assert!(p.zenith_rad.is_finite() && p.azimuth_rad.is_finite());
        assert!(daily_extraterrestrial_horizontal_j_m2(-half_pi, 172).abs() < 1e-9);
    }
}
