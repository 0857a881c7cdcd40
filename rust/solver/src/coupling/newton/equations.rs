//! Every station's residuals as a function of the unknowns, and their linearisation by
//! forward differences for the Newton step.

use crate::boundary_layer::intervals::{
    laminar_interval_residual_between, merged_wake_start, start_residual,
    transition_station_residual, turbulent_interval_residual, turbulent_residuals_between,
    upwinded_weight, LaminarEnd, StationState,
};
use crate::boundary_layer::lag_entrainment::{turbulent_start, TurbulentTerms};
use crate::boundary_layer::{LayerState, Regime};

use super::elimination::{StationLinearisation, MAX_EQUATIONS, SHARED_LOCAL};
use super::layout::{Layout, Role};
use super::{norm_squared, station_state, CoupledProblem, NodeVars, Unknowns};

/// A side's trailing-edge state as it enters the wake: a layer still laminar there becomes
/// turbulent at the trailing edge (the wake equations are turbulent), with the turbulent start
/// of any transition; so the wake's start is continuous when transition moves off the trailing
/// edge (a transition point at the very end of the last interval gives the same state).
pub(super) fn wake_side_state(reynolds: f64, state: &LayerState, regime: Regime) -> LayerState {
    if regime == Regime::Laminar {
        turbulent_start(state, reynolds)
    } else {
        *state
    }
}

/// The closure terms of one station as the end of an ordinary interval: laminar, or turbulent
/// (with the interval's wake flag). Each forward difference of the linearisation perturbs one
/// station, and the terms of the other end are the same numbers as at the iterate, so they are
/// computed once per station ([`EndTable`]).
#[derive(Debug, Clone, Copy)]
enum EndTerms {
    Laminar(LaminarEnd),
    Turbulent { terms: TurbulentTerms, wake: bool },
}

/// No ends computed in advance.
const NO_ENDS: [Option<EndTerms>; 2] = [None, None];

/// Every station's [`EndTerms`] at the iterate and at the forward-difference perturbation of
/// each of its four variables (ln θ, third, m, ue), for all stations' linearisations at once:
/// each station is the end of two intervals, and each end used to be evaluated for every
/// perturbation of either station.
pub(super) struct EndTable {
    base: Vec<EndTerms>,
    perturbed: Vec<[EndTerms; 4]>,
}

/// The ends of station k's interval (own station first) when it is an ordinary one; `residual`
/// uses them only for laminar and turbulent intervals, and only where they are of the kind it
/// needs.
fn ordinary_ends(layout: &Layout, ends: &[EndTerms], k: usize) -> [Option<EndTerms>; 2] {
    if layout.role[k] == Role::Interval {
        [Some(ends[k]), Some(ends[k - 1])]
    } else {
        NO_ENDS
    }
}

/// Forward-difference step of variable `v` (ln θ, third, m, ue, transition unknowns) at value
/// `x`, for a laminar or a turbulent station.
fn difference_step(v: usize, x: f64, laminar: bool) -> f64 {
    let typical = match v {
        0 => 1.0,
        1 if laminar => 1.0,
        1 => 0.01,
        2 => 1e-6,
        3 => 0.1,
        _ => 1.0,
    };
    DIFFERENCE_STEP * x.abs().max(typical)
}

/// Relative size of the forward-difference steps (about the square root of the rounding
/// error of the residuals, common practice).
const DIFFERENCE_STEP: f64 = 1e-7;

impl CoupledProblem<'_> {
    /// Stations a station's residuals depend on: itself first.
    pub(super) fn involved(
        &self,
        layout: &Layout,
        unknowns: &Unknowns,
        k: usize,
    ) -> ([usize; 3], usize) {
        match layout.role[k] {
            // The velocity gradient at the stagnation point comes from both sides' first
            // stations (see `residual`).
            Role::Start => {
                let other = if layout.upper.start == k {
                    layout.lower.start
                } else {
                    layout.upper.start
                };
                ([k, other, k], 2)
            }
            // A transition station also uses the laminar station two back (the shape factor
            // at the transition point is extrapolated from it).
            Role::Interval
                if unknowns.transition[k].is_some() && layout.role[k - 1] == Role::Interval =>
            {
                ([k, k - 1, k - 2], 3)
            }
            Role::Interval => ([k, k - 1, k], 2),
            Role::WakeFirst => {
                let [u, l] = layout.trailing_edges();
                ([k, u, l], 3)
            }
        }
    }

    /// Base weight of the integration rule of the interval into station k: backward Euler on
    /// the first interval of a side and of the wake (the start states are only approximate),
    /// the trapezoidal rule elsewhere (raised towards backward Euler where H changes fast).
    fn weight(&self, layout: &Layout, k: usize) -> f64 {
        let first = match layout.role[k] {
            Role::WakeFirst => true,
            Role::Interval => layout.role[k - 1] == Role::Start,
            Role::Start => false,
        };
        if first {
            1.0
        } else {
            0.5
        }
    }

    /// Weight of the integration rule of the interval into station k from shape factor `h_a`
    /// to `h_b`: the base weight, raised towards backward Euler where H changes fast.
    pub(super) fn interval_weight(&self, layout: &Layout, k: usize, h_a: f64, h_b: f64) -> f64 {
        self.weight(layout, k).max(upwinded_weight(h_a, h_b))
    }

    /// Number of local unknowns of station k (besides its mass defect).
    pub(super) fn local_count(&self, unknowns: &Unknowns, k: usize) -> usize {
        if unknowns.transition[k].is_some() {
            4
        } else {
            2
        }
    }

    /// Residuals of station k for the given variables of its involved stations (the first
    /// `n` entries are used, n = local unknowns + 1).
    fn residual(
        &self,
        layout: &Layout,
        unknowns: &Unknowns,
        k: usize,
        vars: &[NodeVars; 3],
        ends: &[Option<EndTerms>; 2],
    ) -> [f64; MAX_EQUATIONS] {
        let ctx = &self.ctx;
        let (involved, _) = self.involved(layout, unknowns, k);
        let regime = |p: usize| unknowns.regime[involved[p]];
        let b = station_state(&vars[0], regime(0));
        let mut out = [0.0; MAX_EQUATIONS];
        let mut put = |r: &[f64]| out[..r.len()].copy_from_slice(r);
        match layout.role[k] {
            Role::Start => {
                // Hiemenz flow: ue = K·s on both sides of the stagnation point, so
                // K = (ue_upper + ue_lower)/(s_upper + s_lower) over the two first stations,
                // whose arc-length sum does not depend on where the point lies between them.
                let other = involved[1];
                let gradient_s = layout.s[k] + layout.s[other];
                let gradient_ue = vars[0].ue.max(1e-9) + vars[1].ue.max(1e-9);
                put(&start_residual(
                    ctx,
                    &b,
                    gradient_s,
                    gradient_ue,
                    regime(0) != Regime::Laminar,
                ));
            }
            Role::WakeFirst => {
                let upper = wake_side_state(
                    ctx.reynolds,
                    &station_state(&vars[1], regime(1)).state,
                    regime(1),
                );
                let lower = wake_side_state(
                    ctx.reynolds,
                    &station_state(&vars[2], regime(2)).state,
                    regime(2),
                );
                let merged = merged_wake_start(&upper, &lower);
                let ds = layout.s[k] - self.wake_origin;
                let w = self.interval_weight(layout, k, merged.shape_factor, b.state.shape_factor);
                put(&turbulent_interval_residual(
                    ctx, &merged, &b.state, ds, w, true,
                ));
            }
            Role::Interval => {
                let a = station_state(&vars[1], regime(1));
                let (sa, sb) = (layout.s[k - 1], layout.s[k]);
                let upwinded =
                    self.interval_weight(layout, k, a.state.shape_factor, b.state.shape_factor);
                match (regime(1), regime(0)) {
                    (Regime::Laminar, Regime::Laminar) => {
                        let end = |e: Option<EndTerms>, s: &StationState| match e {
                            Some(EndTerms::Laminar(t)) => t,
                            _ => ctx.laminar_end(&s.state),
                        };
                        let (at_a, at_b) = (end(ends[1], &a), end(ends[0], &b));
                        put(&laminar_interval_residual_between(
                            &a,
                            &at_a,
                            &b,
                            &at_b,
                            sb - sa,
                            upwinded,
                        ));
                    }
                    (Regime::Laminar, _) => {
                        let side = layout.side_of(k).min(1);
                        // A pinned point is held at its interval's end like a trip there.
                        let trip = match unknowns.pinned_fraction(side, layout.nodes[k]) {
                            Some(f) => Some((sa + f.max(1e-9) * (sb - sa)).min(sb)),
                            None => layout.trips[side],
                        };
                        let previous =
                            (involved[2] + 2 == k && regime(2) == Regime::Laminar).then(|| {
                                let st = station_state(&vars[2], regime(2)).state;
                                (st.shape_factor, layout.s[k - 2])
                            });
                        put(&transition_station_residual(
                            ctx,
                            previous,
                            &a,
                            &b,
                            vars[0].transition,
                            sa,
                            sb,
                            trip,
                        ));
                    }
                    (_, r) => {
                        let wake = r == Regime::Wake;
                        let end = |e: Option<EndTerms>, s: &StationState| match e {
                            Some(EndTerms::Turbulent { terms, wake: w }) if w == wake => terms,
                            _ => TurbulentTerms::new(&s.state, ctx.reynolds, wake),
                        };
                        let (at_a, at_b) = (end(ends[1], &a), end(ends[0], &b));
                        put(&turbulent_residuals_between(
                            &a.state,
                            &at_a,
                            &b.state,
                            &at_b,
                            sb - sa,
                            upwinded,
                        ))
                    }
                }
            }
        }
        out
    }

    /// The end terms of a station with variables `v` in `regime`.
    fn end_of(&self, v: &NodeVars, regime: Regime) -> EndTerms {
        let state = station_state(v, regime).state;
        if regime == Regime::Laminar {
            EndTerms::Laminar(self.ctx.laminar_end(&state))
        } else {
            let wake = regime == Regime::Wake;
            let terms = TurbulentTerms::new(&state, self.ctx.reynolds, wake);
            EndTerms::Turbulent { terms, wake }
        }
    }

    /// Every station's [`EndTerms`] at the iterate.
    fn iterate_ends(&self, unknowns: &Unknowns, ue: &[f64]) -> Vec<EndTerms> {
        (0..unknowns.regime.len())
            .map(|j| self.end_of(&self.vars_of(unknowns, ue, j), unknowns.regime[j]))
            .collect()
    }

    /// The [`EndTable`] of the iterate.
    pub(super) fn end_table(&self, unknowns: &Unknowns, ue: &[f64]) -> EndTable {
        let perturbed = (0..unknowns.regime.len())
            .map(|j| {
                let regime = unknowns.regime[j];
                let vars = self.vars_of(unknowns, ue, j);
                std::array::from_fn(|v| {
                    let x = vars.get(v);
                    let mut perturbed = vars;
                    perturbed.set(v, x + difference_step(v, x, regime == Regime::Laminar));
                    self.end_of(&perturbed, regime)
                })
            })
            .collect();
        EndTable {
            base: self.iterate_ends(unknowns, ue),
            perturbed,
        }
    }

    fn vars_of(&self, unknowns: &Unknowns, ue: &[f64], j: usize) -> NodeVars {
        NodeVars {
            ln_theta: unknowns.ln_theta[j],
            third: unknowns.third[j],
            m: unknowns.m[j],
            ue: ue[j],
            transition: unknowns.transition[j].unwrap_or([0.0; 2]),
        }
    }

    /// Residuals of station k and their derivatives by forward differences.
    pub(super) fn linearise(
        &self,
        layout: &Layout,
        unknowns: &Unknowns,
        ue: &[f64],
        ends: &EndTable,
        k: usize,
    ) -> StationLinearisation {
        let (involved, count) = self.involved(layout, unknowns, k);
        let mut vars = [NodeVars::default(); 3];
        for p in 0..count {
            vars[p] = self.vars_of(unknowns, ue, involved[p]);
        }
        let n_local = self.local_count(unknowns, k);
        let rows = n_local + 1;
        let base_ends = ordinary_ends(layout, &ends.base, k);
        let base = self.residual(layout, unknowns, k, &vars, &base_ends);
        let mut lin = StationLinearisation {
            involved,
            count,
            n_local,
            residual: base,
            ..Default::default()
        };
        for p in 0..count {
            let laminar = unknowns.regime[involved[p]] == Regime::Laminar;
            // Variables: ln θ, third, m, ue, then (own station only) the transition unknowns.
            let n_vars = if p == 0 {
                4 + (n_local - SHARED_LOCAL)
            } else {
                4
            };
            for v in 0..n_vars {
                let x = vars[p].get(v);
                let h = difference_step(v, x, laminar);
                let mut perturbed = vars;
                perturbed[p].set(v, x + h);
                // The perturbed end's terms from the table, the other end's as at the iterate.
                let mut perturbed_ends = base_ends;
                if let Some(end) = perturbed_ends.get_mut(p).filter(|e| e.is_some()) {
                    *end = (v < 4).then(|| ends.perturbed[involved[p]][v]);
                }
                let r = self.residual(layout, unknowns, k, &perturbed, &perturbed_ends);
                for row in 0..rows {
                    let d = (r[row] - base[row]) / h;
                    match v {
                        0 | 1 => lin.d_local[p][row][v] = d,
                        2 => lin.d_mass[p][row] = d,
                        3 => lin.d_speed[p][row] = d,
                        _ => lin.d_local[p][row][v - 2] = d,
                    }
                }
            }
        }
        lin
    }

    /// Residuals of every station at the current iterate (no derivatives).
    pub(super) fn residuals(
        &self,
        layout: &Layout,
        unknowns: &Unknowns,
        ue: &[f64],
    ) -> Vec<[f64; MAX_EQUATIONS]> {
        let ends = self.iterate_ends(unknowns, ue);
        (0..layout.len())
            .map(|k| {
                let (involved, count) = self.involved(layout, unknowns, k);
                let mut vars = [NodeVars::default(); 3];
                for p in 0..count {
                    vars[p] = self.vars_of(unknowns, ue, involved[p]);
                }
                self.residual(layout, unknowns, k, &vars, &ordinary_ends(layout, &ends, k))
            })
            .collect()
    }

    /// Sum of squared residuals of every station (the merit function of the line search), at
    /// the edge speeds `ue` of the iterate's mass defects when they are known.
    pub(super) fn residual_norm(
        &self,
        layout: &Layout,
        unknowns: &Unknowns,
        ue: Option<Vec<f64>>,
    ) -> f64 {
        let ue = ue.unwrap_or_else(|| layout.edge_speeds(&unknowns.m));
        let ends = self.iterate_ends(unknowns, &ue);
        let mut total = 0.0;
        for k in 0..layout.len() {
            let (involved, count) = self.involved(layout, unknowns, k);
            let mut vars = [NodeVars::default(); 3];
            for p in 0..count {
                vars[p] = self.vars_of(unknowns, &ue, involved[p]);
            }
            let rows = self.local_count(unknowns, k) + 1;
            let r = self.residual(layout, unknowns, k, &vars, &ordinary_ends(layout, &ends, k));
            total += norm_squared(&r[..rows]);
        }
        if total.is_finite() {
            total
        } else {
            f64::INFINITY
        }
    }
}
