//! Free transition by the e^N envelope method, with the envelope fitted to the project's own
//! Orr–Sommerfeld solutions of the Falkner–Skan profiles.
//!
//! `scripts/orr_sommerfeld_envelope.py` solves the Orr–Sommerfeld equation (Chebyshev collocation,
//! Orszag 1971) for each Falkner–Skan profile, continues the temporal eigenvalues to complex
//! wavenumbers for spatial growth rates (Gaster's 1962 estimate as the first step), integrates the amplification of waves of fixed physical frequency along
//! the similar flow and takes their envelope. It tabulates, per shape factor H, the critical
//! Reθ,0(H) and the envelope slope dN/dReθ at ratios ρ = Reθ/Reθ,0 (`data/amplification_envelope.csv`).
//! The march then uses (envelope method, as in similar flows ue ∝ x^m, Reθ = k√Re_x)
//!
//!   dN/ds = (dN/dReθ)(H, Reθ) · θ(dReθ/dx)_similar / θ = (dN/dReθ)(H, Reθ) · (1+m)k²/(2θ),
//!
//! where (1+m)k²/2 = θ dReθ/dx comes from the Falkner–Skan closure table.

use std::sync::OnceLock;

use super::interpolation::MonotoneCubic;
use super::laminar_closure::{ClosureTable, FalknerSkanClosure};
use super::separated_transition::{combined_growth, separated_layer_growth};

/// Rate of growth of the envelope amplification factor along the surface, dN/ds (1/length),
/// for a laminar layer with shape factor h, momentum-thickness Reynolds number re_theta and momentum thickness theta.
pub trait AmplificationModel: Send + Sync {
    /// dN/ds in 1/length (the unit of `theta`); zero below the critical Reynolds number.
    fn growth_rate(&self, h: f64, re_theta: f64, theta: f64) -> f64;
}

/// Mack's relation (AGARD CP-224, 1977): N_crit = −8.43 − 2.4 ln(Tu).
///
/// `tu` is the free-stream turbulence intensity as a fraction (0.0007 for 0.07 %, giving 9.0);
/// the relation is meant for roughly 0.1 % < Tu < 2 %. Callers check the allowed input range.
pub fn critical_n_from_turbulence_intensity(tu: f64) -> f64 {
    -8.43 - 2.4 * tu.ln()
}

/// Width, in units of H, of the bounded extensions of the table in H.
const SHAPE_FACTOR_EXTENSION: f64 = 0.5;
/// Width, in units of ln ρ, of the bounded extension beyond the largest tabulated ratio.
const RATIO_EXTENSION: f64 = 1.0;

/// e^N envelope from the shipped Orr–Sommerfeld table.
#[derive(Debug, Clone)]
pub struct OrrSommerfeldEnvelope {
    log_critical_re_theta: MonotoneCubic,
    /// ln ρ of the tabulated ratios, starting at ln 1 = 0.
    log_ratios: Vec<f64>,
    /// For each ratio, the envelope slope dN/dReθ as a function of H.
    slopes: Vec<MonotoneCubic>,
    closure: &'static FalknerSkanClosure,
}

impl OrrSommerfeldEnvelope {
    /// The envelope built from the table shipped with the crate, parsed once.
    pub fn shipped() -> &'static Self {
        static SHIPPED: OnceLock<OrrSommerfeldEnvelope> = OnceLock::new();
        SHIPPED.get_or_init(|| {
            Self::from_csv(
                include_str!("data/amplification_envelope.csv"),
                FalknerSkanClosure::shipped(),
            )
            .expect("the shipped amplification envelope table is valid (checked by unit tests)")
        })
    }

    /// Builds the envelope from a table in the format of `scripts/orr_sommerfeld_envelope.py`.
    /// Profiles whose table stops at a smaller ratio keep their last slope beyond it.
    pub fn from_csv(source: &str, closure: &'static FalknerSkanClosure) -> Result<Self, String> {
        let what = "amplification envelope table";
        let table = ClosureTable::parse(source, what)?;
        let h = table.column("shape_factor", what)?;
        let critical = table.column("critical_re_theta", what)?;
        let ratio = table.column("re_theta_ratio", what)?;
        let slope = table.column("envelope_slope", what)?;
        let mut ratios: Vec<f64> = Vec::new();
        for &r in &ratio {
            if !ratios.iter().any(|&q| (q - r).abs() < 1e-9) {
                ratios.push(r);
            }
        }
        ratios.sort_by(f64::total_cmp);
        if !matches!(ratios.first(), Some(&r) if (r - 1.0).abs() <= 1e-9) || ratios.len() < 3 {
            return Err(format!(
                "{what}: ratios must start at 1 and have at least three values"
            ));
        }
        let mut shape_factors: Vec<f64> = Vec::new();
        let mut log_critical = Vec::new();
        let mut rows: Vec<Vec<f64>> = Vec::new();
        for i in 0..h.len() {
            if shape_factors.last() != Some(&h[i]) {
                if critical[i] <= 0.0 {
                    return Err(format!(
                        "{what}: critical_re_theta {} at H = {} is not positive",
                        critical[i], h[i]
                    ));
                }
                shape_factors.push(h[i]);
                log_critical.push(critical[i].ln());
                rows.push(Vec::new());
            }
            let row = rows.last_mut().expect("a row was pushed above");
            let j = ratios
                .iter()
                .position(|&q| (q - ratio[i]).abs() < 1e-9)
                .expect("ratio was collected");
            if j != row.len() {
                return Err(format!(
                    "{what}: ratios at H = {} are not in increasing order",
                    h[i]
                ));
            }
            row.push(slope[i]);
        }
        for row in &mut rows {
            let last = *row.last().ok_or_else(|| format!("{what}: empty profile"))?;
            row.resize(ratios.len(), last);
            row[0] = 0.0;
        }
        let slopes = (0..ratios.len())
            .map(|j| {
                let column: Vec<f64> = rows.iter().map(|r| r[j]).collect();
                MonotoneCubic::new(shape_factors.clone(), column, SHAPE_FACTOR_EXTENSION)
            })
            .collect::<Result<Vec<_>, String>>()
            .map_err(|e| format!("{what}: {e}"))?;
        let log_critical_re_theta =
            MonotoneCubic::new(shape_factors, log_critical, SHAPE_FACTOR_EXTENSION)
                .map_err(|e| format!("{what}: {e}"))?;
        // (`envelope_slope` locates H once for all of them.)
        debug_assert!(slopes
            .iter()
            .all(|s| s.shares_abscissae(&log_critical_re_theta)));
        Ok(Self {
            log_critical_re_theta,
            log_ratios: ratios.iter().map(|r| r.ln()).collect(),
            slopes,
            closure,
        })
    }

    /// Critical momentum-thickness Reynolds number Reθ,0(H) where the envelope starts to grow.
    pub fn critical_re_theta(&self, h: f64) -> f64 {
        self.log_critical_re_theta.value(h).exp()
    }

    /// Envelope slope dN/dReθ at shape factor `h` and Reθ (zero below Reθ,0(H)).
    pub fn envelope_slope(&self, h: f64, re_theta: f64) -> f64 {
        if re_theta.is_nan() || re_theta <= 0.0 {
            return 0.0;
        }
        // Every table in H shares the critical Reθ's abscissae (`from_csv`): located once.
        let at = self.log_critical_re_theta.position(h);
        let x = (re_theta / self.log_critical_re_theta.value_at(&at).exp()).ln();
        if x <= 0.0 {
            return 0.0;
        }
        // Only the nodes the interpolation touches are evaluated (at most four).
        let value = |j: usize| self.slopes[j].value_at(&at).max(0.0);
        onset_hermite(&self.log_ratios, &value, x).max(0.0)
    }
}

impl AmplificationModel for OrrSommerfeldEnvelope {
    /// The envelope rate, raised in separated flow to the separated-shear-layer rate of
    /// [`separated_layer_growth`] (Mayle's short-bubble transition length).
    fn growth_rate(&self, h: f64, re_theta: f64, theta: f64) -> f64 {
        if theta.is_nan() || theta <= 0.0 {
            return 0.0;
        }
        let envelope = self.envelope_slope(h, re_theta) * self.closure.re_theta_growth(h) / theta;
        combined_growth(envelope, separated_layer_growth(h, re_theta, theta))
    }
}

/// Cubic Hermite interpolation of (x, v) with zero slope at the first node (a smooth onset from
/// the zero growth below the critical point), three-point slopes inside (linear in the data, so
/// the result is as smooth in H as the data) and a bounded tanh extension beyond the last node.
fn onset_hermite(x: &[f64], value: &dyn Fn(usize) -> f64, t: f64) -> f64 {
    let n = x.len();
    // The interval (or the last node), then only the values it needs: nodes i − 1 .. i + 2.
    let beyond = t >= x[n - 1];
    let i = if beyond {
        n - 1
    } else {
        x.partition_point(|&xi| xi <= t)
            .saturating_sub(1)
            .min(n - 2)
    };
    let first = i.saturating_sub(1);
    let last = (i + 2).min(n - 1);
    let mut local = [0.0; 4];
    for j in first..=last {
        local[j - first] = value(j);
    }
    let v = |j: usize| local[j - first];
    let slope = |k: usize| -> f64 {
        if k == 0 {
            0.0
        } else if k == n - 1 {
            (v(n - 1) - v(n - 2)) / (x[n - 1] - x[n - 2])
        } else {
            let (h0, h1) = (x[k] - x[k - 1], x[k + 1] - x[k]);
            let (d0, d1) = ((v(k) - v(k - 1)) / h0, (v(k + 1) - v(k)) / h1);
            (h1 * d0 + h0 * d1) / (h0 + h1)
        }
    };
    if beyond {
        let d = slope(n - 1);
        let end = v(n - 1);
        let w = if d < 0.0 && end > 0.0 {
            RATIO_EXTENSION.min(0.5 * end / -d)
        } else {
            RATIO_EXTENSION
        };
        return end + d * w * ((t - x[n - 1]) / w).tanh();
    }
    let h = x[i + 1] - x[i];
    let s = (t - x[i]) / h;
    let (s2, s3) = (s * s, s * s * s);
    (2.0 * s3 - 3.0 * s2 + 1.0) * v(i)
        + (s3 - 2.0 * s2 + s) * h * slope(i)
        + (-2.0 * s3 + 3.0 * s2) * v(i + 1)
        + (s3 - s2) * h * slope(i + 1)
}

#[cfg(test)]
mod tests {
    use super::*;

    const BLASIUS_H: f64 = 2.5911;

    #[test]
    fn mack_relation() {
        // Mack, AGARD CP-224 (1977): Tu = 0.07 % gives N = 9.0 (reference data notes, from memory).
        assert!((critical_n_from_turbulence_intensity(0.0007) - 9.0).abs() < 0.02);
    }

    #[test]
    fn blasius_critical_reynolds_number() {
        // Parallel-flow Orr–Sommerfeld critical point of the Blasius layer, Reδ* = 519.4
        // (Jordinson 1970; Schlichting & Gersten), i.e. Reθ = 519.4/2.591 = 200.5 (from memory).
        let r0 = OrrSommerfeldEnvelope::shipped().critical_re_theta(BLASIUS_H);
        assert!(
            (r0 * BLASIUS_H - 519.4).abs() < 0.02 * 519.4,
            "Reδ*,crit = {}",
            r0 * BLASIUS_H
        );
    }

    #[test]
    fn flat_plate_reaches_n9_near_three_million() {
        // Blasius plate, ue = 1, ν = 1e-6: θ = 0.664 √(νx/ue) (Schlichting & Gersten). Integrating
        // dN/dx, N = 9 is commonly quoted near Re_x ≈ 3e6 (common practice, from memory).
        let env = OrrSommerfeldEnvelope::shipped();
        let nu = 1e-6;
        let (mut x, mut n) = (1e-3, 0.0);
        let rate = |x: f64| {
            let theta = 0.664 * (nu * x).sqrt();
            env.growth_rate(BLASIUS_H, theta / nu, theta)
        };
        while n < 9.0 && x < 100.0 {
            let x_next = x * 1.001;
            n += 0.5 * (rate(x) + rate(x_next)) * (x_next - x);
            x = x_next;
        }
        let re_x = x / nu;
        assert!((2.5e6..4.0e6).contains(&re_x), "N = 9 at Re_x = {re_x:.3e}");
    }

    #[test]
    fn growth_is_smooth_and_bounded() {
        // A slope jump Δ shows as a second difference Δ·d; a C¹ function gives O(d²).
        let env = OrrSommerfeldEnvelope::shipped();
        let d = 1e-6;
        for &h in &[1.8, 2.2, 2.4, 2.6, 3.0, 4.0, 5.0, 7.0, 12.0, 30.0] {
            let mut re = 1.0;
            while re < 1e6 {
                let g = |h: f64, re: f64| env.growth_rate(h, re, 1e-3);
                let v = g(h, re);
                assert!((0.0..1e3).contains(&v), "dN/ds = {v} at H {h}, Reθ {re}");
                let scale_h = (g(h + 0.01, re) - g(h - 0.01, re)).abs() / 0.02 + v + 1e-9;
                let second_h = g(h + d, re) - 2.0 * v + g(h - d, re);
                assert!(
                    second_h.abs() < 1e-2 * scale_h * d,
                    "kink in H at H {h}, Reθ {re}"
                );
                let dr = d * re;
                let scale_r =
                    (g(h, re * 1.01) - g(h, re / 1.01)).abs() / (0.02 * re) + v / re + 1e-12;
                let second_r = g(h, re + dr) - 2.0 * v + g(h, re - dr);
                assert!(
                    second_r.abs() < 1e-2 * scale_r * dr,
                    "kink in Reθ at H {h}, Reθ {re}"
                );
                re *= 1.07;
            }
        }
    }

    #[test]
    fn adverse_pressure_gradient_destabilises() {
        // Schlichting & Gersten, ch. 15 (from memory): the critical Reynolds number falls
        // steeply as the shape factor rises; inflectional (separating) profiles are far less stable.
        let env = OrrSommerfeldEnvelope::shipped();
        assert!(env.critical_re_theta(2.3) > 3.0 * env.critical_re_theta(BLASIUS_H));
        assert!(env.critical_re_theta(4.03) < 0.25 * env.critical_re_theta(BLASIUS_H));
        assert!(env.envelope_slope(4.03, 3.0 * env.critical_re_theta(4.03)) > 0.05);
    }
}
