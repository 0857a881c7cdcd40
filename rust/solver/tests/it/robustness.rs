//! Measurement harness (ignored by default): converged share of the robustness sweep
//! (NACA 0012/2412/4415/23012 × Re 2e5, 1e6, 6e6 × α −6°…12°) and of the E387 sweep
//! (Re 1e5–5e5, α 0°–10°), with every failure listed, and the inviscid lift against the
//! trailing-edge panel density (docs/validation.md, robustness). Run with
//! `cargo test -p wakerank-solver --test it robustness -- --ignored --nocapture`.

use wakerank_solver::coupling::{analyze_viscous, ViscousSettings};
use wakerank_solver::geometry::{coordinates::parse_coordinates_normalised, naca};
use wakerank_solver::viscous_batch;

fn report(label: &str, rows: &[(String, f64, wakerank_solver::coupling::ViscousRow)]) -> f64 {
    let converged = rows.iter().filter(|r| r.2.converged).count();
    for (name, re, row) in rows.iter().filter(|r| !r.2.converged) {
        println!(
            "  fail {name} Re {re:.0e} alpha {:5.1}: iterations {} residual {:.2e}",
            row.alpha_deg, row.iterations, row.residual
        );
    }
    let outer_only = rows
        .iter()
        .filter(|r| r.2.converged && r.2.residual > 1e-8)
        .count();
    println!("  of the converged, {outer_only} by the outer iteration alone (residual > 1e-8)");
    let first_order: Vec<String> = rows
        .iter()
        .filter(|r| r.2.converged && !r.2.wake_curvature)
        .map(|(name, re, row)| format!("{name} {re:.0e} {:.0}", row.alpha_deg))
        .collect();
    println!(
        "  of the converged, {} with the first-order wake: {}",
        first_order.len(),
        first_order.join(", ")
    );
    let share = converged as f64 / rows.len() as f64;
    println!(
        "{label}: {converged} of {} converge ({:.1} %)",
        rows.len(),
        100.0 * share
    );
    share
}

#[test]
#[ignore]
fn robustness_sweep_share() {
    let codes = ["0012", "2412", "4415", "23012"];
    let sections: Vec<_> = codes
        .iter()
        .map(|c| naca::from_designation(c, false, 200).unwrap())
        .collect();
    let reynolds = [2e5, 1e6, 6e6];
    let conditions: Vec<_> = reynolds
        .iter()
        .map(|&re| ViscousSettings::new(re))
        .collect();
    let alphas: Vec<f64> = (-6..=12).map(f64::from).collect();
    let rows = viscous_batch(&sections, &conditions, &alphas, 0).unwrap();
    let rows: Vec<_> = rows
        .into_iter()
        .map(|r| {
            (
                codes[r.section_index].to_string(),
                reynolds[r.condition_index],
                r.row,
            )
        })
        .collect();
    report("robustness sweep", &rows);
}

#[test]
#[ignore]
fn e387_sweep_share() {
    let path = concat!(env!("CARGO_MANIFEST_DIR"), "/../../tests/data/e387.txt");
    let section =
        parse_coordinates_normalised(&std::fs::read_to_string(path).unwrap(), "e387.txt", true)
            .unwrap();
    let alphas: Vec<f64> = (0..=10).map(f64::from).collect();
    let mut rows = Vec::new();
    for re in [1e5, 2e5, 3e5, 5e5] {
        for row in analyze_viscous(&section, &alphas, &ViscousSettings::new(re)).unwrap() {
            rows.push(("E387".to_string(), re, row));
        }
    }
    report("E387 sweep", &rows);
}

#[test]
#[ignore]
fn naca0012_free_transition_re6e6() {
    let section = naca::from_designation("0012", false, 200).unwrap();
    let settings = ViscousSettings {
        mach: 0.15,
        ..ViscousSettings::new(6e6)
    };
    let rows = analyze_viscous(&section, &[0.0], &settings).unwrap();
    println!("NACA 0012 free Re 6e6 a0: {:?}", rows[0]);
}

#[test]
#[ignore]
fn inviscid_lift_against_trailing_edge_density() {
    use wakerank_solver::geometry::paneling::repanel_with_trailing_edge_density;
    use wakerank_solver::inviscid::PanelSolver;
    let section = naca::from_designation("0012", false, 200).unwrap();
    for (panels, density) in [(160, 4.0), (160, 2.0), (160, 1.0), (640, 4.0), (640, 1.0)] {
        let r = repanel_with_trailing_edge_density(&section, panels, density).unwrap();
        let s = PanelSolver::new(&r).unwrap().solve(4.0);
        println!(
            "panels {panels} te density {density}: cl(4 deg) {:.5} circulation {:.5}",
            s.cl, s.cl_circulation
        );
    }
}
