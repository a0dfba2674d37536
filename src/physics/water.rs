//! Properties of pure water: saturation line, latent heat, liquid properties and the
//! saturation enthalpies used in the energy bookkeeping of evaporating and condensing nodes.
//!
//! Temperatures are ITS-90 kelvin (`_k`). Where a source correlation is written in degrees
//! Celsius the conversion happens inside the function.
//!
//! Sharqawy, Lienhard & Zubair (2010) equation numbers other than (8) and (36), and the
//! coefficients of their fits, are recalled (from memory); each function is checked against
//! IAPWS-95/IF97/2008/2011 values generated with CoolProp and iapws (`tests/reference/`).
//!
//! Two saturation-pressure functions exist on purpose: [`saturation_pressure_pa`] (IAPWS-IF97,
//! the model's default) and [`saturation_pressure_tiwari_pa`], the simple exponential paired
//! with Dunkle's relations in much of the solar-distillation literature, kept so published
//! worked examples can be reproduced. They differ by about 2 % at still temperatures.

use crate::physics::constants::ZERO_CELSIUS_K;

/// Coefficients n1…n10 of the IAPWS-IF97 region-4 (saturation line) equations,
/// IAPWS R7-97(2012), Table 34 (recalled, with n₂ corrected against the iapws 1.5.5
/// implementation after the fixture test caught a 4e-9 relative difference).
const IF97_N: [f64; 10] = [
    0.116_705_214_527_67e4,
    -0.724_213_167_032_06e6,
    -0.170_738_469_400_92e2,
    0.120_208_247_024_70e5,
    -0.323_255_503_223_33e7,
    0.149_151_086_135_30e2,
    -0.482_326_573_615_91e4,
    0.405_113_405_420_57e6,
    -0.238_555_575_678_49,
    0.650_175_348_447_98e3,
];

/// Lower end of the IF97 saturation line: the triple point [K].
pub const TRIPLE_POINT_K: f64 = 273.16;
/// Upper end of the IF97 saturation line: the critical temperature [K] (IAPWS R7-97, Eq. 30
/// range).
pub const CRITICAL_TEMPERATURE_K: f64 = 647.096;

/// The IF97 region-4 quadratic coefficients A, B, C (Eq. 29b), their θ-derivatives and dθ/dT.
#[derive(Clone, Copy)]
struct Region4Terms {
    dtheta_dt: f64,
    a: f64,
    b: f64,
    c: f64,
    da: f64,
    db: f64,
    dc: f64,
}

/// Evaluates θ(T) (Eq. 29a), then A, B, C and their derivatives.
fn if97_region4_terms(t_k: f64) -> Region4Terms {
    let n = IF97_N;
    let dt = t_k - n[9];
    let theta = t_k + n[8] / dt;
    let dtheta_dt = 1.0 - n[8] / (dt * dt);
    let a = theta * theta + n[0] * theta + n[1];
    let b = n[2] * theta * theta + n[3] * theta + n[4];
    let c = n[5] * theta * theta + n[6] * theta + n[7];
    let da = 2.0 * theta + n[0];
    let db = 2.0 * n[2] * theta + n[3];
    let dc = 2.0 * n[5] * theta + n[6];
    Region4Terms {
        dtheta_dt,
        a,
        b,
        c,
        da,
        db,
        dc,
    }
}

/// Saturation pressure of pure water.
///
/// IAPWS R7-97(2012), *Revised Release on the IAPWS Industrial Formulation 1997 for the
/// Thermodynamic Properties of Water and Steam*, region 4, Eqs. (29)–(30).
///
/// * `t_k` — temperature [K], valid 273.15 ≤ T ≤ 647.096 K.
///
/// Returns p_sat [Pa].
///
/// *Notes*: the release gives p in MPa; this returns pascals. Outside the validity range the
/// same closed form is evaluated without clamping (it stays finite and monotonic a few
/// kelvin beyond both ends); callers validate their inputs.
pub fn saturation_pressure_pa(t_k: f64) -> f64 {
    let Region4Terms { a, b, c, .. } = if97_region4_terms(t_k);
    let root = (b * b - 4.0 * a * c).sqrt();
    let x = 2.0 * c / (-b + root);
    x.powi(4) * 1.0e6
}

/// [`saturation_pressure_pa`] and [`saturation_pressure_derivative_pa_k`] from one evaluation
/// of the IF97 region-4 terms — (p_sat [Pa], dp_sat/dT [Pa K⁻¹]); the thermal-network solver
/// needs both in every Newton iteration.
pub fn saturation_pressure_with_derivative(t_k: f64) -> (f64, f64) {
    let terms = if97_region4_terms(t_k);
    let (x, dx_dt) = region4_x_and_slope(&terms);
    (x.powi(4) * 1.0e6, 4.0 * x.powi(3) * dx_dt * 1.0e6)
}

/// x = p^(1/4) of IF97 Eq. (30) and its temperature slope dx/dT [MPa^(1/4) K⁻¹].
fn region4_x_and_slope(terms: &Region4Terms) -> (f64, f64) {
    let Region4Terms {
        dtheta_dt,
        a,
        b,
        c,
        da,
        db,
        dc,
    } = *terms;
    let root = (b * b - 4.0 * a * c).sqrt();
    let droot = (b * db - 2.0 * (da * c + a * dc)) / root;
    let den = -b + root;
    let x = 2.0 * c / den;
    let dx_dtheta = (2.0 * dc * den - 2.0 * c * (-db + droot)) / (den * den);
    (x, dx_dtheta * dtheta_dt)
}

/// Analytic derivative dp_sat/dT of [`saturation_pressure_pa`] [Pa K⁻¹].
///
/// Differentiates IAPWS R7-97(2012) Eqs. (29)–(30) in closed form (chain rule through
/// θ(T), A(θ), B(θ), C(θ)); used by the thermal-network solver for an analytic Jacobian.
///
/// * `t_k` — temperature [K], valid 273.15–647.096 K.
///
/// Returns dp_sat/dT [Pa K⁻¹].
pub fn saturation_pressure_derivative_pa_k(t_k: f64) -> f64 {
    saturation_pressure_with_derivative(t_k).1
}

/// Saturation temperature of pure water (the backward equation).
///
/// IAPWS R7-97(2012), region 4, Eq. (31).
///
/// * `p_pa` — pressure [Pa], valid 611.213 Pa ≤ p ≤ 22.064 MPa.
///
/// Returns T_sat [K]. *Notes*: consistent with [`saturation_pressure_pa`] to within the
/// release's stated numerical consistency (well below 1 mK); for p ≤ 0 the result is NaN.
pub fn saturation_temperature_k(p_pa: f64) -> f64 {
    let n = IF97_N;
    let beta = (p_pa * 1.0e-6).powf(0.25);
    let e = beta * beta + n[2] * beta + n[5];
    let f = n[0] * beta * beta + n[3] * beta + n[6];
    let g = n[1] * beta * beta + n[4] * beta + n[7];
    let d = 2.0 * g / (-f - (f * f - 4.0 * e * g).sqrt());
    let s = n[9] + d;
    0.5 * (s - (s * s - 4.0 * (n[8] + n[9] * d)).sqrt())
}

/// Constants of the exponential saturation-pressure fit used with Dunkle's relations.
const TIWARI_A: f64 = 25.317;
/// Slope constant of the same fit [K].
const TIWARI_B_K: f64 = 5144.0;

/// Saturation pressure of water from the exponential fit p = exp(25.317 − 5144/T).
///
/// The pairing used with Dunkle's internal heat- and mass-transfer relations in Malik,
/// Tiwari, Kumar & Sodha, *Solar Distillation* (Pergamon, 1982) and later work by Tiwari
/// (from memory; the equation is quoted, not seen in the book).
///
/// * `t_k` — temperature [K], intended for 283–363 K (still temperatures).
///
/// Returns p_sat [Pa].
///
/// *Notes*: it reads about 2.2–2.4 % below IAPWS-IF97 between 50 and 60 °C (checked in the
/// tests against [`saturation_pressure_pa`]), and is kept only to reproduce published worked
/// examples; the model's default is IF97.
pub fn saturation_pressure_tiwari_pa(t_k: f64) -> f64 {
    (TIWARI_A - TIWARI_B_K / t_k).exp()
}

/// Analytic derivative of [`saturation_pressure_tiwari_pa`]: dp/dT = p · 5144 / T² [Pa K⁻¹].
///
/// * `t_k` — temperature [K].
pub fn saturation_pressure_tiwari_derivative_pa_k(t_k: f64) -> f64 {
    saturation_pressure_tiwari_pa(t_k) * TIWARI_B_K / (t_k * t_k)
}

/// Latent heat of vaporisation of pure water.
///
/// Sharqawy, Lienhard & Zubair (2010), "Thermophysical properties of seawater: a review of
/// existing correlations and data", *Desalination and Water Treatment* 16:354–380,
/// pure-water part of Eq. (37) (a fit to IAPWS-95):
/// h_fg = 2.501e6 − 2.369e3 t + 2.678e−1 t² − 8.103e−3 t³ − 2.079e−5 t⁴, t in °C.
///
/// * `t_k` — temperature [K], valid 273.15–473.15 K (0–200 °C); stated accuracy ±0.01 %.
///
/// Returns h_fg [J kg⁻¹].
pub fn latent_heat_j_kg(t_k: f64) -> f64 {
    let t = t_k - ZERO_CELSIUS_K;
    2.501e6 + t * (-2.369e3 + t * (2.678e-1 + t * (-8.103e-3 + t * -2.079e-5)))
}

/// Derivative dh_fg/dT of [`latent_heat_j_kg`] [J kg⁻¹ K⁻¹] (analytic, same source).
///
/// * `t_k` — temperature [K], valid 273.15–473.15 K.
pub fn latent_heat_derivative_j_kg_k(t_k: f64) -> f64 {
    let t = t_k - ZERO_CELSIUS_K;
    -2.369e3 + t * (2.0 * 2.678e-1 + t * (3.0 * -8.103e-3 + t * 4.0 * -2.079e-5))
}

/// Density of pure liquid water at atmospheric pressure.
///
/// Sharqawy, Lienhard & Zubair (2010), Eq. (8), pure-water part (fit to IAPWS-95 at 0.1 MPa):
/// ρ_w = 9.999e2 + 2.034e−2 t − 6.162e−3 t² + 2.261e−5 t³ − 4.657e−8 t⁴, t in °C.
///
/// * `t_k` — temperature [K], valid 273.15–453.15 K (0–180 °C); stated accuracy ±0.01 %.
///
/// Returns ρ [kg m⁻³].
pub fn liquid_density_kg_m3(t_k: f64) -> f64 {
    let t = t_k - ZERO_CELSIUS_K;
    9.999e2 + t * (2.034e-2 + t * (-6.162e-3 + t * (2.261e-5 + t * -4.657e-8)))
}

/// Factor from ITS-90 to IPTS-68 kelvin used by Sharqawy et al. (2010) for correlations
/// originally fitted on the 1968 scale (T₆₈ = 1.00024 T₉₀).
pub(crate) const IPTS68_PER_ITS90: f64 = 1.00024;

/// Coefficients (A, B, C, D) of the Jamieson et al. (1969) specific-heat correlation at
/// salinity `s_g_kg` [g kg⁻¹]; c_p = A + B T + C T² + D T³ [kJ kg⁻¹ K⁻¹], T in K (IPTS-68).
pub(crate) fn jamieson_cp_coefficients(s_g_kg: f64) -> [f64; 4] {
    let s = s_g_kg;
    [
        5.328 - 9.76e-2 * s + 4.04e-4 * s * s,
        -6.913e-3 + 7.351e-4 * s - 3.15e-6 * s * s,
        9.6e-6 - 1.927e-6 * s + 8.23e-9 * s * s,
        2.5e-9 + 1.666e-9 * s - 7.125e-12 * s * s,
    ]
}

/// Isobaric specific heat of pure liquid water.
///
/// Jamieson, Tudhope, Morris & Cartwright (1969), *Desalination* 7:23–30, as given by
/// Sharqawy, Lienhard & Zubair (2010), Eq. (9), at S = 0:
/// c_p = A + B T + C T² + D T³ [kJ kg⁻¹ K⁻¹], T in K on the IPTS-68 scale.
///
/// * `t_k` — temperature [K] (ITS-90), valid 273.15–453.15 K; stated accuracy ±0.28 %.
///
/// Returns c_p [J kg⁻¹ K⁻¹].
///
/// *Notes*: converts ITS-90 to IPTS-68 with T₆₈ = 1.00024 T₉₀ as Sharqawy et al. advise.
pub fn liquid_specific_heat_j_kg_k(t_k: f64) -> f64 {
    let [a, b, c, d] = jamieson_cp_coefficients(0.0);
    let t = t_k * IPTS68_PER_ITS90;
    1.0e3 * (a + t * (b + t * (c + t * d)))
}

/// Thermal conductivity of pure liquid water.
///
/// Jamieson & Tudhope (1970), *Desalination* 8:393–401, as given by Sharqawy, Lienhard &
/// Zubair (2010), Eq. (13), at S = 0:
/// log₁₀ k = log₁₀ 240 + 0.434 (2.3 − 343.5/T)(1 − T/647)^(1/3), k in mW m⁻¹ K⁻¹,
/// T in K (IPTS-68).
///
/// * `t_k` — temperature [K] (ITS-90), valid 273.15–453.15 K; stated accuracy ±3 %.
///
/// Returns k [W m⁻¹ K⁻¹].
///
/// *Notes*: Sharqawy writes the temperature as t + 273.15 with t in °C (IPTS-68); the
/// ITS-90→IPTS-68 factor 1.00024 is applied to the kelvin value. Against IAPWS 2011 it reads
/// between 0.25 % low and 2.9 % high over 0–100 °C, the error growing with temperature (tests).
pub fn liquid_thermal_conductivity_w_m_k(t_k: f64) -> f64 {
    crate::physics::seawater::thermal_conductivity_w_m_k(t_k, 0.0)
}

/// Dynamic viscosity of pure liquid water.
///
/// Sharqawy, Lienhard & Zubair (2010), Eq. (23) (their fit to IAPWS 2008 data):
/// μ_w = 4.2844e−5 + [0.157 (t + 64.993)² − 91.296]⁻¹, t in °C.
///
/// * `t_k` — temperature [K], valid 273.15–453.15 K (0–180 °C); stated accuracy ±0.05 %.
///
/// Returns μ [Pa s].
pub fn liquid_viscosity_pa_s(t_k: f64) -> f64 {
    let t = t_k - ZERO_CELSIUS_K;
    let x = t + 64.993;
    4.2844e-5 + 1.0 / (0.157 * x * x - 91.296)
}

/// Antiderivative of the Jamieson c_p polynomial (S = 0) in IPTS-68 kelvin, in J kg⁻¹.
fn jamieson_cp_integral_j_kg(t68_k: f64) -> f64 {
    let [a, b, c, d] = jamieson_cp_coefficients(0.0);
    let t = t68_k;
    1.0e3 * t * (a + t * (b / 2.0 + t * (c / 3.0 + t * d / 4.0)))
}

/// Specific enthalpy of saturated (≈ atmospheric) liquid water, h_f.
///
/// Reference state as IAPWS-95: h ≈ 0 for liquid at the triple point (273.16 K). Computed as
/// the exact integral of [`liquid_specific_heat_j_kg_k`] (Jamieson et al. 1969 via Sharqawy
/// et al. 2010, Eq. 9) from 273.16 K, so dh_f/dT equals that specific heat exactly — the
/// network's enthalpy balances then conserve energy to round-off.
///
/// * `t_k` — temperature [K], valid 273.16–453.15 K.
///
/// Returns h_f [J kg⁻¹].
///
/// *Notes*: the liquid's pressure dependence (v Δp ≲ 0.1 kJ kg⁻¹ below 100 °C) is ignored.
/// Against IAPWS-95 saturated-liquid enthalpy it agrees within 0.12 kJ kg⁻¹ over 0–100 °C and
/// 1.0 kJ kg⁻¹ up to 200 °C (tests).
pub fn liquid_enthalpy_j_kg(t_k: f64) -> f64 {
    // dT₆₈ = 1.00024 dT₉₀, so ∫c_p(T₆₈) dT₉₀ = [∫c_p dT₆₈] / 1.00024.
    (jamieson_cp_integral_j_kg(t_k * IPTS68_PER_ITS90)
        - jamieson_cp_integral_j_kg(TRIPLE_POINT_K * IPTS68_PER_ITS90))
        / IPTS68_PER_ITS90
}

/// Specific enthalpy of saturated water vapour, h_g = h_f + h_fg.
///
/// Sum of [`liquid_enthalpy_j_kg`] and [`latent_heat_j_kg`] (Sharqawy et al. 2010), so that
/// the vapour a brine node loses and the condensate a cover gains are booked consistently.
///
/// * `t_k` — temperature [K], valid 273.16–453.15 K.
///
/// Returns h_g [J kg⁻¹] on the IAPWS-95 reference (liquid at the triple point ≈ 0).
pub fn vapour_enthalpy_j_kg(t_k: f64) -> f64 {
    liquid_enthalpy_j_kg(t_k) + latent_heat_j_kg(t_k)
}
