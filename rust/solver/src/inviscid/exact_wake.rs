//! The panel method's speeds along the wake against the exact potential flow behind a symmetric
//! Kármán–Trefftz section at zero incidence (a verification used by the tests and by
//! `wakerank validate`).
//!
//! How fast the wake's edge speed returns to free stream sets how much θ still changes behind
//! the trailing edge (dθ/θ = −(H + 2) due/ue), so the far-wake drag is only as good as these
//! speeds. The exact speed on the dividing streamline is
//! [`KarmanTrefftz::exact_speed_behind_trailing_edge`].

use super::PanelSolver;
use crate::error::Result;
use crate::geometry::karman_trefftz::KarmanTrefftz;

/// Panel-method and exact speeds (in units of U∞) at given distances behind the trailing edge.
#[derive(Debug, Clone, PartialEq)]
pub struct WakeSpeedCheck {
    /// Thickness-to-chord ratio of the panelled section.
    pub thickness: f64,
    /// Distances behind the trailing edge, chords.
    pub distances: Vec<f64>,
    /// Panel-method speed along the wake, linearly interpolated between wake nodes.
    pub panel: Vec<f64>,
    /// Exact speed.
    pub exact: Vec<f64>,
}

/// Wake length (chords) and node count of the check: the wake the viscous model uses is about
/// as long, with about as many nodes.
const WAKE_CHORDS: f64 = 5.0;
const WAKE_NODES: usize = 60;

/// Compares the speeds behind the symmetric section `kt` (`center_y` = 0) panelled with
/// `panels` panels, at `distances` chords behind its trailing edge (each in (0, 5)).
pub fn wake_speed_check(
    kt: &KarmanTrefftz,
    panels: usize,
    distances: &[f64],
) -> Result<WakeSpeedCheck> {
    let exact = kt.exact_speed_behind_trailing_edge(distances)?;
    let section = kt.section(panels + 1)?;
    let thickness = 2.0 * section.y.iter().cloned().fold(0.0, f64::max);
    let solver = PanelSolver::new(&section)?;
    let wake = solver.wake(0.0, WAKE_CHORDS, WAKE_NODES);
    let ue = solver.edge_velocity(0.0, &wake);
    let speed = &ue[ue.len() - wake.len()..];
    let panel = distances
        .iter()
        .map(|&d| {
            let s = d * solver.chord();
            let k = wake.s.partition_point(|&v| v < s).clamp(1, wake.len() - 1);
            let w = (s - wake.s[k - 1]) / (wake.s[k] - wake.s[k - 1]);
            speed[k - 1] + w * (speed[k] - speed[k - 1])
        })
        .collect();
    Ok(WakeSpeedCheck {
        thickness,
        distances: distances.to_vec(),
        panel,
        exact,
    })
}
