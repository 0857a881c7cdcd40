//! The wake-curvature sheet in the Newton iteration: its speeds are evaluated at the current
//! iterate and added to the inviscid ones before each iteration's residuals.
//!
//! The sheet's strength γ_k = c_k(f_k + f_{k+1}), f = m + ue·θ at the wake nodes, enters the
//! Jacobian through its mass defects (∂f/∂m = 1, folded into the influence matrix the step is
//! solved with); its dependence on θ, on the edge speeds and on the smoothing length is left
//! out (second order in the layer thickness, docs/method.md "Wake curvature"), so the
//! iteration converges a little slower than quadratically, and a converged solution satisfies
//! the equations with the sheet at its own final state.

use super::layout::Layout;
use super::{CoupledProblem, Unknowns};

impl CoupledProblem<'_> {
    /// Re-evaluates the wake-curvature speeds for `unknowns` and applies them to `layout` (and
    /// to the layouts built after it); with `jacobian`, also the influence matrix a new
    /// factorisation is made with (a chord step reuses the old one). No-op when wake curvature
    /// is not modelled.
    pub(super) fn update_curvature_speeds(
        &self,
        layout: &mut Layout,
        unknowns: &Unknowns,
        induced: &[f64],
        jacobian: bool,
    ) {
        let case = self.case;
        if !self.models_wake_curvature() || layout.wake.is_empty() {
            return;
        }
        let ue = layout.edge_speeds_with_induced(induced);
        // ue(δ* + θ) = m + ue θ at each wake node; the merged trailing-edge node sums both sides.
        let flux = |k: usize| unknowns.m[k] + ue[k] * unknowns.ln_theta[k].exp();
        let [upper, lower] = layout.trailing_edges();
        let defect_flux: Vec<f64> = std::iter::once(flux(upper) + flux(lower))
            .chain(layout.wake.clone().map(flux))
            .collect();
        let te_speed = 0.5 * (ue[upper] + ue[lower]);
        let coefficients = case.curvature_coefficients(&defect_flux, te_speed);
        let (offset, slopes) = case.curvature_sheet(&coefficients, &defect_flux);
        layout.set_speed_offset(case, &offset);
        self.speed_offset.replace(offset);
        if !jacobian {
            return;
        }
        // ∂ue_i/∂m_j of the sheet: station j's wake node w(j) appears in panels w − 1 and w.
        let stag = layout.split.stagnation.node;
        let ns = case.n_surface;
        let mut jacobian = (*layout.influence).clone();
        let columns: Vec<(usize, usize)> = [(upper, 0), (lower, 0)]
            .into_iter()
            .chain(layout.wake.clone().map(|k| (k, layout.nodes[k] - ns)))
            .collect();
        for (i, &node_i) in layout.nodes.iter().enumerate() {
            let sign = case.edge_sign(node_i, stag);
            let response = case.wake_vorticity.row(node_i);
            let row = jacobian.row_mut(i);
            for &(j, w) in &columns {
                let mut d = 0.0;
                if w >= 1 {
                    d += response[w - 1] * slopes[w - 1];
                }
                if w < slopes.len() {
                    d += response[w] * slopes[w];
                }
                row[j] += sign * d;
            }
        }
        layout.jacobian_influence = Some(jacobian);
    }
}
