"""`wakerank validate`: the reference cases, computed beside published values."""

from __future__ import annotations

import math

import typer
from rich.console import Console
from rich.table import Table

from wakerank.cli import app
from wakerank.cli._errors import ErrorsAsMessages


def _fmt(value: float, quantity: str) -> str:
    if not math.isfinite(value):
        return "—"
    return f"{value:.4f}" if quantity.startswith(("cl", "dcl")) else f"{value:.5f}"


@app.command("validate")
def validate(
    panels: int = typer.Option(160, "--panels", help="Surface panels of the airfoil cases."),
) -> None:
    """Run the reference cases (NACA 0012 vs Ladson NASA TM-4074 including maximum lift, lift
    slope vs McCroskey, flat plates vs Blasius and Kármán–Schoenherr, wake speeds vs exact
    potential flow) and print computed beside published values."""
    with ErrorsAsMessages():
        from wakerank.validation import run_all

        results = run_all(panels=panels)
        table = Table(title="wakerank reference cases", show_lines=False)
        for name, justify in (
            ("case", "left"),
            ("quantity", "left"),
            ("condition", "left"),
            ("published", "right"),
            ("computed", "right"),
            ("deviation", "right"),
            ("source", "left"),
        ):
            table.add_column(name, justify=justify)  # type: ignore[arg-type]
        for row in results.iter_rows(named=True):
            dev = row["deviation"]
            dev_text = "not converged" if not math.isfinite(dev) else f"{100 * dev:+.1f} %"
            style = None if not math.isfinite(dev) or abs(dev) <= 0.10 else "yellow"
            table.add_row(
                row["case"],
                row["quantity"],
                row["condition"],
                _fmt(row["published"], row["quantity"]),
                _fmt(row["computed"], row["quantity"]),
                dev_text,
                row["source"],
                style=style,
            )
        Console().print(table)
