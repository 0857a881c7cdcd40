//! Criterion benchmarks of the viscous analysis: one point each, for changes whose effect is
//! smaller than the spread of the wall-clock sweep benchmark (`wakerank bench viscous`). Run
//! with `cargo bench -p wakerank-solver --bench viscous`.

use criterion::{black_box, criterion_group, criterion_main, Criterion};
use wakerank_solver::coupling::{analyze_viscous, ViscousSettings};
use wakerank_solver::geometry::naca;

/// One angle of a NACA section at 160 panels, free transition, M = 0.
fn point(c: &mut Criterion, label: &str, code: &str, reynolds: f64, alpha_deg: f64) {
    let section = naca::from_designation(code, false, 200).unwrap();
    let settings = ViscousSettings {
        panels: 160,
        ..ViscousSettings::new(reynolds)
    };
    c.bench_function(label, |b| {
        b.iter(|| analyze_viscous(black_box(&section), &[alpha_deg], &settings).unwrap())
    });
}

/// A point that converges from its first attempt.
fn easy_point(c: &mut Criterion) {
    point(c, "NACA 2412, Re 1e6, 2 deg, 160 panels", "2412", 1e6, 2.0);
}

/// The benchmark's slowest point: lower-surface transition creeping downstream one interval
/// per Newton solve over several attempts (docs/performance.md).
fn creeping_point(c: &mut Criterion) {
    point(c, "NACA 2412, Re 6e6, 4 deg, 160 panels", "2412", 6e6, 4.0);
}

criterion_group! {
    name = benches;
    config = Criterion::default().sample_size(10);
    targets = easy_point, creeping_point
}
criterion_main!(benches);
