//! Small dense linear algebra: a row-major matrix and an LU factorisation with partial pivoting.
//!
//! The panel systems and the coupled Newton step's reduced systems are a few hundred unknowns,
//! so a dense Doolittle LU (Golub & Van Loan, *Matrix Computations*, §3.4, partial pivoting),
//! blocked four columns at a time with its inner loop widened to the processor's vectors
//! (`wide_kernels`), is fast enough and keeps the core free of external BLAS/LAPACK. Every
//! product and factorisation rounds exactly as its plain loop would, whatever the blocking and
//! vector width, so no result depends on the machine.

use crate::error::{Result, SolverError};

mod wide_kernels;

/// A dense row-major matrix of f64.
#[derive(Debug, Clone, PartialEq)]
pub struct DenseMatrix {
    /// Number of rows.
    pub rows: usize,
    /// Number of columns.
    pub cols: usize,
    /// Entries, row after row (`data[r * cols + c]`).
    pub data: Vec<f64>,
}

impl DenseMatrix {
    /// A rows × cols matrix of zeros.
    pub fn zeros(rows: usize, cols: usize) -> Self {
        DenseMatrix {
            rows,
            cols,
            data: vec![0.0; rows * cols],
        }
    }

    /// Entry at row `r`, column `c`.
    #[inline]
    pub fn get(&self, r: usize, c: usize) -> f64 {
        self.data[r * self.cols + c]
    }

    /// Set the entry at row `r`, column `c`.
    #[inline]
    pub fn set(&mut self, r: usize, c: usize, value: f64) {
        self.data[r * self.cols + c] = value;
    }

    /// Add `value` to the entry at row `r`, column `c`.
    #[inline]
    pub fn add(&mut self, r: usize, c: usize, value: f64) {
        self.data[r * self.cols + c] += value;
    }

    /// Row `r` as a slice.
    #[inline]
    pub fn row(&self, r: usize) -> &[f64] {
        &self.data[r * self.cols..(r + 1) * self.cols]
    }

    /// Mutable row `r`.
    #[inline]
    pub fn row_mut(&mut self, r: usize) -> &mut [f64] {
        &mut self.data[r * self.cols..(r + 1) * self.cols]
    }

    /// Matrix–vector product `A·x` (`x.len()` must equal `cols`).
    pub fn matvec(&self, x: &[f64]) -> Vec<f64> {
        self.matvec_rows(x, 0..self.rows)
    }

    /// The entries `rows` of `A·x`: each the same bits as in [`Self::matvec`] (every row is
    /// summed on its own, in column order).
    pub fn matvec_rows(&self, x: &[f64], rows: std::ops::Range<usize>) -> Vec<f64> {
        assert_eq!(
            x.len(),
            self.cols,
            "matvec: vector length must equal the column count"
        );
        assert!(rows.end <= self.rows, "matvec: rows beyond the matrix");
        // Rows in blocks of eight, each row summed in column order as a plain running sum
        // would (the same rounding, so the same results), but eight rows at once: one running
        // sum makes every addition wait for the one before it (floating-point addition is not
        // reassociated), and independent sums hide that latency.
        let n = self.cols;
        if n == 0 {
            return vec![-0.0; rows.len()];
        }
        let mut y = Vec::with_capacity(rows.len());
        let mut blocks = self.data[rows.start * n..rows.end * n].chunks_exact(8 * n);
        for block in &mut blocks {
            let mut s = [-0.0f64; 8];
            // (Rows and x zipped, so that no element access needs a bounds check.)
            let (r0, rest) = block.split_at(n);
            let (r1, rest) = rest.split_at(n);
            let (r2, rest) = rest.split_at(n);
            let (r3, rest) = rest.split_at(n);
            let (r4, rest) = rest.split_at(n);
            let (r5, rest) = rest.split_at(n);
            let (r6, r7) = rest.split_at(n);
            let columns = r0
                .iter()
                .zip(r1)
                .zip(r2)
                .zip(r3)
                .zip(r4)
                .zip(r5)
                .zip(r6)
                .zip(r7);
            for ((((((((a0, a1), a2), a3), a4), a5), a6), a7), &xj) in columns.zip(x) {
                s[0] += a0 * xj;
                s[1] += a1 * xj;
                s[2] += a2 * xj;
                s[3] += a3 * xj;
                s[4] += a4 * xj;
                s[5] += a5 * xj;
                s[6] += a6 * xj;
                s[7] += a7 * xj;
            }
            y.extend_from_slice(&s);
        }
        for row in blocks.remainder().chunks_exact(n) {
            y.push(row.iter().zip(x).map(|(a, b)| a * b).sum());
        }
        y
    }
}

/// LU factors of a square matrix, `P·A = L·U`, stored in place (unit lower L below the diagonal).
#[derive(Debug, Clone)]
pub struct LuFactors {
    n: usize,
    lu: Vec<f64>,
    pivots: Vec<usize>,
}

impl LuFactors {
    /// Factorise a square matrix with partial (row) pivoting: columns eliminated in panels of
    /// four, the factors bit for bit those of column-by-column elimination.
    ///
    /// Fails with `SolverError::Geometry` when a pivot vanishes: for a panel system that means
    /// coincident or degenerate panels, so the geometry is the thing to fix.
    pub fn new(matrix: DenseMatrix) -> Result<Self> {
        if matrix.rows != matrix.cols {
            return Err(SolverError::Internal(format!(
                "LU of a non-square {}x{} matrix",
                matrix.rows, matrix.cols
            )));
        }
        let n = matrix.rows;
        let mut lu = matrix.data;
        let mut pivots = vec![0usize; n];
        let scale = lu
            .iter()
            .fold(0.0f64, |m, v| m.max(v.abs()))
            .max(f64::MIN_POSITIVE);
        let mut k0 = 0;
        while k0 < n {
            let k1 = (k0 + PANEL).min(n);
            factorise_panel(&mut lu, n, k0, k1, scale, &mut pivots)?;
            update_block_row(&mut lu, n, k0, k1);
            update_trailing(&mut lu, n, k0, k1);
            k0 = k1;
        }
        Ok(LuFactors { n, lu, pivots })
    }

    /// Order of the factorised matrix.
    pub fn order(&self) -> usize {
        self.n
    }

    /// Solve `A·x = b` in place (`b` becomes `x`).
    pub fn solve_in_place(&self, b: &mut [f64]) {
        let n = self.n;
        assert_eq!(b.len(), n, "LU solve: right-hand side has the wrong length");
        for k in 0..n {
            let p = self.pivots[k];
            if p != k {
                b.swap(k, p);
            }
        }
        for r in 1..n {
            let row = &self.lu[r * n..r * n + r];
            let s: f64 = row.iter().zip(&b[..r]).map(|(l, x)| l * x).sum();
            b[r] -= s;
        }
        for r in (0..n).rev() {
            let row = &self.lu[r * n..(r + 1) * n];
            let s: f64 = row[r + 1..]
                .iter()
                .zip(&b[r + 1..])
                .map(|(u, x)| u * x)
                .sum();
            b[r] = (b[r] - s) / row[r];
        }
    }

    /// Solve `A·x = b` in place for every row `b` of `rhs` (each row becomes its `x`). Four
    /// rows go through the substitutions together, so each factor entry is loaded once for
    /// four sums; each sum is still formed in the order [`Self::solve_in_place`] forms it, so
    /// every row gets the same bits as solved alone.
    pub fn solve_rows_in_place(&self, rhs: &mut DenseMatrix) {
        let n = self.n;
        assert_eq!(
            rhs.cols, n,
            "LU solve: right-hand sides have the wrong length"
        );
        if n == 0 {
            return;
        }
        // The value an empty `Iterator::sum` starts from, so that the sums below round
        // exactly as `solve_in_place`'s do.
        let start: f64 = std::iter::empty::<f64>().sum();
        let mut blocks = rhs.data.chunks_exact_mut(4 * n);
        for block in &mut blocks {
            let (b0, rest) = block.split_at_mut(n);
            let (b1, rest) = rest.split_at_mut(n);
            let (b2, b3) = rest.split_at_mut(n);
            let mut b = [b0, b1, b2, b3];
            for k in 0..n {
                let p = self.pivots[k];
                if p != k {
                    for column in b.iter_mut() {
                        column.swap(k, p);
                    }
                }
            }
            for r in 1..n {
                let row = &self.lu[r * n..r * n + r];
                let mut s = [start; 4];
                for (c, &l) in row.iter().enumerate() {
                    for (sum, column) in s.iter_mut().zip(b.iter()) {
                        *sum += l * column[c];
                    }
                }
                for (sum, column) in s.iter().zip(b.iter_mut()) {
                    column[r] -= sum;
                }
            }
            for r in (0..n).rev() {
                let row = &self.lu[r * n..(r + 1) * n];
                let mut s = [start; 4];
                for (c, &u) in row.iter().enumerate().skip(r + 1) {
                    for (sum, column) in s.iter_mut().zip(b.iter()) {
                        *sum += u * column[c];
                    }
                }
                for (sum, column) in s.iter().zip(b.iter_mut()) {
                    column[r] = (column[r] - sum) / row[r];
                }
            }
        }
        for b in blocks.into_remainder().chunks_exact_mut(n) {
            self.solve_in_place(b);
        }
    }

    /// Solve `A·x = b`, returning `x`.
    pub fn solve(&self, b: &[f64]) -> Vec<f64> {
        let mut x = b.to_vec();
        self.solve_in_place(&mut x);
        x
    }
}

/// Columns eliminated together before their updates reach the rest of the matrix. Every
/// entry still receives its updates one at a time, in the order of the columns, so the factors
/// are bit for bit those of the column-by-column elimination; the blocking only saves the
/// loads and stores of the entries between updates (LU with delayed updates, Golub & Van
/// Loan, *Matrix Computations*, §3.4.9).
const PANEL: usize = 4;

/// Eliminate columns k0..k1 with partial pivoting: rows are swapped whole, but the updates
/// reach only the panel's own columns (the rest follow in [`update_block_row`] and
/// [`update_trailing`]).
fn factorise_panel(
    lu: &mut [f64],
    n: usize,
    k0: usize,
    k1: usize,
    scale: f64,
    pivots: &mut [usize],
) -> Result<()> {
    for k in k0..k1 {
        let (mut p, mut best) = (k, lu[k * n + k].abs());
        for r in k + 1..n {
            let v = lu[r * n + k].abs();
            if v > best {
                best = v;
                p = r;
            }
        }
        if best.is_nan() || best <= 1e-13 * scale {
            return Err(SolverError::geometry(format!(
                "panel system is singular (pivot {k} of {n}): check for coincident or zero-length panels"
            )));
        }
        pivots[k] = p;
        if p != k {
            for c in 0..n {
                lu.swap(k * n + c, p * n + c);
            }
        }
        let inv = 1.0 / lu[k * n + k];
        let (head, tail) = lu.split_at_mut((k + 1) * n);
        let pivot_row = &head[k * n + k + 1..k * n + k1];
        for row in tail.chunks_exact_mut(n) {
            let factor = row[k] * inv;
            row[k] = factor;
            for (dst, src) in row[k + 1..k1].iter_mut().zip(pivot_row) {
                *dst -= factor * src;
            }
        }
    }
    Ok(())
}

/// The panel's rows k0+1..k1 right of the panel: each row takes the updates of the rows above
/// it within the panel, in order.
fn update_block_row(lu: &mut [f64], n: usize, k0: usize, k1: usize) {
    for r in k0 + 1..k1 {
        let (head, tail) = lu.split_at_mut(r * n);
        let row = &mut tail[..n];
        for k in k0..r {
            let factor = row[k];
            for (dst, src) in row[k1..].iter_mut().zip(&head[k * n + k1..k * n + n]) {
                *dst -= factor * src;
            }
        }
    }
}

/// Rows k1.. right of the panel: each entry is loaded once, takes the panel's k1 − k0 updates
/// in column order, and is stored once.
fn update_trailing(lu: &mut [f64], n: usize, k0: usize, k1: usize) {
    if k1 >= n {
        return;
    }
    let (head, tail) = lu.split_at_mut(k1 * n);
    let m = n - k1;
    let u: Vec<&[f64]> = (k0..k1).map(|k| &head[k * n + k1..k * n + n]).collect();
    if u.len() == PANEL {
        let u = [&u[0][..m], &u[1][..m], &u[2][..m], &u[3][..m]];
        wide_kernels::trailing_panel_update(tail, n, k0, k1, u);
    } else {
        for row in tail.chunks_exact_mut(n) {
            for (j, uk) in u.iter().enumerate() {
                let factor = row[k0 + j];
                for (dst, src) in row[k1..].iter_mut().zip(uk.iter()) {
                    *dst -= factor * src;
                }
            }
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn solves_a_system_that_needs_pivoting() {
        let a = DenseMatrix {
            rows: 3,
            cols: 3,
            data: vec![0.0, 2.0, 1.0, 1.0, 1.0, 1.0, 2.0, 1.0, 3.0],
        };
        let x_true = [1.0, -2.0, 0.5];
        let b = a.matvec(&x_true);
        let lu = LuFactors::new(a).unwrap();
        let x = lu.solve(&b);
        for (u, v) in x.iter().zip(x_true) {
            assert!((u - v).abs() < 1e-12);
        }
    }

    /// Column-by-column Doolittle elimination with partial pivoting (Golub & Van Loan §3.4),
    /// the reference for the blocked factorisation.
    fn unblocked_lu(mut a: Vec<f64>, n: usize) -> (Vec<f64>, Vec<usize>) {
        let mut pivots = vec![0; n];
        for k in 0..n {
            let p = (k..n).fold(k, |p, r| {
                if a[r * n + k].abs() > a[p * n + k].abs() {
                    r
                } else {
                    p
                }
            });
            pivots[k] = p;
            for c in 0..n {
                a.swap(k * n + c, p * n + c);
            }
            let inv = 1.0 / a[k * n + k];
            for r in k + 1..n {
                let f = a[r * n + k] * inv;
                a[r * n + k] = f;
                for c in k + 1..n {
                    a[r * n + c] -= f * a[k * n + c];
                }
            }
        }
        (a, pivots)
    }

    #[test]
    fn blocked_factors_are_the_bits_of_column_by_column_elimination() {
        // Sizes below, at and around multiples of the panel width, so every partial panel and
        // every vector remainder is exercised.
        for n in [1usize, 2, 3, 4, 5, 7, 8, 9, 13, 31, 64, 67] {
            // Splitmix64 values in [−0.5, 0.5): no accidental linear dependence.
            let data: Vec<f64> = (0..(n * n) as u64)
                .map(|k| {
                    let mut z = k.wrapping_add(0x9e37_79b9_7f4a_7c15);
                    z = (z ^ (z >> 30)).wrapping_mul(0xbf58_476d_1ce4_e5b9);
                    z = (z ^ (z >> 27)).wrapping_mul(0x94d0_49bb_1331_11eb);
                    ((z ^ (z >> 31)) >> 11) as f64 / (1u64 << 53) as f64 - 0.5
                })
                .collect();
            let (expect, expect_pivots) = unblocked_lu(data.clone(), n);
            let lu = LuFactors::new(DenseMatrix {
                rows: n,
                cols: n,
                data,
            })
            .unwrap();
            assert_eq!(lu.pivots, expect_pivots, "pivots, n = {n}");
            for (k, (a, b)) in lu.lu.iter().zip(&expect).enumerate() {
                assert_eq!(a.to_bits(), b.to_bits(), "entry {k}, n = {n}: {a} vs {b}");
            }
        }
    }

    #[test]
    fn right_hand_sides_solved_together_get_the_bits_of_each_solved_alone() {
        let value = |k: u64| {
            let mut z = k.wrapping_add(0x9e37_79b9_7f4a_7c15);
            z = (z ^ (z >> 30)).wrapping_mul(0xbf58_476d_1ce4_e5b9);
            z = (z ^ (z >> 27)).wrapping_mul(0x94d0_49bb_1331_11eb);
            ((z ^ (z >> 31)) >> 11) as f64 / (1u64 << 53) as f64 - 0.5
        };
        for n in [1usize, 2, 5, 13, 67] {
            let lu = LuFactors::new(DenseMatrix {
                rows: n,
                cols: n,
                data: (0..(n * n) as u64).map(value).collect(),
            })
            .unwrap();
            for count in 1..=9 {
                let data: Vec<f64> = (0..(count * n) as u64).map(|k| value(k + 7919)).collect();
                let mut together = DenseMatrix {
                    rows: count,
                    cols: n,
                    data: data.clone(),
                };
                lu.solve_rows_in_place(&mut together);
                for (row, b) in data.chunks_exact(n).enumerate() {
                    let alone = lu.solve(b);
                    for (a, t) in alone.iter().zip(together.row(row)) {
                        assert_eq!(a.to_bits(), t.to_bits(), "n = {n}, {count} rows, row {row}");
                    }
                }
            }
        }
    }

    #[test]
    fn singular_matrix_is_a_geometry_error() {
        let a = DenseMatrix {
            rows: 2,
            cols: 2,
            data: vec![1.0, 2.0, 2.0, 4.0],
        };
        assert!(matches!(LuFactors::new(a), Err(SolverError::Geometry(_))));
    }

    #[test]
    fn matvec_rounds_each_row_as_one_running_sum() {
        // The blocked product must give the bits of a plain per-row running sum (so that no
        // solver result depends on how the rows are blocked); sizes around the block of 8.
        for (rows, cols) in [(1, 1), (7, 3), (8, 8), (13, 17), (17, 200), (3, 0)] {
            let entry = |k: usize| {
                ((k as f64 * 0.618_033_988_7).fract() - 0.5)
                    * 1e3f64.powf((k % 7) as f64 / 3.0 - 1.0)
            };
            let a = DenseMatrix {
                rows,
                cols,
                data: (0..rows * cols).map(entry).collect(),
            };
            let x: Vec<f64> = (0..cols).map(|k| entry(k + 12_345)).collect();
            let y = a.matvec(&x);
            for r in 0..rows {
                let mut s = -0.0f64;
                for c in 0..cols {
                    s += a.get(r, c) * x[c];
                }
                assert_eq!(y[r].to_bits(), s.to_bits(), "row {r} of {rows}x{cols}");
            }
        }
    }
}
