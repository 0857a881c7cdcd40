//! The inviscid side of the interaction for one section and angle: node geometry, inviscid
//! edge speeds and the mass-defect influence matrix, in the sign convention the coupling uses.
//!
//! Convention: surface speeds `q` are the panel method's γ, positive for flow running towards
//! the upper trailing edge (decreasing node index), wake speeds positive downstream; the mass
//! defect `m = ue δ*` is carried as a non-negative boundary-layer quantity on every node. This
//! module is the only place that converts it to the panel method's signed mass defect.

use crate::error::Result;
use crate::geometry::Section;
use crate::inviscid::PanelSolver;
use crate::linalg::DenseMatrix;

use super::settings::ViscousSettings;

/// The panel solver of one re-panelled section, shared by every angle of a sweep.
pub(crate) struct SectionModel {
    pub solver: PanelSolver,
}

impl SectionModel {
    /// Re-panel the section to the requested panel count (0: keep its points) and factorise
    /// its panel system.
    pub fn new(section: &Section, settings: &ViscousSettings) -> Result<Self> {
        let solver = if settings.panels == 0 {
            PanelSolver::new(section)?
        } else {
            PanelSolver::new(&crate::geometry::paneling::repanel(
                section,
                settings.panels,
            )?)?
        };
        Ok(SectionModel { solver })
    }
}

/// Everything the outer iteration needs at one angle of attack.
pub(crate) struct CaseModel {
    /// Angle of attack, degrees.
    pub alpha_deg: f64,
    /// Surface node count.
    pub n_surface: usize,
    /// Node coordinates: surface nodes, then wake nodes.
    pub x: Vec<f64>,
    /// Node coordinates: surface nodes, then wake nodes.
    pub y: Vec<f64>,
    /// Arc length of the surface nodes along the contour from the upper trailing edge.
    pub arc: Vec<f64>,
    /// Arc length of the wake nodes from the trailing edge.
    pub wake_s: Vec<f64>,
    /// Inviscid speeds (convention above), surface then wake.
    pub q_inviscid: Vec<f64>,
    /// ∂q_i/∂m_j with both in the convention above (sign-adjusted from the panel method's).
    pub influence: DenseMatrix,
}

impl CaseModel {
    /// Build the case: wake along the inviscid streamline, inviscid speeds, influence matrix.
    pub fn new(section: &SectionModel, alpha_deg: f64, settings: &ViscousSettings) -> Result<Self> {
        let solver = &section.solver;
        let wake = solver.wake(
            alpha_deg,
            settings.wake_length_chords,
            settings.wake_node_count(),
        );
        let n_surface = solver.node_x().len();
        let mut x = solver.node_x().to_vec();
        let mut y = solver.node_y().to_vec();
        x.extend_from_slice(&wake.x);
        y.extend_from_slice(&wake.y);
        let q_inviscid = solver.edge_velocity(alpha_deg, &wake);
        let influence = solver.mass_defect_influence(&wake);
        Ok(CaseModel {
            alpha_deg,
            n_surface,
            x,
            y,
            arc: solver.arc_length().to_vec(),
            wake_s: wake.s.clone(),
            q_inviscid,
            influence,
        })
    }

    /// Total node count, surface and wake.
    pub fn n_total(&self) -> usize {
        self.x.len()
    }
}

impl CaseModel {
    /// Sign that turns the boundary-layer mass defect of `node` into the panel method's source
    /// variable, given the last upper-side node `stagnation_node`: the panel method carries the
    /// surface mass defect signed like γ (m = γδ*), negative on the lower side, and the wake's
    /// as uₑδ* (see `inviscid::transpiration`), so the sign is the same as [`Self::edge_sign`].
    #[inline]
    fn column_sign(&self, node: usize, stagnation_node: usize) -> f64 {
        self.edge_sign(node, stagnation_node)
    }

    /// Sign that turns the coupling's speed `q` of `node` into the boundary layer's edge speed
    /// (positive downstream on both sides and in the wake).
    #[inline]
    pub fn edge_sign(&self, node: usize, stagnation_node: usize) -> f64 {
        if node < self.n_surface && node > stagnation_node {
            -1.0
        } else {
            1.0
        }
    }

    /// Speeds `q` (coupling convention) induced by the mass defect `m` (boundary-layer sense)
    /// on top of the inviscid ones: q = q_inv + D·m.
    pub fn speeds(&self, m: &[f64], stagnation_node: usize) -> Vec<f64> {
        let signed: Vec<f64> = m
            .iter()
            .enumerate()
            .map(|(j, &v)| v * self.column_sign(j, stagnation_node))
            .collect();
        let induced = self.influence.matvec(&signed);
        self.q_inviscid
            .iter()
            .zip(induced)
            .map(|(a, b)| a + b)
            .collect()
    }

    /// ∂ue_i/∂m_j in boundary-layer signs.
    pub fn influence_between(&self, i: usize, j: usize, stagnation_node: usize) -> f64 {
        self.edge_sign(i, stagnation_node)
            * self.influence.get(i, j)
            * self.column_sign(j, stagnation_node)
    }

    /// ∂ue_i/∂m_i in boundary-layer signs: the coefficient of the quasi-simultaneous law.
    ///
    /// At the two trailing-edge nodes the first wake node is added: its mass defect is the sum
    /// of the two trailing-edge ones (continuity, see `iteration::trailing_edge_speed`), so it
    /// moves with them.
    pub fn self_influence(&self, node: usize, stagnation_node: usize) -> f64 {
        let own = self.influence_between(node, node, stagnation_node);
        let trailing_edge = node == 0 || node + 1 == self.n_surface;
        if trailing_edge && self.n_total() > self.n_surface {
            own + self.influence_between(node, self.n_surface, stagnation_node)
        } else {
            own
        }
    }
}
