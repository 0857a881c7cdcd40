//! The inviscid side of the interaction for one section and angle: node geometry, inviscid
//! edge speeds and the mass-defect influence matrix, in the sign convention the coupling uses.
//!
//! Convention: surface speeds `q` are the panel method's γ, positive for flow running towards
//! the upper trailing edge (decreasing node index), wake speeds positive downstream; the mass
//! defect `m = ue δ*` is carried as a non-negative boundary-layer quantity on every node. This
//! module is the only place that converts it to the panel method's signed mass defect.

use crate::error::Result;
use crate::geometry::Section;
use crate::inviscid::{smoothed_panel_curvature, wake_node_turning, PanelSolver};
use crate::linalg::DenseMatrix;

use super::memo::QuasiSimultaneousMemo;
use super::settings::ViscousSettings;
use std::sync::{Arc, Mutex};

/// Level at which the speed jump of the wake-curvature sheet saturates, in free-stream units.
/// The thin-layer theory behind it needs κ(δ* + θ) ≪ 1; attached cases stay near 0.01–0.02
/// (NACA 0012 tripped at 8°, Re 6e6: 0.016, where the saturation lowers the jump by 0.9 %; a
/// thick low-Reynolds-number wake reaches 0.05), and the bound keeps a wild first iterate (an
/// edge speed near zero at the trailing edge, a layer of a tenth of the chord) from inducing
/// speeds of order one.
pub const MAX_CURVATURE_JUMP: f64 = 0.1;

/// Panel counts above which a case first gets its iterate from the same section at
/// [`COARSE_PANELS`] (nested iteration, `attempts::coarse_start`).
pub(crate) const COARSE_START_ABOVE: usize = 200;
/// Panel count of that coarse model.
pub(crate) const COARSE_PANELS: usize = 160;

/// Most angles whose cases a section keeps ([`SectionModel::case`]; about 0.4 MB each at 160
/// panels, 1.3 MB at 320): past it, further cases are built and not kept.
const MAX_KEPT_CASES: usize = 96;

/// What a case depends on besides the section: the angle and the wake's settings.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
struct CaseKey {
    alpha_bits: u64,
    wake_length_bits: u64,
    wake_nodes: usize,
    wake_curvature: bool,
}

impl CaseKey {
    fn new(alpha_deg: f64, settings: &ViscousSettings) -> Self {
        CaseKey {
            alpha_bits: alpha_deg.to_bits(),
            wake_length_bits: settings.wake_length_chords.to_bits(),
            wake_nodes: settings.wake_node_count(),
            wake_curvature: settings.wake_curvature,
        }
    }
}

/// The panel solver of one re-panelled section, shared by every angle of a sweep (and by every
/// flow condition of a batch at the same panel count: nothing in it depends on the Reynolds
/// number, the transition settings or the Mach number).
pub(crate) struct SectionModel {
    pub solver: PanelSolver,
    /// The same section at [`COARSE_PANELS`] panels when the requested count exceeds
    /// [`COARSE_START_ABOVE`] (its settings: [`coarse_settings`]).
    pub coarse: Option<Box<SectionModel>>,
    /// The quasi-simultaneous runs already made on this section, shared with its cases.
    pub memo: Arc<QuasiSimultaneousMemo>,
    /// The cases built so far ([`SectionModel::case`]).
    cases: Mutex<Vec<(CaseKey, Arc<CaseModel>)>>,
}

/// The settings of the coarse model's cases for a fine case's `settings`.
pub(crate) fn coarse_settings(settings: &ViscousSettings) -> ViscousSettings {
    ViscousSettings {
        panels: COARSE_PANELS,
        wake_nodes: None,
        ..settings.clone()
    }
}

impl SectionModel {
    /// Re-panel the section to the requested panel count (0: keep its points) and factorise
    /// its panel system (and that of the coarse model, where one is used).
    pub fn new(section: &Section, settings: &ViscousSettings) -> Result<Self> {
        let solver = if settings.panels == 0 {
            PanelSolver::new(section)?
        } else {
            PanelSolver::new(&crate::geometry::paneling::repanel(
                section,
                settings.panels,
            )?)?
        };
        let coarse = if settings.panels > COARSE_START_ABOVE {
            // (A section the coarse panelling cannot represent simply goes without.)
            SectionModel::new(section, &coarse_settings(settings))
                .ok()
                .map(Box::new)
        } else {
            None
        };
        Ok(SectionModel {
            solver,
            coarse,
            memo: Arc::default(),
            cases: Mutex::default(),
        })
    }

    /// The case at `alpha_deg` ([`CaseModel::new`]), built once per angle and wake settings
    /// and then shared: a failing angle is attempted many times (continuation, repair, the
    /// first-order-wake pass), and a batch's flow conditions share the section's angles.
    pub fn case(&self, alpha_deg: f64, settings: &ViscousSettings) -> Result<Arc<CaseModel>> {
        let key = CaseKey::new(alpha_deg, settings);
        let kept = |cases: &[(CaseKey, Arc<CaseModel>)]| {
            cases
                .iter()
                .find(|(k, _)| *k == key)
                .map(|(_, c)| Arc::clone(c))
        };
        if let Some(case) = self.cases.lock().ok().and_then(|cases| kept(&cases)) {
            return Ok(case);
        }
        let case = Arc::new(CaseModel::new(self, alpha_deg, settings)?);
        if let Ok(mut cases) = self.cases.lock() {
            if let Some(other) = kept(&cases) {
                // (Built meanwhile by another thread: the same case.)
                return Ok(other);
            }
            if cases.len() < MAX_KEPT_CASES {
                cases.push((key, Arc::clone(&case)));
            }
        }
        Ok(case)
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
    /// ∂q_i/∂γ_k: speeds (convention above) per unit clockwise vortex strength on wake panel k
    /// (`inviscid::wake_vorticity`). Empty columns when wake curvature is not modelled.
    pub wake_vorticity: DenseMatrix,
    /// Turning of the wake at each wake node (positive to the left); empty when wake curvature
    /// is not modelled.
    pub wake_turning: Vec<f64>,
    /// The section's quasi-simultaneous runs ([`SectionModel::memo`]).
    pub memo: Arc<QuasiSimultaneousMemo>,
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
        // One set of wake influence data for the three operators of the case.
        let ops = solver.wake_operators(&wake);
        let q_inviscid = solver.edge_velocity_with(alpha_deg, &ops);
        let influence = solver.mass_defect_influence_with(&wake, &ops);
        let (wake_vorticity, wake_turning) = if settings.wake_curvature {
            (
                solver.wake_vorticity_influence_with(&ops),
                wake_node_turning(&wake),
            )
        } else {
            (DenseMatrix::zeros(x.len(), 0), Vec::new())
        };
        Ok(CaseModel {
            alpha_deg,
            n_surface,
            x,
            y,
            arc: solver.arc_length().to_vec(),
            wake_s: wake.s.clone(),
            q_inviscid,
            influence,
            wake_vorticity,
            wake_turning,
            memo: Arc::clone(&section.memo),
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
        self.speeds_from(m, stagnation_node, 0)
    }

    /// The speeds of [`Self::speeds`] of the nodes from `first_node` on only (the same bits).
    pub fn speeds_from(&self, m: &[f64], stagnation_node: usize, first_node: usize) -> Vec<f64> {
        let signed: Vec<f64> = m
            .iter()
            .enumerate()
            .map(|(j, &v)| v * self.column_sign(j, stagnation_node))
            .collect();
        let induced = self
            .influence
            .matvec_rows(&signed, first_node..self.influence.rows);
        self.q_inviscid[first_node..]
            .iter()
            .zip(induced)
            .map(|(a, b)| a + b)
            .collect()
    }

    /// Coefficients c_k of the wake-curvature vortex sheet, γ_k = c_k·(f_k + f_{k+1}), for a
    /// wake whose nodes carry `defect_flux` f = ue(δ* + θ) (the merged trailing-edge node
    /// first): c_k = −½κ̄_k, the curvature of panel k smoothed over the trailing-edge thickness
    /// δ* + θ = f₀/ue_TE (`inviscid::wake_vorticity`). Empty when wake curvature is not modelled.
    pub fn curvature_coefficients(
        &self,
        defect_flux: &[f64],
        trailing_edge_speed: f64,
    ) -> Vec<f64> {
        if self.wake_turning.len() < 2 {
            return Vec::new();
        }
        let thickness = defect_flux[0] / trailing_edge_speed.max(1e-6);
        smoothed_panel_curvature(&self.wake_s, &self.wake_turning, thickness)
            .into_iter()
            .map(|kappa| -0.5 * kappa)
            .collect()
    }

    /// Node speeds (convention above) of the wake-curvature sheet with coefficients
    /// `coefficients` ([`Self::curvature_coefficients`]) and wake-node `defect_flux`, and each
    /// panel's slope ∂γ_k/∂(f_k + f_{k+1}). Each jump saturates smoothly at
    /// [`MAX_CURVATURE_JUMP`]: γ_k = J·tanh(c_k(f_k + f_{k+1})/J).
    pub fn curvature_sheet(
        &self,
        coefficients: &[f64],
        defect_flux: &[f64],
    ) -> (Vec<f64>, Vec<f64>) {
        if coefficients.is_empty() {
            return (vec![0.0; self.n_total()], Vec::new());
        }
        let (strengths, slopes): (Vec<f64>, Vec<f64>) = coefficients
            .iter()
            .enumerate()
            .map(|(k, c)| {
                let t = (c * (defect_flux[k] + defect_flux[k + 1]) / MAX_CURVATURE_JUMP).tanh();
                (MAX_CURVATURE_JUMP * t, c * (1.0 - t * t))
            })
            .unzip();
        (self.wake_vorticity.matvec(&strengths), slopes)
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
