//! One categorised error type for the whole numerical core.
//!
//! The binding crate maps each category to its own Python exception in a single place
//! (`rust/bindings/src/errors.rs`), so a new failure mode only needs a variant here.

/// Every way a call into the core can fail. The message names what is wrong and where.
#[derive(Debug, Clone, PartialEq, thiserror::Error)]
pub enum SolverError {
    /// The section geometry is unusable (too few points, NaN, self-intersection, ...).
    #[error("{0}")]
    Geometry(String),
    /// An argument is outside its allowed range (Reynolds number, Mach number, N-factor, ...).
    #[error("{0}")]
    Input(String),
    /// An iteration did not converge and no usable result exists.
    #[error("{0}")]
    Convergence(String),
    /// A bug: an invariant of the core was violated. Never expected in normal use.
    #[error("internal error: {0}")]
    Internal(String),
}

/// Result type used across the core.
pub type Result<T> = std::result::Result<T, SolverError>;

impl SolverError {
    /// Shorthand for a geometry error.
    pub fn geometry(msg: impl Into<String>) -> Self {
        SolverError::Geometry(msg.into())
    }
    /// Shorthand for an input error.
    pub fn input(msg: impl Into<String>) -> Self {
        SolverError::Input(msg.into())
    }
}
