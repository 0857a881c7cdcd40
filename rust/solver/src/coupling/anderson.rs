//! Anderson acceleration of the outer fixed-point iteration on the mass defect.
//!
//! The outer iteration is a fixed-point map m ↦ G(m) (march the layers with the interaction
//! law built from m, read back their mass defect). Near the trailing edge the panel method
//! couples neighbouring nodes about as strongly as each node with itself (short panels, the
//! Kutta condition tying both trailing-edge speeds), which a plain relaxed iteration resolves
//! only slowly or not at all. Anderson mixing (D. G. Anderson, J. ACM 12, 1965; in the form of
//! H. F. Walker & P. Ni, SIAM J. Numer. Anal. 49, 2011) combines the last few iterates so as to
//! minimise the linearised residual, at the cost of a small least-squares problem per pass.

/// History of iterates and map values for Anderson mixing.
pub(crate) struct AndersonMixer {
    depth: usize,
    mixing: f64,
    previous: Option<(Vec<f64>, Vec<f64>)>,
    delta_f: Vec<Vec<f64>>,
    delta_g: Vec<Vec<f64>>,
}

impl AndersonMixer {
    /// A mixer keeping `depth` differences, with mixing factor `mixing` (1: undamped).
    pub fn new(depth: usize, mixing: f64) -> Self {
        AndersonMixer {
            depth,
            mixing,
            previous: None,
            delta_f: Vec::new(),
            delta_g: Vec::new(),
        }
    }

    /// Forget the history (after a change that makes old iterates meaningless).
    pub fn reset(&mut self) {
        self.previous = None;
        self.delta_f.clear();
        self.delta_g.clear();
    }

    /// Next iterate from the current iterate `x` and its map value `g = G(x)`.
    pub fn next(&mut self, x: &[f64], g: &[f64]) -> Vec<f64> {
        let f: Vec<f64> = g.iter().zip(x).map(|(a, b)| a - b).collect();
        if let Some((f_old, g_old)) = self.previous.take() {
            self.delta_f
                .push(f.iter().zip(&f_old).map(|(a, b)| a - b).collect());
            self.delta_g
                .push(g.iter().zip(&g_old).map(|(a, b)| a - b).collect());
            if self.delta_f.len() > self.depth {
                self.delta_f.remove(0);
                self.delta_g.remove(0);
            }
        }
        self.previous = Some((f.clone(), g.to_vec()));
        let gamma = least_squares(&self.delta_f, &f);
        let beta = self.mixing;
        (0..x.len())
            .map(|i| {
                let mut fi = f[i];
                let mut gi = g[i];
                for (k, c) in gamma.iter().enumerate() {
                    fi -= c * self.delta_f[k][i];
                    gi -= c * self.delta_g[k][i];
                }
                gi - (1.0 - beta) * fi
            })
            .collect()
    }
}

/// Coefficients γ minimising |f − Σ γ_k ΔF_k| through the normal equations (a few unknowns),
/// with a small Tikhonov term so that nearly dependent differences stay harmless.
fn least_squares(columns: &[Vec<f64>], f: &[f64]) -> Vec<f64> {
    let m = columns.len();
    if m == 0 {
        return Vec::new();
    }
    let dot = |a: &[f64], b: &[f64]| a.iter().zip(b).map(|(x, y)| x * y).sum::<f64>();
    let mut a = vec![vec![0.0; m]; m];
    let mut rhs = vec![0.0; m];
    let mut scale: f64 = 0.0;
    for i in 0..m {
        for j in 0..m {
            a[i][j] = dot(&columns[i], &columns[j]);
        }
        rhs[i] = dot(&columns[i], f);
        scale = scale.max(a[i][i]);
    }
    if !(scale > 0.0 && scale.is_finite()) {
        return vec![0.0; m];
    }
    for (i, row) in a.iter_mut().enumerate() {
        row[i] += 1e-10 * scale;
    }
    // Gaussian elimination with partial pivoting (m ≤ depth, tiny).
    for col in 0..m {
        let pivot = (col..m)
            .max_by(|&p, &q| a[p][col].abs().total_cmp(&a[q][col].abs()))
            .unwrap_or(col);
        a.swap(col, pivot);
        rhs.swap(col, pivot);
        let d = a[col][col];
        if d.abs() < 1e-300 {
            return vec![0.0; m];
        }
        for row in col + 1..m {
            let factor = a[row][col] / d;
            for k in col..m {
                a[row][k] -= factor * a[col][k];
            }
            rhs[row] -= factor * rhs[col];
        }
    }
    let mut gamma = vec![0.0; m];
    for row in (0..m).rev() {
        let tail: f64 = (row + 1..m).map(|k| a[row][k] * gamma[k]).sum();
        gamma[row] = (rhs[row] - tail) / a[row][row];
    }
    if gamma.iter().all(|g| g.is_finite()) {
        gamma
    } else {
        vec![0.0; m]
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    /// A linear fixed point x = A x + b with a contraction that oscillates (eigenvalue −0.95):
    /// plain iteration needs hundreds of passes, Anderson mixing a handful (common practice,
    /// Walker & Ni 2011 §5).
    #[test]
    fn accelerates_an_oscillating_linear_fixed_point() {
        let map = |x: &[f64]| {
            vec![
                -0.95 * x[0] + 0.1 * x[1] + 1.0,
                0.2 * x[0] + 0.5 * x[1] - 2.0,
            ]
        };
        let mut mixer = AndersonMixer::new(4, 1.0);
        let mut x = vec![0.0, 0.0];
        let mut passes = 0;
        for k in 0..50 {
            let g = map(&x);
            let change = g
                .iter()
                .zip(&x)
                .map(|(a, b)| (a - b).abs())
                .fold(0.0, f64::max);
            if change < 1e-12 {
                passes = k;
                break;
            }
            x = mixer.next(&x, &g);
        }
        assert!(passes > 0 && passes < 10, "{passes}");
    }
}
