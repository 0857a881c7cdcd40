"""Viscous section analysis: polars tables from the coupled panel method and boundary layer.

The compiled core (``wakerank._core``) runs the quasi-simultaneous viscous–inviscid
interaction and returns contiguous float64 columns; this module checks argument types, calls
it and builds the frames. Argument ranges are checked once, in the core, and reported as
:class:`wakerank.InputError` naming the argument and its allowed range. :func:`analyze`
(``wakerank.analysis``) calls :func:`viscous_polar` when given a Reynolds number.
"""

from __future__ import annotations

from collections.abc import Sequence
from typing import Any

import numpy as np
import polars as pl

from wakerank import _core
from wakerank.errors import InputError

#: Columns of a viscous polar row, in order (a fixed interface).
POLAR_COLUMNS: tuple[str, ...] = (
    "alpha_deg",
    "cl",
    "cd",
    "cd_squire_young",
    "cd_friction",
    "cd_pressure",
    "cm_c4",
    "cp_min",
    "transition_upper",
    "transition_lower",
    "separation_upper",
    "separation_lower",
    "converged",
    "iterations",
    "residual",
    "wake_curvature",
)

#: Columns after the fixed ones: lift-to-drag ratio, whether the flow turns locally
#: supersonic (cp_min below the critical Cp at the row's Mach number: outside the model's
#: validity, no wave drag), and the flow conditions of the row.
EXTRA_COLUMNS: tuple[str, ...] = (
    "l_over_d",
    "critical_mach_reached",
    "reynolds",
    "mach",
    "n_factor",
    "panels",
)

#: Columns that are null when the event does not occur (NaN in the core's arrays).
_NULLABLE = ("separation_upper", "separation_lower")

#: Station columns of :func:`boundary_layer`, in order (a fixed interface).
STATION_COLUMNS: tuple[str, ...] = (
    "side",
    "s",
    "x",
    "y",
    "edge_velocity",
    "delta_star",
    "theta",
    "shape_factor",
    "cf",
    "amplification",
    "regime",
)

#: Keyword options of the viscous analysis besides reynolds, mach and panels.
VISCOUS_OPTIONS: tuple[str, ...] = ("n_factor", "turbulence_intensity", "trip_upper", "trip_lower")

_SIDES = ("upper", "lower", "wake")
_REGIMES = ("laminar", "turbulent", "wake")


def _number(name: str, value: Any, optional: bool = False) -> float | None:
    if value is None and optional:
        return None
    if isinstance(value, bool):
        raise InputError(f"{name} must be a number, got {value!r}")
    try:
        return float(value)
    except (TypeError, ValueError):
        kind = "a number or None" if optional else "a number"
        raise InputError(f"{name} must be {kind}, got {value!r}") from None


def condition_keywords(
    reynolds: Any, mach: Any = 0.0, panels: int = 160, **options: Any
) -> dict[str, Any]:
    """Keyword arguments of the core's viscous entry points, types checked; unknown options
    fail loudly (an InputError naming them)."""
    unknown = sorted(set(options) - set(VISCOUS_OPTIONS))
    if unknown:
        allowed = ", ".join(VISCOUS_OPTIONS)
        raise InputError(f"unknown viscous option(s) {', '.join(unknown)}; allowed: {allowed}")
    return {
        "reynolds": _number("reynolds", reynolds),
        "mach": _number("mach", mach),
        "n_factor": _number("n_factor", options.get("n_factor", 9.0)),
        "turbulence_intensity": _number(
            "turbulence_intensity", options.get("turbulence_intensity"), optional=True
        ),
        "trip_upper": _number("trip_upper", options.get("trip_upper"), optional=True),
        "trip_lower": _number("trip_lower", options.get("trip_lower"), optional=True),
        "panels": int(panels),
    }


def polar_frame(columns: dict[str, Any], cond: dict[str, Any] | None = None) -> pl.DataFrame:
    """A polar table from the core's columns: the fixed columns first, then l_over_d,
    critical_mach_reached and the conditions (reynolds, mach, n_factor, panels) when `cond`
    is given."""
    data: dict[str, Any] = {}
    for name in POLAR_COLUMNS:
        values = np.asarray(columns[name])
        if name in ("converged", "wake_curvature"):
            data[name] = pl.Series(name, values.astype(bool))
        elif name == "iterations":
            data[name] = pl.Series(name, values.astype(np.int64))
        else:
            series = pl.Series(name, values.astype(np.float64))
            data[name] = series.fill_nan(None) if name in _NULLABLE else series
    frame = pl.DataFrame(data)
    frame = frame.with_columns(
        pl.when(pl.col("cd") > 0)
        .then(pl.col("cl") / pl.col("cd"))
        .otherwise(None)
        .alias("l_over_d"),
        pl.Series(
            "critical_mach_reached",
            np.asarray(columns["critical_mach_reached"]).astype(bool),
        ),
    )
    if cond is not None:
        frame = frame.with_columns(
            pl.lit(cond["reynolds"], dtype=pl.Float64).alias("reynolds"),
            pl.lit(cond["mach"], dtype=pl.Float64).alias("mach"),
            pl.lit(cond["n_factor"], dtype=pl.Float64).alias("n_factor"),
            pl.lit(cond["panels"], dtype=pl.Int64).alias("panels"),
        )
    return frame


def viscous_polar(
    name: str,
    x: np.ndarray,
    y: np.ndarray,
    alphas: np.ndarray,
    panels: int,
    mach: float,
    reynolds: Any,
    **options: Any,
) -> pl.DataFrame:
    """Viscous polar, one row per angle (solved outward from the angle nearest 0° with warm
    starts). Called by :func:`wakerank.analyze` with a Reynolds number."""
    cond = condition_keywords(reynolds, mach, panels, **options)
    angles = np.ascontiguousarray(alphas, dtype=np.float64)
    columns = _core.viscous_sweep(name, x, y, angles, cond)
    return polar_frame(columns, cond)


def _section_and_conditions(
    section: Any,
    reynolds: Any,
    mach: Any,
    panels: Any,
    n_factor: Any,
    turbulence_intensity: Any,
    trip_upper: Any,
    trip_lower: Any,
) -> tuple[str, np.ndarray, np.ndarray, dict[str, Any]]:
    """(name, x, y) of the section and the checked keyword arguments of the core's viscous
    entry points: the preparation shared by :func:`solve_for_cl` and :func:`boundary_layer`."""
    from wakerank.analysis import check_mach, panels_argument, resolve_section

    name, x, y = resolve_section(section)
    cond = condition_keywords(
        reynolds,
        check_mach(mach),
        panels_argument(panels),
        n_factor=n_factor,
        turbulence_intensity=turbulence_intensity,
        trip_upper=trip_upper,
        trip_lower=trip_lower,
    )
    return name, x, y, cond


def solve_for_cl(
    section: Any,
    cl: float,
    *,
    reynolds: float,
    mach: float = 0.0,
    n_factor: float = 9.0,
    turbulence_intensity: float | None = None,
    trip_upper: float | None = None,
    trip_lower: float | None = None,
    panels: int | None = 160,
) -> pl.DataFrame:
    """The viscous polar row (the columns of :func:`wakerank.analyze`) at the angle that gives
    lift coefficient `cl` (within 1e-4; where the computed lift jumps across the target by at
    most 0.002, as free transition moving by one station makes it, the row on the nearer side
    of the jump, within 0.001).

    Raises :class:`wakerank.ConvergenceError` when the target lies beyond the section's
    maximum (or minimum) lift at these conditions, or in a larger jump of the lift (the
    message names the angles and lifts on both sides).
    """
    target = _number("cl", cl)
    name, x, y, cond = _section_and_conditions(
        section, reynolds, mach, panels, n_factor, turbulence_intensity, trip_upper, trip_lower
    )
    columns = _core.viscous_solve_for_cl(name, x, y, target, cond)
    return polar_frame(columns, cond)


def boundary_layer(
    section: Any,
    alpha_deg: float,
    *,
    reynolds: float,
    mach: float = 0.0,
    n_factor: float = 9.0,
    turbulence_intensity: float | None = None,
    trip_upper: float | None = None,
    trip_lower: float | None = None,
    panels: int | None = 160,
) -> pl.DataFrame:
    """Boundary-layer and wake stations of the viscous solution at one angle.

    One row per station: side (upper/lower/wake), arc length s from the stagnation point
    (from the trailing edge in the wake), x, y, edge_velocity, delta_star, theta,
    shape_factor, cf (based on the local edge speed; negative in reversed flow),
    amplification (N) and regime (laminar/turbulent/wake). The table is that of the final
    iterate; ``analyze`` at the same angle tells whether it converged.
    """
    from wakerank.analysis import parse_alpha

    alphas = parse_alpha(alpha_deg)
    if alphas.size != 1:
        raise InputError("boundary_layer takes one angle of attack (alpha_deg)")
    name, x, y, cond = _section_and_conditions(
        section, reynolds, mach, panels, n_factor, turbulence_intensity, trip_upper, trip_lower
    )
    columns = _core.viscous_boundary_layer(name, x, y, float(alphas[0]), cond)
    side = np.asarray(columns["side"]).astype(np.int64)
    regime = np.asarray(columns["regime"]).astype(np.int64)
    data: dict[str, Any] = {"side": pl.Series("side", [_SIDES[k] for k in side], dtype=pl.Utf8)}
    for key in STATION_COLUMNS[1:-1]:
        data[key] = pl.Series(key, np.asarray(columns[key], dtype=np.float64))
    data["regime"] = pl.Series("regime", [_REGIMES[k] for k in regime], dtype=pl.Utf8)
    return pl.DataFrame(data)


def analyze_batch(
    sections: Sequence[Any],
    conditions: Sequence[dict[str, Any]],
    alpha_deg: Any,
    *,
    threads: int | None = None,
) -> pl.DataFrame:
    """Many sections × conditions × one α sweep in one call of the core, in parallel over
    (section, condition) and the same for any thread count.

    `conditions` holds dicts with reynolds and optionally mach, panels and the viscous
    options. Returns the polar columns plus section, section_index and condition_index.
    """
    from wakerank.analysis import parse_alpha, resolve_section

    arrays = [resolve_section(s) for s in sections]
    conds = [condition_keywords(**c) for c in conditions]
    alphas = np.ascontiguousarray(parse_alpha(alpha_deg), dtype=np.float64)
    columns = _core.viscous_batch(arrays, conds, alphas, int(threads or 0))
    frame = polar_frame(columns)
    section_index = np.asarray(columns["section_index"]).astype(np.int64)
    cond_index = np.asarray(columns["condition_index"]).astype(np.int64)
    return frame.with_columns(
        pl.Series("section", [arrays[i][0] for i in section_index], dtype=pl.Utf8),
        pl.Series("section_index", section_index),
        pl.Series("condition_index", cond_index),
        pl.Series("reynolds", [conds[i]["reynolds"] for i in cond_index], dtype=pl.Float64),
        pl.Series("mach", [conds[i]["mach"] for i in cond_index], dtype=pl.Float64),
        pl.Series("n_factor", [conds[i]["n_factor"] for i in cond_index], dtype=pl.Float64),
    )


__all__ = [
    "POLAR_COLUMNS",
    "STATION_COLUMNS",
    "viscous_polar",
    "solve_for_cl",
    "boundary_layer",
    "analyze_batch",
]
