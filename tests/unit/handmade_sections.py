"""Hand-made section coordinates for tests that must not depend on the geometry module."""

from __future__ import annotations

import numpy as np


def naca_symmetric(thickness: float = 0.12, per_side: int = 41, sharp: bool = True):
    """NACA four-digit symmetric thickness form (Abbott & von Doenhoff 1959, eq. 6.2).

    Cosine-spaced, trailing edge -> upper -> leading edge -> lower -> trailing edge. The last
    coefficient -0.1015 gives the standard blunt edge; -0.1036 closes it (common practice).
    """
    beta = np.linspace(0.0, np.pi, per_side)
    xc = 0.5 * (1.0 - np.cos(beta))
    last = -0.1036 if sharp else -0.1015
    yt = 5.0 * thickness * (
        0.2969 * np.sqrt(xc) - 0.1260 * xc - 0.3516 * xc**2 + 0.2843 * xc**3 + last * xc**4
    )
    x = np.r_[xc[::-1], xc[1:]]
    y = np.r_[yt[::-1], -yt[1:]]
    return x, y
