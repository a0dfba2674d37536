//! Moist air inside and around a still: composition, density, transport properties,
//! vapour diffusivity, dew point and the standard-atmosphere pressure at a site.
//!
//! The mixture is dry air plus water vapour at total pressure `p_pa` with vapour partial
//! pressure `p_vapour_pa`. Densities and humidity ratios treat both as ideal gases (errors
//! below 1 % at one atmosphere up to 90 °C, fixture test). Transport properties combine the
//! pure-gas values with the kinetic-theory mixing rules of Wilke (viscosity) and Wassiljewa
//! with the Mason–Saxena interaction factors (conductivity), the approach Tsilingiris (2008),
//! *Energy Conversion and Management* 49:1098–1110, reviewed for humid air at 0–100 °C.

use crate::physics::constants::{
    GAS_CONSTANT_J_MOL_K, GRAVITY_M_S2, MOLAR_MASS_AIR_KG_MOL, MOLAR_MASS_WATER_KG_MOL,
    STANDARD_PRESSURE_PA, ZERO_CELSIUS_K,
};

/// Ratio of the molar masses of water and dry air, M_w / M_a ≈ 0.6221 [–].
pub const MOLAR_MASS_RATIO: f64 = MOLAR_MASS_WATER_KG_MOL / MOLAR_MASS_AIR_KG_MOL;

/// Mole fraction of water vapour, x_v = p_v / p, clamped to [0, 1].
///
/// Dalton's law for ideal gases.
///
/// * `p_vapour_pa` — partial pressure of vapour [Pa]; `p_pa` — total pressure [Pa], > 0.
///
/// Returns x_v [–].
pub fn vapour_mole_fraction(p_vapour_pa: f64, p_pa: f64) -> f64 {
    (p_vapour_pa / p_pa).clamp(0.0, 1.0)
}

/// Humidity ratio (mass of vapour per mass of dry air), W = (M_w/M_a) p_v / (p − p_v).
///
/// ASHRAE Handbook — Fundamentals (2017), ch. 1, Eq. (20) (from memory; ASHRAE rounds the
/// molar-mass ratio to 0.621945 with M_a = 28.966 g mol⁻¹, we use 28.9586 g mol⁻¹ from
/// Lemmon et al. 2000, a 0.03 % difference).
///
/// * `p_vapour_pa` — partial pressure of vapour [Pa], 0 ≤ p_v < p.
/// * `p_pa` — total pressure [Pa].
///
/// Returns W [kg kg⁻¹ dry air]; `f64::INFINITY` when p_v ≥ p (no dry air left), 0 for p_v ≤ 0.
pub fn humidity_ratio(p_vapour_pa: f64, p_pa: f64) -> f64 {
    let p_v = p_vapour_pa.max(0.0);
    if p_v >= p_pa {
        return f64::INFINITY;
    }
    MOLAR_MASS_RATIO * p_v / (p_pa - p_v)
}

/// Density of moist air as an ideal-gas mixture, ρ = [(p − p_v) M_a + p_v M_w] / (R T).
///
/// * `t_k` — temperature [K]; `p_vapour_pa` — vapour partial pressure [Pa];
///   `p_pa` — total pressure [Pa].
///
/// Returns ρ [kg m⁻³] of the mixture.
///
/// *Notes*: ignores compressibility: against a real-gas model the result is within 0.2 %
/// for dry air and up to 0.9 % low for saturated air at 90 °C (p_v = 70 kPa), where the
/// vapour's second virial coefficient matters (fixture test).
pub fn density_kg_m3(t_k: f64, p_vapour_pa: f64, p_pa: f64) -> f64 {
    let x_v = vapour_mole_fraction(p_vapour_pa, p_pa);
    p_pa * ((1.0 - x_v) * MOLAR_MASS_AIR_KG_MOL + x_v * MOLAR_MASS_WATER_KG_MOL)
        / (GAS_CONSTANT_J_MOL_K * t_k)
}

/// Isobaric specific heat of dry air at low pressure [J kg⁻¹ K⁻¹] (ASHRAE Fundamentals 2017,
/// ch. 1, Eq. 32, from memory: 1.006 kJ kg⁻¹ K⁻¹).
pub const DRY_AIR_SPECIFIC_HEAT_J_KG_K: f64 = 1006.0;
/// Isobaric specific heat of water vapour at low pressure [J kg⁻¹ K⁻¹] (same source:
/// 1.86 kJ kg⁻¹ K⁻¹).
pub const VAPOUR_SPECIFIC_HEAT_J_KG_K: f64 = 1860.0;

/// Isobaric specific heat of moist air per kilogram of **mixture**.
///
/// c_p = (c_p,a + W c_p,v) / (1 + W), the mass-weighted mean of the constant specific heats
/// behind ASHRAE's moist-air enthalpy h = 1.006 t + W (2501 + 1.86 t) kJ kg⁻¹ (ASHRAE
/// Fundamentals 2017, ch. 1, Eq. 32, from memory).
///
/// * `p_vapour_pa` — vapour partial pressure [Pa]; `p_pa` — total pressure [Pa].
///
/// Returns c_p [J kg⁻¹ K⁻¹]; for p_v ≥ p, the vapour value.
///
/// *Notes*: within 1 % of CoolProp's real-gas humid-air model at one atmosphere while the vapour
/// mole fraction is below 0.15; nearer saturation at 80–90 °C the real vapour's heat capacity
/// rises above its ideal-gas value and this reads low (−6.5 % at 90 °C, RH 1; fixture test).
pub fn specific_heat_j_kg_k(p_vapour_pa: f64, p_pa: f64) -> f64 {
    let w = humidity_ratio(p_vapour_pa, p_pa);
    if w.is_infinite() {
        return VAPOUR_SPECIFIC_HEAT_J_KG_K;
    }
    (DRY_AIR_SPECIFIC_HEAT_J_KG_K + w * VAPOUR_SPECIFIC_HEAT_J_KG_K) / (1.0 + w)
}

/// Dynamic viscosity of dry air by Sutherland's law, μ = μ₀ (T/T₀)^(3/2) (T₀ + S)/(T + S).
///
/// White, *Viscous Fluid Flow*, 3rd ed. (2006), Table 1-2 (from memory): μ₀ = 1.716e−5 Pa s,
/// T₀ = 273 K, S = 111 K, ±2 % for 170–1900 K.
///
/// * `t_k` — temperature [K].
///
/// Returns μ [Pa s].
pub fn dry_air_viscosity_pa_s(t_k: f64) -> f64 {
    sutherland(t_k, 1.716e-5, 273.0, 111.0)
}

/// Thermal conductivity of dry air by Sutherland's law.
///
/// White, *Viscous Fluid Flow*, 3rd ed. (2006), Table 1-3 (from memory): k₀ = 0.0241 W m⁻¹ K⁻¹,
/// T₀ = 273 K, S = 194 K, ±2 % for 160–2000 K.
///
/// * `t_k` — temperature [K].
///
/// Returns k [W m⁻¹ K⁻¹].
pub fn dry_air_thermal_conductivity_w_m_k(t_k: f64) -> f64 {
    sutherland(t_k, 0.0241, 273.0, 194.0)
}

/// Sutherland's law x₀ (T/T₀)^(3/2) (T₀ + S)/(T + S).
fn sutherland(t_k: f64, x0: f64, t0_k: f64, s_k: f64) -> f64 {
    x0 * (t_k / t0_k).powf(1.5) * (t0_k + s_k) / (t_k + s_k)
}

/// Critical temperature of water used to reduce temperatures in the IAPWS transport
/// releases [K].
const T_CRIT_K: f64 = 647.096;

/// Dynamic viscosity of water vapour in the dilute-gas (zero-density) limit.
///
/// IAPWS R12-08, *Release on the IAPWS Formulation 2008 for the Viscosity of Ordinary Water
/// Substance*, Eq. (11): μ₀ = 100 √T̄ / Σᵢ Hᵢ / T̄ⁱ μPa s, T̄ = T / 647.096 K,
/// H = (1.67752, 2.20462, 0.6366564, −0.241605) (coefficients from memory; checked against the
/// iapws implementation by the fixture test).
///
/// * `t_k` — temperature [K].
///
/// Returns μ [Pa s]. *Notes*: at the vapour partial pressures in a still (≤ 100 kPa) the
/// density correction is below 1 %.
pub fn vapour_viscosity_pa_s(t_k: f64) -> f64 {
    const H: [f64; 4] = [1.67752, 2.20462, 0.636_656_4, -0.241_605];
    let tr = t_k / T_CRIT_K;
    let sum: f64 = H
        .iter()
        .enumerate()
        .map(|(i, h)| h / tr.powi(i as i32))
        .sum();
    100.0 * tr.sqrt() / sum * 1.0e-6
}

/// Thermal conductivity of water vapour in the dilute-gas (zero-density) limit.
///
/// IAPWS R15-11, *Release on the IAPWS Formulation 2011 for the Thermal Conductivity of
/// Ordinary Water Substance*, Eq. (16): λ₀ = √T̄ / Σₖ Lₖ / T̄ᵏ mW m⁻¹ K⁻¹, T̄ = T / 647.096 K,
/// L = (2.443221e−3, 1.323095e−2, 6.770357e−3, −3.454586e−3, 4.096266e−4) (coefficients from
/// memory; checked against the iapws implementation by the fixture test).
///
/// * `t_k` — temperature [K].
///
/// Returns λ [W m⁻¹ K⁻¹].
pub fn vapour_thermal_conductivity_w_m_k(t_k: f64) -> f64 {
    const L: [f64; 5] = [
        2.443_221e-3,
        1.323_095e-2,
        6.770_357e-3,
        -3.454_586e-3,
        4.096_266e-4,
    ];
    let tr = t_k / T_CRIT_K;
    let sum: f64 = L
        .iter()
        .enumerate()
        .map(|(k, l)| l / tr.powi(k as i32))
        .sum();
    tr.sqrt() / sum * 1.0e-3
}

/// Wilke's interaction parameter φᵢⱼ for gas-mixture viscosity.
///
/// Wilke (1950), *J. Chem. Phys.* 18:517–519, Eq. (2):
/// φᵢⱼ = [1 + (μᵢ/μⱼ)^½ (Mⱼ/Mᵢ)^¼]² / [8 (1 + Mᵢ/Mⱼ)]^½.
///
/// * `mu_i_pa_s`, `mu_j_pa_s` — pure-gas viscosities [Pa s];
///   `m_i_kg_mol`, `m_j_kg_mol` — molar masses [kg mol⁻¹].
///
/// Returns φᵢⱼ [–].
pub fn wilke_interaction(mu_i_pa_s: f64, mu_j_pa_s: f64, m_i_kg_mol: f64, m_j_kg_mol: f64) -> f64 {
    let num = 1.0 + (mu_i_pa_s / mu_j_pa_s).sqrt() * (m_j_kg_mol / m_i_kg_mol).powf(0.25);
    num * num / (8.0 * (1.0 + m_i_kg_mol / m_j_kg_mol)).sqrt()
}

/// Two-component mixing rule Σ xᵢ Pᵢ / Σⱼ xⱼ φᵢⱼ with Wilke's φ built from the viscosities.
fn wilke_mix(x_v: f64, prop_a: f64, prop_v: f64, mu_a_pa_s: f64, mu_v_pa_s: f64) -> f64 {
    let x_a = 1.0 - x_v;
    let (m_a, m_v) = (MOLAR_MASS_AIR_KG_MOL, MOLAR_MASS_WATER_KG_MOL);
    let phi_av = wilke_interaction(mu_a_pa_s, mu_v_pa_s, m_a, m_v);
    let phi_va = wilke_interaction(mu_v_pa_s, mu_a_pa_s, m_v, m_a);
    x_a * prop_a / (x_a + x_v * phi_av) + x_v * prop_v / (x_v + x_a * phi_va)
}

/// Dynamic viscosity of moist air.
///
/// Wilke's (1950) mixing rule applied to dry air ([`dry_air_viscosity_pa_s`]) and dilute
/// water vapour ([`vapour_viscosity_pa_s`]), as in Tsilingiris (2008), *Energy Conversion and
/// Management* 49:1098–1110 (approach from memory).
///
/// * `t_k` — temperature [K], intended 273–373 K.
/// * `p_vapour_pa` — vapour partial pressure [Pa]; `p_pa` — total pressure [Pa].
///
/// Returns μ [Pa s]. *Notes*: within 3 % of CoolProp's humid-air model at one atmosphere,
/// 20–90 °C, all humidities (worst −2.7 % at 70 °C, RH 1; fixture test).
pub fn dynamic_viscosity_pa_s(t_k: f64, p_vapour_pa: f64, p_pa: f64) -> f64 {
    let mu_a = dry_air_viscosity_pa_s(t_k);
    let mu_v = vapour_viscosity_pa_s(t_k);
    wilke_mix(
        vapour_mole_fraction(p_vapour_pa, p_pa),
        mu_a,
        mu_v,
        mu_a,
        mu_v,
    )
}

/// Thermal conductivity of moist air.
///
/// Wassiljewa's equation with the Mason & Saxena (1958), *Phys. Fluids* 1:361–369,
/// interaction factors taken equal to Wilke's φᵢⱼ, applied to dry air
/// ([`dry_air_thermal_conductivity_w_m_k`]) and dilute vapour
/// ([`vapour_thermal_conductivity_w_m_k`]), as in Tsilingiris (2008) (approach from memory).
///
/// * `t_k` — temperature [K], intended 273–373 K.
/// * `p_vapour_pa` — vapour partial pressure [Pa]; `p_pa` — total pressure [Pa].
///
/// Returns k [W m⁻¹ K⁻¹]. *Notes*: Mason & Saxena's empirical factor ε (≈ 1.065) is taken as 1,
/// as Tsilingiris does. Within 4 % of CoolProp's humid-air model at one atmosphere, 20–90 °C,
/// all humidities (worst −3.7 % at 80 °C, RH 1; fixture test).
pub fn thermal_conductivity_w_m_k(t_k: f64, p_vapour_pa: f64, p_pa: f64) -> f64 {
    let mu_a = dry_air_viscosity_pa_s(t_k);
    let mu_v = vapour_viscosity_pa_s(t_k);
    let k_a = dry_air_thermal_conductivity_w_m_k(t_k);
    let k_v = vapour_thermal_conductivity_w_m_k(t_k);
    wilke_mix(
        vapour_mole_fraction(p_vapour_pa, p_pa),
        k_a,
        k_v,
        mu_a,
        mu_v,
    )
}

/// Diffusion coefficient of water vapour in air.
///
/// Marrero & Mason (1972), "Gaseous diffusion coefficients", *J. Phys. Chem. Ref. Data*
/// 1:3–118: D = 1.87e−10 T^2.072 / P m² s⁻¹ with P in atmospheres (from memory), valid
/// 280–450 K.
///
/// * `t_k` — temperature [K]; `p_pa` — total pressure [Pa].
///
/// Returns D [m² s⁻¹].
pub fn vapour_diffusivity_m2_s(t_k: f64, p_pa: f64) -> f64 {
    1.87e-10 * t_k.powf(2.072) / (p_pa / STANDARD_PRESSURE_PA)
}

/// Magnus-form constants of Alduchov & Eskridge (1996) over water: a [–], b [°C], e₀ [Pa].
const MAGNUS_A: f64 = 17.625;
/// See [`MAGNUS_A`].
const MAGNUS_B_C: f64 = 243.04;
/// See [`MAGNUS_A`].
const MAGNUS_E0_PA: f64 = 610.94;

/// Saturation vapour pressure over liquid water in the Magnus form.
///
/// Alduchov & Eskridge (1996), "Improved Magnus form approximation of saturation vapor
/// pressure", *J. Appl. Meteor.* 35:601–609, Eq. (21) (AERK): e_s = 610.94 exp(17.625 t /
/// (t + 243.04)) Pa, t in °C (from memory).
///
/// * `t_k` — temperature [K], valid 233.15–323.15 K (−40 to 50 °C), relative error < 0.4 %.
///
/// Returns e_s [Pa]. *Notes*: used only for dew points (its inverse is closed-form); the model's
/// saturation pressure is IAPWS-IF97 ([`crate::physics::water::saturation_pressure_pa`]).
pub fn saturation_pressure_magnus_pa(t_k: f64) -> f64 {
    let t = t_k - ZERO_CELSIUS_K;
    MAGNUS_E0_PA * (MAGNUS_A * t / (t + MAGNUS_B_C)).exp()
}

/// Dew-point temperature from air temperature and relative humidity.
///
/// Inverse of the Alduchov & Eskridge (1996) Magnus form ([`saturation_pressure_magnus_pa`]):
/// γ = ln(RH) + a t / (b + t), t_d = b γ / (a − γ).
///
/// * `t_k` — air temperature [K], valid 233.15–323.15 K.
/// * `rh` — relative humidity [–], 0 < RH ≤ 1 (values above 1 are clamped to 1).
///
/// Returns T_dew [K]; for RH ≤ 0 there is no dew point and the result is `f64::NEG_INFINITY`.
pub fn dew_point_k(t_k: f64, rh: f64) -> f64 {
    if rh <= 0.0 {
        return f64::NEG_INFINITY;
    }
    let t = t_k - ZERO_CELSIUS_K;
    let gamma = rh.min(1.0).ln() + MAGNUS_A * t / (MAGNUS_B_C + t);
    MAGNUS_B_C * gamma / (MAGNUS_A - gamma) + ZERO_CELSIUS_K
}

/// Relative humidity from air temperature and dew point, RH = e_s(T_d) / e_s(T).
///
/// Alduchov & Eskridge (1996) Magnus form ([`saturation_pressure_magnus_pa`]).
///
/// * `t_k` — air temperature [K]; `t_dew_k` — dew point [K]; both 233.15–323.15 K.
///
/// Returns RH [–]; above 1 when the dew point exceeds the air temperature (supersaturated
/// input), which callers should reject.
pub fn relative_humidity_from_dew_point(t_k: f64, t_dew_k: f64) -> f64 {
    saturation_pressure_magnus_pa(t_dew_k) / saturation_pressure_magnus_pa(t_k)
}

/// Atmospheric pressure at a site elevation in the standard atmosphere's troposphere.
///
/// ISO 2533:1975 / ICAO standard atmosphere, barometric formula for a constant lapse rate:
/// p = p₀ (1 − L h / T₀)^(g M / (R L)), p₀ = 101 325 Pa, T₀ = 288.15 K, L = 0.0065 K m⁻¹,
/// M = 0.0289644 kg mol⁻¹ (the standard atmosphere's air molar mass), R = 8.314462618.
///
/// * `elevation_m` — elevation above mean sea level [m], valid −500 to 11 000 m.
///
/// Returns p [Pa].
///
/// *Notes*: the formula is for geopotential height; for site elevations below 5 km the
/// difference from geometric height changes p by < 0.05 %. Above 44.3 km the base goes
/// negative and the result is NaN; design validation keeps elevations far below that.
pub fn pressure_at_elevation_pa(elevation_m: f64) -> f64 {
    const T0_K: f64 = 288.15;
    const LAPSE_K_M: f64 = 0.0065;
    const M_STD_KG_MOL: f64 = 0.028_964_4;
    let exponent = GRAVITY_M_S2 * M_STD_KG_MOL / (GAS_CONSTANT_J_MOL_K * LAPSE_K_M);
    STANDARD_PRESSURE_PA * (1.0 - LAPSE_K_M * elevation_m / T0_K).powf(exponent)
}
