"""NACA section ordinates and properties against the published tables and definitions."""

from __future__ import annotations

import numpy as np
import pytest
import wakerank as wr

# NACA 0012 half-thickness, percent chord: Abbott & von Doenhoff, Theory of Wing Sections,
# Appendix I (x, y).
NACA0012_APPENDIX_I = [
    (1.25, 1.894), (2.5, 2.615), (5.0, 3.555), (7.5, 4.200), (10.0, 4.683), (15.0, 5.345),
    (20.0, 5.737), (25.0, 5.941), (30.0, 6.002), (40.0, 5.803), (50.0, 5.294), (60.0, 4.563),
    (70.0, 3.664), (80.0, 2.623), (90.0, 1.448), (95.0, 0.807), (100.0, 0.126),
]


def _upper(section: wr.Section) -> tuple[np.ndarray, np.ndarray]:
    le = int(np.argmin(section.x))
    return section.x[: le + 1][::-1], section.y[: le + 1][::-1]


@pytest.mark.parametrize(("x_percent", "y_percent"), NACA0012_APPENDIX_I)
def test_naca0012_half_thickness_matches_appendix_i(x_percent: float, y_percent: float) -> None:
    # Abbott & von Doenhoff Appendix I, within 0.00005 chord (the tolerance).
    x, y = _upper(wr.Section.naca("0012", points=400))
    assert np.interp(x_percent / 100, x, y) == pytest.approx(y_percent / 100, abs=5e-5)


def test_naca0012_leading_edge_radius() -> None:
    # Abbott & von Doenhoff §6.4: r = 1.1019 t² for the 4-digit thickness.
    assert wr.Section.naca("0012").leading_edge_radius == pytest.approx(1.1019 * 0.12**2, rel=2e-3)


def test_modified_four_digit_leading_edge_radius_and_maximum_thickness() -> None:
    # Abbott & von Doenhoff §6.4: r = 1.1019 (t·I/6)², maximum thickness at the second suffix digit.
    s = wr.Section.naca("0012-34")
    assert s.family == "naca4_modified"
    assert s.leading_edge_radius == pytest.approx(1.1019 * (0.12 * 3 / 6) ** 2, rel=2e-3)
    assert s.thickness == pytest.approx(0.12, abs=1e-4)
    assert s.thickness_position == pytest.approx(0.40, abs=0.005)
    # Trailing-edge half-thickness d0 = 0.002 at the t = 0.2 scaling, i.e. 0.01·t.
    assert s.trailing_edge_thickness == pytest.approx(2 * 0.01 * 0.12, abs=1e-9)


def test_naca2412_camber() -> None:
    # NACA Report 460: 2412 has 2 % camber at 0.4 chord.
    s = wr.Section.naca("2412")
    assert s.camber == pytest.approx(0.02, abs=1e-4)
    assert s.camber_position == pytest.approx(0.40, abs=0.005)


def test_naca23012_camber_position() -> None:
    # NACA Report 610 (from memory): the 230 mean line has its maximum camber at 0.15 chord.
    # Measured as the mean of the surfaces at common x the peak is at 0.144 (thickness laid
    # off normal to a steep mean line shifts it); the mean line itself peaks at 0.150.
    s = wr.Section.naca("23012")
    assert s.family == "naca5"
    assert s.camber_position == pytest.approx(0.15, abs=0.01)
    assert s.parameters["design_cl"] == pytest.approx(0.3)


def test_reflexed_five_digit() -> None:
    s = wr.Section.naca("23112")
    assert s.parameters["reflexed"] is True
    assert s.camber_position == pytest.approx(0.15, abs=0.01)
