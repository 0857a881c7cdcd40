//! Types shared by the surface and wake marches: stations, settings, inputs and results.
//!
//! Units throughout: lengths (s, θ, δ*) in chords, velocities in the free-stream speed U∞,
//! Reynolds number based on chord, Re = U∞c/ν, so the kinematic viscosity is 1/Re.

/// State of the boundary layer at a station.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Regime {
    /// Laminar two-equation integral method (momentum and kinetic-energy integrals).
    Laminar,
    /// Turbulent lag-entrainment method on the wall (Green, Weeks & Brooman 1977).
    Turbulent,
    /// Lag-entrainment continued in the wake, without wall friction.
    Wake,
}

/// One solved station of a march.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Station {
    /// Arc length from the stagnation point (surface) or from the trailing edge (wake), chords.
    pub s: f64,
    /// Edge velocity ue/U∞ (the solved value when an interaction law is used).
    pub edge_velocity: f64,
    /// Momentum thickness θ/c.
    pub theta: f64,
    /// Displacement thickness δ*/c.
    pub delta_star: f64,
    /// Shape factor H = δ*/θ.
    pub shape_factor: f64,
    /// Skin-friction coefficient τw/(½ρue²); negative in reversed flow, zero in the wake.
    pub cf: f64,
    /// Envelope amplification factor N (frozen once the layer is turbulent).
    pub amplification: f64,
    /// Entrainment coefficient CE of the lag-entrainment method (GWB 1977); 0 while laminar.
    pub shear_lag: f64,
    /// Which equations were solved at this station.
    pub regime: Regime,
    /// Dissipation coefficient CD = D/(ρue³) of the laminar closure; 0 where turbulent or in the
    /// wake (the lag-entrainment method carries no kinetic-energy integral).
    pub dissipation: f64,
}

/// Settings of a march, with documented defaults from [`MarchSettings::new`].
#[derive(Debug, Clone, PartialEq)]
pub struct MarchSettings {
    /// Reynolds number based on chord, U∞c/ν.
    pub reynolds: f64,
    /// Critical amplification factor of free transition (default 9).
    pub n_critical: f64,
    /// Arc length of a trip (forced transition), or None for free transition only.
    pub trip_s: Option<f64>,
    /// Iteration cap of each station's local Newton iteration (default 30).
    pub max_newton_iterations: usize,
    /// Convergence tolerance of the scaled local residuals (default 1e-9).
    pub newton_tolerance: f64,
}

impl MarchSettings {
    /// Settings with N_crit = 9, no trip, 30 Newton iterations, tolerance 1e-9.
    pub fn new(reynolds: f64) -> Self {
        Self {
            reynolds,
            n_critical: 9.0,
            trip_s: None,
            max_newton_iterations: 30,
            newton_tolerance: 1e-9,
        }
    }
}

/// Edge conditions of one march, with the quasi-simultaneous interaction law.
///
/// Quasi-simultaneous interaction (Veldman 1981, J. Eng. Math. 15; Veldman 2009, "A simple
/// interaction law for viscous–inviscid interaction", J. Eng. Math. 65): at station i the edge
/// velocity is not prescribed but tied to the local mass defect m_i = ue_i δ*_i by
///   `ue_i = external_velocity[i] + interaction_coefficient[i] · m_i`
/// and solved simultaneously with the integral equations. A zero coefficient gives the direct
/// mode (prescribed edge velocity). A positive coefficient (a local displacement bump speeds the
/// flow up, as a Hilbert-integral interaction law does) removes the Goldstein singularity.
#[derive(Debug, Clone, Copy)]
pub struct SideInput<'a> {
    /// Station arc lengths, strictly increasing, chords (surface: s > 0; wake: from the TE).
    pub s: &'a [f64],
    /// External (inviscid part of the) edge velocity at each station, in U∞.
    pub external_velocity: &'a [f64],
    /// Coefficient of the local mass defect in the interaction law, 1/chord.
    pub interaction_coefficient: &'a [f64],
}

/// Result of one march over a side or the wake.
#[derive(Debug, Clone, PartialEq)]
pub struct SideSolution {
    /// One solved station per input station.
    pub stations: Vec<Station>,
    /// Arc length where the layer became turbulent, if it did.
    pub transition_s: Option<f64>,
    /// True when the transition was the trip (or forced by a laminar breakdown), not e^N.
    pub transition_forced: bool,
    /// Where the laminar skin friction first reaches zero.
    pub laminar_separation_s: Option<f64>,
    /// Where the turbulent skin friction first reaches zero from attached flow.
    pub turbulent_separation_s: Option<f64>,
    /// Where the skin friction returns positive after a separation.
    pub reattachment_s: Option<f64>,
    /// True when every station's local Newton iteration converged.
    pub converged: bool,
}

/// Integral state carried between stations (crate-internal).
#[derive(Debug, Clone, Copy, PartialEq)]
pub(crate) struct LayerState {
    pub theta: f64,
    pub shape_factor: f64,
    /// Entrainment coefficient CE (turbulent and wake only).
    pub entrainment: f64,
    pub edge_velocity: f64,
}

/// Checks that the three arrays have one entry per station, finite, s strictly increasing.
pub(crate) fn validate_input(input: &SideInput) -> Result<(), String> {
    let n = input.s.len();
    if n == 0 {
        return Err("no stations".into());
    }
    if input.external_velocity.len() != n || input.interaction_coefficient.len() != n {
        return Err(format!(
            "s has {n} entries, external_velocity {}, interaction_coefficient {}",
            input.external_velocity.len(),
            input.interaction_coefficient.len()
        ));
    }
    for i in 0..n {
        if !(input.s[i].is_finite()
            && input.external_velocity[i].is_finite()
            && input.interaction_coefficient[i].is_finite())
        {
            return Err(format!("station {i} has a non-finite input"));
        }
        if i > 0 && input.s[i] <= input.s[i - 1] {
            return Err(format!(
                "s must increase strictly: s[{i}] = {} after {}",
                input.s[i],
                input.s[i - 1]
            ));
        }
    }
    Ok(())
}

/// Solves the interaction law ue = U + k·ue·δ* for ue at fixed δ* (a Newton start value). When
/// that has no positive solution (k·δ* near 1, or of the wrong sign for U, which may be negative
/// when the caller folds other stations' influence into U), returns `fallback`.
pub(crate) fn interacted_velocity(
    external: f64,
    coefficient: f64,
    delta_star: f64,
    fallback: f64,
) -> f64 {
    let denominator = 1.0 - coefficient * delta_star;
    let ue = external / denominator;
    if denominator.abs() > 0.05 && ue.is_finite() && ue > MIN_EDGE_VELOCITY {
        ue
    } else {
        fallback.max(MIN_EDGE_VELOCITY)
    }
}

/// Smallest edge velocity the marches work with (avoids division by zero near stagnation).
pub(crate) const MIN_EDGE_VELOCITY: f64 = 1e-6;

/// Arc length where a quantity crosses zero between two stations (linear interpolation).
pub(crate) fn zero_crossing(s0: f64, f0: f64, s1: f64, f1: f64) -> f64 {
    if (f1 - f0).abs() < 1e-300 {
        return s1;
    }
    (s0 + (s1 - s0) * f0 / (f0 - f1)).clamp(s0.min(s1), s0.max(s1))
}
