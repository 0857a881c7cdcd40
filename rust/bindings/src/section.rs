//! Section geometry entry points: families, coordinate import, re-panelling, properties.
//!
//! Each function copies its inputs into owned Rust data, calls the core and returns
//! `(name, x, y)` with float64 numpy arrays (or a dict of properties). A panic is caught as a
//! last guard and raised as `InternalError`.

use std::panic::{catch_unwind, AssertUnwindSafe};

use numpy::{PyArray1, PyReadonlyArray1};
use pyo3::prelude::*;
use pyo3::types::PyDict;
use wakerank_solver::geometry::{coordinates, cst, naca, paneling, properties, Section};
use wakerank_solver::SolverError;

use crate::errors::to_pyerr;

/// A section as it crosses into Python: name, x, y.
type PySection<'py> = (String, Bound<'py, PyArray1<f64>>, Bound<'py, PyArray1<f64>>);

/// Run `f`, mapping core errors with `to_pyerr` and a panic to `InternalError`.
fn guarded<T>(
    py: Python<'_>,
    what: &str,
    f: impl FnOnce() -> wakerank_solver::Result<T>,
) -> PyResult<T> {
    match catch_unwind(AssertUnwindSafe(f)) {
        Ok(Ok(v)) => Ok(v),
        Ok(Err(e)) => Err(to_pyerr(py, e)),
        Err(_) => Err(to_pyerr(
            py,
            SolverError::Internal(format!("{what} panicked; please report it")),
        )),
    }
}

fn to_py(py: Python<'_>, s: Section) -> PySection<'_> {
    (
        s.name,
        PyArray1::from_vec(py, s.x),
        PyArray1::from_vec(py, s.y),
    )
}

fn owned(a: &PyReadonlyArray1<'_, f64>) -> Vec<f64> {
    a.as_array().to_vec()
}

/// NACA 4-digit section (NACA Report 460).
#[pyfunction]
fn section_naca4(
    py: Python<'_>,
    camber: f64,
    camber_position: f64,
    thickness: f64,
    closed_te: bool,
    points_per_side: usize,
) -> PyResult<PySection<'_>> {
    let s = guarded(py, "naca4", || {
        naca::naca4(
            camber,
            camber_position,
            thickness,
            closed_te,
            points_per_side,
        )
    })?;
    Ok(to_py(py, s))
}

/// NACA modified 4-digit section (NACA Report 492).
#[pyfunction]
fn section_naca4_modified(
    py: Python<'_>,
    camber: f64,
    camber_position: f64,
    thickness: f64,
    le_radius_index: f64,
    max_thickness_position: f64,
    points_per_side: usize,
) -> PyResult<PySection<'_>> {
    let s = guarded(py, "naca4_modified", || {
        naca::naca4_modified(
            camber,
            camber_position,
            thickness,
            le_radius_index,
            max_thickness_position,
            points_per_side,
        )
    })?;
    Ok(to_py(py, s))
}

/// NACA 5-digit section (NACA Report 610), standard or reflexed mean line.
#[pyfunction]
fn section_naca5(
    py: Python<'_>,
    design_cl: f64,
    max_camber_position: f64,
    reflexed: bool,
    thickness: f64,
    closed_te: bool,
    points_per_side: usize,
) -> PyResult<PySection<'_>> {
    let s = guarded(py, "naca5", || {
        naca::naca5(
            design_cl,
            max_camber_position,
            reflexed,
            thickness,
            closed_te,
            points_per_side,
        )
    })?;
    Ok(to_py(py, s))
}

/// Section from a NACA designation ("2412", "0012-34", "23012", "23112").
#[pyfunction]
fn section_naca<'py>(
    py: Python<'py>,
    code: &str,
    closed_te: bool,
    points_per_side: usize,
) -> PyResult<PySection<'py>> {
    let s = guarded(py, "naca", || {
        naca::from_designation(code, closed_te, points_per_side)
    })?;
    Ok(to_py(py, s))
}

/// The family parameters of a NACA designation, as a dict (family plus its parameters).
#[pyfunction]
fn naca_designation<'py>(py: Python<'py>, code: &str) -> PyResult<Bound<'py, PyDict>> {
    let d = guarded(py, "naca_designation", || naca::parse_designation(code))?;
    let out = PyDict::new(py);
    out.set_item("family", d.family())?;
    for (name, value) in d.parameters() {
        match value {
            naca::DesignationValue::Number(x) => out.set_item(name, x)?,
            naca::DesignationValue::Flag(flag) => out.set_item(name, flag)?,
        }
    }
    Ok(out)
}

/// CST section (Kulfan 2008).
#[pyfunction]
fn section_cst(
    py: Python<'_>,
    upper: Vec<f64>,
    lower: Vec<f64>,
    te_thickness: f64,
    n1: f64,
    n2: f64,
    points_per_side: usize,
) -> PyResult<PySection<'_>> {
    let s = guarded(py, "cst", || {
        cst::cst(&upper, &lower, te_thickness, n1, n2, points_per_side)
    })?;
    Ok(to_py(py, s))
}

/// Section from the text of a coordinate file; `source` names it in error messages.
#[pyfunction]
fn section_parse_coordinates<'py>(
    py: Python<'py>,
    text: &str,
    source: &str,
    normalise: bool,
) -> PyResult<PySection<'py>> {
    let s = guarded(py, "parse_coordinates", || {
        coordinates::parse_coordinates_normalised(text, source, normalise)
    })?;
    Ok(to_py(py, s))
}

/// Section from point arrays in any accepted order (reordered, validated, optionally normalised).
#[pyfunction]
fn section_from_points<'py>(
    py: Python<'py>,
    x: PyReadonlyArray1<'py, f64>,
    y: PyReadonlyArray1<'py, f64>,
    name: &str,
    normalise: bool,
) -> PyResult<PySection<'py>> {
    let (x, y) = (owned(&x), owned(&y));
    let s = guarded(py, "from_points", || {
        coordinates::from_points(x, y, name, normalise)
    })?;
    Ok(to_py(py, s))
}

/// Validate a section already in the core's ordering convention.
#[pyfunction]
fn section_validate<'py>(
    py: Python<'py>,
    x: PyReadonlyArray1<'py, f64>,
    y: PyReadonlyArray1<'py, f64>,
    name: &str,
) -> PyResult<()> {
    let s = Section {
        name: name.to_string(),
        x: owned(&x),
        y: owned(&y),
    };
    guarded(py, "validate", || s.validate())
}

/// Re-panel a section to `panels` panels (`panels` + 1 points).
#[pyfunction]
fn section_repanel<'py>(
    py: Python<'py>,
    x: PyReadonlyArray1<'py, f64>,
    y: PyReadonlyArray1<'py, f64>,
    name: &str,
    panels: usize,
) -> PyResult<PySection<'py>> {
    let s = Section {
        name: name.to_string(),
        x: owned(&x),
        y: owned(&y),
    };
    let out = guarded(py, "repanel", || paneling::repanel(&s, panels))?;
    Ok(to_py(py, out))
}

/// Geometric properties of a validated section, as a dict.
#[pyfunction]
fn section_properties<'py>(
    py: Python<'py>,
    x: PyReadonlyArray1<'py, f64>,
    y: PyReadonlyArray1<'py, f64>,
    name: &str,
) -> PyResult<Bound<'py, PyDict>> {
    let s = Section {
        name: name.to_string(),
        x: owned(&x),
        y: owned(&y),
    };
    let p = guarded(py, "properties", || {
        s.validate()?;
        Ok(properties::properties(&s))
    })?;
    let out = PyDict::new(py);
    out.set_item("thickness", p.thickness)?;
    out.set_item("thickness_position", p.thickness_position)?;
    out.set_item("camber", p.camber)?;
    out.set_item("camber_position", p.camber_position)?;
    out.set_item("leading_edge_radius", p.leading_edge_radius)?;
    out.set_item("trailing_edge_thickness", p.trailing_edge_thickness)?;
    out.set_item("trailing_edge_angle_deg", p.trailing_edge_angle_deg)?;
    out.set_item("area", p.area)?;
    out.set_item("chord", p.chord)?;
    Ok(out)
}

/// Register this module's functions on the compiled module.
pub fn register(m: &Bound<'_, PyModule>) -> PyResult<()> {
    m.add_function(wrap_pyfunction!(section_naca4, m)?)?;
    m.add_function(wrap_pyfunction!(section_naca4_modified, m)?)?;
    m.add_function(wrap_pyfunction!(section_naca5, m)?)?;
    m.add_function(wrap_pyfunction!(section_naca, m)?)?;
    m.add_function(wrap_pyfunction!(naca_designation, m)?)?;
    m.add_function(wrap_pyfunction!(section_cst, m)?)?;
    m.add_function(wrap_pyfunction!(section_parse_coordinates, m)?)?;
    m.add_function(wrap_pyfunction!(section_from_points, m)?)?;
    m.add_function(wrap_pyfunction!(section_validate, m)?)?;
    m.add_function(wrap_pyfunction!(section_repanel, m)?)?;
    m.add_function(wrap_pyfunction!(section_properties, m)?)?;
    m.add("DEFAULT_PANELS", paneling::DEFAULT_PANELS)?;
    Ok(())
}
