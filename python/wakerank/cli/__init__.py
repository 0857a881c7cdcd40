"""The `wakerank` command line (typer). It calls only the public Python API.

Each command group lives in its own module of this package and registers itself on `app`
below; `_errors.py` turns every expected error into one clear line and a non-zero exit.
"""

from __future__ import annotations

import typer

import wakerank
from wakerank.cli._errors import run_app

app = typer.Typer(
    name="wakerank",
    help="Screen airfoil sections for the least profile drag at the design lift.",
    no_args_is_help=True,
    add_completion=False,
    pretty_exceptions_enable=False,
)


def _version_callback(value: bool) -> None:
    if value:
        typer.echo(f"wakerank {wakerank.__version__}")
        raise typer.Exit()


@app.callback()
def _root(
    version: bool = typer.Option(
        False, "--version", callback=_version_callback, is_eager=True, help="Print the version."
    ),
) -> None:
    """Screen airfoil sections for the least profile drag at the design lift."""


# Command modules register themselves on `app` when imported (one line each).
from wakerank.cli import analyze as _analyze  # noqa: E402,F401
from wakerank.cli import bench as _bench  # noqa: E402,F401
from wakerank.cli import validate as _validate  # noqa: E402,F401
from wakerank.cli import export as _export  # noqa: E402,F401
from wakerank.cli import plot as _plot  # noqa: E402,F401
from wakerank.cli import report as _report  # noqa: E402,F401
from wakerank.cli import section as _section  # noqa: E402,F401
from wakerank.cli import run as _run  # noqa: E402,F401
from wakerank.cli import rank as _rank  # noqa: E402,F401
from wakerank.cli import demo as _demo  # noqa: E402,F401
from wakerank.cli import bench_campaign as _bench_campaign  # noqa: E402,F401

def main() -> None:
    """Entry point of the console script."""
    run_app(app)
