"""Figures straight from a catalog folder: what `wakerank plot ...` draws.

Each function opens what it needs lazily (only the named sections' rows are read), resolves
sections by id or label, and hands plain frames to `wakerank.plots`.
"""

from __future__ import annotations

import os
from collections.abc import Sequence
from typing import Any

import numpy as np
import polars as pl
from matplotlib.figure import Figure

from wakerank import plots
from wakerank.errors import InputError


def _open(catalog: Any) -> Any:
    from wakerank.catalog import Catalog, open_catalog

    return catalog if isinstance(catalog, Catalog) else open_catalog(catalog)


def resolve_sections(sections: pl.LazyFrame, references: Sequence[str]) -> pl.DataFrame:
    """Rows of the sections named by id (or a unique prefix of one) or by label, in order."""
    table = sections.select("section_id", "label").collect()
    ids = table["section_id"].to_list()
    by_label: dict[str, list[str]] = {}
    for section_id, label in table.iter_rows():
        by_label.setdefault(str(label), []).append(section_id)
    chosen = []
    for reference in references:
        if reference in ids:
            chosen.append(reference)
            continue
        if len(by_label.get(reference, [])) == 1:
            chosen.append(by_label[reference][0])
            continue
        prefixed = [i for i in ids if i.startswith(reference)]
        if len(prefixed) == 1:
            chosen.append(prefixed[0])
            continue
        if len(prefixed) > 1 or len(by_label.get(reference, [])) > 1:
            raise InputError(f"section {reference!r} is ambiguous in this catalog; give the full id")
        raise InputError(f"no section {reference!r} in this catalog (give a section id or label)")
    return table.filter(pl.col("section_id").is_in(chosen)).sort(
        pl.col("section_id").replace_strict(chosen, list(range(len(chosen))))
    )


def polar_figure(
    catalog: Any,
    sections: Sequence[str],
    *,
    reynolds: float,
    transition: str | None = None,
    design_cl: Sequence[float] = (),
) -> Figure:
    """Drag polars and lift curves of the named sections at one condition."""
    opened = _open(catalog)
    chosen = resolve_sections(opened.sections, sections)
    ids = chosen["section_id"].to_list()
    points = opened.points.filter(pl.col("section_id").is_in(ids)).collect()
    labels = dict(chosen.iter_rows())
    return plots.polar_figure(points, ids, reynolds=reynolds, transition=transition, labels=labels,
                              design_cl=design_cl)


def section_figure(
    catalog: Any,
    section: str,
    *,
    alpha_deg: float,
    reynolds: float,
    transition: str | None = None,
) -> Figure:
    """Cp and boundary layer of one catalog section, recomputed at one angle.

    The section is rebuilt from its stored coordinates; Mach, N-factor, trips and panel count
    are those of the catalog's condition at `reynolds` (and `transition`).
    """
    import wakerank as wr

    opened = _open(catalog)
    chosen = resolve_sections(opened.sections, [section])
    section_id, label = chosen.row(0)
    stored = opened.sections.filter(pl.col("section_id") == section_id).select("x", "y").collect()
    rows = opened.points.filter(pl.col("section_id") == section_id).collect()
    rows, transition = plots.select_condition(rows, reynolds, transition)
    condition = rows.row(0, named=True)
    shape = wr.Section.from_coordinates(
        np.asarray(stored["x"][0], dtype=float), np.asarray(stored["y"][0], dtype=float), name=label
    )
    options = _analysis_options(condition)
    surface = wr.surface(shape, alpha_deg, panels=options.get("panels", 160),
                         mach=options.get("mach", 0.0))
    stations = wr.boundary_layer(shape, alpha_deg=alpha_deg, **options)
    return plots.section_figure(
        surface,
        stations,
        label=str(label),
        alpha_deg=alpha_deg,
        reynolds=float(condition["reynolds"]),
        mach=condition.get("mach"),
        transition=transition,
        n_factor=condition.get("n_factor"),
    )


def _analysis_options(condition: dict[str, Any]) -> dict[str, Any]:
    options: dict[str, Any] = {"reynolds": float(condition["reynolds"])}
    for key in ("mach", "trip_upper", "trip_lower"):
        if condition.get(key) is not None:
            options[key] = float(condition[key])
    if condition.get("turbulence_intensity") is not None:
        options["turbulence_intensity"] = float(condition["turbulence_intensity"])
    elif condition.get("n_factor") is not None:
        options["n_factor"] = float(condition["n_factor"])
    if condition.get("panels") is not None:
        options["panels"] = int(condition["panels"])
    return options


def design_points(catalog: Any, design_cl: float) -> pl.DataFrame:
    """cd (and alpha, cm, transition) at `design_cl` on every converged polar of the catalog.

    Uses the ranking's interpolation (`wakerank.ranking.rank` without constraints), so maps
    agree with the shortlist at any design cl, not only the campaign's.
    """
    from wakerank.export import design_points_from_shortlist
    from wakerank.ranking import rank

    ranked = rank(_open(catalog), [design_cl], top=None, transition=None)
    if ranked.height == 0:
        raise InputError(f"no polar of this catalog reaches cl = {design_cl:g}")
    return design_points_from_shortlist(ranked)


def default_reynolds(catalog: Any) -> float:
    """The lowest Reynolds number of the catalog (for commands where it is optional)."""
    opened = _open(catalog)
    values = opened.points.select(pl.col("reynolds").unique()).collect()["reynolds"].to_list()
    if not values:
        raise InputError("the catalog has no points yet")
    return float(min(values))


def map_figure(
    catalog: Any,
    *,
    design_cl: float,
    x: str,
    y: str,
    reynolds: float | None = None,
    transition: str | None = None,
) -> Figure:
    """cd at the design cl over two section parameters of the catalog."""
    opened = _open(catalog)
    design = design_points(opened, design_cl)
    sections = family_parameters(opened.sections, [x, y])
    return plots.map_figure(
        design,
        sections,
        x=x,
        y=y,
        design_cl=design_cl,
        reynolds=reynolds if reynolds is not None else default_reynolds(opened),
        transition=transition,
    )


def family_parameters(sections: pl.LazyFrame, names: Sequence[str]) -> pl.DataFrame:
    """section_id and one column per name: the family's nominal parameter (from the
    ``parameters`` JSON, e.g. NACA thickness 0.12) where the section has it, else the measured
    geometric property of the same name (e.g. the thickness of a CST or file section)."""
    columns = sections.collect_schema().names()
    exprs = []
    for name in names:
        nominal = (
            pl.col("parameters").str.json_path_match(f"$.{name}").cast(pl.Float64, strict=False)
            if "parameters" in columns
            else pl.lit(None, dtype=pl.Float64)
        )
        measured = pl.col(name) if name in columns else pl.lit(None, dtype=pl.Float64)
        exprs.append(pl.coalesce(nominal, measured).alias(name))
    table = sections.select("section_id", *exprs).collect()
    for name in names:
        if table[name].null_count() == table.height:
            known = [c for c in columns if c not in ("section_id", "family", "label", "x", "y")]
            raise InputError(
                f"sections have no parameter {name!r}; there are {known} and the family parameters"
            )
    return table


def default_output(kind: str, **labels: Any) -> str:
    """File name for a figure, e.g. ``polar-Re8e5.png``."""
    suffix = "-".join(f"{key}{value}" for key, value in labels.items() if value is not None)
    name = f"{kind}-{suffix}" if suffix else kind
    return os.fspath(name.replace(" ", "_").replace("/", "_") + ".png")
