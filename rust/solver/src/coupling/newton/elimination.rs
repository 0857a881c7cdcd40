//! The linear system of one coupled Newton step, reduced to the mass defects and solved.
//!
//! Every station k has three residuals R_k and three unknowns: two local ones
//! z_k = (ln θ_k, third variable) and its mass defect m_k. A station's residuals depend on its
//! own z and m, on those of the station(s) it starts from, and on edge speeds, which depend on
//! every mass defect through the panel method's influence matrix, ue = ue_inv + D·m. The
//! linearised system
//!   E_k δz_k + Σ_p E_p δz_p + F_k δm = −R_k
//! is lower block-triangular in z (stations are ordered so that predecessors come first) and
//! dense in m. Eliminating z station by station leaves one equation per station in δm
//! alone — the component of the station's equations orthogonal to the columns of E_k — and
//! expresses δz_k as an affine function of δm (block elimination with a dense coupling column,
//! as in the global Newton solution of Drela & Giles, AIAA J. 25, 1987). The reduced dense
//! system is solved by LU with partial pivoting, then δz follows by back-substitution.

use crate::linalg::{DenseMatrix, LuFactors};

/// The linearisation of one station's three residuals.
#[derive(Debug, Clone, Default)]
pub(crate) struct StationLinearisation {
    /// Station indices the residuals depend on: itself first, then its predecessors.
    pub involved: [usize; 3],
    /// How many entries of `involved` are used (1 to 3).
    pub count: usize,
    /// Residuals at the current iterate.
    pub residual: [f64; 3],
    /// ∂R/∂z of each involved station, row-major 3 × 2.
    pub d_local: [[[f64; 2]; 3]; 3],
    /// ∂R/∂m of each involved station at fixed edge speed.
    pub d_mass: [[f64; 3]; 3],
    /// ∂R/∂ue of each involved station.
    pub d_speed: [[f64; 3]; 3],
}

/// Newton corrections: δz per station and δm per station.
pub(crate) struct Corrections {
    pub local: Vec<[f64; 2]>,
    pub mass: Vec<f64>,
}

fn cross(a: [f64; 3], b: [f64; 3]) -> [f64; 3] {
    [
        a[1] * b[2] - a[2] * b[1],
        a[2] * b[0] - a[0] * b[2],
        a[0] * b[1] - a[1] * b[0],
    ]
}

fn norm(a: [f64; 3]) -> f64 {
    (a[0] * a[0] + a[1] * a[1] + a[2] * a[2]).sqrt()
}

/// Solves the linearised coupled system; `influence[k][l]` = ∂ue_k/∂m_l. None when a station's
/// local Jacobian or the reduced system is singular.
pub(crate) fn solve_step(
    stations: &[StationLinearisation],
    influence: &DenseMatrix,
) -> Option<Corrections> {
    let k_total = stations.len();
    let mut gain = vec![0.0; k_total * 2 * k_total];
    let mut offset = vec![[0.0; 2]; k_total];
    let mut reduced = DenseMatrix::zeros(k_total, k_total);
    let mut reduced_rhs = vec![0.0; k_total];
    let mut coupling = vec![0.0; 3 * k_total];
    for (k, lin) in stations.iter().enumerate() {
        coupling.iter_mut().for_each(|v| *v = 0.0);
        let mut rhs = lin.residual.map(|v| -v);
        for p in 0..lin.count {
            let j = lin.involved[p];
            for r in 0..3 {
                let row = &mut coupling[r * k_total..(r + 1) * k_total];
                row[j] += lin.d_mass[p][r];
                let ds = lin.d_speed[p][r];
                if ds != 0.0 {
                    for (v, d) in row.iter_mut().zip(influence.row(j)) {
                        *v += ds * d;
                    }
                }
                if p >= 1 {
                    for c in 0..2 {
                        let e = lin.d_local[p][r][c];
                        if e == 0.0 {
                            continue;
                        }
                        let g = &gain[(j * 2 + c) * k_total..(j * 2 + c + 1) * k_total];
                        for (v, gv) in row.iter_mut().zip(g) {
                            *v += e * gv;
                        }
                        rhs[r] -= e * offset[j][c];
                    }
                }
            }
        }
        let e = &lin.d_local[0];
        let column = |c: usize| [e[0][c], e[1][c], e[2][c]];
        let (c1, c2) = (column(0), column(1));
        let (n1, n2) = (norm(c1), norm(c2));
        if !(n1 > 0.0 && n2 > 0.0 && n1.is_finite() && n2.is_finite()) {
            return None;
        }
        let mut q = cross(c1.map(|v| v / n1), c2.map(|v| v / n2));
        let nq = norm(q);
        if nq < 1e-10 {
            return None;
        }
        q = q.map(|v| v / nq);
        // Reduced equation: q·(rhs − M δm) = 0.
        {
            let row = reduced.row_mut(k);
            for r in 0..3 {
                let m_row = &coupling[r * k_total..(r + 1) * k_total];
                for (v, mv) in row.iter_mut().zip(m_row) {
                    *v += q[r] * mv;
                }
            }
        }
        reduced_rhs[k] = q[0] * rhs[0] + q[1] * rhs[1] + q[2] * rhs[2];
        // Least-squares left inverse L = (EᵀE)⁻¹Eᵀ; δz = L (rhs − M δm).
        let (a11, a12, a22) = (
            c1[0] * c1[0] + c1[1] * c1[1] + c1[2] * c1[2],
            c1[0] * c2[0] + c1[1] * c2[1] + c1[2] * c2[2],
            c2[0] * c2[0] + c2[1] * c2[1] + c2[2] * c2[2],
        );
        let det = a11 * a22 - a12 * a12;
        if det.abs() <= 1e-300 {
            return None;
        }
        let inv = [[a22 / det, -a12 / det], [-a12 / det, a11 / det]];
        let mut left = [[0.0; 3]; 2];
        for c in 0..2 {
            for r in 0..3 {
                left[c][r] = inv[c][0] * c1[r] + inv[c][1] * c2[r];
            }
        }
        for c in 0..2 {
            offset[k][c] = left[c][0] * rhs[0] + left[c][1] * rhs[1] + left[c][2] * rhs[2];
            let g = &mut gain[(k * 2 + c) * k_total..(k * 2 + c + 1) * k_total];
            for r in 0..3 {
                let l = left[c][r];
                if l == 0.0 {
                    continue;
                }
                let m_row = &coupling[r * k_total..(r + 1) * k_total];
                for (gv, mv) in g.iter_mut().zip(m_row) {
                    *gv -= l * mv;
                }
            }
        }
    }
    let lu = LuFactors::new(reduced).ok()?;
    let mass = lu.solve(&reduced_rhs);
    if !mass.iter().all(|v| v.is_finite()) {
        return None;
    }
    let local: Vec<[f64; 2]> = (0..k_total)
        .map(|k| {
            let mut z = offset[k];
            for (c, zc) in z.iter_mut().enumerate() {
                let g = &gain[(k * 2 + c) * k_total..(k * 2 + c + 1) * k_total];
                *zc += g.iter().zip(&mass).map(|(a, b)| a * b).sum::<f64>();
            }
            z
        })
        .collect();
    if !local.iter().all(|z| z[0].is_finite() && z[1].is_finite()) {
        return None;
    }
    Some(Corrections { local, mass })
}

#[cfg(test)]
mod tests {
    use super::*;

    /// The reduction must give the same answer as a dense solve of the full 3K system
    /// (common practice: check a block elimination against the unreduced system).
    #[test]
    fn reduction_matches_the_full_system() {
        let k_total = 4;
        let mut influence = DenseMatrix::zeros(k_total, k_total);
        for i in 0..k_total {
            for j in 0..k_total {
                influence.set(i, j, 0.3 / (1.0 + (i as f64 - j as f64).abs()) + 0.1 * j as f64);
            }
        }
        let pseudo = |a: usize, b: usize| ((a * 7 + b * 13) % 17) as f64 / 17.0 - 0.4;
        let mut stations = Vec::new();
        for k in 0..k_total {
            let mut lin = StationLinearisation {
                involved: [k, k.saturating_sub(1), 0],
                count: if k == 0 { 1 } else { 2 },
                residual: [pseudo(k, 1), pseudo(k, 2), pseudo(k, 3)],
                ..Default::default()
            };
            for p in 0..lin.count {
                for r in 0..3 {
                    for c in 0..2 {
                        lin.d_local[p][r][c] =
                            pseudo(k + p, r * 2 + c) + if p == 0 && r == c { 2.0 } else { 0.0 };
                    }
                    lin.d_mass[p][r] = pseudo(k + 3 * p, r + 5) + if p == 0 && r == 2 { 1.5 } else { 0.0 };
                    lin.d_speed[p][r] = pseudo(k + 5 * p, r + 9);
                }
            }
            stations.push(lin);
        }
        let solved = solve_step(&stations, &influence).expect("solvable");
        // Full system: unknowns (z0, z1, m) per station.
        let n = 3 * k_total;
        let mut full = DenseMatrix::zeros(n, n);
        let mut rhs = vec![0.0; n];
        for (k, lin) in stations.iter().enumerate() {
            for r in 0..3 {
                let row = 3 * k + r;
                rhs[row] = -lin.residual[r];
                for p in 0..lin.count {
                    let j = lin.involved[p];
                    for c in 0..2 {
                        full.add(row, 3 * j + c, lin.d_local[p][r][c]);
                    }
                    full.add(row, 3 * j + 2, lin.d_mass[p][r]);
                    for l in 0..k_total {
                        full.add(row, 3 * l + 2, lin.d_speed[p][r] * influence.get(j, l));
                    }
                }
            }
        }
        let x = LuFactors::new(full).unwrap().solve(&rhs);
        for k in 0..k_total {
            assert!((x[3 * k] - solved.local[k][0]).abs() < 1e-10);
            assert!((x[3 * k + 1] - solved.local[k][1]).abs() < 1e-10);
            assert!((x[3 * k + 2] - solved.mass[k]).abs() < 1e-10);
        }
    }
}
