"""Figures of a catalog: drag polars, one section's boundary layer, drag maps over a family.

Every function takes plain polars frames (catalog tables, or the frames of `wakerank.surface`
and `wakerank.boundary_layer`) and returns a matplotlib Figure drawn without pyplot (Agg
canvas), so it works on headless machines and in worker processes. Every figure has labelled
axes with units, a legend and the flow conditions in its title. `save_png` writes a figure at
a fixed pixel size.
"""

from __future__ import annotations

import math
from collections.abc import Sequence
from pathlib import Path

import numpy as np
import polars as pl
from matplotlib.backends.backend_agg import FigureCanvasAgg
from matplotlib.figure import Figure

from wakerank.errors import InputError

#: Size of every figure in inches and its resolution: PNGs are 1000 x 600 pixels.
FIGURE_INCHES = (10.0, 6.0)
DPI = 100

#: Axis labels (with units) of the family parameters and geometric properties of sections.
PARAMETER_LABELS = {
    "thickness": "maximum thickness t/c (-)",
    "camber": "maximum camber f/c (-)",
    "thickness_position": "position of maximum thickness x/c (-)",
    "camber_position": "position of maximum camber x/c (-)",
    "leading_edge_radius": "leading-edge radius r/c (-)",
    "trailing_edge_thickness": "trailing-edge thickness h/c (-)",
    "trailing_edge_angle_deg": "trailing-edge angle (deg)",
    "area": "cross-section area A/c^2 (-)",
}

#: Chords of wake shown behind the section in boundary-layer panels (x/c up to this value).
WAKE_SHOWN = 2.0
#: Stations within this x/c of the nose are left out when scaling cf and H axes (the
#: stagnation-point values would flatten the rest).
LEADING_EDGE_SKIP = 0.02

#: Tolerance for matching a requested Reynolds number or design cl against stored values.
MATCH_RELATIVE = 1e-6


def new_figure() -> Figure:
    """A figure of the standard size on its own Agg canvas."""
    figure = Figure(figsize=FIGURE_INCHES, dpi=DPI)
    FigureCanvasAgg(figure)
    return figure


def save_png(figure: Figure, path: str | Path) -> Path:
    """Write `figure` as a PNG of exactly FIGURE_INCHES x DPI pixels; returns the path."""
    path = Path(path)
    if path.parent and not path.parent.exists():
        raise InputError(f"{path}: folder {path.parent} does not exist")
    figure.savefig(path, format="png", dpi=DPI)
    return path


def _format_reynolds(reynolds: float) -> str:
    exponent = math.floor(math.log10(reynolds))
    mantissa = reynolds / 10**exponent
    return f"{mantissa:.2g}e{exponent}"


def conditions_title(
    reynolds: float,
    mach: float | None = None,
    transition: str | None = None,
    n_factor: float | None = None,
) -> str:
    """Flow conditions for a title, e.g. ``Re = 8e5, M = 0.08, free transition (N = 9)``."""
    parts = [f"Re = {_format_reynolds(reynolds)}"]
    if mach is not None:
        parts.append(f"M = {mach:.3g}")
    if transition is not None:
        if transition == "free":
            parts.append("free transition" + (f" (N = {n_factor:g})" if n_factor else ""))
        else:
            parts.append(f"transition {transition}")
    return ", ".join(parts)


def _near(column: str, value: float) -> pl.Expr:
    return (pl.col(column) - value).abs() <= MATCH_RELATIVE * max(abs(value), 1.0)


def select_condition(
    table: pl.DataFrame, reynolds: float, transition: str | None = None
) -> tuple[pl.DataFrame, str | None]:
    """Rows at `reynolds` (and `transition`; default the free one if present, else the first)."""
    rows = table.filter(_near("reynolds", reynolds))
    if rows.height == 0:
        stored = sorted(table["reynolds"].unique().to_list()) if "reynolds" in table.columns else []
        shown = ", ".join(_format_reynolds(r) for r in stored) or "none"
        raise InputError(
            f"no rows at Reynolds number {_format_reynolds(reynolds)}; the catalog has {shown}"
        )
    if "transition" not in rows.columns:
        return rows, transition
    settings = rows["transition"].unique(maintain_order=True).to_list()
    if transition is None:
        transition = "free" if "free" in settings else settings[0]
    elif transition not in settings:
        raise InputError(f"no rows with transition {transition!r}; there are {settings}")
    return rows.filter(pl.col("transition") == transition), transition


def _first(table: pl.DataFrame, column: str) -> float | None:
    if column not in table.columns or table.height == 0:
        return None
    value = table[column].drop_nulls()
    return float(value[0]) if len(value) else None


def polar_figure(
    points: pl.DataFrame,
    section_ids: Sequence[str],
    *,
    reynolds: float,
    transition: str | None = None,
    labels: dict[str, str] | None = None,
    design_cl: Sequence[float] = (),
) -> Figure:
    """Drag polar (cl over cd) and lift curve (cl over alpha) of each section at one condition.

    Only converged points are drawn; a non-converged angle leaves a gap in the line. Points
    solved with the first-order wake (``wake_curvature`` false, docs/catalog.md) are ringed.
    Each `design_cl` is marked by a dashed line.
    """
    if not section_ids:
        raise InputError("name at least one section id to plot")
    rows, transition = select_condition(points, reynolds, transition)
    labels = labels or {}
    figure = new_figure()
    drag_axes, lift_axes = figure.subplots(1, 2)
    missing = []
    ringed = False
    for section_id in section_ids:
        polar = rows.filter(pl.col("section_id") == section_id).sort("alpha_deg")
        if polar.height == 0:
            missing.append(section_id)
            continue
        ok = polar["converged"].fill_null(False).to_numpy()
        alpha = polar["alpha_deg"].to_numpy()
        cl = np.where(ok, polar["cl"].fill_null(np.nan).to_numpy(), np.nan)
        cd = np.where(ok, polar["cd"].fill_null(np.nan).to_numpy(), np.nan)
        label = labels.get(section_id, section_id)
        (line,) = drag_axes.plot(cd, cl, marker=".", label=label)
        lift_axes.plot(alpha, cl, marker=".", color=line.get_color(), label=label)
        if "wake_curvature" in polar.columns:
            first_order = ok & ~polar["wake_curvature"].fill_null(True).to_numpy()
            if first_order.any():
                ring = {"marker": "o", "ls": "none", "mfc": "none", "color": line.get_color()}
                name = None if ringed else "first-order wake"
                drag_axes.plot(cd[first_order], cl[first_order], label=name, **ring)
                lift_axes.plot(alpha[first_order], cl[first_order], **ring)
                ringed = True
    if missing:
        raise InputError(f"no polar at this condition for section(s) {', '.join(missing)}")
    for k, target in enumerate(design_cl):
        for axes in (drag_axes, lift_axes):
            axes.axhline(target, color="0.4", ls="--", lw=0.8,
                         label="design cl" if k == 0 else None)
    drag_axes.set_xlabel("drag coefficient cd (-)")
    drag_axes.set_ylabel("lift coefficient cl (-)")
    drag_axes.set_title("drag polar")
    lift_axes.set_xlabel("angle of attack alpha (deg)")
    lift_axes.set_ylabel("lift coefficient cl (-)")
    lift_axes.set_title("lift curve")
    for axes in (drag_axes, lift_axes):
        axes.grid(True, alpha=0.3)
        axes.legend(fontsize="small")
    figure.suptitle(
        "Polars, "
        + conditions_title(reynolds, _first(rows, "mach"), transition, _first(rows, "n_factor"))
    )
    figure.tight_layout()
    return figure


def section_figure(
    surface: pl.DataFrame,
    stations: pl.DataFrame,
    *,
    label: str,
    alpha_deg: float,
    reynolds: float,
    mach: float | None = None,
    transition: str | None = "free",
    n_factor: float | None = None,
) -> Figure:
    """Pressure distribution and boundary layer of one section at one angle.

    `surface` has x, y, cp (inviscid, `wakerank.surface`); `stations` has side, x,
    edge_velocity, theta, shape_factor, cf, amplification (`wakerank.boundary_layer`). The
    viscous cp is 1 - ue^2 (incompressible edge velocity ratio).
    """
    for name, frame, needed in (
        ("surface", surface, ("x", "y", "cp")),
        ("boundary layer", stations, ("side", "x", "edge_velocity", "theta", "shape_factor", "cf", "amplification")),
    ):
        absent = [c for c in needed if c not in frame.columns]
        if absent:
            raise InputError(f"{name} table lacks column(s) {', '.join(absent)}")
    figure = new_figure()
    grid = figure.subplots(2, 3)
    cp_axes, theta_axes, shape_axes = grid[0]
    shape_geometry, cf_axes, amp_axes = grid[1]
    cp_axes.plot(surface["x"].to_numpy(), surface["cp"].to_numpy(), color="0.5", lw=1, label="inviscid")
    shape_geometry.plot(surface["x"].to_numpy(), surface["y"].to_numpy(), color="k", lw=1, label="section")
    styles = {"upper": "tab:blue", "lower": "tab:red", "wake": "tab:green"}
    for side, color in styles.items():
        part = stations.filter(pl.col("side") == side)
        if part.height == 0:
            continue
        x = part["x"].to_numpy()
        theta_axes.plot(x, part["theta"].to_numpy(), color=color, label=side)
        shape_axes.plot(x, part["shape_factor"].to_numpy(), color=color, label=side)
        if side == "wake":  # no wall: no skin friction; no instability growth is followed
            continue
        ue = part["edge_velocity"].to_numpy()
        cp_axes.plot(x, 1.0 - ue**2, color=color, lw=1.5, label=f"viscous, {side}")
        cf_axes.plot(x, part["cf"].to_numpy(), color=color, label=side)
        amp_axes.plot(x, part["amplification"].to_numpy(), color=color, label=side)
    cp_axes.invert_yaxis()
    if n_factor:
        amp_axes.axhline(n_factor, color="k", ls="--", lw=0.8, label=f"critical N = {n_factor:g}")
    on_wall = stations.filter((pl.col("side") != "wake") & (pl.col("x") > LEADING_EDGE_SKIP))
    _robust_ylim(cf_axes, on_wall["cf"].to_numpy())
    _robust_ylim(shape_axes, stations.filter(pl.col("x") > LEADING_EDGE_SKIP)["shape_factor"].to_numpy())
    wake_end = min(float(stations["x"].max() or 1.0), WAKE_SHOWN)
    for axes in (theta_axes, shape_axes):
        axes.set_xlim(-0.02, wake_end)
    shape_geometry.set_aspect("equal", adjustable="datalim")
    axis_labels = (
        (cp_axes, "pressure coefficient cp (-)", "pressure"),
        (theta_axes, "momentum thickness theta/c (-)", "momentum thickness"),
        (shape_axes, "shape factor H = delta*/theta (-)", "shape factor"),
        (shape_geometry, "y/c (-)", "section"),
        (cf_axes, "skin friction cf (-)", "skin friction"),
        (amp_axes, "amplification factor N (-)", "amplification"),
    )
    for axes, ylabel, title in axis_labels:
        axes.set_xlabel("x/c (-)")
        axes.set_ylabel(ylabel, fontsize="small")
        axes.set_title(title, fontsize="small")
        axes.grid(True, alpha=0.3)
        axes.legend(fontsize="x-small")
    figure.suptitle(
        f"{label} at alpha = {alpha_deg:g} deg, "
        + conditions_title(reynolds, mach, transition, n_factor)
    )
    figure.tight_layout()
    return figure


def _robust_ylim(axes, values: np.ndarray) -> None:  # type: ignore[no-untyped-def]
    """Scale the y axis to the 1st-99th percentile of the finite values, with a margin."""
    finite = values[np.isfinite(values)]
    if finite.size < 5:
        return
    low, high = np.percentile(finite, [1.0, 99.0])
    margin = 0.15 * (high - low) if high > low else max(abs(high), 1e-6) * 0.1
    axes.set_ylim(min(low - margin, 0.0) if low >= 0 else low - margin, high + margin)


def parameter_label(name: str) -> str:
    """Axis label with unit for a section parameter column."""
    return PARAMETER_LABELS.get(name, f"{name} (-)")


def map_table(
    design: pl.DataFrame,
    sections: pl.DataFrame,
    *,
    x: str,
    y: str,
    design_cl: float,
    reynolds: float,
    transition: str | None = None,
) -> tuple[pl.DataFrame, str | None]:
    """Least cd at the design cl for each (x, y) pair of section parameters, one condition."""
    for name in (x, y):
        if name not in sections.columns:
            known = [c for c in sections.columns if sections[c].dtype.is_numeric()]
            raise InputError(f"sections have no parameter {name!r}; numeric ones are {known}")
    rows, transition = select_condition(design, reynolds, transition)
    rows = rows.filter(_near("design_cl", design_cl))
    if rows.height == 0:
        stored = sorted(design["design_cl"].unique().to_list())
        raise InputError(f"no design point at cl = {design_cl:g}; the catalog has {stored}")
    joined = (
        sections.select("section_id", x, y)
        .drop_nulls([x, y])
        .join(rows.select("section_id", "cd"), on="section_id", how="left")
    )
    best = (
        joined.group_by([x, y])
        .agg(pl.col("cd").min().alias("cd"), pl.len().alias("sections"))
        .sort([x, y])
    )
    return best, transition


def map_figure(
    design: pl.DataFrame,
    sections: pl.DataFrame,
    *,
    x: str,
    y: str,
    design_cl: float,
    reynolds: float,
    transition: str | None = None,
) -> Figure:
    """cd at the design cl over two family parameters (least cd where other parameters vary)."""
    best, transition = map_table(
        design, sections, x=x, y=y, design_cl=design_cl, reynolds=reynolds, transition=transition
    )
    figure = new_figure()
    axes = figure.subplots(1, 1)
    good = best.filter(pl.col("cd").is_not_null() & pl.col("cd").is_finite())
    bad = best.filter(~(pl.col("cd").is_not_null() & pl.col("cd").is_finite()))
    if good.height == 0:
        raise InputError(f"no converged design point at cl = {design_cl:g} to map")
    gx, gy, gcd = (good[c].to_numpy() for c in (x, y, "cd"))
    if len(np.unique(gx)) >= 2 and len(np.unique(gy)) >= 2 and good.height >= 4:
        try:
            filled = axes.tricontourf(gx, gy, gcd, levels=12, cmap="viridis", alpha=0.6)
        except (ValueError, RuntimeError):  # collinear or degenerate points: markers only
            filled = None
    else:
        filled = None
    marks = axes.scatter(gx, gy, c=gcd, cmap="viridis", edgecolors="k", s=40, label="screened sections")
    colorbar = figure.colorbar(filled if filled is not None else marks, ax=axes)
    colorbar.set_label(f"drag coefficient cd at cl = {design_cl:g} (-)")
    least = int(np.argmin(gcd))
    axes.scatter([gx[least]], [gy[least]], marker="*", s=260, color="gold", edgecolors="k",
                 label=f"least cd = {gcd[least]:.5f}")
    if bad.height:
        axes.scatter(bad[x].to_numpy(), bad[y].to_numpy(), marker="x", color="0.4",
                     label="does not reach this cl on a converged polar")
    for values, set_limits in ((best[x], axes.set_xlim), (best[y], axes.set_ylim)):
        low, high = float(values.min()), float(values.max())  # type: ignore[arg-type]
        pad = 0.06 * (high - low) if high > low else max(abs(high), 1e-3) * 0.1
        set_limits(low - pad, high + pad)  # markers on the border of the family stay whole
    axes.ticklabel_format(useOffset=False)
    axes.set_xlabel(parameter_label(x))
    axes.set_ylabel(parameter_label(y))
    axes.grid(True, alpha=0.3)
    axes.legend(fontsize="small", loc="upper center", bbox_to_anchor=(0.5, -0.12), ncol=3)
    rows = design.filter(_near("reynolds", reynolds))
    axes.set_title(
        f"cd at cl = {design_cl:g}, "
        + conditions_title(reynolds, _first(rows, "mach"), transition, _first(rows, "n_factor"))
    )
    figure.tight_layout()
    return figure
