"""One run of a campaign into a catalog folder: plan, resume, run the pending chunks on a
backend with a progress bar, then write the design table and the manifest.

Resume works from what is on disk, whatever backend wrote it: a chunk whose part exists and
reads back with the expected metadata and row count is done; a part that is truncated or has
the wrong row count is deleted and redone; temporary files of an interrupted write are
removed; parts of chunks no longer in the plan (the campaign was edited) are moved to
``superseded/`` so the catalog holds exactly the campaign's rows.
"""

from __future__ import annotations

import hashlib
import os
import platform
import shutil
import time
from dataclasses import dataclass, field
from datetime import datetime, timezone
from pathlib import Path
from typing import Any

from rich.console import Console
from rich.progress import BarColumn, MofNCompleteColumn, Progress, TextColumn, TimeRemainingColumn

from wakerank import catalog as cat
from wakerank.atomic import write_json_atomically
from wakerank.campaign import LoadedCampaign, values_of
from wakerank.cases import CampaignPlan, ChunkSpec, expand
from wakerank.catalog_schema import CATALOG_FORMAT, CATALOG_FORMAT_VERSION
from wakerank.runner import (
    AnalysisFunction,
    Backend,
    ChunkFailure,
    ChunkResult,
    LocalBackend,
    part_path,
    read_part_counts,
)


class RunInterrupted(KeyboardInterrupt):
    """Raised by :func:`run_campaign` after a Ctrl-C, once finished work is safely kept."""

    def __init__(self, out_dir: Path, done: int, total: int):
        super().__init__(f"interrupted with {done} of {total} cases in {out_dir}")
        self.out_dir = out_dir
        self.done = done
        self.total = total


@dataclass
class RunSummary:
    """What a run did: counts for the whole catalog and for this session."""

    out_dir: Path
    cases: int
    chunks: int
    points: int = 0
    converged_points: int = 0
    failed_cases: int = 0
    reused_chunks: int = 0
    computed_chunks: int = 0
    computed_cases: int = 0
    redone_parts: int = 0
    superseded_parts: int = 0
    failed_chunks: list[dict[str, str]] = field(default_factory=list)
    wall_seconds: float = 0.0
    core_seconds: float = 0.0
    workers: int = 1

    @property
    def complete(self) -> bool:
        return not self.failed_chunks

    @property
    def cases_per_second(self) -> float:
        return self.computed_cases / self.wall_seconds if self.wall_seconds > 0 else 0.0


def default_out_dir(loaded: LoadedCampaign) -> Path:
    """``catalogs/<name>/`` in the current folder."""
    return Path("catalogs") / loaded.campaign.name


def run_campaign(
    loaded: LoadedCampaign,
    out_dir: str | os.PathLike[str] | None = None,
    *,
    workers: int | None = None,
    fresh: bool = False,
    chunk_size: int | None = None,
    backend: Backend | None = None,
    analysis_function: AnalysisFunction | None = None,
    console: Console | None = None,
    progress: bool = True,
) -> RunSummary:
    """Run (or resume) `loaded` into the catalog folder `out_dir` and return the summary.

    `analysis_function` replaces :func:`wakerank.analyze` in the default local backend (a
    hook for tests). Raises :class:`RunInterrupted` on Ctrl-C after keeping finished parts.
    """
    out = Path(out_dir) if out_dir is not None else default_out_dir(loaded)
    previous = _previous_manifest(out) if not fresh else None
    campaign_sha = hashlib.sha256(loaded.text.encode("utf-8")).hexdigest()
    if chunk_size is None and previous and previous.get("campaign_sha256") == campaign_sha:
        chunk_size = previous.get("chunk_size")
    plan = expand(loaded, chunk_size)  # validates everything before anything is written
    if fresh:
        _clear(out)
    out.mkdir(parents=True, exist_ok=True)
    console = console or Console(stderr=True)
    local = LocalBackend(workers, analysis_function)
    backend = backend or local
    summary = RunSummary(
        out_dir=out,
        cases=plan.case_count,
        chunks=len(plan.chunks),
        workers=getattr(backend, "workers", local.workers),
    )

    done, pending = _scan_existing(plan, out, summary)
    for result in done:
        _count(summary, result)
    summary.reused_chunks = len(done)
    if not _sections_current(out / cat.SECTIONS, plan):
        cat.write_sections(plan.sections, out / cat.SECTIONS)
    started_at = (previous or {}).get("started_at") or _now()
    manifest = _manifest(loaded, plan, campaign_sha, started_at, summary, status="running")
    write_json_atomically(manifest, out / cat.MANIFEST)

    tick = time.perf_counter()
    try:
        _run_pending(backend, pending, out, summary, console, progress)
    except KeyboardInterrupt:
        summary.wall_seconds = time.perf_counter() - tick
        manifest = _manifest(loaded, plan, campaign_sha, started_at, summary, "interrupted")
        write_json_atomically(manifest, out / cat.MANIFEST)
        raise RunInterrupted(out, _cases_done(summary, plan), plan.case_count) from None
    summary.wall_seconds = time.perf_counter() - tick

    design_cl = values_of(loaded.campaign.design.cl) if loaded.campaign.design else []
    design = cat.design_table(cat.part_files(out), design_cl)
    cat.write_table_atomically(design, out / cat.DESIGN)
    status = "complete" if summary.complete else "incomplete"
    manifest = _manifest(loaded, plan, campaign_sha, started_at, summary, status)
    manifest["finished_at"] = _now()
    write_json_atomically(manifest, out / cat.MANIFEST)
    return summary


def _run_pending(
    backend: Backend,
    pending: list[ChunkSpec],
    out: Path,
    summary: RunSummary,
    console: Console,
    show: bool,
) -> None:
    by_id = {chunk.chunk_id: chunk for chunk in pending}
    done_before = summary.cases - sum(len(c.cases) for c in pending)
    columns = (
        TextColumn("[bold]{task.description}"),
        BarColumn(),
        MofNCompleteColumn(),
        TextColumn("cases"),
        TextColumn("{task.fields[converged]} converged"),
        TextColumn("{task.fields[rate]} cases/s"),
        TimeRemainingColumn(),
    )
    started = time.perf_counter()
    with Progress(*columns, console=console, disable=not show, transient=False) as bar:
        task = bar.add_task(
            "running",
            total=summary.cases,
            completed=done_before,
            converged=_share(summary),
            rate="-",
        )
        results = backend.run(pending, str(out))
        try:
            for outcome in results:
                chunk = by_id.get(outcome.chunk_id)
                if isinstance(outcome, ChunkFailure):
                    summary.failed_chunks.append(
                        {"chunk_id": outcome.chunk_id, "message": outcome.message}
                    )
                    continue
                _count(summary, outcome)
                summary.computed_chunks += 1
                summary.computed_cases += outcome.cases
                summary.core_seconds += outcome.core_seconds
                elapsed = time.perf_counter() - started
                rate = summary.computed_cases / elapsed if elapsed > 0 else 0.0
                bar.update(
                    task,
                    advance=len(chunk.cases) if chunk else outcome.cases,
                    converged=_share(summary),
                    rate=f"{rate:.1f}",
                )
        finally:
            close = getattr(results, "close", None)
            if close is not None:
                close()


def _share(summary: RunSummary) -> str:
    if summary.points == 0:
        return "-"
    return f"{100.0 * summary.converged_points / summary.points:.0f}%"


def _count(summary: RunSummary, result: ChunkResult) -> None:
    summary.points += result.rows
    summary.converged_points += result.converged_rows
    summary.failed_cases += result.failed_cases


def _cases_done(summary: RunSummary, plan: CampaignPlan) -> int:
    per_chunk = {c.chunk_id: len(c.cases) for c in plan.chunks}
    failed = {f["chunk_id"] for f in summary.failed_chunks}
    return sum(
        n
        for cid, n in per_chunk.items()
        if cid not in failed and part_path(summary.out_dir, cid).exists()
    )


def _scan_existing(
    plan: CampaignPlan, out: Path, summary: RunSummary
) -> tuple[list[ChunkResult], list[ChunkSpec]]:
    points = out / cat.POINTS
    for leftover in points.glob(".*.tmp") if points.is_dir() else []:
        leftover.unlink(missing_ok=True)
    planned = {chunk.chunk_id for chunk in plan.chunks}
    for part in sorted(points.glob("part-*.parquet")) if points.is_dir() else []:
        chunk_id = part.stem.removeprefix("part-")
        if chunk_id not in planned:
            target = out / "superseded" / part.name
            target.parent.mkdir(exist_ok=True)
            os.replace(part, target)
            summary.superseded_parts += 1
    done: list[ChunkResult] = []
    pending: list[ChunkSpec] = []
    for chunk in plan.chunks:
        path = part_path(out, chunk.chunk_id)
        if path.exists():
            counts = read_part_counts(path, chunk)
            if counts is not None:
                done.append(counts)
                continue
            path.unlink()
            summary.redone_parts += 1
        pending.append(chunk)
    return done, pending


def _sections_current(path: Path, plan: CampaignPlan) -> bool:
    """True when sections.parquet already lists exactly the plan's sections, in order."""
    import polars as pl

    try:
        ids = pl.read_parquet(path, columns=["section_id"])["section_id"].to_list()
    except (OSError, pl.exceptions.PolarsError):
        return False
    return ids == [spec.section_id for spec in plan.sections]


def _previous_manifest(out: Path) -> dict[str, Any] | None:
    import json

    try:
        return json.loads((out / cat.MANIFEST).read_text(encoding="utf-8"))  # type: ignore[no-any-return]
    except (OSError, ValueError):
        return None


def _clear(out: Path) -> None:
    """Remove what a run writes (never anything else in the folder)."""
    for name in (cat.MANIFEST, cat.SECTIONS, cat.DESIGN):
        (out / name).unlink(missing_ok=True)
    points = out / cat.POINTS
    if points.is_dir():
        for part in list(points.glob("part-*.parquet")) + list(points.glob(".*.tmp")):
            part.unlink()
    if (out / "superseded").is_dir():
        shutil.rmtree(out / "superseded")


def _now() -> str:
    return datetime.now(timezone.utc).isoformat(timespec="seconds")


def _manifest(
    loaded: LoadedCampaign,
    plan: CampaignPlan,
    campaign_sha: str,
    started_at: str,
    summary: RunSummary,
    status: str,
) -> dict[str, Any]:
    import wakerank

    campaign = loaded.campaign
    return {
        "format": CATALOG_FORMAT,
        "format_version": CATALOG_FORMAT_VERSION,
        "name": campaign.name,
        "status": status,
        "wakerank_version": wakerank.__version__,
        "python": platform.python_version(),
        "campaign_file": str(loaded.path),
        "campaign_sha256": campaign_sha,
        "campaign_text": loaded.text,
        "solver_settings": {
            "panels": campaign.panels,
            "analysis": "viscous: panel method + integral boundary layer, cd = 2 theta_inf / c",
        },
        "design": campaign.design.model_dump(by_alias=True) if campaign.design else None,
        "chunk_size": plan.chunk_size,
        "started_at": started_at,
        "updated_at": _now(),
        "finished_at": None,
        "counts": {
            "sections": len(plan.sections),
            "conditions": len(plan.conditions),
            "cases": plan.case_count,
            "chunks": len(plan.chunks),
            "points_planned": plan.point_count,
            "points_written": summary.points,
            "converged_points": summary.converged_points,
            "failed_cases": summary.failed_cases,
        },
        "failed_chunks": summary.failed_chunks,
    }


__all__ = ["RunInterrupted", "RunSummary", "default_out_dir", "run_campaign"]
