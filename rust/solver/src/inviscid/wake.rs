//! The inviscid wake: a polyline traced from the trailing edge along the streamline that leaves
//! it, on which the viscous coupling places the wake's transpiration sources.

use super::influence::Scratch;
use super::PanelSolver;

/// Wake nodes behind the trailing edge (chord-normalised), first node at the trailing-edge
/// midpoint, then downstream. Spacing grows geometrically from about the trailing-edge panel
/// length (at most half a blunt base's height, `BASE_RESOLVING_FRACTION`).
#[derive(Debug, Clone, PartialEq)]
pub struct Wake {
    /// Node abscissae.
    pub x: Vec<f64>,
    /// Node ordinates.
    pub y: Vec<f64>,
    /// Arc length from the trailing edge along the wake.
    pub s: Vec<f64>,
}

impl Wake {
    /// Number of wake nodes.
    pub fn len(&self) -> usize {
        self.x.len()
    }
    /// True when the wake has no nodes.
    pub fn is_empty(&self) -> bool {
        self.x.is_empty()
    }
}

/// Behind a blunt trailing edge the first wake interval is at most this fraction of the base
/// height. The near wake adjusts to the base over a length of the order of its height, and the
/// coupled lift converged only at first order in the wake's first interval while that was the
/// trailing-edge panel length (longer than the base at 160 panels): NACA 0012 (base 0.25 % of
/// chord), tripped, Re 6e6, 8°: cl 0.9019 at 160 panels and 0.8919 at 320 with the panel length,
/// 0.8933 and 0.8888 with half the base (docs/validation.md). A quarter of the base cut the
/// family sweep's converged share to 95 %; half of it costs two points of 228.
pub(crate) const BASE_RESOLVING_FRACTION: f64 = 0.5;

/// Interval lengths ds₀·rᵏ (k = 0 … intervals−1) that add up to `length`; the ratio r ≥ 1 is
/// found by bisection. Uniform spacing when even ds₀ is too long for that.
pub(crate) fn geometric_spacing(first: f64, length: f64, intervals: usize) -> Vec<f64> {
    let uniform = length / intervals as f64;
    if first >= uniform {
        return vec![uniform; intervals];
    }
    let total = |r: f64| first * (0..intervals).map(|k| r.powi(k as i32)).sum::<f64>();
    let (mut lo, mut hi) = (1.0, 2.0);
    while total(hi) < length {
        hi *= 2.0;
    }
    for _ in 0..100 {
        let mid = 0.5 * (lo + hi);
        if total(mid) < length {
            lo = mid;
        } else {
            hi = mid;
        }
    }
    let r = 0.5 * (lo + hi);
    let mut ds: Vec<f64> = (0..intervals).map(|k| first * r.powi(k as i32)).collect();
    let scale = length / ds.iter().sum::<f64>();
    ds.iter_mut().for_each(|d| *d *= scale);
    ds
}

impl PanelSolver {
    /// Trailing-edge midpoint and the unit bisector of the two trailing-edge panels, pointing
    /// downstream.
    pub fn trailing_edge_bisector(&self) -> ((f64, f64), (f64, f64)) {
        let p = &self.panels;
        let n = p.nodes();
        let te = (0.5 * (p.x[0] + p.x[n - 1]), 0.5 * (p.y[0] + p.y[n - 1]));
        let last = p.count() - 1;
        // Upper panel 0 runs forward from the TE: downstream is −t̂₀; the lower last panel ends
        // at the TE: downstream is +t̂.
        let (bx, by) = (p.tx[last] - p.tx[0], p.ty[last] - p.ty[0]);
        let norm = bx.hypot(by);
        let dir = if norm > 1e-12 {
            (bx / norm, by / norm)
        } else {
            (1.0, 0.0)
        };
        (te, dir)
    }

    /// Wake nodes traced along the inviscid streamline leaving the trailing-edge bisector, for
    /// `length_chords` chords with `nodes` nodes (at least 2). The first interval follows the
    /// bisector; each later one follows the local velocity at its midpoint (second-order
    /// predictor–corrector), with the surface vortex sheet of the solution at `alpha_deg`.
    pub fn wake(&self, alpha_deg: f64, length_chords: f64, nodes: usize) -> Wake {
        let nodes = nodes.max(2);
        let length = if length_chords.is_finite() && length_chords > 0.0 {
            length_chords
        } else {
            1.0
        } * self.chord;
        let p = &self.panels;
        let n = p.nodes();
        let base = (p.x[0] - p.x[n - 1]).hypot(p.y[0] - p.y[n - 1]);
        let mut first = 0.5 * (p.len[0] + p.len[p.count() - 1]);
        // Blunt: the trailing edge is open (the interior control is off, `InteriorControl`).
        if !self.interior().active {
            first = first.min(BASE_RESOLVING_FRACTION * base);
        }
        let ds = geometric_spacing(first, length, nodes - 1);
        let gamma = self.sheet_at(alpha_deg);
        let (te, mut dir) = self.trailing_edge_bisector();
        let mut scratch = Scratch::default();
        let (mut x, mut y, mut s) = (vec![te.0], vec![te.1], vec![0.0]);
        for (k, &h) in ds.iter().enumerate() {
            let (x0, y0) = (x[k], y[k]);
            if k > 0 {
                let (u, v) = self.velocity_at(
                    x0 + 0.5 * h * dir.0,
                    y0 + 0.5 * h * dir.1,
                    alpha_deg,
                    &gamma,
                    &mut scratch,
                );
                let q = u.hypot(v);
                if q > 1e-9 {
                    dir = (u / q, v / q);
                }
            }
            x.push(x0 + h * dir.0);
            y.push(y0 + h * dir.1);
            s.push(s[k] + h);
        }
        Wake { x, y, s }
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn spacing_adds_up_and_grows() {
        let ds = geometric_spacing(0.005, 3.0, 40);
        assert!((ds.iter().sum::<f64>() - 3.0).abs() < 1e-12);
        assert!((ds[0] - 0.005).abs() < 1e-6);
        assert!(ds.windows(2).all(|w| w[1] > w[0]));
        let uniform = geometric_spacing(1.0, 2.0, 4);
        assert!(uniform.iter().all(|d| (d - 0.5).abs() < 1e-15));
    }
}
