//! Adaptive time stepping over an interval, with the energy balance booked on the way.

use super::balance::{BalanceError, EnergyBalance, MAX_BALANCE_RESIDUAL_FRACTION};
use super::build::{Network, NetworkError};
use super::solver::{FailReason, Solver, SolverSettings, StepEvent, StepOutcome, StepRecord};
use super::state::{Inputs, State};

/// Step-size control of [`Simulation::advance`].
///
/// The accuracy setting is `max_change_k`: a step is repeated at half length when any node
/// with heat capacity changes by more than this. Implicit Euler's error per step is about
/// half the change over the step times the relative change of its rate, so the error in a
/// day's yield falls in proportion to this setting; with the default 0.5 K halving it changes
/// a basin still's daily yield by well under 1 % (checked in the integration tests).
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct StepControl {
    /// First step tried [s].
    pub initial_step_s: f64,
    /// Shortest step [s]: a failure at this length ends the simulation with an error.
    pub min_step_s: f64,
    /// Longest step [s].
    pub max_step_s: f64,
    /// Largest temperature change of a node with heat capacity in one step [K].
    pub max_change_k: f64,
    /// Factor by which the step grows after an easy step [-], > 1.
    pub growth: f64,
}

impl Default for StepControl {
    /// 60 s first step, 0.01 s to 900 s, 0.5 K per step, growth 1.5.
    fn default() -> Self {
        StepControl {
            initial_step_s: 60.0,
            min_step_s: 0.01,
            max_step_s: 900.0,
            max_change_k: 0.5,
            growth: 1.5,
        }
    }
}

impl StepControl {
    /// Check every setting is in range.
    pub fn validate(&self) -> Result<(), NetworkError> {
        let bad = |what, value, allowed| NetworkError::BadValue {
            item: "step control".to_owned(),
            what,
            value,
            allowed,
        };
        let pos = |v: f64| v.is_finite() && v > 0.0;
        if !pos(self.min_step_s) {
            return Err(bad("min_step_s", self.min_step_s, "> 0 s"));
        }
        if !(pos(self.max_step_s) && self.max_step_s >= self.min_step_s) {
            return Err(bad("max_step_s", self.max_step_s, ">= min_step_s"));
        }
        if !(pos(self.initial_step_s)
            && self.initial_step_s >= self.min_step_s
            && self.initial_step_s <= self.max_step_s)
        {
            return Err(bad(
                "initial_step_s",
                self.initial_step_s,
                "[min_step_s, max_step_s]",
            ));
        }
        if !pos(self.max_change_k) {
            return Err(bad("max_change_k", self.max_change_k, "> 0 K"));
        }
        if !(self.growth.is_finite() && self.growth > 1.0 && self.growth <= 10.0) {
            return Err(bad("growth", self.growth, "(1, 10]"));
        }
        Ok(())
    }
}

/// What an [`Simulation::advance`] call did.
#[derive(Debug, Clone, Default, PartialEq)]
pub struct AdvanceSummary {
    /// Steps accepted.
    pub steps: u32,
    /// Steps repeated shorter (no convergence, too large a change, or a dry-out ahead).
    pub retried: u32,
    /// Newton iterations over the accepted steps.
    pub newton_iterations: u32,
    /// Shortest accepted step [s].
    pub shortest_step_s: f64,
    /// Dry-out events: (simulated time [s], node index).
    pub dry_outs: Vec<(f64, usize)>,
}

/// Why [`Simulation::advance`] could not finish.
#[derive(Debug, Clone, PartialEq, thiserror::Error)]
#[non_exhaustive]
pub enum AdvanceError {
    /// A step failed even at the shortest step length.
    #[error("at t = {time_s:.1} s a step of {dt_s:.3} s failed: {reason}")]
    Step {
        /// Simulated time of the last accepted state [s].
        time_s: f64,
        /// Length of the failed step [s].
        dt_s: f64,
        /// Why.
        reason: FailReason,
    },
    /// A dry-out could not be reached with a step of at least the shortest length.
    #[error("at t = {time_s:.1} s node `{node}` runs dry faster than the shortest step")]
    DryOutTooFast {
        /// Simulated time [s].
        time_s: f64,
        /// The node's name.
        node: String,
    },
    /// Booking the energy balance failed.
    #[error(transparent)]
    Balance(#[from] BalanceError),
    /// The interval is not a positive finite time, or the state cannot be settled now.
    #[error("{0}")]
    Invalid(&'static str),
}

/// A network, its solver, its state and its energy balance, advanced interval by interval.
#[derive(Debug, Clone)]
pub struct Simulation<'n> {
    solver: Solver<'n>,
    state: State,
    saved: State,
    record: StepRecord,
    balance: EnergyBalance,
    control: StepControl,
    next_dt_s: f64,
}

impl<'n> Simulation<'n> {
    /// Start from `state` with validated settings.
    pub fn new(
        net: &'n Network,
        state: State,
        settings: SolverSettings,
        control: StepControl,
    ) -> Result<Self, NetworkError> {
        control.validate()?;
        let solver = Solver::new(net, settings)?;
        let n = net.nodes().len();
        if state.t_k.len() != n || state.brine_kg.len() != n {
            return Err(NetworkError::BadValue {
                item: "simulation".to_owned(),
                what: "state length",
                value: state.t_k.len() as f64,
                allowed: "the network's node count",
            });
        }
        Ok(Simulation {
            balance: EnergyBalance::new(net, &state),
            saved: state.clone(),
            record: StepRecord::new(net),
            next_dt_s: control.initial_step_s,
            solver,
            state,
            control,
        })
    }

    /// The current state.
    pub fn state(&self) -> &State {
        &self.state
    }
    /// The energy balance so far.
    pub fn balance(&self) -> &EnergyBalance {
        &self.balance
    }
    /// The energy balance so far, or an error if its residual exceeds the product's bound
    /// [`MAX_BALANCE_RESIDUAL_FRACTION`] of the absorbed sunlight.
    pub fn checked_balance(&self) -> Result<&EnergyBalance, BalanceError> {
        self.balance.check(MAX_BALANCE_RESIDUAL_FRACTION)?;
        Ok(&self.balance)
    }
    /// The record of the latest accepted step.
    pub fn last_record(&self) -> &StepRecord {
        &self.record
    }
    /// The network.
    pub fn network(&self) -> &'n Network {
        self.solver.network()
    }

    /// Replace the state by the steady state under `inputs` (a Δt = ∞ step of the same
    /// Newton code, masses held fixed). Allowed only before the first `advance`, since it is
    /// not a process in time; the balance then starts from the settled state.
    pub fn settle(&mut self, inputs: &Inputs) -> Result<u32, AdvanceError> {
        if self.balance.steps > 0 {
            return Err(AdvanceError::Invalid(
                "settle() is only allowed before the first advance()",
            ));
        }
        match self
            .solver
            .step(&mut self.state, inputs, f64::INFINITY, &mut self.record)
        {
            StepOutcome::Converged { iterations } => {
                self.balance = EnergyBalance::new(self.solver.network(), &self.state);
                Ok(iterations)
            }
            StepOutcome::Failed { reason } => Err(AdvanceError::Step {
                time_s: self.state.time_s,
                dt_s: f64::INFINITY,
                reason,
            }),
            StepOutcome::Stopped { .. } => Err(AdvanceError::Invalid(
                "a steady-state step cannot stop at an event",
            )),
        }
    }

    /// Advance by `interval_s` [s] with constant `inputs`, choosing steps by the
    /// [`StepControl`] and booking each accepted step in the energy balance.
    pub fn advance(
        &mut self,
        inputs: &Inputs,
        interval_s: f64,
    ) -> Result<AdvanceSummary, AdvanceError> {
        if !(interval_s.is_finite() && interval_s > 0.0) {
            return Err(AdvanceError::Invalid(
                "the interval must be a positive, finite time",
            ));
        }
        let net = self.solver.network();
        let c = self.control;
        let mut summary = AdvanceSummary {
            shortest_step_s: f64::INFINITY,
            ..AdvanceSummary::default()
        };
        let mut remaining = interval_s;
        let mut dt = self.next_dt_s.clamp(c.min_step_s, c.max_step_s);
        // Round-off in `remaining` must not leave a sliver step.
        let sliver = 1e-9 * interval_s;
        while remaining > sliver {
            let h = if dt >= remaining - sliver {
                remaining
            } else {
                dt
            };
            self.saved.clone_from(&self.state);
            match self
                .solver
                .step(&mut self.state, inputs, h, &mut self.record)
            {
                StepOutcome::Converged { iterations } => {
                    let change = self.largest_change();
                    if change > c.max_change_k && h > c.min_step_s {
                        self.state.clone_from(&self.saved);
                        summary.retried += 1;
                        dt = (h * (0.9 * c.max_change_k / change).max(0.25)).max(c.min_step_s);
                        continue;
                    }
                    self.balance.book(net, &self.record, &self.state)?;
                    remaining -= h;
                    summary.steps += 1;
                    summary.newton_iterations += iterations;
                    summary.shortest_step_s = summary.shortest_step_s.min(h);
                    let before = summary.dry_outs.len();
                    for (i, nr) in self.record.nodes.iter().enumerate() {
                        if nr.dried_out {
                            summary.dry_outs.push((self.state.time_s, i));
                        }
                    }
                    if summary.dry_outs.len() > before {
                        // The node's capacity has just vanished: start small again.
                        dt = c.initial_step_s;
                    } else if change < 0.5 * c.max_change_k {
                        dt = (dt.max(h) * c.growth).min(c.max_step_s);
                    } else {
                        dt = dt.max(h);
                    }
                }
                StepOutcome::Stopped {
                    event:
                        StepEvent::DryOut {
                            node,
                            time_to_event_s,
                        },
                } => {
                    summary.retried += 1;
                    if time_to_event_s < c.min_step_s {
                        return Err(AdvanceError::DryOutTooFast {
                            time_s: self.state.time_s,
                            node: net
                                .nodes()
                                .get(node)
                                .map(|n| n.name.clone())
                                .unwrap_or_default(),
                        });
                    }
                    dt = time_to_event_s;
                }
                StepOutcome::Failed { reason } => {
                    summary.retried += 1;
                    if h <= c.min_step_s {
                        return Err(AdvanceError::Step {
                            time_s: self.state.time_s,
                            dt_s: h,
                            reason,
                        });
                    }
                    dt = (0.5 * h).max(c.min_step_s);
                }
            }
        }
        self.next_dt_s = dt;
        Ok(summary)
    }

    /// Largest temperature change over the last step among nodes that store heat.
    fn largest_change(&self) -> f64 {
        let net = self.solver.network();
        net.nodes()
            .iter()
            .zip(&self.record.nodes)
            .enumerate()
            .filter(|(i, (n, _))| n.capacity_j_k > 0.0 || self.saved.brine_kg[*i] > 0.0)
            .map(|(_, (_, r))| r.temperature_change_k.abs())
            .fold(0.0, f64::max)
    }
}
