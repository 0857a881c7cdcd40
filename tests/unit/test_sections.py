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


DATA = __import__("pathlib").Path(__file__).resolve().parents[1] / "data"


def _write(path, lines) -> None:  # type: ignore[no-untyped-def]
    path.write_text("\n".join(lines) + "\n")


def _surfaces(points: int = 40):  # type: ignore[no-untyped-def]
    s = wr.Section.naca("2412", points=points)
    le = int(np.argmin(s.x))
    upper = list(zip(s.x[: le + 1][::-1], s.y[: le + 1][::-1]))
    lower = list(zip(s.x[le:], s.y[le:]))
    return s, upper, lower


def test_file_layouts_give_the_same_section(tmp_path) -> None:  # type: ignore[no-untyped-def]
    s, upper, lower = _surfaces()
    row = "{:.9f} {:.9f}".format
    loop = [row(x, y) for x, y in zip(s.x, s.y)]
    layouts = {
        "loop.txt": ["my section", *loop],
        "loop_reversed.txt": ["my section", *loop[::-1]],
        "loop_commas.csv": ["my section", *[line.replace(" ", ", ") for line in loop]],
        "split.txt": ["my section", *[row(x, y) for x, y in upper], "", *[row(x, y) for x, y in lower]],
        "split_count.txt": [
            "my section",
            f"{len(upper)}. {len(lower)}.",
            *[row(x, y) for x, y in upper],
            *[row(x, y) for x, y in lower],
        ],
        "no_name.txt": loop,
    }
    for name, lines in layouts.items():
        _write(tmp_path / name, lines)
        read = wr.Section.from_file(tmp_path / name, normalise=False)
        assert read.family == "file"
        assert read.name == ("no_name" if name == "no_name.txt" else "my section")
        np.testing.assert_allclose(read.x, s.x, atol=1e-9, err_msg=name)
        np.testing.assert_allclose(read.y, s.y, atol=1e-9, err_msg=name)


def test_e387_design_ordinates() -> None:
    # NASA TM-4062 (McGhee, Walker & Millard 1988), Table I: t/c ≈ 0.0907 near 0.31c.
    s = wr.Section.from_file(DATA / "e387.txt")
    assert s.name.startswith("E387")
    assert s.thickness == pytest.approx(0.0907, abs=5e-4)
    assert s.thickness_position == pytest.approx(0.31, abs=0.01)
    assert s.chord == pytest.approx(1.0, abs=1e-9)
    # The table ends both surfaces at (1, 0) (from memory); the file lists that point once, at
    # the start of its loop, and the reader closes the lower surface on it (a sharp trailing
    # edge).
    assert s.properties()["trailing_edge_thickness"] == pytest.approx(0.0, abs=1e-12)
    assert (s.x[0], s.y[0]) == (s.x[-1], s.y[-1])


def test_from_spec_reads_designations_and_files() -> None:
    assert wr.Section.from_spec("NACA 23012").family == "naca5"
    assert wr.Section.from_spec(str(DATA / "e387.txt")).family == "file"
    with pytest.raises(wr.InputError, match="neither a NACA designation"):
        wr.Section.from_spec("no/such/file.dat")


def test_cst_section() -> None:
    # Kulfan 2008: with N1 = 0.5 the leading-edge radius is A0²/2 (c = 1), here 0.17²/2.
    s = wr.Section.cst(upper=[0.17, 0.16, 0.15], lower=[-0.17, -0.16, -0.15], te_thickness=0.0)
    assert s.family == "cst" and s.parameters["n1"] == 0.5 and s.parameters["n2"] == 1.0
    assert s.camber == pytest.approx(0.0, abs=1e-12)
    assert s.leading_edge_radius == pytest.approx(0.17**2 / 2, rel=5e-3)
    blunt = wr.Section.cst(upper=[0.2, 0.2], lower=[-0.1, -0.1], te_thickness=0.004)
    assert blunt.trailing_edge_thickness == pytest.approx(0.004, abs=1e-12)
    with pytest.raises(wr.GeometryError, match="lower surface is not below"):
        wr.Section.cst(upper=[0.1, 0.1], lower=[0.2, 0.2])


def test_five_digit_and_modified_keywords() -> None:
    a = wr.Section.naca5(design_cl=0.3, max_camber_position=0.15, thickness=0.12)
    assert a.geometry_id == wr.Section.naca("23012").geometry_id
    b = wr.Section.naca4_modified(0.0, 0.0, 0.12, le_radius_index=3, max_thickness_position=0.4)
    assert b.geometry_id == wr.Section.naca("0012-34").geometry_id


def test_cli_section_prints_properties_and_draws(tmp_path) -> None:  # type: ignore[no-untyped-def]
    import subprocess
    import sys

    out = tmp_path / "s.png"
    result = subprocess.run(
        [sys.executable, "-c", "from wakerank.cli import main; main()", "section", "23012", "--plot", str(out), "--points", "80"],
        capture_output=True,
        check=False,
        text=True,
        timeout=120,
    )
    assert result.returncode == 0, result.stderr
    assert "NACA 23012" in result.stdout and "thickness t/c" in result.stdout and "0.12" in result.stdout
    assert out.read_bytes()[:8] == b"\x89PNG\r\n\x1a\n"


def test_from_file_normalises_a_scaled_rotated_file(tmp_path) -> None:  # type: ignore[no-untyped-def]
    s = wr.Section.naca("2412", points=60)
    angle = np.radians(7.0)
    x = 250.0 * (np.cos(angle) * s.x - np.sin(angle) * s.y) + 40.0
    y = 250.0 * (np.sin(angle) * s.x + np.cos(angle) * s.y) - 3.0
    path = tmp_path / "mm.dat"
    path.write_text("\n".join(f"{a:.9f},{b:.9f}" for a, b in zip(x, y)) + "\n")
    raw = wr.Section.from_file(path, normalise=False)
    assert raw.chord == pytest.approx(250.0, rel=1e-6)
    unit = wr.Section.from_file(path)
    assert unit.chord == pytest.approx(1.0, abs=1e-12)
    assert unit.thickness == pytest.approx(s.thickness, abs=2e-4)


def test_constructor_checks_the_ordering() -> None:
    s = wr.Section.naca("0012", points=30)
    assert len(wr.Section(s.x, s.y, "ok")) == len(s)
    with pytest.raises(wr.GeometryError, match="clockwise"):
        wr.Section(s.x[::-1], s.y[::-1], "backwards")
