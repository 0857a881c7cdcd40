"""`wakerank bench campaign`: a fixed small campaign end to end, cases per second and the share
of wall time spent outside the compiled core (expansion, table building, Parquet writes, the
design table and manifest).

"Inside the core" is the time spent in :func:`wakerank.analyze` calls; with one worker the
share outside is ``1 - core / wall``.
"""

from __future__ import annotations

import tempfile
import time
from pathlib import Path

from wakerank.campaign import load_campaign

#: The fixed benchmark campaign: 12 sections x 2 Reynolds numbers x 13 angles.
BENCH_CAMPAIGN = """\
name = "bench-campaign"
panels = 160
chunk_size = 4

[[sections]]
family = "naca4"
camber = [0.0, 0.02, 0.04]
camber_position = [0.4]
thickness = [0.09, 0.12, 0.15, 0.18]

[conditions]
reynolds = [5e5, 1e6]
mach = 0.0
alpha_deg = {from = -2, to = 10, step = 1}

[design]
cl = 0.5
"""


def bench_campaign(workers: int = 1) -> dict[str, float]:
    """Run the benchmark campaign with `workers` threads; return wall time, rate and shares."""
    from wakerank.session import run_campaign

    with tempfile.TemporaryDirectory(prefix="wakerank-bench-") as tmp:
        path = Path(tmp) / "bench.toml"
        path.write_text(BENCH_CAMPAIGN, encoding="utf-8")
        loaded = load_campaign(path)
        tick = time.perf_counter()
        summary = run_campaign(
            loaded, Path(tmp) / "catalog", workers=workers, fresh=True, progress=False
        )
        wall = time.perf_counter() - tick
    busy = wall * summary.workers
    return {
        "workers": float(summary.workers),
        "cases": float(summary.computed_cases),
        "points": float(summary.points),
        "wall_seconds": wall,
        "cases_per_second": summary.computed_cases / wall,
        "core_seconds": summary.core_seconds,
        "outside_core_share": max(0.0, 1.0 - summary.core_seconds / busy),
        "converged_share": summary.converged_points / max(summary.points, 1),
    }
