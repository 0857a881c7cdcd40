//! Continuation in α: an angle whose warm start from a converged neighbour fails is approached
//! through intermediate angles, each warm-started from the last one reached (docs/method.md,
//! "Sweeps and warm starts"); and the record of the attempts known to fail, so that no
//! continuation solves again what already failed.
//!
//! Every attempt is a deterministic function of its angle and its warm start (and of the
//! section and settings, fixed for a sweep), so an attempt that failed once fails again: the
//! record only saves the time. Past the maximum lift, where a sweep's last angles all fail,
//! each angle's continuation passed through the intermediate angles of the one before (from
//! the same last converged neighbour): NACA 2412 at Re 1e6, 17°–20°, repeated four of its
//! twelve intermediate attempts.

use std::cell::RefCell;
use std::sync::Arc;

use super::attempts::{first_order_wake_solution, solve_angle};
use super::iteration::{CoupledSolution, WarmStart};
use super::model::{CaseModel, SectionModel};
use super::newton::CoupledProblem;
use super::settings::ViscousSettings;

/// Smallest angle step worth subdividing when a warm start fails, degrees.
const MIN_CONTINUATION_STEP_DEG: f64 = 0.2;
/// Levels of step halving tried after a failed warm start.
const CONTINUATION_LEVELS: usize = 2;

/// Result of one attempt at one angle.
pub(crate) type Attempt = Option<(Arc<CaseModel>, CoupledSolution)>;

/// The (angle, warm start) pairs from which one kind of attempt did not converge.
#[derive(Default)]
pub(crate) struct KnownFailures(RefCell<Vec<(u64, WarmStart)>>);

impl KnownFailures {
    /// Whether the attempt at `alpha_deg` from `start` is known to fail (the same angle to the
    /// bit and an equal warm start).
    fn contains(&self, alpha_deg: f64, start: &WarmStart) -> bool {
        let bits = alpha_deg.to_bits();
        self.0
            .borrow()
            .iter()
            .any(|(a, s)| *a == bits && s == start)
    }

    /// Records that the attempt at `alpha_deg` from `start` did not converge.
    fn insert(&self, alpha_deg: f64, start: &WarmStart) {
        if !self.contains(alpha_deg, start) {
            self.0
                .borrow_mut()
                .push((alpha_deg.to_bits(), start.clone()));
        }
    }
}

/// The known failures of a sweep (or of one single-angle analysis), one record per kind of
/// attempt.
#[derive(Default)]
struct SweepFailures {
    /// [`solve_angle`] from a warm start.
    angle: KnownFailures,
    /// The Newton iteration from the warm start's iterate only.
    warm_newton: KnownFailures,
    /// The first-order-wake solution from a warm start.
    first_order: KnownFailures,
}

/// How a sweep (or a single-angle analysis) solves its angles: the section, the settings and
/// the record of the attempts known to fail, with the continuation in α of every attempt.
pub(crate) struct AngleSolver<'a> {
    model: &'a SectionModel,
    settings: &'a ViscousSettings,
    failures: SweepFailures,
}

/// `attempt` at `alpha_deg` from `warm` = (angle, start), then, when that fails and there is a
/// warm start, the continuation of [`continuation`] with the same attempt.
fn attempt_with_continuation(
    alpha_deg: f64,
    warm: Option<&(f64, WarmStart)>,
    failures: &KnownFailures,
    attempt: impl Fn(f64, Option<&WarmStart>) -> Attempt,
) -> Attempt {
    let first = attempt(alpha_deg, warm.map(|w| &w.1));
    match warm {
        Some(w) => continuation(alpha_deg, w.clone(), first, failures, |a, start| {
            attempt(a, Some(start))
        }),
        None => first,
    }
}

impl<'a> AngleSolver<'a> {
    /// The solver of `model`'s angles under `settings`, with no failure known yet.
    pub(crate) fn new(model: &'a SectionModel, settings: &'a ViscousSettings) -> Self {
        AngleSolver {
            model,
            settings,
            failures: SweepFailures::default(),
        }
    }

    /// The settings.
    pub(crate) fn settings(&self) -> &'a ViscousSettings {
        self.settings
    }

    /// Solve `alpha_deg` from the converged neighbour `warm` = (angle, mass defect); when that
    /// fails, approach it through intermediate angles (the step halved, up to two levels), each
    /// warm-started from the last converged one: continuation in α.
    pub(crate) fn solve(&self, alpha_deg: f64, warm: Option<&(f64, WarmStart)>) -> Attempt {
        let (model, settings) = (self.model, self.settings);
        attempt_with_continuation(alpha_deg, warm, &self.failures.angle, |a, start| {
            solve_angle(model, a, settings, start)
        })
    }

    /// The first-order-wake solution at `alpha_deg` ([`first_order_wake_solution`]) from
    /// `warm` = (angle, state), with the continuation in α of [`continuation`]; only a
    /// converged one.
    pub(crate) fn first_order(&self, alpha_deg: f64, warm: Option<&(f64, WarmStart)>) -> Attempt {
        let (model, settings) = (self.model, self.settings);
        attempt_with_continuation(alpha_deg, warm, &self.failures.first_order, |a, start| {
            let case = model.case(a, settings).ok()?;
            let solution = first_order_wake_solution(&case, settings, start)?;
            Some((case, solution))
        })
        .filter(|(_, s)| s.converged)
    }

    /// [`Self::solve`], and where that converges nothing, the first-order-wake solution from
    /// the same warm start: for the single-angle entries (stations, target cl) the same
    /// attempts, continuation and last resort a sweep has.
    pub(crate) fn solve_or_first_order(
        &self,
        alpha_deg: f64,
        warm: Option<&(f64, WarmStart)>,
    ) -> Attempt {
        let solved = self.solve(alpha_deg, warm);
        if solved.as_ref().is_some_and(|(_, s)| s.converged) {
            return solved;
        }
        self.first_order(alpha_deg, warm).or(solved)
    }

    /// The Newton iteration at `alpha_deg` from the iterate `warm` = (angle, state) only, with
    /// the continuation of [`continuation`].
    pub(crate) fn warm_newton(&self, alpha_deg: f64, warm: (f64, WarmStart)) -> Attempt {
        let (model, settings) = (self.model, self.settings);
        attempt_with_continuation(
            alpha_deg,
            Some(&warm),
            &self.failures.warm_newton,
            |a, start| {
                let case = model.case(a, settings).ok()?;
                let solution = CoupledProblem::new(&case, settings)
                    .solve(start?.state.as_ref()?)
                    .ok()?;
                Some((case, solution))
            },
        )
    }

    /// The last converged of the angles 0°, … (steps of at most `APPROACH_STEP_DEG`) short
    /// of `alpha_deg`, each warm-started from the one before: the warm start (angle, state)
    /// with which an angle far from 0° is solved as a sweep from 0° would reach it. None when
    /// none converges or `alpha_deg` is within one step of 0°.
    pub(crate) fn approach_from_zero(&self, alpha_deg: f64) -> Option<(f64, WarmStart)> {
        let steps = (alpha_deg.abs() / APPROACH_STEP_DEG).ceil() as usize;
        let mut warm: Option<(f64, WarmStart)> = None;
        for k in 0..steps {
            let a = alpha_deg * k as f64 / steps as f64;
            let start = warm.as_ref().map(|w| &w.1);
            if let Some((_, s)) = solve_angle(self.model, a, self.settings, start) {
                if s.converged {
                    warm = Some((a, s.warm_start()));
                }
            }
        }
        warm
    }
}

/// Continuation in α after the attempt `first` at `alpha_deg` from `warm` = (angle, start):
/// when `first` did not converge, the step from the warm angle is halved (up to two levels)
/// and the intermediate angles solved by `attempt`, each from the last converged one, then the
/// target again. `first` is returned when that does not converge either. Attempts recorded in
/// `failures` are not made again (they would fail again), and every failed one is recorded.
fn continuation(
    alpha_deg: f64,
    warm: (f64, WarmStart),
    first: Attempt,
    failures: &KnownFailures,
    attempt: impl Fn(f64, &WarmStart) -> Attempt,
) -> Attempt {
    if first.as_ref().is_some_and(|(_, s)| s.converged) {
        return first;
    }
    failures.insert(alpha_deg, &warm.1);
    // The attempt at `a` from `start`, unless known to fail; a failure is recorded.
    let converged_attempt = |a: f64, start: &WarmStart| -> Attempt {
        if failures.contains(a, start) {
            return None;
        }
        let result = attempt(a, start).filter(|(_, s)| s.converged);
        if result.is_none() {
            failures.insert(a, start);
        }
        result
    };
    let mut start = warm;
    for level in 1..=CONTINUATION_LEVELS {
        let step = (alpha_deg - start.0) / (1 << level) as f64;
        if step.abs() < MIN_CONTINUATION_STEP_DEG {
            break;
        }
        let mut reached = true;
        for k in 1..(1 << level) {
            let a = start.0 + step * k as f64;
            match converged_attempt(a, &start.1) {
                Some((_, s)) => start = (a, s.warm_start()),
                None => {
                    reached = false;
                    break;
                }
            }
        }
        if reached {
            if let Some(again) = converged_attempt(alpha_deg, &start.1) {
                return Some(again);
            }
        }
    }
    first
}

/// Largest step between the intermediate angles by which an angle away from 0° is approached
/// from 0° (degrees).
const APPROACH_STEP_DEG: f64 = 2.0;

#[cfg(test)]
mod tests {
    use super::*;

    /// The record answers for the same angle to the bit and an equal warm start only.
    #[test]
    fn known_failures_match_angle_and_start_exactly() {
        let start = |v: f64| WarmStart {
            mass_defect: vec![v, 2.0 * v],
            state: None,
        };
        let failures = KnownFailures::default();
        failures.insert(17.0, &start(1.0));
        assert!(failures.contains(17.0, &start(1.0)));
        assert!(!failures.contains(17.0 + 1e-12, &start(1.0)));
        assert!(!failures.contains(17.0, &start(1.5)));
        failures.insert(17.0, &start(1.0));
        assert_eq!(failures.0.borrow().len(), 1);
    }
}
