//! March along one surface side from the stagnation point: laminar two-equation method, e^N or
//! forced transition, turbulent lag-entrainment, each station solved implicitly (trapezoidal
//! rule, second order) by a local Newton iteration together with the interaction law.

use super::lag_entrainment::{
    state_skin_friction, turbulent_residuals, turbulent_start, TurbulentTerms, ENTRAINMENT_RANGE,
    TURBULENT_SHAPE_FACTOR_RANGE, WAKE_SHAPE_FACTOR_RANGE,
};
use super::laminar::{
    laminar_coefficients, laminar_residuals, stagnation_theta, LaminarTerms,
    LAMINAR_SHAPE_FACTOR_RANGE, STAGNATION_SHAPE_FACTOR,
};
use super::laminar_closure::LaminarClosure;
use super::local_newton::{solve, NewtonOptions};
use super::station::{
    interacted_velocity, validate_input, zero_crossing, LayerState, MarchSettings, Regime,
    SideInput, SideSolution, Station, MIN_EDGE_VELOCITY,
};
use super::transition::AmplificationModel;
use super::transition_interval::TransitionInterval;

/// Edge conditions of the station being solved.
#[derive(Debug, Clone, Copy)]
pub(crate) struct EdgeCondition {
    pub external_velocity: f64,
    pub interaction_coefficient: f64,
}

impl EdgeCondition {
    /// Residual of the interaction law ue = U + k·ue·δ*.
    fn residual(&self, state: &LayerState) -> f64 {
        state.edge_velocity
            - self.external_velocity
            - self.interaction_coefficient * state.edge_velocity * state.shape_factor * state.theta
    }

    /// The edge velocity the interaction law gives a station carrying the displacement
    /// thickness of `a` (the Newton start of a step from `a`).
    fn velocity_guess(&self, a: &LayerState) -> f64 {
        interacted_velocity(
            self.external_velocity,
            self.interaction_coefficient,
            a.shape_factor * a.theta,
            a.edge_velocity,
        )
    }

    fn velocity_bounds(&self) -> (f64, f64) {
        (
            MIN_EDGE_VELOCITY,
            10.0 * self.external_velocity.abs().max(1.0) + 10.0,
        )
    }
}

fn newton_options<const N: usize>(
    settings: &MarchSettings,
    lower: [f64; N],
    upper: [f64; N],
    max_step: [f64; N],
    typical: [f64; N],
) -> NewtonOptions<N> {
    NewtonOptions {
        max_iterations: settings.max_newton_iterations,
        tolerance: settings.newton_tolerance,
        lower,
        upper,
        max_step,
        typical,
    }
}

/// Solves one laminar interval from `a` over `ds`; returns the state and whether Newton converged.
fn laminar_step_with(
    a: &LayerState,
    ds: f64,
    edge: EdgeCondition,
    settings: &MarchSettings,
    closure: &dyn LaminarClosure,
    weight: f64,
    memory: &mut StepMemory,
) -> (LayerState, bool) {
    let re = settings.reynolds;
    let unpack = |x: &[f64; 3]| LayerState {
        theta: x[0].exp(),
        shape_factor: x[1],
        entrainment: 0.0,
        edge_velocity: x[2],
    };
    let ue_guess = edge.velocity_guess(a);
    let (ue_min, ue_max) = edge.velocity_bounds();
    let options = newton_options(
        settings,
        [(1e-14_f64).ln(), LAMINAR_SHAPE_FACTOR_RANGE.0, ue_min],
        [0.0, LAMINAR_SHAPE_FACTOR_RANGE.1, ue_max],
        [1.0, 0.5, 0.2 * ue_guess.max(0.05)],
        [1.0, 1.0, 1.0],
    );
    let at_a = LaminarTerms::new(a, re, closure);
    let outcome = solve(
        match memory.guess {
            Some(g) => [g.theta.ln(), g.shape_factor, g.edge_velocity],
            None => [a.theta.ln(), a.shape_factor, ue_guess],
        },
        |x| {
            let b = unpack(x);
            let [r1, r2] = laminar_residuals(a, &at_a, &b, ds, weight, re, closure);
            [r1, r2, edge.residual(&b)]
        },
        &options,
        &mut None,
    );
    (unpack(&outcome.x), outcome.converged)
}

/// Solves one turbulent (wall or wake) interval from `a` over `ds`.
fn turbulent_step_with(
    a: &LayerState,
    ds: f64,
    edge: EdgeCondition,
    settings: &MarchSettings,
    wake: bool,
    weight: f64,
    memory: &mut StepMemory,
) -> (LayerState, bool) {
    let re = settings.reynolds;
    let unpack = |x: &[f64; 4]| LayerState {
        theta: x[0].exp(),
        shape_factor: x[1],
        entrainment: x[2],
        edge_velocity: x[3],
    };
    let ue_guess = edge.velocity_guess(a);
    let (ue_min, ue_max) = edge.velocity_bounds();
    let h_range = if wake {
        WAKE_SHAPE_FACTOR_RANGE
    } else {
        TURBULENT_SHAPE_FACTOR_RANGE
    };
    let options = newton_options(
        settings,
        [(1e-14_f64).ln(), h_range.0, ENTRAINMENT_RANGE.0, ue_min],
        [0.0, h_range.1, ENTRAINMENT_RANGE.1, ue_max],
        [
            1.0,
            0.3,
            0.5 * a.entrainment.abs().max(0.01),
            0.2 * ue_guess.max(0.05),
        ],
        [1.0, 1.0, 0.01, 1.0],
    );
    let guess_h = a.shape_factor.clamp(h_range.0, h_range.1);
    let at_a = TurbulentTerms::new(a, re, wake);
    let outcome = solve(
        match memory.guess {
            Some(g) => [g.theta.ln(), g.shape_factor, g.entrainment, g.edge_velocity],
            None => [a.theta.ln(), guess_h, a.entrainment, ue_guess],
        },
        |x| {
            let b = unpack(x);
            let [r1, r2, r3] = turbulent_residuals(a, &at_a, &b, ds, weight, re, wake);
            [r1, r2, r3, edge.residual(&b)]
        },
        &options,
        &mut None,
    );
    (unpack(&outcome.x), outcome.converged)
}

/// Laminar interval: trapezoidal rule (backward Euler when `start` is set or the trapezoidal
/// iteration fails, which is more robust and first order for that interval only). `memory`
/// supplies the Newton start (the previous station's state when it has no guess).
pub(crate) fn laminar_step(
    a: &LayerState,
    ds: f64,
    edge: EdgeCondition,
    settings: &MarchSettings,
    closure: &dyn LaminarClosure,
    start: bool,
    memory: &mut StepMemory,
) -> (LayerState, bool) {
    trapezoidal_or_backward_euler(start, memory, |weight, memory| {
        laminar_step_with(a, ds, edge, settings, closure, weight, memory)
    })
}

/// Turbulent or wake interval, with the same fallback as [`laminar_step`].
pub(crate) fn turbulent_step(
    a: &LayerState,
    ds: f64,
    edge: EdgeCondition,
    settings: &MarchSettings,
    wake: bool,
    start: bool,
    memory: &mut StepMemory,
) -> (LayerState, bool) {
    trapezoidal_or_backward_euler(start, memory, |weight, memory| {
        turbulent_step_with(a, ds, edge, settings, wake, weight, memory)
    })
}

/// One interval by `step(weight, memory)`: the trapezoidal rule (weight 0.5), or backward
/// Euler (1) at a layer's start or where the trapezoidal iteration fails, from a fresh start.
fn trapezoidal_or_backward_euler(
    start: bool,
    memory: &mut StepMemory,
    step: impl Fn(f64, &mut StepMemory) -> (LayerState, bool),
) -> (LayerState, bool) {
    if !start {
        let (state, ok) = step(0.5, memory);
        if ok {
            return (state, ok);
        }
    }
    memory.guess = None;
    step(1.0, memory)
}

/// Newton start carried along a march: the first iterate for the next station, extrapolated
/// from the last two (handing over the previous station's Jacobian as well was measured to cost
/// more iterations than it saves, so each station computes its own).
#[derive(Debug, Default, Clone)]
pub(crate) struct StepMemory {
    pub guess: Option<LayerState>,
}

/// Newton start from linear extrapolation of the last two states (ratio = Δs_new/Δs_old);
/// θ extrapolated in ln θ, the result clipped to stay physical.
pub(crate) fn extrapolated(older: &LayerState, newer: &LayerState, ratio: f64) -> LayerState {
    let ahead = |p: f64, q: f64| q + ratio * (q - p);
    LayerState {
        theta: (newer.theta.ln() + ratio * (newer.theta / older.theta).ln()).exp(),
        shape_factor: ahead(older.shape_factor, newer.shape_factor).max(1.0005),
        entrainment: ahead(older.entrainment, newer.entrainment),
        edge_velocity: ahead(older.edge_velocity, newer.edge_velocity).max(MIN_EDGE_VELOCITY),
    }
}

/// Builds the public station record of a state.
pub(crate) fn make_station(
    s: f64,
    state: &LayerState,
    regime: Regime,
    amplification: f64,
    settings: &MarchSettings,
    closure: Option<&dyn LaminarClosure>,
) -> Station {
    let (cf, dissipation) = match (regime, closure) {
        (Regime::Laminar, Some(c)) => laminar_coefficients(state, settings.reynolds, c),
        (Regime::Wake, _) => (0.0, 0.0),
        _ => (state_skin_friction(state, settings.reynolds, false), 0.0),
    };
    Station {
        s,
        edge_velocity: state.edge_velocity,
        theta: state.theta,
        delta_star: state.theta * state.shape_factor,
        shape_factor: state.shape_factor,
        cf,
        amplification,
        shear_lag: if regime == Regime::Laminar {
            0.0
        } else {
            state.entrainment
        },
        regime,
        dissipation,
    }
}

/// Records separation and reattachment events from consecutive stations.
#[derive(Debug, Default)]
pub(crate) struct SeparationTracker {
    pub laminar_separation: Option<f64>,
    pub turbulent_separation: Option<f64>,
    pub reattachment: Option<f64>,
}

impl SeparationTracker {
    /// The side's solution: its stations, transition and the events observed along them.
    pub(crate) fn finish(
        self,
        stations: Vec<Station>,
        transition_s: Option<f64>,
        transition_forced: bool,
        converged: bool,
    ) -> SideSolution {
        SideSolution {
            stations,
            transition_s,
            transition_forced,
            laminar_separation_s: self.laminar_separation,
            turbulent_separation_s: self.turbulent_separation,
            reattachment_s: self.reattachment,
            converged,
        }
    }

    /// Records the events between consecutive stations a and b. A sign change of cf in the
    /// interval where the layer becomes turbulent (a laminar, b turbulent) is the laminar
    /// layer separating as it undergoes transition (the reversed-flow start of a transitional
    /// bubble), not turbulent separation: turbulent separation needs both stations turbulent.
    pub(crate) fn observe(&mut self, a: &Station, b: &Station) {
        if a.cf > 0.0 && b.cf <= 0.0 {
            let s = zero_crossing(a.s, a.cf, b.s, b.cf);
            match (a.regime, b.regime) {
                (_, Regime::Laminar) | (Regime::Laminar, Regime::Turbulent) => {
                    self.laminar_separation.get_or_insert(s);
                }
                (_, Regime::Turbulent) => {
                    self.turbulent_separation.get_or_insert(s);
                }
                (_, Regime::Wake) => {}
            }
        } else if a.cf < 0.0 && b.cf >= 0.0 && b.regime != Regime::Wake {
            self.reattachment
                .get_or_insert(zero_crossing(a.s, a.cf, b.s, b.cf));
        }
    }
}

fn failed_solution() -> SideSolution {
    SideSolution {
        stations: Vec::new(),
        transition_s: None,
        transition_forced: false,
        laminar_separation_s: None,
        turbulent_separation_s: None,
        reattachment_s: None,
        converged: false,
    }
}

/// Replaces a non-finite state by the previous one at the new edge velocity (never NaN).
pub(crate) fn finite_or(state: LayerState, fallback: &LayerState) -> (LayerState, bool) {
    let finite = state.theta.is_finite()
        && state.theta > 0.0
        && state.shape_factor.is_finite()
        && state.entrainment.is_finite()
        && state.edge_velocity.is_finite();
    if finite {
        (state, true)
    } else {
        (*fallback, false)
    }
}

/// Where the direct-mode laminar march broke down: extrapolates cf² (which falls linearly to zero
/// at a Goldstein singularity) from the last two stations.
fn extrapolated_separation(a: &Station, b: &Station) -> Option<f64> {
    if a.regime != Regime::Laminar || b.regime != Regime::Laminar || !(b.cf > 0.0 && a.cf > b.cf) {
        return None;
    }
    let (qa, qb) = (a.cf * a.cf, b.cf * b.cf);
    Some(b.s + qb * (b.s - a.s) / (qa - qb))
}

/// Marches the boundary layer of one side from the stagnation point (see [`SideInput`] for the
/// interaction law). The first station is initialised by the stagnation-flow (Hiemenz,
/// Falkner–Skan m = 1) similarity solution θ = 0.2923√(ν/K), K = ue/s, H = 2.2162. Transition is
/// where the amplification factor N (trapezoidal integral of `amplification`'s dN/ds) reaches
/// `n_critical`, or at `trip_s`, whichever comes first, located by linear interpolation inside the
/// interval. A laminar station whose Newton iteration fails (direct mode at a Goldstein
/// singularity) makes the layer turbulent from the previous station (flagged, not converged).
pub fn march_surface(
    input: &SideInput,
    settings: &MarchSettings,
    closure: &dyn LaminarClosure,
    amplification: &dyn AmplificationModel,
) -> SideSolution {
    if validate_input(input).is_err() || !(settings.reynolds > 0.0 && settings.reynolds.is_finite())
    {
        return failed_solution();
    }
    let re = settings.reynolds;
    let n = input.s.len();
    let edge = |i: usize| EdgeCondition {
        external_velocity: input.external_velocity[i],
        interaction_coefficient: input.interaction_coefficient[i],
    };
    let growth = |st: &LayerState| {
        let g =
            amplification.growth_rate(st.shape_factor, re * st.edge_velocity * st.theta, st.theta);
        if g.is_finite() {
            g.max(0.0)
        } else {
            0.0
        }
    };

    // Stagnation-point start. With δ* = A/√ue (A = 2.2162·0.2923·√(s0/Re)) the interaction law
    // ue − c·A·√ue = E is a quadratic in √ue; its positive root, else the external velocity.
    let s0 = input.s[0].max(1e-12);
    let e0 = edge(0);
    let a_coefficient = STAGNATION_SHAPE_FACTOR * stagnation_theta(s0, 1.0, re);
    let b = e0.interaction_coefficient * a_coefficient;
    let discriminant = b * b + 4.0 * e0.external_velocity;
    let root = 0.5 * (b + discriminant.max(0.0).sqrt());
    let ue = if discriminant >= 0.0 && root * root > MIN_EDGE_VELOCITY {
        root * root
    } else {
        e0.external_velocity.abs().max(MIN_EDGE_VELOCITY)
    };
    let theta = stagnation_theta(s0, ue, re);
    let mut state = LayerState {
        theta,
        shape_factor: STAGNATION_SHAPE_FACTOR,
        entrainment: 0.0,
        edge_velocity: ue,
    };
    let mut regime = Regime::Laminar;
    let mut transition_s = None;
    let mut transition_forced = false;
    if settings.trip_s.is_some_and(|t| t <= input.s[0]) {
        state = turbulent_start(&state, re);
        regime = Regime::Turbulent;
        transition_s = Some(input.s[0]);
        transition_forced = true;
    }
    let mut n_amp = 0.0;
    let mut all_converged = true;
    let mut tracker = SeparationTracker::default();
    let mut previous: Option<LayerState> = None;
    let mut memory = StepMemory::default();
    let mut stations = Vec::with_capacity(n);
    stations.push(make_station(
        input.s[0],
        &state,
        regime,
        n_amp,
        settings,
        Some(closure),
    ));

    for i in 1..n {
        let (sa, sb) = (input.s[i - 1], input.s[i]);
        let ds = sb - sa;
        let prev = state;
        memory.guess = previous
            .filter(|_| {
                stations[i - 1].regime == regime && i >= 2 && stations[i - 2].regime == regime
            })
            .map(|older: LayerState| {
                extrapolated(&older, &prev, (ds / (sa - input.s[i - 2])).min(2.0))
            });
        previous = Some(prev);
        let (next, ok) = if regime == Regime::Laminar {
            let (lam, lam_ok) =
                laminar_step(&prev, ds, edge(i), settings, closure, i == 1, &mut memory);
            let (lam, finite) = finite_or(lam, &prev);
            if !(lam_ok && finite) {
                // Laminar breakdown: turbulent from the previous station.
                if let [.., a, b] = stations.as_slice() {
                    if tracker.laminar_separation.is_none() {
                        tracker.laminar_separation =
                            extrapolated_separation(a, b).map(|s| s.min(sb));
                    }
                }
                regime = Regime::Turbulent;
                transition_s.get_or_insert(sa);
                transition_forced = true;
                let start = turbulent_start(&prev, re);
                memory.guess = None;
                let (turb, _) =
                    turbulent_step(&start, ds, edge(i), settings, false, true, &mut memory);
                (finite_or(turb, &start).0, false)
            } else {
                let n_next = n_amp + 0.5 * ds * (growth(&prev) + growth(&lam));
                let trip_inside = settings.trip_s.is_some_and(|t| t > sa && t <= sb);
                if n_next < settings.n_critical && !trip_inside {
                    n_amp = n_next;
                    (lam, true)
                } else {
                    let interval = TransitionInterval {
                        start: &prev,
                        start_amplification: n_amp,
                        sa,
                        sb,
                        first: i == 1,
                    };
                    let outcome =
                        interval.solve(&lam, [edge(i - 1), edge(i)], settings, closure, &growth);
                    n_amp = outcome.amplification;
                    regime = Regime::Turbulent;
                    transition_s = Some(outcome.s);
                    transition_forced = outcome.forced;
                    (outcome.state, outcome.converged)
                }
            }
        } else {
            let (turb, turb_ok) =
                turbulent_step(&prev, ds, edge(i), settings, false, i == 1, &mut memory);
            let (turb, finite) = finite_or(turb, &prev);
            (turb, turb_ok && finite)
        };
        all_converged &= ok;
        state = next;
        let station = make_station(sb, &state, regime, n_amp, settings, Some(closure));
        tracker.observe(&stations[i - 1], &station);
        stations.push(station);
    }

    tracker.finish(stations, transition_s, transition_forced, all_converged)
}

#[cfg(test)]
mod tests {
    use super::*;

    fn station(s: f64, cf: f64, regime: Regime) -> Station {
        Station {
            s,
            edge_velocity: 1.0,
            theta: 1e-3,
            delta_star: 2e-3,
            shape_factor: 2.0,
            cf,
            amplification: 0.0,
            shear_lag: 0.0,
            regime,
            dissipation: 0.0,
        }
    }

    fn events(stations: &[Station]) -> SideSolution {
        let mut tracker = SeparationTracker::default();
        for pair in stations.windows(2) {
            tracker.observe(&pair[0], &pair[1]);
        }
        tracker.finish(stations.to_vec(), None, false, true)
    }

    #[test]
    fn reversed_flow_at_the_turbulent_start_is_not_turbulent_separation() {
        // Attached laminar layer, a first turbulent station in reversed flow, reattachment: a
        // transitional bubble (common practice), so laminar separation and reattachment.
        let side = events(&[
            station(0.1, 2e-4, Regime::Laminar),
            station(0.2, 1e-4, Regime::Laminar),
            station(0.3, -1e-3, Regime::Turbulent),
            station(0.4, 3e-3, Regime::Turbulent),
        ]);
        assert!(side.turbulent_separation_s.is_none());
        let separation = side.laminar_separation_s.expect("laminar separation");
        assert!((separation - (0.2 + 0.1 / 11.0)).abs() < 1e-12);
        assert!(side.reattachment_s.is_some_and(|s| s > 0.3 && s < 0.4));
    }

    #[test]
    fn turbulent_separation_lies_between_turbulent_stations() {
        let side = events(&[
            station(0.1, 2e-4, Regime::Laminar),
            station(0.3, 3e-3, Regime::Turbulent),
            station(0.8, 1e-3, Regime::Turbulent),
            station(0.9, -1e-3, Regime::Turbulent),
        ]);
        assert!(side.laminar_separation_s.is_none());
        assert!((side.turbulent_separation_s.unwrap() - 0.85).abs() < 1e-12);
    }
}
