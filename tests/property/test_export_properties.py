"""Properties of the export helpers over many sections and Reynolds numbers (hypothesis)."""

from __future__ import annotations

import numpy as np
from hypothesis import given, settings
from hypothesis import strategies as st

from wakerank.export import close_trailing_edge, trailing_edge_gap
from wakerank.wall_spacing import wall_spacing


def blunt_section(thickness: float, per_side: int, lift: float):
    """NACA four-digit thickness form with its blunt edge (Abbott & von Doenhoff 1959, eq. 6.2),
    sheared by `lift` x so that the base is off the chord line."""
    xc = 0.5 * (1.0 - np.cos(np.linspace(0.0, np.pi, per_side)))
    yt = 5.0 * thickness * (
        0.2969 * np.sqrt(xc) - 0.1260 * xc - 0.3516 * xc**2 + 0.2843 * xc**3 - 0.1015 * xc**4
    )
    x = np.r_[xc[::-1], xc[1:]]
    y = np.r_[yt[::-1], -yt[1:]] + lift * np.r_[xc[::-1], xc[1:]]
    return x, y


@settings(max_examples=60, deadline=None)
@given(thickness=st.floats(0.04, 0.25), per_side=st.integers(12, 120), lift=st.floats(-0.02, 0.02))
def test_closing_meets_at_the_base_midpoint_and_never_moves_the_nose(thickness, per_side, lift):
    x, y = blunt_section(thickness, per_side, lift)
    gap = trailing_edge_gap(x, y)
    cx, cy = close_trailing_edge(x, y)
    le = int(np.argmin(x))
    assert trailing_edge_gap(cx, cy) == 0.0
    assert (cx[le], cy[le]) == (x[le], y[le])
    assert np.max(np.hypot(cx - x, cy - y)) <= 0.5 * gap * (1 + 1e-12)
    assert np.isclose(cy[0], 0.5 * (y[0] + y[-1]))


@settings(max_examples=80, deadline=None)
@given(reynolds=st.floats(1e4, 1e8), y_plus=st.floats(0.1, 10.0))
def test_first_cell_height_shrinks_with_reynolds_and_grows_with_y_plus(reynolds, y_plus):
    base = wall_spacing(reynolds, y_plus)
    assert 0.0 < base.first_cell_height < base.boundary_layer_thickness
    assert wall_spacing(reynolds * 1.5, y_plus).first_cell_height < base.first_cell_height
    assert np.isclose(wall_spacing(reynolds, 2 * y_plus).first_cell_height, 2 * base.first_cell_height)
