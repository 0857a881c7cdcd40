"""One self-contained HTML page about a catalog: campaign, ranked shortlist, polars, maps,
convergence statistics and cautions. Images are inlined as base64 PNG, so the page is a single
file that opens anywhere, offline.
"""

from __future__ import annotations

import base64
import html
import io
import json
import math
from collections.abc import Sequence
from pathlib import Path
from typing import Any

import polars as pl
from matplotlib.figure import Figure

from wakerank.errors import InputError
from wakerank.plots import DPI, map_figure, polar_figure

#: Sections of the page, in order (their ids are the anchors of the table of contents).
PAGE_SECTIONS = (
    ("campaign", "Campaign"),
    ("shortlist", "Ranked shortlist"),
    ("polars", "Polars of the shortlist"),
    ("maps", "Drag maps"),
    ("convergence", "Convergence statistics"),
    ("cautions", "Cautions"),
)

CAUTION_TEXT = (
    "These are screening estimates from a two-dimensional panel method coupled to an integral "
    "boundary layer, with drag from the far-wake momentum defect. Confirm any choice by "
    "detailed CFD and by test. Any design that flies or carries loads follows the applicable "
    "airworthiness codes and licensed engineering practice; these numbers are no substitute "
    "for either."
)

#: Most sections drawn in one polar figure (more would be unreadable).
POLAR_SECTIONS = 6
#: Most shortlist rows shown in the table.
TABLE_ROWS = 50

_STYLE = """
body { font-family: sans-serif; margin: 2em auto; max-width: 1100px; color: #222; }
table { border-collapse: collapse; font-size: 0.85em; margin: 0.5em 0 1.5em; }
th, td { border: 1px solid #bbb; padding: 0.2em 0.5em; text-align: right; }
th { background: #eee; } td.text { text-align: left; }
img { max-width: 100%; } pre { background: #f6f6f6; padding: 0.5em; font-size: 0.85em; } .caution { border-left: 4px solid #c60; padding: 0.5em 1em; background: #fff6ec; }
"""


def figure_to_data_uri(figure: Figure) -> str:
    """The figure as a ``data:image/png;base64,...`` URI."""
    buffer = io.BytesIO()
    figure.savefig(buffer, format="png", dpi=DPI)
    return "data:image/png;base64," + base64.b64encode(buffer.getvalue()).decode("ascii")


def _cell(value: Any) -> str:
    if value is None:
        return '<td class="text">-</td>'
    if isinstance(value, bool):
        return f'<td class="text">{"yes" if value else "no"}</td>'
    if isinstance(value, float):
        if not math.isfinite(value):
            return '<td class="text">-</td>'
        return f"<td>{value:.5g}</td>"
    if isinstance(value, int):
        return f"<td>{value}</td>"
    return f'<td class="text">{html.escape(str(value))}</td>'


def table_html(frame: pl.DataFrame, limit: int = TABLE_ROWS) -> str:
    """An HTML table of the first `limit` rows (nested columns shown as text)."""
    shown = frame.head(limit)
    head = "".join(f"<th>{html.escape(c)}</th>" for c in shown.columns)
    body = "".join(
        "<tr>" + "".join(_cell(v) for v in row) + "</tr>" for row in shown.iter_rows()
    )
    more = f"<p>({frame.height - limit} more rows not shown)</p>" if frame.height > limit else ""
    return f"<table><thead><tr>{head}</tr></thead><tbody>{body}</tbody></table>{more}"


def convergence_table(points: pl.DataFrame | pl.LazyFrame) -> pl.DataFrame:
    """Points, converged points and their share per Reynolds number and transition setting,
    and how many converged points come from the first-order wake (``wake_curvature`` false)."""
    lazy = points.lazy()
    columns = lazy.collect_schema().names()
    keys = [k for k in ("reynolds", "transition") if k in columns]
    failed = pl.col("error").is_not_null().sum() if "error" in columns else pl.lit(0)
    converged = pl.col("converged").fill_null(False)
    first_order = (
        (converged & ~pl.col("wake_curvature").fill_null(False)).sum()
        if "wake_curvature" in columns
        else pl.lit(None, dtype=pl.UInt32)
    )
    return (
        lazy.group_by(keys)
        .agg(
            pl.len().alias("points"),
            converged.sum().alias("converged"),
            first_order.alias("converged_first_order_wake"),
            failed.alias("points_of_failed_cases"),
        )
        .with_columns((pl.col("converged") / pl.col("points")).alias("converged_share"))
        .sort(keys)
        .collect()
    )


def _campaign_file_html(manifest: dict[str, Any]) -> str:
    """The campaign file's text, when it is still where the manifest says."""
    path = manifest.get("campaign_file")
    if not path:
        return ""
    try:
        text = Path(path).read_text(encoding="utf-8")
    except (OSError, UnicodeDecodeError):
        return f"<p>Campaign file {html.escape(str(path))} (no longer readable).</p>"
    return f"<h3>Campaign file {html.escape(str(path))}</h3><pre>{html.escape(text)}</pre>"


def _manifest_rows(manifest: dict[str, Any]) -> str:
    items = []
    for key, value in manifest.items():
        if key == "campaign_text":
            continue
        text = value if isinstance(value, str) else json.dumps(value, sort_keys=True)
        items.append(f"<tr><th>{html.escape(key)}</th>{_cell(text)}</tr>")
    return "<table>" + "".join(items) + "</table>"


#: Shortlist columns left out of the report's table (long or internal).
HIDDEN_COLUMNS = ("parameters", "condition_id", "turbulence_intensity")


def _shortlist_html(shortlist: pl.DataFrame, design_cl: float, constraints: dict[str, Any]) -> str:
    given = ", ".join(f"{k} = {v:g}" for k, v in constraints.items() if v is not None)
    intro = f"<p>Ranked by cd at the design lift coefficient cl = {design_cl:g}"
    intro += f"; constraints: {html.escape(given)}.</p>" if given else "; no constraints.</p>"
    shown = shortlist.drop([c for c in HIDDEN_COLUMNS if c in shortlist.columns])
    return intro + table_html(shown)


def _image(uri: str, alt: str) -> str:
    return f'<p><img src="{uri}" alt="{html.escape(alt)}"></p>'


def build_report(
    *,
    manifest: dict[str, Any],
    points: pl.DataFrame,
    sections: pl.DataFrame,
    design: pl.DataFrame,
    shortlist: pl.DataFrame,
    design_cl: float,
    map_axes: Sequence[tuple[str, str]] = (("thickness", "camber"),),
    convergence: pl.DataFrame | None = None,
    constraints: dict[str, Any] | None = None,
) -> str:
    """The report page as one HTML string (see PAGE_SECTIONS).

    `points` need only hold the shortlisted sections' rows; `design` holds cd at the design
    cl for every section (for the maps); `convergence` defaults to `convergence_table(points)`.
    """
    if shortlist.height == 0:
        raise InputError(f"the shortlist at cl = {design_cl:g} is empty: nothing to report")
    name = str(manifest.get("name") or manifest.get("campaign_name") or "catalog")
    labels = dict(zip(sections["section_id"].to_list(), sections["label"].to_list())) \
        if "label" in sections.columns else {}
    reynolds_values = (
        shortlist["reynolds"].unique(maintain_order=True).to_list()
        if "reynolds" in shortlist.columns
        else sorted(points["reynolds"].unique().to_list())
    )
    polar_html = []
    for reynolds in reynolds_values:
        here = shortlist.filter(pl.col("reynolds") == reynolds) if "reynolds" in shortlist.columns else shortlist
        ids = here["section_id"].unique(maintain_order=True).to_list()[:POLAR_SECTIONS]
        setting = here["transition"][0] if "transition" in here.columns else None
        figure = polar_figure(points, ids, reynolds=float(reynolds), transition=setting,
                              labels=labels, design_cl=[design_cl])
        polar_html.append(_image(figure_to_data_uri(figure), f"polars at Re {reynolds:g}"))
    map_html = []
    for x, y in map_axes:
        if x not in sections.columns or y not in sections.columns:
            continue
        for reynolds in reynolds_values:
            try:
                figure = map_figure(design, sections, x=x, y=y, design_cl=design_cl,
                                    reynolds=float(reynolds))
            except InputError as exc:
                map_html.append(f"<p>No map of {x} and {y}: {html.escape(str(exc))}</p>")
                continue
            map_html.append(_image(figure_to_data_uri(figure), f"map of cd over {x} and {y}"))
    if not map_html:
        map_html.append("<p>No family parameters to map in this catalog.</p>")
    failed_chunks = manifest.get("failed_chunks") or []
    failed_html = (
        f"<p>{len(failed_chunks)} chunk(s) failed on every try and are missing from the "
        "catalog: " + html.escape(json.dumps(failed_chunks)) + "</p>"
        if failed_chunks else "<p>No chunk failed.</p>"
    )
    toc = "".join(f'<li><a href="#{key}">{title}</a></li>' for key, title in PAGE_SECTIONS)
    body = {
        "campaign": _manifest_rows(manifest) + _campaign_file_html(manifest),
        "shortlist": _shortlist_html(shortlist, design_cl, constraints or {}),
        "polars": "".join(polar_html),
        "maps": "".join(map_html),
        "convergence": table_html(
            convergence if convergence is not None else convergence_table(points)
        ) + failed_html,
        "cautions": f'<p class="caution">{html.escape(CAUTION_TEXT)}</p>',
    }
    parts = [
        "<!DOCTYPE html>",
        '<html lang="en"><head><meta charset="utf-8">',
        f"<title>wakerank report: {html.escape(name)}</title>",
        f"<style>{_STYLE}</style></head><body>",
        f"<h1>wakerank report: {html.escape(name)}</h1>",
        f"<ul>{toc}</ul>",
    ]
    for key, title in PAGE_SECTIONS:
        parts.append(f'<section id="{key}"><h2>{title}</h2>{body[key]}</section>')
    parts.append("</body></html>")
    return "\n".join(parts) + "\n"


def catalog_report(
    catalog: Any,
    design_cl: float,
    *,
    reynolds: float | None = None,
    top: int = 10,
    transition: str | None = "free",
) -> str:
    """The report of a catalog folder (or opened catalog) ranked at `design_cl`.

    The campaign's own [design] constraints (thickness, |cm|, stall margin) apply, as in
    `wakerank rank`.
    """
    from wakerank.catalog import Catalog, open_catalog
    from wakerank.catalog_plots import design_points, family_parameters
    from wakerank.ranking import rank

    opened = catalog if isinstance(catalog, Catalog) else open_catalog(catalog)
    wanted = opened.manifest.get("design") or {}
    constraints = {
        key: wanted.get(key) for key in ("min_thickness", "max_abs_cm", "min_stall_margin")
    }
    shortlist = rank(opened, [design_cl], reynolds=reynolds, top=top, transition=transition,
                     **constraints)
    ids = shortlist["section_id"].unique().to_list()
    points = opened.points.filter(pl.col("section_id").is_in(ids)).collect()
    sections = opened.sections.select("section_id", "label").collect().join(
        family_parameters(opened.sections, ["thickness", "camber"]), on="section_id"
    )
    design = design_points(opened, design_cl)
    return build_report(
        manifest=opened.manifest,
        points=points,
        sections=sections,
        design=design,
        shortlist=shortlist,
        design_cl=design_cl,
        convergence=convergence_table(opened.points),
        constraints=constraints,
    )
