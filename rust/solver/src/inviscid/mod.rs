//! Inviscid flow about a section: a linear-strength vortex panel method with the Kutta condition.
//!
//! Method (Katz & Plotkin, *Low-Speed Aerodynamics*, 2nd ed., §11.4 "linear-strength vortex
//! method"): the surface loop of N nodes is cut into N − 1 straight panels carrying a vortex
//! sheet whose strength varies linearly between the node values γᵢ. They follow from zero
//! normal velocity at the N − 1 panel midpoints and the Kutta condition γ₀ + γ_{N−1} = 0.
//! With the normal velocity zero all round, the fluid inside the loop is at rest, so the
//! surface speed just outside equals the local sheet strength: γᵢ is the surface speed.
//! Near a sharp trailing edge the interior is a sliver that the midpoint conditions barely see;
//! one more condition (interior at rest there) with one more unknown (an interior source that
//! comes out nearly zero) determines the trailing-edge strengths (`InteriorControl`).
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
//! speed. The open sheet ends make the two corner strengths unreliable; their speeds are
//! extrapolated from the neighbouring nodes (`surface_speed`). For the forces the base carries
//! the mean trailing-edge Cp (dead air at the corner pressure), so the pressure is integrated
//! over a closed contour. The gap lets a little fluid into the interior, an error of the order
//! of the base height over the chord; the geometry module limits the base height.
//!
//! Only one LU factorisation is made per geometry; every α is the superposition
//! γ(α) = cos α · γ(0°) + sin α · γ(90°) of two base solutions.

pub mod compressibility;
pub mod exact_wake;
pub(crate) mod influence;
mod transpiration;
pub mod wake;
mod wake_vorticity;

pub use crate::linalg::DenseMatrix;
pub use transpiration::{TranspirationSolution, WakeOperators};
pub use wake::Wake;
pub use wake_vorticity::{smoothed_panel_curvature, wake_node_turning};

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
    /// Unknowns of the α = 0° and 90° free streams: the N node sheet strengths, then the
    /// strength of the interior source (see [`InteriorControl`]).
    sheet_0: Vec<f64>,
    sheet_90: Vec<f64>,
    interior: InteriorControl,
    arc: Vec<f64>,
    chord: f64,
    /// Quarter-chord reference point for the moment.
    quarter_chord: (f64, f64),
    /// Response of the sheet unknowns to each surface node's mass defect (the surface columns
    /// of the mass-defect influence, which do not depend on the wake), built on first use.
    pub(crate) surface_mass_response: std::sync::OnceLock<crate::linalg::DenseMatrix>,
    /// Normal velocity at each condition point per unit source on each surface panel (the body
    /// columns of the source-normal rows, which do not depend on the wake), built on first use.
    pub(crate) surface_source_normal: std::sync::OnceLock<crate::linalg::DenseMatrix>,
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
        let interior = InteriorControl::new(&panels);
        let (matrix, rhs_0, rhs_90) = assemble(&panels, &interior);
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
            interior,
            arc,
            chord,
            quarter_chord,
            surface_mass_response: std::sync::OnceLock::new(),
            surface_source_normal: std::sync::OnceLock::new(),
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
    /// edge): the node sheet strengths (the fluid inside the loop is at rest), corners of a
    /// blunt trailing edge extrapolated.
    pub fn gamma_at(&self, alpha_deg: f64) -> Vec<f64> {
        self.surface_speed(&self.sheet_at(alpha_deg))
    }

    /// Unknowns for `alpha_deg` (node strengths, then the interior source strength).
    pub(crate) fn sheet_at(&self, alpha_deg: f64) -> Vec<f64> {
        superpose(alpha_deg, &self.sheet_0, &self.sheet_90)
    }

    /// Surface speeds from the unknowns: the N node sheet strengths. At a blunt trailing edge
    /// the open sheet ends make the two corner strengths unreliable, so their speeds are
    /// extrapolated linearly in arc length from the two nodes beside them on the same side.
    pub(crate) fn surface_speed(&self, sheet: &[f64]) -> Vec<f64> {
        let n = self.panels.nodes();
        let mut speed = sheet[..n].to_vec();
        if !self.interior.active {
            let l = &self.panels.len;
            speed[0] = speed[1] + (speed[1] - speed[2]) * l[0] / l[1];
            speed[n - 1] = speed[n - 2] + (speed[n - 2] - speed[n - 3]) * l[n - 2] / l[n - 3];
        }
        speed
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
        let (qu, qv) = self.interior.source_velocity(px, py);
        let q = gamma[n];
        let u = c + cu.iter().zip(gamma).map(|(a, g)| a * g).sum::<f64>() + qu * q;
        let v = s + cv.iter().zip(gamma).map(|(a, g)| a * g).sum::<f64>() + qv * q;
        (u, v)
    }

    /// The interior control of this solver.
    pub(crate) fn interior(&self) -> &InteriorControl {
        &self.interior
    }
}

/// The extra unknown and equation that keep the trailing-edge sliver at rest.
///
/// Next to the trailing edge the interior of the loop is a thin sliver; the midpoint tangency
/// conditions barely see the flow inside it, so on their own they leave the two trailing-edge
/// node strengths ill-determined (badly so for a cusp). One more equation states what the
/// method assumes there: the interior fluid is at rest, i.e. the velocity along the
/// trailing-edge bisector vanishes at the `probe` midway between the midpoints of the two
/// trailing-edge panels. To keep the system square it comes with one more unknown, a point
/// source of strength Q at `source`, well inside the section near 35 % chord. A closed body
/// cannot hold a net source under zero normal flow, so Q is driven to (nearly) zero by the
/// tangency rows themselves and only the sliver mode is constrained.
#[derive(Debug, Clone)]
pub(crate) struct InteriorControl {
    /// False for a blunt trailing edge, whose open base lets the interior communicate with the
    /// outer flow: the source is then fixed at zero (row `Q = 0`).
    pub active: bool,
    pub probe: (f64, f64),
    pub direction: (f64, f64),
    pub source: (f64, f64),
}

impl InteriorControl {
    fn new(panels: &Panels) -> Self {
        let n = panels.nodes();
        let np = panels.count();
        let probe = (
            0.5 * (panels.mx[0] + panels.mx[np - 1]),
            0.5 * (panels.my[0] + panels.my[np - 1]),
        );
        let (bx, by) = (
            panels.tx[np - 1] - panels.tx[0],
            panels.ty[np - 1] - panels.ty[0],
        );
        let norm = bx.hypot(by);
        let direction = if norm > 1e-12 {
            (bx / norm, by / norm)
        } else {
            (1.0, 0.0)
        };
        // Source: midway between the upper and lower nodes nearest 35 % of the chord.
        let te = (
            0.5 * (panels.x[0] + panels.x[n - 1]),
            0.5 * (panels.y[0] + panels.y[n - 1]),
        );
        let le_index = (0..n)
            .max_by(|&a, &b| {
                let da = (panels.x[a] - te.0).hypot(panels.y[a] - te.1);
                let db = (panels.x[b] - te.0).hypot(panels.y[b] - te.1);
                da.total_cmp(&db)
            })
            .unwrap_or(n / 2);
        let (lx, ly) = (panels.x[le_index], panels.y[le_index]);
        let (cx, cy) = (te.0 - lx, te.1 - ly);
        let c2 = (cx * cx + cy * cy).max(1e-300);
        let fraction = |k: usize| ((panels.x[k] - lx) * cx + (panels.y[k] - ly) * cy) / c2;
        let nearest = |range: std::ops::Range<usize>| {
            range
                .min_by(|&a, &b| {
                    (fraction(a) - 0.35)
                        .abs()
                        .total_cmp(&(fraction(b) - 0.35).abs())
                })
                .unwrap_or(le_index)
        };
        let upper = nearest(0..le_index.max(1));
        let lower = nearest(le_index..n);
        let source = (
            0.5 * (panels.x[upper] + panels.x[lower]),
            0.5 * (panels.y[upper] + panels.y[lower]),
        );
        let base = (panels.x[0] - panels.x[n - 1]).hypot(panels.y[0] - panels.y[n - 1]);
        let active = base < 1e-3 * panels.len[0].min(panels.len[np - 1]);
        InteriorControl {
            active,
            probe,
            direction,
            source,
        }
    }

    /// Velocity at (px, py) per unit strength of the interior point source.
    pub fn source_velocity(&self, px: f64, py: f64) -> (f64, f64) {
        let (dx, dy) = (px - self.source.0, py - self.source.1);
        let r2 = (dx * dx + dy * dy).max(1e-300);
        (
            dx / (2.0 * std::f64::consts::PI * r2),
            dy / (2.0 * std::f64::consts::PI * r2),
        )
    }
}

/// Assemble the (N+1)² system: N − 1 midpoint tangency rows, the Kutta row, the interior
/// row ([`InteriorControl`]); unknowns the N node strengths and the interior source. Also the
/// right-hand sides of the α = 0° and α = 90° free streams.
fn assemble(panels: &Panels, interior: &InteriorControl) -> (DenseMatrix, Vec<f64>, Vec<f64>) {
    let n = panels.nodes();
    let mut matrix = DenseMatrix::zeros(n + 1, n + 1);
    let (mut rhs_0, mut rhs_90) = (vec![0.0; n + 1], vec![0.0; n + 1]);
    let mut scratch = Scratch::default();
    let (mut cu, mut cv) = (vec![0.0; n], vec![0.0; n]);
    let mut row_at =
        |px: f64, py: f64, on: Option<usize>, (dx, dy): (f64, f64), row: &mut [f64]| {
            influence_at(
                panels,
                px,
                py,
                on,
                &mut scratch,
                Coefficients {
                    vortex: Some((&mut cu, &mut cv)),
                    source: None,
                },
            );
            for (a, (u, v)) in row.iter_mut().zip(cu.iter().zip(&cv)) {
                *a = u * dx + v * dy;
            }
            let (su, sv) = interior.source_velocity(px, py);
            row[n] = su * dx + sv * dy;
        };
    for i in 0..panels.count() {
        let normal = panels.normal(i);
        row_at(
            panels.mx[i],
            panels.my[i],
            Some(i),
            normal,
            matrix.row_mut(i),
        );
        rhs_0[i] = -normal.0;
        rhs_90[i] = -normal.1;
    }
    matrix.set(n - 1, 0, 1.0);
    matrix.set(n - 1, n - 1, 1.0);
    if interior.active {
        let (px, py) = interior.probe;
        row_at(px, py, None, interior.direction, matrix.row_mut(n));
        rhs_0[n] = -interior.direction.0;
        rhs_90[n] = -interior.direction.1;
    } else {
        matrix.set(n, n, 1.0);
    }
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
