"""`wakerank plot polar|section|map DIR ...`: figures of a catalog as PNG files."""

from __future__ import annotations

from pathlib import Path

import typer

from wakerank.cli import app
from wakerank.cli._errors import ErrorsAsMessages

plot_app = typer.Typer(help="Draw figures of a catalog (PNG).", no_args_is_help=True)
app.add_typer(plot_app, name="plot")

_TRANSITION_HELP = "Transition setting of the runs: free or a trip label [default: free if run]."


def _split(values: list[str]) -> list[str]:
    return [part.strip() for value in values for part in value.split(",") if part.strip()]


def _save(figure, out: Path) -> None:  # type: ignore[no-untyped-def]
    from wakerank.plots import save_png

    save_png(figure, out)
    typer.echo(f"wrote {out}")


@plot_app.command("polar")
def polar_command(
    catalog: Path = typer.Argument(..., help="Catalog folder."),
    sections: list[str] = typer.Option(..., "--sections", help="Section ids or labels (repeat, or separate by commas)."),
    reynolds: float = typer.Option(..., "--reynolds", help="Reynolds number of the polars."),
    transition: str | None = typer.Option(None, "--transition", help=_TRANSITION_HELP),
    cl: list[float] = typer.Option([], "--cl", help="Mark a design lift coefficient (repeatable)."),
    out: Path | None = typer.Option(None, "--out", help="PNG file [default: polar-Re<Re>.png]."),
) -> None:
    """Drag polars (cl over cd) and lift curves (cl over alpha) of several sections."""
    from wakerank import catalog_plots

    with ErrorsAsMessages():
        figure = catalog_plots.polar_figure(catalog, _split(sections), reynolds=reynolds,
                                            transition=transition, design_cl=cl)
        _save(figure, out or Path(catalog_plots.default_output("polar", Re=f"{reynolds:g}")))


@plot_app.command("section")
def section_command(
    catalog: Path = typer.Argument(..., help="Catalog folder."),
    section: str = typer.Argument(..., help="Section id or label."),
    alpha: float = typer.Option(..., "--alpha", help="Angle of attack (deg)."),
    reynolds: float = typer.Option(..., "--reynolds", help="Reynolds number."),
    transition: str | None = typer.Option(None, "--transition", help=_TRANSITION_HELP),
    out: Path | None = typer.Option(None, "--out", help="PNG file [default: section-<id>-a<alpha>.png]."),
) -> None:
    """Cp, momentum thickness, shape factor, cf and amplification of one section at one angle."""
    from wakerank import catalog_plots

    with ErrorsAsMessages():
        figure = catalog_plots.section_figure(catalog, section, alpha_deg=alpha, reynolds=reynolds,
                                              transition=transition)
        name = catalog_plots.default_output("section", id=section[:16], a=f"{alpha:g}")
        _save(figure, out or Path(name))


@plot_app.command("map")
def map_command(
    catalog: Path = typer.Argument(..., help="Catalog folder."),
    cl: float = typer.Option(..., "--cl", help="Design lift coefficient."),
    x: str = typer.Option("thickness", "--x", help="Section parameter on the horizontal axis."),
    y: str = typer.Option("camber", "--y", help="Section parameter on the vertical axis."),
    reynolds: float | None = typer.Option(None, "--reynolds", help="Reynolds number [default: the catalog's lowest]."),
    transition: str | None = typer.Option(None, "--transition", help=_TRANSITION_HELP),
    out: Path | None = typer.Option(None, "--out", help="PNG file [default: map-cl<cl>.png]."),
) -> None:
    """cd at the design cl across two family parameters (least cd where others vary)."""
    from wakerank import catalog_plots

    with ErrorsAsMessages():
        figure = catalog_plots.map_figure(catalog, design_cl=cl, x=x, y=y, reynolds=reynolds,
                                          transition=transition)
        _save(figure, out or Path(catalog_plots.default_output("map", cl=f"{cl:g}")))
