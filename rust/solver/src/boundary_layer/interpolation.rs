//! Smooth one-dimensional interpolation of tabulated closure data.
//!
//! Piecewise cubic Hermite interpolation with Fritsch–Carlson slopes (Fritsch & Carlson,
//! "Monotone piecewise cubic interpolation", SIAM J. Numer. Anal. 17, 1980): the interpolant is
//! C¹, reproduces the table exactly, and never overshoots between the nodes (local extrema of the
//! data get zero slope). Beyond the table it continues with a bounded, C¹ (in fact C²) extension
//! `v_end + d_end · w · tanh((x − x_end)/w)`, which leaves the end with the end slope and
//! saturates at `v_end ± |d_end| w`; the width `w` is shrunk where needed so that the extension
//! never changes the sign of the quantity (a positive dissipation stays positive, a small negative
//! skin friction stays negative and bounded).

/// A C¹ monotone cubic interpolant with bounded extension beyond both ends.
#[derive(Debug, Clone)]
pub struct MonotoneCubic {
    x: Vec<f64>,
    y: Vec<f64>,
    slope: Vec<f64>,
    low_width: f64,
    high_width: f64,
    /// Index of the interval holding the lower edge of each of `BUCKETS_PER_NODE`·n equal
    /// buckets over the table: a lookup starts there instead of bisecting.
    bucket_start: Vec<usize>,
    /// Buckets per unit of x.
    bucket_scale: f64,
}

/// Equal-width buckets per table node for the interval lookup (our choice: about one node per
/// bucket for the closure tables' moderately graded abscissae).
const BUCKETS_PER_NODE: usize = 2;

impl MonotoneCubic {
    /// Builds the interpolant through (x, y); x strictly increasing, at least two points.
    /// `extension_width` is the largest saturation width (in units of x) of the end extensions.
    pub fn new(x: Vec<f64>, y: Vec<f64>, extension_width: f64) -> Result<Self, String> {
        let n = x.len();
        if n < 2 || y.len() != n {
            return Err(format!(
                "need at least two (x, y) pairs of equal length, got {} and {}",
                n,
                y.len()
            ));
        }
        if let Some(i) = (1..n).find(|&i| x[i] <= x[i - 1] || !x[i].is_finite()) {
            return Err(format!(
                "abscissae must increase strictly: x[{}] = {} after {}",
                i,
                x[i],
                x[i - 1]
            ));
        }
        if let Some(i) = (0..n).find(|&i| !y[i].is_finite()) {
            return Err(format!("ordinate {} is not finite", i));
        }
        let slope = fritsch_carlson_slopes(&x, &y);
        let width = |v: f64, d: f64, direction: f64| -> f64 {
            // Heading towards zero: keep at least half of the end value's magnitude.
            if v != 0.0 && v * d * direction < 0.0 {
                extension_width.min(0.5 * (v / d).abs())
            } else {
                extension_width
            }
        };
        let low_width = width(y[0], slope[0], -1.0);
        let high_width = width(y[n - 1], slope[n - 1], 1.0);
        let buckets = BUCKETS_PER_NODE * n;
        let bucket_scale = buckets as f64 / (x[n - 1] - x[0]);
        let bucket_start = (0..buckets)
            .map(|b| {
                let edge = x[0] + b as f64 / bucket_scale;
                x.partition_point(|&xi| xi <= edge).clamp(1, n - 1) - 1
            })
            .collect();
        Ok(Self {
            x,
            y,
            slope,
            low_width,
            high_width,
            bucket_start,
            bucket_scale,
        })
    }

    /// Value at `t` (the same value as [`Self::value_and_derivative`], without the derivative).
    pub fn value(&self, t: f64) -> f64 {
        self.value_at(&self.position(t))
    }

    /// Where `t` falls in the abscissae: beyond an end, or in interval `i` of length `h` at
    /// fraction `s`. Found once, it serves every table on the same abscissae
    /// ([`Self::value_at`], [`Self::shares_abscissae`]).
    #[inline]
    pub fn position(&self, t: f64) -> TablePosition {
        let n = self.x.len();
        if t.is_nan() {
            // Never index with NaN: the caller sees NaN and flags its result.
            return TablePosition::NotANumber;
        }
        if t <= self.x[0] {
            return TablePosition::Below(t - self.x[0]);
        }
        if t >= self.x[n - 1] {
            return TablePosition::Above(t - self.x[n - 1]);
        }
        // The largest i with x[i] ≤ t (x[0] < t < x[n − 1] here): from the bucket's start, then
        // a step or two either way (the steps back guard against rounding of the bucket index).
        let bucket =
            (((t - self.x[0]) * self.bucket_scale) as usize).min(self.bucket_start.len() - 1);
        let mut i = self.bucket_start[bucket];
        while i > 0 && self.x[i] > t {
            i -= 1;
        }
        while self.x[i + 1] <= t {
            i += 1;
        }
        let h = self.x[i + 1] - self.x[i];
        TablePosition::Inside {
            i,
            h,
            s: (t - self.x[i]) / h,
        }
    }

    /// Value at a `position` found by a table with the same abscissae: exactly
    /// [`Self::value`] at its abscissa.
    #[inline]
    pub fn value_at(&self, position: &TablePosition) -> f64 {
        match *position {
            TablePosition::Inside { i, h, s } => self.cubic_value(i, h, s),
            _ => self.extension(position).0,
        }
    }

    /// Whether `other` has exactly the same abscissae (so that a [`TablePosition`] of one
    /// serves the other).
    pub fn shares_abscissae(&self, other: &MonotoneCubic) -> bool {
        self.x == other.x
    }

    /// Value and slope of the bounded extension at a position beyond an end (NaN for NaN).
    fn extension(&self, position: &TablePosition) -> (f64, f64) {
        let n = self.y.len();
        match *position {
            TablePosition::Below(dx) => saturating(self.y[0], self.slope[0], self.low_width, dx),
            TablePosition::Above(dx) => {
                saturating(self.y[n - 1], self.slope[n - 1], self.high_width, dx)
            }
            _ => (f64::NAN, f64::NAN),
        }
    }

    /// The Hermite cubic of interval `i` (length `h`) at fraction `s`.
    #[inline]
    fn cubic_value(&self, i: usize, h: f64, s: f64) -> f64 {
        let (y0, y1) = (self.y[i], self.y[i + 1]);
        let (m0, m1) = (self.slope[i] * h, self.slope[i + 1] * h);
        let s2 = s * s;
        let s3 = s2 * s;
        (2.0 * s3 - 3.0 * s2 + 1.0) * y0
            + (s3 - 2.0 * s2 + s) * m0
            + (-2.0 * s3 + 3.0 * s2) * y1
            + (s3 - s2) * m1
    }

    /// Value and first derivative at `t` (the derivative is continuous everywhere).
    pub fn value_and_derivative(&self, t: f64) -> (f64, f64) {
        let position = self.position(t);
        let TablePosition::Inside { i, h, s } = position else {
            return self.extension(&position);
        };
        let value = self.cubic_value(i, h, s);
        let (y0, y1) = (self.y[i], self.y[i + 1]);
        let (m0, m1) = (self.slope[i] * h, self.slope[i + 1] * h);
        let s2 = s * s;
        let derivative = ((6.0 * s2 - 6.0 * s) * y0
            + (3.0 * s2 - 4.0 * s + 1.0) * m0
            + (-6.0 * s2 + 6.0 * s) * y1
            + (3.0 * s2 - 2.0 * s) * m1)
            / h;
        (value, derivative)
    }

    /// Smallest and largest tabulated abscissa.
    pub fn range(&self) -> (f64, f64) {
        (self.x[0], self.x[self.x.len() - 1])
    }
}

/// Where an abscissa falls in a table's abscissae, independent of its ordinates
/// ([`MonotoneCubic::position`]).
#[derive(Debug, Clone, Copy, PartialEq)]
pub enum TablePosition {
    /// The abscissa is NaN (every value is NaN).
    NotANumber,
    /// Below the first abscissa, by this (negative or zero) distance.
    Below(f64),
    /// Above the last abscissa, by this distance.
    Above(f64),
    /// In interval `i` of length `h`, at fraction `s` of it.
    Inside { i: usize, h: f64, s: f64 },
}

fn saturating(v: f64, d: f64, w: f64, dx: f64) -> (f64, f64) {
    let t = (dx / w).tanh();
    (v + d * w * t, d * (1.0 - t * t))
}

/// Node slopes by Fritsch & Carlson (1980): three-point estimates, zero at local extrema,
/// limited so that α² + β² ≤ 9 on every interval.
fn fritsch_carlson_slopes(x: &[f64], y: &[f64]) -> Vec<f64> {
    let n = x.len();
    let secant: Vec<f64> = (0..n - 1)
        .map(|i| (y[i + 1] - y[i]) / (x[i + 1] - x[i]))
        .collect();
    let mut slope = vec![0.0; n];
    slope[0] = secant[0];
    slope[n - 1] = secant[n - 2];
    for i in 1..n - 1 {
        slope[i] = if secant[i - 1] * secant[i] <= 0.0 {
            0.0
        } else {
            // Weighted harmonic mean (Fritsch & Butland form of the three-point estimate).
            let h0 = x[i] - x[i - 1];
            let h1 = x[i + 1] - x[i];
            let w0 = 2.0 * h1 + h0;
            let w1 = h1 + 2.0 * h0;
            (w0 + w1) / (w0 / secant[i - 1] + w1 / secant[i])
        };
    }
    for i in 0..n - 1 {
        if secant[i] == 0.0 {
            slope[i] = 0.0;
            slope[i + 1] = 0.0;
            continue;
        }
        let a = slope[i] / secant[i];
        let b = slope[i + 1] / secant[i];
        let r = a * a + b * b;
        if r > 9.0 {
            let tau = 3.0 / r.sqrt();
            slope[i] = tau * a * secant[i];
            slope[i + 1] = tau * b * secant[i];
        }
    }
    slope
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn reproduces_nodes_and_a_straight_line() {
        let x = vec![0.0, 1.0, 2.5, 4.0];
        let y: Vec<f64> = x.iter().map(|v| 2.0 * v + 1.0).collect();
        let f = MonotoneCubic::new(x.clone(), y.clone(), 1.0).unwrap();
        for (xi, yi) in x.iter().zip(&y) {
            assert!((f.value(*xi) - yi).abs() < 1e-14);
        }
        let (v, d) = f.value_and_derivative(1.7);
        assert!((v - 4.4).abs() < 1e-12 && (d - 2.0).abs() < 1e-12);
    }

    #[test]
    fn a_shared_position_gives_exactly_the_value() {
        // Our design: a position found once serves every table on the same abscissae, with
        // the same value as a lookup of its own, inside, on the nodes, beyond both ends, NaN.
        let x = vec![0.0, 0.5, 1.5, 2.0, 3.5];
        let f = MonotoneCubic::new(x.clone(), vec![1.0, 2.0, 2.5, 2.4, 4.0], 0.7).unwrap();
        let g = MonotoneCubic::new(x, vec![-1.0, 0.3, 0.2, 0.9, 1.0], 0.7).unwrap();
        assert!(f.shares_abscissae(&g));
        for t in [-2.0, -0.1, 0.0, 0.2, 0.5, 1.49, 2.0, 3.0, 3.5, 5.0] {
            let at = f.position(t);
            assert_eq!(f.value_at(&at).to_bits(), f.value(t).to_bits(), "t = {t}");
            assert_eq!(g.value_at(&at).to_bits(), g.value(t).to_bits(), "t = {t}");
        }
        assert!(g.value_at(&f.position(f64::NAN)).is_nan());
        let other = MonotoneCubic::new(vec![0.0, 1.0], vec![0.0, 1.0], 1.0).unwrap();
        assert!(!f.shares_abscissae(&other));
    }

    #[test]
    fn no_overshoot_and_continuous_slope() {
        let x = vec![0.0, 1.0, 2.0, 3.0, 4.0];
        let y = vec![0.0, 0.0, 1.0, 1.0, 1.0];
        let f = MonotoneCubic::new(x, y, 1.0).unwrap();
        let mut t = -0.5;
        while t < 4.5 {
            let v = f.value(t);
            assert!((-1e-12..=1.0 + 1e-12).contains(&v), "overshoot {v} at {t}");
            let (_, dl) = f.value_and_derivative(t - 1e-9);
            let (_, dr) = f.value_and_derivative(t + 1e-9);
            assert!((dl - dr).abs() < 1e-6, "slope jump at {t}");
            t += 0.01;
        }
    }

    #[test]
    fn extension_is_bounded_and_keeps_sign() {
        let f = MonotoneCubic::new(vec![0.0, 1.0], vec![-1.0, -0.5], 10.0).unwrap();
        let far = f.value(1e6);
        assert!(far < 0.0 && far > -0.5, "{far}");
        let low = f.value(-1e6);
        assert!(low.is_finite() && low > -1.0 - 10.0 * 0.5 - 1e-12);
    }

    #[test]
    fn bucket_lookup_finds_the_bisection_interval() {
        // Strongly graded abscissae; values and slopes at many points equal those of the
        // interval found by bisection (the cubic is evaluated on the same interval).
        let x: Vec<f64> = (0..40)
            .map(|k| (k as f64 / 39.0).powi(3) * 10.0 - 1.0)
            .collect();
        let y: Vec<f64> = x.iter().map(|v| v.sin()).collect();
        let f = MonotoneCubic::new(x.clone(), y, 1.0).unwrap();
        for k in 0..5000 {
            let t = -1.0 + 10.0 * k as f64 / 4999.0;
            let expected = if t > x[0] && t < x[39] {
                Some(x.partition_point(|&xi| xi <= t) - 1)
            } else {
                None
            };
            match (f.position(t), expected) {
                (TablePosition::Inside { i, .. }, Some(j)) => assert_eq!(i, j, "at {t}"),
                (TablePosition::Below(_) | TablePosition::Above(_), None) => {}
                _ => panic!("inside/outside mismatch at {t}"),
            }
        }
        for &t in &x[1..39] {
            match f.position(t) {
                TablePosition::Inside { i, s, .. } => assert!(x[i] == t && s == 0.0),
                _ => panic!("node {t} outside"),
            }
        }
    }

    #[test]
    fn rejects_unsorted_abscissae() {
        assert!(MonotoneCubic::new(vec![0.0, 0.0], vec![1.0, 2.0], 1.0).is_err());
    }
}
