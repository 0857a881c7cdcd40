//! The angle of attack at which a section gives a target lift coefficient.

use crate::error::{Result, SolverError};
use crate::geometry::Section;

use super::continuation::AngleSolver;
use super::model::SectionModel;
use super::settings::ViscousSettings;
use super::sweep::polar_row;
use super::ViscousRow;

/// Largest |α| searched, degrees.
const ALPHA_LIMIT_DEG: f64 = 25.0;
/// Accepted lift error.
const CL_TOLERANCE: f64 = 1.0e-4;
/// Largest step of the secant iteration, degrees (keeps warm starts close).
const MAX_STEP_DEG: f64 = 2.0;
/// Shortest step over which a falling lift is taken as the sign of maximum lift, degrees.
const MIN_SLOPE_STEP_DEG: f64 = 0.25;
/// Bracket width below which a target not yet met is taken to lie in a jump of the lift,
/// degrees.
const MIN_BRACKET_DEG: f64 = 1e-3;
/// Largest jump of the lift across the target for which the row on the nearer side is
/// returned instead of an error (our choice: free transition moving by one station makes the
/// lift jump by a few 1e-4 near the leading edge; a screening row within 1e-3 of the target
/// lift serves).
const SMALL_JUMP_CL: f64 = 2e-3;

/// Solve for the angle of attack giving `target_cl` and return that polar row.
///
/// A secant iteration on α (steps limited to 2° so every solve warm-starts from the last
/// converged one), started from the thin-airfoil slope 2π per radian through the viscous cl
/// at 0°; once two converged angles bracket the target, a safeguarded secant (regula falsi
/// with bisection whenever the secant leaves the bracket or the local slope has the wrong
/// sign — free-transition lift curves are not smooth on the scale of a panel). When the lift
/// stops growing before the target is reached the target lies beyond the section's maximum
/// (or minimum) lift, and a `SolverError::Convergence` says so, giving the extreme lift found;
/// when the bracket shrinks below `MIN_BRACKET_DEG` (0.001°) without reaching the target, the lift
/// jumps across it: a jump of at most `SMALL_JUMP_CL` (0.002) gives the row on its nearer side, a
/// larger one an error that gives the two sides of the jump.
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
    // The converged (α, cl) nearest the target short of it and past it, once found, with
    // its row.
    let mut short: Option<(f64, f64, ViscousRow)> = None;
    let mut past: Option<(f64, f64, ViscousRow)> = None;
    // (One solver for the search's angles: the attempts known to fail are shared.)
    let solver = AngleSolver::new(&model, settings);
    for _ in 0..40 {
        let solved = solver.solve_or_first_order(alpha, warm.as_ref());
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
        // The new point replaces its side's end of a bracket (it lies inside); before there is
        // one, each side keeps the point nearest the target.
        let was_bracketed = short.is_some() && past.is_some();
        let side = if error * direction < 0.0 {
            &mut short
        } else {
            &mut past
        };
        if was_bracketed
            || side
                .as_ref()
                .is_none_or(|(_, cl, _)| (cl - target_cl).abs() > error.abs())
        {
            *side = Some((alpha, row.cl, row.clone()));
        }
        // (A lift that falls over a short step is the solution changing branch — free
        // transition has several self-consistent places — not maximum lift: the step after it
        // takes the thin-airfoil slope.)
        let slope = match previous {
            Some((a0, c0)) if (alpha - a0).abs() >= MIN_SLOPE_STEP_DEG => {
                (row.cl - c0) / (alpha - a0)
            }
            Some((a0, c0)) if (alpha - a0).abs() > 1e-9 && (row.cl - c0) * direction > 0.0 => {
                (row.cl - c0) / (alpha - a0)
            }
            _ => slope_guess,
        };
        let first = previous.is_none();
        previous = Some((alpha, row.cl));
        let step = if slope.abs() > 1e-6 {
            -error / slope
        } else {
            -error / slope_guess
        };
        let secant = alpha + step.clamp(-MAX_STEP_DEG, MAX_STEP_DEG);
        if let (Some(s), Some(p)) = (&short, &past) {
            let (lo, hi) = (s.0.min(p.0), s.0.max(p.0));
            if hi - lo < MIN_BRACKET_DEG && (p.1 - s.1).abs() <= SMALL_JUMP_CL {
                let nearer = if (s.1 - target_cl).abs() <= (p.1 - target_cl).abs() {
                    s
                } else {
                    p
                };
                return Ok(nearer.2.clone());
            }
            if hi - lo < MIN_BRACKET_DEG {
                return Err(SolverError::Convergence(format!(
                    "cl = {target_cl} was not reached at reynolds = {:e}: the lift jumps across \
                     it between alpha_deg = {:.4} (cl {:.4}) and {:.4} (cl {:.4}), so no angle \
                     gives that lift (free transition changing place, or the flow changing \
                     regime, there); analyze those two angles for the nearest rows",
                    settings.reynolds, s.0, s.1, p.0, p.1
                )));
            }
            // Within the bracket: the secant where it stays well inside and the local slope
            // has the right sign, else regula falsi, else bisection.
            let inside = |a: f64| a > lo + 0.05 * (hi - lo) && a < hi - 0.05 * (hi - lo);
            let chord = s.0 + (target_cl - s.1) * (p.0 - s.0) / (p.1 - s.1);
            alpha = if slope * direction > 0.0 && inside(secant) {
                secant
            } else if inside(chord) {
                chord
            } else {
                0.5 * (lo + hi)
            };
            continue;
        }
        // Lift that no longer grows towards the target: beyond maximum lift.
        if !first && slope * direction <= 0.0 && error * direction < 0.0 {
            break;
        }
        alpha = secant;
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
