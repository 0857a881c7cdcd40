//! Inviscid flow about a section: a linear-strength vortex panel method with the Kutta condition.
//!
//! Method (Katz & Plotkin, *Low-Speed Aerodynamics*, 2nd ed., §11.4 "linear-strength vortex
//! method"): the surface loop of N nodes is cut into N − 1 straight panels carrying a vortex
//! sheet whose strength varies linearly between the node values γᵢ. The N unknowns follow from
//! zero normal velocity at the N − 1 panel midpoints and the Kutta condition γ₀ + γ_{N−1} = 0.
//! With the normal velocity zero all round, the fluid inside the loop is at rest, so the
//! surface speed just outside equals the local sheet strength: γᵢ is the surface speed. Only
//! the two trailing-edge nodes, where the interior is a sliver that the midpoint conditions
//! barely see, get their speed by extrapolation from their neighbours
//! ([`PanelSolver::surface_speed`]).
//!
//! Conventions (shared with the viscous coupling):
//! - nodes run from the upper trailing edge forward over the upper surface, round the leading
//!   edge and back to the lower trailing edge (counter-clockwise); `arc_length` s increases
//!   the same way from s = 0 at the upper trailing-edge node;
//! - γ > 0 is flow from the leading edge towards the upper trailing edge (clockwise, i.e. in
//!   the −s direction); on the lower surface of a lifting section γ < 0. The stagnation point
//!   is where γ changes sign; each side's edge speed is |γ|;
//! - U∞ = 1, chord-normalised coordinates; α is measured from the x-axis;
//! - Kutta condition γ₀ + γ_{N−1} = 0: equal speeds leaving both trailing-edge nodes.
//!
//! Blunt trailing edge: when the first and last nodes do not coincide, the base between them is
//! left open (no panel) and the same Kutta condition makes the flow leave both corners at equal
//! speed. For the forces the base carries the mean trailing-edge Cp (dead air at the corner
//! pressure), so the pressure is integrated over a closed contour. The gap lets a little fluid into the interior, an error of the order of the base
//! height over the chord; sections with a base larger than the geometry module's limit are
//! rejected before they get here.
//!
//! Only one LU factorisation is made per geometry; every α is the superposition
//! γ(α) = cos α · γ(0°) + sin α · γ(90°) of two base solutions.

pub mod compressibility;
pub(crate) mod influence;
mod transpiration;
pub mod wake;

pub use crate::linalg::DenseMatrix;
pub use transpiration::TranspirationSolution;
pub use wake::Wake;

use crate::error::{Result, SolverError};
use crate::geometry::Section;
use crate::linalg::LuFactors;
use influence::{influence_at, Coefficients, Panels, Scratch};

/// Fewest surface points accepted by the panel solver.
pub const MIN_POINTS: usize = 10;

/// The factorised panel system of one paneled section; solves any angle of attack cheaply.
#[derive(Debug, Clone)]
pub struct PanelSolver {
    panels: Panels,
    lu: LuFactors,
    /// Sheet strengths of the α = 0° and 90° free streams.
    sheet_0: Vec<f64>,
    sheet_90: Vec<f64>,
    arc: Vec<f64>,
    chord: f64,
    /// Quarter-chord reference point for the moment.
    quarter_chord: (f64, f64),
}

/// Result of one inviscid solve at one angle of attack.
#[derive(Debug, Clone, PartialEq)]
pub struct InviscidSolution {
    /// Angle of attack, degrees.
    pub alpha_deg: f64,
    /// Free-stream Mach number of the Kármán–Tsien correction (0 for incompressible).
    pub mach: f64,
    /// Node vortex strengths = signed incompressible surface speeds / U∞ (γ > 0: flow towards
    /// the upper trailing edge).
    pub gamma: Vec<f64>,
    /// Pressure coefficient at the nodes (compressibility-corrected when `mach` > 0).
    pub cp: Vec<f64>,
    /// Lift coefficient from pressure integration.
    pub cl: f64,
    /// Lift coefficient from the circulation (Kutta–Joukowski, cl = 2Γ/(U∞c)).
    pub cl_circulation: f64,
    /// Pitching moment about the quarter chord, positive nose-up.
    pub cm_c4: f64,
    /// Pressure-drag coefficient (zero in exact inviscid flow: d'Alembert).
    pub cd_pressure: f64,
    /// Smallest Cp on the surface.
    pub cp_min: f64,
    /// True when `cp_min` is below the critical Cp (the flow turns locally supersonic).
    pub critical_mach_reached: bool,
}

impl PanelSolver {
    /// Build and factorise the panel system of `section` (its points are the panel nodes).
    ///
    /// Errors: `SolverError::Geometry` for fewer than [`MIN_POINTS`] points, non-finite
    /// coordinates, zero-length panels or a singular system.
    pub fn new(section: &Section) -> Result<Self> {
        let n = section.x.len();
        if section.y.len() != n {
            return Err(SolverError::geometry(format!(
                "section '{}': x has {} values but y has {}",
                section.name,
                n,
                section.y.len()
            )));
        }
        if n < MIN_POINTS {
            return Err(SolverError::geometry(format!(
                "section '{}': the panel method needs at least {MIN_POINTS} points, got {n}",
                section.name
            )));
        }
        if let Some(k) = (0..n).find(|&k| !section.x[k].is_finite() || !section.y[k].is_finite()) {
            return Err(SolverError::geometry(format!(
                "section '{}': point {k} is not finite ({}, {})",
                section.name, section.x[k], section.y[k]
            )));
        }
        let panels = Panels::new(&section.x, &section.y);
        let scale = panels.len.iter().sum::<f64>();
        if let Some(k) =
            (0..panels.count()).find(|&k| panels.len[k].is_nan() || panels.len[k] <= 1e-10 * scale)
        {
            return Err(SolverError::geometry(format!(
                "section '{}': points {k} and {} coincide (zero-length panel)",
                section.name,
                k + 1
            )));
        }
        let (matrix, rhs_0, rhs_90) = assemble(&panels);
        let lu = LuFactors::new(matrix)?;
        let sheet_0 = lu.solve(&rhs_0);
        let sheet_90 = lu.solve(&rhs_90);
        let mut arc = vec![0.0; n];
        for k in 0..panels.count() {
            arc[k + 1] = arc[k] + panels.len[k];
        }
        let (chord, quarter_chord) = chord_and_reference(&panels);
        Ok(PanelSolver {
            panels,
            lu,
            sheet_0,
            sheet_90,
            arc,
            chord,
            quarter_chord,
        })
    }

    /// Incompressible solution at `alpha_deg`.
    pub fn solve(&self, alpha_deg: f64) -> InviscidSolution {
        self.solution_from(alpha_deg, 0.0, self.gamma_at(alpha_deg))
    }

    /// Incompressible solutions at each angle (one factorisation serves all).
    pub fn solve_many(&self, alphas_deg: &[f64]) -> Vec<InviscidSolution> {
        alphas_deg.iter().map(|&a| self.solve(a)).collect()
    }

    /// Panel nodes (= surface stations), x.
    pub fn node_x(&self) -> &[f64] {
        &self.panels.x
    }

    /// Panel nodes (= surface stations), y.
    pub fn node_y(&self) -> &[f64] {
        &self.panels.y
    }

    /// Arc length s along the loop from the upper trailing-edge node (node 0).
    pub fn arc_length(&self) -> &[f64] {
        &self.arc
    }

    /// Number of surface nodes.
    pub fn node_count(&self) -> usize {
        self.panels.nodes()
    }

    /// Chord used to normalise the coefficients (distance from the trailing-edge midpoint to
    /// the farthest node, the leading edge).
    pub fn chord(&self) -> f64 {
        self.chord
    }

    /// Signed surface speeds at the nodes for `alpha_deg` (γ > 0 towards the upper trailing
    /// edge): the sheet strengths, trailing-edge nodes extrapolated (see [`Self::surface_speed`]).
    pub fn gamma_at(&self, alpha_deg: f64) -> Vec<f64> {
        self.surface_speed(self.sheet_at(alpha_deg))
    }

    /// Vortex-sheet node strengths for `alpha_deg` (superposition of the base solutions).
    pub(crate) fn sheet_at(&self, alpha_deg: f64) -> Vec<f64> {
        superpose(alpha_deg, &self.sheet_0, &self.sheet_90)
    }

    /// Surface speeds from sheet strengths. Inside the loop the fluid is at rest, so the outer
    /// speed equals the sheet strength, except at the two trailing-edge nodes: there the
    /// interior is a sliver that the midpoint conditions barely see and the node strengths are
    /// ill-determined, so their speeds are extrapolated linearly in arc length from the two
    /// nodes beside them on the same side. A linear map, so it also applies to derivatives.
    pub fn surface_speed(&self, mut sheet: Vec<f64>) -> Vec<f64> {
        let l = &self.panels.len;
        let n = sheet.len();
        sheet[0] = sheet[1] + (sheet[1] - sheet[2]) * l[0] / l[1];
        sheet[n - 1] = sheet[n - 2] + (sheet[n - 2] - sheet[n - 3]) * l[n - 2] / l[n - 3];
        sheet
    }

    /// Assemble a solution from the signed node speeds: Cp (Kármán–Tsien corrected when
    /// `mach` > 0), forces by the trapezoidal rule per panel, circulation Γ = Σ q̄·l of the
    /// (compressible) speeds.
    fn solution_from(&self, alpha_deg: f64, mach: f64, node_speed: Vec<f64>) -> InviscidSolution {
        let cp: Vec<f64> = node_speed
            .iter()
            .map(|q| compressibility::karman_tsien_cp(1.0 - q * q, mach))
            .collect();
        let p = &self.panels;
        let (xr, yr) = self.quarter_chord;
        let (mut fx, mut fy, mut moment, mut circulation) = (0.0, 0.0, 0.0, 0.0);
        let speed =
            |k: usize| compressibility::speed_ratio_from_cp(cp[k], mach).copysign(node_speed[k]);
        for k in 0..p.count() {
            let cp_mean = 0.5 * (cp[k] + cp[k + 1]);
            let (nx, ny) = p.normal(k);
            let (dfx, dfy) = (-cp_mean * nx * p.len[k], -cp_mean * ny * p.len[k]);
            fx += dfx;
            fy += dfy;
            // Counter-clockwise moment about the reference; nose-up is clockwise.
            moment += (p.mx[k] - xr) * dfy - (p.my[k] - yr) * dfx;
            let q_mean = if mach == 0.0 {
                0.5 * (node_speed[k] + node_speed[k + 1])
            } else {
                0.5 * (speed(k) + speed(k + 1))
            };
            circulation += q_mean * p.len[k];
        }
        // Blunt trailing edge: the base (last node → first node) carries the trailing-edge
        // pressure, so that the pressure integral is taken over a closed contour.
        let n = p.nodes();
        let (bx, by) = (p.x[0] - p.x[n - 1], p.y[0] - p.y[n - 1]);
        let cp_base = 0.5 * (cp[0] + cp[n - 1]);
        let (dfx, dfy) = (-cp_base * by, cp_base * bx);
        fx += dfx;
        fy += dfy;
        let (mx, my) = (0.5 * (p.x[0] + p.x[n - 1]), 0.5 * (p.y[0] + p.y[n - 1]));
        moment += (mx - xr) * dfy - (my - yr) * dfx;
        let (s, c) = alpha_deg.to_radians().sin_cos();
        let chord = self.chord;
        let cp_min = cp.iter().cloned().fold(f64::INFINITY, f64::min);
        let critical = cp_min < compressibility::critical_cp(mach);
        InviscidSolution {
            alpha_deg,
            mach,
            cl: (fy * c - fx * s) / chord,
            cd_pressure: (fx * c + fy * s) / chord,
            cm_c4: -moment / (chord * chord),
            cl_circulation: 2.0 * circulation / chord,
            cp_min,
            critical_mach_reached: critical,
            gamma: node_speed,
            cp,
        }
    }

    /// Velocity (u, v) at an off-surface point from the free stream at `alpha_deg` and the
    /// surface vortex sheet `gamma` (sources excluded).
    pub(crate) fn velocity_at(
        &self,
        px: f64,
        py: f64,
        alpha_deg: f64,
        gamma: &[f64],
        scratch: &mut Scratch,
    ) -> (f64, f64) {
        let n = self.panels.nodes();
        let (mut cu, mut cv) = (vec![0.0; n], vec![0.0; n]);
        influence_at(
            &self.panels,
            px,
            py,
            None,
            scratch,
            Coefficients {
                vortex: Some((&mut cu, &mut cv)),
                source: None,
            },
        );
        let (s, c) = alpha_deg.to_radians().sin_cos();
        let u = c + cu.iter().zip(gamma).map(|(a, g)| a * g).sum::<f64>();
        let v = s + cv.iter().zip(gamma).map(|(a, g)| a * g).sum::<f64>();
        (u, v)
    }
}

/// Assemble the N×N system (N − 1 midpoint tangency rows, then the Kutta row) and the
/// right-hand sides of the α = 0° and α = 90° free streams.
fn assemble(panels: &Panels) -> (DenseMatrix, Vec<f64>, Vec<f64>) {
    let n = panels.nodes();
    let mut matrix = DenseMatrix::zeros(n, n);
    let (mut rhs_0, mut rhs_90) = (vec![0.0; n], vec![0.0; n]);
    let mut scratch = Scratch::default();
    let (mut cu, mut cv) = (vec![0.0; n], vec![0.0; n]);
    for i in 0..panels.count() {
        influence_at(
            panels,
            panels.mx[i],
            panels.my[i],
            Some(i),
            &mut scratch,
            Coefficients {
                vortex: Some((&mut cu, &mut cv)),
                source: None,
            },
        );
        let (nx, ny) = panels.normal(i);
        for (a, (u, v)) in matrix.row_mut(i).iter_mut().zip(cu.iter().zip(&cv)) {
            *a = u * nx + v * ny;
        }
        rhs_0[i] = -nx;
        rhs_90[i] = -ny;
    }
    matrix.set(n - 1, 0, 1.0);
    matrix.set(n - 1, n - 1, 1.0);
    (matrix, rhs_0, rhs_90)
}

/// cos α·a + sin α·b.
fn superpose(alpha_deg: f64, a: &[f64], b: &[f64]) -> Vec<f64> {
    let (s, c) = alpha_deg.to_radians().sin_cos();
    a.iter().zip(b).map(|(x, y)| c * x + s * y).collect()
}

/// Chord (trailing-edge midpoint to the farthest node) and the quarter-chord point.
fn chord_and_reference(panels: &Panels) -> (f64, (f64, f64)) {
    let n = panels.nodes();
    let te = (
        0.5 * (panels.x[0] + panels.x[n - 1]),
        0.5 * (panels.y[0] + panels.y[n - 1]),
    );
    let (mut le, mut best) = (te, 0.0);
    for k in 0..n {
        let d = (panels.x[k] - te.0).hypot(panels.y[k] - te.1);
        if d > best {
            best = d;
            le = (panels.x[k], panels.y[k]);
        }
    }
    (
        best,
        (le.0 + 0.25 * (te.0 - le.0), le.1 + 0.25 * (te.1 - le.1)),
    )
}
