//! Kármán–Trefftz sections: the conformal image of a circle, with an exact inviscid solution.
//!
//! The map z = n·a·[(ζ+a)ⁿ + (ζ−a)ⁿ] / [(ζ+a)ⁿ − (ζ−a)ⁿ] takes a circle through ζ = a (centre μ,
//! radius R = |a − μ|) to a section whose trailing-edge included angle is τ = (2 − n)·π; n = 2
//! is the Joukowski map z = ζ + a²/ζ (Milne-Thomson, *Theoretical Aerodynamics*, §5; Katz &
//! Plotkin, *Low-Speed Aerodynamics*, 2nd ed., §6.6–6.7). The flow about the circle with the
//! Kutta condition at ζ = a has circulation Γ = 4πU∞R·sin(α + β), β = −arg(a − μ), so the exact
//! lift is known in closed form and the exact surface speed is |dw/dζ| / |dz/dζ|. The core uses
//! these sections to verify the panel method.

use super::Section;
use crate::error::{Result, SolverError};
use std::f64::consts::PI;

/// Minimal complex arithmetic for the map (no external crate needed).
#[derive(Debug, Clone, Copy, PartialEq)]
struct Complex {
    re: f64,
    im: f64,
}

impl Complex {
    const fn new(re: f64, im: f64) -> Self {
        Complex { re, im }
    }
    fn polar(r: f64, theta: f64) -> Self {
        Complex::new(r * theta.cos(), r * theta.sin())
    }
    fn abs(self) -> f64 {
        self.re.hypot(self.im)
    }
    fn arg(self) -> f64 {
        self.im.atan2(self.re)
    }
    fn add(self, o: Self) -> Self {
        Complex::new(self.re + o.re, self.im + o.im)
    }
    fn sub(self, o: Self) -> Self {
        Complex::new(self.re - o.re, self.im - o.im)
    }
    fn mul(self, o: Self) -> Self {
        Complex::new(
            self.re * o.re - self.im * o.im,
            self.re * o.im + self.im * o.re,
        )
    }
    fn scale(self, k: f64) -> Self {
        Complex::new(self.re * k, self.im * k)
    }
    fn div(self, o: Self) -> Self {
        let d = o.re * o.re + o.im * o.im;
        Complex::new(
            (self.re * o.re + self.im * o.im) / d,
            (self.im * o.re - self.re * o.im) / d,
        )
    }
    /// Principal power exp(p·ln z).
    fn powf(self, p: f64) -> Self {
        Complex::polar(self.abs().powf(p), self.arg() * p)
    }
}

/// A Kármán–Trefftz section: circle centre (in units of a = 1) and trailing-edge angle.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct KarmanTrefftz {
    /// Real part of the circle centre μ (negative: thickness).
    pub center_x: f64,
    /// Imaginary part of the circle centre μ (positive: camber).
    pub center_y: f64,
    /// Trailing-edge included angle τ in degrees (0 gives the cusped Joukowski section).
    pub trailing_edge_angle_deg: f64,
}

/// The normalising transform from the mapped plane to unit chord, LE at the origin.
#[derive(Debug, Clone, Copy)]
struct Frame {
    leading_edge: Complex,
    chord: f64,
    /// Angle of the chord line (LE → TE) in the mapped plane.
    chord_angle: f64,
}

const A: f64 = 1.0;

impl KarmanTrefftz {
    /// A Joukowski section (cusped trailing edge) with circle centre μ = center_x + i·center_y.
    pub fn joukowski(center_x: f64, center_y: f64) -> Self {
        KarmanTrefftz {
            center_x,
            center_y,
            trailing_edge_angle_deg: 0.0,
        }
    }

    fn mu(&self) -> Complex {
        Complex::new(self.center_x, self.center_y)
    }

    /// Circle radius R = |a − μ| (the circle passes through ζ = a).
    pub fn radius(&self) -> f64 {
        Complex::new(A, 0.0).sub(self.mu()).abs()
    }

    /// Angle β = −arg(a − μ) of the trailing-edge point seen from the circle centre.
    pub fn beta(&self) -> f64 {
        -Complex::new(A, 0.0).sub(self.mu()).arg()
    }

    /// Kármán–Trefftz exponent n = 2 − τ/π.
    pub fn exponent(&self) -> f64 {
        2.0 - self.trailing_edge_angle_deg.to_radians() / PI
    }

    fn validate(&self) -> Result<()> {
        let ok = self.center_x.is_finite()
            && self.center_y.is_finite()
            && self.trailing_edge_angle_deg.is_finite()
            && (0.0..90.0).contains(&self.trailing_edge_angle_deg)
            && self.center_x < 0.0
            && self.center_x > -0.5
            && self.center_y.abs() < 0.5;
        if ok {
            Ok(())
        } else {
            Err(SolverError::geometry(format!(
                "Karman-Trefftz section needs -0.5 < center_x < 0, |center_y| < 0.5 and 0 <= \
                 trailing_edge_angle_deg < 90; got center ({}, {}), angle {}",
                self.center_x, self.center_y, self.trailing_edge_angle_deg
            )))
        }
    }

    /// The map z(ζ).
    fn map(&self, zeta: Complex) -> Complex {
        let n = self.exponent();
        let a = Complex::new(A, 0.0);
        let r = zeta.sub(a).div(zeta.add(a)).powf(n);
        let one = Complex::new(1.0, 0.0);
        one.add(r).div(one.sub(r)).scale(n * A)
    }

    /// The derivative dz/dζ = 4n²a²·r / [(1 − r)²(ζ − a)(ζ + a)], r = ((ζ−a)/(ζ+a))ⁿ.
    fn map_derivative(&self, zeta: Complex) -> Complex {
        let n = self.exponent();
        let a = Complex::new(A, 0.0);
        let r = zeta.sub(a).div(zeta.add(a)).powf(n);
        let one_minus_r = Complex::new(1.0, 0.0).sub(r);
        r.scale(4.0 * n * n * A * A).div(
            one_minus_r
                .mul(one_minus_r)
                .mul(zeta.sub(a))
                .mul(zeta.add(a)),
        )
    }

    /// Circle-plane point at polar angle θ about the centre.
    fn circle_point(&self, theta: f64) -> Complex {
        self.mu().add(Complex::polar(self.radius(), theta))
    }

    /// Circle angles of the section's points: uniform from the trailing edge round (CCW).
    fn circle_angles(&self, n_points: usize) -> Vec<f64> {
        let start = -self.beta();
        (0..n_points)
            .map(|k| start + 2.0 * PI * k as f64 / (n_points - 1) as f64)
            .collect()
    }

    fn frame(&self) -> Frame {
        let te = self.map(Complex::new(A, 0.0));
        // The leading edge is the point farthest from the trailing edge (dense search, then refine).
        let dist = |theta: f64| self.map(self.circle_point(theta)).sub(te).abs();
        let samples = 2000;
        let start = -self.beta();
        let (mut best_t, mut best_d) = (start + PI, 0.0);
        for k in 1..samples {
            let t = start + 2.0 * PI * k as f64 / samples as f64;
            let d = dist(t);
            if d > best_d {
                best_d = d;
                best_t = t;
            }
        }
        // Golden-section refinement around the best sample.
        let h = 2.0 * PI / samples as f64;
        let (mut lo, mut hi) = (best_t - h, best_t + h);
        let g = 0.5 * (5f64.sqrt() - 1.0);
        for _ in 0..80 {
            let m1 = hi - g * (hi - lo);
            let m2 = lo + g * (hi - lo);
            if dist(m1) > dist(m2) {
                hi = m2;
            } else {
                lo = m1;
            }
        }
        let le = self.map(self.circle_point(0.5 * (lo + hi)));
        let chord_vec = te.sub(le);
        Frame {
            leading_edge: le,
            chord: chord_vec.abs(),
            chord_angle: chord_vec.arg(),
        }
    }

    fn normalise(&self, frame: &Frame, z: Complex) -> (f64, f64) {
        let w = z
            .sub(frame.leading_edge)
            .mul(Complex::polar(1.0 / frame.chord, -frame.chord_angle));
        (w.re, w.im)
    }

    /// Chord of the mapped section before normalisation (in units of a = 1).
    pub fn chord(&self) -> f64 {
        self.frame().chord
    }

    /// The section as `n_points` points (so `n_points − 1` panels), normalised to unit chord
    /// with the leading edge at the origin and the chord along x. Points are uniform in the
    /// circle angle from the trailing edge round counter-clockwise; the first and last points
    /// are the trailing edge (a closed, sharp trailing edge).
    pub fn section(&self, n_points: usize) -> Result<Section> {
        self.validate()?;
        if n_points < 11 {
            return Err(SolverError::geometry(format!(
                "Karman-Trefftz section needs at least 11 points, got {n_points}"
            )));
        }
        let frame = self.frame();
        let angles = self.circle_angles(n_points);
        let (mut x, mut y) = (Vec::with_capacity(n_points), Vec::with_capacity(n_points));
        for (k, &t) in angles.iter().enumerate() {
            let z = if k == 0 || k + 1 == n_points {
                self.map(Complex::new(A, 0.0))
            } else {
                self.map(self.circle_point(t))
            };
            let (px, py) = self.normalise(&frame, z);
            x.push(px);
            y.push(py);
        }
        Ok(Section {
            name: format!(
                "Karman-Trefftz ({:+.4}{:+.4}i, {:.1} deg)",
                self.center_x, self.center_y, self.trailing_edge_angle_deg
            ),
            x,
            y,
        })
    }

    /// Exact lift coefficient at angle of attack `alpha_deg` (measured from the chord line):
    /// cl = 8πR·sin(α_ζ + β)/c, where α_ζ = α + (chord-line angle) is the free-stream angle in the
    /// mapped plane (Katz & Plotkin §6.6, Γ = 4πU∞R sin(α + β), L' = ρU∞Γ).
    pub fn exact_cl(&self, alpha_deg: f64) -> f64 {
        let frame = self.frame();
        let alpha = alpha_deg.to_radians() + frame.chord_angle;
        8.0 * PI * self.radius() * (alpha + self.beta()).sin() / frame.chord
    }

    /// Exact lift coefficient with α measured from the real axis of the circle plane (the
    /// convention of the textbook worked examples; differs from [`Self::exact_cl`] by the
    /// small inclination of the chord line of a cambered section).
    pub fn exact_cl_circle_axis(&self, alpha_deg: f64) -> f64 {
        8.0 * PI * self.radius() * (alpha_deg.to_radians() + self.beta()).sin() / self.chord()
    }

    /// Exact surface pressure coefficient Cp = 1 − |dw/dz|²/U∞² at the points of
    /// `section(n_points)`, returned with their normalised coordinates. At the trailing-edge
    /// points, where dz/dζ vanishes, the speed is the limit taken just beside the edge.
    pub fn exact_surface_cp(
        &self,
        alpha_deg: f64,
        n_points: usize,
    ) -> Result<(Vec<f64>, Vec<f64>, Vec<f64>)> {
        let section = self.section(n_points)?;
        let frame = self.frame();
        let alpha = alpha_deg.to_radians() + frame.chord_angle;
        let r = self.radius();
        let gamma = 4.0 * PI * r * (alpha + self.beta()).sin();
        let mu = self.mu();
        let speed = |theta: f64| {
            let zeta = self.circle_point(theta);
            let d = zeta.sub(mu);
            // dw/dζ = U[e^{-iα} − R² e^{iα}/(ζ−μ)²] + iΓ/(2π(ζ−μ)), Γ clockwise-positive.
            let e_m = Complex::polar(1.0, -alpha);
            let e_p = Complex::polar(1.0, alpha);
            let dw = e_m
                .sub(e_p.scale(r * r).div(d.mul(d)))
                .add(Complex::new(0.0, gamma / (2.0 * PI)).div(d));
            dw.abs() / self.map_derivative(zeta).abs()
        };
        let angles = self.circle_angles(n_points);
        let eps = 1e-5;
        let cp = angles
            .iter()
            .enumerate()
            .map(|(k, &t)| {
                let q = if k == 0 {
                    speed(t + eps)
                } else if k + 1 == n_points {
                    speed(t - eps)
                } else {
                    speed(t)
                };
                1.0 - q * q
            })
            .collect();
        Ok((section.x, section.y, cp))
    }

    /// Exact speed (in units of U∞) on the chord line's extension behind the trailing edge of a
    /// symmetric section at zero incidence, `distances` chords behind the edge. The real axis
    /// ζ > a of the circle plane maps onto that line, which is then the dividing streamline, so
    /// the speed is (dw/dζ)/(dz/dζ) with dw/dζ = 1 − R²/(ζ − μ)² (Milne-Thomson §5). It checks the
    /// panel method's speeds along the wake, which set how far θ still changes there.
    pub fn exact_speed_behind_trailing_edge(&self, distances: &[f64]) -> Result<Vec<f64>> {
        self.validate()?;
        if self.center_y != 0.0 {
            return Err(SolverError::geometry(format!(
                "the speed behind the trailing edge is exact only for a symmetric section \
                 (center_y = 0); got center_y {}",
                self.center_y
            )));
        }
        let frame = self.frame();
        let x_of = |xi: f64| self.normalise(&frame, self.map(Complex::new(xi, 0.0))).0;
        let r2 = self.radius().powi(2);
        distances
            .iter()
            .map(|&d| {
                if !(d.is_finite() && d > 0.0) {
                    return Err(SolverError::geometry(format!(
                        "distance behind the trailing edge must be positive, got {d}"
                    )));
                }
                // x(ξ) rises monotonically from 1 at ξ = a: bisect for x = 1 + d.
                let (mut lo, mut hi) = (A, 2.0 * A);
                while x_of(hi) < 1.0 + d {
                    hi *= 2.0;
                }
                for _ in 0..200 {
                    let mid = 0.5 * (lo + hi);
                    if x_of(mid) < 1.0 + d {
                        lo = mid;
                    } else {
                        hi = mid;
                    }
                }
                let xi = 0.5 * (lo + hi);
                let dw = 1.0 - r2 / (xi - self.center_x).powi(2);
                Ok(dw / self.map_derivative(Complex::new(xi, 0.0)).re)
            })
            .collect()
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    /// Worked check from the project's reference data ([C], Katz & Plotkin §6.6 formula).
    #[test]
    fn joukowski_worked_example() {
        let kt = KarmanTrefftz::joukowski(-0.08, 0.08);
        assert!((kt.radius() - 1.082959).abs() < 1e-6);
        assert!((kt.beta().to_degrees() - 4.2364).abs() < 1e-4);
        assert!((kt.chord() - 4.02219).abs() < 2e-5, "chord {}", kt.chord());
    }

    #[test]
    fn joukowski_map_is_zeta_plus_inverse() {
        let kt = KarmanTrefftz::joukowski(-0.1, 0.05);
        let z = Complex::new(0.3, 1.2);
        let expect = z.add(Complex::new(1.0, 0.0).div(z));
        assert!(kt.map(z).sub(expect).abs() < 1e-12);
        let d = kt.map_derivative(z);
        let expect_d = Complex::new(1.0, 0.0).sub(Complex::new(1.0, 0.0).div(z.mul(z)));
        assert!(d.sub(expect_d).abs() < 1e-12);
    }

    #[test]
    fn speed_behind_a_joukowski_edge_matches_the_inverted_map() {
        // Joukowski z = ζ + 1/ζ inverted in closed form, ζ = (z + √(z² − 4))/2 (Milne-Thomson
        // §5), against the bisection of the general map; far behind, the speed tends to U∞
        // like a doublet, 1 − O(1/d²) (common practice).
        let kt = KarmanTrefftz::joukowski(-0.115, 0.0);
        let frame = kt.frame();
        let d = [0.25, 1.0, 2.0, 8.0];
        let speeds = kt.exact_speed_behind_trailing_edge(&d).unwrap();
        for (&dk, &q) in d.iter().zip(&speeds) {
            let z = frame.leading_edge.re + (1.0 + dk) * frame.chord;
            let zeta = 0.5 * (z + (z * z - 4.0).sqrt());
            let dw = 1.0 - kt.radius().powi(2) / (zeta - kt.center_x).powi(2);
            let expect = dw / (1.0 - 1.0 / (zeta * zeta));
            assert!((q - expect).abs() < 1e-12, "{dk}: {q} vs {expect}");
            assert!(q < 1.0, "{dk}: {q}");
        }
        let deficit_ratio = (1.0 - speeds[3]) / (1.0 - speeds[2]);
        assert!(deficit_ratio < 0.15, "deficit 8c / 2c = {deficit_ratio}");
        assert!(KarmanTrefftz::joukowski(-0.1, 0.05)
            .exact_speed_behind_trailing_edge(&[1.0])
            .is_err());
    }

    #[test]
    fn section_runs_from_upper_te_counter_clockwise() {
        let s = KarmanTrefftz {
            center_x: -0.1,
            center_y: 0.05,
            trailing_edge_angle_deg: 10.0,
        }
        .section(101)
        .unwrap();
        assert_eq!(s.len(), 101);
        assert!((s.x[0] - 1.0).abs() < 1e-9 && s.y[0].abs() < 1e-9);
        assert!(s.y[25] > 0.0 && s.y[75] < 0.0);
        let xmin = s.x.iter().cloned().fold(f64::INFINITY, f64::min);
        // The exact leading edge lies between two sample points: x_min is tiny and not negative.
        assert!(xmin > -1e-9 && xmin < 2e-3, "x_min {xmin}");
    }
}
