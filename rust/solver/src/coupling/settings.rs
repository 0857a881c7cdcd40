//! Settings of a viscous analysis: flow conditions, transition control and iteration limits.

use crate::error::{Result, SolverError};

/// Allowed Reynolds numbers (chord-based): the integral closures are calibrated between these.
pub const REYNOLDS_RANGE: (f64, f64) = (1.0e4, 1.0e8);
/// Allowed free-stream Mach numbers: the Kármán–Tsien correction is subsonic-only.
pub const MACH_RANGE: (f64, f64) = (0.0, 0.7);
/// Allowed critical N-factors of the amplification criterion.
pub const N_FACTOR_RANGE: (f64, f64) = (1.0, 20.0);
/// Allowed free-stream turbulence intensities (a fraction, 0.0001 = 0.01 %).
pub const TURBULENCE_INTENSITY_RANGE: (f64, f64) = (1.0e-4, 0.05);
/// Allowed trip positions, fraction of chord.
pub const TRIP_RANGE: (f64, f64) = (0.0, 1.0);
/// Allowed panel counts (0 keeps the section's own points as panel nodes).
pub const PANEL_RANGE: (usize, usize) = (20, 2000);

/// Everything a viscous analysis needs besides the section and the angle of attack.
///
/// Built with [`ViscousSettings::new`] (documented defaults) and checked by
/// [`ViscousSettings::validate`] before any work starts.
#[derive(Debug, Clone, PartialEq)]
pub struct ViscousSettings {
    /// Chord Reynolds number U∞c/ν.
    pub reynolds: f64,
    /// Free-stream Mach number (compressibility enters through the Kármán–Tsien rule).
    pub mach: f64,
    /// Critical N-factor of the amplification criterion (default 9).
    pub n_critical: f64,
    /// Free-stream turbulence intensity as a fraction; when set it replaces `n_critical`
    /// through Mack's relation (AGARD CP-224, 1977).
    pub turbulence_intensity: Option<f64>,
    /// Forced transition on the upper surface at this x/c.
    pub trip_upper: Option<f64>,
    /// Forced transition on the lower surface at this x/c.
    pub trip_lower: Option<f64>,
    /// Number of surface panels after re-panelling (default 160; 0 keeps the section's points).
    pub panels: usize,
    /// Cap on the outer viscous–inviscid iterations (default 80): nothing loops forever.
    pub max_iterations: usize,
    /// Convergence threshold on the interaction residual (see `coupling::iteration`), in units
    /// of the free-stream speed (default 1e-4).
    pub tolerance: f64,
    /// Length of the wake behind the trailing edge, chords (default 5).
    pub wake_length_chords: f64,
    /// Number of wake nodes (default: a quarter of the panel count, at least 24).
    pub wake_nodes: Option<usize>,
    /// Model the pressure jump across the curved wake (default true; `inviscid::wake_vorticity`).
    /// Off gives the first-order displacement interaction alone, for comparisons.
    pub wake_curvature: bool,
}

impl ViscousSettings {
    /// Settings at the given Reynolds number with every other field at its default.
    pub fn new(reynolds: f64) -> Self {
        ViscousSettings {
            reynolds,
            mach: 0.0,
            n_critical: 9.0,
            turbulence_intensity: None,
            trip_upper: None,
            trip_lower: None,
            panels: 160,
            max_iterations: 80,
            tolerance: 1.0e-4,
            wake_length_chords: 5.0,
            wake_nodes: None,
            wake_curvature: true,
        }
    }

    /// Check every argument against its allowed range; the error names the argument.
    pub fn validate(&self) -> Result<()> {
        check_range("reynolds", self.reynolds, REYNOLDS_RANGE)?;
        check_range("mach", self.mach, MACH_RANGE)?;
        check_range("n_factor", self.n_critical, N_FACTOR_RANGE)?;
        if let Some(tu) = self.turbulence_intensity {
            check_range("turbulence_intensity", tu, TURBULENCE_INTENSITY_RANGE)?;
        }
        if let Some(trip) = self.trip_upper {
            check_range("trip_upper", trip, TRIP_RANGE)?;
        }
        if let Some(trip) = self.trip_lower {
            check_range("trip_lower", trip, TRIP_RANGE)?;
        }
        if self.panels != 0 && (self.panels < PANEL_RANGE.0 || self.panels > PANEL_RANGE.1) {
            return Err(SolverError::input(format!(
                "panels = {} is outside the allowed range {}..={} (or 0 for the section's own points)",
                self.panels, PANEL_RANGE.0, PANEL_RANGE.1
            )));
        }
        if self.max_iterations == 0 || self.max_iterations > 10_000 {
            return Err(SolverError::input(format!(
                "max_iterations = {} is outside the allowed range 1..=10000",
                self.max_iterations
            )));
        }
        if !(self.tolerance.is_finite() && self.tolerance > 0.0 && self.tolerance < 1.0) {
            return Err(SolverError::input(format!(
                "tolerance = {} must lie between 0 and 1 (exclusive)",
                self.tolerance
            )));
        }
        check_range("wake_length_chords", self.wake_length_chords, (1.0, 20.0))?;
        if let Some(n) = self.wake_nodes {
            if !(8..=1000).contains(&n) {
                return Err(SolverError::input(format!(
                    "wake_nodes = {n} is outside the allowed range 8..=1000"
                )));
            }
        }
        Ok(())
    }

    /// The critical N-factor actually used: from Mack's relation when a turbulence intensity
    /// is given (N = −8.43 − 2.4 ln Tu, Mack, AGARD CP-224, 1977), clipped to the allowed
    /// N-factor range because the relation leaves its validity (0.1 %–2 %) at both ends.
    pub fn effective_n_critical(&self) -> f64 {
        match self.turbulence_intensity {
            Some(tu) => {
                let n = crate::boundary_layer::transition::critical_n_from_turbulence_intensity(tu);
                n.clamp(N_FACTOR_RANGE.0, N_FACTOR_RANGE.1)
            }
            None => self.n_critical,
        }
    }

    /// Number of wake nodes used.
    pub fn wake_node_count(&self) -> usize {
        self.wake_nodes.unwrap_or((self.panels / 4).max(40))
    }
}

fn check_range(name: &str, value: f64, (lo, hi): (f64, f64)) -> Result<()> {
    if value.is_finite() && value >= lo && value <= hi {
        Ok(())
    } else {
        Err(SolverError::input(format!(
            "{name} = {value} is outside the allowed range {} to {}",
            readable(lo),
            readable(hi)
        )))
    }
}

/// A range bound as people write it: 1e4, 0.7, 1e-4.
fn readable(value: f64) -> String {
    if value != 0.0 && (value.abs() >= 1e4 || value.abs() < 1e-3) {
        format!("{value:e}")
    } else {
        format!("{value}")
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn defaults_are_valid() {
        assert!(ViscousSettings::new(1e6).validate().is_ok());
    }

    #[test]
    fn each_bad_range_names_its_argument() {
        let base = ViscousSettings::new(1e6);
        let cases: Vec<(ViscousSettings, &str)> = vec![
            (
                ViscousSettings {
                    reynolds: 5e3,
                    ..base.clone()
                },
                "reynolds",
            ),
            (
                ViscousSettings {
                    reynolds: f64::NAN,
                    ..base.clone()
                },
                "reynolds",
            ),
            (
                ViscousSettings {
                    mach: 0.8,
                    ..base.clone()
                },
                "mach",
            ),
            (
                ViscousSettings {
                    n_critical: 0.5,
                    ..base.clone()
                },
                "n_factor",
            ),
            (
                ViscousSettings {
                    turbulence_intensity: Some(0.1),
                    ..base.clone()
                },
                "turbulence_intensity",
            ),
            (
                ViscousSettings {
                    trip_upper: Some(1.2),
                    ..base.clone()
                },
                "trip_upper",
            ),
            (
                ViscousSettings {
                    trip_lower: Some(-0.1),
                    ..base.clone()
                },
                "trip_lower",
            ),
            (
                ViscousSettings {
                    panels: 10,
                    ..base.clone()
                },
                "panels",
            ),
        ];
        for (settings, name) in cases {
            match settings.validate() {
                Err(SolverError::Input(msg)) => assert!(msg.contains(name), "{msg}"),
                other => panic!("expected an input error naming {name}, got {other:?}"),
            }
        }
    }
}
