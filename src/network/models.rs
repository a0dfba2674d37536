//! The small traits a link or a water node is computed through, and the simple built-in
//! models that implement them.
//!
//! The solver only ever asks a model for a flow and its derivatives with respect to the two
//! end temperatures, so a still variant can plug in any correlation from [`crate::physics`]
//! without the solver knowing which one it is.

use std::fmt::Debug;

use crate::physics::heat_transfer::{
    EnclosureAir, EnclosureTransfer, InternalCorrelation, enclosure_transfer,
};
use crate::physics::{seawater, water};

/// A heat flow between the two ends of a link and its partial derivatives.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct LinkFlow {
    /// Heat flow from end `a` to end `b` [W].
    pub q_w: f64,
    /// ∂q/∂T_a [W K⁻¹].
    pub dq_dta_w_k: f64,
    /// ∂q/∂T_b [W K⁻¹].
    pub dq_dtb_w_k: f64,
}

/// A conductance that depends on the temperatures of its two ends (free convection,
/// temperature-dependent conduction).
///
/// The model returns the heat flow itself, not a conductance, so that forms such as
/// q = c·|ΔT|^(4/3) keep a finite derivative at ΔT = 0.
pub trait ConductanceModel: Debug + Send + Sync {
    /// Heat flow from `a` to `b` at end temperatures `t_a_k`, `t_b_k` [K], with its
    /// derivatives. Must be finite for temperatures between 150 K and 500 K.
    fn heat_flow(&self, t_a_k: f64, t_b_k: f64) -> LinkFlow;
}

/// Free-convection-like conductance UA = `floor_w_k` + `coefficient_w_k` · (|ΔT|/1 K)^`exponent`,
/// so that q = UA·ΔT.
///
/// This is the shape of the classical simplified free-convection correlations
/// (h ∝ ΔT^(1/3) for turbulent, h ∝ ΔT^(1/4) for laminar flow; Incropera & DeWitt,
/// *Fundamentals of Heat and Mass Transfer*, 6th ed., §9.6, simplified correlations for air —
/// from memory). The floor keeps a conduction path at ΔT = 0.
///
/// * `floor_w_k` — conductance at ΔT = 0 [W K⁻¹], ≥ 0
/// * `coefficient_w_k` — conductance added at |ΔT| = 1 K [W K⁻¹], ≥ 0
/// * `exponent` — power of |ΔT| [-], 0 ≤ n ≤ 2
///
/// Notes: q = floor·ΔT + c·|ΔT|^n·ΔT has dq/dΔT = floor + c·(n+1)·|ΔT|^n, which is finite
/// and continuous at ΔT = 0 for every n ≥ 0.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct PowerLawConductance {
    /// Conductance at zero temperature difference [W K⁻¹].
    pub floor_w_k: f64,
    /// Conductance added at a 1 K difference [W K⁻¹].
    pub coefficient_w_k: f64,
    /// Exponent of |ΔT| [-].
    pub exponent: f64,
}

impl ConductanceModel for PowerLawConductance {
    fn heat_flow(&self, t_a_k: f64, t_b_k: f64) -> LinkFlow {
        let dt_k = t_a_k - t_b_k;
        let mag = dt_k.abs();
        let pow = if mag > 0.0 {
            mag.powf(self.exponent)
        } else {
            0.0
        };
        let q_w = (self.floor_w_k + self.coefficient_w_k * pow) * dt_k;
        let slope = self.floor_w_k + self.coefficient_w_k * (self.exponent + 1.0) * pow;
        LinkFlow {
            q_w,
            dq_dta_w_k: slope,
            dq_dtb_w_k: -slope,
        }
    }
}

/// Heat and evaporation fluxes across a humid enclosure, per unit of evaporating area, with
/// their total derivatives with respect to the two surface temperatures: the physics
/// module's [`EnclosureTransfer`], so that every internal correlation plugs in directly.
pub type EnclosureFlux = EnclosureTransfer;

/// The internal heat and mass transfer between an evaporating surface (brine, wick) and a
/// condensing surface (cover, stage plate).
///
/// The solver passes the vapour pressures and their slopes, so an implementation needs no
/// property routines of its own: `p_hot_pa` already includes the lowering by salinity.
pub trait EnclosureModel: Debug + Send + Sync {
    /// Fluxes at surface temperatures `t_hot_k`, `t_cold_k` [K] with vapour pressures
    /// `p_hot_pa`, `p_cold_pa` [Pa] and their temperature slopes [Pa K⁻¹].
    /// Must be finite for any pair of temperatures between 150 K and 500 K, including
    /// t_cold_k > t_hot_k.
    #[allow(clippy::too_many_arguments)]
    fn transfer(
        &self,
        t_hot_k: f64,
        t_cold_k: f64,
        p_hot_pa: f64,
        dp_hot_dt_pa_k: f64,
        p_cold_pa: f64,
        dp_cold_dt_pa_k: f64,
    ) -> EnclosureFlux;
}

/// Dunkle's ratio of evaporative to convective transfer, 16.273e−3 [K Pa⁻¹].
///
/// Dunkle (1961), ASME Int. Dev. Heat Transfer, Part V, 895–902: h_ew = 16.273e−3 · h_cw ·
/// (p_w − p_g)/(T_w − T_g) (from memory, as listed in REFERENCES.md §1).
pub const DUNKLE_LEWIS_FACTOR_K_PA: f64 = 16.273e-3;

/// Internal transfer with a fixed convective coefficient: q_c = h·(T_hot − T_cold) and
/// q_e = h · `lewis_factor_k_pa` · (p_hot − p_cold).
///
/// This is Dunkle's evaporative relation (h_ew·ΔT = 16.273e−3·h_cw·Δp, see
/// [`DUNKLE_LEWIS_FACTOR_K_PA`]) with h_cw held constant instead of following
/// Dunkle's cube-root law.
///
/// * `h_convective_w_m2_k` — convective coefficient [W m⁻² K⁻¹], > 0
/// * `lewis_factor_k_pa` — ratio q_e/(h·Δp) [K Pa⁻¹], ≥ 0
///
/// Notes: a linearisation, smooth everywhere, for tests and for quick estimates; the
/// evaporative flux is computed from Δp directly, never by dividing by ΔT.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct FixedCoefficientEnclosure {
    /// Convective coefficient [W m⁻² K⁻¹].
    pub h_convective_w_m2_k: f64,
    /// Evaporative-to-convective factor [K Pa⁻¹].
    pub lewis_factor_k_pa: f64,
}

impl EnclosureModel for FixedCoefficientEnclosure {
    fn transfer(
        &self,
        t_hot_k: f64,
        t_cold_k: f64,
        p_hot_pa: f64,
        dp_hot_dt_pa_k: f64,
        p_cold_pa: f64,
        dp_cold_dt_pa_k: f64,
    ) -> EnclosureFlux {
        let h = self.h_convective_w_m2_k;
        let he = h * self.lewis_factor_k_pa;
        EnclosureFlux {
            h_convective_w_m2_k: h,
            q_convective_w_m2: h * (t_hot_k - t_cold_k),
            q_evaporative_w_m2: he * (p_hot_pa - p_cold_pa),
            dq_convective_dt_hot: h,
            dq_convective_dt_cold: -h,
            dq_evaporative_dt_hot: he * dp_hot_dt_pa_k,
            dq_evaporative_dt_cold: -he * dp_cold_dt_pa_k,
        }
    }
}

/// Evaporation `potential_kg_s` capped smoothly at `cap_kg_s`, with its derivative with
/// respect to the potential: (E [kg s⁻¹], dE/d potential [-]).
///
/// E = a − φ(a − b), with a the potential, b the cap and φ a C¹ ramp of half-width w:
/// φ(x) = 0 for x ≤ −w, (x + w)²/(4w) for |x| < w, x for x ≥ w. Our own construction (a
/// quadratically smoothed min, no source). So E = a exactly below b − w, E = b exactly above
/// b + w, E ≤ b everywhere (the largest shortfall is w/4, at a = b), and E and dE/da are
/// continuous — there is no kink for Newton to chatter on.
///
/// * `potential_kg_s` — what the surface would evaporate if fully wet [kg s⁻¹]
/// * `cap_kg_s` — the supply b [kg s⁻¹], ≥ 0
/// * `width_kg_s` — the half-width w of the smoothing [kg s⁻¹], > 0
///
/// *Notes*: the cap and the width are constants of a step, so only dE/da enters the
/// Jacobian. A width of zero or less gives the hard minimum.
pub fn supply_cap(potential_kg_s: f64, cap_kg_s: f64, width_kg_s: f64) -> (f64, f64) {
    let x = potential_kg_s - cap_kg_s;
    let w = width_kg_s;
    if x <= -w {
        (potential_kg_s, 1.0)
    } else if x >= w {
        (cap_kg_s, 0.0)
    } else {
        let phi = (x + w) * (x + w) / (4.0 * w);
        let dphi = (x + w) / (2.0 * w);
        (potential_kg_s - phi, 1.0 - dphi)
    }
}

/// Water and brine properties used by the network's mass-carrying nodes and links.
///
/// The same functions are used by the solver and by the energy balance, so the balance
/// closes whatever property set is chosen; the accuracy of the prediction depends on it.
pub trait WaterProperties: Debug + Send + Sync {
    /// Saturation vapour pressure over pure water [Pa] at `t_k` [K].
    fn saturation_pressure_pa(&self, t_k: f64) -> f64;
    /// d p_sat / dT [Pa K⁻¹] at `t_k` [K].
    fn saturation_pressure_derivative_pa_k(&self, t_k: f64) -> f64;
    /// Both of the above at once, (p [Pa], dp/dT [Pa K⁻¹]); override where one evaluation
    /// gives both more cheaply.
    fn saturation_pressure_with_derivative(&self, t_k: f64) -> (f64, f64) {
        (
            self.saturation_pressure_pa(t_k),
            self.saturation_pressure_derivative_pa_k(t_k),
        )
    }
    /// Vapour pressure over brine ÷ over pure water at the same temperature [-], salinity
    /// `salinity_g_kg` [g kg⁻¹].
    fn vapour_pressure_ratio(&self, salinity_g_kg: f64) -> f64;
    /// Specific enthalpy of liquid water [J kg⁻¹] at `t_k` [K].
    fn liquid_enthalpy_j_kg(&self, t_k: f64) -> f64;
    /// d h_f / dT = c_p of the liquid [J kg⁻¹ K⁻¹] at `t_k` [K].
    fn liquid_heat_capacity_j_kg_k(&self, t_k: f64) -> f64;
    /// Latent heat of vaporisation h_fg per kg of vapour [J kg⁻¹] at `t_k` [K].
    fn latent_heat_j_kg(&self, t_k: f64) -> f64;
    /// d h_fg / dT [J kg⁻¹ K⁻¹] at `t_k` [K].
    fn latent_heat_derivative_j_kg_k(&self, t_k: f64) -> f64;
    /// Specific enthalpy of saturated vapour h_g = h_f + h_fg [J kg⁻¹] at `t_k` [K].
    fn vapour_enthalpy_j_kg(&self, t_k: f64) -> f64 {
        self.liquid_enthalpy_j_kg(t_k) + self.latent_heat_j_kg(t_k)
    }
}

/// A compact property set for the network: Malik–Tiwari saturation pressure, Nayar's
/// seawater lowering, constant liquid heat capacity and a latent heat linear in temperature.
///
/// * liquid: h_f = `cp_liquid_j_kg_k` · (T − 273.16 K), the triple point as zero
///   (IAPWS convention)
/// * vapour-pressure lowering: Nayar's ratio, with the salinity capped at
///   [`SALT_SATURATION_G_KG`]
/// * latent heat: h_fg = 2.501e6 − 2370·(T − 273.15 K) J kg⁻¹ (a common linear fit, from
///   memory; 50 °C → 2.3825 MJ kg⁻¹ against 2.38195 MJ kg⁻¹ from IAPWS-95, REFERENCES.md §5)
///
/// Notes: brine enthalpy is taken as that of pure water (seawater's c_p is a few per cent
/// lower); the energy balance still closes because the solver and the balance share these
/// functions. For predictions use [`SeawaterProperties`] (the network's default); this set
/// is for quick hand checks, since every value can be worked out on paper.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct SimpleWater {
    /// Liquid specific heat [J kg⁻¹ K⁻¹].
    pub cp_liquid_j_kg_k: f64,
}

impl Default for SimpleWater {
    /// c_p = 4180 J kg⁻¹ K⁻¹, liquid water near 30–50 °C (common practice, no source).
    fn default() -> Self {
        SimpleWater {
            cp_liquid_j_kg_k: 4180.0,
        }
    }
}

/// Salinity at which salt starts to crystallise [g kg⁻¹]: NaCl saturates near 26.4 wt %
/// (REFERENCES.md §8, from memory). Beyond it the brine stays saturated and the extra salt
/// is a crust, so the vapour-pressure lowering stops growing.
pub const SALT_SATURATION_G_KG: f64 = 264.0;

/// Triple point of water [K], the zero of liquid enthalpy (IAPWS convention).
const TRIPLE_POINT_K: f64 = 273.16;

impl WaterProperties for SimpleWater {
    fn saturation_pressure_pa(&self, t_k: f64) -> f64 {
        crate::physics::water::saturation_pressure_tiwari_pa(t_k)
    }
    fn saturation_pressure_derivative_pa_k(&self, t_k: f64) -> f64 {
        crate::physics::water::saturation_pressure_tiwari_derivative_pa_k(t_k)
    }
    fn vapour_pressure_ratio(&self, salinity_g_kg: f64) -> f64 {
        crate::physics::seawater::vapour_pressure_ratio(
            salinity_g_kg.clamp(0.0, SALT_SATURATION_G_KG),
        )
    }
    fn liquid_enthalpy_j_kg(&self, t_k: f64) -> f64 {
        self.cp_liquid_j_kg_k * (t_k - TRIPLE_POINT_K)
    }
    fn liquid_heat_capacity_j_kg_k(&self, _t_k: f64) -> f64 {
        self.cp_liquid_j_kg_k
    }
    fn latent_heat_j_kg(&self, t_k: f64) -> f64 {
        2.501e6 - 2370.0 * (t_k - 273.15)
    }
    fn latent_heat_derivative_j_kg_k(&self, _t_k: f64) -> f64 {
        -2370.0
    }
}

/// The network's default property set, from [`crate::physics`]: IAPWS-IF97 saturation
/// pressure and its analytic slope ([`water::saturation_pressure_pa`]), Sharqawy et al.'s
/// latent heat and liquid enthalpy ([`water::latent_heat_j_kg`],
/// [`water::liquid_enthalpy_j_kg`], with c_p its exact derivative), and Nayar et al.'s
/// vapour-pressure lowering ([`seawater::vapour_pressure_ratio`]).
///
/// Notes: the salinity given to the lowering is capped at [`SALT_SATURATION_G_KG`] (salt
/// beyond it crystallises); Nayar's fit is stated to 120 g/kg, so 120–264 g/kg is an
/// extrapolation. The latent heat is the pure-water value: the per-kilogram-of-vapour
/// correction for salinity is at most 0.1 % at 120 g/kg
/// ([`seawater::latent_heat_per_kg_vapour_j_kg`]). The brine's enthalpy is that of pure water
/// at the same temperature.
#[derive(Debug, Clone, Copy, Default, PartialEq)]
pub struct SeawaterProperties;

impl WaterProperties for SeawaterProperties {
    fn saturation_pressure_pa(&self, t_k: f64) -> f64 {
        water::saturation_pressure_pa(t_k)
    }
    fn saturation_pressure_derivative_pa_k(&self, t_k: f64) -> f64 {
        water::saturation_pressure_derivative_pa_k(t_k)
    }
    fn saturation_pressure_with_derivative(&self, t_k: f64) -> (f64, f64) {
        water::saturation_pressure_with_derivative(t_k)
    }
    fn vapour_pressure_ratio(&self, salinity_g_kg: f64) -> f64 {
        seawater::vapour_pressure_ratio(salinity_g_kg.clamp(0.0, SALT_SATURATION_G_KG))
    }
    fn liquid_enthalpy_j_kg(&self, t_k: f64) -> f64 {
        water::liquid_enthalpy_j_kg(t_k)
    }
    fn liquid_heat_capacity_j_kg_k(&self, t_k: f64) -> f64 {
        water::liquid_specific_heat_j_kg_k(t_k)
    }
    fn latent_heat_j_kg(&self, t_k: f64) -> f64 {
        water::latent_heat_j_kg(t_k)
    }
    fn latent_heat_derivative_j_kg_k(&self, t_k: f64) -> f64 {
        water::latent_heat_derivative_j_kg_k(t_k)
    }
}

/// Internal transfer by one of the published correlations of
/// [`crate::physics::heat_transfer::enclosure_transfer`] (Dunkle, Kumar–Tiwari, inclined
/// enclosure), with the enclosure's air properties and geometry held fixed.
///
/// Notes: the air properties are fixed for the life of the network (as the correlation
/// expects them fixed within a Newton iteration); a variant that wants them to follow the
/// weather builds its network with values for the season.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct CorrelationEnclosure {
    /// Which correlation.
    pub correlation: InternalCorrelation,
    /// Air properties and characteristic length.
    pub air: EnclosureAir,
}

impl EnclosureModel for CorrelationEnclosure {
    fn transfer(
        &self,
        t_hot_k: f64,
        t_cold_k: f64,
        p_hot_pa: f64,
        dp_hot_dt_pa_k: f64,
        p_cold_pa: f64,
        dp_cold_dt_pa_k: f64,
    ) -> EnclosureFlux {
        enclosure_transfer(
            &self.correlation,
            t_hot_k,
            t_cold_k,
            p_hot_pa,
            dp_hot_dt_pa_k,
            p_cold_pa,
            dp_cold_dt_pa_k,
            &self.air,
        )
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn latent_heat_fit_against_iapws95() {
        // REFERENCES.md §5 [C] (IAPWS-95 via CoolProp): 50 °C → 2381.95 kJ/kg, 25 °C → 2441.68.
        // A linear fit; 0.1 % is its stated accuracy over 20–60 °C.
        let w = SimpleWater::default();
        for (t_c, h_kj) in [(50.0, 2381.95), (25.0, 2441.68)] {
            let h = w.latent_heat_j_kg(273.15 + t_c) / 1e3;
            assert!((h / h_kj - 1.0).abs() < 1e-3, "{t_c} °C: {h}");
        }
    }

    #[test]
    fn supply_cap_is_smooth_and_never_above_the_cap() {
        // Our own construction: exact outside the band, at most w/4 below the smaller of the
        // two inside it, derivative equal to a difference quotient (1e-6, round-off of the
        // quotient).
        let (b, w) = (2.0, 0.2);
        assert!((supply_cap(1.0, b, w).0 - 1.0).abs() < 1e-15);
        assert!((supply_cap(3.0, b, w).0 - b).abs() < 1e-15);
        assert!((supply_cap(b, b, w).0 - (b - w / 4.0)).abs() < 1e-12);
        for i in 0..=400 {
            let a = 1.5 + f64::from(i) * 0.0025;
            let (e, de) = supply_cap(a, b, w);
            assert!(e <= b + 1e-15 && e <= a + 1e-15 && e >= a.min(b) - w / 4.0 - 1e-12);
            let h = 1e-6;
            let fd = (supply_cap(a + h, b, w).0 - supply_cap(a - h, b, w).0) / (2.0 * h);
            assert!((de - fd).abs() < 1e-6, "{a}: {de} vs {fd}");
        }
    }

    #[test]
    fn power_law_slope_matches_difference_quotient() {
        let m = PowerLawConductance {
            floor_w_k: 0.5,
            coefficient_w_k: 2.0,
            exponent: 1.0 / 3.0,
        };
        // At ΔT = 0 the slope is the floor alone (|ΔT|^(4/3) has zero slope there).
        let at_zero = m.heat_flow(300.0, 300.0);
        assert!((at_zero.dq_dta_w_k - 0.5).abs() < 1e-12);
        for (ta, tb) in [(310.0, 300.0), (300.2, 300.0), (295.0, 300.5)] {
            let f = m.heat_flow(ta, tb);
            let h = 1e-5;
            let fd = (m.heat_flow(ta + h, tb).q_w - m.heat_flow(ta - h, tb).q_w) / (2.0 * h);
            assert!((f.dq_dta_w_k - fd).abs() < 1e-4 * (1.0 + fd.abs()));
            assert!((f.dq_dta_w_k + f.dq_dtb_w_k).abs() < 1e-12);
        }
    }
}
