"""One place that turns expected failures into a single clear line and a non-zero exit."""

from __future__ import annotations

import sys

import typer

from wakerank.errors import WakerankError

#: Exit status for bad input (geometry, arguments, campaign files).
EXIT_BAD_INPUT = 2
#: Exit status when a computation failed with no usable result.
EXIT_FAILED = 3


def run_app(app: typer.Typer) -> None:
    """Run the typer app; print expected errors as one line on stderr, never a traceback."""
    try:
        app(standalone_mode=True)
    except KeyboardInterrupt:
        typer.echo("interrupted: finished work is kept; rerun the same command to resume", err=True)
        sys.exit(130)


def fail(message: str, code: int = EXIT_BAD_INPUT) -> None:
    """Print `error: message` on stderr and exit with `code`."""
    typer.echo(f"error: {message}", err=True)
    raise typer.Exit(code)


class ErrorsAsMessages:
    """Context manager for command bodies: expected exceptions become `fail(...)`.

    Usage: ``with ErrorsAsMessages(): ...``. WakerankError, ValueError, OSError and
    FileNotFoundError print one line; anything else is a bug and propagates.
    """

    def __enter__(self) -> "ErrorsAsMessages":
        return self

    def __exit__(self, exc_type, exc, tb) -> bool:  # type: ignore[no-untyped-def]
        if exc is None:
            return False
        if isinstance(exc, (WakerankError, ValueError)):
            fail(str(exc), EXIT_BAD_INPUT)
        if isinstance(exc, OSError):
            where = f"{exc.filename}: " if getattr(exc, "filename", None) else ""
            fail(f"{where}{exc.strerror or exc}", EXIT_BAD_INPUT)
        return False
