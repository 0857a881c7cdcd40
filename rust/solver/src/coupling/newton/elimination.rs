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

use std::cell::RefCell;

use crate::linalg::{DenseMatrix, LuFactors};

thread_local! {
    /// The gain buffer of the last factorisation dropped on this thread, for the next one:
    /// 1.5 MB at 160 panels that would otherwise be allocated and zeroed for every Jacobian.
    /// Its stale contents are never read: every gain row is written before it is used.
    static SPARE_GAIN: RefCell<Vec<f64>> = const { RefCell::new(Vec::new()) };
}

/// A buffer of `len` entries for the gain rows: the spare one when there is one (contents
/// stale, see [`SPARE_GAIN`]), otherwise a new one.
fn gain_buffer(len: usize) -> Vec<f64> {
    let mut buffer = SPARE_GAIN.with(|spare| std::mem::take(&mut *spare.borrow_mut()));
    if buffer.len() >= len {
        buffer.truncate(len);
    } else {
        buffer.resize(len, 0.0);
    }
    buffer
}

/// Most local unknowns of a station: ln θ and its third variable, plus, at the first turbulent
/// station of a side, the laminar momentum thickness at the transition point and the point's
/// fraction of the interval.
pub(crate) const MAX_LOCAL: usize = 4;
/// Most equations of a station (one more than its local unknowns: the extra one is the
/// equation that fixes its mass defect).
pub(crate) const MAX_EQUATIONS: usize = MAX_LOCAL + 1;
/// Local unknowns of a station through which the stations downstream depend on it.
pub(crate) const SHARED_LOCAL: usize = 2;

/// The linearisation of one station's residuals.
#[derive(Debug, Clone, Default)]
pub(crate) struct StationLinearisation {
    /// Station indices the residuals depend on: itself first, then its predecessors.
    pub involved: [usize; 3],
    /// How many entries of `involved` are used (1 to 3).
    pub count: usize,
    /// Local unknowns of the station itself (2, or 4 at a transition station).
    pub n_local: usize,
    /// Residuals at the current iterate (the first n_local + 1 are used).
    pub residual: [f64; MAX_EQUATIONS],
    /// ∂R/∂z of each involved station: its own n_local columns, a predecessor's first
    /// SHARED_LOCAL.
    pub d_local: [[[f64; MAX_LOCAL]; MAX_EQUATIONS]; 3],
    /// ∂R/∂m of each involved station at fixed edge speed.
    pub d_mass: [[f64; MAX_EQUATIONS]; 3],
    /// ∂R/∂ue of each involved station.
    pub d_speed: [[f64; MAX_EQUATIONS]; 3],
}

impl StationLinearisation {
    /// Number of equations.
    pub(crate) fn n_equations(&self) -> usize {
        self.n_local + 1
    }
}

/// Newton corrections: δz per station (n_local entries used) and δm per station.
pub(crate) struct Corrections {
    pub local: Vec<[f64; MAX_LOCAL]>,
    pub mass: Vec<f64>,
}

/// Orthonormal complement and least-squares left inverse of an (n + 1) × n matrix of full
/// column rank, by Householder QR (Golub & Van Loan, *Matrix Computations*, §5.2): returns the
/// unit vector q orthogonal to every column, and L with L·E = I. None when rank deficient.
fn complement_and_left_inverse(
    e: &[[f64; MAX_LOCAL]; MAX_EQUATIONS],
    n: usize,
) -> Option<([f64; MAX_EQUATIONS], [[f64; MAX_EQUATIONS]; MAX_LOCAL])> {
    let rows = n + 1;
    // Column scaling (the unknowns differ in size by orders of magnitude).
    let mut scale = [1.0; MAX_LOCAL];
    let mut a = [[0.0; MAX_LOCAL]; MAX_EQUATIONS];
    for c in 0..n {
        let norm = (0..rows).map(|r| e[r][c] * e[r][c]).sum::<f64>().sqrt();
        if !(norm > 0.0 && norm.is_finite()) {
            return None;
        }
        scale[c] = norm;
        for r in 0..rows {
            a[r][c] = e[r][c] / norm;
        }
    }
    // Q accumulated explicitly (rows × rows).
    let mut q = [[0.0; MAX_EQUATIONS]; MAX_EQUATIONS];
    for (r, row) in q.iter_mut().enumerate().take(rows) {
        row[r] = 1.0;
    }
    for c in 0..n {
        let norm = (c..rows).map(|r| a[r][c] * a[r][c]).sum::<f64>().sqrt();
        if norm < 1e-12 {
            return None;
        }
        let alpha = if a[c][c] > 0.0 { -norm } else { norm };
        let mut v = [0.0; MAX_EQUATIONS];
        for r in c..rows {
            v[r] = a[r][c];
        }
        v[c] -= alpha;
        let vv = (c..rows).map(|r| v[r] * v[r]).sum::<f64>();
        if vv <= 1e-300 {
            continue;
        }
        // A ← (I − 2vvᵀ/vᵀv) A, Q ← Q (I − 2vvᵀ/vᵀv).
        for cc in 0..n {
            let dot = (c..rows).map(|r| v[r] * a[r][cc]).sum::<f64>() * 2.0 / vv;
            for r in c..rows {
                a[r][cc] -= dot * v[r];
            }
        }
        for row in q.iter_mut().take(rows) {
            let dot = (c..rows).map(|r| row[r] * v[r]).sum::<f64>() * 2.0 / vv;
            for r in c..rows {
                row[r] -= dot * v[r];
            }
        }
    }
    // a now holds R in its first n rows; Q's last column spans the complement.
    let mut complement = [0.0; MAX_EQUATIONS];
    for r in 0..rows {
        complement[r] = q[r][n];
    }
    // L̂ = R⁻¹ Q₁ᵀ, then L = D⁻¹ L̂ for the column scaling D.
    let mut left = [[0.0; MAX_EQUATIONS]; MAX_LOCAL];
    for r in 0..rows {
        // Solve R x = (Q₁ᵀ)[:, r] = row r of Q, first n entries.
        let mut x = [0.0; MAX_LOCAL];
        for i in (0..n).rev() {
            let mut sum = q[r][i];
            for j in i + 1..n {
                sum -= a[i][j] * x[j];
            }
            if a[i][i].abs() < 1e-14 {
                return None;
            }
            x[i] = sum / a[i][i];
        }
        for i in 0..n {
            left[i][r] = x[i] / scale[i];
        }
    }
    Some((complement, left))
}

/// A factorised Newton system: everything of the elimination that depends on the Jacobian,
/// so that further right-hand sides (residuals of later iterates, the Jacobian kept) cost only
/// O(K²) (a chord, or modified Newton, step).
pub(crate) struct Factorisation {
    k_total: usize,
    /// δz_k = offset_k + gain_k δm, gain rows per station and local unknown.
    gain: Vec<f64>,
    /// Orthogonal complement of each station's local columns.
    complement: Vec<[f64; MAX_EQUATIONS]>,
    /// Least-squares left inverse of each station's local columns.
    left: Vec<[[f64; MAX_EQUATIONS]; MAX_LOCAL]>,
    /// LU factors of the reduced system in δm.
    reduced: LuFactors,
    /// The Jacobian the factorisation was made from (residuals ignored).
    stations: Vec<StationLinearisation>,
}

impl Factorisation {
    fn gain_row(&self, k: usize, c: usize) -> usize {
        (k * MAX_LOCAL + c) * self.k_total
    }

    /// Factorises the linearised coupled system; `influence[k][l]` = ∂ue_k/∂m_l. None when a
    /// station's local Jacobian or the reduced system is singular.
    pub(crate) fn new(
        stations: Vec<StationLinearisation>,
        influence: &DenseMatrix,
    ) -> Option<Self> {
        let k_total = stations.len();
        let mut gain = gain_buffer(k_total * MAX_LOCAL * k_total);
        let mut complement = vec![[0.0; MAX_EQUATIONS]; k_total];
        let mut lefts = vec![[[0.0; MAX_EQUATIONS]; MAX_LOCAL]; k_total];
        // The reduced matrix, row k appended by station k (not zeroed first: each row's first
        // term is written as adding it to zero gives it).
        let mut reduced = Vec::with_capacity(k_total * k_total);
        let mut coupling = vec![0.0; MAX_EQUATIONS * k_total];
        let gain_row = |k: usize, c: usize| (k * MAX_LOCAL + c) * k_total;
        for (k, lin) in stations.iter().enumerate() {
            let rows = lin.n_equations();
            for r in 0..rows {
                let row = &mut coupling[r * k_total..(r + 1) * k_total];
                for p in 0..lin.count {
                    let j = lin.involved[p];
                    let ds = lin.d_speed[p][r];
                    if p == 0 {
                        // The station's own terms, written over the last station's row as
                        // adding them to zero gives them.
                        if ds != 0.0 {
                            for (v, d) in row.iter_mut().zip(influence.row(j)) {
                                *v = 0.0 + ds * d;
                            }
                            row[j] = (0.0 + lin.d_mass[p][r]) + ds * influence.get(j, j);
                        } else {
                            row.fill(0.0);
                            row[j] = 0.0 + lin.d_mass[p][r];
                        }
                        continue;
                    }
                    row[j] += lin.d_mass[p][r];
                    if ds != 0.0 {
                        for (v, d) in row.iter_mut().zip(influence.row(j)) {
                            *v += ds * d;
                        }
                    }
                    for c in 0..SHARED_LOCAL {
                        let e = lin.d_local[p][r][c];
                        if e == 0.0 {
                            continue;
                        }
                        let start = gain_row(j, c);
                        let g = &gain[start..start + k_total];
                        for (v, gv) in row.iter_mut().zip(g) {
                            *v += e * gv;
                        }
                    }
                }
            }
            let (q, left) = complement_and_left_inverse(&lin.d_local[0], lin.n_local)?;
            // Reduced equation: q·(rhs − M δm) = 0.
            reduced.extend(coupling[..k_total].iter().map(|mv| 0.0 + q[0] * mv));
            let row = &mut reduced[k * k_total..];
            for r in 1..rows {
                let m_row = &coupling[r * k_total..(r + 1) * k_total];
                for (v, mv) in row.iter_mut().zip(m_row) {
                    *v += q[r] * mv;
                }
            }
            // δz = L (rhs − M δm): the gain part. (The row's first term is written over the
            // buffer's stale contents as 0 − l·m, what subtracting it from zero gives.)
            for c in 0..lin.n_local {
                let start = gain_row(k, c);
                let g = &mut gain[start..start + k_total];
                let mut written = false;
                for r in 0..rows {
                    let l = left[c][r];
                    if l == 0.0 {
                        continue;
                    }
                    let m_row = &coupling[r * k_total..(r + 1) * k_total];
                    if written {
                        for (gv, mv) in g.iter_mut().zip(m_row) {
                            *gv -= l * mv;
                        }
                    } else {
                        for (gv, mv) in g.iter_mut().zip(m_row) {
                            *gv = 0.0 - l * mv;
                        }
                        written = true;
                    }
                }
                if !written {
                    g.fill(0.0);
                }
            }
            complement[k] = q;
            lefts[k] = left;
        }
        let reduced = LuFactors::new(DenseMatrix {
            rows: k_total,
            cols: k_total,
            data: reduced,
        })
        .ok()?;
        Some(Factorisation {
            k_total,
            gain,
            complement,
            left: lefts,
            reduced,
            stations,
        })
    }

    /// Newton corrections for the residuals `residuals` (one per station, in the layout the
    /// factorisation was made for).
    pub(crate) fn corrections(&self, residuals: &[[f64; MAX_EQUATIONS]]) -> Option<Corrections> {
        let k_total = self.k_total;
        let mut offset = vec![[0.0; MAX_LOCAL]; k_total];
        let mut reduced_rhs = vec![0.0; k_total];
        for (k, lin) in self.stations.iter().enumerate() {
            let rows = lin.n_equations();
            let mut rhs = [0.0; MAX_EQUATIONS];
            for r in 0..rows {
                rhs[r] = -residuals[k][r];
            }
            for p in 1..lin.count {
                let j = lin.involved[p];
                for r in 0..rows {
                    for c in 0..SHARED_LOCAL {
                        rhs[r] -= lin.d_local[p][r][c] * offset[j][c];
                    }
                }
            }
            let q = &self.complement[k];
            reduced_rhs[k] = (0..rows).map(|r| q[r] * rhs[r]).sum();
            for c in 0..lin.n_local {
                offset[k][c] = (0..rows).map(|r| self.left[k][c][r] * rhs[r]).sum();
            }
        }
        let mass = self.reduced.solve(&reduced_rhs);
        if !mass.iter().all(|v| v.is_finite()) {
            return None;
        }
        let mut local = vec![[0.0; MAX_LOCAL]; k_total];
        for (k, lin) in self.stations.iter().enumerate() {
            // The station's gain rows are contiguous: their products with δm are summed side
            // by side, each in column order (independent running sums hide the latency of
            // the additions; the order, and so the result, is that of one sum per row).
            let start = self.gain_row(k, 0);
            let rows = &self.gain[start..start + lin.n_local * k_total];
            let mut sums = [-0.0f64; MAX_LOCAL];
            if lin.n_local == 2 {
                let (g0, g1) = rows.split_at(k_total);
                for (j, &dm) in mass.iter().enumerate() {
                    sums[0] += g0[j] * dm;
                    sums[1] += g1[j] * dm;
                }
            } else {
                for (c, g) in rows.chunks_exact(k_total).enumerate() {
                    sums[c] = g.iter().zip(&mass).map(|(a, b)| a * b).sum::<f64>();
                }
            }
            for c in 0..lin.n_local {
                let z = offset[k][c] + sums[c];
                if !z.is_finite() {
                    return None;
                }
                local[k][c] = z;
            }
        }
        Some(Corrections { local, mass })
    }
}

impl Drop for Factorisation {
    /// Leaves the gain buffer for the next factorisation on this thread ([`SPARE_GAIN`]).
    fn drop(&mut self) {
        let gain = std::mem::take(&mut self.gain);
        SPARE_GAIN.with(|spare| {
            let mut spare = spare.borrow_mut();
            if gain.capacity() > spare.capacity() {
                *spare = gain;
            }
        });
    }
}

/// Solves the linearised coupled system once (factorisation and corrections).
#[cfg(test)]
pub(crate) fn solve_step(
    stations: &[StationLinearisation],
    influence: &DenseMatrix,
) -> Option<Corrections> {
    let factorisation = Factorisation::new(stations.to_vec(), influence)?;
    let residuals: Vec<[f64; MAX_EQUATIONS]> = stations.iter().map(|s| s.residual).collect();
    factorisation.corrections(&residuals)
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
                influence.set(
                    i,
                    j,
                    0.3 / (1.0 + (i as f64 - j as f64).abs()) + 0.1 * j as f64,
                );
            }
        }
        let pseudo = |a: usize, b: usize| ((a * 7 + b * 13) % 17) as f64 / 17.0 - 0.4;
        let mut stations = Vec::new();
        for k in 0..k_total {
            let mut lin = StationLinearisation {
                involved: [k, k.saturating_sub(1), 0],
                count: if k == 0 { 1 } else { 2 },
                n_local: if k == 2 { 4 } else { 2 },
                residual: [
                    pseudo(k, 1),
                    pseudo(k, 2),
                    pseudo(k, 3),
                    pseudo(k, 4),
                    pseudo(k, 6),
                ],
                ..Default::default()
            };
            for p in 0..lin.count {
                let cols = if p == 0 { lin.n_local } else { SHARED_LOCAL };
                for r in 0..lin.n_equations() {
                    for c in 0..cols {
                        lin.d_local[p][r][c] =
                            pseudo(k + p, r * 2 + c) + if p == 0 && r == c { 2.0 } else { 0.0 };
                    }
                    lin.d_mass[p][r] = pseudo(k + 3 * p, r + 5)
                        + if p == 0 && r == lin.n_local { 1.5 } else { 0.0 };
                    lin.d_speed[p][r] = pseudo(k + 5 * p, r + 9);
                }
            }
            stations.push(lin);
        }
        let solved = solve_step(&stations, &influence).expect("solvable");
        // Full system: unknowns (z..., m) per station, in station order.
        let mut first = vec![0; k_total + 1];
        for k in 0..k_total {
            first[k + 1] = first[k] + stations[k].n_local + 1;
        }
        let n = first[k_total];
        let mass_index = |k: usize| first[k] + stations[k].n_local;
        let mut full = DenseMatrix::zeros(n, n);
        let mut rhs = vec![0.0; n];
        for (k, lin) in stations.iter().enumerate() {
            for r in 0..lin.n_equations() {
                let row = first[k] + r;
                rhs[row] = -lin.residual[r];
                for p in 0..lin.count {
                    let j = lin.involved[p];
                    let cols = if p == 0 { lin.n_local } else { SHARED_LOCAL };
                    for c in 0..cols {
                        full.add(row, first[j] + c, lin.d_local[p][r][c]);
                    }
                    full.add(row, mass_index(j), lin.d_mass[p][r]);
                    for l in 0..k_total {
                        full.add(row, mass_index(l), lin.d_speed[p][r] * influence.get(j, l));
                    }
                }
            }
        }
        let x = LuFactors::new(full).unwrap().solve(&rhs);
        for k in 0..k_total {
            for c in 0..stations[k].n_local {
                assert!((x[first[k] + c] - solved.local[k][c]).abs() < 1e-9);
            }
            assert!((x[mass_index(k)] - solved.mass[k]).abs() < 1e-9);
        }
    }
}
