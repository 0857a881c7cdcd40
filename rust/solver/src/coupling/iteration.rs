//! The outer viscous–inviscid iteration with the quasi-simultaneous interaction law.
//!
//! Each pass (Veldman, J. Eng. Math. 15, 1981; Coenen, Veldman & Patrianakos 2000):
//! 1. speeds from the current mass defect, q = q_inv + D·m; the stagnation point is where q
//!    changes sign, and the surface is split there into the upper and lower layers;
//! 2. every surface and wake node gets the external part of its edge speed,
//!    E_i = ue_inv,i + Σ_{j≠i} D_ij m_j, and the interaction coefficient c_i = D_ii, so the
//!    march solves ue_i = E_i + c_i ue_i δ*_i together with its own equations (c_i > 0: a
//!    growing displacement raises the local speed, which is what keeps separation well posed);
//! 3. both surfaces are marched, then the wake with E updated from the new surface defects
//!    (a Gauss–Seidel sweep);
//! 4. the residual is the largest mismatch between the edge speed the march settled on and the
//!    speed the panel method gives for the march's own mass defect,
//!    r = max_i |ue_i − (ue_inv,i + Σ_j D_ij m_j)| in units of U∞, over surface and wake;
//! 5. the next m mixes the new defects with the previous ones (Anderson mixing, damped) and the
//!    pass repeats until r < tolerance or the iteration cap is reached; an unconverged run
//!    returns its pass with the smallest r.

use crate::boundary_layer::laminar_closure::FalknerSkanClosure;
use crate::boundary_layer::transition::OrrSommerfeldEnvelope;
use crate::boundary_layer::{
    march_surface, march_wake_with, LaminarTrailingEdge, MarchSettings, SideInput, SideSolution,
    Station,
};
use crate::error::{Result, SolverError};

use super::anderson::AndersonMixer;
use super::model::CaseModel;
use super::settings::ViscousSettings;
use super::stagnation::{layer_trips, locate_stagnation, split_surface, SideNodes, SurfaceSplit};

/// How the outer iteration is run: the cap on c·δ* and the Anderson mixing factor.
///
/// The cap: on the short panels at the trailing edge D_ii reaches several hundred per chord,
/// c·δ* approaches one and the local law ue(1 − cδ*) = E turns nearly singular. Capping c
/// (with δ* of the previous iterate) keeps every march well posed; it does not change the
/// converged solution, because E carries the rest of the influence.
#[derive(Debug, Clone, Copy, PartialEq)]
pub(crate) struct Strategy {
    /// Largest c·δ* allowed in the interaction law ue = E + c·ue·δ*.
    pub max_coefficient_times_displacement: f64,
    /// Mixing factor of the Anderson update (1 would take the mixed map value undamped).
    pub mixing: f64,
    /// How a side still laminar at the trailing edge enters the marched wake.
    pub laminar_trailing_edge: LaminarTrailingEdge,
}

/// The first strategy tried.
pub(crate) const PRIMARY: Strategy = Strategy {
    max_coefficient_times_displacement: 0.8,
    mixing: 0.3,
    laminar_trailing_edge: LaminarTrailingEdge::AsLaminar,
};
/// A more cautious one for cases where the first stalls: a softer interaction law and
/// stronger damping.
pub(crate) const CAUTIOUS: Strategy = Strategy {
    max_coefficient_times_displacement: 0.5,
    mixing: 0.15,
    laminar_trailing_edge: LaminarTrailingEdge::AsLaminar,
};
/// The last resort: an interaction coefficient closer to the full self-influence, which some
/// trailing-edge states need to keep the saw-tooth mode of the iteration damped.
pub(crate) const STIFF: Strategy = Strategy {
    max_coefficient_times_displacement: 1.5,
    mixing: 0.3,
    laminar_trailing_edge: LaminarTrailingEdge::AsLaminar,
};
/// For a laminar layer that reaches the trailing edge with its N near the critical value (low
/// Reynolds numbers): the cautious strategy with a laminar side entering the wake turbulent,
/// as the Newton system's wake starts. Between passes that place transition in the last
/// interval and passes that leave the layer laminar to the trailing edge, the wake's start then
/// no longer jumps from an equilibrium entrainment to none (NACA 0012, Re 1e5, 0°: residual
/// 1–3 over every pass before; docs/validation.md, "Low Reynolds numbers").
pub(crate) const CAUTIOUS_TURBULENT_WAKE: Strategy = Strategy {
    laminar_trailing_edge: LaminarTrailingEdge::TurbulentStart,
    ..CAUTIOUS
};
/// Floor on the speed used in that cap (near the stagnation point).
const MIN_CAP_SPEED: f64 = 0.05;
/// An unconverged run stops once this many passes in a row have had a residual more than
/// [`DIVERGED_FACTOR`] times its smallest so far: it has wandered off, and its passes there,
/// with the marches' local iterations struggling at every station, cost many times an
/// ordinary pass while none of them is the best pass the run returns (measured, version
/// 0.4.6: the benchmark, family, E387, low-Reynolds-number and past-maximum-lift sweeps give
/// the same rows; a sweep past the maximum lift 5× faster).
const DIVERGED_PASSES: usize = 20;
/// See [`DIVERGED_PASSES`].
const DIVERGED_FACTOR: f64 = 10.0;
/// Differences kept by the Anderson mixer.
const MIXING_DEPTH: usize = 6;

/// The coupled solution of one case after the outer iteration stopped.
#[derive(Clone)]
pub(crate) struct CoupledSolution {
    /// Surface split at the final stagnation point.
    pub split: SurfaceSplit,
    /// Upper-surface layer, stations matching `split.upper.nodes`.
    pub upper: SideSolution,
    /// Lower-surface layer, stations matching `split.lower.nodes`.
    pub lower: SideSolution,
    /// Wake, stations matching the wake nodes.
    pub wake: SideSolution,
    /// Mass defect per node (surface then wake), boundary-layer sense: the warm start of the
    /// next angle.
    pub mass_defect: Vec<f64>,
    /// Whether the residual met the tolerance with every march converged and finite.
    pub converged: bool,
    /// Outer iterations used.
    pub iterations: usize,
    /// Final residual (see the module documentation).
    pub residual: f64,
    /// The full iterate of the coupled Newton iteration, when that produced this solution:
    /// the best warm start for a neighbouring angle.
    pub newton_state: Option<super::newton::NewtonState>,
    /// Whether the solution includes the wake-curvature pressure jump (only the Newton
    /// iteration models it; the quasi-simultaneous iteration's wake is first-order).
    pub wake_curvature: bool,
}

impl CoupledSolution {
    /// What a neighbouring angle starts from.
    pub(crate) fn warm_start(&self) -> WarmStart {
        WarmStart {
            mass_defect: self.mass_defect.clone(),
            state: self.newton_state.clone(),
        }
    }
}

/// The warm start of a neighbouring angle: its mass defect by node, and its full iterate when
/// the coupled Newton iteration produced it.
#[derive(Debug, Clone, PartialEq)]
pub(crate) struct WarmStart {
    pub mass_defect: Vec<f64>,
    pub state: Option<super::newton::NewtonState>,
}

/// Edge conditions of one march, owned (the march borrows them as a [`SideInput`]).
struct OwnedSideInput {
    s: Vec<f64>,
    external_velocity: Vec<f64>,
    interaction_coefficient: Vec<f64>,
}

impl OwnedSideInput {
    fn view(&self) -> SideInput<'_> {
        SideInput {
            s: &self.s,
            external_velocity: &self.external_velocity,
            interaction_coefficient: &self.interaction_coefficient,
        }
    }
}

/// External speed E_i = ue_i − c_i m_i and coefficient c_i = ∂ue_i/∂m_i of every node of a side.
fn side_input(
    case: &CaseModel,
    side: &SideNodes,
    q: &[f64],
    m: &[f64],
    stag: usize,
    cap: f64,
) -> OwnedSideInput {
    let mut external = Vec::with_capacity(side.nodes.len());
    let mut coefficient = Vec::with_capacity(side.nodes.len());
    for &node in &side.nodes {
        let speed = case.edge_sign(node, stag) * q[node];
        let mut c = case.self_influence(node, stag);
        if m[node] > 0.0 {
            c = c.min(cap * speed.abs().max(MIN_CAP_SPEED) / m[node]);
        }
        external.push(speed - c * m[node]);
        coefficient.push(c);
    }
    OwnedSideInput {
        s: side.s.clone(),
        external_velocity: external,
        interaction_coefficient: coefficient,
    }
}

fn wake_nodes(case: &CaseModel) -> SideNodes {
    SideNodes {
        nodes: (case.n_surface..case.n_total()).collect(),
        s: case.wake_s.clone(),
    }
}

fn march_settings(settings: &ViscousSettings, trip_s: Option<f64>) -> MarchSettings {
    MarchSettings {
        n_critical: settings.effective_n_critical(),
        trip_s,
        ..MarchSettings::new(settings.reynolds)
    }
}

/// March one surface side with the shipped laminar closure and amplification envelope.
pub(crate) fn march_side(input: &SideInput, settings: &MarchSettings) -> SideSolution {
    march_surface(
        input,
        settings,
        FalknerSkanClosure::shipped(),
        OrrSommerfeldEnvelope::shipped(),
    )
}

fn store_defect(target: &mut [f64], nodes: &[usize], solution: &SideSolution) -> bool {
    let mut finite = true;
    for (&node, station) in nodes.iter().zip(&solution.stations) {
        let value = station.edge_velocity * station.delta_star;
        finite &= value.is_finite();
        target[node] = value;
    }
    finite && solution.stations.len() == nodes.len()
}

/// Edge speed of the first wake station, which is the trailing edge itself: the mass defect is
/// continuous there, m_wake = m_upper + m_lower with δ*_wake = δ*_upper + δ*_lower (the wake
/// march's start), so ue = (ue_u δ*_u + ue_l δ*_l)/(δ*_u + δ*_l). The panel speed at the
/// trailing-edge point itself is not used: there the inviscid solution has its trailing-edge
/// singularity (stagnation behind a finite angle, corner flow at a blunt base).
fn trailing_edge_speed(upper: &Station, lower: &Station) -> f64 {
    let total = upper.delta_star + lower.delta_star;
    if total > 0.0 && total.is_finite() {
        (upper.edge_velocity * upper.delta_star + lower.edge_velocity * lower.delta_star) / total
    } else {
        0.5 * (upper.edge_velocity + lower.edge_velocity)
    }
}

/// Run the outer iteration for one case, starting from `warm_start` (the mass defect of a
/// neighbouring angle) or from no displacement at all; a run that has wandered far from its
/// best pass stops early ([`DIVERGED_PASSES`]). Returns the converged pass, or else the
/// finite pass with the smallest residual: the unconverged iteration mostly wanders (NACA 0012,
/// Re 1e6, 7°: residual 0.31 at pass 7, 44 at pass 20), and the Newton iteration that finishes
/// every attempt converges from its best pass more often than from its last.
pub(crate) fn solve_case(
    case: &CaseModel,
    settings: &ViscousSettings,
    warm_start: Option<&[f64]>,
    strategy: Strategy,
) -> Result<CoupledSolution> {
    let n = case.n_total();
    let ns = case.n_surface;
    let mut m = match warm_start {
        Some(w) if w.len() == n && w.iter().all(|v| v.is_finite()) => w.to_vec(),
        _ => vec![0.0; n],
    };
    let mut mixer = AndersonMixer::new(MIXING_DEPTH, strategy.mixing);
    let cap = strategy.max_coefficient_times_displacement;
    // The split of the last pass (the next pass's first guess), the finite pass with the
    // smallest residual so far, and the last pass when it is not that one.
    let mut previous_split: Option<SurfaceSplit> = None;
    let mut best: Option<CoupledSolution> = None;
    // Passes in a row far above the best residual (see DIVERGED_PASSES).
    let mut wandering = 0;
    let mut last: Option<CoupledSolution> = None;
    let wake_side = wake_nodes(case);

    for iteration in 1..=settings.max_iterations {
        // 1. speeds with the current displacement, stagnation point and split.
        let guess_split = previous_split
            .as_ref()
            .map_or(ns / 2, |s| s.stagnation.node);
        let q = case.speeds(&m, guess_split);
        let stagnation = locate_stagnation(&q[..ns], &case.arc, &case.x[..ns], &case.y[..ns])?;
        let split = split_surface(stagnation, &case.arc);
        let stag = stagnation.node;
        // Speeds again if the split moved (the column signs depend on it).
        let q = if stag == guess_split {
            q
        } else {
            case.speeds(&m, stag)
        };

        // 2–3. march both surfaces.
        let [trip_upper, trip_lower] = layer_trips(
            &split,
            &case.arc,
            &case.x[..ns],
            [settings.trip_upper, settings.trip_lower],
        );
        let upper_in = side_input(case, &split.upper, &q, &m, stag, cap);
        let lower_in = side_input(case, &split.lower, &q, &m, stag, cap);
        let upper = march_side(&upper_in.view(), &march_settings(settings, trip_upper));
        let lower = march_side(&lower_in.view(), &march_settings(settings, trip_lower));
        // A node on the stagnation point itself belongs to neither layer: no displacement.
        let mut m_new = m.clone();
        m_new[..ns].iter_mut().for_each(|v| *v = 0.0);
        let mut finite = store_defect(&mut m_new, &split.upper.nodes, &upper);
        finite &= store_defect(&mut m_new, &split.lower.nodes, &lower);

        // ... then the wake, with the new surface defects (Gauss–Seidel).
        // (Only the wake nodes' speeds are needed: the surface entries are left NaN.)
        let mut q_wake = vec![f64::NAN; ns];
        q_wake.extend(case.speeds_from(&m_new, stag, ns));
        let wake_in = side_input(case, &wake_side, &q_wake, &m_new, stag, cap);
        let (Some(upper_te), Some(lower_te)) = (upper.stations.last(), lower.stations.last())
        else {
            return Err(SolverError::Convergence(
                "a surface march returned no stations".into(),
            ));
        };
        let mut wake_in = wake_in;
        if let (Some(e), Some(c)) = (
            wake_in.external_velocity.first_mut(),
            wake_in.interaction_coefficient.first_mut(),
        ) {
            *e = trailing_edge_speed(upper_te, lower_te);
            *c = 0.0;
        }
        let wake = march_wake_with(
            &wake_in.view(),
            upper_te,
            lower_te,
            0.0,
            &march_settings(settings, None),
            strategy.laminar_trailing_edge,
        );
        finite &= store_defect(&mut m_new, &wake_side.nodes, &wake);

        // 4. residual: the march's edge speed against the panel speed of its own defect.
        let q_check = case.speeds(&m_new, stag);
        let mut residual: f64 = 0.0;
        for (nodes, solution) in [
            (&split.upper.nodes, &upper),
            (&split.lower.nodes, &lower),
            (&wake_side.nodes, &wake),
        ] {
            for (&node, station) in nodes.iter().zip(&solution.stations) {
                if node == case.n_surface {
                    // The first wake station is the trailing edge itself (see trailing_edge_speed).
                    continue;
                }
                let implied = case.edge_sign(node, stag) * q_check[node];
                let gap = (station.edge_velocity - implied).abs();
                // (f64::max ignores NaN: a non-finite gap makes the residual infinite.)
                residual = if gap.is_finite() {
                    residual.max(gap)
                } else {
                    f64::INFINITY
                };
            }
        }
        if !residual.is_finite() {
            finite = false;
        }
        let marches_ok = upper.converged && lower.converged && wake.converged;
        let done = finite && marches_ok && residual < settings.tolerance;

        // 5. next mass defect by Anderson mixing; when the stagnation point moves to another
        // node the sides change and the history is meaningless, so it restarts.
        let moved = previous_split.as_ref().is_some_and(|l| {
            l.upper.nodes != split.upper.nodes || l.lower.nodes != split.lower.nodes
        });
        if moved || !finite {
            mixer.reset();
        }
        previous_split = Some(split.clone());
        let state: Vec<f64> = if done || !finite {
            m_new.clone()
        } else {
            mixer
                .next(&m, &m_new)
                .into_iter()
                .map(|v| v.max(0.0))
                .collect()
        };
        let this = CoupledSolution {
            split,
            upper,
            lower,
            wake,
            mass_defect: m_new,
            converged: done,
            iterations: iteration,
            residual,
            newton_state: None,
            wake_curvature: false,
        };
        if done {
            return Ok(this);
        }
        if finite && best.as_ref().is_none_or(|b| residual < b.residual) {
            best = Some(this);
            last = None;
        } else {
            last = Some(this);
        }
        if !finite {
            break;
        }
        let best_residual = best.as_ref().map_or(f64::INFINITY, |b| b.residual);
        wandering = if residual > DIVERGED_FACTOR * best_residual {
            wandering + 1
        } else {
            0
        };
        if wandering >= DIVERGED_PASSES {
            break;
        }
        m = state;
    }
    best.or(last)
        .ok_or_else(|| SolverError::Internal("outer iteration ran no pass".into()))
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::coupling::model::SectionModel;
    use crate::geometry::naca;

    /// Our design (docs/method.md, the quasi-simultaneous iteration): an unconverged run
    /// returns its pass with the smallest residual, and a run that wanders off stops early.
    /// NACA 0012 at Re 1e6 and 7°, from the inviscid flow, the primary strategy (measured: its
    /// best pass is the seventh, residual 0.31; from the eleventh on the residual stays above
    /// ten times that).
    #[test]
    fn a_wandering_run_stops_early_and_returns_its_best_pass() {
        let section = naca::from_designation("0012", false, 200).unwrap();
        let settings = ViscousSettings::new(1e6);
        let model = SectionModel::new(&section, &settings).unwrap();
        let case = CaseModel::new(&model, 7.0, &settings).unwrap();
        let run = solve_case(&case, &settings, None, PRIMARY).unwrap();
        assert!(!run.converged);
        assert_eq!(run.iterations, 7);
        assert!(run.residual < 0.35, "{}", run.residual);
        // Passes 11 to 30 all lie above ten times the best: the run ends there, with what a
        // run capped at 30 passes returns.
        let capped = ViscousSettings {
            max_iterations: 30,
            ..settings.clone()
        };
        let shorter = solve_case(&case, &capped, None, PRIMARY).unwrap();
        assert_eq!(shorter.mass_defect, run.mass_defect);
    }
}
