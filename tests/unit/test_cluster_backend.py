"""The Dask backend with a stand-in chunk function: placement, retries, failures, lost workers.

A real scheduler with worker processes runs on 127.0.0.1 (LocalCluster, processes=True).
"""

from __future__ import annotations

import os
import signal
import sys
import time
from dataclasses import dataclass
from pathlib import Path

import polars as pl
import pytest

distributed = pytest.importorskip("distributed")
cloudpickle = pytest.importorskip("cloudpickle")

from wakerank.cluster import connect, parse_target, run_chunks
from wakerank.errors import InputError

cloudpickle.register_pickle_by_value(sys.modules[__name__])


@dataclass(frozen=True)
class StandInChunk:
    chunk_id: str
    cases: tuple[int, ...]
    seconds: float = 0.0
    fail: bool = False


def write_part(chunk: StandInChunk, out_dir: str) -> int:
    """Stand-in for the runner's chunk function: one part per chunk, temporary file + rename."""
    if chunk.fail:
        raise ValueError(f"chunk {chunk.chunk_id} cannot be computed")
    time.sleep(chunk.seconds)
    frame = pl.DataFrame({"case": list(chunk.cases), "value": [c * 0.5 for c in chunk.cases]})
    final = Path(out_dir) / f"part-{chunk.chunk_id}.parquet"
    temporary = final.with_suffix(f".tmp-{os.getpid()}")
    frame.write_parquet(temporary)
    os.replace(temporary, final)
    return len(chunk.cases)


def _chunks(count: int, per_chunk: int = 5, seconds: float = 0.0) -> list[StandInChunk]:
    return [
        StandInChunk(f"c{i:03d}", tuple(range(i * per_chunk, (i + 1) * per_chunk)), seconds)
        for i in range(count)
    ]


@pytest.fixture(scope="module")
def client():
    with connect("local:2") as dask_client:
        yield dask_client


def test_targets_parse_or_name_the_problem():
    assert parse_target("local:3").local_workers == 3
    assert parse_target("tcp://10.0.0.5:8786").address == "tcp://10.0.0.5:8786"
    for bad in ("local:0", "local:x", "10.0.0.5:8786", ""):
        with pytest.raises(InputError, match="--cluster"):
            parse_target(bad)


def test_every_chunk_once_and_failures_reported(client, tmp_path):
    chunks = _chunks(6) + [StandInChunk("bad", (999,), fail=True)]
    outcomes = list(run_chunks(client, write_part, chunks, str(tmp_path), retries=1))
    assert sorted(o.chunk.chunk_id for o in outcomes) == sorted(c.chunk_id for c in chunks)
    failed = [o for o in outcomes if o.failed]
    assert [o.chunk.chunk_id for o in failed] == ["bad"]
    assert "cannot be computed" in failed[0].error
    table = pl.read_parquet(tmp_path / "part-*.parquet")
    assert sorted(table["case"].to_list()) == list(range(30))


def test_killed_worker_loses_no_chunk(client, tmp_path):
    chunks = _chunks(16, seconds=0.25)
    pids = client.run(os.getpid)
    seen = []
    for outcome in run_chunks(client, write_part, chunks, str(tmp_path)):
        seen.append(outcome)
        if len(seen) == 2:
            os.kill(next(iter(pids.values())), signal.SIGKILL)
    assert not [o for o in seen if o.failed]
    assert sorted(o.chunk.chunk_id for o in seen) == [c.chunk_id for c in chunks]
    table = pl.read_parquet(tmp_path / "part-*.parquet")
    assert table.height == 80 and table["case"].n_unique() == 80
    # the killed process is gone (its nanny may have started a fresh one meanwhile)
    assert next(iter(pids.values())) not in client.run(os.getpid).values()
