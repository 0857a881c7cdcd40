//! wakerank-solver: the numerical core of wakerank.
//!
//! Pure Rust, no Python. Section families and coordinate import ([`geometry`]), the
//! linear-vortex panel method, the integral boundary layer and the viscous–inviscid coupling
//! that gives each case's drag from the far-wake momentum defect (cd = 2θ∞/c).

pub mod boundary_layer;
pub mod error;
pub mod geometry;

pub use error::{Result, SolverError};
pub use geometry::Section;

/// Version of the core, shared with the Python package.
pub const VERSION: &str = env!("CARGO_PKG_VERSION");
