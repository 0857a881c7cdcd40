//! Continuation in the Reynolds number for points no attempt from the inviscid flow or a
//! neighbour converges (docs/method.md, "Sweeps and warm starts").

use super::attempts::solve_case_model;
use super::iteration::CoupledSolution;
use super::model::CaseModel;
use super::newton::CoupledProblem;
use super::settings::ViscousSettings;

/// Below this Reynolds number the continuation starts from it (our choice: from there up, the
/// low-Reynolds-number set of docs/validation.md converges from the inviscid flow).
const LOW_START_REYNOLDS: f64 = 2e5;
/// Above this Reynolds number the continuation starts from it (our choice: up to there the
/// benchmark sections converge with the full model from the inviscid flow; docs/validation.md,
/// "Robustness").
const HIGH_START_REYNOLDS: f64 = 1e7;
/// Largest ratio of successive Reynolds numbers of a continuation (our choice).
const CONTINUATION_RATIO: f64 = 1.5;
/// Successive halvings of a continuation step (in ln Re) tried after a failed one.
const CONTINUATION_HALVINGS: usize = 3;
/// Most Newton solves of one continuation (a bound on its cost).
const CONTINUATION_SOLVES: usize = 16;

/// The Reynolds number a continuation to `target` starts from, if the target lies outside
/// [LOW_START_REYNOLDS, HIGH_START_REYNOLDS].
fn start_reynolds(target: f64) -> Option<f64> {
    if target < LOW_START_REYNOLDS {
        Some(LOW_START_REYNOLDS)
    } else if target > HIGH_START_REYNOLDS {
        Some(HIGH_START_REYNOLDS)
    } else {
        None
    }
}

/// Whether a point whose attempts gave `best` is worth a continuation in the Reynolds number:
/// outside [LOW_START_REYNOLDS, HIGH_START_REYNOLDS] when nothing converged, and above
/// HIGH_START_REYNOLDS also when only the first-order wake did (there the full model's
/// solution is usually reached: NACA 0012, 2412, 4415 at Re 3e7 and 1e8, α −4°…8°, 15 of 42
/// points first-order before, none after). Below LOW_START_REYNOLDS a first-order point is
/// left as it is: the continuation's full-model solution there changes the warm starts of the
/// sweep's next angles, and in the low-Reynolds-number set of docs/validation.md it gained no
/// point and lost one (NACA 0012, Re 1e5, 4°; our measurement).
pub(super) fn continuation_wanted(
    best: Option<&CoupledSolution>,
    settings: &ViscousSettings,
) -> bool {
    let Some(_) = start_reynolds(settings.reynolds) else {
        return false;
    };
    match best {
        None => true,
        Some(b) if !b.converged => true,
        Some(b) => {
            settings.wake_curvature && !b.wake_curvature && settings.reynolds > HIGH_START_REYNOLDS
        }
    }
}

/// A case at a Reynolds number below [`LOW_START_REYNOLDS`] or above [`HIGH_START_REYNOLDS`]
/// solved by continuation in the Reynolds number (natural-parameter continuation, as in
/// Allgower & Georg, *Numerical Continuation Methods*, 1990, ch. 1): the same case (the wake,
/// the influence matrix and the inviscid speeds do not depend on Re) first solved at that
/// bound by the attempts of `solve_case_model` from the inviscid flow, then on to the target
/// in steps of at most [`CONTINUATION_RATIO`], each Newton iteration started from the solution
/// of the step before; a failed step is halved (in ln Re) up to [`CONTINUATION_HALVINGS`] times
/// in a row, and at most [`CONTINUATION_SOLVES`] steps are made. At low Reynolds numbers the
/// laminar separation grows long and the quasi-simultaneous starter from the inviscid flow
/// diverges; at very high ones the layers are so thin that the starter's first iterate is far
/// from the full model's solution (docs/validation.md); the solution itself changes smoothly
/// with Re, down to where a branch ends (a bubble that no longer reattaches). Depends on
/// nothing but the case and the settings; None when the chain breaks.
pub(super) fn reynolds_continuation(
    case: &CaseModel,
    settings: &ViscousSettings,
) -> Option<CoupledSolution> {
    let target = settings.reynolds;
    let start_at = start_reynolds(target)?;
    let at = |reynolds: f64| ViscousSettings {
        reynolds,
        ..settings.clone()
    };
    let mut solution = solve_case_model(case, &at(start_at), None, None).filter(|s| s.converged)?;
    // Position along ln Re from the start (0) to the target (1).
    let (ln_start, ln_target) = (start_at.ln(), target.ln());
    let full_step = 1.0 / ((ln_start - ln_target).abs() / CONTINUATION_RATIO.ln()).ceil();
    let (mut position, mut step, mut halvings) = (0.0f64, full_step, 0);
    for _ in 0..CONTINUATION_SOLVES {
        if position >= 1.0 {
            return Some(solution);
        }
        let next = (position + step).min(1.0);
        let rung = if next >= 1.0 {
            settings.clone()
        } else {
            at((ln_start + next * (ln_target - ln_start)).exp())
        };
        let from = solution.newton_state.as_ref()?;
        match CoupledProblem::new(case, &rung).solve(from) {
            Ok(s) if s.converged => {
                solution = s;
                position = next;
                step = (2.0 * step).min(full_step);
                halvings = 0;
            }
            _ if halvings < CONTINUATION_HALVINGS => {
                halvings += 1;
                step *= 0.5;
            }
            _ => return None,
        }
    }
    (position >= 1.0).then_some(solution)
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn continuation_runs_only_outside_the_middle_range() {
        assert_eq!(start_reynolds(5e4), Some(LOW_START_REYNOLDS));
        assert_eq!(start_reynolds(2e5), None);
        assert_eq!(start_reynolds(1e6), None);
        assert_eq!(start_reynolds(1e7), None);
        assert_eq!(start_reynolds(1e8), Some(HIGH_START_REYNOLDS));
    }
}
