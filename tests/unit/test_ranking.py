"""Ranking and the design table against a hand-made catalog with answers worked by hand."""

from __future__ import annotations

import json
from pathlib import Path

import numpy as np
import polars as pl
import pytest
from wakerank import InputError, open_catalog, rank
from wakerank.catalog import design_table, scan_points
from wakerank.catalog_schema import POINT_SCHEMA, SECTION_SCHEMA

ALPHAS = np.arange(0.0, 9.0)  # 0..8 degrees, step 1


def _polar(
    section,
    condition="c1",
    cd0=0.010,
    cm=-0.05,
    transition="free",
    drop=(),
    non_converged=(),
    separated=(),
    cl=None,
    cd_factor=1.0,
):
    cl = 0.1 * ALPHAS + 0.2 if cl is None else np.asarray(cl, dtype=float)
    rows = []
    for i, a in enumerate(ALPHAS):
        if a in drop:
            continue
        rows.append(
            {
                "section_id": section,
                "condition_id": condition,
                "reynolds": 8e5,
                "mach": 0.0,
                "n_factor": 9.0,
                "transition": transition,
                "panels": 160,
                "alpha_deg": a,
                "cl": cl[i],
                "cd": cd_factor * (cd0 + 0.001 * a),
                "cm_c4": cm,
                "transition_upper": 0.5 - 0.02 * a,
                "transition_lower": 0.6,
                "separation_upper": 0.9 if a in separated else None,
                "converged": a not in non_converged,
            }
        )
    return rows


def _catalog(tmp_path: Path) -> Path:
    tmp_path.mkdir(parents=True, exist_ok=True)
    stalled = [0.2, 0.3, 0.4, 0.5, 0.45, 0.40, 0.35, 0.30, 0.25]  # cl_max 0.5 at 3 degrees
    polars = (
        _polar("A")  # the reference: cd = 0.010 + 0.001 alpha, cl = 0.2 + 0.1 alpha
        + _polar("A", condition="c2", transition="trip upper 0.05 lower 0.05", cd_factor=1.25)
        + _polar("B", non_converged=(3.0,))  # 0.55 lies in the gap 2..4 degrees
        + _polar("C", cl=stalled, separated=(4.0, 5.0, 6.0, 7.0, 8.0))
        + _polar("D", separated=(3.0,))  # turbulent separation at 3 degrees: a gap
        + _polar("F", cd0=0.008)  # least drag but only 10 % thick
        + _polar("G", cd0=0.009, cm=-0.12)  # low drag, too much pitching moment
        + _polar("H", drop=(4.0,))  # the 4-degree row is missing: a gap
    )
    frame = pl.DataFrame(polars).with_columns(
        [pl.lit(None).alias(k) for k in POINT_SCHEMA if k not in polars[0]]
    )
    frame = frame.select([pl.col(k).cast(v) for k, v in POINT_SCHEMA.items()])
    (tmp_path / "points").mkdir()
    # deliberately shuffled and split: ranking must not depend on row order or part layout
    shuffled = frame.sample(fraction=1.0, shuffle=True, seed=5)
    shuffled[:40].write_parquet(tmp_path / "points" / "part-one.parquet")
    shuffled[40:].write_parquet(tmp_path / "points" / "part-two.parquet")
    thickness = {"A": 0.12, "B": 0.12, "C": 0.12, "D": 0.12, "F": 0.10, "G": 0.13, "H": 0.12}
    _write_sections(tmp_path, thickness)
    return tmp_path


def _write_sections(directory: Path, thickness: dict[str, float]) -> None:
    """sections.parquet (id, label, thickness; other properties null) and the manifest."""
    sections = pl.DataFrame(
        {
            "section_id": list(thickness),
            "family": "handmade",
            "label": list(thickness),
            "parameters": "{}",
            "thickness": list(thickness.values()),
        }
    ).with_columns(
        [
            pl.lit(None).cast(v).alias(k)
            for k, v in SECTION_SCHEMA.items()
            if k not in ("section_id", "family", "label", "parameters", "thickness")
        ]
    )
    sections.select(list(SECTION_SCHEMA)).cast(SECTION_SCHEMA).write_parquet(
        directory / "sections.parquet"
    )
    (directory / "manifest.json").write_text(json.dumps({"name": "handmade"}))


def test_cd_at_design_cl_interpolates_only_inside_segments(tmp_path):
    shortlist = rank(_catalog(tmp_path), cl=0.55, top=None)
    # B (non-converged), D (separated) and H (missing angle) have a gap at 0.55; C stalls at
    # cl_max = 0.5: none of them may appear. By hand: cl = 0.55 at 3.5 degrees.
    assert shortlist["section_id"].to_list() == ["F", "G", "A"]
    a = shortlist.row(2, named=True)
    assert a["cd_at_cl_0.55"] == pytest.approx(0.0135, rel=1e-12)
    assert a["alpha_deg_at_cl_0.55"] == pytest.approx(3.5, rel=1e-12)
    assert a["transition_upper_at_cl_0.55"] == pytest.approx(0.5 - 0.02 * 3.5, rel=1e-12)
    assert a["l_over_d"] == pytest.approx(0.55 / 0.0135)
    assert a["cl_max"] == pytest.approx(1.0) and not a["stall_reached"]
    assert a["stall_margin"] == pytest.approx(0.45)
    assert shortlist["rank"].to_list() == [1, 2, 3]


def test_design_point_says_whether_a_first_order_wake_point_took_part(tmp_path):
    # docs/catalog.md: wake_curvature at a design cl is true only when both points it
    # interpolates include the wake-curvature term. A's point at 4 degrees is first-order.
    catalog = _catalog(tmp_path)
    for part in (catalog / "points").glob("*.parquet"):
        frame = pl.read_parquet(part)
        first_order = (pl.col("section_id") == "A") & (pl.col("alpha_deg") == 4.0)
        frame.with_columns(wake_curvature=~first_order).write_parquet(part)
    table = rank(catalog, cl=[0.45, 0.55], top=None).filter(pl.col("section_id") == "A")
    row = table.row(0, named=True)
    assert row["wake_curvature_at_cl_0.45"]  # 2.5 degrees: points at 2 and 3 degrees
    assert not row["wake_curvature_at_cl_0.55"]  # 3.5 degrees: points at 3 and 4 degrees
    # The rank command marks such a row and says what the mark means.
    from typer.testing import CliRunner
    from wakerank.cli import app

    result = CliRunner().invoke(app, ["rank", str(catalog), "--cl", "0.55"])
    assert result.exit_code == 0, result.output
    assert "first-order wake" in result.output and "*" in result.output


def test_stalled_polar_uses_the_branch_below_cl_max(tmp_path):
    # 0.45 is met twice on C: at 2.5 degrees (attached) and 4 degrees (past stall).
    shortlist = rank(_catalog(tmp_path), cl=0.45, top=None)
    c = shortlist.filter(pl.col("section_id") == "C").row(0, named=True)
    assert c["alpha_deg_at_cl_0.45"] == pytest.approx(2.5)
    assert c["cd_at_cl_0.45"] == pytest.approx(0.0125)
    assert c["cl_max"] == pytest.approx(0.5) and c["stall_reached"]
    # B and D have their gap at 3 degrees (cl 0.5), so 0.45 falls in it; H's is at 4 degrees
    assert sorted(shortlist["section_id"]) == ["A", "C", "F", "G", "H"]


def test_constraints_and_weighted_design_points(tmp_path):
    catalog = _catalog(tmp_path)
    shortlist = rank(
        catalog,
        cl=[0.4, 0.55],
        weights=[0.3, 0.7],
        min_thickness=0.11,
        max_abs_cm=0.08,
        min_stall_margin=0.4,
    )
    assert shortlist["section_id"].to_list() == ["A"]
    # by hand: 0.3 cd(0.4) + 0.7 cd(0.55) = 0.3 x 0.012 + 0.7 x 0.0135
    assert shortlist["weighted_cd"][0] == pytest.approx(0.3 * 0.012 + 0.7 * 0.0135)
    assert rank(catalog, cl=0.55, min_stall_margin=0.46).height == 0
    tripped = rank(catalog, cl=0.55, transition="tripped")
    assert tripped["cd_at_cl_0.55"][0] == pytest.approx(1.25 * 0.0135)


def test_bad_ranking_arguments_name_the_problem(tmp_path):
    catalog = _catalog(tmp_path)
    with pytest.raises(InputError, match="reynolds: no runs at 1e\\+06"):
        rank(catalog, cl=0.55, reynolds=1e6)
    with pytest.raises(InputError, match="weights: expected 2 weights"):
        rank(catalog, cl=[0.4, 0.55], weights=[1.0])


def test_design_table_bucket_and_roughness_sensitivity(tmp_path):
    catalog = _catalog(tmp_path)
    table = design_table(scan_points(catalog), [0.55])
    a_free = table.filter((pl.col("section_id") == "A") & (pl.col("transition") == "free"))
    row = a_free.row(0, named=True)
    # cd_min = 0.010 at cl 0.2; cd <= 0.011 up to 1 degree (cl 0.3): bucket 0.1 wide
    assert row["cd_min"] == pytest.approx(0.010)
    assert row["drag_bucket_width"] == pytest.approx(0.1)
    assert row["roughness_sensitivity"] == pytest.approx(1.25)
    tripped = table.filter((pl.col("section_id") == "A") & (pl.col("transition") != "free"))
    assert tripped["roughness_sensitivity"][0] == pytest.approx(1.25)
    assert table.filter(pl.col("section_id") == "F")["roughness_sensitivity"].is_null().all()
    assert set(table["section_id"]) == {"A", "F", "G"}


def test_open_catalog_gives_lazy_frames(tmp_path):
    catalog = open_catalog(_catalog(tmp_path))
    assert isinstance(catalog.points, pl.LazyFrame) and isinstance(catalog.sections, pl.LazyFrame)
    assert catalog.points.select(pl.len()).collect().item() == 8 * 9 - 1
    with pytest.raises(InputError, match="not a wakerank catalog"):
        open_catalog(tmp_path / "points")


def test_rank_command_prints_the_table_and_writes_the_shortlist(tmp_path):
    from typer.testing import CliRunner
    from wakerank.cli import app

    catalog = _catalog(tmp_path / "cat")
    out = tmp_path / "shortlist.parquet"
    result = CliRunner().invoke(
        app,
        [
            "rank",
            str(catalog),
            "--cl",
            "0.4",
            "--cl",
            "0.55",
            "--weights",
            "0.3,0.7",
            "--min-thickness",
            "0.11",
            "--top",
            "5",
            "--out",
            str(out),
        ],
    )
    assert result.exit_code == 0, result.output
    assert "least drag at cl = 0.4, 0.55" in result.output
    assert pl.read_parquet(out)["section_id"].to_list() == ["G", "A"]
    bad = CliRunner().invoke(app, ["rank", str(catalog), "--cl", "0.55", "--weights", "a,b"])
    assert bad.exit_code == 2


def test_rank_command_takes_the_design_point_from_the_manifest(tmp_path):
    from typer.testing import CliRunner
    from wakerank.cli import app

    catalog = _catalog(tmp_path / "cat")
    manifest = json.loads((catalog / "manifest.json").read_text())
    manifest["design"] = {"cl": 0.55, "min_thickness": 0.11, "max_abs_cm": 0.08}
    (catalog / "manifest.json").write_text(json.dumps(manifest))
    result = CliRunner().invoke(app, ["rank", str(catalog), "--out", str(tmp_path / "s.parquet")])
    assert result.exit_code == 0, result.output
    assert pl.read_parquet(tmp_path / "s.parquet")["section_id"].to_list() == ["A"]


def test_design_points_say_where_the_flow_turns_locally_supersonic(tmp_path):
    # critical_mach_reached at a design cl: either interpolated point has cp_min below the
    # critical Cp at its Mach number; at M 0.7 Cp* = -0.779 (isentropic relations, Anderson,
    # Modern Compressible Flow). Hand-made: cp_min = -0.5 - 0.1 alpha passes it at 2.8 degrees;
    # cl 0.25 lies at 0.5 degrees (both neighbours subcritical), cl 0.55 at 3.5 degrees.
    rows = _polar("A")
    for row in rows:
        row["mach"] = 0.7
        row["cp_min"] = -0.5 - 0.1 * row["alpha_deg"]
    frame = pl.DataFrame(rows).with_columns(
        [pl.lit(None).alias(k) for k in POINT_SCHEMA if k not in rows[0]]
    )
    frame = frame.select([pl.col(k).cast(v) for k, v in POINT_SCHEMA.items()])
    (tmp_path / "points").mkdir(parents=True)
    frame.write_parquet(tmp_path / "points" / "part-one.parquet")
    _write_sections(tmp_path, {"A": 0.12})
    shortlist = rank(tmp_path, cl=[0.25, 0.55], weights=[0.5, 0.5], top=None)
    row = shortlist.row(0, named=True)
    assert row["critical_mach_reached_at_cl_0.25"] is False
    assert row["critical_mach_reached_at_cl_0.55"] is True


def test_the_ranking_benchmark_catalog_matches_the_catalog_schema(tmp_path):
    # `wakerank bench rank` writes a synthetic catalog; it must carry every column of the
    # point schema (it lacked wake_curvature once, and the benchmark failed), and rank.
    from wakerank.bench.ranking import bench_rank, write_synthetic_catalog

    rows = write_synthetic_catalog(tmp_path, points=2_000)
    assert rows > 0
    assert set(pl.read_parquet(tmp_path / "points").columns) == set(POINT_SCHEMA)
    timings = bench_rank(tmp_path, repeats=1)
    assert set(timings) == {"one design cl", "two design cls, weighted"}
