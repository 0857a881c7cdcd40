//! How one angle is solved: the order of attempts (the Newton iteration from the inviscid
//! flow's first iterate, from the converged neighbour, from the quasi-simultaneous strategies)
//! and the first-order-wake fall-back where the full model converges nothing
//! (docs/method.md, "Sweeps and warm starts" and "Wake curvature").

use super::iteration::{
    solve_case, CoupledSolution, WarmStart, CAUTIOUS, CAUTIOUS_TURBULENT_WAKE, PRIMARY, STIFF,
};
use super::model::{coarse_settings, CaseModel, SectionModel, COARSE_START_ABOVE};
use super::newton::{CoupledProblem, NewtonState};
use super::reynolds_continuation::{continuation_wanted, reynolds_continuation};
use super::settings::ViscousSettings;
use std::sync::Arc;

/// Outer passes of the quasi-simultaneous iteration that give the coupled Newton iteration its
/// first iterate (from the inviscid flow, or from a neighbour's mass defect).
const STARTER_PASSES: usize = 20;

/// `settings` limited to the starter's passes of the quasi-simultaneous iteration.
fn starter_settings(settings: &ViscousSettings) -> ViscousSettings {
    ViscousSettings {
        max_iterations: STARTER_PASSES,
        ..settings.clone()
    }
}

/// Solve one angle. First the coupled Newton iteration from a first iterate made by a few passes
/// of the quasi-simultaneous iteration from the inviscid flow, so that the answer does not depend
/// on which other angles were asked for; then from the warm start's full iterate (the converged
/// neighbour); then from the quasi-simultaneous starter warm-started with the neighbour's mass
/// defect; last, the quasi-simultaneous iteration on its own with its strategies (cautious,
/// stiff), each finished by the Newton iteration; where all of those fail, the last attempts
/// (a held transition point, a turbulent wake start) and, below Re 2e5 or above 1e7,
/// continuation in the Reynolds number ([`reynolds_continuation`]). The first attempt that
/// converges is kept, otherwise the last one. Above [`COARSE_START_ABOVE`] panels the Newton
/// iteration from the coarse model's solution comes first ([`coarse_start`]), and the
/// warm-started starter before the neighbour's full iterate.
pub(crate) fn solve_angle(
    section: &SectionModel,
    alpha_deg: f64,
    settings: &ViscousSettings,
    warm_start: Option<&WarmStart>,
) -> Option<(Arc<CaseModel>, CoupledSolution)> {
    let case = section.case(alpha_deg, settings).ok()?;
    let coarse = section
        .coarse
        .as_deref()
        .and_then(|coarse| coarse_start(coarse, &coarse_settings(settings), &case));
    let solution = solve_case_model(&case, settings, warm_start, coarse.as_ref())?;
    Some((case, solution))
}

/// A first iterate for a finely panelled case from the same section and angle at the coarse
/// model's panel count (nested iteration, as in full multigrid: the coarse problem is cheaper,
/// and on the short trailing-edge panels of a fine one the quasi-simultaneous starter from the
/// inviscid flow often diverges; docs/method.md, "Sweeps and warm starts"): the coarse case
/// solved as a point without neighbours by [`solve_case_model`] (first the starter and the
/// Newton iteration from the inviscid flow, then its other attempts), its converged solution
/// carried over to the fine case's nodes ([`NewtonState::on_case`]). None when it does not
/// converge. It does not depend on the neighbours.
fn coarse_start(
    coarse: &SectionModel,
    coarse_settings: &ViscousSettings,
    fine: &CaseModel,
) -> Option<NewtonState> {
    let case = coarse.case(fine.alpha_deg, coarse_settings).ok()?;
    let solution = solve_case_model(&case, coarse_settings, None, None)?;
    let state = solution
        .newton_state
        .as_ref()
        .filter(|_| solution.converged)?;
    Some(state.on_case(&case, fine))
}

/// Solves one case: [`first_attempts`], then, where they leave it unconverged (or, above Re
/// 1e7, first-order only), continuation in the Reynolds number ([`continuation_wanted`]).
pub(super) fn solve_case_model(
    case: &CaseModel,
    settings: &ViscousSettings,
    warm_start: Option<&WarmStart>,
    coarse_start: Option<&NewtonState>,
) -> Option<CoupledSolution> {
    let mut best = first_attempts(case, settings, warm_start, coarse_start);
    // 5. Last of all, below Re 2e5 where nothing converged, and above 1e7 where nothing or
    // only the first-order wake did: continuation in the Reynolds number.
    if continuation_wanted(best.as_ref(), settings) {
        if let Some(solution) = reynolds_continuation(case, settings) {
            if solution.wake_curvature || best.as_ref().is_none_or(|b| !b.converged) {
                best = Some(solution);
            }
        }
    }
    best
}

/// Steps 0–4 of [`solve_case_model`]: the first converged attempt (possibly with the
/// first-order wake), else the last one.
fn first_attempts(
    case: &CaseModel,
    settings: &ViscousSettings,
    warm_start: Option<&WarmStart>,
    coarse_start: Option<&NewtonState>,
) -> Option<CoupledSolution> {
    let problem = CoupledProblem::new(case, settings);
    let mut best: Option<CoupledSolution> = None;
    let keep = |solution: CoupledSolution, best: &mut Option<CoupledSolution>| {
        let converged = solution.converged;
        if converged || best.as_ref().is_none_or(|b| !b.converged) {
            *best = Some(solution);
        }
        converged
    };
    let warm_defect = warm_start.map(|w| w.mass_defect.as_slice());
    let starter = starter_settings(settings);
    let first_order_settings = ViscousSettings {
        wake_curvature: false,
        ..settings.clone()
    };
    let first_order = CoupledProblem::new(case, &first_order_settings);
    // A quasi-simultaneous attempt, converged or not, is finished by the Newton iteration;
    // returns whether the case is done. A converged quasi-simultaneous solution the full
    // model does not converge from is itself first-order in the wake: the Newton iteration
    // with the first-order wake polishes it to the Newton tolerance where it can.
    // (The problems: the full model's, then the first-order wake's.)
    let attempt_with = |(problem, first_order): (&CoupledProblem, &CoupledProblem),
                        settings: &ViscousSettings,
                        start: Option<&[f64]>,
                        strategy,
                        best: &mut Option<CoupledSolution>| {
        // (A run made before on this section, the same in every respect, is taken as stored.)
        let wake_nodes = case.n_total() - case.n_surface;
        let run = || solve_case(case, settings, start, strategy);
        let Ok(first) =
            case.memo
                .get_or_run(case.alpha_deg, wake_nodes, settings, start, strategy, run)
        else {
            return false;
        };
        let first_state = NewtonState::from_coupled(&first);
        if let Ok(solution) = problem.solve(&first_state) {
            if keep(solution, best) {
                return true;
            }
        }
        if !first.converged {
            return keep(first, best);
        }
        if problem.models_wake_curvature() {
            if let Ok(solution) = first_order.solve(&first_state) {
                if keep(with_full_model(problem, solution), best) {
                    return true;
                }
            }
        }
        keep(first, best);
        true
    };
    let attempt = |settings: &ViscousSettings,
                   start: Option<&[f64]>,
                   strategy,
                   best: &mut Option<CoupledSolution>| {
        attempt_with((&problem, &first_order), settings, start, strategy, best)
    };
    // 0. On a fine panelling, from the coarse model's solution at this angle.
    if let Some(start) = coarse_start {
        if let Ok(solution) = problem.solve(start) {
            if keep(solution, &mut best) {
                return best;
            }
        }
    }
    // 1. From the inviscid flow: the same answer whatever the neighbours.
    if attempt(&starter, None, PRIMARY, &mut best) {
        return best;
    }
    // (On a fine panelling the starter from the neighbour's mass defect comes first: there the
    // neighbour's full iterate mostly creeps until it runs out of iterations, while the
    // starter, unstable from the inviscid flow, converges from so close a start.)
    let fine = settings.panels > COARSE_START_ABOVE && warm_defect.is_some();
    if fine && attempt(&starter, warm_defect, PRIMARY, &mut best) {
        return best;
    }
    // 2. From the converged neighbour's full iterate.
    if let Some(state) = warm_start.and_then(|w| w.state.as_ref()) {
        if let Ok(solution) = problem.solve(state) {
            if keep(solution, &mut best) {
                return best;
            }
        }
    }
    // 3. The quasi-simultaneous strategies, from the neighbour's mass defect, then from none.
    let attempts = [
        (&starter, PRIMARY),
        (settings, PRIMARY),
        (settings, CAUTIOUS),
        (settings, STIFF),
    ];
    for (index, (attempt_settings, strategy)) in attempts.into_iter().enumerate() {
        for start in [warm_defect, None] {
            // (The cold starter was attempt 1; on a fine panelling the warm one came before 2.)
            let repeat = index == 0 && (start.is_none() || fine);
            if !repeat && attempt(attempt_settings, start, strategy, &mut best) {
                return best;
            }
            if warm_defect.is_none() {
                break;
            }
        }
    }
    // 4. Only where every attempt above failed (so no row that converges before changes), with
    // a transition point past its interval's end held there once its move downstream is
    // refused: the stiff strategy, then the cautious one with a laminar side entering the wake
    // turbulent, each from the inviscid flow and from the neighbour's mass defect. (The
    // starter, the primary and the cautious strategy rescued none of the low-Reynolds-number
    // points these did: docs/validation.md, "Low Reynolds numbers".)
    if best.as_ref().is_none_or(|b| !b.converged) {
        let holding = CoupledProblem::new(case, settings).holding_points_past_refused_moves();
        let holding_first_order =
            CoupledProblem::new(case, &first_order_settings).holding_points_past_refused_moves();
        for strategy in [STIFF, CAUTIOUS_TURBULENT_WAKE] {
            for start in [None, warm_defect] {
                let problems = (&holding, &holding_first_order);
                if attempt_with(problems, settings, start, strategy, &mut best) {
                    return best;
                }
                if warm_defect.is_none() {
                    break;
                }
            }
        }
    }
    best
}

/// The solution with the first-order wake (no wake-curvature sheet), for an angle at which the
/// full model has no converged solution — typically past a fold of its solution branch, where
/// the wake is too thick for the thin-layer curvature term (docs/method.md, "Wake curvature"):
/// every attempt of [`solve_case_model`] with the sheet left out. Returns only a converged
/// solution; its row says `wake_curvature` false, like the rows of the quasi-simultaneous
/// iteration, whose wake is first-order too.
pub(crate) fn first_order_wake_solution(
    case: &CaseModel,
    settings: &ViscousSettings,
    warm_start: Option<&WarmStart>,
) -> Option<CoupledSolution> {
    if !settings.wake_curvature {
        return None;
    }
    let first_order = ViscousSettings {
        wake_curvature: false,
        ..settings.clone()
    };
    let full = CoupledProblem::new(case, settings);
    solve_case_model(case, &first_order, warm_start, None)
        .filter(|solution| solution.converged)
        .map(|solution| with_full_model(&full, solution))
}

/// The full model's solution from a converged first-order-wake one, where the Newton iteration
/// with the wake-curvature sheet converges from it (the two differ by the sheet alone, about
/// 2 % in cl, so the first-order solution is often a good enough start where the attempts from
/// the inviscid flow or the neighbour were not); otherwise the first-order solution itself.
fn with_full_model(full: &CoupledProblem, solution: CoupledSolution) -> CoupledSolution {
    if !solution.converged || !full.models_wake_curvature() {
        return solution;
    }
    match solution
        .newton_state
        .as_ref()
        .map(|state| full.solve(state))
    {
        Some(Ok(upgraded)) if upgraded.converged => upgraded,
        _ => solution,
    }
}
