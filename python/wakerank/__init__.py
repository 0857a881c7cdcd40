"""wakerank: screen airfoil sections for the least profile drag at the design lift.

Screening estimates only: confirm any choice by detailed CFD and test; designs that fly or
carry loads follow the applicable airworthiness codes and licensed engineering practice.
"""

from __future__ import annotations

from wakerank._core import core_version as _core_version
from wakerank.errors import (
    ConvergenceError,
    GeometryError,
    InputError,
    InternalError,
    WakerankError,
)

__version__: str = _core_version()

__all__ = [
    "__version__",
    "WakerankError",
    "GeometryError",
    "InputError",
    "ConvergenceError",
    "InternalError",
]
