"""wakerank: screen airfoil sections for the least profile drag at the design lift.

Screening estimates only: confirm any choice by detailed CFD and test; designs that fly or
carry loads follow the applicable airworthiness codes and licensed engineering practice.
"""

from __future__ import annotations

from wakerank._core import core_version as _core_version
from wakerank.analysis import analyze, surface
from wakerank.errors import (
    CampaignError,
    ConvergenceError,
    GeometryError,
    InputError,
    InternalError,
    WakerankError,
)
from wakerank.sections import Section
from wakerank.viscous import boundary_layer, solve_for_cl

__version__: str = _core_version()

# Campaigns, catalogs and ranking (imported after __version__, which the runner records).
from wakerank.campaign import load_campaign  # noqa: E402
from wakerank.catalog import Catalog, open_catalog  # noqa: E402
from wakerank.ranking import rank  # noqa: E402
from wakerank.session import run_campaign  # noqa: E402

__all__ = [
    "__version__",
    "Section",
    "analyze",
    "surface",
    "solve_for_cl",
    "boundary_layer",
    "WakerankError",
    "GeometryError",
    "InputError",
    "ConvergenceError",
    "InternalError",
    "CampaignError",
    "load_campaign",
    "run_campaign",
    "Catalog",
    "open_catalog",
    "rank",
]
