//! Wake curvature: the pressure jump across a curved wake, carried by a vortex sheet on the
//! wake panels.
//!
//! Across a thin curved shear layer the normal momentum equation is ∂p/∂n = −ρu²κ, with κ the
//! curvature of the wake centreline (positive when the wake turns to the left of its direction
//! of flow, n pointing to the left). The real wake, with its lower speeds inside, sustains a
//! smaller pressure difference across it than the equivalent inviscid flow would, continued
//! through the same layer at the edge speed U; the difference is a jump in the inviscid flow,
//! p_left − p_right = ρκ∫(U² − u²)dn = ρκU²(δ* + θ), and with p + ½ρq² constant on each side a
//! jump of speed q_left − q_right = −κU(δ* + θ): a vortex sheet of that strength (clockwise
//! positive, as on the surface). This is the wake-curvature term of the second-order
//! viscous–inviscid theory (Lock & Williams, Prog. Aerospace Sci. 24, 1987, §3; from memory,
//! the derivation above is ours). At the trailing edge the pressure is continuous into the
//! wake, so the Kutta condition becomes γ₀ + γ_{N−1} = γ_w(0): the upper speed minus the lower
//! one equals the wake's jump where it starts. Behind a lifting section the wake turns towards
//! the free-stream direction (κ > 0 at positive lift), its upper side runs slower than its lower
//! side and the lift falls.

use super::transpiration::WakeOperators;
use super::{PanelSolver, Wake};
use crate::linalg::DenseMatrix;

/// Turning of the wake polyline at each node (radians, positive to the left; zero at both
/// ends): the direction of the panel after the node minus that of the panel before it.
pub fn wake_node_turning(wake: &Wake) -> Vec<f64> {
    let n = wake.len();
    let direction: Vec<f64> = (0..n.saturating_sub(1))
        .map(|k| (wake.y[k + 1] - wake.y[k]).atan2(wake.x[k + 1] - wake.x[k]))
        .collect();
    (0..n)
        .map(|j| {
            if j == 0 || j + 1 >= n {
                0.0
            } else {
                let d = direction[j] - direction[j - 1];
                // Wrapped to (−π, π].
                d.sin().atan2(d.cos())
            }
        })
        .collect()
}

/// Mean curvature of each wake panel after spreading each node's turning uniformly over a
/// window of `length` centred on the node (the part of a window ahead of the trailing edge is
/// dropped): κ̄_k = Σ_j Δφ_j·overlap(panel k, window j)/(length·Δs_k).
///
/// The inviscid streamline leaving a finite-angle trailing edge turns like √s (its curvature
/// is singular there), and the Kutta condition weighs a vortex at distance s behind the
/// trailing edge like 1/√s, so unsmoothed the sheet's effect would grow without bound as the
/// wake panels shrink. A real wake of thickness δ* + θ cannot follow turns shorter than its
/// own thickness; the window is that thickness (our choice of scale, docs/method.md).
pub fn smoothed_panel_curvature(s: &[f64], turning: &[f64], length: f64) -> Vec<f64> {
    let panels = s.len().saturating_sub(1);
    let half = 0.5 * length.max(1e-9);
    let mut kappa = vec![0.0; panels];
    for (j, &dphi) in turning.iter().enumerate() {
        if dphi == 0.0 {
            continue;
        }
        let (a, b) = (s[j] - half, s[j] + half);
        for (k, out) in kappa.iter_mut().enumerate() {
            let overlap = s[k + 1].min(b) - s[k].max(a);
            if overlap > 0.0 {
                *out += dphi * overlap / (2.0 * half);
            }
        }
    }
    for (k, out) in kappa.iter_mut().enumerate() {
        *out /= s[k + 1] - s[k];
    }
    kappa
}

impl PanelSolver {
    /// Edge-speed response to a uniform clockwise vortex sheet of unit strength on each wake
    /// panel, (N + wake nodes) × wake panels, in the signs of `edge_velocity` (surface rows the
    /// signed node speeds γ, wake rows the speed along the wake averaged over each node's cell).
    /// The surface sheet is re-solved with the wake vortex's normal velocity in the tangency
    /// rows and the first wake panel's strength on the right of the Kutta row
    /// (γ₀ + γ_{N−1} = γ_w(0), module documentation).
    pub fn wake_vorticity_influence(&self, wake: &Wake) -> DenseMatrix {
        self.wake_vorticity_influence_with(&self.wake_operators(wake))
    }

    /// [`Self::wake_vorticity_influence`] with the wake's influence data already built.
    pub fn wake_vorticity_influence_with(&self, ops: &WakeOperators) -> DenseMatrix {
        let data = &ops.data;
        let (n, nw) = (self.panels.nodes(), data.panels.count());
        let nodes = data.to_nodes.len();
        let mut out = DenseMatrix::zeros(n + nodes, nw);
        if nw == 0 {
            return out;
        }
        // Right-hand sides, one row per wake panel: −(normal velocity) at each collocation
        // point and at the interior probe. A uniform clockwise vortex panel induces the
        // velocity of the same source panel turned clockwise by 90°: (u, v)_vortex = (v, −u)_source.
        let mut rhs = DenseMatrix::zeros(nw, n + 1);
        let (wake_u, wake_v) = &ops.condition_wake_source;
        for point in self.condition_points() {
            let ((nx, ny), row_index) = (point.direction, point.row);
            let (wu, wv) = (wake_u.row(row_index), wake_v.row(row_index));
            for k in 0..nw {
                rhs.set(k, row_index, -(wv[k] * nx - wu[k] * ny));
            }
        }
        // Kutta row (index N − 1): upper minus lower trailing-edge speed = the first panel's jump.
        rhs.set(0, n - 1, 1.0);
        self.lu.solve_rows_in_place(&mut rhs);
        for k in 0..nw {
            for i in 0..n {
                out.set(i, k, rhs.get(k, i));
            }
        }
        // Wake rows: through the re-solved sheet, plus the wake panels' own tangential speed
        // (on its own panel the principal value, the mean of the two sides, is zero).
        let vortex = &ops.vortex;
        let mut direct = DenseMatrix::zeros(data.points.len(), nw);
        let (point_u, point_v) = &ops.wake_point_wake_source;
        for (p, &(_, _, own)) in data.points.iter().enumerate() {
            let (tx, ty) = (data.panels.tx[own], data.panels.ty[own]);
            let (wu, wv) = (point_u.row(p), point_v.row(p));
            for k in 0..nw {
                direct.set(p, k, tx * wv[k] - ty * wu[k]);
            }
        }
        let direct = data.to_node_rows(&direct, nw);
        for j in 0..nodes {
            for k in 0..nw {
                let through_sheet: f64 = (0..=n).map(|i| vortex.get(j, i) * rhs.get(k, i)).sum();
                out.set(n + j, k, through_sheet + direct.get(j, k));
            }
        }
        out
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn curvature_adds_up_to_the_total_turning() {
        // A circular arc of radius 2 through 0.3 rad, 7 nodes: it turns 0.05 at each of its 5
        // inner nodes, and a short window leaves κ = 1/r on the panels inside.
        let r = 2.0;
        let angles: Vec<f64> = (0..7).map(|k| 0.05 * k as f64).collect();
        let wake = Wake {
            x: angles.iter().map(|a| r * a.sin()).collect(),
            y: angles.iter().map(|a| r * (1.0 - a.cos())).collect(),
            s: angles.iter().map(|a| r * a).collect(),
        };
        let turning = wake_node_turning(&wake);
        assert!(turning[1..6].iter().all(|t| (t - 0.05).abs() < 1e-12));
        for length in [1e-6, 0.1, 0.15] {
            let kappa = smoothed_panel_curvature(&wake.s, &turning, length);
            let total: f64 = kappa
                .iter()
                .zip(wake.s.windows(2))
                .map(|(k, s)| k * (s[1] - s[0]))
                .sum();
            assert!((total - 0.25).abs() < 1e-12, "{length}: {total}");
            assert!((kappa[2] * r - 1.0).abs() < 1e-9, "{}", kappa[2]);
        }
        // A window reaching ahead of the first node drops that part of the turning.
        let kappa = smoothed_panel_curvature(&wake.s, &turning, 0.4);
        let total: f64 = kappa
            .iter()
            .zip(wake.s.windows(2))
            .map(|(k, s)| k * (s[1] - s[0]))
            .sum();
        assert!(total < 0.25 - 1e-3);
    }
}
