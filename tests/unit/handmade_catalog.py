"""A small catalog folder written by hand (no solver): synthetic polars with known shapes.

Twelve symmetric-thickness sections (t/c 0.10-0.16, nominal camber 0-0.04 as parameters) at
two Reynolds numbers; cl = 0.11 (alpha - alpha0) with alpha0 = -100 camber, cd a parabola
around cl = 0.4 growing with thickness, stall above alpha = 11 deg. Numbers are made up;
only the catalog's shape matters to the tests that read it.
"""

from __future__ import annotations

import json
from pathlib import Path

import numpy as np
import polars as pl
from handmade_sections import naca_symmetric
from wakerank.catalog_schema import POINT_SCHEMA, SECTION_SCHEMA

ALPHAS = np.arange(-4.0, 14.5, 1.0)
REYNOLDS = (4e5, 8e5)


def section_ids() -> list[str]:
    return [f"sec{i:02d}" for i in range(12)]


def write_catalog(folder: Path) -> Path:
    """Write manifest.json, sections.parquet and two point parts into `folder`."""
    folder.mkdir(parents=True, exist_ok=True)
    (folder / "points").mkdir(exist_ok=True)
    thickness = np.repeat([0.10, 0.12, 0.14, 0.16], 3)
    camber = np.tile([0.0, 0.02, 0.04], 4)
    sections = []
    points = []
    for i, section_id in enumerate(section_ids()):
        x, y = naca_symmetric(thickness=float(thickness[i]), per_side=41)
        sections.append({
            "section_id": section_id, "family": "naca4", "label": f"test section {i}",
            "parameters": json.dumps({"thickness": thickness[i], "camber": camber[i]}),
            "thickness": thickness[i], "camber": camber[i], "camber_position": 0.4,
            "x": x.tolist(), "y": y.tolist(),
        })
        for reynolds in REYNOLDS:
            cl = 0.11 * (ALPHAS + 100.0 * camber[i])
            stalled = ALPHAS > 11.0
            cl = np.where(stalled, cl - 0.2 * (ALPHAS - 11.0), cl)
            cd = 0.005 * (8e5 / reynolds) ** 0.3 + 0.02 * (thickness[i] - 0.1) + 0.008 * (cl - 0.4) ** 2
            points.append(pl.DataFrame({
                "section_id": section_id, "condition_id": f"re{reynolds:g}",
                "reynolds": reynolds, "mach": 0.08, "n_factor": 9.0, "transition": "free",
                "panels": 160, "alpha_deg": ALPHAS, "cl": cl, "cd": cd, "cm_c4": -0.25 * camber[i],
                "transition_upper": 0.6 - 0.04 * ALPHAS, "transition_lower": 0.6 + 0.02 * ALPHAS,
                "converged": ALPHAS != 13.0, "iterations": 20, "residual": 1e-7,
                "wake_curvature": ALPHAS != 13.0,
            }))
    frame = pl.DataFrame(sections)
    pl.DataFrame({n: frame[n] if n in frame.columns else None for n in SECTION_SCHEMA},
                 schema=SECTION_SCHEMA).write_parquet(folder / "sections.parquet")
    table = pl.concat(points)
    table = table.select(
        [(pl.col(n) if n in table.columns else pl.lit(None)).cast(t).alias(n)
         for n, t in POINT_SCHEMA.items()]
    )
    half = table.height // 2
    table.head(half).write_parquet(folder / "points" / "part-a.parquet")
    table.tail(table.height - half).write_parquet(folder / "points" / "part-b.parquet")
    manifest = {"name": "handmade survey", "wakerank_version": "test",
                "design": {"cl": [0.55], "min_thickness": 0.11}, "failed_chunks": []}
    (folder / "manifest.json").write_text(json.dumps(manifest))
    return folder
