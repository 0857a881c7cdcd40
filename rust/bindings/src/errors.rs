//! The one place where core errors become Python exceptions.
//!
//! The exception classes themselves are declared in Python (`wakerank/errors.py`) so that
//! they subclass `ValueError` / `RuntimeError` naturally; here we import and raise them.

use pyo3::exceptions::{PyRuntimeError, PyValueError};
use pyo3::prelude::*;
use wakerank_solver::SolverError;

/// Raise the wakerank exception class matching the error's category.
pub fn to_pyerr(py: Python<'_>, err: SolverError) -> PyErr {
    let (class, msg) = match &err {
        SolverError::Geometry(m) => ("GeometryError", m.clone()),
        SolverError::Input(m) => ("InputError", m.clone()),
        SolverError::Convergence(m) => ("ConvergenceError", m.clone()),
        SolverError::Internal(m) => ("InternalError", format!("internal error: {m}")),
    };
    match py
        .import("wakerank.errors")
        .and_then(|module| module.getattr(class))
    {
        Ok(exc_type) => PyErr::from_type(exc_type.cast_into().expect("exception class"), msg),
        Err(_) => match err {
            SolverError::Internal(_) | SolverError::Convergence(_) => PyRuntimeError::new_err(msg),
            _ => PyValueError::new_err(msg),
        },
    }
}
