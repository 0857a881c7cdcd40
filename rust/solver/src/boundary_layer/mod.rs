//! Integral boundary layer: closure relations, transition, and the marching equations.

pub mod interpolation;
pub(crate) mod intervals;
pub mod lag_entrainment;
pub(crate) mod laminar;
pub mod laminar_closure;
pub(crate) mod local_newton;
pub mod march;
pub mod separated_transition;
pub mod station;
pub mod transition;
mod transition_interval;
pub mod wake;

pub use march::march_surface;
pub(crate) use station::LayerState;
pub use station::{MarchSettings, Regime, SideInput, SideSolution, Station};
pub use wake::{march_wake, march_wake_with, LaminarTrailingEdge};
