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
from rich.table import Table

import wakerank as wr
from wakerank.cli import app
from wakerank.cli._errors import ErrorsAsMessages
from wakerank.cli._output import table_console


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

#: Columns of a viscous polar printed on screen (--out writes them all).
VISCOUS_SHOWN = [
    "alpha_deg",
    "cl",
    "cd",
    "cd_squire_young",
    "cd_friction",
    "cd_pressure",
    "cm_c4",
    "transition_upper",
    "transition_lower",
    "converged",
]


#: How the screen table marks a converged row solved with the first-order wake.
FIRST_ORDER_MARK = "yes*"
FIRST_ORDER_NOTE = (
    "converged with the first-order wake only (no wake-curvature term; the full model has no "
    "converged solution there, lift typically 1-3 % above its trend); column wake_curvature "
    "in --out"
)


#: How the screen table explains the blank values of a row that did not converge.
NOT_CONVERGED_NOTE = (
    "no: not converged, values not shown (the last iterate's are in --out, with its "
    "iterations and residual)"
)


def supersonic_note(table: pl.DataFrame) -> str:
    """A warning naming the converged angles whose flow turns locally supersonic (empty when
    none): there the Kármán–Tsien rule and the boundary layer are outside their validity and
    cd counts no wave drag."""
    if "critical_mach_reached" not in table.columns:
        return ""
    converged = pl.col("converged").fill_null(False) if "converged" in table.columns else True
    hit = table.filter(pl.col("critical_mach_reached") & converged)
    if hit.is_empty():
        return ""
    angles = ", ".join(f"{a:g}" for a in hit["alpha_deg"].to_list())
    return (
        f"warning: the flow turns locally supersonic (cp_min below the critical Cp) at "
        f"alpha_deg = {angles}: outside the model's validity, cd has no wave drag"
    )


def viscous_view(table: pl.DataFrame) -> pl.DataFrame:
    """The on-screen columns of a viscous polar, `converged` as yes / yes* / no (yes*: the
    row comes from the first-order wake, see :data:`FIRST_ORDER_NOTE`). A row that did not
    converge shows its angle only: the last iterate of a failed solution can be far from any
    flow (lift coefficients of ±50 occur), so it is not printed beside converged rows."""
    flag = (
        pl.when(~pl.col("converged"))
        .then(pl.lit("no"))
        .when(pl.col("wake_curvature"))
        .then(pl.lit("yes"))
        .otherwise(pl.lit(FIRST_ORDER_MARK))
        .alias("converged")
    )
    values = [name for name in VISCOUS_SHOWN if name not in ("alpha_deg", "converged")]
    blank = [
        pl.when(pl.col("converged")).then(pl.col(name)).otherwise(None).alias(name)
        for name in values
    ]
    return table.with_columns(blank).with_columns(flag).select(VISCOUS_SHOWN)


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
        view.add_column(name, justify="right", no_wrap=True)
    for row in table.iter_rows():
        cells = []
        for value in row:
            if isinstance(value, bool):
                cells.append("yes" if value else "no")
            elif isinstance(value, float):
                cells.append(f"{value:.5f}" if abs(value) < 0.1 else f"{value:.4f}")
            elif value is None:
                cells.append("—")
            else:
                cells.append(str(value))
        view.add_row(*cells)
    table_console().print(view)


def run_analyze(spec: str, alpha: str, options: AnalyzeOptions, out: Optional[Path]) -> None:
    """The command body: load, analyse, print, optionally write."""
    check_output(out)
    section = load_section(spec)
    table = wr.analyze(section, alpha_deg=alpha, **options.as_kwargs())
    kind = "viscous" if options.viscous else "inviscid"
    shown = viscous_view(table) if options.viscous else table
    print_table(shown, f"{getattr(section, 'name', spec)} ({kind}, {options.panels} panels)")
    if options.viscous and (shown["converged"] == FIRST_ORDER_MARK).any():
        typer.echo(f"{FIRST_ORDER_MARK}: {FIRST_ORDER_NOTE}")
    if options.viscous and (shown["converged"] == "no").any():
        typer.echo(NOT_CONVERGED_NOTE)
    note = supersonic_note(table)
    if note:
        typer.echo(note)
    if out is not None:
        write_table(table, out)
        typer.echo(f"wrote {len(table)} rows to {out}")


@app.command("analyze")
def analyze_command(
    spec: str = typer.Argument(..., help="Section: a coordinate file, or a family spec such as 2412."),
    alpha: str = typer.Option("-4:12:1", "--alpha", help="Angles: start:stop:step, a,b,c or one value (degrees)."),
    panels: int = typer.Option(160, "--panels", help="Panels along the surface."),
    mach: float = typer.Option(0.0, "--mach", help="Free-stream Mach number (Karman-Tsien), 0 <= M < 0.9 (viscous: <= 0.7)."),
    re: Optional[float] = typer.Option(None, "--re", help="Chord Reynolds number (1e4-1e8): viscous analysis with drag."),
    n_factor: Optional[float] = typer.Option(None, "--n-factor", help="Critical N-factor of free transition (1-20, default 9)."),
    tu: Optional[float] = typer.Option(None, "--tu", help="Free-stream turbulence intensity as a fraction (0.0001-0.05), via Mack's relation."),
    trip_upper: Optional[float] = typer.Option(None, "--trip-upper", help="Forced transition on the upper surface at this x/c."),
    trip_lower: Optional[float] = typer.Option(None, "--trip-lower", help="Forced transition on the lower surface at this x/c."),
    out: Optional[Path] = typer.Option(None, "--out", help="Also write the table (.parquet or .csv)."),
) -> None:
    """Polar of one section: lift, moment and minimum pressure at each angle; with --re also
    the drag (far wake, Squire-Young, friction, pressure), transition and separation."""
    with ErrorsAsMessages():
        viscous = viscous_options(re, n_factor, tu, trip_upper, trip_lower)
        run_analyze(spec, alpha, AnalyzeOptions(panels=panels, mach=mach, viscous=viscous), out)


def viscous_options(
    re: Optional[float],
    n_factor: Optional[float],
    tu: Optional[float],
    trip_upper: Optional[float],
    trip_lower: Optional[float],
) -> dict[str, Any]:
    """The viscous keyword arguments of :func:`wakerank.analyze` from the CLI options; the
    transition options need --re."""
    given = {
        "n_factor": n_factor,
        "turbulence_intensity": tu,
        "trip_upper": trip_upper,
        "trip_lower": trip_lower,
    }
    chosen = {key: value for key, value in given.items() if value is not None}
    if re is None:
        if chosen:
            flags = {"n_factor": "--n-factor", "turbulence_intensity": "--tu",
                     "trip_upper": "--trip-upper", "trip_lower": "--trip-lower"}
            names = ", ".join(flags[k] for k in chosen)
            raise wr.InputError(f"{names}: transition options need a Reynolds number (--re)")
        return {}
    return {"reynolds": re, **chosen}
