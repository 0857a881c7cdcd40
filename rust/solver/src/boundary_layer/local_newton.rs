//! Small dense Newton iteration with a numerical Jacobian, step limiting and a feasible box.
//!
//! Each station of a march solves 3 or 4 nonlinear equations; a forward-difference Jacobian is
//! cheap at that size. The step is scaled down uniformly so that no variable moves more than its
//! limit, the iterate is kept inside a box (θ > 0, bounded H, ...) and a few halvings backtrack
//! when the residual grows. Never produces a non-finite iterate.

/// Options of one Newton solve.
#[derive(Debug, Clone, Copy)]
pub(crate) struct NewtonOptions<const N: usize> {
    pub max_iterations: usize,
    /// Convergence when the largest residual is below this.
    pub tolerance: f64,
    pub lower: [f64; N],
    pub upper: [f64; N],
    /// Largest change of each variable in one step.
    pub max_step: [f64; N],
    /// Typical magnitude of each variable (sets the finite-difference step).
    pub typical: [f64; N],
}

/// Result of a Newton solve: the last (best) iterate and whether it converged.
#[derive(Debug, Clone, Copy)]
pub(crate) struct NewtonOutcome<const N: usize> {
    pub x: [f64; N],
    pub converged: bool,
}

fn max_abs<const N: usize>(r: &[f64; N]) -> f64 {
    r.iter().fold(0.0_f64, |m, v| {
        if v.is_finite() {
            m.max(v.abs())
        } else {
            f64::INFINITY
        }
    })
}

/// Solves J·dx = −r by Gaussian elimination with partial pivoting; None when singular.
fn solve_linear<const N: usize>(mut a: [[f64; N]; N], mut b: [f64; N]) -> Option<[f64; N]> {
    for col in 0..N {
        let pivot = (col..N).max_by(|&i, &j| a[i][col].abs().total_cmp(&a[j][col].abs()))?;
        if a[pivot][col].abs() <= 1e-300 || a[pivot][col].is_nan() {
            return None;
        }
        a.swap(col, pivot);
        b.swap(col, pivot);
        for row in col + 1..N {
            let factor = a[row][col] / a[col][col];
            for k in col..N {
                a[row][k] -= factor * a[col][k];
            }
            b[row] -= factor * b[col];
        }
    }
    let mut x = [0.0; N];
    for row in (0..N).rev() {
        let mut sum = b[row];
        for k in row + 1..N {
            sum -= a[row][k] * x[k];
        }
        x[row] = sum / a[row][row];
    }
    x.iter().all(|v| v.is_finite()).then_some(x)
}

/// Runs Newton's method from `x0` on `residual`.
///
/// Modified Newton: the Jacobian — handed in through `jacobian`, or computed by forward
/// differences — is kept while it reduces the residual fast enough (by 4× per step) and
/// refreshed otherwise; only a fresh Jacobian's step backtracks. On success the last Jacobian
/// is handed back.
pub(crate) fn solve<const N: usize>(
    x0: [f64; N],
    residual: impl Fn(&[f64; N]) -> [f64; N],
    options: &NewtonOptions<N>,
    jacobian: &mut Option<[[f64; N]; N]>,
) -> NewtonOutcome<N> {
    let clamp = |x: &mut [f64; N]| {
        for j in 0..N {
            x[j] = x[j].clamp(options.lower[j], options.upper[j]);
        }
    };
    let mut x = x0;
    clamp(&mut x);
    let mut r = residual(&x);
    let mut norm = max_abs(&r);
    for _ in 0..options.max_iterations {
        if norm < options.tolerance {
            return NewtonOutcome { x, converged: true };
        }
        if !norm.is_finite() {
            break;
        }
        let fresh = jacobian.is_none();
        let matrix = *jacobian.get_or_insert_with(|| {
            let mut m = [[0.0; N]; N];
            for j in 0..N {
                let mut xp = x;
                let h = 1e-7 * x[j].abs().max(options.typical[j]);
                xp[j] += h;
                let rp = residual(&xp);
                for i in 0..N {
                    m[i][j] = (rp[i] - r[i]) / h;
                }
            }
            m
        });
        let Some(mut dx) = solve_linear(matrix, r.map(|v| -v)) else {
            *jacobian = None;
            if fresh {
                break;
            }
            continue;
        };
        let mut scale: f64 = 1.0;
        for j in 0..N {
            if dx[j].abs() > options.max_step[j] {
                scale = scale.min(options.max_step[j] / dx[j].abs());
            }
        }
        dx.iter_mut().for_each(|d| *d *= scale);
        let mut accepted = false;
        let mut factor = 1.0;
        for _ in 0..if fresh { 8 } else { 1 } {
            let mut trial = x;
            for j in 0..N {
                trial[j] += factor * dx[j];
            }
            clamp(&mut trial);
            let rt = residual(&trial);
            let nt = max_abs(&rt);
            if nt.is_finite() && (nt < norm || (fresh && factor < 0.02)) {
                if nt > 0.25 * norm {
                    *jacobian = None;
                }
                x = trial;
                r = rt;
                norm = nt;
                accepted = true;
                break;
            }
            factor *= 0.5;
        }
        if !accepted {
            *jacobian = None;
            if fresh {
                break;
            }
        }
    }
    let converged = norm < options.tolerance;
    if !converged {
        *jacobian = None;
    }
    NewtonOutcome { x, converged }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn solves_a_small_nonlinear_system() {
        let options = NewtonOptions {
            max_iterations: 30,
            tolerance: 1e-12,
            lower: [-10.0, -10.0],
            upper: [10.0, 10.0],
            max_step: [1.0, 1.0],
            typical: [1.0, 1.0],
        };
        let out = solve(
            [0.5, 0.5],
            |x| [x[0] * x[0] + x[1] * x[1] - 4.0, x[0] - x[1]],
            &options,
            &mut None,
        );
        assert!(out.converged);
        assert!((out.x[0] - 2f64.sqrt()).abs() < 1e-9);
    }

    #[test]
    fn singular_system_reports_failure_without_nan() {
        let options = NewtonOptions {
            max_iterations: 10,
            tolerance: 1e-12,
            lower: [-1.0],
            upper: [1.0],
            max_step: [0.5],
            typical: [1.0],
        };
        let out = solve([0.3], |x| [x[0] * x[0] + 1.0], &options, &mut None);
        assert!(!out.converged);
        assert!(out.x[0].is_finite());
    }
}
