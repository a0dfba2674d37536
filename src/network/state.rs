//! What changes from step to step: the state (temperatures, water and salt) and the inputs
//! (boundary temperatures, sources, conductances, feed and drain).

use super::build::{BoundaryId, LinkId, LinkKind, Network, NetworkError, NodeId};
use super::models::SALT_SATURATION_G_KG;

/// Lowest and highest temperatures the network accepts anywhere [K]: outside them the
/// water properties and the internal-transfer correlations have no meaning.
pub const TEMPERATURE_RANGE_K: (f64, f64) = (150.0, 500.0);

fn bad(item: &str, what: &'static str, value: f64, allowed: &'static str) -> NetworkError {
    NetworkError::BadValue {
        item: item.to_owned(),
        what,
        value,
        allowed,
    }
}

fn temperature_ok(t_k: f64) -> bool {
    t_k.is_finite() && t_k >= TEMPERATURE_RANGE_K.0 && t_k <= TEMPERATURE_RANGE_K.1
}

const T_ALLOWED: &str = "[150, 500] K";

/// The state of a network: node temperatures, and water and salt in water nodes.
#[derive(Debug, Clone, PartialEq)]
pub struct State {
    pub(crate) t_k: Vec<f64>,
    pub(crate) brine_kg: Vec<f64>,
    pub(crate) salt_kg: Vec<f64>,
    pub(crate) time_s: f64,
}

impl State {
    /// Every node temperature [K], in node order.
    pub fn temperatures_k(&self) -> &[f64] {
        &self.t_k
    }
    /// One node's temperature [K].
    pub fn temperature_k(&self, node: NodeId) -> Option<f64> {
        self.t_k.get(node.0).copied()
    }
    /// Mass of brine (water plus salt) held by a node [kg] (0 for a node without water).
    pub fn brine_kg(&self, node: NodeId) -> Option<f64> {
        self.brine_kg.get(node.0).copied()
    }
    /// Salt held by a node [kg].
    pub fn salt_kg(&self, node: NodeId) -> Option<f64> {
        self.salt_kg.get(node.0).copied()
    }
    /// Absolute salinity of a node's brine [g kg⁻¹] (0 when empty).
    pub fn salinity_g_kg(&self, node: NodeId) -> Option<f64> {
        let m = self.brine_kg.get(node.0)?;
        let s = self.salt_kg.get(node.0)?;
        Some(salinity(*m, *s))
    }
    /// Simulated time since the state was made [s] (steady-state steps do not advance it).
    pub fn time_s(&self) -> f64 {
        self.time_s
    }

    /// Set a node's temperature `t_k` [K].
    pub fn set_temperature_k(
        &mut self,
        net: &Network,
        node: NodeId,
        t_k: f64,
    ) -> Result<(), NetworkError> {
        let n = net.nodes.get(node.0).ok_or(NetworkError::UnknownId {
            what: "node",
            index: node.0,
        })?;
        if !temperature_ok(t_k) || node.0 >= self.t_k.len() {
            return Err(bad(&n.name, "temperature_k", t_k, T_ALLOWED));
        }
        self.t_k[node.0] = t_k;
        Ok(())
    }

    /// Put `brine_kg` [kg] of brine at salinity `salinity_g_kg` [g kg⁻¹] into a water node.
    pub fn set_brine(
        &mut self,
        net: &Network,
        node: NodeId,
        brine_kg: f64,
        salinity_g_kg: f64,
    ) -> Result<(), NetworkError> {
        let n = net.nodes.get(node.0).ok_or(NetworkError::UnknownId {
            what: "node",
            index: node.0,
        })?;
        if !n.holds_water || node.0 >= self.brine_kg.len() {
            return Err(NetworkError::NotWater {
                node: n.name.clone(),
            });
        }
        if !(brine_kg.is_finite() && (0.0..=1e7).contains(&brine_kg)) {
            return Err(bad(&n.name, "brine_kg", brine_kg, "[0, 1e7] kg"));
        }
        if !(salinity_g_kg.is_finite() && (0.0..=300.0).contains(&salinity_g_kg)) {
            return Err(bad(
                &n.name,
                "salinity_g_kg",
                salinity_g_kg,
                "[0, 300] g/kg",
            ));
        }
        self.brine_kg[node.0] = brine_kg;
        self.salt_kg[node.0] = brine_kg * salinity_g_kg / 1000.0;
        Ok(())
    }
}

/// Salt beyond what the water in `brine_kg` [kg] of brine holding `salt_kg` [kg] of salt can
/// dissolve at [`SALT_SATURATION_G_KG`] [kg]: the crust lying on the liner.
pub(crate) fn crust_kg(brine_kg: f64, salt_kg: f64) -> f64 {
    let water = (brine_kg - salt_kg).max(0.0);
    let dissolvable = water * SALT_SATURATION_G_KG / (1000.0 - SALT_SATURATION_G_KG);
    (salt_kg - dissolvable).max(0.0)
}

/// Salinity of the liquid part of the brine, the crust left out [g kg⁻¹] (0 when no liquid
/// is left).
pub(crate) fn dissolved_salinity(brine_kg: f64, salt_kg: f64) -> f64 {
    let c = crust_kg(brine_kg, salt_kg);
    let liquid = brine_kg - c;
    if liquid > 0.0 {
        (1000.0 * (salt_kg - c) / liquid).clamp(0.0, SALT_SATURATION_G_KG)
    } else {
        0.0
    }
}

pub(crate) fn salinity(brine_kg: f64, salt_kg: f64) -> f64 {
    if brine_kg > 0.0 {
        (1000.0 * salt_kg / brine_kg).clamp(0.0, 1000.0)
    } else {
        0.0
    }
}

/// Everything given from outside for one step. Make it with [`Network::inputs`], set what
/// changes, and reuse it: nothing is allocated per step.
#[derive(Debug, Clone, PartialEq)]
pub struct Inputs {
    pub(crate) boundary_t_k: Vec<f64>,
    pub(crate) source_w: Vec<f64>,
    pub(crate) conductance_w_k: Vec<f64>,
    pub(crate) feed_kg_s: Vec<f64>,
    pub(crate) feed_t_k: Vec<f64>,
    pub(crate) feed_salinity_g_kg: Vec<f64>,
    pub(crate) drain_kg_s: Vec<f64>,
}

impl Inputs {
    /// Boundary temperatures [K], in boundary order.
    pub fn boundary_temperatures_k(&self) -> &[f64] {
        &self.boundary_t_k
    }
    /// Heat sources (absorbed sunlight) [W], in node order.
    pub fn sources_w(&self) -> &[f64] {
        &self.source_w
    }
    /// Current conductance of each fixed-conductance link [W K⁻¹] (other links: unused).
    pub fn conductances_w_k(&self) -> &[f64] {
        &self.conductance_w_k
    }

    /// Set a boundary's temperature `t_k` [K].
    pub fn set_boundary_k(
        &mut self,
        net: &Network,
        b: BoundaryId,
        t_k: f64,
    ) -> Result<(), NetworkError> {
        let name = net.boundaries.get(b.0).ok_or(NetworkError::UnknownId {
            what: "boundary",
            index: b.0,
        })?;
        if !temperature_ok(t_k) || b.0 >= self.boundary_t_k.len() {
            return Err(bad(name, "temperature_k", t_k, T_ALLOWED));
        }
        self.boundary_t_k[b.0] = t_k;
        Ok(())
    }

    /// Set the heat absorbed by a node (sunlight) `source_w` [W].
    pub fn set_source_w(
        &mut self,
        net: &Network,
        node: NodeId,
        source_w: f64,
    ) -> Result<(), NetworkError> {
        let n = net.nodes.get(node.0).ok_or(NetworkError::UnknownId {
            what: "node",
            index: node.0,
        })?;
        if !(source_w.is_finite() && source_w.abs() <= 1e9) || node.0 >= self.source_w.len() {
            return Err(bad(&n.name, "source_w", source_w, "[-1e9, 1e9] W"));
        }
        self.source_w[node.0] = source_w;
        Ok(())
    }

    /// Set the conductance of a fixed-conductance link `ua_w_k` [W K⁻¹] (e.g. for wind).
    pub fn set_conductance_w_k(
        &mut self,
        net: &Network,
        link: LinkId,
        ua_w_k: f64,
    ) -> Result<(), NetworkError> {
        let l = net.links.get(link.0).ok_or(NetworkError::UnknownId {
            what: "link",
            index: link.0,
        })?;
        if !matches!(l.kind, LinkKind::Conductance { .. }) {
            return Err(NetworkError::BadEnds {
                link: l.name.clone(),
                why: "only a fixed-conductance link takes a conductance input".to_owned(),
            });
        }
        if !(ua_w_k.is_finite() && (0.0..=1e9).contains(&ua_w_k))
            || link.0 >= self.conductance_w_k.len()
        {
            return Err(bad(&l.name, "ua_w_k", ua_w_k, "[0, 1e9] W/K"));
        }
        self.conductance_w_k[link.0] = ua_w_k;
        Ok(())
    }

    /// Feed `feed_kg_s` [kg s⁻¹] of brine at `feed_t_k` [K] and `salinity_g_kg` [g kg⁻¹]
    /// into a water node.
    pub fn set_feed(
        &mut self,
        net: &Network,
        node: NodeId,
        feed_kg_s: f64,
        feed_t_k: f64,
        salinity_g_kg: f64,
    ) -> Result<(), NetworkError> {
        let n = self.water_node(net, node)?;
        if !(feed_kg_s.is_finite() && (0.0..=1e3).contains(&feed_kg_s)) {
            return Err(bad(n, "feed_kg_s", feed_kg_s, "[0, 1e3] kg/s"));
        }
        if !temperature_ok(feed_t_k) {
            return Err(bad(n, "feed_t_k", feed_t_k, T_ALLOWED));
        }
        if !(salinity_g_kg.is_finite() && (0.0..=300.0).contains(&salinity_g_kg)) {
            return Err(bad(n, "salinity_g_kg", salinity_g_kg, "[0, 300] g/kg"));
        }
        self.feed_kg_s[node.0] = feed_kg_s;
        self.feed_t_k[node.0] = feed_t_k;
        self.feed_salinity_g_kg[node.0] = salinity_g_kg;
        Ok(())
    }

    /// Drain `drain_kg_s` [kg s⁻¹] of brine from a water node (flushing, wick run-off).
    pub fn set_drain(
        &mut self,
        net: &Network,
        node: NodeId,
        drain_kg_s: f64,
    ) -> Result<(), NetworkError> {
        let n = self.water_node(net, node)?;
        if !(drain_kg_s.is_finite() && (0.0..=1e3).contains(&drain_kg_s)) {
            return Err(bad(n, "drain_kg_s", drain_kg_s, "[0, 1e3] kg/s"));
        }
        self.drain_kg_s[node.0] = drain_kg_s;
        Ok(())
    }

    fn water_node<'a>(&self, net: &'a Network, node: NodeId) -> Result<&'a str, NetworkError> {
        let n = net.nodes.get(node.0).ok_or(NetworkError::UnknownId {
            what: "node",
            index: node.0,
        })?;
        if !n.holds_water || node.0 >= self.feed_kg_s.len() {
            return Err(NetworkError::NotWater {
                node: n.name.clone(),
            });
        }
        Ok(&n.name)
    }

    pub(crate) fn fits(&self, net: &Network) -> bool {
        let n = net.nodes.len();
        self.boundary_t_k.len() == net.boundaries.len()
            && self.conductance_w_k.len() == net.links.len()
            && [
                &self.source_w,
                &self.feed_kg_s,
                &self.feed_t_k,
                &self.feed_salinity_g_kg,
                &self.drain_kg_s,
            ]
            .iter()
            .all(|v| v.len() == n)
    }
}

impl Network {
    /// A state with every node at `t_k` [K] and no water.
    pub fn initial_state(&self, t_k: f64) -> Result<State, NetworkError> {
        if !temperature_ok(t_k) {
            return Err(bad("initial state", "temperature_k", t_k, T_ALLOWED));
        }
        let n = self.nodes.len();
        Ok(State {
            t_k: vec![t_k; n],
            brine_kg: vec![0.0; n],
            salt_kg: vec![0.0; n],
            time_s: 0.0,
        })
    }

    /// Inputs with every boundary (and feed) at `t_k` [K], no sources, no feed or drain, and
    /// the fixed conductances given at build time.
    pub fn inputs(&self, t_k: f64) -> Result<Inputs, NetworkError> {
        if !temperature_ok(t_k) {
            return Err(bad("inputs", "temperature_k", t_k, T_ALLOWED));
        }
        let n = self.nodes.len();
        Ok(Inputs {
            boundary_t_k: vec![t_k; self.boundaries.len()],
            source_w: vec![0.0; n],
            conductance_w_k: self
                .links
                .iter()
                .map(|l| match l.kind {
                    LinkKind::Conductance { ua_w_k } => ua_w_k,
                    _ => 0.0,
                })
                .collect(),
            feed_kg_s: vec![0.0; n],
            feed_t_k: vec![t_k; n],
            feed_salinity_g_kg: vec![0.0; n],
            drain_kg_s: vec![0.0; n],
        })
    }

    /// Energy stored in the network relative to an arbitrary zero [J]:
    /// Σ C_i·T_i + m_i·h_f(T_i). Differences of it are the stored heat.
    pub fn stored_energy_j(&self, state: &State) -> f64 {
        self.nodes
            .iter()
            .enumerate()
            .map(|(i, n)| {
                let t = state.t_k.get(i).copied().unwrap_or(0.0);
                let m = state.brine_kg.get(i).copied().unwrap_or(0.0);
                let water = if m > 0.0 {
                    m * self.water.liquid_enthalpy_j_kg(t)
                } else {
                    0.0
                };
                n.capacity_j_k * t + water
            })
            .sum()
    }
}
