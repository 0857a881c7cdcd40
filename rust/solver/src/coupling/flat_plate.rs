//! A flat plate at zero incidence: the boundary-layer march alone, at the free-stream speed,
//! as the simplest check of the march against Blasius and the turbulent plate correlations.

use crate::boundary_layer::{MarchSettings, SideInput};
use crate::error::{Result, SolverError};

use super::iteration::march_side;
use super::settings::ViscousSettings;

/// Stations along the plate (clustered towards the leading edge).
const PLATE_STATIONS: usize = 160;

/// Skin-friction drag of one side of a plate of length 1 at Reynolds number `reynolds`
/// (based on the length): CF = 2θ(L)/L from the momentum integral, edge speed U∞ all along.
/// `tripped` forces transition at the leading edge; otherwise the amplification criterion with
/// critical N-factor `n_critical` decides.
pub fn flat_plate_drag(reynolds: f64, tripped: bool, n_critical: f64) -> Result<f64> {
    let settings = ViscousSettings {
        n_critical,
        ..ViscousSettings::new(reynolds)
    };
    settings.validate()?;
    let s: Vec<f64> = (1..=PLATE_STATIONS)
        .map(|k| {
            let t = k as f64 / PLATE_STATIONS as f64;
            // Quadratic clustering near the leading edge.
            t * t
        })
        .collect();
    let external = vec![1.0; s.len()];
    let coefficient = vec![0.0; s.len()];
    let input = SideInput {
        s: &s,
        external_velocity: &external,
        interaction_coefficient: &coefficient,
    };
    let march = MarchSettings {
        n_critical,
        trip_s: if tripped { Some(0.0) } else { None },
        ..MarchSettings::new(reynolds)
    };
    let solution = march_side(&input, &march);
    let last = solution
        .stations
        .last()
        .ok_or_else(|| SolverError::Internal("flat-plate march returned no stations".into()))?;
    if !last.theta.is_finite() {
        return Err(SolverError::Convergence(format!(
            "flat-plate march at reynolds = {reynolds:e} gave a non-finite momentum thickness"
        )));
    }
    Ok(2.0 * last.theta)
}
