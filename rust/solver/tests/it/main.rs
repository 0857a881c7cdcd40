//! Integration tests of the public API of wakerank-solver (one test binary).

mod boundary_layer;
mod coupling;
mod geometry;

#[test]
fn version_is_set() {
    assert!(!wakerank_solver::VERSION.is_empty());
}
mod inviscid;
mod robustness;
