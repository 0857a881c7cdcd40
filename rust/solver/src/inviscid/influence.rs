//! Velocity induced by straight panels: linear-strength vortex and constant-strength source.
//!
//! Closed forms of Katz & Plotkin, *Low-Speed Aerodynamics* (2nd ed.), §10.2.1 (constant
//! source) and §10.3.2 (linear vortex), written in the panel frame and rotated to the global
//! frame. Signs used throughout the core:
//! - vortex strength γ is positive **clockwise** (the sense that gives positive lift,
//!   L' = ρU∞Γ), so on a counter-clockwise loop a positive γ is flow along −t̂, the tangent
//!   pointing from the upper trailing edge towards the leading edge;
//! - source strength σ is positive for outflow.
//!
//! For a point (x, y) in the panel frame (x along the panel from its start, y to the left),
//! with r₁, r₂ the distances to the panel ends, θ₁ = atan2(y, x), θ₂ = atan2(y, x − l),
//! Δθ = θ₂ − θ₁ and L = ln(r₁/r₂), a clockwise vortex varying linearly from γa to γb induces
//!   u = [γa (Δθ − P) + γb P] / 2π,   P = (xΔθ − yL)/l,
//!   v = −[γa (L − Q) + γb Q] / 2π,   Q = (xL − l + yΔθ)/l,
//! and a uniform source σ induces u = σL/2π, v = σΔθ/2π. On the panel itself the principal
//! value Δθ = 0 is used (the one-sided limits differ by ±π).

use std::f64::consts::PI;

const INV_2PI: f64 = 0.5 / PI;

/// Straight panels between consecutive nodes of an open polyline (the surface loop or the wake).
#[derive(Debug, Clone)]
pub(crate) struct Panels {
    /// Node abscissae.
    pub x: Vec<f64>,
    /// Node ordinates.
    pub y: Vec<f64>,
    /// Panel lengths.
    pub len: Vec<f64>,
    /// Unit tangent x-component (from node k to node k+1).
    pub tx: Vec<f64>,
    /// Unit tangent y-component.
    pub ty: Vec<f64>,
    /// Panel midpoints.
    pub mx: Vec<f64>,
    /// Panel midpoints.
    pub my: Vec<f64>,
}

impl Panels {
    /// Panels joining consecutive points (`x.len() − 1` panels). Lengths must be positive.
    pub fn new(x: &[f64], y: &[f64]) -> Self {
        let n = x.len().saturating_sub(1);
        let mut p = Panels {
            x: x.to_vec(),
            y: y.to_vec(),
            len: Vec::with_capacity(n),
            tx: Vec::with_capacity(n),
            ty: Vec::with_capacity(n),
            mx: Vec::with_capacity(n),
            my: Vec::with_capacity(n),
        };
        for k in 0..n {
            let (dx, dy) = (x[k + 1] - x[k], y[k + 1] - y[k]);
            let l = dx.hypot(dy);
            p.len.push(l);
            p.tx.push(dx / l);
            p.ty.push(dy / l);
            p.mx.push(0.5 * (x[k] + x[k + 1]));
            p.my.push(0.5 * (y[k] + y[k + 1]));
        }
        p
    }

    /// Number of panels.
    pub fn count(&self) -> usize {
        self.len.len()
    }

    /// Number of nodes.
    pub fn nodes(&self) -> usize {
        self.x.len()
    }

    /// Outward normal of panel k of a counter-clockwise loop: n = (t_y, −t_x).
    #[inline]
    pub fn normal(&self, k: usize) -> (f64, f64) {
        (self.ty[k], -self.tx[k])
    }
}

/// Scratch buffers for one evaluation point (offsets and squared distances to the nodes).
#[derive(Debug, Clone, Default)]
pub(crate) struct Scratch {
    dx: Vec<f64>,
    dy: Vec<f64>,
    r2: Vec<f64>,
}

/// Threshold below which the short series below are exact to double precision
/// (|z|¹⁷/17 < 1e-21 for |z| < 1/16).
const SERIES_LIMIT: f64 = 0.0625;

/// Angle from vector a to vector b given their cross and dot products, in (−π, π].
/// Panels far from the point subtend small angles; there atan(z) = z(1 − z²/3 + z⁴/5 − …)
/// with z = cross/dot is summed directly, which is exact to rounding and much cheaper than
/// atan2 (Abramowitz & Stegun 4.4.42).
#[inline]
fn subtended_angle(cross: f64, dot: f64) -> f64 {
    if dot > 0.0 && cross.abs() < SERIES_LIMIT * dot {
        let z = cross / dot;
        let z2 = z * z;
        let poly = 1.0
            - z2 * (1.0 / 3.0
                - z2 * (1.0 / 5.0
                    - z2 * (1.0 / 7.0
                        - z2 * (1.0 / 9.0 - z2 * (1.0 / 11.0 - z2 * (1.0 / 13.0 - z2 / 15.0))))));
        z * poly
    } else {
        cross.atan2(dot)
    }
}

/// ½·ln(a/b) for positive a, b. When a ≈ b, ½ln(a/b) = atanh(w), w = (a − b)/(a + b), summed
/// as w(1 + w²/3 + w⁴/5 + …) (Abramowitz & Stegun 4.6.22); otherwise with two logarithms.
#[inline]
fn half_log_ratio(a: f64, b: f64) -> f64 {
    let w = (a - b) / (a + b);
    if w.abs() < SERIES_LIMIT {
        let w2 = w * w;
        let poly = 1.0
            + w2 * (1.0 / 3.0
                + w2 * (1.0 / 5.0
                    + w2 * (1.0 / 7.0
                        + w2 * (1.0 / 9.0 + w2 * (1.0 / 11.0 + w2 * (1.0 / 13.0 + w2 / 15.0))))));
        w * poly
    } else {
        0.5 * (a.ln() - b.ln())
    }
}

/// Which kinds of singularity to evaluate, and the output coefficient arrays.
///
/// `vortex_u/v[j]`: velocity at the point per unit γ at node j (length = nodes).
/// `source_u/v[k]`: velocity per unit σ on panel k (length = panels).
pub(crate) struct Coefficients<'a> {
    pub vortex: Option<(&'a mut [f64], &'a mut [f64])>,
    pub source: Option<(&'a mut [f64], &'a mut [f64])>,
}

/// Velocity influence coefficients of all `panels` at point (px, py).
///
/// `on_panel` names the panel whose midpoint the point is, so its principal value is used.
/// Vortex outputs are accumulated (+=) because each node is shared by two panels; source
/// outputs are overwritten.
pub(crate) fn influence_at(
    panels: &Panels,
    px: f64,
    py: f64,
    on_panel: Option<usize>,
    scratch: &mut Scratch,
    out: Coefficients<'_>,
) {
    let nodes = panels.nodes();
    scratch.dx.resize(nodes, 0.0);
    scratch.dy.resize(nodes, 0.0);
    scratch.r2.resize(nodes, 0.0);
    for j in 0..nodes {
        let dx = px - panels.x[j];
        let dy = py - panels.y[j];
        scratch.dx[j] = dx;
        scratch.dy[j] = dy;
        scratch.r2[j] = (dx * dx + dy * dy).max(1e-300);
    }
    let Coefficients {
        mut vortex,
        mut source,
    } = out;
    if let Some((u, v)) = vortex.as_mut() {
        u.iter_mut().for_each(|c| *c = 0.0);
        v.iter_mut().for_each(|c| *c = 0.0);
    }
    let (sdx, sdy, sr2) = (&scratch.dx, &scratch.dy, &scratch.r2);
    for k in 0..panels.count() {
        let (ax, ay, bx, by) = (sdx[k], sdy[k], sdx[k + 1], sdy[k + 1]);
        let dtheta = if on_panel == Some(k) {
            0.0
        } else {
            subtended_angle(ax * by - ay * bx, ax * bx + ay * by)
        };
        let log_ratio = half_log_ratio(sr2[k], sr2[k + 1]);
        let (tx, ty) = (panels.tx[k], panels.ty[k]);
        if let Some((u, v)) = vortex.as_mut() {
            let (dx, dy) = (ax, ay);
            let xl = dx * tx + dy * ty;
            let yl = -dx * ty + dy * tx;
            let inv_l = 1.0 / panels.len[k];
            let p = (xl * dtheta - yl * log_ratio) * inv_l;
            let q = (xl * log_ratio + yl * dtheta) * inv_l - 1.0;
            let ua = (dtheta - p) * INV_2PI;
            let ub = p * INV_2PI;
            let va = -(log_ratio - q) * INV_2PI;
            let vb = -q * INV_2PI;
            // Global = u·t̂ + v·ŷ with ŷ = (−t_y, t_x).
            u[k] += ua * tx - va * ty;
            v[k] += ua * ty + va * tx;
            u[k + 1] += ub * tx - vb * ty;
            v[k + 1] += ub * ty + vb * tx;
        }
        if let Some((u, v)) = source.as_mut() {
            let us = log_ratio * INV_2PI;
            let vs = dtheta * INV_2PI;
            u[k] = us * tx - vs * ty;
            v[k] = us * ty + vs * tx;
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn series_match_library_functions() {
        for &(c, d) in &[
            (1e-3, 1.0),
            (-0.06, 1.0),
            (0.0624, 1.0),
            (0.3, 1.0),
            (1.0, -2.0),
            (-2.0, 0.5),
        ] {
            assert!(
                (subtended_angle(c, d) - f64::atan2(c, d)).abs()
                    < 2e-16 * (1.0 + f64::atan2(c, d).abs())
            );
        }
        for &(a, b) in &[
            (1.0, 1.0),
            (1.1, 1.0),
            (0.89, 1.0),
            (3.0, 0.2),
            (1e-8, 2e-8),
        ] {
            let exact = 0.5 * (f64::ln(a) - f64::ln(b));
            assert!(
                (half_log_ratio(a, b) - exact).abs() < 4e-16 * (1.0 + exact.abs()),
                "{a} {b}"
            );
        }
    }

    /// Numerical quadrature of the point-vortex / point-source kernels along a panel.
    fn quadrature(panels: &Panels, px: f64, py: f64, ga: f64, gb: f64, sigma: f64) -> (f64, f64) {
        let m = 20000;
        let (x0, y0) = (panels.x[0], panels.y[0]);
        let (tx, ty, l) = (panels.tx[0], panels.ty[0], panels.len[0]);
        let (mut u, mut v) = (0.0, 0.0);
        for i in 0..m {
            let xi = (i as f64 + 0.5) / m as f64 * l;
            let g = ga + (gb - ga) * xi / l;
            let (sx, sy) = (x0 + xi * tx, y0 + xi * ty);
            let (dx, dy) = (px - sx, py - sy);
            let r2 = dx * dx + dy * dy;
            let ds = l / m as f64;
            // clockwise vortex: u = γ dy / (2π r²), v = −γ dx / (2π r²)
            u += (g * dy + sigma * dx) / (2.0 * PI * r2) * ds;
            v += (-g * dx + sigma * dy) / (2.0 * PI * r2) * ds;
        }
        (u, v)
    }

    #[test]
    fn closed_forms_match_quadrature() {
        let panels = Panels::new(&[0.3, 0.9], &[0.1, 0.4]);
        let mut scratch = Scratch::default();
        for &(px, py) in &[(0.2, 0.7), (1.4, -0.2), (0.5, 0.1), (-0.3, -0.5)] {
            let (mut vu, mut vv) = (vec![0.0; 2], vec![0.0; 2]);
            let (mut su, mut sv) = (vec![0.0; 1], vec![0.0; 1]);
            influence_at(
                &panels,
                px,
                py,
                None,
                &mut scratch,
                Coefficients {
                    vortex: Some((&mut vu, &mut vv)),
                    source: Some((&mut su, &mut sv)),
                },
            );
            let (ga, gb, sigma) = (1.3, -0.4, 0.7);
            let u = vu[0] * ga + vu[1] * gb + su[0] * sigma;
            let v = vv[0] * ga + vv[1] * gb + sv[0] * sigma;
            let (uq, vq) = quadrature(&panels, px, py, ga, gb, sigma);
            assert!(
                (u - uq).abs() < 1e-6 && (v - vq).abs() < 1e-6,
                "{u} {uq} {v} {vq}"
            );
        }
    }
}
