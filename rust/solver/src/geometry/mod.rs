//! Section geometry: the families, coordinate import, re-panelling and geometric properties.

pub mod karman_trefftz;

/// An airfoil section as an ordered loop of points in chord-normalised coordinates.
///
/// Ordering convention used throughout the core: the first point is the trailing edge of the
/// upper surface, the points run forward over the upper surface to the leading edge and back
/// along the lower surface to the lower trailing-edge point (counter-clockwise). The loop is
/// not closed explicitly: for a sharp trailing edge the first and last points coincide, for a
/// blunt one they are the two ends of the trailing-edge base.
#[derive(Debug, Clone, PartialEq)]
pub struct Section {
    /// A human-readable name ("NACA 2412", a file stem, ...).
    pub name: String,
    /// Abscissae, fraction of chord.
    pub x: Vec<f64>,
    /// Ordinates, fraction of chord.
    pub y: Vec<f64>,
}

impl Section {
    /// Number of points in the loop.
    pub fn len(&self) -> usize {
        self.x.len()
    }
    /// True when the section has no points.
    pub fn is_empty(&self) -> bool {
        self.x.is_empty()
    }
}
