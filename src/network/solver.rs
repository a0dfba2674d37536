//! The one solver: Newton's method on the node energy balances, implicit Euler in time.
//!
//! For node i with fixed capacity C_i and water mass m_i the residual is
//!
//! R_i = [C_i (T_i − T_i⁰) + m_i⁰ (h_f(T_i) − h_f(T_i⁰))]/Δt − G_i(T) − S_i
//!
//! where G_i is the heat the links bring in *relative to the node's own liquid enthalpy*
//! (G_i = F_i − h_f(T_i)·ṁ_net,i with F_i the full enthalpy inflow, F_i = Σq + Σṁ_in h_in −
//! Σṁ_out h_out). With m_i¹ = m_i⁰ + Δt·ṁ_net,i this is exactly the implicit-Euler form of
//! d(m h + C T)/dt = F, so energy is conserved to the Newton tolerance even while the
//! brine mass changes. With Δt = ∞ the first term vanishes and the same code gives the
//! steady state (masses held fixed).

use nalgebra::DMatrix;

use super::band::BandMatrix;

use super::build::{End, Network, NetworkError};
use super::state::{Inputs, State, TEMPERATURE_RANGE_K, dissolved_salinity, salinity};
use super::table::EnclosureLink;

/// Newton settings. Validated by [`Solver::new`].
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct SolverSettings {
    /// Most Newton iterations per step.
    pub max_iterations: u32,
    /// Absolute residual tolerance per node [W].
    pub abs_tolerance_w: f64,
    /// Relative residual tolerance per node [-], times the sum of the magnitudes of the
    /// terms in that node's balance (so round-off never blocks convergence).
    pub rel_tolerance: f64,
    /// Largest temperature change per Newton iteration [K]; larger updates are scaled down
    /// (keeps Dunkle's 268.9 kPa − p_w term and the exponentials in range).
    pub max_newton_change_k: f64,
    /// Most halvings of the Newton update when the residual does not fall.
    pub max_halvings: u32,
}

impl Default for SolverSettings {
    /// 30 iterations; 1e−6 W + 1e−11 × the node's term sum; 10 K per iteration; 12 halvings.
    fn default() -> Self {
        SolverSettings {
            max_iterations: 30,
            abs_tolerance_w: 1e-6,
            rel_tolerance: 1e-11,
            max_newton_change_k: 10.0,
            max_halvings: 12,
        }
    }
}

impl SolverSettings {
    /// Check every setting is in range.
    pub fn validate(&self) -> Result<(), NetworkError> {
        let bad = |what, value, allowed| NetworkError::BadValue {
            item: "solver settings".to_owned(),
            what,
            value,
            allowed,
        };
        if !(1..=1000).contains(&self.max_iterations) {
            return Err(bad(
                "max_iterations",
                f64::from(self.max_iterations),
                "[1, 1000]",
            ));
        }
        if !(self.abs_tolerance_w.is_finite() && self.abs_tolerance_w > 0.0) {
            return Err(bad("abs_tolerance_w", self.abs_tolerance_w, "> 0 W"));
        }
        if !(self.rel_tolerance.is_finite() && (0.0..1e-2).contains(&self.rel_tolerance)) {
            return Err(bad("rel_tolerance", self.rel_tolerance, "[0, 0.01)"));
        }
        if !(self.max_newton_change_k.is_finite() && self.max_newton_change_k > 0.0) {
            return Err(bad(
                "max_newton_change_k",
                self.max_newton_change_k,
                "> 0 K",
            ));
        }
        if self.max_halvings > 60 {
            return Err(bad("max_halvings", f64::from(self.max_halvings), "[0, 60]"));
        }
        Ok(())
    }
}

/// How a step ended. Every step ends in exactly one of these.
#[derive(Debug, Clone, Copy, PartialEq)]
pub enum StepOutcome {
    /// The balances converged after `iterations` Newton iterations (0 if the start was
    /// already converged); the state and the record are updated.
    Converged {
        /// Newton iterations used.
        iterations: u32,
    },
    /// The step converged but crossed an event; the state is unchanged. Retry with a step of
    /// `time_to_event_s`.
    Stopped {
        /// The event.
        event: StepEvent,
    },
    /// The step failed; the state is unchanged.
    Failed {
        /// Why.
        reason: FailReason,
    },
}

/// An event that ends a step early.
#[derive(Debug, Clone, Copy, PartialEq)]
pub enum StepEvent {
    /// A water node would run out of water within the step.
    DryOut {
        /// The node (see [`Network::nodes`] for its name).
        node: usize,
        /// Estimated time from the step's start to the node becoming dry [s].
        time_to_event_s: f64,
    },
}

/// Why a step failed.
#[derive(Debug, Clone, Copy, PartialEq)]
pub enum FailReason {
    /// The inputs, state or step length do not fit the network or are out of range.
    InvalidInput {
        /// What is wrong.
        what: &'static str,
    },
    /// Newton used every iteration allowed without meeting the tolerance.
    MaxIterations {
        /// Iterations used.
        iterations: u32,
        /// Largest node residual at the end [W].
        residual_w: f64,
    },
    /// The Jacobian could not be factorised.
    SingularJacobian {
        /// The iteration at which it happened.
        iteration: u32,
    },
    /// No fraction of the Newton update reduced the residual.
    NoDescent {
        /// The iteration at which it happened.
        iteration: u32,
        /// Largest node residual at that point [W].
        residual_w: f64,
    },
    /// A flow or residual was not a finite number.
    NonFinite {
        /// The iteration at which it happened.
        iteration: u32,
    },
}

impl std::fmt::Display for FailReason {
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        match self {
            FailReason::InvalidInput { what } => write!(f, "invalid input: {what}"),
            FailReason::MaxIterations {
                iterations,
                residual_w,
            } => write!(
                f,
                "no convergence in {iterations} Newton iterations (largest residual {residual_w:.3e} W)"
            ),
            FailReason::SingularJacobian { iteration } => {
                write!(f, "singular Jacobian at Newton iteration {iteration}")
            }
            FailReason::NoDescent {
                iteration,
                residual_w,
            } => write!(
                f,
                "no reducing Newton update at iteration {iteration} (largest residual {residual_w:.3e} W)"
            ),
            FailReason::NonFinite { iteration } => {
                write!(f, "non-finite flow at Newton iteration {iteration}")
            }
        }
    }
}

/// Flows through one link at the end of a step (implicit Euler: held over the step).
#[derive(Debug, Clone, Copy, Default, PartialEq)]
pub struct LinkRecord {
    /// Heat leaving end `a` toward end `b` [W]; for an enclosure the convective plus the
    /// evaporative flux leaving the water surface.
    pub heat_w: f64,
    /// Convective part of an enclosure's flow [W] (0 for other links).
    pub convective_w: f64,
    /// Evaporation from the water node [kg s⁻¹] (negative: condensation onto it).
    pub evaporation_kg_s: f64,
    /// Vapour condensing on the cold surface [kg s⁻¹].
    pub condensation_kg_s: f64,
    /// Condensate reaching the trough, the distillate [kg s⁻¹].
    pub collection_kg_s: f64,
    /// Condensate dripping back into the water node [kg s⁻¹].
    pub dripback_kg_s: f64,
    /// Vapour leaking out of the still [kg s⁻¹].
    pub leak_kg_s: f64,
    /// Enthalpy leaving with the distillate, at h_f of the cold surface [W].
    pub distillate_enthalpy_w: f64,
    /// Enthalpy leaving with leaked vapour, at h_g of the water node [W].
    pub leak_enthalpy_w: f64,
}

/// A node's sources and mass flows over a step.
#[derive(Debug, Clone, Copy, Default, PartialEq)]
pub struct NodeRecord {
    /// Absorbed sunlight or other source [W].
    pub source_w: f64,
    /// Feed into the node [kg s⁻¹].
    pub feed_kg_s: f64,
    /// Enthalpy entering with the feed [W].
    pub feed_enthalpy_w: f64,
    /// Drain from the node [kg s⁻¹].
    pub drain_kg_s: f64,
    /// Enthalpy leaving with the drained brine [W].
    pub drain_enthalpy_w: f64,
    /// Salt entering with the feed [kg s⁻¹].
    pub feed_salt_kg_s: f64,
    /// Salt leaving with the drained brine, at the dissolved salinity of the step's start
    /// (a crust stays behind) [kg s⁻¹].
    pub drain_salt_kg_s: f64,
    /// Temperature change over the step [K].
    pub temperature_change_k: f64,
    /// The node was wet at the start of the step and is dry (water at or below its
    /// `dry_mass_kg`) at the end: a dry-out event.
    pub dried_out: bool,
}

/// Everything one converged step did. Reuse one record across steps: it is resized only when
/// the network changes.
#[derive(Debug, Clone, Default, PartialEq)]
pub struct StepRecord {
    /// Step length [s] (∞ for a steady-state step).
    pub dt_s: f64,
    /// Change of stored energy over the step, from the states at its start and end [J].
    pub stored_change_j: f64,
    /// Per link, in link order.
    pub links: Vec<LinkRecord>,
    /// Per node, in node order.
    pub nodes: Vec<NodeRecord>,
}

impl StepRecord {
    /// A record sized for `net`.
    pub fn new(net: &Network) -> Self {
        StepRecord {
            dt_s: 0.0,
            stored_change_j: 0.0,
            links: vec![LinkRecord::default(); net.links.len()],
            nodes: vec![NodeRecord::default(); net.nodes.len()],
        }
    }
    /// Mass evaporated in the step over every enclosure [kg] (0 for a steady step).
    pub fn evaporated_kg(&self) -> f64 {
        self.amount(|l| l.evaporation_kg_s)
    }
    /// Mass condensed in the step [kg].
    pub fn condensed_kg(&self) -> f64 {
        self.amount(|l| l.condensation_kg_s)
    }
    /// Distillate collected in the step [kg].
    pub fn collected_kg(&self) -> f64 {
        self.amount(|l| l.collection_kg_s)
    }
    /// Vapour leaked in the step [kg].
    pub fn leaked_kg(&self) -> f64 {
        self.amount(|l| l.leak_kg_s)
    }
    fn amount(&self, f: impl Fn(&LinkRecord) -> f64) -> f64 {
        if self.dt_s.is_finite() {
            self.links.iter().map(f).sum::<f64>() * self.dt_s
        } else {
            0.0
        }
    }
}

/// Per-step constants gathered before Newton starts.
#[derive(Debug, Clone)]
struct StepConsts {
    t0: Vec<f64>,
    m0: Vec<f64>,
    /// Net mass flow into each node at the converged state [kg s⁻¹] (filled after Newton).
    inflow: Vec<f64>,
    wet: Vec<bool>,
    p_ratio: Vec<f64>,
    /// Liquid enthalpy at the step's start temperature (water nodes) [J kg⁻¹].
    h0: Vec<f64>,
    /// Liquid enthalpy of the feed (water nodes with a feed) [J kg⁻¹].
    h_feed: Vec<f64>,
    /// Evaporation cap of a fed wick over this step [kg s⁻¹] (∞: no cap).
    cap_kg_s: Vec<f64>,
    /// Half-width of the cap's smoothing [kg s⁻¹].
    cap_width_kg_s: Vec<f64>,
}

/// Half-width of a fed wick's evaporation cap as a share of its feed water [-]: the cap then
/// costs at most 1.25 % of the feed where evaporation and supply are equal, and nothing
/// outside ±5 % of it (our own choice, no source).
pub const FED_WICK_CAP_WIDTH_SHARE: f64 = 0.05;

/// The latest converged finite step, for the Newton start of the step that continues it.
#[derive(Debug, Clone)]
struct PreviousStep {
    /// A converged step has been recorded.
    valid: bool,
    /// Simulated time at the step's end [s].
    end_time_s: f64,
    /// Its length [s].
    dt_s: f64,
    /// Node temperatures at its end [K].
    end_t_k: Vec<f64>,
    /// Node temperature changes over it [K].
    change_k: Vec<f64>,
}

/// Newton scratch space.
#[derive(Debug, Clone)]
struct Scratch {
    t: Vec<f64>,
    t_trial: Vec<f64>,
    r: Vec<f64>,
    r_trial: Vec<f64>,
    scale: Vec<f64>,
    scale_trial: Vec<f64>,
    dx: Vec<f64>,
    jac: BandMatrix,
    jac_trial: BandMatrix,
    lu: BandMatrix,
    /// Enclosure flows per link at `t` (zero for other links), kept for the step's record.
    flows: Vec<EnclosureFlows>,
    /// The same at `t_trial`.
    flows_trial: Vec<EnclosureFlows>,
}

/// The network solver. Holds scratch space sized for one network, so a step allocates
/// nothing.
#[derive(Debug, Clone)]
pub struct Solver<'n> {
    net: &'n Network,
    settings: SolverSettings,
    consts: StepConsts,
    ws: Scratch,
    previous: PreviousStep,
}

impl<'n> Solver<'n> {
    /// A solver for `net` with validated `settings`.
    pub fn new(net: &'n Network, settings: SolverSettings) -> Result<Self, NetworkError> {
        settings.validate()?;
        let n = net.nodes.len();
        Ok(Solver {
            net,
            settings,
            consts: StepConsts {
                t0: vec![0.0; n],
                m0: vec![0.0; n],
                inflow: vec![0.0; n],
                wet: vec![false; n],
                p_ratio: vec![1.0; n],
                h0: vec![0.0; n],
                h_feed: vec![0.0; n],
                cap_kg_s: vec![f64::INFINITY; n],
                cap_width_kg_s: vec![0.0; n],
            },
            previous: PreviousStep {
                valid: false,
                end_time_s: 0.0,
                dt_s: 0.0,
                end_t_k: vec![0.0; n],
                change_k: vec![0.0; n],
            },
            ws: Scratch {
                t: vec![0.0; n],
                t_trial: vec![0.0; n],
                r: vec![0.0; n],
                r_trial: vec![0.0; n],
                scale: vec![0.0; n],
                scale_trial: vec![0.0; n],
                dx: vec![0.0; n],
                jac: BandMatrix::zeros(n, net.bandwidth),
                jac_trial: BandMatrix::zeros(n, net.bandwidth),
                lu: BandMatrix::zeros(n, net.bandwidth),
                flows: vec![EnclosureFlows::default(); net.links.len()],
                flows_trial: vec![EnclosureFlows::default(); net.links.len()],
            },
        })
    }

    /// The network this solver serves.
    pub fn network(&self) -> &'n Network {
        self.net
    }

    /// The settings in use.
    pub fn settings(&self) -> &SolverSettings {
        &self.settings
    }

    fn prepare(&mut self, state: &State, inputs: &Inputs, dt_s: f64) -> Result<f64, FailReason> {
        let net = self.net;
        let n = net.nodes.len();
        if !inputs.fits(net) {
            return Err(FailReason::InvalidInput {
                what: "inputs were made for another network",
            });
        }
        if state.t_k.len() != n || state.brine_kg.len() != n || state.salt_kg.len() != n {
            return Err(FailReason::InvalidInput {
                what: "state was made for another network",
            });
        }
        if dt_s.is_nan() || dt_s <= 0.0 {
            return Err(FailReason::InvalidInput {
                what: "step length must be > 0 s (or infinite for the steady state)",
            });
        }
        let (lo, hi) = TEMPERATURE_RANGE_K;
        if state
            .t_k
            .iter()
            .any(|t| !(t.is_finite() && *t >= lo && *t <= hi))
        {
            return Err(FailReason::InvalidInput {
                what: "a node temperature is outside [150, 500] K",
            });
        }
        let ws = &mut self.consts;
        ws.t0.copy_from_slice(&state.t_k);
        self.ws.t.copy_from_slice(&state.t_k);
        for (i, node) in net.nodes.iter().enumerate() {
            let m = state.brine_kg[i];
            ws.m0[i] = if node.holds_water { m } else { 0.0 };
            ws.wet[i] = node.holds_water && m - state.salt_kg[i] > node.dry_mass_kg;
            // Only water nodes evaporate (an enclosure's hot end must hold water).
            ws.p_ratio[i] = if node.holds_water {
                net.water
                    .vapour_pressure_ratio(salinity(m, state.salt_kg[i]))
            } else {
                1.0
            };
            // A fed wick evaporates at most what its feed (less the salt it brings and the
            // run-off) and its water above half its dry mass supply over the step, so its
            // water never falls below that floor within a step. The steady state holds the
            // masses fixed and so has no cap.
            ws.cap_kg_s[i] = f64::INFINITY;
            if node.fed_wick && dt_s.is_finite() {
                let feed = inputs.feed_kg_s[i].max(0.0);
                let feed_water = feed * (1.0 - inputs.feed_salinity_g_kg[i] / 1000.0).max(0.0);
                let reserve = (m - state.salt_kg[i] - 0.5 * node.dry_mass_kg) / dt_s;
                ws.cap_kg_s[i] = (feed_water - inputs.drain_kg_s[i] + reserve).max(0.0);
                ws.cap_width_kg_s[i] = FED_WICK_CAP_WIDTH_SHARE * feed_water + 1e-12;
            }
            if node.holds_water {
                ws.h0[i] = net.water.liquid_enthalpy_j_kg(state.t_k[i]);
                ws.h_feed[i] = if inputs.feed_kg_s[i] > 0.0 {
                    net.water.liquid_enthalpy_j_kg(inputs.feed_t_k[i])
                } else {
                    0.0
                };
            }
        }
        Ok(if dt_s.is_finite() { 1.0 / dt_s } else { 0.0 })
    }

    /// Residual [W] and Jacobian [W K⁻¹] of every node balance at trial temperatures
    /// `t_trial_k`, for a step of `dt_s` from `state` (∞ for the steady state).
    ///
    /// This is what Newton iterates on; it is public so tests can compare the analytic
    /// Jacobian with finite differences.
    pub fn evaluate(
        &mut self,
        state: &State,
        inputs: &Inputs,
        dt_s: f64,
        t_trial_k: &[f64],
        residual_w: &mut [f64],
        jacobian: &mut DMatrix<f64>,
    ) -> Result<(), FailReason> {
        let n = self.net.nodes.len();
        if t_trial_k.len() != n || residual_w.len() != n || jacobian.shape() != (n, n) {
            return Err(FailReason::InvalidInput {
                what: "trial vectors do not match the network",
            });
        }
        let inv_dt = self.prepare(state, inputs, dt_s)?;
        let mut scale = vec![0.0; n];
        let mut band = BandMatrix::zeros(n, self.net.bandwidth);
        assemble(
            self.net,
            &self.consts,
            inputs,
            inv_dt,
            t_trial_k,
            residual_w,
            &mut scale,
            &mut band,
            &mut self.ws.flows_trial,
        );
        for j in 0..n {
            for i in 0..n {
                jacobian[(i, j)] = band.get(i, j);
            }
        }
        Ok(())
    }

    /// Advance `state` by `dt_s` [s] with the given inputs (`f64::INFINITY` for the steady
    /// state). On [`StepOutcome::Converged`] the state and `record` hold the end of the step;
    /// otherwise both are unchanged.
    pub fn step(
        &mut self,
        state: &mut State,
        inputs: &Inputs,
        dt_s: f64,
        record: &mut StepRecord,
    ) -> StepOutcome {
        let inv_dt = match self.prepare(state, inputs, dt_s) {
            Ok(v) => v,
            Err(reason) => return StepOutcome::Failed { reason },
        };
        self.newton_start(state, dt_s);
        let iterations = match self.newton(inputs, inv_dt) {
            Ok(k) => k,
            Err(reason) => return StepOutcome::Failed { reason },
        };
        let net = self.net;
        let n = net.nodes.len();
        let energy_before_j = net.stored_energy_j(state);
        if record.links.len() != net.links.len() || record.nodes.len() != n {
            *record = StepRecord::new(net);
        }
        fill_record(net, &self.ws.flows, &self.ws.t, inputs, record);
        record.dt_s = dt_s;
        net_inflows_kg_s(net, record, &mut self.consts.inflow);
        for (i, nr) in record.nodes.iter_mut().enumerate() {
            if net.nodes[i].holds_water {
                nr.feed_salt_kg_s = nr.feed_kg_s * inputs.feed_salinity_g_kg[i] / 1000.0;
                // The drain takes liquid brine: the crust stays behind. Never more salt than
                // the node holds plus what the feed brings, so the salt booked out is the salt
                // that leaves the state.
                let dissolved = dissolved_salinity(self.consts.m0[i], state.salt_kg[i]);
                let available_kg_s = if dt_s.is_finite() {
                    state.salt_kg[i].max(0.0) / dt_s + nr.feed_salt_kg_s
                } else {
                    f64::INFINITY
                };
                nr.drain_salt_kg_s = (nr.drain_kg_s * dissolved / 1000.0).min(available_kg_s);
            }
        }

        if dt_s.is_finite() {
            // Mass update from the converged flows; stop at a dry-out instead of stepping
            // through the kink. "Dry" is judged on the water in the brine (brine − salt).
            let mut first_event: Option<StepEvent> = None;
            for (i, node) in net.nodes.iter().enumerate() {
                if !node.holds_water {
                    continue;
                }
                let (m1, salt1) = self.masses_after(state, record, dt_s, i);
                let w0 = self.consts.m0[i] - state.salt_kg[i];
                let w1 = m1 - salt1;
                if w1 < 0.0 {
                    let target = (0.5 * node.dry_mass_kg).min(0.5 * w0.max(0.0));
                    let time = (dt_s * (w0 - target) / (w0 - w1)).max(0.0);
                    if first_event.is_none_or(
                        |StepEvent::DryOut {
                             time_to_event_s, ..
                         }| { time < time_to_event_s },
                    ) {
                        first_event = Some(StepEvent::DryOut {
                            node: i,
                            time_to_event_s: time,
                        });
                    }
                }
            }
            if let Some(event) = first_event {
                return StepOutcome::Stopped { event };
            }
            for (i, node) in net.nodes.iter().enumerate() {
                if !node.holds_water {
                    continue;
                }
                let (m1, salt1) = self.masses_after(state, record, dt_s, i);
                state.brine_kg[i] = m1;
                state.salt_kg[i] = salt1;
                record.nodes[i].dried_out = self.consts.wet[i] && m1 - salt1 <= node.dry_mass_kg;
            }
            state.time_s += dt_s;
        }
        for i in 0..n {
            record.nodes[i].temperature_change_k = self.ws.t[i] - self.consts.t0[i];
        }
        state.t_k.copy_from_slice(&self.ws.t);
        record.stored_change_j = net.stored_energy_j(state) - energy_before_j;
        let prev = &mut self.previous;
        prev.valid = dt_s.is_finite();
        prev.end_time_s = state.time_s;
        prev.dt_s = dt_s;
        prev.end_t_k.copy_from_slice(&state.t_k);
        for ((d, t1), t0) in prev
            .change_k
            .iter_mut()
            .zip(&state.t_k)
            .zip(&self.consts.t0)
        {
            *d = t1 - t0;
        }
        StepOutcome::Converged { iterations }
    }

    /// Newton's starting temperatures (in the scratch vector, which `prepare` set to the
    /// state's). When this step continues the last converged one — the state is exactly
    /// where that step ended — start from the straight-line extrapolation of that step's
    /// change, scaled to this step's length (at most twice); otherwise from the state. Only
    /// the start moves: the converged temperatures still meet the same tolerance.
    fn newton_start(&mut self, state: &State, dt_s: f64) {
        let prev = &self.previous;
        if !(prev.valid && dt_s.is_finite())
            || state.time_s.to_bits() != prev.end_time_s.to_bits()
            || state
                .t_k
                .iter()
                .zip(&prev.end_t_k)
                .any(|(a, b)| a.to_bits() != b.to_bits())
        {
            return;
        }
        let ratio = (dt_s / prev.dt_s).min(2.0);
        let (lo, hi) = TEMPERATURE_RANGE_K;
        for ((t, t0), d) in self.ws.t.iter_mut().zip(&state.t_k).zip(&prev.change_k) {
            *t = (t0 + ratio * d).clamp(lo, hi);
        }
    }

    /// Brine and salt of water node `i` at the end of a converged step [kg]: evaporation
    /// takes pure water, feed brings salt at the feed salinity, the drain takes it at the
    /// dissolved salinity of the step's start (the record's salt flows).
    ///
    /// Exactly the record's flows, never clamped: the water left (brine − salt) may come out
    /// negative, and the caller must treat that as a dry-out inside the step rather than
    /// accept it. (Clamping the salt to the brine here once hid such overdrafts: the water
    /// evaporated beyond what the node held was booked as distillate while the state lost
    /// the same mass of salt, issue 6.)
    fn masses_after(&self, state: &State, record: &StepRecord, dt_s: f64, i: usize) -> (f64, f64) {
        let m0 = self.consts.m0[i];
        let salt0 = state.salt_kg[i];
        let nr = &record.nodes[i];
        let m1 = m0 + dt_s * self.consts.inflow[i];
        let salt1 = salt0 + dt_s * (nr.feed_salt_kg_s - nr.drain_salt_kg_s);
        (m1, salt1)
    }

    fn newton(&mut self, inputs: &Inputs, inv_dt: f64) -> Result<u32, FailReason> {
        let net = self.net;
        let set = self.settings;
        let c = &self.consts;
        let ws = &mut self.ws;
        let (t_lo, t_hi) = TEMPERATURE_RANGE_K;
        assemble(
            net,
            c,
            inputs,
            inv_dt,
            &ws.t,
            &mut ws.r,
            &mut ws.scale,
            &mut ws.jac,
            &mut ws.flows,
        );
        let mut k: u32 = 0;
        loop {
            if ws.r.iter().any(|v| !v.is_finite()) {
                return Err(FailReason::NonFinite { iteration: k });
            }
            let worst = largest(&ws.r);
            let converged =
                ws.r.iter()
                    .zip(&ws.scale)
                    .all(|(r, sc)| r.abs() <= set.abs_tolerance_w + set.rel_tolerance * sc);
            if converged {
                return Ok(k);
            }
            if k >= set.max_iterations {
                return Err(FailReason::MaxIterations {
                    iterations: k,
                    residual_w: worst,
                });
            }
            k += 1;
            // Solve J·dx = −r in the band of the Jacobian.
            ws.lu.copy_from(&ws.jac);
            for (d, r) in ws.dx.iter_mut().zip(&ws.r) {
                *d = -r;
            }
            if !ws.lu.solve_in_place(&mut ws.dx) {
                return Err(FailReason::SingularJacobian { iteration: k });
            }
            let big = largest(&ws.dx);
            if !big.is_finite() {
                return Err(FailReason::NonFinite { iteration: k });
            }
            let mut lambda = if big > set.max_newton_change_k {
                set.max_newton_change_k / big
            } else {
                1.0
            };
            let norm0 = norm2(&ws.r);
            let mut accepted = false;
            for _ in 0..=set.max_halvings {
                let mut in_range = true;
                for ((tt, t), d) in ws.t_trial.iter_mut().zip(&ws.t).zip(&ws.dx) {
                    *tt = t + lambda * d;
                    in_range &= *tt >= t_lo && *tt <= t_hi;
                }
                if in_range {
                    assemble(
                        net,
                        c,
                        inputs,
                        inv_dt,
                        &ws.t_trial,
                        &mut ws.r_trial,
                        &mut ws.scale_trial,
                        &mut ws.jac_trial,
                        &mut ws.flows_trial,
                    );
                    let norm1 = norm2(&ws.r_trial);
                    // Armijo-like sufficient decrease on the 2-norm of the residual.
                    if norm1.is_finite() && norm1 <= (1.0 - 1e-4 * lambda) * norm0 {
                        std::mem::swap(&mut ws.t, &mut ws.t_trial);
                        std::mem::swap(&mut ws.r, &mut ws.r_trial);
                        std::mem::swap(&mut ws.scale, &mut ws.scale_trial);
                        std::mem::swap(&mut ws.jac, &mut ws.jac_trial);
                        std::mem::swap(&mut ws.flows, &mut ws.flows_trial);
                        accepted = true;
                        break;
                    }
                }
                lambda *= 0.5;
            }
            if !accepted {
                return Err(FailReason::NoDescent {
                    iteration: k,
                    residual_w: worst,
                });
            }
        }
    }
}

fn largest(v: &[f64]) -> f64 {
    v.iter().fold(0.0_f64, |a, x| a.max(x.abs()))
}

fn norm2(v: &[f64]) -> f64 {
    v.iter().map(|x| x * x).sum::<f64>().sqrt()
}

fn end_t(e: End, t: &[f64], inputs: &Inputs) -> f64 {
    match e {
        End::Node(i) => t[i.0],
        End::Boundary(b) => inputs.boundary_t_k[b.0],
    }
}

/// The flows of an enclosure link and their derivatives.
#[derive(Debug, Clone, Copy, Default)]
struct EnclosureFlows {
    q_conv_w: f64,
    q_evap_w: f64,
    mdot_kg_s: f64,
    /// Share of ṁ dripping back to the water node [-].
    phi: f64,
    /// Share of ṁ condensing on the cold node [-].
    psi: f64,
    hf_w: f64,
    hf_c: f64,
    hfg_w: f64,
    /// dG/dT for the water node (w) and cold node (c).
    dgw_dtw: f64,
    dgw_dtc: f64,
    dgc_dtw: f64,
    dgc_dtc: f64,
    /// Heat gained by the water node relative to its own liquid enthalpy [W].
    g_w: f64,
    /// Heat gained by the cold node [W].
    g_c: f64,
}

fn enclosure_flows(
    net: &Network,
    c: &StepConsts,
    e: &EnclosureLink,
    tw: f64,
    tc: f64,
) -> EnclosureFlows {
    let water = net.water.as_ref();
    let (w, area_m2, collected, leaked) = (e.w, e.area_m2, e.collected_fraction, e.leaked_fraction);
    let model = e.model.as_ref();
    let ratio = c.p_ratio[w];
    let (p_w, dp_w) = water.saturation_pressure_with_derivative(tw);
    let (p_hot, dp_hot) = (ratio * p_w, ratio * dp_w);
    let (p_cold, dp_cold) = water.saturation_pressure_with_derivative(tc);
    let fl = model.transfer(tw, tc, p_hot, dp_hot, p_cold, dp_cold);
    let q_conv = fl.q_convective_w_m2 * area_m2;
    let (dqc_w, dqc_c) = (
        fl.dq_convective_dt_hot * area_m2,
        fl.dq_convective_dt_cold * area_m2,
    );
    let cap = c.cap_kg_s[w];
    let (mut q_evap, mut dqe_w, mut dqe_c) = if c.wet[w] || cap.is_finite() {
        (
            fl.q_evaporative_w_m2 * area_m2,
            fl.dq_evaporative_dt_hot * area_m2,
            fl.dq_evaporative_dt_cold * area_m2,
        )
    } else {
        (0.0, 0.0, 0.0)
    };
    let hfg = water.latent_heat_j_kg(tw);
    let dhfg = water.latent_heat_derivative_j_kg_k(tw);
    let mut mdot = q_evap / hfg;
    let mut dm_w = dqe_w / hfg - q_evap * dhfg / (hfg * hfg);
    let mut dm_c = dqe_c / hfg;
    if cap.is_finite() {
        // A fed wick: evaporation capped smoothly at its supply (C¹, so no event chatter).
        let (e, de) = super::models::supply_cap(mdot, cap, c.cap_width_kg_s[w]);
        mdot = e;
        dm_w *= de;
        dm_c *= de;
        q_evap = e * hfg;
        dqe_w = dm_w * hfg + e * dhfg;
        dqe_c = dm_c * hfg;
    }
    // Reversed flux (cold side warmer): vapour from the condensate film condenses back
    // into the water node; nothing is collected or leaked.
    let (phi, psi) = if mdot >= 0.0 {
        ((1.0 - leaked) * (1.0 - collected), 1.0 - leaked)
    } else {
        (1.0, 1.0)
    };
    let hf_w = water.liquid_enthalpy_j_kg(tw);
    let hf_c = water.liquid_enthalpy_j_kg(tc);
    let cp_w = water.liquid_heat_capacity_j_kg_k(tw);
    let cp_c = water.liquid_heat_capacity_j_kg_k(tc);
    let hg_w = hf_w + hfg;
    let drip = phi * mdot;
    EnclosureFlows {
        q_conv_w: q_conv,
        q_evap_w: q_evap,
        mdot_kg_s: mdot,
        phi,
        psi,
        hf_w,
        hf_c,
        hfg_w: hfg,
        g_w: -(q_conv + q_evap) + drip * (hf_c - hf_w),
        g_c: q_conv + psi * mdot * (hg_w - hf_c),
        dgw_dtw: -(dqc_w + dqe_w) + phi * dm_w * (hf_c - hf_w) - drip * cp_w,
        dgw_dtc: -(dqc_c + dqe_c) + phi * dm_c * (hf_c - hf_w) + drip * cp_c,
        dgc_dtw: dqc_w + psi * dm_w * (hg_w - hf_c) + psi * mdot * (cp_w + dhfg),
        dgc_dtc: dqc_c + psi * dm_c * (hg_w - hf_c) - psi * mdot * cp_c,
    }
}

/// Residual, per-node term magnitudes and Jacobian at temperatures `t`.
#[allow(clippy::too_many_arguments)]
fn assemble(
    net: &Network,
    c: &StepConsts,
    inputs: &Inputs,
    inv_dt: f64,
    t: &[f64],
    r: &mut [f64],
    scale: &mut [f64],
    jac: &mut BandMatrix,
    flows: &mut [EnclosureFlows],
) {
    let water = net.water.as_ref();
    jac.clear();
    let (ix, jm) = jac.parts();
    for (i, node) in net.nodes.iter().enumerate() {
        let ti = t[i];
        let mut res = -inputs.source_w[i];
        let mut sc = inputs.source_w[i].abs();
        let mut diag = 0.0;
        let m0 = c.m0[i];
        let feed = inputs.feed_kg_s[i];
        let stores_water = inv_dt > 0.0 && m0 > 0.0;
        let fed = node.holds_water && feed > 0.0;
        // h_f and c_p at the trial temperature, evaluated once for storage and feed.
        let (h1, cp1) = if stores_water || fed {
            (
                water.liquid_enthalpy_j_kg(ti),
                water.liquid_heat_capacity_j_kg_k(ti),
            )
        } else {
            (0.0, 0.0)
        };
        if inv_dt > 0.0 {
            let mut store = node.capacity_j_k * (ti - c.t0[i]);
            let mut cap = node.capacity_j_k;
            sc += inv_dt * node.capacity_j_k * ti;
            if stores_water {
                store += m0 * (h1 - c.h0[i]);
                cap += m0 * cp1;
                sc += inv_dt * m0 * h1.abs();
            }
            res += inv_dt * store;
            diag += inv_dt * cap;
        }
        if fed {
            let g = feed * (c.h_feed[i] - h1);
            res -= g;
            sc += g.abs();
            diag += feed * cp1;
        }
        r[i] = res;
        scale[i] = sc;
        jm[ix.at(i, i)] += diag;
    }
    let tb = &inputs.boundary_t_k;
    let ua = &inputs.conductance_w_k;
    let tab = &net.table;
    for e in &tab.enclosures {
        let (w, cn) = (e.w, e.c);
        let f = enclosure_flows(net, c, e, t[w], t[cn]);
        r[w] -= f.g_w;
        r[cn] -= f.g_c;
        scale[w] += f.g_w.abs();
        scale[cn] += f.g_c.abs();
        jm[ix.at(w, w)] -= f.dgw_dtw;
        jm[ix.at(w, cn)] -= f.dgw_dtc;
        jm[ix.at(cn, w)] -= f.dgc_dtw;
        jm[ix.at(cn, cn)] -= f.dgc_dtc;
        flows[e.link] = f;
    }
    for p in &tab.conductance_pairs {
        let (a, b) = (p.a, p.b);
        let u = ua[p.link];
        let q = u * (t[a] - t[b]);
        r[a] += q;
        r[b] -= q;
        scale[a] += q.abs();
        scale[b] += q.abs();
        jm[ix.at(a, a)] += u;
        jm[ix.at(a, b)] -= u;
        jm[ix.at(b, b)] += u;
        jm[ix.at(b, a)] -= u;
    }
    for e in &tab.conductance_edges {
        let i = e.node;
        let u = ua[e.link];
        let q = u * (t[i] - tb[e.boundary]);
        r[i] += q;
        scale[i] += q.abs();
        jm[ix.at(i, i)] += u;
    }
    for p in &tab.radiation_pairs {
        let (a, b) = (p.a, p.b);
        let (ta2, tb2) = (t[a] * t[a], t[b] * t[b]);
        let q = p.k * (ta2 * ta2 - tb2 * tb2);
        let (dqa, dqb) = (4.0 * p.k * ta2 * t[a], 4.0 * p.k * tb2 * t[b]);
        r[a] += q;
        r[b] -= q;
        scale[a] += q.abs();
        scale[b] += q.abs();
        jm[ix.at(a, a)] += dqa;
        jm[ix.at(a, b)] -= dqb;
        jm[ix.at(b, b)] += dqb;
        jm[ix.at(b, a)] -= dqa;
    }
    for e in &tab.radiation_edges {
        let i = e.node;
        let tbd = tb[e.boundary];
        let (ti2, tb2) = (t[i] * t[i], tbd * tbd);
        let q = e.k * (ti2 * ti2 - tb2 * tb2);
        r[i] += q;
        scale[i] += q.abs();
        jm[ix.at(i, i)] += 4.0 * e.k * ti2 * t[i];
    }
    for v in &tab.variable {
        let ta = end_t(v.a, t, inputs);
        let tbv = end_t(v.b, t, inputs);
        let f = v.model.heat_flow(ta, tbv);
        let (q, dqa, dqb) = (f.q_w, f.dq_dta_w_k, f.dq_dtb_w_k);
        if let End::Node(a) = v.a {
            r[a.0] += q;
            scale[a.0] += q.abs();
            jm[ix.at(a.0, a.0)] += dqa;
            if let End::Node(b) = v.b {
                jm[ix.at(a.0, b.0)] += dqb;
            }
        }
        if let End::Node(b) = v.b {
            r[b.0] -= q;
            scale[b.0] += q.abs();
            jm[ix.at(b.0, b.0)] -= dqb;
            if let End::Node(a) = v.a {
                jm[ix.at(b.0, a.0)] -= dqa;
            }
        }
    }
}

/// Fill the record from the converged temperatures `t`, with the enclosure flows `flows`
/// that the last assembly computed at exactly these temperatures (so the record books the
/// very flows whose balance met the tolerance, without evaluating the enclosures again).
fn fill_record(
    net: &Network,
    flows: &[EnclosureFlows],
    t: &[f64],
    inputs: &Inputs,
    rec: &mut StepRecord,
) {
    let water = net.water.as_ref();
    let tab = &net.table;
    let tb = &inputs.boundary_t_k;
    let ua = &inputs.conductance_w_k;
    for e in &tab.enclosures {
        let f = &flows[e.link];
        let m = f.mdot_kg_s;
        let cond = f.psi * m;
        let leak = m - cond;
        let drip = f.phi * m;
        rec.links[e.link] = LinkRecord {
            heat_w: f.q_conv_w + f.q_evap_w,
            convective_w: f.q_conv_w,
            evaporation_kg_s: m,
            condensation_kg_s: cond,
            collection_kg_s: cond - drip,
            dripback_kg_s: drip,
            leak_kg_s: leak,
            distillate_enthalpy_w: (cond - drip) * f.hf_c,
            leak_enthalpy_w: leak * (f.hf_w + f.hfg_w),
        };
    }
    let heat_only = |heat_w: f64| LinkRecord {
        heat_w,
        ..LinkRecord::default()
    };
    for p in &tab.conductance_pairs {
        rec.links[p.link] = heat_only(ua[p.link] * (t[p.a] - t[p.b]));
    }
    for e in &tab.conductance_edges {
        rec.links[e.link] = heat_only(e.sign * (ua[e.link] * (t[e.node] - tb[e.boundary])));
    }
    for p in &tab.radiation_pairs {
        let (ta2, tb2) = (t[p.a] * t[p.a], t[p.b] * t[p.b]);
        rec.links[p.link] = heat_only(p.k * (ta2 * ta2 - tb2 * tb2));
    }
    for e in &tab.radiation_edges {
        let tbd = tb[e.boundary];
        let (ti2, tb2) = (t[e.node] * t[e.node], tbd * tbd);
        rec.links[e.link] = heat_only(e.sign * (e.k * (ti2 * ti2 - tb2 * tb2)));
    }
    for v in &tab.variable {
        let q = v
            .model
            .heat_flow(end_t(v.a, t, inputs), end_t(v.b, t, inputs))
            .q_w;
        rec.links[v.link] = heat_only(q);
    }
    for (i, node) in net.nodes.iter().enumerate() {
        let nr = &mut rec.nodes[i];
        *nr = NodeRecord {
            source_w: inputs.source_w[i],
            ..NodeRecord::default()
        };
        if node.holds_water {
            nr.feed_kg_s = inputs.feed_kg_s[i];
            nr.feed_enthalpy_w = nr.feed_kg_s * water.liquid_enthalpy_j_kg(inputs.feed_t_k[i]);
            nr.drain_kg_s = inputs.drain_kg_s[i];
            nr.drain_enthalpy_w = nr.drain_kg_s * water.liquid_enthalpy_j_kg(t[i]);
        }
    }
}

/// Net mass flow into every node [kg s⁻¹]: feed − drain − evaporation + drip-back
/// (zero for nodes without water).
fn net_inflows_kg_s(net: &Network, rec: &StepRecord, inflow: &mut [f64]) {
    for (f, nr) in inflow.iter_mut().zip(&rec.nodes) {
        *f = nr.feed_kg_s - nr.drain_kg_s;
    }
    for e in &net.table.enclosures {
        let lr = &rec.links[e.link];
        inflow[e.w] += lr.dripback_kg_s - lr.evaporation_kg_s;
    }
}
