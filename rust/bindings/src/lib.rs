//! `wakerank._core`: the compiled module behind the `wakerank` Python package.
//!
//! Thin by design: convert numpy arrays to owned Rust data, release the GIL for long work,
//! map errors in one place (`errors.rs`). No numerics live here.

use pyo3::prelude::*;

mod errors;
mod inviscid;
mod section;
mod viscous;

/// Version of the compiled core.
#[pyfunction]
fn core_version() -> &'static str {
    wakerank_solver::VERSION
}

#[pymodule]
fn _core(m: &Bound<'_, PyModule>) -> PyResult<()> {
    m.add_function(wrap_pyfunction!(core_version, m)?)?;
    inviscid::register(m)?;
    section::register(m)?;
    viscous::register(m)?;
    Ok(())
}
