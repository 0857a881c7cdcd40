//! Criterion benchmarks of the inviscid panel method (run with `cargo bench -p wakerank-solver`).

use criterion::{black_box, criterion_group, criterion_main, Criterion};
use wakerank_solver::geometry::karman_trefftz::KarmanTrefftz;
use wakerank_solver::linalg::{DenseMatrix, LuFactors};
use wakerank_solver::PanelSolver;

fn section_160() -> wakerank_solver::Section {
    KarmanTrefftz {
        center_x: -0.1,
        center_y: 0.06,
        trailing_edge_angle_deg: 8.0,
    }
    .section(161)
    .unwrap()
}

fn factorise(c: &mut Criterion) {
    let section = section_160();
    c.bench_function("panel system build + LU, 160 panels", |b| {
        b.iter(|| PanelSolver::new(black_box(&section)).unwrap())
    });
}

fn fifteen_angles(c: &mut Criterion) {
    let section = section_160();
    let alphas: Vec<f64> = (0..15).map(|k| -4.0 + k as f64).collect();
    c.bench_function("one section, 15 angles, 160 panels", |b| {
        b.iter(|| {
            PanelSolver::new(black_box(&section))
                .unwrap()
                .solve_many(&alphas)
        })
    });
}

fn coupling_matrix(c: &mut Criterion) {
    let solver = PanelSolver::new(&section_160()).unwrap();
    let wake = solver.wake(4.0, 3.0, 40);
    c.bench_function("mass-defect influence, 160 panels + 40 wake nodes", |b| {
        b.iter(|| solver.mass_defect_influence(black_box(&wake)))
    });
}

/// The dense LU of the coupled Newton step's reduced system: one unknown per boundary-layer
/// station (160 panels and 60 wake nodes give about 220).
fn dense_lu(c: &mut Criterion) {
    let n = 220;
    let matrix = DenseMatrix {
        rows: n,
        cols: n,
        data: (0..n * n)
            .map(|k| {
                let (r, col) = (k / n, k % n);
                let d = 1.0 + (r as f64 - col as f64).abs();
                if r == col {
                    4.0
                } else {
                    ((k as f64 * 0.618_033_988_7).fract() - 0.5) / d
                }
            })
            .collect(),
    };
    c.bench_function("dense LU with partial pivoting, 220 unknowns", |b| {
        b.iter(|| LuFactors::new(black_box(matrix.clone())).unwrap())
    });
}

criterion_group!(
    benches,
    factorise,
    fifteen_angles,
    coupling_matrix,
    dense_lu
);
criterion_main!(benches);
