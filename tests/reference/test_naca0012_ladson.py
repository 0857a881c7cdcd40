"""NACA 0012 at M = 0.15 against Ladson, NASA TM-4074 (1988), Langley LTPT (and, for free
transition at Re 6e6, against Abbott & von Doenhoff's figure).

Reference values from the report's Table I (free transition) and the grit-trip runs at
x/c = 0.05 (Re 6e6), shipped in wakerank/data (see its README). Tolerances are the ones the
project set for these checks: cd within 10 %, lift slope within 5 %.
"""

from __future__ import annotations

import numpy as np
import polars as pl
import pytest

import wakerank as wr
from wakerank.validation import mccroskey_lift_slope, reference_table


@pytest.fixture(scope="module")
def naca0012():
    return wr.Section.naca("0012")


@pytest.mark.xfail(
    reason="known miss, docs/validation.md: the point converges at cd 0.00556, 14 % below "
    "Ladson's 0.0065 (transition predicted at x/c 0.37 with N = 9)",
    strict=False,
)
def test_free_transition_cd_at_zero_lift_re6e6(naca0012):
    # Ladson NASA TM-4074 Table I: cd = 0.0065 at Re 5.97e6, α = 0.05° [T].
    table = reference_table("ladson1988_naca0012_free_transition_M015")
    ref = table.filter((pl.col("Re") == 5.97e6) & (pl.col("alpha_deg").abs() < 0.1)).row(0, named=True)
    polar = wr.analyze(naca0012, alpha_deg=ref["alpha_deg"], reynolds=5.97e6, mach=0.15)
    assert polar["converged"][0]
    assert polar["cd"][0] == pytest.approx(ref["cd"], rel=0.10)


def test_free_transition_cd_re6e6_against_abbott_von_doenhoff():
    # Abbott & von Doenhoff, Theory of Wing Sections (section data), NACA 0012 at Re 6e6, free
    # transition, read from the figure [T, approximate]: cd 0.0058 near zero lift, 0.0066 at
    # cl 0.46 (../shared/guide/reference-data.md). The same 10 % as the Ladson check: the two
    # tunnels' free-transition drags differ by about 12 % at this Reynolds number.
    from wakerank.validation import abbott_free_transition

    for comparison in abbott_free_transition():
        assert comparison.computed == pytest.approx(comparison.published, rel=0.10), comparison


def test_tripped_cd_at_zero_lift_re6e6(naca0012):
    # Ladson NASA TM-4074, grit at x/c 0.05, Re 6e6: cd = 0.0080–0.0081 near α = 0 [T].
    table = reference_table("ladson1988_naca0012_tripped_Re6e6_M015")
    near_zero = table.filter(pl.col("alpha_deg").abs() < 0.1)
    published = float(near_zero["cd"].mean())
    polar = wr.analyze(
        naca0012, alpha_deg=0.0, reynolds=6e6, mach=0.15, trip_upper=0.05, trip_lower=0.05
    )
    assert polar["converged"][0]
    assert polar["cd"][0] == pytest.approx(published, rel=0.10)


def test_tripped_lift_slope_re6e6(naca0012):
    # Ladson NASA TM-4074 tripped runs: 0.1065–0.1078 per degree over 0°–10° [C from the table];
    # McCroskey AGARD CP-429 (1988) fit: 0.1075 per degree at Re 6e6, M 0.15. Within 5 %.
    alphas = [0.0, 2.0, 4.0, 6.0, 8.0]
    polar = wr.analyze(
        naca0012, alpha_deg=alphas, reynolds=6e6, mach=0.15, trip_upper=0.05, trip_lower=0.05
    )
    assert polar["converged"].all()
    slope = np.polyfit(polar["alpha_deg"].to_numpy(), polar["cl"].to_numpy(), 1)[0]
    assert slope == pytest.approx(mccroskey_lift_slope(6e6, 0.15), rel=0.05)


@pytest.fixture(scope="module")
def maximum_lift():
    from wakerank.validation import maximum_lift as comparisons

    return {(c.case, c.condition): c for c in comparisons()}


def test_tripped_maximum_lift_re6e6(maximum_lift):
    # Ladson NASA TM-4074, grit at x/c 0.05, Re 6e6: cl,max 1.61–1.63 near 17°
    # (../shared/guide/reference-data.md) [T]. Within 5 %, the tolerance of the lift slope.
    # The computed value is the largest converged cl of a 1° sweep: the iteration stops
    # converging above 17°, where the tunnel's section stalls (docs/validation.md).
    (tripped,) = [c for (case, _), c in maximum_lift.items() if "tripped" in case]
    assert tripped.computed == pytest.approx(tripped.published, rel=0.05), tripped


@pytest.mark.xfail(
    reason="known miss, docs/validation.md 'Maximum lift': with free transition the computed "
    "lift keeps rising past Ladson's maximum (1.85 against 1.66 at Re 5.97e6, 1.68 against "
    "1.41 at 2e6); the bursting of the leading-edge bubble that stalls the section is not "
    "modelled",
    strict=True,
)
def test_free_transition_maximum_lift(maximum_lift):
    # Ladson NASA TM-4074 Table I, free transition: cl,max 1.66 (Re 5.97e6), 1.41 (2e6) [T].
    free = [c for (case, _), c in maximum_lift.items() if "free" in case]
    assert len(free) == 2
    for c in free:
        assert c.computed == pytest.approx(c.published, rel=0.10), c
