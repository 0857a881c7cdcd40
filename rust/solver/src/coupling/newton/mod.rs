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
//! Transition moves between intervals as the amplification factor of the iterate demands,
//! the stagnation point is re-located after every step, and each step is relaxed so that no
//! variable changes by more than a set fraction.

mod elimination;
mod layout;
mod output;
mod warm_start;

pub(crate) use warm_start::NewtonState;

use crate::boundary_layer::intervals::{
    laminar_interval_residual, merged_wake_start, start_residual, transition_interval_residual,
    transition_point, turbulent_interval_residual, upwinded_weight, EquationContext, StationState,
    TransitionPoint,
};
use crate::boundary_layer::lag_entrainment::{
    turbulent_start, ENTRAINMENT_RANGE, TURBULENT_SHAPE_FACTOR_RANGE, WAKE_SHAPE_FACTOR_RANGE,
};
use crate::boundary_layer::laminar_closure::FalknerSkanClosure;
use crate::boundary_layer::march::{laminar_step, EdgeCondition, StepMemory};
use crate::boundary_layer::transition::OrrSommerfeldEnvelope;
use crate::boundary_layer::{LayerState, Regime};
use crate::error::Result;

use super::iteration::CoupledSolution;
use super::model::CaseModel;
use super::settings::ViscousSettings;
use super::stagnation::{locate_stagnation, split_surface};
use elimination::{solve_step, StationLinearisation};
use layout::{Layout, Role};

/// Largest residual (any station, any equation) of a converged solution. The residuals are
/// changes of ln θ, of a shape parameter and of N or CE over one interval.
pub(crate) const NEWTON_TOLERANCE: f64 = 1e-8;
/// Residual below which transition may move to another interval: the iterate must first
/// settle with the current regimes, otherwise the move criteria (N of an unconverged iterate)
/// make transition hop back and forth.
const REGIME_MOVE_RESIDUAL: f64 = 1e-3;
/// Most stations transition moves downstream in one regime update.
const MAX_DOWNSTREAM_MOVE: usize = 40;
/// Halvings of a Newton step tried when it does not reduce the residual.
const LINE_SEARCH_HALVINGS: usize = 4;
/// Every this many iterations transition may move even when the iterate has not settled (an
/// iterate that cannot settle with transition in the wrong interval would otherwise never
/// move it).
const FORCED_REGIME_UPDATE: usize = 6;
/// ... but only from an iterate whose residual is below this.
const FORCED_MOVE_RESIDUAL: f64 = 0.1;
/// Cap on the Newton iterations of one case.
const MAX_NEWTON_ITERATIONS: usize = 40;
/// Largest change of ln θ in one step.
const MAX_LOG_THETA_STEP: f64 = 0.4;
/// Largest relative change of the mass defect and of the shape factor in one step.
const MAX_RELATIVE_STEP: f64 = 0.35;
/// Largest shape factor the residuals are evaluated at (keeps a wild first iterate, with an
/// edge speed near zero at the trailing edge, finite).
const MAX_EVALUATED_SHAPE_FACTOR: f64 = 40.0;
/// Edge speed below which a station counts as near a stagnation point for the step limits.
const NEAR_STAGNATION_SPEED: f64 = 0.3;
/// Largest change of CE in one step where CE itself is small.
const MAX_ENTRAINMENT_STEP: f64 = 0.02;
/// Lower bound of the laminar shape factor kept by the update (the closure's attached range
/// starts near 2.0 at strong acceleration).
const LAMINAR_MIN_SHAPE_FACTOR: f64 = 1.9;
/// Upper bound of the laminar shape factor (end of the reversed-flow branch of the closure).
const LAMINAR_MAX_SHAPE_FACTOR: f64 = 16.0;

/// The unknowns of every station of a layout.
#[derive(Debug, Clone)]
pub(crate) struct Unknowns {
    pub ln_theta: Vec<f64>,
    pub third: Vec<f64>,
    pub m: Vec<f64>,
    pub regime: Vec<Regime>,
}

/// Local variables of a station as the residuals see them.
#[derive(Debug, Clone, Copy)]
struct NodeVars {
    ln_theta: f64,
    third: f64,
    m: f64,
    ue: f64,
}

impl NodeVars {
    fn get(&self, v: usize) -> f64 {
        [self.ln_theta, self.third, self.m, self.ue][v]
    }
    fn set(&mut self, v: usize, value: f64) {
        match v {
            0 => self.ln_theta = value,
            1 => self.third = value,
            2 => self.m = value,
            _ => self.ue = value,
        }
    }
}

fn norm_squared(r: &[f64; 3]) -> f64 {
    r[0] * r[0] + r[1] * r[1] + r[2] * r[2]
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
        }
    }

    /// Stations a station's residuals depend on: itself first.
    fn involved(&self, layout: &Layout, k: usize) -> ([usize; 3], usize) {
        match layout.role[k] {
            // The velocity gradient at the stagnation point comes from both sides' first
            // stations (see `residual`).
            Role::Start => {
                let other = if layout.upper.start == k {
                    layout.lower.start
                } else {
                    layout.upper.start
                };
                ([k, other, k], 2)
            }
            Role::Interval => ([k, k - 1, k], 2),
            Role::WakeFirst => {
                let [u, l] = layout.trailing_edges();
                ([k, u, l], 3)
            }
        }
    }

    /// Time-integration weight of the interval into station k: backward Euler on the first
    /// interval of a side and of the wake (the start states are only approximate), the
    /// trapezoidal rule elsewhere.
    fn weight(&self, layout: &Layout, k: usize) -> f64 {
        let first = match layout.role[k] {
            Role::WakeFirst => true,
            Role::Interval => layout.role[k - 1] == Role::Start,
            Role::Start => false,
        };
        if first {
            1.0
        } else {
            0.5
        }
    }

    /// Residuals of station k for the given variables of its involved stations.
    fn residual(
        &self,
        layout: &Layout,
        unknowns: &Unknowns,
        k: usize,
        vars: &[NodeVars; 3],
    ) -> ([f64; 3], Option<TransitionPoint>) {
        let ctx = &self.ctx;
        let (involved, _) = self.involved(layout, k);
        let regime = |p: usize| unknowns.regime[involved[p]];
        let b = station_state(&vars[0], regime(0));
        let w = self.weight(layout, k);
        match layout.role[k] {
            Role::Start => {
                // Hiemenz flow: ue = K·s on both sides of the stagnation point, so
                // K = (ue_upper + ue_lower)/(s_upper + s_lower) over the two first stations,
                // whose arc-length sum does not depend on where the point lies between them.
                let other = involved[1];
                let gradient_s = layout.s[k] + layout.s[other];
                let gradient_ue = vars[0].ue.max(1e-9) + vars[1].ue.max(1e-9);
                (
                    start_residual(
                        ctx,
                        &b,
                        gradient_s,
                        gradient_ue,
                        regime(0) != Regime::Laminar,
                    ),
                    None,
                )
            }
            Role::WakeFirst => {
                let upper = station_state(&vars[1], regime(1)).state;
                let lower = station_state(&vars[2], regime(2)).state;
                let merged = merged_wake_start(&upper, &lower);
                let ds = layout.s[k] - self.wake_origin;
                let w = w.max(upwinded_weight(merged.shape_factor, b.state.shape_factor));
                (
                    turbulent_interval_residual(ctx, &merged, &b.state, ds, w, true),
                    None,
                )
            }
            Role::Interval => {
                let a = station_state(&vars[1], regime(1));
                let (sa, sb) = (layout.s[k - 1], layout.s[k]);
                let upwinded = w.max(upwinded_weight(a.state.shape_factor, b.state.shape_factor));
                match (regime(1), regime(0)) {
                    (Regime::Laminar, Regime::Laminar) => {
                        (laminar_interval_residual(ctx, &a, &b, sb - sa, upwinded), None)
                    }
                    (Regime::Laminar, _) => {
                        let trip = layout.trips[layout.side_of(k).min(1)];
                        let (r, point) =
                            transition_interval_residual(ctx, &a, &b, sa, sb, trip, w);
                        (r, Some(point))
                    }
                    (_, r) => (
                        turbulent_interval_residual(
                            ctx,
                            &a.state,
                            &b.state,
                            sb - sa,
                            upwinded,
                            r == Regime::Wake,
                        ),
                        None,
                    ),
                }
            }
        }
    }

    /// Residuals of station k and their derivatives by forward differences.
    fn linearise(
        &self,
        layout: &Layout,
        unknowns: &Unknowns,
        ue: &[f64],
        k: usize,
    ) -> (StationLinearisation, Option<TransitionPoint>) {
        let (involved, count) = self.involved(layout, k);
        let mut vars = [NodeVars {
            ln_theta: 0.0,
            third: 0.0,
            m: 0.0,
            ue: 1.0,
        }; 3];
        for p in 0..count {
            let j = involved[p];
            vars[p] = NodeVars {
                ln_theta: unknowns.ln_theta[j],
                third: unknowns.third[j],
                m: unknowns.m[j],
                ue: ue[j],
            };
        }
        let (base, point) = self.residual(layout, unknowns, k, &vars);
        let mut lin = StationLinearisation {
            involved,
            count,
            residual: base,
            ..Default::default()
        };
        for p in 0..count {
            let laminar = unknowns.regime[involved[p]] == Regime::Laminar;
            for v in 0..4 {
                let x = vars[p].get(v);
                let typical = match v {
                    0 => 1.0,
                    1 if laminar => 1.0,
                    1 => 0.01,
                    2 => 1e-6,
                    _ => 0.1,
                };
                let h = 1e-7 * x.abs().max(typical);
                let mut perturbed = vars;
                perturbed[p].set(v, x + h);
                let (r, _) = self.residual(layout, unknowns, k, &perturbed);
                for row in 0..3 {
                    let d = (r[row] - base[row]) / h;
                    match v {
                        0 | 1 => lin.d_local[p][row][v] = d,
                        2 => lin.d_mass[p][row] = d,
                        _ => lin.d_speed[p][row] = d,
                    }
                }
            }
        }
        (lin, point)
    }
}

impl CoupledProblem<'_> {
    /// Sum of squared residuals of every station (the merit function of the line search).
    fn residual_norm(&self, layout: &Layout, unknowns: &Unknowns) -> f64 {
        let ue = layout.edge_speeds(&unknowns.m);
        let mut total = 0.0;
        for k in 0..layout.len() {
            let (involved, count) = self.involved(layout, k);
            let mut vars = [NodeVars {
                ln_theta: 0.0,
                third: 0.0,
                m: 0.0,
                ue: 1.0,
            }; 3];
            for p in 0..count {
                let j = involved[p];
                vars[p] = NodeVars {
                    ln_theta: unknowns.ln_theta[j],
                    third: unknowns.third[j],
                    m: unknowns.m[j],
                    ue: ue[j],
                };
            }
            let (r, _) = self.residual(layout, unknowns, k, &vars);
            total += norm_squared(&r);
        }
        if total.is_finite() {
            total
        } else {
            f64::INFINITY
        }
    }

    /// Runs the coupled Newton iteration from `start`.
    pub(crate) fn solve(&self, start: &NewtonState) -> Result<CoupledSolution> {
        let case = self.case;
        let ns = case.n_surface;
        let m_start: Vec<f64> = (0..case.n_total())
            .map(|n| start.node_mass_defect.get(n).copied().unwrap_or(0.0))
            .collect();
        let guess_stag = start.stagnation_node.min(ns.saturating_sub(2));
        let mut layout = self.layout_for(&m_start, guess_stag)?;
        let mut unknowns = self.map_state(&layout, start);
        // The mapped mass defects move the stagnation point a little: settle the split.
        for _ in 0..3 {
            let m_full = layout.node_mass_defect(case, &unknowns.m);
            let settled = self.layout_for(&m_full, layout.split.stagnation.node)?;
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
        let mut points: Vec<Option<TransitionPoint>> = vec![None; layout.len()];
        for iteration in 1..=MAX_NEWTON_ITERATIONS.min(self.settings.max_iterations.max(1)) {
            iterations = iteration;
            let ue = layout.edge_speeds(&unknowns.m);
            let mut lins = Vec::with_capacity(layout.len());
            points = vec![None; layout.len()];
            residual = 0.0;
            let mut finite = true;
            for k in 0..layout.len() {
                let (lin, point) = self.linearise(&layout, &unknowns, &ue, k);
                for r in lin.residual {
                    finite &= r.is_finite();
                    residual = residual.max(r.abs());
                }
                points[k] = point;
                lins.push(lin);
            }
            if !finite {
                if std::env::var_os("WAKERANK_TRACE").is_some() {
                    for (k, l) in lins.iter().enumerate() {
                        if !l.residual.iter().all(|v| v.is_finite()) {
                            let st = self.layer_state(&unknowns, &ue, k);
                            eprintln!("non-finite at {k} {:?} {:?} {st:?} s {}", unknowns.regime[k], l.residual, layout.s[k]);
                        }
                    }
                }
                residual = f64::NAN;
                break;
            }
            let settled = residual < REGIME_MOVE_RESIDUAL;
            let forced = iteration % FORCED_REGIME_UPDATE == 0 && residual < FORCED_MOVE_RESIDUAL;
            let moved = (settled || forced)
                && self.update_regimes(&layout, &mut unknowns, &ue, &points, settled);
            if std::env::var_os("WAKERANK_TRACE").is_some() {
                let worst = lins
                    .iter()
                    .enumerate()
                    .max_by(|a, b| {
                        let fa = a.1.residual.iter().fold(0.0_f64, |m, v| m.max(v.abs()));
                        let fb = b.1.residual.iter().fold(0.0_f64, |m, v| m.max(v.abs()));
                        fa.total_cmp(&fb)
                    })
                    .map(|(k, l)| (k, l.residual));
                if let Some(range) = std::env::var("WAKERANK_TRACE_STATIONS").ok() {
                    let (a, b) = range.split_once('-').unwrap_or(("0", "5"));
                    let (a, b): (usize, usize) = (a.parse().unwrap_or(0), b.parse().unwrap_or(5));
                    for k in a..=b.min(layout.len() - 1) {
                        let st = self.layer_state(&unknowns, &ue, k);
                        eprintln!("   k {k} {:?} s {:.6e} ue {:.5} th {:.4e} H {:.4} c {:.4} R {:?}", unknowns.regime[k], layout.s[k], ue[k], st.theta, st.shape_factor, unknowns.third[k], lins[k].residual);
                    }
                }
                eprintln!(
                    "newton it {iteration} residual {residual:.3e} moved {moved} worst {:?} regimes {:?}",
                    worst,
                    (layout.upper.clone().find(|&k| unknowns.regime[k] != Regime::Laminar), layout.upper.end,
                     layout.lower.clone().find(|&k| unknowns.regime[k] != Regime::Laminar), layout.lower.end)
                );
            }
            if !moved && residual < NEWTON_TOLERANCE {
                converged = true;
                break;
            }
            if moved {
                continue;
            }
            let Some(step) = solve_step(&lins, &layout.influence) else {
                break;
            };
            // Backtracking on the residual's 2-norm: a step that does not reduce it is halved
            // (up to LINE_SEARCH_HALVINGS times, the last one taken regardless).
            let base_norm = lins.iter().map(|l| norm_squared(&l.residual)).sum::<f64>();
            let mut scale = 1.0;
            let mut accepted = unknowns.clone();
            for attempt in 0..=LINE_SEARCH_HALVINGS {
                let mut trial = unknowns.clone();
                self.apply_step(&layout, &mut trial, &ue, &step, scale);
                let trial_norm = self.residual_norm(&layout, &trial);
                accepted = trial;
                if trial_norm < base_norm || attempt == LINE_SEARCH_HALVINGS {
                    break;
                }
                scale *= 0.5;
            }
            unknowns = accepted;
            // Re-locate the stagnation point; a change of split re-maps the stations.
            let m_full = layout.node_mass_defect(case, &unknowns.m);
            let new_layout = self.layout_for(&m_full, layout.split.stagnation.node)?;
            if new_layout.split.upper.nodes != layout.split.upper.nodes
                || new_layout.split.lower.nodes != layout.split.lower.nodes
            {
                let state = output::newton_state(&layout, &unknowns, case);
                unknowns = self.map_state(&new_layout, &state);
            }
            layout = new_layout;
        }
        let mut solution = output::coupled_solution(
            self,
            &layout,
            &unknowns,
            &points,
            converged,
            iterations,
            residual,
        );
        solution.newton_state = Some(output::newton_state(&layout, &unknowns, case));
        Ok(solution)
    }

    /// Layout at the stagnation point of the speeds induced by the node mass defects `m_full`.
    fn layout_for(&self, m_full: &[f64], stag_guess: usize) -> Result<Layout> {
        let case = self.case;
        let ns = case.n_surface;
        let q = case.speeds(m_full, stag_guess);
        let stagnation = locate_stagnation(&q[..ns], &case.arc, &case.x[..ns], &case.y[..ns])?;
        let q = if stagnation.node == stag_guess {
            q
        } else {
            case.speeds(m_full, stagnation.node)
        };
        let stagnation = locate_stagnation(&q[..ns], &case.arc, &case.x[..ns], &case.y[..ns])?;
        let split = split_surface(stagnation, &case.arc);
        Ok(Layout::new(
            case,
            split,
            [self.settings.trip_upper, self.settings.trip_lower],
        ))
    }

    /// The unknowns of `layout` from a state (see [`NewtonState::unknowns_for`]).
    fn map_state(&self, layout: &Layout, state: &NewtonState) -> Unknowns {
        state.unknowns_for(layout, self.ctx.reynolds, |u, ue, k| {
            self.make_turbulent(u, ue, k)
        })
    }

    fn layer_state(&self, unknowns: &Unknowns, ue: &[f64], k: usize) -> LayerState {
        station_state(
            &NodeVars {
                ln_theta: unknowns.ln_theta[k],
                third: unknowns.third[k],
                m: unknowns.m[k],
                ue: ue[k],
            },
            unknowns.regime[k],
        )
        .state
    }

    /// Makes a laminar station turbulent with the start state of a transition.
    fn make_turbulent(&self, unknowns: &mut Unknowns, ue: &[f64], k: usize) {
        let state = self.layer_state(unknowns, ue, k);
        let start = turbulent_start(&state, self.ctx.reynolds);
        unknowns.regime[k] = Regime::Turbulent;
        unknowns.third[k] = start.entrainment;
        unknowns.m[k] = start.theta * start.shape_factor * ue[k].max(1e-6);
    }

    /// Moves transition by the amplification factor of the iterate: upstream to the first
    /// interval that reaches the critical N (or holds the trip); with `allow_downstream`, also
    /// downstream while the transition interval holds neither. Returns whether anything moved.
    fn update_regimes(
        &self,
        layout: &Layout,
        unknowns: &mut Unknowns,
        ue: &[f64],
        points: &[Option<TransitionPoint>],
        allow_downstream: bool,
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
            let early = (range.start..t).find(|&j| {
                if trip.is_some_and(|ts| ts <= layout.s[j] * (1.0 + 1e-12)) {
                    return true;
                }
                if j == range.start {
                    return false;
                }
                let a = StationState {
                    state: self.layer_state(unknowns, ue, j - 1),
                    amplification: unknowns.third[j - 1],
                };
                !transition_point(&self.ctx, &a, ue[j], layout.s[j - 1], layout.s[j], trip).beyond
            });
            if let Some(j) = early {
                // The stations between the new transition and the old turbulent layer start
                // between the turbulent start at j and the old first turbulent state.
                self.make_turbulent(unknowns, ue, j);
                if t < range.end {
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
                    }
                } else {
                    for k in j + 1..t {
                        self.make_turbulent(unknowns, ue, k);
                    }
                }
                moved = true;
            } else if allow_downstream && t > range.start && t < range.end {
                if points[t].is_some_and(|p| p.beyond) {
                    self.move_downstream(layout, unknowns, ue, range.clone(), t, trip);
                    moved = true;
                }
            }
        }
        moved
    }

    /// Transition interval (t − 1, t) holds no transition: the laminar layer is continued
    /// downstream by implicit laminar steps at the current edge speeds (the march's own
    /// equations with ue prescribed) until an interval reaches the critical N (or the trip), and
    /// transition is placed there. A step that has no solution (laminar separation with ue
    /// prescribed) stops the continuation.
    fn move_downstream(
        &self,
        layout: &Layout,
        unknowns: &mut Unknowns,
        ue: &[f64],
        range: std::ops::Range<usize>,
        t: usize,
        trip: Option<f64>,
    ) {
        let settings = crate::boundary_layer::MarchSettings::new(self.ctx.reynolds);
        let mut a = StationState {
            state: self.layer_state(unknowns, ue, t - 1),
            amplification: unknowns.third[t - 1],
        };
        let mut k = t;
        while k < range.end && k - t < MAX_DOWNSTREAM_MOVE {
            let ds = layout.s[k] - layout.s[k - 1];
            let edge = EdgeCondition {
                external_velocity: ue[k].max(1e-6),
                interaction_coefficient: 0.0,
            };
            let (lam, ok) = laminar_step(
                &a.state,
                ds,
                edge,
                &settings,
                self.ctx.closure,
                false,
                &mut StepMemory::default(),
            );
            if !ok || !(lam.theta.is_finite() && lam.shape_factor.is_finite()) {
                break;
            }
            let n = a.amplification + 0.5 * ds * (self.ctx.growth(&a.state) + self.ctx.growth(&lam));
            unknowns.regime[k] = Regime::Laminar;
            unknowns.third[k] = n;
            unknowns.ln_theta[k] = lam.theta.ln();
            unknowns.m[k] = lam.theta * lam.shape_factor * ue[k].max(1e-6);
            a = StationState {
                state: lam,
                amplification: n,
            };
            k += 1;
            if k >= range.end {
                break;
            }
            let point = transition_point(&self.ctx, &a, ue[k], layout.s[k - 1], layout.s[k], trip);
            if !point.beyond {
                break;
            }
        }
        if k == t {
            // Not even one step: fall back to the explicit estimate of the interval's end.
            let point = transition_point(&self.ctx, &a, ue[t], layout.s[t - 1], layout.s[t], trip);
            let lam = point.laminar;
            unknowns.regime[t] = Regime::Laminar;
            unknowns.third[t] = point.amplification_at_end;
            unknowns.ln_theta[t] = lam.theta.ln();
            unknowns.m[t] = lam.theta * lam.shape_factor * ue[t].max(1e-6);
        }
    }

    /// Applies the Newton corrections, relaxed so that ln θ changes by at most
    /// MAX_LOG_THETA_STEP and m, H and CE by at most MAX_RELATIVE_STEP of their value; then keeps
    /// every shape factor inside the range of its closure.
    fn apply_step(
        &self,
        layout: &Layout,
        unknowns: &mut Unknowns,
        ue: &[f64],
        step: &elimination::Corrections,
        scale: f64,
    ) {
        let due = layout.influence.matvec(&step.mass);
        let mut omega: f64 = scale;
        let trace = std::env::var_os("WAKERANK_TRACE").is_some();
        let mut binding = (usize::MAX, 0usize);
        let mut current = 0usize;
        let mut which = 0usize;
        let mut limit = |change: f64, allowed: f64, k: usize, w: usize| {
            if change.abs() * omega > allowed {
                omega = allowed / change.abs();
                current = k;
                which = w;
            }
        };
        for k in 0..layout.len() {
            let [dl, dc] = step.local[k];
            let dm = step.mass[k];
            let m = unknowns.m[k].max(1e-12);
            let u = ue[k].max(1e-6);
            limit(dl, MAX_LOG_THETA_STEP, k, 0);
            // Near a stagnation point m and ue are small and move with the point itself;
            // relative limits there would stall every step, so they clip those stations'
            // own corrections instead (below).
            if ue[k] > NEAR_STAGNATION_SPEED {
                limit(dm / m, MAX_RELATIVE_STEP, k, 1);
                limit(dm / m - due[k] / u - dl, MAX_RELATIVE_STEP, k, 2);
            }
            if ue[k] + due[k] <= 0.0 {
                limit(due[k] / u, 0.5, k, 3);
            }
            if unknowns.regime[k] != Regime::Laminar {
                limit(dc, (MAX_RELATIVE_STEP * unknowns.third[k].abs()).max(MAX_ENTRAINMENT_STEP), k, 4);
            }
        }
        binding = (current, which);
        if trace {
            eprintln!("  omega {omega:.3} limited by {binding:?}");
        }
        for k in 0..layout.len() {
            let [dl, dc] = step.local[k];
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
            unknowns.m[k] = (unknowns.m[k] + own * step.mass[k]).max(1e-12);
            if unknowns.regime[k] != Regime::Laminar {
                unknowns.third[k] = unknowns.third[k].clamp(ENTRAINMENT_RANGE.0, ENTRAINMENT_RANGE.1);
            }
        }
        let ue_new = layout.edge_speeds(&unknowns.m);
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
            }
        }
    }
}
