"""`wakerank plot`, `report`, `export` on a hand-made catalog: files appear, errors are one line."""

from __future__ import annotations

import json

import polars as pl
import pytest

pytest.importorskip("wakerank.ranking")  # the campaign modules (catalog, ranking) are needed

from handmade_catalog import section_ids, write_catalog  # noqa: E402
from test_plots import EXPECTED_PIXELS, png_size  # noqa: E402
from typer.testing import CliRunner  # noqa: E402
from wakerank.cli import app  # noqa: E402


@pytest.fixture(scope="module")
def catalog(tmp_path_factory):
    return write_catalog(tmp_path_factory.mktemp("catalog") / "survey")


def invoke(*args):
    return CliRunner().invoke(app, [str(a) for a in args])


def test_plot_polar_by_id_and_label(catalog, tmp_path):
    out = tmp_path / "polar.png"
    result = invoke("plot", "polar", catalog, "--sections", "sec01,test section 4",
                    "--sections", "sec07", "--reynolds", "8e5", "--cl", "0.55", "--out", out)
    assert result.exit_code == 0, result.output
    assert png_size(out) == EXPECTED_PIXELS


def test_plot_map(catalog, tmp_path):
    out = tmp_path / "map.png"
    result = invoke("plot", "map", catalog, "--cl", "0.55", "--x", "thickness", "--y", "camber",
                    "--reynolds", "8e5", "--out", out)
    assert result.exit_code == 0, result.output
    assert png_size(out) == EXPECTED_PIXELS


def test_plot_errors_are_one_line(catalog, tmp_path):
    result = invoke("plot", "polar", catalog, "--sections", "nope", "--reynolds", "8e5",
                    "--out", tmp_path / "x.png")
    assert result.exit_code == 2
    assert result.output.strip().count("\n") == 0 and "no section 'nope'" in result.output
    result = invoke("plot", "map", catalog, "--cl", "0.55", "--x", "sweep", "--out", tmp_path / "x.png")
    assert result.exit_code == 2 and "no parameter 'sweep'" in result.output
    result = invoke("plot", "polar", tmp_path / "absent", "--sections", "a", "--reynolds", "8e5")
    assert result.exit_code == 2 and "no such catalog folder" in result.output


def test_report_page(catalog, tmp_path):
    out = tmp_path / "report.html"
    result = invoke("report", catalog, "--cl", "0.55", "--out", out)
    assert result.exit_code == 0, result.output
    page = out.read_text()
    for anchor in ("campaign", "shortlist", "polars", "maps", "convergence", "cautions"):
        assert f'id="{anchor}"' in page
    assert "handmade survey" in page and "min_thickness = 0.11" in page
    assert page.count("data:image/png;base64,") == 4  # polars and a map at each Reynolds number


def test_rank_then_export_with_case_files(catalog, tmp_path):
    jsonschema = pytest.importorskip("jsonschema")
    from wakerank.export import case_schema

    shortlist = tmp_path / "shortlist.parquet"
    result = invoke("rank", catalog, "--cl", "0.4", "--cl", "0.55", "--reynolds", "8e5",
                    "--top", "2", "--out", shortlist)
    assert result.exit_code == 0, result.output
    ranked = pl.read_parquet(shortlist)
    result = invoke("export", shortlist, "--catalog", catalog, "--to", tmp_path / "cfd")
    assert result.exit_code == 0, result.output
    for section_id in ranked["section_id"]:
        case = json.loads((tmp_path / "cfd" / section_id / "case.json").read_text())
        jsonschema.validate(case, case_schema())
        assert [p["design_cl"] for p in case["design_points"]] == [0.4, 0.55]
        assert case["design_points"][0]["reynolds"] == 8e5
    assert set(ranked["section_id"]) <= set(section_ids())


def test_export_of_a_missing_shortlist_is_one_line(catalog, tmp_path):
    result = invoke("export", tmp_path / "none.parquet", "--catalog", catalog, "--to", tmp_path)
    assert result.exit_code == 2 and "no such shortlist file" in result.output


def test_plot_section_recomputes_the_boundary_layer(catalog, tmp_path):
    import wakerank

    if not (hasattr(wakerank, "surface") and hasattr(wakerank, "boundary_layer")):
        pytest.skip("needs wakerank.surface and wakerank.boundary_layer")
    out = tmp_path / "section.png"
    result = invoke("plot", "section", catalog, "sec04", "--alpha", "4", "--reynolds", "8e5",
                    "--out", out)
    assert result.exit_code == 0, result.output
    assert png_size(out) == EXPECTED_PIXELS


def test_plot_section_names_a_missing_condition(catalog, tmp_path):
    result = invoke("plot", "section", catalog, "sec04", "--alpha", "4", "--reynolds", "3e6",
                    "--out", tmp_path / "s.png")
    assert result.exit_code == 2 and "no rows at Reynolds number 3e6" in result.output
