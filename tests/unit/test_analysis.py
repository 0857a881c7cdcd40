"""The inviscid Python API: argument parsing, table columns and errors."""

from __future__ import annotations

import numpy as np
import polars as pl
import pytest

import wakerank as wr
from wakerank.analysis import parse_alpha
from wakerank.karman_trefftz import KarmanTrefftzSection


def test_alpha_forms() -> None:
    np.testing.assert_allclose(parse_alpha("-4:12:1"), np.arange(-4.0, 13.0))
    np.testing.assert_allclose(parse_alpha("0:1:0.25"), [0, 0.25, 0.5, 0.75, 1.0])
    np.testing.assert_allclose(parse_alpha("-2:2"), [-2, -1, 0, 1, 2])
    np.testing.assert_allclose(parse_alpha("1, 3,5"), [1, 3, 5])
    np.testing.assert_allclose(parse_alpha(4), [4.0])
    np.testing.assert_allclose(parse_alpha([-2, 0, 2]), [-2, 0, 2])
    np.testing.assert_allclose(parse_alpha(np.array([1.5])), [1.5])


@pytest.mark.parametrize("bad", ["", "a:b", "4:0:1", "0:4:0", "1:2:3:4", [], [float("nan")], "100", "x"])
def test_bad_alpha_is_input_error(bad: object) -> None:
    with pytest.raises(wr.InputError, match="alpha_deg"):
        parse_alpha(bad)  # type: ignore[arg-type]


def test_analyze_columns_and_types() -> None:
    table = wr.analyze(wr.Section.naca("2412"), alpha_deg=[-2, 0, 2, 4])
    for column in ["alpha_deg", "cl", "cl_circulation", "cm_c4", "cp_min", "critical_mach_reached"]:
        assert column in table.columns
    assert table.height == 4
    assert table.schema["critical_mach_reached"] == pl.Boolean
    assert table["panels"].to_list() == [160] * 4
    assert table["cl"].is_sorted()


def test_surface_columns_and_ordering() -> None:
    table = wr.surface(wr.Section.naca("0012"), alpha_deg=4.0, panels=100)
    assert table.columns == ["x", "y", "s", "cp", "edge_velocity"]
    assert table.height == 101
    assert table["s"].is_sorted() and table["s"][0] == 0.0
    # γ > 0 towards the upper trailing edge: positive on the upper surface aft, negative below.
    assert table["edge_velocity"][5] > 0 > table["edge_velocity"][95]
    assert table["cp"].min() == pytest.approx(1 - table["edge_velocity"].abs().max() ** 2)


def test_spec_string_and_own_points() -> None:
    by_spec = wr.analyze("2412", alpha_deg=2.0)
    by_section = wr.analyze(wr.Section.naca("2412"), alpha_deg=2.0)
    assert by_spec["cl"][0] == pytest.approx(by_section["cl"][0])
    kt = KarmanTrefftzSection(-0.1, 0.05, 8.0, points=81)
    assert wr.analyze(kt, alpha_deg=0.0, panels=None)["panels"][0] == 80


@pytest.mark.parametrize("panels", [5, 10_000, 1.5, "many", True])
def test_bad_panels(panels: object) -> None:
    with pytest.raises(wr.InputError, match="panels"):
        wr.analyze(wr.Section.naca("0012"), alpha_deg=0.0, panels=panels)  # type: ignore[arg-type]


def test_viscous_options_need_reynolds() -> None:
    with pytest.raises(wr.InputError, match="reynolds"):
        wr.analyze(wr.Section.naca("0012"), alpha_deg=0.0, n_factor=9.0)


def test_high_mach_warns() -> None:
    with pytest.warns(UserWarning, match="validated"):
        wr.analyze(wr.Section.naca("0012"), alpha_deg=0.0, mach=0.8)


def test_batch_entry_returns_errors_per_section() -> None:
    from wakerank import _core

    good = wr.Section.naca("0012")
    x = np.array(good.x)
    bad_y = np.array(good.y)
    bad_y[10] = np.nan
    results = _core.inviscid_polar_batch(
        [("good", x, np.array(good.y)), ("bad", x, bad_y)], np.array([0.0, 2.0]), 100, 0.0, 1
    )
    assert isinstance(results[0], dict) and results[0]["cl"].shape == (2,)
    assert isinstance(results[1], wr.GeometryError)
