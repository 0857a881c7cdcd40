//! Angle sweeps with warm starts and continuation in α, and the polar row and station table of
//! a coupled solution (each angle's attempts: `attempts`).

use crate::boundary_layer::{Regime, SideSolution};
use crate::error::Result;
use crate::geometry::Section;

use crate::inviscid::compressibility::{critical_cp, karman_tsien_cp as karman_tsien};

use super::continuation::AngleSolver;
use super::forces::{
    far_wake_drag, friction_drag, integrate_pressure, squire_young, wetted_pressure_drag,
};
use super::iteration::{CoupledSolution, WarmStart};
use super::model::{CaseModel, SectionModel};
use super::settings::ViscousSettings;
use super::stagnation::{x_at_arc_length, SideNodes};
use super::{StationRegime, StationRow, StationSide, ViscousRow};

/// A solved operating point: its polar row and its boundary-layer and wake stations.
#[derive(Debug, Clone, PartialEq)]
pub struct ViscousAnalysis {
    /// The polar row.
    pub row: ViscousRow,
    /// Upper stations (stagnation to trailing edge), lower stations, then wake stations.
    pub stations: Vec<StationRow>,
}

/// Viscous polar of `section` at every angle in `alpha_deg` (rows in the given order).
///
/// The angles are solved in order of increasing distance from the one nearest 0°, upwards
/// then downwards, each warm-started from the mass defect of its converged neighbour (with
/// continuation through intermediate angles when that fails), so a sweep is as cheap as
/// possible and the result does not depend on any thread count.
pub fn analyze_viscous(
    section: &Section,
    alpha_deg: &[f64],
    settings: &ViscousSettings,
) -> Result<Vec<ViscousRow>> {
    settings.validate()?;
    let model = SectionModel::new(section, settings)?;
    Ok(sweep(&model, alpha_deg, settings))
}

/// Viscous polars of `section` at every angle in `alpha_deg` for each of `conditions` (in
/// parallel on the current rayon pool): the rows [`analyze_viscous`] gives for each condition
/// alone, but the conditions with the same panel count share one panel solution, one case per
/// angle and the quasi-simultaneous runs (nothing in them depends on the Reynolds number, the
/// transition settings or the Mach number; docs/performance.md). One result per condition; a
/// condition that fails validation, or a section the panel method cannot use, fails alone.
pub fn analyze_viscous_conditions(
    section: &Section,
    alpha_deg: &[f64],
    conditions: &[ViscousSettings],
) -> Vec<Result<Vec<ViscousRow>>> {
    use rayon::prelude::*;
    let mut panel_counts: Vec<usize> = conditions.iter().map(|c| c.panels).collect();
    panel_counts.sort_unstable();
    panel_counts.dedup();
    let models: Vec<Result<SectionModel>> = panel_counts
        .par_iter()
        .map(|&panels| {
            let settings = conditions.iter().find(|c| c.panels == panels);
            SectionModel::new(section, settings.expect("a condition with these panels"))
        })
        .collect();
    conditions
        .par_iter()
        .map(|settings| {
            settings.validate()?;
            let index = panel_counts.binary_search(&settings.panels).unwrap_or(0);
            let model = models[index].as_ref().map_err(Clone::clone)?;
            Ok(sweep(model, alpha_deg, settings))
        })
        .collect()
}

pub(crate) fn sweep(
    model: &SectionModel,
    alpha_deg: &[f64],
    settings: &ViscousSettings,
) -> Vec<ViscousRow> {
    let mut order: Vec<usize> = (0..alpha_deg.len()).collect();
    order.sort_by(|&a, &b| alpha_deg[a].total_cmp(&alpha_deg[b]).then(a.cmp(&b)));
    let mut rows: Vec<Option<ViscousRow>> = vec![None; alpha_deg.len()];
    let Some(start) = (0..order.len()).min_by(|&a, &b| {
        alpha_deg[order[a]]
            .abs()
            .total_cmp(&alpha_deg[order[b]].abs())
    }) else {
        return Vec::new();
    };
    // The angles' attempts, with the record of those known to fail (no continuation repeats
    // one).
    let solver = AngleSolver::new(model, settings);
    let upward: Vec<usize> = order[start..].to_vec();
    let downward: Vec<usize> = order[..start].iter().rev().copied().collect();
    let mut start_defect: Option<(f64, WarmStart)> = None;
    // The warm start of every converged angle, for the repair pass.
    let mut warm_of: Vec<Option<WarmStart>> = vec![None; alpha_deg.len()];
    for (pass, indices) in [upward, downward].into_iter().enumerate() {
        // The last converged angle of this pass and its mass defect (the warm start).
        let mut warm: Option<(f64, WarmStart)> = if pass == 0 {
            None
        } else {
            start_defect.clone()
        };
        for (k, &index) in indices.iter().enumerate() {
            let alpha = alpha_deg[index];
            let mut solved = solver.solve(alpha, warm.as_ref());
            if pass == 0 && k == 0 && !solved.as_ref().is_some_and(|(_, s)| s.converged) {
                // A sweep that starts away from 0° (its angle nearest 0° failed cold): approach
                // that angle from 0° as a sweep from 0° would.
                if let Some(approach) = solver.approach_from_zero(alpha) {
                    let again = solver.solve(alpha, Some(&approach));
                    if again.as_ref().is_some_and(|(_, s)| s.converged) {
                        solved = again;
                    }
                }
            }
            let row = match solved {
                Some((case, solution)) => {
                    let row = polar_row(&case, &solution, settings);
                    if solution.converged {
                        warm = Some((alpha, solution.warm_start()));
                        warm_of[index] = Some(solution.warm_start());
                        if pass == 0 && k == 0 {
                            start_defect = warm.clone();
                        }
                    }
                    row
                }
                None => ViscousRow::failed(alpha, 0, f64::NAN),
            };
            rows[index] = Some(row);
        }
    }
    let grid = SweepGrid {
        solver: &solver,
        alpha_deg,
        order: &order,
    };
    grid.repair(&mut rows, &mut warm_of);
    grid.beyond_the_ends(&mut rows, &warm_of);
    grid.first_order_rows(&mut rows, &warm_of);
    rows.into_iter()
        .zip(alpha_deg)
        .map(|(r, &a)| r.unwrap_or_else(|| ViscousRow::failed(a, 0, f64::NAN)))
        .collect()
}

/// What the passes after the sweep work on: the section, the angles (in the caller's order),
/// the settings and the angles' indices in ascending α.
#[derive(Clone, Copy)]
struct SweepGrid<'a> {
    solver: &'a AngleSolver<'a>,
    alpha_deg: &'a [f64],
    order: &'a [usize],
}

impl<'a> SweepGrid<'a> {
    /// The grid's fields and the settings, for the passes' bodies.
    fn parts(
        &self,
    ) -> (
        &'a AngleSolver<'a>,
        &'a [f64],
        &'a ViscousSettings,
        &'a [usize],
    ) {
        (
            self.solver,
            self.alpha_deg,
            self.solver.settings(),
            self.order,
        )
    }

    /// An end angle of the sweep (lowest or highest) that failed, next to a converged one: the
    /// angle one step beyond it (the spacing to that neighbour) is solved from the neighbour (with
    /// continuation), and the end angle again from there. A failed interior angle has converged
    /// neighbours on both sides for the repair pass; an end angle has only one, and a point that
    /// fails from below is often reached from above (NACA 0012 at Re 2e5: +6° converges from 7°
    /// where it failed from 5°).
    fn beyond_the_ends(&self, rows: &mut [Option<ViscousRow>], warm_of: &[Option<WarmStart>]) {
        let (solver, alpha_deg, settings, order) = self.parts();
        let n = order.len();
        if n < 2 {
            return;
        }
        let converged =
            |rows: &[Option<ViscousRow>], i: usize| rows[i].as_ref().is_some_and(|r| r.converged);
        for (end, inner) in [(order[0], order[1]), (order[n - 1], order[n - 2])] {
            if converged(rows, end) {
                continue;
            }
            let Some(warm) = warm_of[inner].clone() else {
                continue;
            };
            let (a_end, a_inner) = (alpha_deg[end], alpha_deg[inner]);
            let beyond = a_end + (a_end - a_inner);
            let Some((_, helper)) = solver
                .solve(beyond, Some(&(a_inner, warm)))
                .filter(|(_, s)| s.converged)
            else {
                continue;
            };
            if let Some((case, solution)) = solver.warm_newton(a_end, (beyond, helper.warm_start()))
            {
                if solution.converged {
                    rows[end] = Some(polar_row(&case, &solution, settings));
                }
            }
        }
    }

    /// Repair pass: an angle that failed is tried again from each converged neighbour (in α order)
    /// it has not yet been tried from — the Newton iteration from that neighbour's iterate, through
    /// intermediate angles when needed — until no attempt succeeds. A sweep whose starting angle
    /// failed otherwise solves everything on one side of it cold. The order is fixed, so the
    /// result does not depend on anything but the inputs.
    fn repair(&self, rows: &mut [Option<ViscousRow>], warm_of: &mut [Option<WarmStart>]) {
        let (solver, alpha_deg, settings, order) = self.parts();
        let converged =
            |rows: &[Option<ViscousRow>], i: usize| rows[i].as_ref().is_some_and(|r| r.converged);
        let mut tried: std::collections::HashSet<(usize, usize)> = std::collections::HashSet::new();
        loop {
            let mut progress = false;
            for pos in 0..order.len() {
                let index = order[pos];
                if converged(rows, index) {
                    continue;
                }
                let neighbours = [
                    pos.checked_sub(1),
                    Some(pos + 1).filter(|&p| p < order.len()),
                ];
                for nb in neighbours.into_iter().flatten().map(|p| order[p]) {
                    let Some(state) = warm_of[nb].clone() else {
                        continue;
                    };
                    if !tried.insert((index, nb)) {
                        continue;
                    }
                    let alpha = alpha_deg[index];
                    if let Some((case, solution)) =
                        solver.warm_newton(alpha, (alpha_deg[nb], state))
                    {
                        if solution.converged {
                            rows[index] = Some(polar_row(&case, &solution, settings));
                            warm_of[index] = Some(solution.warm_start());
                            progress = true;
                            break;
                        }
                    }
                }
            }
            if !progress {
                break;
            }
        }
    }

    /// Last resort after the repair pass: each angle still unconverged is solved with the
    /// first-order wake ([`first_order_wake_solution`]) from its converged neighbour below, else
    /// above (in α order), with the continuation in α of [`continuation`]. The neighbours are the
    /// full-model solutions of the passes before, so the order of this pass does not matter.
    fn first_order_rows(&self, rows: &mut [Option<ViscousRow>], warm_of: &[Option<WarmStart>]) {
        let (solver, alpha_deg, settings, order) = self.parts();
        if !settings.wake_curvature {
            return;
        }
        for pos in 0..order.len() {
            let index = order[pos];
            if rows[index].as_ref().is_some_and(|r| r.converged) {
                continue;
            }
            let alpha = alpha_deg[index];
            let neighbour = [
                pos.checked_sub(1),
                Some(pos + 1).filter(|&p| p < order.len()),
            ]
            .into_iter()
            .flatten()
            .find_map(|p| warm_of[order[p]].clone().map(|w| (alpha_deg[order[p]], w)));
            if let Some((case, solution)) = solver.first_order(alpha, neighbour.as_ref()) {
                rows[index] = Some(polar_row(&case, &solution, settings));
            }
        }
    }
}

/// The polar row and stations of one angle. Angles away from 0° are approached through a
/// few warm-started intermediate angles (steps of at most 2°), as a sweep would.
pub fn boundary_layer_stations(
    section: &Section,
    alpha_deg: f64,
    settings: &ViscousSettings,
) -> Result<ViscousAnalysis> {
    settings.validate()?;
    let model = SectionModel::new(section, settings)?;
    let solver = AngleSolver::new(&model, settings);
    let warm = solver.approach_from_zero(alpha_deg);
    match solver.solve_or_first_order(alpha_deg, warm.as_ref()) {
        Some((case, solution)) => Ok(ViscousAnalysis {
            row: polar_row(&case, &solution, settings),
            stations: stations(&case, &solution),
        }),
        None => Err(crate::error::SolverError::Convergence(format!(
            "no boundary-layer solution could be formed at alpha_deg = {alpha_deg}"
        ))),
    }
}

fn side_points(
    case: &CaseModel,
    nodes: &SideNodes,
    solution: &SideSolution,
    stag: (f64, f64),
) -> [Vec<f64>; 4] {
    let mut x = vec![stag.0];
    let mut y = vec![stag.1];
    let mut cf = vec![0.0];
    let mut ue = vec![0.0];
    for (&node, st) in nodes.nodes.iter().zip(&solution.stations) {
        x.push(case.x[node]);
        y.push(case.y[node]);
        cf.push(st.cf);
        ue.push(st.edge_velocity);
    }
    [x, y, cf, ue]
}

/// Assemble the polar row of a coupled solution (forces, drags, transition, separation).
pub(crate) fn polar_row(
    case: &CaseModel,
    sol: &CoupledSolution,
    settings: &ViscousSettings,
) -> ViscousRow {
    let ns = case.n_surface;
    let alpha = case.alpha_deg;
    let stag = sol.split.stagnation;
    // Viscous edge speed at each surface node, from the marches.
    let mut ue = vec![0.0; ns];
    for (nodes, side) in [
        (&sol.split.upper, &sol.upper),
        (&sol.split.lower, &sol.lower),
    ] {
        for (&node, st) in nodes.nodes.iter().zip(&side.stations) {
            ue[node] = st.edge_velocity;
        }
    }
    let cp_of = |speed: f64| karman_tsien(1.0 - speed * speed, settings.mach);
    let cp: Vec<f64> = ue.iter().map(|&u| cp_of(u)).collect();
    let (xs, ys) = (&case.x[..ns], &case.y[..ns]);
    let viscous = integrate_pressure(xs, ys, &cp, alpha);
    let cd_pressure = wetted_pressure_drag(xs, ys, &cp, alpha);

    let mut cd_friction = 0.0;
    let mut cd_sy = 0.0;
    for (nodes, side) in [
        (&sol.split.upper, &sol.upper),
        (&sol.split.lower, &sol.lower),
    ] {
        let [x, y, cf, u] = side_points(case, nodes, side, (stag.x, stag.y));
        cd_friction += friction_drag(&x, &y, &cf, &u, alpha);
        if let Some(te) = side.stations.last() {
            cd_sy += squire_young(te.theta, te.edge_velocity, te.shape_factor);
        }
    }
    let cd = sol.wake.stations.last().map_or(f64::NAN, |end| {
        far_wake_drag(end.theta, end.edge_velocity, end.shape_factor)
    });

    let to_x = |nodes: &SideNodes, s: f64| x_at_arc_length(nodes, &case.x, s, stag.x);
    let transition =
        |nodes: &SideNodes, side: &SideSolution| side.transition_s.map_or(1.0, |s| to_x(nodes, s));
    let separation = |nodes: &SideNodes, side: &SideSolution| {
        side.turbulent_separation_s.map(|s| to_x(nodes, s))
    };

    let mut row = ViscousRow {
        alpha_deg: alpha,
        cl: viscous.cl,
        cd,
        cd_squire_young: cd_sy,
        cd_friction,
        cd_pressure,
        cm_c4: viscous.cm_c4,
        cp_min: cp.iter().copied().fold(f64::INFINITY, f64::min),
        transition_upper: transition(&sol.split.upper, &sol.upper),
        transition_lower: transition(&sol.split.lower, &sol.lower),
        separation_upper: separation(&sol.split.upper, &sol.upper),
        separation_lower: separation(&sol.split.lower, &sol.lower),
        converged: sol.converged,
        iterations: sol.iterations,
        residual: sol.residual,
        wake_curvature: sol.wake_curvature && sol.converged,
        critical_mach_reached: false,
    };
    row.critical_mach_reached = row.cp_min < critical_cp(settings.mach);
    // A converged row never holds NaN: anything non-finite demotes it to a flagged row.
    if row.converged && !row.is_finite() {
        row.converged = false;
        row.wake_curvature = false;
    }
    row
}

fn regime(r: Regime) -> StationRegime {
    match r {
        Regime::Laminar => StationRegime::Laminar,
        Regime::Turbulent => StationRegime::Turbulent,
        Regime::Wake => StationRegime::Wake,
    }
}

/// Station table of a coupled solution: upper, lower, then wake.
pub(crate) fn stations(case: &CaseModel, sol: &CoupledSolution) -> Vec<StationRow> {
    let wake_nodes = SideNodes {
        nodes: (case.n_surface..case.n_total()).collect(),
        s: case.wake_s.clone(),
    };
    let mut out = Vec::new();
    for (side, nodes, solution) in [
        (StationSide::Upper, &sol.split.upper, &sol.upper),
        (StationSide::Lower, &sol.split.lower, &sol.lower),
        (StationSide::Wake, &wake_nodes, &sol.wake),
    ] {
        for (&node, st) in nodes.nodes.iter().zip(&solution.stations) {
            out.push(StationRow {
                side,
                s: st.s,
                x: case.x[node],
                y: case.y[node],
                edge_velocity: st.edge_velocity,
                delta_star: st.delta_star,
                theta: st.theta,
                shape_factor: st.shape_factor,
                cf: st.cf,
                amplification: st.amplification,
                regime: regime(st.regime),
            });
        }
    }
    out
}
