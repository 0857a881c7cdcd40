"""`wakerank analyze SPEC|FILE`: a polar of one section, printed as a table or written to a file.

The options come in groups (section, angles, flow, output) gathered into one
:class:`AnalyzeOptions`; a new analysis option is one more field and one more typer option.
"""

from __future__ import annotations

from dataclasses import dataclass, field
from pathlib import Path
from typing import Any, Optional

import polars as pl
import typer
from rich.console import Console
from rich.table import Table

import wakerank as wr
from wakerank.cli import app
from wakerank.cli._errors import ErrorsAsMessages


@dataclass
class AnalyzeOptions:
    """Everything `analyze` passes to :func:`wakerank.analyze` besides section and angles."""

    panels: int = 160
    mach: float = 0.0
    #: Viscous options (reynolds, ...) added by the viscous analysis; empty means inviscid.
    viscous: dict[str, Any] = field(default_factory=dict)

    def as_kwargs(self) -> dict[str, Any]:
        return {"panels": self.panels, "mach": self.mach, **self.viscous}


def load_section(spec: str) -> Any:
    """A section from a coordinate file (when `spec` names an existing file) or a family
    specification such as "2412" or "naca 0012-34"."""
    try:
        from wakerank.sections import Section
    except ImportError:
        raise wr.InputError("section families are not available in this build") from None

    path = Path(spec)
    if path.exists():
        return Section.from_file(path)
    return Section.from_spec(spec)


OUTPUT_SUFFIXES = (".parquet", ".csv")


def check_output(out: Optional[Path]) -> None:
    """Fail before any work when --out has a suffix we cannot write."""
    if out is not None and out.suffix.lower() not in OUTPUT_SUFFIXES:
        raise wr.InputError(f"--out {out}: the file must end in .parquet or .csv")


def write_table(table: pl.DataFrame, out: Path) -> None:
    """Write the table as Parquet (.parquet) or CSV (.csv)."""
    check_output(out)
    if out.suffix.lower() == ".parquet":
        table.write_parquet(out)
    else:
        table.write_csv(out)


def print_table(table: pl.DataFrame, title: str) -> None:
    """Print the polar with rich: numbers to 4 decimals, flags as yes/no."""
    view = Table(title=title)
    for name in table.columns:
        view.add_column(name, justify="right", overflow="fold")
    for row in table.iter_rows():
        cells = []
        for value in row:
            if isinstance(value, bool):
                cells.append("yes" if value else "no")
            elif isinstance(value, float):
                cells.append(f"{value:.4f}")
            else:
                cells.append(str(value))
        view.add_row(*cells)
    Console().print(view)


def run_analyze(spec: str, alpha: str, options: AnalyzeOptions, out: Optional[Path]) -> None:
    """The command body: load, analyse, print, optionally write."""
    check_output(out)
    section = load_section(spec)
    table = wr.analyze(section, alpha_deg=alpha, **options.as_kwargs())
    kind = "viscous" if options.viscous else "inviscid"
    print_table(table, f"{getattr(section, 'name', spec)} ({kind}, {options.panels} panels)")
    if out is not None:
        write_table(table, out)
        typer.echo(f"wrote {len(table)} rows to {out}")


@app.command("analyze")
def analyze_command(
    spec: str = typer.Argument(..., help="Section: a coordinate file, or a family spec such as 2412."),
    alpha: str = typer.Option("-4:12:1", "--alpha", help="Angles: start:stop:step, a,b,c or one value (degrees)."),
    panels: int = typer.Option(160, "--panels", help="Panels along the surface."),
    mach: float = typer.Option(0.0, "--mach", help="Free-stream Mach number (Karman-Tsien), 0 <= M < 0.9."),
    out: Optional[Path] = typer.Option(None, "--out", help="Also write the table (.parquet or .csv)."),
) -> None:
    """Polar of one section: lift, moment and minimum pressure at each angle."""
    with ErrorsAsMessages():
        run_analyze(spec, alpha, AnalyzeOptions(panels=panels, mach=mach), out)
