"""`wakerank rank DIR`: the sections with the least drag at the design lift, as a table."""

from __future__ import annotations

from pathlib import Path
from typing import Any

import typer
from rich import box
from rich.console import Console
from rich.table import Table

from wakerank.cli import app
from wakerank.cli._errors import ErrorsAsMessages
from wakerank.cli._output import table_console


@app.command("rank")
def rank_command(
    catalog: Path = typer.Argument(..., help="Catalog folder written by `wakerank run`."),
    cl: list[float] = typer.Option(
        [], "--cl", help="Design lift coefficient; repeat for several [default: the campaign's]."
    ),
    weights: str | None = typer.Option(
        None, "--weights", help="Comma-separated weights, one per --cl (e.g. 0.3,0.7)."
    ),
    reynolds: float | None = typer.Option(None, "--reynolds", help="Only this Reynolds number."),
    mach: float | None = typer.Option(None, "--mach", help="Only this Mach number."),
    min_thickness: float | None = typer.Option(
        None, "--min-thickness", help="Least thickness (chord fraction)."
    ),
    max_abs_cm: float | None = typer.Option(
        None, "--max-abs-cm", help="Largest |cm about c/4| at every design cl."
    ),
    min_stall_margin: float | None = typer.Option(
        None, "--min-stall-margin", help="Least cl_max - design cl."
    ),
    transition: str = typer.Option(
        "free", "--transition", help="free, tripped, a trip label, or any."
    ),
    top: int = typer.Option(20, "--top", min=1, help="Rows to keep."),
    out: Path | None = typer.Option(None, "--out", help="Write the shortlist as Parquet."),
) -> None:
    """Rank sections by (weighted) profile drag at the design cl, with constraints."""
    from wakerank.catalog import open_catalog
    from wakerank.ranking import rank

    with ErrorsAsMessages():
        opened = open_catalog(catalog)
        design = opened.manifest.get("design") or {}
        options = _defaults_from_design(design)
        targets = list(cl) or options.pop("cl", None)
        if not targets:
            raise ValueError(
                "give a design lift coefficient with --cl (the campaign has no [design])"
            )
        given_weights = _parse_weights(weights) if weights is not None else None
        if given_weights is None and not cl:
            given_weights = options.get("weights")
        shortlist = rank(
            opened,
            targets,
            reynolds=reynolds,
            mach=mach,
            min_thickness=min_thickness
            if min_thickness is not None
            else options.get("min_thickness"),
            max_abs_cm=max_abs_cm if max_abs_cm is not None else options.get("max_abs_cm"),
            min_stall_margin=(
                min_stall_margin
                if min_stall_margin is not None
                else options.get("min_stall_margin")
            ),
            weights=given_weights,
            top=top,
            transition=None if transition == "any" else transition,
        )
        if out is not None:
            out.parent.mkdir(parents=True, exist_ok=True)
            shortlist.write_parquet(out)
    print_shortlist(shortlist, targets, table_console())
    if out is not None:
        typer.echo(f"shortlist written to {out}")


def _defaults_from_design(design: dict[str, Any]) -> dict[str, Any]:
    from wakerank.campaign import Design, values_of

    if not design:
        return {}
    model = Design.model_validate(design)
    return {
        "cl": values_of(model.cl),
        "weights": model.weights,
        "min_thickness": model.min_thickness,
        "max_abs_cm": model.max_abs_cm,
        "min_stall_margin": model.min_stall_margin,
    }


def _parse_weights(text: str) -> list[float]:
    try:
        return [float(part) for part in text.split(",") if part.strip()]
    except ValueError:
        raise ValueError(f"--weights: expected comma-separated numbers, got {text!r}") from None


def print_shortlist(shortlist: Any, targets: list[float], console: Console) -> None:
    """The ranked table as rich renders it (the columns an engineer reads first).

    Reynolds number and transition get a column only when the rows differ in them;
    otherwise they go into the title, which keeps the table readable in 80 columns.
    """
    from wakerank.ranking import design_column

    several = len(targets) > 1
    varying = {
        name: shortlist[name].n_unique() > 1 if shortlist.height else False
        for name in ("reynolds", "transition")
    }
    title = "least drag at cl = " + ", ".join(f"{t:g}" for t in targets)
    if shortlist.height and not varying["reynolds"]:
        title += f", Re = {_reynolds(shortlist['reynolds'][0])}"
    if shortlist.height and not varying["transition"]:
        title += f", {shortlist['transition'][0]} transition"
    table = Table(title=title, box=box.SIMPLE_HEAD, padding=(0, 1), pad_edge=False)
    headers = ["#", "section", "t/c"]
    headers += ["Re"] if varying["reynolds"] else []
    headers += ["transition"] if varying["transition"] else []
    headers += ["mean cd"] if several else ["cd"]
    headers += [f"cd@{t:g}" for t in targets] if several else []
    headers += ["cl_max", "margin", "|cm|max"] if several else ["L/D", "cl_max", "margin", "cm_c4"]
    rows = []
    first_order_seen = supersonic_seen = False
    for row in shortlist.iter_rows(named=True):
        cms = [row[design_column("cm_c4", t)] for t in targets]
        first_order = not all(row.get(design_column("wake_curvature", t), True) for t in targets)
        first_order_seen |= first_order
        supersonic = any(row.get(design_column("critical_mach_reached", t)) for t in targets)
        supersonic_seen |= supersonic
        cells = [str(row["rank"]), str(row["label"]), f"{row['thickness']:.3f}"]
        cells += [_reynolds(row["reynolds"])] if varying["reynolds"] else []
        cells += [str(row["transition"])] if varying["transition"] else []
        marks = ("*" if first_order else "") + ("!" if supersonic else "")
        cells.append(f"{row['weighted_cd']:.5f}" + marks)
        if several:
            cells += [f"{row[design_column('cd', t)]:.5f}" for t in targets]
        else:
            cells.append(f"{row['l_over_d']:.1f}")
        margin = f"{row['stall_margin']:.2f}" + ("" if row["stall_reached"] else "+")
        cm = f"{max(abs(c) for c in cms):.3f}" if several else f"{cms[0]:.3f}"
        cells += [f"{row['cl_max']:.2f}", margin, cm]
        rows.append(cells)
    for i, header in enumerate(headers):
        left = header in ("section", "transition")
        widest = max([len(header)] + [len(r[i]) for r in rows])
        table.add_column(
            header,
            justify="left" if left else "right",
            min_width=min(widest, 10) if left else widest,
            no_wrap=not left,
        )
    for cells in rows:
        table.add_row(*cells)
    console.print(table)
    if shortlist.height == 0:
        console.print("no section meets the constraints at these conditions")
    elif not all(shortlist["stall_reached"]):
        console.print(
            "margin = cl_max - design cl; + : the lift still rose at the last converged angle, "
            "so the margin is a lower bound of the model's; the model's maximum lift runs high "
            "with free transition (docs/validation.md, 'Maximum lift')"
        )
    if first_order_seen:
        console.print(
            "* : interpolated from a point solved with the first-order wake (no wake-curvature "
            "term; the full model had no converged solution there; docs/catalog.md)"
        )
    if supersonic_seen:
        console.print(
            "! : interpolated from a point whose flow turns locally supersonic (cp_min below the "
            "critical Cp): outside the model's validity, cd has no wave drag"
        )


def _reynolds(value: float) -> str:
    """Compact Reynolds number: 1.2e6, 8e5."""
    mantissa, exponent = f"{value:.2g}".split("e") if "e" in f"{value:.2g}" else (f"{value:g}", "")
    return f"{mantissa}e{int(exponent)}" if exponent else mantissa
