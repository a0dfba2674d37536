//! The links of a built network regrouped by kind for the solver's inner loop.
//!
//! [`Network::links`](super::Network::links) keeps every link in the order the variant added
//! it, as an enum with two [`End`]s; the solver assembles the residual and Jacobian several
//! times a step, and matching the kind and both ends of every link each time costs more than
//! the arithmetic. [`LinkTable`] is built once by [`NetworkBuilder::build`]
//! (super::NetworkBuilder::build): one plain list per kind and per end shape, with a link to
//! a boundary turned so that its node comes first. The flows are the same expressions as
//! for the original links (turning a link only negates its flow, which is exact).

use std::sync::Arc;

use super::build::{End, Link, LinkKind};
use super::models::{ConductanceModel, EnclosureModel};
use crate::physics::constants::STEFAN_BOLTZMANN_W_M2_K4;

/// A heat-only link between two nodes.
#[derive(Debug, Clone, Copy)]
pub(crate) struct PairLink {
    /// Position in the network's links (and in the step record and the conductance inputs).
    pub link: usize,
    /// Node at end `a`.
    pub a: usize,
    /// Node at end `b`.
    pub b: usize,
    /// σ·A F ε [W K⁻⁴] for radiation (unused for a conductance, whose UA is an input).
    pub k: f64,
}

/// A heat-only link between a node and a boundary, node first: the heat leaving the node is
/// f(T_node, T_boundary), and the link's own flow from `a` to `b` is `sign` times that.
#[derive(Debug, Clone, Copy)]
pub(crate) struct EdgeLink {
    /// Position in the network's links.
    pub link: usize,
    /// The node.
    pub node: usize,
    /// The boundary.
    pub boundary: usize,
    /// +1 when the node is end `a`, −1 when it is end `b`.
    pub sign: f64,
    /// σ·A F ε [W K⁻⁴] for radiation (unused for a conductance).
    pub k: f64,
}

/// A link whose conductance follows a model (rare: kept general).
#[derive(Debug, Clone)]
pub(crate) struct ModelLink {
    /// Position in the network's links.
    pub link: usize,
    /// End `a`.
    pub a: End,
    /// End `b`.
    pub b: End,
    /// The model.
    pub model: Arc<dyn ConductanceModel>,
}

/// A humid enclosure from water node `w` to node `c`.
#[derive(Debug, Clone)]
pub(crate) struct EnclosureLink {
    /// Position in the network's links.
    pub link: usize,
    /// The water (hot, evaporating) node.
    pub w: usize,
    /// The condensing node.
    pub c: usize,
    /// Evaporating area [m²].
    pub area_m2: f64,
    /// Share of the condensate collected [-].
    pub collected_fraction: f64,
    /// Share of the vapour leaked [-].
    pub leaked_fraction: f64,
    /// The transfer model.
    pub model: Arc<dyn EnclosureModel>,
}

/// Every link of a network, grouped by kind and end shape.
#[derive(Debug, Clone, Default)]
pub(crate) struct LinkTable {
    /// Fixed conductances between two nodes.
    pub conductance_pairs: Vec<PairLink>,
    /// Fixed conductances from a node to a boundary.
    pub conductance_edges: Vec<EdgeLink>,
    /// Radiation between two nodes.
    pub radiation_pairs: Vec<PairLink>,
    /// Radiation from a node to a boundary.
    pub radiation_edges: Vec<EdgeLink>,
    /// Model conductances.
    pub variable: Vec<ModelLink>,
    /// Humid enclosures.
    pub enclosures: Vec<EnclosureLink>,
}

impl LinkTable {
    /// Regroup validated links (every end exists; no link joins two boundaries; every
    /// enclosure joins a water node to a node).
    pub(crate) fn new(links: &[Link]) -> Self {
        let mut t = LinkTable::default();
        for (l, link) in links.iter().enumerate() {
            let k = match &link.kind {
                LinkKind::Radiation { exchange_area_m2 } => {
                    STEFAN_BOLTZMANN_W_M2_K4 * exchange_area_m2
                }
                _ => 0.0,
            };
            match &link.kind {
                LinkKind::Conductance { .. } | LinkKind::Radiation { .. } => {
                    let radiation = matches!(link.kind, LinkKind::Radiation { .. });
                    let (pairs, edges) = if radiation {
                        (&mut t.radiation_pairs, &mut t.radiation_edges)
                    } else {
                        (&mut t.conductance_pairs, &mut t.conductance_edges)
                    };
                    match (link.a, link.b) {
                        (End::Node(a), End::Node(b)) => pairs.push(PairLink {
                            link: l,
                            a: a.0,
                            b: b.0,
                            k,
                        }),
                        (End::Node(n), End::Boundary(bd)) => edges.push(EdgeLink {
                            link: l,
                            node: n.0,
                            boundary: bd.0,
                            sign: 1.0,
                            k,
                        }),
                        (End::Boundary(bd), End::Node(n)) => edges.push(EdgeLink {
                            link: l,
                            node: n.0,
                            boundary: bd.0,
                            sign: -1.0,
                            k,
                        }),
                        // Rejected by the builder.
                        (End::Boundary(_), End::Boundary(_)) => {}
                    }
                }
                LinkKind::Variable { model } => t.variable.push(ModelLink {
                    link: l,
                    a: link.a,
                    b: link.b,
                    model: model.clone(),
                }),
                LinkKind::Enclosure {
                    area_m2,
                    model,
                    collected_fraction,
                    leaked_fraction,
                } => {
                    if let (End::Node(w), End::Node(c)) = (link.a, link.b) {
                        t.enclosures.push(EnclosureLink {
                            link: l,
                            w: w.0,
                            c: c.0,
                            area_m2: *area_m2,
                            collected_fraction: *collected_fraction,
                            leaked_fraction: *leaked_fraction,
                            model: model.clone(),
                        });
                    }
                }
            }
        }
        t
    }
}
