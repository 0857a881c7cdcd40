"""Catalog folders: reading them (:func:`open_catalog`), the sections and design tables, the
manifest. The schema is in :mod:`wakerank.catalog_schema` and docs/catalog.md.

A catalog folder holds ``points/part-*.parquet``, ``sections.parquet``, ``design.parquet`` and
``manifest.json``; each opens as it is in any Arrow/Parquet tool.
"""

from __future__ import annotations

import json
import os
from collections.abc import Iterable, Sequence
from dataclasses import dataclass
from pathlib import Path
from typing import Any

import numpy as np
import polars as pl
import pyarrow.parquet as pq

from wakerank import polar
from wakerank.atomic import commit_temporary, temporary_name, write_parquet_atomically
from wakerank.catalog_schema import (
    CONDITION_COLUMNS,
    DESIGN_SCHEMA,
    POINT_SCHEMA,
    SECTION_PROPERTY_COLUMNS,
    SECTION_SCHEMA,
)
from wakerank.errors import InputError

MANIFEST = "manifest.json"
SECTIONS = "sections.parquet"
DESIGN = "design.parquet"
POINTS = "points"


@dataclass(frozen=True)
class Catalog:
    """An opened catalog: lazy tables (nothing is read until collected) and the manifest."""

    path: Path
    points: pl.LazyFrame
    sections: pl.LazyFrame
    design: pl.LazyFrame
    manifest: dict[str, Any]


def open_catalog(directory: str | os.PathLike[str]) -> Catalog:
    """Open the catalog folder `directory` as polars LazyFrames (points, sections, design)."""
    path = Path(directory)
    if not path.is_dir():
        raise InputError(f"{path}: no such catalog folder")
    manifest_path = path / MANIFEST
    if not manifest_path.is_file():
        raise InputError(f"{path}: not a wakerank catalog (no {MANIFEST})")
    try:
        manifest = json.loads(manifest_path.read_text(encoding="utf-8"))
    except (OSError, ValueError) as exc:
        raise InputError(f"{manifest_path}: unreadable manifest: {exc}") from None
    return Catalog(
        path=path,
        points=scan_points(path),
        sections=_scan_or_empty(path / SECTIONS, SECTION_SCHEMA),
        design=_scan_or_empty(path / DESIGN, DESIGN_SCHEMA),
        manifest=manifest,
    )


def part_files(path: Path) -> list[Path]:
    """The part files of the catalog at `path`, sorted (temporary files are dot-hidden)."""
    return sorted((path / POINTS).glob("part-*.parquet"))


def scan_points(path: Path) -> pl.LazyFrame:
    """All complete parts of the catalog at `path` as one LazyFrame."""
    parts = part_files(path)
    if not parts:
        return pl.LazyFrame(schema=POINT_SCHEMA)
    return pl.scan_parquet([str(p) for p in parts])


def _scan_or_empty(path: Path, schema: dict[str, pl.DataType]) -> pl.LazyFrame:
    if path.is_file():
        return pl.scan_parquet(str(path))
    return pl.LazyFrame(schema=schema)


def write_table_atomically(frame: pl.DataFrame, path: Path) -> None:
    """Write a whole table (sections, design) so that `path` is absent or complete."""
    write_parquet_atomically(frame.to_arrow(), path, {"table": path.stem})


def section_rows(specs: Iterable[Any]) -> pl.DataFrame:
    """sections.parquet rows for section specs: id, family, label, parameters (JSON),
    geometric properties and coordinates."""
    rows: dict[str, list[Any]] = {name: [] for name in SECTION_SCHEMA}
    for spec in specs:
        section = spec.build()
        properties = section.properties()
        rows["section_id"].append(spec.section_id)
        rows["family"].append(spec.family)
        rows["label"].append(spec.label)
        rows["parameters"].append(spec.parameters_json)
        for name in SECTION_PROPERTY_COLUMNS:
            value = properties.get(name)
            rows[name].append(float(value) if value is not None else None)
        rows["x"].append(np.asarray(section.x, dtype=float).tolist())
        rows["y"].append(np.asarray(section.y, dtype=float).tolist())
    return pl.DataFrame(rows, schema=SECTION_SCHEMA)


def write_sections(specs: Sequence[Any], path: Path, batch: int = 2000) -> None:
    """Write sections.parquet for `specs` atomically, building the sections in batches so
    memory stays bounded."""
    temporary = temporary_name(path)
    writer = None
    try:
        for start in range(0, max(len(specs), 1), batch):
            table = section_rows(specs[start : start + batch]).to_arrow()
            if writer is None:
                writer = pq.ParquetWriter(temporary, table.schema)
            writer.write_table(table)
        assert writer is not None
        writer.close()
        writer = None
        commit_temporary(temporary, path)
    finally:
        if writer is not None:
            writer.close()
        if temporary.exists():
            temporary.unlink()


def design_table(
    points: pl.LazyFrame | Sequence[Path], design_cl: Sequence[float], batch: int = 64
) -> pl.DataFrame:
    """One row per section x condition x design cl (see docs/catalog.md for each column).

    `points` is a LazyFrame, or the list of part files: every polar lies inside one part (a
    case never spans chunks), so parts are processed `batch` at a time and memory stays
    bounded by the batch, not the catalog.

    Roughness sensitivity is cd with trips / cd free at the same section, Reynolds number,
    Mach, N-factor and design cl: on a tripped row its own ratio, on a free row the largest
    ratio over the trips that were run; null where only one of the two was run.
    """
    if not design_cl:
        return pl.DataFrame(schema=DESIGN_SCHEMA)
    if isinstance(points, pl.LazyFrame):
        pieces = [_design_rows(points, design_cl)]
    else:
        files = [str(p) for p in points]
        pieces = [
            _design_rows(pl.scan_parquet(files[i : i + batch]), design_cl)
            for i in range(0, len(files), batch)
        ]
    if not pieces:
        return pl.DataFrame(schema=DESIGN_SCHEMA)
    rows = pl.concat(pieces, how="vertical").lazy()
    table = with_roughness_sensitivity(rows).sort(["section_id", "condition_id", "design_cl"])
    return table.select(list(DESIGN_SCHEMA)).collect().cast(DESIGN_SCHEMA)  # type: ignore[arg-type]


def _design_rows(points: pl.LazyFrame, design_cl: Sequence[float]) -> pl.DataFrame:
    prepared = polar.prepare(points).collect().lazy()
    values = polar.at_design_cl(prepared, design_cl)
    features = polar.polar_features(prepared)
    conditions = points.select(CONDITION_COLUMNS).unique("condition_id")
    return (
        values.join(features, on=polar.POLAR_KEY, how="left")
        .join(conditions, on="condition_id", how="left")
        .with_columns(
            (pl.col("design_cl") / pl.col("cd")).alias("l_over_d"),
            (pl.col("cl_max") - pl.col("design_cl")).alias("stall_margin"),
        )
        .collect()
    )


#: Settings that must match for a tripped and a free run to be compared.
_PAIRING = [
    "section_id",
    "reynolds",
    "mach",
    "n_factor",
    "turbulence_intensity",
    "panels",
    "design_cl",
]


def with_roughness_sensitivity(table: pl.LazyFrame) -> pl.LazyFrame:
    """Add roughness_sensitivity = cd tripped / cd free (see :func:`design_table`)."""
    keyed = table.with_columns(
        [pl.col(c).fill_null(-1.0).alias(f"_k_{c}") for c in _PAIRING if c not in ("section_id",)]
    )
    keys = ["section_id", *[f"_k_{c}" for c in _PAIRING if c != "section_id"]]
    free = keyed.filter(pl.col("transition") == "free").select(
        *keys, pl.col("cd").alias("_cd_free")
    )
    keyed = keyed.join(free, on=keys, how="left")
    ratio = pl.when(pl.col("transition") != "free").then(pl.col("cd") / pl.col("_cd_free"))
    keyed = keyed.with_columns(ratio.alias("_ratio"))
    worst = keyed.group_by(keys).agg(pl.col("_ratio").max().alias("_worst"))
    keyed = keyed.join(worst, on=keys, how="left").with_columns(
        pl.when(pl.col("transition") == "free")
        .then(pl.col("_worst"))
        .otherwise(pl.col("_ratio"))
        .alias("roughness_sensitivity")
    )
    return keyed.drop([c for c in keyed.collect_schema().names() if c.startswith("_")])


__all__ = [
    "DESIGN",
    "MANIFEST",
    "POINTS",
    "SECTIONS",
    "Catalog",
    "design_table",
    "open_catalog",
    "part_files",
    "scan_points",
    "section_rows",
    "with_roughness_sensitivity",
    "write_sections",
    "write_table_atomically",
]
