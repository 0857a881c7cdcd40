//! Laminar two-equation integral method: momentum and kinetic-energy integral equations with
//! the Falkner–Skan closure (Schlichting & Gersten, *Boundary-Layer Theory*, ch. 10; White,
//! *Viscous Fluid Flow*, §4-7), discretised by the trapezoidal rule between stations.
//!
//! With Reθ = Re·ue·θ, Cf = (Cf·Reθ)(H)/Reθ and CD = (CD·Reθ)(H)/Reθ:
//!   d ln θ/ds = Cf/(2θ) − (H + 2) d ln ue/ds                        (momentum)
//!   dH*/ds   = (2CD − H*·Cf/2)/θ + H*(H − 1) d ln ue/ds              (kinetic energy)
//! The second is d(H*θ)/ds = 2CD − 3H*θ (d ln ue/ds) with the momentum equation subtracted.

use super::laminar_closure::LaminarClosure;
use super::station::LayerState;

/// Stagnation-point (Hiemenz, Falkner–Skan m = 1) momentum thickness factor: θ = 0.2923√(ν/K)
/// with K = due/ds (Schlichting & Gersten; our Falkner–Skan table gives 0.2923).
pub(crate) const STAGNATION_THETA_FACTOR: f64 = 0.2923;
/// Stagnation-point shape factor (Falkner–Skan m = 1).
pub(crate) const STAGNATION_SHAPE_FACTOR: f64 = 2.2162;
/// Bounds of the laminar shape factor in the local Newton iteration (attached ≥ 2.09 at β = 10;
/// the reversed-flow branch of the closure extends beyond 10).
pub(crate) const LAMINAR_SHAPE_FACTOR_RANGE: (f64, f64) = (1.9, 16.0);

/// Reθ of a state, kept positive (the closures are divided by it).
fn momentum_thickness_reynolds(state: &LayerState, reynolds: f64) -> f64 {
    (reynolds * state.edge_velocity * state.theta).max(1e-12)
}

/// Local skin friction and dissipation coefficients, Cf and CD, of a laminar state.
pub(crate) fn laminar_coefficients(
    state: &LayerState,
    reynolds: f64,
    closure: &dyn LaminarClosure,
) -> (f64, f64) {
    let re_theta = momentum_thickness_reynolds(state, reynolds);
    let h = state.shape_factor;
    (
        closure.skin_friction_re_theta(h) / re_theta,
        closure.dissipation_re_theta(h) / re_theta,
    )
}

/// Terms of the laminar equations at one state: the right-hand sides that do not multiply
/// d ln ue/ds, (Cf/(2θ), (2CD − H*Cf/2)/θ), their coefficients of d ln ue/ds, (−(H+2), H*(H−1)),
/// and H*. Computed once for the known start of an interval.
#[derive(Debug, Clone, Copy)]
pub(crate) struct LaminarTerms {
    source: [f64; 2],
    gradient: [f64; 2],
    energy_shape_factor: f64,
}

impl LaminarTerms {
    /// The terms not multiplying d ln ue/ds and their coefficients of d ln ue/ds, per equation.
    pub(crate) fn parts(&self) -> ([f64; 2], [f64; 2]) {
        (self.source, self.gradient)
    }

    pub(crate) fn new(state: &LayerState, reynolds: f64, closure: &dyn LaminarClosure) -> Self {
        let h = state.shape_factor;
        let [h_star, cf_re_theta, cd_re_theta] = closure.values(h);
        let re_theta = momentum_thickness_reynolds(state, reynolds);
        let (cf, cd) = (cf_re_theta / re_theta, cd_re_theta / re_theta);
        let theta = state.theta;
        Self {
            source: [0.5 * cf / theta, (2.0 * cd - 0.5 * h_star * cf) / theta],
            gradient: [-(h + 2.0), h_star * (h - 1.0)],
            energy_shape_factor: h_star,
        }
    }
}

/// Residuals of the momentum and kinetic-energy equations from `a` (with its terms `at_a`) to
/// `b`: trapezoidal rule for `weight` = 0.5, backward Euler for 1 (used where the start state is
/// only approximate).
pub(crate) fn laminar_residuals(
    a: &LayerState,
    at_a: &LaminarTerms,
    b: &LayerState,
    ds: f64,
    weight: f64,
    reynolds: f64,
    closure: &dyn LaminarClosure,
) -> [f64; 2] {
    let at_b = LaminarTerms::new(b, reynolds, closure);
    laminar_residuals_between(a, at_a, b, &at_b, ds, weight)
}

/// [`laminar_residuals`] with the terms at both ends given.
pub(crate) fn laminar_residuals_between(
    a: &LayerState,
    at_a: &LaminarTerms,
    b: &LayerState,
    at_b: &LaminarTerms,
    ds: f64,
    weight: f64,
) -> [f64; 2] {
    let d_log_ue = (b.edge_velocity / a.edge_velocity).ln();
    let changes = [
        (b.theta / a.theta).ln(),
        at_b.energy_shape_factor - at_a.energy_shape_factor,
    ];
    let mean = |p: f64, q: f64| (1.0 - weight) * p + weight * q;
    let mut r = [0.0; 2];
    for k in 0..2 {
        r[k] = changes[k]
            - ds * mean(at_a.source[k], at_b.source[k])
            - mean(at_a.gradient[k], at_b.gradient[k]) * d_log_ue;
    }
    r
}

/// Stagnation-flow momentum thickness at the first station: θ = 0.2923√(ν/K), K = ue/s.
pub(crate) fn stagnation_theta(s: f64, edge_velocity: f64, reynolds: f64) -> f64 {
    let k = (edge_velocity / s.max(1e-12)).max(1e-12);
    STAGNATION_THETA_FACTOR * (1.0 / (reynolds * k)).sqrt()
}
