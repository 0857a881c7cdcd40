//! Residuals of the integral equations of one station, written for a simultaneous solution of
//! all stations together (the coupled Newton iteration of `coupling::newton`).
//!
//! A march solves station after station; a simultaneous solution instead needs, for every
//! station, three residuals as a function of its own state and that of the station(s) it
//! starts from, so that a Newton iteration can linearise them all at once (Drela & Giles,
//! "Viscous-inviscid analysis of transonic and low Reynolds number airfoils", AIAA J. 25,
//! 1987, describe this global formulation). The equations are the ones the marches use:
//! laminar momentum and kinetic-energy integrals with the Falkner–Skan closure
//! ([`super::laminar`]), the amplification equation dN/ds of the envelope method
//! ([`super::transition`]), and the lag-entrainment equations ([`super::lag_entrainment`]).
//!
//! Each station carries three unknowns besides its edge speed: ln θ, a third variable (the
//! amplification factor N while laminar, the entrainment coefficient CE when turbulent or in
//! the wake) and the shape factor through the mass defect.

pub(crate) use super::lag_entrainment::turbulent_residuals_between;
use super::lag_entrainment::{turbulent_residuals, turbulent_start, TurbulentTerms};
use super::laminar::{
    laminar_residuals, laminar_residuals_between, stagnation_theta, LaminarTerms,
    LAMINAR_SHAPE_FACTOR_RANGE, STAGNATION_SHAPE_FACTOR,
};
use super::laminar_closure::LaminarClosure;
use super::station::LayerState;
use super::transition::AmplificationModel;

/// The closures and flow conditions every residual needs.
#[derive(Clone, Copy)]
pub(crate) struct EquationContext<'a> {
    /// Chord Reynolds number.
    pub reynolds: f64,
    /// Critical amplification factor of free transition.
    pub n_critical: f64,
    /// Laminar closure (energy shape factor, friction, dissipation).
    pub closure: &'a dyn LaminarClosure,
    /// Envelope growth rate dN/ds.
    pub amplification: &'a dyn AmplificationModel,
}

impl EquationContext<'_> {
    /// dN/ds of a laminar state, never negative or non-finite.
    pub(crate) fn growth(&self, state: &LayerState) -> f64 {
        let g = self.amplification.growth_rate(
            state.shape_factor,
            self.reynolds * state.edge_velocity * state.theta,
            state.theta,
        );
        if g.is_finite() {
            g.max(0.0)
        } else {
            0.0
        }
    }
}

/// A station's state with its third variable: N while laminar (then `state.entrainment` is 0),
/// CE when turbulent or in the wake.
#[derive(Debug, Clone, Copy)]
pub(crate) struct StationState {
    pub state: LayerState,
    pub amplification: f64,
}

/// Residuals of the first station of a side, started by the stagnation-point similarity
/// solution (Hiemenz flow, Falkner–Skan m = 1): θ = 0.2923√(ν/K), H = 2.2162, N = 0, with the
/// velocity gradient K = `gradient_ue`/`gradient_s`. With `turbulent` (a trip ahead of the
/// first station) the similarity state is made turbulent as at any transition
/// ([`turbulent_start`]).
pub(crate) fn start_residual(
    ctx: &EquationContext,
    b: &StationState,
    gradient_s: f64,
    gradient_ue: f64,
    turbulent: bool,
) -> [f64; 3] {
    let theta = stagnation_theta(gradient_s, gradient_ue, ctx.reynolds);
    let similar = LayerState {
        theta,
        shape_factor: STAGNATION_SHAPE_FACTOR,
        entrainment: 0.0,
        edge_velocity: b.state.edge_velocity,
    };
    if turbulent {
        let start = turbulent_start(&similar, ctx.reynolds);
        [
            (b.state.theta / start.theta).ln(),
            b.state.shape_factor - start.shape_factor,
            (b.state.entrainment - start.entrainment) / start.entrainment.max(1e-3),
        ]
    } else {
        [
            (b.state.theta / theta).ln(),
            b.state.shape_factor - STAGNATION_SHAPE_FACTOR,
            b.amplification,
        ]
    }
}

/// Residuals of a laminar interval a → b: momentum, kinetic energy (trapezoidal rule for
/// `weight` 0.5, backward Euler for 1) and the amplification equation
/// N_b − N_a = Δs (g_a + g_b)/2.
pub(crate) fn laminar_interval_residual(
    ctx: &EquationContext,
    a: &StationState,
    b: &StationState,
    ds: f64,
    weight: f64,
) -> [f64; 3] {
    let (at_a, at_b) = (ctx.laminar_end(&a.state), ctx.laminar_end(&b.state));
    laminar_interval_residual_between(a, &at_a, b, &at_b, ds, weight)
}

/// [`laminar_interval_residual`] with the terms at both ends given (the linearisation
/// perturbs one end at a time and reuses the other's).
pub(crate) fn laminar_interval_residual_between(
    a: &StationState,
    at_a: &LaminarEnd,
    b: &StationState,
    at_b: &LaminarEnd,
    ds: f64,
    weight: f64,
) -> [f64; 3] {
    let [r1, r2] =
        laminar_residuals_between(&a.state, &at_a.terms, &b.state, &at_b.terms, ds, weight);
    let growth = 0.5 * ds * (at_a.growth + at_b.growth);
    [r1, r2, b.amplification - a.amplification - growth]
}

/// The terms of the laminar equations at one end of an interval and its dN/ds.
#[derive(Debug, Clone, Copy)]
pub(crate) struct LaminarEnd {
    terms: LaminarTerms,
    growth: f64,
}

impl EquationContext<'_> {
    /// The laminar terms and dN/ds at `state`.
    pub(crate) fn laminar_end(&self, state: &LayerState) -> LaminarEnd {
        LaminarEnd {
            terms: LaminarTerms::new(state, self.reynolds, self.closure),
            growth: self.growth(state),
        }
    }
}

/// Residuals of a turbulent interval on the wall or in the wake (momentum, entrainment, lag).
pub(crate) fn turbulent_interval_residual(
    ctx: &EquationContext,
    a: &LayerState,
    b: &LayerState,
    ds: f64,
    weight: f64,
    wake: bool,
) -> [f64; 3] {
    let at_a = TurbulentTerms::new(a, ctx.reynolds, wake);
    turbulent_residuals(a, &at_a, b, ds, weight, ctx.reynolds, wake)
}

/// Where, inside a transition interval, the layer becomes turbulent, and its laminar state there.
#[derive(Debug, Clone, Copy)]
pub(crate) struct TransitionPoint {
    /// Fraction of the interval laminar flow covers, 0..1.
    pub fraction: f64,
    /// Laminar state at the transition point.
    pub laminar: LayerState,
}

/// Largest change of the shape factor in the explicit laminar step of a transition interval.
const MAX_EXPLICIT_SHAPE_CHANGE: f64 = 0.5;
/// Smallest |dH*/dH| used to turn the kinetic-energy equation into a change of H (H* has its
/// minimum near laminar separation, where dH*/dH vanishes).
const MIN_ENERGY_SHAPE_SLOPE: f64 = 0.05;

/// Rates of change along s of ln θ and of H from the laminar momentum and kinetic-energy
/// equations at `state`, for a given d ln ue/ds (dH/ds = (dH*/ds)/(dH*/dH), with |dH*/dH| kept
/// above MIN_ENERGY_SHAPE_SLOPE).
fn laminar_rates(ctx: &EquationContext, state: &LayerState, d_log_ue: f64) -> (f64, f64) {
    let terms = LaminarTerms::new(state, ctx.reynolds, ctx.closure);
    let (source, gradient) = terms.parts();
    let h = state.shape_factor;
    let slope = (ctx.closure.energy_shape_factor(h + 1e-4)
        - ctx.closure.energy_shape_factor(h - 1e-4))
        / 2e-4;
    let slope = if slope.abs() < MIN_ENERGY_SHAPE_SLOPE {
        MIN_ENERGY_SHAPE_SLOPE.copysign(slope)
    } else {
        slope
    };
    (
        source[0] + gradient[0] * d_log_ue,
        (source[1] + gradient[1] * d_log_ue) / slope,
    )
}

/// Laminar state at fraction `f` of the interval a → b: one explicit Heun (second-order
/// Runge–Kutta) step of the momentum and kinetic-energy equations from a over f·Δs, with the
/// edge speed interpolated linearly, ue = ue_a + f (ue_b − ue_a). Explicit so that it always
/// exists and is smooth in every argument (the coupled Newton iteration differentiates it);
/// second order, like the trapezoidal rule of the laminar intervals, so the state it gives at
/// the interval's end is close to the one a laminar interval would have there.
pub(crate) fn laminar_at_fraction(
    ctx: &EquationContext,
    a: &LayerState,
    ue_b: f64,
    ds: f64,
    f: f64,
) -> LayerState {
    let ue = a.edge_velocity + f * (ue_b - a.edge_velocity);
    let d_log_ue = (ue_b / a.edge_velocity).ln() / ds;
    let step = f * ds;
    let limit = |dh: f64| dh.clamp(-MAX_EXPLICIT_SHAPE_CHANGE, MAX_EXPLICIT_SHAPE_CHANGE);
    let bounded = |h: f64| h.clamp(LAMINAR_SHAPE_FACTOR_RANGE.0, LAMINAR_SHAPE_FACTOR_RANGE.1);
    let (r_theta, r_h) = laminar_rates(ctx, a, d_log_ue);
    let predictor = LayerState {
        theta: (a.theta.ln() + step * r_theta).exp(),
        shape_factor: bounded(a.shape_factor + limit(step * r_h)),
        entrainment: 0.0,
        edge_velocity: ue,
    };
    let (p_theta, p_h) = laminar_rates(ctx, &predictor, d_log_ue);
    LayerState {
        theta: (a.theta.ln() + 0.5 * step * (r_theta + p_theta)).exp(),
        shape_factor: bounded(a.shape_factor + limit(0.5 * step * (r_h + p_h))),
        entrainment: 0.0,
        edge_velocity: ue,
    }
}

/// Iterations of the root search for the transition point (Illinois false position).
const ROOT_ITERATIONS: usize = 60;

/// Locates transition inside the interval [sa, sb] that starts from the laminar state `a`
/// (amplification `n_a`) and ends at edge speed `ue_b`: the trip `trip_s` or the point where
/// N_a + f Δs (g_a + g_t)/2 reaches the critical N (g_t the growth rate of the laminar state at
/// fraction f, [`laminar_at_fraction`]), whichever comes first. The same amplification at the
/// interval's end decides whether transition belongs in this interval at all, so moving it
/// between intervals cannot cycle.
pub(crate) fn transition_point(
    ctx: &EquationContext,
    a: &StationState,
    ue_b: f64,
    sa: f64,
    sb: f64,
    trip_s: Option<f64>,
) -> TransitionPoint {
    let ds = sb - sa;
    let n_a = a.amplification;
    let g_a = ctx.growth(&a.state);
    let amplification_at = |f: f64| {
        let t = laminar_at_fraction(ctx, &a.state, ue_b, ds, f);
        n_a + 0.5 * f * ds * (g_a + ctx.growth(&t))
    };
    let n_end = amplification_at(1.0);
    let trip_fraction = trip_s
        .filter(|&t| t <= sb)
        .map(|t| ((t - sa) / ds).clamp(0.0, 1.0));
    let free_fraction = if n_a >= ctx.n_critical {
        Some(0.0)
    } else if n_end >= ctx.n_critical {
        // Illinois false position on N(f) − N_crit over [0, 1].
        let (mut lo, mut hi) = (0.0_f64, 1.0_f64);
        let (mut r_lo, mut r_hi) = (n_a - ctx.n_critical, n_end - ctx.n_critical);
        let mut side = 0;
        let mut f = 1.0;
        for _ in 0..ROOT_ITERATIONS {
            f = if r_hi != r_lo {
                (lo * r_hi - hi * r_lo) / (r_hi - r_lo)
            } else {
                0.5 * (lo + hi)
            };
            let r = amplification_at(f) - ctx.n_critical;
            if r.abs() < 1e-14 || hi - lo < 1e-15 {
                break;
            }
            if (r > 0.0) == (r_hi > 0.0) {
                hi = f;
                r_hi = r;
                if side == 1 {
                    r_lo *= 0.5;
                }
                side = 1;
            } else {
                lo = f;
                r_lo = r;
                if side == -1 {
                    r_hi *= 0.5;
                }
                side = -1;
            }
        }
        Some(f.clamp(0.0, 1.0))
    } else {
        None
    };
    let fraction = match (free_fraction, trip_fraction) {
        (Some(f), Some(t)) => f.min(t),
        (Some(f), None) => f,
        (None, Some(t)) => t,
        (None, None) => 1.0,
    };
    TransitionPoint {
        fraction,
        laminar: laminar_at_fraction(ctx, &a.state, ue_b, ds, fraction),
    }
}

/// The wake's first state, merged from the two trailing-edge states: θ = θu + θl,
/// δ* = δ*u + δ*l, the mass defect continuous (ue = (ue_u δ*u + ue_l δ*l)/(δ*u + δ*l)), CE the
/// θ-weighted mean of the two sides' (zero from a laminar side).
pub(crate) fn merged_wake_start(upper: &LayerState, lower: &LayerState) -> LayerState {
    let theta = upper.theta + lower.theta;
    let (du, dl) = (
        upper.theta * upper.shape_factor,
        lower.theta * lower.shape_factor,
    );
    let delta_star = du + dl;
    let edge_velocity = if delta_star > 0.0 {
        (upper.edge_velocity * du + lower.edge_velocity * dl) / delta_star
    } else {
        0.5 * (upper.edge_velocity + lower.edge_velocity)
    };
    LayerState {
        theta,
        shape_factor: delta_star / theta,
        entrainment: (upper.theta * upper.entrainment + lower.theta * lower.entrainment) / theta,
        edge_velocity,
    }
}

/// How fast the integration rule of an interval moves from the trapezoidal rule towards
/// backward Euler as the shape factor changes between its ends (our choice: a 10 % change
/// gives weight 0.61, a 40 % change 0.98).
const UPWIND_SENSITIVITY: f64 = 25.0;

/// Weight of the end state in an interval's integration rule: 0.5 (trapezoidal, second order)
/// where the shape factor changes little between the stations, rising smoothly to 1 (backward
/// Euler) where it changes fast. The trapezoidal rule leaves the odd–even (saw-tooth) mode of
/// nearly algebraic stretches of the equations undamped; weighting towards the downstream end
/// damps it (hybrid differencing, common practice).
pub(crate) fn upwinded_weight(h_a: f64, h_b: f64) -> f64 {
    let r = (h_b / h_a).ln();
    if !r.is_finite() {
        return 1.0;
    }
    1.0 - 0.5 * (-UPWIND_SENSITIVITY * r * r).exp()
}

/// Largest change of the laminar shape factor from station a to the transition point, as a
/// fraction of H_a (keeps the extrapolation sane where H changes fast).
const MAX_TRANSITION_SHAPE_CHANGE: f64 = 0.5;

/// Laminar shape factor at the transition point, fraction f of the interval [sa, sb]: H_a
/// extrapolated linearly with the slope between the two laminar stations before it
/// (`previous` = (H, s) of the station before a, when laminar). Extrapolated rather than solved
/// from the kinetic-energy equation because with the edge speed tied to the two stations that
/// equation is singular where dH*/dH vanishes, near laminar separation — where transition in a
/// separation bubble happens.
pub(crate) fn transition_shape_factor(
    previous: Option<(f64, f64)>,
    h_a: f64,
    sa: f64,
    sb: f64,
    f: f64,
) -> f64 {
    let slope = previous.map_or(0.0, |(h, s)| (h_a - h) / (sa - s).max(1e-12));
    let change = (f * (sb - sa) * slope).clamp(
        -MAX_TRANSITION_SHAPE_CHANGE * h_a,
        MAX_TRANSITION_SHAPE_CHANGE * h_a,
    );
    (h_a + change).clamp(LAMINAR_SHAPE_FACTOR_RANGE.0, LAMINAR_SHAPE_FACTOR_RANGE.1)
}

/// Residuals of the first turbulent station b of a side, whose interval from the laminar
/// station a holds the transition point. The momentum thickness of the laminar layer at that
/// point, ln θ_t, and the point's fraction f of the interval are unknowns of b as well
/// (`transition`), so b has five equations: laminar momentum from a to the point (edge speed
/// interpolated linearly, H from [`transition_shape_factor`]), the transition criterion
/// N_a + f Δs (g_a + g_t)/2 = N_crit (or f at the trip when the trip lies in the interval),
/// and the lag-entrainment equations from the turbulent start of the point's state
/// ([`turbulent_start`]) to b. f is not bounded: a solution outside [0, 1] says that
/// transition belongs in a neighbouring interval, and the regimes are moved there. The
/// residual is smooth in every unknown and continuous as f passes 0 or 1.
#[allow(clippy::too_many_arguments)]
pub(crate) fn transition_station_residual(
    ctx: &EquationContext,
    previous: Option<(f64, f64)>,
    a: &StationState,
    b: &StationState,
    transition: [f64; 2],
    sa: f64,
    sb: f64,
    trip_s: Option<f64>,
) -> [f64; 5] {
    let ds = sb - sa;
    let [ln_theta, f] = transition;
    let ue_t =
        (a.state.edge_velocity + f * (b.state.edge_velocity - a.state.edge_velocity)).max(1e-6);
    let point = LayerState {
        theta: ln_theta.exp(),
        shape_factor: transition_shape_factor(previous, a.state.shape_factor, sa, sb, f),
        entrainment: 0.0,
        edge_velocity: ue_t,
    };
    let at_a = LaminarTerms::new(&a.state, ctx.reynolds, ctx.closure);
    let laminar_weight = upwinded_weight(a.state.shape_factor, point.shape_factor).max(0.5);
    let [r1, _] = laminar_residuals(
        &a.state,
        &at_a,
        &point,
        f * ds,
        laminar_weight,
        ctx.reynolds,
        ctx.closure,
    );
    let trip_fraction = trip_s.filter(|&t| t > sa && t <= sb).map(|t| (t - sa) / ds);
    let r2 = match trip_fraction {
        Some(ft) => f - ft,
        None => {
            a.amplification + 0.5 * f * ds * (ctx.growth(&a.state) + ctx.growth(&point))
                - ctx.n_critical
        }
    };
    let start = turbulent_start(&point, ctx.reynolds);
    let turbulent_weight = upwinded_weight(start.shape_factor, b.state.shape_factor).max(0.5);
    let [r3, r4, r5] = turbulent_interval_residual(
        ctx,
        &start,
        &b.state,
        (1.0 - f) * ds,
        turbulent_weight,
        false,
    );
    [r1, r2, r3, r4, r5]
}
