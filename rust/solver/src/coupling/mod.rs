//! Viscous–inviscid coupling: the panel method and the integral boundary layer solved
//! together, and the drag of the section from its far wake.
//!
//! The displacement effect of the boundary layer and wake enters the panel solution as
//! transpiration sources σ = d(ue δ*)/ds on the surface and along the wake; the mass-defect
//! influence matrix D of the panel method gives the edge speed they induce,
//! ue = ue_inv + D·m with m = ue δ*. The boundary layer is marched with the quasi-simultaneous
//! interaction law of Veldman (J. Eng. Math. 1981; AIAA J. 47, 2009), ue_i = E_i + D_ii m_i,
//! which keeps the march well posed through laminar separation bubbles and moderate
//! trailing-edge separation; an outer iteration updates E until the march and the panel
//! solution agree. See `iteration` for the loop and its residual, `forces` for the drag
//! bookkeeping and docs/method.md for the equations.

mod anderson;
mod attempts;
mod continuation;
mod flat_plate;
mod forces;
mod iteration;
mod memo;
mod model;
mod newton;
mod reynolds_continuation;
mod settings;
mod stagnation;
mod sweep;
mod target_cl;

pub use flat_plate::flat_plate_drag;
pub use forces::{far_wake_drag, friction_drag, integrate_pressure, squire_young, PressureForces};
pub use settings::{
    ViscousSettings, MACH_RANGE, N_FACTOR_RANGE, PANEL_RANGE, REYNOLDS_RANGE, TRIP_RANGE,
    TURBULENCE_INTENSITY_RANGE,
};
pub use stagnation::{
    layer_trips, locate_stagnation, split_surface, x_at_arc_length, SideNodes, StagnationPoint,
    SurfaceSplit,
};
pub use sweep::{
    analyze_viscous, analyze_viscous_conditions, boundary_layer_stations, ViscousAnalysis,
};
pub use target_cl::solve_for_cl;

/// One viscous operating point: the row of a polar.
#[derive(Debug, Clone, PartialEq)]
pub struct ViscousRow {
    /// Angle of attack, degrees.
    pub alpha_deg: f64,
    /// Lift coefficient from the viscous surface pressure.
    pub cl: f64,
    /// Drag from the far-wake momentum defect, 2θ∞/c.
    pub cd: f64,
    /// Squire–Young drag from the two trailing-edge states.
    pub cd_squire_young: f64,
    /// Skin-friction drag, both surfaces.
    pub cd_friction: f64,
    /// Pressure drag from integrating the viscous surface pressure.
    pub cd_pressure: f64,
    /// Pitching moment about the quarter chord from the viscous surface pressure.
    pub cm_c4: f64,
    /// Least pressure coefficient on the surface.
    pub cp_min: f64,
    /// Transition on the upper surface, x/c (1 when the layer stays laminar to the trailing edge).
    pub transition_upper: f64,
    /// Transition on the lower surface, x/c.
    pub transition_lower: f64,
    /// Where the turbulent layer separates on the upper surface, x/c.
    pub separation_upper: Option<f64>,
    /// Where the turbulent layer separates on the lower surface, x/c.
    pub separation_lower: Option<f64>,
    /// Whether the outer iteration met its tolerance with every value finite.
    pub converged: bool,
    /// Outer iterations used.
    pub iterations: usize,
    /// Final interaction residual (see `iteration`).
    pub residual: f64,
    /// Whether the solution includes the wake-curvature pressure jump (docs/method.md, "Wake
    /// curvature"); false for rows solved with the first-order wake (the quasi-simultaneous
    /// iteration's, and the fall-back where the full model has no converged solution) and for
    /// rows that did not converge.
    pub wake_curvature: bool,
    /// Whether `cp_min` lies below the critical pressure coefficient at the free-stream Mach
    /// number (the flow turns locally supersonic): outside the model's validity — the
    /// Kármán–Tsien rule and the boundary layer know no shocks, and no wave drag is counted.
    pub critical_mach_reached: bool,
}

impl ViscousRow {
    /// A row for an angle at which no solution could be formed at all (flagged, NaN values).
    pub fn failed(alpha_deg: f64, iterations: usize, residual: f64) -> Self {
        ViscousRow {
            alpha_deg,
            cl: f64::NAN,
            cd: f64::NAN,
            cd_squire_young: f64::NAN,
            cd_friction: f64::NAN,
            cd_pressure: f64::NAN,
            cm_c4: f64::NAN,
            cp_min: f64::NAN,
            transition_upper: f64::NAN,
            transition_lower: f64::NAN,
            separation_upper: None,
            separation_lower: None,
            converged: false,
            iterations,
            residual,
            wake_curvature: false,
            critical_mach_reached: false,
        }
    }

    /// True when every number in the row is finite.
    pub fn is_finite(&self) -> bool {
        [
            self.alpha_deg,
            self.cl,
            self.cd,
            self.cd_squire_young,
            self.cd_friction,
            self.cd_pressure,
            self.cm_c4,
            self.cp_min,
            self.transition_upper,
            self.transition_lower,
            self.residual,
        ]
        .iter()
        .all(|v| v.is_finite())
            && self.separation_upper.is_none_or(f64::is_finite)
            && self.separation_lower.is_none_or(f64::is_finite)
    }
}

/// Which layer a station belongs to.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum StationSide {
    /// Upper surface, from the stagnation point to the trailing edge.
    Upper,
    /// Lower surface, from the stagnation point to the trailing edge.
    Lower,
    /// Wake, from the trailing edge downstream.
    Wake,
}

/// Flow regime at a station.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum StationRegime {
    /// Laminar boundary layer.
    Laminar,
    /// Turbulent boundary layer.
    Turbulent,
    /// Wake (no wall).
    Wake,
}

/// One boundary-layer or wake station of a converged solution.
#[derive(Debug, Clone, PartialEq)]
pub struct StationRow {
    /// Upper, lower or wake.
    pub side: StationSide,
    /// Arc length from the stagnation point (surface) or from the trailing edge (wake), chords.
    pub s: f64,
    /// Station position, chords.
    pub x: f64,
    /// Station position, chords.
    pub y: f64,
    /// Edge speed over free-stream speed.
    pub edge_velocity: f64,
    /// Displacement thickness over chord.
    pub delta_star: f64,
    /// Momentum thickness over chord.
    pub theta: f64,
    /// Shape factor δ*/θ.
    pub shape_factor: f64,
    /// Skin-friction coefficient based on the local edge speed (0 in the wake).
    pub cf: f64,
    /// Amplification factor N of the transition criterion.
    pub amplification: f64,
    /// Laminar, turbulent or wake.
    pub regime: StationRegime,
}
