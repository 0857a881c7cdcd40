"""Chunk execution with atomic Parquet parts, resume, progress, and pluggable backends.

The unit of work is :func:`run_chunk`: a pure, picklable top-level function that analyses the
cases of one :class:`~wakerank.cases.ChunkSpec`, writes them as one part
``points/part-<chunk_id>.parquet`` atomically (temporary file in the same folder, fsync,
``os.replace``) and returns only counts. A *backend* maps it over the pending chunks:

    class Backend(Protocol):
        def run(self, chunks: Sequence[ChunkSpec], out_dir: str) -> Iterator[ChunkOutcome]

It calls ``run_chunk(chunk, out_dir)`` once per chunk, in any process and any order, yields a
:class:`ChunkResult` (or a :class:`ChunkFailure` for a chunk that failed for good) as each
finishes, and, when the consumer stops early (KeyboardInterrupt, GeneratorExit), stops
submitting and cleans up. :class:`LocalBackend` is the in-process thread pool (the core
releases the GIL). Orchestration (:func:`run_campaign`) decides what is pending from the parts
already on disk, so every backend resumes in the same way.
"""

from __future__ import annotations

import concurrent.futures as cf
import os
import threading
import time
from collections.abc import Callable, Iterator, Sequence
from dataclasses import dataclass
from pathlib import Path
from typing import Any, Protocol

import polars as pl
import pyarrow as pa
import pyarrow.parquet as pq

from wakerank.atomic import META_PREFIX, write_parquet_atomically
from wakerank.cases import Case, ChunkSpec
from wakerank.catalog_schema import ANALYSIS_COLUMNS, POINT_SCHEMA
from wakerank.errors import WakerankError

#: Signature of the per-case analysis: ``f(section, **condition.analysis_options())`` returning
#: a polars DataFrame with the columns of :data:`~wakerank.catalog_schema.ANALYSIS_COLUMNS`,
#: one row per angle. The default is :func:`wakerank.analyze`.
AnalysisFunction = Callable[..., pl.DataFrame]


@dataclass(frozen=True)
class ChunkResult:
    """Counts of one finished chunk (its rows are on disk, never in memory)."""

    chunk_id: str
    cases: int
    rows: int
    converged_rows: int
    failed_cases: int
    core_seconds: float = 0.0
    total_seconds: float = 0.0


@dataclass(frozen=True)
class ChunkFailure:
    """A chunk that could not be run (an unexpected error, or every retry failed)."""

    chunk_id: str
    message: str


ChunkOutcome = ChunkResult | ChunkFailure


class ChunkAbandoned(Exception):
    """Raised inside :func:`run_chunk` when asked to stop between cases; nothing is written."""


class Backend(Protocol):
    """Runs :func:`run_chunk` over chunks and yields each outcome once as it finishes."""

    def run(self, chunks: Sequence[ChunkSpec], out_dir: str) -> Iterator[ChunkOutcome]: ...


def part_path(out_dir: str | Path, chunk_id: str) -> Path:
    """Where the part of chunk `chunk_id` lives inside catalog folder `out_dir`."""
    return Path(out_dir) / "points" / f"part-{chunk_id}.parquet"


def run_chunk(
    chunk: ChunkSpec,
    out_dir: str,
    *,
    analysis_function: AnalysisFunction | None = None,
    should_stop: Callable[[], bool] | None = None,
) -> ChunkResult:
    """Analyse every case of `chunk`, write its part atomically and return the counts.

    A case whose analysis raises a :class:`wakerank.WakerankError` (bad geometry, no usable
    solution) is kept as rows with ``converged = false`` and the message in ``error``, so the
    part always holds one row per case and angle. Any other exception is a bug and propagates
    (the backend records the chunk as failed). `should_stop` is polled between cases; when it
    returns true the chunk is abandoned (:class:`ChunkAbandoned`) and nothing is written.
    """
    started = time.perf_counter()
    analyze = analysis_function or _default_analysis()
    core_seconds = 0.0
    frames: list[pl.DataFrame] = []
    failed = 0
    sections: dict[str, Any] = {}
    # Polars of the cases still to come that the core's analysis computed together with an
    # earlier case of the same section (`_analyze_together`), by case index; only when the
    # analysis is the core's own (`wakerank.analyze`), whose rows these are.
    together: dict[int, pl.DataFrame] = {}
    # Cases already part of a group tried together (computed, or to run alone after the group's
    # call failed), so that no group is tried twice.
    grouped: set[int] = set()
    shared = _is_core_analysis(analyze)
    for index, case in enumerate(chunk.cases):
        if should_stop is not None and should_stop():
            raise ChunkAbandoned(chunk.chunk_id)
        spec = case.section
        error: str | None = None
        result: pl.DataFrame | None = None
        try:
            if spec.section_id not in sections:
                sections[spec.section_id] = spec.build()
            tick = time.perf_counter()
            try:
                if shared and index not in grouped:
                    group, results = _analyze_together(
                        sections[spec.section_id], chunk.cases, index
                    )
                    grouped.update(group)
                    together.update(results)
                result = together.pop(index, None)
                if result is None:
                    result = analyze(
                        sections[spec.section_id], **case.condition.analysis_options()
                    )
            finally:
                core_seconds += time.perf_counter() - tick
        except WakerankError as exc:
            error = f"{type(exc).__name__}: {exc}"
            failed += 1
        frames.append(case_rows(case, result, error))
    table = pl.concat(frames, how="vertical").to_arrow()
    converged = int(pl.from_arrow(table.column("converged")).sum() or 0)
    metadata = {
        "chunk_id": chunk.chunk_id,
        "rows": str(table.num_rows),
        "cases": str(len(chunk.cases)),
        "converged_rows": str(converged),
        "failed_cases": str(failed),
    }
    write_parquet_atomically(table, part_path(out_dir, chunk.chunk_id), metadata)
    return ChunkResult(
        chunk_id=chunk.chunk_id,
        cases=len(chunk.cases),
        rows=table.num_rows,
        converged_rows=converged,
        failed_cases=failed,
        core_seconds=core_seconds,
        total_seconds=time.perf_counter() - started,
    )


def _analyze_together(
    section: Any, cases: Sequence[Case], first: int
) -> tuple[list[int], dict[int, pl.DataFrame]]:
    """Case `first` and the later cases of `cases` with the same section and angle grid (their
    indices), and their polars computed in one call of the core, by case index; no polars when
    there is no other such case or the call fails (each case then runs alone and meets its own
    error).

    The core shares the section's panel solution, its cases by angle and its
    quasi-simultaneous runs between the conditions, none of which depends on the Reynolds
    number, the transition settings or the Mach number; every row is the one the condition
    gives alone (Rust test `conditions_sharing_a_section_give_the_rows_of_each_alone`).
    """
    from wakerank.viscous import analyze_batch

    head = cases[first]
    group = [
        index
        for index in range(first, len(cases))
        if cases[index].section.section_id == head.section.section_id
        and cases[index].condition.alpha_deg == head.condition.alpha_deg
    ]
    if len(group) < 2:
        return group, {}
    conditions = []
    for index in group:
        options = cases[index].condition.analysis_options()
        options.pop("alpha_deg")
        conditions.append(options)
    try:
        frame = analyze_batch([section], conditions, list(head.condition.alpha_deg), threads=1)
    except WakerankError:
        return group, {}
    return group, {
        index: frame.filter(pl.col("condition_index") == k) for k, index in enumerate(group)
    }


def _is_core_analysis(analyze: AnalysisFunction) -> bool:
    """Whether `analyze` is :func:`wakerank.analyze` itself."""
    import wakerank

    return analyze is getattr(wakerank, "analyze", None)


def _default_analysis() -> AnalysisFunction:
    import wakerank

    return wakerank.analyze  # type: ignore[attr-defined,no-any-return]


def case_rows(case: Case, result: pl.DataFrame | None, error: str | None) -> pl.DataFrame:
    """The catalog rows of one case: one per angle of its grid, in the points schema.

    Angles the analysis did not return (or all of them, when it raised) become rows with
    ``converged = false`` and null values, so a gap in a polar is always visible.
    """
    cond = case.condition
    grid = pl.DataFrame({"alpha_deg": pl.Series(cond.alpha_deg, dtype=pl.Float64)})
    if result is not None and result.height > 0:
        present = [c for c in ANALYSIS_COLUMNS if c in result.columns]
        values = result.select(present).with_columns(pl.col("alpha_deg").cast(pl.Float64))
        if values.height == grid.height and (
            (values["alpha_deg"] - grid["alpha_deg"]).abs().max() < 1e-9  # type: ignore[operator]
        ):
            values = values.with_columns(grid["alpha_deg"])
        else:
            values = values.with_columns(pl.col("alpha_deg").round(9)).unique(
                "alpha_deg", keep="first", maintain_order=True
            )
            grid = grid.with_columns(pl.col("alpha_deg").round(9))
        rows = grid.join(values, on="alpha_deg", how="left", maintain_order="left")
    else:
        rows = grid
    rows = rows.with_columns(
        pl.lit(case.section.section_id).alias("section_id"),
        pl.lit(cond.condition_id).alias("condition_id"),
        pl.lit(cond.reynolds).alias("reynolds"),
        pl.lit(cond.mach).alias("mach"),
        pl.lit(cond.n_factor, dtype=pl.Float64).alias("n_factor"),
        pl.lit(cond.turbulence_intensity, dtype=pl.Float64).alias("turbulence_intensity"),
        pl.lit(cond.transition).alias("transition"),
        pl.lit(cond.trip_upper, dtype=pl.Float64).alias("trip_upper"),
        pl.lit(cond.trip_lower, dtype=pl.Float64).alias("trip_lower"),
        pl.lit(cond.panels).alias("panels"),
        pl.lit(error, dtype=pl.String).alias("error"),
    )
    columns = []
    for name, dtype in POINT_SCHEMA.items():
        column = pl.col(name) if name in rows.columns else pl.lit(None)
        columns.append(column.cast(dtype).alias(name))
    rows = rows.select(columns)
    # A row is converged only if the analysis said so; missing angles and failures are not.
    return rows.with_columns(pl.col("converged", "wake_curvature").fill_null(False))


def read_part_counts(path: Path, chunk: ChunkSpec) -> ChunkResult | None:
    """Counts of an existing part if it is complete and belongs to `chunk`, else None.

    A part is complete when its footer reads back, its metadata names this chunk and its row
    count is the chunk's (cases x angles); a truncated or half-written file fails the first test.
    """
    try:
        meta = pq.read_metadata(path)
    except (OSError, pa.ArrowException):
        return None
    kv = meta.metadata or {}

    def get(key: str) -> str | None:
        raw = kv.get(META_PREFIX + key.encode())
        return raw.decode() if raw is not None else None

    if get("chunk_id") != chunk.chunk_id or meta.num_rows != chunk.expected_rows:
        return None
    try:
        return ChunkResult(
            chunk_id=chunk.chunk_id,
            cases=int(get("cases") or -1),
            rows=meta.num_rows,
            converged_rows=int(get("converged_rows") or 0),
            failed_cases=int(get("failed_cases") or 0),
        )
    except ValueError:
        return None


class LocalBackend:
    """In-process backend: a thread pool of `workers` threads calling :func:`run_chunk`.

    The compiled core releases the GIL, so threads run cases in parallel. At most two chunks
    per worker are queued at a time, so memory does not grow with the campaign. On
    interruption the queued chunks are cancelled and the running ones stop at their next case
    boundary without writing anything.
    """

    def __init__(
        self, workers: int | None = None, analysis_function: AnalysisFunction | None = None
    ):
        self.workers = max(1, workers or os.cpu_count() or 1)
        self.analysis_function = analysis_function

    def run(self, chunks: Sequence[ChunkSpec], out_dir: str) -> Iterator[ChunkOutcome]:
        stop = threading.Event()
        pending = iter(chunks)
        running: dict[cf.Future[ChunkResult], str] = {}
        pool = cf.ThreadPoolExecutor(self.workers, thread_name_prefix="wakerank-chunk")

        def submit_next() -> bool:
            chunk = next(pending, None)
            if chunk is None:
                return False
            future = pool.submit(
                run_chunk,
                chunk,
                out_dir,
                analysis_function=self.analysis_function,
                should_stop=stop.is_set,
            )
            running[future] = chunk.chunk_id
            return True

        try:
            while len(running) < 2 * self.workers and submit_next():
                pass
            while running:
                done, _ = cf.wait(list(running), timeout=0.25, return_when=cf.FIRST_COMPLETED)
                for future in done:
                    chunk_id = running.pop(future)
                    try:
                        yield future.result()
                    except ChunkAbandoned:
                        continue
                    except Exception as exc:  # a bug in a case: record the chunk, go on
                        yield ChunkFailure(chunk_id, f"{type(exc).__name__}: {exc}")
                    submit_next()
        finally:
            stop.set()
            for future in running:
                future.cancel()
            pool.shutdown(wait=True, cancel_futures=True)


__all__ = [
    "AnalysisFunction",
    "Backend",
    "ChunkAbandoned",
    "ChunkFailure",
    "ChunkOutcome",
    "ChunkResult",
    "LocalBackend",
    "case_rows",
    "part_path",
    "read_part_counts",
    "run_chunk",
]
