//! Still variants on the shared thermal network, and the result record every variant
//! returns.
//!
//! Each variant is a small builder ([`single_slope::SingleSlopeStill`]) that turns its design
//! into a [`crate::network::Network`] and, for each weather record, into that network's
//! [`crate::network::Inputs`] (boundary temperatures, absorbed sunlight, wind-dependent
//! conductances, feed). It implements [`StillModel`]; the driver in this module
//! ([`simulate_variant`]) runs any [`StillModel`] over the site's weather with the network's
//! one solver, books the energy balance day by day and fills a [`VariantResult`].
//!
//! Runs: with a monthly climate, each month's average day is repeated until the daily cycle
//! repeats (daily yield within [`RunOptions::periodic_yield_tol`] and the node temperatures
//! at midnight within [`RunOptions::periodic_temperature_tol_k`], and for a basin its depth
//! and salinity within [`RunOptions::periodic_depth_tol_mm`] and
//! [`RunOptions::periodic_salinity_tol`]); each month starts from where the month before
//! ended. With a weather file, the records run once in order. Each simulated day starts a
//! fresh energy balance; the brine (water and salt) carries over from day to day.
//!
//! Feeding is the driver's job: for a basin-type still an [`Operator`] (from the variant's
//! `[variant.operation]` table, see [`crate::operation`]) sets feed and drain at the start of
//! every control interval. Hours in which it acts are split into control intervals (default
//! [`crate::design::DEFAULT_CONTROL_INTERVAL_S`]); the network's `advance` is called once per
//! interval, so the energy balance books every interval of the day.

pub mod calibrated;
pub mod double_slope;
mod materials;
pub mod multi_effect;
pub mod render;
pub mod single_slope;
pub mod stepped;
pub mod sunlight;
pub mod weather;
pub mod wick;

use serde::Serialize;

use crate::climate::{HourlyWeather, Plane, SkyModel};
use crate::design::{LoadedDesign, Variant, VariantKind};
use crate::error::Error;
use crate::network::{
    EnergyBalance, Inputs, LossPath, Network, NetworkError, NodeId, Simulation, SolverSettings,
    State, StepControl,
};
use crate::operation::{BasinView, DayLog, MassBalance, Operation, OperationDay, Operator};
use crate::physics::constants::ZERO_CELSIUS_K;
use crate::physics::irradiance::PlaneIrradiance;
use crate::physics::water;
pub use calibrated::CalibratedModel;
pub use double_slope::DoubleSlopeStill;
pub use multi_effect::MultiEffectStill;
pub use single_slope::SingleSlopeStill;
pub use stepped::SteppedStill;
pub use sunlight::SunlightSplit;
pub use weather::{SiteWeather, preflight, site_weather};
pub use wick::WickStill;

/// Largest energy residual accepted, as a fraction of the absorbed sunlight (DESIGN.md:
/// 0.1 %).
pub const MAX_RESIDUAL_FRACTION: f64 = 1e-3;

/// Accuracy setting of the adaptive step: the largest temperature change of a node with
/// heat capacity in one step \[K\]. Halving it (and the step limits) changes every demo
/// month's daily yield by at most 0.22 % (measured; `tests/it/stills.rs` holds it under 1 %).
/// 4 K would halve the steps but lets a basin that runs dry each afternoon fall into a
/// two-day cycle that never repeats within the periodic-day tolerance.
pub const DEFAULT_MAX_CHANGE_K: f64 = 2.0;

/// Newton tolerance on each node's energy balance in still runs \[W\]: a milliwatt, a
/// millionth of the sunlight a square metre of still absorbs at noon, so the booked energy
/// residual stays orders of magnitude below its 0.1 % bound while Newton stops one iteration
/// earlier than at the network's generic 1 µW (measured with `benches/stills.rs`).
pub const STILL_NEWTON_TOLERANCE_W: f64 = 1e-3;

/// What a variant needs to know about one weather record.
#[derive(Debug, Clone, Copy)]
pub struct HourContext<'a> {
    /// The weather record.
    pub weather: &'a HourlyWeather,
    /// Irradiance on each of the model's cover planes, per m² of cover, in the order of
    /// [`StillModel::planes`] (one entry for most kinds, two for a double slope).
    pub poa: &'a [PlaneIrradiance],
    /// Ground temperature \[K\] (the month's mean air temperature).
    pub ground_k: f64,
    /// Whether the dew point comes from data.
    pub dew_point_known: bool,
    /// Feed salinity [g kg⁻¹].
    pub feed_salinity_g_kg: f64,
}

/// The basin of a basin-type still (single-slope, double-slope, stepped): the water node the
/// operator feeds, its plan area and its set depth. The driver, not the variant, decides when
/// and how much feed flows in.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Basin {
    /// The brine node.
    pub node: NodeId,
    /// Free-surface (plan) area of the brine \[m²\].
    pub area_m2: f64,
    /// Brine mass at the set depth \[kg\].
    pub set_kg: f64,
}

/// What an operator sees of a basin in `state`.
pub fn basin_view(state: &State, basin: &Basin) -> BasinView {
    let m = state.brine_kg(basin.node).unwrap_or(0.0);
    let salt = state.salt_kg(basin.node).unwrap_or(0.0);
    BasinView {
        brine_kg: m,
        liquid_kg: m - crate::operation::crust_kg(m, salt),
        depth_mm: crate::operation::depth_mm(m, salt, basin.area_m2),
        salinity_g_kg: crate::operation::dissolved_salinity_g_kg(m, salt),
    }
}

/// Water (brine less salt), dissolved salt and crust of a basin in `state` [kg].
fn basin_masses(state: &State, basin: &Basin) -> (f64, f64, f64) {
    let m = state.brine_kg(basin.node).unwrap_or(0.0);
    let salt = state.salt_kg(basin.node).unwrap_or(0.0);
    let crust = crate::operation::crust_kg(m, salt);
    (m - salt, salt - crust, crust)
}

/// A still variant as the driver sees it.
pub trait StillModel {
    /// The network.
    fn network(&self) -> &Network;
    /// The planes that admit sunlight, each with its cover area \[m²\]; the driver transposes
    /// the weather onto each once per run and hands the results over in [`HourContext::poa`].
    fn planes(&self) -> Vec<(Plane, f64)>;
    /// The water node reported as "brine" (the hottest evaporating surface: the basin brine,
    /// the wick, or a multi-effect still's first stage).
    fn brine_node(&self) -> NodeId;
    /// The basin the operator keeps topped up, for basin-type stills; `None` for stills fed by
    /// a continuous flow (wick, multi-effect), which set their own feed in `hour_inputs`.
    fn basin(&self) -> Option<Basin> {
        None
    }
    /// Every water node (brine, wick film, stage wicks); each starts a simulated day at the
    /// feed salinity.
    fn water_nodes(&self) -> Vec<NodeId> {
        vec![self.brine_node()]
    }
    /// The (main) cover node.
    fn cover_node(&self) -> NodeId;
    /// The basin liner or absorber node, if any.
    fn liner_node(&self) -> Option<NodeId>;
    /// The inner-walls node, if any.
    fn walls_node(&self) -> Option<NodeId>;
    /// Footprint (plan area) \[m²\].
    fn footprint_m2(&self) -> f64;
    /// Cover area \[m²\].
    fn aperture_m2(&self) -> f64;
    /// Evaporating area \[m²\].
    fn evaporating_m2(&self) -> f64;
    /// Brine mass at the set depth \[kg\].
    fn set_brine_kg(&self) -> f64;
    /// Kind-specific details for the result.
    fn details(&self) -> KindDetails;
    /// Kind-specific details completed from the totals of a run (per-stage distillate, dry
    /// hours, gain output ratio …); by default the fixed [`StillModel::details`].
    fn run_details(&self, run: &RunTotals) -> KindDetails {
        let _ = run;
        self.details()
    }
    /// The state at the start of a run: every node at `t_k` \[K\], brine at its set mass and
    /// `salinity_g_kg` [g kg⁻¹]. By default the one water node ([`StillModel::brine_node`])
    /// holds [`StillModel::set_brine_kg`]; a kind with several water nodes overrides it.
    fn initial_state(&self, t_k: f64, salinity_g_kg: f64) -> Result<State, NetworkError> {
        let net = self.network();
        let mut s = net.initial_state(t_k)?;
        s.set_brine(net, self.brine_node(), self.set_brine_kg(), salinity_g_kg)?;
        Ok(s)
    }
    /// Fill `inputs` for one weather record (computed once per record, not per iteration)
    /// and return where its sunlight went.
    fn hour_inputs(
        &self,
        ctx: &HourContext<'_>,
        state: &State,
        inputs: &mut Inputs,
    ) -> Result<SunlightSplit, NetworkError>;
}

/// Totals of a run, per link and per node, from which a variant completes its details.
///
/// With a monthly climate each month's (last, periodic) average day counts for the days of
/// the month; with a weather file every simulated day counts once.
#[derive(Debug, Clone, Default, PartialEq)]
pub struct RunTotals {
    /// Days represented [day].
    pub days: f64,
    /// Hours represented \[h\].
    pub hours: f64,
    /// Sunlight on the aperture (plane of array × cover area) [J].
    pub incident_j: f64,
    /// Sunlight entering through the cover(s) [J].
    pub entering_j: f64,
    /// Distillate [kg].
    pub distillate_kg: f64,
    /// Distillate × latent heat at the brine node's temperature [J].
    pub distillate_latent_j: f64,
    /// Brine drained (run-off) [kg].
    pub drained_kg: f64,
    /// Heat carried by each link from end `a` to end `b` [J], in link order.
    pub link_heat_j: Vec<f64>,
    /// Distillate collected by each link [kg], in link order.
    pub link_collected_kg: Vec<f64>,
    /// Highest temperature of each node [K], in node order.
    pub node_max_k: Vec<f64>,
    /// Hours in which each water node was dry at some moment \[h\], in node order.
    pub node_dry_hours: Vec<f64>,
}

impl RunTotals {
    fn add_day(&mut self, d: &DayTotals, weight: f64) {
        let Some(b) = d.balance.as_ref() else {
            return;
        };
        let grow = |v: &mut Vec<f64>, n: usize, fill: f64| {
            if v.len() != n {
                *v = vec![fill; n];
            }
        };
        grow(&mut self.link_heat_j, b.link_heat_j.len(), 0.0);
        grow(&mut self.link_collected_kg, b.link_collected_kg.len(), 0.0);
        grow(&mut self.node_max_k, d.node_max_k.len(), f64::MIN);
        grow(&mut self.node_dry_hours, d.node_dry_hours.len(), 0.0);
        self.days += weight;
        self.hours += weight * d.hours_simulated;
        self.incident_j += weight * d.incident_j;
        self.entering_j += weight * d.entering_j;
        self.distillate_kg += weight * d.distillate_kg;
        self.distillate_latent_j += weight * d.distillate_latent_j;
        self.drained_kg += weight * b.drained_kg;
        for (a, x) in self.link_heat_j.iter_mut().zip(&b.link_heat_j) {
            *a += weight * x;
        }
        for (a, x) in self.link_collected_kg.iter_mut().zip(&b.link_collected_kg) {
            *a += weight * x;
        }
        for (a, x) in self.node_max_k.iter_mut().zip(&d.node_max_k) {
            *a = a.max(*x);
        }
        for (a, x) in self.node_dry_hours.iter_mut().zip(&d.node_dry_hours) {
            *a += weight * x;
        }
    }
}

/// Kind-specific details carried in a [`VariantResult`].
#[derive(Debug, Clone, PartialEq, Serialize)]
#[serde(tag = "kind", rename_all = "kebab-case")]
pub enum KindDetails {
    /// A single-slope basin still.
    SingleSlope {
        /// Front wall height \[mm\].
        front_wall_mm: f64,
        /// Back wall height, derived \[mm\].
        back_wall_mm: f64,
        /// Cover tilt \[deg\].
        cover_tilt_deg: f64,
        /// Set brine depth \[mm\].
        brine_depth_mm: f64,
        /// Base overall coefficient [W m⁻² K⁻¹].
        base_u_w_m2_k: f64,
        /// Side wall coefficient without the outside film [W m⁻² K⁻¹].
        side_u_inner_w_m2_k: f64,
        /// Inner wall area above the brine modelled \[m²\] (0 when walls are left out).
        wall_area_m2: f64,
        /// Whether every optional loss path was off.
        ideal: bool,
    },
    /// A tilted wick still.
    Wick {
        /// Cover and wick tilt \[deg\].
        cover_tilt_deg: f64,
        /// Wick-to-cover gap \[mm\].
        gap_mm: f64,
        /// Feed per m² of wick [L h⁻¹ m⁻²].
        feed_l_h_m2: f64,
        /// Wick area \[m²\].
        wick_area_m2: f64,
        /// Backing overall coefficient [W m⁻² K⁻¹].
        back_u_w_m2_k: f64,
        /// Share of the simulated hours in which the cloth was dry at some moment [-].
        dry_hour_fraction: f64,
        /// Warm brine running off the wick, per day [L day⁻¹].
        run_off_l_day: f64,
    },
    /// A multi-effect diffusion still with latent-heat recovery.
    MultiEffect {
        /// Number of stages.
        stages: u32,
        /// Air gap of each stage \[mm\].
        gap_mm: f64,
        /// Sink kind (`air-fins` or `water-body`).
        sink: String,
        /// Last plate to sink coefficient [W m⁻² K⁻¹].
        sink_coefficient_w_m2_k: f64,
        /// Edge and frame conductance of each stage node [W K⁻¹].
        edge_ua_per_node_w_k: f64,
        /// Highest temperature of each stage's wick [°C], first stage first.
        stage_max_c: Vec<f64>,
        /// Distillate of each stage per m² footprint [L m⁻² day⁻¹], first stage first.
        stage_l_m2_day: Vec<f64>,
        /// Share of the hours in which each stage's wick was dry at some moment (its
        /// evaporation held to its feed) [-], first stage first.
        stage_dry_hour_fraction: Vec<f64>,
        /// Distillate × latent heat ÷ sunlight on the aperture [-] (DESIGN.md).
        solar_to_vapour_efficiency: f64,
        /// Distillate × latent heat ÷ heat delivered to the first stage [-] (DESIGN.md).
        gain_output_ratio: f64,
        /// Heat delivered to the first stage per m² footprint [kWh m⁻² day⁻¹].
        first_stage_heat_kwh_m2_day: f64,
        /// Air gap between the absorber and the glazing \[mm\].
        glazing_gap_mm: f64,
        /// Heat the last plate rejects to the sink per m² footprint [kWh m⁻² day⁻¹].
        sink_heat_kwh_m2_day: f64,
        /// Day-mean rise of the last plate above the sink, q ÷ h_sink \[K\] (higher near noon).
        sink_rise_day_mean_k: f64,
        /// Highest absorber temperature [°C].
        absorber_max_c: f64,
        /// Highest temperature of the last condensing plate [°C].
        last_plate_max_c: f64,
        /// What the sink does to the stack, in words, with the run's figures.
        sink_note: String,
    },
    /// A double-slope basin still.
    DoubleSlope {
        /// Side wall height under the eaves \[mm\].
        side_wall_mm: f64,
        /// Ridge height above the basin floor, derived \[mm\].
        ridge_mm: f64,
        /// Tilt of both faces \[deg\].
        cover_tilt_deg: f64,
        /// Directions the two faces face \[deg\], the design's face first.
        face_azimuths_deg: [f64; 2],
        /// Set brine depth \[mm\].
        brine_depth_mm: f64,
        /// Mean height of the cover above the brine \[mm\].
        mean_gap_mm: f64,
        /// Base overall coefficient [W m⁻² K⁻¹].
        base_u_w_m2_k: f64,
        /// Inner wall area above the brine modelled \[m²\] (0 when walls are left out).
        wall_area_m2: f64,
    },
    /// A stepped (tray) still.
    Stepped {
        /// Number of trays.
        trays: u32,
        /// Front-to-back depth of one tray \[mm\].
        tread_mm: f64,
        /// Rise from one tray to the next \[mm\].
        riser_mm: f64,
        /// Tray (brine) depth \[mm\].
        tray_depth_mm: f64,
        /// Cover tilt \[deg\].
        cover_tilt_deg: f64,
        /// Mean gap between the brine surfaces and the cover \[mm\] (the internal
        /// correlation's length).
        mean_gap_mm: f64,
        /// Evaporating area per m² of footprint [-].
        evaporating_per_footprint: f64,
        /// Whether the risers are wetted and evaporate.
        wetted_risers: bool,
        /// Base overall coefficient [W m⁻² K⁻¹].
        base_u_w_m2_k: f64,
    },
}

/// Energy booked over a month's (last) simulated day, per day [kWh].
#[derive(Debug, Clone, Copy, Default, PartialEq, Serialize)]
pub struct EnergySummary {
    /// Sunlight on the cover.
    pub incident_kwh: f64,
    /// Sunlight entering through the cover.
    pub entering_kwh: f64,
    /// Sunlight absorbed by the still's parts (the network's sources).
    pub absorbed_kwh: f64,
    /// Sunlight reflected back out or lost to dust and drops.
    pub reflected_kwh: f64,
    /// Convection (and ground radiation) from the cover.
    pub cover_to_air_kwh: f64,
    /// Radiation from the cover to the sky.
    pub cover_to_sky_kwh: f64,
    /// Through the base.
    pub base_kwh: f64,
    /// Through the sides.
    pub sides_kwh: f64,
    /// Change of stored heat.
    pub stored_kwh: f64,
    /// Enthalpy brought in with the top-up feed.
    pub feed_in_kwh: f64,
    /// Enthalpy leaving with the distillate.
    pub distillate_out_kwh: f64,
    /// Enthalpy leaving with leaked vapour.
    pub leaked_vapour_kwh: f64,
    /// Distillate [kg].
    pub distillate_kg: f64,
    /// Water evaporated [kg].
    pub evaporated_kg: f64,
    /// Residual as a fraction of the absorbed sunlight [-].
    pub residual_fraction: f64,
}

const J_PER_KWH: f64 = 3.6e6;

impl EnergySummary {
    fn from_balance(b: &EnergyBalance, incident_j: f64, entering_j: f64) -> Self {
        EnergySummary {
            incident_kwh: incident_j / J_PER_KWH,
            entering_kwh: entering_j / J_PER_KWH,
            absorbed_kwh: b.absorbed_sunlight_j / J_PER_KWH,
            reflected_kwh: (incident_j - b.absorbed_sunlight_j) / J_PER_KWH,
            cover_to_air_kwh: b.loss_j(LossPath::CoverToAir) / J_PER_KWH,
            cover_to_sky_kwh: b.loss_j(LossPath::CoverToSky) / J_PER_KWH,
            base_kwh: b.loss_j(LossPath::Base) / J_PER_KWH,
            sides_kwh: b.loss_j(LossPath::Sides) / J_PER_KWH,
            stored_kwh: b.stored_j / J_PER_KWH,
            feed_in_kwh: b.feed_in_j / J_PER_KWH,
            distillate_out_kwh: b.distillate_out_j / J_PER_KWH,
            leaked_vapour_kwh: b.leaked_vapour_out_j / J_PER_KWH,
            distillate_kg: b.distillate_kg,
            evaporated_kg: b.evaporated_kg,
            residual_fraction: b.residual_fraction(),
        }
    }
}

/// One hour of a run (`--hourly`).
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
pub struct HourRecord {
    /// Month 1…12.
    pub month: u32,
    /// Day of the year.
    pub day_of_year: u32,
    /// Solar time at the middle of the record \[h\].
    pub solar_hour_h: f64,
    /// Air temperature [°C].
    pub t_air_c: f64,
    /// Cover temperature at the end of the hour [°C].
    pub t_cover_c: f64,
    /// Brine temperature [°C].
    pub t_brine_c: f64,
    /// Liner temperature [°C] (cover's if none).
    pub t_liner_c: f64,
    /// Sunlight entering through the cover, per m² footprint [W m⁻²].
    pub entering_w_m2: f64,
    /// Sunlight absorbed in the still [W].
    pub absorbed_w: f64,
    /// Cover to air [W].
    pub cover_to_air_w: f64,
    /// Cover to sky [W].
    pub cover_to_sky_w: f64,
    /// Base [W].
    pub base_w: f64,
    /// Sides [W].
    pub sides_w: f64,
    /// Distillate over the hour [L] (1 kg = 1 L).
    pub distillate_l: f64,
    /// Brine depth at the end of the hour [mm] (0 for a still without a basin).
    pub depth_mm: f64,
    /// Salinity of the brine at the end of the hour [g kg⁻¹].
    pub salinity_g_kg: f64,
    /// Feed over the hour [L].
    pub feed_l: f64,
    /// Brine flushed or overflowed over the hour [L].
    pub flush_l: f64,
}

/// The worst month.
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
pub struct WorstMonth {
    /// Month 1…12.
    pub month: u32,
    /// Its yield [L m⁻² day⁻¹].
    pub l_m2_day: f64,
}

/// One month's result, per (average or mean) day.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct MonthResult {
    /// Month 1…12.
    pub month: u32,
    /// Distillate per m² of footprint [L m⁻² day⁻¹].
    pub l_m2_day: f64,
    /// Distillate of the whole still [L day⁻¹].
    pub l_day: f64,
    /// Global horizontal irradiation [kWh m⁻² day⁻¹].
    pub insolation_kwh_m2_day: f64,
    /// Sunlight entering through the cover per m² footprint [kWh m⁻² day⁻¹].
    pub cover_insolation_kwh_m2_day: f64,
    /// Plane-of-array irradiation on the cover per m² of cover [kWh m⁻² day⁻¹].
    pub poa_kwh_m2_day: f64,
    /// Daily efficiency: distillate × latent heat ÷ sunlight entering through the cover [-].
    pub efficiency: f64,
    /// Single-effect ceiling: entering sunlight ÷ latent heat [L m⁻² day⁻¹].
    pub ceiling_l_m2_day: f64,
    /// Share of the distillate made while no sunlight entered [-].
    pub night_share: f64,
    /// Highest brine temperature [°C].
    pub max_brine_c: f64,
    /// Highest cover temperature [°C].
    pub max_cover_c: f64,
    /// Days simulated until the cycle repeated (0 for a weather file).
    pub days_to_periodic: u32,
    /// Days in the repeating cycle the month's figures average: 1 when every day repeats,
    /// more when operation repeats over several days (a flush every few days), and
    /// [`QUASI_PERIODIC_WINDOW_DAYS`] when no exact cycle exists (a salinity-limit flush whose
    /// interval alternates) and the mean of that window has settled instead; 0 for a
    /// weather file.
    pub cycle_days: u32,
    /// Energy booked over the day.
    pub energy: EnergySummary,
    /// Operation of the basin over the (last) day; `None` for a still without a basin.
    pub operation: Option<OperationDay>,
    /// Brine (or feed water) fed on a mean day [L day⁻¹], every kind (1 kg = 1 L).
    pub fed_l_day: f64,
    /// Brine drained, flushed or run off on a mean day [L day⁻¹], every kind.
    pub drained_l_day: f64,
    /// Salt fed on a mean day [kg day⁻¹]; once the still runs periodically the same salt
    /// leaves with the drained brine (or stays as crust to be cleaned out).
    pub fed_salt_kg_day: f64,
}

/// The result every variant returns.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct VariantResult {
    /// Variant name.
    pub name: String,
    /// Kind name as in design files.
    pub kind: String,
    /// Footprint \[m²\].
    pub footprint_m2: f64,
    /// Cover (aperture) area \[m²\].
    pub aperture_m2: f64,
    /// Evaporating area \[m²\].
    pub evaporating_m2: f64,
    /// January to December.
    pub months: Vec<MonthResult>,
    /// Annual distillate [L].
    pub annual_l: f64,
    /// Annual distillate per m² footprint [L m⁻²].
    pub annual_l_m2: f64,
    /// Mean daily yield over the year [L m⁻² day⁻¹].
    pub mean_l_m2_day: f64,
    /// The month with the lowest daily yield.
    pub worst_month: WorstMonth,
    /// Largest |residual| fraction over the months [-].
    pub energy_residual: f64,
    /// Hour-by-hour records (the last simulated day of each month, or every record of a
    /// weather file), when asked for.
    pub hourly: Option<Vec<HourRecord>>,
    /// Kind-specific details.
    pub details: KindDetails,
}

/// How to run.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct RunOptions {
    /// Adaptive time-step control (its `max_change_k` is the accuracy setting).
    pub control: StepControl,
    /// Newton settings.
    pub settings: SolverSettings,
    /// Keep hour-by-hour records.
    pub hourly: bool,
    /// Most average days simulated per month before giving up.
    pub max_days: u32,
    /// Daily yield tolerance of the periodic test [-].
    pub periodic_yield_tol: f64,
    /// Midnight temperature tolerance of the periodic test \[K\].
    pub periodic_temperature_tol_k: f64,
    /// Midnight brine depth tolerance of the periodic test \[mm\].
    pub periodic_depth_tol_mm: f64,
    /// Relative day-to-day change of the midnight salinity accepted as periodic [-].
    pub periodic_salinity_tol: f64,
}

impl Default for RunOptions {
    /// The network's step control with [`DEFAULT_MAX_CHANGE_K`] per step and steps up to an
    /// hour, periodic within 0.1 % of yield, 0.05 K, 0.05 mm of depth and 0.5 % of salinity
    /// per day, at most 40 days. The salinity test is the loosest because salt in a deep basin
    /// settles slowly (time constant: basin mass ÷ flush rate, days); a 0.5 % change of a
    /// 50 g/kg brine moves Nayar's vapour-pressure ratio by under 0.02 %.
    fn default() -> Self {
        RunOptions {
            control: StepControl {
                max_change_k: DEFAULT_MAX_CHANGE_K,
                max_step_s: 3600.0,
                ..StepControl::default()
            },
            settings: SolverSettings {
                abs_tolerance_w: STILL_NEWTON_TOLERANCE_W,
                ..SolverSettings::default()
            },
            hourly: false,
            max_days: 40,
            periodic_yield_tol: 1e-3,
            periodic_temperature_tol_k: 0.05,
            periodic_depth_tol_mm: 0.05,
            periodic_salinity_tol: 5e-3,
        }
    }
}

/// Whether a kind has a model yet.
pub fn is_modelled(kind: &VariantKind) -> bool {
    matches!(
        kind,
        VariantKind::SingleSlope(_)
            | VariantKind::DoubleSlope(_)
            | VariantKind::Stepped(_)
            | VariantKind::Wick(_)
            | VariantKind::MultiEffect(_)
    )
}

/// Build the model of a variant, or `None` for a kind not modelled yet, with the variant's
/// `[variant.calibration]` factors applied ([`CalibratedModel`]; neutral factors leave the
/// model exactly as built).
pub fn build_model(
    loaded: &LoadedDesign,
    variant: &Variant,
    weather: &SiteWeather,
) -> Result<Option<Box<dyn StillModel>>, Error> {
    let factors = variant
        .calibration
        .as_ref()
        .map(|c| c.factors())
        .unwrap_or_default();
    let Some(m) = build_uncalibrated(loaded, variant, weather)? else {
        return Ok(None);
    };
    let ceiling = calibrated::distillate_factor_ceiling(m.network());
    if factors.distillate_factor > ceiling * (1.0 + 1e-9) {
        let i = loaded
            .design
            .variants
            .iter()
            .position(|v| v.name == variant.name)
            .map_or(1, |i| i + 1);
        return Err(Error::Design(crate::design::DesignErrors(vec![
            crate::design::DesignIssue {
                file: loaded.source.clone(),
                line_col: None,
                path: format!("variant[{i}].calibration.distillate_factor"),
                message: format!(
                    "{} has no effect above {ceiling:.3} for this variant: every condensing \
                     surface then already collects all it condenses; allowed [{}, {ceiling:.3}]",
                    factors.distillate_factor,
                    crate::design::DISTILLATE_FACTOR_RANGE.0
                ),
            },
        ])));
    }
    Ok(Some(if factors.is_neutral() {
        m
    } else {
        Box::new(CalibratedModel::new(m, factors)) as Box<dyn StillModel>
    }))
}

/// The highest `distillate_factor` that still acts on a variant's model (see
/// [`calibrated::distillate_factor_ceiling`]), capped at the design file's range.
pub fn distillate_factor_upper(
    loaded: &LoadedDesign,
    variant: &Variant,
    weather: &SiteWeather,
) -> Result<f64, Error> {
    let hi = crate::design::DISTILLATE_FACTOR_RANGE.1;
    Ok(
        build_uncalibrated(loaded, variant, weather)?.map_or(hi, |m| {
            calibrated::distillate_factor_ceiling(m.network()).min(hi)
        }),
    )
}

/// The model of a variant as its kind builds it (a calibrated `cover_emissivity` is already
/// in the cover's properties), before the other calibration factors.
fn build_uncalibrated(
    loaded: &LoadedDesign,
    variant: &Variant,
    weather: &SiteWeather,
) -> Result<Option<Box<dyn StillModel>>, Error> {
    match &variant.kind {
        VariantKind::SingleSlope(k) => Ok(Some(Box::new(SingleSlopeStill::new(
            variant,
            k,
            &loaded.library,
            weather.pressure_pa,
        )?))),
        VariantKind::DoubleSlope(k) => Ok(Some(Box::new(DoubleSlopeStill::new(
            variant,
            k,
            &loaded.library,
            weather.pressure_pa,
        )?))),
        VariantKind::Stepped(k) => Ok(Some(Box::new(SteppedStill::new(
            variant,
            k,
            &loaded.library,
            weather.pressure_pa,
        )?))),
        VariantKind::Wick(k) => Ok(Some(Box::new(WickStill::new(
            variant,
            k,
            &loaded.library,
            weather.pressure_pa,
        )?))),
        VariantKind::MultiEffect(k) => Ok(Some(Box::new(MultiEffectStill::new(
            variant,
            k,
            &loaded.library,
            weather.pressure_pa,
        )?))),
    }
}

/// Simulate one variant of a loaded design over the site's weather.
///
/// Errors: [`Error::Model`] for a kind not modelled yet, a failed step, a non-periodic month,
/// an energy residual over [`MAX_RESIDUAL_FRACTION`] or a non-finite or negative output.
pub fn simulate_variant(
    loaded: &LoadedDesign,
    variant: &Variant,
    weather: &SiteWeather,
    opts: &RunOptions,
) -> Result<VariantResult, Error> {
    let model = build_model(loaded, variant, weather)?.ok_or_else(|| Error::Model {
        variant: variant.name.clone(),
        at: String::new(),
        reason: format!("the {} kind is not modelled yet", variant.kind.name()),
    })?;
    run_model_operated(
        model.as_ref(),
        &variant.name,
        variant.kind.name(),
        weather,
        opts,
        &variant.operation.clone().unwrap_or_default(),
    )
}

/// Irradiance on every plane of `model` for every weather record: `rows[record][plane]`.
fn plane_irradiance_rows(
    model: &dyn StillModel,
    weather: &SiteWeather,
) -> Vec<Vec<PlaneIrradiance>> {
    let per_plane: Vec<Vec<PlaneIrradiance>> = model
        .planes()
        .iter()
        .map(|(plane, _)| weather.series.plane_series(*plane, SkyModel::HayDavies))
        .collect();
    (0..weather.series.hours.len())
        .map(|i| per_plane.iter().map(|series| series[i]).collect())
        .collect()
}

/// Per-day totals.
#[derive(Debug, Clone, Default)]
struct DayTotals {
    incident_j: f64,
    entering_j: f64,
    ghi_j_m2: f64,
    poa_j_m2: f64,
    distillate_kg: f64,
    distillate_latent_j: f64,
    night_kg: f64,
    max_brine_k: f64,
    max_cover_k: f64,
    hours: Vec<HourRecord>,
    balance: Option<EnergyBalance>,
    /// Hours simulated.
    hours_simulated: f64,
    /// Highest temperature of each node [K].
    node_max_k: Vec<f64>,
    /// Hours in which each water node was dry at some moment.
    node_dry_hours: Vec<f64>,
    operation: Option<OperationDay>,
}

fn model_error(name: &str, month: u32, hour: Option<f64>, reason: String) -> Error {
    let at = match hour {
        Some(h) => format!(", month {month}, hour {h:.1}"),
        None => format!(", month {month}"),
    };
    Error::Model {
        variant: name.to_owned(),
        at,
        reason,
    }
}

/// Run one day of records from `state`; returns the day's totals and the end state. For a
/// basin-type still `operator` sets feed and drain interval by interval.
#[allow(clippy::too_many_arguments)]
fn run_day(
    model: &dyn StillModel,
    name: &str,
    records: &[HourlyWeather],
    poa: &[Vec<PlaneIrradiance>],
    weather: &SiteWeather,
    state: State,
    inputs: &mut Inputs,
    opts: &RunOptions,
    operator: &mut Operator,
) -> Result<(DayTotals, State), Error> {
    let net = model.network();
    let brine = model.brine_node();
    let cover = model.cover_node();
    let basin = model.basin();
    let month = records.first().map_or(1, |r| r.month);
    let plane_areas: Vec<f64> = model.planes().iter().map(|(_, a)| *a).collect();
    let total_area: f64 = plane_areas.iter().sum::<f64>().max(f64::MIN_POSITIVE);
    let start_masses = basin.map(|b| basin_masses(&state, &b));
    let mut sim = Simulation::new(net, state, opts.settings, opts.control)
        .map_err(|e| model_error(name, month, None, e.to_string()))?;
    let mut t = DayTotals {
        node_max_k: vec![f64::MIN; net.nodes().len()],
        node_dry_hours: vec![0.0; net.nodes().len()],
        ..DayTotals::default()
    };
    let is_dry = |s: &State, i: usize| {
        let node = &net.nodes()[i];
        node.holds_water
            && s.brine_kg.get(i).copied().unwrap_or(0.0) - s.salt_kg.get(i).copied().unwrap_or(0.0)
                <= node.dry_mass_kg
    };
    let mut log = DayLog::new();
    let wet_mm = operator.operation().wetting_depth_mm;
    let set_mm = operator.set_depth_mm();
    let interval_s = operator.operation().control_interval_s;
    for (rec, p) in records.iter().zip(poa) {
        let m = (rec.month.clamp(1, 12) - 1) as usize;
        let ctx = HourContext {
            weather: rec,
            poa: p,
            ground_k: weather.month_mean_air_k[m],
            dew_point_known: weather.dew_point_known,
            feed_salinity_g_kg: weather.feed_salinity_g_kg,
        };
        let hour_err =
            |reason: String| model_error(name, rec.month, Some(rec.hour_mid_solar_h), reason);
        let split = model
            .hour_inputs(&ctx, sim.state(), inputs)
            .map_err(|e| hour_err(e.to_string()))?;
        let before = sim.balance().clone();
        let dt_s = rec.period_h * 3600.0;
        let dry_before: Vec<bool> = (0..net.nodes().len())
            .map(|i| is_dry(sim.state(), i))
            .collect();
        let mut dried_nodes: Vec<usize> = Vec::new();
        let start_h = rec.hour_mid_solar_h - 0.5 * rec.period_h;
        let daylight = split.entering_w > 0.0;
        if let Some(b) = basin {
            let n = if operator.splits_hour(start_h, rec.period_h) {
                (dt_s / interval_s).ceil().max(1.0) as u32
            } else {
                1
            };
            let sub_s = dt_s / f64::from(n);
            for k in 0..n {
                let view = basin_view(sim.state(), &b);
                let (act, flushed) =
                    operator.act(start_h + f64::from(k) * sub_s / 3600.0, sub_s, &view);
                inputs
                    .set_feed(
                        net,
                        b.node,
                        act.feed_kg_s,
                        rec.t_air_k,
                        weather.feed_salinity_g_kg,
                    )
                    .and_then(|()| inputs.set_drain(net, b.node, act.drain_kg_s))
                    .map_err(|e| hour_err(e.to_string()))?;
                let d0 = sim.balance().distillate_kg;
                let summary = sim
                    .advance(inputs, sub_s)
                    .map_err(|e| hour_err(e.to_string()))?;
                operator.collected(sim.balance().distillate_kg - d0);
                let end = basin_view(sim.state(), &b);
                let (_, _, crust) = basin_masses(sim.state(), &b);
                log.book(
                    sub_s,
                    view.depth_mm,
                    end.depth_mm,
                    end.salinity_g_kg,
                    crust,
                    set_mm,
                    wet_mm,
                    daylight,
                );
                log.dry_out_events += summary.dry_outs.len() as u32;
                dried_nodes.extend(summary.dry_outs.iter().map(|&(_, n)| n));
                log.flushes += u32::from(flushed);
            }
        } else {
            let summary = sim
                .advance(inputs, dt_s)
                .map_err(|e| hour_err(e.to_string()))?;
            dried_nodes.extend(summary.dry_outs.iter().map(|&(_, n)| n));
        }
        t.hours_simulated += rec.period_h;
        for (i, was_dry) in dry_before.iter().enumerate() {
            if *was_dry || dried_nodes.contains(&i) || is_dry(sim.state(), i) {
                t.node_dry_hours[i] += rec.period_h;
            }
            if let Some(tk) = sim.state().temperature_k(NodeId(i)) {
                t.node_max_k[i] = t.node_max_k[i].max(tk);
            }
        }
        let after = sim.balance();
        let d_kg = after.distillate_kg - before.distillate_kg;
        let s = sim.state();
        let t_brine = s.temperature_k(brine).unwrap_or(f64::NAN);
        let t_cover = s.temperature_k(cover).unwrap_or(f64::NAN);
        if !(d_kg.is_finite() && t_brine.is_finite() && t_cover.is_finite()) || d_kg < -1e-9 {
            return Err(hour_err(format!(
                "unphysical output (distillate {d_kg} kg, brine {t_brine} K, cover {t_cover} K)"
            )));
        }
        t.incident_j += split.incident_w * dt_s;
        t.entering_j += split.entering_w * dt_s;
        t.ghi_j_m2 += rec.ghi_w_m2.max(0.0) * dt_s;
        let poa_w_m2 = p
            .iter()
            .zip(&plane_areas)
            .map(|(g, a)| g.total_w_m2() * a)
            .sum::<f64>()
            / total_area;
        t.poa_j_m2 += poa_w_m2 * dt_s;
        t.distillate_kg += d_kg;
        t.distillate_latent_j += d_kg * water::latent_heat_j_kg(t_brine);
        if !daylight {
            t.night_kg += d_kg;
        }
        t.max_brine_k = t.max_brine_k.max(t_brine);
        t.max_cover_k = t.max_cover_k.max(t_cover);
        if opts.hourly {
            let path = |p: LossPath| (after.loss_j(p) - before.loss_j(p)) / dt_s;
            let t_liner = model
                .liner_node()
                .and_then(|n| s.temperature_k(n))
                .unwrap_or(t_cover);
            let view = basin.map(|b| basin_view(s, &b));
            t.hours.push(HourRecord {
                month: rec.month,
                day_of_year: rec.day_of_year,
                solar_hour_h: rec.hour_mid_solar_h,
                t_air_c: rec.t_air_k - ZERO_CELSIUS_K,
                t_cover_c: t_cover - ZERO_CELSIUS_K,
                t_brine_c: t_brine - ZERO_CELSIUS_K,
                t_liner_c: t_liner - ZERO_CELSIUS_K,
                entering_w_m2: split.entering_w / model.footprint_m2(),
                absorbed_w: (after.absorbed_sunlight_j - before.absorbed_sunlight_j) / dt_s,
                cover_to_air_w: path(LossPath::CoverToAir),
                cover_to_sky_w: path(LossPath::CoverToSky),
                base_w: path(LossPath::Base),
                sides_w: path(LossPath::Sides),
                distillate_l: d_kg,
                depth_mm: view.map_or(0.0, |v| v.depth_mm),
                salinity_g_kg: view.map_or_else(
                    || s.salinity_g_kg(brine).unwrap_or(0.0),
                    |v| v.salinity_g_kg,
                ),
                feed_l: after.fed_kg - before.fed_kg,
                flush_l: after.drained_kg - before.drained_kg,
            });
        }
    }
    let balance = sim.balance().clone();
    if let Err(e) = balance.check(MAX_RESIDUAL_FRACTION) {
        return Err(model_error(name, month, None, e.to_string()));
    }
    if let (Some(b), Some((w0, s0, c0))) = (basin, start_masses) {
        let (w1, s1, c1) = basin_masses(sim.state(), &b);
        let mass = MassBalance {
            fed_kg: balance.fed_kg,
            fed_salt_kg: balance.fed_salt_kg,
            flushed_kg: balance.drained_kg,
            flushed_salt_kg: balance.drained_salt_kg,
            distillate_kg: balance.distillate_kg,
            leaked_kg: balance.leaked_kg,
            water_start_kg: w0,
            water_end_kg: w1,
            dissolved_salt_start_kg: s0,
            dissolved_salt_end_kg: s1,
            crust_start_kg: c0,
            crust_end_kg: c1,
        };
        let end = basin_view(sim.state(), &b);
        t.operation = Some(OperationDay::from_log(&log, operator, mass, end));
    }
    t.balance = Some(balance);
    Ok((t, sim.state().clone()))
}

/// What the periodic test compares between days: yield [kg], node temperatures [K] and the
/// basin's depth [mm] and salinity [g kg⁻¹].
type DayEnd = (f64, Vec<f64>, Option<(f64, f64)>);

/// Longest multi-day cycle the periodic test looks for [days].
pub const MAX_CYCLE_DAYS: usize = 10;

/// The shortest period P (1…[`MAX_CYCLE_DAYS`]) with which the last day repeats the day P days
/// before it, within the periodic tolerances of `opts`; `None` while nothing repeats.
fn cycle_period(history: &[(DayTotals, DayEnd)], opts: &RunOptions) -> Option<usize> {
    let (_, (y1, t1, b1)) = history.last()?;
    (1..=MAX_CYCLE_DAYS.min(history.len().saturating_sub(1))).find(|&p| {
        let (_, (y0, t0, b0)) = &history[history.len() - 1 - p];
        let dt = t1
            .iter()
            .zip(t0)
            .map(|(a, b)| (a - b).abs())
            .fold(0.0, f64::max);
        let brine_ok = match (b1, b0) {
            (Some((d1, s1)), Some((d0, s0))) => {
                (d1 - d0).abs() <= opts.periodic_depth_tol_mm
                    && (s1 - s0).abs() <= opts.periodic_salinity_tol * s1.max(1e-6)
            }
            _ => true,
        };
        (y1 - y0).abs() <= opts.periodic_yield_tol * y1.max(1e-9)
            && dt <= opts.periodic_temperature_tol_k
            && brine_ok
    })
}

/// Window of days averaged when a month has no exact cycle [days].
pub const QUASI_PERIODIC_WINDOW_DAYS: usize = 10;

/// When the mean daily yield of the last [`QUASI_PERIODIC_WINDOW_DAYS`] days agrees with that
/// of the window before within 1 % (ten times the periodic yield tolerance), the window's
/// length; `None` otherwise.
fn settled_window(history: &[(DayTotals, DayEnd)], opts: &RunOptions) -> Option<usize> {
    let w = QUASI_PERIODIC_WINDOW_DAYS;
    if history.len() < 2 * w {
        return None;
    }
    let mean = |days: &[(DayTotals, DayEnd)]| {
        days.iter().map(|(t, _)| t.distillate_kg).sum::<f64>() / days.len() as f64
    };
    let n = history.len();
    let last = mean(&history[n - w..]);
    let before = mean(&history[n - 2 * w..n - w]);
    ((last - before).abs() <= 10.0 * opts.periodic_yield_tol * last.max(1e-9)).then_some(w)
}

/// A basin's depth [mm] and salinity [g kg⁻¹] at the end of a day, for the periodic test.
fn basin_end(model: &dyn StillModel, state: &State) -> Option<(f64, f64)> {
    model.basin().map(|b| {
        let v = basin_view(state, &b);
        (v.depth_mm, v.salinity_g_kg)
    })
}

/// An operator for `model`'s basin running `operation` (a no-op stand-in for stills without
/// a basin: it is never asked to act).
fn operator_for(model: &dyn StillModel, operation: &Operation) -> Operator {
    match model.basin() {
        Some(b) => Operator::new(operation, b.area_m2, b.set_kg),
        None => Operator::new(operation, model.footprint_m2(), model.set_brine_kg()),
    }
}

fn month_result(
    model: &dyn StillModel,
    month: u32,
    days: &[DayTotals],
    days_to_periodic: u32,
    cycle_days: u32,
) -> MonthResult {
    let n = days.len().max(1) as f64;
    let fp = model.footprint_m2();
    let sum = |f: &dyn Fn(&DayTotals) -> f64| days.iter().map(f).sum::<f64>() / n;
    let distillate = sum(&|d| d.distillate_kg);
    let latent = sum(&|d| d.distillate_latent_j);
    let entering = sum(&|d| d.entering_j);
    let night = sum(&|d| d.night_kg);
    let hfg = if distillate > 0.0 {
        latent / distillate
    } else {
        water::latent_heat_j_kg(ZERO_CELSIUS_K + 40.0)
    };
    let mut energy = EnergySummary::default();
    if let Some(b) = days.last().and_then(|d| d.balance.as_ref()) {
        let last = days
            .last()
            .map_or((0.0, 0.0), |d| (d.incident_j, d.entering_j));
        energy = EnergySummary::from_balance(b, last.0, last.1);
    }
    MonthResult {
        month,
        l_m2_day: distillate / fp,
        l_day: distillate,
        insolation_kwh_m2_day: sum(&|d| d.ghi_j_m2) / J_PER_KWH,
        cover_insolation_kwh_m2_day: entering / fp / J_PER_KWH,
        poa_kwh_m2_day: sum(&|d| d.poa_j_m2) / J_PER_KWH,
        efficiency: if entering > 0.0 {
            latent / entering
        } else {
            0.0
        },
        ceiling_l_m2_day: entering / hfg / fp,
        night_share: if distillate > 0.0 {
            night / distillate
        } else {
            0.0
        },
        max_brine_c: days.iter().map(|d| d.max_brine_k).fold(f64::MIN, f64::max) - ZERO_CELSIUS_K,
        max_cover_c: days.iter().map(|d| d.max_cover_k).fold(f64::MIN, f64::max) - ZERO_CELSIUS_K,
        days_to_periodic,
        cycle_days,
        energy,
        operation: days.last().and_then(|d| d.operation.clone()),
        fed_l_day: sum(&|d| d.balance.as_ref().map_or(0.0, |b| b.fed_kg)),
        drained_l_day: sum(&|d| d.balance.as_ref().map_or(0.0, |b| b.drained_kg)),
        fed_salt_kg_day: sum(&|d| d.balance.as_ref().map_or(0.0, |b| b.fed_salt_kg)),
    }
}

/// Run a built model over the site's weather on its cover planes, operated as by default
/// ([`Operation::default`]: a morning refill by hand, flushing twice the distillate).
pub fn run_model(
    model: &dyn StillModel,
    name: &str,
    kind: &str,
    weather: &SiteWeather,
    opts: &RunOptions,
) -> Result<VariantResult, Error> {
    run_model_operated(model, name, kind, weather, opts, &Operation::default())
}

/// Run a built model over the site's weather on its cover planes, its basin fed and flushed
/// as `operation` says.
///
/// The plane-of-array irradiance (Hay–Davies) of every record on every plane is computed
/// once before the run. One operator runs the whole year, so a controller's memory and the
/// brine carry over from month to month.
pub fn run_model_operated(
    model: &dyn StillModel,
    name: &str,
    kind: &str,
    weather: &SiteWeather,
    opts: &RunOptions,
    operation: &Operation,
) -> Result<VariantResult, Error> {
    let net = model.network();
    let mut operator = operator_for(model, operation);
    let poa = plane_irradiance_rows(model, weather);
    let hours = &weather.series.hours;
    let mut inputs = net
        .inputs(weather.month_mean_air_k[0])
        .map_err(|e| model_error(name, 1, None, e.to_string()))?;
    let mut months = Vec::with_capacity(12);
    let mut hourly = Vec::new();
    let mut run = RunTotals::default();
    let mut carried: Option<State> = None;
    if weather.average_days {
        for m in 1..=12u32 {
            let idx: Vec<usize> = (0..hours.len()).filter(|&i| hours[i].month == m).collect();
            let (Some(&a), Some(&b)) = (idx.first(), idx.last()) else {
                return Err(model_error(
                    name,
                    m,
                    None,
                    "no weather for the month".into(),
                ));
            };
            let recs = &hours[a..=b];
            let p = &poa[a..=b];
            let t0 = weather.month_mean_air_k[(m - 1) as usize];
            let mut state = match carried.take() {
                Some(s) => s,
                None => model
                    .initial_state(t0, weather.feed_salinity_g_kg)
                    .map_err(|e| model_error(name, m, None, e.to_string()))?,
            };
            // Days run so far this month with what the periodic test compares at their end.
            let mut history: Vec<(DayTotals, DayEnd)> = Vec::new();
            let mut done: Option<(usize, u32)> = None;
            for day in 1..=opts.max_days {
                let (totals, end) = run_day(
                    model,
                    name,
                    recs,
                    p,
                    weather,
                    state,
                    &mut inputs,
                    opts,
                    &mut operator,
                )?;
                let day_end: DayEnd = (
                    totals.distillate_kg,
                    end.temperatures_k().to_vec(),
                    basin_end(model, &end),
                );
                history.push((totals, day_end));
                // The cycle may span several days (a flush every few days, a basin that dries
                // out on alternate afternoons): the shortest period whose days repeat wins.
                if let Some(period) = cycle_period(&history, opts) {
                    done = Some((period, day));
                    carried = Some(end);
                    break;
                }
                state = end;
            }
            // No exact cycle: accept the mean of the last window when it has settled against
            // the window before it (threshold-triggered flushing is quasi-periodic).
            if done.is_none() {
                done = settled_window(&history, opts).map(|w| (w, opts.max_days));
            }
            let Some((period, days)) = done else {
                return Err(model_error(
                    name,
                    m,
                    None,
                    format!(
                        "the daily cycle did not repeat within {} days (periods up to {} days \
                         tried)",
                        opts.max_days, MAX_CYCLE_DAYS
                    ),
                ));
            };
            let cycle: Vec<DayTotals> = history
                .split_off(history.len() - period)
                .into_iter()
                .map(|(t, _)| t)
                .collect();
            let weight = f64::from(crate::design::DAYS_IN_MONTH[(m - 1) as usize]) / period as f64;
            for d in &cycle {
                run.add_day(d, weight);
            }
            let mut result = month_result(model, m, &cycle, days, period as u32);
            if let Some(last) = cycle.last() {
                // Hourly records: the cycle's last day (one day of records per month).
                hourly.extend(last.hours.iter().cloned());
                result.operation = last.operation.clone().or(result.operation);
            }
            months.push(result);
        }
    } else {
        let mut state = model
            .initial_state(weather.month_mean_air_k[0], weather.feed_salinity_g_kg)
            .map_err(|e| model_error(name, 1, None, e.to_string()))?;
        let mut per_month: Vec<Vec<DayTotals>> = vec![Vec::new(); 12];
        let mut start = 0;
        while start < hours.len() {
            let doy = hours[start].day_of_year;
            let mut end = start;
            while end < hours.len() && hours[end].day_of_year == doy {
                end += 1;
            }
            let (mut totals, next) = run_day(
                model,
                name,
                &hours[start..end],
                &poa[start..end],
                weather,
                state,
                &mut inputs,
                opts,
                &mut operator,
            )?;
            run.add_day(&totals, 1.0);
            hourly.append(&mut totals.hours);
            let m = (hours[start].month.clamp(1, 12) - 1) as usize;
            per_month[m].push(totals);
            state = next;
            start = end;
        }
        for (i, days) in per_month.iter().enumerate() {
            months.push(month_result(model, i as u32 + 1, days, 0, 0));
        }
    }
    finish(
        model,
        name,
        kind,
        months,
        opts.hourly.then_some(hourly),
        &run,
    )
}

fn finish(
    model: &dyn StillModel,
    name: &str,
    kind: &str,
    months: Vec<MonthResult>,
    hourly: Option<Vec<HourRecord>>,
    run: &RunTotals,
) -> Result<VariantResult, Error> {
    for mr in &months {
        let values = [
            mr.l_m2_day,
            mr.efficiency,
            mr.cover_insolation_kwh_m2_day,
            mr.max_brine_c,
            mr.max_cover_c,
        ];
        if values.iter().any(|v| !v.is_finite()) || mr.l_m2_day < 0.0 {
            return Err(model_error(
                name,
                mr.month,
                None,
                "a result is not a finite, non-negative number".into(),
            ));
        }
    }
    let fp = model.footprint_m2();
    let days = crate::design::DAYS_IN_MONTH;
    let annual_l: f64 = months
        .iter()
        .zip(days)
        .map(|(m, d)| m.l_day * f64::from(d))
        .sum();
    let worst = months
        .iter()
        .min_by(|a, b| a.l_m2_day.total_cmp(&b.l_m2_day))
        .map_or(
            WorstMonth {
                month: 1,
                l_m2_day: 0.0,
            },
            |m| WorstMonth {
                month: m.month,
                l_m2_day: m.l_m2_day,
            },
        );
    let residual = months
        .iter()
        .map(|m| m.energy.residual_fraction)
        .fold(0.0, f64::max);
    Ok(VariantResult {
        name: name.to_owned(),
        kind: kind.to_owned(),
        footprint_m2: fp,
        aperture_m2: model.aperture_m2(),
        evaporating_m2: model.evaporating_m2(),
        annual_l,
        annual_l_m2: annual_l / fp,
        mean_l_m2_day: annual_l / fp / 365.0,
        worst_month: worst,
        energy_residual: residual,
        months,
        hourly,
        details: model.run_details(run),
    })
}

/// Simulate a single day of `month` (1…12) from a start with every node at the month's mean
/// air temperature, without repeating it: a quick check of a built model (property tests,
/// one day per case). The energy balance is checked as in a full run.
pub fn run_single_day(
    model: &dyn StillModel,
    name: &str,
    weather: &SiteWeather,
    month: u32,
    opts: &RunOptions,
) -> Result<MonthResult, Error> {
    run_single_day_with_details(model, name, weather, month, opts).map(|(m, _)| m)
}

/// As [`run_single_day`], also returning the kind's details completed from that one day
/// ([`StillModel::run_details`]).
pub fn run_single_day_with_details(
    model: &dyn StillModel,
    name: &str,
    weather: &SiteWeather,
    month: u32,
    opts: &RunOptions,
) -> Result<(MonthResult, KindDetails), Error> {
    let month = month.clamp(1, 12);
    let hours = &weather.series.hours;
    let idx: Vec<usize> = (0..hours.len())
        .filter(|&i| hours[i].month == month)
        .collect();
    let (Some(&a), Some(&b)) = (idx.first(), idx.last()) else {
        return Err(model_error(
            name,
            month,
            None,
            "no weather for the month".into(),
        ));
    };
    let first_day = hours[a].day_of_year;
    let end = (a..=b)
        .find(|&i| hours[i].day_of_year != first_day)
        .unwrap_or(b + 1);
    let recs = &hours[a..end];
    let planes = model.planes();
    let poa: Vec<Vec<PlaneIrradiance>> = recs
        .iter()
        .map(|h| {
            planes
                .iter()
                .map(|(plane, _)| {
                    crate::climate::plane_irradiance(
                        h,
                        *plane,
                        weather.series.albedo,
                        SkyModel::HayDavies,
                    )
                })
                .collect()
        })
        .collect();
    let t0 = weather.month_mean_air_k[(month - 1) as usize];
    let net = model.network();
    let state = model
        .initial_state(t0, weather.feed_salinity_g_kg)
        .map_err(|e| model_error(name, month, None, e.to_string()))?;
    let mut inputs = net
        .inputs(t0)
        .map_err(|e| model_error(name, month, None, e.to_string()))?;
    let mut operator = operator_for(model, &Operation::default());
    let (totals, _) = run_day(
        model,
        name,
        recs,
        &poa,
        weather,
        state,
        &mut inputs,
        opts,
        &mut operator,
    )?;
    let mut run = RunTotals::default();
    run.add_day(&totals, 1.0);
    Ok((
        month_result(model, month, std::slice::from_ref(&totals), 1, 1),
        model.run_details(&run),
    ))
}
