"""Reference cases: wakerank's results beside published measurements and correlations.

Used by ``wakerank validate``, the reference tests and ``scripts/validation_plots.py``. Each
comparison names its source. Published values:

- NACA 0012 at M = 0.15: Ladson, NASA TM-4074 (1988), Table I (free transition at
  Re = 2e6, 3.94e6, 5.97e6) and transition fixed by grit at x/c = 0.05 (Re = 6e6);
  shipped in ``wakerank/data`` (see its README).
- NACA 0012 at Re 6e6, free transition, in another low-turbulence tunnel: Abbott & von
  Doenhoff, *Theory of Wing Sections*, section data (values read from the figure,
  approximate): cd ≈ 0.0058 near zero lift, 0.0066 at cl 0.46.
- Lift slope of the NACA 0012: McCroskey, AGARD CP-429 / NASA TM-100019 (1988), fit
  dcl/dα = (0.1025 + 0.00485 log10(Re/1e6)) / √(1 − M²) per degree.
- Maximum lift of the NACA 0012 at M 0.15: Ladson, NASA TM-4074 (1988): 1.61–1.63 near 17°
  tripped at Re 6e6; 1.66 (Re 5.97e6) and 1.41 (Re 2e6) with free transition.
- Speed along the wake behind symmetric Kármán–Trefftz sections: the exact potential flow of
  the conformal map (Milne-Thomson, *Theoretical Aerodynamics*, §5).
- Flat plates, one side: Blasius CF = 1.328/√Re (Schlichting & Gersten, *Boundary-Layer
  Theory*) and Kármán–Schoenherr 0.242/√CF = log10(Re·CF) (turbulent, tripped at the
  leading edge).
"""

from __future__ import annotations

import math
from dataclasses import dataclass
from importlib import resources

import numpy as np
import polars as pl

from wakerank import _core

#: Angles of the Ladson tables compared (attached flow, well below maximum lift).
ALPHA_RANGE_DEG = (-4.5, 10.5)


@dataclass(frozen=True)
class Comparison:
    """One computed value beside its published counterpart."""

    case: str
    quantity: str
    condition: str
    published: float
    computed: float
    source: str

    @property
    def deviation(self) -> float:
        """Relative deviation (computed − published) / published."""
        if self.published == 0 or not math.isfinite(self.computed):
            return float("nan")
        return (self.computed - self.published) / abs(self.published)


def reference_table(name: str) -> pl.DataFrame:
    """A shipped reference table (file stem in ``wakerank/data``) as a polars frame."""
    with resources.files("wakerank.data").joinpath(f"{name}.csv").open("rb") as handle:
        return pl.read_csv(handle)


def naca0012():
    """The NACA 0012 section (Abbott & von Doenhoff thickness, blunt 0.126 % trailing edge)."""
    import wakerank as wr

    return wr.Section.naca("0012")


def ladson_free_transition(panels: int = 160) -> list[Comparison]:
    """NACA 0012, M 0.15, free transition (N = 9) vs Ladson NASA TM-4074 Table I: cl and cd."""
    import wakerank as wr

    table = reference_table("ladson1988_naca0012_free_transition_M015")
    out: list[Comparison] = []
    section = naca0012()
    for reynolds in sorted(set(table["Re"].to_list())):
        rows = table.filter(
            (pl.col("Re") == reynolds) & pl.col("alpha_deg").is_between(*ALPHA_RANGE_DEG)
        ).sort("alpha_deg")
        polar = wr.analyze(
            section, alpha_deg=rows["alpha_deg"].to_list(), reynolds=reynolds, mach=0.15,
            panels=panels,
        )
        for ref, got in zip(rows.iter_rows(named=True), polar.iter_rows(named=True)):
            cond = f"Re {reynolds:.3g}, α {ref['alpha_deg']:+.2f}°"
            src = "Ladson NASA TM-4074 Table I"
            cd = got["cd"] if got["converged"] else float("nan")
            out.append(Comparison("NACA 0012 free transition", "cd", cond, ref["cd"], cd, src))
            if abs(ref["cl"]) > 0.1:
                cl = got["cl"] if got["converged"] else float("nan")
                out.append(Comparison("NACA 0012 free transition", "cl", cond, ref["cl"], cl, src))
    return out


#: Abbott & von Doenhoff, Theory of Wing Sections, section data, NACA 0012 at Re 6e6 with free
#: transition, read from the figure (approximate): (cl, cd).
ABBOTT_VON_DOENHOFF_FREE_RE6E6 = ((0.0, 0.0058), (0.46, 0.0066))


def abbott_free_transition(panels: int = 160) -> list[Comparison]:
    """NACA 0012, Re 6e6, free transition (N = 9) vs Abbott & von Doenhoff's figure: cd at the
    figure's lift coefficients (solved for that cl; M 0.15 like the Ladson cases)."""
    import wakerank as wr

    out: list[Comparison] = []
    src = "Abbott & von Doenhoff, section data (figure, approximate)"
    for cl, cd_published in ABBOTT_VON_DOENHOFF_FREE_RE6E6:
        try:
            row = wr.solve_for_cl(naca0012(), cl=cl, reynolds=6e6, mach=0.15, panels=panels)
            cd = row["cd"][0] if row["converged"][0] else float("nan")
        except wr.ConvergenceError:
            cd = float("nan")
        out.append(Comparison("NACA 0012 free transition", "cd", f"Re 6e6, cl {cl:.2f}",
                              cd_published, cd, src))
    return out


def ladson_tripped(panels: int = 160) -> list[Comparison]:
    """NACA 0012, M 0.15, Re 6e6, trips at x/c 0.05 vs Ladson NASA TM-4074 (grit 80): cl, cd."""
    import wakerank as wr

    table = reference_table("ladson1988_naca0012_tripped_Re6e6_M015")
    rows = table.filter(
        (pl.col("grit") == 80) & pl.col("alpha_deg").is_between(*ALPHA_RANGE_DEG)
    ).sort("alpha_deg")
    polar = wr.analyze(
        naca0012(), alpha_deg=rows["alpha_deg"].to_list(), reynolds=6e6, mach=0.15,
        trip_upper=0.05, trip_lower=0.05, panels=panels,
    )
    out: list[Comparison] = []
    src = "Ladson NASA TM-4074, grit 80 at x/c 0.05"
    for ref, got in zip(rows.iter_rows(named=True), polar.iter_rows(named=True)):
        cond = f"Re 6e6 tripped, α {ref['alpha_deg']:+.2f}°"
        cd = got["cd"] if got["converged"] else float("nan")
        out.append(Comparison("NACA 0012 tripped x/c 0.05", "cd", cond, ref["cd"], cd, src))
        if abs(ref["cl"]) > 0.1:
            cl = got["cl"] if got["converged"] else float("nan")
            out.append(Comparison("NACA 0012 tripped x/c 0.05", "cl", cond, ref["cl"], cl, src))
    return out


def mccroskey_lift_slope(reynolds: float, mach: float) -> float:
    """McCroskey's NACA 0012 lift-slope fit, per degree (AGARD CP-429, 1988)."""
    return (0.1025 + 0.00485 * math.log10(reynolds / 1e6)) / math.sqrt(1.0 - mach * mach)


def lift_slope(panels: int = 160) -> list[Comparison]:
    """Lift slope over 0°–6° of the tripped NACA 0012 at Re 6e6, M 0.15, vs McCroskey's fit."""
    import wakerank as wr

    alphas = [0.0, 2.0, 4.0, 6.0]
    polar = wr.analyze(
        naca0012(), alpha_deg=alphas, reynolds=6e6, mach=0.15, trip_upper=0.05,
        trip_lower=0.05, panels=panels,
    )
    ok = polar.filter(pl.col("converged"))
    slope = (
        float(np.polyfit(ok["alpha_deg"].to_numpy(), ok["cl"].to_numpy(), 1)[0])
        if ok.height >= 2
        else float("nan")
    )
    return [
        Comparison(
            "NACA 0012 lift slope", "dcl/dα per deg", "Re 6e6, M 0.15, 0°–6°",
            mccroskey_lift_slope(6e6, 0.15), slope, "McCroskey AGARD CP-429 (1988) fit",
        )
    ]


#: Maximum lift of the NACA 0012 at M 0.15 (Ladson, NASA TM-4074, 1988; values as collected in
#: the project's reference notes): (label, Reynolds number, trip x/c or None, published cl_max,
#: angles swept in 1° steps).
LADSON_MAXIMUM_LIFT = (
    ("tripped x/c 0.05", 6e6, 0.05, 1.62, (12, 18)),
    ("free transition", 5.97e6, None, 1.66, (14, 20)),
    ("free transition", 2.0e6, None, 1.41, (12, 18)),
)


def maximum_lift(panels: int = 160) -> list[Comparison]:
    """Largest converged cl of the NACA 0012 (M 0.15) beside Ladson's maximum lift.

    The computed value is the largest cl among the converged points of a sweep in 1° steps;
    where the iteration stops converging before the lift falls it is the model's lift at the
    last converged angle, not a stall it predicted (docs/validation.md, "Maximum lift").
    """
    import wakerank as wr

    out: list[Comparison] = []
    for label, reynolds, trip, published, (first, last) in LADSON_MAXIMUM_LIFT:
        polar = wr.analyze(
            naca0012(), alpha_deg=[float(a) for a in range(first, last + 1)],
            reynolds=reynolds, mach=0.15, trip_upper=trip, trip_lower=trip, panels=panels,
        )
        ok = polar.filter(pl.col("converged"))
        computed = float(ok["cl"].max()) if ok.height else float("nan")
        out.append(Comparison(
            f"NACA 0012 {label}", "cl_max", f"Re {reynolds:.3g}, α {first}°–{last}°",
            published, computed, "Ladson NASA TM-4074",
        ))
    return out


def karman_schoenherr(reynolds: float) -> float:
    """Kármán–Schoenherr one-side turbulent plate CF: 0.242/√CF = log10(Re·CF), solved."""
    cf = 0.074 * reynolds**-0.2
    for _ in range(100):
        # Fixed point on CF = (0.242 / log10(Re·CF))².
        cf = (0.242 / math.log10(reynolds * cf)) ** 2
    return cf


def flat_plates() -> list[Comparison]:
    """Flat plates, one side: laminar vs Blasius, tripped at the leading edge vs Kármán–Schoenherr."""
    out: list[Comparison] = []
    for reynolds in (1e5, 1e6):
        got = _core.flat_plate_drag(reynolds, tripped=False)
        out.append(Comparison("flat plate, laminar", "CF one side", f"Re {reynolds:.0e}",
                              1.328 / math.sqrt(reynolds), got, "Blasius (Schlichting & Gersten)"))
    for reynolds in (1e6, 1e7):
        got = _core.flat_plate_drag(reynolds, tripped=True)
        out.append(Comparison("flat plate, turbulent", "CF one side", f"Re {reynolds:.0e}",
                              karman_schoenherr(reynolds), got, "Kármán–Schoenherr"))
    return out


#: Symmetric Kármán–Trefftz sections (circle centre, trailing-edge angle) of the wake check:
#: about 12 % and 15 % thick.
WAKE_CHECK_SECTIONS = ((-0.07, 10.0), (-0.10, 10.0))


def wake_recovery(panels: int = 160) -> list[Comparison]:
    """Edge speed along the wake behind symmetric Kármán–Trefftz sections at zero incidence,
    0.25 to 2 chords behind the trailing edge: panel method beside the exact potential flow.
    How fast it returns to free stream sets how much θ still changes in the wake."""
    distances = [0.25, 1.0, 2.0]
    src = "exact potential flow (conformal map, Milne-Thomson §5)"
    out: list[Comparison] = []
    for center_x, angle in WAKE_CHECK_SECTIONS:
        thickness, computed, exact = _core.karman_trefftz_wake_speeds(
            center_x, angle, panels, distances
        )
        case = f"Kármán–Trefftz t/c {thickness:.3f}, α 0°"
        for d, got, want in zip(distances, computed, exact, strict=True):
            out.append(Comparison(case, "wake speed / U∞", f"{d:g} c behind TE",
                                  float(want), float(got), src))
    return out


def run_all(panels: int = 160) -> pl.DataFrame:
    """Every reference comparison as a table: case, quantity, condition, published, computed,
    deviation (relative), source."""
    comparisons = (
        ladson_free_transition(panels)
        + abbott_free_transition(panels)
        + ladson_tripped(panels)
        + lift_slope(panels)
        + maximum_lift(panels)
        + flat_plates()
        + wake_recovery(panels)
    )
    return pl.DataFrame(
        {
            "case": [c.case for c in comparisons],
            "quantity": [c.quantity for c in comparisons],
            "condition": [c.condition for c in comparisons],
            "published": [c.published for c in comparisons],
            "computed": [c.computed for c in comparisons],
            "deviation": [c.deviation for c in comparisons],
            "source": [c.source for c in comparisons],
        },
        schema_overrides={"published": pl.Float64, "computed": pl.Float64, "deviation": pl.Float64},
    )


__all__ = [
    "Comparison",
    "reference_table",
    "run_all",
    "ladson_free_transition",
    "ladson_tripped",
    "lift_slope",
    "maximum_lift",
    "flat_plates",
    "wake_recovery",
    "karman_schoenherr",
    "mccroskey_lift_slope",
]
