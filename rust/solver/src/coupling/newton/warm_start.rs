//! The iterate kept between neighbouring angles, and how it is mapped onto the stations of a
//! new case: by arc length from the stagnation point on each side (the boundary layer near the
//! leading edge depends on the distance from the stagnation point, which moves with the angle),
//! by position in the wake.

use crate::boundary_layer::laminar::{stagnation_theta, STAGNATION_SHAPE_FACTOR};
use crate::boundary_layer::Regime;

use super::super::iteration::CoupledSolution;
use super::super::model::CaseModel;
use super::layout::{Layout, Role};
use super::Unknowns;

/// Fixed-point passes that set the mass defects of a mapped state from its θ and H.
const MAPPING_PASSES: usize = 4;
/// Stations after a side's start that the later passes adjust, and that a move of the
/// stagnation point within one case re-maps by arc length (`keep_downstream_states`).
const NEAR_START_STATIONS: usize = 4;

/// The states along one side (or the wake), ordered downstream.
#[derive(Debug, Clone, PartialEq, Default)]
pub(crate) struct SideProfile {
    pub s: Vec<f64>,
    pub ln_theta: Vec<f64>,
    pub shape_factor: Vec<f64>,
    /// N while laminar, CE when turbulent or in the wake.
    pub third: Vec<f64>,
    pub regime: Vec<Regime>,
}

impl SideProfile {
    fn push(&mut self, s: f64, ln_theta: f64, shape_factor: f64, third: f64, regime: Regime) {
        if ln_theta.is_finite() && shape_factor.is_finite() && third.is_finite() {
            self.s.push(s);
            self.ln_theta.push(ln_theta);
            self.shape_factor.push(shape_factor);
            self.third.push(third);
            self.regime.push(regime);
        }
    }

    /// State at arc length `s`: linear between the two stations around it when they share a
    /// regime, the nearer one's otherwise, the end ones' outside.
    fn at(&self, s: f64) -> Option<(f64, f64, f64, Regime)> {
        let n = self.s.len();
        if n == 0 {
            return None;
        }
        let take = |i: usize| {
            Some((
                self.ln_theta[i],
                self.shape_factor[i],
                self.third[i],
                self.regime[i],
            ))
        };
        let upper = self.s.partition_point(|&v| v <= s);
        if upper == 0 {
            return take(0);
        }
        if upper == n {
            return take(n - 1);
        }
        let (i, j) = (upper - 1, upper);
        let t = (s - self.s[i]) / (self.s[j] - self.s[i]).max(1e-300);
        if self.regime[i] != self.regime[j] {
            return take(if t < 0.5 { i } else { j });
        }
        let lerp = |a: &[f64]| a[i] + t * (a[j] - a[i]);
        Some((
            lerp(&self.ln_theta),
            lerp(&self.shape_factor),
            lerp(&self.third),
            self.regime[i],
        ))
    }
}

/// A complete iterate: the warm start of a neighbouring angle.
#[derive(Debug, Clone, PartialEq, Default)]
pub(crate) struct NewtonState {
    /// Upper side, lower side, wake.
    pub sides: [SideProfile; 3],
    /// Last node on the upper side.
    pub stagnation_node: usize,
    /// Mass defect of every case node.
    pub node_mass_defect: Vec<f64>,
    /// Whether the mapped unknowns keep these mass defects away from the stagnation point
    /// instead of re-forming them from θ, H and the edge speeds they induce (a state carried
    /// over from another panelling: on the short trailing-edge panels of the finer one, the
    /// edge speed of an interpolated mass defect is off by tens of per cent, and re-forming
    /// the mass defect from it would start the saw-tooth mode of that fixed point).
    pub keeps_mass_defect: bool,
}

impl NewtonState {
    /// The state of a solution of either iteration (the quasi-simultaneous one gives the
    /// coupled Newton iteration its first iterate).
    pub(crate) fn from_coupled(sol: &CoupledSolution) -> Self {
        let mut sides: [SideProfile; 3] = Default::default();
        for (profile, side) in sides.iter_mut().zip([&sol.upper, &sol.lower, &sol.wake]) {
            for st in &side.stations {
                let third = if st.regime == Regime::Laminar {
                    st.amplification
                } else {
                    st.shear_lag
                };
                profile.push(st.s, st.theta.ln(), st.shape_factor, third, st.regime);
            }
        }
        NewtonState {
            sides,
            stagnation_node: sol.split.stagnation.node,
            node_mass_defect: sol.mass_defect.clone(),
            keeps_mass_defect: false,
        }
    }

    /// This state, a solution of case `from`, carried over to case `to`: the same section and
    /// angle panelled differently (nested iteration from a coarse model). The side profiles
    /// are functions of arc length from the stagnation point (surface) or from the trailing
    /// edge (wake) and carry over as they are; the node mass defects are interpolated
    /// linearly, along the contour in fractions of its length and along the wake in distance
    /// from the trailing edge; the stagnation node is `to`'s last node before the same
    /// contour position.
    pub(crate) fn on_case(&self, from: &CaseModel, to: &CaseModel) -> NewtonState {
        let fraction = |case: &CaseModel| -> Vec<f64> {
            let arc = &case.arc[..case.n_surface];
            let total = arc.last().copied().unwrap_or(1.0).max(f64::MIN_POSITIVE);
            arc.iter().map(|a| a / total).collect()
        };
        let (from_t, to_t) = (fraction(from), fraction(to));
        let ns_from = from.n_surface;
        let surface = &self.node_mass_defect[..ns_from.min(self.node_mass_defect.len())];
        let wake = self.node_mass_defect.get(ns_from..).unwrap_or(&[]);
        let mut node_mass_defect = Vec::with_capacity(to.n_total());
        node_mass_defect.extend(to_t.iter().map(|&t| interpolate(&from_t, surface, t)));
        let from_wake = &from.wake_s[..wake.len().min(from.wake_s.len())];
        node_mass_defect.extend(to.wake_s.iter().map(|&s| interpolate(from_wake, wake, s)));
        let stagnation_t = from_t.get(self.stagnation_node).copied().unwrap_or(0.5);
        let stagnation_node = to_t
            .partition_point(|&t| t <= stagnation_t)
            .saturating_sub(1)
            .min(to.n_surface.saturating_sub(2));
        NewtonState {
            sides: self.sides.clone(),
            stagnation_node,
            node_mass_defect,
            keeps_mass_defect: true,
        }
    }

    /// The unknowns of `layout` from this state, with consistent regimes: each side laminar
    /// from its start, turbulent from its first turbulent station on. `ue_of` gives the edge
    /// speeds of a mass-defect vector; `make_turbulent` converts a station.
    pub(crate) fn unknowns_for(
        &self,
        layout: &Layout,
        reynolds: f64,
        mut make_turbulent: impl FnMut(&mut Unknowns, &[f64], usize),
    ) -> Unknowns {
        let k_total = layout.len();
        let mut unknowns = Unknowns {
            ln_theta: vec![0.0; k_total],
            third: vec![0.0; k_total],
            m: vec![0.0; k_total],
            regime: vec![Regime::Laminar; k_total],
            transition: vec![None; k_total],
            pinned: [None; 2],
        };
        let mut shape = vec![2.0; k_total];
        for k in 0..k_total {
            let side = layout.side_of(k);
            let wake = side == 2;
            let (ln_theta, h, third, regime) = self.sides[side].at(layout.s[k]).unwrap_or((
                (1e-3_f64).ln(),
                2.0,
                if wake { 0.02 } else { 0.0 },
                Regime::Laminar,
            ));
            unknowns.ln_theta[k] = ln_theta;
            unknowns.third[k] = third;
            unknowns.regime[k] = if wake { Regime::Wake } else { regime };
            shape[k] = h;
            unknowns.m[k] = self
                .node_mass_defect
                .get(layout.nodes[k])
                .copied()
                .filter(|v| v.is_finite() && *v > 0.0)
                .unwrap_or(1e-4);
        }
        // Shape factor and θ kept at each station's edge speed (a few fixed-point passes, as
        // the edge speeds move with the mass defects); a side's first station starts from the
        // similarity solution.
        for pass in 0..MAPPING_PASSES {
            let ue = layout.edge_speeds(&unknowns.m);
            for k in 0..k_total {
                // Later passes only near the stagnation points, where ue is small and moves
                // most; elsewhere (at the trailing edge the self-influence times δ* nears one)
                // repeated passes would not settle.
                let near_start = [layout.upper.start, layout.lower.start]
                    .iter()
                    .any(|&first| k >= first && k < first + NEAR_START_STATIONS);
                if (pass > 0 || self.keeps_mass_defect) && !near_start {
                    continue;
                }
                let u = ue[k].max(1e-3);
                if layout.role[k] == Role::Start && unknowns.regime[k] == Regime::Laminar {
                    // The velocity gradient of both first stations, as the start residual has it.
                    let (a, b) = (layout.upper.start, layout.lower.start);
                    let theta = stagnation_theta(
                        layout.s[a] + layout.s[b],
                        ue[a].max(1e-9) + ue[b].max(1e-9),
                        reynolds,
                    );
                    unknowns.ln_theta[k] = theta.ln();
                    unknowns.third[k] = 0.0;
                    shape[k] = STAGNATION_SHAPE_FACTOR;
                }
                unknowns.m[k] = shape[k] * unknowns.ln_theta[k].exp() * u;
            }
        }
        let ue = layout.edge_speeds(&unknowns.m);
        for range in [layout.upper.clone(), layout.lower.clone()] {
            if let Some(t) = range
                .clone()
                .find(|&k| unknowns.regime[k] != Regime::Laminar)
            {
                for k in t..range.end {
                    if unknowns.regime[k] == Regime::Laminar {
                        make_turbulent(&mut unknowns, &ue, k);
                    }
                }
            }
        }
        unknowns
    }
}

/// The piecewise-linear interpolant of (`x`, `y`) at `t` (x increasing), held constant beyond
/// the ends; 0 without points.
fn interpolate(x: &[f64], y: &[f64], t: f64) -> f64 {
    let n = x.len().min(y.len());
    if n == 0 {
        return 0.0;
    }
    let upper = x[..n].partition_point(|&v| v <= t);
    if upper == 0 {
        return y[0];
    }
    if upper == n {
        return y[n - 1];
    }
    let (i, j) = (upper - 1, upper);
    let w = (t - x[i]) / (x[j] - x[i]).max(f64::MIN_POSITIVE);
    y[i] + w * (y[j] - y[i])
}

/// After the stagnation point of one case has moved to another node: every station beyond the
/// first `NEAR_START_STATIONS` of its side (and every wake station) whose node was on the same
/// side before, in the same regime, gets that node's previous unknowns back instead of the
/// state mapped by arc length from the new stagnation point. Away from the leading edge the
/// layer belongs to the surface, not to the distance from the stagnation point: shifting a
/// steep trailing-edge state by the point's movement (a fraction of a panel) upset the edge
/// speeds there enough to wreck the iterate (family sweep 224 → 227 of 228 converged;
/// docs/validation.md, robustness).
pub(super) fn keep_downstream_states(
    layout: &Layout,
    unknowns: &mut Unknowns,
    previous_layout: &Layout,
    previous: &Unknowns,
) {
    let ranges = |l: &Layout| [l.upper.clone(), l.lower.clone(), l.wake.clone()];
    let node_count = layout
        .nodes
        .iter()
        .chain(&previous_layout.nodes)
        .max()
        .map_or(0, |n| n + 1);
    let sides = ranges(layout).into_iter().zip(ranges(previous_layout));
    for (side, (range, old_range)) in sides.enumerate() {
        let skip = if side == 2 { 0 } else { NEAR_START_STATIONS };
        let mut old_station = vec![None; node_count];
        for j in old_range.skip(skip) {
            old_station[previous_layout.nodes[j]] = Some(j);
        }
        for k in range.skip(skip) {
            let Some(j) = old_station[layout.nodes[k]] else {
                continue;
            };
            if previous.regime[j] != unknowns.regime[k] {
                continue;
            }
            unknowns.ln_theta[k] = previous.ln_theta[j];
            unknowns.third[k] = previous.third[j];
            unknowns.m[k] = previous.m[j];
            unknowns.transition[k] = previous.transition[j];
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::coupling::model::SectionModel;
    use crate::coupling::settings::ViscousSettings;
    use crate::geometry::naca;

    /// Carried over to a case of twice the panels, a state keeps its node mass defects at the
    /// same places (contour fraction on the surface, distance from the trailing edge in the
    /// wake) and its stagnation point (common practice: linear interpolation of a smooth
    /// function is second-order accurate; within 1e-4 relative on the surface, within the
    /// interpolation bound in the wake).
    #[test]
    fn a_state_carries_over_to_a_finer_panelling() {
        let section = naca::from_designation("0012", false, 200).unwrap();
        let case = |panels: usize| {
            let settings = ViscousSettings {
                panels,
                ..ViscousSettings::new(1e6)
            };
            let model = SectionModel::new(&section, &settings).unwrap();
            CaseModel::new(&model, 2.0, &settings).unwrap()
        };
        let (coarse, fine) = (case(160), case(320));
        let surface = |t: f64| 1e-3 * (1.0 + t * t);
        let wake = |s: f64| 5e-3 * (-s).exp();
        let fraction = |c: &CaseModel, n: usize| c.arc[n] / c.arc[c.n_surface - 1];
        let mut node_mass_defect: Vec<f64> = (0..coarse.n_surface)
            .map(|n| surface(fraction(&coarse, n)))
            .collect();
        node_mass_defect.extend(coarse.wake_s.iter().map(|&s| wake(s)));
        let stagnation_node = coarse.n_surface / 2;
        let state = NewtonState {
            sides: Default::default(),
            stagnation_node,
            node_mass_defect,
            keeps_mass_defect: false,
        };
        let carried = state.on_case(&coarse, &fine);
        assert!(carried.keeps_mass_defect);
        assert_eq!(carried.node_mass_defect.len(), fine.n_total());
        for n in 0..fine.n_surface {
            let expected = surface(fraction(&fine, n));
            let got = carried.node_mass_defect[n];
            assert!(
                (got / expected - 1.0).abs() < 1e-4,
                "node {n}: {got} {expected}"
            );
        }
        // In the wake, whose intervals grow downstream, the bound of linear interpolation:
        // h²/8 · max |f''| over the interval, ≤ h²/8 · e^h · f(s) for the exponential, h the
        // coarse interval around s.
        for (j, &s) in fine.wake_s.iter().enumerate() {
            let w = &coarse.wake_s;
            let s = s.min(*w.last().unwrap());
            let i = w.partition_point(|&v| v <= s).clamp(1, w.len() - 1);
            let h = w[i] - w[i - 1];
            let bound = h * h / 8.0 * h.exp() + 1e-12;
            let got = carried.node_mass_defect[fine.n_surface + j];
            assert!(
                (got / wake(s) - 1.0).abs() <= bound,
                "wake node {j}: {got} {}",
                wake(s)
            );
        }
        let point = fraction(&coarse, stagnation_node);
        let node = carried.stagnation_node;
        assert!(fraction(&fine, node) <= point && point < fraction(&fine, node + 1));
    }
}
