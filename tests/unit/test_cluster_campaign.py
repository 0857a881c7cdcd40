"""A real campaign on a Dask cluster gives the in-process catalog, also when a worker is killed.

LocalCluster with two worker processes on 127.0.0.1 (processes=True, one thread each): the
chunks run in other processes and write their parts into the shared folder.
"""

from __future__ import annotations

import json
import os
import sys
import shutil
import signal
from pathlib import Path

import polars as pl
import pytest
import wakerank
from polars.testing import assert_frame_equal

pytest.importorskip("distributed")
pytest.importorskip("wakerank.session")
if not (hasattr(wakerank, "Section") and hasattr(wakerank, "analyze")):
    pytest.skip("needs the section families and the viscous analysis", allow_module_level=True)

from wakerank.campaign import load_campaign  # noqa: E402
from wakerank.catalog import open_catalog  # noqa: E402
from wakerank.cluster import DaskBackend, connect  # noqa: E402
from wakerank.session import run_campaign  # noqa: E402

CAMPAIGN = """
name = "cluster-check"
panels = 80
chunk_size = 1

[[sections]]
family = "naca4"
camber = [0.02, 0.04]
camber_position = [0.4]
thickness = [0.10, 0.12, 0.15]

[conditions]
reynolds = [5e5, 1e6]
mach = 0.0
n_factor = 9.0
alpha_deg = {from = 0, to = 4, step = 2}
transition = ["free"]

[design]
cl = 0.4
"""
ORDER = ["section_id", "condition_id", "alpha_deg"]


def _points(folder: Path) -> pl.DataFrame:
    return open_catalog(folder).points.collect().sort(ORDER)


class WorkerKiller:
    """Passes a backend's outcomes through and SIGKILLs one worker process after the first."""

    def __init__(self, backend: DaskBackend, pid: int):
        self.backend, self.pid, self.killed = backend, pid, False

    def run(self, chunks, out_dir):  # type: ignore[no-untyped-def]
        for outcome in self.backend.run(chunks, out_dir):
            yield outcome
            if not self.killed:
                os.kill(self.pid, signal.SIGKILL)
                self.killed = True


@pytest.fixture(scope="module")
def campaign(tmp_path_factory):
    folder = tmp_path_factory.mktemp("campaign")
    path = folder / "cluster-check.toml"
    path.write_text(CAMPAIGN)
    loaded = load_campaign(path)
    reference = run_campaign(loaded, folder / "in-process", workers=1, progress=False)
    assert reference.complete
    return loaded, folder / "in-process"


@pytest.fixture(scope="module")
def client():
    """One local cluster of two worker processes for the module (the kill test runs last)."""
    with connect("local:2") as dask_client:
        yield dask_client


def test_cluster_catalog_equals_in_process_catalog(campaign, client, tmp_path):
    loaded, reference = campaign
    summary = run_campaign(loaded, tmp_path / "dask", backend=DaskBackend(client),
                           progress=False)
    assert summary.complete and not summary.failed_chunks
    assert_frame_equal(_points(tmp_path / "dask"), _points(reference))
    for table in ("sections", "design"):
        mine = getattr(open_catalog(tmp_path / "dask"), table).collect().sort("section_id")
        theirs = getattr(open_catalog(reference), table).collect().sort("section_id")
        assert_frame_equal(mine.sort(mine.columns[:3]), theirs.sort(theirs.columns[:3]))


def analysis_that_breaks_on_thick_sections(section, **options):  # type: ignore[no-untyped-def]
    """Stand-in for a bug that hits some chunks on every try: raises for t/c above 0.14."""
    if section.thickness > 0.14:
        raise RuntimeError("stand-in failure for thick sections")
    return wakerank.analyze(section, **options)


def test_chunk_failing_every_try_is_recorded_not_dropped(campaign, client, tmp_path):
    cloudpickle = pytest.importorskip("cloudpickle")
    cloudpickle.register_pickle_by_value(sys.modules[__name__])
    loaded, reference = campaign
    backend = DaskBackend(client, retries=1,
                          analysis_function=analysis_that_breaks_on_thick_sections)
    summary = run_campaign(loaded, tmp_path / "dask", backend=backend, progress=False)
    assert not summary.complete
    assert len(summary.failed_chunks) == 4  # two t/c = 0.15 sections at two Reynolds numbers
    assert all("stand-in failure" in f["message"] for f in summary.failed_chunks)
    manifest = json.loads((tmp_path / "dask" / "manifest.json").read_text())
    assert sorted(f["chunk_id"] for f in manifest["failed_chunks"]) == sorted(
        f["chunk_id"] for f in summary.failed_chunks
    )
    points = _points(tmp_path / "dask")
    assert points.height == 4 * 2 * 3
    expected = _points(reference).join(points.select("section_id").unique(), on="section_id")
    assert_frame_equal(points, expected.sort(ORDER))


def test_cluster_resumes_an_in_process_run(campaign, client, tmp_path):
    loaded, reference = campaign
    resumed = tmp_path / "resumed"
    shutil.copytree(reference, resumed)
    parts = sorted((resumed / "points").glob("part-*.parquet"))
    for part in parts[::2]:
        part.unlink()
    parts[1].write_bytes(parts[1].read_bytes()[:100])  # a half-written part is redone
    summary = run_campaign(loaded, resumed, backend=DaskBackend(client), progress=False)
    assert summary.complete
    assert summary.computed_chunks == len(parts[::2]) + 1
    assert_frame_equal(_points(resumed), _points(reference))


def test_killed_worker_still_gives_every_case_once(campaign, client, tmp_path):
    loaded, reference = campaign
    victim = next(iter(client.run(os.getpid).values()))
    killer = WorkerKiller(DaskBackend(client), victim)
    summary = run_campaign(loaded, tmp_path / "dask", backend=killer, progress=False)
    assert killer.killed and victim not in client.run(os.getpid).values()
    assert summary.complete and not summary.failed_chunks
    points = _points(tmp_path / "dask")
    assert points.select(ORDER).is_duplicated().sum() == 0
    assert points.height == 6 * 2 * 3  # sections x conditions x angles
    assert_frame_equal(points, _points(reference))
