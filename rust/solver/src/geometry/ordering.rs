//! Recognising how a list of outline points is ordered, and reordering it to the core's
//! convention (upper trailing edge → leading edge → lower trailing edge).

/// Where a point came from, for error messages: a file line or an index into the input.
pub(crate) struct Locator<'a> {
    /// "foo.txt" or "section 'mine'".
    pub source: &'a str,
    /// Line number of each input point, when the points came from a file.
    pub lines: Option<&'a [usize]>,
}

impl Locator<'_> {
    /// "line 12" or "point 12" for input point `i`.
    pub fn short(&self, i: usize) -> String {
        match self.lines {
            Some(lines) => format!("line {}", lines.get(i).copied().unwrap_or(0)),
            None => format!("point {i}"),
        }
    }
    /// "foo.txt line 12" or "section 'mine' point 12".
    pub fn at(&self, i: usize) -> String {
        format!("{} {}", self.source, self.short(i))
    }
}

/// How the input points are laid out.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub(crate) enum Layout {
    /// One loop from a trailing-edge point round the leading edge to the other.
    Loop { clockwise: bool },
    /// Two surfaces, each from the leading to the trailing edge; the second starts here.
    Split { second_start: usize },
}

/// Turning points of x along the list, ignoring reversals smaller than `h` (a zig-zag filter).
fn turning_points(x: &[f64], h: f64) -> (i8, Vec<usize>) {
    let mut pivots = vec![0];
    let mut dir: i8 = 0;
    let mut first_dir: i8 = 0;
    let mut ext = 0;
    for i in 1..x.len() {
        match dir {
            0 => {
                if x[i] >= x[0] + h {
                    dir = 1;
                    ext = i;
                } else if x[i] <= x[0] - h {
                    dir = -1;
                    ext = i;
                }
                first_dir = dir;
            }
            1 => {
                if x[i] > x[ext] {
                    ext = i;
                } else if x[i] < x[ext] - h {
                    pivots.push(ext);
                    dir = -1;
                    ext = i;
                }
            }
            _ => {
                if x[i] < x[ext] {
                    ext = i;
                } else if x[i] > x[ext] + h {
                    pivots.push(ext);
                    dir = 1;
                    ext = i;
                }
            }
        }
    }
    pivots.push(x.len() - 1);
    (first_dir, pivots)
}

/// Twice the signed area of the polygon (positive when counter-clockwise).
pub(crate) fn signed_area2(x: &[f64], y: &[f64]) -> f64 {
    let n = x.len();
    (0..n)
        .map(|i| {
            let j = (i + 1) % n;
            x[i] * y[j] - x[j] * y[i]
        })
        .sum()
}

/// Recognise the layout of finite points (at least a few). Errors name the file lines.
pub(crate) fn recognise(x: &[f64], y: &[f64], loc: &Locator) -> Result<Layout, String> {
    let n = x.len();
    let (xmin, xmax) = x
        .iter()
        .fold((f64::INFINITY, f64::NEG_INFINITY), |(a, b), &v| {
            (a.min(v), b.max(v))
        });
    let span = xmax - xmin;
    if span.partial_cmp(&0.0) != Some(std::cmp::Ordering::Greater) {
        return Err(format!(
            "{}: all points have the same x, so there is no chord",
            loc.source
        ));
    }
    let near_te = |i: usize| x[i] >= xmax - 0.1 * span;
    let near_le = |i: usize| x[i] <= xmin + 0.1 * span;
    let (first_dir, pivots) = turning_points(x, 0.02 * span);
    let runs = pivots.len() - 1;
    let listing = |p: &[usize]| {
        p.iter()
            .take(5)
            .map(|&i| loc.short(i))
            .collect::<Vec<_>>()
            .join(", ")
    };
    let unrecognised = |detail: String| {
        format!(
            "{}: the point order is not recognised ({detail}); expected one loop from the trailing edge \
             round the leading edge and back (either direction), or the upper and the lower surface \
             each listed from the leading to the trailing edge",
            loc.source
        )
    };
    if near_te(0) {
        // A loop closes early when a later point repeats the first one.
        let tol = 1e-9 * span;
        for i in 2..n.saturating_sub(2) {
            if (x[i] - x[0]).abs() <= tol && (y[i] - y[0]).abs() <= tol && n - 1 - i >= 3 {
                return Err(format!(
                    "{}: more than one loop: {} closes the loop begun at {} and {} more points follow",
                    loc.source,
                    loc.short(i),
                    loc.short(0),
                    n - 1 - i
                ));
            }
        }
    }
    match first_dir {
        -1 => {
            if runs == 2 && near_te(0) && near_te(n - 1) && near_le(pivots[1]) {
                return Ok(Layout::Loop {
                    clockwise: signed_area2(x, y) < 0.0,
                });
            }
            let alternates =
                pivots
                    .iter()
                    .enumerate()
                    .all(|(k, &i)| if k % 2 == 0 { near_te(i) } else { near_le(i) });
            let long_runs = pivots.windows(2).all(|w| w[1] - w[0] >= 7);
            if runs >= 4 && runs % 2 == 0 && alternates && long_runs {
                let les: Vec<usize> = pivots.iter().copied().skip(1).step_by(2).collect();
                return Err(format!(
                    "{}: more than one loop: the points go round the leading edge {} times (at {}); give one section per file",
                    loc.source,
                    les.len(),
                    listing(&les)
                ));
            }
            Err(unrecognised(format!(
                "x reverses direction at {}",
                listing(&pivots[1..runs])
            )))
        }
        1 => {
            let jumps_only = pivots
                .windows(2)
                .skip(1)
                .step_by(2)
                .all(|w| w[1] == w[0] + 1);
            let alternates = pivots.iter().enumerate().all(|(k, &i)| {
                if k == 0 || k == runs {
                    true
                } else if k % 2 == 1 {
                    near_te(i)
                } else {
                    near_le(i)
                }
            });
            if runs == 3 && jumps_only && alternates && near_le(0) && near_te(n - 1) {
                return Ok(Layout::Split {
                    second_start: pivots[2],
                });
            }
            if runs >= 7 && runs % 2 == 1 && jumps_only && alternates {
                return Err(format!(
                    "{}: more than one loop: {} surfaces are listed from the leading edge; give one section per file",
                    loc.source,
                    runs.div_ceil(2)
                ));
            }
            Err(unrecognised(format!(
                "the list starts at the leading edge but x reverses direction at {}",
                listing(&pivots[1..runs.max(1)])
            )))
        }
        _ => Err(unrecognised("x hardly changes along the list".into())),
    }
}

/// Integral of y dx along a run of points (trapezoidal rule), to tell upper from lower.
fn y_integral(x: &[f64], y: &[f64]) -> f64 {
    x.windows(2)
        .zip(y.windows(2))
        .map(|(xw, yw)| 0.5 * (yw[0] + yw[1]) * (xw[1] - xw[0]))
        .sum()
}

/// Input indices in the core's order, for two surfaces listed from the leading edge.
/// The surface with the larger ∫y dx is the upper one; a shared leading-edge point is kept once.
pub(crate) fn split_order(x: &[f64], y: &[f64], second_start: usize) -> Vec<usize> {
    let n = x.len();
    let first: Vec<usize> = (0..second_start).collect();
    let second: Vec<usize> = (second_start..n).collect();
    let integral = |idx: &[usize]| {
        let xs: Vec<f64> = idx.iter().map(|&i| x[i]).collect();
        let ys: Vec<f64> = idx.iter().map(|&i| y[i]).collect();
        y_integral(&xs, &ys)
    };
    let (upper, lower) = if integral(&first) >= integral(&second) {
        (first, second)
    } else {
        (second, first)
    };
    let mut order: Vec<usize> = upper.iter().rev().copied().collect();
    let (a, b) = (upper[0], lower[0]);
    let skip = usize::from(x[a] == x[b] && y[a] == y[b]);
    order.extend(lower.iter().skip(skip));
    order
}

/// Input indices in the core's order for a recognised layout.
pub(crate) fn core_order(x: &[f64], y: &[f64], layout: Layout) -> Vec<usize> {
    match layout {
        Layout::Loop { clockwise: false } => (0..x.len()).collect(),
        Layout::Loop { clockwise: true } => (0..x.len()).rev().collect(),
        Layout::Split { second_start } => split_order(x, y, second_start),
    }
}
