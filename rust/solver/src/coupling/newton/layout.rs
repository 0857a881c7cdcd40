//! Which nodes carry unknowns in the coupled Newton iteration, in which order, and how their
//! edge speeds follow from the mass defects.
//!
//! Stations are ordered upper side (stagnation point to trailing edge), lower side, then the
//! wake from its second node: the wake's first node is the trailing edge itself, whose state
//! is the merge of the two sides' trailing-edge states, so it carries no unknowns of its own,
//! and its mass defect (the sum of the two sides') is folded into their influence columns.

use std::ops::Range;

use crate::linalg::DenseMatrix;

use super::super::model::CaseModel;
use super::super::stagnation::{arc_length_at_x, SurfaceSplit};

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
    /// ∂ue_k/∂m_l between stations (trailing-edge columns include the merged wake node).
    pub influence: DenseMatrix,
}

impl Layout {
    /// Builds the layout of `split` for the case, with trips at x/c `trips` (upper, lower).
    pub(crate) fn new(case: &CaseModel, split: SurfaceSplit, trips: [Option<f64>; 2]) -> Self {
        let ns = case.n_surface;
        let stag = split.stagnation.node;
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
        let ue_inviscid = nodes
            .iter()
            .map(|&node| case.edge_sign(node, stag) * case.q_inviscid[node])
            .collect();
        let te = [upper.end - 1, lower.end - 1];
        let mut influence = DenseMatrix::zeros(k_total, k_total);
        let has_wake = case.n_total() > ns;
        for (k, &node_k) in nodes.iter().enumerate() {
            let row = influence.row_mut(k);
            for (l, &node_l) in nodes.iter().enumerate() {
                row[l] = case.influence_between(node_k, node_l, stag);
            }
            if has_wake {
                let folded = case.influence_between(node_k, ns, stag);
                row[te[0]] += folded;
                row[te[1]] += folded;
            }
        }
        let trip_s = [
            trips[0].and_then(|xt| arc_length_at_x(&split.upper, &case.x, xt, split.stagnation.x)),
            trips[1].and_then(|xt| arc_length_at_x(&split.lower, &case.x, xt, split.stagnation.x)),
        ];
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
        }
    }

    /// Number of stations.
    pub(crate) fn len(&self) -> usize {
        self.nodes.len()
    }

    /// Edge speeds of every station for mass defects `m`: ue = ue_inv + D·m.
    pub(crate) fn edge_speeds(&self, m: &[f64]) -> Vec<f64> {
        self.influence
            .matvec(m)
            .into_iter()
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
    /// trailing-edge node's as the sum of the two sides', zero on a node left out at the
    /// stagnation point.
    pub(crate) fn node_mass_defect(&self, case: &CaseModel, m: &[f64]) -> Vec<f64> {
        let mut full = vec![0.0; case.n_total()];
        for (&node, &v) in self.nodes.iter().zip(m) {
            full[node] = v;
        }
        if case.n_total() > case.n_surface {
            let [u, l] = self.trailing_edges();
            full[case.n_surface] = m[u] + m[l];
        }
        full
    }
}
