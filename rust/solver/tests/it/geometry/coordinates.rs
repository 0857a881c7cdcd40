use wakerank_solver::geometry::coordinates::{from_points, parse_coordinates};
use wakerank_solver::geometry::naca::naca4;
use wakerank_solver::geometry::properties::properties;
use wakerank_solver::SolverError;

fn naca2412() -> wakerank_solver::Section {
    naca4(0.02, 0.4, 0.12, false, 40).unwrap()
}

fn geometry_message(r: wakerank_solver::Result<wakerank_solver::Section>) -> String {
    match r {
        Err(SolverError::Geometry(m)) => m,
        other => panic!("expected a geometry error, got {other:?}"),
    }
}

#[test]
fn loop_in_either_direction_is_reordered() {
    let s = naca2412();
    let same = from_points(s.x.clone(), s.y.clone(), "a", false).unwrap();
    assert_eq!(same.x, s.x);
    let rev = from_points(
        s.x.iter().rev().copied().collect(),
        s.y.iter().rev().copied().collect(),
        "b",
        false,
    )
    .unwrap();
    assert_eq!(rev.x, s.x);
    assert_eq!(rev.y, s.y);
}

#[test]
fn split_surfaces_are_joined() {
    let s = naca2412();
    let le = 39;
    let upper: Vec<usize> = (0..=le).rev().collect();
    let lower: Vec<usize> = (le..s.len()).collect();
    let mut text = String::from("split\n");
    for &i in upper.iter().chain(&lower) {
        text.push_str(&format!("{:.12} {:.12}\n", s.x[i], s.y[i]));
    }
    let parsed = parse_coordinates(&text, "split.txt").unwrap();
    assert_eq!(parsed.len(), s.len());
    assert!((parsed.y[0] - s.y[0]).abs() < 1e-11);
    // With a count line.
    let mut counted = format!("split\n{}. {}.\n", upper.len(), lower.len());
    counted.push_str(text.split_once('\n').unwrap().1);
    let parsed = parse_coordinates(&counted, "count.txt").unwrap();
    assert_eq!(parsed.len(), s.len());
}

#[test]
fn e387_design_ordinates() {
    // NASA TM-4062 (McGhee, Walker & Millard 1988) Table I: t/c ≈ 0.0907 near 0.31c.
    let text = include_str!("../../../../../tests/data/e387.txt");
    let s = parse_coordinates(text, "e387.txt").unwrap();
    let p = properties(&s);
    assert!((p.thickness - 0.0907).abs() < 5e-4, "{}", p.thickness);
    assert!(
        (p.thickness_position - 0.31).abs() < 0.01,
        "{}",
        p.thickness_position
    );
}

#[test]
fn normalise_puts_the_leading_edge_at_the_origin() {
    let s = naca2412();
    let (c, sn) = (0.3f64.cos(), 0.3f64.sin());
    let x: Vec<f64> = (0..s.len())
        .map(|i| 2.0 * (c * s.x[i] - sn * s.y[i]) + 5.0)
        .collect();
    let y: Vec<f64> = (0..s.len())
        .map(|i| 2.0 * (sn * s.x[i] + c * s.y[i]) - 1.0)
        .collect();
    let n = from_points(x, y, "moved", true).unwrap();
    let p = properties(&n);
    assert!((p.chord - 1.0).abs() < 1e-9);
    let te = (
        0.5 * (n.x[0] + n.x[n.len() - 1]),
        0.5 * (n.y[0] + n.y[n.len() - 1]),
    );
    assert!((te.0 - 1.0).abs() < 1e-9 && te.1.abs() < 1e-9);
}

#[test]
fn bad_point_lists_name_the_problem_and_the_place() {
    let s = naca2412();
    let few = geometry_message(from_points(
        s.x[..7].to_vec(),
        s.y[..7].to_vec(),
        "few",
        false,
    ));
    assert!(few.contains("only 7 points"), "{few}");
    let mut y = s.y.clone();
    y[12] = f64::NAN;
    let nan = geometry_message(from_points(s.x.clone(), y, "nan", false));
    assert!(
        nan.contains("point 12") && nan.contains("not a finite"),
        "{nan}"
    );
    let mut x = s.x.clone();
    let mut y = s.y.clone();
    x.insert(20, x[20]);
    y.insert(20, y[20]);
    let dup = geometry_message(from_points(x, y, "dup", false));
    assert!(
        dup.contains("point 21") && dup.contains("duplicate"),
        "{dup}"
    );
    let mut y = s.y.clone();
    for v in &mut y[10..15] {
        *v = -*v;
    }
    let cross = geometry_message(from_points(s.x.clone(), y, "cross", false));
    assert!(cross.contains("crosses itself"), "{cross}");
    let mut y = s.y.clone();
    y[0] += 0.08;
    let gap = geometry_message(from_points(s.x.clone(), y, "gap", false));
    assert!(gap.contains("trailing-edge gap"), "{gap}");
    let mut x2 = s.x.clone();
    x2.extend(s.x.iter().map(|v| v + 0.0));
    let mut y2 = s.y.clone();
    y2.extend(s.y.iter().map(|v| v + 0.5));
    let two = geometry_message(from_points(x2, y2, "two", false));
    assert!(two.contains("more than one loop"), "{two}");
    let order: Vec<usize> = (0..s.len()).map(|i| (i * 37) % s.len()).collect();
    let scrambled = geometry_message(from_points(
        order.iter().map(|&i| s.x[i]).collect(),
        order.iter().map(|&i| s.y[i]).collect(),
        "scrambled",
        false,
    ));
    assert!(scrambled.contains("not recognised"), "{scrambled}");
}

#[test]
fn file_errors_name_the_line() {
    let text = "name\n1 0\n0.5 0.05\n0 0\n0.5 -0.05\nabc 1\n";
    let e = parse_coordinates(text, "foo.txt").unwrap_err().to_string();
    assert_eq!(e, "foo.txt line 6: expected two numbers, found 'abc'");
}

#[test]
fn byte_order_mark_and_crlf_are_accepted() {
    let s = naca2412();
    let mut text = String::from("\u{feff}");
    for i in 0..s.len() {
        text.push_str(&format!("{:.9}\t{:.9}\r\n", s.x[i], s.y[i]));
    }
    let parsed = parse_coordinates(&text, "bom.txt").unwrap();
    assert_eq!(parsed.len(), s.len());
    assert_eq!(parsed.name, "bom.txt");
}
