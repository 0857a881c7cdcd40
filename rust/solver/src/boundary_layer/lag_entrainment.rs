//! Turbulent lag-entrainment method of Green, Weeks & Brooman (ARC R&M 3791, 1977), in its
//! incompressible form (M → 0; compressibility enters only through the edge velocity from the
//! inviscid solution). The relations are as quoted from the report in the project's reference
//! notes (H1(H), Cf0, Cf/Cf0) and, where marked, from memory of the report — verify against it.
//!
//! Unknowns θ, H (= H̄ at M = 0) and the entrainment coefficient CE; equations
//!   d ln θ/ds      = Cf/(2θ) − (H + 2) d ln ue/ds                          (momentum)
//!   d ln(θ H1)/ds  = CE/(θ H1) − d ln ue/ds        [(1/ue) d(ue θ H1)/ds = CE] (entrainment)
//!   dCE/ds         = (F/θ)·{2.8/(H + H1)·[Cτ,EQ0^½ − λ Cτ^½] + (θ/ue due/ds)_EQ} − F d ln ue/ds (lag)
//! discretised by the trapezoidal rule between stations.

use super::station::LayerState;

/// Bounds of the turbulent shape factor in the local Newton iteration.
pub(crate) const TURBULENT_SHAPE_FACTOR_RANGE: (f64, f64) = (1.02, 12.0);
/// Bounds of the wake shape factor (the wake relaxes towards H = 1).
pub(crate) const WAKE_SHAPE_FACTOR_RANGE: (f64, f64) = (1.0005, 6.0);
/// Bounds of the entrainment coefficient (keeps F's denominator 0.01 + CE positive).
pub(crate) const ENTRAINMENT_RANGE: (f64, f64) = (-0.005, 0.5);
/// Largest turbulent shape factor given to a layer that has just become turbulent, so that δ*
/// stays continuous at transition where the turbulent relations allow it (our choice).
pub(crate) const TRANSITION_SHAPE_FACTOR_CAP: f64 = 4.0;
/// Smallest Reθ used in the flat-plate skin-friction law (the law has a pole at Reθ = 10.5 and is
/// meant for developed turbulent layers; our floor, applied near a leading-edge trip).
const MIN_TURBULENT_RE_THETA: f64 = 50.0;

/// Dissipation-length factor λ of the lag equation: 1 on the wall; 0.5 in the wake, where GWB
/// double the dissipation length (from memory of GWB 1977 — verify against the report).
pub(crate) fn dissipation_length_factor(wake: bool) -> f64 {
    if wake {
        0.5
    } else {
        1.0
    }
}

/// Entrainment shape factor H1 = (δ − δ*)/θ = 3.15 + 1.72/(H − 1) − 0.01(H − 1)² (GWB 1977).
pub fn entrainment_shape_factor(h: f64) -> f64 {
    // Our guard: beyond H − 1 = 12 (far outside the range the fit was made for) the quadratic
    // term would turn H1 negative, so the argument is held there.
    let hm1 = (h - 1.0).clamp(1e-4, 12.0);
    3.15 + 1.72 / hm1 - 0.01 * hm1 * hm1
}

/// Flat-plate skin friction Cf0 = 0.01013/(log10 Reθ − 1.02) − 0.00075 (GWB 1977, M = 0).
pub fn flat_plate_skin_friction(re_theta: f64) -> f64 {
    let re = re_theta.max(MIN_TURBULENT_RE_THETA);
    0.01013 / (re.log10() - 1.02) - 0.00075
}

/// Flat-plate (equilibrium) shape factor H0 = 1/(1 − 6.55√(Cf0/2)) (GWB 1977).
pub fn flat_plate_shape_factor(cf0: f64) -> f64 {
    1.0 / (1.0 - 6.55 * (0.5 * cf0).sqrt()).max(0.2)
}

/// Skin friction from Cf/Cf0 = 0.9/(H/H0 − 0.4) − 0.5 (GWB 1977). The denominator is kept above
/// 0.05 (our guard; reached only for H far below H0 at very low Reθ).
pub fn turbulent_skin_friction(h: f64, re_theta: f64) -> f64 {
    skin_friction_from_flat_plate(h, flat_plate_skin_friction(re_theta))
}

/// Cf from the flat-plate value Cf0 at the same Reθ (the relation above).
fn skin_friction_from_flat_plate(h: f64, cf0: f64) -> f64 {
    let h0 = flat_plate_shape_factor(cf0);
    cf0 * (0.9 / (h / h0 - 0.4).max(0.05) - 0.5)
}

/// Equilibrium pressure-gradient parameter (θ/ue due/ds)_EQ = (1.25/H)[Cf/2 − ((H − 1)/(6.432H))²]
/// (GWB 1977, M = 0, no secondary influences).
pub fn equilibrium_pressure_gradient(h: f64, cf: f64) -> f64 {
    let q = (h - 1.0) / (6.432 * h);
    1.25 / h * (0.5 * cf - q * q)
}

/// Equilibrium entrainment CE,EQ0 = H1[Cf/2 − (H + 1)(θ/ue due/ds)_EQ] (GWB 1977).
pub fn equilibrium_entrainment(h: f64, cf: f64) -> f64 {
    entrainment_shape_factor(h) * (0.5 * cf - (h + 1.0) * equilibrium_pressure_gradient(h, cf))
}

/// Shear-stress coefficient from entrainment, Cτ = 0.024 CE + 1.2 CE² + 0.32 Cf0 (GWB 1977, M = 0).
pub fn shear_stress_coefficient(entrainment: f64, cf0: f64) -> f64 {
    (0.024 * entrainment + 1.2 * entrainment * entrainment + 0.32 * cf0).max(1e-12)
}

/// Lag factor F = (0.02 CE + CE² + 0.8 Cf0/3)/(0.01 + CE) (GWB 1977).
pub fn lag_factor(entrainment: f64, cf0: f64) -> f64 {
    (0.02 * entrainment + entrainment * entrainment + 0.8 * cf0 / 3.0)
        / (0.01 + entrainment).max(1e-3)
}

/// Skin friction of a turbulent state (0 in the wake).
pub(crate) fn state_skin_friction(state: &LayerState, reynolds: f64, wake: bool) -> f64 {
    if wake {
        0.0
    } else {
        turbulent_skin_friction(
            state.shape_factor,
            reynolds * state.edge_velocity * state.theta,
        )
    }
}

/// Terms of the three equations at one state: sources (not multiplying d ln ue/ds), the
/// coefficients of d ln ue/ds, and H1. Computed once for the known start of an interval.
#[derive(Debug, Clone, Copy)]
pub(crate) struct TurbulentTerms {
    source: [f64; 3],
    gradient: [f64; 3],
    entrainment_shape_factor: f64,
}

impl TurbulentTerms {
    pub(crate) fn new(state: &LayerState, reynolds: f64, wake: bool) -> Self {
        let h = state.shape_factor;
        let theta = state.theta;
        let ce = state.entrainment;
        let re_theta = reynolds * state.edge_velocity * theta;
        let cf0 = flat_plate_skin_friction(re_theta);
        let cf = if wake {
            0.0
        } else {
            skin_friction_from_flat_plate(h, cf0)
        };
        let h1 = entrainment_shape_factor(h);
        let equilibrium_gradient = equilibrium_pressure_gradient(h, cf);
        let ce_eq = h1 * (0.5 * cf - (h + 1.0) * equilibrium_gradient);
        let tau_eq = shear_stress_coefficient(ce_eq, cf0);
        let tau = shear_stress_coefficient(ce, cf0);
        let f = lag_factor(ce, cf0);
        let lambda = dissipation_length_factor(wake);
        let lag_source = f / theta
            * (2.8 / (h + h1) * (tau_eq.sqrt() - lambda * tau.sqrt()) + equilibrium_gradient);
        Self {
            source: [0.5 * cf / theta, ce / (theta * h1), lag_source],
            gradient: [-(h + 2.0), -1.0, -f],
            entrainment_shape_factor: h1,
        }
    }
}

/// Residuals of momentum, entrainment and lag equations from `a` (with its terms `at_a`) to `b`
/// (trapezoidal rule for `weight` = 0.5, backward Euler for 1).
pub(crate) fn turbulent_residuals(
    a: &LayerState,
    at_a: &TurbulentTerms,
    b: &LayerState,
    ds: f64,
    weight: f64,
    reynolds: f64,
    wake: bool,
) -> [f64; 3] {
    let at_b = TurbulentTerms::new(b, reynolds, wake);
    turbulent_residuals_between(a, at_a, b, &at_b, ds, weight)
}

/// [`turbulent_residuals`] with the terms at both ends given.
pub(crate) fn turbulent_residuals_between(
    a: &LayerState,
    at_a: &TurbulentTerms,
    b: &LayerState,
    at_b: &TurbulentTerms,
    ds: f64,
    weight: f64,
) -> [f64; 3] {
    let d_log_ue = (b.edge_velocity / a.edge_velocity).ln();
    let changes = [
        (b.theta / a.theta).ln(),
        (b.theta * at_b.entrainment_shape_factor / (a.theta * at_a.entrainment_shape_factor)).ln(),
        b.entrainment - a.entrainment,
    ];
    let mean = |p: f64, q: f64| (1.0 - weight) * p + weight * q;
    let mut r = [0.0; 3];
    for k in 0..3 {
        r[k] = changes[k]
            - ds * mean(at_a.source[k], at_b.source[k])
            - mean(at_a.gradient[k], at_b.gradient[k]) * d_log_ue;
    }
    r
}

/// Turbulent state just after transition: θ continuous; H = the laminar H capped to
/// [H0(Reθ) .. TRANSITION_SHAPE_FACTOR_CAP] (δ* continuous where possible; our choice); CE from its
/// equilibrium value CE,EQ0 at that state (GWB 1977 start CE at equilibrium when it is unknown —
/// from memory of the report).
pub(crate) fn turbulent_start(laminar: &LayerState, reynolds: f64) -> LayerState {
    let re_theta = reynolds * laminar.edge_velocity * laminar.theta;
    let h0 = flat_plate_shape_factor(flat_plate_skin_friction(re_theta));
    let h = laminar
        .shape_factor
        .min(TRANSITION_SHAPE_FACTOR_CAP)
        .max(h0.min(TRANSITION_SHAPE_FACTOR_CAP));
    let cf = turbulent_skin_friction(h, re_theta);
    let ce = equilibrium_entrainment(h, cf).clamp(1e-4, ENTRAINMENT_RANGE.1);
    LayerState {
        theta: laminar.theta,
        shape_factor: h,
        entrainment: ce,
        edge_velocity: laminar.edge_velocity,
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn flat_plate_equilibrium_is_consistent() {
        // On a flat plate at its equilibrium H0 the pressure-gradient parameter is nearly zero
        // and the lag equation is in balance (consistency of the GWB relations, common practice).
        let cf0 = flat_plate_skin_friction(5000.0);
        let h0 = flat_plate_shape_factor(cf0);
        assert!((turbulent_skin_friction(h0, 5000.0) - cf0).abs() < 1e-12);
        assert!(equilibrium_pressure_gradient(h0, cf0).abs() < 2e-4);
        assert!(h0 > 1.25 && h0 < 1.45);
    }

    #[test]
    fn skin_friction_vanishes_near_h_2_2_h0() {
        // Cf/Cf0 = 0.9/(H/H0 − 0.4) − 0.5 is zero at H/H0 = 2.2 (GWB 1977).
        let cf0 = flat_plate_skin_friction(3000.0);
        let h0 = flat_plate_shape_factor(cf0);
        assert!(turbulent_skin_friction(2.2 * h0, 3000.0).abs() < 1e-12);
    }
}
