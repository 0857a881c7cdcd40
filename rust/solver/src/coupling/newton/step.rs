//! The relaxed Newton update.

use crate::boundary_layer::lag_entrainment::{
    ENTRAINMENT_RANGE, TURBULENT_SHAPE_FACTOR_RANGE, WAKE_SHAPE_FACTOR_RANGE,
};
use crate::boundary_layer::Regime;

use super::elimination::Corrections;
use super::layout::Layout;
use super::{CoupledProblem, Unknowns};

/// Largest change of ln θ in one step.
const MAX_LOG_THETA_STEP: f64 = 0.4;
/// Largest relative change of the mass defect and of the shape factor in one step.
const MAX_RELATIVE_STEP: f64 = 0.35;
/// Largest change of a transition point's place in its interval in one step (intervals).
const MAX_FRACTION_STEP: f64 = 1.0;
/// Range the update keeps a transition point's place in its interval within (fractions of
/// the interval: up to one interval before its start, or past its end).
pub(super) const FRACTION_BOUNDS: (f64, f64) = (-1.0, 2.0);
/// Largest change of CE in one step where CE itself is small.
const MAX_ENTRAINMENT_STEP: f64 = 0.02;
/// Edge speed below which a station counts as near a stagnation point for the step limits.
const NEAR_STAGNATION_SPEED: f64 = 0.3;
/// Lower bound of the laminar shape factor kept by the update (the closure's attached range
/// starts near 2.0 at strong acceleration).
pub(super) const LAMINAR_MIN_SHAPE_FACTOR: f64 = 1.9;
/// Upper bound of the laminar shape factor (end of the reversed-flow branch of the closure).
pub(super) const LAMINAR_MAX_SHAPE_FACTOR: f64 = 16.0;

impl CoupledProblem<'_> {
    /// Applies the Newton corrections, relaxed so that ln θ changes by at most
    /// MAX_LOG_THETA_STEP and m, H and CE by at most MAX_RELATIVE_STEP of their value; then keeps
    /// every shape factor inside the range of its closure. Returns the edge speeds of the new
    /// iterate when no mass defect had to be changed for that last bound (else None).
    pub(super) fn apply_step(
        &self,
        layout: &Layout,
        unknowns: &mut Unknowns,
        ue: &[f64],
        step: &Corrections,
        scale: f64,
    ) -> Option<Vec<f64>> {
        let due = layout.influence.matvec(&step.mass);
        let mut omega: f64 = scale;
        let mut limit = |change: f64, allowed: f64| {
            if change.abs() * omega > allowed {
                omega = allowed / change.abs();
            }
        };
        for k in 0..layout.len() {
            let [dl, dc, ..] = step.local[k];
            let dm = step.mass[k];
            let m = unknowns.m[k].max(1e-12);
            let u = ue[k].max(1e-6);
            limit(dl, MAX_LOG_THETA_STEP);
            // Near a stagnation point m and ue are small and move with the point itself;
            // relative limits there would stall every step, so they clip those stations'
            // own corrections instead (below).
            if ue[k] > NEAR_STAGNATION_SPEED {
                limit(dm / m, MAX_RELATIVE_STEP);
                limit(dm / m - due[k] / u - dl, MAX_RELATIVE_STEP);
            }
            if ue[k] + due[k] <= 0.0 {
                limit(due[k] / u, 0.5);
            }
            if unknowns.regime[k] != Regime::Laminar {
                limit(
                    dc,
                    (MAX_RELATIVE_STEP * unknowns.third[k].abs()).max(MAX_ENTRAINMENT_STEP),
                );
            }
            if unknowns.transition[k].is_some() {
                let [_, _, dlt, _] = step.local[k];
                limit(dlt, MAX_LOG_THETA_STEP);
                // (The fraction is clipped on its own below: where the amplification grows
                // slowly through the interval its correction is large and would stall every
                // other variable's step.)
            }
        }
        for k in 0..layout.len() {
            let [dl, dc, dlt, df] = step.local[k];
            let mut own = omega;
            if ue[k] <= NEAR_STAGNATION_SPEED {
                let m = unknowns.m[k].max(1e-12);
                let u = ue[k].max(1e-6);
                for change in [step.mass[k] / m, step.mass[k] / m - due[k] / u - dl] {
                    if change.abs() * own > MAX_RELATIVE_STEP {
                        own = MAX_RELATIVE_STEP / change.abs();
                    }
                }
            }
            unknowns.ln_theta[k] += own * dl;
            unknowns.third[k] += own * dc;
            if let Some(t) = unknowns.transition[k].as_mut() {
                t[0] += own * dlt;
                // Kept within one interval either side: beyond that the point moves.
                let change = (own * df).clamp(-MAX_FRACTION_STEP, MAX_FRACTION_STEP);
                t[1] = (t[1] + change).clamp(FRACTION_BOUNDS.0, FRACTION_BOUNDS.1);
            }
            unknowns.m[k] = (unknowns.m[k] + own * step.mass[k]).max(1e-12);
            if unknowns.regime[k] != Regime::Laminar {
                unknowns.third[k] =
                    unknowns.third[k].clamp(ENTRAINMENT_RANGE.0, ENTRAINMENT_RANGE.1);
            }
        }
        let ue_new = layout.edge_speeds(&unknowns.m);
        let mut clamped = false;
        for k in 0..layout.len() {
            let (lo, hi) = match unknowns.regime[k] {
                Regime::Laminar => (LAMINAR_MIN_SHAPE_FACTOR, LAMINAR_MAX_SHAPE_FACTOR),
                Regime::Turbulent => TURBULENT_SHAPE_FACTOR_RANGE,
                Regime::Wake => WAKE_SHAPE_FACTOR_RANGE,
            };
            let scale = ue_new[k].max(1e-6) * unknowns.ln_theta[k].exp();
            let h = unknowns.m[k] / scale;
            if h < lo || h > hi {
                unknowns.m[k] = h.clamp(lo, hi) * scale;
                clamped = true;
            }
        }
        (!clamped).then_some(ue_new)
    }
}
