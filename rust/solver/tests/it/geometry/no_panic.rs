//! The geometry entry points return a section or an error for any input, never panic.

use proptest::prelude::*;
use wakerank_solver::geometry::coordinates::{from_points, parse_coordinates};
use wakerank_solver::geometry::paneling::repanel;
use wakerank_solver::geometry::properties::properties;

fn any_f64() -> impl Strategy<Value = f64> {
    prop_oneof![
        4 => -2.0f64..2.0,
        1 => Just(0.0),
        1 => Just(1.0),
        1 => prop::num::f64::ANY,
    ]
}

proptest! {
    #![proptest_config(ProptestConfig::with_cases(300))]

    #[test]
    fn from_points_never_panics(x in prop::collection::vec(any_f64(), 0..60), y in prop::collection::vec(any_f64(), 0..60), normalise in any::<bool>()) {
        if let Ok(s) = from_points(x, y, "p", normalise) {
            let _ = properties(&s);
            let _ = repanel(&s, 40);
        }
    }

    #[test]
    fn parse_coordinates_never_panics(text in "[0-9 .,eE+\\-\nabcnaif#]{0,400}") {
        let _ = parse_coordinates(&text, "fuzz.txt");
    }

    #[test]
    fn perturbed_loops_never_panic(noise in prop::collection::vec(-0.05f64..0.05, 80)) {
        let s = wakerank_solver::geometry::naca::naca4(0.02, 0.4, 0.12, false, 40).unwrap();
        let x: Vec<f64> = s.x.iter().zip(&noise).map(|(a, b)| a + b).collect();
        let y: Vec<f64> = s.y.iter().zip(noise.iter().rev()).map(|(a, b)| a + 0.2 * b).collect();
        if let Ok(s) = from_points(x, y, "noisy", false) {
            let _ = properties(&s);
            let _ = repanel(&s, 60);
        }
    }
}
