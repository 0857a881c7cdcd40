//! Simultaneous (global Newton) solution of the coupled boundary layer, wake and panel method.
//!
//! The quasi-simultaneous outer iteration (`coupling::iteration`) marches each side with a
//! local interaction law and corrects the rest of the influence between passes; at the
//! trailing edge, where the Kutta condition couples the two sides' last stations as strongly
//! as each station's own coefficient, that correction stalls. Here every station's equations
//! and the full mass-defect influence of the panel method are solved together by Newton's
//! method (the global formulation of Drela & Giles, AIAA J. 25, 1987, with our own closures,
//! variables and elimination): unknowns ln θ, a third variable (N while laminar, CE when
//! turbulent) and the mass defect m = ue δ* at every station, edge speeds ue = ue_inv + D·m.
//! The first turbulent station of each side also carries the laminar state at the transition
//! point and the point's place in its interval, so transition moves smoothly; when the point
//! leaves its interval the regimes are moved. The stagnation point is re-located after every
//! step, and each step is relaxed so that no variable changes by more than a set fraction,
//! then backtracked until the residual falls.

mod curvature;
mod elimination;
mod equations;
mod layout;
mod output;
mod regimes;
mod step;
mod warm_start;

pub(crate) use warm_start::NewtonState;

use crate::boundary_layer::intervals::{EquationContext, StationState};
use crate::boundary_layer::laminar_closure::FalknerSkanClosure;
use crate::boundary_layer::transition::OrrSommerfeldEnvelope;
use crate::boundary_layer::{LayerState, Regime};
use crate::error::Result;

use super::iteration::CoupledSolution;
use super::model::CaseModel;
use super::settings::ViscousSettings;
use super::stagnation::{locate_stagnation, split_surface};
use elimination::{Factorisation, MAX_EQUATIONS};
use layout::Layout;
use regimes::TransitionHistory;

/// Largest residual (any station, any equation) of a converged solution. The residuals are
/// changes of ln θ, of a shape parameter and of N or CE over one interval.
pub(crate) const NEWTON_TOLERANCE: f64 = 1e-8;
/// Residual below which transition may move downstream to another interval: the iterate must
/// first settle with the current regimes.
const REGIME_MOVE_RESIDUAL: f64 = 1e-3;
/// Halvings of a Newton step tried when it does not reduce the residual.
const LINE_SEARCH_HALVINGS: usize = 4;
/// A chord step (the last Jacobian kept) is accepted as long as it cuts the residual's
/// 2-norm at least by this factor; otherwise the Jacobian is refreshed.
const CHORD_REDUCTION: f64 = 0.5;
/// Cap on the Newton iterations of one case.
const MAX_NEWTON_ITERATIONS: usize = 60;
/// Iterations without a new lowest residual after which the iteration gives up (a stalled
/// iterate, typically pinned at a closure bound, does not recover; the caller's next start
/// is a better use of the time). Counted afresh after each move of transition.
const STALL_ITERATIONS: usize = 12;
/// Largest shape factor the residuals are evaluated at (keeps a wild first iterate, with an
/// edge speed near zero at the trailing edge, finite).
const MAX_EVALUATED_SHAPE_FACTOR: f64 = 40.0;

/// The unknowns of every station of a layout.
#[derive(Debug, Clone)]
pub(crate) struct Unknowns {
    pub ln_theta: Vec<f64>,
    /// N while laminar, CE when turbulent or in the wake.
    pub third: Vec<f64>,
    pub m: Vec<f64>,
    pub regime: Vec<Regime>,
    /// At the first turbulent station of a side: ln θ of the laminar layer at the transition
    /// point and the point's fraction of the interval.
    pub transition: Vec<Option<[f64; 2]>>,
    /// Per side (upper, lower): a transition point held at one end of its interval (case node
    /// of the transition station, fraction 0 or 1) where the criterion has no root in either
    /// neighbouring interval (`update_regimes`); cleared by any move of that side.
    pub pinned: [Option<(usize, f64)>; 2],
}

impl Unknowns {
    /// The fraction side `side`'s transition point is held at, if it is held and its
    /// transition station is at case node `node`.
    pub(crate) fn pinned_fraction(&self, side: usize, node: usize) -> Option<f64> {
        self.pinned[side]
            .filter(|&(at, _)| at == node)
            .map(|(_, f)| f)
    }
}

/// Variables of a station as the residuals see them: its unknowns and its edge speed.
#[derive(Debug, Clone, Copy, Default)]
struct NodeVars {
    ln_theta: f64,
    third: f64,
    m: f64,
    ue: f64,
    transition: [f64; 2],
}

impl NodeVars {
    fn get(&self, v: usize) -> f64 {
        match v {
            0 => self.ln_theta,
            1 => self.third,
            2 => self.m,
            3 => self.ue,
            _ => self.transition[v - 4],
        }
    }
    fn set(&mut self, v: usize, value: f64) {
        match v {
            0 => self.ln_theta = value,
            1 => self.third = value,
            2 => self.m = value,
            3 => self.ue = value,
            _ => self.transition[v - 4] = value,
        }
    }
}

fn norm_squared(r: &[f64]) -> f64 {
    r.iter().map(|v| v * v).sum()
}

/// Station state from its variables: θ = e^{ln θ}, H = m/(ue θ).
fn station_state(v: &NodeVars, regime: Regime) -> StationState {
    let ue = v.ue.max(1e-6);
    let theta = v.ln_theta.exp();
    let h = (v.m / (ue * theta)).clamp(1.0005, MAX_EVALUATED_SHAPE_FACTOR);
    let laminar = regime == Regime::Laminar;
    StationState {
        state: LayerState {
            theta,
            shape_factor: h,
            entrainment: if laminar { 0.0 } else { v.third },
            edge_velocity: ue,
        },
        amplification: if laminar { v.third } else { 0.0 },
    }
}

/// The problem of one case: layout, closures and settings.
pub(crate) struct CoupledProblem<'a> {
    case: &'a CaseModel,
    settings: &'a ViscousSettings,
    ctx: EquationContext<'static>,
    wake_origin: f64,
    /// Node speeds of the wake-curvature sheet at the latest iterate (coupling convention),
    /// added to the inviscid speeds of every layout (`curvature`).
    speed_offset: std::cell::RefCell<Vec<f64>>,
    /// Whether a transition point that lies past its interval's end with its move downstream
    /// refused is held at that end without waiting for convergence
    /// ([`Self::holding_points_past_refused_moves`]).
    hold_past_refused_moves: bool,
}

impl<'a> CoupledProblem<'a> {
    pub(crate) fn new(case: &'a CaseModel, settings: &'a ViscousSettings) -> Self {
        CoupledProblem {
            case,
            settings,
            ctx: EquationContext {
                reynolds: settings.reynolds,
                n_critical: settings.effective_n_critical(),
                closure: FalknerSkanClosure::shipped(),
                amplification: OrrSommerfeldEnvelope::shipped(),
            },
            wake_origin: case.wake_s.first().copied().unwrap_or(0.0),
            speed_offset: std::cell::RefCell::new(vec![0.0; case.n_total()]),
            hold_past_refused_moves: false,
        }
    }

    /// The same problem, but a transition point that has lain past its interval's end for
    /// BOUND_ITERATIONS iterations with its move downstream refused (made before in the solve)
    /// is held at that end at once, as one at the lower bound is (`update_regimes`). For the
    /// last attempts only (`attempts`): there the point can go nowhere and the iterate does not
    /// converge (NACA 0012, Re 7e4, 0°: f between 1.5 and 2 for a dozen iterations); in the
    /// first attempts it put NACA 0012 at Re 2e5 and ±6° on a second solution (cl 0.646 against
    /// 0.692), so it is not used where those converge.
    pub(crate) fn holding_points_past_refused_moves(mut self) -> Self {
        self.hold_past_refused_moves = true;
        self
    }

    /// Whether this problem carries the wake-curvature sheet (the setting, and a case built
    /// with it).
    pub(crate) fn models_wake_curvature(&self) -> bool {
        self.settings.wake_curvature && !self.case.wake_turning.is_empty()
    }

    /// Runs the coupled Newton iteration from `start`.
    pub(crate) fn solve(&self, start: &NewtonState) -> Result<CoupledSolution> {
        let case = self.case;
        let ns = case.n_surface;
        let m_start: Vec<f64> = (0..case.n_total())
            .map(|n| start.node_mass_defect.get(n).copied().unwrap_or(0.0))
            .collect();
        let guess_stag = start.stagnation_node.min(ns.saturating_sub(2));
        self.speed_offset.replace(vec![0.0; case.n_total()]);
        let mut layout = self.layout_for(&m_start, guess_stag, None)?;
        let mut unknowns = self.map_state(&layout, start);
        // The mapped mass defects move the stagnation point a little: settle the split.
        for _ in 0..3 {
            let m_full = layout.node_mass_defect(case, &unknowns.m);
            let settled = self.layout_for(&m_full, layout.split.stagnation.node, Some(&layout))?;
            if settled.split.upper.nodes == layout.split.upper.nodes
                && settled.split.lower.nodes == layout.split.lower.nodes
            {
                break;
            }
            layout = settled;
            unknowns = self.map_state(&layout, start);
        }
        let mut residual = f64::INFINITY;
        let mut converged = false;
        let mut iterations = 0;
        // The factorised Jacobian of the last full Newton step, kept for chord steps while
        // they reduce the residual fast enough.
        let mut frozen: Option<Factorisation> = None;
        let (mut lowest, mut lowest_at) = (f64::INFINITY, 0);
        // Each side's last move of transition between intervals and how long its point has lain
        // at the lower bound of its fraction (`update_regimes`).
        let mut history = TransitionHistory::default();
        // The converged iterate from before a transition point was held at an interval end.
        let mut unpinned: Option<(Layout, Unknowns, usize, f64)> = None;
        for iteration in 1..=MAX_NEWTON_ITERATIONS.min(self.settings.max_iterations.max(1)) {
            iterations = iteration;
            // (D·m once for the edge speeds before and after the curvature sheet's update.)
            let induced = layout.influence.matvec(&unknowns.m);
            self.update_curvature_speeds(&mut layout, &unknowns, &induced, frozen.is_none());
            let ue = layout.edge_speeds_with_induced(&induced);
            let lins: Option<Vec<_>> = frozen.is_none().then(|| {
                let ends = self.end_table(&unknowns, &ue);
                (0..layout.len())
                    .map(|k| self.linearise(&layout, &unknowns, &ue, &ends, k))
                    .collect()
            });
            let residuals: Vec<[f64; MAX_EQUATIONS]> = match &lins {
                Some(l) => l.iter().map(|s| s.residual).collect(),
                None => self.residuals(&layout, &unknowns, &ue),
            };
            let row_counts: Vec<usize> = (0..layout.len())
                .map(|k| self.local_count(&unknowns, k) + 1)
                .collect();
            residual = (0..layout.len())
                .flat_map(|k| residuals[k][..row_counts[k]].iter())
                .fold(0.0_f64, |m, v| {
                    // (f64::max ignores NaN: a NaN must stay NaN once met.)
                    if v.is_finite() && !m.is_nan() {
                        m.max(v.abs())
                    } else {
                        f64::NAN
                    }
                });
            if !residual.is_finite() {
                residual = f64::NAN;
                break;
            }
            if residual < 0.5 * lowest {
                (lowest, lowest_at) = (residual, iteration);
            } else if iteration - lowest_at >= STALL_ITERATIONS {
                break;
            }
            let settled = residual < REGIME_MOVE_RESIDUAL;
            let converged_here = residual < NEWTON_TOLERANCE;
            let before = converged_here.then(|| unknowns.clone());
            let moved = self.update_regimes(
                &layout,
                &mut unknowns,
                &ue,
                settled,
                converged_here,
                &mut history,
            );
            if !moved && converged_here {
                converged = true;
                break;
            }
            if let Some(before) = before.filter(|b| b.pinned != unknowns.pinned) {
                // A transition point was just held at its interval's end: should that system
                // not converge, this converged iterate (point just outside) is the answer.
                unpinned = Some((layout.clone(), before, iteration, residual));
            }
            if moved {
                // The moved regimes change the displacement, and with it the stagnation point.
                frozen = None;
                // A new discrete system: the stall count starts afresh from here (the blocked
                // reversal in `update_regimes` keeps moves from cycling).
                (lowest, lowest_at) = (f64::INFINITY, iteration);
                layout = self.resplit(&layout, &mut unknowns)?;
                continue;
            }
            let chord = frozen.is_some();
            if let Some(l) = lins {
                frozen = Factorisation::new(l, layout.step_influence());
            }
            let Some(step) = frozen.as_ref().and_then(|f| f.corrections(&residuals)) else {
                if chord {
                    frozen = None;
                    continue;
                }
                break;
            };
            // Backtracking on the residual's 2-norm: a step that does not reduce it is halved
            // (up to LINE_SEARCH_HALVINGS times, the last one taken regardless).
            let base_norm: f64 = (0..layout.len())
                .map(|k| norm_squared(&residuals[k][..row_counts[k]]))
                .sum();
            let mut scale = 1.0;
            let mut accepted = unknowns.clone();
            let mut accepted_norm = f64::INFINITY;
            for attempt in 0..=LINE_SEARCH_HALVINGS {
                let mut trial = unknowns.clone();
                let trial_ue = self.apply_step(&layout, &mut trial, &ue, &step, scale);
                let trial_norm = self.residual_norm(&layout, &trial, trial_ue);
                accepted = trial;
                accepted_norm = trial_norm;
                if trial_norm < base_norm || attempt == LINE_SEARCH_HALVINGS {
                    break;
                }
                scale *= 0.5;
            }
            unknowns = accepted;
            // A chord step that did not cut the residual by CHORD_REDUCTION (in 2-norm)
            // means the Jacobian is stale: refresh it.
            if scale < 1.0 || accepted_norm > CHORD_REDUCTION * CHORD_REDUCTION * base_norm {
                frozen = None;
            }
            let previous_nodes = layout.nodes.clone();
            layout = self.resplit(&layout, &mut unknowns)?;
            if previous_nodes != layout.nodes {
                frozen = None;
            }
        }
        if !converged {
            if let Some((l, u, i, r)) = unpinned {
                (layout, unknowns, residual, converged) = (l, u, r, true);
                iterations = iterations.max(i);
            }
        }
        let mut solution =
            output::coupled_solution(self, &layout, &unknowns, converged, iterations, residual);
        solution.newton_state = Some(output::newton_state(&layout, &unknowns, case));
        Ok(solution)
    }

    /// Re-locates the stagnation point for the current mass defects; a change of split re-maps
    /// the stations near the stagnation point onto the new split and keeps every other node's
    /// state (`warm_start::keep_downstream_states`).
    fn resplit(&self, layout: &Layout, unknowns: &mut Unknowns) -> Result<Layout> {
        let m_full = layout.node_mass_defect(self.case, &unknowns.m);
        let new_layout = self.layout_for(&m_full, layout.split.stagnation.node, Some(layout))?;
        if new_layout.split.upper.nodes != layout.split.upper.nodes
            || new_layout.split.lower.nodes != layout.split.lower.nodes
        {
            let state = output::newton_state(layout, unknowns, self.case);
            let previous = std::mem::replace(unknowns, self.map_state(&new_layout, &state));
            unknowns.pinned = previous.pinned;
            warm_start::keep_downstream_states(&new_layout, unknowns, layout, &previous);
            let ue = new_layout.edge_speeds(&unknowns.m);
            self.place_transition_points(&new_layout, unknowns, &ue);
        }
        Ok(new_layout)
    }

    /// Layout at the stagnation point of the speeds induced by the node mass defects `m_full`
    /// (reusing what it can of `previous`, see [`Layout::new`]).
    fn layout_for(
        &self,
        m_full: &[f64],
        stag_guess: usize,
        previous: Option<&Layout>,
    ) -> Result<Layout> {
        let case = self.case;
        let ns = case.n_surface;
        let offset = self.speed_offset.borrow();
        let with_offset =
            |q: Vec<f64>| -> Vec<f64> { q.iter().zip(offset.iter()).map(|(a, b)| a + b).collect() };
        let q = with_offset(case.speeds(m_full, stag_guess));
        let stagnation = locate_stagnation(&q[..ns], &case.arc, &case.x[..ns], &case.y[..ns])?;
        let q = if stagnation.node == stag_guess {
            q
        } else {
            with_offset(case.speeds(m_full, stagnation.node))
        };
        let stagnation = locate_stagnation(&q[..ns], &case.arc, &case.x[..ns], &case.y[..ns])?;
        let split = split_surface(stagnation, &case.arc);
        Ok(Layout::new(
            case,
            split,
            [self.settings.trip_upper, self.settings.trip_lower],
            &offset,
            previous,
        ))
    }

    /// The unknowns of `layout` from a state (see [`NewtonState::unknowns_for`]), with a
    /// transition point placed on each side that turns turbulent.
    fn map_state(&self, layout: &Layout, state: &NewtonState) -> Unknowns {
        let mut unknowns = state.unknowns_for(layout, self.ctx.reynolds, |u, ue, k| {
            self.make_turbulent(u, ue, k)
        });
        let ue = layout.edge_speeds(&unknowns.m);
        self.place_transition_points(layout, &mut unknowns, &ue);
        unknowns
    }

    fn layer_state(&self, unknowns: &Unknowns, ue: &[f64], k: usize) -> LayerState {
        self.station(unknowns, ue, k).state
    }

    fn station(&self, unknowns: &Unknowns, ue: &[f64], k: usize) -> StationState {
        station_state(
            &NodeVars {
                ln_theta: unknowns.ln_theta[k],
                third: unknowns.third[k],
                m: unknowns.m[k],
                ue: ue[k],
                transition: [0.0; 2],
            },
            unknowns.regime[k],
        )
    }
}
