"""`wakerank bench ...`: speed measurements (never timed tests). One command per subject."""

from __future__ import annotations

import typer

from wakerank.cli import app

#: The viscous analysis' speed aim: converged operating points per second per core, 160 panels.
VISCOUS_AIM_PER_CORE = 150

bench_app = typer.Typer(help="Measure speed: cases per second of the compiled core.", no_args_is_help=True)
app.add_typer(bench_app, name="bench")


@bench_app.command("inviscid")
def bench_inviscid(
    sections: int = typer.Option(64, "--sections", help="Sections to analyse (15 angles each)."),
    repeat: int = typer.Option(3, "--repeat", help="Timings per measurement; the best is kept."),
) -> None:
    """Inviscid panel method: cases/s through the batch entry, the Python API and NumPy."""
    from wakerank.bench.inviscid import run
    from wakerank.cli._errors import ErrorsAsMessages

    with ErrorsAsMessages():
        if sections < 1 or repeat < 1:
            raise ValueError("--sections and --repeat must be at least 1")
        for line in run(sections=sections, repeat=repeat).lines():
            typer.echo(line)


@bench_app.command("viscous")
def bench_viscous(
    threads: int = typer.Option(1, "--threads", help="Worker threads (1 gives the per-core figure)."),
    repeat: int = typer.Option(1, "--repeat", help="Repeat each measurement and keep the fastest."),
) -> None:
    """Converged viscous operating points per second on α sweeps, and the cost vs panel count."""
    from rich.console import Console
    from rich.table import Table

    from wakerank.bench.viscous import ALPHAS, PANEL_COUNTS, REYNOLDS, SECTIONS, run_sweeps
    from wakerank.cli._errors import ErrorsAsMessages

    with ErrorsAsMessages():
        console = Console()
        console.print(
            f"sweeps: NACA {', '.join(SECTIONS)} × Re {', '.join(f'{r:.0e}' for r in REYNOLDS)} × "
            f"α {ALPHAS[0]:g}..{ALPHAS[-1]:g}° ({len(ALPHAS)} angles), {threads} thread(s)"
        )
        table = Table(title="viscous analysis cost")
        for column in ("panels", "points", "converged", "seconds", "converged points/s", "ms/point"):
            table.add_column(column, justify="right")
        per_core_at_160 = None
        for panels in PANEL_COUNTS:
            result = run_sweeps(panels=panels, threads=threads, repeat=repeat)
            if panels == 160:
                per_core_at_160 = result.converged_per_second / threads
            table.add_row(
                str(panels),
                str(result.points),
                str(result.converged),
                f"{result.seconds:.2f}",
                f"{result.converged_per_second:.0f}",
                f"{result.ms_per_point:.2f}",
            )
        console.print(table)
        if per_core_at_160 is not None:
            met = "met" if per_core_at_160 >= VISCOUS_AIM_PER_CORE else "not met"
            console.print(
                f"aim: at least {VISCOUS_AIM_PER_CORE} converged points/s per core at 160 panels; "
                f"measured {per_core_at_160:.0f} ({met}; docs/performance.md)"
            )
