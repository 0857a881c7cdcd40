"""Column names and types of the catalog tables (documented in docs/catalog.md).

The schema lives apart from the code that writes (runner) and reads (catalog, ranking) the
tables, so both sides agree on one definition.
"""

from __future__ import annotations

import polars as pl

from wakerank.viscous import POLAR_COLUMNS

#: Catalog format identifier and version, recorded in manifest.json.
CATALOG_FORMAT = "wakerank-catalog"
CATALOG_FORMAT_VERSION = 1

#: Columns of one row of a viscous polar as :func:`wakerank.analyze` returns them
#: (defined once, beside the analysis that produces them).
ANALYSIS_COLUMNS: tuple[str, ...] = POLAR_COLUMNS

#: points/part-*.parquet: one row per section x condition x angle.
POINT_SCHEMA: dict[str, pl.DataType] = {
    "section_id": pl.String(),
    "condition_id": pl.String(),
    "reynolds": pl.Float64(),
    "mach": pl.Float64(),
    "n_factor": pl.Float64(),
    "turbulence_intensity": pl.Float64(),
    "transition": pl.String(),
    "trip_upper": pl.Float64(),
    "trip_lower": pl.Float64(),
    "panels": pl.Int32(),
    "alpha_deg": pl.Float64(),
    "cl": pl.Float64(),
    "cd": pl.Float64(),
    "cd_squire_young": pl.Float64(),
    "cd_friction": pl.Float64(),
    "cd_pressure": pl.Float64(),
    "cm_c4": pl.Float64(),
    "cp_min": pl.Float64(),
    "transition_upper": pl.Float64(),
    "transition_lower": pl.Float64(),
    "separation_upper": pl.Float64(),
    "separation_lower": pl.Float64(),
    "converged": pl.Boolean(),
    "iterations": pl.Int32(),
    "residual": pl.Float64(),
    "wake_curvature": pl.Boolean(),
    "error": pl.String(),
}

#: Columns that identify a condition apart from its id (used to pair free and tripped runs).
CONDITION_COLUMNS: tuple[str, ...] = (
    "condition_id",
    "reynolds",
    "mach",
    "n_factor",
    "turbulence_intensity",
    "transition",
    "trip_upper",
    "trip_lower",
    "panels",
)

#: Geometric properties of a section, stored as columns of sections.parquet.
SECTION_PROPERTY_COLUMNS: tuple[str, ...] = (
    "thickness",
    "thickness_position",
    "camber",
    "camber_position",
    "leading_edge_radius",
    "trailing_edge_thickness",
    "trailing_edge_angle_deg",
    "area",
)

#: sections.parquet: one row per section.
SECTION_SCHEMA: dict[str, pl.DataType] = {
    "section_id": pl.String(),
    "family": pl.String(),
    "label": pl.String(),
    "parameters": pl.String(),
    **{name: pl.Float64() for name in SECTION_PROPERTY_COLUMNS},
    "x": pl.List(pl.Float64()),
    "y": pl.List(pl.Float64()),
}

#: design.parquet: one row per section x condition x design cl.
DESIGN_SCHEMA: dict[str, pl.DataType] = {
    "section_id": pl.String(),
    **{name: POINT_SCHEMA[name] for name in CONDITION_COLUMNS},
    "design_cl": pl.Float64(),
    "alpha_deg": pl.Float64(),
    "cd": pl.Float64(),
    "cm_c4": pl.Float64(),
    "transition_upper": pl.Float64(),
    "transition_lower": pl.Float64(),
    "wake_curvature": pl.Boolean(),
    "l_over_d": pl.Float64(),
    "cl_max": pl.Float64(),
    "alpha_cl_max_deg": pl.Float64(),
    "stall_reached": pl.Boolean(),
    "stall_margin": pl.Float64(),
    "cd_min": pl.Float64(),
    "drag_bucket_width": pl.Float64(),
    "roughness_sensitivity": pl.Float64(),
}

__all__ = [
    "ANALYSIS_COLUMNS",
    "CATALOG_FORMAT",
    "CATALOG_FORMAT_VERSION",
    "CONDITION_COLUMNS",
    "DESIGN_SCHEMA",
    "POINT_SCHEMA",
    "SECTION_PROPERTY_COLUMNS",
    "SECTION_SCHEMA",
]
