"""The Section class: families, coordinates, properties, re-panelling, ids."""

from __future__ import annotations

import numpy as np
import polars as pl
import pytest

import wakerank as wr


def test_naca_designation_and_parameters() -> None:
    s = wr.Section.naca("2412")
    assert s.name == "NACA 2412"
    assert s.family == "naca4"
    assert s.parameters["camber"] == pytest.approx(0.02)
    assert s.parameters["camber_position"] == pytest.approx(0.4)
    assert s.parameters["thickness"] == pytest.approx(0.12)
    # NACA 2412: 2 % camber at 0.4 chord, 12 % thick (NACA Report 460).
    assert s.camber == pytest.approx(0.02, abs=1e-4)
    assert s.camber_position == pytest.approx(0.4, abs=0.005)
    assert s.thickness == pytest.approx(0.12, abs=1e-4)


def test_naca4_keywords_match_the_designation() -> None:
    a = wr.Section.naca4(camber=0.02, camber_position=0.4, thickness=0.12, closed_te=False)
    b = wr.Section.naca("NACA 2412")
    assert a.geometry_id == b.geometry_id
    closed = wr.Section.naca4(camber=0.02, camber_position=0.4, thickness=0.12, closed_te=True)
    assert closed.trailing_edge_thickness < 1e-12
    # Open trailing edge of the Report 460 polynomial: 2·5t·0.0021 = 0.00252 chord.
    assert a.trailing_edge_thickness == pytest.approx(0.00252, abs=1e-9)


def test_leading_edge_radius_of_naca0012() -> None:
    # Abbott & von Doenhoff §6.4: r = 1.1019 t²; spline curvature within 0.5 % at 200 points/side.
    s = wr.Section.naca("0012")
    assert s.leading_edge_radius == pytest.approx(1.1019 * 0.12**2, rel=5e-3)


def test_arrays_are_read_only_float64() -> None:
    s = wr.Section.naca("0012", points=50)
    assert s.x.dtype == np.float64 and len(s) == 99
    with pytest.raises(ValueError):
        s.x[0] = 2.0


def test_from_coordinates_reorders_and_keeps_the_id() -> None:
    s = wr.Section.naca("2412", points=60)
    rev = wr.Section.from_coordinates(s.x[::-1], s.y[::-1], name="mine")
    assert rev.name == "mine" and rev.family == "coordinates"
    np.testing.assert_array_equal(rev.x, s.x)
    assert rev.geometry_id == s.geometry_id
    assert len(s.geometry_id) == 16


def test_repanel_returns_a_new_section() -> None:
    s = wr.Section.naca("2412")
    r = s.repanel(200)
    assert len(r) == 201
    assert r.family == "naca4" and r.parameters["repanelled_to"] == 200
    assert r.thickness == pytest.approx(s.thickness, abs=1e-5)
    assert len(s.repanel()) == wr.sections.DEFAULT_PANELS + 1


def test_frame_properties_and_repr() -> None:
    s = wr.Section.naca("0012", points=40)
    frame = s.to_frame()
    assert isinstance(frame, pl.DataFrame) and frame.columns == ["x", "y"] and frame.height == 79
    props = s.properties()
    assert set(props) >= {"thickness", "camber", "leading_edge_radius", "area", "trailing_edge_angle_deg"}
    assert "NACA 0012" in repr(s)


def test_bad_designation_is_an_input_error() -> None:
    with pytest.raises(wr.InputError, match="24x2"):
        wr.Section.naca("24x2")
