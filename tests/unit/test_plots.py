"""Plots render from hand-made catalog frames into valid PNGs of the standard size."""

from __future__ import annotations

import struct

import numpy as np
import polars as pl
import pytest
from handmade_sections import naca_symmetric
from wakerank.errors import InputError
from wakerank.plots import DPI, FIGURE_INCHES, map_figure, polar_figure, save_png, section_figure

EXPECTED_PIXELS = (int(FIGURE_INCHES[0] * DPI), int(FIGURE_INCHES[1] * DPI))


def png_size(path) -> tuple[int, int]:
    """Width and height from the PNG signature and IHDR chunk (PNG specification, sec. 11.2.2)."""
    data = path.read_bytes()
    assert data[:8] == b"\x89PNG\r\n\x1a\n"
    assert data[12:16] == b"IHDR"
    return struct.unpack(">II", data[16:24])


def handmade_points() -> pl.DataFrame:
    frames = []
    for k, section_id in enumerate(["s-a", "s-b"]):
        alpha = np.arange(-4.0, 12.5, 1.0)
        cl = 0.1 * (k + 1) + 0.11 * alpha
        frames.append(pl.DataFrame({
            "section_id": section_id, "reynolds": 8e5, "mach": 0.08, "n_factor": 9.0,
            "transition": "free", "alpha_deg": alpha, "cl": cl,
            "cd": 0.006 + 0.01 * (cl - 0.4) ** 2, "converged": alpha < 11.0,
        }))
    return pl.concat(frames)


def handmade_design() -> tuple[pl.DataFrame, pl.DataFrame]:
    thickness = np.repeat([0.10, 0.12, 0.14, 0.16], 3)
    camber = np.tile([0.0, 0.02, 0.04], 4)
    ids = [f"s{i}" for i in range(len(thickness))]
    sections = pl.DataFrame({"section_id": ids, "thickness": thickness, "camber": camber})
    design = pl.DataFrame({
        "section_id": ids, "reynolds": 8e5, "mach": 0.08, "n_factor": 9.0, "transition": "free",
        "design_cl": 0.55, "cd": 0.005 + 0.02 * (thickness - 0.1) + 0.05 * (camber - 0.025) ** 2,
    })
    return design, sections


def test_polar_plot_is_a_png_of_the_standard_size(tmp_path):
    figure = polar_figure(handmade_points(), ["s-a", "s-b"], reynolds=8e5, labels={"s-a": "A"})
    assert "Re = 8e5" in figure.get_suptitle()
    for axes in figure.axes:
        assert axes.get_xlabel() and axes.get_ylabel() and axes.get_legend() is not None
    path = save_png(figure, tmp_path / "polar.png")
    assert png_size(path) == EXPECTED_PIXELS


def test_polar_plot_rings_first_order_wake_points():
    points = handmade_points().with_columns(wake_curvature=pl.col("alpha_deg") < 9.0)
    figure = polar_figure(points, ["s-a", "s-b"], reynolds=8e5)
    drag_axes = figure.axes[0]
    labels = [text.get_text() for text in drag_axes.get_legend().get_texts()]
    assert labels.count("first-order wake") == 1
    # Two sections, each with its polar line and its ring markers (9 and 10 degrees).
    rings = [line for line in drag_axes.get_lines() if line.get_marker() == "o"]
    assert len(rings) == 2 and all(len(line.get_xdata()) == 2 for line in rings)


def test_polar_plot_names_a_missing_condition():
    with pytest.raises(InputError, match="Reynolds number 4e5"):
        polar_figure(handmade_points(), ["s-a"], reynolds=4e5)
    with pytest.raises(InputError, match="s-zz"):
        polar_figure(handmade_points(), ["s-zz"], reynolds=8e5)


def test_section_plot_is_a_png_of_the_standard_size(tmp_path):
    x, y = naca_symmetric()
    surface = pl.DataFrame({"x": x, "y": y, "cp": 1.0 - (1.0 + 2.0 * np.abs(y)) ** 2})
    n = 30
    xs = np.linspace(0.0, 1.0, n)
    stations = pl.concat([
        pl.DataFrame({
            "side": side, "x": xs + (1.0 if side == "wake" else 0.0),
            "edge_velocity": np.full(n, 1.1), "theta": 1e-3 * np.sqrt(xs + 1e-3),
            "shape_factor": np.full(n, 2.5), "cf": np.full(n, 3e-3), "amplification": 9.0 * xs,
        })
        for side in ("upper", "lower", "wake")
    ])
    figure = section_figure(surface, stations, label="NACA 0012", alpha_deg=4.0, reynolds=8e5,
                            mach=0.08, n_factor=9.0)
    assert len(figure.axes) == 6
    for axes in figure.axes:
        assert axes.get_xlabel() and axes.get_ylabel() and axes.get_legend() is not None
    assert "alpha = 4 deg" in figure.get_suptitle()
    assert png_size(save_png(figure, tmp_path / "section.png")) == EXPECTED_PIXELS


def test_map_plot_is_a_png_of_the_standard_size(tmp_path):
    design, sections = handmade_design()
    figure = map_figure(design, sections, x="thickness", y="camber", design_cl=0.55, reynolds=8e5)
    axes = figure.axes[0]
    assert "t/c" in axes.get_xlabel() and "f/c" in axes.get_ylabel()
    assert "cl = 0.55" in axes.get_title() and "Re = 8e5" in axes.get_title()
    assert png_size(save_png(figure, tmp_path / "map.png")) == EXPECTED_PIXELS


def test_map_names_an_unknown_parameter():
    design, sections = handmade_design()
    with pytest.raises(InputError, match="no parameter 'sweep'"):
        map_figure(design, sections, x="sweep", y="camber", design_cl=0.55, reynolds=8e5)
