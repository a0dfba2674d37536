//! The double-slope basin still as a thermal network: two cover faces of equal tilt facing
//! opposite ways over one basin. No solver code here.
//!
//! Nodes: near face ("cover", the face whose azimuth the design gives), far face
//! ("far cover"), brine (water node), liner, and — unless wall interception and side losses
//! are both off — the inner walls (side walls and gable ends). Boundaries: ambient air, sky,
//! ground.
//!
//! How the brine shares itself between the faces (a stated rule, no source): each face
//! spans half the basin in plan, so the brine exchanges heat and vapour with each face over
//! half the evaporating area, through its own enclosure link driven by that face's own
//! temperature. The cooler (shaded) face then draws the larger share by itself, since the
//! convective and evaporative fluxes grow with the brine-to-face difference. Long-wave
//! radiation likewise goes half to each face.

use super::materials::Materials;
use std::sync::Arc;

use super::single_slope::{
    CONCRETE_CONDUCTIVITY_W_M_K, CONCRETE_VOLUMETRIC_HEAT_J_M3_K, COVER_VOLUMETRIC_HEAT_J_M3_K,
    LINER_TO_BRINE_W_M2_K, MIN_COVER_HEIGHT_M, STEEL_VOLUMETRIC_HEAT_J_M3_K,
    WALL_TO_COVER_CONVECTION_W_M2_K, WALL_TO_COVER_VIEW, WATER_EMISSIVITY, base_u_w_m2_k,
    cover_outside_coefficient_w_m2_k, enclosure_air, internal_correlation, net_error,
    sky_temperature_k,
};
use super::sunlight::{
    Enclosure, GableSection, InsideShares, OpticsSwitches, StillOptics, SunlightSplit,
    gable_beam_shares, gable_diffuse_shares,
};
use super::{Basin, HourContext, KindDetails, StillModel};
use crate::climate::Plane;
use crate::design::{
    BasinKind, Condensate, DEFAULT_SOILING_TRANSMITTANCE, DoubleSlope, Library, LossSwitches,
    Variant,
};
use crate::error::Error;
use crate::network::{
    BoundaryId, CorrelationEnclosure, Inputs, LinkId, LossPath, Network, NetworkBuilder,
    NetworkError, NodeId, State,
};
use crate::physics::heat_transfer::conduction_layers_u_w_m2_k;
use crate::physics::optics::effective_emissivity_parallel;

/// A double-slope basin still, built and ready to run.
#[derive(Debug, Clone)]
pub struct DoubleSlopeStill {
    net: Network,
    covers: [NodeId; 2],
    brine: NodeId,
    liner: NodeId,
    walls: Option<NodeId>,
    air: BoundaryId,
    sky: BoundaryId,
    ground: BoundaryId,
    cover_to_air: [LinkId; 2],
    side_links: Vec<(LinkId, f64)>,
    side_layers: Vec<(f64, f64)>,
    optics: [StillOptics; 2],
    section: GableSection,
    face_area_m2: f64,
    footprint_m2: f64,
    tilt_rad: f64,
    planes: [Plane; 2],
    cover_height_m: f64,
    plate_length_m: f64,
    set_brine_kg: f64,
    switches: LossSwitches,
    details: KindDetails,
}

impl DoubleSlopeStill {
    /// Build the still of `variant` (kind `k`) with materials from `lib` at a site of total
    /// pressure `pressure_pa` \[Pa\]. The loss switches are all on and the cover's dust is
    /// [`DEFAULT_SOILING_TRANSMITTANCE`] (the kind has no fields for them).
    ///
    /// Errors are [`Error::Model`] (a validated design names materials that exist).
    pub fn new(
        variant: &Variant,
        k: &DoubleSlope,
        lib: &Library,
        pressure_pa: f64,
    ) -> Result<Self, Error> {
        Self::with_switches(variant, k, lib, pressure_pa, LossSwitches::default())
    }

    /// As [`DoubleSlopeStill::new`] with the loss switches `sw` given (tests and studies).
    pub fn with_switches(
        variant: &Variant,
        k: &DoubleSlope,
        lib: &Library,
        pressure_pa: f64,
        sw: LossSwitches,
    ) -> Result<Self, Error> {
        let name = variant.name.as_str();
        let m = Materials::new(variant, lib);
        let cover = m.cover("the cover", &variant.cover)?;
        let liner = m.surface("the liner", &k.liner)?;
        let base_layers = m.layers(&k.base_insulation, "base_insulation")?;
        let side_layers = m.layers(&k.side_insulation, "side_insulation")?;
        let sw = sw.effective();

        let w = variant.width_m;
        let l = variant.length_m;
        let footprint = w * l;
        let tilt = k.cover_tilt_deg.to_radians();
        let face_area = 0.5 * footprint / tilt.cos();
        let depth_m = k.brine_depth_mm / 1000.0;
        let section = GableSection {
            width_m: w,
            length_m: l,
            tilt_rad: tilt,
            eave_above_brine_m: (k.side_wall_mm / 1000.0 - depth_m).max(0.0),
        };
        let basin_t_m = k
            .basin_thickness_mm
            .unwrap_or_else(|| k.basin.default_thickness_mm())
            / 1000.0;
        let (basin_rho_c, basin_k) = match k.basin {
            BasinKind::MetalTray => (STEEL_VOLUMETRIC_HEAT_J_M3_K, 50.0),
            BasinKind::Masonry => (CONCRETE_VOLUMETRIC_HEAT_J_M3_K, CONCRETE_CONDUCTIVITY_W_M_K),
        };
        let with_walls = sw.wall_shading || sw.side_losses;
        let wall_area = section.wall_area_m2();

        let mut b = NetworkBuilder::new();
        let air = b.boundary("ambient air");
        let sky = b.boundary("sky");
        let ground = b.boundary("ground");
        let c_cover = COVER_VOLUMETRIC_HEAT_J_M3_K * cover.thickness_mm / 1000.0 * face_area;
        let near = b.node("cover", c_cover);
        let far = b.node("far cover", c_cover);
        let set_brine_kg = depth_m * footprint * 1000.0;
        let brine = b.water_node("brine", 0.0, 0.01 * set_brine_kg);
        let liner_n = b.node("liner", basin_rho_c * basin_t_m * footprint);
        let walls = with_walls.then(|| b.node("walls", basin_rho_c * basin_t_m * wall_area));

        let air_props = enclosure_air(pressure_pa, section.mean_gap_m());
        let correlation = internal_correlation(k.internal_correlation, tilt);
        let eps_in = effective_emissivity_parallel(WATER_EMISSIVITY, cover.emissivity);
        let mut cover_to_air = Vec::with_capacity(2);
        for (node, label) in [(near, "cover"), (far, "far cover")] {
            cover_to_air.push(b.conductance(
                &format!("{label} to air"),
                node,
                air,
                face_area * 10.0,
                LossPath::CoverToAir,
            ));
            b.radiation(
                &format!("{label} to sky"),
                node,
                sky,
                face_area * cover.emissivity * 0.5 * (1.0 + tilt.cos()),
                LossPath::CoverToSky,
            );
            // The ground around the still is taken at the air temperature, as for the
            // single slope.
            b.radiation(
                &format!("{label} to ground"),
                node,
                air,
                face_area * cover.emissivity * 0.5 * (1.0 - tilt.cos()),
                LossPath::CoverToAir,
            );
            b.enclosure(
                &format!("brine to {label}"),
                brine,
                node,
                0.5 * footprint,
                Arc::new(CorrelationEnclosure {
                    correlation,
                    air: air_props,
                }),
                if sw.drip_back {
                    k.collection_efficiency
                } else {
                    1.0
                },
                if sw.leakage { k.vapour_leakage } else { 0.0 },
            );
            b.radiation(
                &format!("brine to {label} radiation"),
                brine,
                node,
                0.5 * footprint * eps_in,
                LossPath::Internal,
            );
        }
        b.conductance(
            "liner to brine",
            liner_n,
            brine,
            LINER_TO_BRINE_W_M2_K * footprint,
            LossPath::Internal,
        );
        let floor = (k.basin == BasinKind::Masonry).then_some((0.5 * basin_t_m, basin_k));
        let u_base = base_u_w_m2_k(name, floor, &base_layers)?;
        b.conductance("base", liner_n, ground, u_base * footprint, LossPath::Base);

        let mut side_links = Vec::new();
        let mut side_layers_all = vec![(basin_t_m, basin_k)];
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
            let eps = effective_emissivity_parallel(liner.emissivity, cover.emissivity);
            for (node, label) in [(near, "cover"), (far, "far cover")] {
                b.radiation(
                    &format!("walls to {label} radiation"),
                    wn,
                    node,
                    0.5 * wall_area * WALL_TO_COVER_VIEW * eps,
                    LossPath::Internal,
                );
                b.conductance(
                    &format!("walls to {label} convection"),
                    wn,
                    node,
                    0.5 * WALL_TO_COVER_CONVECTION_W_M2_K * wall_area,
                    LossPath::Internal,
                );
            }
        }
        let net = b.build().map_err(|e| net_error(name, &e))?;

        let az = variant.cover_azimuth_deg.to_radians();
        let az_far = (az + std::f64::consts::PI).rem_euclid(std::f64::consts::TAU);
        let face_optics = |azimuth: f64| StillOptics {
            // Only the tilt of this geometry is used by the cover optics; the inside shares
            // come from the gable section.
            geom: Enclosure {
                width_m: 0.5 * w,
                length_m: l,
                tilt_rad: tilt,
                front_above_brine_m: section.eave_above_brine_m,
            },
            cover_azimuth_rad: azimuth,
            cover_area_m2: face_area,
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
        let ridge_mm = k.ridge_mm(w);
        let far_az_deg = (variant.cover_azimuth_deg + 180.0).rem_euclid(360.0);
        Ok(DoubleSlopeStill {
            net,
            covers: [near, far],
            brine,
            liner: liner_n,
            walls,
            air,
            sky,
            ground,
            cover_to_air: [cover_to_air[0], cover_to_air[1]],
            side_links,
            side_layers: side_layers_all,
            optics: [face_optics(az), face_optics(az_far)],
            section,
            face_area_m2: face_area,
            footprint_m2: footprint,
            tilt_rad: tilt,
            planes: [
                Plane::from_degrees(k.cover_tilt_deg, variant.cover_azimuth_deg),
                Plane::from_degrees(k.cover_tilt_deg, far_az_deg),
            ],
            cover_height_m: (0.5 * (k.side_wall_mm + ridge_mm) / 1000.0).max(MIN_COVER_HEIGHT_M),
            plate_length_m: face_area / (w / tilt.cos() + 2.0 * l),
            set_brine_kg,
            switches: sw,
            details: KindDetails::DoubleSlope {
                side_wall_mm: k.side_wall_mm,
                ridge_mm,
                cover_tilt_deg: k.cover_tilt_deg,
                face_azimuths_deg: [variant.cover_azimuth_deg, far_az_deg],
                brine_depth_mm: k.brine_depth_mm,
                mean_gap_mm: section.mean_gap_m() * 1000.0,
                base_u_w_m2_k: u_base,
                wall_area_m2: if with_walls { wall_area } else { 0.0 },
            },
        })
    }

    /// The two cover nodes: the face the design names, then the far face.
    pub fn cover_nodes(&self) -> [NodeId; 2] {
        self.covers
    }

    /// The loss switches in force.
    pub fn switches(&self) -> LossSwitches {
        self.switches
    }

    /// The gable section used for the inside light shares.
    pub fn section(&self) -> &GableSection {
        &self.section
    }
}

impl StillModel for DoubleSlopeStill {
    fn network(&self) -> &Network {
        &self.net
    }

    fn planes(&self) -> Vec<(Plane, f64)> {
        vec![
            (self.planes[0], self.face_area_m2),
            (self.planes[1], self.face_area_m2),
        ]
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
        self.covers[0]
    }

    fn liner_node(&self) -> Option<NodeId> {
        Some(self.liner)
    }

    fn walls_node(&self) -> Option<NodeId> {
        self.walls
    }

    fn footprint_m2(&self) -> f64 {
        self.footprint_m2
    }

    fn aperture_m2(&self) -> f64 {
        2.0 * self.face_area_m2
    }

    fn evaporating_m2(&self) -> f64 {
        self.footprint_m2
    }

    fn set_brine_kg(&self) -> f64 {
        self.set_brine_kg
    }

    fn details(&self) -> KindDetails {
        self.details.clone()
    }

    /// Each face: its own outside coefficient (at its own lagged temperature) and its own
    /// plane-of-array sunlight through [`StillOptics::through_cover`]; inside, the
    /// [`gable_beam_shares`] and [`gable_diffuse_shares`] send the entering light to the
    /// brine (then [`StillOptics::into_brine`]), to the walls (absorbed with the liner's
    /// absorptance) or across to the far face, which absorbs
    /// [`StillOptics::far_cover_absorptance`] of it and lets the rest out.
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
        let mut h_sum = 0.0;
        for (i, &node) in self.covers.iter().enumerate() {
            let t_cover = state.temperature_k(node).unwrap_or(t_air);
            let h_out = cover_outside_coefficient_w_m2_k(
                h.wind_m_s,
                h.wind_height_m,
                t_air,
                t_cover,
                self.cover_height_m,
                self.tilt_rad,
                self.plate_length_m,
            );
            h_sum += h_out;
            inputs.set_conductance_w_k(net, self.cover_to_air[i], h_out * self.face_area_m2)?;
        }
        let u_side = conduction_layers_u_w_m2_k(&self.side_layers, 0.5 * h_sum).unwrap_or(0.0);
        for &(id, area) in &self.side_links {
            inputs.set_conductance_w_k(net, id, u_side * area)?;
        }

        let mut total = SunlightSplit::default();
        let mut cover_w = [0.0; 2];
        for face in 0..2 {
            let other = 1 - face;
            let optics = &self.optics[face];
            let Some(poa) = ctx.poa.get(face) else {
                continue;
            };
            let through = optics.through_cover(poa);
            if through.incident_w <= 0.0 {
                continue;
            }
            let all_in = InsideShares {
                water: 1.0,
                ..InsideShares::default()
            };
            let (sb, sd) = if optics.switches.walls {
                (
                    gable_beam_shares(&self.section, h.sun, optics.cover_azimuth_rad),
                    gable_diffuse_shares(&self.section),
                )
            } else {
                (all_in, all_in)
            };
            let water_beam = through.entering_beam_w * sb.water;
            let water_diffuse = through.entering_diffuse_w * sd.water;
            let across =
                through.entering_beam_w * sb.far_cover + through.entering_diffuse_w * sd.far_cover;
            let on_walls = (through.entering_w() - water_beam - water_diffuse - across).max(0.0);
            let (brine_w, liner_w) = optics.into_brine(water_beam, water_diffuse, h.sun);
            let far_w = across * self.optics[other].far_cover_absorptance();
            cover_w[face] += through.cover_w;
            cover_w[other] += far_w;
            total.incident_w += through.incident_w;
            total.entering_w += through.entering_w();
            total.cover_w += through.cover_w + far_w;
            total.brine_w += brine_w;
            total.liner_w += liner_w;
            total.walls_w += on_walls * optics.liner_absorptance;
        }
        total.lost_w =
            total.incident_w - total.cover_w - total.brine_w - total.liner_w - total.walls_w;
        inputs.set_source_w(net, self.covers[0], cover_w[0])?;
        inputs.set_source_w(net, self.covers[1], cover_w[1])?;
        inputs.set_source_w(net, self.brine, total.brine_w)?;
        inputs.set_source_w(net, self.liner, total.liner_w)?;
        if let Some(wn) = self.walls {
            inputs.set_source_w(net, wn, total.walls_w)?;
        }
        Ok(total)
    }
}
