"""`wakerank bench ...`: speed measurements (never timed tests). One command per subject."""

from __future__ import annotations

import typer

from wakerank.cli import app

bench_app = typer.Typer(help="Measure speed: cases per second of the compiled core.", no_args_is_help=True)
app.add_typer(bench_app, name="bench")
