//! Sections from coordinate lists: a text file's contents or two arrays of points.
//!
//! Accepted text layouts: whitespace- or comma-separated `x y` columns, an optional name on
//! the first line, blank lines and `#` comments ignored; either one continuous loop through
//! the trailing edge (in either direction) or the upper and the lower surface listed
//! separately from the leading to the trailing edge, optionally preceded by a count line
//! giving the number of points on each ("61. 61.").

use super::ordering::{Layout, Locator};
use super::validation::{chord_and_leading_edge, order_and_check};
use super::Section;
use crate::{Result, SolverError};

/// Build a section from points in any accepted order: validate, reorder to the core's
/// convention (upper trailing edge first, counter-clockwise), and, if `normalise`, scale to
/// unit chord with the leading edge at the origin and the chord line horizontal (leading edge
/// = the point farthest from the trailing-edge midpoint).
pub fn from_points(x: Vec<f64>, y: Vec<f64>, name: &str, normalise: bool) -> Result<Section> {
    let source = if name.is_empty() {
        "coordinates".to_string()
    } else {
        format!("section '{name}'")
    };
    let loc = Locator {
        source: &source,
        lines: None,
    };
    assemble(&x, &y, name, normalise, &loc, None)
}

fn assemble(
    x: &[f64],
    y: &[f64],
    name: &str,
    normalise: bool,
    loc: &Locator,
    layout: Option<Layout>,
) -> Result<Section> {
    let origin = order_and_check(x, y, loc, layout)?;
    let mut section = Section {
        name: name.to_string(),
        x: origin.iter().map(|&i| x[i]).collect(),
        y: origin.iter().map(|&i| y[i]).collect(),
    };
    close_single_trailing_edge_point(&mut section);
    if normalise {
        normalise_to_unit_chord(&mut section);
    }
    // What leaves here must pass the core's own check (re-panelling and the panel method start
    // with it): closing a single trailing-edge point can turn a barely accepted loop into one
    // that is not (found by the property test `test_perturbed_sections_never_crash`).
    section.validate()?;
    Ok(section)
}

/// Largest angle between the trailing-edge gap and the surface it would continue for the gap to
/// count as a missing repeated point (our choice; a blunt base stands nearly normal to both
/// surfaces).
const CONTINUATION_ANGLE_DEG: f64 = 30.0;
/// Largest gap, in lengths of the surface's last segment, for the same reading.
const CONTINUATION_LENGTHS: f64 = 1.5;

/// A loop that lists its trailing-edge point only once (at one end) reads as a section with a
/// gap between that point and the other surface's last point. When the gap continues one
/// surface — nearly along its last segment and not much longer than it, where a blunt base
/// stands nearly normal to both surfaces — the surface is closed on the listed point: the
/// point is repeated at that end (the trailing edge is sharp, as the file meant).
fn close_single_trailing_edge_point(section: &mut Section) {
    let n = section.x.len();
    if n < 4 {
        return;
    }
    let (x, y) = (&section.x, &section.y);
    let gap = (x[0] - x[n - 1], y[0] - y[n - 1]);
    let gap_length = gap.0.hypot(gap.1);
    if gap_length == 0.0 {
        return;
    }
    let continues = |tangent: (f64, f64), along: (f64, f64)| {
        let length = tangent.0.hypot(tangent.1);
        length > 0.0
            && gap_length <= CONTINUATION_LENGTHS * length
            && (tangent.0 * along.0 + tangent.1 * along.1) / (length * gap_length)
                >= CONTINUATION_ANGLE_DEG.to_radians().cos()
    };
    // The lower surface's last segment continued by the gap to the first point, or the upper
    // surface's first segment (towards the trailing edge) continued back to the last point.
    let lower = (x[n - 1] - x[n - 2], y[n - 1] - y[n - 2]);
    let upper = (x[0] - x[1], y[0] - y[1]);
    if continues(lower, gap) {
        section.x.push(x[0]);
        section.y.push(y[0]);
    } else if continues(upper, (-gap.0, -gap.1)) {
        section.x.insert(0, x[n - 1]);
        section.y.insert(0, y[n - 1]);
    }
}

/// Translate, rotate and scale in place so that the leading edge is at (0, 0) and the
/// trailing-edge midpoint at (1, 0).
pub(crate) fn normalise_to_unit_chord(section: &mut Section) {
    let n = section.len();
    let (chord, le) = chord_and_leading_edge(&section.x, &section.y);
    let (lx, ly) = (section.x[le], section.y[le]);
    let (tx, ty) = (
        0.5 * (section.x[0] + section.x[n - 1]),
        0.5 * (section.y[0] + section.y[n - 1]),
    );
    let (c, s) = ((tx - lx) / chord, (ty - ly) / chord);
    for i in 0..n {
        let (dx, dy) = (section.x[i] - lx, section.y[i] - ly);
        section.x[i] = (c * dx + s * dy) / chord;
        section.y[i] = (-s * dx + c * dy) / chord;
    }
    section.x[le] = 0.0;
    section.y[le] = 0.0;
}

fn tokens(line: &str) -> Vec<&str> {
    line.split(|c: char| c.is_whitespace() || c == ',' || c == ';')
        .filter(|t| !t.is_empty())
        .collect()
}

/// Parse the text of a coordinate file (`source` names it in messages: "foo.txt line 12:
/// expected two numbers, found 'abc'"). The section's name is the name line, or `source`.
/// Coordinates are kept as given (no normalisation); see [`from_points`] for that.
pub fn parse_coordinates(text: &str, source: &str) -> Result<Section> {
    parse_with(text, source, false)
}

/// [`parse_coordinates`] with optional normalisation to unit chord.
pub fn parse_coordinates_normalised(text: &str, source: &str, normalise: bool) -> Result<Section> {
    parse_with(text, source, normalise)
}

fn parse_with(text: &str, source: &str, normalise: bool) -> Result<Section> {
    let mut name: Option<String> = None;
    let (mut x, mut y, mut lines) = (Vec::new(), Vec::new(), Vec::new());
    let text = text.strip_prefix('\u{feff}').unwrap_or(text);
    for (k, raw) in text.lines().enumerate() {
        let line = raw.trim();
        if line.is_empty() || line.starts_with('#') {
            continue;
        }
        let toks = tokens(line);
        let values: Vec<Option<f64>> = toks.iter().map(|t| t.parse::<f64>().ok()).collect();
        if toks.len() == 2 && values.iter().all(Option::is_some) {
            x.push(values[0].unwrap_or(f64::NAN));
            y.push(values[1].unwrap_or(f64::NAN));
            lines.push(k + 1);
            continue;
        }
        if name.is_none() && x.is_empty() {
            name = Some(line.to_string());
            continue;
        }
        let shown: String = line.chars().take(40).collect();
        let msg = match toks.iter().zip(&values).find(|(_, v)| v.is_none()) {
            Some((bad, _)) => format!(
                "{source} line {}: expected two numbers, found '{bad}'",
                k + 1
            ),
            None => format!(
                "{source} line {}: expected two numbers, found {} in '{shown}'",
                k + 1,
                toks.len()
            ),
        };
        return Err(SolverError::geometry(msg));
    }
    let name = name.unwrap_or_else(|| source.to_string());
    // A count line: two whole numbers that add up to the points that follow.
    if x.len() > 1 {
        let (a, b) = (x[0], y[0]);
        let whole = |v: f64| v >= 2.0 && v.fract() == 0.0;
        if whole(a) && whole(b) && (a + b) as usize == x.len() - 1 {
            let upper = a as usize;
            let loc = Locator {
                source,
                lines: Some(&lines[1..]),
            };
            return assemble(
                &x[1..],
                &y[1..],
                &name,
                normalise,
                &loc,
                Some(Layout::Split {
                    second_start: upper,
                }),
            );
        }
    }
    let loc = Locator {
        source,
        lines: Some(&lines),
    };
    assemble(&x, &y, &name, normalise, &loc, None)
}

#[cfg(test)]
mod tests {
    use super::*;

    fn loop_text() -> String {
        let s = crate::geometry::naca::naca4(0.02, 0.4, 0.12, false, 30).unwrap();
        let mut t = String::from("test section\n");
        for i in 0..s.len() {
            t.push_str(&format!("{:.6} {:.6}\n", s.x[i], s.y[i]));
        }
        t
    }

    #[test]
    fn loop_listing_the_trailing_edge_once_is_closed() {
        // A loop from (1, 0) round the leading edge that stops on the lower surface just short
        // of (1, 0): the gap continues the lower surface, so the trailing edge is sharp.
        let mut text = String::from("single-point trailing edge\n");
        let n = 40;
        let mut points = Vec::new();
        for i in 0..n {
            let t = std::f64::consts::PI * i as f64 / (n - 1) as f64;
            let xx = 0.5 * (1.0 + t.cos());
            points.push((xx, 0.06 * (1.0 - xx) * xx.sqrt() * 4.0));
        }
        for i in 1..n - 1 {
            let t = std::f64::consts::PI * (n - 1 - i) as f64 / (n - 1) as f64;
            let xx = 0.5 * (1.0 + t.cos());
            points.push((xx, -0.04 * (1.0 - xx) * xx.sqrt() * 4.0));
        }
        for (xx, yy) in &points {
            text.push_str(&format!("{xx:.6} {yy:.6}\n"));
        }
        let section = parse_coordinates(&text, "single.dat").unwrap();
        let last = section.len() - 1;
        assert_eq!(
            (section.x[0], section.y[0]),
            (section.x[last], section.y[last])
        );
        assert_eq!(section.len(), points.len() + 1);
    }

    #[test]
    fn blunt_base_is_kept() {
        // A vertical base between the two trailing-edge points is a real blunt trailing edge.
        let x: Vec<f64> = (0..30)
            .map(|i| 0.5 * (1.0 + (std::f64::consts::PI * i as f64 / 29.0).cos()))
            .collect();
        let mut xs = x.clone();
        let mut ys: Vec<f64> = x
            .iter()
            .map(|&v| 0.002 + 0.05 * (1.0 - v) * v.sqrt())
            .collect();
        for &v in x.iter().rev().skip(1) {
            xs.push(v);
            ys.push(-0.002 - 0.05 * (1.0 - v) * v.sqrt());
        }
        let section = from_points(xs.clone(), ys, "blunt", false).unwrap();
        assert_eq!(section.len(), xs.len());
        let last = section.len() - 1;
        assert!((section.y[0] - section.y[last]).abs() > 0.003);
    }

    #[test]
    fn name_line_and_loop() {
        let s = parse_coordinates(&loop_text(), "t.txt").unwrap();
        assert_eq!(s.name, "test section");
        assert_eq!(s.len(), 59);
    }

    #[test]
    fn text_in_number_column() {
        let mut t = loop_text();
        t.push_str("0.5 abc\n");
        let e = parse_coordinates(&t, "foo.txt").unwrap_err().to_string();
        assert_eq!(e, "foo.txt line 61: expected two numbers, found 'abc'");
    }
}
