//! The angle of attack at which a section gives a target lift coefficient.

use crate::error::{Result, SolverError};
use crate::geometry::Section;

use super::model::SectionModel;
use super::settings::ViscousSettings;
use super::sweep::{polar_row, solve_with_continuation_or_first_order};
use super::ViscousRow;

/// Largest |α| searched, degrees.
const ALPHA_LIMIT_DEG: f64 = 25.0;
/// Accepted lift error.
const CL_TOLERANCE: f64 = 1.0e-4;
/// Largest step of the secant iteration, degrees (keeps warm starts close).
const MAX_STEP_DEG: f64 = 2.0;

/// Solve for the angle of attack giving `target_cl` and return that polar row.
///
/// A secant iteration on α (steps limited to 2° so every solve warm-starts from the last
/// converged one), started from the thin-airfoil slope 2π per radian through the viscous cl
/// at 0°. When the lift stops growing before the target is reached the target lies beyond the
/// section's maximum (or minimum) lift, and a `SolverError::Convergence` says so, giving the
/// extreme lift found.
pub fn solve_for_cl(
    section: &Section,
    target_cl: f64,
    settings: &ViscousSettings,
) -> Result<ViscousRow> {
    settings.validate()?;
    if !target_cl.is_finite() || target_cl.abs() > 3.0 {
        return Err(SolverError::input(format!(
            "cl = {target_cl} is outside the allowed range -3 to 3"
        )));
    }
    let model = SectionModel::new(section, settings)?;
    let slope_guess = 2.0 * std::f64::consts::PI * std::f64::consts::PI / 180.0;
    let mut alpha = 0.0_f64;
    let mut warm: Option<(f64, super::iteration::WarmStart)> = None;
    let mut previous: Option<(f64, f64)> = None;
    let direction = target_cl.signum();
    let mut extreme = f64::NAN;
    for _ in 0..40 {
        let solved = solve_with_continuation_or_first_order(&model, alpha, settings, warm.as_ref());
        let Some((case, sol)) = solved else { break };
        let row = polar_row(&case, &sol, settings);
        if !row.converged {
            break;
        }
        warm = Some((alpha, sol.warm_start()));
        let error = row.cl - target_cl;
        extreme = if extreme.is_nan() {
            row.cl
        } else if direction >= 0.0 {
            extreme.max(row.cl)
        } else {
            extreme.min(row.cl)
        };
        if error.abs() < CL_TOLERANCE {
            return Ok(row);
        }
        let slope = match previous {
            Some((a0, c0)) if (alpha - a0).abs() > 1e-9 => (row.cl - c0) / (alpha - a0),
            _ => slope_guess,
        };
        // Lift that no longer grows towards the target: beyond maximum lift.
        if previous.is_some() && slope * direction <= 0.0 && error * direction < 0.0 {
            break;
        }
        let step = if slope.abs() > 1e-6 {
            -error / slope
        } else {
            -error / slope_guess
        };
        previous = Some((alpha, row.cl));
        alpha += step.clamp(-MAX_STEP_DEG, MAX_STEP_DEG);
        if alpha.abs() > ALPHA_LIMIT_DEG {
            break;
        }
    }
    Err(SolverError::Convergence(format!(
        "cl = {target_cl} was not reached at reynolds = {:e}: the largest converged |cl| found was {:.4} \
         (the target is beyond the section's maximum lift, or the solution stopped converging)",
        settings.reynolds,
        extreme.abs()
    )))
}
