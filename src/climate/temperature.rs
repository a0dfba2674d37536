//! Hourly air temperature from daily extremes.

/// Ratio c fixing the sunset temperature between the day's maximum and the next minimum
/// (Cesaraccio et al. 2001, calibrated value 0.39).
pub const CESARACCIO_SUNSET_RATIO: f64 = 0.39;

/// Hours between the time of maximum temperature and sunset (Cesaraccio et al. 2001: the
/// maximum is reached 4 h before sunset).
pub const CESARACCIO_MAX_BEFORE_SUNSET_H: f64 = 4.0;

/// Air temperature at a time of day from the daily minimum and maximum, by the sine /
/// square-root profile of Cesaraccio, Spano, Duce & Snyder (2001).
///
/// Cesaraccio, C., Spano, D., Duce, P., Snyder, R.L. (2001), "An improved model for
/// determining degree-day values from daily temperature data", Int. J. Biometeorol.
/// 45(4):161–169. The profile (from memory, checked against the TrenchR implementation):
/// * sunrise `t_r` → time of maximum `t_x = t_s − 4 h`: T = T_n + (T_x − T_n)·sin(π/2·(t − t_r)/(t_x − t_r));
/// * `t_x` → sunset `t_s`: T = T_0 + (T_x − T_0)·cos(π/2·(t − t_x)/(t_s − t_x)), with
///   T_0 = T_x − c·(T_x − T_p), c = 0.39;
/// * sunset → next sunrise (`t_r + 24`): T = T_0 + (T_p − T_0)·√((t − t_s)/(t_r + 24 − t_s)).
///
/// * `time_h` — local (solar) time \[h\], within `sunrise_h … sunrise_h + 24`; earlier times
///   are shifted by +24 h (the previous night's curve with the same extremes)
/// * `sunrise_h`, `sunset_h` — sunrise and sunset \[h\], sunrise < sunset
/// * `t_min_c`, `t_max_c` — the day's minimum (at sunrise) and maximum [°C]
/// * `t_min_next_c` — the next day's minimum [°C]
///
/// Returns air temperature [°C]. Continuous over the whole day.
///
/// Notes: the paper's curves are used unchanged; where the day is shorter than 4 h (polar
/// winter) the maximum is put at the middle of the day so the first sine still rises.
pub fn cesaraccio_air_temperature_c(
    time_h: f64,
    sunrise_h: f64,
    sunset_h: f64,
    t_min_c: f64,
    t_max_c: f64,
    t_min_next_c: f64,
) -> f64 {
    use std::f64::consts::FRAC_PI_2;
    let t = if time_h < sunrise_h {
        time_h + 24.0
    } else {
        time_h
    };
    let t_x = (sunset_h - CESARACCIO_MAX_BEFORE_SUNSET_H).max(0.5 * (sunrise_h + sunset_h));
    let t_0 = t_max_c - CESARACCIO_SUNSET_RATIO * (t_max_c - t_min_next_c);
    if t <= t_x {
        let span = (t_x - sunrise_h).max(1e-9);
        t_min_c + (t_max_c - t_min_c) * (FRAC_PI_2 * (t - sunrise_h) / span).sin()
    } else if t <= sunset_h {
        let span = (sunset_h - t_x).max(1e-9);
        t_0 + (t_max_c - t_0) * (FRAC_PI_2 * (t - t_x) / span).cos()
    } else {
        let night = (sunrise_h + 24.0 - sunset_h).max(1e-9);
        let x = ((t - sunset_h) / night).clamp(0.0, 1.0);
        t_0 + (t_min_next_c - t_0) * x.sqrt()
    }
}

/// Sunrise and sunset [h solar time] to use in the temperature profile for a sunset hour
/// angle \[rad\]. The day length is held within 4…20 h so that near-polar days keep a
/// recognisable curve (common practice, no source).
pub fn profile_sun_times_h(sunset_hour_angle_rad: f64) -> (f64, f64) {
    let half_day_h = sunset_hour_angle_rad.to_degrees() / 15.0;
    if !(2.0..=10.0).contains(&half_day_h) {
        if half_day_h < 2.0 {
            return (12.0 - 2.0, 12.0 + 2.0);
        }
        return (12.0 - 10.0, 12.0 + 10.0);
    }
    (12.0 - half_day_h, 12.0 + half_day_h)
}
