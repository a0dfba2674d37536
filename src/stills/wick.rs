//! The tilted wick still as a thermal network. No solver code here: this module only turns a
//! design into nodes, links and hourly inputs for [`crate::network`].
//!
//! A dark cloth, wetted by a continuous feed, lies on an insulated backing under a parallel
//! cover with a small gap. Nodes: cover, wick (a water node whose only heat capacity is the
//! water the cloth holds) and backing. Boundaries: ambient air, sky, feed water. The feed
//! enters the wick at the feed temperature; what does not evaporate runs off at the wick's
//! temperature and carries its heat away ([`run_off_kg_s`]). When the feed is below the
//! evaporation, the cloth dries: the wick is a fed wick
//! ([`NetworkBuilder::fed_wick_node`]), whose evaporation the network caps smoothly at what
//! the feed (less the run-off) and the cloth's reserve can supply within a step, so a cloth
//! fed below its evaporation sits partly dry at the feed's rate instead of drying out and
//! re-wetting step after step; the hours with a dry cloth are reported
//! ([`KindDetails::Wick`]).
//!
//! Internal transfer: Hollands et al.'s narrow inclined enclosure
//! ([`InternalCorrelation::InclinedEnclosure`], plate spacing = the gap), not Dunkle's
//! horizontal-basin relation, with the evaporative flux by Dunkle's Lewis-relation form.

use super::materials::Materials;
use std::sync::Arc;

use super::single_slope::{cover_outside_coefficient_w_m2_k, net_error, sky_temperature_k};
use super::sunlight::{FlatOptics, SunlightSplit};
use super::{HourContext, KindDetails, RunTotals, StillModel};
use crate::climate::Plane;
use crate::design::{Condensate, Library, Variant, Wick};
use crate::error::Error;
use crate::network::{
    BoundaryId, CorrelationEnclosure, EnclosureModel, Inputs, LinkId, LossPath, Network,
    NetworkBuilder, NetworkError, NodeId, State,
};
use crate::physics::constants::ZERO_CELSIUS_K;
use crate::physics::heat_transfer::{
    EnclosureAir, InternalCorrelation, conduction_layers_u_w_m2_k,
};
use crate::physics::optics::effective_emissivity_parallel;
use crate::physics::{humid_air, water};

/// Share of the cloth's water holding at or below which the wick counts as dry [-]. Common
/// practice, no source: a cloth at a twentieth of its holding no longer forms a continuous
/// wet surface.
pub const WICK_DRY_SHARE: f64 = 0.05;
/// Heat capacity of the wick backing per m² [J m⁻² K⁻¹]: a 1 mm metal or 3 mm board backing
/// ≈ 2–4 kJ m⁻² K⁻¹ (common practice, no source).
pub const BACKING_CAPACITY_J_M2_K: f64 = 3000.0;
/// Conductance between the wet cloth and the backing it lies on [W m⁻² K⁻¹]: a 1 mm wet
/// cloth with k ≈ 0.5 W m⁻¹ K⁻¹ (common practice, no source).
pub const WICK_CONTACT_W_M2_K: f64 = 500.0;
/// Film coefficient behind the backing insulation [W m⁻² K⁻¹] (REFERENCES.md §2, the base
/// film 5.7, from memory).
pub const BACK_FILM_W_M2_K: f64 = 5.7;
/// Largest share of the sunlight the wick absorbs that can go into evaporation within an
/// hour [-]: the run-off control assumes no more (wick stills convert well under this;
/// REFERENCES.md §6 studies give daily efficiencies of roughly 30–50 %, from memory).
pub const RUN_OFF_SUN_SHARE: f64 = 0.6;
/// Steepest tilt at which Hollands et al.'s correlation holds \[deg\].
pub const HOLLANDS_MAX_TILT_DEG: f64 = 75.0;
/// Height at which the wind on a low still's cover is evaluated \[m\] (common practice, no
/// source).
pub const COVER_HEIGHT_M: f64 = 0.5;

/// Run-off from a continuously fed wick over the coming period [kg s⁻¹].
///
/// The feed keeps a saturated cloth at its holding; what it brings beyond the evaporation
/// runs off. The evaporation during the period is not known before the step, so the run-off
/// is set against an upper estimate of it, and the water the cloth holds beyond its holding
/// is drained over the period:
/// D = clamp(F − E_max + (m − m_hold)/Δt, 0, F).
/// Our own control law (no source). With D ≤ F a dry cloth never loses water it does not
/// have; water over the holding (when the evaporation fell short of E_max) is drained in the
/// next period.
///
/// * `feed_kg_s` — feed F [kg s⁻¹]; `evaporation_max_kg_s` — E_max [kg s⁻¹]
/// * `water_kg` — water now in the cloth m [kg]; `holding_kg` — its holding m_hold [kg]
/// * `period_s` — the coming period Δt \[s\]
pub fn run_off_kg_s(
    feed_kg_s: f64,
    evaporation_max_kg_s: f64,
    water_kg: f64,
    holding_kg: f64,
    period_s: f64,
) -> f64 {
    let f = feed_kg_s.max(0.0);
    if !(period_s.is_finite() && period_s > 0.0) {
        return 0.0;
    }
    let d = f - evaporation_max_kg_s.max(0.0) + (water_kg - holding_kg) / period_s;
    if d.is_finite() { d.clamp(0.0, f) } else { 0.0 }
}

/// Evaporation across an enclosure link at given surface temperatures [kg s⁻¹] (≥ 0), with
/// the network's own water properties, for the run-off estimate.
///
/// * `net` — the network (its water properties); `model` — the enclosure model
/// * `area_m2` \[m²\]; `t_hot_k`, `t_cold_k` \[K\]; `salinity_g_kg` [g kg⁻¹]
pub fn evaporation_estimate_kg_s(
    net: &Network,
    model: &dyn EnclosureModel,
    area_m2: f64,
    t_hot_k: f64,
    t_cold_k: f64,
    salinity_g_kg: f64,
) -> f64 {
    let w = net.water();
    let ratio = w.vapour_pressure_ratio(salinity_g_kg);
    let f = model.transfer(
        t_hot_k,
        t_cold_k,
        ratio * w.saturation_pressure_pa(t_hot_k),
        ratio * w.saturation_pressure_derivative_pa_k(t_hot_k),
        w.saturation_pressure_pa(t_cold_k),
        w.saturation_pressure_derivative_pa_k(t_cold_k),
    );
    let m = f.q_evaporative_w_m2 * area_m2 / w.latent_heat_j_kg(t_hot_k);
    if m.is_finite() { m.max(0.0) } else { 0.0 }
}

/// Humid-air properties of an enclosure at a film temperature of 50 °C, half saturated
/// (held fixed, as [`CorrelationEnclosure`] expects).
pub(crate) fn enclosure_air(pressure_pa: f64, gap_m: f64) -> EnclosureAir {
    let t_film_k = ZERO_CELSIUS_K + 50.0;
    let p_v = 0.5 * water::saturation_pressure_pa(t_film_k);
    let mu = humid_air::dynamic_viscosity_pa_s(t_film_k, p_v, pressure_pa);
    let rho = humid_air::density_kg_m3(t_film_k, p_v, pressure_pa);
    let k_air = humid_air::thermal_conductivity_w_m_k(t_film_k, p_v, pressure_pa);
    let cp = humid_air::specific_heat_j_kg_k(p_v, pressure_pa);
    EnclosureAir {
        conductivity_w_m_k: k_air,
        kinematic_viscosity_m2_s: mu / rho,
        prandtl: mu * cp / k_air,
        total_pressure_pa: pressure_pa,
        characteristic_length_m: gap_m,
    }
}

/// A tilted wick still, built and ready to run.
#[derive(Debug, Clone)]
pub struct WickStill {
    net: Network,
    cover: NodeId,
    wick: NodeId,
    backing: NodeId,
    air: BoundaryId,
    sky: BoundaryId,
    cover_to_air: LinkId,
    back_to_air: LinkId,
    back_layers: Vec<(f64, f64)>,
    internal: Arc<CorrelationEnclosure>,
    optics: FlatOptics,
    plane: Plane,
    tilt_rad: f64,
    footprint_m2: f64,
    area_m2: f64,
    holding_kg: f64,
    feed_kg_s: f64,
    feed_t_k: Option<f64>,
    details: KindDetails,
}

impl WickStill {
    /// Build the wick still of `variant` (kind data `k`) with materials from `lib` at a site
    /// of total pressure `pressure_pa` \[Pa\].
    ///
    /// Errors are [`Error::Model`]: a validated design names materials that exist.
    pub fn new(
        variant: &Variant,
        k: &Wick,
        lib: &Library,
        pressure_pa: f64,
    ) -> Result<Self, Error> {
        let name = variant.name.as_str();
        let m = Materials::new(variant, lib);
        let cover = m.cover("the cover", &variant.cover)?;
        let cloth = m.wick("the wick cloth", &k.cloth)?;
        let back_layers = m.layers(&k.backing_insulation, "backing_insulation")?;
        let footprint = variant.footprint_m2();
        let tilt = k.cover_tilt_deg.to_radians();
        let area = footprint / tilt.cos();
        let gap_m = k.gap_mm / 1000.0;
        let holding_kg = cloth.water_holding_kg_m2 * area;

        let mut b = NetworkBuilder::new();
        let air = b.boundary("ambient air");
        let sky = b.boundary("sky");
        let cover_n = b.node(
            "cover",
            super::single_slope::COVER_VOLUMETRIC_HEAT_J_M3_K * cover.thickness_mm / 1000.0 * area,
        );
        // The cloth's own heat capacity (≈ 0.3 kg m⁻² of fibre) is small beside the water it
        // holds and is left out: the wick's capacity is its water.
        let wick = b.fed_wick_node("wick", 0.0, WICK_DRY_SHARE * holding_kg);
        let backing = b.node("backing", BACKING_CAPACITY_J_M2_K * area);
        let cover_to_air = b.conductance(
            "cover to air",
            cover_n,
            air,
            10.0 * area,
            LossPath::CoverToAir,
        );
        b.radiation(
            "cover to sky",
            cover_n,
            sky,
            area * cover.emissivity * 0.5 * (1.0 + tilt.cos()),
            LossPath::CoverToSky,
        );
        b.radiation(
            "cover to ground",
            cover_n,
            air,
            area * cover.emissivity * 0.5 * (1.0 - tilt.cos()),
            LossPath::CoverToAir,
        );
        let correlation = InternalCorrelation::InclinedEnclosure {
            tilt_rad: tilt.min(HOLLANDS_MAX_TILT_DEG.to_radians()),
        };
        let internal = Arc::new(CorrelationEnclosure {
            correlation,
            air: enclosure_air(pressure_pa, gap_m),
        });
        b.enclosure(
            "wick to cover",
            wick,
            cover_n,
            area,
            internal.clone(),
            k.collection_efficiency,
            k.vapour_leakage,
        );
        b.radiation(
            "wick to cover radiation",
            wick,
            cover_n,
            area * effective_emissivity_parallel(cloth.emissivity, cover.emissivity),
            LossPath::Internal,
        );
        b.conductance(
            "wick to backing",
            wick,
            backing,
            WICK_CONTACT_W_M2_K * area,
            LossPath::Internal,
        );
        let u_back =
            conduction_layers_u_w_m2_k(&back_layers, BACK_FILM_W_M2_K).unwrap_or(BACK_FILM_W_M2_K);
        let back_to_air = b.conductance(
            "backing to air",
            backing,
            air,
            u_back * area,
            LossPath::Base,
        );
        let net = b.build().map_err(|e| net_error(name, &e))?;
        let optics = FlatOptics {
            tilt_rad: tilt,
            cover_area_m2: area,
            cover_n: cover.refractive_index,
            cover_k_per_m: cover.extinction_per_m,
            cover_thickness_m: cover.thickness_mm / 1000.0,
            condensate: Some(cover.condensate == Condensate::Drops),
            absorptance: cloth.absorptance,
        };
        Ok(WickStill {
            net,
            cover: cover_n,
            wick,
            backing,
            air,
            sky,
            cover_to_air,
            back_to_air,
            back_layers,
            internal,
            optics,
            plane: Plane::from_degrees(k.cover_tilt_deg, variant.cover_azimuth_deg),
            tilt_rad: tilt,
            footprint_m2: footprint,
            area_m2: area,
            holding_kg,
            // 1 L of feed taken as 1 kg (seawater is ≈ 2.5 % denser; stated simplification).
            feed_kg_s: k.feed_l_h_m2 * area / 3600.0,
            feed_t_k: k.feed_temperature_c.map(|c| c + ZERO_CELSIUS_K),
            details: KindDetails::Wick {
                cover_tilt_deg: k.cover_tilt_deg,
                gap_mm: k.gap_mm,
                feed_l_h_m2: k.feed_l_h_m2,
                wick_area_m2: area,
                back_u_w_m2_k: u_back,
                dry_hour_fraction: 0.0,
                run_off_l_day: 0.0,
            },
        })
    }

    /// Feed into the wick [kg s⁻¹].
    pub fn feed_kg_s(&self) -> f64 {
        self.feed_kg_s
    }

    /// Water the cloth holds when saturated [kg].
    pub fn holding_kg(&self) -> f64 {
        self.holding_kg
    }
}

impl StillModel for WickStill {
    fn network(&self) -> &Network {
        &self.net
    }
    fn planes(&self) -> Vec<(Plane, f64)> {
        vec![(self.plane, self.area_m2)]
    }
    fn brine_node(&self) -> NodeId {
        self.wick
    }
    fn cover_node(&self) -> NodeId {
        self.cover
    }
    fn liner_node(&self) -> Option<NodeId> {
        Some(self.backing)
    }
    fn walls_node(&self) -> Option<NodeId> {
        None
    }
    fn footprint_m2(&self) -> f64 {
        self.footprint_m2
    }
    fn aperture_m2(&self) -> f64 {
        self.area_m2
    }
    fn evaporating_m2(&self) -> f64 {
        self.area_m2
    }
    fn set_brine_kg(&self) -> f64 {
        self.holding_kg
    }
    fn details(&self) -> KindDetails {
        self.details.clone()
    }
    fn run_details(&self, run: &RunTotals) -> KindDetails {
        let mut d = self.details.clone();
        if let KindDetails::Wick {
            dry_hour_fraction,
            run_off_l_day,
            ..
        } = &mut d
        {
            let i = self.wick.0;
            let dry = run.node_dry_hours.get(i).copied().unwrap_or(0.0);
            *dry_hour_fraction = if run.hours > 0.0 {
                dry / run.hours
            } else {
                0.0
            };
            *run_off_l_day = if run.days > 0.0 {
                run.drained_kg / run.days
            } else {
                0.0
            };
        }
        d
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
        inputs.set_boundary_k(net, self.air, t_air)?;
        inputs.set_boundary_k(net, self.sky, sky_temperature_k(h, ctx.dew_point_known))?;
        let t_cover = state.temperature_k(self.cover).unwrap_or(t_air);
        let t_wick = state.temperature_k(self.wick).unwrap_or(t_air);
        let h_out = cover_outside_coefficient_w_m2_k(
            h.wind_m_s,
            h.wind_height_m,
            t_air,
            t_cover,
            COVER_HEIGHT_M,
            self.tilt_rad,
            self.area_m2.sqrt(),
        );
        inputs.set_conductance_w_k(net, self.cover_to_air, h_out * self.area_m2)?;
        let u_back = conduction_layers_u_w_m2_k(&self.back_layers, BACK_FILM_W_M2_K)
            .unwrap_or(BACK_FILM_W_M2_K);
        inputs.set_conductance_w_k(net, self.back_to_air, u_back * self.area_m2)?;

        let mut split = self.optics.split(&ctx.poa[0]);
        split.brine_w = split.liner_w;
        split.liner_w = 0.0;
        inputs.set_source_w(net, self.cover, split.cover_w)?;
        inputs.set_source_w(net, self.wick, split.brine_w)?;
        inputs.set_source_w(net, self.backing, 0.0)?;

        let feed_t = self.feed_t_k.unwrap_or(t_air);
        inputs.set_feed(
            net,
            self.wick,
            self.feed_kg_s,
            feed_t,
            ctx.feed_salinity_g_kg,
        )?;
        let salinity = state
            .salinity_g_kg(self.wick)
            .unwrap_or(ctx.feed_salinity_g_kg);
        let e_now = evaporation_estimate_kg_s(
            net,
            self.internal.as_ref(),
            self.area_m2,
            t_wick,
            t_cover,
            salinity,
        );
        let e_sun = RUN_OFF_SUN_SHARE * split.brine_w / water::latent_heat_j_kg(t_wick);
        let water_kg =
            state.brine_kg(self.wick).unwrap_or(0.0) - state.salt_kg(self.wick).unwrap_or(0.0);
        let drain = run_off_kg_s(
            self.feed_kg_s,
            e_now.max(e_sun),
            water_kg,
            self.holding_kg,
            h.period_h * 3600.0,
        );
        inputs.set_drain(net, self.wick, drain)?;
        Ok(split)
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn run_off_never_exceeds_the_feed_and_drains_excess() {
        // Our own control law (doc comment of run_off_kg_s), checked by hand:
        // F = 1e-4, E_max = 4e-5, m = m_hold → D = 6e-5 kg/s.
        let d = run_off_kg_s(1e-4, 4e-5, 0.5, 0.5, 3600.0);
        assert!((d - 6e-5).abs() < 1e-15);
        // 0.36 kg over the holding drains 1e-4 kg/s more, capped at the feed.
        let d = run_off_kg_s(1e-4, 4e-5, 0.86, 0.5, 3600.0);
        assert!((d - 1e-4).abs() < 1e-15);
        // Evaporation above the feed: no run-off.
        assert!(run_off_kg_s(1e-4, 3e-4, 0.5, 0.5, 3600.0).abs() < 1e-18);
    }
}
