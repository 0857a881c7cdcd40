//! Developer probe: one viscous α sweep with timing, for diagnosing the coupled solution.
//! `cargo run --release -p wakerank-solver --example probe_sweep -- 0012 6e6 -6 12 1 [trip]`
//! Environment: `WR_PANELS` (default 160), `WR_MACH` (default 0), `WR_CLOSED_TE=1` for the
//! closed-trailing-edge NACA variant,
//! `WR_NO_CURVATURE=1` to leave the wake-curvature sheet out, `WR_WAKE_NODES` for the number
//! of wake nodes (default a quarter of the panel count, at least 24), `WR_STATIONS=1` to print,
//! for each angle, the `boundary_layer_stations` row and its stations near the leading and
//! trailing edges instead of the sweep.

use std::time::Instant;
use wakerank_solver::coupling::{analyze_viscous, ViscousSettings};
use wakerank_solver::geometry::{coordinates::parse_coordinates_normalised, naca};

/// A numeric environment variable, or `default` when unset.
fn env_or(name: &str, default: f64) -> f64 {
    std::env::var(name).map_or(default, |v| v.parse().unwrap())
}

fn main() {
    let args: Vec<String> = std::env::args().collect();
    let code = args.get(1).map_or("0012", |s| s.as_str());
    let re: f64 = args.get(2).map_or(6e6, |s| s.parse().unwrap());
    let a0: f64 = args.get(3).map_or(-6.0, |s| s.parse().unwrap());
    let a1: f64 = args.get(4).map_or(12.0, |s| s.parse().unwrap());
    let da: f64 = args.get(5).map_or(1.0, |s| s.parse().unwrap());
    let trip = args.get(6).map(|s| s.parse::<f64>().unwrap());
    let section = if code.ends_with(".txt") {
        parse_coordinates_normalised(&std::fs::read_to_string(code).unwrap(), code, true).unwrap()
    } else {
        naca::from_designation(
            code,
            std::env::var("WR_CLOSED_TE").is_ok_and(|v| v == "1"),
            200,
        )
        .unwrap()
    };
    let mut alphas = Vec::new();
    let mut a = a0;
    while (a - a1) * da.signum() <= 1e-9 {
        alphas.push(a);
        a += da;
    }
    let settings = ViscousSettings {
        trip_upper: trip,
        trip_lower: trip,
        panels: env_or("WR_PANELS", 160.0) as usize,
        mach: env_or("WR_MACH", 0.0),
        wake_curvature: std::env::var("WR_NO_CURVATURE").is_err(),
        wake_nodes: std::env::var("WR_WAKE_NODES")
            .ok()
            .map(|v| v.parse().unwrap()),
        ..ViscousSettings::new(re)
    };
    if std::env::var("WR_STATIONS").is_ok() {
        for &a in &alphas {
            let Ok(analysis) =
                wakerank_solver::coupling::boundary_layer_stations(&section, a, &settings)
            else {
                println!("alpha {a}: no solution");
                continue;
            };
            let r = &analysis.row;
            println!(
                "alpha {a:6.2} cl {:8.5} cd {:9.6} cm_c4 {:8.5} converged {}",
                r.cl, r.cd, r.cm_c4, r.converged
            );
            for st in &analysis.stations {
                if st.x > 0.97 || st.x < 0.002 {
                    println!(
                        "  {:?} x {:.4} ue {:.4} theta {:.3e} H {:.3} cf {:.2e} N {:.2} {:?}",
                        st.side,
                        st.x,
                        st.edge_velocity,
                        st.theta,
                        st.shape_factor,
                        st.cf,
                        st.amplification,
                        st.regime
                    );
                }
            }
        }
        return;
    }
    let t = Instant::now();
    let rows = analyze_viscous(&section, &alphas, &settings).unwrap();
    let dt = t.elapsed().as_secs_f64();
    let mut ok = 0;
    for r in &rows {
        ok += r.converged as usize;
        println!(
            "alpha {:6.2} cl {:8.5} cd {:9.6} squire_young {:9.6} friction+pressure {:9.6} \
             cm_c4 {:8.5} transition {:6.4}/{:6.4} converged {} iterations {} residual {:.1e} separation {:?}/{:?} curvature {}",
            r.alpha_deg,
            r.cl,
            r.cd,
            r.cd_squire_young,
            r.cd_friction + r.cd_pressure,
            r.cm_c4,
            r.transition_upper,
            r.transition_lower,
            r.converged,
            r.iterations,
            r.residual,
            r.separation_upper.map(|x| (x * 1e4).round() / 1e4),
            r.separation_lower.map(|x| (x * 1e4).round() / 1e4),
            r.wake_curvature
        );
    }
    println!(
        "{ok}/{} converged in {dt:.2} s ({:.1} converged/s)",
        rows.len(),
        ok as f64 / dt
    );
}
