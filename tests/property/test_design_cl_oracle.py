"""The vectorised design-cl interpolation against a plain-Python oracle on random polars."""

from __future__ import annotations

import math

import numpy as np
import polars as pl
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st
from wakerank import polar


def oracle(alpha, cl, cd, usable, converged, target):
    """Loop version of the rules in wakerank.polar (one polar on a full, regular grid)."""
    conv = [i for i in range(len(alpha)) if converged[i]]
    if not conv:
        return None
    cl_max = max(cl[i] for i in conv)
    alpha_max = min(alpha[i] for i in conv if cl[i] == cl_max)
    for i in range(len(alpha) - 1):
        j = i + 1
        if not (usable[i] and usable[j]) or alpha[j] > alpha_max or cl[i] == cl[j]:
            continue
        lo, hi = min(cl[i], cl[j]), max(cl[i], cl[j])
        if lo <= target <= hi:
            f = (target - cl[i]) / (cl[j] - cl[i])
            return cd[i] + f * (cd[j] - cd[i])
    return None


@settings(max_examples=80, deadline=None)
@given(
    n=st.integers(3, 14),
    slope=st.floats(0.05, 0.15),
    stall_at=st.integers(1, 13),
    failed=st.lists(st.integers(0, 13), max_size=4),
    separated=st.lists(st.integers(0, 13), max_size=3),
    target=st.floats(0.0, 1.5),
)
def test_vectorised_interpolation_matches_the_oracle(n, slope, stall_at, failed, separated, target):
    alpha = np.arange(n, dtype=float)
    cl = np.where(
        alpha <= stall_at, slope * alpha + 0.1, slope * stall_at + 0.1 - 0.05 * (alpha - stall_at)
    )
    cd = 0.01 + 0.02 * (cl - 0.4) ** 2 + 0.0001 * alpha
    converged = np.array([i not in failed for i in range(n)])
    sep = np.array([i in separated for i in range(n)])
    usable = converged & ~sep
    frame = pl.LazyFrame(
        {
            "section_id": "s",
            "condition_id": "c",
            "alpha_deg": alpha,
            "cl": cl,
            "cd": cd,
            "cm_c4": -0.05,
            "transition_upper": 0.4,
            "transition_lower": 0.6,
            "separation_upper": np.where(sep, 0.9, np.nan),
            "separation_lower": np.nan,
            "converged": converged,
        }
    ).with_columns(pl.col("separation_upper", "separation_lower").fill_nan(None))
    got = polar.at_design_cl(polar.prepare(frame), [target]).collect()
    expected = oracle(alpha, cl, cd, usable, converged, target)
    if expected is None:
        assert got.height == 0
    else:
        assert got.height == 1
        assert got["cd"][0] == pytest.approx(expected, rel=1e-12)
        assert math.isfinite(got["alpha_deg"][0])
