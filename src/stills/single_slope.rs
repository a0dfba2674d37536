//! The single-slope basin still as a thermal network. No solver code here: this module
//! only turns a design into nodes, links and hourly inputs for [`crate::network`].
//!
//! Nodes: cover, brine (water node), liner (a thin steel tray, or a masonry floor with its
//! large capacity), and — unless both wall interception and side losses are switched off —
//! the inner walls above the brine. Boundaries: ambient air, sky, ground (the month's mean
//! air temperature, common practice, no source).

use super::materials::Materials;
use std::sync::Arc;

use super::sunlight::{
    Enclosure, OpticsSwitches, StillOptics, SunlightSplit, condensate_collection_factor,
};
use super::{Basin, HourContext, KindDetails, StillModel};
use crate::climate::Plane;
use crate::design::{
    BasinKind, Condensate, InternalCorrelation as DesignCorrelation, Library, LossSwitches,
    SingleSlope, Variant,
};
use crate::error::Error;
use crate::network::{
    BoundaryId, CorrelationEnclosure, Inputs, LinkId, LossPath, Network, NetworkBuilder,
    NetworkError, NodeId, State,
};
use crate::physics::heat_transfer::{
    EnclosureAir, InternalCorrelation, KUMAR_TIWARI_PASSIVE_C, KUMAR_TIWARI_PASSIVE_N,
    combined_convection_w_m2_k, conduction_layers_u_w_m2_k, natural_convection_tilted_plate_w_m2_k,
    wind_convection_watmuff_w_m2_k, wind_speed_at_height_m_s,
};
use crate::physics::optics::effective_emissivity_parallel;
use crate::physics::sky::{
    berdahl_martin_sky_emissivity, sky_temperature_from_emissivity_k, swinbank_sky_temperature_k,
};
use crate::physics::{humid_air, water};

/// Volumetric heat capacity of a cover, glass or plastic [J m⁻³ K⁻¹]. Common practice, no
/// source: glass ≈ 2500 kg/m³ × 840 J/kg K = 2.1e6, polycarbonate ≈ 1200 × 1200 = 1.4e6.
pub const COVER_VOLUMETRIC_HEAT_J_M3_K: f64 = 2.0e6;
/// Steel ρ·c = 7850 kg/m³ × 500 J/kg K [J m⁻³ K⁻¹] (common practice, no source).
pub const STEEL_VOLUMETRIC_HEAT_J_M3_K: f64 = 3.9e6;
/// Concrete ρ·c = 2300 kg/m³ × 880 J/kg K [J m⁻³ K⁻¹] (common practice, no source).
pub const CONCRETE_VOLUMETRIC_HEAT_J_M3_K: f64 = 2.0e6;
/// Concrete conductivity [W m⁻¹ K⁻¹] (common practice, no source).
pub const CONCRETE_CONDUCTIVITY_W_M_K: f64 = 1.4;
/// Liner-to-brine convection coefficient [W m⁻² K⁻¹]: Malik, Tiwari, Kumar & Sodha (1982)
/// give an order of 100–300 (REFERENCES.md §1, from memory, low confidence); 150 is taken.
pub const LINER_TO_BRINE_W_M2_K: f64 = 150.0;
/// Film coefficient under the base, to the ground [W m⁻² K⁻¹]: the 5.7 of REFERENCES.md §2
/// (from memory).
pub const BASE_FILM_W_M2_K: f64 = 5.7;
/// Overall coefficient from the basin floor down to the ground [W m⁻² K⁻¹]: the floor's own
/// lower half (`floor` as (thickness [m], conductivity [W m⁻¹ K⁻¹]), for a masonry basin), the
/// insulation `layers`, and the [`BASE_FILM_W_M2_K`] film, in series
/// ([`conduction_layers_u_w_m2_k`]).
pub(crate) fn base_u_w_m2_k(
    variant: &str,
    floor: Option<(f64, f64)>,
    layers: &[(f64, f64)],
) -> Result<f64, Error> {
    let all: Vec<(f64, f64)> = floor.into_iter().chain(layers.iter().copied()).collect();
    conduction_layers_u_w_m2_k(&all, BASE_FILM_W_M2_K).ok_or_else(|| Error::Model {
        variant: variant.to_owned(),
        at: String::new(),
        reason: "base insulation layers give no finite conductance".to_owned(),
    })
}

/// Free convection between the inner walls and the cover through the enclosure air
/// [W m⁻² K⁻¹]. Common practice, no source.
pub const WALL_TO_COVER_CONVECTION_W_M2_K: f64 = 2.5;
/// View factor from the inner walls to the cover used for their radiation exchange [-].
/// A stated simplification (no source): the walls see the cover and the brine about equally.
pub const WALL_TO_COVER_VIEW: f64 = 0.5;
/// Long-wave emissivity of water (REFERENCES.md §3, ≈ 0.95, from memory).
pub const WATER_EMISSIVITY: f64 = 0.95;
/// Roughness length of the ground around the still \[m\]: open country (Stull 1988, from
/// memory, as in [`wind_speed_at_height_m_s`]).
pub const SITE_ROUGHNESS_M: f64 = 0.03;
/// Lowest height at which the wind on the cover is evaluated \[m\] (common practice, no
/// source: a still stands on a low plinth).
pub const MIN_COVER_HEIGHT_M: f64 = 0.3;

/// A single-slope basin still, built and ready to run.
#[derive(Debug, Clone)]
pub struct SingleSlopeStill {
    net: Network,
    cover: NodeId,
    brine: NodeId,
    liner: NodeId,
    walls: Option<NodeId>,
    air: BoundaryId,
    sky: BoundaryId,
    ground: BoundaryId,
    cover_to_air: LinkId,
    side_links: Vec<(LinkId, f64)>,
    side_layers: Vec<(f64, f64)>,
    optics: StillOptics,
    cover_area_m2: f64,
    footprint_m2: f64,
    tilt_rad: f64,
    plane: Plane,
    cover_height_m: f64,
    plate_length_m: f64,
    set_brine_kg: f64,
    switches: LossSwitches,
    details: KindDetails,
}

pub(crate) fn net_error(variant: &str, e: &NetworkError) -> Error {
    Error::Model {
        variant: variant.to_owned(),
        at: String::new(),
        reason: format!("could not build the network: {e}"),
    }
}

/// Air properties of a basin still's humid enclosure, evaluated once at a 50 °C film half
/// saturated with vapour (common practice, no source), with the site's total pressure
/// `pressure_pa` \[Pa\] and the mean brine-to-cover gap `gap_m` \[m\] (at least 10 mm) as the
/// characteristic length.
pub fn enclosure_air(pressure_pa: f64, gap_m: f64) -> EnclosureAir {
    let t_film_k = 323.15;
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
        characteristic_length_m: gap_m.max(0.01),
    }
}

/// The physics correlation for a design's choice, with the cover tilt `tilt_rad` \[rad\]
/// for Hollands' inclined enclosure (capped at its 75° validity limit).
pub fn internal_correlation(choice: DesignCorrelation, tilt_rad: f64) -> InternalCorrelation {
    match choice {
        DesignCorrelation::Dunkle => InternalCorrelation::Dunkle,
        DesignCorrelation::KumarTiwari => InternalCorrelation::KumarTiwari {
            c: KUMAR_TIWARI_PASSIVE_C,
            n: KUMAR_TIWARI_PASSIVE_N,
        },
        DesignCorrelation::InclinedEnclosure => InternalCorrelation::InclinedEnclosure {
            tilt_rad: tilt_rad.clamp(0.0, 75f64.to_radians()),
        },
    }
}

/// Sky temperature for one record \[K\]: Berdahl & Martin's emissivity from the dew point
/// when it comes from data, Swinbank's relation otherwise.
pub fn sky_temperature_k(h: &crate::climate::HourlyWeather, dew_point_known: bool) -> f64 {
    if dew_point_known {
        sky_temperature_from_emissivity_k(berdahl_martin_sky_emissivity(h.t_dew_k), h.t_air_k)
    } else {
        swinbank_sky_temperature_k(h.t_air_k)
    }
}

/// A cover's outside convection coefficient for one hour [W m⁻² K⁻¹]: Watmuff et al.'s
/// wind coefficient ([`wind_convection_watmuff_w_m2_k`]) at the wind speed brought from the
/// measurement height `wind_height_m` \[m\] to the cover's mean height `cover_height_m` \[m\]
/// by the log law ([`wind_speed_at_height_m_s`]), combined by the cube sum
/// ([`combined_convection_w_m2_k`]) with free convection of a plate of length
/// `plate_length_m` \[m\] at tilt `tilt_rad` \[rad\]
/// ([`natural_convection_tilted_plate_w_m2_k`]) at the cover temperature `t_cover_k` \[K\]
/// given (lagged by the caller); `wind_m_s` [m s⁻¹], `t_air_k` \[K\].
pub fn cover_outside_coefficient_w_m2_k(
    wind_m_s: f64,
    wind_height_m: f64,
    t_air_k: f64,
    t_cover_k: f64,
    cover_height_m: f64,
    tilt_rad: f64,
    plate_length_m: f64,
) -> f64 {
    let v = wind_speed_at_height_m_s(wind_m_s, wind_height_m, cover_height_m, SITE_ROUGHNESS_M);
    let forced = wind_convection_watmuff_w_m2_k(v);
    let t_film = 0.5 * (t_air_k + t_cover_k);
    let mu = humid_air::dry_air_viscosity_pa_s(t_film);
    let k_air = humid_air::dry_air_thermal_conductivity_w_m_k(t_film);
    let rho = 101_325.0 * crate::physics::constants::MOLAR_MASS_AIR_KG_MOL
        / (crate::physics::constants::GAS_CONSTANT_J_MOL_K * t_film);
    let natural = natural_convection_tilted_plate_w_m2_k(
        t_cover_k,
        t_air_k,
        tilt_rad,
        plate_length_m,
        k_air,
        mu / rho,
        mu * humid_air::DRY_AIR_SPECIFIC_HEAT_J_KG_K / k_air,
    );
    combined_convection_w_m2_k(forced, natural)
}

impl SingleSlopeStill {
    /// Build the still of `variant` (whose kind is `k`) with materials from `lib`, at a site
    /// of total pressure `pressure_pa` \[Pa\].
    ///
    /// Errors are [`Error::Model`]: a validated design always names materials that exist, so
    /// a failure here is a model problem, not an input one.
    pub fn new(
        variant: &Variant,
        k: &SingleSlope,
        lib: &Library,
        pressure_pa: f64,
    ) -> Result<Self, Error> {
        let name = variant.name.as_str();
        let m = Materials::new(variant, lib);
        let cover = m.cover("the cover", &variant.cover)?;
        let liner = m.surface("the liner", &k.liner)?;
        let base_layers = m.layers(&k.base_insulation, "base_insulation")?;
        let side_layers = m.layers(&k.side_insulation, "side_insulation")?;
        let sw = k.losses.effective();

        let w = variant.width_m;
        let l = variant.length_m;
        let footprint = w * l;
        let tilt = k.cover_tilt_deg.to_radians();
        let cover_area = footprint / tilt.cos();
        let depth_m = k.brine_depth_mm / 1000.0;
        let geom = Enclosure {
            width_m: w,
            length_m: l,
            tilt_rad: tilt,
            front_above_brine_m: (k.front_wall_mm / 1000.0 - depth_m).max(0.0),
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
        let wall_area = geom.wall_area_m2();

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
        let liner_n = b.node("liner", basin_rho_c * basin_t_m * footprint);
        let walls = with_walls.then(|| b.node("walls", basin_rho_c * basin_t_m * wall_area));

        // Outside of the cover: convection (set every hour) and long-wave radiation to sky
        // and ground with view factors (1 ± cos β)/2.
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
        // The ground around the still is taken at the air temperature (stated simplification).
        b.radiation(
            "cover to ground",
            cover_n,
            air,
            cover_area * cover.emissivity * 0.5 * (1.0 - tilt.cos()),
            LossPath::CoverToAir,
        );

        // Inside: humid enclosure on the evaporating area, radiation brine → cover.
        let air_props = enclosure_air(pressure_pa, geom.mean_gap_m());
        let correlation = internal_correlation(k.internal_correlation, tilt);
        b.enclosure(
            "brine to cover",
            brine,
            cover_n,
            footprint,
            Arc::new(CorrelationEnclosure {
                correlation,
                air: air_props,
            }),
            if sw.drip_back {
                k.collection_efficiency
                    * condensate_collection_factor(cover.condensate == Condensate::Drops)
            } else {
                1.0
            },
            if sw.leakage { k.vapour_leakage } else { 0.0 },
        );
        b.radiation(
            "brine to cover radiation",
            brine,
            cover_n,
            footprint * effective_emissivity_parallel(WATER_EMISSIVITY, cover.emissivity),
            LossPath::Internal,
        );
        b.conductance(
            "liner to brine",
            liner_n,
            brine,
            LINER_TO_BRINE_W_M2_K * footprint,
            LossPath::Internal,
        );

        // Base: (masonry: half the floor) + insulation + film, to the ground.
        let floor = (k.basin == BasinKind::Masonry).then_some((0.5 * basin_t_m, basin_k));
        let u_base = base_u_w_m2_k(name, floor, &base_layers)?;
        b.conductance("base", liner_n, ground, u_base * footprint, LossPath::Base);

        // Sides: brine (wetted walls) and walls to air through the side insulation; walls to
        // cover by radiation and convection.
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
            let eps_liner = liner.emissivity;
            b.radiation(
                "walls to cover radiation",
                wn,
                cover_n,
                wall_area
                    * WALL_TO_COVER_VIEW
                    * effective_emissivity_parallel(eps_liner, cover.emissivity),
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
            geom,
            cover_azimuth_rad: variant.cover_azimuth_deg.to_radians(),
            cover_area_m2: cover_area,
            cover_n: cover.refractive_index,
            cover_k_per_m: cover.extinction_per_m,
            cover_thickness_m: cover.thickness_mm / 1000.0,
            soiling_transmittance: k.soiling_transmittance,
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
        let u_side = conduction_layers_u_w_m2_k(&side_layers_all, f64::INFINITY).unwrap_or(0.0);
        Ok(SingleSlopeStill {
            net,
            cover: cover_n,
            brine,
            liner: liner_n,
            walls,
            air,
            sky,
            ground,
            cover_to_air,
            side_links,
            side_layers: side_layers_all,
            optics,
            cover_area_m2: cover_area,
            footprint_m2: footprint,
            tilt_rad: tilt,
            plane: Plane::from_degrees(k.cover_tilt_deg, variant.cover_azimuth_deg),
            cover_height_m: (0.5 * (k.front_wall_mm + back_wall_mm) / 1000.0)
                .max(MIN_COVER_HEIGHT_M),
            plate_length_m: cover_area / (2.0 * (w / tilt.cos() + l)),
            set_brine_kg,
            switches: sw,
            details: KindDetails::SingleSlope {
                front_wall_mm: k.front_wall_mm,
                back_wall_mm,
                cover_tilt_deg: k.cover_tilt_deg,
                brine_depth_mm: k.brine_depth_mm,
                base_u_w_m2_k: u_base,
                side_u_inner_w_m2_k: u_side,
                wall_area_m2: if with_walls { wall_area } else { 0.0 },
                ideal: sw == LossSwitches::ideal(),
            },
        })
    }

    /// The cover's outside convection coefficient for one hour [W m⁻² K⁻¹]: Watmuff et al.'s
    /// wind coefficient ([`wind_convection_watmuff_w_m2_k`]) at the wind speed brought from
    /// the measurement height to the cover's mean height by the log law
    /// ([`wind_speed_at_height_m_s`]), combined by the cube sum
    /// ([`combined_convection_w_m2_k`]) with free convection of a tilted plate
    /// ([`natural_convection_tilted_plate_w_m2_k`]) evaluated at the cover temperature at the
    /// start of the hour (lagged, so the conductance is fixed within the hour).
    pub fn outside_coefficient_w_m2_k(
        &self,
        wind_m_s: f64,
        wind_height_m: f64,
        t_air_k: f64,
        t_cover_k: f64,
    ) -> f64 {
        cover_outside_coefficient_w_m2_k(
            wind_m_s,
            wind_height_m,
            t_air_k,
            t_cover_k,
            self.cover_height_m,
            self.tilt_rad,
            self.plate_length_m,
        )
    }

    /// The loss switches in force.
    pub fn switches(&self) -> LossSwitches {
        self.switches
    }

    /// The optics used for the sunlight split.
    pub fn optics(&self) -> &StillOptics {
        &self.optics
    }
}

impl StillModel for SingleSlopeStill {
    fn network(&self) -> &Network {
        &self.net
    }

    fn brine_node(&self) -> NodeId {
        self.brine
    }

    fn cover_node(&self) -> NodeId {
        self.cover
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
        self.cover_area_m2
    }

    fn basin(&self) -> Option<Basin> {
        Some(Basin {
            node: self.brine,
            area_m2: self.footprint_m2,
            set_kg: self.set_brine_kg,
        })
    }

    fn planes(&self) -> Vec<(Plane, f64)> {
        vec![(self.plane, self.cover_area_m2)]
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

    fn hour_inputs(
        &self,
        ctx: &HourContext<'_>,
        state: &State,
        inputs: &mut Inputs,
    ) -> Result<SunlightSplit, NetworkError> {
        let h = ctx.weather;
        let net = &self.net;
        let t_air = h.t_air_k;
        let t_sky = sky_temperature_k(h, ctx.dew_point_known);
        inputs.set_boundary_k(net, self.air, t_air)?;
        inputs.set_boundary_k(net, self.sky, t_sky)?;
        inputs.set_boundary_k(net, self.ground, ctx.ground_k)?;
        let t_cover = state.temperature_k(self.cover).unwrap_or(t_air);
        let h_out = self.outside_coefficient_w_m2_k(h.wind_m_s, h.wind_height_m, t_air, t_cover);
        inputs.set_conductance_w_k(net, self.cover_to_air, h_out * self.cover_area_m2)?;
        let u_side = conduction_layers_u_w_m2_k(&self.side_layers, h_out).unwrap_or(0.0);
        for &(id, area) in &self.side_links {
            inputs.set_conductance_w_k(net, id, u_side * area)?;
        }
        // The depth split uses the brine actually in the basin, not the set depth.
        let mut optics = self.optics;
        if let (Some(m), Some(salt)) = (state.brine_kg(self.brine), state.salt_kg(self.brine)) {
            optics.depth_m = crate::operation::depth_mm(m, salt, self.footprint_m2) / 1000.0;
        }
        let split = optics.split(&ctx.poa[0], h.sun);
        inputs.set_source_w(net, self.cover, split.cover_w)?;
        inputs.set_source_w(net, self.brine, split.brine_w)?;
        inputs.set_source_w(net, self.liner, split.liner_w)?;
        if let Some(wn) = self.walls {
            inputs.set_source_w(net, wn, split.walls_w)?;
        }
        Ok(split)
    }
}
