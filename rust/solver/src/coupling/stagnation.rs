//! Locating the stagnation point and splitting the surface into its two boundary layers.
//!
//! The surface nodes run from the upper trailing edge over the leading edge to the lower
//! trailing edge. With the surface speed taken positive for flow running towards the upper
//! trailing edge (decreasing node index), the stagnation point is where that speed changes
//! from positive to negative. It moves with the angle of attack and, slightly, with the
//! displacement effect, so it is located afresh in every outer iteration.

use crate::error::{Result, SolverError};

/// Where the surface speed vanishes: between `node` and `node + 1`, at arc length `s`.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct StagnationPoint {
    /// Last node on the upper side.
    pub node: usize,
    /// Arc length of the stagnation point, measured like the panel nodes' arc length.
    pub s: f64,
    /// Coordinates of the stagnation point.
    pub x: f64,
    /// Coordinates of the stagnation point.
    pub y: f64,
}

/// Node indices and arc length from the stagnation point of one side, ordered downstream.
#[derive(Debug, Clone, PartialEq)]
pub struct SideNodes {
    /// Surface node indices, first the one nearest the stagnation point, last the trailing edge.
    pub nodes: Vec<usize>,
    /// Arc length from the stagnation point of each node (strictly increasing, > 0).
    pub s: Vec<f64>,
}

/// The two sides of the surface as seen by the boundary layer.
#[derive(Debug, Clone, PartialEq)]
pub struct SurfaceSplit {
    /// The stagnation point.
    pub stagnation: StagnationPoint,
    /// Upper side: nodes `stagnation.node` down to 0.
    pub upper: SideNodes,
    /// Lower side: nodes `stagnation.node + 1` up to the last.
    pub lower: SideNodes,
}

/// Smallest arc length allowed between the stagnation point and the first station, chords;
/// keeps the first station off the singular stagnation point.
const MIN_FIRST_STATION_S: f64 = 1.0e-6;

/// Locate the stagnation point from the signed surface speed `speed_upper_positive` (positive
/// for flow towards the upper trailing edge) at nodes with arc length `arc` and coordinates
/// `x`, `y`. Among several sign changes, the one nearest the leading edge (smallest x) wins,
/// so that reversed flow near a trailing edge cannot capture it. The position is linearly
/// interpolated between the two nodes that bracket the sign change.
pub fn locate_stagnation(
    speed_upper_positive: &[f64],
    arc: &[f64],
    x: &[f64],
    y: &[f64],
) -> Result<StagnationPoint> {
    let n = speed_upper_positive.len();
    if n < 4 || arc.len() != n || x.len() != n || y.len() != n {
        return Err(SolverError::Internal(format!(
            "stagnation search needs matching arrays of at least 4 nodes, got {n}"
        )));
    }
    let mut best: Option<(f64, usize)> = None;
    for i in 0..n - 1 {
        let (a, b) = (speed_upper_positive[i], speed_upper_positive[i + 1]);
        if a.is_nan() || b.is_nan() {
            return Err(SolverError::Convergence(
                "surface speed holds NaN: no stagnation point".into(),
            ));
        }
        if a >= 0.0 && b < 0.0 {
            let xm = x[i].min(x[i + 1]);
            if best.is_none_or(|(bx, _)| xm < bx) {
                best = Some((xm, i));
            }
        }
    }
    let Some((_, i)) = best else {
        return Err(SolverError::Convergence(
            "surface speed never changes sign from the upper to the lower side: no stagnation point"
                .into(),
        ));
    };
    let (a, b) = (speed_upper_positive[i], speed_upper_positive[i + 1]);
    let t = a / (a - b);
    Ok(StagnationPoint {
        node: i,
        s: arc[i] + t * (arc[i + 1] - arc[i]),
        x: x[i] + t * (x[i + 1] - x[i]),
        y: y[i] + t * (y[i + 1] - y[i]),
    })
}

/// Fraction of its panel within which a node counts as lying on the stagnation point itself.
const ON_STAGNATION_FRACTION: f64 = 0.05;

/// Split the surface nodes at the stagnation point into the upper and lower sides, each with
/// its arc length measured from the stagnation point. A node lying on the stagnation point
/// (within 5 % of its panel, as at α = 0 on a symmetric section) carries no boundary layer of
/// its own and is left out of both sides: the march starts at the next node.
pub fn split_surface(stagnation: StagnationPoint, arc: &[f64]) -> SurfaceSplit {
    let k = stagnation.node;
    let near = |node: usize, neighbour: usize| {
        (arc[node] - stagnation.s).abs()
            < ON_STAGNATION_FRACTION * (arc[neighbour] - arc[node]).abs()
    };
    let mut upper_nodes: Vec<usize> = (0..=k).rev().collect();
    if k > 0 && upper_nodes.len() > 2 && near(k, k - 1) {
        upper_nodes.remove(0);
    }
    let mut lower_nodes: Vec<usize> = (k + 1..arc.len()).collect();
    if k + 2 < arc.len() && lower_nodes.len() > 2 && near(k + 1, k + 2) {
        lower_nodes.remove(0);
    }
    let side = |nodes: Vec<usize>, sign: f64| {
        let mut s = Vec::with_capacity(nodes.len());
        let mut last = 0.0_f64;
        for &node in &nodes {
            let value = (sign * (arc[node] - stagnation.s)).max(last + MIN_FIRST_STATION_S);
            s.push(value);
            last = value;
        }
        SideNodes { nodes, s }
    };
    SurfaceSplit {
        stagnation,
        upper: side(upper_nodes, -1.0),
        lower: side(lower_nodes, 1.0),
    }
}

/// Arc lengths from the stagnation point at which the upper and lower layers are tripped, for
/// trips at x/c `trips` = [on the section's upper surface, on its lower surface].
///
/// The surfaces are the contour's two parts either side of the leading edge (the node of least
/// x): nodes 0 to it (upper), it to the last (lower). Each trip sits at the first point of its
/// surface, going aft from the leading edge, with that x; a layer is tripped at the first trip
/// it passes over, whichever surface it is on — at a high angle of attack the upper layer
/// starts on the lower surface and passes the lower-surface trip on its way to the leading
/// edge, and the upper-surface trip lies on the upper surface, not where the layer first has
/// that x. A layer whose own surface's trip lies ahead of its start (between the leading edge
/// and a stagnation point beyond the trip) is tripped at its start, as a trip in the
/// stagnation region it starts from. `arc` and `x` are the surface nodes' arc lengths (from
/// the upper trailing edge) and abscissae; `None` for a layer that passes no trip.
pub fn layer_trips(
    split: &SurfaceSplit,
    arc: &[f64],
    x: &[f64],
    trips: [Option<f64>; 2],
) -> [Option<f64>; 2] {
    let n = arc.len().min(x.len());
    if n < 2 {
        return [None, None];
    }
    let leading_edge = (0..n).min_by(|&a, &b| x[a].total_cmp(&x[b])).unwrap_or(0);
    let stagnation = split.stagnation.s;
    let mut out = [None::<f64>; 2];
    let mut trip_layer = |layer: usize, s: f64| {
        let s = s.max(0.0);
        out[layer] = Some(out[layer].map_or(s, |t: f64| t.min(s)));
    };
    for (surface, x_trip) in trips.iter().enumerate() {
        let Some(x_trip) = *x_trip else { continue };
        // Contour arc length of the trip: from the leading edge aft along the surface.
        let along: Vec<usize> = if surface == 0 {
            (0..=leading_edge).rev().collect()
        } else {
            (leading_edge..n).collect()
        };
        let at = if x_trip <= x[leading_edge] {
            Some(arc[leading_edge])
        } else {
            along.windows(2).find(|w| x[w[1]] >= x_trip).map(|w| {
                let (p, q) = (w[0], w[1]);
                let t = ((x_trip - x[p]) / (x[q] - x[p])).clamp(0.0, 1.0);
                arc[p] + t * (arc[q] - arc[p])
            })
        };
        let Some(at) = at else { continue };
        // The layer that passes over it: the upper one runs from the stagnation point towards
        // decreasing arc length, the lower one towards increasing.
        let on_upper_layer = at <= stagnation;
        trip_layer(usize::from(!on_upper_layer), (stagnation - at).abs());
        // On the other layer's path, the stagnation point lies on this surface aft of the
        // trip: this surface's own layer starts tripped.
        if (surface == 0) != on_upper_layer {
            trip_layer(surface, 0.0);
        }
    }
    out
}

/// x of a side at arc length `s` from the stagnation point (linear between nodes).
pub fn x_at_arc_length(side: &SideNodes, x: &[f64], s: f64, stagnation_x: f64) -> f64 {
    let mut prev_s = 0.0;
    let mut prev_x = stagnation_x;
    for (&node, &sn) in side.nodes.iter().zip(&side.s) {
        if sn >= s {
            let t = if sn > prev_s {
                (s - prev_s) / (sn - prev_s)
            } else {
                1.0
            };
            return prev_x + t.clamp(0.0, 1.0) * (x[node] - prev_x);
        }
        prev_s = sn;
        prev_x = x[node];
    }
    prev_x
}

#[cfg(test)]
mod tests {
    use super::*;

    /// A circle's surface speed in uniform flow is 2 sin(θ − α) (potential flow, any textbook,
    /// e.g. Katz & Plotkin §3.11): the stagnation point sits at the angle α on the front.
    fn circle(n: usize, alpha: f64) -> (Vec<f64>, Vec<f64>, Vec<f64>, Vec<f64>) {
        // Nodes from the rear (θ = 0) counter-clockwise over the top to the rear again.
        let mut x = Vec::new();
        let mut y = Vec::new();
        let mut q = Vec::new();
        let mut s = Vec::new();
        for i in 0..n {
            let th = 2.0 * std::f64::consts::PI * (i as f64 + 0.5) / n as f64;
            x.push(0.5 + 0.5 * th.cos());
            y.push(0.5 * th.sin());
            // Counter-clockwise tangential speed is −2 sin(θ − α); flow towards the upper
            // rear (clockwise) is positive in our convention.
            q.push(2.0 * (th - alpha).sin());
            s.push(0.5 * th);
        }
        (q, s, x, y)
    }

    #[test]
    fn stagnation_on_a_circle_follows_the_angle_of_attack() {
        for alpha_deg in [-8.0_f64, 0.0, 5.0, 12.0] {
            let alpha = alpha_deg.to_radians();
            let (q, s, x, y) = circle(181, alpha);
            let st = locate_stagnation(&q, &s, &x, &y).unwrap();
            // Front stagnation at θ = π + α, arc length 0.5 (π + α).
            let expected = 0.5 * (std::f64::consts::PI + alpha);
            assert!(
                (st.s - expected).abs() < 1e-3,
                "{alpha_deg}: {} vs {expected}",
                st.s
            );
            let split = split_surface(st, &s);
            let total = split.upper.nodes.len() + split.lower.nodes.len();
            assert!(total == 181 || total == 180, "{total}");
            assert!(split.upper.s.windows(2).all(|w| w[1] > w[0]));
            assert!(split.lower.s.windows(2).all(|w| w[1] > w[0]));
            assert!(split.upper.s[0] > 0.0 && split.lower.s[0] > 0.0);
            assert_eq!(*split.upper.nodes.last().unwrap(), 0);
        }
    }

    /// A stagnation point on a node (symmetric flow): that node belongs to neither layer.
    #[test]
    fn node_on_the_stagnation_point_is_left_out() {
        let arc: Vec<f64> = (0..9).map(|i| i as f64).collect();
        let st = StagnationPoint {
            node: 4,
            s: 4.0,
            x: 0.0,
            y: 0.0,
        };
        let split = split_surface(st, &arc);
        assert_eq!(split.upper.nodes, vec![3, 2, 1, 0]);
        assert_eq!(split.lower.nodes, vec![5, 6, 7, 8]);
        assert!((split.upper.s[0] - 1.0).abs() < 1e-12 && (split.lower.s[0] - 1.0).abs() < 1e-12);
    }

    #[test]
    fn no_sign_change_is_an_error() {
        let q = vec![1.0; 10];
        let s: Vec<f64> = (0..10).map(|i| i as f64).collect();
        assert!(locate_stagnation(&q, &s, &s, &s).is_err());
    }

    /// A contour of 9 nodes on a wedge-like section: upper surface nodes 0–4 (x 1.0 … 0.0,
    /// the leading edge at node 4), lower 4–8; arc length = distance in x along the contour.
    fn wedge() -> (Vec<f64>, Vec<f64>) {
        let x = vec![1.0, 0.75, 0.5, 0.25, 0.0, 0.25, 0.5, 0.75, 1.0];
        let arc = vec![0.0, 0.25, 0.5, 0.75, 1.0, 1.25, 1.5, 1.75, 2.0];
        (x, arc)
    }

    fn split_at(arc: &[f64], x: &[f64], stagnation_s: f64) -> SurfaceSplit {
        let node = arc
            .iter()
            .rposition(|&a| a <= stagnation_s)
            .unwrap()
            .min(arc.len() - 2);
        let t = (stagnation_s - arc[node]) / (arc[node + 1] - arc[node]);
        let st = StagnationPoint {
            node,
            s: stagnation_s,
            x: x[node] + t * (x[node + 1] - x[node]),
            y: 0.0,
        };
        split_surface(st, arc)
    }

    /// Our design (docs/method.md, "Stagnation point"): a trip sits on its own surface at its
    /// x/c and trips whichever layer passes over it; a layer whose own surface's trip lies
    /// ahead of its start starts tripped.
    #[test]
    fn trips_sit_on_their_surface_and_trip_the_layer_passing_over_them() {
        let (x, arc) = wedge();
        let close = |a: Option<f64>, b: f64| a.is_some_and(|a| (a - b).abs() < 1e-12);
        // Stagnation point at the leading edge: each layer meets its own trip at x/c.
        let split = split_at(&arc, &x, 1.0);
        let [u, l] = layer_trips(&split, &arc, &x, [Some(0.3), Some(0.6)]);
        assert!(close(u, 0.3) && close(l, 0.6), "{u:?} {l:?}");
        // High angle of attack: stagnation point on the lower surface at x 0.2 (arc 1.2). The
        // upper layer passes the lower trip at x 0.1 (arc 1.1) first, 0.1 from its start; the
        // lower layer starts aft of its own trip and starts tripped.
        let split = split_at(&arc, &x, 1.2);
        let [u, l] = layer_trips(&split, &arc, &x, [Some(0.3), Some(0.1)]);
        assert!(close(u, 0.1) && close(l, 0.0), "{u:?} {l:?}");
        // An upper trip alone lies on the upper surface, 0.5 along the upper layer (0.2 to the
        // leading edge, 0.3 beyond it), not at the layer's start.
        let [u, l] = layer_trips(&split, &arc, &x, [Some(0.3), None]);
        assert!(close(u, 0.5) && l.is_none(), "{u:?} {l:?}");
        // A lower trip aft of the stagnation point trips the lower layer only.
        let [u, l] = layer_trips(&split, &arc, &x, [None, Some(0.5)]);
        assert!(u.is_none() && close(l, 0.3), "{u:?} {l:?}");
        // Beyond the trailing edge: no trip.
        assert_eq!(
            layer_trips(&split, &arc, &x, [Some(1.5), None]),
            [None, None]
        );
    }

    #[test]
    fn arc_length_maps_to_x() {
        let side = SideNodes {
            nodes: vec![0, 1, 2],
            s: vec![0.1, 0.2, 0.3],
        };
        let x = [0.1, 0.2, 0.3];
        assert!((x_at_arc_length(&side, &x, 0.25, 0.0) - 0.25).abs() < 1e-12);
    }
}
