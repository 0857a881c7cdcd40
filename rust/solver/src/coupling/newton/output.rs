//! Turning the Newton iterate into the coupled solution the polar row and station table are
//! built from, and into the node state that warm-starts a neighbouring angle.

use crate::boundary_layer::intervals::merged_wake_start;
use crate::boundary_layer::march::{make_station, SeparationTracker};
use crate::boundary_layer::{MarchSettings, Regime, SideSolution, Station};

use super::super::iteration::CoupledSolution;
use super::super::model::CaseModel;
use super::equations::wake_side_state;
use super::layout::Layout;
use super::{CoupledProblem, NewtonState, Unknowns};

/// The iterate as a warm start for a neighbouring angle.
pub(super) fn newton_state(layout: &Layout, unknowns: &Unknowns, case: &CaseModel) -> NewtonState {
    let ue = layout.edge_speeds(&unknowns.m);
    let mut state = NewtonState {
        sides: Default::default(),
        stagnation_node: layout.split.stagnation.node,
        node_mass_defect: layout.node_mass_defect(case, &unknowns.m),
        keeps_mass_defect: false,
    };
    for k in 0..layout.len() {
        let profile = &mut state.sides[layout.side_of(k)];
        profile.s.push(layout.s[k]);
        profile.ln_theta.push(unknowns.ln_theta[k]);
        profile
            .shape_factor
            .push(unknowns.m[k] / (ue[k].max(1e-6) * unknowns.ln_theta[k].exp()));
        profile.third.push(unknowns.third[k]);
        profile.regime.push(unknowns.regime[k]);
    }
    state
}

/// One side's stations, transition and separation events.
fn side_solution(
    problem: &CoupledProblem,
    layout: &Layout,
    unknowns: &Unknowns,
    ue: &[f64],
    range: std::ops::Range<usize>,
    trip: Option<f64>,
    converged: bool,
) -> SideSolution {
    let settings = MarchSettings::new(problem.ctx.reynolds);
    let closure = problem.ctx.closure;
    let mut transition_s = None;
    let mut transition_forced = false;
    let mut frozen = 0.0;
    let mut tracker = SeparationTracker::default();
    let mut stations: Vec<Station> = Vec::with_capacity(range.len());
    for k in range.clone() {
        let regime = unknowns.regime[k];
        if regime != Regime::Laminar && transition_s.is_none() {
            if k == range.start {
                transition_s = Some(layout.s[k]);
                transition_forced = true;
            } else if let Some([_, f]) = unknowns.transition[k] {
                let (sa, sb) = (layout.s[k - 1], layout.s[k]);
                let f = f.clamp(0.0, 1.0);
                let s_tr = sa + f * (sb - sa);
                transition_s = Some(s_tr);
                transition_forced = trip.is_some_and(|ts| ts > sa && ts <= sb);
                frozen = if transition_forced {
                    unknowns.third[k - 1]
                } else {
                    problem.ctx.n_critical
                };
            } else {
                transition_s = Some(layout.s[k]);
                transition_forced = trip.is_some();
                frozen = unknowns.third[k - 1];
            }
        }
        let state = problem.layer_state(unknowns, ue, k);
        let amplification = if regime == Regime::Laminar {
            unknowns.third[k]
        } else {
            frozen
        };
        let station = make_station(
            layout.s[k],
            &state,
            regime,
            amplification,
            &settings,
            Some(closure),
        );
        if let Some(previous) = stations.last() {
            tracker.observe(previous, &station);
        }
        stations.push(station);
    }
    tracker.finish(stations, transition_s, transition_forced, converged)
}

/// The coupled solution of the iterate.
pub(super) fn coupled_solution(
    problem: &CoupledProblem,
    layout: &Layout,
    unknowns: &Unknowns,
    converged: bool,
    iterations: usize,
    residual: f64,
) -> CoupledSolution {
    let case = problem.case;
    let ue = layout.edge_speeds(&unknowns.m);
    let side = |range, trip| side_solution(problem, layout, unknowns, &ue, range, trip, converged);
    let upper = side(layout.upper.clone(), layout.trips[0]);
    let lower = side(layout.lower.clone(), layout.trips[1]);
    let settings = MarchSettings::new(problem.ctx.reynolds);
    let [tu, tl] = layout.trailing_edges();
    let reynolds = problem.ctx.reynolds;
    let merged = merged_wake_start(
        &wake_side_state(
            reynolds,
            &problem.layer_state(unknowns, &ue, tu),
            unknowns.regime[tu],
        ),
        &wake_side_state(
            reynolds,
            &problem.layer_state(unknowns, &ue, tl),
            unknowns.regime[tl],
        ),
    );
    let amplification = upper
        .stations
        .last()
        .map_or(0.0, |s| s.amplification)
        .max(lower.stations.last().map_or(0.0, |s| s.amplification));
    let mut wake_stations = vec![make_station(
        problem.wake_origin,
        &merged,
        Regime::Wake,
        amplification,
        &settings,
        None,
    )];
    for k in layout.wake.clone() {
        let state = problem.layer_state(unknowns, &ue, k);
        wake_stations.push(make_station(
            layout.s[k],
            &state,
            Regime::Wake,
            amplification,
            &settings,
            None,
        ));
    }
    let wake = SideSolution {
        stations: wake_stations,
        transition_s: None,
        transition_forced: false,
        laminar_separation_s: None,
        turbulent_separation_s: None,
        reattachment_s: None,
        converged,
    };
    let finite = [&upper, &lower, &wake].iter().all(|s| {
        s.stations.iter().all(|st| {
            [
                st.theta,
                st.delta_star,
                st.edge_velocity,
                st.cf,
                st.shape_factor,
            ]
            .iter()
            .all(|v| v.is_finite())
        })
    });
    CoupledSolution {
        split: layout.split.clone(),
        upper,
        lower,
        wake,
        mass_defect: layout.node_mass_defect(case, &unknowns.m),
        converged: converged && finite,
        iterations,
        residual,
        newton_state: None,
        wake_curvature: problem.models_wake_curvature(),
    }
}
