"""Where command tables are printed: one console policy for every command."""

from __future__ import annotations

from rich.console import Console

#: Width used when the output is not a terminal (piped to a file or another program).
PIPED_WIDTH = 160


def table_console() -> Console:
    """A console for tables: the terminal's width, or PIPED_WIDTH columns when piped."""
    console = Console()
    return console if console.is_terminal else Console(width=PIPED_WIDTH)
