//! Viscous analysis entry points: copy the inputs, release the GIL, run the core, hand back
//! float64 columns (Python builds the polars frames).

use std::panic::{catch_unwind, AssertUnwindSafe};

use numpy::{PyArray1, PyReadonlyArray1};
use pyo3::prelude::*;
use pyo3::types::{PyDict, PyList, PyTuple};
use wakerank_solver::coupling::{self, StationRegime, StationSide, ViscousRow, ViscousSettings};
use wakerank_solver::{Section, SolverError};

use crate::errors::to_pyerr;

/// Run `f`, turning a panic into an internal error: never a panic across the boundary.
fn guarded<T>(f: impl FnOnce() -> Result<T, SolverError>) -> Result<T, SolverError> {
    catch_unwind(AssertUnwindSafe(f)).unwrap_or_else(|payload| {
        let what = payload
            .downcast_ref::<&str>()
            .map(|s| s.to_string())
            .or_else(|| payload.downcast_ref::<String>().cloned())
            .unwrap_or_else(|| "unknown panic".into());
        Err(SolverError::Internal(format!(
            "the viscous solver panicked: {what}"
        )))
    })
}

fn section(
    name: String,
    x: &PyReadonlyArray1<'_, f64>,
    y: &PyReadonlyArray1<'_, f64>,
) -> PyResult<Section> {
    Ok(Section {
        name,
        x: x.as_array().to_vec(),
        y: y.as_array().to_vec(),
    })
}

/// Viscous settings from a conditions dict (keys as `wakerank.viscous.condition_keywords`
/// writes them; missing ones take the core's defaults).
fn settings_from(d: &Bound<'_, PyDict>) -> PyResult<ViscousSettings> {
    Ok(ViscousSettings {
        mach: get_item::<f64>(d, "mach", Some(0.0))?,
        n_critical: get_item::<f64>(d, "n_factor", Some(9.0))?,
        turbulence_intensity: get_optional(d, "turbulence_intensity")?,
        trip_upper: get_optional(d, "trip_upper")?,
        trip_lower: get_optional(d, "trip_lower")?,
        panels: get_item::<usize>(d, "panels", Some(160))?,
        ..ViscousSettings::new(get_item::<f64>(d, "reynolds", None)?)
    })
}

/// The shared path of the single-section entry points: copy the section and the conditions,
/// run `solve` with the GIL released and panics caught, map a failure to its Python exception.
fn run_detached<'py, T: Send>(
    py: Python<'py>,
    name: String,
    x: &PyReadonlyArray1<'py, f64>,
    y: &PyReadonlyArray1<'py, f64>,
    conditions: &Bound<'py, PyDict>,
    solve: impl FnOnce(&Section, &ViscousSettings) -> Result<T, SolverError> + Send,
) -> PyResult<T> {
    let section = section(name, x, y)?;
    let settings = settings_from(conditions)?;
    py.detach(move || guarded(|| solve(&section, &settings)))
        .map_err(|e| to_pyerr(py, e))
}

fn column<'py>(
    py: Python<'py>,
    dict: &Bound<'py, PyDict>,
    name: &str,
    values: Vec<f64>,
) -> PyResult<()> {
    dict.set_item(name, PyArray1::from_vec(py, values))
}

/// Polar rows as a dict of float64 columns (None becomes NaN; converged as 0/1).
fn rows_to_dict<'py>(py: Python<'py>, rows: &[ViscousRow]) -> PyResult<Bound<'py, PyDict>> {
    let dict = PyDict::new(py);
    let get = |f: fn(&ViscousRow) -> f64| rows.iter().map(f).collect::<Vec<f64>>();
    column(py, &dict, "alpha_deg", get(|r| r.alpha_deg))?;
    column(py, &dict, "cl", get(|r| r.cl))?;
    column(py, &dict, "cd", get(|r| r.cd))?;
    column(py, &dict, "cd_squire_young", get(|r| r.cd_squire_young))?;
    column(py, &dict, "cd_friction", get(|r| r.cd_friction))?;
    column(py, &dict, "cd_pressure", get(|r| r.cd_pressure))?;
    column(py, &dict, "cm_c4", get(|r| r.cm_c4))?;
    column(py, &dict, "cp_min", get(|r| r.cp_min))?;
    column(py, &dict, "transition_upper", get(|r| r.transition_upper))?;
    column(py, &dict, "transition_lower", get(|r| r.transition_lower))?;
    column(
        py,
        &dict,
        "separation_upper",
        get(|r| r.separation_upper.unwrap_or(f64::NAN)),
    )?;
    column(
        py,
        &dict,
        "separation_lower",
        get(|r| r.separation_lower.unwrap_or(f64::NAN)),
    )?;
    column(
        py,
        &dict,
        "converged",
        get(|r| if r.converged { 1.0 } else { 0.0 }),
    )?;
    column(py, &dict, "iterations", get(|r| r.iterations as f64))?;
    column(py, &dict, "residual", get(|r| r.residual))?;
    column(
        py,
        &dict,
        "wake_curvature",
        get(|r| if r.wake_curvature { 1.0 } else { 0.0 }),
    )?;
    column(
        py,
        &dict,
        "critical_mach_reached",
        get(|r| if r.critical_mach_reached { 1.0 } else { 0.0 }),
    )?;
    Ok(dict)
}

/// Viscous polar of one section over an α sweep (warm-started, outward from 0°).
#[pyfunction]
#[pyo3(signature = (name, x, y, alpha_deg, conditions))]
pub fn viscous_sweep<'py>(
    py: Python<'py>,
    name: String,
    x: PyReadonlyArray1<'py, f64>,
    y: PyReadonlyArray1<'py, f64>,
    alpha_deg: PyReadonlyArray1<'py, f64>,
    conditions: &Bound<'py, PyDict>,
) -> PyResult<Bound<'py, PyDict>> {
    let alphas = alpha_deg.as_array().to_vec();
    let rows = run_detached(py, name, &x, &y, conditions, move |section, settings| {
        coupling::analyze_viscous(section, &alphas, settings)
    })?;
    rows_to_dict(py, &rows)
}

/// The viscous polar row at a target lift coefficient.
#[pyfunction]
#[pyo3(signature = (name, x, y, cl, conditions))]
pub fn viscous_solve_for_cl<'py>(
    py: Python<'py>,
    name: String,
    x: PyReadonlyArray1<'py, f64>,
    y: PyReadonlyArray1<'py, f64>,
    cl: f64,
    conditions: &Bound<'py, PyDict>,
) -> PyResult<Bound<'py, PyDict>> {
    let row = run_detached(py, name, &x, &y, conditions, move |section, settings| {
        coupling::solve_for_cl(section, cl, settings)
    })?;
    rows_to_dict(py, &[row])
}

/// Boundary-layer and wake stations at one angle: columns, with side and regime as codes
/// (side 0 upper, 1 lower, 2 wake; regime 0 laminar, 1 turbulent, 2 wake).
#[pyfunction]
#[pyo3(signature = (name, x, y, alpha_deg, conditions))]
pub fn viscous_boundary_layer<'py>(
    py: Python<'py>,
    name: String,
    x: PyReadonlyArray1<'py, f64>,
    y: PyReadonlyArray1<'py, f64>,
    alpha_deg: f64,
    conditions: &Bound<'py, PyDict>,
) -> PyResult<Bound<'py, PyDict>> {
    let analysis = run_detached(py, name, &x, &y, conditions, move |section, settings| {
        coupling::boundary_layer_stations(section, alpha_deg, settings)
    })?;
    let st = &analysis.stations;
    let dict = PyDict::new(py);
    let side_code = |s: StationSide| match s {
        StationSide::Upper => 0.0,
        StationSide::Lower => 1.0,
        StationSide::Wake => 2.0,
    };
    let regime_code = |r: StationRegime| match r {
        StationRegime::Laminar => 0.0,
        StationRegime::Turbulent => 1.0,
        StationRegime::Wake => 2.0,
    };
    column(
        py,
        &dict,
        "side",
        st.iter().map(|r| side_code(r.side)).collect(),
    )?;
    column(py, &dict, "s", st.iter().map(|r| r.s).collect())?;
    column(py, &dict, "x", st.iter().map(|r| r.x).collect())?;
    column(py, &dict, "y", st.iter().map(|r| r.y).collect())?;
    column(
        py,
        &dict,
        "edge_velocity",
        st.iter().map(|r| r.edge_velocity).collect(),
    )?;
    column(
        py,
        &dict,
        "delta_star",
        st.iter().map(|r| r.delta_star).collect(),
    )?;
    column(py, &dict, "theta", st.iter().map(|r| r.theta).collect())?;
    column(
        py,
        &dict,
        "shape_factor",
        st.iter().map(|r| r.shape_factor).collect(),
    )?;
    column(py, &dict, "cf", st.iter().map(|r| r.cf).collect())?;
    column(
        py,
        &dict,
        "amplification",
        st.iter().map(|r| r.amplification).collect(),
    )?;
    column(
        py,
        &dict,
        "regime",
        st.iter().map(|r| regime_code(r.regime)).collect(),
    )?;
    dict.set_item("converged", analysis.row.converged)?;
    Ok(dict)
}

fn get_item<'py, T: for<'a> FromPyObject<'a, 'py>>(
    dict: &Bound<'py, PyDict>,
    key: &str,
    default: Option<T>,
) -> PyResult<T> {
    match dict.get_item(key)? {
        Some(v) if !v.is_none() => v.extract::<T>().map_err(Into::into),
        _ => default
            .ok_or_else(|| pyo3::exceptions::PyKeyError::new_err(format!("condition lacks {key}"))),
    }
}

fn get_optional<'py>(dict: &Bound<'py, PyDict>, key: &str) -> PyResult<Option<f64>> {
    match dict.get_item(key)? {
        Some(v) if !v.is_none() => Ok(Some(v.extract::<f64>()?)),
        _ => Ok(None),
    }
}

/// Many sections × conditions × one α sweep in one call, in parallel over (section,
/// condition) cases on `threads` threads (0: RAYON_NUM_THREADS or the core count); the
/// result is the same for any thread count. Columns as `viscous_sweep` plus section_index
/// and condition_index, ordered section, condition, angle.
#[pyfunction]
#[pyo3(signature = (sections, conditions, alpha_deg, threads=0))]
pub fn viscous_batch<'py>(
    py: Python<'py>,
    sections: &Bound<'py, PyList>,
    conditions: &Bound<'py, PyList>,
    alpha_deg: PyReadonlyArray1<'py, f64>,
    threads: usize,
) -> PyResult<Bound<'py, PyDict>> {
    let mut owned_sections = Vec::with_capacity(sections.len());
    for item in sections.iter() {
        let tuple = item.cast_into::<PyTuple>()?;
        let name: String = tuple.get_item(0)?.extract()?;
        let x: PyReadonlyArray1<'py, f64> = tuple.get_item(1)?.extract()?;
        let y: PyReadonlyArray1<'py, f64> = tuple.get_item(2)?.extract()?;
        owned_sections.push(section(name, &x, &y)?);
    }
    let mut owned_conditions = Vec::with_capacity(conditions.len());
    for item in conditions.iter() {
        owned_conditions.push(settings_from(&item.cast_into::<PyDict>()?)?);
    }
    let alphas = alpha_deg.as_array().to_vec();
    let rows = py
        .detach(move || {
            guarded(|| {
                wakerank_solver::batch::viscous_batch(
                    &owned_sections,
                    &owned_conditions,
                    &alphas,
                    threads,
                )
            })
        })
        .map_err(|e| to_pyerr(py, e))?;
    let plain: Vec<ViscousRow> = rows.iter().map(|r| r.row.clone()).collect();
    let dict = rows_to_dict(py, &plain)?;
    column(
        py,
        &dict,
        "section_index",
        rows.iter().map(|r| r.section_index as f64).collect(),
    )?;
    column(
        py,
        &dict,
        "condition_index",
        rows.iter().map(|r| r.condition_index as f64).collect(),
    )?;
    Ok(dict)
}

/// One-side skin-friction drag CF of a flat plate of unit length at `reynolds`, laminar
/// (free transition with `n_factor`) or tripped at the leading edge.
#[pyfunction]
#[pyo3(signature = (reynolds, *, tripped=false, n_factor=9.0))]
pub fn flat_plate_drag(
    py: Python<'_>,
    reynolds: f64,
    tripped: bool,
    n_factor: f64,
) -> PyResult<f64> {
    py.detach(move || guarded(|| coupling::flat_plate_drag(reynolds, tripped, n_factor)))
        .map_err(|e| to_pyerr(py, e))
}

/// Register the viscous functions on the module.
pub fn register(m: &Bound<'_, PyModule>) -> PyResult<()> {
    m.add_function(wrap_pyfunction!(viscous_sweep, m)?)?;
    m.add_function(wrap_pyfunction!(viscous_solve_for_cl, m)?)?;
    m.add_function(wrap_pyfunction!(viscous_boundary_layer, m)?)?;
    m.add_function(wrap_pyfunction!(viscous_batch, m)?)?;
    m.add_function(wrap_pyfunction!(flat_plate_drag, m)?)?;
    Ok(())
}
