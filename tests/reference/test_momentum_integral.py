"""Momentum-integral consistency of the viscous solution (common practice, no source).

Behind the trailing edge the static pressure returns to the free-stream value within about a
chord and nothing then changes the momentum defect, so: the wake edge speed one chord behind
the trailing edge is within 1 % of free stream; θ there is within 2 % of θ∞; the far-wake drag
agrees with friction + pressure drag within 5 % and with Squire–Young within 5 %.
"""

from __future__ import annotations

import numpy as np
import polars as pl
import pytest

import wakerank as wr

ATTACHED_CASES = [
    ("0012", 0.0, 3e6),
    ("0012", 4.0, 3e6),
    ("2412", 2.0, 1e6),
    ("4415", 0.0, 6e6),
]

_SLOW_WAKE = pytest.mark.xfail(
    reason="known miss, docs/validation.md 'Momentum-integral consistency': for NACA 4415 at Re "
    "6e6 the wake edge speed one chord behind the trailing edge is 0.991 and θ there 2.5 % above "
    "θ∞; the exact potential flow behind a 15 % thick symmetric Kármán–Trefftz section is already "
    "0.9924 there (θ(1c)/θ∞ ≥ 1.023 by the momentum integral equation)",
    strict=False,
)
WAKE_CASES = [
    ATTACHED_CASES[0],
    ATTACHED_CASES[1],
    ATTACHED_CASES[2],
    pytest.param(*ATTACHED_CASES[3], marks=_SLOW_WAKE),
]


@pytest.mark.parametrize(("code", "alpha", "reynolds"), WAKE_CASES)
def test_wake_recovers_free_stream_and_theta_settles(code, alpha, reynolds):
    section = wr.Section.naca(code)
    stations = wr.boundary_layer(section, alpha_deg=alpha, reynolds=reynolds)
    wake = stations.filter(pl.col("side") == "wake").sort("s")
    s = wake["s"].to_numpy()
    one_chord = np.interp(1.0, s, wake["edge_velocity"].to_numpy())
    theta_one = np.interp(1.0, s, wake["theta"].to_numpy())
    theta_end = wake["theta"][-1]
    assert abs(one_chord - 1.0) < 0.01
    assert theta_one == pytest.approx(theta_end, rel=0.02)


@pytest.mark.parametrize(("code", "alpha", "reynolds"), ATTACHED_CASES)
def test_squire_young_agrees_with_far_wake(code, alpha, reynolds):
    row = wr.analyze(wr.Section.naca(code), alpha_deg=alpha, reynolds=reynolds).row(0, named=True)
    assert row["converged"]
    assert row["cd_squire_young"] == pytest.approx(row["cd"], rel=0.05)


@pytest.mark.parametrize(("code", "alpha", "reynolds"), ATTACHED_CASES)
def test_friction_plus_pressure_agrees_with_far_wake(code, alpha, reynolds):
    row = wr.analyze(wr.Section.naca(code), alpha_deg=alpha, reynolds=reynolds).row(0, named=True)
    assert row["converged"]
    assert row["cd_friction"] + row["cd_pressure"] == pytest.approx(row["cd"], rel=0.05)
