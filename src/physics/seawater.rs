//! Properties of seawater and brine: vapour-pressure lowering, boiling-point elevation,
//! latent heat, density, specific heat, conductivity and viscosity.
//!
//! Salinity `s_g_kg` is the mass of dissolved salt per kilogram of seawater [g kg⁻¹]
//! (reference / absolute salinity; standard seawater has S ≈ 35 g kg⁻¹). Temperatures are
//! ITS-90 kelvin.
//!
//! Sources: Sharqawy, Lienhard & Zubair (2010) is cited by equation number. Eqs. (8) and (36)
//! were confirmed against a published description of the paper; the other equation numbers
//! and all coefficients are recalled (from memory) and are validated by the TEOS-10 and
//! IAPWS fixture tests in `tests/it/physics_water.rs`, which would catch a wrong coefficient.
//!
//! # Latent heat: per kilogram of what?
//! Evaporating one kilogram of *vapour* from brine takes the pure-water latent heat at the
//! brine temperature plus a small heat of dilution ([`latent_heat_per_kg_vapour_j_kg`]); this is
//! the value to divide an evaporative heat flow by. Sharqawy et al.'s h_fg,w (1 − S/1000)
//! ([`latent_heat_per_kg_seawater_j_kg`]) is per kilogram of *seawater* and must never be used
//! to turn a heat flow into a vapour mass: it would overstate distillate by S/1000 (3.5 % for
//! seawater, 10 % or more for concentrated brine).

use crate::physics::constants::ZERO_CELSIUS_K;
use crate::physics::water;

/// Ratio of the vapour pressure over seawater to that over pure water at the same
/// temperature, p_sw / p_w.
///
/// Nayar, Sharqawy, Banchik & Lienhard (2016), "Thermophysical properties of seawater: a review
/// and new correlations that include pressure dependence", *Desalination* 390:1–24, Eq. (27):
/// p_sw / p_w = exp(−4.5818e−4 S − 2.0443e−6 S²), S in g kg⁻¹.
///
/// * `s_g_kg` — salinity [g kg⁻¹], valid 0–120 g kg⁻¹ (for 0–180 °C per the paper).
///
/// Returns the ratio [–], 1 for pure water.
///
/// *Notes*: independent of temperature by construction; TEOS-10 water activity agrees within
/// 0.06 % up to 42 g kg⁻¹ and within 0.6 % at 120 g kg⁻¹, where TEOS-10 itself is extrapolated
/// (fixture test). Negative salinities are treated as 0.
pub fn vapour_pressure_ratio(s_g_kg: f64) -> f64 {
    let s = s_g_kg.max(0.0);
    (-4.5818e-4 * s - 2.0443e-6 * s * s).exp()
}

/// Vapour pressure over seawater, p_sw = p_sat,IF97(T) · [`vapour_pressure_ratio`]\(S).
///
/// * `t_k` — temperature [K], valid 273.15–453.15 K.
/// * `s_g_kg` — salinity [g kg⁻¹], valid 0–120 g kg⁻¹.
///
/// Returns p_sw [Pa].
pub fn vapour_pressure_pa(t_k: f64, s_g_kg: f64) -> f64 {
    water::saturation_pressure_pa(t_k) * vapour_pressure_ratio(s_g_kg)
}

/// Temperature derivative of [`vapour_pressure_pa`] at fixed salinity [Pa K⁻¹] (analytic).
///
/// * `t_k` — temperature [K]; `s_g_kg` — salinity [g kg⁻¹].
pub fn vapour_pressure_derivative_pa_k(t_k: f64, s_g_kg: f64) -> f64 {
    water::saturation_pressure_derivative_pa_k(t_k) * vapour_pressure_ratio(s_g_kg)
}

/// Boiling-point elevation of seawater.
///
/// Sharqawy, Lienhard & Zubair (2010), *Desalination and Water Treatment* 16:354–380,
/// Eq. (36): BPE = A S² + B S with S in kg kg⁻¹,
/// A = −4.584e−4 t² + 2.823e−1 t + 17.95, B = 1.536e−4 t² + 5.267e−2 t + 6.56, t in °C.
///
/// * `t_k` — temperature [K], valid 273.15–473.15 K.
/// * `s_g_kg` — salinity [g kg⁻¹], valid 0–120 g kg⁻¹; stated accuracy ±0.018 K.
///
/// Returns the elevation [K]. Negative salinities are treated as 0.
pub fn boiling_point_elevation_k(t_k: f64, s_g_kg: f64) -> f64 {
    let t = t_k - ZERO_CELSIUS_K;
    let s = s_g_kg.max(0.0) * 1.0e-3;
    let a = -4.584e-4 * t * t + 2.823e-1 * t + 17.95;
    let b = 1.536e-4 * t * t + 5.267e-2 * t + 6.56;
    a * s * s + b * s
}

/// dBPE/dT of [`boiling_point_elevation_k`] at fixed salinity [K K⁻¹].
fn boiling_point_elevation_derivative(t_k: f64, s_g_kg: f64) -> f64 {
    let t = t_k - ZERO_CELSIUS_K;
    let s = s_g_kg.max(0.0) * 1.0e-3;
    let da = -2.0 * 4.584e-4 * t + 2.823e-1;
    let db = 2.0 * 1.536e-4 * t + 5.267e-2;
    da * s * s + db * s
}

/// Latent heat of evaporating water from seawater, per kilogram of **vapour** produced.
///
/// This is the value to divide an evaporative heat flow by to get the vapour mass.
///
/// Derivation (ours): Clausius–Clapeyron gives h_fg = R_v T² d(ln p)/dT for an ideal vapour
/// over a liquid of negligible volume. Over seawater, p_sw(T) = p_w(T − θ) with θ the
/// boiling-point elevation ([`boiling_point_elevation_k`], Sharqawy et al. 2010 Eq. 36), so
/// d(ln p_sw)/dT = (1 − dθ/dT) · d(ln p_w)/dT at T − θ. Taking the ratio to the pure-water
/// expression at T cancels the ideal-gas and liquid-volume approximations to first order:
///
/// h_fg,sw(T, S) = h_fg,w(T) · (1 − dθ/dT) · [d ln p_w/dT]\(T − θ) / [d ln p_w/dT]\(T)
///
/// with h_fg,w from [`water::latent_heat_j_kg`] and p_w from IAPWS-IF97.
///
/// * `t_k` — brine temperature [K], valid 273.15–453.15 K.
/// * `s_g_kg` — salinity [g kg⁻¹], valid 0–120 g kg⁻¹.
///
/// Returns h_fg per kg vapour [J kg⁻¹].
///
/// *Notes*: the correction is tiny: at most 0.011 % of the pure-water value at S = 35 g kg⁻¹
/// (0–40 °C) and about 0.1 % at 120 g kg⁻¹. The TEOS-10 latent heat of evaporation from
/// seawater (`gsw.latentheat_evap_t`) changes with salinity by the same order, and the two
/// corrections agree within 0.012 % over 0–40 °C, 0–40 g kg⁻¹ (fixture test). Treating the
/// value as the pure-water one would be accurate to about 0.1 %; the correction is kept so
/// that the brine's enthalpy balance follows its salinity consistently. At 0 °C, T − θ lies a
/// fraction of a kelvin below the IF97 range; the IF97 expression is smooth there.
pub fn latent_heat_per_kg_vapour_j_kg(t_k: f64, s_g_kg: f64) -> f64 {
    let theta_k = boiling_point_elevation_k(t_k, s_g_kg);
    let dtheta = boiling_point_elevation_derivative(t_k, s_g_kg);
    let dlnp =
        |t: f64| water::saturation_pressure_derivative_pa_k(t) / water::saturation_pressure_pa(t);
    water::latent_heat_j_kg(t_k) * (1.0 - dtheta) * dlnp(t_k - theta_k) / dlnp(t_k)
}

/// Sharqawy's "latent heat of seawater", h_fg,sw = h_fg,w (1 − S/1000), per kilogram of
/// **seawater** evaporated.
///
/// Sharqawy, Lienhard & Zubair (2010), Eq. (37), with h_fg,w from [`water::latent_heat_j_kg`].
///
/// * `t_k` — temperature [K], valid 273.15–473.15 K.
/// * `s_g_kg` — salinity [g kg⁻¹], valid 0–240 g kg⁻¹ per the paper.
///
/// Returns h_fg per kg of seawater [J kg⁻¹].
///
/// **Warning**: never divide an evaporative heat flow by this to get a vapour (distillate)
/// mass; the vapour carries no salt, so that would overstate the distillate by S/1000. Use
/// [`latent_heat_per_kg_vapour_j_kg`] instead. This function exists to reproduce published
/// values and for bookkeeping expressed per kilogram of brine.
pub fn latent_heat_per_kg_seawater_j_kg(t_k: f64, s_g_kg: f64) -> f64 {
    water::latent_heat_j_kg(t_k) * (1.0 - s_g_kg.max(0.0) * 1.0e-3)
}

/// Density of seawater at atmospheric pressure.
///
/// Sharqawy, Lienhard & Zubair (2010), Eq. (8):
/// ρ_sw = ρ_w + S (b1 + b2 t + b3 t² + b4 t³ + b5 S t²), S in kg kg⁻¹, t in °C,
/// b = (8.020e2, −2.001, 1.677e−2, −3.060e−5, −1.613e−5); ρ_w from
/// [`water::liquid_density_kg_m3`].
///
/// * `t_k` — temperature [K], valid 273.15–453.15 K.
/// * `s_g_kg` — salinity [g kg⁻¹], valid 0–160 g kg⁻¹; stated accuracy ±0.1 %.
///
/// Returns ρ [kg m⁻³].
pub fn density_kg_m3(t_k: f64, s_g_kg: f64) -> f64 {
    let t = t_k - ZERO_CELSIUS_K;
    let s = s_g_kg.max(0.0) * 1.0e-3;
    water::liquid_density_kg_m3(t_k)
        + s * (8.020e2 + t * (-2.001 + t * (1.677e-2 + t * -3.060e-5)) - 1.613e-5 * s * t * t)
}

/// Isobaric specific heat of seawater.
///
/// Jamieson, Tudhope, Morris & Cartwright (1969), *Desalination* 7:23–30, as given by
/// Sharqawy, Lienhard & Zubair (2010), Eq. (9): c_p = A + B T + C T² + D T³ [kJ kg⁻¹ K⁻¹],
/// T in K (IPTS-68), with A…D quadratic in S [g kg⁻¹].
///
/// * `t_k` — temperature [K] (ITS-90), valid 273.15–453.15 K.
/// * `s_g_kg` — salinity [g kg⁻¹], valid 0–180 g kg⁻¹; stated accuracy ±0.28 %.
///
/// Returns c_p [J kg⁻¹ K⁻¹]. *Notes*: T₆₈ = 1.00024 T₉₀ as Sharqawy et al. advise.
pub fn specific_heat_j_kg_k(t_k: f64, s_g_kg: f64) -> f64 {
    let [a, b, c, d] = water::jamieson_cp_coefficients(s_g_kg.max(0.0));
    let t = t_k * water::IPTS68_PER_ITS90;
    1.0e3 * (a + t * (b + t * (c + t * d)))
}

/// Thermal conductivity of seawater.
///
/// Jamieson & Tudhope (1970), *Desalination* 8:393–401, as given by Sharqawy, Lienhard &
/// Zubair (2010), Eq. (13):
/// log₁₀ k = log₁₀(240 + 0.0002 S) + 0.434 (2.3 − (343.5 + 0.037 S)/T) (1 − T/(647 + 0.03 S))^(1/3),
/// k in mW m⁻¹ K⁻¹, T in K (IPTS-68), S in g kg⁻¹.
///
/// * `t_k` — temperature [K] (ITS-90), valid 273.15–453.15 K.
/// * `s_g_kg` — salinity [g kg⁻¹], valid 0–160 g kg⁻¹; stated accuracy ±3 %.
///
/// Returns k [W m⁻¹ K⁻¹].
pub fn thermal_conductivity_w_m_k(t_k: f64, s_g_kg: f64) -> f64 {
    let s = s_g_kg.max(0.0);
    let t = t_k * water::IPTS68_PER_ITS90;
    let log_k = (240.0 + 0.0002 * s).log10()
        + 0.434 * (2.3 - (343.5 + 0.037 * s) / t) * (1.0 - t / (647.0 + 0.03 * s)).cbrt();
    10f64.powf(log_k) * 1.0e-3
}

/// Dynamic viscosity of seawater.
///
/// Sharqawy, Lienhard & Zubair (2010), Eq. (22): μ_sw = μ_w (1 + A S + B S²), S in kg kg⁻¹,
/// A = 1.541 + 1.998e−2 t − 9.52e−5 t², B = 7.974 − 7.561e−2 t + 4.724e−4 t², t in °C;
/// μ_w from [`water::liquid_viscosity_pa_s`].
///
/// * `t_k` — temperature [K], valid 293.15–453.15 K (20–180 °C).
/// * `s_g_kg` — salinity [g kg⁻¹], valid 0–150 g kg⁻¹; stated accuracy ±1.5 %.
///
/// Returns μ [Pa s]. *Notes*: used below 20 °C as well, where it is an extrapolation.
pub fn viscosity_pa_s(t_k: f64, s_g_kg: f64) -> f64 {
    let t = t_k - ZERO_CELSIUS_K;
    let s = s_g_kg.max(0.0) * 1.0e-3;
    let a = 1.541 + 1.998e-2 * t - 9.52e-5 * t * t;
    let b = 7.974 - 7.561e-2 * t + 4.724e-4 * t * t;
    water::liquid_viscosity_pa_s(t_k) * (1.0 + a * s + b * s * s)
}
