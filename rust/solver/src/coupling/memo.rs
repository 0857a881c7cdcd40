//! The results of the quasi-simultaneous iteration already computed for a section, so that an
//! attempt that repeats one (the same angle, start, strategy and settings) takes it instead of
//! running it again.
//!
//! An angle that fails is attempted again and again — from other warm starts, through the
//! continuation in α, by the repair pass, with the first-order wake — and each time its attempts
//! from the inviscid flow run the same passes; the first-order-wake pass runs every one of its
//! quasi-simultaneous iterations a second time (that iteration's wake is first-order in either
//! model: only the Newton iteration that finishes it differs). The iteration is a deterministic
//! function of the key below, so taking the stored result changes nothing but the time.

use std::sync::Mutex;

use crate::error::Result;

use super::iteration::{CoupledSolution, Strategy};
use super::settings::ViscousSettings;

/// Most results kept per section (some 25 kB each at 160 panels, 50 kB at 320: the marched
/// stations of both sides and the wake, and the mass defect): a bound of a few tens of
/// megabytes on what a long run of failing angles can take; past it results are computed and
/// not kept. (A sweep whose angles all converge keeps one or two per angle.)
const MAX_ENTRIES: usize = 1_000;

/// What a run of the quasi-simultaneous iteration depends on besides the section: the angle,
/// the warm start's mass defect, the strategy and the settings it reads.
#[derive(Debug, Clone, PartialEq)]
struct RunKey {
    alpha_bits: u64,
    wake_nodes: usize,
    start: Option<Vec<u64>>,
    strategy: Strategy,
    reynolds_bits: u64,
    n_critical_bits: u64,
    trips: [Option<u64>; 2],
    max_iterations: usize,
    tolerance_bits: u64,
}

impl RunKey {
    fn new(
        alpha_deg: f64,
        wake_nodes: usize,
        settings: &ViscousSettings,
        start: Option<&[f64]>,
        strategy: Strategy,
    ) -> Self {
        RunKey {
            alpha_bits: alpha_deg.to_bits(),
            wake_nodes,
            start: start.map(|m| m.iter().map(|v| v.to_bits()).collect()),
            strategy,
            reynolds_bits: settings.reynolds.to_bits(),
            n_critical_bits: settings.effective_n_critical().to_bits(),
            trips: [
                settings.trip_upper.map(f64::to_bits),
                settings.trip_lower.map(f64::to_bits),
            ],
            max_iterations: settings.max_iterations,
            tolerance_bits: settings.tolerance.to_bits(),
        }
    }
}

/// Quasi-simultaneous results of one section, shared by its cases.
#[derive(Default)]
pub(crate) struct QuasiSimultaneousMemo(Mutex<Vec<(RunKey, Result<CoupledSolution>)>>);

impl QuasiSimultaneousMemo {
    /// The result stored for this run, or `run`'s (then stored).
    pub(crate) fn get_or_run(
        &self,
        alpha_deg: f64,
        wake_nodes: usize,
        settings: &ViscousSettings,
        start: Option<&[f64]>,
        strategy: Strategy,
        run: impl FnOnce() -> Result<CoupledSolution>,
    ) -> Result<CoupledSolution> {
        let key = RunKey::new(alpha_deg, wake_nodes, settings, start, strategy);
        let stored = self
            .0
            .lock()
            .ok()
            .and_then(|runs| runs.iter().find(|(k, _)| *k == key).map(|(_, r)| r.clone()));
        if let Some(result) = stored {
            return result;
        }
        let result = run();
        if let Ok(mut runs) = self.0.lock() {
            if runs.len() < MAX_ENTRIES && !runs.iter().any(|(k, _)| *k == key) {
                runs.push((key, result.clone()));
            }
        }
        result
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::coupling::iteration::PRIMARY;
    use crate::error::SolverError;

    /// A stored run is taken only for the same angle, start, strategy and settings (our
    /// design: the memo may change the time, never the answer).
    #[test]
    fn a_run_is_reused_only_for_the_same_inputs() {
        let memo = QuasiSimultaneousMemo::default();
        let settings = ViscousSettings::new(1e6);
        let runs = std::cell::Cell::new(0);
        let run = || {
            runs.set(runs.get() + 1);
            Err(SolverError::Convergence(format!("run {}", runs.get())))
        };
        let start = [0.1, 0.2];
        let first = memo.get_or_run(2.0, 40, &settings, Some(&start), PRIMARY, run);
        let again = memo.get_or_run(2.0, 40, &settings, Some(&start), PRIMARY, run);
        assert_eq!(runs.get(), 1);
        assert_eq!(first.err(), again.err());
        let other_re = ViscousSettings::new(2e6);
        let _ = memo.get_or_run(2.0, 40, &other_re, Some(&start), PRIMARY, run);
        let _ = memo.get_or_run(2.0, 40, &settings, None, PRIMARY, run);
        let _ = memo.get_or_run(2.5, 40, &settings, Some(&start), PRIMARY, run);
        let _ = memo.get_or_run(2.0, 40, &settings, Some(&[0.1, 0.3]), PRIMARY, run);
        assert_eq!(runs.get(), 5);
    }
}
