"""Export for CFD: first-cell height, trailing-edge closing, case files against their schema, mesh."""

from __future__ import annotations

import json
import math

import numpy as np
import polars as pl
import pytest
from handmade_sections import naca_symmetric
from wakerank.errors import InputError
from wakerank.export import (
    ExportOptions,
    case_schema,
    close_trailing_edge,
    export_shortlist,
    trailing_edge_gap,
)
from wakerank.wall_spacing import flat_plate_skin_friction, wall_spacing


def test_first_cell_height_matches_schlichting_by_hand():
    # Schlichting's local flat-plate formula at Re_x = 1e6, worked by hand:
    # 2*log10(1e6) - 0.65 = 11.35; ln 11.35 = 2.42922; Cf = exp(-2.3*2.42922) = 0.0037455
    # u_tau/U = sqrt(Cf/2) = 0.043275; y/c = y+ / (Re u_tau) = 1/(1e6*0.043275) = 2.3108e-5
    spacing = wall_spacing(1e6, y_plus=1.0)
    assert spacing.skin_friction == pytest.approx(0.0037455, rel=1e-4)
    assert spacing.friction_velocity == pytest.approx(0.043275, rel=1e-4)
    assert spacing.first_cell_height == pytest.approx(2.3108e-5, rel=1e-4)
    # y scales linearly with the target y+ (definition y+ = y u_tau / nu)
    assert wall_spacing(1e6, y_plus=30.0).first_cell_height == pytest.approx(30 * 2.3108e-5, rel=1e-4)
    # at Re = 8e5 by hand: 2*5.90309 - 0.65 = 11.15618; ln 11.15618 = 2.411993;
    # Cf = exp(-2.3*2.411993) = exp(-5.547584) = 0.0038969
    assert flat_plate_skin_friction(8e5) == pytest.approx(0.0038969, rel=1e-4)


def test_bad_wall_spacing_input_names_the_value():
    with pytest.raises(InputError, match="y\\+"):
        wall_spacing(1e6, y_plus=0.0)
    with pytest.raises(InputError, match="Reynolds"):
        wall_spacing(-5.0)


def test_closing_a_blunt_trailing_edge_keeps_the_nose():
    x, y = naca_symmetric(sharp=False)
    assert trailing_edge_gap(x, y) == pytest.approx(2 * 5 * 0.12 * 0.0021, rel=1e-3)
    cx, cy = close_trailing_edge(x, y)
    assert trailing_edge_gap(cx, cy) == 0.0
    le = int(np.argmin(x))
    assert (cx[le], cy[le]) == (x[le], y[le])
    assert np.max(np.abs(cy - y)) <= 0.5 * trailing_edge_gap(x, y) + 1e-15


def _shortlist(section_id: str) -> pl.DataFrame:
    """A shortlist row as `wakerank.rank` gives it: values at each design cl in columns."""
    return pl.DataFrame(
        {
            "rank": [1],
            "section_id": [section_id],
            "label": ["NACA 0012"],
            "reynolds": [8e5],
            "mach": [0.08],
            "n_factor": [9.0],
            "transition": ["free"],
            "condition_id": ["c1"],
            "weighted_cd": [0.0075],
            "alpha_deg_at_cl_0.4": [3.6],
            "cd_at_cl_0.4": [0.0071],
            "cm_c4_at_cl_0.4": [-0.001],
            "transition_upper_at_cl_0.4": [0.31],
            "transition_lower_at_cl_0.4": [0.62],
            "alpha_deg_at_cl_0.55": [5.0],
            "cd_at_cl_0.55": [0.0079],
            "cm_c4_at_cl_0.55": [-0.002],
            "transition_upper_at_cl_0.55": [0.22],
            "transition_lower_at_cl_0.55": [0.71],
            "wake_curvature_at_cl_0.55": [False],
        }
    )


def _catalog_frames(section_id: str, sharp: bool):
    x, y = naca_symmetric(sharp=sharp)
    sections = pl.DataFrame(
        {"section_id": [section_id], "family": ["naca4"], "label": ["NACA 0012"],
         "x": [x.tolist()], "y": [y.tolist()]}
    )
    return _shortlist(section_id), sections


def test_case_file_validates_against_its_schema(tmp_path):
    jsonschema = pytest.importorskip("jsonschema")
    shortlist, sections = _catalog_frames("s-0012", sharp=False)
    [folder] = export_shortlist(shortlist, sections, tmp_path, ExportOptions(close_trailing_edge=True))
    case = json.loads((folder / "case.json").read_text())
    jsonschema.Draft202012Validator.check_schema(case_schema())
    jsonschema.validate(case, case_schema())
    assert case["section"]["trailing_edge"] == "closed-by-export"
    assert [p["design_cl"] for p in case["design_points"]] == [0.4, 0.55]
    assert case["design_points"][1]["predicted"]["cd"] == 0.0079
    assert case["design_points"][1]["transition"]["upper_x"] == 0.22
    assert case["design_points"][1]["alpha_deg"] == 5.0
    # Which model the screening values came from (docs/export.md): unknown at 0.4 (no column),
    # first-order wake at 0.55.
    assert case["design_points"][0]["predicted"]["full_model"] is None
    assert case["design_points"][1]["predicted"]["full_model"] is False
    first = case["design_points"][0]["first_cell"]
    assert first["height"] == pytest.approx(wall_spacing(8e5).first_cell_height)
    coords = np.loadtxt(folder / "coordinates.csv", delimiter=",", skiprows=1)
    assert coords.shape == (81, 2)
    assert coords[0].tolist() == coords[-1].tolist()


def test_schema_rejects_a_case_without_design_points(tmp_path):
    jsonschema = pytest.importorskip("jsonschema")
    shortlist, sections = _catalog_frames("s-0012", sharp=True)
    [folder] = export_shortlist(shortlist, sections, tmp_path, ExportOptions())
    case = json.loads((folder / "case.json").read_text())
    case["design_points"] = []
    with pytest.raises(jsonschema.ValidationError):
        jsonschema.validate(case, case_schema())


def test_unknown_section_is_one_clear_error(tmp_path):
    shortlist, sections = _catalog_frames("s-0012", sharp=True)
    with pytest.raises(InputError, match="not in the catalog"):
        export_shortlist(shortlist.with_columns(section_id=pl.lit("nope")), sections,
                         tmp_path, ExportOptions())


@pytest.mark.parametrize("sharp", [True, False], ids=["sharp-edge", "blunt-edge"])
def test_mesh_reopens_with_markers_and_first_cell(tmp_path, sharp):
    gmsh = pytest.importorskip("gmsh")
    shortlist, sections = _catalog_frames("s-0012", sharp=sharp)
    [folder] = export_shortlist(shortlist, sections, tmp_path, ExportOptions(mesh=True))
    case = json.loads((folder / "case.json").read_text())
    mesh = case["mesh"]
    assert mesh["farfield_radius"] >= 50.0
    su2 = (folder / "mesh.su2").read_text()
    assert "MARKER_TAG= airfoil" in su2 and "MARKER_TAG= farfield" in su2
    gmsh.initialize(readConfigFiles=False, interruptible=False)
    try:
        gmsh.option.setNumber("General.Terminal", 0)
        gmsh.open(str(folder / "mesh.msh"))
        names = {gmsh.model.getPhysicalName(d, t) for d, t in gmsh.model.getPhysicalGroups()}
        assert {"airfoil", "farfield", "fluid"} <= names
        _, xyz, _ = gmsh.model.mesh.getNodes()
        xyz = xyz.reshape(-1, 3)
        radius = np.hypot(xyz[:, 0] - 0.5, xyz[:, 1])
        assert radius.max() == pytest.approx(mesh["farfield_radius"], rel=1e-9)
        # first node above the wall at mid-chord (upper surface nearly flat there, slope ~0.03)
        strip = xyz[(np.abs(xyz[:, 0] - 0.5) < 0.02) & (xyz[:, 1] > 0)]
        heights = np.sort(strip[:, 1])
        assert heights[1] - heights[0] == pytest.approx(mesh["first_cell_height"], rel=0.02)
        # no inverted or degenerate cell (scaled Jacobian > 0: gmsh's minSICN quality measure)
        _, tags, _ = gmsh.model.mesh.getElements(2)
        quality = gmsh.model.mesh.getElementQualities(np.concatenate(tags), "minSICN")
        assert quality.min() > 0.0
    finally:
        gmsh.finalize()
    assert mesh["first_cell_height"] == pytest.approx(wall_spacing(8e5).first_cell_height)
    assert math.isclose(mesh["design_reynolds"], 8e5)


def test_points_option_repanels_the_coordinates(tmp_path):
    shortlist, sections = _catalog_frames("s-0012", sharp=False)
    [folder] = export_shortlist(shortlist, sections, tmp_path / "a", ExportOptions(points=121))
    coords = np.loadtxt(folder / "coordinates.csv", delimiter=",", skiprows=1)
    assert coords.shape == (121, 2)
    case = json.loads((folder / "case.json").read_text())
    assert case["section"]["points"] == 121 and case["section"]["trailing_edge"] == "blunt"
    # repanelled points stay on the section: the largest ordinate within 0.2 % of the input's
    x, y = naca_symmetric(sharp=False)
    assert coords[:, 1].max() == pytest.approx(y.max(), rel=2e-3)
    [closed] = export_shortlist(shortlist, sections, tmp_path / "b",
                                ExportOptions(points=121, close_trailing_edge=True))
    coords = np.loadtxt(closed / "coordinates.csv", delimiter=",", skiprows=1)
    assert coords.shape == (121, 2) and coords[0].tolist() == coords[-1].tolist()
    with pytest.raises(InputError, match="--points"):
        export_shortlist(shortlist, sections, tmp_path, ExportOptions(points=8))


@pytest.mark.parametrize(
    ("options", "message"),
    [
        (ExportOptions(points=8), "--points 8"),
        (ExportOptions(y_plus=-1.0), "--y-plus"),
        (ExportOptions(mesh=True, farfield_radius=10.0), "--farfield 10"),
    ],
)
def test_bad_options_write_nothing(tmp_path, options, message):
    shortlist, sections = _catalog_frames("s-0012", sharp=True)
    with pytest.raises(InputError, match=message):
        export_shortlist(shortlist, sections, tmp_path / "out", options)
    assert not (tmp_path / "out").exists()


def test_coincident_wall_points_are_one_geometry_error(tmp_path):
    from wakerank.errors import GeometryError
    from wakerank.mesh import MeshSettings, build_mesh

    x, y = naca_symmetric(per_side=21)
    x[5], y[5] = x[4], y[4]  # a zero-length wall segment (gmsh would not finish on it)
    settings = MeshSettings(first_cell_height=1e-5, layer_thickness=0.02)
    with pytest.raises(GeometryError, match="points 4 and 5 coincide"):
        build_mesh(x, y, settings, tmp_path / "bad")
