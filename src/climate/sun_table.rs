//! Sun geometry precomputed once per site and day of the year.

use super::{ClimateError, Horizon, SiteLocation};
use crate::physics::irradiance::{collares_pereira_rabl_rt, liu_jordan_rd};
use crate::physics::sun::{
    SunPosition, daily_extraterrestrial_horizontal_j_m2, declination_cooper_rad,
    extraterrestrial_normal_w_m2, interval_extraterrestrial_horizontal_j_m2,
    sun_position_from_hour_angle, sunset_hour_angle_rad,
};
use std::f64::consts::PI;

/// Hour angle swept in one hour \[rad\] (15°).
const HOUR_RAD: f64 = PI / 12.0;

/// 4-point Gauss–Legendre nodes and weights on −1…1 (Abramowitz & Stegun 1964, Table 25.4).
const GL_NODES: [f64; 4] = [
    -0.861_136_311_594_052_6,
    -0.339_981_043_584_856_3,
    0.339_981_043_584_856_3,
    0.861_136_311_594_052_6,
];
const GL_WEIGHTS: [f64; 4] = [
    0.347_854_845_137_453_8,
    0.652_145_154_862_546_1,
    0.652_145_154_862_546_1,
    0.347_854_845_137_453_8,
];

/// Sun geometry for one solar hour of one day.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct HourSun {
    /// Sun position at the middle of the lit part of the hour (middle of the hour at night).
    pub sun: SunPosition,
    /// Mean extraterrestrial irradiance on a horizontal surface over the hour [W m⁻²].
    pub extra_horizontal_w_m2: f64,
    /// Share of the day's global irradiation falling in this hour: the Collares-Pereira & Rabl
    /// ratio integrated over the lit part of the hour and renormalised so a day sums to 1 [-].
    pub global_share: f64,
    /// Share of the day's diffuse irradiation in this hour: Liu & Jordan's r_d integrated over
    /// the lit part of the hour, renormalised likewise [-].
    pub diffuse_share: f64,
    /// Fraction of the hour's beam the horizon profile lets through [-].
    pub beam_visible_fraction: f64,
}

/// Sun geometry for one day of the year.
#[derive(Debug, Clone, PartialEq)]
pub struct DaySun {
    /// Day of the year 1…365.
    pub day_of_year: u32,
    /// Declination (Cooper) \[rad\].
    pub declination_rad: f64,
    /// Sunset hour angle \[rad\].
    pub sunset_hour_angle_rad: f64,
    /// Daily extraterrestrial irradiation on a horizontal surface [J m⁻²].
    pub h0_j_m2: f64,
    /// Extraterrestrial normal irradiance [W m⁻²].
    pub dni_extra_w_m2: f64,
    /// Sunrise and sunset in solar time \[h\].
    pub sunrise_solar_h: f64,
    /// Sunset in solar time \[h\].
    pub sunset_solar_h: f64,
    /// The 24 solar hours, hour `i` spanning solar time i…i+1 h.
    pub hours: [HourSun; 24],
}

/// Sun geometry for every day of a non-leap year at one site (day 366 maps to day 365).
#[derive(Debug, Clone, PartialEq)]
pub struct SunTable {
    latitude_rad: f64,
    horizon: Horizon,
    days: Vec<DaySun>,
}

impl SunTable {
    /// Compute the table for a site. Fails when the site is invalid.
    pub fn new(site: &SiteLocation) -> Result<Self, ClimateError> {
        let problems = site.problems();
        if let Some(first) = problems.first() {
            return Err(ClimateError::bad("site", first.clone()));
        }
        let latitude_rad = site.latitude_rad();
        let horizon = Horizon::from_degrees(&site.horizon);
        let days = (1..=365)
            .map(|n| day_sun(latitude_rad, n, &horizon))
            .collect();
        Ok(Self {
            latitude_rad,
            horizon,
            days,
        })
    }

    /// Geometry of a day of the year (1…366; 366 gives day 365's, 0 gives day 1's).
    pub fn day(&self, day_of_year: u32) -> &DaySun {
        let i = (day_of_year.clamp(1, 365) - 1) as usize;
        &self.days[i]
    }

    /// Latitude of the site \[rad\].
    pub fn latitude_rad(&self) -> f64 {
        self.latitude_rad
    }

    /// The horizon profile.
    pub fn horizon(&self) -> &Horizon {
        &self.horizon
    }
}

/// Geometry of an arbitrary period between two hour angles on one day: the sun position at
/// the middle of its lit part, the mean extraterrestrial horizontal irradiance over the
/// whole period [W m⁻²] and the horizon-visible beam fraction.
pub(crate) fn period_geometry(
    latitude_rad: f64,
    day_of_year: u32,
    omega_start_rad: f64,
    omega_end_rad: f64,
    horizon: &Horizon,
) -> (SunPosition, f64, f64) {
    let decl = declination_cooper_rad(day_of_year);
    let ws = sunset_hour_angle_rad(latitude_rad, decl);
    let lo = omega_start_rad.max(-ws);
    let hi = omega_end_rad.min(ws);
    let span_s = (omega_end_rad - omega_start_rad) / HOUR_RAD * 3600.0;
    if hi <= lo || span_s <= 0.0 {
        let mid = 0.5 * (omega_start_rad + omega_end_rad);
        let sun = sun_position_from_hour_angle(latitude_rad, decl, mid);
        return (sun, 0.0, 1.0);
    }
    // Clipped to the lit part ourselves, so the result does not depend on how the
    // interval function treats hour angles beyond sunset.
    let h0 = interval_extraterrestrial_horizontal_j_m2(latitude_rad, day_of_year, lo, hi).max(0.0);
    let sun = sun_position_from_hour_angle(latitude_rad, decl, 0.5 * (lo + hi));
    let visible = beam_visible_fraction(latitude_rad, decl, lo, hi, horizon);
    (sun, h0 / span_s, visible)
}

/// Fraction of the beam on a horizontal surface between two hour angles (both within the
/// lit part of the day) that the horizon lets through: 8 equal sub-steps, each weighted by
/// cos(zenith).
fn beam_visible_fraction(
    latitude_rad: f64,
    decl_rad: f64,
    lo: f64,
    hi: f64,
    horizon: &Horizon,
) -> f64 {
    if horizon.is_free() {
        return 1.0;
    }
    const STEPS: usize = 8;
    let (mut seen, mut all) = (0.0, 0.0);
    for k in 0..STEPS {
        let w = lo + (hi - lo) * (k as f64 + 0.5) / STEPS as f64;
        let sun = sun_position_from_hour_angle(latitude_rad, decl_rad, w);
        let cz = sun.zenith_rad.cos().max(0.0);
        all += cz;
        if !horizon.blocks(sun) {
            seen += cz;
        }
    }
    if all > 0.0 { seen / all } else { 0.0 }
}

/// Integral of a per-hour ratio over the lit part of an hour, in hours: (12/π)∫ r dω.
fn integrate_hour(f: impl Fn(f64) -> f64, lo: f64, hi: f64) -> f64 {
    if hi <= lo {
        return 0.0;
    }
    let half = 0.5 * (hi - lo);
    let mid = 0.5 * (hi + lo);
    let s: f64 = GL_NODES
        .iter()
        .zip(GL_WEIGHTS)
        .map(|(x, w)| w * f(mid + half * x).max(0.0))
        .sum();
    s * half / HOUR_RAD
}

/// Sum over the day of the Collares-Pereira & Rabl hourly ratio r_t, integrated hour by hour
/// over the lit part of the day, *before* renormalisation [-].
///
/// The ratio of Collares-Pereira & Rabl (1979) is a fit and does not integrate to exactly
/// one; this is the factor [`SunTable`] divides by so that a synthesised day reproduces its
/// daily total.
///
/// * `sunset_hour_angle_rad` — ω_s \[rad\], 0…π
pub fn cpr_raw_daily_sum(sunset_hour_angle_rad: f64) -> f64 {
    let ws = sunset_hour_angle_rad;
    (0..24)
        .map(|h| {
            let w1 = (h as f64 - 12.0) * HOUR_RAD;
            integrate_hour(
                |w| collares_pereira_rabl_rt(w, ws),
                w1.max(-ws),
                (w1 + HOUR_RAD).min(ws),
            )
        })
        .sum()
}

fn day_sun(latitude_rad: f64, n: u32, horizon: &Horizon) -> DaySun {
    let decl = declination_cooper_rad(n);
    let ws = sunset_hour_angle_rad(latitude_rad, decl);
    let mut raw_t = [0.0; 24];
    let mut raw_d = [0.0; 24];
    let mut geo = [(
        SunPosition {
            zenith_rad: PI,
            azimuth_rad: 0.0,
        },
        0.0,
        1.0,
    ); 24];
    for h in 0..24 {
        let w1 = (h as f64 - 12.0) * HOUR_RAD;
        let w2 = w1 + HOUR_RAD;
        let (lo, hi) = (w1.max(-ws), w2.min(ws));
        raw_t[h] = integrate_hour(|w| collares_pereira_rabl_rt(w, ws), lo, hi);
        raw_d[h] = integrate_hour(|w| liu_jordan_rd(w, ws), lo, hi);
        geo[h] = period_geometry(latitude_rad, n, w1, w2, horizon);
    }
    let sum_t: f64 = raw_t.iter().sum();
    let sum_d: f64 = raw_d.iter().sum();
    let hours = std::array::from_fn(|h| HourSun {
        sun: geo[h].0,
        extra_horizontal_w_m2: geo[h].1,
        global_share: if sum_t > 0.0 { raw_t[h] / sum_t } else { 0.0 },
        diffuse_share: if sum_d > 0.0 { raw_d[h] / sum_d } else { 0.0 },
        beam_visible_fraction: geo[h].2,
    });
    let ws_h = ws / HOUR_RAD;
    DaySun {
        day_of_year: n,
        declination_rad: decl,
        sunset_hour_angle_rad: ws,
        h0_j_m2: daily_extraterrestrial_horizontal_j_m2(latitude_rad, n).max(0.0),
        dni_extra_w_m2: extraterrestrial_normal_w_m2(n),
        sunrise_solar_h: 12.0 - ws_h,
        sunset_solar_h: 12.0 + ws_h,
        hours,
    }
}
