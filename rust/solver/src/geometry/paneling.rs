//! Re-panelling: new points along a smooth spline through a section's points, spaced to
//! resolve the leading edge, the trailing edge and regions of high curvature.
//!
//! Method (our own, common practice in panel codes): a natural cubic spline x(s), y(s) in
//! cumulative chord length s; a point density w(s) = √(1 + κ(s)·c) + A_te·exp(−d(s)/(ℓ_te·c)),
//! where κ is the spline curvature, c the chord and d the arc distance to the nearer
//! trailing-edge point; nodes are placed at equal increments of ∫w ds. The √κ weighting gives
//! panels of equal chordal deviation from the true curve; the trailing-edge term keeps the
//! panels there short for the Kutta condition. The end points are kept exactly, so a blunt
//! trailing edge keeps its base.

use super::spline::OutlineSpline;
use super::validation::chord_and_leading_edge;
use super::Section;
use crate::{Result, SolverError};

/// Number of panels used when a caller does not choose one.
pub const DEFAULT_PANELS: usize = 160;

/// Extra density at the trailing edge, relative to a flat mid-chord region.
const TE_DENSITY: f64 = 4.0;
/// Decay length of the trailing-edge density term, fraction of chord.
const TE_DECAY: f64 = 0.02;
/// Fine samples of the density per output panel.
const SAMPLES_PER_PANEL: usize = 40;

/// A new section with `panels` + 1 points (`panels` panels between consecutive points) on
/// the spline through `section`'s points, the first and last point unchanged.
pub fn repanel(section: &Section, panels: usize) -> Result<Section> {
    repanel_with_trailing_edge_density(section, panels, TE_DENSITY)
}

/// [`repanel`] with the extra trailing-edge density `te_density` (≥ 0) instead of the default:
/// 0 leaves only the curvature weighting, so the trailing-edge panels are about as long as
/// the mid-chord ones.
pub fn repanel_with_trailing_edge_density(
    section: &Section,
    panels: usize,
    te_density: f64,
) -> Result<Section> {
    if !(te_density.is_finite() && te_density >= 0.0) {
        return Err(SolverError::input(format!(
            "te_density must be finite and non-negative, got {te_density}"
        )));
    }
    if !(10..=19_999).contains(&panels) {
        return Err(SolverError::input(format!(
            "panels must be between 10 and 19999, got {panels}"
        )));
    }
    section.validate()?;
    let spline = OutlineSpline::new(&section.x, &section.y);
    let total = spline.length();
    let (chord, _) = chord_and_leading_edge(&section.x, &section.y);
    let m = (panels * SAMPLES_PER_PANEL).max(4 * section.len());
    let ds = total / m as f64;
    let mut density: Vec<f64> = (0..=m)
        .map(|j| {
            let s = j as f64 * ds;
            let kappa = spline.curvature(s).abs() * chord;
            let d = s.min(total - s) / chord;
            (1.0 + kappa).sqrt() + te_density * (-d / TE_DECAY).exp()
        })
        .collect();
    smooth(&mut density, 10);
    let mut cumulative = vec![0.0; m + 1];
    for j in 1..=m {
        cumulative[j] = cumulative[j - 1] + 0.5 * (density[j - 1] + density[j]) * ds;
    }
    let w_total = cumulative[m];
    let n = section.len();
    let mut x = Vec::with_capacity(panels + 1);
    let mut y = Vec::with_capacity(panels + 1);
    x.push(section.x[0]);
    y.push(section.y[0]);
    let mut j = 0;
    for k in 1..panels {
        let target = w_total * k as f64 / panels as f64;
        while j + 1 < m && cumulative[j + 1] < target {
            j += 1;
        }
        let frac = (target - cumulative[j]) / (cumulative[j + 1] - cumulative[j]);
        let s = (j as f64 + frac) * ds;
        let (px, py) = spline.point(s);
        x.push(px);
        y.push(py);
    }
    x.push(section.x[n - 1]);
    y.push(section.y[n - 1]);
    let out = Section {
        name: section.name.clone(),
        x,
        y,
    };
    out.validate().map_err(|e| {
        SolverError::geometry(format!(
            "re-panelling '{}' to {panels} panels failed: the spline through its points wiggles \
             too much to give a clean outline (smooth the coordinates or change the panel count): {e}",
            section.name
        ))
    })?;
    Ok(out)
}

/// A few passes of the [1/4, 1/2, 1/4] filter, ends held.
fn smooth(v: &mut [f64], passes: usize) {
    let n = v.len();
    let mut tmp = v.to_vec();
    for _ in 0..passes {
        for i in 1..n - 1 {
            tmp[i] = 0.25 * v[i - 1] + 0.5 * v[i] + 0.25 * v[i + 1];
        }
        v[1..n - 1].copy_from_slice(&tmp[1..n - 1]);
    }
}
