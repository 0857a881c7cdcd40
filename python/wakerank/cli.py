"""The `wakerank` command line. It calls only the public Python API."""

from __future__ import annotations

import typer

import wakerank

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


def main() -> None:
    """Entry point of the console script."""
    app()
