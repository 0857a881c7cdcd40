"""`wakerank demo`: a small campaign end to end, ranked and plotted, in about a minute."""

from __future__ import annotations

import time
from pathlib import Path

import typer

from wakerank.cli import app
from wakerank.cli._errors import ErrorsAsMessages


@app.command("demo")
def demo_command(
    out: Path = typer.Option(Path("wakerank-demo"), "--out", help="Output folder."),
    workers: int | None = typer.Option(
        None, "--workers", min=1, help="Worker threads [default: all cores]."
    ),
) -> None:
    """Screen a survey aircraft's wing sections for the least drag at cl 0.5 (a demo)."""
    from wakerank.cli._output import table_console
    from wakerank.cli.rank import print_shortlist
    from wakerank.demo import DEMO_REYNOLDS, run_demo
    from wakerank.session import RunInterrupted

    started = time.perf_counter()
    with ErrorsAsMessages():
        try:
            result = run_demo(out, workers=workers)
        except RunInterrupted:
            typer.echo(f"interrupted: rerun `wakerank demo --out {out}` to resume", err=True)
            raise typer.Exit(130) from None
    console = table_console()
    console.print(
        f"[bold]Survey-wing demo[/bold]: {result.summary.cases} cases in "
        f"{time.perf_counter() - started:.0f} s; ranked at Re = {DEMO_REYNOLDS:.3g}"
    )
    print_shortlist(result.shortlist, result.design_cl, console)
    console.print(f"campaign file : {result.campaign_file}")
    console.print(f"catalog       : {result.catalog_dir}")
    console.print(f"shortlist     : {result.shortlist_file}")
    console.print(f"drag polars   : {result.plot_file}")
    console.print(f"next          : wakerank rank {result.catalog_dir} --cl 0.5 --reynolds 4e5")
