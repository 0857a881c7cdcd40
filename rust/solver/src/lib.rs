//! wakerank-solver: the numerical core of wakerank.
//!
//! Pure Rust, no Python. Section families and coordinate import ([`geometry`]), the
//! linear-vortex panel method, the integral boundary layer and the viscous–inviscid coupling
//! that gives each case's drag from the far-wake momentum defect (cd = 2θ∞/c).

pub mod batch;
pub mod boundary_layer;
pub mod coupling;
pub mod error;
pub mod geometry;
pub mod inviscid;
pub mod linalg;

pub use batch::{analyze_inviscid, analyze_inviscid_batch, viscous_batch, ViscousBatchRow};
pub use error::{Result, SolverError};
pub use geometry::Section;
pub use inviscid::{InviscidSolution, PanelSolver, Wake};
pub use linalg::DenseMatrix;

/// Version of the core, shared with the Python package.
pub const VERSION: &str = env!("CARGO_PKG_VERSION");
