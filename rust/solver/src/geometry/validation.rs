//! Checks that make a point list a usable section outline, with messages that say what is
//! wrong and where (file line or point index).

use super::ordering::{core_order, recognise, Layout, Locator};
use super::Section;
use crate::{Result, SolverError};

/// Fewest points accepted for a section outline.
pub const MIN_POINTS: usize = 10;

/// Largest accepted trailing-edge gap (distance between the first and last point), as a
/// fraction of chord. Real blunt trailing edges are below about 2 %; a larger gap usually
/// means a truncated or mis-ordered file (common practice).
pub const MAX_TRAILING_EDGE_GAP: f64 = 0.05;

/// Largest number of points accepted: keeps every check cheap, including the worst case of
/// the self-intersection sweep; real sections need a few hundred.
pub const MAX_POINTS: usize = 20_000;

/// Point count and finiteness, on the input as given.
pub(crate) fn check_count_and_finite(x: &[f64], y: &[f64], loc: &Locator) -> Result<()> {
    if x.len() != y.len() {
        return Err(SolverError::input(format!(
            "{}: x has {} values but y has {}",
            loc.source,
            x.len(),
            y.len()
        )));
    }
    if x.len() < MIN_POINTS {
        return Err(SolverError::geometry(format!(
            "{}: only {} points; a section needs at least {MIN_POINTS}",
            loc.source,
            x.len()
        )));
    }
    if x.len() > MAX_POINTS {
        return Err(SolverError::geometry(format!(
            "{}: {} points; at most {MAX_POINTS} are accepted",
            loc.source,
            x.len()
        )));
    }
    for i in 0..x.len() {
        for (axis, v) in [("x", x[i]), ("y", y[i])] {
            if !v.is_finite() {
                return Err(SolverError::geometry(format!(
                    "{}: {axis} is not a finite number ({v})",
                    loc.at(i)
                )));
            }
        }
    }
    Ok(())
}

/// Chord length: the distance from the trailing-edge midpoint to the farthest point, and that
/// point's index (the leading edge; common practice).
pub(crate) fn chord_and_leading_edge(x: &[f64], y: &[f64]) -> (f64, usize) {
    let n = x.len();
    let (tx, ty) = (0.5 * (x[0] + x[n - 1]), 0.5 * (y[0] + y[n - 1]));
    let mut best = (0.0, 0);
    for i in 0..n {
        let d = (x[i] - tx).hypot(y[i] - ty);
        if d > best.0 {
            best = (d, i);
        }
    }
    best
}

/// Checks on points already in the core's order; `origin[i]` is the input index of point i.
pub(crate) fn check_ordered(x: &[f64], y: &[f64], origin: &[usize], loc: &Locator) -> Result<()> {
    let n = x.len();
    let (chord, _) = chord_and_leading_edge(x, y);
    if chord <= 0.0 {
        return Err(SolverError::geometry(format!(
            "{}: the points have no extent (zero chord)",
            loc.source
        )));
    }
    let tol = 1e-10 * chord;
    for i in 0..n - 1 {
        if (x[i + 1] - x[i]).hypot(y[i + 1] - y[i]) <= tol {
            return Err(SolverError::geometry(format!(
                "{}: repeats the point at {} (duplicate point, zero-length segment)",
                loc.at(origin[i + 1].max(origin[i])),
                loc.short(origin[i + 1].min(origin[i]))
            )));
        }
    }
    let gap = (x[0] - x[n - 1]).hypot(y[0] - y[n - 1]);
    if gap > MAX_TRAILING_EDGE_GAP * chord {
        return Err(SolverError::geometry(format!(
            "{}: the trailing-edge gap between {} and {} is {:.4} of chord, more than the {} allowed \
             (is the file truncated or mis-ordered?)",
            loc.source,
            loc.short(origin[0]),
            loc.short(origin[n - 1]),
            gap / chord,
            MAX_TRAILING_EDGE_GAP
        )));
    }
    check_self_intersection(x, y, origin, loc, tol)
}

fn orient(ax: f64, ay: f64, bx: f64, by: f64, cx: f64, cy: f64) -> f64 {
    (bx - ax) * (cy - ay) - (by - ay) * (cx - ax)
}

fn segments_meet(p: [(f64, f64); 2], q: [(f64, f64); 2]) -> bool {
    let o1 = orient(p[0].0, p[0].1, p[1].0, p[1].1, q[0].0, q[0].1);
    let o2 = orient(p[0].0, p[0].1, p[1].0, p[1].1, q[1].0, q[1].1);
    let o3 = orient(q[0].0, q[0].1, q[1].0, q[1].1, p[0].0, p[0].1);
    let o4 = orient(q[0].0, q[0].1, q[1].0, q[1].1, p[1].0, p[1].1);
    if o1 * o2 > 0.0 || o3 * o4 > 0.0 {
        return false;
    }
    if o1 == 0.0 && o2 == 0.0 {
        // Collinear: overlap of the projections.
        let overlap = |a0: f64, a1: f64, b0: f64, b1: f64| {
            a0.min(a1) <= b0.max(b1) && b0.min(b1) <= a0.max(a1)
        };
        return overlap(p[0].0, p[1].0, q[0].0, q[1].0) && overlap(p[0].1, p[1].1, q[0].1, q[1].1);
    }
    true
}

/// Self-intersection by a sweep over segments sorted by their smallest x.
fn check_self_intersection(
    x: &[f64],
    y: &[f64],
    origin: &[usize],
    loc: &Locator,
    tol: f64,
) -> Result<()> {
    let n = x.len();
    let mut segs: Vec<(usize, usize)> = (0..n - 1).map(|i| (i, i + 1)).collect();
    let closing = (x[0] - x[n - 1]).hypot(y[0] - y[n - 1]) > tol;
    if closing {
        segs.push((n - 1, 0));
    }
    let m = segs.len();
    let adjacent = |a: usize, b: usize| {
        let (sa, sb) = (segs[a], segs[b]);
        sa.0 == sb.0
            || sa.0 == sb.1
            || sa.1 == sb.0
            || sa.1 == sb.1
            || (!closing && ((a == 0 && b == m - 1) || (b == 0 && a == m - 1)))
    };
    let min_x = |k: usize| x[segs[k].0].min(x[segs[k].1]);
    let max_x = |k: usize| x[segs[k].0].max(x[segs[k].1]);
    let mut by_x: Vec<usize> = (0..m).collect();
    by_x.sort_by(|&a, &b| min_x(a).total_cmp(&min_x(b)).then(a.cmp(&b)));
    let pt = |i: usize| (x[i], y[i]);
    for (pos, &a) in by_x.iter().enumerate() {
        let (ylo, yhi) = (
            y[segs[a].0].min(y[segs[a].1]),
            y[segs[a].0].max(y[segs[a].1]),
        );
        for &b in &by_x[pos + 1..] {
            if min_x(b) > max_x(a) {
                break;
            }
            if adjacent(a, b) {
                continue;
            }
            let (qlo, qhi) = (
                y[segs[b].0].min(y[segs[b].1]),
                y[segs[b].0].max(y[segs[b].1]),
            );
            if qlo > yhi || qhi < ylo {
                continue;
            }
            if segments_meet(
                [pt(segs[a].0), pt(segs[a].1)],
                [pt(segs[b].0), pt(segs[b].1)],
            ) {
                let (first, second) = if a < b { (a, b) } else { (b, a) };
                let name = |k: usize| {
                    let (i, j) = segs[k];
                    format!("{} and {}", loc.short(origin[i]), loc.short(origin[j]))
                };
                return Err(SolverError::geometry(format!(
                    "{}: the outline crosses itself: the segment between {} meets the segment between {}",
                    loc.source,
                    name(first),
                    name(second)
                )));
            }
        }
    }
    Ok(())
}

/// Everything needed to turn an input point list into a section in the core's order:
/// count, finiteness, layout (loop either way, or split surfaces), duplicates, trailing-edge
/// gap, self-intersection. Returns the input indices in the core's order.
pub(crate) fn order_and_check(
    x: &[f64],
    y: &[f64],
    loc: &Locator,
    layout: Option<Layout>,
) -> Result<Vec<usize>> {
    check_count_and_finite(x, y, loc)?;
    let layout = match layout {
        Some(l) => l,
        None => recognise(x, y, loc).map_err(SolverError::Geometry)?,
    };
    let origin = core_order(x, y, layout);
    let ox: Vec<f64> = origin.iter().map(|&i| x[i]).collect();
    let oy: Vec<f64> = origin.iter().map(|&i| y[i]).collect();
    // The reordered outline must itself read as one counter-clockwise loop.
    let reordered = Locator {
        source: loc.source,
        lines: None,
    };
    match recognise(&ox, &oy, &reordered) {
        Ok(Layout::Loop { clockwise: false }) => {}
        _ => {
            return Err(SolverError::geometry(format!(
                "{}: the point order is not recognised: the surfaces do not join into one loop \
                 from the trailing edge round the leading edge and back",
                loc.source
            )))
        }
    }
    check_ordered(&ox, &oy, &origin, loc)?;
    Ok(origin)
}

impl Section {
    /// Check that the section is a usable outline in the core's ordering convention: at
    /// least [`MIN_POINTS`] finite points, one counter-clockwise loop from the upper trailing
    /// edge, no repeated consecutive points, a trailing-edge gap below
    /// [`MAX_TRAILING_EDGE_GAP`] of chord and no self-intersection.
    pub fn validate(&self) -> Result<()> {
        let source = format!("section '{}'", self.name);
        let loc = Locator {
            source: &source,
            lines: None,
        };
        check_count_and_finite(&self.x, &self.y, &loc)?;
        match recognise(&self.x, &self.y, &loc).map_err(SolverError::Geometry)? {
            Layout::Loop { clockwise: false } => {}
            Layout::Loop { clockwise: true } => {
                return Err(SolverError::geometry(format!(
                "{source}: the points run clockwise (lower surface first); the core expects the \
                     upper trailing edge first (coordinates::from_points reorders)"
            )))
            }
            Layout::Split { .. } => {
                return Err(SolverError::geometry(format!(
                    "{source}: the surfaces are listed separately; the core expects one loop \
                     (coordinates::from_points reorders)"
                )))
            }
        }
        let origin: Vec<usize> = (0..self.len()).collect();
        check_ordered(&self.x, &self.y, &origin, &loc)
    }
}
