//! The multi-effect diffusion still with latent-heat recovery as a thermal network. No
//! solver code here: this module only turns a design into nodes, links and hourly inputs
//! for [`crate::network`].
//!
//! A glazed absorber heats the first stage. Each stage is a wetted wick on a plate facing a
//! condensing plate across a narrow air gap: vapour crosses the gap by Stefan diffusion
//! ([`DiffusionGap`]), with conduction through the air and long-wave radiation in parallel,
//! and the spacers bridge the gap. Each condensing plate heats the next stage's wick; the
//! last plate rejects heat to the sink the design sets (air through fins, or a water body
//! the still floats on). Each stage wick is fed at the feed temperature and its run-off
//! drains warm ([`super::wick::run_off_kg_s`]). A stage wick is a fed wick
//! ([`NetworkBuilder::fed_wick_node`]): when its evaporation would outrun its feed, the
//! network caps the evaporation smoothly at the supply ([`crate::network::supply_cap`]) and
//! the cloth sits partly dry, rather than drying out and re-wetting step after step (which
//! once cost ~270 solver steps per clear hour in a stochastic year); the share of hours each
//! stage was dry is reported. The edges of every stage lose heat through
//! the side insulation and frame; the absorber loses heat through the glazing.
//!
//! Node order: glazing, absorber, then wick and plate of stage 1, 2, …, N. Every link joins
//! neighbours in that order, so the network's Jacobian is tridiagonal
//! ([`Network::bandwidth`] = 1) and the banded elimination keeps ten stages cheap.
//!
//! What the sink does. The stack passes the heat the losses leave down to the sink, so the
//! last plate sits q/h_sink above the sink temperature. Under one sun a 10-stage stack of
//! 0.25 m delivers only ≈ 190–240 W m⁻² to the sink (the glazing and the edges take most of
//! the ≈ 800 absorbed). A water body (200 W m⁻² K⁻¹) holds the last plate within ≈ 1 K; an
//! air sink is computed from its geometry and the stack's tilt ([`AirSink`]): heated air
//! leaves either up the slope (along fin channels that run up it, buoyancy g·sin β) or, near
//! level, by spilling from under the plate over its edges, where fins closed at the top by
//! the plate add almost nothing. ≈ 3 W m⁻² K⁻¹ level, fins or not; ≈ 17 for the default
//! fins under a 0.25 m stack tilted 30° and ≈ 11 under the demo's 0.5 m stack at 15°. The
//! stack does not ride up rigidly: a diffusion gap passes latent heat in proportion to the
//! slope of the saturation pressure, which roughly doubles every 12 K, so the coldest stages
//! hold most of the stack's resistance, and the absorber rises by a fraction of the last
//! plate's rise. For the steady Chiavazzo-like stack: level, any air
//! sink lets the last plate rise ≈ 22 K and the edge, frame, glazing and warm-drain losses
//! take ≈ 20 % of the distillate; tilted 30°, fins rise ≈ 12 K and cost ≈ 6 % (a plain plate
//! still ≈ 19 %). The tilt, not the fins alone, makes an air sink work. The run's figures go
//! into the result ([`KindDetails::MultiEffect`]: sink heat, day-mean rise, absorber and
//! last-plate peaks and a note in words).

use super::materials::Materials;
use std::sync::Arc;

use super::single_slope::{cover_outside_coefficient_w_m2_k, net_error, sky_temperature_k};
use super::sunlight::{FlatOptics, SunlightSplit};
use super::wick::{
    COVER_HEIGHT_M, RUN_OFF_SUN_SHARE, WICK_CONTACT_W_M2_K, WICK_DRY_SHARE,
    evaporation_estimate_kg_s, run_off_kg_s,
};
use super::{HourContext, KindDetails, RunTotals, StillModel};
use crate::climate::Plane;
use crate::design::{Library, MultiEffect, Sink, Variant};
use crate::error::Error;
use crate::network::{
    BoundaryId, EnclosureFlux, EnclosureModel, Inputs, LinkId, LossPath, Network, NetworkBuilder,
    NetworkError, NodeId, State,
};
use crate::physics::constants::{
    GAS_CONSTANT_J_MOL_K, GRAVITY_M_S2, MOLAR_MASS_AIR_KG_MOL, STEFAN_BOLTZMANN_W_M2_K4,
    ZERO_CELSIUS_K,
};
use crate::physics::heat_transfer::{
    conduction_layers_u_w_m2_k, hollands_nusselt, stefan_diffusion_flux_kg_m2_s,
};
use crate::physics::optics::effective_emissivity_parallel;
use crate::physics::{humid_air, water};

/// Exponent of temperature in Marrero & Mason's vapour diffusivity, D ∝ T^2.072
/// ([`humid_air::vapour_diffusivity_m2_s`], from memory).
pub const DIFFUSIVITY_TEMPERATURE_EXPONENT: f64 = 2.072;
/// Reference temperature of [`diffusivity_temperature_factor`] \[K\].
const DIFFUSIVITY_REFERENCE_K: f64 = 330.0;
/// 330^2.072 (Python's `330.0 ** 2.072`; the test holds it to `powf` within 1e-15).
const DIFFUSIVITY_REFERENCE_FACTOR: f64 = 165_333.509_083_298_27;

/// T^2.072, the temperature factor of Marrero & Mason's vapour diffusivity
/// ([`DIFFUSIVITY_TEMPERATURE_EXPONENT`]), evaluated without a general power: the solver
/// calls it for every stage gap in every Newton iteration, where `powf` (a logarithm and an
/// exponential) took about a twentieth of a 10-stage step's instructions.
///
/// With x = T/T₀ (T₀ = 330 K): T^2.072 = T₀^2.072 · x² · exp(0.072 ln x), where
/// ln x = 2 atanh s, s = (x − 1)/(x + 1), by its odd series to s¹¹ (Abramowitz & Stegun
/// 4.1.27), and exp by its Taylor series to the 6th power. Relative error below 1e-12 for
/// 250–450 K and below 1e-7 over the network's whole range, 150–500 K (tested against
/// `powf`); far below the correlation's own uncertainty.
pub fn diffusivity_temperature_factor(t_k: f64) -> f64 {
    let x = t_k / DIFFUSIVITY_REFERENCE_K;
    let s = (x - 1.0) / (x + 1.0);
    let s2 = s * s;
    let ln_x = 2.0
        * s
        * (1.0 + s2 * (1.0 / 3.0 + s2 * (0.2 + s2 * (1.0 / 7.0 + s2 * (1.0 / 9.0 + s2 / 11.0)))));
    let y = (DIFFUSIVITY_TEMPERATURE_EXPONENT - 2.0) * ln_x;
    let exp_y = 1.0
        + y * (1.0
            + y * (0.5 + y * (1.0 / 6.0 + y * (1.0 / 24.0 + y * (1.0 / 120.0 + y / 720.0)))));
    DIFFUSIVITY_REFERENCE_FACTOR * x * x * exp_y
}

/// Share of a stage's area taken by spacers bridging the gap [-] (common practice, no
/// source).
pub const SPACER_AREA_SHARE: f64 = 0.02;
/// Conductivity of the spacers [W m⁻¹ K⁻¹]: a plastic such as polypropylene ≈ 0.2
/// (Incropera et al. Table A.3 order of magnitude, from memory).
pub const SPACER_CONDUCTIVITY_W_M_K: f64 = 0.2;
/// Thermal bridge of the frame around each stage, per metre of perimeter [W m⁻¹ K⁻¹]
/// (common practice, no source: a timber or plastic frame a few cm deep).
pub const FRAME_BRIDGE_W_M_K: f64 = 0.05;
/// Outside film on the edges of the stack [W m⁻² K⁻¹] (common practice, no source).
pub const EDGE_FILM_W_M2_K: f64 = 10.0;
/// Volumetric heat capacity of a metal plate [J m⁻³ K⁻¹]: aluminium ≈ 2700 × 900 = 2.4e6,
/// steel ≈ 3.9e6; the lower is taken (common practice, no source).
pub const PLATE_VOLUMETRIC_HEAT_J_M3_K: f64 = 2.4e6;

/// Temperature difference below which the air sink's convection is evaluated as at this
/// difference \[K\]: keeps the lagged coefficient finite and positive at dawn, when the plate
/// is as warm as the air (our own choice, no source).
pub const SINK_MIN_DIFFERENCE_K: f64 = 1.0;
/// Rating point at which an air sink's coefficient is quoted in the result: the plate
/// 10 K above air at 30 °C (our own choice, no source).
pub const SINK_RATING_AIR_K: f64 = ZERO_CELSIUS_K + 30.0;
/// See [`SINK_RATING_AIR_K`] \[K\].
pub const SINK_RATING_DIFFERENCE_K: f64 = 10.0;

/// Nusselt number of a hot plate facing down (or a cold plate facing up) in free
/// convection, Nu_L = 0.27 Ra_L^¼.
///
/// Incropera, DeWitt, Bergman & Lavine, *Fundamentals of Heat and Mass Transfer*, 6th ed.,
/// eq. 9.32 (from memory), with L = A/P (eq. 9.29).
///
/// * `rayleigh` — Ra_L = gβΔT L³/(να) [-], with g·cos β for a plate tilted β from level
///
/// Validity: 10⁵ ≲ Ra_L ≲ 10¹⁰. *Notes*: applied outside that range too (a 0.25 m plate a
/// few kelvin above the air sits near 10⁵).
pub fn downward_plate_nusselt(rayleigh: f64) -> f64 {
    0.27 * rayleigh.max(0.0).powf(0.25)
}

/// Nusselt number of the underside of a hot plate tilted from the vertical, laminar,
/// Nu_L = 0.59 Ra_L^¼ with Ra_L on the buoyancy along the plate.
///
/// Incropera et al., 6th ed., eq. 9.24 with Table 9.1 (C = 0.59, n = ¼, 10⁴ ≲ Ra_L ≲ 10⁹),
/// and §9.6.2: for the lower surface of a heated plate tilted θ from the vertical, g is
/// replaced by g·cos θ (from memory). It is the isolated-plate limit of
/// [`vertical_channel_nusselt`] (1/√2.873 = 0.590), so a plain plate and wide fins agree.
///
/// * `rayleigh_along` — Ra_L = g cos θ βΔT L³/(να) with L the plate's length along the
///   slope [-]
///
/// Validity: θ up to ≈ 60° from the vertical (30° from level); closer to level the
/// flow separates and [`downward_plate_nusselt`] takes over (see [`AirSink::coefficient`]).
pub fn inclined_plate_nusselt(rayleigh_along: f64) -> f64 {
    0.59 * rayleigh_along.max(0.0).powf(0.25)
}

/// Nusselt number on the spacing of a channel between vertical isothermal parallel plates
/// (fins), Nu_S = [576/(Ra_S S/L)² + 2.873/(Ra_S S/L)^½]^(−½).
///
/// Bar-Cohen & Rohsenow (1984), as given by Incropera et al., 6th ed., eq. 9.45 with
/// Table 9.3, symmetric isothermal plates (from memory). The first term is Elenbaas's
/// fully developed limit Nu_S = Ra_S (S/L)/24; the second the isolated plate,
/// Nu_L = 0.59 Ra_L^¼.
///
/// * `rayleigh_spacing` — Ra_S = gβΔT S³/(να) [-], g along the channel
/// * `spacing_m` — clear spacing S \[m\]; `height_m` — channel length along the flow L \[m\]
///
/// Validity: laminar channels, Ra_S S/L up to ≈ 10⁵.
pub fn vertical_channel_nusselt(rayleigh_spacing: f64, spacing_m: f64, height_m: f64) -> f64 {
    let x = rayleigh_spacing.max(0.0) * spacing_m / height_m.max(1e-6);
    if x <= 0.0 {
        return 0.0;
    }
    (576.0 / (x * x) + 2.873 / x.sqrt()).powf(-0.5)
}

/// Fin spacing that sheds the most heat from a given base between isothermal plates,
/// S_opt = 2.71 (Ra_S/(S³ L))^(−¼) \[m\].
///
/// Bar-Cohen & Rohsenow (1984), Incropera et al., 6th ed., eq. 9.47 (from memory).
///
/// * `rayleigh_per_m3` — Ra_S/S³ = g βΔT/(να) [m⁻³], g along the channel
/// * `length_m` — channel length along the flow L \[m\]
///
/// Returns `None` without buoyancy along the channel (a level plate).
pub fn optimum_fin_spacing_m(rayleigh_per_m3: f64, length_m: f64) -> Option<f64> {
    let r = rayleigh_per_m3 / length_m.max(1e-6);
    (r.is_finite() && r > 0.0).then(|| 2.71 * r.powf(-0.25))
}

/// Efficiency of a straight rectangular fin with an adiabatic tip at the corrected length
/// L_c = L + t/2: η_f = tanh(m L_c)/(m L_c), m = (2h/(k t))^½.
///
/// Incropera et al., 6th ed., eqs. 3.89 and 3.86, Table 3.5 (from memory).
///
/// * `h_w_m2_k` — convective coefficient on the fin [W m⁻² K⁻¹]
/// * `conductivity_w_m_k` — fin conductivity k [W m⁻¹ K⁻¹]
/// * `thickness_m` — fin thickness t \[m\]; `height_m` — fin height L \[m\]
///
/// *Notes*: m = (2h/(kt))^½ takes the fin as much longer than thick (w ≫ t).
pub fn straight_fin_efficiency(
    h_w_m2_k: f64,
    conductivity_w_m_k: f64,
    thickness_m: f64,
    height_m: f64,
) -> f64 {
    let lc = height_m + 0.5 * thickness_m;
    let m = (2.0 * h_w_m2_k.max(0.0) / (conductivity_w_m_k * thickness_m).max(1e-12)).sqrt();
    let x = m * lc;
    if x < 1e-6 { 1.0 } else { x.tanh() / x }
}

/// An air-cooled sink under the last plate of a stack tilted β from level: straight fins
/// (or a plain plate) of the plate's metal, in still air. The fins run up the slope, so the
/// channels between them open at the low and high edges of the plate.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct AirSink {
    /// Fin height \[m\] (0: a plain plate).
    pub fin_height_m: f64,
    /// Clear spacing between fins \[m\].
    pub fin_spacing_m: f64,
    /// Fin thickness \[m\].
    pub fin_thickness_m: f64,
    /// Fin conductivity [W m⁻¹ K⁻¹].
    pub conductivity_w_m_k: f64,
    /// Long-wave emissivity of the sink [-].
    pub emissivity: f64,
    /// Characteristic length of the plate, area ÷ perimeter \[m\].
    pub plate_length_m: f64,
    /// Length of the plate up the slope, which is the length of the channels \[m\].
    pub slope_length_m: f64,
    /// Tilt of the plate from level β \[rad\], [0, π/2).
    pub tilt_rad: f64,
    /// Multiplies the free convection computed from the geometry [-] (1: as computed).
    pub convection_factor: f64,
}

/// Which way an air sink sheds its heat (the larger of the two; see
/// [`AirSink::coefficient`]).
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum SinkFlow {
    /// Heated air rises up the slope along the plate (or the fin channels).
    AlongSlope,
    /// Heated air spills from under a (nearly) level plate over its edges.
    UnderLevelPlate,
}

/// An air sink's coefficient per m² of plate, split into its parts.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct AirSinkCoefficient {
    /// Convection from fins and exposed plate, per m² of plate [W m⁻² K⁻¹].
    pub convective_w_m2_k: f64,
    /// Long-wave radiation to surroundings at the air temperature, per m² of plate
    /// [W m⁻² K⁻¹].
    pub radiative_w_m2_k: f64,
    /// Fin efficiency in the flow up the slope [-] (1 for a plain plate).
    pub fin_efficiency: f64,
    /// The flow that governs [`Self::convective_w_m2_k`].
    pub flow: SinkFlow,
    /// Fin spacing that would shed the most heat up this slope at this temperature
    /// difference \[m\] (`None` for a level plate).
    pub best_spacing_m: Option<f64>,
}

impl AirSinkCoefficient {
    /// Total coefficient per m² of plate [W m⁻² K⁻¹].
    pub fn total_w_m2_k(&self) -> f64 {
        self.convective_w_m2_k + self.radiative_w_m2_k
    }
}

impl AirSink {
    /// Coefficient from the last plate at `t_plate_k` to still air at `t_air_k` \[K\] and
    /// total pressure `pressure_pa` \[Pa\], per m² of plate.
    ///
    /// Two flows can carry the heat away, and the larger is taken:
    /// * **Up the slope**, driven by the buoyancy along the plate, g·sin β. A plain plate is
    ///   the underside of a heated inclined plate ([`inclined_plate_nusselt`] on the slope
    ///   length); fins are parallel-plate channels as long as the slope
    ///   ([`vertical_channel_nusselt`] with g·sin β), at [`straight_fin_efficiency`], the
    ///   exposed plate between them at the channel coefficient (overall surface efficiency,
    ///   Incropera eqs. 3.102–3.103, from memory). Replacing g by its component along the
    ///   channels is what Mehrtash & Tari (2013), *Appl. Therm. Eng.* 51:1067–1075, found to
    ///   hold for plate-fin sinks tilted from the vertical, facing down up to 60° from it
    ///   (β ≥ 30°; their abstract gives −60° to +80°, and that −60° is the face-down side
    ///   is our reading); nearer level it is extrapolated.
    /// * **Under a level plate**, driven by the buoyancy across it, g·cos β: the heated air
    ///   collects under the plate and spills over its edges ([`downward_plate_nusselt`] on
    ///   L = A/P of the plan). For fins this counts only the plan of the array, not the fin
    ///   surface: with the plate closing the channels' tops, the air between the fins must
    ///   leave sideways along them. Dayan et al. (2004), *Int. J. Heat Mass Transfer*
    ///   47:2849–2860, measured and modelled such downward-facing arrays and size fin
    ///   heights for the cooling they add (from their abstract; their correlation is not
    ///   used here), so crediting the fins nothing errs on the safe side.
    ///
    /// So fins help in proportion to the tilt: level, they add almost nothing over a plain
    /// plate; tilted, a long channel chokes unless the spacing suits its length (see
    /// [`optimum_fin_spacing_m`], quoted as [`AirSinkCoefficient::best_spacing_m`]).
    ///
    /// Radiation: ε σ (T_p² + T_a²)(T_p + T_a) from the plate's plan area to surroundings at
    /// the air temperature (the ground under the still, or the sky seen past it); the fin
    /// channels mostly see each other. Air properties at the film temperature (dry air, ideal
    /// gas). The difference is taken as at least [`SINK_MIN_DIFFERENCE_K`].
    pub fn coefficient(
        &self,
        t_plate_k: f64,
        t_air_k: f64,
        pressure_pa: f64,
    ) -> AirSinkCoefficient {
        let dt = (t_plate_k - t_air_k).abs().max(SINK_MIN_DIFFERENCE_K);
        let t_film = (0.5 * (t_plate_k + t_air_k)).clamp(200.0, 500.0);
        let k = humid_air::dry_air_thermal_conductivity_w_m_k(t_film);
        let mu = humid_air::dry_air_viscosity_pa_s(t_film);
        let rho = pressure_pa * MOLAR_MASS_AIR_KG_MOL / (GAS_CONSTANT_J_MOL_K * t_film);
        let nu = mu / rho;
        let alpha = k / (rho * humid_air::DRY_AIR_SPECIFIC_HEAT_J_KG_K);
        let tilt = self.tilt_rad.clamp(0.0, std::f64::consts::FRAC_PI_2);
        // Ra/L³ for the buoyancy along the slope and across the plate [m⁻³].
        let ra_per_m3 = GRAVITY_M_S2 * dt / t_film / (nu * alpha);
        let (along, across) = (ra_per_m3 * tilt.sin(), ra_per_m3 * tilt.cos());
        let plan = self.plate_length_m.max(1e-3);
        let level = downward_plate_nusselt(across * plan.powi(3)) * k / plan;
        let slope = self.slope_length_m.max(1e-3);
        let (up_slope, eta) = if self.fin_height_m <= 0.0 {
            (
                inclined_plate_nusselt(along * slope.powi(3)) * k / slope,
                1.0,
            )
        } else {
            let s = self.fin_spacing_m.max(1e-4);
            let t = self.fin_thickness_m;
            let h = vertical_channel_nusselt(along * s.powi(3), s, slope) * k / s;
            let eta = straight_fin_efficiency(h, self.conductivity_w_m_k, t, self.fin_height_m);
            let per_m = 1.0 / (s + t);
            let fin_area = 2.0 * (self.fin_height_m + 0.5 * t) * per_m;
            let base_area = (1.0 - t * per_m).max(0.0);
            (h * (base_area + eta * fin_area), eta)
        };
        let (convective, flow) = if up_slope >= level {
            (up_slope, SinkFlow::AlongSlope)
        } else {
            (level, SinkFlow::UnderLevelPlate)
        };
        let convective = convective * self.convection_factor;
        let (tp, ta) = (t_plate_k, t_air_k);
        let radiative =
            self.emissivity * STEFAN_BOLTZMANN_W_M2_K4 * (tp * tp + ta * ta) * (tp + ta);
        AirSinkCoefficient {
            convective_w_m2_k: convective,
            radiative_w_m2_k: radiative,
            fin_efficiency: eta,
            flow,
            best_spacing_m: optimum_fin_spacing_m(along, slope),
        }
    }
}

/// Heat and vapour transfer across a multi-effect stage's air gap: Stefan diffusion of the
/// vapour (latent heat carried) with conduction through the air in parallel.
///
/// Mass flux: [`stefan_diffusion_flux_kg_m2_s`] (Bird, Stewart & Lightfoot §18.2) with the
/// diffusivity of Marrero & Mason ([`humid_air::vapour_diffusivity_m2_s`]) at the mean gap
/// temperature T̄. The latent flux is ṁ·h_fg(T_hot) ([`water::latent_heat_j_kg`]);
/// conduction is k_air/δ·(T_hot − T_cold) (REFERENCES.md §7, from memory). Radiation is a
/// separate link.
///
/// * `gap_m` — gap width δ \[m\]; `total_pressure_pa` — P \[Pa\]
/// * `conductivity_w_m_k` — conductivity across the gap [W m⁻¹ K⁻¹], held fixed: the
///   humid air's k_air, plus the spacers' conductivity times their share of the area where
///   the still's spacers bridge the gap
///
/// *Notes*: the derivative of D with T̄ (D ∝ T̄^2.072) is added to the Stefan derivatives,
/// which hold D fixed. The gap is narrow enough that the air is still (Rayleigh number below
/// Hollands' onset of convection at 1708 for δ of a few mm and ΔT of a few K); the vapour
/// carries its sensible heat across at the same rate as conduction would be negligible and
/// is left out.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct DiffusionGap {
    /// Gap width δ \[m\].
    pub gap_m: f64,
    /// Total pressure P \[Pa\].
    pub total_pressure_pa: f64,
    /// Conductivity across the gap: air, plus area-weighted spacers [W m⁻¹ K⁻¹].
    pub conductivity_w_m_k: f64,
}

impl EnclosureModel for DiffusionGap {
    fn transfer(
        &self,
        t_hot_k: f64,
        t_cold_k: f64,
        p_hot_pa: f64,
        dp_hot_dt_pa_k: f64,
        p_cold_pa: f64,
        dp_cold_dt_pa_k: f64,
    ) -> EnclosureFlux {
        let tm = (0.5 * (t_hot_k + t_cold_k)).max(1.0);
        // Marrero & Mason's D = D(1 K)·T̄^2.072 ([`humid_air::vapour_diffusivity_m2_s`]), the
        // power by [`diffusivity_temperature_factor`] (the solver's innermost loop).
        let d = humid_air::vapour_diffusivity_m2_s(1.0, self.total_pressure_pa)
            * diffusivity_temperature_factor(tm);
        let f = stefan_diffusion_flux_kg_m2_s(
            t_hot_k,
            t_cold_k,
            p_hot_pa,
            dp_hot_dt_pa_k,
            p_cold_pa,
            dp_cold_dt_pa_k,
            self.gap_m,
            self.total_pressure_pa,
            d,
        );
        let m = f.mass_flux_kg_m2_s;
        let dd = 0.5 * m * DIFFUSIVITY_TEMPERATURE_EXPONENT / tm;
        let dm_hot = f.dflux_dt_hot_kg_m2_s_k + dd;
        let dm_cold = f.dflux_dt_cold_kg_m2_s_k + dd;
        let hfg = water::latent_heat_j_kg(t_hot_k);
        let dhfg = water::latent_heat_derivative_j_kg_k(t_hot_k);
        let h = self.conductivity_w_m_k / self.gap_m.max(1e-6);
        EnclosureFlux {
            h_convective_w_m2_k: h,
            q_convective_w_m2: h * (t_hot_k - t_cold_k),
            q_evaporative_w_m2: m * hfg,
            dq_convective_dt_hot: h,
            dq_convective_dt_cold: -h,
            dq_evaporative_dt_hot: dm_hot * hfg + m * dhfg,
            dq_evaporative_dt_cold: dm_cold * hfg,
        }
    }
}

/// One stage's nodes and links.
#[derive(Debug, Clone, Copy)]
struct Stage {
    wick: NodeId,
    plate: NodeId,
    gap_link: LinkId,
}

/// A multi-effect diffusion still, built and ready to run.
#[derive(Debug, Clone)]
pub struct MultiEffectStill {
    net: Network,
    glazing: NodeId,
    absorber: NodeId,
    stages: Vec<Stage>,
    air: BoundaryId,
    sky: BoundaryId,
    sink: BoundaryId,
    sink_kind: Sink,
    glazing_to_air: LinkId,
    absorber_to_glazing: LinkId,
    first_stage_link: LinkId,
    sink_link: LinkId,
    sink_h_w_m2_k: f64,
    air_sink: Option<AirSink>,
    sink_basis: String,
    glazing_gap_m: f64,
    gap_model: Arc<DiffusionGap>,
    optics: FlatOptics,
    plane: Plane,
    tilt_rad: f64,
    footprint_m2: f64,
    aperture_m2: f64,
    area_m2: f64,
    holding_kg: f64,
    feed_kg_s: f64,
    k_air_w_m_k: f64,
    details: KindDetails,
}

impl MultiEffectStill {
    /// Build the still of `variant` (kind data `k`) with materials from `lib` at a site of
    /// total pressure `pressure_pa` \[Pa\].
    ///
    /// Errors are [`Error::Model`]: a validated design names materials that exist.
    pub fn new(
        variant: &Variant,
        k: &MultiEffect,
        lib: &Library,
        pressure_pa: f64,
    ) -> Result<Self, Error> {
        let name = variant.name.as_str();
        let m = Materials::new(variant, lib);
        let glazing = m.cover("the glazing", &variant.cover)?;
        let absorber = m.surface("the absorber", &k.absorber)?;
        let cloth = m.wick("the wick cloth", &k.wick_cloth)?;
        let plate = m.plate("the plate", &k.plate)?;
        let side = m.layers(&k.side_insulation, "side_insulation")?;
        let n_stages = k.stages.max(1) as usize;
        let footprint = variant.footprint_m2();
        let tilt = k.glazing_tilt_deg.to_radians();
        let area = footprint / tilt.cos();
        let gap_m = k.gap_mm / 1000.0;
        let glazing_gap_m = k.glazing_gap_mm / 1000.0;
        let plate_t_m = plate.thickness_mm / 1000.0;
        let holding_kg = cloth.water_holding_kg_m2 * area;
        let perimeter_m = 2.0 * (variant.width_m / tilt.cos() + variant.length_m);
        let pitch_m = gap_m + plate_t_m + cloth.thickness_mm / 1000.0;
        let u_edge =
            conduction_layers_u_w_m2_k(&side, EDGE_FILM_W_M2_K).unwrap_or(EDGE_FILM_W_M2_K);
        // Per node (wick or plate): half a stage pitch of edge, plus the frame bridge.
        let edge_ua = u_edge * perimeter_m * 0.5 * pitch_m + FRAME_BRIDGE_W_M_K * perimeter_m * 0.5;
        let air_props = super::wick::enclosure_air(pressure_pa, gap_m);
        let k_air = air_props.conductivity_w_m_k;
        let gap_model = Arc::new(DiffusionGap {
            gap_m,
            total_pressure_pa: pressure_pa,
            // The spacers bridge the gap in parallel with the air: one conduction term,
            // (k_air + share·k_spacer)/δ per m² of stage, instead of a link of their own
            // (the same heat flow, one link fewer per stage in the solver's loop).
            conductivity_w_m_k: k_air + SPACER_AREA_SHARE * SPACER_CONDUCTIVITY_W_M_K,
        });
        let contact = 1.0 / (plate_t_m / plate.conductivity_w_m_k + 1.0 / WICK_CONTACT_W_M2_K);

        let mut b = NetworkBuilder::new();
        let air = b.boundary("ambient air");
        let sky = b.boundary("sky");
        let sink = b.boundary("sink");
        let glazing_n = b.node(
            "glazing",
            super::single_slope::COVER_VOLUMETRIC_HEAT_J_M3_K * glazing.thickness_mm / 1000.0
                * area,
        );
        let absorber_n = b.node("absorber", PLATE_VOLUMETRIC_HEAT_J_M3_K * plate_t_m * area);
        let glazing_to_air = b.conductance(
            "glazing to air",
            glazing_n,
            air,
            10.0 * area,
            LossPath::CoverToAir,
        );
        b.radiation(
            "glazing to sky",
            glazing_n,
            sky,
            area * glazing.emissivity * 0.5 * (1.0 + tilt.cos()),
            LossPath::CoverToSky,
        );
        b.radiation(
            "glazing to ground",
            glazing_n,
            air,
            area * glazing.emissivity * 0.5 * (1.0 - tilt.cos()),
            LossPath::CoverToAir,
        );
        let absorber_to_glazing = b.conductance(
            "absorber to glazing convection",
            absorber_n,
            glazing_n,
            area * humid_air::dry_air_thermal_conductivity_w_m_k(320.0) / glazing_gap_m.max(1e-3),
            LossPath::Internal,
        );
        b.radiation(
            "absorber to glazing radiation",
            absorber_n,
            glazing_n,
            area * effective_emissivity_parallel(absorber.emissivity, glazing.emissivity),
            LossPath::Internal,
        );
        b.conductance("absorber edge", absorber_n, air, edge_ua, LossPath::Edge);
        let mut stages = Vec::with_capacity(n_stages);
        let mut first_stage_link = None;
        let mut prev = absorber_n;
        for i in 1..=n_stages {
            let wick =
                b.fed_wick_node(&format!("stage {i} wick"), 0.0, WICK_DRY_SHARE * holding_kg);
            let plate_n = b.node(
                &format!("stage {i} plate"),
                PLATE_VOLUMETRIC_HEAT_J_M3_K * plate_t_m * area,
            );
            let heat_in = b.conductance(
                &format!("stage {i} heating"),
                prev,
                wick,
                contact * area,
                LossPath::Internal,
            );
            if i == 1 {
                first_stage_link = Some(heat_in);
            }
            let gap_link = b.enclosure(
                &format!("stage {i} gap"),
                wick,
                plate_n,
                area,
                gap_model.clone(),
                k.collection_efficiency,
                0.0,
            );
            b.radiation(
                &format!("stage {i} gap radiation"),
                wick,
                plate_n,
                area * effective_emissivity_parallel(cloth.emissivity, plate.emissivity),
                LossPath::Internal,
            );
            b.conductance(
                &format!("stage {i} wick edge"),
                wick,
                air,
                edge_ua,
                LossPath::Edge,
            );
            b.conductance(
                &format!("stage {i} plate edge"),
                plate_n,
                air,
                edge_ua,
                LossPath::Edge,
            );
            stages.push(Stage {
                wick,
                plate: plate_n,
                gap_link,
            });
            prev = plate_n;
        }
        // An air sink without a coefficient set in the design is physical: its coefficient
        // follows the last plate's temperature hour by hour; the result quotes it at the
        // rating point.
        let air_sink = match (k.sink, k.sink_coefficient_w_m2_k) {
            (Sink::AirFins, None) => Some(AirSink {
                fin_height_m: k.fin_height_mm / 1000.0,
                fin_spacing_m: k.fin_spacing_mm / 1000.0,
                fin_thickness_m: k.fin_thickness_mm / 1000.0,
                conductivity_w_m_k: plate.conductivity_w_m_k,
                emissivity: k.sink_emissivity.unwrap_or(plate.emissivity),
                plate_length_m: area / perimeter_m.max(1e-6),
                slope_length_m: variant.width_m / tilt.cos(),
                tilt_rad: tilt,
                convection_factor: k.sink_convection_factor,
            }),
            _ => None,
        };
        let (sink_h, sink_basis) = match &air_sink {
            Some(a) => {
                let c = a.coefficient(
                    SINK_RATING_AIR_K + SINK_RATING_DIFFERENCE_K,
                    SINK_RATING_AIR_K,
                    pressure_pa,
                );
                (c.total_w_m2_k(), air_sink_basis(a, &c, pressure_pa))
            }
            None => (k.sink_coefficient(), String::new()),
        };
        let sink_link = b.conductance(
            "last plate to sink",
            prev,
            sink,
            sink_h * area,
            LossPath::Base,
        );
        let net = b.build().map_err(|e| net_error(name, &e))?;
        let first_stage_link = first_stage_link.ok_or_else(|| Error::Model {
            variant: name.to_owned(),
            at: String::new(),
            reason: "the stack has no first stage".to_owned(),
        })?;
        let optics = FlatOptics {
            tilt_rad: tilt,
            cover_area_m2: area,
            cover_n: glazing.refractive_index,
            cover_k_per_m: glazing.extinction_per_m,
            cover_thickness_m: glazing.thickness_mm / 1000.0,
            condensate: None,
            absorptance: absorber.absorptance,
        };
        Ok(MultiEffectStill {
            net,
            glazing: glazing_n,
            absorber: absorber_n,
            stages,
            air,
            sky,
            sink,
            sink_kind: k.sink,
            glazing_to_air,
            absorber_to_glazing,
            first_stage_link,
            sink_link,
            sink_h_w_m2_k: sink_h,
            air_sink,
            sink_basis,
            glazing_gap_m,
            gap_model,
            optics,
            plane: Plane::from_degrees(k.glazing_tilt_deg, variant.cover_azimuth_deg),
            tilt_rad: tilt,
            footprint_m2: footprint,
            aperture_m2: area,
            area_m2: area,
            holding_kg,
            feed_kg_s: k.feed_l_h_m2 * area / 3600.0,
            k_air_w_m_k: humid_air::dry_air_thermal_conductivity_w_m_k(320.0),
            details: KindDetails::MultiEffect {
                stages: n_stages as u32,
                gap_mm: k.gap_mm,
                sink: k.sink.name().to_owned(),
                sink_coefficient_w_m2_k: sink_h,
                edge_ua_per_node_w_k: edge_ua,
                stage_max_c: vec![0.0; n_stages],
                stage_l_m2_day: vec![0.0; n_stages],
                stage_dry_hour_fraction: vec![0.0; n_stages],
                solar_to_vapour_efficiency: 0.0,
                gain_output_ratio: 0.0,
                first_stage_heat_kwh_m2_day: 0.0,
                glazing_gap_mm: k.glazing_gap_mm,
                sink_heat_kwh_m2_day: 0.0,
                sink_rise_day_mean_k: 0.0,
                absorber_max_c: 0.0,
                last_plate_max_c: 0.0,
                sink_note: String::new(),
            },
        })
    }

    /// The stage nodes (wick, condensing plate), first stage first.
    pub fn stage_nodes(&self) -> Vec<(NodeId, NodeId)> {
        self.stages.iter().map(|s| (s.wick, s.plate)).collect()
    }

    /// The enclosure link of each stage's gap, first stage first.
    pub fn stage_links(&self) -> Vec<LinkId> {
        self.stages.iter().map(|s| s.gap_link).collect()
    }

    /// The link that carries heat from the absorber into the first stage.
    pub fn first_stage_link(&self) -> LinkId {
        self.first_stage_link
    }

    /// The absorber node.
    pub fn absorber_node(&self) -> NodeId {
        self.absorber
    }

    /// Sink temperature for one record \[K\]: the air for fins; for a water body the month's
    /// mean air temperature (a stated simplification: a pond or the sea near the shore
    /// follows the mean air temperature, not its daily swing).
    fn sink_temperature_k(&self, ctx: &HourContext<'_>) -> f64 {
        match self.sink_kind {
            Sink::AirFins => ctx.weather.t_air_k,
            Sink::WaterBody => ctx.ground_k,
        }
    }
}

impl StillModel for MultiEffectStill {
    fn network(&self) -> &Network {
        &self.net
    }
    fn planes(&self) -> Vec<(Plane, f64)> {
        vec![(self.plane, self.aperture_m2)]
    }
    fn brine_node(&self) -> NodeId {
        self.stages[0].wick
    }
    fn water_nodes(&self) -> Vec<NodeId> {
        self.stages.iter().map(|s| s.wick).collect()
    }
    fn cover_node(&self) -> NodeId {
        self.glazing
    }
    fn liner_node(&self) -> Option<NodeId> {
        Some(self.absorber)
    }
    fn walls_node(&self) -> Option<NodeId> {
        None
    }
    fn footprint_m2(&self) -> f64 {
        self.footprint_m2
    }
    fn aperture_m2(&self) -> f64 {
        self.aperture_m2
    }
    fn evaporating_m2(&self) -> f64 {
        self.area_m2 * self.stages.len() as f64
    }
    fn set_brine_kg(&self) -> f64 {
        self.holding_kg * self.stages.len() as f64
    }
    fn details(&self) -> KindDetails {
        self.details.clone()
    }
    fn run_details(&self, run: &RunTotals) -> KindDetails {
        let mut d = self.details.clone();
        if let KindDetails::MultiEffect {
            stage_max_c,
            stage_l_m2_day,
            stage_dry_hour_fraction,
            solar_to_vapour_efficiency,
            gain_output_ratio,
            first_stage_heat_kwh_m2_day,
            sink_heat_kwh_m2_day,
            sink_rise_day_mean_k,
            absorber_max_c,
            last_plate_max_c,
            sink_note,
            ..
        } = &mut d
        {
            let days = run.days.max(f64::MIN_POSITIVE);
            for (i, s) in self.stages.iter().enumerate() {
                stage_max_c[i] = run
                    .node_max_k
                    .get(s.wick.0)
                    .map_or(0.0, |t| t - ZERO_CELSIUS_K);
                stage_l_m2_day[i] = run
                    .link_collected_kg
                    .get(s.gap_link.0)
                    .copied()
                    .unwrap_or(0.0)
                    / days
                    / self.footprint_m2;
                let dry_h = run.node_dry_hours.get(s.wick.0).copied().unwrap_or(0.0);
                stage_dry_hour_fraction[i] = if run.hours > 0.0 {
                    dry_h / run.hours
                } else {
                    0.0
                };
            }
            let q1 = run
                .link_heat_j
                .get(self.first_stage_link.0)
                .copied()
                .unwrap_or(0.0);
            *first_stage_heat_kwh_m2_day = q1 / days / self.footprint_m2 / 3.6e6;
            *solar_to_vapour_efficiency = if run.incident_j > 0.0 {
                run.distillate_latent_j / run.incident_j
            } else {
                0.0
            };
            *gain_output_ratio = if q1 > 0.0 {
                run.distillate_latent_j / q1
            } else {
                0.0
            };
            let node_max_c =
                |n: NodeId| run.node_max_k.get(n.0).map_or(0.0, |t| t - ZERO_CELSIUS_K);
            *absorber_max_c = node_max_c(self.absorber);
            *last_plate_max_c = self.stages.last().map_or(0.0, |s| node_max_c(s.plate));
            let q_sink_j = run
                .link_heat_j
                .get(self.sink_link.0)
                .copied()
                .unwrap_or(0.0);
            *sink_heat_kwh_m2_day = q_sink_j / days / self.footprint_m2 / 3.6e6;
            let q_mean_w_m2 = q_sink_j / (days * 86_400.0) / self.area_m2;
            *sink_rise_day_mean_k = q_mean_w_m2 / self.sink_h_w_m2_k.max(f64::MIN_POSITIVE);
            *sink_note = sink_note_text(
                self.sink_kind,
                self.sink_h_w_m2_k,
                self.stages.len(),
                *sink_heat_kwh_m2_day,
                *sink_rise_day_mean_k,
                *absorber_max_c,
                *last_plate_max_c,
            );
            if !self.sink_basis.is_empty() {
                sink_note.push(' ');
                sink_note.push_str(&self.sink_basis);
            }
        }
        d
    }
    fn initial_state(&self, t_k: f64, salinity_g_kg: f64) -> Result<State, NetworkError> {
        let mut s = self.net.initial_state(t_k)?;
        for st in &self.stages {
            s.set_brine(&self.net, st.wick, self.holding_kg, salinity_g_kg)?;
        }
        Ok(s)
    }
    fn hour_inputs(
        &self,
        ctx: &HourContext<'_>,
        state: &State,
        inputs: &mut Inputs,
    ) -> Result<SunlightSplit, NetworkError> {
        let h = ctx.weather;
        let net = &self.net;
        let t_air = h.t_air_k;
        let t_sink = self.sink_temperature_k(ctx);
        inputs.set_boundary_k(net, self.air, t_air)?;
        inputs.set_boundary_k(net, self.sky, sky_temperature_k(h, ctx.dew_point_known))?;
        inputs.set_boundary_k(net, self.sink, t_sink)?;
        if let (Some(a), Some(last)) = (&self.air_sink, self.stages.last()) {
            // Lagged, like the outside and glazing-gap coefficients: fixed within the hour.
            let t_plate = state.temperature_k(last.plate).unwrap_or(t_sink);
            let h_sink = a
                .coefficient(t_plate, t_sink, self.gap_model.total_pressure_pa)
                .total_w_m2_k();
            inputs.set_conductance_w_k(net, self.sink_link, h_sink * self.area_m2)?;
        }
        let t_glazing = state.temperature_k(self.glazing).unwrap_or(t_air);
        let t_abs = state.temperature_k(self.absorber).unwrap_or(t_air);
        let h_out = cover_outside_coefficient_w_m2_k(
            h.wind_m_s,
            h.wind_height_m,
            t_air,
            t_glazing,
            COVER_HEIGHT_M,
            self.tilt_rad,
            self.area_m2.sqrt(),
        );
        inputs.set_conductance_w_k(net, self.glazing_to_air, h_out * self.area_m2)?;
        // Absorber to glazing: Hollands et al. (1976) across the dry gap, at the temperatures
        // at the start of the hour (lagged, so the conductance is fixed within the hour).
        let t_film = 0.5 * (t_abs + t_glazing);
        let mu = humid_air::dry_air_viscosity_pa_s(t_film);
        let rho = 101_325.0 * MOLAR_MASS_AIR_KG_MOL / (GAS_CONSTANT_J_MOL_K * t_film);
        let nu_kin = mu / rho;
        let pr = mu * humid_air::DRY_AIR_SPECIFIC_HEAT_J_KG_K / self.k_air_w_m_k;
        let ra = 9.81 * (t_abs - t_glazing).max(0.0) / t_film * self.glazing_gap_m.powi(3)
            / (nu_kin * nu_kin)
            * pr;
        let nu = hollands_nusselt(ra, self.tilt_rad.min(75f64.to_radians()));
        inputs.set_conductance_w_k(
            net,
            self.absorber_to_glazing,
            nu * self.k_air_w_m_k / self.glazing_gap_m.max(1e-3) * self.area_m2,
        )?;

        let split = self.optics.split(&ctx.poa[0]);
        inputs.set_source_w(net, self.glazing, split.cover_w)?;
        inputs.set_source_w(net, self.absorber, split.liner_w)?;

        // Feed at the sink's temperature for a still floating on its feed water, at the air
        // temperature otherwise.
        let feed_t = match self.sink_kind {
            Sink::WaterBody => t_sink,
            Sink::AirFins => t_air,
        };
        let e_sun = RUN_OFF_SUN_SHARE * split.liner_w / water::latent_heat_j_kg(t_abs);
        for s in &self.stages {
            inputs.set_feed(net, s.wick, self.feed_kg_s, feed_t, ctx.feed_salinity_g_kg)?;
            let tw = state.temperature_k(s.wick).unwrap_or(t_air);
            let tp = state.temperature_k(s.plate).unwrap_or(t_air);
            let sal = state
                .salinity_g_kg(s.wick)
                .unwrap_or(ctx.feed_salinity_g_kg);
            let e_now =
                evaporation_estimate_kg_s(net, self.gap_model.as_ref(), self.area_m2, tw, tp, sal);
            let water_kg =
                state.brine_kg(s.wick).unwrap_or(0.0) - state.salt_kg(s.wick).unwrap_or(0.0);
            let drain = run_off_kg_s(
                self.feed_kg_s,
                e_now.max(e_sun),
                water_kg,
                self.holding_kg,
                h.period_h * 3600.0,
            );
            inputs.set_drain(net, s.wick, drain)?;
        }
        Ok(split)
    }
}

/// The sentences that say how an air sink was rated and what governs it, for the result's
/// sink note. `c` is the coefficient at the rating point ([`SINK_RATING_AIR_K`],
/// [`SINK_RATING_DIFFERENCE_K`]) and site pressure `pressure_pa` \[Pa\].
pub fn air_sink_basis(a: &AirSink, c: &AirSinkCoefficient, pressure_pa: f64) -> String {
    let tilt_deg = a.tilt_rad.to_degrees();
    let finned = a.fin_height_m > 0.0;
    let shape = if finned {
        format!(
            "fins {:.0} mm high at {:.0} mm spacing, {:.1} mm thick, running up the slope",
            a.fin_height_m * 1000.0,
            a.fin_spacing_m * 1000.0,
            a.fin_thickness_m * 1000.0,
        )
    } else {
        "a plain plate facing down, no fins".to_owned()
    };
    let factor = if (a.convection_factor - 1.0).abs() > 1e-12 {
        format!(" (× {:.2} as the design sets)", a.convection_factor)
    } else {
        String::new()
    };
    let mut text = format!(
        "The air sink is {shape}: {:.1} W/m²K by free convection{factor} plus {:.1} by \
         radiation (emissivity {:.2}) with the plate 10 K above 30 °C air; the coefficient \
         follows the plate hour by hour.",
        c.convective_w_m2_k, c.radiative_w_m2_k, a.emissivity
    );
    match c.flow {
        SinkFlow::UnderLevelPlate => {
            text.push_str(&format!(
                " At {tilt_deg:.0}° the stack is too close to level for heated air to rise \
                 along the plate: it gathers under the plate and spills over the edges (a hot \
                 plate facing down, Incropera eq. 9.32)"
            ));
            text.push_str(if finned {
                ", and the fins, closed at the top by the plate, add almost nothing. Tilt the \
                 stack so air can rise along the fins, or float it on water."
            } else {
                "."
            });
        }
        SinkFlow::AlongSlope if finned => {
            text.push_str(&format!(
                " Heated air rises up the {:.2} m slope at {tilt_deg:.0}° through the fin \
                 channels (Bar-Cohen & Rohsenow with buoyancy g·sin β, fin efficiency {:.2}).",
                a.slope_length_m, c.fin_efficiency
            ));
            if tilt_deg < 30.0 - 1e-6 {
                text.push_str(
                    " Below 30° of tilt that relation is extrapolated from tests on steeper \
                     sinks; treat the figure as optimistic.",
                );
            }
        }
        SinkFlow::AlongSlope => text.push_str(&format!(
            " Heated air rises up the {:.2} m slope at {tilt_deg:.0}° (the underside of an \
             inclined plate, Incropera eq. 9.24 with buoyancy g·sin β).",
            a.slope_length_m
        )),
    }
    // What tilting helps, where the relation is trusted (30°, the face-down limit of
    // Mehrtash & Tari's range): the same sink under the same footprint width.
    let trusted = 30f64.to_radians();
    if a.tilt_rad < trusted - 1e-9 {
        let steeper = AirSink {
            tilt_rad: trusted,
            slope_length_m: a.slope_length_m * a.tilt_rad.cos() / trusted.cos(),
            ..*a
        };
        let h30 = steeper.coefficient(
            SINK_RATING_AIR_K + SINK_RATING_DIFFERENCE_K,
            SINK_RATING_AIR_K,
            pressure_pa,
        );
        text.push_str(&format!(
            " Tilted 30° over the same width, the same sink would rate {:.1} W/m²K of \
             convection.",
            h30.convective_w_m2_k
        ));
    }
    if let (true, Some(best)) = (finned, c.best_spacing_m) {
        let (now, best_mm) = (a.fin_spacing_m * 1000.0, best * 1000.0);
        if (now / best_mm - 1.0).abs() > 0.25 {
            text.push_str(&format!(
                " For this slope and tilt fins about {best_mm:.0} mm apart would shed the \
                 most heat (Bar-Cohen & Rohsenow optimum spacing; these are {now:.0} mm)."
            ));
        }
    }
    text
}

/// The sink's effect on the stack in words, with a run's figures, for reports.
///
/// * `sink` — the sink kind; `h_w_m2_k` — its coefficient [W m⁻² K⁻¹]; `stages` — N
/// * `heat_kwh_m2_day` — heat rejected to it [kWh m⁻² day⁻¹]; `rise_k` — day-mean q/h \[K\]
/// * `absorber_max_c`, `last_plate_max_c` — peak temperatures [°C]
///
/// *Notes*: the mechanism named for three or more stages is the module's finding (the cold
/// stages hold most of the stack's resistance); with one or two stages there is little stack
/// to absorb the rise, and the absorber and its glazing loss follow the last plate.
pub fn sink_note_text(
    sink: Sink,
    h_w_m2_k: f64,
    stages: usize,
    heat_kwh_m2_day: f64,
    rise_k: f64,
    absorber_max_c: f64,
    last_plate_max_c: f64,
) -> String {
    let what = match sink {
        Sink::AirFins => "the air through fins",
        Sink::WaterBody => "the water body",
    };
    let how = if stages >= 3 {
        "The stack rides up with it, but the coldest stages pass vapour worst per kelvin and \
         conduct better when warmer, so the absorber rises much less than the last plate and \
         the glazing loss hardly grows; a weaker sink costs distillate mainly through the \
         edge, frame and warm-drain losses of the warmer lower stages."
    } else {
        "With so few stages the absorber rises nearly as much as the last plate, and the \
         glazing, edge and warm-drain losses grow with it."
    };
    format!(
        "The last plate rejects {heat_kwh_m2_day:.2} kWh/m²/day to {what} at \
         {h_w_m2_k:.0} W/m²K, so it runs q/h = {rise_k:.1} K above the sink on the day's mean \
         (more near noon; peaks: last plate {last_plate_max_c:.1} °C, absorber \
         {absorber_max_c:.1} °C). {how}"
    )
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn diffusivity_factor_matches_powf() {
        // The bounds stated in `diffusivity_temperature_factor`'s documentation, against
        // std's powf (a general-purpose reference): 1e-12 relative in 250–450 K, 1e-7 in
        // 150–500 K.
        let reference = DIFFUSIVITY_REFERENCE_K.powf(DIFFUSIVITY_TEMPERATURE_EXPONENT);
        assert!((DIFFUSIVITY_REFERENCE_FACTOR / reference - 1.0).abs() < 1e-15);
        for i in 0..=3500 {
            let t = 150.0 + 0.1 * f64::from(i);
            let exact = t.powf(DIFFUSIVITY_TEMPERATURE_EXPONENT);
            let err = (diffusivity_temperature_factor(t) / exact - 1.0).abs();
            let bound = if (250.0..=450.0).contains(&t) {
                1e-12
            } else {
                1e-7
            };
            assert!(err < bound, "{t} K: {err:e}");
        }
    }

    #[test]
    fn gap_derivatives_match_difference_quotients() {
        // Analytic derivatives against central differences (a self-consistency check of the
        // Jacobian the solver uses; 1e-5 relative for the difference quotient's error).
        let g = DiffusionGap {
            gap_m: 0.004,
            total_pressure_pa: 101_325.0,
            conductivity_w_m_k: 0.028,
        };
        let f = |th: f64, tc: f64| {
            g.transfer(
                th,
                tc,
                water::saturation_pressure_pa(th),
                water::saturation_pressure_derivative_pa_k(th),
                water::saturation_pressure_pa(tc),
                water::saturation_pressure_derivative_pa_k(tc),
            )
        };
        let (th, tc) = (333.15, 328.15);
        let a = f(th, tc);
        let h = 1e-4;
        let d_hot =
            (f(th + h, tc).q_evaporative_w_m2 - f(th - h, tc).q_evaporative_w_m2) / (2.0 * h);
        let d_cold =
            (f(th, tc + h).q_evaporative_w_m2 - f(th, tc - h).q_evaporative_w_m2) / (2.0 * h);
        assert!((a.dq_evaporative_dt_hot / d_hot - 1.0).abs() < 1e-5);
        // The diffusivity inside equals the physics function's (1e-12: the series' error
        // at 330.65 K is far smaller, round-off of the two evaluations dominates).
        let tm: f64 = 330.65;
        let fast =
            humid_air::vapour_diffusivity_m2_s(1.0, 101_325.0) * diffusivity_temperature_factor(tm);
        let slow = humid_air::vapour_diffusivity_m2_s(tm, 101_325.0);
        assert!((fast / slow - 1.0).abs() < 1e-12);
        assert!((a.dq_evaporative_dt_cold / d_cold - 1.0).abs() < 1e-5);
    }
}
