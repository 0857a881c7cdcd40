//! Class-shape transformation sections (Kulfan, "Universal parametric geometry
//! representation method", J. Aircraft 45(1), 2008).
//!
//! Each surface is y(x) = C(x)·S(x) ± x·Δ/2 with the class function C(x) = x^N1 (1 − x)^N2
//! and the shape function S(x) = Σᵢ Aᵢ·Kᵢ xⁱ (1 − x)ⁿ⁻ⁱ, Kᵢ = n!/(i!(n − i)!) (Bernstein
//! polynomials of degree n = coefficients − 1). N1 = 0.5, N2 = 1 give a round-nosed section
//! with a sharp trailing edge; Δ is the trailing-edge thickness, split equally above and below.

use super::{check_points_per_side, cosine_spacing, join_surfaces, Section};
use crate::{Result, SolverError};

/// Class exponent N1 of a round-nosed section (Kulfan 2008).
pub const DEFAULT_N1: f64 = 0.5;
/// Class exponent N2 of a section with a sharp trailing edge (Kulfan 2008).
pub const DEFAULT_N2: f64 = 1.0;

fn binomial(n: usize, k: usize) -> f64 {
    (0..k).fold(1.0, |acc, i| acc * (n - i) as f64 / (i + 1) as f64)
}

fn surface(coeffs: &[f64], x: f64, n1: f64, n2: f64) -> f64 {
    let n = coeffs.len() - 1;
    let class = x.powf(n1) * (1.0 - x).powf(n2);
    let shape: f64 = coeffs
        .iter()
        .enumerate()
        .map(|(i, a)| a * binomial(n, i) * x.powi(i as i32) * (1.0 - x).powi((n - i) as i32))
        .sum();
    class * shape
}

fn check_coefficients(which: &str, c: &[f64]) -> Result<()> {
    if c.is_empty() || c.len() > 40 {
        return Err(SolverError::input(format!(
            "CST {which} coefficients: give 1 to 40 values, got {}",
            c.len()
        )));
    }
    if let Some(i) = c.iter().position(|v| !v.is_finite()) {
        return Err(SolverError::input(format!(
            "CST {which} coefficient {i} is not a finite number"
        )));
    }
    Ok(())
}

/// A CST section: `upper` and `lower` Bernstein coefficients (the lower ones are ordinates,
/// so usually negative), trailing-edge thickness `te_thickness` (fraction of chord), class
/// exponents `n1`, `n2`, and `points_per_side` cosine-spaced stations per surface.
pub fn cst(
    upper: &[f64],
    lower: &[f64],
    te_thickness: f64,
    n1: f64,
    n2: f64,
    points_per_side: usize,
) -> Result<Section> {
    check_points_per_side(points_per_side)?;
    check_coefficients("upper", upper)?;
    check_coefficients("lower", lower)?;
    for (name, v) in [("n1", n1), ("n2", n2)] {
        if !(v.is_finite() && v > 0.0 && v <= 4.0) {
            return Err(SolverError::input(format!(
                "CST class exponent {name} must be in (0, 4], got {v}"
            )));
        }
    }
    if !(te_thickness.is_finite() && (0.0..=super::MAX_TRAILING_EDGE_GAP).contains(&te_thickness)) {
        return Err(SolverError::input(format!(
            "CST trailing-edge thickness must be in [0, {}] chord, got {te_thickness}",
            super::MAX_TRAILING_EDGE_GAP
        )));
    }
    let stations = cosine_spacing(points_per_side);
    let yu: Vec<f64> = stations
        .iter()
        .map(|&x| surface(upper, x, n1, n2) + 0.5 * x * te_thickness)
        .collect();
    let yl: Vec<f64> = stations
        .iter()
        .map(|&x| surface(lower, x, n1, n2) - 0.5 * x * te_thickness)
        .collect();
    if let Some(i) = (1..stations.len() - 1).find(|&i| yu[i] <= yl[i]) {
        return Err(SolverError::geometry(format!(
            "CST section: the lower surface is not below the upper one at x = {:.4} (the lower \
             coefficients are ordinates, usually negative)",
            stations[i]
        )));
    }
    let fmt = |c: &[f64]| {
        c.iter()
            .map(|v| format!("{v}"))
            .collect::<Vec<_>>()
            .join(",")
    };
    let name = format!(
        "CST upper[{}] lower[{}] te {}",
        fmt(upper),
        fmt(lower),
        te_thickness
    );
    let section = join_surfaces(name, (&stations, &yu), (&stations, &yl));
    section.validate()?;
    Ok(section)
}
