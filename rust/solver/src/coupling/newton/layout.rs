//! Which nodes carry unknowns in the coupled Newton iteration, in which order, and how their
//! edge speeds follow from the mass defects.
//!
//! Stations are ordered upper side (stagnation point to trailing edge), lower side, then the
//! wake from its second node: the wake's first node is the trailing edge itself, whose state
//! is the merge of the two sides' trailing-edge states, so it carries no unknowns of its own,
//! and its mass defect (the sum of the two sides') is folded into their influence columns.
//!
//! A surface node much closer to the stagnation point than the next node of its side carries
//! no unknowns either: its first interval would span a large ratio of edge speeds (ue ≈ K·s
//! near the point), where one-step quadrature of the integral equations is poor and the edge
//! speed changes sign as the point moves across the node. Its mass defect follows the side's
//! first station as the Hiemenz solution does (δ* constant, ue ∝ s: m ∝ s), so it vanishes as
//! the point reaches the node and the station set stays put while the point crosses it.

use std::ops::Range;
use std::sync::Arc;

use crate::linalg::DenseMatrix;

use super::super::model::CaseModel;
use super::super::stagnation::{layer_trips, SideNodes, SurfaceSplit};

/// What a station's residuals start from.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub(crate) enum Role {
    /// First station of a side: the stagnation-point similarity solution.
    Start,
    /// An interval from the previous station.
    Interval,
    /// First wake unknown: an interval from the merged trailing-edge state.
    WakeFirst,
}

/// Station order, positions and the edge-speed model of one stagnation split.
#[derive(Clone)]
pub(crate) struct Layout {
    /// The surface split the stations follow.
    pub split: SurfaceSplit,
    /// Case node of each station.
    pub nodes: Vec<usize>,
    /// Arc length of each station: from the stagnation point on the surface, from the trailing
    /// edge in the wake.
    pub s: Vec<f64>,
    /// Role of each station.
    pub role: Vec<Role>,
    /// Upper-side stations.
    pub upper: Range<usize>,
    /// Lower-side stations.
    pub lower: Range<usize>,
    /// Wake stations (wake nodes from the second on).
    pub wake: Range<usize>,
    /// Trip arc length of the upper and lower side, if a trip lies on it.
    pub trips: [Option<f64>; 2],
    /// Inviscid edge speed of each station (positive downstream).
    pub ue_inviscid: Vec<f64>,
    /// ∂ue_k/∂m_l between stations (trailing-edge columns include the merged wake node, and
    /// each side's first column its node left out at the stagnation point).
    pub influence: Arc<DenseMatrix>,
    /// `influence` before the nodes left out at the stagnation point are folded in: it depends
    /// on the station nodes and the stagnation node alone, so a layout of the same stations
    /// reuses it ([`Layout::new`]).
    unfolded: Arc<DenseMatrix>,
    /// Surface nodes left out at the stagnation point: (node, first station of its side,
    /// m_node / m_station).
    pub near_stagnation: Vec<(usize, usize, f64)>,
    /// The influence matrix the Newton step is solved with when it differs from `influence`
    /// (with the wake-curvature sheet's mass-defect terms, `newton::curvature`).
    pub jacobian_influence: Option<DenseMatrix>,
}

/// A side's first node is left out when it is closer to the stagnation point than this
/// fraction of the next node's distance (our choice: the first interval then spans an
/// edge-speed ratio of at most about four).
const NEAR_STAGNATION_FRACTION: f64 = 0.25;

/// Removes from `side` a first node much closer to the stagnation point than the next one;
/// returns it with its arc length.
fn trim_near_stagnation(side: &mut SideNodes) -> Option<(usize, f64)> {
    if side.nodes.len() > 3 && side.s[0] < NEAR_STAGNATION_FRACTION * side.s[1] {
        let node = side.nodes.remove(0);
        let s = side.s.remove(0);
        Some((node, s))
    } else {
        None
    }
}

/// Edge speeds of the stations at `nodes` without their mass defects: the inviscid speeds plus
/// `speed_offset`, signed positive downstream.
fn base_edge_speeds(
    case: &CaseModel,
    nodes: &[usize],
    stag: usize,
    speed_offset: &[f64],
) -> Vec<f64> {
    nodes
        .iter()
        .map(|&node| {
            let extra = speed_offset.get(node).copied().unwrap_or(0.0);
            case.edge_sign(node, stag) * (case.q_inviscid[node] + extra)
        })
        .collect()
}

impl Layout {
    /// Builds the layout of `split` for the case, with trips at x/c `trips` (upper, lower) and
    /// the node speeds `speed_offset` (coupling convention, e.g. of the wake-curvature sheet)
    /// added to the inviscid ones. When `previous` has the same stations and stagnation node
    /// (the usual case between Newton steps: the stagnation point moves within its panel), its
    /// station-to-station influence is reused instead of rebuilt; the result is the same.
    pub(crate) fn new(
        case: &CaseModel,
        mut split: SurfaceSplit,
        trips: [Option<f64>; 2],
        speed_offset: &[f64],
        previous: Option<&Layout>,
    ) -> Self {
        let ns = case.n_surface;
        let stag = split.stagnation.node;
        // Nodes the split already left out (on the stagnation point) and those trimmed here.
        let mut left_out: Vec<(usize, usize, f64)> = Vec::new();
        for node in [stag, stag + 1] {
            if node < ns && !split.upper.nodes.contains(&node) && !split.lower.nodes.contains(&node)
            {
                let side = usize::from(node > stag);
                left_out.push((node, side, (case.arc[node] - split.stagnation.s).abs()));
            }
        }
        for (side, nodes) in [&mut split.upper, &mut split.lower].into_iter().enumerate() {
            if let Some((node, s)) = trim_near_stagnation(nodes) {
                left_out.push((node, side, s));
            }
        }
        let mut nodes = Vec::new();
        let mut s = Vec::new();
        let mut role = Vec::new();
        for side in [&split.upper, &split.lower] {
            for (i, (&node, &sv)) in side.nodes.iter().zip(&side.s).enumerate() {
                nodes.push(node);
                s.push(sv);
                role.push(if i == 0 { Role::Start } else { Role::Interval });
            }
        }
        let upper = 0..split.upper.nodes.len();
        let lower = upper.end..nodes.len();
        for j in 1..case.wake_s.len() {
            nodes.push(ns + j);
            s.push(case.wake_s[j]);
            role.push(if j == 1 {
                Role::WakeFirst
            } else {
                Role::Interval
            });
        }
        let wake = lower.end..nodes.len();
        let k_total = nodes.len();
        let ue_inviscid = base_edge_speeds(case, &nodes, stag, speed_offset);
        let te = [upper.end - 1, lower.end - 1];
        let near_stagnation: Vec<(usize, usize, f64)> = left_out
            .into_iter()
            .map(|(node, side, d)| {
                let first = if side == 0 { upper.start } else { lower.start };
                (node, first, d / s[first].max(f64::MIN_POSITIVE))
            })
            .collect();
        let reusable = previous.filter(|p| p.split.stagnation.node == stag && p.nodes == nodes);
        let unfolded = match reusable {
            Some(p) => Arc::clone(&p.unfolded),
            None => {
                let mut unfolded = DenseMatrix::zeros(k_total, k_total);
                let has_wake = case.n_total() > ns;
                for (k, &node_k) in nodes.iter().enumerate() {
                    let row = unfolded.row_mut(k);
                    for (l, &node_l) in nodes.iter().enumerate() {
                        row[l] = case.influence_between(node_k, node_l, stag);
                    }
                    if has_wake {
                        let folded = case.influence_between(node_k, ns, stag);
                        row[te[0]] += folded;
                        row[te[1]] += folded;
                    }
                }
                Arc::new(unfolded)
            }
        };
        let influence = if near_stagnation.is_empty() {
            Arc::clone(&unfolded)
        } else {
            let mut folded = (*unfolded).clone();
            for (k, &node_k) in nodes.iter().enumerate() {
                let row = folded.row_mut(k);
                for &(node, first, ratio) in &near_stagnation {
                    row[first] += ratio * case.influence_between(node_k, node, stag);
                }
            }
            Arc::new(folded)
        };
        let trip_s = layer_trips(&split, &case.arc, &case.x[..case.n_surface], trips);
        Layout {
            split,
            nodes,
            s,
            role,
            upper,
            lower,
            wake,
            trips: trip_s,
            ue_inviscid,
            influence,
            unfolded,
            near_stagnation,
            jacobian_influence: None,
        }
    }

    /// Replaces the speeds added to the inviscid ones by `speed_offset` (see [`Layout::new`]).
    pub(crate) fn set_speed_offset(&mut self, case: &CaseModel, speed_offset: &[f64]) {
        let stag = self.split.stagnation.node;
        self.ue_inviscid = base_edge_speeds(case, &self.nodes, stag, speed_offset);
    }

    /// The influence matrix of the Newton step: `jacobian_influence` when set, else
    /// `influence`.
    pub(crate) fn step_influence(&self) -> &DenseMatrix {
        self.jacobian_influence.as_ref().unwrap_or(&self.influence)
    }

    /// Number of stations.
    pub(crate) fn len(&self) -> usize {
        self.nodes.len()
    }

    /// Edge speeds of every station for mass defects `m`: ue = ue_inv + D·m.
    pub(crate) fn edge_speeds(&self, m: &[f64]) -> Vec<f64> {
        self.edge_speeds_with_induced(&self.influence.matvec(m))
    }

    /// Edge speeds from the speeds `induced` = D·m the mass defects induce (one product
    /// shared by two sets of inviscid speeds, `newton::curvature`).
    pub(crate) fn edge_speeds_with_induced(&self, induced: &[f64]) -> Vec<f64> {
        induced
            .iter()
            .zip(&self.ue_inviscid)
            .map(|(induced, base)| base + induced)
            .collect()
    }

    /// The two trailing-edge stations (last upper, last lower).
    pub(crate) fn trailing_edges(&self) -> [usize; 2] {
        [self.upper.end - 1, self.lower.end - 1]
    }

    /// Which side (0 upper, 1 lower, 2 wake) a station is on.
    pub(crate) fn side_of(&self, k: usize) -> usize {
        if self.upper.contains(&k) {
            0
        } else if self.lower.contains(&k) {
            1
        } else {
            2
        }
    }

    /// Mass defect of every case node (boundary-layer sense): the stations' own, the merged
    /// trailing-edge node's as the sum of the two sides', and a node left out at the
    /// stagnation point its side's first station's in proportion to arc length.
    pub(crate) fn node_mass_defect(&self, case: &CaseModel, m: &[f64]) -> Vec<f64> {
        let mut full = vec![0.0; case.n_total()];
        for (&node, &v) in self.nodes.iter().zip(m) {
            full[node] = v;
        }
        if case.n_total() > case.n_surface {
            let [u, l] = self.trailing_edges();
            full[case.n_surface] = m[u] + m[l];
        }
        for &(node, first, ratio) in &self.near_stagnation {
            full[node] = ratio * m[first];
        }
        full
    }
}
