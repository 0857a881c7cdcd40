"""`wakerank run CAMPAIGN.toml`: run or resume a screening campaign into a catalog folder."""

from __future__ import annotations

import shlex
from pathlib import Path

import typer

from wakerank.cli import app
from wakerank.cli._errors import EXIT_FAILED, ErrorsAsMessages


@app.command("run")
def run_command(
    campaign: Path = typer.Argument(..., help="Campaign file (TOML)."),
    out: Path | None = typer.Option(
        None, "--out", help="Catalog folder [default: catalogs/<name>]."
    ),
    workers: int | None = typer.Option(
        None, "--workers", min=1, help="Worker threads [default: all cores]."
    ),
    fresh: bool = typer.Option(
        False, "--fresh", help="Discard earlier results in the folder and start over."
    ),
    chunk_size: int | None = typer.Option(
        None, "--chunk-size", min=1, help="Cases per chunk (one Parquet part each)."
    ),
    cluster: str | None = typer.Option(
        None, "--cluster", help="Run the chunks on Dask: tcp://HOST:8786 or local:N."
    ),
) -> None:
    """Run a campaign: every section at every condition, resumable after an interruption."""
    from wakerank.campaign import load_campaign
    from wakerank.session import RunInterrupted, default_out_dir, run_campaign

    with ErrorsAsMessages():
        loaded = load_campaign(campaign)
        target = out if out is not None else default_out_dir(loaded)
        try:
            summary = run_campaign(
                loaded,
                target,
                workers=workers,
                fresh=fresh,
                chunk_size=chunk_size,
                backend=_backend(cluster),  # type: ignore[arg-type]
            )
        except RunInterrupted as stop:
            again = ["wakerank", "run", str(campaign), "--out", str(target)]
            typer.echo(
                f"interrupted: {stop.done} of {stop.total} cases are kept in {target}; "
                f"rerun to resume: {shlex.join(again)}",
                err=True,
            )
            raise typer.Exit(130) from None
    share = 100.0 * summary.converged_points / summary.points if summary.points else 0.0
    typer.echo(
        f"catalog {target}: {summary.cases} cases ({summary.computed_cases} run now, "
        f"{summary.cases - summary.computed_cases} kept from before), {summary.points} points, "
        f"{share:.0f}% converged"
    )
    if summary.redone_parts:
        typer.echo(f"recomputed {summary.redone_parts} incomplete part(s) from an earlier run")
    if summary.superseded_parts:
        typer.echo(
            f"moved {summary.superseded_parts} part(s) of chunks no longer in the campaign to "
            f"{target / 'superseded'}"
        )
    if summary.failed_chunks:
        for failure in summary.failed_chunks:
            typer.echo(f"failed chunk {failure['chunk_id']}: {failure['message']}", err=True)
        typer.echo(
            f"error: {len(summary.failed_chunks)} chunk(s) failed (listed in the manifest); "
            "rerun the same command to retry them",
            err=True,
        )
        raise typer.Exit(EXIT_FAILED)
    typer.echo(f"next: wakerank rank {shlex.quote(str(target))}")


def _backend(cluster: str | None) -> object | None:
    """None (the in-process thread pool) or the Dask backend for `--cluster`."""
    if cluster is None:
        return None
    from wakerank.cluster import DaskBackend

    return DaskBackend(cluster)
