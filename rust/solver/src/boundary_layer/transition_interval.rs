//! The interval in which a laminar layer becomes turbulent: locating the transition point
//! (trip or critical amplification factor) and solving laminar up to it, turbulent after it.

use super::lag_entrainment::turbulent_start;
use super::laminar_closure::LaminarClosure;
use super::march::{finite_or, laminar_step, turbulent_step, EdgeCondition, StepMemory};
use super::station::{interacted_velocity, LayerState, MarchSettings};

/// An interval [sa, sb] in which the layer becomes turbulent.
pub(crate) struct TransitionInterval<'a> {
    pub start: &'a LayerState,
    pub start_amplification: f64,
    pub sa: f64,
    pub sb: f64,
    pub first: bool,
}

/// The solved transition interval: the turbulent state at sb and where transition happened.
pub(crate) struct TransitionOutcome {
    pub state: LayerState,
    pub s: f64,
    pub forced: bool,
    pub amplification: f64,
    pub converged: bool,
}

impl TransitionInterval<'_> {
    /// Where transition happens given the laminar state at sb: the trip or the point where N
    /// reaches its critical value (linear in N), whichever is first; sb when neither is inside.
    fn locate(
        &self,
        laminar_b: &LayerState,
        settings: &MarchSettings,
        growth: &dyn Fn(&LayerState) -> f64,
    ) -> (f64, bool, f64) {
        let ds = self.sb - self.sa;
        let n_a = self.start_amplification;
        let n_b = n_a + 0.5 * ds * (growth(self.start) + growth(laminar_b));
        let trip = settings.trip_s.filter(|&t| t > self.sa && t <= self.sb);
        let free = (n_b >= settings.n_critical)
            .then(|| self.sa + ds * ((settings.n_critical - n_a) / (n_b - n_a)).clamp(0.0, 1.0));
        let (s_tr, forced) = match (trip, free) {
            (Some(t), Some(f)) => (t.min(f), t <= f),
            (Some(t), None) => (t, true),
            (None, Some(f)) => (f, false),
            (None, None) => (self.sb, false),
        };
        let w = ((s_tr - self.sa) / ds).clamp(0.0, 1.0);
        (s_tr, forced, n_a + w * (n_b - n_a))
    }

    /// Turbulent part from the laminar state at the transition point to sb.
    fn turbulent_part(
        &self,
        at_transition: &LayerState,
        laminar_b: &LayerState,
        s_tr: f64,
        edge: EdgeCondition,
        settings: &MarchSettings,
    ) -> (LayerState, bool) {
        let re = settings.reynolds;
        let begin = turbulent_start(at_transition, re);
        let rest = self.sb - s_tr;
        if rest > 1e-9 * (self.sb - self.sa) {
            let (turb, ok) = turbulent_step(
                &begin,
                rest,
                edge,
                settings,
                false,
                true,
                &mut StepMemory::default(),
            );
            let (turb, finite) = finite_or(turb, &begin);
            (turb, ok && finite)
        } else {
            let mut end = turbulent_start(laminar_b, re);
            end.edge_velocity = interacted_velocity(
                edge.external_velocity,
                edge.interaction_coefficient,
                end.shape_factor * end.theta,
                laminar_b.edge_velocity,
            );
            (end, true)
        }
    }

    /// Laminar from sa to the transition point, turbulent from there to sb.
    ///
    /// First choice, consistent with the interaction law at the stations: the edge velocity
    /// inside the interval is interpolated linearly towards the final ue at sb, found by a
    /// secant iteration on it (exact in one pass in direct mode), so the converged solution
    /// does not depend on the interaction coefficient. Where that laminar part has no solution
    /// (prescribed deceleration of separated laminar flow: Goldstein's singularity), the laminar
    /// part is solved instead with the interaction law interpolated linearly between the two
    /// stations (E and c), which is well posed.
    pub(crate) fn solve(
        &self,
        laminar_interacted: &LayerState,
        edges: [EdgeCondition; 2],
        settings: &MarchSettings,
        closure: &dyn LaminarClosure,
        growth: &dyn Fn(&LayerState) -> f64,
    ) -> TransitionOutcome {
        let a = self.start;
        let ds = self.sb - self.sa;
        let prescribed = |ue: f64| EdgeCondition {
            external_velocity: ue,
            interaction_coefficient: 0.0,
        };
        let mut ue_b = laminar_interacted.edge_velocity;
        // Secant iteration on g(ue) = F(ue) − ue, F the ue at sb that the interval returns for an
        // assumed ue (plain fixed-point steps until two points are known or when the secant
        // degenerates).
        let mut last: Option<(f64, f64)> = None;
        for _ in 0..30 {
            let (laminar_b, ok_b) = laminar_step(
                a,
                ds,
                prescribed(ue_b),
                settings,
                closure,
                self.first,
                &mut StepMemory::default(),
            );
            let (s_tr, forced, amplification) = self.locate(&laminar_b, settings, growth);
            let w = (s_tr - self.sa) / ds;
            let (at_transition, ok_tr) = if w > 1e-9 {
                let ue_tr = a.edge_velocity + w * (ue_b - a.edge_velocity);
                laminar_step(
                    a,
                    w * ds,
                    prescribed(ue_tr),
                    settings,
                    closure,
                    self.first,
                    &mut StepMemory::default(),
                )
            } else {
                (*a, true)
            };
            if !(ok_b && ok_tr) {
                break;
            }
            let (state, ok_turb) =
                self.turbulent_part(&at_transition, &laminar_b, s_tr, edges[1], settings);
            let gap = state.edge_velocity - ue_b;
            if gap.abs() <= 1e-11 * ue_b.max(1.0) {
                return TransitionOutcome {
                    state,
                    s: s_tr,
                    forced,
                    amplification,
                    converged: ok_turb,
                };
            }
            let fixed_point = state.edge_velocity;
            let next = match last {
                Some((ue_old, gap_old)) if (gap - gap_old).abs() > 1e-300 => {
                    ue_b - gap * (ue_b - ue_old) / (gap - gap_old)
                }
                _ => fixed_point,
            };
            last = Some((ue_b, gap));
            ue_b = if next.is_finite() && next > 0.0 {
                next
            } else {
                fixed_point
            };
        }
        // Well-posed fallback with the interpolated interaction law.
        let (s_tr, forced, amplification) = self.locate(laminar_interacted, settings, growth);
        let w = (s_tr - self.sa) / ds;
        let (at_transition, ok_tr) = if w > 1e-9 {
            let lerp = |p: f64, q: f64| p + w * (q - p);
            let interpolated = EdgeCondition {
                external_velocity: lerp(edges[0].external_velocity, edges[1].external_velocity),
                interaction_coefficient: lerp(
                    edges[0].interaction_coefficient,
                    edges[1].interaction_coefficient,
                ),
            };
            laminar_step(
                a,
                w * ds,
                interpolated,
                settings,
                closure,
                self.first,
                &mut StepMemory::default(),
            )
        } else {
            (*a, true)
        };
        let (at_transition, finite) = finite_or(at_transition, a);
        let (state, ok_turb) =
            self.turbulent_part(&at_transition, laminar_interacted, s_tr, edges[1], settings);
        TransitionOutcome {
            state,
            s: s_tr,
            forced,
            amplification,
            converged: ok_tr && finite && ok_turb,
        }
    }
}
