//! Wake march: the lag-entrainment equations continued behind the trailing edge with no wall
//! friction and the wake's dissipation-length factor (Green, Weeks & Brooman 1977).

use super::lag_entrainment::{turbulent_start, WAKE_SHAPE_FACTOR_RANGE};
use super::march::{
    extrapolated, finite_or, make_station, turbulent_step, EdgeCondition, StepMemory,
};
use super::station::{
    interacted_velocity, validate_input, LayerState, MarchSettings, Regime, SideInput,
    SideSolution, Station,
};

/// How a side still laminar at the trailing edge enters the wake's start.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Default)]
pub enum LaminarTrailingEdge {
    /// As it is, contributing no entrainment: the lag equation builds the wake's shear stress
    /// up from the other side's.
    #[default]
    AsLaminar,
    /// Turbulent from the trailing edge, with the turbulent start of any transition
    /// (`lag_entrainment::turbulent_start`: θ kept, H capped, CE at equilibrium) —
    /// the wake start of the coupled Newton system, whose wake equations are turbulent.
    TurbulentStart,
}

/// Marches the wake from the trailing edge (a laminar side entering it as it is; see
/// [`march_wake_with`]). `input.s` is measured from the trailing edge (the
/// first station is the trailing edge itself). The start merges the two sides' trailing-edge
/// states: θ = θu + θl, δ* = δ*u + δ*l + `te_gap` (the base thickness, which the caller may pass
/// as 0 and handle itself), CE the θ-weighted average of both sides (zero from a laminar side).
/// The equations are the turbulent ones with Cf = 0 and λ = 0.5 (see
/// `lag_entrainment::dissipation_length_factor`), with the same interaction law.
pub fn march_wake(
    input: &SideInput,
    upper_te: &Station,
    lower_te: &Station,
    te_gap: f64,
    settings: &MarchSettings,
) -> SideSolution {
    march_wake_with(
        input,
        upper_te,
        lower_te,
        te_gap,
        settings,
        LaminarTrailingEdge::AsLaminar,
    )
}

/// [`march_wake`] with the treatment of a side still laminar at the trailing edge.
pub fn march_wake_with(
    input: &SideInput,
    upper_te: &Station,
    lower_te: &Station,
    te_gap: f64,
    settings: &MarchSettings,
    laminar_edge: LaminarTrailingEdge,
) -> SideSolution {
    let entering = |station: &Station| -> Station {
        if laminar_edge == LaminarTrailingEdge::AsLaminar
            || station.regime != Regime::Laminar
            || !(station.theta > 0.0 && station.delta_star.is_finite())
        {
            return *station;
        }
        let start = turbulent_start(
            &LayerState {
                theta: station.theta,
                shape_factor: station.delta_star / station.theta,
                entrainment: 0.0,
                edge_velocity: station.edge_velocity,
            },
            settings.reynolds,
        );
        Station {
            delta_star: start.theta * start.shape_factor,
            shape_factor: start.shape_factor,
            shear_lag: start.entrainment,
            ..*station
        }
    };
    let (upper_te, lower_te) = (&entering(upper_te), &entering(lower_te));
    let mut solution = SideSolution {
        stations: Vec::new(),
        transition_s: None,
        transition_forced: false,
        laminar_separation_s: None,
        turbulent_separation_s: None,
        reattachment_s: None,
        converged: false,
    };
    if validate_input(input).is_err() || !(settings.reynolds > 0.0 && settings.reynolds.is_finite())
    {
        return solution;
    }
    let edge = |i: usize| EdgeCondition {
        external_velocity: input.external_velocity[i],
        interaction_coefficient: input.interaction_coefficient[i],
    };
    let positive = |v: f64| if v.is_finite() { v.max(0.0) } else { 0.0 };
    let theta = (positive(upper_te.theta) + positive(lower_te.theta)).max(1e-12);
    let delta_star =
        positive(upper_te.delta_star) + positive(lower_te.delta_star) + positive(te_gap);
    let entrainment = (positive(upper_te.theta) * finite(upper_te.shear_lag)
        + positive(lower_te.theta) * finite(lower_te.shear_lag))
        / theta;
    let shape_factor =
        (delta_star / theta).clamp(WAKE_SHAPE_FACTOR_RANGE.0, WAKE_SHAPE_FACTOR_RANGE.1);
    let e0 = edge(0);
    let mut state = LayerState {
        theta,
        shape_factor,
        entrainment,
        edge_velocity: interacted_velocity(
            e0.external_velocity,
            e0.interaction_coefficient,
            shape_factor * theta,
            0.5 * (finite(upper_te.edge_velocity) + finite(lower_te.edge_velocity)),
        ),
    };
    let amplification = upper_te.amplification.max(lower_te.amplification);
    let amplification = if amplification.is_finite() {
        amplification
    } else {
        0.0
    };
    let mut all_converged = true;
    let mut previous: Option<LayerState> = None;
    let mut memory = StepMemory::default();
    solution.stations.push(make_station(
        input.s[0],
        &state,
        Regime::Wake,
        amplification,
        settings,
        None,
    ));
    for i in 1..input.s.len() {
        let prev = state;
        memory.guess = previous.map(|older: LayerState| {
            let ratio = (input.s[i] - input.s[i - 1]) / (input.s[i - 1] - input.s[i - 2]);
            extrapolated(&older, &prev, ratio.min(2.0))
        });
        previous = Some(prev);
        let (next, ok) = turbulent_step(
            &prev,
            input.s[i] - input.s[i - 1],
            edge(i),
            settings,
            true,
            i == 1,
            &mut memory,
        );
        let (next, finite_ok) = finite_or(next, &prev);
        all_converged &= ok && finite_ok;
        state = next;
        solution.stations.push(make_station(
            input.s[i],
            &state,
            Regime::Wake,
            amplification,
            settings,
            None,
        ));
    }
    solution.converged = all_converged;
    solution
}

fn finite(v: f64) -> f64 {
    if v.is_finite() {
        v
    } else {
        0.0
    }
}
