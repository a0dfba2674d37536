//! Heat and mass transfer: inside a still (brine → cover, plate → plate), across a stagnant
//! air gap (multi-effect stages), from the cover to the outside air, and through insulation.
//!
//! The internal correlations share one interface, [`enclosure_transfer`], which returns the
//! convective and evaporative fluxes together with their analytic partial derivatives with
//! respect to both surface temperatures, because the network solver's Jacobian is analytic.
//!
//! Conventions: "hot" is the evaporating surface (brine, wick, stage evaporator), "cold" the
//! condensing one (cover, stage condenser). Fluxes are positive from hot to cold and change
//! sign when the driving difference does. Saturation pressures and their temperature
//! derivatives are *arguments*: this module never evaluates water properties itself.

use crate::physics::constants::{
    GAS_CONSTANT_J_MOL_K, GRAVITY_M_S2, MOLAR_MASS_WATER_KG_MOL, STANDARD_PRESSURE_PA,
    STEFAN_BOLTZMANN_W_M2_K4,
};

/// Dunkle's factor relating the evaporative to the convective flux [K Pa⁻¹]:
/// q_e = 16.273e−3 · h_c · (p_hot − p_cold).
///
/// Dunkle (1961), from the Lewis relation for humid air near 1 atm (see [`enclosure_transfer`]).
pub const DUNKLE_EVAPORATION_FACTOR_K_PA: f64 = 16.273e-3;

/// Dunkle's vapour-density constant in the modified temperature difference \[Pa\] (268.9 kPa).
///
/// Dunkle (1961): ΔT′ = ΔT + (p_w − p_g)·T_w/(268.9e3 − p_w). It equals
/// P·M_air/(M_air − M_water) at P = 1 atm (101 325 × 28.96/10.94 ≈ 268 kPa).
pub const DUNKLE_PRESSURE_CONSTANT_PA: f64 = 268.9e3;

/// Dunkle's convective prefactor [W m⁻² K⁻⁴ᐟ³]: h_c = 0.884·ΔT′^(1/3).
pub const DUNKLE_CONVECTION_PREFACTOR: f64 = 0.884;

/// Kumar & Tiwari (1996) constant C for a passive basin still (from memory).
pub const KUMAR_TIWARI_PASSIVE_C: f64 = 0.0322;

/// Kumar & Tiwari (1996) exponent n for a passive basin still (from memory).
pub const KUMAR_TIWARI_PASSIVE_N: f64 = 0.41;

/// Air properties and geometry an internal correlation needs. The caller evaluates the
/// properties (at the mean film temperature, humid air if it can) and keeps them fixed
/// within a Newton iteration; their temperature dependence is not part of the derivatives.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct EnclosureAir {
    /// Thermal conductivity of the (humid) air k [W m⁻¹ K⁻¹].
    pub conductivity_w_m_k: f64,
    /// Kinematic viscosity ν [m² s⁻¹].
    pub kinematic_viscosity_m2_s: f64,
    /// Prandtl number Pr [-].
    pub prandtl: f64,
    /// Total pressure inside the enclosure P \[Pa\] (site pressure for a vented still).
    pub total_pressure_pa: f64,
    /// Characteristic length L \[m\]: the mean brine-to-cover distance of a basin, or the
    /// plate spacing of a narrow inclined enclosure.
    pub characteristic_length_m: f64,
}

/// Which correlation describes free convection between the evaporating and condensing
/// surfaces. The evaporative flux always follows from the convective coefficient through
/// Dunkle's Lewis-relation form, q_e = 16.273e−3·h_c·(p_hot − p_cold).
///
/// The default is [`InternalCorrelation::Dunkle`]: it is the relation most basin-still models
/// use and has no fitted constants that belong to one experiment. It over-predicts evaporation
/// at large brine–cover temperature differences (Shawaqfeh & Farid 1995);
/// [`InternalCorrelation::KumarTiwari`] is the alternative.
#[derive(Debug, Clone, Copy, PartialEq, Default)]
pub enum InternalCorrelation {
    /// Dunkle (1961): h_c = 0.884·ΔT′^(1/3), independent of the gap height.
    #[default]
    Dunkle,
    /// Kumar & Tiwari (1996): Nu = C·(Gr·Pr)^n with a fitted C and n
    /// ([`KUMAR_TIWARI_PASSIVE_C`], [`KUMAR_TIWARI_PASSIVE_N`] for a passive still).
    KumarTiwari {
        /// Constant C [-].
        c: f64,
        /// Exponent n [-], in (0, 1].
        n: f64,
    },
    /// Hollands, Unny, Raithby & Konicek (1976) for a narrow enclosure between parallel
    /// plates heated from below (wick and stepped stills, multi-effect stages). The plate
    /// spacing is [`EnclosureAir::characteristic_length_m`].
    InclinedEnclosure {
        /// Tilt of the plates from horizontal β \[rad\], 0…75°.
        tilt_rad: f64,
    },
}

/// A correlation parameter outside its meaningful range.
#[derive(Debug, Clone, PartialEq, thiserror::Error)]
#[error("{parameter} = {value} is outside its allowed range {allowed}")]
pub struct InvalidCorrelation {
    /// Which parameter.
    pub parameter: &'static str,
    /// The value given.
    pub value: f64,
    /// The allowed range, in words.
    pub allowed: &'static str,
}

impl InternalCorrelation {
    /// Check the correlation's parameters; design validation calls this so that
    /// [`enclosure_transfer`] only ever sees meaningful values.
    pub fn validate(&self) -> Result<(), InvalidCorrelation> {
        match *self {
            InternalCorrelation::Dunkle => Ok(()),
            InternalCorrelation::KumarTiwari { c, n } => {
                if !(c.is_finite() && c > 0.0) {
                    return Err(InvalidCorrelation {
                        parameter: "c",
                        value: c,
                        allowed: "> 0",
                    });
                }
                if !(n.is_finite() && (KT_N_MIN..=1.0).contains(&n)) {
                    return Err(InvalidCorrelation {
                        parameter: "n",
                        value: n,
                        allowed: "0.1 … 1",
                    });
                }
                Ok(())
            }
            InternalCorrelation::InclinedEnclosure { tilt_rad } => {
                if !(tilt_rad.is_finite() && (0.0..=HOLLANDS_MAX_TILT_RAD).contains(&tilt_rad)) {
                    return Err(InvalidCorrelation {
                        parameter: "tilt_rad",
                        value: tilt_rad,
                        allowed: "0 … 75° (in radians)",
                    });
                }
                Ok(())
            }
        }
    }
}

/// Smallest Kumar–Tiwari exponent accepted (keeps the blend exponent 2/n ≤ 20).
const KT_N_MIN: f64 = 0.1;
/// Upper tilt limit of Hollands et al. (1976) \[rad\] (75°).
const HOLLANDS_MAX_TILT_RAD: f64 = 75.0 * std::f64::consts::PI / 180.0;

/// Fluxes between the hot and cold surface of an enclosure, per m² of surface, with their
/// analytic partial derivatives with respect to the two surface temperatures (the pressures
/// follow their temperatures through the dp/dT the caller gave).
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct EnclosureTransfer {
    /// Convective coefficient h_c [W m⁻² K⁻¹] (never below the conduction limit k/L).
    pub h_convective_w_m2_k: f64,
    /// Convective flux q_c = h_c·(T_hot − T_cold) [W m⁻²].
    pub q_convective_w_m2: f64,
    /// Evaporative (latent) flux q_e = 16.273e−3·h_c·(p_hot − p_cold) [W m⁻²]. The evaporated
    /// mass is q_e / h_fg, computed by the caller with its own latent heat.
    pub q_evaporative_w_m2: f64,
    /// ∂q_c/∂T_hot [W m⁻² K⁻¹].
    pub dq_convective_dt_hot: f64,
    /// ∂q_c/∂T_cold [W m⁻² K⁻¹].
    pub dq_convective_dt_cold: f64,
    /// ∂q_e/∂T_hot [W m⁻² K⁻¹].
    pub dq_evaporative_dt_hot: f64,
    /// ∂q_e/∂T_cold [W m⁻² K⁻¹].
    pub dq_evaporative_dt_cold: f64,
}

/// A value with its partial derivatives with respect to T_hot and T_cold.
#[derive(Debug, Clone, Copy)]
struct Dual2 {
    v: f64,
    d_hot: f64,
    d_cold: f64,
}

/// Width of the guard on Dunkle's denominator, as a fraction of the pressure constant.
const DENOMINATOR_GUARD_FRACTION: f64 = 0.05;

/// C¹ guard for Dunkle's denominator d = P* − p_hot, which vanishes near 128 °C at 1 atm.
/// With f = 0.05·P*: exact for d ≥ 2f; f + d²/(4f) for 0 < d < 2f; f for d ≤ 0.
/// Returns (guarded value, d(guarded)/dd).
fn guarded_denominator(d_pa: f64, p_star_pa: f64) -> (f64, f64) {
    let f = DENOMINATOR_GUARD_FRACTION * p_star_pa;
    if d_pa >= 2.0 * f {
        (d_pa, 1.0)
    } else if d_pa > 0.0 {
        (f + d_pa * d_pa / (4.0 * f), d_pa / (2.0 * f))
    } else {
        (f, 0.0)
    }
}

/// Dunkle's pressure constant scaled to the enclosure's total pressure \[Pa\].
fn dunkle_pressure_constant_at(p_total_pa: f64) -> f64 {
    let p = if p_total_pa.is_finite() && p_total_pa > 0.0 {
        p_total_pa
    } else {
        STANDARD_PRESSURE_PA
    };
    DUNKLE_PRESSURE_CONSTANT_PA * p / STANDARD_PRESSURE_PA
}

fn modified_difference(
    t_hot_k: f64,
    t_cold_k: f64,
    p_hot_pa: f64,
    dp_hot_dt_pa_k: f64,
    p_cold_pa: f64,
    dp_cold_dt_pa_k: f64,
    p_total_pa: f64,
) -> Dual2 {
    let p_star = dunkle_pressure_constant_at(p_total_pa);
    let (den, dden_dd) = guarded_denominator(p_star - p_hot_pa, p_star);
    let dp = p_hot_pa - p_cold_pa;
    let v = (t_hot_k - t_cold_k) + dp * t_hot_k / den;
    // d/dT_hot of dp·T_hot/den, with d(den)/dT_hot = dden_dd·(−dp_hot/dT).
    let d_hot = 1.0
        + (dp_hot_dt_pa_k * t_hot_k + dp) / den
        + dp * t_hot_k * dden_dd * dp_hot_dt_pa_k / (den * den);
    let d_cold = -1.0 - dp_cold_dt_pa_k * t_hot_k / den;
    Dual2 { v, d_hot, d_cold }
}

/// Dunkle's vapour-modified temperature difference ΔT′ \[K\].
///
/// Dunkle (1961): ΔT′ = (T_w − T_g) + (p_w − p_g)·T_w/(268.9e3 − p_w), T_w in kelvin.
///
/// * `t_hot_k`, `t_cold_k` — evaporating and condensing surface temperatures \[K\]
/// * `p_hot_pa`, `p_cold_pa` — saturation vapour pressures at those temperatures \[Pa\]
/// * `p_total_pa` — total pressure in the enclosure \[Pa\]
///
/// Returns ΔT′ \[K\]; it is the temperature difference that gives the same buoyancy in dry
/// air as the real temperature and humidity differences together.
///
/// *Notes*: the 268.9 kPa constant is P·M_a/(M_a − M_w) at 1 atm; here it is scaled with
/// `p_total_pa`/101 325 so the buoyancy stays right at altitude (identical at 1 atm). The
/// denominator is guarded (C¹) once it falls below 10 % of that constant (≈126 °C brine at
/// 1 atm), where the original formula diverges near 128 °C.
pub fn vapour_modified_temperature_difference_k(
    t_hot_k: f64,
    t_cold_k: f64,
    p_hot_pa: f64,
    p_cold_pa: f64,
    p_total_pa: f64,
) -> f64 {
    modified_difference(t_hot_k, t_cold_k, p_hot_pa, 0.0, p_cold_pa, 0.0, p_total_pa).v
}

/// Dunkle's convective coefficient between brine and cover, as published [W m⁻² K⁻¹].
///
/// Dunkle, R.V. (1961), "Solar water distillation: the roof type still and a multiple effect
/// diffusion still", Int. Developments in Heat Transfer, ASME, Part V, 895–902:
/// h_cw = 0.884·ΔT′^(1/3) with ΔT′ from [`vapour_modified_temperature_difference_k`] at 1 atm.
///
/// * `t_hot_k`, `t_cold_k` — brine and cover temperatures \[K\]
/// * `p_hot_pa`, `p_cold_pa` — saturation pressures at those temperatures \[Pa\]
///
/// Returns h_cw [W m⁻² K⁻¹], and 0 when ΔT′ ≤ 0 (no convection). Valid for turbulent free
/// convection, Gr above ≈ 3.2e5, i.e. ordinary basin stills.
///
/// *Notes*: this is the bare correlation for reporting and checks. The solver uses
/// [`enclosure_transfer`], which blends it with the conduction limit so it stays C¹.
pub fn dunkle_convective_coefficient_w_m2_k(
    t_hot_k: f64,
    t_cold_k: f64,
    p_hot_pa: f64,
    p_cold_pa: f64,
) -> f64 {
    let dt = vapour_modified_temperature_difference_k(
        t_hot_k,
        t_cold_k,
        p_hot_pa,
        p_cold_pa,
        STANDARD_PRESSURE_PA,
    );
    DUNKLE_CONVECTION_PREFACTOR * dt.max(0.0).cbrt()
}

/// Evaporative (latent) flux from Dunkle's Lewis-relation form [W m⁻²].
///
/// Dunkle (1961): q_ew = h_ew (T_w − T_g) with h_ew = 16.273e−3·h_cw·(p_w − p_g)/(T_w − T_g),
/// written here without the temperature difference: q_ew = 16.273e−3·h_cw·(p_w − p_g).
///
/// * `h_convective_w_m2_k` — convective coefficient h_c [W m⁻² K⁻¹]
/// * `p_hot_pa`, `p_cold_pa` — saturation pressures at the two surfaces \[Pa\]
///
/// Returns q_e [W m⁻²], positive from the hot to the cold surface.
///
/// *Notes*: Dunkle's h_ew divides by (T_w − T_g) and is undefined at equal temperatures;
/// the flux form is not, so the model never forms h_ew.
pub fn lewis_evaporative_flux_w_m2(h_convective_w_m2_k: f64, p_hot_pa: f64, p_cold_pa: f64) -> f64 {
    DUNKLE_EVAPORATION_FACTOR_K_PA * h_convective_w_m2_k * (p_hot_pa - p_cold_pa)
}

/// Rayleigh number built on the vapour-modified temperature difference [-].
///
/// Ra = g·ΔT′·L³·Pr/(ν²·T̄) with T̄ = (T_hot + T_cold)/2 (ideal-gas expansion coefficient
/// 1/T̄); it equals Gr·Pr of Kumar & Tiwari (1996) and the Ra of Hollands et al. (1976).
///
/// * `t_hot_k`, `t_cold_k` \[K\]; `p_hot_pa`, `p_cold_pa` saturation pressures \[Pa\]
/// * `props` — air properties and characteristic length
///
/// Returns Ra [-], negative when the layer is stably stratified.
pub fn vapour_modified_rayleigh(
    t_hot_k: f64,
    t_cold_k: f64,
    p_hot_pa: f64,
    p_cold_pa: f64,
    props: &EnclosureAir,
) -> f64 {
    rayleigh_dual(t_hot_k, t_cold_k, p_hot_pa, 0.0, p_cold_pa, 0.0, props).v
}

/// Kumar & Tiwari's Grashof number with the vapour-modified temperature difference [-].
///
/// Kumar, S. & Tiwari, G.N. (1996), "Estimation of convective mass transfer in solar
/// distillation systems", Solar Energy 57(6), 459–464: Gr = g·β·ΔT′·L³/ν², β = 1/T̄
/// (from memory).
///
/// * `t_hot_k`, `t_cold_k` \[K\]; `p_hot_pa`, `p_cold_pa` saturation pressures \[Pa\]
/// * `props` — air properties; L is the mean brine-to-cover distance
pub fn kumar_tiwari_grashof(
    t_hot_k: f64,
    t_cold_k: f64,
    p_hot_pa: f64,
    p_cold_pa: f64,
    props: &EnclosureAir,
) -> f64 {
    let pr = sane_positive(props.prandtl, 0.71);
    vapour_modified_rayleigh(t_hot_k, t_cold_k, p_hot_pa, p_cold_pa, props) / pr
}

fn sane_positive(x: f64, fallback: f64) -> f64 {
    if x.is_finite() && x > 0.0 {
        x
    } else {
        fallback
    }
}

/// Sanitised (k, ν, Pr, L): non-physical inputs fall back to air near 40 °C and a 0.3 m gap,
/// so a bad caller gets finite numbers instead of NaN (design validation rejects them first).
fn sane_props(props: &EnclosureAir) -> (f64, f64, f64, f64) {
    (
        sane_positive(props.conductivity_w_m_k, 0.027),
        sane_positive(props.kinematic_viscosity_m2_s, 1.7e-5),
        sane_positive(props.prandtl, 0.71),
        sane_positive(props.characteristic_length_m, 0.3).max(1e-4),
    )
}

fn rayleigh_dual(
    t_hot_k: f64,
    t_cold_k: f64,
    p_hot_pa: f64,
    dp_hot_dt_pa_k: f64,
    p_cold_pa: f64,
    dp_cold_dt_pa_k: f64,
    props: &EnclosureAir,
) -> Dual2 {
    let (_, nu, pr, l) = sane_props(props);
    let dtp = modified_difference(
        t_hot_k,
        t_cold_k,
        p_hot_pa,
        dp_hot_dt_pa_k,
        p_cold_pa,
        dp_cold_dt_pa_k,
        props.total_pressure_pa,
    );
    let tm = (0.5 * (t_hot_k + t_cold_k)).max(1.0);
    let k = GRAVITY_M_S2 * l.powi(3) * pr / (nu * nu);
    Dual2 {
        v: k * dtp.v / tm,
        d_hot: k * (dtp.d_hot / tm - 0.5 * dtp.v / (tm * tm)),
        d_cold: k * (dtp.d_cold / tm - 0.5 * dtp.v / (tm * tm)),
    }
}

/// Power-mean blend of a conduction floor h0 with a power law a·x^n (x ≥ 0):
/// h = (h0^m + (a·x₊^n)^m)^(1/m) with m = 2/n, so (a·x^n)^m = a^m·x² and h is C¹ in x with
/// dh/dx = 0 at x = 0 and a finite maximum slope. Returns (h, dh/dx).
fn blend_with_conduction(h0: f64, a: f64, n: f64, x: f64) -> (f64, f64) {
    let m = 2.0 / n;
    let xp = x.max(0.0);
    // Dunkle's n = 1/3 gives m = 6: integer powers and a sixth root (√∛) are several times
    // cheaper than `powf`, and this sits inside every Newton iteration.
    let (am, s, h) = if (m - 6.0).abs() < 1e-12 {
        let am = a.powi(6);
        let s = h0.powi(6) + am * xp * xp;
        (am, s, s.cbrt().sqrt())
    } else {
        let am = a.powf(m);
        let s = h0.powf(m) + am * xp * xp;
        (am, s, s.powf(1.0 / m))
    };
    // h^(1−m) = h / h^m = h / s.
    let dh_dx = if s > 0.0 {
        (2.0 / m) * am * xp * h / s
    } else {
        0.0
    };
    (h, dh_dx)
}

/// Width of the C¹ smoothing of the [·]⁺ brackets in Hollands' correlation.
const HOLLANDS_SMOOTHING: f64 = 0.01;

/// C¹ positive part: 0 below −w, x above w, (x + w)²/(4w) between. Returns (value, slope).
fn soft_positive(x: f64, w: f64) -> (f64, f64) {
    if x <= -w {
        (0.0, 0.0)
    } else if x >= w {
        (x, 1.0)
    } else {
        ((x + w) * (x + w) / (4.0 * w), (x + w) / (2.0 * w))
    }
}

/// Nusselt number for a narrow inclined air layer heated from below, as published [-].
///
/// Hollands, K.G.T., Unny, T.E., Raithby, G.D. & Konicek, L. (1976), "Free convective heat
/// transfer across inclined air layers", J. Heat Transfer 98, 189–193; as given in Duffie &
/// Beckman (2013) ch. 3, natural convection between parallel plates (eq. 3.8.4, equation
/// number from memory):
/// Nu = 1 + 1.44[1 − 1708(sin 1.8β)^1.6/(Ra cos β)][1 − 1708/(Ra cos β)]⁺
///        + [(Ra cos β/5830)^(1/3) − 1]⁺.
///
/// * `rayleigh` — Ra on the plate spacing [-]
/// * `tilt_rad` — tilt from horizontal β \[rad\], valid 0…75°
///
/// Returns Nu [-] ≥ 1. *Notes*: β is clamped to 0…75°; Ra ≤ 0 (stable layer) gives 1.
pub fn hollands_nusselt(rayleigh: f64, tilt_rad: f64) -> f64 {
    let beta = tilt_rad.abs().min(HOLLANDS_MAX_TILT_RAD);
    let s = rayleigh * beta.cos();
    if s <= 0.0 {
        return 1.0;
    }
    let y1 = 1.0 - 1708.0 * (1.8 * beta).sin().powf(1.6) / s;
    let y2 = (1.0 - 1708.0 / s).max(0.0);
    let y3 = ((s / 5830.0).cbrt() - 1.0).max(0.0);
    1.0 + 1.44 * y1 * y2 + y3
}

/// Hollands' Nu with both [·]⁺ brackets smoothed (width 0.01), and dNu/dRa.
fn hollands_nusselt_smooth(rayleigh: f64, tilt_rad: f64) -> (f64, f64) {
    let beta = tilt_rad.abs().min(HOLLANDS_MAX_TILT_RAD);
    let cb = beta.cos();
    let s = rayleigh * cb;
    // Below this the second bracket is under −w, so both convective terms vanish
    // (the third bracket is negative for s < 5830 as well).
    if s <= 1708.0 / (1.0 + HOLLANDS_SMOOTHING) {
        return (1.0, 0.0);
    }
    let sb = (1.8 * beta).sin().max(0.0).powf(1.6);
    let y1 = 1.0 - 1708.0 * sb / s;
    let dy1 = 1708.0 * sb / (s * s);
    let (p2, dp2) = soft_positive(1.0 - 1708.0 / s, HOLLANDS_SMOOTHING);
    let dy2 = 1708.0 / (s * s);
    let c = (s / 5830.0).cbrt();
    let (p3, dp3) = soft_positive(c - 1.0, HOLLANDS_SMOOTHING);
    let dy3 = c / (3.0 * s);
    let nu = 1.0 + 1.44 * y1 * p2 + p3;
    let dnu_ds = 1.44 * (dy1 * p2 + y1 * dp2 * dy2) + dp3 * dy3;
    (nu, dnu_ds * cb)
}

/// Convective and evaporative transfer between the hot (evaporating) and cold (condensing)
/// surface of an enclosure, with analytic derivatives for the solver's Jacobian.
///
/// Sources: Dunkle (1961) for the vapour-modified ΔT′, the Lewis-relation evaporative flux
/// q_e = 16.273e−3·h_c·(p_hot − p_cold) and the Dunkle h_c; Kumar & Tiwari (1996),
/// Solar Energy 57(6), Nu = C(Gr·Pr)^n; Hollands et al. (1976) (see [`hollands_nusselt`]).
///
/// * `corr` — the correlation
/// * `t_hot_k`, `t_cold_k` — surface temperatures \[K\]
/// * `p_hot_pa`, `p_cold_pa` — saturation vapour pressures at those temperatures (with the
///   salinity lowering if any) \[Pa\]
/// * `dp_hot_dt_pa_k`, `dp_cold_dt_pa_k` — their temperature derivatives [Pa K⁻¹]
/// * `props` — air properties, total pressure and characteristic length
///
/// Returns fluxes [W m⁻²] and their derivatives [W m⁻² K⁻¹].
///
/// *Notes* (departures from the papers, all for a well-behaved Newton solver):
/// * The conduction limit h₀ = k/L (Nu = 1) is the floor: when the cover is warmer than the
///   brine (ΔT′ ≤ 0) the layer is stable and only conducts. Dunkle and Kumar–Tiwari,
///   h = a·x^n (x = ΔT′ or Ra), are blended with it as h = (h₀^m + (a·x₊^n)^m)^(1/m) with
///   m = 2/n (m = 6 for Dunkle), so h is C¹ with a finite slope everywhere (zero at x = 0).
///   The crossover, where both are equal, is at ΔT′ = (h₀/0.884)³ — about 1e−3 K for a
///   0.3 m gap — so the blend changes h by less than 1e−8 (relative) at ΔT′ ≥ 0.1 K.
/// * Hollands' [·]⁺ brackets are smoothed over ±0.01 of their argument (C¹); the
///   published value is [`hollands_nusselt`].
/// * Dunkle's 268.9 kPa constant scales with the total pressure and its denominator is
///   guarded near 128 °C (see [`vapour_modified_temperature_difference_k`]); the caller
///   should still limit the temperature step per Newton iteration there.
/// * Air properties are held constant in the derivatives. Kumar–Tiwari n is clamped to
///   0.1…1 and Hollands' tilt to 0…75° (design validation rejects values outside,
///   see [`InternalCorrelation::validate`]).
#[allow(clippy::too_many_arguments)] // two states of (T, p, dp/dT) are the natural inputs
pub fn enclosure_transfer(
    corr: &InternalCorrelation,
    t_hot_k: f64,
    t_cold_k: f64,
    p_hot_pa: f64,
    dp_hot_dt_pa_k: f64,
    p_cold_pa: f64,
    dp_cold_dt_pa_k: f64,
    props: &EnclosureAir,
) -> EnclosureTransfer {
    let (k_air, _, _, l) = sane_props(props);
    let h0 = k_air / l;
    let h = match *corr {
        InternalCorrelation::Dunkle => {
            let x = modified_difference(
                t_hot_k,
                t_cold_k,
                p_hot_pa,
                dp_hot_dt_pa_k,
                p_cold_pa,
                dp_cold_dt_pa_k,
                props.total_pressure_pa,
            );
            let (h, dh_dx) = blend_with_conduction(h0, DUNKLE_CONVECTION_PREFACTOR, 1.0 / 3.0, x.v);
            Dual2 {
                v: h,
                d_hot: dh_dx * x.d_hot,
                d_cold: dh_dx * x.d_cold,
            }
        }
        InternalCorrelation::KumarTiwari { c, n } => {
            let n = if n.is_finite() {
                n.clamp(KT_N_MIN, 1.0)
            } else {
                KUMAR_TIWARI_PASSIVE_N
            };
            let c = sane_positive(c, KUMAR_TIWARI_PASSIVE_C);
            let ra = rayleigh_dual(
                t_hot_k,
                t_cold_k,
                p_hot_pa,
                dp_hot_dt_pa_k,
                p_cold_pa,
                dp_cold_dt_pa_k,
                props,
            );
            let (h, dh_dra) = blend_with_conduction(h0, c * h0, n, ra.v);
            Dual2 {
                v: h,
                d_hot: dh_dra * ra.d_hot,
                d_cold: dh_dra * ra.d_cold,
            }
        }
        InternalCorrelation::InclinedEnclosure { tilt_rad } => {
            let tilt = if tilt_rad.is_finite() { tilt_rad } else { 0.0 };
            let ra = rayleigh_dual(
                t_hot_k,
                t_cold_k,
                p_hot_pa,
                dp_hot_dt_pa_k,
                p_cold_pa,
                dp_cold_dt_pa_k,
                props,
            );
            let (nu, dnu_dra) = hollands_nusselt_smooth(ra.v, tilt);
            Dual2 {
                v: nu * h0,
                d_hot: h0 * dnu_dra * ra.d_hot,
                d_cold: h0 * dnu_dra * ra.d_cold,
            }
        }
    };
    let dt = t_hot_k - t_cold_k;
    let dp = p_hot_pa - p_cold_pa;
    let f = DUNKLE_EVAPORATION_FACTOR_K_PA;
    EnclosureTransfer {
        h_convective_w_m2_k: h.v,
        q_convective_w_m2: h.v * dt,
        q_evaporative_w_m2: f * h.v * dp,
        dq_convective_dt_hot: h.v + dt * h.d_hot,
        dq_convective_dt_cold: -h.v + dt * h.d_cold,
        dq_evaporative_dt_hot: f * (h.d_hot * dp + h.v * dp_hot_dt_pa_k),
        dq_evaporative_dt_cold: f * (h.d_cold * dp - h.v * dp_cold_dt_pa_k),
    }
}

/// Linearised radiative exchange coefficient between two grey surfaces [W m⁻² K⁻¹].
///
/// h_r = ε·σ·(T₁² + T₂²)(T₁ + T₂), so that q = h_r (T₁ − T₂) = ε σ (T₁⁴ − T₂⁴) exactly
/// (linearised radiation coefficient, Duffie & Beckman 2013 ch. 3, from memory).
///
/// * `t1_k`, `t2_k` — surface temperatures \[K\]
/// * `eps` — effective emissivity of the pair [-] (e.g. [`crate::physics::optics::effective_emissivity_parallel`])
pub fn radiative_coefficient_w_m2_k(t1_k: f64, t2_k: f64, eps: f64) -> f64 {
    eps * STEFAN_BOLTZMANN_W_M2_K4 * (t1_k * t1_k + t2_k * t2_k) * (t1_k + t2_k)
}

/// Dunkle's brine-to-cover radiative coefficient h_rw [W m⁻² K⁻¹].
///
/// Dunkle (1961): h_rw = ε_eff σ (T_w² + T_g²)(T_w + T_g), ε_eff = (1/ε_w + 1/ε_g − 1)⁻¹.
///
/// * `t_w_k`, `t_g_k` — brine and cover temperatures \[K\]; `eps_eff` [-]
pub fn dunkle_radiative_coefficient_w_m2_k(t_w_k: f64, t_g_k: f64, eps_eff: f64) -> f64 {
    radiative_coefficient_w_m2_k(t_w_k, t_g_k, eps_eff)
}

/// Vapour mass flux across a stagnant air gap and its temperature derivatives.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct DiffusionFlux {
    /// Mass flux ṁ from the hot to the cold surface [kg m⁻² s⁻¹].
    pub mass_flux_kg_m2_s: f64,
    /// ∂ṁ/∂T_hot [kg m⁻² s⁻¹ K⁻¹].
    pub dflux_dt_hot_kg_m2_s_k: f64,
    /// ∂ṁ/∂T_cold [kg m⁻² s⁻¹ K⁻¹].
    pub dflux_dt_cold_kg_m2_s_k: f64,
}

/// Largest vapour partial pressure used in the Stefan flux, as a fraction of the total.
const STEFAN_MAX_PRESSURE_FRACTION: f64 = 0.99;

/// Stefan (one-way) diffusion of vapour across a stagnant air gap (multi-effect stages).
///
/// Stefan flow through a stagnant gas (Bird, Stewart & Lightfoot, *Transport Phenomena*,
/// 2nd ed. 2002, §18.2, eq. 18.2-14, from memory):
/// ṁ = D·M·P/(R·T̄·δ) · ln[(P − p_c)/(P − p_e)], T̄ = (T_e + T_c)/2.
///
/// * `t_hot_k`, `t_cold_k` — evaporator and condenser temperatures \[K\]
/// * `p_hot_pa`, `p_cold_pa` — vapour pressures at the two surfaces \[Pa\]
/// * `dp_hot_dt_pa_k`, `dp_cold_dt_pa_k` — their temperature derivatives [Pa K⁻¹]
/// * `gap_m` — gap width δ \[m\]; `p_total_pa` — total pressure P \[Pa\]
/// * `diffusivity_m2_s` — vapour–air diffusivity D [m² s⁻¹] (caller evaluates it at T̄)
///
/// Returns ṁ [kg m⁻² s⁻¹] and its derivatives; D is held constant in the derivatives.
///
/// *Notes*: each vapour pressure is capped at 0.99·P (the gap would be boiling beyond it);
/// the derivative through a capped pressure is zero. Non-positive gap, pressure or
/// diffusivity give a zero flux.
#[allow(clippy::too_many_arguments)] // two states of (T, p, dp/dT) plus the gap description
pub fn stefan_diffusion_flux_kg_m2_s(
    t_hot_k: f64,
    t_cold_k: f64,
    p_hot_pa: f64,
    dp_hot_dt_pa_k: f64,
    p_cold_pa: f64,
    dp_cold_dt_pa_k: f64,
    gap_m: f64,
    p_total_pa: f64,
    diffusivity_m2_s: f64,
) -> DiffusionFlux {
    let zero = DiffusionFlux {
        mass_flux_kg_m2_s: 0.0,
        dflux_dt_hot_kg_m2_s_k: 0.0,
        dflux_dt_cold_kg_m2_s_k: 0.0,
    };
    // Written out rather than over an array: this runs for every stage gap in every Newton
    // iteration of a multi-effect still.
    let positive = |x: f64| x > 0.0 && x < f64::INFINITY;
    if !(positive(gap_m) && positive(p_total_pa) && positive(diffusivity_m2_s)) {
        return zero;
    }
    let cap = STEFAN_MAX_PRESSURE_FRACTION * p_total_pa;
    let (pe, dpe) = if p_hot_pa < cap {
        (p_hot_pa, dp_hot_dt_pa_k)
    } else {
        (cap, 0.0)
    };
    let (pc, dpc) = if p_cold_pa < cap {
        (p_cold_pa, dp_cold_dt_pa_k)
    } else {
        (cap, 0.0)
    };
    let tm = (0.5 * (t_hot_k + t_cold_k)).max(1.0);
    let a = diffusivity_m2_s * MOLAR_MASS_WATER_KG_MOL * p_total_pa
        / (GAS_CONSTANT_J_MOL_K * tm * gap_m);
    let ln = ((p_total_pa - pc) / (p_total_pa - pe)).ln();
    let m = a * ln;
    DiffusionFlux {
        mass_flux_kg_m2_s: m,
        dflux_dt_hot_kg_m2_s_k: -0.5 * m / tm + a * dpe / (p_total_pa - pe),
        dflux_dt_cold_kg_m2_s_k: -0.5 * m / tm - a * dpc / (p_total_pa - pc),
    }
}

/// Wind convection coefficient on a cover, Watmuff, Charters & Proctor [W m⁻² K⁻¹].
///
/// Watmuff, J.H., Charters, W.W.S. & Proctor, D. (1977), "Solar and wind induced external
/// coefficients for solar collectors", COMPLES 2, 56 (as quoted by Duffie & Beckman 2013,
/// §3.15, from memory): h_w = 2.8 + 3.0·v.
///
/// * `wind_speed_m_s` — wind speed v near the cover [m s⁻¹]; negative values count as 0
///
/// Returns h_w [W m⁻² K⁻¹], convection only; radiation to the sky is a separate term.
pub fn wind_convection_watmuff_w_m2_k(wind_speed_m_s: f64) -> f64 {
    2.8 + 3.0 * wind_speed_m_s.max(0.0)
}

/// Wind coefficient after McAdams (1954) [W m⁻² K⁻¹].
///
/// McAdams, W.H. (1954), *Heat Transmission*, 3rd ed. (as quoted by Duffie & Beckman 2013,
/// §3.15, from memory): h = 5.7 + 3.8·v.
///
/// * `wind_speed_m_s` — wind speed v [m s⁻¹]; negative values count as 0
///
/// *Notes*: the measurements behind it include radiation from the plate to its
/// surroundings, so combining it with a separate sky-radiation term double counts that
/// radiation. Prefer [`wind_convection_watmuff_w_m2_k`] alongside an explicit sky term.
pub fn wind_convection_mcadams_w_m2_k(wind_speed_m_s: f64) -> f64 {
    5.7 + 3.8 * wind_speed_m_s.max(0.0)
}

/// Smallest height used in the log wind profile, as a multiple of the roughness length.
const LOG_PROFILE_MIN_HEIGHT_OVER_ROUGHNESS: f64 = 1.5;

/// Wind speed at another height by the neutral logarithmic profile [m s⁻¹].
///
/// Stull, R.B. (1988), *An Introduction to Boundary Layer Meteorology*, §9.7 (neutral
/// surface layer, from memory): v(z) = v_ref·ln(z/z₀)/ln(z_ref/z₀).
///
/// * `v_ref_m_s` — measured wind speed [m s⁻¹]; `z_ref_m` — its height (10 m at a standard
///   station) \[m\]; `z_m` — wanted height \[m\]; `roughness_m` — roughness length z₀ \[m\]
///   (≈0.03 m open country, ≈0.0002 m open sea, ≈0.1 m scattered buildings)
///
/// *Notes*: both heights are clamped to at least 1.5·z₀ (common practice, no source) since
/// the log law has no meaning within the roughness; z₀ is floored at 1e−5 m.
pub fn wind_speed_at_height_m_s(v_ref_m_s: f64, z_ref_m: f64, z_m: f64, roughness_m: f64) -> f64 {
    let z0 = sane_positive(roughness_m, 0.03).max(1e-5);
    let zmin = LOG_PROFILE_MIN_HEIGHT_OVER_ROUGHNESS * z0;
    let z_ref = if z_ref_m.is_finite() {
        z_ref_m.max(zmin)
    } else {
        10.0_f64.max(zmin)
    };
    let z = if z_m.is_finite() { z_m.max(zmin) } else { zmin };
    v_ref_m_s.max(0.0) * (z / z0).ln() / (z_ref / z0).ln()
}

/// Free-convection coefficient of a tilted plate in still air [W m⁻² K⁻¹] (calm nights).
///
/// Incropera, DeWitt, Bergman & Lavine (2007), *Fundamentals of Heat and Mass Transfer*,
/// 6th ed., eqs. 9.30–9.32 (Lloyd & Moran 1974 for horizontal plates; g replaced by g·cos θ
/// for a tilted one, §9.6.2) (from memory):
/// * unstable (surface warmer than the air, facing up, or colder facing down):
///   Nu = 0.54 Ra^(1/4) (10⁴…10⁷), 0.15 Ra^(1/3) (10⁷…10¹¹);
/// * stable (cover colder than the air, the usual night case): Nu = 0.27 Ra^(1/4).
///
/// * `t_surface_k`, `t_air_k` \[K\]; `tilt_rad` — tilt from horizontal \[rad\]
/// * `length_m` — plate area / perimeter \[m\]
/// * `conductivity_w_m_k`, `kinematic_viscosity_m2_s`, `prandtl` — air at the film temperature
///
/// *Notes*: the two unstable branches are joined by their maximum (crossover Ra ≈ 4.7e6
/// instead of a 6 % jump at 1e7); below Ra = 10⁴ the same laws are extrapolated; tilt is
/// clamped to 0…85° so g·cos θ stays positive.
pub fn natural_convection_tilted_plate_w_m2_k(
    t_surface_k: f64,
    t_air_k: f64,
    tilt_rad: f64,
    length_m: f64,
    conductivity_w_m_k: f64,
    kinematic_viscosity_m2_s: f64,
    prandtl: f64,
) -> f64 {
    let tilt = if tilt_rad.is_finite() {
        tilt_rad.abs().min(85f64.to_radians())
    } else {
        0.0
    };
    let l = sane_positive(length_m, 1.0);
    let k = sane_positive(conductivity_w_m_k, 0.026);
    let nu = sane_positive(kinematic_viscosity_m2_s, 1.6e-5);
    let pr = sane_positive(prandtl, 0.71);
    let tf = (0.5 * (t_surface_k + t_air_k)).max(1.0);
    let dt = t_surface_k - t_air_k;
    let ra = GRAVITY_M_S2 * tilt.cos() * dt.abs() * l.powi(3) * pr / (tf * nu * nu);
    let nusselt = if dt > 0.0 {
        (0.54 * ra.powf(0.25)).max(0.15 * ra.cbrt())
    } else {
        0.27 * ra.powf(0.25)
    };
    nusselt * k / l
}

/// Combined free and forced convection by the cube sum [W m⁻² K⁻¹].
///
/// Churchill, S.W. (1977), "A comprehensive correlating equation for laminar, assisting,
/// forced and free convection", AIChE J. 23(1), 10–16; Incropera et al. (2007) eq. 9.56
/// with n = 3 (from memory): h = (h_forced³ + h_natural³)^(1/3).
///
/// * `h_forced_w_m2_k`, `h_natural_w_m2_k` [W m⁻² K⁻¹] (negative values count as 0)
pub fn combined_convection_w_m2_k(h_forced_w_m2_k: f64, h_natural_w_m2_k: f64) -> f64 {
    (h_forced_w_m2_k.max(0.0).powi(3) + h_natural_w_m2_k.max(0.0).powi(3)).cbrt()
}

/// Overall coefficient through conduction layers and an outer film [W m⁻² K⁻¹].
///
/// Series resistances (Duffie & Beckman 2013, §6.4, bottom loss): U = (Σ Lᵢ/kᵢ + 1/h)⁻¹.
///
/// * `layers` — (thickness \[m\], conductivity [W m⁻¹ K⁻¹]) from inside to outside
/// * `h_outer_w_m2_k` — outer film coefficient [W m⁻² K⁻¹]; `f64::INFINITY` for none
///
/// Returns `None` if a thickness is negative or not finite, a conductivity is not positive,
/// or the film coefficient is not positive.
pub fn conduction_layers_u_w_m2_k(layers: &[(f64, f64)], h_outer_w_m2_k: f64) -> Option<f64> {
    if h_outer_w_m2_k.is_nan() || h_outer_w_m2_k <= 0.0 {
        return None;
    }
    let mut r = 1.0 / h_outer_w_m2_k;
    for &(thickness_m, k_w_m_k) in layers {
        if !(thickness_m.is_finite() && thickness_m >= 0.0 && k_w_m_k.is_finite() && k_w_m_k > 0.0)
        {
            return None;
        }
        r += thickness_m / k_w_m_k;
    }
    if r > 0.0 { Some(1.0 / r) } else { None }
}
