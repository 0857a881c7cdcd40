"""`wakerank bench campaign` and `wakerank bench rank`: campaign throughput, ranking speed."""

from __future__ import annotations

import tempfile
import time
from pathlib import Path

import typer

from wakerank.cli._errors import ErrorsAsMessages
from wakerank.cli.bench import bench_app


@bench_app.command("campaign")
def bench_campaign_command(
    workers: int = typer.Option(1, "--workers", min=1, help="Worker threads."),
) -> None:
    """Run a fixed campaign end to end: cases per second and the share outside the core."""
    from wakerank.bench.campaign import bench_campaign

    with ErrorsAsMessages():
        figures = bench_campaign(workers)
    typer.echo(
        f"campaign: {figures['cases']:.0f} cases ({figures['points']:.0f} points) with "
        f"{figures['workers']:.0f} worker(s) in {figures['wall_seconds']:.2f} s: "
        f"{figures['cases_per_second']:.2f} cases/s, "
        f"{100 * figures['converged_share']:.0f}% of points converged"
    )
    if figures["workers"] == 1:
        typer.echo(f"outside the core: {100 * figures['outside_core_share']:.1f}% of the wall time")
    else:
        typer.echo(
            f"worker time not spent in the core (outside the core, waiting for the last chunks, "
            f"other load): {100 * figures['outside_core_share']:.1f}%; run with --workers 1 for "
            "the share outside the core alone"
        )


@bench_app.command("rank")
def bench_rank_command(
    points: int = typer.Option(
        1_000_000, "--points", min=1000, help="Rows of the synthetic catalog."
    ),
) -> None:
    """Rank a synthetic catalog of a million points: seconds per ranking."""
    from wakerank.bench.ranking import bench_rank, write_synthetic_catalog

    with ErrorsAsMessages(), tempfile.TemporaryDirectory(prefix="wakerank-bench-rank-") as tmp:
        tick = time.perf_counter()
        rows = write_synthetic_catalog(Path(tmp), points)
        typer.echo(
            f"synthetic catalog: {rows} points written in {time.perf_counter() - tick:.1f} s"
        )
        for label, seconds in bench_rank(Path(tmp)).items():
            typer.echo(f"rank ({label}): {seconds:.2f} s for {rows} points")
