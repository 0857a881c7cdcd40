//! Forces from the surface distributions: lift, pitching moment and pressure drag from the
//! surface pressure, skin-friction drag from the wall shear, and the drag bookkeeping of the
//! trailing-edge and far-wake states.
//!
//! All quantities are per unit span, made non-dimensional with ½ρU∞² and the chord (chord 1,
//! U∞ = 1 in the core's units).

/// Lift, pitching moment about the quarter chord and pressure drag of a closed surface.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct PressureForces {
    /// Lift coefficient (normal to the free stream).
    pub cl: f64,
    /// Pressure drag coefficient (along the free stream).
    pub cd: f64,
    /// Pitching-moment coefficient about (0.25, 0), positive nose-up.
    pub cm_c4: f64,
}

/// Integrate the pressure coefficient `cp` over the surface polygon (`x`, `y`), nodes running
/// counter-clockwise from the upper trailing edge round to the lower one; the trailing-edge
/// base (last node back to the first) closes the contour. Cp varies linearly along each
/// segment and the segment integrals are exact for that: F = −∮ Cp n ds with the outward
/// normal n, cl = F·(−sin α, cos α), cd = F·(cos α, sin α), and the moment of the same
/// pressure about the quarter chord.
pub fn integrate_pressure(x: &[f64], y: &[f64], cp: &[f64], alpha_deg: f64) -> PressureForces {
    let (fx, fy, mz) = pressure_sums(x, y, cp, x.len());
    let a = alpha_deg.to_radians();
    PressureForces {
        cl: -fx * a.sin() + fy * a.cos(),
        cd: fx * a.cos() + fy * a.sin(),
        // Nose-up is clockwise, the opposite of the z-moment.
        cm_c4: -mz,
    }
}

/// Pressure drag of the wetted surfaces only: the integral of [`integrate_pressure`] without
/// the closing trailing-edge base (zero length on a sharp trailing edge).
///
/// The coupled model has no base pressure of its own: its two trailing-edge nodes carry the edge
/// pressure of the layers there, and the wake starts from the two sides' layers with nothing for
/// the base. Applied to the base, that pressure (Cp ≈ +0.2 in a recovering flow) gives a thrust
/// −Cp·h with no counterpart in the far-wake momentum deficit; left out, the near-field
/// breakdown cd_friction + cd_pressure accounts for the same flow as the far-wake drag.
pub fn wetted_pressure_drag(x: &[f64], y: &[f64], cp: &[f64], alpha_deg: f64) -> f64 {
    let (fx, fy, _) = pressure_sums(x, y, cp, x.len().saturating_sub(1));
    let a = alpha_deg.to_radians();
    fx * a.cos() + fy * a.sin()
}

/// Force (fx, fy) and z-moment about (0.25, 0) of the pressure on the first `segments`
/// segments of the counter-clockwise contour (segment i runs from node i to node i + 1, the
/// last one back to node 0), Cp linear along each (the exact segment integrals of
/// [`integrate_pressure`]).
fn pressure_sums(x: &[f64], y: &[f64], cp: &[f64], segments: usize) -> (f64, f64, f64) {
    let n = x.len();
    let (mut fx, mut fy, mut mz) = (0.0, 0.0, 0.0);
    for i in 0..segments {
        let j = (i + 1) % n;
        let (dx, dy) = (x[j] - x[i], y[j] - y[i]);
        // Outward normal times length for a counter-clockwise contour: (dy, −dx).
        let (nx, ny) = (dy, -dx);
        let (pa, pb) = (cp[i], cp[j]);
        let mean = 0.5 * (pa + pb);
        fx -= mean * nx;
        fy -= mean * ny;
        // ∫ Cp r dξ over the segment for linear Cp: L[(2pa + pb) ra + (pa + 2pb) rb]/6.
        let rx = ((2.0 * pa + pb) * (x[i] - 0.25) + (pa + 2.0 * pb) * (x[j] - 0.25)) / 6.0;
        let ry = ((2.0 * pa + pb) * y[i] + (pa + 2.0 * pb) * y[j]) / 6.0;
        // z-moment of dF = −Cp n dξ: r × dF = −(rx ny − ry nx).
        mz -= rx * ny - ry * nx;
    }
    (fx, fy, mz)
}

/// Skin-friction drag of one side: ∫ τ_w (t·e∞) ds with τ_w/(½ρU∞²) = cf (ue/U∞)², cf based
/// on the local edge speed, t the unit tangent in the flow direction. The side's points are
/// ordered downstream starting at the stagnation point, where the wall shear vanishes; the
/// trapezoidal rule integrates between them.
pub fn friction_drag(x: &[f64], y: &[f64], cf: &[f64], ue: &[f64], alpha_deg: f64) -> f64 {
    let a = alpha_deg.to_radians();
    let (ex, ey) = (a.cos(), a.sin());
    let shear = |k: usize| cf[k] * ue[k] * ue[k];
    let mut total = 0.0;
    for k in 0..x.len().saturating_sub(1) {
        let along = (x[k + 1] - x[k]) * ex + (y[k + 1] - y[k]) * ey;
        total += 0.5 * (shear(k) + shear(k + 1)) * along;
    }
    total
}

/// Squire–Young's drag of one side from its trailing-edge state (Squire & Young, ARC R&M 1838,
/// 1938): 2 θ (ue/U∞)^((H + 5)/2), chord 1.
pub fn squire_young(theta: f64, edge_velocity: f64, shape_factor: f64) -> f64 {
    2.0 * theta * edge_velocity.abs().powf(0.5 * (shape_factor + 5.0))
}

/// Drag from the momentum defect at the end of the wake, cd = 2θ∞/c. When the wake ends
/// before the edge speed has returned to the free stream, the remaining recovery is added by
/// Squire & Young's relation applied to the wake-end state, 2θ (ue/U∞)^((H + 5)/2); as
/// ue → U∞ and H → 1 this is exactly 2θ∞, so the correction is applied always and is tiny
/// for a wake several chords long.
pub fn far_wake_drag(theta_end: f64, edge_velocity_end: f64, shape_factor_end: f64) -> f64 {
    squire_young(theta_end, edge_velocity_end, shape_factor_end)
}

#[cfg(test)]
mod tests {
    use super::*;

    fn ellipse(n: usize, t: f64) -> (Vec<f64>, Vec<f64>) {
        let mut x = Vec::new();
        let mut y = Vec::new();
        for i in 0..n {
            let th = 2.0 * std::f64::consts::PI * i as f64 / n as f64;
            x.push(0.5 + 0.5 * th.cos());
            y.push(0.5 * t * th.sin());
        }
        (x, y)
    }

    /// A uniform pressure exerts no net force or moment on a closed body (common practice).
    #[test]
    fn uniform_pressure_gives_no_force() {
        let (x, y) = ellipse(100, 0.12);
        let cp = vec![0.7; 100];
        let f = integrate_pressure(&x, &y, &cp, 5.0);
        assert!(f.cl.abs() < 1e-12 && f.cd.abs() < 1e-12 && f.cm_c4.abs() < 1e-12);
    }

    /// A flat plate with Cp = −1 above and +1 below carries cl = 2 at α = 0 with its centre of
    /// pressure at mid-chord, so cm_c4 = −2 × 0.25 = −0.5 (common practice).
    #[test]
    fn pressure_difference_gives_lift_and_nose_down_moment() {
        let n = 51;
        let mut x = Vec::new();
        let mut y = Vec::new();
        let mut cp = Vec::new();
        for i in 0..n {
            x.push(1.0 - i as f64 / (n - 1) as f64);
            y.push(1e-9);
            cp.push(-1.0);
        }
        for i in 1..n - 1 {
            x.push(i as f64 / (n - 1) as f64);
            y.push(-1e-9);
            cp.push(1.0);
        }
        let f = integrate_pressure(&x, &y, &cp, 0.0);
        assert!((f.cl - 2.0).abs() < 0.05, "{}", f.cl);
        assert!((f.cm_c4 + 0.5).abs() < 0.02, "{}", f.cm_c4);
        assert!(f.cd.abs() < 1e-6);
    }

    /// A blunt base under uniform pressure: the closed contour feels no force, so the wetted
    /// surfaces alone carry minus the base's force, −Cp·h along the free stream (common
    /// practice: the pressure on a body's forward- and aft-facing projections balances).
    #[test]
    fn wetted_surfaces_exclude_the_base() {
        // Rectangle 1 × h traversed counter-clockwise from the upper trailing-edge corner.
        let h = 0.01;
        let x = vec![1.0, 0.0, 0.0, 1.0];
        let y = vec![h / 2.0, h / 2.0, -h / 2.0, -h / 2.0];
        let cp = vec![0.25; 4];
        assert!(integrate_pressure(&x, &y, &cp, 0.0).cd.abs() < 1e-15);
        // The base (x = 1, facing downstream) pushes forward with 0.25 h; without it the
        // forward-facing face at x = 0 is left, a drag of +0.25 h.
        assert!((wetted_pressure_drag(&x, &y, &cp, 0.0) - 0.25 * h).abs() < 1e-15);
        // A sharp trailing edge (first point = last point) has no base to leave out.
        let (xs, ys) = ellipse(60, 0.1);
        let cps: Vec<f64> = xs.iter().map(|v| 0.3 * v).collect();
        let mut xc = xs.clone();
        let mut yc = ys.clone();
        let mut cpc = cps.clone();
        xc.push(xs[0]);
        yc.push(ys[0]);
        cpc.push(cps[0]);
        let closed = integrate_pressure(&xc, &yc, &cpc, 3.0).cd;
        assert!((wetted_pressure_drag(&xc, &yc, &cpc, 3.0) - closed).abs() < 1e-15);
    }

    /// A flat plate at zero incidence with constant cf: drag = cf × length (common practice).
    #[test]
    fn friction_on_a_plate() {
        let x: Vec<f64> = (0..11).map(|i| i as f64 / 10.0).collect();
        let y = vec![0.0; 11];
        let cf = vec![0.004; 11];
        let ue = vec![1.0; 11];
        assert!((friction_drag(&x, &y, &cf, &ue, 0.0) - 0.004).abs() < 1e-12);
    }

    /// Squire & Young at ue = U∞, H = 1 reduces to 2θ (Squire & Young, ARC R&M 1838, 1938).
    #[test]
    fn squire_young_limits() {
        assert!((squire_young(0.003, 1.0, 1.4) - 0.006).abs() < 1e-15);
        assert!(squire_young(0.003, 0.9, 1.4) < 0.006);
        assert!((far_wake_drag(0.003, 1.0, 1.0) - 0.006).abs() < 1e-15);
    }
}
