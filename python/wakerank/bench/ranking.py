"""`wakerank bench rank`: ranking speed on a synthetic catalog of about a million points.

The synthetic polars are smooth made-up curves (not physics): a linear lift curve that stalls,
a parabolic drag polar, a few non-converged and separated points so every code path of the
interpolation is exercised.
"""

from __future__ import annotations

import time
from pathlib import Path

import numpy as np
import polars as pl

from wakerank.atomic import write_json_atomically
from wakerank.catalog_schema import (
    CATALOG_FORMAT,
    CATALOG_FORMAT_VERSION,
    POINT_SCHEMA,
    SECTION_SCHEMA,
)


def write_synthetic_catalog(directory: Path, points: int = 1_000_000, seed: int = 3) -> int:
    """Write a synthetic catalog of about `points` rows into `directory`; return the row count."""
    rng = np.random.Generator(np.random.PCG64(seed))
    alphas = np.arange(-4.0, 16.0, 0.5)
    conditions = [(re, "free") for re in (4e5, 8e5, 1.6e6)] + [(8e5, "trip upper 0.05 lower 0.05")]
    n_sections = max(1, points // (len(alphas) * len(conditions)))
    thickness = rng.uniform(0.08, 0.18, n_sections)
    camber = rng.uniform(0.0, 0.06, n_sections)
    ids = [f"s{k:07d}" for k in range(n_sections)]
    (directory / "points").mkdir(parents=True, exist_ok=True)
    total = 0
    for ci, (reynolds, transition) in enumerate(conditions):
        a = np.tile(alphas, n_sections)
        t = np.repeat(thickness, len(alphas))
        m = np.repeat(camber, len(alphas))
        stall = 10.0 + 40.0 * (t - 0.08)
        cl = 0.105 * (a + 100.0 * m) * np.where(a < stall, 1.0, 0.6)
        cd = 0.0055 + 0.012 * (cl - 0.4) ** 2 + 0.02 * t * (8e5 / reynolds) ** 0.5
        converged = rng.random(a.size) > 0.02
        separated = np.where(a > stall - 1.0, 0.8, np.nan)
        frame = pl.DataFrame(
            {
                "section_id": np.repeat(ids, len(alphas)),
                "condition_id": f"c{ci}",
                "reynolds": reynolds,
                "mach": 0.05,
                "n_factor": 9.0,
                "turbulence_intensity": None,
                "transition": transition,
                "trip_upper": 0.05 if transition != "free" else None,
                "trip_lower": 0.05 if transition != "free" else None,
                "panels": 160,
                "alpha_deg": a,
                "cl": cl,
                "cd": cd,
                "cd_squire_young": cd,
                "cd_friction": 0.7 * cd,
                "cd_pressure": 0.3 * cd,
                "cm_c4": -0.025 - 1.2 * m,
                "cp_min": -1.0 - cl,
                "transition_upper": np.clip(0.6 - 0.05 * a, 0.02, 1.0),
                "transition_lower": np.clip(0.5 + 0.05 * a, 0.02, 1.0),
                "separation_upper": separated,
                "separation_lower": None,
                "converged": converged,
                "iterations": 20,
                "residual": 1e-7,
                "wake_curvature": converged,
                "error": None,
            }
        ).with_columns(pl.col("separation_upper").fill_nan(None))
        frame = frame.select([pl.col(k).cast(v) for k, v in POINT_SCHEMA.items()])
        frame.write_parquet(directory / "points" / f"part-synthetic{ci}.parquet")
        total += frame.height
    sections = pl.DataFrame(
        {
            "section_id": ids,
            "family": "synthetic",
            "label": ids,
            "parameters": "{}",
            "thickness": thickness,
            "camber": camber,
        }
    ).with_columns(
        [
            pl.lit(None).cast(v).alias(k)
            for k, v in SECTION_SCHEMA.items()
            if k not in ("section_id", "family", "label", "parameters", "thickness", "camber")
        ]
    )
    sections.select(list(SECTION_SCHEMA)).cast(SECTION_SCHEMA).write_parquet(
        directory / "sections.parquet"
    )
    write_json_atomically(
        {
            "format": CATALOG_FORMAT,
            "format_version": CATALOG_FORMAT_VERSION,
            "name": "synthetic",
            "design": None,
        },
        directory / "manifest.json",
    )
    return total


def bench_rank(directory: Path, repeats: int = 3) -> dict[str, float]:
    """Time :func:`wakerank.rank` on the catalog in `directory` (best of `repeats`)."""
    from wakerank.ranking import rank

    timings = {}
    for label, kwargs in {
        "one design cl": {"cl": 0.55, "min_thickness": 0.12, "max_abs_cm": 0.08},
        "two design cls, weighted": {"cl": [0.4, 0.55], "weights": [0.3, 0.7]},
    }.items():
        best = float("inf")
        for _ in range(repeats):
            tick = time.perf_counter()
            rank(directory, **kwargs)  # type: ignore[arg-type]
            best = min(best, time.perf_counter() - tick)
        timings[label] = best
    return timings
