"""Ranking of catalog sections by profile drag at one or several design lift coefficients.

For each polar (section x condition) cd is found at every design cl by the interpolation rules
of :mod:`wakerank.polar` (only between converged, attached neighbours below cl_max, never
across a gap, never extrapolated); polars that miss a design cl drop out. Constraints then
apply, and the rest are sorted by the weighted drag sum(w_i cd_i) / sum(w_i).
"""

from __future__ import annotations

import math
import os
from collections.abc import Sequence

import polars as pl

from wakerank import polar
from wakerank.catalog import Catalog, open_catalog
from wakerank.errors import InputError

#: Values interpolated at each design cl and shown per design point, with their column stem.
PER_DESIGN_POINT = (
    "alpha_deg",
    "cd",
    "cm_c4",
    "transition_upper",
    "transition_lower",
    "wake_curvature",
    "critical_mach_reached",
)

#: Relative tolerance when matching a requested Reynolds or Mach number to the catalog's.
MATCH_TOLERANCE = 1e-6


def design_column(name: str, design_cl: float) -> str:
    """Column name of value `name` at design cl `design_cl`, e.g. ``cd_at_cl_0.55``."""
    return f"{name}_at_cl_{design_cl:g}"


def rank(
    catalog_or_dir: Catalog | str | os.PathLike[str],
    cl: float | Sequence[float] = 0.55,
    *,
    reynolds: float | None = None,
    mach: float | None = None,
    min_thickness: float | None = None,
    max_abs_cm: float | None = None,
    min_stall_margin: float | None = None,
    weights: Sequence[float] | None = None,
    top: int | None = 20,
    transition: str | None = "free",
) -> pl.DataFrame:
    """Sections ranked by (weighted) cd at the design cl(s), best first.

    `transition` selects the runs: ``"free"`` (default), ``"tripped"`` (every trip setting), a
    trip label as stored in the catalog, or None for all. `reynolds` and `mach` select one
    condition (otherwise every condition is ranked, one row per section and condition).
    Constraints: thickness >= `min_thickness`; |cm_c4| <= `max_abs_cm` at every design cl;
    cl_max - max(design cl) >= `min_stall_margin`. Returns at most `top` rows (all if None).
    """
    catalog = (
        catalog_or_dir if isinstance(catalog_or_dir, Catalog) else open_catalog(catalog_or_dir)
    )
    targets = _design_cls(cl)
    w = _weights(weights, len(targets))
    if top is not None and top < 1:
        raise InputError(f"top: expected an integer >= 1, got {top}")
    points = _select_points(catalog.points, reynolds, mach, transition)
    prepared = polar.prepare(points).collect().lazy()  # shared by every step below
    values = polar.at_design_cl(prepared, targets)
    features = polar.polar_features(prepared)

    table = features
    for target in targets:
        at = values.filter(pl.col("design_cl") == target).select(
            *polar.POLAR_KEY,
            *[pl.col(n).alias(design_column(n, target)) for n in PER_DESIGN_POINT],
        )
        table = table.join(at, on=polar.POLAR_KEY, how="inner")
    conditions = points.select(
        "condition_id", "reynolds", "mach", "n_factor", "turbulence_intensity", "transition"
    ).unique("condition_id")
    sections = catalog.sections.select(
        "section_id", "label", "family", "thickness", "camber", "parameters"
    )
    table = table.join(conditions, on="condition_id", how="left").join(
        sections, on="section_id", how="left"
    )
    weighted = sum((wi * pl.col(design_column("cd", t)) for wi, t in zip(w, targets)), pl.lit(0.0))
    table = table.with_columns(
        weighted.alias("weighted_cd"),
        (pl.col("cl_max") - max(targets)).alias("stall_margin"),
        (pl.lit(targets[0]) / pl.col(design_column("cd", targets[0]))).alias("l_over_d"),
    )
    if min_thickness is not None:
        table = table.filter(pl.col("thickness") >= min_thickness)
    if max_abs_cm is not None:
        for t in targets:
            table = table.filter(pl.col(design_column("cm_c4", t)).abs() <= max_abs_cm)
    if min_stall_margin is not None:
        table = table.filter(pl.col("stall_margin") >= min_stall_margin)
    table = table.sort(["weighted_cd", "section_id", "condition_id"])
    if top is not None:
        table = table.head(top)
    per_point = [design_column(n, t) for t in targets for n in PER_DESIGN_POINT]
    result = table.select(
        "section_id",
        "label",
        "family",
        "thickness",
        "camber",
        "reynolds",
        "mach",
        "n_factor",
        "turbulence_intensity",
        "transition",
        "weighted_cd",
        "l_over_d",
        "cl_max",
        "alpha_cl_max_deg",
        "stall_reached",
        "stall_margin",
        "cd_min",
        "drag_bucket_width",
        *per_point,
        "condition_id",
        "parameters",
    ).collect()
    return result.with_row_index("rank", offset=1).with_columns(pl.col("rank").cast(pl.Int32))


def _design_cls(cl: float | Sequence[float]) -> list[float]:
    values = [float(cl)] if isinstance(cl, (int, float)) else [float(c) for c in cl]
    if not values:
        raise InputError("cl: give at least one design lift coefficient")
    for value in values:
        if not math.isfinite(value) or not -1.0 <= value <= 3.0:
            raise InputError(f"cl: expected design lift coefficients in [-1, 3], got {value:g}")
    if len(set(values)) != len(values):
        raise InputError(f"cl: each design lift coefficient once, got {values}")
    return values


def _weights(weights: Sequence[float] | None, count: int) -> list[float]:
    if weights is None:
        return [1.0 / count] * count
    w = [float(x) for x in weights]
    if len(w) != count:
        raise InputError(f"weights: expected {count} weights (one per design cl), got {len(w)}")
    if any(not math.isfinite(x) or x <= 0 for x in w):
        raise InputError(f"weights: expected positive numbers, got {w}")
    total = sum(w)
    return [x / total for x in w]


def _select_points(
    points: pl.LazyFrame, reynolds: float | None, mach: float | None, transition: str | None
) -> pl.LazyFrame:
    selected = points
    if transition == "free":
        selected = selected.filter(pl.col("transition") == "free")
    elif transition == "tripped":
        selected = selected.filter(pl.col("transition") != "free")
    elif transition not in (None, "any", "all"):
        selected = selected.filter(pl.col("transition") == transition)
    for name, value in (("reynolds", reynolds), ("mach", mach)):
        if value is None:
            continue
        tolerance = max(abs(value) * MATCH_TOLERANCE, 1e-12)
        matched = selected.filter((pl.col(name) - value).abs() <= tolerance)
        if matched.select(pl.len()).collect().item() == 0:
            available = points.select(pl.col(name).unique().sort()).collect()[name].to_list()
            raise InputError(
                f"{name}: no runs at {value:g} in this catalog; available: "
                + ", ".join(f"{v:g}" for v in available)
            )
        selected = matched
    return selected


__all__ = ["PER_DESIGN_POINT", "design_column", "rank"]
