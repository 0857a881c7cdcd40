//! Inviscid panel analysis for Python: numpy arrays in, dicts of numpy arrays out.
//!
//! Inputs are copied into owned Rust data, the work runs with the GIL released, and a panic is
//! caught and reported as `wakerank.InternalError` instead of crossing into Python.

use crate::errors::to_pyerr;
use numpy::{IntoPyArray, PyReadonlyArray1};
use pyo3::prelude::*;
use pyo3::types::PyDict;
use std::panic::{catch_unwind, AssertUnwindSafe};
use wakerank_solver::batch::{analyze_inviscid, analyze_inviscid_batch, inviscid_surface};
use wakerank_solver::geometry::karman_trefftz::KarmanTrefftz;
use wakerank_solver::inviscid::exact_wake::wake_speed_check;
use wakerank_solver::{InviscidSolution, Result as CoreResult, Section, SolverError};

/// Run `work` without the GIL; a panic becomes an internal error.
fn guarded<T: Send>(py: Python<'_>, work: impl FnOnce() -> CoreResult<T> + Send) -> CoreResult<T> {
    py.detach(|| {
        catch_unwind(AssertUnwindSafe(work)).unwrap_or_else(|panic| {
            let what = panic
                .downcast_ref::<&str>()
                .map(|s| s.to_string())
                .or_else(|| panic.downcast_ref::<String>().cloned())
                .unwrap_or_else(|| "unknown panic".into());
            Err(SolverError::Internal(what))
        })
    })
}

fn section_from(
    name: &str,
    x: &PyReadonlyArray1<'_, f64>,
    y: &PyReadonlyArray1<'_, f64>,
) -> Section {
    Section {
        name: name.to_string(),
        x: x.as_array().to_vec(),
        y: y.as_array().to_vec(),
    }
}

/// Polar table columns of a list of solutions.
fn polar_dict<'py>(
    py: Python<'py>,
    sols: &[InviscidSolution],
    panels: usize,
) -> PyResult<Bound<'py, PyDict>> {
    let d = PyDict::new(py);
    let col = |f: fn(&InviscidSolution) -> f64| sols.iter().map(f).collect::<Vec<f64>>();
    d.set_item("alpha_deg", col(|s| s.alpha_deg).into_pyarray(py))?;
    d.set_item("cl", col(|s| s.cl).into_pyarray(py))?;
    d.set_item("cl_circulation", col(|s| s.cl_circulation).into_pyarray(py))?;
    d.set_item("cm_c4", col(|s| s.cm_c4).into_pyarray(py))?;
    d.set_item("cd_pressure", col(|s| s.cd_pressure).into_pyarray(py))?;
    d.set_item("cp_min", col(|s| s.cp_min).into_pyarray(py))?;
    d.set_item(
        "critical_mach_reached",
        sols.iter()
            .map(|s| s.critical_mach_reached)
            .collect::<Vec<bool>>()
            .into_pyarray(py),
    )?;
    d.set_item("mach", col(|s| s.mach).into_pyarray(py))?;
    d.set_item("panels", panels)?;
    Ok(d)
}

/// Inviscid polar of one section: dict of numpy columns (alpha_deg, cl, cl_circulation, cm_c4,
/// cd_pressure, cp_min, critical_mach_reached, mach) and the panel count used.
#[pyfunction]
#[pyo3(signature = (x, y, alphas_deg, panels, mach, name = "section"))]
pub fn inviscid_polar<'py>(
    py: Python<'py>,
    x: PyReadonlyArray1<'py, f64>,
    y: PyReadonlyArray1<'py, f64>,
    alphas_deg: PyReadonlyArray1<'py, f64>,
    panels: usize,
    mach: f64,
    name: &str,
) -> PyResult<Bound<'py, PyDict>> {
    let section = section_from(name, &x, &y);
    let alphas = alphas_deg.as_array().to_vec();
    let sols = guarded(py, || analyze_inviscid(&section, &alphas, panels, mach))
        .map_err(|e| to_pyerr(py, e))?;
    let used = if panels == 0 {
        section.x.len() - 1
    } else {
        panels
    };
    polar_dict(py, &sols, used)
}

/// Inviscid polars of many sections in parallel. `sections` is a list of (name, x, y); the
/// result has one entry per section, in order: a dict as from `inviscid_polar`, or the
/// exception instance for a section that failed.
#[pyfunction]
#[pyo3(signature = (sections, alphas_deg, panels, mach, threads = None))]
pub fn inviscid_polar_batch<'py>(
    py: Python<'py>,
    sections: Vec<(
        String,
        PyReadonlyArray1<'py, f64>,
        PyReadonlyArray1<'py, f64>,
    )>,
    alphas_deg: PyReadonlyArray1<'py, f64>,
    panels: usize,
    mach: f64,
    threads: Option<usize>,
) -> PyResult<Vec<Py<PyAny>>> {
    let owned: Vec<Section> = sections
        .iter()
        .map(|(n, x, y)| section_from(n, x, y))
        .collect();
    let alphas = alphas_deg.as_array().to_vec();
    let results = guarded(py, || {
        Ok(analyze_inviscid_batch(
            &owned, &alphas, panels, mach, threads,
        ))
    })
    .map_err(|e| to_pyerr(py, e))?;
    results
        .into_iter()
        .zip(&owned)
        .map(|(r, s)| match r {
            Ok(sols) => {
                let used = if panels == 0 {
                    s.x.len().saturating_sub(1)
                } else {
                    panels
                };
                Ok(polar_dict(py, &sols, used)?.into_any().unbind())
            }
            Err(e) => Ok(to_pyerr(py, e).into_value(py).into_any()),
        })
        .collect()
}

/// Surface distribution at one angle: dict of numpy arrays x, y, s, cp, edge_velocity.
#[pyfunction]
#[pyo3(signature = (x, y, alpha_deg, panels, mach, name = "section"))]
pub fn inviscid_surface_arrays<'py>(
    py: Python<'py>,
    x: PyReadonlyArray1<'py, f64>,
    y: PyReadonlyArray1<'py, f64>,
    alpha_deg: f64,
    panels: usize,
    mach: f64,
    name: &str,
) -> PyResult<Bound<'py, PyDict>> {
    let section = section_from(name, &x, &y);
    let surf = guarded(py, || inviscid_surface(&section, alpha_deg, panels, mach))
        .map_err(|e| to_pyerr(py, e))?;
    let d = PyDict::new(py);
    d.set_item("x", surf.x.into_pyarray(py))?;
    d.set_item("y", surf.y.into_pyarray(py))?;
    d.set_item("s", surf.s.into_pyarray(py))?;
    d.set_item("cp", surf.cp.into_pyarray(py))?;
    d.set_item("edge_velocity", surf.edge_velocity.into_pyarray(py))?;
    Ok(d)
}

/// (name, x, y, exact Cp, exact cl) handed to Python.
type ExactSolution = (String, Py<PyAny>, Py<PyAny>, Py<PyAny>, f64);

/// Kármán–Trefftz section points and its exact solution at `alpha_deg`: (name, x, y, cp, cl).
#[pyfunction]
pub fn karman_trefftz_exact<'py>(
    py: Python<'py>,
    center_x: f64,
    center_y: f64,
    trailing_edge_angle_deg: f64,
    n_points: usize,
    alpha_deg: f64,
) -> PyResult<ExactSolution> {
    let kt = KarmanTrefftz {
        center_x,
        center_y,
        trailing_edge_angle_deg,
    };
    let (name, (x, y, cp), cl) = guarded(py, || {
        let section = kt.section(n_points)?;
        Ok((
            section.name,
            kt.exact_surface_cp(alpha_deg, n_points)?,
            kt.exact_cl(alpha_deg),
        ))
    })
    .map_err(|e| to_pyerr(py, e))?;
    Ok((
        name,
        x.into_pyarray(py).into_any().unbind(),
        y.into_pyarray(py).into_any().unbind(),
        cp.into_pyarray(py).into_any().unbind(),
        cl,
    ))
}

/// Critical pressure coefficient at free-stream Mach number `mach` (where the local flow
/// turns sonic; minus infinity at M = 0), from the core's isentropic relations.
#[pyfunction]
fn critical_pressure_coefficient(mach: f64) -> f64 {
    wakerank_solver::inviscid::compressibility::critical_cp(mach)
}

/// Speeds along the wake behind a symmetric Kármán–Trefftz section at zero incidence, panel
/// method beside exact potential flow, at `distances` chords behind the trailing edge: the
/// thickness ratio, the panel speeds and the exact ones.
#[pyfunction]
fn karman_trefftz_wake_speeds<'py>(
    py: Python<'py>,
    center_x: f64,
    trailing_edge_angle_deg: f64,
    panels: usize,
    distances: Vec<f64>,
) -> PyResult<(f64, Py<PyAny>, Py<PyAny>)> {
    let kt = KarmanTrefftz {
        center_x,
        center_y: 0.0,
        trailing_edge_angle_deg,
    };
    let check =
        guarded(py, || wake_speed_check(&kt, panels, &distances)).map_err(|e| to_pyerr(py, e))?;
    Ok((
        check.thickness,
        check.panel.into_pyarray(py).into_any().unbind(),
        check.exact.into_pyarray(py).into_any().unbind(),
    ))
}

/// Register the functions of this module.
pub fn register(m: &Bound<'_, PyModule>) -> PyResult<()> {
    m.add_function(wrap_pyfunction!(critical_pressure_coefficient, m)?)?;
    m.add_function(wrap_pyfunction!(inviscid_polar, m)?)?;
    m.add_function(wrap_pyfunction!(inviscid_polar_batch, m)?)?;
    m.add_function(wrap_pyfunction!(inviscid_surface_arrays, m)?)?;
    m.add_function(wrap_pyfunction!(karman_trefftz_exact, m)?)?;
    m.add_function(wrap_pyfunction!(karman_trefftz_wake_speeds, m)?)?;
    Ok(())
}
