//! Natural cubic splines, and the arc-length spline of a section outline built from them.

/// A natural cubic spline y(t) through strictly increasing knots (zero second derivative at
/// both ends; standard tridiagonal construction, e.g. de Boor, *A Practical Guide to Splines*).
#[derive(Debug, Clone)]
pub(crate) struct CubicSpline {
    t: Vec<f64>,
    y: Vec<f64>,
    /// Second derivatives at the knots.
    m: Vec<f64>,
}

impl CubicSpline {
    /// Fit through (t_i, y_i); `t` strictly increasing with at least two knots.
    pub fn natural(t: &[f64], y: &[f64]) -> Self {
        let n = t.len();
        let mut m = vec![0.0; n];
        if n > 2 {
            // Thomas algorithm on the interior equations.
            let k = n - 2;
            let mut diag = vec![0.0; k];
            let mut rhs = vec![0.0; k];
            let mut upper = vec![0.0; k];
            for j in 0..k {
                let i = j + 1;
                let h0 = t[i] - t[i - 1];
                let h1 = t[i + 1] - t[i];
                diag[j] = 2.0 * (h0 + h1);
                upper[j] = h1;
                rhs[j] = 6.0 * ((y[i + 1] - y[i]) / h1 - (y[i] - y[i - 1]) / h0);
                if j > 0 {
                    let w = h0 / diag[j - 1];
                    diag[j] -= w * upper[j - 1];
                    rhs[j] -= w * rhs[j - 1];
                }
            }
            for j in (0..k).rev() {
                let next = if j + 1 < k { m[j + 2] } else { 0.0 };
                m[j + 1] = (rhs[j] - upper[j] * next) / diag[j];
            }
        }
        CubicSpline {
            t: t.to_vec(),
            y: y.to_vec(),
            m,
        }
    }

    fn segment(&self, s: f64) -> usize {
        let n = self.t.len();
        match self.t.partition_point(|&ti| ti <= s) {
            0 => 0,
            i if i >= n => n - 2,
            i => i - 1,
        }
    }

    /// Value, first and second derivative at `s` (extrapolates the end cubics outside).
    pub fn eval_all(&self, s: f64) -> (f64, f64, f64) {
        let i = self.segment(s);
        let h = self.t[i + 1] - self.t[i];
        let a = (self.t[i + 1] - s) / h;
        let b = (s - self.t[i]) / h;
        let (m0, m1) = (self.m[i], self.m[i + 1]);
        let value = a * self.y[i]
            + b * self.y[i + 1]
            + ((a * a * a - a) * m0 + (b * b * b - b) * m1) * h * h / 6.0;
        let slope = (self.y[i + 1] - self.y[i]) / h - (3.0 * a * a - 1.0) / 6.0 * h * m0
            + (3.0 * b * b - 1.0) / 6.0 * h * m1;
        (value, slope, a * m0 + b * m1)
    }

    /// Value at `s`.
    pub fn eval(&self, s: f64) -> f64 {
        self.eval_all(s).0
    }
}

/// A closed-form parametric spline (x(s), y(s)) through a section's points, parametrised by
/// the cumulative chord length between points (an approximation of arc length).
#[derive(Debug, Clone)]
pub(crate) struct OutlineSpline {
    pub s: Vec<f64>,
    x: CubicSpline,
    y: CubicSpline,
}

impl OutlineSpline {
    /// Fit through the points; consecutive points must be distinct.
    pub fn new(x: &[f64], y: &[f64]) -> Self {
        let mut s = Vec::with_capacity(x.len());
        s.push(0.0);
        for i in 1..x.len() {
            let ds = (x[i] - x[i - 1]).hypot(y[i] - y[i - 1]);
            s.push(s[i - 1] + ds);
        }
        let sx = CubicSpline::natural(&s, x);
        let sy = CubicSpline::natural(&s, y);
        OutlineSpline { s, x: sx, y: sy }
    }

    /// Total length of the parameter range.
    pub fn length(&self) -> f64 {
        *self.s.last().unwrap_or(&0.0)
    }

    /// Point at parameter `s`.
    pub fn point(&self, s: f64) -> (f64, f64) {
        (self.x.eval(s), self.y.eval(s))
    }

    /// Unit tangent (direction of increasing s) at `s`.
    pub fn tangent(&self, s: f64) -> (f64, f64) {
        let (_, dx, _) = self.x.eval_all(s);
        let (_, dy, _) = self.y.eval_all(s);
        let norm = dx.hypot(dy).max(f64::MIN_POSITIVE);
        (dx / norm, dy / norm)
    }

    /// Signed curvature κ = (x'y'' − y'x'')/(x'² + y'²)^{3/2}; positive where the outline
    /// turns counter-clockwise.
    pub fn curvature(&self, s: f64) -> f64 {
        let (_, dx, ddx) = self.x.eval_all(s);
        let (_, dy, ddy) = self.y.eval_all(s);
        let speed2 = (dx * dx + dy * dy).max(f64::MIN_POSITIVE);
        (dx * ddy - dy * ddx) / (speed2 * speed2.sqrt())
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn spline_reproduces_a_cubic_interior() {
        // A natural spline through samples of sin reproduces it closely in the interior.
        let t: Vec<f64> = (0..=100).map(|i| i as f64 * 0.0314159).collect();
        let y: Vec<f64> = t.iter().map(|v| v.sin()).collect();
        let sp = CubicSpline::natural(&t, &y);
        for k in 10..90 {
            let s = k as f64 * 0.0314159 + 0.01;
            assert!((sp.eval(s) - s.sin()).abs() < 1e-7);
        }
    }

    #[test]
    fn circle_curvature() {
        let n = 400;
        let (x, y): (Vec<f64>, Vec<f64>) = (0..n)
            .map(|i| {
                let a = 2.0 * std::f64::consts::PI * i as f64 / n as f64;
                (2.0 * a.cos(), 2.0 * a.sin())
            })
            .unzip();
        let sp = OutlineSpline::new(&x, &y);
        let k = sp.curvature(sp.length() / 2.0);
        assert!((k - 0.5).abs() < 1e-4, "{k}");
    }
}
