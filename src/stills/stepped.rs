//! The stepped (tray) still as a thermal network: a staircase of shallow trays under one
//! cover tilted to the sun. No solver code here.
//!
//! Nodes: cover, brine (one lumped water node for all trays, and the wetted risers when
//! the design says so), steps (the metal trays and risers: the absorber, with its heat
//! capacity), and — unless wall interception and side losses are both off — the inner walls.
//!
//! Why one lumped brine node (a stated simplification): the trays sit under one cover on
//! one absorber and are equally deep, so they take nearly the same sunlight per m² and lose
//! heat to the same cover; they are fed in series once a day, when the operator's top-up
//! cascades from the top tray down (the driver's feed, at air temperature, enters the lumped
//! node, so the sensible heat the cascade carries is booked exactly; how it spreads over the
//! trays during that hour is not resolved). The gap above the trays is small and nearly
//! uniform, so the brine-to-cover transfer uses the design's correlation with the mean gap
//! as its length — by default Hollands et al. (1976) for an inclined enclosure.

use super::materials::Materials;
use std::sync::Arc;

use super::single_slope::{
    COVER_VOLUMETRIC_HEAT_J_M3_K, LINER_TO_BRINE_W_M2_K, MIN_COVER_HEIGHT_M,
    STEEL_VOLUMETRIC_HEAT_J_M3_K, WALL_TO_COVER_CONVECTION_W_M2_K, WALL_TO_COVER_VIEW,
    WATER_EMISSIVITY, base_u_w_m2_k, cover_outside_coefficient_w_m2_k, enclosure_air,
    internal_correlation, net_error, sky_temperature_k,
};
use super::sunlight::{
    Enclosure, InsideShares, OpticsSwitches, StairSection, StillOptics, SunlightSplit,
    stair_beam_shares, stair_diffuse_shares,
};
use super::{Basin, HourContext, KindDetails, StillModel};
use crate::climate::Plane;
use crate::design::{
    BasinKind, Condensate, DEFAULT_SOILING_TRANSMITTANCE, Library, LossSwitches, Stepped, Variant,
};
use crate::error::Error;
use crate::network::{
    BoundaryId, CorrelationEnclosure, Inputs, LinkId, LossPath, Network, NetworkBuilder,
    NetworkError, NodeId, State,
};
use crate::physics::heat_transfer::conduction_layers_u_w_m2_k;
use crate::physics::optics::effective_emissivity_parallel;

/// Steel conductivity used for the trays [W m⁻¹ K⁻¹] (as for the single slope's metal tray;
/// common practice, no source).
const STEEL_CONDUCTIVITY_W_M_K: f64 = 50.0;

/// A stepped (tray) still, built and ready to run.
#[derive(Debug, Clone)]
pub struct SteppedStill {
    net: Network,
    cover: NodeId,
    brine: NodeId,
    steps: NodeId,
    walls: Option<NodeId>,
    air: BoundaryId,
    sky: BoundaryId,
    ground: BoundaryId,
    cover_to_air: LinkId,
    side_links: Vec<(LinkId, f64)>,
    side_layers: Vec<(f64, f64)>,
    optics: StillOptics,
    section: StairSection,
    wetted_risers: bool,
    cover_area_m2: f64,
    footprint_m2: f64,
    evaporating_m2: f64,
    tilt_rad: f64,
    plane: Plane,
    cover_height_m: f64,
    plate_length_m: f64,
    set_brine_kg: f64,
    details: KindDetails,
}

impl SteppedStill {
    /// Build the still of `variant` (kind `k`) with materials from `lib` at a site of total
    /// pressure `pressure_pa` \[Pa\]; trays are metal ([`BasinKind::MetalTray`] default
    /// thickness), every loss path is on and the cover's dust is
    /// [`DEFAULT_SOILING_TRANSMITTANCE`] (the kind has no fields for them).
    ///
    /// Errors are [`Error::Model`] (a validated design names materials that exist).
    pub fn new(
        variant: &Variant,
        k: &Stepped,
        lib: &Library,
        pressure_pa: f64,
    ) -> Result<Self, Error> {
        let name = variant.name.as_str();
        let m = Materials::new(variant, lib);
        let cover = m.cover("the cover", &variant.cover)?;
        let liner = m.surface("the liner", &k.liner)?;
        let base_layers = m.layers(&k.base_insulation, "base_insulation")?;
        let side_layers = m.layers(&k.side_insulation, "side_insulation")?;
        let sw = LossSwitches::default();

        let w = variant.width_m;
        let l = variant.length_m;
        let footprint = w * l;
        let tilt = k.cover_tilt_deg.to_radians();
        let cover_area = footprint / tilt.cos();
        let depth_m = k.tray_depth_mm / 1000.0;
        let section = StairSection {
            width_m: w,
            length_m: l,
            tilt_rad: tilt,
            front_above_brine_m: (k.front_wall_mm / 1000.0 - depth_m).max(0.0),
            trays: k.trays.max(1),
            riser_m: k.riser_mm / 1000.0,
        };
        let riser_area = section.riser_area_m2();
        let evaporating = footprint + if k.wetted_risers { riser_area } else { 0.0 };
        let tray_t_m = BasinKind::MetalTray.default_thickness_mm() / 1000.0;
        let with_walls = sw.wall_shading || sw.side_losses;
        let wall_area = section.wall_area_m2();

        let mut b = NetworkBuilder::new();
        let air = b.boundary("ambient air");
        let sky = b.boundary("sky");
        let ground = b.boundary("ground");
        let cover_n = b.node(
            "cover",
            COVER_VOLUMETRIC_HEAT_J_M3_K * cover.thickness_mm / 1000.0 * cover_area,
        );
        let set_brine_kg = depth_m * footprint * 1000.0;
        let brine = b.water_node("brine", 0.0, 0.01 * set_brine_kg);
        let steps = b.node(
            "steps",
            STEEL_VOLUMETRIC_HEAT_J_M3_K * tray_t_m * (footprint + riser_area),
        );
        let walls = with_walls
            .then(|| b.node("walls", STEEL_VOLUMETRIC_HEAT_J_M3_K * tray_t_m * wall_area));

        let cover_to_air = b.conductance(
            "cover to air",
            cover_n,
            air,
            cover_area * 10.0,
            LossPath::CoverToAir,
        );
        b.radiation(
            "cover to sky",
            cover_n,
            sky,
            cover_area * cover.emissivity * 0.5 * (1.0 + tilt.cos()),
            LossPath::CoverToSky,
        );
        b.radiation(
            "cover to ground",
            cover_n,
            air,
            cover_area * cover.emissivity * 0.5 * (1.0 - tilt.cos()),
            LossPath::CoverToAir,
        );
        let correlation = internal_correlation(k.internal_correlation, tilt);
        b.enclosure(
            "brine to cover",
            brine,
            cover_n,
            evaporating,
            Arc::new(CorrelationEnclosure {
                correlation,
                air: enclosure_air(pressure_pa, section.mean_gap_m()),
            }),
            k.collection_efficiency,
            k.vapour_leakage,
        );
        b.radiation(
            "brine to cover radiation",
            brine,
            cover_n,
            evaporating * effective_emissivity_parallel(WATER_EMISSIVITY, cover.emissivity),
            LossPath::Internal,
        );
        let wetted_steel = footprint + if k.wetted_risers { riser_area } else { 0.0 };
        b.conductance(
            "steps to brine",
            steps,
            brine,
            LINER_TO_BRINE_W_M2_K * wetted_steel,
            LossPath::Internal,
        );
        if !k.wetted_risers && riser_area > 0.0 {
            // Dry risers face the cover like the inner walls do.
            b.radiation(
                "risers to cover radiation",
                steps,
                cover_n,
                riser_area * effective_emissivity_parallel(liner.emissivity, cover.emissivity),
                LossPath::Internal,
            );
            b.conductance(
                "risers to cover convection",
                steps,
                cover_n,
                WALL_TO_COVER_CONVECTION_W_M2_K * riser_area,
                LossPath::Internal,
            );
        }
        let u_base = base_u_w_m2_k(name, None, &base_layers)?;
        b.conductance("base", steps, ground, u_base * footprint, LossPath::Base);

        let mut side_links = Vec::new();
        let mut side_layers_all = vec![(tray_t_m, STEEL_CONDUCTIVITY_W_M_K)];
        side_layers_all.extend_from_slice(&side_layers);
        if sw.side_losses {
            let wetted = 2.0 * (w + l) * depth_m;
            let id = b.conductance("brine to side air", brine, air, 1.0, LossPath::Sides);
            side_links.push((id, wetted));
        }
        if let Some(wn) = walls {
            if sw.side_losses {
                let id = b.conductance("walls to side air", wn, air, 1.0, LossPath::Sides);
                side_links.push((id, wall_area));
            }
            b.radiation(
                "walls to cover radiation",
                wn,
                cover_n,
                wall_area
                    * WALL_TO_COVER_VIEW
                    * effective_emissivity_parallel(liner.emissivity, cover.emissivity),
                LossPath::Internal,
            );
            b.conductance(
                "walls to cover convection",
                wn,
                cover_n,
                WALL_TO_COVER_CONVECTION_W_M2_K * wall_area,
                LossPath::Internal,
            );
        }
        let net = b.build().map_err(|e| net_error(name, &e))?;

        let optics = StillOptics {
            // The cover optics use the tilt; the inside shares come from the stair section.
            geom: Enclosure {
                width_m: w,
                length_m: l,
                tilt_rad: tilt,
                front_above_brine_m: section.front_above_brine_m,
            },
            cover_azimuth_rad: variant.cover_azimuth_deg.to_radians(),
            cover_area_m2: cover_area,
            cover_n: cover.refractive_index,
            cover_k_per_m: cover.extinction_per_m,
            cover_thickness_m: cover.thickness_mm / 1000.0,
            soiling_transmittance: DEFAULT_SOILING_TRANSMITTANCE,
            condensate_drops: cover.condensate == Condensate::Drops,
            liner_absorptance: liner.absorptance,
            depth_m,
            switches: OpticsSwitches {
                angle_reflection: sw.angle_reflection,
                soiling: sw.soiling,
                condensate: sw.condensate_film,
                walls: sw.wall_shading,
            },
        };
        let back_wall_mm = k.back_wall_mm(w);
        Ok(SteppedStill {
            net,
            cover: cover_n,
            brine,
            steps,
            walls,
            air,
            sky,
            ground,
            cover_to_air,
            side_links,
            side_layers: side_layers_all,
            optics,
            section,
            wetted_risers: k.wetted_risers,
            cover_area_m2: cover_area,
            footprint_m2: footprint,
            evaporating_m2: evaporating,
            tilt_rad: tilt,
            plane: Plane::from_degrees(k.cover_tilt_deg, variant.cover_azimuth_deg),
            cover_height_m: (0.5 * (k.front_wall_mm + back_wall_mm) / 1000.0)
                .max(MIN_COVER_HEIGHT_M),
            plate_length_m: cover_area / (2.0 * (w / tilt.cos() + l)),
            set_brine_kg,
            details: KindDetails::Stepped {
                trays: k.trays,
                tread_mm: k.tread_m(w) * 1000.0,
                riser_mm: k.riser_mm,
                tray_depth_mm: k.tray_depth_mm,
                cover_tilt_deg: k.cover_tilt_deg,
                mean_gap_mm: section.mean_gap_m() * 1000.0,
                evaporating_per_footprint: evaporating / footprint,
                wetted_risers: k.wetted_risers,
                base_u_w_m2_k: u_base,
            },
        })
    }

    /// The stair section used for the inside light shares.
    pub fn section(&self) -> &StairSection {
        &self.section
    }
}

impl StillModel for SteppedStill {
    fn network(&self) -> &Network {
        &self.net
    }

    fn planes(&self) -> Vec<(Plane, f64)> {
        vec![(self.plane, self.cover_area_m2)]
    }

    fn brine_node(&self) -> NodeId {
        self.brine
    }

    fn basin(&self) -> Option<Basin> {
        Some(Basin {
            node: self.brine,
            area_m2: self.footprint_m2,
            set_kg: self.set_brine_kg,
        })
    }

    fn cover_node(&self) -> NodeId {
        self.cover
    }

    fn liner_node(&self) -> Option<NodeId> {
        Some(self.steps)
    }

    fn walls_node(&self) -> Option<NodeId> {
        self.walls
    }

    fn footprint_m2(&self) -> f64 {
        self.footprint_m2
    }

    fn aperture_m2(&self) -> f64 {
        self.cover_area_m2
    }

    fn evaporating_m2(&self) -> f64 {
        self.evaporating_m2
    }

    fn set_brine_kg(&self) -> f64 {
        self.set_brine_kg
    }

    fn details(&self) -> KindDetails {
        self.details.clone()
    }

    /// Cover optics through [`StillOptics::through_cover`]; inside, [`stair_beam_shares`] and
    /// [`stair_diffuse_shares`] send the light to the tray surfaces (then
    /// [`StillOptics::into_brine`]), to the risers (absorbed with the liner's absorptance,
    /// into the brine when they are wetted, into the steps otherwise) or to the walls.
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
        inputs.set_boundary_k(net, self.ground, ctx.ground_k)?;
        let t_cover = state.temperature_k(self.cover).unwrap_or(t_air);
        let h_out = cover_outside_coefficient_w_m2_k(
            h.wind_m_s,
            h.wind_height_m,
            t_air,
            t_cover,
            self.cover_height_m,
            self.tilt_rad,
            self.plate_length_m,
        );
        inputs.set_conductance_w_k(net, self.cover_to_air, h_out * self.cover_area_m2)?;
        let u_side = conduction_layers_u_w_m2_k(&self.side_layers, h_out).unwrap_or(0.0);
        for &(id, area) in &self.side_links {
            inputs.set_conductance_w_k(net, id, u_side * area)?;
        }

        let mut split = SunlightSplit::default();
        if let Some(poa) = ctx.poa.first() {
            let o = &self.optics;
            let through = o.through_cover(poa);
            if through.incident_w > 0.0 {
                let all_in = InsideShares {
                    water: 1.0,
                    ..InsideShares::default()
                };
                let (sb, sd) = if o.switches.walls {
                    (
                        stair_beam_shares(&self.section, h.sun, o.cover_azimuth_rad),
                        stair_diffuse_shares(&self.section),
                    )
                } else {
                    (all_in, all_in)
                };
                let water_beam = through.entering_beam_w * sb.water;
                let water_diffuse = through.entering_diffuse_w * sd.water;
                let on_risers =
                    through.entering_beam_w * sb.risers + through.entering_diffuse_w * sd.risers;
                let on_walls =
                    (through.entering_w() - water_beam - water_diffuse - on_risers).max(0.0);
                let (brine_w, floor_w) = o.into_brine(water_beam, water_diffuse, h.sun);
                let risers_w = on_risers * o.liner_absorptance;
                let (to_brine, to_steps) = if self.wetted_risers {
                    (brine_w + risers_w, floor_w)
                } else {
                    (brine_w, floor_w + risers_w)
                };
                let walls_w = on_walls * o.liner_absorptance;
                split = SunlightSplit {
                    incident_w: through.incident_w,
                    entering_w: through.entering_w(),
                    cover_w: through.cover_w,
                    brine_w: to_brine,
                    liner_w: to_steps,
                    walls_w,
                    lost_w: through.incident_w - through.cover_w - to_brine - to_steps - walls_w,
                };
            }
        }
        inputs.set_source_w(net, self.cover, split.cover_w)?;
        inputs.set_source_w(net, self.brine, split.brine_w)?;
        inputs.set_source_w(net, self.steps, split.liner_w)?;
        if let Some(wn) = self.walls {
            inputs.set_source_w(net, wn, split.walls_w)?;
        }
        Ok(split)
    }
}
