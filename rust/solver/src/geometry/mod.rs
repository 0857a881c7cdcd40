//! Section geometry: the families, coordinate import, re-panelling and geometric properties.
//!
//! Every constructor returns a [`Section`] in one ordering convention (see below) that has
//! passed [`Section::validate`], so the panel method never sees an unusable outline.

pub mod coordinates;
pub mod cst;
pub mod naca;
mod naca_lines;
mod ordering;
pub mod paneling;
pub mod properties;
mod spline;
mod validation;

pub use validation::{MAX_TRAILING_EDGE_GAP, MIN_POINTS};

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

/// Cosine-spaced abscissae from 0 to 1 (`n` points, ends included): x = (1 − cos β)/2.
///
/// Common practice for analytic families: points cluster at both the leading and trailing edge.
pub(crate) fn cosine_spacing(n: usize) -> Vec<f64> {
    let last = (n - 1) as f64;
    (0..n)
        .map(|i| {
            if i == 0 {
                0.0
            } else if i + 1 == n {
                1.0
            } else {
                0.5 * (1.0 - (std::f64::consts::PI * i as f64 / last).cos())
            }
        })
        .collect()
}

/// Join an upper and a lower surface, each listed from the leading to the trailing edge and
/// sharing the leading-edge point, into one loop in the core's ordering convention.
pub(crate) fn join_surfaces(
    name: String,
    upper: (&[f64], &[f64]),
    lower: (&[f64], &[f64]),
) -> Section {
    let n = upper.0.len() + lower.0.len() - 1;
    let mut x = Vec::with_capacity(n);
    let mut y = Vec::with_capacity(n);
    for i in (0..upper.0.len()).rev() {
        x.push(upper.0[i]);
        y.push(upper.1[i]);
    }
    for i in 1..lower.0.len() {
        x.push(lower.0[i]);
        y.push(lower.1[i]);
    }
    Section { name, x, y }
}

/// Check the `points_per_side` argument shared by the analytic families.
pub(crate) fn check_points_per_side(points_per_side: usize) -> crate::Result<()> {
    if !(6..=10_000).contains(&points_per_side) {
        return Err(crate::SolverError::input(format!(
            "points per side must be between 6 and 10000, got {points_per_side}"
        )));
    }
    Ok(())
}
