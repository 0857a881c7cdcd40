//! Geometric properties of a section: thickness, camber, leading-edge radius, trailing edge,
//! area.
//!
//! Method: the outline is rotated and scaled into the chord frame (leading edge — the point
//! farthest from the trailing-edge midpoint — at the origin, trailing-edge midpoint at (1, 0)),
//! a natural cubic spline in arc length is fitted through the points, each surface is sampled
//! densely and interpolated at common chordwise stations; thickness is the distance between
//! the surfaces perpendicular to the chord line, camber their mean. Thickness is therefore
//! measured perpendicular to the chord, not to the mean line as in the NACA definitions (the
//! two agree closely for moderate camber). The leading-edge radius is 1/κ of the spline at the
//! leading-edge point, Richardson-extrapolated in the point spacing; the trailing-edge angle is the angle between the spline's end tangents.

use super::spline::OutlineSpline;
use super::validation::chord_and_leading_edge;
use super::Section;

/// Geometric properties; lengths are fractions of chord, the area a fraction of chord².
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct SectionProperties {
    /// Maximum thickness perpendicular to the chord line.
    pub thickness: f64,
    /// Chordwise position of the maximum thickness.
    pub thickness_position: f64,
    /// Maximum camber (signed: positive when the mean line is above the chord line).
    pub camber: f64,
    /// Chordwise position of the maximum camber.
    pub camber_position: f64,
    /// Radius of curvature at the leading edge.
    pub leading_edge_radius: f64,
    /// Distance between the two trailing-edge points.
    pub trailing_edge_thickness: f64,
    /// Included angle between the surfaces at the trailing edge, degrees.
    pub trailing_edge_angle_deg: f64,
    /// Enclosed area (closed by the trailing-edge base).
    pub area: f64,
    /// Chord length in the section's own units.
    pub chord: f64,
}

/// Dense samples of the spline per surface.
const SAMPLES_PER_SIDE: usize = 3000;
/// Common chordwise stations for thickness and camber.
const STATIONS: usize = 2001;

/// Compute the properties of a (validated) section.
pub fn properties(section: &Section) -> SectionProperties {
    let n = section.len();
    if n < 4 {
        return SectionProperties {
            thickness: f64::NAN,
            thickness_position: f64::NAN,
            camber: f64::NAN,
            camber_position: f64::NAN,
            leading_edge_radius: f64::NAN,
            trailing_edge_thickness: f64::NAN,
            trailing_edge_angle_deg: f64::NAN,
            area: f64::NAN,
            chord: f64::NAN,
        };
    }
    let (le, (lx, ly), (c, s), chord) = chord_frame(section);
    let xi: Vec<f64> = (0..n)
        .map(|i| (c * (section.x[i] - lx) + s * (section.y[i] - ly)) / chord)
        .collect();
    let eta: Vec<f64> = (0..n)
        .map(|i| (-s * (section.x[i] - lx) + c * (section.y[i] - ly)) / chord)
        .collect();
    let spline = OutlineSpline::new(&xi, &eta);
    let s_le = spline.s[le];
    let total = spline.length();

    let sample = |a: f64, b: f64| -> (Vec<f64>, Vec<f64>) {
        (0..=SAMPLES_PER_SIDE)
            .map(|k| spline.point(a + (b - a) * k as f64 / SAMPLES_PER_SIDE as f64))
            .unzip()
    };
    let (ux, uy) = sample(s_le, 0.0);
    let (lxs, lys) = sample(s_le, total);
    let stations: Vec<f64> = super::cosine_spacing(STATIONS);
    let upper = interpolate_monotone(&ux, &uy, &stations);
    let lower = interpolate_monotone(&lxs, &lys, &stations);
    let thick: Vec<f64> = upper.iter().zip(&lower).map(|(u, l)| u - l).collect();
    let mean: Vec<f64> = upper
        .iter()
        .zip(&lower)
        .map(|(u, l)| 0.5 * (u + l))
        .collect();
    let (thickness, thickness_position) = refined_extremum(&stations, &thick);
    let abs_mean: Vec<f64> = mean.iter().map(|v| v.abs()).collect();
    let (_, camber_position) = refined_extremum(&stations, &abs_mean);
    let k = stations
        .partition_point(|&v| v < camber_position)
        .min(STATIONS - 1);
    let camber = if mean[k] < 0.0 {
        -refined_extremum(&stations, &abs_mean).0
    } else {
        refined_extremum(&stations, &abs_mean).0
    };

    let kappa = leading_edge_curvature(&xi, &eta, le, spline.curvature(s_le).abs());
    let leading_edge_radius = if kappa > 0.0 {
        1.0 / kappa
    } else {
        f64::INFINITY
    };
    let trailing_edge_thickness =
        (section.x[0] - section.x[n - 1]).hypot(section.y[0] - section.y[n - 1]) / chord;
    let forward_upper = spline.tangent(0.0);
    let back_lower = spline.tangent(total);
    let forward_lower = (-back_lower.0, -back_lower.1);
    let cos_angle =
        (forward_upper.0 * forward_lower.0 + forward_upper.1 * forward_lower.1).clamp(-1.0, 1.0);
    let trailing_edge_angle_deg = cos_angle.acos().to_degrees();

    let (ax, ay): (Vec<f64>, Vec<f64>) = (0..=2 * SAMPLES_PER_SIDE)
        .map(|k| spline.point(total * k as f64 / (2 * SAMPLES_PER_SIDE) as f64))
        .unzip();
    let area = 0.5 * super::ordering::signed_area2(&ax, &ay);

    SectionProperties {
        thickness,
        thickness_position,
        camber,
        camber_position,
        leading_edge_radius,
        trailing_edge_thickness,
        trailing_edge_angle_deg,
        area,
        chord,
    }
}

/// Curvature at the leading-edge point, Richardson-extrapolated: the spline curvature `fine`
/// through all points has an error of order h², so the curvature of a second spline through
/// every other point (leading edge kept) gives (4κ_h − κ_2h)/3. The correction is used only
/// when it is small (below 10 %), i.e. when the point spacing is smooth enough for it.
fn leading_edge_curvature(xi: &[f64], eta: &[f64], le: usize, fine: f64) -> f64 {
    let n = xi.len();
    let mut keep: Vec<usize> = (0..n).filter(|&i| i.abs_diff(le) % 2 == 0).collect();
    if keep[0] != 0 {
        keep.insert(0, 0);
    }
    if keep[keep.len() - 1] != n - 1 {
        keep.push(n - 1);
    }
    if keep.len() < super::MIN_POINTS {
        return fine;
    }
    let cx: Vec<f64> = keep.iter().map(|&i| xi[i]).collect();
    let cy: Vec<f64> = keep.iter().map(|&i| eta[i]).collect();
    let coarse_spline = OutlineSpline::new(&cx, &cy);
    let k = keep.iter().position(|&i| i == le).unwrap_or(0);
    let coarse = coarse_spline.curvature(coarse_spline.s[k]).abs();
    let extrapolated = (4.0 * fine - coarse) / 3.0;
    if extrapolated.is_finite() && (extrapolated - fine).abs() < 0.1 * fine {
        extrapolated
    } else {
        fine
    }
}

/// The chord line: leading-edge index, leading-edge point, direction cosines, chord length.
///
/// A section already in chord axes (a point at the origin and the trailing-edge midpoint on
/// the x-axis, as for the NACA and CST families and normalised files) keeps the x-axis as its
/// chord line, as the family definitions do. Otherwise the leading edge is the point farthest
/// from the trailing-edge midpoint (common practice).
fn chord_frame(section: &Section) -> (usize, (f64, f64), (f64, f64), f64) {
    let (x, y) = (&section.x, &section.y);
    let n = x.len();
    let (far_chord, far_le) = chord_and_leading_edge(x, y);
    let (tx, ty) = (0.5 * (x[0] + x[n - 1]), 0.5 * (y[0] + y[n - 1]));
    let tol = 1e-6 * far_chord;
    if ty.abs() <= tol && tx > 0.0 {
        if let Some(i) = (0..n).find(|&i| x[i].abs() <= tol && y[i].abs() <= tol) {
            return (i, (x[i], y[i]), (1.0, 0.0), tx.hypot(ty));
        }
    }
    let (lx, ly) = (x[far_le], y[far_le]);
    (
        far_le,
        (lx, ly),
        ((tx - lx) / far_chord, (ty - ly) / far_chord),
        far_chord,
    )
}

/// Linear interpolation of y(x) at `at`, using only samples where x increases (drops any
/// backtracking near the leading edge); held constant outside the sampled range.
fn interpolate_monotone(x: &[f64], y: &[f64], at: &[f64]) -> Vec<f64> {
    let mut xs = Vec::with_capacity(x.len());
    let mut ys = Vec::with_capacity(x.len());
    for i in 0..x.len() {
        if xs.last().is_none_or(|&last| x[i] > last) {
            xs.push(x[i]);
            ys.push(y[i]);
        }
    }
    at.iter()
        .map(|&v| {
            if xs.len() < 2 || v <= xs[0] {
                return ys[0];
            }
            let j = xs.partition_point(|&p| p < v);
            if j >= xs.len() {
                return ys[ys.len() - 1];
            }
            let f = (v - xs[j - 1]) / (xs[j] - xs[j - 1]);
            ys[j - 1] + f * (ys[j] - ys[j - 1])
        })
        .collect()
}

/// Maximum of sampled values, refined by a parabola through the best sample and its
/// neighbours: (value, position).
fn refined_extremum(x: &[f64], v: &[f64]) -> (f64, f64) {
    let mut k = 0;
    for i in 1..v.len() {
        if v[i] > v[k] {
            k = i;
        }
    }
    if k == 0 || k + 1 >= v.len() {
        return (v[k], x[k]);
    }
    let (x0, x1, x2) = (x[k - 1], x[k], x[k + 1]);
    let (y0, y1, y2) = (v[k - 1], v[k], v[k + 1]);
    let denom = (x0 - x1) * (x0 - x2) * (x1 - x2);
    let a = (x2 * (y1 - y0) + x1 * (y0 - y2) + x0 * (y2 - y1)) / denom;
    let b = (x2 * x2 * (y0 - y1) + x1 * x1 * (y2 - y0) + x0 * x0 * (y1 - y2)) / denom;
    if a >= 0.0 {
        return (y1, x1);
    }
    let xv = (-b / (2.0 * a)).clamp(x0, x2);
    let c = y1 - a * x1 * x1 - b * x1;
    (a * xv * xv + b * xv + c, xv)
}
