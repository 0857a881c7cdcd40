use wakerank_solver::geometry::naca::naca4;
use wakerank_solver::geometry::paneling::{
    repanel, repanel_with_trailing_edge_density, DEFAULT_PANELS,
};

fn half_thickness_0012(x: f64) -> f64 {
    // NACA Report 460 polynomial, open trailing edge.
    0.6 * (0.2969 * x.sqrt() - 0.1260 * x - 0.3516 * x * x + 0.2843 * x.powi(3)
        - 0.1015 * x.powi(4))
}

#[test]
fn repanel_reproduces_naca_ordinates() {
    // A fine NACA 0012 input re-panelled to 160 panels stays on the Report 460 surface.
    let fine = naca4(0.0, 0.0, 0.12, false, 201).unwrap();
    let r = repanel(&fine, DEFAULT_PANELS).unwrap();
    assert_eq!(r.len(), DEFAULT_PANELS + 1);
    let worst = (0..r.len())
        .map(|i| (r.y[i].abs() - half_thickness_0012(r.x[i].clamp(0.0, 1.0))).abs())
        .fold(0.0, f64::max);
    assert!(worst < 1e-5, "max ordinate error {worst}");
}

#[test]
fn repanel_keeps_a_blunt_trailing_edge_and_concentrates_panels() {
    let s = naca4(0.02, 0.4, 0.12, false, 120).unwrap();
    let r = repanel(&s, 200).unwrap();
    let n = r.len();
    assert_eq!((r.x[0], r.y[0]), (s.x[0], s.y[0]));
    assert_eq!(
        (r.x[n - 1], r.y[n - 1]),
        (s.x[s.len() - 1], s.y[s.len() - 1])
    );
    let d: Vec<f64> = (0..n - 1)
        .map(|i| (r.x[i + 1] - r.x[i]).hypot(r.y[i + 1] - r.y[i]))
        .collect();
    let le = (0..n).min_by(|&a, &b| r.x[a].total_cmp(&r.x[b])).unwrap();
    let mid = (0..le)
        .min_by(|&a, &b| (r.x[a] - 0.5).abs().total_cmp(&(r.x[b] - 0.5).abs()))
        .unwrap();
    // Leading-edge and trailing-edge panels are much shorter than mid-chord panels.
    assert!(d[le] < 0.3 * d[mid], "{} vs {}", d[le], d[mid]);
    assert!(d[0] < 0.5 * d[mid] && d[n - 2] < 0.5 * d[mid]);
    // Neighbouring panels differ by less than 30 %.
    for i in 1..d.len() {
        let ratio = d[i].max(d[i - 1]) / d[i].min(d[i - 1]);
        assert!(ratio < 1.3, "panel {i}: ratio {ratio}");
    }
}

#[test]
fn repanel_rejects_too_few_panels() {
    let s = naca4(0.0, 0.0, 0.12, false, 50).unwrap();
    assert!(repanel(&s, 5).is_err());
}

#[test]
fn lower_trailing_edge_density_gives_longer_trailing_edge_panels() {
    // Common practice: the trailing-edge term only redistributes points, the outline stays.
    let s = naca4(0.0, 0.0, 0.12, false, 201).unwrap();
    let te_panel = |r: &wakerank_solver::geometry::Section| {
        let n = r.len();
        let first = (r.x[1] - r.x[0]).hypot(r.y[1] - r.y[0]);
        let last = (r.x[n - 1] - r.x[n - 2]).hypot(r.y[n - 1] - r.y[n - 2]);
        first.min(last)
    };
    let default = repanel(&s, DEFAULT_PANELS).unwrap();
    let same = repanel_with_trailing_edge_density(&s, DEFAULT_PANELS, 4.0).unwrap();
    assert_eq!(default, same);
    let coarse = repanel_with_trailing_edge_density(&s, DEFAULT_PANELS, 1.0).unwrap();
    assert_eq!(coarse.len(), DEFAULT_PANELS + 1);
    assert_eq!((coarse.x[0], coarse.y[0]), (s.x[0], s.y[0]));
    assert!(te_panel(&coarse) > 1.3 * te_panel(&default));
    println!(
        "trailing-edge panel {} -> {}",
        te_panel(&default),
        te_panel(&coarse)
    );
    let worst = (0..coarse.len())
        .map(|i| (coarse.y[i].abs() - half_thickness_0012(coarse.x[i].clamp(0.0, 1.0))).abs())
        .fold(0.0, f64::max);
    assert!(worst < 1e-5, "max ordinate error {worst}");
    assert!(repanel_with_trailing_edge_density(&s, DEFAULT_PANELS, -1.0).is_err());
}
