use wakerank_solver::geometry::naca::{from_designation, naca4, naca5};
use wakerank_solver::geometry::properties::properties;
use wakerank_solver::geometry::Section;
use wakerank_solver::SolverError;

/// NACA 0012 half-thickness, percent chord: Abbott & von Doenhoff, Theory of Wing Sections,
/// Appendix I (x, y).
pub const NACA0012_ORDINATES: [(f64, f64); 17] = [
    (1.25, 1.894),
    (2.5, 2.615),
    (5.0, 3.555),
    (7.5, 4.200),
    (10.0, 4.683),
    (15.0, 5.345),
    (20.0, 5.737),
    (25.0, 5.941),
    (30.0, 6.002),
    (40.0, 5.803),
    (50.0, 5.294),
    (60.0, 4.563),
    (70.0, 3.664),
    (80.0, 2.623),
    (90.0, 1.448),
    (95.0, 0.807),
    (100.0, 0.126),
];

/// Upper surface ordinate at `x` by linear interpolation between the section's points.
pub fn upper_at(s: &Section, x: f64) -> f64 {
    let le = (0..s.len())
        .min_by(|&a, &b| s.x[a].total_cmp(&s.x[b]))
        .unwrap();
    for i in (1..=le).rev() {
        let (x0, x1) = (s.x[i], s.x[i - 1]);
        if x0 <= x && x <= x1 {
            return s.y[i] + (s.y[i - 1] - s.y[i]) * (x - x0) / (x1 - x0);
        }
    }
    panic!("x = {x} outside the upper surface")
}

#[test]
fn naca0012_matches_abbott_von_doenhoff_appendix_i() {
    // Abbott & von Doenhoff Appendix I, within 0.00005 chord.
    let s = from_designation("0012", false, 400).unwrap();
    for (xp, yp) in NACA0012_ORDINATES {
        let y = upper_at(&s, xp / 100.0);
        assert!(
            (y - yp / 100.0).abs() < 5e-5,
            "x = {xp} %: {y} vs {}",
            yp / 100.0
        );
    }
}

#[test]
fn naca4_ordering_and_trailing_edge() {
    let open = naca4(0.02, 0.4, 0.12, false, 100).unwrap();
    assert_eq!(open.len(), 199);
    assert_eq!(open.name, "NACA 2412");
    // Upper trailing edge first, leading edge in the middle at the origin (Report 460).
    assert!(open.y[0] > open.y[198]);
    assert_eq!((open.x[99], open.y[99]), (0.0, 0.0));
    // Open trailing edge: 2·5t·0.0021 = 0.00252 chord (Report 460 polynomial at x = 1).
    let gap = (open.x[0] - open.x[198]).hypot(open.y[0] - open.y[198]);
    assert!((gap - 0.00252).abs() < 1e-9);
    let closed = naca4(0.02, 0.4, 0.12, true, 100).unwrap();
    assert!((closed.x[0] - closed.x[198]).hypot(closed.y[0] - closed.y[198]) < 1e-15);
}

#[test]
fn naca_properties_match_their_definitions() {
    // LE radius 1.1019 t² (Abbott & von Doenhoff §6.4); the spline curvature at the LE point
    // converges as h²: within 0.5 % at 200 points per side.
    let s = from_designation("0012", false, 200).unwrap();
    let p = properties(&s);
    assert!(
        (p.leading_edge_radius / (1.1019 * 0.12 * 0.12) - 1.0).abs() < 0.005,
        "{}",
        p.leading_edge_radius
    );
    assert!((p.thickness - 0.12).abs() < 1e-4 && (p.thickness_position - 0.30).abs() < 0.005);
    // Area of the 4-digit thickness: 10t∫(...)dx = 0.68508 t (Report 460 polynomial, integrated).
    assert!((p.area - 0.68508 * 0.12).abs() < 2e-5, "{}", p.area);
    // TE included angle from the slope of the polynomial at x = 1: 2·atan(5t·0.23385).
    let angle = 2.0 * (0.6f64 * 0.23385).atan().to_degrees();
    assert!(
        (p.trailing_edge_angle_deg - angle).abs() < 0.05,
        "{}",
        p.trailing_edge_angle_deg
    );

    // NACA 2412: camber 0.02 at 0.4 (Report 460). Measured as the mean of the surfaces at
    // common x, the peak sits slightly aft of the mean line's (thickness is laid off normal
    // to the mean line).
    let p = properties(&from_designation("2412", false, 200).unwrap());
    assert!((p.camber - 0.02).abs() < 1e-4, "{}", p.camber);
    assert!(
        (p.camber_position - 0.4).abs() < 0.005,
        "{}",
        p.camber_position
    );

    // NACA 23012: maximum camber near 0.15 chord (Report 610, from memory), 0.0184 from the
    // mean-line formula with the table's m, k1.
    let p = properties(&from_designation("NACA 23012", false, 200).unwrap());
    assert!(
        (p.camber_position - 0.15).abs() < 0.01,
        "{}",
        p.camber_position
    );
    assert!((p.camber - 0.01839).abs() < 2e-4, "{}", p.camber);
}

#[test]
fn five_digit_and_modified_designations() {
    let s = from_designation("23112", false, 100).unwrap();
    assert_eq!(s.name, "NACA 23112");
    let m = from_designation("0012-34", false, 200).unwrap();
    let p = properties(&m);
    // Modified thickness: maximum at 0.4, LE radius 1.1019 (t·I/6)² with I = 3 (A&vD §6.4).
    assert!((p.thickness - 0.12).abs() < 1e-4 && (p.thickness_position - 0.4).abs() < 0.005);
    assert!(
        (p.leading_edge_radius / (1.1019 * 0.0036) - 1.0).abs() < 0.02,
        "{}",
        p.leading_edge_radius
    );
    assert!(from_designation("2412-63", false, 100).is_ok());
    assert!(naca5(0.3, 0.15, false, 0.12, true, 100).is_ok());
}

#[test]
fn unknown_designations_are_input_errors() {
    for code in [
        "12", "24a2", "2412-3", "23512x", "23212-", "123456", "2012", "23212", "2400",
    ] {
        let e = from_designation(code, false, 100);
        assert!(matches!(e, Err(SolverError::Input(_))), "{code}: {e:?}");
    }
    let msg = from_designation("24a2", false, 100)
        .unwrap_err()
        .to_string();
    assert!(msg.contains("24a2"), "{msg}");
}

#[test]
fn a_designation_lists_its_family_and_parameters() {
    // Our interface (the binding's `naca_designation` dict is built from it).
    use wakerank_solver::geometry::naca::{parse_designation, DesignationValue};
    let four = parse_designation("2412").unwrap();
    assert_eq!(four.family(), "naca4");
    let names: Vec<_> = four.parameters().iter().map(|p| p.0).collect();
    assert_eq!(names, ["camber", "camber_position", "thickness"]);
    let five = parse_designation("23112-45").unwrap();
    assert_eq!(five.family(), "naca5_modified");
    let parameters = five.parameters();
    assert_eq!(parameters[2], ("reflexed", DesignationValue::Flag(true)));
    assert_eq!(parameters.last().unwrap().0, "max_thickness_position");
    assert_eq!(parameters.len(), 6);
}
