"""The campaign runner: resume after a kill, truncated parts, determinism, Ctrl-C."""

from __future__ import annotations

import os
import signal
import subprocess
import sys
import time
from pathlib import Path

import polars as pl
import pytest
from campaign_fakes import TINY_CAMPAIGN, fake_analyze, install
from wakerank.campaign import load_campaign
from wakerank.catalog import open_catalog
from wakerank.session import run_campaign

DRIVER = Path(__file__).parent / "campaign_driver.py"
ORDER = ["section_id", "condition_id", "alpha_deg"]


@pytest.fixture
def campaign_file(tmp_path, monkeypatch):
    install(monkeypatch)
    path = tmp_path / "tiny.toml"
    path.write_text(TINY_CAMPAIGN)
    return path


def _points(directory: Path) -> pl.DataFrame:
    return open_catalog(directory).points.collect().sort(ORDER)


def _run(campaign_file: Path, out: Path, **options):
    return run_campaign(load_campaign(campaign_file), out, progress=False, **options)


def test_run_writes_one_row_per_case_and_angle(campaign_file, tmp_path):
    summary = _run(campaign_file, tmp_path / "cat", workers=2)
    catalog = open_catalog(tmp_path / "cat")
    points = catalog.points.collect()
    # 4 NACA 4-digit (the symmetric ones once) + 1 five-digit; 2 Re x 2 transitions; 15 angles
    assert summary.cases == 4 * 5 and points.height == 20 * 15
    assert points.select(ORDER).is_duplicated().sum() == 0
    assert catalog.sections.collect().height == 5
    assert catalog.manifest["status"] == "complete"
    assert catalog.manifest["counts"]["points_written"] == points.height
    assert catalog.design.collect().height > 0


def test_results_do_not_depend_on_workers_or_chunk_size(campaign_file, tmp_path):
    _run(campaign_file, tmp_path / "a", workers=1, chunk_size=1)
    _run(campaign_file, tmp_path / "b", workers=3, chunk_size=7)
    assert _points(tmp_path / "a").equals(_points(tmp_path / "b"))
    design_a = open_catalog(tmp_path / "a").design.collect()
    design_b = open_catalog(tmp_path / "b").design.collect()
    assert design_a.equals(design_b)


def test_rerun_reuses_every_part_and_writes_nothing_twice(campaign_file, tmp_path):
    first = _run(campaign_file, tmp_path / "cat")
    before = {p.name: p.stat().st_mtime_ns for p in (tmp_path / "cat" / "points").iterdir()}
    again = _run(campaign_file, tmp_path / "cat")
    after = {p.name: p.stat().st_mtime_ns for p in (tmp_path / "cat" / "points").iterdir()}
    assert again.computed_chunks == 0 and again.reused_chunks == first.chunks
    assert before == after


def test_rerun_with_another_solver_version_recomputes_every_part(
    campaign_file, tmp_path, monkeypatch
):
    # Results of two solver versions are never mixed in one catalog (common practice).
    import wakerank.cases

    first = _run(campaign_file, tmp_path / "cat")
    monkeypatch.setattr(wakerank.cases, "core_version", lambda: "0.0.0-other")
    again = _run(campaign_file, tmp_path / "cat")
    assert again.reused_chunks == 0 and again.computed_chunks == first.chunks
    assert again.superseded_parts == first.chunks
    assert len(list((tmp_path / "cat" / "superseded").iterdir())) == first.chunks
    assert _points(tmp_path / "cat").height == first.points


def test_truncated_part_is_detected_and_recomputed(campaign_file, tmp_path):
    _run(campaign_file, tmp_path / "cat")
    reference = _points(tmp_path / "cat")
    part = sorted((tmp_path / "cat" / "points").glob("part-*.parquet"))[1]
    data = part.read_bytes()
    part.write_bytes(data[: len(data) // 2])
    leftover = part.with_name(f".{part.name}.999.1.tmp")
    leftover.write_bytes(b"half a write")
    summary = _run(campaign_file, tmp_path / "cat")
    assert summary.redone_parts == 1 and summary.computed_chunks == 1
    assert not leftover.exists()
    assert _points(tmp_path / "cat").equals(reference)


def test_part_with_wrong_row_count_is_recomputed(campaign_file, tmp_path):
    _run(campaign_file, tmp_path / "cat")
    reference = _points(tmp_path / "cat")
    part = min((tmp_path / "cat" / "points").glob("part-*.parquet"))
    pl.read_parquet(part).head(3).write_parquet(part)  # complete file, wrong content
    summary = _run(campaign_file, tmp_path / "cat")
    assert summary.redone_parts == 1
    assert _points(tmp_path / "cat").equals(reference)


def test_failed_case_is_kept_as_non_converged_rows(campaign_file, tmp_path):
    from wakerank.errors import ConvergenceError

    def sometimes_fails(section, **options):
        if section.thickness > 0.15 and options["reynolds"] < 6e5:
            raise ConvergenceError("no solution at all")
        return fake_analyze(section, **options)

    summary = _run(campaign_file, tmp_path / "cat", analysis_function=sometimes_fails)
    points = _points(tmp_path / "cat")
    failed = points.filter(pl.col("error").is_not_null())
    assert summary.failed_cases == 2 * 2  # two 16 % sections x two transitions
    assert failed.height == summary.failed_cases * 15
    assert not failed["converged"].any() and failed["cd"].is_null().all()
    assert "no solution at all" in failed["error"][0]


def test_unexpected_error_marks_the_chunk_failed_not_lost(campaign_file, tmp_path):
    def buggy(section, **options):
        if section.thickness > 0.15:
            raise RuntimeError("bug in a case")
        return fake_analyze(section, **options)

    summary = _run(campaign_file, tmp_path / "cat", analysis_function=buggy)
    assert summary.failed_chunks and "bug in a case" in summary.failed_chunks[0]["message"]
    manifest = open_catalog(tmp_path / "cat").manifest
    assert manifest["status"] == "incomplete" and manifest["failed_chunks"]
    # the rerun with the bug fixed completes the catalog
    fixed = _run(campaign_file, tmp_path / "cat")
    assert fixed.complete and fixed.computed_chunks == len(summary.failed_chunks)


def _driver(args, core="fake", **kwargs):
    env = {**os.environ, "PYTHONPATH": str(DRIVER.parent), "WAKERANK_TEST_CORE": core}
    return subprocess.Popen(
        [sys.executable, str(DRIVER), *args],
        env=env,
        stdout=subprocess.PIPE,
        stderr=subprocess.PIPE,
        text=True,
        **kwargs,
    )


def _wait_for_parts(points: Path, count: int, process, timeout: float = 60.0) -> None:
    deadline = time.monotonic() + timeout
    while time.monotonic() < deadline:
        if points.is_dir() and len(list(points.glob("part-*.parquet"))) >= count:
            return
        if process.poll() is not None:
            raise AssertionError(f"run ended early: {process.communicate()}")
        time.sleep(0.05)
    raise AssertionError("no parts appeared")


def test_sigkill_mid_run_then_rerun_equals_an_uninterrupted_run(campaign_file, tmp_path):
    out = tmp_path / "killed"
    process = _driver(["run", str(campaign_file), "--out", str(out), "--workers", "2"])
    _wait_for_parts(out / "points", 3, process)
    process.send_signal(signal.SIGKILL)
    process.wait()
    written = len(list((out / "points").glob("part-*.parquet")))
    assert 0 < written < 10, "the kill should land half-way"
    rerun = _driver(["run", str(campaign_file), "--out", str(out)])
    _stdout, stderr = rerun.communicate(timeout=120)
    assert rerun.returncode == 0, stderr
    _run(campaign_file, tmp_path / "clean", analysis_function=fake_analyze)
    killed, clean = _points(out), _points(tmp_path / "clean")
    assert killed.select(ORDER).is_duplicated().sum() == 0
    assert killed.equals(clean)


REAL_CAMPAIGN = """\
name = "kill-check"
panels = 80
chunk_size = 1

[[sections]]
family = "naca4"
camber = [0.0, 0.02, 0.04]
camber_position = [0.4]
thickness = [0.10, 0.12, 0.15]

[conditions]
reynolds = [5e5, 1e6]
alpha_deg = {from = 0, to = 4, step = 2}
"""


def _real_core_available() -> bool:
    import wakerank as wr

    try:
        wr.analyze(wr.Section.naca("0012"), alpha_deg=[0.0], reynolds=1e6, panels=80)
    except (AttributeError, wr.InputError):
        return False
    return True


@pytest.mark.skipif(not _real_core_available(), reason="needs the viscous analysis")
def test_sigkill_with_the_real_core_then_rerun_equals_an_uninterrupted_run(tmp_path):
    campaign = tmp_path / "kill.toml"
    campaign.write_text(REAL_CAMPAIGN)
    out = tmp_path / "killed"
    process = _driver(["run", str(campaign), "--out", str(out), "--workers", "1"], core="real")
    _wait_for_parts(out / "points", 3, process, timeout=120)
    process.send_signal(signal.SIGKILL)
    process.wait()
    written = len(list((out / "points").glob("part-*.parquet")))
    assert 0 < written < 18, "the kill should land half-way"
    rerun = _driver(["run", str(campaign), "--out", str(out), "--workers", "2"], core="real")
    _, stderr = rerun.communicate(timeout=300)
    assert rerun.returncode == 0, stderr
    run_campaign(load_campaign(campaign), tmp_path / "clean", workers=1, progress=False)
    killed, clean = _points(out), _points(tmp_path / "clean")
    assert killed.height == 9 * 2 * 3  # sections x Reynolds numbers x angles
    assert killed.select(ORDER).is_duplicated().sum() == 0
    assert killed.equals(clean)


def test_ctrl_c_keeps_finished_parts_and_says_how_to_resume(campaign_file, tmp_path):
    out = tmp_path / "cat"
    process = _driver(["run", str(campaign_file), "--out", str(out), "--workers", "1"])
    _wait_for_parts(out / "points", 2, process)
    process.send_signal(signal.SIGINT)
    _stdout, stderr = process.communicate(timeout=60)
    assert process.returncode == 130, stderr
    assert "rerun to resume" in stderr and "Traceback" not in stderr
    assert open_catalog(out).manifest["status"] == "interrupted"
    assert not list((out / "points").glob(".*.tmp"))
    rerun = _driver(["run", str(campaign_file), "--out", str(out)])
    _, stderr = rerun.communicate(timeout=120)
    assert rerun.returncode == 0, stderr
    assert open_catalog(out).manifest["status"] == "complete"
