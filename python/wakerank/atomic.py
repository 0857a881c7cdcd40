"""Atomic file writes: a reader (or a resumed run) sees a file complete or not at all.

Each write goes to a temporary file in the destination folder, is flushed to disk (fsync),
renamed over the destination (``os.replace``, atomic on POSIX and Windows) and the folder is
fsynced, so a kill or a power cut never leaves a half-written file under the final name.
"""

from __future__ import annotations

import json
import os
import threading
from pathlib import Path
from typing import Any

import pyarrow as pa
import pyarrow.parquet as pq

#: Prefix of the wakerank keys in Parquet key-value metadata.
META_PREFIX = b"wakerank."


def temporary_name(path: Path) -> Path:
    """A temporary sibling of `path`, unique per process and thread, hidden by its dot."""
    return path.with_name(f".{path.name}.{os.getpid()}.{threading.get_ident()}.tmp")


def write_parquet_atomically(table: pa.Table, path: Path, metadata: dict[str, str]) -> None:
    """Write `table` to `path` with `metadata` under ``wakerank.*`` keys, atomically."""
    path.parent.mkdir(parents=True, exist_ok=True)
    existing = table.schema.metadata or {}
    extra = {META_PREFIX + k.encode(): v.encode() for k, v in metadata.items()}
    table = table.replace_schema_metadata({**existing, **extra})
    temporary = temporary_name(path)
    try:
        pq.write_table(table, temporary)
        _fsync_file(temporary)
        os.replace(temporary, path)
    finally:
        if temporary.exists():
            temporary.unlink()
    fsync_directory(path.parent)


def write_json_atomically(content: dict[str, Any], path: Path) -> None:
    """Write `content` as indented JSON to `path`, atomically."""
    path.parent.mkdir(parents=True, exist_ok=True)
    temporary = temporary_name(path)
    try:
        with open(temporary, "w", encoding="utf-8") as handle:
            json.dump(content, handle, indent=2)
            handle.write("\n")
            handle.flush()
            os.fsync(handle.fileno())
        os.replace(temporary, path)
    finally:
        if temporary.exists():
            temporary.unlink()
    fsync_directory(path.parent)


def commit_temporary(temporary: Path, path: Path) -> None:
    """fsync an already written `temporary` file and rename it to `path`."""
    _fsync_file(temporary)
    os.replace(temporary, path)
    fsync_directory(path.parent)


def _fsync_file(path: Path) -> None:
    with open(path, "rb") as handle:
        os.fsync(handle.fileno())


def fsync_directory(directory: Path) -> None:
    """Flush a folder's entries to disk (no-op where folders cannot be opened)."""
    try:
        fd = os.open(directory, os.O_RDONLY)
    except OSError:  # pragma: no cover - platforms without directory handles
        return
    try:
        os.fsync(fd)
    except OSError:  # pragma: no cover
        pass
    finally:
        os.close(fd)


__all__ = [
    "META_PREFIX",
    "commit_temporary",
    "fsync_directory",
    "temporary_name",
    "write_json_atomically",
    "write_parquet_atomically",
]
