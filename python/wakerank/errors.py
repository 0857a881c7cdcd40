"""Exceptions raised by wakerank. The compiled core maps its error categories onto these."""

from __future__ import annotations


class WakerankError(Exception):
    """Base class of every error wakerank raises on purpose."""


class GeometryError(WakerankError, ValueError):
    """The section geometry is unusable: the message says what is wrong and where."""


class InputError(WakerankError, ValueError):
    """An argument is outside its allowed range: the message names it and the range."""


class ConvergenceError(WakerankError, RuntimeError):
    """An iteration failed with no usable result."""


class InternalError(WakerankError, RuntimeError):
    """An invariant of the core was violated (a bug: please report it)."""


class CampaignError(WakerankError, ValueError):
    """A campaign file is malformed: the message names the file, the key path and what was
    expected (for example ``campaign.toml: sections[2].thickness.count: expected an integer
    >= 1, got 'four'``)."""


__all__ = [
    "WakerankError",
    "GeometryError",
    "InputError",
    "ConvergenceError",
    "InternalError",
    "CampaignError",
]
