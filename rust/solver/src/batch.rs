//! Many sections × many angles in parallel (rayon), with deterministic ordering.
//!
//! Each section is independent: one factorisation, then every angle by superposition. The work
//! runs in a local thread pool whose size is explicit (`threads`), or taken from
//! `RAYON_NUM_THREADS`, or the number of cores; results come back in input order whatever the
//! thread count, and each case's arithmetic does not depend on it.

use crate::error::{Result, SolverError};
use crate::geometry::paneling::repanel;
use crate::geometry::Section;
use crate::inviscid::compressibility::{speed_ratio_from_cp, validate_mach};
use crate::inviscid::{InviscidSolution, PanelSolver};
use rayon::prelude::*;

/// Build the local thread pool: explicit count, else `RAYON_NUM_THREADS`, else all cores.
pub fn thread_pool(threads: Option<usize>) -> Result<rayon::ThreadPool> {
    let from_env = || {
        std::env::var("RAYON_NUM_THREADS")
            .ok()
            .and_then(|v| v.trim().parse::<usize>().ok())
    };
    let count = threads.or_else(from_env).unwrap_or(0);
    rayon::ThreadPoolBuilder::new()
        .num_threads(count)
        .build()
        .map_err(|e| SolverError::Internal(format!("cannot start the thread pool: {e}")))
}

/// The section as the panel solver sees it: re-panelled to `panels` panels, or its own points
/// as given when `panels` is 0.
pub fn paneled(section: &Section, panels: usize) -> Result<Section> {
    if panels == 0 {
        Ok(section.clone())
    } else {
        repanel(section, panels)
    }
}

/// Surface distribution of one inviscid solution, station by station (panel nodes).
#[derive(Debug, Clone, PartialEq)]
pub struct InviscidSurface {
    /// Node abscissae.
    pub x: Vec<f64>,
    /// Node ordinates.
    pub y: Vec<f64>,
    /// Arc length from the upper trailing edge.
    pub s: Vec<f64>,
    /// Pressure coefficient (Kármán–Tsien corrected when mach > 0).
    pub cp: Vec<f64>,
    /// Signed edge speed / U∞ (γ > 0 towards the upper trailing edge); at mach > 0 the
    /// isentropic speed that the corrected Cp implies.
    pub edge_velocity: Vec<f64>,
}

/// Surface stations, Cp and edge velocity of one section at one angle.
pub fn inviscid_surface(
    section: &Section,
    alpha_deg: f64,
    panels: usize,
    mach: f64,
) -> Result<InviscidSurface> {
    validate_mach(mach)?;
    if !alpha_deg.is_finite() {
        return Err(SolverError::input(format!(
            "alpha_deg must be finite, got {alpha_deg}"
        )));
    }
    let solver = PanelSolver::new(&paneled(section, panels)?)?;
    let sol = solver.solve_compressible(alpha_deg, mach)?;
    let edge_velocity = sol
        .gamma
        .iter()
        .zip(&sol.cp)
        .map(|(g, cp)| speed_ratio_from_cp(*cp, mach).copysign(*g))
        .collect();
    Ok(InviscidSurface {
        x: solver.node_x().to_vec(),
        y: solver.node_y().to_vec(),
        s: solver.arc_length().to_vec(),
        cp: sol.cp,
        edge_velocity,
    })
}

/// Inviscid analysis of one section at every angle (incompressible when `mach` is 0), after
/// re-panelling to `panels` panels (0: the section's own points).
pub fn analyze_inviscid(
    section: &Section,
    alphas_deg: &[f64],
    panels: usize,
    mach: f64,
) -> Result<Vec<InviscidSolution>> {
    validate_mach(mach)?;
    if let Some(a) = alphas_deg.iter().find(|a| !a.is_finite()) {
        return Err(SolverError::input(format!(
            "alpha_deg must be finite, got {a}"
        )));
    }
    let solver = PanelSolver::new(&paneled(section, panels)?)?;
    solver.solve_many_compressible(alphas_deg, mach)
}

/// Inviscid analysis of many sections at the same angles, in parallel; one result per section,
/// in input order. A failing section gives its own error and does not stop the others.
pub fn analyze_inviscid_batch(
    sections: &[Section],
    alphas_deg: &[f64],
    panels: usize,
    mach: f64,
    threads: Option<usize>,
) -> Vec<Result<Vec<InviscidSolution>>> {
    let pool = match thread_pool(threads) {
        Ok(pool) => pool,
        Err(e) => return sections.iter().map(|_| Err(e.clone())).collect(),
    };
    pool.install(|| {
        sections
            .par_iter()
            .map(|s| analyze_inviscid(s, alphas_deg, panels, mach))
            .collect()
    })
}

/// One row of a viscous batch: which section and condition it belongs to, and its polar row.
#[derive(Debug, Clone, PartialEq)]
pub struct ViscousBatchRow {
    /// Index into the batch's sections.
    pub section_index: usize,
    /// Index into the batch's conditions.
    pub condition_index: usize,
    /// The polar row.
    pub row: crate::coupling::ViscousRow,
}

/// Viscous polars of many sections × conditions over one α sweep, in parallel over the
/// (section, condition) cases on `threads` threads (0: the `RAYON_NUM_THREADS` environment
/// variable, else the core count).
///
/// Each case's sweep runs on one thread with its own warm starts, so the result is identical
/// for any thread count or case order. Rows come back ordered by section, condition, angle.
/// Bad conditions fail the whole batch up front (`SolverError::Input`); a section the panel
/// method cannot use fails it with that section's `SolverError::Geometry`.
pub fn viscous_batch(
    sections: &[crate::geometry::Section],
    conditions: &[crate::coupling::ViscousSettings],
    alpha_deg: &[f64],
    threads: usize,
) -> crate::error::Result<Vec<ViscousBatchRow>> {
    for condition in conditions {
        condition.validate()?;
    }
    let pool = thread_pool(if threads == 0 { None } else { Some(threads) })?;
    // Sections in parallel, and each section's conditions in parallel sharing its panel
    // solution and cases (`analyze_viscous_conditions`).
    let results: Vec<Vec<crate::error::Result<Vec<crate::coupling::ViscousRow>>>> =
        pool.install(|| {
            sections
                .par_iter()
                .map(|section| {
                    crate::coupling::analyze_viscous_conditions(section, alpha_deg, conditions)
                })
                .collect()
        });
    let mut rows = Vec::with_capacity(sections.len() * conditions.len() * alpha_deg.len());
    for (s, per_condition) in results.into_iter().enumerate() {
        for (c, result) in per_condition.into_iter().enumerate() {
            for row in result? {
                rows.push(ViscousBatchRow {
                    section_index: s,
                    condition_index: c,
                    row,
                });
            }
        }
    }
    Ok(rows)
}
