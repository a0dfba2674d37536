//! Calibration factors applied to any still model, kind-independent.
//!
//! A [`CalibratedModel`] wraps a built model and changes only what the factors name:
//! * `distillate_factor` multiplies the collected share of every enclosure link (capped at
//!   1: no more than condenses can be collected). The condensate no longer collected **drips
//!   back** into the evaporating water node at the condensing surface's temperature, through
//!   the network's existing drip-back path, so the water and energy balances stay closed by
//!   the network's own booking; the leaked share is left as the kind set it.
//! * `cover_transmittance_factor` multiplies the sunlight that passes the cover: every
//!   node's sunlight source except the covers' own (the nodes that see the sky) is scaled
//!   after the kind's optics, and the difference is booked as reflected. The scale is capped
//!   so that the cover never passes more than it does not absorb.
//! * `base_loss_factor` multiplies every link booked as a base or edge loss
//!   ([`LossPath::Base`], [`LossPath::Edge`]) — fixed conductances (also when the kind resets
//!   them each hour), radiation exchange areas and temperature-dependent conductances —
//!   except a multi-effect stack's link to its heat `sink`, which is the stack's heat
//!   rejection, not a loss.
//! * `cover_emissivity` is not applied here: it replaces the cover material's emissivity
//!   when the kind builds its network (`stills::materials`), so every radiation link that
//!   involves the cover uses it.

use std::sync::Arc;

use super::{Basin, HourContext, KindDetails, RunTotals, StillModel, SunlightSplit};
use crate::climate::Plane;
use crate::design::CalibrationFactors;
use crate::network::{
    ConductanceModel, End, Inputs, LinkFlow, LinkId, LinkKind, LossPath, Network, NetworkError,
    NodeId, State,
};

/// A conductance model whose heat flow is scaled by a fixed factor.
#[derive(Debug)]
struct ScaledConductance {
    inner: Arc<dyn ConductanceModel>,
    factor: f64,
}

impl ConductanceModel for ScaledConductance {
    fn heat_flow(&self, t_a_k: f64, t_b_k: f64) -> LinkFlow {
        let f = self.inner.heat_flow(t_a_k, t_b_k);
        LinkFlow {
            q_w: f.q_w * self.factor,
            dq_dta_w_k: f.dq_dta_w_k * self.factor,
            dq_dtb_w_k: f.dq_dtb_w_k * self.factor,
        }
    }
}

/// A still model with calibration factors applied (see the module documentation).
#[derive(Debug)]
pub struct CalibratedModel {
    inner: Box<dyn StillModel>,
    net: Network,
    factors: CalibrationFactors,
    /// Whether each node is a cover (has a radiation link to the `sky` boundary).
    is_cover: Vec<bool>,
    /// Fixed-conductance base and edge links with their uncalibrated conductance [W K⁻¹].
    base_links: Vec<(LinkId, f64)>,
}

impl std::fmt::Debug for dyn StillModel {
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        f.debug_struct("StillModel")
            .field("nodes", &self.network().nodes().len())
            .finish()
    }
}

/// The `distillate_factor` above which it has no effect on `net`: the collected share of
/// every enclosure link is capped at 1, so the factor acts up to 1 / (the smallest collected
/// share); infinite for a network without a collecting link.
pub fn distillate_factor_ceiling(net: &Network) -> f64 {
    let smallest = net
        .links()
        .iter()
        .filter_map(|l| match l.kind {
            LinkKind::Enclosure {
                collected_fraction, ..
            } if collected_fraction > 0.0 => Some(collected_fraction),
            _ => None,
        })
        .fold(f64::INFINITY, f64::min);
    if smallest.is_finite() {
        1.0 / smallest
    } else {
        f64::INFINITY
    }
}

fn scales_base(net: &Network, path: LossPath, a: End, b: End) -> bool {
    let to_sink = [a, b].iter().any(|e| match e {
        End::Boundary(id) => net
            .boundaries()
            .get(id.index())
            .is_some_and(|n| n == "sink"),
        End::Node(_) => false,
    });
    matches!(path, LossPath::Base | LossPath::Edge) && !to_sink
}

impl CalibratedModel {
    /// Wrap `inner` with `factors` (the emissivity is the builder's business, see the
    /// module documentation).
    pub fn new(inner: Box<dyn StillModel>, factors: CalibrationFactors) -> Self {
        let mut net = inner.network().clone();
        let sky = net.boundary_id("sky");
        let mut is_cover = vec![false; net.nodes().len()];
        let mut base_links = Vec::new();
        let f_base = factors.base_loss_factor;
        let scaled: Vec<bool> = net
            .links()
            .iter()
            .map(|l| scales_base(&net, l.path, l.a, l.b))
            .collect();
        // Edit through the network so its regrouped copy of the links follows.
        net.edit_links(|links| {
            for (i, link) in links.iter_mut().enumerate() {
                let (a, b, base) = (link.a, link.b, scaled[i]);
                match &mut link.kind {
                    LinkKind::Enclosure {
                        collected_fraction, ..
                    } => {
                        *collected_fraction =
                            (*collected_fraction * factors.distillate_factor).min(1.0);
                    }
                    LinkKind::Conductance { ua_w_k } if base => {
                        base_links.push((LinkId(i), *ua_w_k));
                        *ua_w_k *= f_base;
                    }
                    LinkKind::Radiation { exchange_area_m2 } => {
                        if base {
                            *exchange_area_m2 *= f_base;
                        }
                        if let (End::Node(n), Some(s)) = (a, sky)
                            && b == End::Boundary(s)
                            && let Some(c) = is_cover.get_mut(n.index())
                        {
                            *c = true;
                        }
                    }
                    LinkKind::Variable { model } if base => {
                        *model = Arc::new(ScaledConductance {
                            inner: model.clone(),
                            factor: f_base,
                        });
                    }
                    _ => {}
                }
            }
        });
        CalibratedModel {
            inner,
            net,
            factors,
            is_cover,
            base_links,
        }
    }

    /// The factors applied.
    pub fn factors(&self) -> CalibrationFactors {
        self.factors
    }
}

impl StillModel for CalibratedModel {
    fn network(&self) -> &Network {
        &self.net
    }
    fn planes(&self) -> Vec<(Plane, f64)> {
        self.inner.planes()
    }
    fn brine_node(&self) -> NodeId {
        self.inner.brine_node()
    }
    fn basin(&self) -> Option<Basin> {
        self.inner.basin()
    }
    fn water_nodes(&self) -> Vec<NodeId> {
        self.inner.water_nodes()
    }
    fn cover_node(&self) -> NodeId {
        self.inner.cover_node()
    }
    fn liner_node(&self) -> Option<NodeId> {
        self.inner.liner_node()
    }
    fn walls_node(&self) -> Option<NodeId> {
        self.inner.walls_node()
    }
    fn footprint_m2(&self) -> f64 {
        self.inner.footprint_m2()
    }
    fn aperture_m2(&self) -> f64 {
        self.inner.aperture_m2()
    }
    fn evaporating_m2(&self) -> f64 {
        self.inner.evaporating_m2()
    }
    fn set_brine_kg(&self) -> f64 {
        self.inner.set_brine_kg()
    }
    fn details(&self) -> KindDetails {
        self.inner.details()
    }
    fn run_details(&self, run: &RunTotals) -> KindDetails {
        self.inner.run_details(run)
    }
    fn initial_state(&self, t_k: f64, salinity_g_kg: f64) -> Result<State, NetworkError> {
        self.inner.initial_state(t_k, salinity_g_kg)
    }

    fn hour_inputs(
        &self,
        ctx: &HourContext<'_>,
        state: &State,
        inputs: &mut Inputs,
    ) -> Result<SunlightSplit, NetworkError> {
        // The kind may or may not reset its base conductances each hour: start from the
        // uncalibrated values so the factor applies exactly once.
        for &(id, ua) in &self.base_links {
            if let Some(c) = inputs.conductance_w_k.get_mut(id.index()) {
                *c = ua;
            }
        }
        let mut split = self.inner.hour_inputs(ctx, state, inputs)?;
        for &(id, _) in &self.base_links {
            if let Some(c) = inputs.conductance_w_k.get_mut(id.index()) {
                *c *= self.factors.base_loss_factor;
            }
        }
        let f = self.factors.cover_transmittance_factor;
        if f.to_bits() != 1f64.to_bits() {
            let passed: f64 = inputs
                .source_w
                .iter()
                .zip(&self.is_cover)
                .filter(|(_, c)| !**c)
                .map(|(q, _)| *q)
                .sum();
            let room = (split.incident_w - split.cover_w).max(0.0);
            let scale = if passed * f > room && passed > 0.0 {
                room / passed
            } else {
                f
            };
            for (q, c) in inputs.source_w.iter_mut().zip(&self.is_cover) {
                if !*c {
                    *q *= scale;
                }
            }
            split.entering_w *= scale;
            split.brine_w *= scale;
            split.liner_w *= scale;
            split.walls_w *= scale;
            split.lost_w =
                split.incident_w - split.cover_w - split.brine_w - split.liner_w - split.walls_w;
        }
        Ok(split)
    }
}
