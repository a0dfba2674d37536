//! The network's structure: nodes, boundaries, links and their validation.

use std::sync::Arc;

use super::models::{ConductanceModel, EnclosureModel, SeawaterProperties, WaterProperties};
use super::table::LinkTable;

/// Index of an unknown-temperature node in its network.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash, PartialOrd, Ord)]
pub struct NodeId(pub(crate) usize);

/// Index of a boundary (known temperature: ambient air, sky, ground, feed water).
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash, PartialOrd, Ord)]
pub struct BoundaryId(pub(crate) usize);

/// Index of a link in its network.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash, PartialOrd, Ord)]
pub struct LinkId(pub(crate) usize);

impl NodeId {
    /// Position of the node in state and input vectors.
    pub fn index(self) -> usize {
        self.0
    }
}
impl BoundaryId {
    /// Position of the boundary in input vectors.
    pub fn index(self) -> usize {
        self.0
    }
}
impl LinkId {
    /// Position of the link in step records.
    pub fn index(self) -> usize {
        self.0
    }
}

/// One end of a link.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum End {
    /// A node whose temperature is solved for.
    Node(NodeId),
    /// A boundary whose temperature is given each step.
    Boundary(BoundaryId),
}

impl From<NodeId> for End {
    fn from(n: NodeId) -> Self {
        End::Node(n)
    }
}
impl From<BoundaryId> for End {
    fn from(b: BoundaryId) -> Self {
        End::Boundary(b)
    }
}

/// Which way heat leaves (or moves inside) the still, so the energy balance can report
/// losses by path.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash, PartialOrd, Ord)]
pub enum LossPath {
    /// Convection from a cover or glazing to the ambient air.
    CoverToAir,
    /// Long-wave radiation from a cover or glazing to the sky.
    CoverToSky,
    /// Through the base to the ground or the air below.
    Base,
    /// Through the side and back walls.
    Sides,
    /// Edges, spacers, frame and other thermal bridges.
    Edge,
    /// Between two parts of the still (not a loss).
    Internal,
    /// Anything else that reaches a boundary.
    Other,
}

impl LossPath {
    /// Every path, in reporting order.
    pub const ALL: [LossPath; 7] = [
        LossPath::CoverToAir,
        LossPath::CoverToSky,
        LossPath::Base,
        LossPath::Sides,
        LossPath::Edge,
        LossPath::Internal,
        LossPath::Other,
    ];

    /// Position in [`LossPath::ALL`].
    pub fn index(self) -> usize {
        self as usize
    }

    /// A plain label for reports.
    pub fn label(self) -> &'static str {
        match self {
            LossPath::CoverToAir => "cover to air",
            LossPath::CoverToSky => "cover to sky",
            LossPath::Base => "base",
            LossPath::Sides => "sides",
            LossPath::Edge => "edges and frame",
            LossPath::Internal => "internal",
            LossPath::Other => "other",
        }
    }
}

/// How a link carries heat.
#[derive(Debug, Clone)]
pub enum LinkKind {
    /// q = UA·(T_a − T_b). The conductance given here is the default of
    /// [`crate::network::Inputs::conductance_w_k`], which may change it every step (wind).
    Conductance {
        /// UA [W K⁻¹].
        ua_w_k: f64,
    },
    /// A temperature-dependent conductance given by a model.
    Variable {
        /// The model.
        model: Arc<dyn ConductanceModel>,
    },
    /// Grey-body radiation q = σ·(A F ε)·(T_a⁴ − T_b⁴).
    Radiation {
        /// Exchange area A·F·ε_eff [m²].
        exchange_area_m2: f64,
    },
    /// Convection plus evaporation–condensation across a humid enclosure, from the water node
    /// at end `a` (brine, wick) to the node at end `b` (cover, plate). Carries mass and latent
    /// heat.
    Enclosure {
        /// Evaporating area [m²].
        area_m2: f64,
        /// The internal heat- and mass-transfer model.
        model: Arc<dyn EnclosureModel>,
        /// Share of the condensate that reaches the collecting trough [-]; the rest drips
        /// back into the water node at the condensing surface's temperature.
        collected_fraction: f64,
        /// Share of the evaporated vapour that leaks out of the still uncondensed [-].
        leaked_fraction: f64,
    },
}

/// One link of the network.
#[derive(Debug, Clone)]
pub struct Link {
    /// Name used in reports and errors.
    pub name: String,
    /// First end (the hot, evaporating end for an enclosure).
    pub a: End,
    /// Second end.
    pub b: End,
    /// How it carries heat.
    pub kind: LinkKind,
    /// Which loss path its flow into a boundary is booked under.
    pub path: LossPath,
}

/// One unknown-temperature node.
#[derive(Debug, Clone)]
pub struct Node {
    /// Name used in reports and errors.
    pub name: String,
    /// Heat capacity of the solid parts (glass, liner, plate) [J K⁻¹].
    pub capacity_j_k: f64,
    /// Whether the node holds water whose mass changes (brine, wick film).
    pub holds_water: bool,
    /// When the water in the node (brine less its salt) is at or below this, the node counts
    /// as dry and stops evaporating [kg].
    pub dry_mass_kg: f64,
    /// A continuously fed wick: its evaporation is capped smoothly at the water the feed
    /// and the cloth's reserve can supply over a step ([`crate::network::supply_cap`]),
    /// so a wick fed below its evaporation sits at a partly dry balance instead of drying
    /// out and re-wetting step after step.
    pub fed_wick: bool,
}

/// Why a network could not be built.
#[derive(Debug, Clone, PartialEq, thiserror::Error)]
#[non_exhaustive]
pub enum NetworkError {
    /// The network has no unknown node.
    #[error("the network has no node")]
    Empty,
    /// Two nodes, boundaries or links share a name.
    #[error("the name `{name}` is used twice")]
    DuplicateName {
        /// The name.
        name: String,
    },
    /// A node has no chain of links to any boundary, so its temperature is undetermined.
    #[error("node `{node}` has no path of links to a boundary (its temperature is undetermined)")]
    Isolated {
        /// The node's name.
        node: String,
    },
    /// A value is out of its allowed range.
    #[error("{item}: {what} = {value} is outside {allowed}")]
    BadValue {
        /// The node or link.
        item: String,
        /// Which value.
        what: &'static str,
        /// The value given.
        value: f64,
        /// The allowed range.
        allowed: &'static str,
    },
    /// An id that does not belong to this network.
    #[error("no {what} with index {index} in this network")]
    UnknownId {
        /// "node", "boundary" or "link".
        what: &'static str,
        /// The index given.
        index: usize,
    },
    /// Water, feed or drain given for a node that holds no water.
    #[error("node `{node}` holds no water")]
    NotWater {
        /// The node's name.
        node: String,
    },
    /// A link's ends are not allowed for its kind.
    #[error("link `{link}`: {why}")]
    BadEnds {
        /// The link.
        link: String,
        /// What is wrong.
        why: String,
    },
}

/// An immutable, validated thermal network. Still variants build one with
/// [`NetworkBuilder`] and hand it to [`crate::network::Solver`].
#[derive(Debug, Clone)]
pub struct Network {
    pub(crate) nodes: Vec<Node>,
    pub(crate) boundaries: Vec<String>,
    pub(crate) links: Vec<Link>,
    pub(crate) water: Arc<dyn WaterProperties>,
    /// Largest |i − j| over links joining nodes i and j (band half-width of the Jacobian).
    pub(crate) bandwidth: usize,
    /// The links regrouped by kind for the solver's inner loop.
    pub(crate) table: LinkTable,
}

impl Network {
    /// The nodes, in index order.
    pub fn nodes(&self) -> &[Node] {
        &self.nodes
    }
    /// The boundary names, in index order.
    pub fn boundaries(&self) -> &[String] {
        &self.boundaries
    }
    /// The links, in index order.
    pub fn links(&self) -> &[Link] {
        &self.links
    }

    /// Edit the links in place (crate-internal, e.g. calibration factors), then rebuild the
    /// solver's regrouped copy of them, so the two never disagree. Structure (ends, count)
    /// must not change: only coefficients.
    pub(crate) fn edit_links(&mut self, edit: impl FnOnce(&mut [Link])) {
        edit(&mut self.links);
        self.table = LinkTable::new(&self.links);
    }
    /// The water property set shared by solver and energy balance.
    pub fn water(&self) -> &dyn WaterProperties {
        self.water.as_ref()
    }
    /// Half-width of the Jacobian's band (0 for a single node, 1 for a chain).
    pub fn bandwidth(&self) -> usize {
        self.bandwidth
    }
    /// Find a node by name.
    pub fn node_id(&self, name: &str) -> Option<NodeId> {
        self.nodes.iter().position(|n| n.name == name).map(NodeId)
    }
    /// Find a boundary by name.
    pub fn boundary_id(&self, name: &str) -> Option<BoundaryId> {
        self.boundaries
            .iter()
            .position(|n| n == name)
            .map(BoundaryId)
    }
    /// Find a link by name.
    pub fn link_id(&self, name: &str) -> Option<LinkId> {
        self.links.iter().position(|l| l.name == name).map(LinkId)
    }
}

/// Collects nodes, boundaries and links; [`NetworkBuilder::build`] validates them.
///
/// Ids returned by one builder are only meaningful for the network it builds.
#[derive(Debug, Clone, Default)]
pub struct NetworkBuilder {
    nodes: Vec<Node>,
    boundaries: Vec<String>,
    links: Vec<Link>,
    water: Option<Arc<dyn WaterProperties>>,
}

impl NetworkBuilder {
    /// An empty builder.
    pub fn new() -> Self {
        Self::default()
    }

    /// Use this water property set (default [`SeawaterProperties`]).
    pub fn water_properties(&mut self, water: Arc<dyn WaterProperties>) -> &mut Self {
        self.water = Some(water);
        self
    }

    /// Add a node of fixed heat capacity `capacity_j_k` [J K⁻¹] (0 for a massless surface).
    pub fn node(&mut self, name: &str, capacity_j_k: f64) -> NodeId {
        self.nodes.push(Node {
            name: name.to_owned(),
            capacity_j_k,
            holds_water: false,
            dry_mass_kg: 0.0,
            fed_wick: false,
        });
        NodeId(self.nodes.len() - 1)
    }

    /// Add a node holding water whose mass and salt are state (brine, wick film), with the
    /// fixed capacity of its solid parts `capacity_j_k` [J K⁻¹] and the water (brine less
    /// salt) at or below which it counts as dry `dry_mass_kg` [kg].
    pub fn water_node(&mut self, name: &str, capacity_j_k: f64, dry_mass_kg: f64) -> NodeId {
        self.nodes.push(Node {
            name: name.to_owned(),
            capacity_j_k,
            holds_water: true,
            dry_mass_kg,
            fed_wick: false,
        });
        NodeId(self.nodes.len() - 1)
    }

    /// Add a continuously fed wick: a water node (as [`Self::water_node`]) whose evaporation
    /// is capped smoothly at the water its feed and its reserve above half of `dry_mass_kg`
    /// can supply within a step, instead of stopping at a dry-out event. Below `dry_mass_kg`
    /// it still counts as dry (for the dry hours), but keeps evaporating what the feed brings.
    pub fn fed_wick_node(&mut self, name: &str, capacity_j_k: f64, dry_mass_kg: f64) -> NodeId {
        let id = self.water_node(name, capacity_j_k, dry_mass_kg);
        if let Some(n) = self.nodes.last_mut() {
            n.fed_wick = true;
        }
        id
    }

    /// Add a boundary (temperature given each step).
    pub fn boundary(&mut self, name: &str) -> BoundaryId {
        self.boundaries.push(name.to_owned());
        BoundaryId(self.boundaries.len() - 1)
    }

    /// Add a link of any kind.
    pub fn link(
        &mut self,
        name: &str,
        a: impl Into<End>,
        b: impl Into<End>,
        kind: LinkKind,
        path: LossPath,
    ) -> LinkId {
        self.links.push(Link {
            name: name.to_owned(),
            a: a.into(),
            b: b.into(),
            kind,
            path,
        });
        LinkId(self.links.len() - 1)
    }

    /// Add a fixed conductance UA = `ua_w_k` [W K⁻¹].
    pub fn conductance(
        &mut self,
        name: &str,
        a: impl Into<End>,
        b: impl Into<End>,
        ua_w_k: f64,
        path: LossPath,
    ) -> LinkId {
        self.link(name, a, b, LinkKind::Conductance { ua_w_k }, path)
    }

    /// Add a temperature-dependent conductance.
    pub fn variable_conductance(
        &mut self,
        name: &str,
        a: impl Into<End>,
        b: impl Into<End>,
        model: Arc<dyn ConductanceModel>,
        path: LossPath,
    ) -> LinkId {
        self.link(name, a, b, LinkKind::Variable { model }, path)
    }

    /// Add a radiation link with exchange area A·F·ε_eff = `exchange_area_m2` [m²].
    pub fn radiation(
        &mut self,
        name: &str,
        a: impl Into<End>,
        b: impl Into<End>,
        exchange_area_m2: f64,
        path: LossPath,
    ) -> LinkId {
        self.link(name, a, b, LinkKind::Radiation { exchange_area_m2 }, path)
    }

    /// Add a humid-enclosure link from water node `hot` to node `cold` over `area_m2` [m²],
    /// with the shares of condensate collected and of vapour leaked [-].
    #[allow(clippy::too_many_arguments)]
    pub fn enclosure(
        &mut self,
        name: &str,
        hot: NodeId,
        cold: NodeId,
        area_m2: f64,
        model: Arc<dyn EnclosureModel>,
        collected_fraction: f64,
        leaked_fraction: f64,
    ) -> LinkId {
        self.link(
            name,
            hot,
            cold,
            LinkKind::Enclosure {
                area_m2,
                model,
                collected_fraction,
                leaked_fraction,
            },
            LossPath::Internal,
        )
    }

    /// Validate and freeze the network.
    ///
    /// Checks names are unique, values are in range, link ends exist and suit the link kind,
    /// and every node has a path of links to a boundary (otherwise the steady-state Jacobian is
    /// singular) — the error names the first node without one.
    pub fn build(&self) -> Result<Network, NetworkError> {
        if self.nodes.is_empty() {
            return Err(NetworkError::Empty);
        }
        let mut names: Vec<&str> = self
            .nodes
            .iter()
            .map(|n| n.name.as_str())
            .chain(self.boundaries.iter().map(String::as_str))
            .chain(self.links.iter().map(|l| l.name.as_str()))
            .collect();
        names.sort_unstable();
        if let Some(w) = names.windows(2).find(|w| w[0] == w[1]) {
            return Err(NetworkError::DuplicateName {
                name: w[0].to_owned(),
            });
        }
        for n in &self.nodes {
            check(
                &n.name,
                "capacity_j_k",
                n.capacity_j_k,
                0.0,
                1e12,
                "[0, 1e12] J/K",
            )?;
            check(
                &n.name,
                "dry_mass_kg",
                n.dry_mass_kg,
                0.0,
                1e6,
                "[0, 1e6] kg",
            )?;
        }
        let n_nodes = self.nodes.len();
        let n_bound = self.boundaries.len();
        let mut bandwidth = 0;
        let mut wick_enclosures = vec![0u32; n_nodes];
        for l in &self.links {
            let bad = |why: &str| NetworkError::BadEnds {
                link: l.name.clone(),
                why: why.to_owned(),
            };
            for e in [l.a, l.b] {
                let ok = match e {
                    End::Node(NodeId(i)) => i < n_nodes,
                    End::Boundary(BoundaryId(i)) => i < n_bound,
                };
                if !ok {
                    return Err(bad("an end belongs to another network"));
                }
            }
            match (l.a, l.b) {
                (End::Boundary(_), End::Boundary(_)) => {
                    return Err(bad("joins two boundaries"));
                }
                (End::Node(x), End::Node(y)) if x == y => {
                    return Err(bad("joins a node to itself"));
                }
                (End::Node(NodeId(x)), End::Node(NodeId(y))) => {
                    bandwidth = bandwidth.max(x.abs_diff(y));
                }
                _ => {}
            }
            // A fed wick's supply cap is per node, so it may evaporate through one
            // enclosure only (a second would spend the same supply twice).
            if let (LinkKind::Enclosure { .. }, End::Node(NodeId(x))) = (&l.kind, l.a)
                && self.nodes[x].fed_wick
            {
                wick_enclosures[x] += 1;
                if wick_enclosures[x] > 1 {
                    return Err(bad("a fed wick may evaporate through one enclosure only"));
                }
            }
            match &l.kind {
                LinkKind::Conductance { ua_w_k } => {
                    check(&l.name, "ua_w_k", *ua_w_k, 0.0, 1e9, "[0, 1e9] W/K")?;
                }
                LinkKind::Variable { .. } => {}
                LinkKind::Radiation { exchange_area_m2 } => {
                    check(
                        &l.name,
                        "exchange_area_m2",
                        *exchange_area_m2,
                        0.0,
                        1e6,
                        "[0, 1e6] m²",
                    )?;
                }
                LinkKind::Enclosure {
                    area_m2,
                    collected_fraction,
                    leaked_fraction,
                    ..
                } => {
                    check(&l.name, "area_m2", *area_m2, 0.0, 1e6, "[0, 1e6] m²")?;
                    check(
                        &l.name,
                        "collected_fraction",
                        *collected_fraction,
                        0.0,
                        1.0,
                        "[0, 1]",
                    )?;
                    check(
                        &l.name,
                        "leaked_fraction",
                        *leaked_fraction,
                        0.0,
                        1.0,
                        "[0, 1]",
                    )?;
                    match (l.a, l.b) {
                        (End::Node(h), End::Node(_)) if self.nodes[h.0].holds_water => {}
                        _ => {
                            return Err(bad("an enclosure runs from a water node to another node"));
                        }
                    }
                }
            }
        }
        // Every node must reach a boundary: flood fill from the boundaries over links.
        let mut reached = vec![false; n_nodes];
        let mut frontier: Vec<usize> = Vec::new();
        for l in &self.links {
            for (x, y) in [(l.a, l.b), (l.b, l.a)] {
                if let (End::Boundary(_), End::Node(NodeId(i))) = (x, y)
                    && !reached[i]
                {
                    reached[i] = true;
                    frontier.push(i);
                }
            }
        }
        while let Some(i) = frontier.pop() {
            for l in &self.links {
                if let (End::Node(NodeId(x)), End::Node(NodeId(y))) = (l.a, l.b) {
                    for (p, q) in [(x, y), (y, x)] {
                        if p == i && !reached[q] {
                            reached[q] = true;
                            frontier.push(q);
                        }
                    }
                }
            }
        }
        if let Some(i) = reached.iter().position(|r| !r) {
            return Err(NetworkError::Isolated {
                node: self.nodes[i].name.clone(),
            });
        }
        Ok(Network {
            nodes: self.nodes.clone(),
            boundaries: self.boundaries.clone(),
            links: self.links.clone(),
            table: LinkTable::new(&self.links),
            water: self
                .water
                .clone()
                .unwrap_or_else(|| Arc::new(SeawaterProperties)),
            bandwidth,
        })
    }
}

fn check(
    item: &str,
    what: &'static str,
    value: f64,
    lo: f64,
    hi: f64,
    allowed: &'static str,
) -> Result<(), NetworkError> {
    if value.is_finite() && value >= lo && value <= hi {
        Ok(())
    } else {
        Err(NetworkError::BadValue {
            item: item.to_owned(),
            what,
            value,
            allowed,
        })
    }
}
