"""`wakerank section SPEC|FILE`: geometric properties of one section, optionally drawn."""

from __future__ import annotations

from pathlib import Path

import typer

from wakerank.cli import app
from wakerank.cli._errors import ErrorsAsMessages, fail


def _table(section) -> object:  # type: ignore[no-untyped-def]
    from rich.table import Table

    p = section.properties()
    table = Table(title=section.name, show_header=True, header_style="bold")
    table.add_column("property")
    table.add_column("value", justify="right")
    rows = [
        ("family", section.family),
        ("points", f"{len(section)}"),
        ("chord", f"{p['chord']:.6g}"),
        ("thickness t/c", f"{p['thickness']:.5f}"),
        ("  at x/c", f"{p['thickness_position']:.4f}"),
        ("camber", f"{p['camber']:.5f}"),
        ("  at x/c", f"{p['camber_position']:.4f}"),
        ("leading-edge radius r/c", f"{p['leading_edge_radius']:.5f}"),
        ("trailing-edge thickness", f"{p['trailing_edge_thickness']:.5f}"),
        ("trailing-edge angle (deg)", f"{p['trailing_edge_angle_deg']:.3f}"),
        ("area A/c²", f"{p['area']:.5f}"),
        ("geometry id", section.geometry_id),
    ]
    for name, value in rows:
        table.add_row(name, value)
    return table


def _draw(section, out: Path) -> None:  # type: ignore[no-untyped-def]
    import matplotlib

    matplotlib.use("Agg")
    import matplotlib.pyplot as plt

    figure, axes = plt.subplots(figsize=(8, 3))
    axes.plot(section.x, section.y, "-", color="tab:blue", linewidth=1.2)
    axes.plot(section.x, section.y, ".", color="tab:blue", markersize=2)
    axes.set_aspect("equal", adjustable="datalim")
    axes.set_xlabel("x/c")
    axes.set_ylabel("y/c")
    p = section.properties()
    axes.set_title(f"{section.name}  (t/c {p['thickness']:.4f}, camber {p['camber']:.4f})")
    axes.grid(True, linewidth=0.3)
    figure.tight_layout()
    figure.savefig(out, dpi=150)
    plt.close(figure)


@app.command("section")
def section_command(
    spec: str = typer.Argument(..., help="A NACA designation (2412, 23012, 0012-34) or a coordinate file."),
    plot: Path | None = typer.Option(None, "--plot", help="Also draw the section to this image file (PNG)."),
    points: int | None = typer.Option(
        None,
        "--points",
        help="Points per surface: for a designation, the stations per side; for a file, "
        "re-panel to about this many points per surface.",
    ),
) -> None:
    """Print the geometric properties of a section; optionally draw it."""
    from rich.console import Console

    import wakerank as wr

    with ErrorsAsMessages():
        if points is not None and points < 6:
            fail(f"--points {points}: need at least 6 points per surface")
        if points is not None and not Path(spec).is_file():
            section = wr.Section.from_spec(spec, points=points)
        else:
            section = wr.Section.from_spec(spec)
            if points is not None:
                section = section.repanel(2 * (points - 1))
        Console().print(_table(section))
        if plot is not None:
            _draw(section, plot)
            typer.echo(f"wrote {plot}")
