"""Kármán–Trefftz sections with their exact inviscid solution, for verifying the panel method.

The circle of centre μ = center_x + i·center_y through ζ = 1, mapped by the Kármán–Trefftz
transformation with trailing-edge angle τ (τ = 0: Joukowski). Exact lift cl = 8πR sin(α + β)/c
and exact surface Cp (Milne-Thomson, *Theoretical Aerodynamics*; Katz & Plotkin,
*Low-Speed Aerodynamics*, §6.6–6.7), computed by the compiled core.
"""

from __future__ import annotations

from dataclasses import dataclass, field

import numpy as np

from wakerank import _core


@dataclass(frozen=True)
class KarmanTrefftzSection:
    """A Kármán–Trefftz section normalised to unit chord, LE at the origin, chord along x.

    ``points`` points from the upper trailing edge round counter-clockwise (the first and
    last are the trailing edge), uniform in the circle angle.
    """

    center_x: float
    center_y: float
    trailing_edge_angle_deg: float = 0.0
    points: int = 201
    name: str = field(init=False)
    x: np.ndarray = field(init=False, repr=False)
    y: np.ndarray = field(init=False, repr=False)

    def __post_init__(self) -> None:
        name, x, y, _, _ = self._exact(0.0)
        object.__setattr__(self, "name", name)
        object.__setattr__(self, "x", x)
        object.__setattr__(self, "y", y)

    def _exact(self, alpha_deg: float) -> tuple[str, np.ndarray, np.ndarray, np.ndarray, float]:
        return _core.karman_trefftz_exact(
            float(self.center_x),
            float(self.center_y),
            float(self.trailing_edge_angle_deg),
            int(self.points),
            float(alpha_deg),
        )

    def exact_cl(self, alpha_deg: float) -> float:
        """Exact lift coefficient, α from the chord line."""
        return self._exact(alpha_deg)[4]

    def exact_cp(self, alpha_deg: float) -> np.ndarray:
        """Exact surface pressure coefficient at the section's points."""
        return self._exact(alpha_deg)[3]


__all__ = ["KarmanTrefftzSection"]
