"""Viscous benchmark: converged operating points per second on α sweeps, and cost vs panels.

Runs through the batch entry point of the core on one thread, so the figure is per core.
"""

from __future__ import annotations

import time
from dataclasses import dataclass

import numpy as np

import wakerank as wr
from wakerank.viscous import analyze_batch

#: Sections, Reynolds numbers and angles of the sweep benchmark.
SECTIONS = ("0012", "2412", "4415")
REYNOLDS = (1e6, 6e6)
ALPHAS = tuple(float(a) for a in np.arange(-4.0, 8.5, 1.0))
PANEL_COUNTS = (120, 160, 240, 320)


@dataclass(frozen=True)
class ViscousBenchResult:
    """Timing of one configuration."""

    panels: int
    points: int
    converged: int
    seconds: float

    @property
    def converged_per_second(self) -> float:
        """Converged operating points per second (one thread)."""
        return self.converged / self.seconds if self.seconds > 0 else float("nan")

    @property
    def ms_per_point(self) -> float:
        """Milliseconds per operating point, converged or not."""
        return 1e3 * self.seconds / self.points if self.points else float("nan")


def run_sweeps(panels: int = 160, threads: int = 1, repeat: int = 1) -> ViscousBenchResult:
    """Time α sweeps of every benchmark section × Reynolds number at `panels` panels."""
    sections = [wr.Section.naca(code) for code in SECTIONS]
    conditions = [{"reynolds": re, "mach": 0.0, "panels": panels} for re in REYNOLDS]
    best = float("inf")
    frame = None
    for _ in range(max(1, repeat)):
        start = time.perf_counter()
        frame = analyze_batch(sections, conditions, ALPHAS, threads=threads)
        best = min(best, time.perf_counter() - start)
    assert frame is not None
    return ViscousBenchResult(
        panels=panels,
        points=frame.height,
        converged=int(frame["converged"].sum()),
        seconds=best,
    )


def run_panel_scaling(threads: int = 1) -> list[ViscousBenchResult]:
    """The sweep benchmark at 120, 160, 240 and 320 panels."""
    return [run_sweeps(panels=n, threads=threads) for n in PANEL_COUNTS]
