"""First-cell height for a target y+ from a flat-plate skin-friction correlation.

A RANS mesh that resolves the viscous sublayer needs its first cell at y+ ~ 1. Before any CFD
run, the wall shear is estimated from a turbulent flat plate of the chord's length at the
chord Reynolds number (common practice for sizing the first cell):

    Cf      = [2 log10(Re_x) - 0.65]^-2.3     Schlichting's local skin-friction formula
                                              (Schlichting, Boundary-Layer Theory, 7th ed.,
                                              ch. XXI; stated for Re_x < 1e9)
    u_tau   = U sqrt(Cf / 2)
    y       = y+ nu / u_tau

With lengths in chords and speeds in free-stream units (U = 1, nu = 1/Re) this is
``y/c = y+ / (Re sqrt(Cf/2))``. The same flat plate gives a boundary-layer thickness
``delta/x = 0.37 Re_x^-1/5`` (Prandtl's one-seventh power law, Schlichting ch. XXI), used to
size the layer of stretched cells.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

from wakerank.errors import InputError

#: Name recorded in case files for the correlation below.
SKIN_FRICTION_CORRELATION = "Schlichting local flat-plate: Cf = [2 log10(Re_x) - 0.65]^-2.3"
#: Name recorded in case files for the boundary-layer thickness estimate.
THICKNESS_CORRELATION = "one-seventh power law: delta/x = 0.37 Re_x^-0.2"


@dataclass(frozen=True)
class WallSpacing:
    """First-cell estimate at one Reynolds number; lengths in chords."""

    reynolds: float
    y_plus: float
    skin_friction: float
    friction_velocity: float
    first_cell_height: float
    boundary_layer_thickness: float


def flat_plate_skin_friction(reynolds_x: float) -> float:
    """Local turbulent skin-friction coefficient, Schlichting's formula (see module doc)."""
    if not (reynolds_x > 1e3) or not math.isfinite(reynolds_x):
        raise InputError(f"Reynolds number {reynolds_x!r} must be a finite number above 1e3")
    return (2.0 * math.log10(reynolds_x) - 0.65) ** -2.3


def wall_spacing(reynolds: float, y_plus: float = 1.0) -> WallSpacing:
    """First-cell height (in chords) for ``y_plus`` at chord Reynolds number ``reynolds``."""
    if not (y_plus > 0.0) or not math.isfinite(y_plus):
        raise InputError(f"target y+ {y_plus!r} must be a positive number")
    cf = flat_plate_skin_friction(reynolds)
    u_tau = math.sqrt(cf / 2.0)
    height = y_plus / (reynolds * u_tau)
    thickness = 0.37 * reynolds**-0.2
    return WallSpacing(
        reynolds=float(reynolds),
        y_plus=float(y_plus),
        skin_friction=cf,
        friction_velocity=u_tau,
        first_cell_height=height,
        boundary_layer_thickness=thickness,
    )
