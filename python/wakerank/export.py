"""Hand a shortlist over to detailed CFD: coordinates, a case file and optionally a mesh.

For each shortlisted section, ``export_shortlist`` writes into ``OUTDIR/<section_id>/``:
``coordinates.csv`` (x, y in chords), ``case.json`` (flow conditions and screening predictions
of each design point, plus the first-cell height for a target y+; schema in
``wakerank/data/case.schema.json`` and docs/export.md) and, with ``mesh=True``,
``mesh.msh`` + ``mesh.su2`` (see wakerank.mesh).
"""

from __future__ import annotations

import json
import math
import re
from dataclasses import dataclass
from importlib import resources
from pathlib import Path
from typing import Any

import numpy as np
import polars as pl

from wakerank.errors import InputError
from wakerank.ranking import PER_DESIGN_POINT
from wakerank.wall_spacing import SKIN_FRICTION_CORRELATION, wall_spacing

#: Identifier of the case-file format written here.
CASE_FORMAT = "wakerank-case/1"
#: The cautions every case file carries.
CAUTIONS = (
    "Screening estimates from a 2-D panel method with an integral boundary layer. Confirm by "
    "detailed CFD and by test; designs that fly or carry loads follow the applicable "
    "airworthiness codes and licensed engineering practice."
)
#: Gap (in chords) below which a trailing edge counts as sharp.
SHARP_GAP = 1e-9


@dataclass(frozen=True)
class ExportOptions:
    """Choices of ``wakerank export``; ``points=None`` keeps the catalog's coordinates."""

    points: int | None = None
    close_trailing_edge: bool = False
    y_plus: float = 1.0
    mesh: bool = False
    farfield_radius: float = 100.0
    growth_ratio: float = 1.2

    def check(self) -> None:
        """Reject bad options before anything is written, naming the option."""
        from wakerank.mesh import MIN_FARFIELD_RADIUS

        if self.points is not None and self.points < 16:
            raise InputError(f"--points {self.points}: need at least 16 points around the section")
        if not (self.y_plus > 0.0) or not math.isfinite(self.y_plus):
            raise InputError(f"--y-plus {self.y_plus}: the target y+ must be a positive number")
        if self.mesh and not (self.farfield_radius >= MIN_FARFIELD_RADIUS):
            raise InputError(
                f"--farfield {self.farfield_radius:g}: the far field must be at least "
                f"{MIN_FARFIELD_RADIUS:g} chords away"
            )


def case_schema() -> dict[str, Any]:
    """The JSON Schema of case files, as shipped in the package."""
    text = resources.files("wakerank").joinpath("data/case.schema.json").read_text("utf-8")
    return json.loads(text)


def trailing_edge_gap(x: np.ndarray, y: np.ndarray) -> float:
    """Distance between the first and last coordinate (the trailing-edge base), in chords."""
    return float(math.hypot(x[-1] - x[0], y[-1] - y[0]))


def close_trailing_edge(x: np.ndarray, y: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
    """Close a blunt trailing edge by shearing each surface linearly in x/c (common practice).

    Each surface moves by ``(x - x_le)/(x_te - x_le)`` times half the gap toward the base's
    mid-point, so the leading edge stays in place and both ends meet; the loop then ends on its
    first point.
    """
    x = np.asarray(x, dtype=float).copy()
    y = np.asarray(y, dtype=float).copy()
    if trailing_edge_gap(x, y) < SHARP_GAP:
        return x, y
    le = int(np.argmin(x))
    mid_x, mid_y = 0.5 * (x[0] + x[-1]), 0.5 * (y[0] + y[-1])
    for part, end in ((slice(0, le + 1), 0), (slice(le, len(x)), -1)):
        chord = x[end] - x[le]
        if chord <= 0.0:
            raise InputError("cannot close the trailing edge: a surface does not end aft of the nose")
        weight = (x[part] - x[le]) / chord
        x[part] += weight * (mid_x - x[end])
        y[part] += weight * (mid_y - y[end])
    x[-1], y[-1] = x[0], y[0]
    return x, y


def export_coordinates(
    x: np.ndarray, y: np.ndarray, options: ExportOptions
) -> tuple[np.ndarray, np.ndarray, str]:
    """Coordinates as exported (resampled, closed) and the trailing-edge kind for the case file."""
    x = np.asarray(x, dtype=float)
    y = np.asarray(y, dtype=float)
    if options.points is not None:
        x, y = _repanel(x, y, options.points)
    if options.close_trailing_edge and trailing_edge_gap(x, y) >= SHARP_GAP:
        x, y = close_trailing_edge(x, y)
        return x, y, "closed-by-export"
    return x, y, ("sharp" if trailing_edge_gap(x, y) < SHARP_GAP else "blunt")


def _repanel(x: np.ndarray, y: np.ndarray, points: int) -> tuple[np.ndarray, np.ndarray]:
    import wakerank

    if points < 16:
        raise InputError(f"--points {points}: need at least 16 points around the section")
    # a closed loop of N points has N - 1 panels
    section = wakerank.Section.from_coordinates(x, y).repanel(points - 1)
    return np.asarray(section.x, dtype=float), np.asarray(section.y, dtype=float)


def write_coordinates_csv(path: Path, x: np.ndarray, y: np.ndarray) -> None:
    """Write ``x,y`` rows (chords) with a header line; 10 significant digits."""
    lines = ["x,y"] + [f"{a:.10g},{b:.10g}" for a, b in zip(x, y)]
    path.write_text("\n".join(lines) + "\n", encoding="utf-8")


def _number_or_none(row: dict[str, Any], key: str) -> float | None:
    value = row.get(key)
    if value is None:
        return None
    value = float(value)
    return value if math.isfinite(value) else None


def design_point_entry(row: dict[str, Any], y_plus: float) -> dict[str, Any]:
    """One ``design_points`` item of the case file from a design-table row."""
    for key in ("design_cl", "reynolds", "alpha_deg", "cd"):
        if row.get(key) is None:
            raise InputError(f"design point of section {row.get('section_id')!r} lacks {key!r}")
    spacing = wall_spacing(float(row["reynolds"]), y_plus)
    cl = _number_or_none(row, "cl")
    cd = float(row["cd"])
    return {
        "design_cl": float(row["design_cl"]),
        "reynolds": float(row["reynolds"]),
        "mach": float(row.get("mach") or 0.0),
        "n_factor": _number_or_none(row, "n_factor"),
        "alpha_deg": float(row["alpha_deg"]),
        "transition": {
            "setting": str(row.get("transition") or "free"),
            "upper_x": _number_or_none(row, "transition_upper"),
            "lower_x": _number_or_none(row, "transition_lower"),
        },
        "predicted": {
            "cl": cl if cl is not None else float(row["design_cl"]),
            "cd": cd,
            "cm_c4": _number_or_none(row, "cm_c4"),
            "l_over_d": _number_or_none(row, "l_over_d"),
            "full_model": None if row.get("wake_curvature") is None else bool(row["wake_curvature"]),
        },
        "first_cell": {
            "y_plus": spacing.y_plus,
            "height": spacing.first_cell_height,
            "skin_friction": spacing.skin_friction,
            "correlation": SKIN_FRICTION_CORRELATION,
        },
    }


def build_case(
    section_id: str,
    design_rows: list[dict[str, Any]],
    *,
    coordinates_file: str,
    points: int,
    trailing_edge: str,
    trailing_edge_gap_chords: float,
    y_plus: float,
    name: str | None = None,
    family: str | None = None,
    mesh: dict[str, Any] | None = None,
) -> dict[str, Any]:
    """The case-file document for one section (see case.schema.json)."""
    import wakerank

    if not design_rows:
        raise InputError(f"section {section_id!r} has no design point in the catalog")
    return {
        "format": CASE_FORMAT,
        "wakerank_version": wakerank.__version__,
        "section": {
            "section_id": section_id,
            "name": name,
            "family": family,
            "coordinates_file": coordinates_file,
            "points": points,
            "trailing_edge": trailing_edge,
            "trailing_edge_gap": trailing_edge_gap_chords,
        },
        "reference": {"chord": 1.0, "moment_reference_x": 0.25, "length_unit": "chord"},
        "design_points": [design_point_entry(row, y_plus) for row in design_rows],
        "mesh": mesh,
        "cautions": CAUTIONS,
    }


def export_section(
    section_id: str,
    x: np.ndarray,
    y: np.ndarray,
    design: pl.DataFrame,
    out_dir: Path,
    options: ExportOptions,
    *,
    name: str | None = None,
    family: str | None = None,
) -> Path:
    """Write coordinates, case file and optional mesh of one section; returns its folder."""
    folder = Path(out_dir) / _safe_folder(section_id)
    folder.mkdir(parents=True, exist_ok=True)
    ex, ey, edge = export_coordinates(x, y, options)
    write_coordinates_csv(folder / "coordinates.csv", ex, ey)
    rows = design.sort(["design_cl", "reynolds"]).to_dicts()
    mesh_entry = _write_mesh(folder, ex, ey, rows, options, section_id) if options.mesh else None
    case = build_case(
        section_id,
        rows,
        coordinates_file="coordinates.csv",
        points=len(ex),
        trailing_edge=edge,
        trailing_edge_gap_chords=trailing_edge_gap(ex, ey),
        y_plus=options.y_plus,
        name=name,
        family=family,
        mesh=mesh_entry,
    )
    (folder / "case.json").write_text(json.dumps(case, indent=2) + "\n", encoding="utf-8")
    return folder


def _write_mesh(folder, x, y, rows, options, section_id):  # type: ignore[no-untyped-def]
    from wakerank.mesh import MeshSettings, build_mesh

    reynolds = max(float(r["reynolds"]) for r in rows)
    spacing = wall_spacing(reynolds, options.y_plus)
    settings = MeshSettings(
        first_cell_height=spacing.first_cell_height,
        layer_thickness=spacing.boundary_layer_thickness,
        growth_ratio=options.growth_ratio,
        farfield_radius=options.farfield_radius,
        farfield_cell_size=options.farfield_radius / 10.0,
    )
    summary = build_mesh(x, y, settings, folder / "mesh", name=_safe_folder(section_id))
    return {
        "msh_file": summary.msh_path.name,
        "su2_file": summary.su2_path.name,
        "markers": ["airfoil", "farfield"],
        "farfield_radius": summary.farfield_radius,
        "first_cell_height": settings.first_cell_height,
        "design_reynolds": reynolds,
        "growth_ratio": settings.growth_ratio,
        "wall_layers": summary.wall_layers,
        "nodes": summary.nodes,
        "elements": summary.elements_2d,
    }


def _safe_folder(section_id: str) -> str:
    cleaned = "".join(c if (c.isalnum() or c in "-_.") else "_" for c in section_id)
    if not cleaned.strip("."):
        raise InputError(f"section id {section_id!r} cannot name a folder")
    return cleaned



#: Condition columns carried from a shortlist row into each of its design points.
CONDITION_KEYS = ("section_id", "condition_id", "reynolds", "mach", "n_factor", "transition")
_AT_CL = re.compile(r"^cd_at_cl_(.+)$")


def design_points_from_shortlist(shortlist: pl.DataFrame) -> pl.DataFrame:
    """One row per shortlisted section x condition x design cl (long form).

    A shortlist from `wakerank.rank` holds one row per section and condition, with the values
    at each design cl in ``<name>_at_cl_<cl>`` columns; a long table with a ``design_cl``
    column is returned as it is.
    """
    if "design_cl" in shortlist.columns:
        return shortlist
    targets = [m.group(1) for c in shortlist.columns if (m := _AT_CL.match(c))]
    if not targets:
        raise InputError("shortlist has neither a design_cl column nor cd_at_cl_<cl> columns")
    keys = [k for k in CONDITION_KEYS if k in shortlist.columns]
    frames = []
    for text in targets:
        design_cl = float(text)
        values = [
            pl.col(f"{name}_at_cl_{text}").alias(name)
            for name in PER_DESIGN_POINT
            if f"{name}_at_cl_{text}" in shortlist.columns
        ]
        frames.append(
            shortlist.select(*keys, *values).with_columns(
                pl.lit(design_cl).alias("design_cl"),
                pl.lit(design_cl).alias("cl"),
                (pl.lit(design_cl) / pl.col("cd")).alias("l_over_d"),
            )
        )
    return pl.concat(frames, how="diagonal_relaxed")


def export_shortlist(
    shortlist: pl.DataFrame,
    sections: pl.DataFrame,
    out_dir: Path,
    options: ExportOptions,
) -> list[Path]:
    """Export every section of the shortlist (in its order) with its design points.

    ``sections`` needs ``section_id`` and list columns ``x``, ``y`` (the catalog's
    sections table); the design points come from the shortlist itself (see
    `design_points_from_shortlist`), so a shortlist ranked at any design cl exports.
    """
    options.check()
    if "section_id" not in shortlist.columns:
        raise InputError("shortlist has no 'section_id' column")
    ids = shortlist["section_id"].unique(maintain_order=True).to_list()
    if not ids:
        raise InputError("shortlist is empty: nothing to export")
    missing = set(ids) - set(sections["section_id"].to_list())
    if missing:
        shown = ", ".join(sorted(missing)[:5])
        raise InputError(f"section(s) {shown} of the shortlist are not in the catalog")
    points = design_points_from_shortlist(shortlist)
    folders = []
    for section_id in ids:
        found = sections.filter(pl.col("section_id") == section_id)
        if found.height == 0:
            raise InputError(f"section {section_id!r} of the shortlist is not in the catalog")
        row = found.row(0, named=True)
        folders.append(
            export_section(
                section_id,
                np.asarray(row["x"], dtype=float),
                np.asarray(row["y"], dtype=float),
                points.filter(pl.col("section_id") == section_id),
                out_dir,
                options,
                name=row.get("label"),
                family=row.get("family"),
            )
        )
    return folders
