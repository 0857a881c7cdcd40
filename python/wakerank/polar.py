"""Vectorised polar arithmetic on catalog points: values at a design cl, cl_max, drag bucket.

A *polar* is the set of points of one section at one condition (key: section_id,
condition_id), ordered by angle of attack. The rules, the same for ranking and the design
table:

* a point is *usable* when it converged, has finite cl and cd and shows no turbulent
  separation on either surface (``separation_upper`` and ``separation_lower`` are null);
* cl_max is the largest cl among converged points, at ``alpha_cl_max_deg``; ``stall_reached``
  says whether a converged point past that angle has a lower cl (otherwise cl_max is only a
  lower bound of the model's maximum lift: the grid or the solver stopped first; the model's
  maximum lift itself runs high with free transition, docs/validation.md);
* values at a design cl are linear interpolations in cl between two usable points that are
  neighbours on the condition's angle grid (the union of angles of all polars of that
  condition), both at or below ``alpha_cl_max_deg``. A non-converged, separated or missing
  angle between two points breaks the polar into segments; nothing is interpolated across a
  gap and nothing is extrapolated. If several pairs bracket the design cl, the one at the
  lowest angle wins;
* a value at a design cl says ``wake_curvature`` true when both points it interpolates
  include the wake-curvature term (docs/catalog.md; a missing column or value counts as
  true), and ``critical_mach_reached`` true when either of them has cp_min below the
  critical Cp at its Mach number (the flow turns locally supersonic; missing columns count
  as subcritical);
* the drag bucket is the cl range spanned by the usable pre-stall points with
  cd <= 1.1 cd_min (cd_min over the same points).

Everything is polars expressions (sort, window functions, one cross join with the design
cls), so a million points take about a second.
"""

from __future__ import annotations

from collections.abc import Sequence

import polars as pl

from wakerank import _core

#: Columns identifying one polar.
POLAR_KEY = ["section_id", "condition_id"]

#: Columns interpolated at the design cl (besides alpha_deg).
INTERPOLATED = ["alpha_deg", "cd", "cm_c4", "transition_upper", "transition_lower"]

#: cd within this factor of cd_min counts as inside the drag bucket (our definition).
DRAG_BUCKET_FACTOR = 1.1

_NEEDED = [
    "section_id",
    "condition_id",
    "alpha_deg",
    "cl",
    "cd",
    "cm_c4",
    "transition_upper",
    "transition_lower",
    "separation_upper",
    "separation_lower",
    "converged",
]


def _supersonic(points: pl.LazyFrame) -> pl.Expr:
    """Per point: cp_min below the critical Cp at the point's Mach number (the core's
    isentropic relation, evaluated once per Mach number present)."""
    names = points.collect_schema().names()
    if "cp_min" not in names or "mach" not in names:
        return pl.lit(False)
    machs = points.select(pl.col("mach").unique().drop_nulls()).collect()["mach"].to_list()
    critical = {m: _core.critical_pressure_coefficient(float(m)) for m in machs}
    cp_star = pl.col("mach").replace_strict(
        critical, default=float("-inf"), return_dtype=pl.Float64
    )
    return (pl.col("cp_min") < cp_star).fill_null(False)


def _missing(name: str) -> pl.Expr:
    return pl.col(name).is_null() | pl.col(name).is_nan()


def prepare(points: pl.LazyFrame) -> pl.LazyFrame:
    """Points sorted by polar and angle, with usability flags, cl_max and grid neighbours.

    ``_polar`` numbers the polars in sort order so that window functions run over one integer
    key; ``_grid`` is the index of the angle on its condition's grid.
    """
    # Sorting on a 64-bit hash of the key is much faster than on the two strings.
    has_flag = "wake_curvature" in points.collect_schema().names()
    flag = pl.col("wake_curvature").fill_null(True) if has_flag else pl.lit(True)
    p = (
        points.select(
            *_NEEDED, flag.alias("wake_curvature"), _supersonic(points).alias("_supersonic")
        )
        .with_columns(pl.struct(POLAR_KEY).hash(seed=0).alias("_key"))
        .sort(["_key", "alpha_deg"])
    )
    new_polar = pl.col("_key") != pl.col("_key").shift(1)
    converged = (
        pl.col("converged").fill_null(False)
        & pl.col("cl").is_not_null()
        & pl.col("cl").is_finite()
        & pl.col("cd").is_not_null()
        & pl.col("cd").is_finite()
    )
    attached = _missing("separation_upper") & _missing("separation_lower")
    grid = (
        p.select("condition_id", "alpha_deg")
        .unique()
        .sort("condition_id", "alpha_deg")
        .with_columns(pl.int_range(pl.len()).over("condition_id").alias("_grid"))
    )
    p = p.with_columns(
        new_polar.fill_null(True).cast(pl.Int64).cum_sum().alias("_polar"),
        converged.alias("_converged"),
        (converged & attached).alias("_usable"),
    ).join(grid, on=["condition_id", "alpha_deg"], how="left", maintain_order="left")
    cl_conv = pl.when(pl.col("_converged")).then(pl.col("cl"))
    p = p.with_columns(cl_conv.max().over("_polar").alias("cl_max"))
    at_max = pl.col("_converged") & (pl.col("cl") == pl.col("cl_max"))
    p = p.with_columns(
        pl.when(at_max).then(pl.col("alpha_deg")).min().over("_polar").alias("alpha_cl_max_deg")
    )
    past = pl.col("_converged") & (pl.col("alpha_deg") > pl.col("alpha_cl_max_deg"))
    return p.with_columns(
        (past & (pl.col("cl") < pl.col("cl_max"))).any().over("_polar").alias("stall_reached"),
        (pl.col("_usable") & (pl.col("alpha_deg") <= pl.col("alpha_cl_max_deg"))).alias(
            "_pre_stall"
        ),
    )


def polar_features(prepared: pl.LazyFrame) -> pl.LazyFrame:
    """Per polar: cl_max, alpha_cl_max_deg, stall_reached, cd_min, drag_bucket_width."""
    cd_pre = pl.when(pl.col("_pre_stall")).then(pl.col("cd"))
    with_min = prepared.with_columns(cd_pre.min().over("_polar").alias("cd_min"))
    in_bucket = pl.col("_pre_stall") & (pl.col("cd") <= DRAG_BUCKET_FACTOR * pl.col("cd_min"))
    bucket_cl = pl.when(in_bucket).then(pl.col("cl"))
    return (
        with_min.group_by("_polar")
        .agg(
            pl.col("section_id").first(),
            pl.col("condition_id").first(),
            pl.col("cl_max").first(),
            pl.col("alpha_cl_max_deg").first(),
            pl.col("stall_reached").first(),
            pl.col("cd_min").first(),
            (bucket_cl.max() - bucket_cl.min()).alias("drag_bucket_width"),
        )
        .drop("_polar")
    )


def at_design_cl(prepared: pl.LazyFrame, design_cl: Sequence[float]) -> pl.LazyFrame:
    """Per polar and design cl: interpolated alpha_deg, cd, cm_c4 and transition locations,
    whether both points interpolated include the wake-curvature term, and whether either
    turns locally supersonic (``critical_mach_reached``).

    Polars that do not bracket a design cl with a usable pair give no row for it.
    """
    targets = sorted({float(c) for c in design_cl})
    if not targets:
        raise ValueError("design cl: give at least one lift coefficient")
    same_polar = pl.col("_polar").shift(-1) == pl.col("_polar")
    carried = [*INTERPOLATED, "cl", "wake_curvature", "_supersonic"]
    nxt = {name: pl.col(name).shift(-1) for name in carried}
    pairs = prepared.with_columns(
        (same_polar & pl.col("_pre_stall").shift(-1)).fill_null(False).alias("_next_ok"),
        (pl.col("_grid").shift(-1) == pl.col("_grid") + 1).alias("_adjacent"),
        *[expr.alias(f"_next_{name}") for name, expr in nxt.items()],
    ).filter(
        pl.col("_pre_stall")
        & pl.col("_next_ok")
        & pl.col("_adjacent").fill_null(False)
        & (pl.col("_next_cl") != pl.col("cl"))
    )
    low = pl.min_horizontal("cl", "_next_cl")
    high = pl.max_horizontal("cl", "_next_cl")
    pairs = pairs.filter((high >= targets[0]) & (low <= targets[-1]))
    wanted = pl.LazyFrame({"design_cl": pl.Series(targets, dtype=pl.Float64)})
    joined = pairs.join(wanted, how="cross").filter(
        (pl.col("design_cl") >= low) & (pl.col("design_cl") <= high)
    )
    fraction = (pl.col("design_cl") - pl.col("cl")) / (pl.col("_next_cl") - pl.col("cl"))
    interpolated = [
        (pl.col(name) + fraction * (pl.col(f"_next_{name}") - pl.col(name))).alias(name)
        for name in INTERPOLATED
    ]
    full_model = (pl.col("wake_curvature") & pl.col("_next_wake_curvature")).alias(
        "wake_curvature"
    )
    supersonic = (pl.col("_supersonic") | pl.col("_next__supersonic")).alias(
        "critical_mach_reached"
    )
    return (
        joined.select(*POLAR_KEY, "design_cl", *interpolated, full_model, supersonic)
        .sort([*POLAR_KEY, "design_cl", "alpha_deg"])
        .group_by([*POLAR_KEY, "design_cl"], maintain_order=True)
        .first()
    )


__all__ = [
    "DRAG_BUCKET_FACTOR",
    "INTERPOLATED",
    "POLAR_KEY",
    "at_design_cl",
    "polar_features",
    "prepare",
]
