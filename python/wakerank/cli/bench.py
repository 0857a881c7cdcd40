"""`wakerank bench ...`: speed measurements (never timed tests). One command per subject."""

from __future__ import annotations

import typer

from wakerank.cli import app

bench_app = typer.Typer(help="Measure speed: cases per second of the compiled core.", no_args_is_help=True)
app.add_typer(bench_app, name="bench")


@bench_app.command("inviscid")
def bench_inviscid(
    sections: int = typer.Option(64, "--sections", help="Sections to analyse (15 angles each)."),
    repeat: int = typer.Option(3, "--repeat", help="Timings per measurement; the best is kept."),
) -> None:
    """Inviscid panel method: cases/s through the batch entry, the Python API and NumPy."""
    from wakerank.bench.inviscid import run
    from wakerank.cli._errors import ErrorsAsMessages

    with ErrorsAsMessages():
        if sections < 1 or repeat < 1:
            raise ValueError("--sections and --repeat must be at least 1")
        for line in run(sections=sections, repeat=repeat).lines():
            typer.echo(line)
