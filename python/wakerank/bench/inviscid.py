"""`wakerank bench inviscid`: section×angle cases per second of the inviscid panel method.

Measured at 160 panels with 15 angles per section, on Kármán–Trefftz sections (built by the
core, so the figure does not depend on other families): through the parallel batch entry
(one thread, then all), through the per-call Python API, and for the plain NumPy
implementation of the same method (:mod:`wakerank.bench.numpy_panel`) in the same process.
"""

from __future__ import annotations

import os
import platform
import time
from dataclasses import dataclass
from typing import Callable

import numpy as np

import wakerank as wr
from wakerank import _core
from wakerank.bench import numpy_panel
from wakerank.karman_trefftz import KarmanTrefftzSection

PANELS = 160
ANGLES = np.linspace(-4.0, 10.0, 15)


@dataclass
class InviscidBenchmark:
    """Figures of one run (cases = sections × angles)."""

    sections: int
    angles: int
    panels: int
    batch_one_thread: float
    batch_all_threads: float
    threads: int
    python_per_call: float
    numpy: float
    per_call_overhead_us: float
    machine: str

    def lines(self) -> list[str]:
        return [
            f"machine: {self.machine}",
            f"{self.sections} sections x {self.angles} angles at {self.panels} panels",
            f"batch, 1 thread          : {self.batch_one_thread:10.0f} cases/s",
            f"batch, {self.threads} threads         : {self.batch_all_threads:10.0f} cases/s",
            f"Python API, per section  : {self.python_per_call:10.0f} cases/s",
            f"NumPy yardstick          : {self.numpy:10.0f} cases/s",
            f"batch 1 thread / NumPy   : {self.batch_one_thread / self.numpy:10.1f} x",
            f"per-call overhead        : {self.per_call_overhead_us:10.1f} us",
        ]


def machine_description() -> str:
    """CPU model and core count (from /proc/cpuinfo where available)."""
    model = platform.processor() or platform.machine()
    try:
        with open("/proc/cpuinfo", encoding="utf-8") as handle:
            for line in handle:
                if line.startswith("model name"):
                    model = line.split(":", 1)[1].strip()
                    break
    except OSError:
        pass
    return f"{model}, {os.cpu_count()} logical cores, Python {platform.python_version()}"


def sample_sections(count: int) -> list[KarmanTrefftzSection]:
    """`count` different Kármán–Trefftz sections of PANELS panels."""
    rng = np.random.default_rng(20261201)
    return [
        KarmanTrefftzSection(
            float(rng.uniform(-0.14, -0.06)),
            float(rng.uniform(0.0, 0.1)),
            float(rng.uniform(4.0, 14.0)),
            points=PANELS + 1,
        )
        for _ in range(count)
    ]


def _best_of(repeat: int, work: Callable[[], object]) -> float:
    best = float("inf")
    for _ in range(repeat):
        start = time.perf_counter()
        work()
        best = min(best, time.perf_counter() - start)
    return best


def run(sections: int = 64, repeat: int = 3) -> InviscidBenchmark:
    """Run every measurement; best of `repeat` timings each."""
    shapes = sample_sections(sections)
    batch_input = [(s.name, s.x, s.y) for s in shapes]
    cases = sections * ANGLES.size
    threads = os.cpu_count() or 1

    def batch(n_threads: int | None) -> None:
        _core.inviscid_polar_batch(batch_input, ANGLES, 0, 0.0, n_threads)

    def python_api() -> None:
        for s in shapes:
            wr.analyze(s, ANGLES, panels=None)

    def numpy_yardstick() -> None:
        for s in shapes:
            numpy_panel.solve(s.x, s.y, ANGLES)

    t_one = _best_of(repeat, lambda: batch(1))
    t_all = _best_of(repeat, lambda: batch(None))
    t_api = _best_of(repeat, python_api)
    t_numpy = _best_of(max(1, repeat - 1), numpy_yardstick)
    return InviscidBenchmark(
        sections=sections,
        angles=ANGLES.size,
        panels=PANELS,
        batch_one_thread=cases / t_one,
        batch_all_threads=cases / t_all,
        threads=threads,
        python_per_call=cases / t_api,
        numpy=cases / t_numpy,
        per_call_overhead_us=max(0.0, (t_api - t_one) / sections) * 1e6,
        machine=machine_description(),
    )
