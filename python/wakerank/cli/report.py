"""`wakerank report DIR --cl 0.55`: one self-contained HTML page about a catalog."""

from __future__ import annotations

from pathlib import Path

import typer

from wakerank.cli import app
from wakerank.cli._errors import ErrorsAsMessages


@app.command("report")
def report_command(
    catalog: Path = typer.Argument(..., help="Catalog folder."),
    cl: float = typer.Option(..., "--cl", help="Design lift coefficient to rank at."),
    reynolds: float | None = typer.Option(None, "--reynolds", help="Only this Reynolds number [default: all]."),
    top: int = typer.Option(10, "--top", min=1, help="Shortlist length."),
    transition: str = typer.Option("free", "--transition", help="free, tripped, a trip label, or any."),
    out: Path | None = typer.Option(None, "--out", help="HTML file [default: report-cl<cl>.html]."),
) -> None:
    """Campaign, ranked shortlist, polars, drag maps, convergence statistics and cautions."""
    from wakerank.report import catalog_report

    with ErrorsAsMessages():
        page = catalog_report(catalog, cl, reynolds=reynolds, top=top,
                              transition=None if transition == "any" else transition)
        target = out or Path(f"report-cl{cl:g}.html")
        target.write_text(page, encoding="utf-8")
    typer.echo(f"wrote {target}")
