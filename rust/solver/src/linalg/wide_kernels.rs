//! Inner loops compiled twice more for wider vector units, chosen when the program runs.
//!
//! The package is built for the baseline x86-64 instruction set (two-lane vectors) so that one
//! wheel runs everywhere; on a processor with AVX2 or AVX-512 the same loop runs four or eight
//! lanes wide. Each lane does the same multiplications and subtractions in the same order and
//! nothing is fused into a multiply–add, so the results are bit for bit the same on every
//! machine. This is the one place in the solver with `unsafe`: calling a function compiled for
//! instructions the processor might lack, which is sound once the processor has been asked
//! (`is_x86_feature_detected!`, the standard library's run-time detection).
#![allow(unsafe_code)]

use super::PANEL;

/// Rows of `tail` (each `n` long) right of column `k1` take the updates of the panel's
/// columns k0..k1 = k0 + PANEL: `a -= l_j · u_j` for j in order, `l_j` from the row's own
/// panel columns and `u_j` the panel's pivot rows (right of k1).
pub(super) fn trailing_panel_update(
    tail: &mut [f64],
    n: usize,
    k0: usize,
    k1: usize,
    u: [&[f64]; PANEL],
) {
    #[cfg(target_arch = "x86_64")]
    {
        if std::is_x86_feature_detected!("avx512f") {
            // SAFETY: the processor has just been found to have the instructions enabled.
            unsafe { trailing_panel_update_avx512(tail, n, k0, k1, u) };
            return;
        }
        if std::is_x86_feature_detected!("avx2") {
            // SAFETY: as above.
            unsafe { trailing_panel_update_avx2(tail, n, k0, k1, u) };
            return;
        }
    }
    trailing_panel_update_baseline(tail, n, k0, k1, u);
}

#[inline(always)]
fn trailing_panel_update_baseline(
    tail: &mut [f64],
    n: usize,
    k0: usize,
    k1: usize,
    u: [&[f64]; PANEL],
) {
    let m = n - k1;
    for row in tail.chunks_exact_mut(n) {
        let l = [row[k0], row[k0 + 1], row[k0 + 2], row[k0 + 3]];
        let dst = &mut row[k1..];
        for c in 0..m {
            let mut a = dst[c];
            a -= l[0] * u[0][c];
            a -= l[1] * u[1][c];
            a -= l[2] * u[2][c];
            a -= l[3] * u[3][c];
            dst[c] = a;
        }
    }
}

/// `$name`: the baseline loop compiled with the instructions of `$feature` enabled.
macro_rules! widened {
    ($name:ident, $feature:literal) => {
        #[cfg(target_arch = "x86_64")]
        #[target_feature(enable = $feature)]
        unsafe fn $name(tail: &mut [f64], n: usize, k0: usize, k1: usize, u: [&[f64]; PANEL]) {
            trailing_panel_update_baseline(tail, n, k0, k1, u)
        }
    };
}

widened!(trailing_panel_update_avx2, "avx2");
widened!(trailing_panel_update_avx512, "avx512f");

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn every_vector_width_gives_the_bits_of_the_baseline_loop() {
        let n = 37;
        let value = |k: usize| ((k as f64 * 0.754_877_666).fract() - 0.5) * (1.0 + k as f64);
        let start: Vec<f64> = (0..3 * n).map(value).collect();
        let pivot: Vec<Vec<f64>> = (0..PANEL)
            .map(|j| (0..n - 5).map(|c| value(1000 + 41 * j + c)).collect())
            .collect();
        let u = [&pivot[0][..], &pivot[1][..], &pivot[2][..], &pivot[3][..]];
        let mut expect = start.clone();
        for row in expect.chunks_exact_mut(n) {
            for c in 5..n {
                for j in 0..PANEL {
                    row[c] -= row[1 + j] * u[j][c - 5];
                }
            }
        }
        let mut got = start.clone();
        trailing_panel_update(&mut got, n, 1, 5, u);
        let bits = |v: &[f64]| v.iter().map(|x| x.to_bits()).collect::<Vec<_>>();
        assert_eq!(bits(&got), bits(&expect));
    }
}
