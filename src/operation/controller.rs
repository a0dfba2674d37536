//! The level controller: proportional–integral with a transport delay, its default tuning
//! and its stability limit on a basin.
//!
//! The basin is an integrating process: a feed of q [L h⁻¹] over A [m²] of brine raises the
//! depth h [mm] at dh/dt = q / (3600·A) [mm s⁻¹], and the feed reaches the far side of the
//! basin θ [s] later: G(s) = k·e^(−θs)/s with k = 1/(3600·A).

use crate::design::Operation;

/// Process gain of a basin: depth rate per unit feed [mm s⁻¹ per L h⁻¹] (1 L over 1 m² is
/// 1 mm).
pub fn basin_process_gain(area_m2: f64) -> f64 {
    1.0 / (3600.0 * area_m2.max(1e-9))
}

/// The controller's settings once the defaults are filled in.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Tuning {
    /// Gain [L h⁻¹ per mm of depth error].
    pub gain_l_h_mm: f64,
    /// Reset (integral) time [s].
    pub reset_time_s: f64,
    /// Transport delay [s].
    pub delay_s: f64,
    /// Delay the loop sees: transport delay plus half the control interval (the hold of a
    /// sampled controller) [s].
    pub effective_delay_s: f64,
}

impl Tuning {
    /// Fill in the defaults for a basin of `area_m2` [m²]: the SIMC rules for an integrating
    /// process with dead time (Skogestad, S. (2003), "Simple analytic rules for model
    /// reduction and PID controller tuning", J. Process Control 13:291–309, Table 1, from
    /// memory) with the closed-loop time constant τc equal to the effective delay θ:
    /// K = 1/(k·(τc + θ)) = 3600·A/(2θ) [L h⁻¹ per mm], Tᵢ = 4(τc + θ) = 8θ.
    ///
    /// Notes: θ includes half the control interval, the usual allowance for a sampled
    /// controller's hold (Åström & Hägglund, *PID Controllers*, 1995, from memory).
    pub fn resolve(op: &Operation, area_m2: f64) -> Tuning {
        let theta = op.delay_s.max(0.0) + 0.5 * op.control_interval_s;
        let k = basin_process_gain(area_m2);
        Tuning {
            gain_l_h_mm: op.gain_l_h_mm.unwrap_or(1.0 / (k * 2.0 * theta)),
            reset_time_s: op.reset_time_s.unwrap_or(8.0 * theta),
            delay_s: op.delay_s,
            effective_delay_s: theta,
        }
    }
}

/// Largest stable gain of a PI controller on an integrating basin with dead time
/// [L h⁻¹ per mm].
///
/// Derived here (Nyquist criterion on L(jω) = K(1 + 1/(jωTᵢ))·k·e^(−jωθ)/(jω)): the phase is
/// −π/2 − atan(1/(ωTᵢ)) − ωθ, which reaches −π at the ω₁₈₀ solving
/// ωθ + atan(1/(ωTᵢ)) = π/2; the loop is stable while |L(jω₁₈₀)| < 1, i.e.
/// K < ω₁₈₀ / (k·√(1 + 1/(ω₁₈₀Tᵢ)²)).
///
/// * `area_m2` — free surface of the brine [m²]
/// * `effective_delay_s` — θ, transport delay plus half the control interval [s]
/// * `reset_time_s` — Tᵢ [s]
///
/// Returns 0 when Tᵢ ≤ θ (the phase is below −π at every frequency: no gain is stable) and
/// infinity when θ = 0. Checks: with Tᵢ → ∞ it tends to the P-only limit π/(2kθ).
pub fn pi_gain_limit_l_h_mm(area_m2: f64, effective_delay_s: f64, reset_time_s: f64) -> f64 {
    let k = basin_process_gain(area_m2);
    let theta = effective_delay_s;
    let ti = reset_time_s;
    if !(theta.is_finite() && ti.is_finite()) || theta <= 0.0 {
        return f64::INFINITY;
    }
    if ti <= theta {
        return 0.0;
    }
    let f = |w: f64| w * theta + (1.0 / (w * ti)).atan() - std::f64::consts::FRAC_PI_2;
    // f < 0 just above 0 (slope θ − Tᵢ < 0) and f > 0 at ω = π/(2θ).
    let mut lo = 1e-12 / theta;
    let mut hi = std::f64::consts::FRAC_PI_2 / theta;
    for _ in 0..200 {
        let mid = 0.5 * (lo + hi);
        if f(mid) < 0.0 {
            lo = mid;
        } else {
            hi = mid;
        }
    }
    let w = 0.5 * (lo + hi);
    w / (k * (1.0 + 1.0 / (w * ti).powi(2)).sqrt())
}

/// A PI controller with output limits and a transport delay, sampled at the control
/// interval. The integral stops growing while the output sits at a limit (conditional
/// integration, a common anti-windup; common practice, no source).
#[derive(Debug, Clone, PartialEq)]
pub struct LevelController {
    tuning: Tuning,
    max_l_h: f64,
    integral_mm_s: f64,
    /// Commands already sent: (start time [s], end time [s], flow [L h⁻¹]).
    sent: Vec<(f64, f64, f64)>,
}

impl LevelController {
    /// A controller with `tuning` and valve range [0, `max_l_h`] [L h⁻¹].
    pub fn new(tuning: Tuning, max_l_h: f64) -> Self {
        LevelController {
            tuning,
            max_l_h,
            integral_mm_s: 0.0,
            sent: Vec::new(),
        }
    }

    /// The settings.
    pub fn tuning(&self) -> Tuning {
        self.tuning
    }

    /// Set the valve for the interval [`t_s`, `t_s + dt_s`] from the depth error
    /// `error_mm` = set − measured [mm]; returns the flow reaching the basin over that interval
    /// [L h⁻¹] (the commands of one transport delay earlier, averaged over the interval).
    pub fn step(&mut self, t_s: f64, dt_s: f64, error_mm: f64) -> f64 {
        let t = self.tuning;
        let raw = t.gain_l_h_mm * (error_mm + self.integral_mm_s / t.reset_time_s);
        let u = raw.clamp(0.0, self.max_l_h);
        let saturated_up = raw >= self.max_l_h && error_mm > 0.0;
        let saturated_down = raw <= 0.0 && error_mm < 0.0;
        if !(saturated_up || saturated_down) {
            self.integral_mm_s += error_mm * dt_s;
        }
        self.sent.push((t_s, t_s + dt_s, u));
        let (a, b) = (t_s - t.delay_s, t_s + dt_s - t.delay_s);
        let mut sum = 0.0;
        for &(s, e, q) in &self.sent {
            let overlap = (e.min(b) - s.max(a)).max(0.0);
            sum += overlap * q;
        }
        // Forget commands that can no longer arrive.
        let keep_from = a;
        self.sent.retain(|&(_, e, _)| e > keep_from - 1.0);
        sum / dt_s
    }
}
