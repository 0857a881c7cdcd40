//! Integral boundary layer: closure relations, transition, and the marching equations.

pub mod interpolation;
pub mod laminar_closure;
