//! Long-wave radiation from the sky: effective sky temperature and clear-sky emissivity.
//!
//! A cover loses heat to the sky as q = ε_cover σ (T_cover⁴ − T_sky⁴). Two ways to get T_sky:
//! Swinbank's air-temperature-only relation, and Berdahl & Martin's emissivity from the dew
//! point. Humidity matters: a humid (coastal) night sky is warmer, so a still near the sea
//! loses less at night than Swinbank predicts for the same air temperature; use the dew-point
//! relation where the dew point is known.

use std::f64::consts::PI;

use crate::physics::constants::ZERO_CELSIUS_K;

/// Effective clear-sky temperature from the air temperature alone \[K\].
///
/// Swinbank, W.C. (1963), "Long-wave radiation from clear skies", Q. J. R. Meteorol. Soc. 89,
/// 339–348 (as used by Duffie & Beckman 2013, eq. 3.9.2, from memory):
/// T_sky = 0.0552·T_air^1.5, both in kelvin.
///
/// * `t_air_k` — screen-level air temperature \[K\]
///
/// Returns T_sky \[K\]. *Notes*: fitted to clear nights at inland sites; it ignores humidity,
/// so it under-estimates T_sky (over-estimates night losses) in humid coastal air. Negative
/// input returns 0.
pub fn swinbank_sky_temperature_k(t_air_k: f64) -> f64 {
    0.0552 * t_air_k.max(0.0).powf(1.5)
}

/// Clear-sky emissivity from the dew point [-].
///
/// Berdahl, P. & Martin, M. (1984), "Emissivity of clear skies", Solar Energy 32(5),
/// 663–664 (from memory; coefficients confirmed against a secondary quotation, not the
/// paper): ε_sky = 0.711 + 0.56(T_dp/100) + 0.73(T_dp/100)², T_dp in °C.
///
/// * `t_dew_k` — dew-point temperature \[K\]; fitted for about −20…+30 °C
///
/// Returns ε_sky [-], clamped to 0…1.
pub fn berdahl_martin_sky_emissivity(t_dew_k: f64) -> f64 {
    let x = (t_dew_k - ZERO_CELSIUS_K) / 100.0;
    (0.711 + 0.56 * x + 0.73 * x * x).clamp(0.0, 1.0)
}

/// Clear-sky emissivity from the dew point with Berdahl & Martin's hour-of-day and station
/// pressure corrections [-].
///
/// Berdahl & Martin (1984), as [`berdahl_martin_sky_emissivity`] plus
/// Δε = 0.013 cos(2π t/24) + 0.00012 (P − 1000), t in hours from midnight (solar time), P in
/// hPa (from memory; the hour term matches a secondary quotation, the pressure term is not
/// confirmed).
///
/// * `t_dew_k` — dew point \[K\]; `solar_hour` — hours from local solar midnight \[h\];
///   `pressure_pa` — station pressure \[Pa\]
///
/// Returns ε_sky [-], clamped to 0…1. *Notes*: the hour term raises ε at night and lowers it
/// by day: a night-time inversion makes the air aloft warm relative to screen level.
pub fn berdahl_martin_sky_emissivity_corrected(
    t_dew_k: f64,
    solar_hour: f64,
    pressure_pa: f64,
) -> f64 {
    let x = (t_dew_k - ZERO_CELSIUS_K) / 100.0;
    let base = 0.711 + 0.56 * x + 0.73 * x * x;
    let hour = 0.013 * (2.0 * PI * solar_hour / 24.0).cos();
    let pressure = 0.00012 * (pressure_pa / 100.0 - 1000.0);
    (base + hour + pressure).clamp(0.0, 1.0)
}

/// Effective sky temperature from a sky emissivity \[K\].
///
/// Definition of the effective sky temperature (σT_sky⁴ = ε_sky σT_air⁴, Duffie & Beckman
/// 2013 §3.9, from memory): T_sky = ε_sky^(1/4)·T_air.
///
/// * `eps` — sky emissivity [-] (negative counts as 0)
/// * `t_air_k` — screen-level air temperature \[K\]
pub fn sky_temperature_from_emissivity_k(eps: f64, t_air_k: f64) -> f64 {
    eps.max(0.0).powf(0.25) * t_air_k
}
