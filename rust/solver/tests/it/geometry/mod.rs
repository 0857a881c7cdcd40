//! Section geometry: families, coordinate import, re-panelling, properties, bad input.

mod coordinates;
mod families;
mod no_panic;
mod paneling;
