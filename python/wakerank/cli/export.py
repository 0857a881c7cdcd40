"""`wakerank export SHORTLIST --catalog DIR --to OUTDIR`: coordinates, case files, meshes for CFD."""

from __future__ import annotations

from pathlib import Path

import typer

from wakerank.cli import app
from wakerank.cli._errors import ErrorsAsMessages


@app.command("export")
def export_command(
    shortlist: Path = typer.Argument(..., help="Shortlist Parquet file written by `wakerank rank --out`."),
    catalog: Path = typer.Option(..., "--catalog", help="Catalog folder the shortlist was ranked from."),
    to: Path = typer.Option(..., "--to", help="Output folder (one sub-folder per section)."),
    mesh: bool = typer.Option(False, "--mesh", help="Also write a far-field mesh (.msh and .su2; needs wakerank[mesh])."),
    points: int | None = typer.Option(None, "--points", min=16, help="Repanel the coordinates to N points [default: as stored]."),
    close_te: bool = typer.Option(False, "--close-te", help="Close a blunt trailing edge."),
    y_plus: float = typer.Option(1.0, "--y-plus", help="Target y+ of the first cell."),
    farfield: float = typer.Option(100.0, "--farfield", help="Far-field radius in chords (at least 50)."),
) -> None:
    """Write each shortlisted section's coordinates, case file (and mesh) for detailed CFD."""
    import polars as pl

    from wakerank.catalog import open_catalog
    from wakerank.export import ExportOptions, export_shortlist

    with ErrorsAsMessages():
        if not shortlist.is_file():
            raise ValueError(f"{shortlist}: no such shortlist file")
        try:
            ranked = pl.read_parquet(shortlist)
        except (OSError, pl.exceptions.PolarsError) as exc:
            raise ValueError(f"{shortlist}: not a readable Parquet shortlist ({exc})") from None
        opened = open_catalog(catalog)
        ids = ranked["section_id"].unique().to_list() if "section_id" in ranked.columns else []
        sections = opened.sections.filter(pl.col("section_id").is_in(ids)).collect()
        options = ExportOptions(
            points=points,
            close_trailing_edge=close_te,
            y_plus=y_plus,
            mesh=mesh,
            farfield_radius=farfield,
        )
        folders = export_shortlist(ranked, sections, to, options)
    for folder in folders:
        typer.echo(f"wrote {folder}")
