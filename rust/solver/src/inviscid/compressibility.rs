//! Compressibility correction of the incompressible panel solution (Kármán–Tsien).
//!
//! Cp = Cp₀ / [β + M²/(1 + β) · Cp₀/2], β = √(1 − M²) (von Kármán, J. Aero. Sci. 8, 1941;
//! Tsien, J. Aero. Sci. 6, 1939). The critical pressure coefficient, where the local flow
//! reaches sonic speed, follows from the isentropic relations (Anderson, *Modern Compressible
//! Flow*, §9.9). Allowed Mach numbers are 0 ≤ M < 0.9; the correction is meant for M ≤ 0.7 and
//! for subcritical flow, so results between 0.7 and 0.9 or with `critical_mach_reached` are
//! outside its validated range (the Python layer warns above 0.7).

use super::{InviscidSolution, PanelSolver};
use crate::error::{Result, SolverError};

/// Ratio of specific heats of air.
pub const GAMMA_AIR: f64 = 1.4;

/// Largest Mach number accepted (exclusive): the correction is meaningless near M = 1.
pub const MACH_LIMIT: f64 = 0.9;

/// Mach number above which results are outside the correction's validated range.
pub const MACH_VALIDATED: f64 = 0.7;

/// Check a free-stream Mach number: finite and 0 ≤ M < 0.9, else an input error naming `mach`.
pub fn validate_mach(mach: f64) -> Result<()> {
    if mach.is_finite() && (0.0..MACH_LIMIT).contains(&mach) {
        Ok(())
    } else {
        Err(SolverError::input(format!(
            "mach must be in [0, {MACH_LIMIT}) for the Karman-Tsien correction, got {mach}"
        )))
    }
}

/// Kármán–Tsien corrected pressure coefficient from the incompressible one.
pub fn karman_tsien_cp(cp0: f64, mach: f64) -> f64 {
    if mach == 0.0 {
        return cp0;
    }
    let beta = (1.0 - mach * mach).sqrt();
    cp0 / (beta + mach * mach / (1.0 + beta) * 0.5 * cp0)
}

/// Critical pressure coefficient: Cp* = 2/(γM²)·{[(2 + (γ−1)M²)/(γ+1)]^(γ/(γ−1)) − 1}.
/// Minus infinity at M = 0 (incompressible flow never turns sonic).
pub fn critical_cp(mach: f64) -> f64 {
    if mach <= 0.0 {
        return f64::NEG_INFINITY;
    }
    let g = GAMMA_AIR;
    let m2 = mach * mach;
    2.0 / (g * m2) * (((2.0 + (g - 1.0) * m2) / (g + 1.0)).powf(g / (g - 1.0)) - 1.0)
}

/// Local speed ratio q/U∞ that gives pressure coefficient `cp` in isentropic flow at free-stream
/// Mach number `mach` (inverse of Cp = 2/(γM²)·{[1 + (γ−1)/2·M²(1 − q²)]^(γ/(γ−1)) − 1}).
/// At M = 0 it is Bernoulli's q = √(1 − Cp). Clipped at zero speed.
pub fn speed_ratio_from_cp(cp: f64, mach: f64) -> f64 {
    if mach == 0.0 {
        return (1.0 - cp).max(0.0).sqrt();
    }
    let g = GAMMA_AIR;
    let m2 = mach * mach;
    let p_ratio = (1.0 + 0.5 * g * m2 * cp).max(0.0);
    let q2 = 1.0 - (p_ratio.powf((g - 1.0) / g) - 1.0) * 2.0 / ((g - 1.0) * m2);
    q2.max(0.0).sqrt()
}

impl PanelSolver {
    /// Solution at `alpha_deg` with the Kármán–Tsien correction at free-stream Mach `mach`.
    ///
    /// Cp is corrected station by station; cl, cm and cd integrate the corrected Cp;
    /// cl_circulation integrates the compressible surface speeds that the corrected Cp implies
    /// (isentropic flow), so both lifts still agree. `gamma` stays the incompressible speed.
    /// Errors: `SolverError::Input` when `mach` is outside [0, 0.9).
    pub fn solve_compressible(&self, alpha_deg: f64, mach: f64) -> Result<InviscidSolution> {
        validate_mach(mach)?;
        let mut solution = self.solution_from(alpha_deg, mach, self.gamma_at(alpha_deg));
        solution.mach = mach;
        Ok(solution)
    }

    /// [`PanelSolver::solve_compressible`] at each angle.
    pub fn solve_many_compressible(
        &self,
        alphas_deg: &[f64],
        mach: f64,
    ) -> Result<Vec<InviscidSolution>> {
        alphas_deg
            .iter()
            .map(|&a| self.solve_compressible(a, mach))
            .collect()
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn critical_cp_known_values() {
        // Anderson, Modern Compressible Flow, Fig. 9.10 / common tables: Cp* ≈ −1.29 at M 0.6.
        assert!((critical_cp(0.6) + 1.2943).abs() < 1e-3);
        // Sonic free stream: Cp* = 0.
        assert!(critical_cp(1.0).abs() < 1e-12);
    }

    #[test]
    fn speed_from_cp_inverts_isentropic_relation() {
        let m = 0.5;
        let q: f64 = 1.3;
        let g = GAMMA_AIR;
        let cp = 2.0 / (g * m * m)
            * ((1.0 + 0.5 * (g - 1.0) * m * m * (1.0 - q * q)).powf(g / (g - 1.0)) - 1.0);
        assert!((speed_ratio_from_cp(cp, m) - q).abs() < 1e-12);
    }

    #[test]
    fn mach_range() {
        assert!(validate_mach(0.0).is_ok() && validate_mach(0.85).is_ok());
        for bad in [0.9, 1.2, -0.1, f64::NAN] {
            let err = validate_mach(bad).unwrap_err().to_string();
            assert!(err.contains("mach"), "{err}");
        }
    }
}
