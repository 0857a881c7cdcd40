//! Where each side's layer is laminar and where turbulent, and moving transition between
//! intervals as the iterate demands.
//!
//! The first turbulent station of a side carries the transition point's place f in its
//! interval. When the iterate has settled with f outside [0, 1], transition is moved one
//! interval up- or downstream, carrying the point's laminar state along, so the residuals stay
//! continuous. Independently, a laminar station upstream whose amplification factor has
//! reached the critical value (or that lies past the trip) pulls transition up to it.

use crate::boundary_layer::intervals::{
    laminar_interval_residual, transition_point, transition_shape_factor, StationState,
};
use crate::boundary_layer::lag_entrainment::turbulent_start;
use crate::boundary_layer::local_newton::{solve, NewtonOptions};
use crate::boundary_layer::{LayerState, Regime};

use super::layout::Layout;
use super::step::{FRACTION_BOUNDS, LAMINAR_MAX_SHAPE_FACTOR, LAMINAR_MIN_SHAPE_FACTOR};
use super::{CoupledProblem, Unknowns};

/// How far outside [0, 1] the transition point of an unsettled iterate may lie before it moves.
const UNSETTLED_FRACTION_SLACK: f64 = 0.5;
/// How far past the end of the last interval a trailing-edge transition point may lie before
/// the layer is made laminar to the trailing edge (intervals; our choice, inside the bound of
/// 2 the step keeps fractions within).
const TRAILING_EDGE_FRACTION_SLACK: f64 = 0.75;
/// How far past the critical N a laminar station of an unsettled iterate may be before it
/// pulls transition up.
const UNSETTLED_N_MARGIN: f64 = 1.0;

/// Consecutive iterations a transition point must lie at the lower bound the update keeps its
/// fraction within, its move upstream blocked, before it is held at its interval's start
/// without waiting for the iterate to converge (our choice: a point thrown there in the first
/// steps after a move mostly comes back; one that stays there stalls the iteration).
const BOUND_ITERATIONS: usize = 3;

/// How far past its interval's end (in intervals) a point with its move downstream refused
/// counts as lying there, for the hold of `CoupledProblem::holding_points_past_refused_moves`
/// (our choice).
const PAST_END_SLACK: f64 = 0.25;

/// What the iteration remembers of each side's transition between calls of `update_regimes`.
#[derive(Debug, Clone, Default)]
pub(super) struct TransitionHistory {
    /// Every move each side has made in this solve, as case nodes (from, to), the trailing
    /// edge as [`OFF_TRAILING_EDGE`]: a move is made once at most, so no sequence of moves
    /// repeats (`refuses`).
    pub made: [Vec<(usize, usize)>; 2],
    /// Consecutive iterations each side's point has lain at the lower bound of its fraction.
    pub at_bound: [usize; 2],
    /// Consecutive iterations each side's point has lain past its interval's end (by more than
    /// PAST_END_SLACK) with its move downstream refused.
    pub past_end: [usize; 2],
}

impl TransitionHistory {
    /// Side `side`'s last move between intervals, as case nodes (from, to): the last one made
    /// that is not a pull-up from the trailing edge.
    fn last_move(&self, side: usize) -> Option<(usize, usize)> {
        self.made[side]
            .iter()
            .rev()
            .find(|&&(from, _)| from != OFF_TRAILING_EDGE)
            .copied()
    }

    /// Whether side `side` has moved transition from case node `from` to `to` before in this
    /// solve (either may be [`OFF_TRAILING_EDGE`]), so that the move is not made again: the
    /// rule against undoing the last move stops a cycle between two intervals, this one a
    /// cycle through several (NACA 0012, Re 1e6, 8°, lower side: off the trailing edge,
    /// pulled up two intervals by the critical N, one interval down, off again, until the
    /// attempt ran out of iterations).
    fn refuses(&self, side: usize, from: usize, to: usize) -> bool {
        self.made[side].contains(&(from, to))
    }
}

/// Stands for "off the trailing edge" (the layer laminar to it) as the target of a move in
/// the moves of a [`TransitionHistory`].
const OFF_TRAILING_EDGE: usize = usize::MAX;

/// Records a move of side `side`'s transition from case node `from` to `to` (either may be
/// [`OFF_TRAILING_EDGE`]) among its moves; releases a held point.
fn note_move(
    history: &mut TransitionHistory,
    unknowns: &mut Unknowns,
    side: usize,
    from: usize,
    to: usize,
) {
    history.made[side].push((from, to));
    unknowns.pinned[side] = None;
}

/// Whether moving transition from station `from` to station `to` undoes the side's last move
/// (`last`, as case nodes).
fn undoes_last(last: Option<(usize, usize)>, layout: &Layout, from: usize, to: usize) -> bool {
    last == Some((layout.nodes[to], layout.nodes[from]))
}

impl CoupledProblem<'_> {
    /// Makes station k turbulent with the turbulent start of its own (laminar) state.
    pub(super) fn make_turbulent(&self, unknowns: &mut Unknowns, ue: &[f64], k: usize) {
        let state = self.layer_state(unknowns, ue, k);
        let start = turbulent_start(&state, self.ctx.reynolds);
        unknowns.regime[k] = Regime::Turbulent;
        unknowns.third[k] = start.entrainment;
        unknowns.ln_theta[k] = start.theta.ln();
        unknowns.m[k] = start.theta * start.shape_factor * ue[k].max(1e-6);
        unknowns.transition[k] = None;
    }

    /// Makes station k turbulent in place: its θ and mass defect stay (a jump of one station's
    /// displacement is a strong local source that upsets the edge speeds around it and, through
    /// the Kutta condition, the circulation); CE is that of the turbulent start of `laminar`.
    fn switch_to_turbulent(&self, unknowns: &mut Unknowns, k: usize, laminar: &LayerState) {
        let start = turbulent_start(laminar, self.ctx.reynolds);
        unknowns.regime[k] = Regime::Turbulent;
        unknowns.third[k] = start.entrainment;
    }

    /// Gives the first turbulent station of each side (after a laminar one) its transition
    /// point, estimated from the laminar station before it; clears it everywhere else.
    pub(super) fn place_transition_points(
        &self,
        layout: &Layout,
        unknowns: &mut Unknowns,
        ue: &[f64],
    ) {
        let mut keep = vec![false; layout.len()];
        for (side, range) in [layout.upper.clone(), layout.lower.clone()]
            .into_iter()
            .enumerate()
        {
            let Some(t) = range
                .clone()
                .find(|&k| unknowns.regime[k] != Regime::Laminar)
            else {
                continue;
            };
            if t == range.start {
                continue;
            }
            keep[t] = true;
            if unknowns.transition[t].is_none() {
                let a = self.station(unknowns, ue, t - 1);
                let point = transition_point(
                    &self.ctx,
                    &a,
                    ue[t],
                    layout.s[t - 1],
                    layout.s[t],
                    layout.trips[side],
                );
                let ln_theta = point.laminar.theta.ln();
                // (A wild first iterate — an edge speed below zero at t — has no laminar
                // solution in the interval: start the point mid-interval with a's θ instead of
                // NaN, which would end the attempt at its first step.)
                unknowns.transition[t] =
                    Some(if ln_theta.is_finite() && point.fraction.is_finite() {
                        [ln_theta, point.fraction]
                    } else {
                        [a.state.theta.ln(), 0.5]
                    });
            }
        }
        for (k, flag) in keep.into_iter().enumerate() {
            if !flag {
                unknowns.transition[k] = None;
            }
        }
    }

    /// Moves transition where the iterate says it belongs; returns whether anything moved.
    /// From a settled iterate (`settled`), when the laminar solution and the transition point
    /// are accurate, any point outside its interval moves; from an unsettled one only points
    /// well outside (the equations of a point several intervals away are meaningless).
    ///
    /// `history.last_move` is each side's last interval move as case nodes (from, to); a
    /// move that would undo it is not made, nor one made before in this solve (`refuses`).
    /// Between two neighbouring intervals the discrete transition point can have no consistent
    /// place — in the upstream interval it settles beyond its end, in the downstream one before
    /// its start — and the iterate would move it to and fro for ever; it stays instead in the interval it reached and, once the iterate has converged
    /// (`converged_here`), is held at the end it passed (`Unknowns::pinned`) and solved again,
    /// so its place is uncertain by less than an interval.
    pub(super) fn update_regimes(
        &self,
        layout: &Layout,
        unknowns: &mut Unknowns,
        ue: &[f64],
        settled: bool,
        converged_here: bool,
        history: &mut TransitionHistory,
    ) -> bool {
        let mut moved = false;
        for (side, range) in [layout.upper.clone(), layout.lower.clone()]
            .into_iter()
            .enumerate()
        {
            let trip = layout.trips[side];
            let t = range
                .clone()
                .find(|&k| unknowns.regime[k] != Regime::Laminar)
                .unwrap_or(range.end);
            // A laminar station past the trip or at the critical N pulls transition up.
            // (From an unsettled iterate only when N is well past the critical value.)
            let margin = if settled { 0.0 } else { UNSETTLED_N_MARGIN };
            let early = (range.start..t).find(|&j| {
                trip.is_some_and(|ts| ts <= layout.s[j] * (1.0 + 1e-12))
                    || (j > range.start && unknowns.third[j] >= self.ctx.n_critical + margin)
            });
            // (Not when it would undo the side's last move one interval downstream, or off the
            // trailing edge.)
            let from = if t < range.end {
                layout.nodes[t]
            } else {
                OFF_TRAILING_EDGE
            };
            let early = early.filter(|&j| {
                let last = history.last_move(side);
                let undoes = if t < range.end {
                    undoes_last(last, layout, t, j)
                } else {
                    last == Some((layout.nodes[j], OFF_TRAILING_EDGE))
                };
                // (Nor, for a point held at its interval's end because it had no consistent
                // place, by the N of the two stations before the transition station: the held
                // point lies within an interval of where N reaches the critical value, and
                // pulling it up makes the three intervals around it cycle.)
                let held =
                    t < range.end && unknowns.pinned_fraction(side, layout.nodes[t]).is_some();
                let blocked = (j + 1 == t && undoes)
                    || (held && j + 2 >= t)
                    || history.refuses(side, from, layout.nodes[j]);
                !blocked
            });
            if let Some(j) = early {
                note_move(history, unknowns, side, from, layout.nodes[j]);
                self.transition_at(layout, unknowns, ue, range.clone(), j, t, trip);
                moved = true;
                continue;
            }
            if t <= range.start || t >= range.end {
                continue;
            }
            let Some(point) = unknowns.transition[t] else {
                continue;
            };
            let [ln_theta, f] = point;
            // From an unsettled iterate only when the point is well outside its interval.
            let slack = if settled {
                0.0
            } else {
                UNSETTLED_FRACTION_SLACK
            };
            // Off the trailing edge only well beyond it: a transition point just past the end
            // of the last interval and a layer laminar to the trailing edge are two discrete
            // systems whose trailing-edge displacement differs, and between them the iterate
            // would cycle.
            let downstream_slack = if t + 1 == range.end {
                slack.max(TRAILING_EDGE_FRACTION_SLACK)
            } else {
                slack
            };
            let last = history.last_move(side);
            let undoes = |target: usize| undoes_last(last, layout, t, target);
            // Moves that may not be made: back over the last move, or made before.
            let up_blocked =
                undoes(t - 1) || history.refuses(side, layout.nodes[t], layout.nodes[t - 1]);
            let down_target = if t + 1 < range.end {
                layout.nodes[t + 1]
            } else {
                OFF_TRAILING_EDGE
            };
            let down_blocked = (t + 1 < range.end && undoes(t + 1))
                || history.refuses(side, layout.nodes[t], down_target);
            // A settled point outside its interval whose move would undo the last one has no
            // consistent place in either interval: it is held at the end it passed (like a
            // trip there) instead of lying outside, where the turbulent part would run
            // backwards from a near-separated start.
            let pinned_here = unknowns.pinned_fraction(side, layout.nodes[t]).is_some();
            // (Also before convergence when the point has lain at the lower bound the step
            // keeps it within, a whole interval before its start, for BOUND_ITERATIONS
            // iterations: with its move upstream blocked it can go nowhere, and the iterate
            // stalls there instead of converging. Not at the upper bound: there the point past
            // the last interval leaves the layer laminar to the trailing edge, and holding it
            // earlier put NACA 0012 at Re 2e5 and −6° on a second solution.)
            let at_bound = f <= FRACTION_BOUNDS.0 + 1e-9;
            history.at_bound[side] = if at_bound {
                history.at_bound[side] + 1
            } else {
                0
            };
            // (In the last attempts, likewise past the end with the move downstream refused:
            // `CoupledProblem::holding_points_past_refused_moves`.)
            let past_end = f > 1.0 + PAST_END_SLACK && t + 1 < range.end && down_blocked;
            history.past_end[side] = if past_end {
                history.past_end[side] + 1
            } else {
                0
            };
            let stuck = history.at_bound[side] >= BOUND_ITERATIONS
                || (self.hold_past_refused_moves && history.past_end[side] >= BOUND_ITERATIONS);
            if (converged_here || stuck) && !pinned_here {
                let blocked_up = f < 0.0 && t - 1 > range.start && up_blocked;
                // (Past the end of the last interval: there the point at f = 1 gives the wake
                // the same start as a layer laminar to the trailing edge.)
                let blocked_down = f > 1.0 && (t + 1 == range.end || down_blocked);
                if blocked_up || blocked_down {
                    let end = if blocked_down { 1.0 } else { 0.0 };
                    unknowns.pinned[side] = Some((layout.nodes[t], end));
                    unknowns.transition[t] = Some([ln_theta, end]);
                    moved = true;
                    continue;
                }
            }
            if f < -slack && t - 1 > range.start && !up_blocked {
                let to = layout.nodes[t - 1];
                note_move(history, unknowns, side, layout.nodes[t], to);
                let h_t = self.transition_shape(layout, unknowns, ue, t, f);
                // One interval upstream: the station before becomes the transition station.
                let ratio = (layout.s[t] - layout.s[t - 1]) / (layout.s[t - 1] - layout.s[t - 2]);
                let laminar = LayerState {
                    theta: ln_theta.exp(),
                    shape_factor: h_t,
                    entrainment: 0.0,
                    edge_velocity: ue[t - 1],
                };
                // Station t − 1 keeps its θ and mass defect (see `switch_to_turbulent`).
                self.switch_to_turbulent(unknowns, t - 1, &laminar);
                unknowns.transition[t - 1] = Some([ln_theta, (1.0 + f * ratio).clamp(0.0, 1.0)]);
                unknowns.transition[t] = None;
                moved = true;
            } else if f > 1.0 + downstream_slack && !down_blocked {
                note_move(history, unknowns, side, layout.nodes[t], down_target);
                // One interval downstream (or off the trailing edge): station t turns laminar
                // with the point's laminar state.
                let a = self.station(unknowns, ue, t - 1);
                let ds = layout.s[t] - layout.s[t - 1];
                // The laminar state at t: the laminar interval's own (Newton) equations with
                // the current edge speed, or the point's state where they have no solution.
                // (The point lies at f > 1: interpolate its laminar state back to f = 1.)
                let ln_theta_at_t = a.state.theta.ln() + (ln_theta - a.state.theta.ln()) / f;
                let estimate = LayerState {
                    theta: ln_theta_at_t.exp(),
                    shape_factor: self.transition_shape(layout, unknowns, ue, t, 1.0),
                    entrainment: 0.0,
                    edge_velocity: ue[t].max(1e-6),
                };
                let laminar = self
                    .solve_laminar_interval(layout, &a, ds, t, &estimate)
                    .unwrap_or(estimate);
                let n = a.amplification
                    + 0.5 * ds * (self.ctx.growth(&a.state) + self.ctx.growth(&laminar));
                unknowns.regime[t] = Regime::Laminar;
                unknowns.third[t] = n.min(self.ctx.n_critical - 1e-9);
                unknowns.ln_theta[t] = laminar.theta.ln();
                // Its mass defect stays, as in every move (see `switch_to_turbulent`): only θ
                // is taken from the laminar solution.
                unknowns.transition[t] = None;
                if t + 1 < range.end {
                    let ratio = ds / (layout.s[t + 1] - layout.s[t]);
                    unknowns.transition[t + 1] =
                        Some([ln_theta, ((f - 1.0) * ratio).clamp(0.0, 1.0)]);
                }
                moved = true;
            }
        }
        moved
    }

    /// The laminar state at station t that satisfies the momentum and kinetic-energy equations
    /// of the interval from `a` (the discretisation of the coupled residuals, so the iterate
    /// stays settled after the move) at t's current edge speed; None when the local Newton
    /// iteration from `guess` does not converge.
    fn solve_laminar_interval(
        &self,
        layout: &Layout,
        a: &StationState,
        ds: f64,
        t: usize,
        guess: &LayerState,
    ) -> Option<LayerState> {
        let ue_t = guess.edge_velocity;
        let state_of = |x: &[f64; 2]| StationState {
            state: LayerState {
                theta: x[0].exp(),
                shape_factor: x[1],
                entrainment: 0.0,
                edge_velocity: ue_t,
            },
            amplification: a.amplification,
        };
        let residual = |x: &[f64; 2]| {
            let b = state_of(x);
            let w = self.interval_weight(layout, t, a.state.shape_factor, x[1]);
            let r = laminar_interval_residual(&self.ctx, a, &b, ds, w);
            [r[0], r[1]]
        };
        let options = NewtonOptions {
            max_iterations: 30,
            tolerance: 1e-10,
            lower: [guess.theta.ln() - 2.0, LAMINAR_MIN_SHAPE_FACTOR],
            upper: [guess.theta.ln() + 2.0, LAMINAR_MAX_SHAPE_FACTOR],
            max_step: [0.3, 0.5],
            typical: [1.0, 1.0],
        };
        let outcome = solve(
            [guess.theta.ln(), guess.shape_factor],
            residual,
            &options,
            &mut None,
        );
        outcome.converged.then(|| state_of(&outcome.x).state)
    }

    /// Laminar shape factor at the transition point of station t at fraction f (see
    /// [`transition_shape_factor`]).
    pub(super) fn transition_shape(
        &self,
        layout: &Layout,
        unknowns: &Unknowns,
        ue: &[f64],
        t: usize,
        f: f64,
    ) -> f64 {
        let a = self.layer_state(unknowns, ue, t - 1);
        let previous = (t >= 2
            && layout.side_of(t - 2) == layout.side_of(t)
            && unknowns.regime[t - 2] == Regime::Laminar)
            .then(|| {
                (
                    self.layer_state(unknowns, ue, t - 2).shape_factor,
                    layout.s[t - 2],
                )
            });
        transition_shape_factor(previous, a.shape_factor, layout.s[t - 1], layout.s[t], f)
    }

    /// Transition moved up into the interval (j − 1, j) from the turbulent station t (or the
    /// side's end): j becomes the transition station, with its point placed by the amplification
    /// factors of j − 1 and j (or at the trip); the stations between start between the
    /// turbulent start at j and the old first turbulent state.
    #[allow(clippy::too_many_arguments)]
    fn transition_at(
        &self,
        layout: &Layout,
        unknowns: &mut Unknowns,
        ue: &[f64],
        range: std::ops::Range<usize>,
        j: usize,
        t: usize,
        trip: Option<f64>,
    ) {
        if j == range.start {
            // Trip ahead of the first station: turbulent from the start.
            self.make_turbulent(unknowns, ue, j);
        } else {
            let (a, b) = (
                self.station(unknowns, ue, j - 1),
                self.station(unknowns, ue, j),
            );
            let (sa, sb) = (layout.s[j - 1], layout.s[j]);
            let f = match trip.filter(|&ts| ts > sa && ts <= sb) {
                Some(ts) => (ts - sa) / (sb - sa),
                None => {
                    let (na, nb) = (a.amplification, b.amplification);
                    if nb > na {
                        ((self.ctx.n_critical - na) / (nb - na)).clamp(0.0, 1.0)
                    } else {
                        0.5
                    }
                }
            };
            let ln_theta = a.state.theta.ln() + f * (b.state.theta / a.state.theta).ln();
            let h = a.state.shape_factor + f * (b.state.shape_factor - a.state.shape_factor);
            let laminar = LayerState {
                theta: ln_theta.exp(),
                shape_factor: h,
                entrainment: 0.0,
                edge_velocity: ue[j],
            };
            self.switch_to_turbulent(unknowns, j, &laminar);
            unknowns.transition[j] = Some([ln_theta, f]);
        }
        if t < range.end {
            unknowns.transition[t] = None;
            let anchor = self.layer_state(unknowns, ue, t);
            let begin = self.layer_state(unknowns, ue, j);
            let (ce_begin, ce_anchor) = (unknowns.third[j], unknowns.third[t]);
            for k in j + 1..t {
                let w = (layout.s[k] - layout.s[j]) / (layout.s[t] - layout.s[j]);
                let ln_theta = begin.theta.ln() + w * (anchor.theta / begin.theta).ln();
                let h = begin.shape_factor + w * (anchor.shape_factor - begin.shape_factor);
                unknowns.regime[k] = Regime::Turbulent;
                unknowns.ln_theta[k] = ln_theta;
                unknowns.third[k] = ce_begin + w * (ce_anchor - ce_begin);
                unknowns.m[k] = h * ln_theta.exp() * ue[k].max(1e-6);
                unknowns.transition[k] = None;
            }
        } else {
            // Transition pulled up from the trailing edge: the stations behind it keep their
            // θ and mass defect (so the edge speeds, and with them the circulation, do not
            // jump) and take the entrainment of a turbulent start.
            for k in j + 1..t {
                let state = self.layer_state(unknowns, ue, k);
                self.switch_to_turbulent(unknowns, k, &state);
                unknowns.transition[k] = None;
            }
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    fn unknowns() -> Unknowns {
        Unknowns {
            ln_theta: Vec::new(),
            third: Vec::new(),
            m: Vec::new(),
            regime: Vec::new(),
            transition: Vec::new(),
            pinned: [Some((7, 1.0)), None],
        }
    }

    /// Our design (docs/method.md, "Transition moves that would cycle"): each side makes a
    /// move once per solve; a pull-up from the trailing edge is remembered among the moves but
    /// is not the side's last move (the undo rule compares with interval moves); any move
    /// releases the side's held point.
    #[test]
    fn each_move_is_made_once_per_solve() {
        let mut history = TransitionHistory::default();
        let mut u = unknowns();
        note_move(&mut history, &mut u, 0, 10, 11);
        assert!(u.pinned[0].is_none());
        assert!(history.refuses(0, 10, 11) && !history.refuses(1, 10, 11));
        assert!(!history.refuses(0, 11, 12));
        assert_eq!(history.last_move(0), Some((10, 11)));
        note_move(&mut history, &mut u, 0, OFF_TRAILING_EDGE, 9);
        assert!(history.refuses(0, OFF_TRAILING_EDGE, 9));
        assert_eq!(history.last_move(0), Some((10, 11)));
        note_move(&mut history, &mut u, 0, 12, OFF_TRAILING_EDGE);
        assert_eq!(history.last_move(0), Some((12, OFF_TRAILING_EDGE)));
    }
}
