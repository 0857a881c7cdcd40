"""`wakerank bench inviscid`: section×angle cases per second of the inviscid panel method.

Measured at 160 panels with 15 angles per section, on Kármán–Trefftz sections (built by the
core, so the figure does not depend on other families): through the parallel batch entry
(one thread, then all), through the per-call binding and the Python API, and for the plain
NumPy implementation of the same method (:mod:`wakerank.bench.numpy_panel`) in the same
process, with its BLAS limited to one thread so that both figures are per core.
"""

from __future__ import annotations

import contextlib
import ctypes
import os
import platform
import re
import time
from dataclasses import dataclass
from typing import Callable, Iterator

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
    binding_per_call: float
    python_per_call: float
    numpy: float
    numpy_blas_threads: str
    binding_overhead_us: float
    python_overhead_us: float
    machine: str
    load_average: str

    def lines(self) -> list[str]:
        return [
            f"machine: {self.machine}; load average {self.load_average}",
            f"{self.sections} sections x {self.angles} angles at {self.panels} panels",
            "per core (process CPU time, best of the repeats):",
            f"batch, 1 thread             : {self.batch_one_thread:10.0f} cases/s",
            f"binding, one call a section : {self.binding_per_call:10.0f} cases/s",
            f"wr.analyze, one call a section: {self.python_per_call:8.0f} cases/s",
            f"NumPy yardstick (BLAS {self.numpy_blas_threads}) : {self.numpy:10.0f} cases/s",
            f"batch 1 thread / NumPy      : {self.batch_one_thread / self.numpy:10.1f} x",
            f"per-call time, 10 panels x 1 angle, binding   : {self.binding_overhead_us:8.1f} us",
            f"per-call time, 10 panels x 1 angle, wr.analyze: {self.python_overhead_us:8.1f} us",
            f"wall clock, batch on {self.threads} threads: {self.batch_all_threads:.0f} cases/s",
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


@contextlib.contextmanager
def single_threaded_blas() -> Iterator[str]:
    """Limit NumPy's OpenBLAS to one thread for the duration (as threadpoolctl does), so the
    yardstick is a per-core figure; yields the thread count in force ("1" or "default")."""
    setter = getter = None
    try:
        with open("/proc/self/maps", encoding="utf-8") as handle:
            libraries = sorted(set(re.findall(r"(/\S*openblas\S*\.so\S*)", handle.read())))
        for path in libraries:
            lib = ctypes.CDLL(path)
            for prefix in ("scipy_openblas", "openblas"):
                for suffix in ("64_", ""):
                    if hasattr(lib, f"{prefix}_set_num_threads{suffix}"):
                        setter = getattr(lib, f"{prefix}_set_num_threads{suffix}")
                        getter = getattr(lib, f"{prefix}_get_num_threads{suffix}")
                        break
                if setter:
                    break
            if setter:
                break
    except OSError:
        setter = None
    if setter is None or getter is None:
        yield "default"
        return
    before = int(getter())
    setter(1)
    try:
        yield "1 thread"
    finally:
        setter(before)


def _best_of(repeat: int, work: Callable[[], object], clock: Callable[[], float]) -> float:
    best = float("inf")
    for _ in range(repeat):
        start = clock()
        work()
        best = min(best, clock() - start)
    return best


def _cpu_seconds(repeat: int, work: Callable[[], object]) -> float:
    """Best process CPU time of `work`: a per-core figure that a busy machine distorts less
    than wall time (single-threaded work only)."""
    return _best_of(repeat, work, time.process_time)


def run(sections: int = 64, repeat: int = 3) -> InviscidBenchmark:
    """Run every measurement; best of `repeat` timings each."""
    shapes = sample_sections(sections)
    batch_input = [(s.name, s.x, s.y) for s in shapes]
    cases = sections * ANGLES.size
    threads = os.cpu_count() or 1

    def batch(n_threads: int | None) -> None:
        _core.inviscid_polar_batch(batch_input, ANGLES, 0, 0.0, n_threads)

    def binding() -> None:
        for s in shapes:
            _core.inviscid_polar(s.x, s.y, ANGLES, 0, 0.0, s.name)

    def python_api() -> None:
        for s in shapes:
            wr.analyze(s, ANGLES, panels=None)

    def numpy_yardstick() -> None:
        for s in shapes:
            numpy_panel.solve(s.x, s.y, ANGLES)

    t_one = _cpu_seconds(repeat, lambda: batch(1))
    t_all = _best_of(repeat, lambda: batch(None), time.perf_counter)
    t_binding = _cpu_seconds(repeat, binding)
    # Overhead measured directly: a 10-panel section at one angle (the core's work is ~2 µs).
    tiny = KarmanTrefftzSection(-0.1, 0.05, 8.0, points=11)
    one_angle = ANGLES[:1].copy()
    calls = 2000

    def tiny_binding() -> None:
        for _ in range(calls):
            _core.inviscid_polar(tiny.x, tiny.y, one_angle, 0, 0.0, tiny.name)

    def tiny_api() -> None:
        for _ in range(calls // 10):
            wr.analyze(tiny, one_angle, panels=None)

    t_tiny_binding = _cpu_seconds(repeat, tiny_binding) / calls
    t_tiny_api = _cpu_seconds(repeat, tiny_api) / (calls // 10)
    t_api = _cpu_seconds(repeat, python_api)
    with single_threaded_blas() as blas_threads:
        t_numpy = _cpu_seconds(max(1, repeat - 1), numpy_yardstick)
    return InviscidBenchmark(
        sections=sections,
        angles=ANGLES.size,
        panels=PANELS,
        batch_one_thread=cases / t_one,
        batch_all_threads=cases / t_all,
        threads=threads,
        binding_per_call=cases / t_binding,
        python_per_call=cases / t_api,
        numpy=cases / t_numpy,
        numpy_blas_threads=blas_threads,
        binding_overhead_us=t_tiny_binding * 1e6,
        python_overhead_us=t_tiny_api * 1e6,
        machine=machine_description(),
        load_average=" ".join(f"{v:.1f}" for v in os.getloadavg()),
    )
