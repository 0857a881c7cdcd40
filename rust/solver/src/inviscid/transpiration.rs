//! Wall and wake transpiration: how surface and wake source sheets change the edge velocity.
//!
//! The displacement effect of the boundary layer and wake enters the inviscid flow as source
//! sheets of strength σ = d(uₑδ*)/dξ (Lighthill, J. Fluid Mech. 4, 1958, "equivalent sources"),
//! ξ the boundary-layer arc length running from the stagnation point towards each trailing
//! edge and along the wake. Each surface panel and each wake panel carries a uniform σ.
//!
//! **Interior control.** The unknowns are the N node strengths and the strength of the
//! interior source of `InteriorControl` (nearly zero); sources enter its rest condition too.
//! At the corners of a blunt trailing edge the inviscid speed is extrapolated from the
//! neighbours and the transpiration response is that of the re-solved sheet (q = q_inv + Δγ),
//! an affine map, so `edge_velocity + D·m` reproduces `solve_with_transpiration` exactly and
//! the diagonal of D stays positive.
//!
//! **Mass-defect unknowns.** There is one m per surface node, then one per wake node:
//! - on the surface m is *signed like γ*: mᵢ = γᵢ·δ*ᵢ (so mᵢ = uₑδ* on the upper side, where
//!   γ > 0, and −uₑδ* on the lower side). Then σ on surface panel k (nodes k, k+1) is
//!   σₖ = −(m_{k+1} − m_k)/Δs_k on both sides, with no special case at the stagnation point;
//! - on the wake m = uₑδ* ≥ 0 and σ on wake panel k is (m_{k+1} − m_k)/Δs_k; the first wake
//!   node carries the merged mass defect of both sides at the trailing edge.
//!
//! **Edge velocities.** On the surface the signed speed γᵢ (γ > 0 towards the upper trailing
//! edge); along the wake the speed uₑ = V·t̂ along the wake direction. The speed of a wake node
//! is its average over the node's cell (the halves of the panels next to it), by two-point Gauss
//! rules on each half-panel: the logarithmic singularity of uniform source panels at the node is
//! integrable, and the average sees the jump of source strength there.
//!
//! The surface rows of the influence matrix include the re-solved vortex strengths: each unit m
//! changes σ, which changes the normal-velocity right-hand side, and the vortex sheet re-adjusts
//! under the Kutta condition. With sᵢ = +1 on the upper side (γ > 0), −1 on the lower side and
//! +1 on the wake, the derivative of the unsigned speeds with respect to the unsigned mass
//! defects is ∂uₑᵢ/∂mⱼ = sᵢ·sⱼ·Dᵢⱼ.

use super::influence::{influence_at, Coefficients, Panels, Scratch};
use super::{InviscidSolution, PanelSolver, Wake};
use crate::error::{Result, SolverError};
use crate::linalg::DenseMatrix;

/// An inviscid solution with transpiration: the surface result and the wake edge speeds.
#[derive(Debug, Clone, PartialEq)]
pub struct TranspirationSolution {
    /// Surface solution (γ, Cp and integrated coefficients including the source effect).
    pub solution: InviscidSolution,
    /// Edge speed at each wake node.
    pub wake_velocity: Vec<f64>,
}

/// Influence data of a wake: panels, the points where speeds are evaluated and the weights
/// that average them over each node's cell.
pub(super) struct WakeData {
    pub(super) panels: Panels,
    /// Evaluation points on the wake panels: (x, y, panel).
    pub(super) points: Vec<(f64, f64, usize)>,
    /// For each wake node: (point, weight) pairs whose sum is the node's speed.
    pub(super) to_nodes: Vec<Vec<(usize, f64)>>,
}

/// The wake-dependent influence data of one wake, built once and shared by the inviscid edge
/// velocity, the mass-defect influence D and the wake-vorticity response of a case.
pub struct WakeOperators {
    pub(super) data: WakeData,
    /// Normal velocity at the condition points per unit σ (`source_normal_rows`).
    pub(super) normal: DenseMatrix,
    /// Wake-node tangential speed per unit surface γ and interior source (`wake_tangential_rows`).
    pub(super) vortex: DenseMatrix,
    /// Wake-node tangential speed per unit σ on each surface then wake panel.
    pub(super) source: DenseMatrix,
    /// Velocity (u, v) at each condition point (by its system row) per unit σ on each wake
    /// panel: the source-normal rows' wake part, kept for the wake-vorticity operator, whose
    /// right-hand sides need the same velocities turned by 90°.
    pub(super) condition_wake_source: (DenseMatrix, DenseMatrix),
    /// Velocity (u, v) at each wake point (`WakeData::points`) per unit σ on each wake panel,
    /// its own panel by its principal value: kept for the wake-vorticity operator likewise.
    pub(super) wake_point_wake_source: (DenseMatrix, DenseMatrix),
}

/// A point where the panel system states a condition on the normal velocity (see
/// `PanelSolver::condition_points`).
pub(super) struct ConditionPoint {
    pub(super) x: f64,
    pub(super) y: f64,
    /// The velocity component the condition sets (the outward normal, or the probe direction).
    pub(super) direction: (f64, f64),
    /// The panel the point lies on (its principal value is used there).
    pub(super) on_panel: Option<usize>,
    /// Row of the system.
    pub(super) row: usize,
}

/// Gauss–Legendre abscissae of the two-point rule on [0, 1] (weights ½ each).
const GAUSS_TWO_POINT: [f64; 2] = [0.211_324_865_405_187_1, 0.788_675_134_594_812_9];

impl WakeData {
    /// Wake panels, and each node's speed as the average over its cell — the halves of the two
    /// panels next to it (one at the ends) — by two-point Gauss rules on each half-panel.
    ///
    /// Averaged over a cell, the tangential speed of uniform-strength source panels sees the
    /// jump of strength at the node (its logarithmic singularity is integrable); the midpoint
    /// values did not, so an odd–even pattern of the wake mass defect hardly changed them and the
    /// coupled solution carried it undamped behind the trailing edge (docs/validation.md). A wake
    /// of fewer than two nodes has no panels and zero speeds.
    pub(super) fn new(wake: &Wake) -> Self {
        let n = wake.x.len().min(wake.y.len()).min(wake.s.len());
        let panels = Panels::new(&wake.x[..n], &wake.y[..n]);
        let count = n.saturating_sub(1);
        let mut points = Vec::with_capacity(4 * count);
        // Points of panel k: first half (toward node k), then second half (toward node k + 1).
        for k in 0..count {
            for half in 0..2 {
                for g in GAUSS_TWO_POINT {
                    let t = 0.5 * (half as f64 + g);
                    let x = wake.x[k] + t * (wake.x[k + 1] - wake.x[k]);
                    let y = wake.y[k] + t * (wake.y[k + 1] - wake.y[k]);
                    points.push((x, y, k));
                }
            }
        }
        let half_length = |k: usize| 0.5 * (wake.s[k + 1] - wake.s[k]);
        let to_nodes = (0..n)
            .map(|i| {
                // (panel, half) pairs of node i's cell, each with its half-panel length.
                let mut parts = Vec::with_capacity(2);
                if i >= 1 && i - 1 < count {
                    parts.push((i - 1, 1, half_length(i - 1)));
                }
                if i < count {
                    parts.push((i, 0, half_length(i)));
                }
                let cell: f64 = parts.iter().map(|p| p.2).sum();
                parts
                    .iter()
                    .flat_map(|&(k, half, length)| {
                        (0..2).map(move |g| (4 * k + 2 * half + g, 0.5 * length / cell))
                    })
                    .collect()
            })
            .collect();
        WakeData {
            panels,
            points,
            to_nodes,
        }
    }

    /// Node values from values at the evaluation points.
    fn to_node_values(&self, point_values: &[f64]) -> Vec<f64> {
        self.to_nodes
            .iter()
            .map(|parts| parts.iter().map(|&(p, w)| w * point_values[p]).sum())
            .collect()
    }

    /// Node rows from rows at the evaluation points (a row per node, same columns).
    pub(super) fn to_node_rows(&self, point_rows: &DenseMatrix, columns: usize) -> DenseMatrix {
        let mut rows = DenseMatrix::zeros(self.to_nodes.len(), columns);
        for (i, parts) in self.to_nodes.iter().enumerate() {
            let out = rows.row_mut(i);
            for &(p, w) in parts {
                for (o, v) in out.iter_mut().zip(point_rows.row(p)) {
                    *o += w * v;
                }
            }
        }
        rows
    }
}

impl PanelSolver {
    /// Surface speeds with transpiration: the inviscid speeds at `alpha_deg` plus the change of
    /// the node sheet strengths that the sources cause (identical to the sheet strengths except
    /// at the extrapolated corners of a blunt trailing edge).
    fn transpired_speed(&self, alpha_deg: f64, sheet: &[f64]) -> Vec<f64> {
        let inviscid_sheet = self.sheet_at(alpha_deg);
        let inviscid = self.surface_speed(&inviscid_sheet);
        inviscid
            .iter()
            .zip(sheet.iter().zip(&inviscid_sheet))
            .map(|(q, (total, base))| q + (total - base))
            .collect()
    }

    /// The points where the panel system states its conditions, with the row of each: tangency
    /// at the panel midpoints (rows 0..N − 1, on their own panel), then the interior rest
    /// condition at its probe (row N) when it is active. Row N − 1, the Kutta condition, has no
    /// point.
    pub(super) fn condition_points(&self) -> Vec<ConditionPoint> {
        let (n, np) = (self.panels.nodes(), self.panels.count());
        let control = self.interior();
        let mut points: Vec<ConditionPoint> = (0..np)
            .map(|i| ConditionPoint {
                x: self.panels.mx[i],
                y: self.panels.my[i],
                direction: self.panels.normal(i),
                on_panel: Some(i),
                row: i,
            })
            .collect();
        if control.active {
            points.push(ConditionPoint {
                x: control.probe.0,
                y: control.probe.1,
                direction: control.direction,
                on_panel: None,
                row: n,
            });
        }
        points
    }

    /// Normal velocity at each surface collocation point per unit σ on every surface panel and
    /// then every wake panel (rows: N; the Kutta row is zero). The self term is the one-sided
    /// value −σ/2 on the fluid-free inner side, which keeps the interior at rest.
    /// Also returns the velocities (u, v) per unit σ of each wake panel at each condition point.
    fn source_normal_rows(&self, wake: &WakeData) -> (DenseMatrix, (DenseMatrix, DenseMatrix)) {
        let (n, np, nw) = (
            self.panels.nodes(),
            self.panels.count(),
            wake.panels.count(),
        );
        let mut rows = DenseMatrix::zeros(n + 1, np + nw);
        let mut scratch = Scratch::default();
        let body = self.surface_source_normal.get_or_init(|| {
            let mut body = DenseMatrix::zeros(n + 1, np);
            let (mut su, mut sv) = (vec![0.0; np], vec![0.0; np]);
            for point in self.condition_points() {
                let on_body = Coefficients {
                    vortex: None,
                    source: Some((&mut su, &mut sv)),
                };
                influence_at(
                    &self.panels,
                    point.x,
                    point.y,
                    point.on_panel,
                    &mut scratch,
                    on_body,
                );
                let (nx, ny) = point.direction;
                let row = body.row_mut(point.row);
                for k in 0..np {
                    row[k] = su[k] * nx + sv[k] * ny;
                }
                if let Some(i) = point.on_panel {
                    row[i] -= 0.5;
                }
            }
            body
        });
        let mut wake_u = DenseMatrix::zeros(n + 1, nw);
        let mut wake_v = DenseMatrix::zeros(n + 1, nw);
        for point in self.condition_points() {
            let ConditionPoint {
                x: px,
                y: py,
                direction: (nx, ny),
                row: row_index,
                ..
            } = point;
            let (wu, wv) = (wake_u.row_mut(row_index), wake_v.row_mut(row_index));
            let on_wake = Coefficients {
                vortex: None,
                source: Some((wu, wv)),
            };
            influence_at(&wake.panels, px, py, None, &mut scratch, on_wake);
            let (wu, wv) = (wake_u.row(row_index), wake_v.row(row_index));
            let row = rows.row_mut(row_index);
            row[..np].copy_from_slice(body.row(row_index));
            for k in 0..nw {
                row[np + k] = wu[k] * nx + wv[k] * ny;
            }
        }
        (rows, (wake_u, wake_v))
    }

    /// Tangential velocity (along the wake panel) at each wake node, averaged over its cell, per
    /// unit γ at each surface node (`vortex`, Nw_nodes × (N + 1)) and per unit σ on each surface
    /// then wake panel (`source`, Nw_nodes × (Np + Nw)).
    /// Also returns the velocities (u, v) per unit σ of each wake panel at each wake point.
    pub(super) fn wake_tangential_rows(
        &self,
        wake: &WakeData,
    ) -> (DenseMatrix, DenseMatrix, (DenseMatrix, DenseMatrix)) {
        let (n, np, nw) = (
            self.panels.nodes(),
            self.panels.count(),
            wake.panels.count(),
        );
        let count = wake.points.len();
        let mut vortex = DenseMatrix::zeros(count, n + 1);
        let mut source = DenseMatrix::zeros(count, np + nw);
        let mut scratch = Scratch::default();
        let (mut vu, mut vv) = (vec![0.0; n], vec![0.0; n]);
        let (mut su, mut sv) = (vec![0.0; np], vec![0.0; np]);
        let mut wake_u = DenseMatrix::zeros(count, nw);
        let mut wake_v = DenseMatrix::zeros(count, nw);
        for (p, &(px, py, k)) in wake.points.iter().enumerate() {
            let (tx, ty) = (wake.panels.tx[k], wake.panels.ty[k]);
            let body = Coefficients {
                vortex: Some((&mut vu, &mut vv)),
                source: Some((&mut su, &mut sv)),
            };
            influence_at(&self.panels, px, py, None, &mut scratch, body);
            let own = Coefficients {
                vortex: None,
                source: Some((wake_u.row_mut(p), wake_v.row_mut(p))),
            };
            influence_at(&wake.panels, px, py, Some(k), &mut scratch, own);
            let (wu, wv) = (wake_u.row(p), wake_v.row(p));
            for j in 0..n {
                vortex.set(p, j, vu[j] * tx + vv[j] * ty);
            }
            let (qu, qv) = self.interior().source_velocity(px, py);
            vortex.set(p, n, qu * tx + qv * ty);
            let row = source.row_mut(p);
            for j in 0..np {
                row[j] = su[j] * tx + sv[j] * ty;
            }
            for j in 0..nw {
                row[np + j] = wu[j] * tx + wv[j] * ty;
            }
        }
        (
            wake.to_node_rows(&vortex, n + 1),
            wake.to_node_rows(&source, np + nw),
            (wake_u, wake_v),
        )
    }

    /// Free-stream tangential component at each wake node, averaged over its cell.
    fn wake_free_stream(&self, wake: &WakeData, alpha_deg: f64) -> Vec<f64> {
        let (s, c) = alpha_deg.to_radians().sin_cos();
        let at_points: Vec<f64> = wake
            .points
            .iter()
            .map(|&(_, _, k)| c * wake.panels.tx[k] + s * wake.panels.ty[k])
            .collect();
        wake.to_node_values(&at_points)
    }

    /// Source strengths on the surface panels and on the wake panels from the mass defects m
    /// (surface nodes then wake nodes, signed as in the module documentation).
    pub fn sources_from_mass_defect(
        &self,
        wake: &Wake,
        mass_defect: &[f64],
    ) -> Result<(Vec<f64>, Vec<f64>)> {
        let n = self.panels.nodes();
        if mass_defect.len() != n + wake.len() {
            return Err(SolverError::input(format!(
                "mass defect needs {} values (surface nodes + wake nodes), got {}",
                n + wake.len(),
                mass_defect.len()
            )));
        }
        let (ms, mw) = mass_defect.split_at(n);
        let surface = (0..n - 1)
            .map(|k| -(ms[k + 1] - ms[k]) / self.panels.len[k])
            .collect();
        let wake_sigma = (0..wake.len().saturating_sub(1))
            .map(|k| (mw[k + 1] - mw[k]) / (wake.s[k + 1] - wake.s[k]))
            .collect();
        Ok((surface, wake_sigma))
    }

    /// The influence data of `wake` ([`WakeOperators`]), for the `*_with` entries below.
    pub fn wake_operators(&self, wake: &Wake) -> WakeOperators {
        let data = WakeData::new(wake);
        let (normal, condition_wake_source) = self.source_normal_rows(&data);
        let (vortex, source, wake_point_wake_source) = self.wake_tangential_rows(&data);
        WakeOperators {
            data,
            normal,
            vortex,
            source,
            condition_wake_source,
            wake_point_wake_source,
        }
    }

    /// Inviscid edge velocity for `alpha_deg`: the signed surface speeds γ at the surface nodes,
    /// then the speed along the wake at the wake nodes (no transpiration).
    pub fn edge_velocity(&self, alpha_deg: f64, wake: &Wake) -> Vec<f64> {
        self.edge_velocity_with(alpha_deg, &self.wake_operators(wake))
    }

    /// [`Self::edge_velocity`] with the wake's influence data already built.
    pub fn edge_velocity_with(&self, alpha_deg: f64, ops: &WakeOperators) -> Vec<f64> {
        let zeros_surface = vec![0.0; self.panels.count()];
        let zeros_wake = vec![0.0; ops.data.panels.count()];
        match self.transpiration_with(alpha_deg, ops, &zeros_surface, &zeros_wake) {
            Ok(t) => t
                .solution
                .gamma
                .into_iter()
                .chain(t.wake_velocity)
                .collect(),
            Err(_) => unreachable!("source arrays are sized from the wake itself"),
        }
    }

    /// Direct solve with given source strengths on the surface panels (`surface_sigma`, one per
    /// panel, N − 1) and the wake panels (`wake_sigma`, one per wake panel). The vortex sheet is
    /// re-solved under the Kutta condition with the sources in the tangency right-hand side.
    pub fn solve_with_transpiration(
        &self,
        alpha_deg: f64,
        wake: &Wake,
        surface_sigma: &[f64],
        wake_sigma: &[f64],
    ) -> Result<TranspirationSolution> {
        let ops = self.wake_operators(wake);
        self.transpiration_with(alpha_deg, &ops, surface_sigma, wake_sigma)
    }

    /// [`Self::solve_with_transpiration`] with the wake's influence data already built.
    fn transpiration_with(
        &self,
        alpha_deg: f64,
        ops: &WakeOperators,
        surface_sigma: &[f64],
        wake_sigma: &[f64],
    ) -> Result<TranspirationSolution> {
        let data = &ops.data;
        let (n, np, nw) = (
            self.panels.nodes(),
            self.panels.count(),
            data.panels.count(),
        );
        if surface_sigma.len() != np || wake_sigma.len() != nw {
            return Err(SolverError::input(format!(
                "transpiration needs {np} surface and {nw} wake source strengths, got {} and {}",
                surface_sigma.len(),
                wake_sigma.len()
            )));
        }
        let sigma: Vec<f64> = surface_sigma.iter().chain(wake_sigma).copied().collect();
        let normal = ops.normal.matvec(&sigma);
        let (s, c) = alpha_deg.to_radians().sin_cos();
        let direction = self.interior().direction;
        let mut rhs: Vec<f64> = (0..=n)
            .map(|i| {
                if i < np {
                    let (nx, ny) = self.panels.normal(i);
                    -(c * nx + s * ny) - normal[i]
                } else if i == n && self.interior().active {
                    -(c * direction.0 + s * direction.1) - normal[n]
                } else {
                    0.0
                }
            })
            .collect();
        self.lu.solve_in_place(&mut rhs);
        let sheet = rhs;
        let free = self.wake_free_stream(data, alpha_deg);
        let induced_v = ops.vortex.matvec(&sheet);
        let induced_s = ops.source.matvec(&sigma);
        let wake_velocity = (0..data.to_nodes.len())
            .map(|k| free[k] + induced_v[k] + induced_s[k])
            .collect();
        Ok(TranspirationSolution {
            solution: self.solution_from(alpha_deg, 0.0, self.transpired_speed(alpha_deg, &sheet)),
            wake_velocity,
        })
    }

    /// Mass-defect influence matrix D, (N + Nw)²: `D[i][j]` = ∂(edge velocity i)/∂(m_j), surface
    /// nodes then wake nodes, with the signs of the module documentation. The edge velocity
    /// with displacement is `edge_velocity(α, wake) + D·m`. It does not depend on α except
    /// through the wake geometry.
    pub fn mass_defect_influence(&self, wake: &Wake) -> DenseMatrix {
        self.mass_defect_influence_with(wake, &self.wake_operators(wake))
    }

    /// [`Self::mass_defect_influence`] with the wake's influence data (`ops`, of `wake`)
    /// already built.
    pub fn mass_defect_influence_with(&self, wake: &Wake, ops: &WakeOperators) -> DenseMatrix {
        let data = &ops.data;
        let (n, np, nw_nodes) = (
            self.panels.nodes(),
            self.panels.count(),
            data.to_nodes.len(),
        );
        let nw = data.panels.count();
        let total = n + nw_nodes;
        let normal = &ops.normal;
        // dσ/dm as sparse columns: column j touches at most two panels.
        let column = |j: usize| -> [(usize, f64); 2] {
            if j < n {
                let before = if j >= 1 {
                    (j - 1, -1.0 / self.panels.len[j - 1])
                } else {
                    (0, 0.0)
                };
                let after = if j < np {
                    (j, 1.0 / self.panels.len[j])
                } else {
                    (0, 0.0)
                };
                [before, after]
            } else {
                let w = j - n;
                let ds = |k: usize| wake.s[k + 1] - wake.s[k];
                let before = if w >= 1 {
                    (np + w - 1, 1.0 / ds(w - 1))
                } else {
                    (0, 0.0)
                };
                let after = if w < nw {
                    (np + w, -1.0 / ds(w))
                } else {
                    (0, 0.0)
                };
                [before, after]
            }
        };
        // Unknowns: d(sheet, Q)/dm = −A⁻¹·(B·S), one LU solve per column.
        // The surface columns do not depend on the wake (a surface source's normal velocity on
        // the surface is fixed by the body alone): solved once per section and kept.
        let unknowns = n + 1;
        let response = |j: usize| {
            let mut rhs = vec![0.0; unknowns];
            for (k, w) in column(j) {
                if w != 0.0 {
                    for i in 0..unknowns {
                        rhs[i] -= normal.get(i, k) * w;
                    }
                }
            }
            self.lu.solve_in_place(&mut rhs);
            rhs
        };
        let surface = self.surface_mass_response.get_or_init(|| {
            let mut columns = DenseMatrix::zeros(n, unknowns);
            for j in 0..n {
                columns.row_mut(j).copy_from_slice(&response(j));
            }
            columns
        });
        // The wake columns' right-hand sides, one per row, solved together.
        let mut wake_responses = DenseMatrix::zeros(total - n, unknowns);
        for j in n..total {
            let rhs = wake_responses.row_mut(j - n);
            for (k, w) in column(j) {
                if w != 0.0 {
                    for (i, r) in rhs.iter_mut().enumerate() {
                        *r -= normal.get(i, k) * w;
                    }
                }
            }
        }
        self.lu.solve_rows_in_place(&mut wake_responses);
        let mut d_gamma = DenseMatrix::zeros(unknowns, total);
        for j in 0..total {
            let values = if j < n {
                surface.row(j)
            } else {
                wake_responses.row(j - n)
            };
            for (i, &v) in values.iter().enumerate() {
                d_gamma.set(i, j, v);
            }
        }
        // Wake rows (node cell averages): vortex part through d(sheet)/dm plus the direct source
        // part.
        let (vortex, source) = (&ops.vortex, &ops.source);
        let mut d = DenseMatrix::zeros(total, total);
        for k in 0..nw_nodes {
            if nw == 0 {
                break;
            }
            let vrow = vortex.row(k);
            let out = d.row_mut(n + k);
            for i in 0..unknowns {
                let a = vrow[i];
                if a != 0.0 {
                    for (o, g) in out.iter_mut().zip(d_gamma.row(i)) {
                        *o += a * g;
                    }
                }
            }
            for (j, o) in out.iter_mut().enumerate() {
                for (p, w) in column(j) {
                    if w != 0.0 {
                        *o += source.get(k, p) * w;
                    }
                }
            }
        }
        // Surface rows: the node sheet strengths are the surface speeds.
        for i in 0..n {
            d.row_mut(i).copy_from_slice(d_gamma.row(i));
        }
        d
    }
}
