"""The linear-vortex panel method in plain vectorised NumPy: the speed yardstick and slow oracle.

The same equations as the compiled core (Katz & Plotkin, *Low-Speed Aerodynamics*, §11.4):
nodes from the upper trailing edge round counter-clockwise, a clockwise-positive vortex sheet
varying linearly between node strengths γ, zero normal velocity at the panel midpoints, the
Kutta condition γ₀ + γ_{N−1} = 0, two base solutions (α = 0°, 90°) superposed for every angle,
surface speed = sheet strength with the two trailing-edge nodes extrapolated from their neighbours.
Written independently of the Rust code, so a test comparing the two checks both.
"""

from __future__ import annotations

import numpy as np

_INV_2PI = 0.5 / np.pi


def _panel_geometry(x: np.ndarray, y: np.ndarray) -> tuple[np.ndarray, ...]:
    dx, dy = np.diff(x), np.diff(y)
    length = np.hypot(dx, dy)
    tx, ty = dx / length, dy / length
    mx, my = 0.5 * (x[:-1] + x[1:]), 0.5 * (y[:-1] + y[1:])
    return length, tx, ty, mx, my


def influence_matrix(x: np.ndarray, y: np.ndarray) -> np.ndarray:
    """The N×N system: normal velocity at the N−1 midpoints per unit node γ, then the Kutta row."""
    length, tx, ty, mx, my = _panel_geometry(x, y)
    n = x.size
    rel_x = mx[:, None] - x[None, :]
    rel_y = my[:, None] - y[None, :]
    angle = np.arctan2(rel_y, rel_x)
    log_r2 = np.log(np.maximum(rel_x**2 + rel_y**2, 1e-300))
    dtheta = angle[:, 1:] - angle[:, :-1]
    dtheta = np.where(dtheta > np.pi, dtheta - 2 * np.pi, dtheta)
    dtheta = np.where(dtheta < -np.pi, dtheta + 2 * np.pi, dtheta)
    np.fill_diagonal(dtheta, 0.0)  # principal value on the panel itself
    log_ratio = 0.5 * (log_r2[:, :-1] - log_r2[:, 1:])
    xl = rel_x[:, :-1] * tx + rel_y[:, :-1] * ty
    yl = -rel_x[:, :-1] * ty + rel_y[:, :-1] * tx
    p = (xl * dtheta - yl * log_ratio) / length
    q = (xl * log_ratio + yl * dtheta) / length - 1.0
    ua, ub = (dtheta - p) * _INV_2PI, p * _INV_2PI
    va, vb = -(log_ratio - q) * _INV_2PI, -q * _INV_2PI
    nx, ny = ty[:, None], -tx[:, None]
    # normal of (u t̂ + v ŷ), ŷ = (−t_y, t_x), for start (a) and end (b) node of each panel
    tn = tx * nx + ty * ny
    yn = -ty * nx + tx * ny
    matrix = np.zeros((n, n))
    matrix[:-1, :-1] += ua * tn + va * yn
    matrix[:-1, 1:] += ub * tn + vb * yn
    matrix[-1, 0] = matrix[-1, -1] = 1.0
    return matrix


def solve(x: np.ndarray, y: np.ndarray, alphas_deg: np.ndarray) -> dict[str, np.ndarray]:
    """γ, Cp and the integrated coefficients at each angle (incompressible, U∞ = 1)."""
    x = np.asarray(x, dtype=np.float64)
    y = np.asarray(y, dtype=np.float64)
    alphas = np.atleast_1d(np.asarray(alphas_deg, dtype=np.float64))
    length, tx, ty, mx, my = _panel_geometry(x, y)
    matrix = influence_matrix(x, y)
    rhs = np.zeros((x.size, 2))
    rhs[:-1, 0] = -ty  # −n_x
    rhs[:-1, 1] = tx  # −n_y
    base = np.linalg.solve(matrix, rhs)
    a = np.radians(alphas)
    sheet = np.cos(a)[:, None] * base[:, 0] + np.sin(a)[:, None] * base[:, 1]
    # Surface speed = sheet strength (interior at rest), except the two trailing-edge nodes,
    # which are ill-determined and extrapolated linearly in arc length from their neighbours.
    gamma = sheet.copy()
    gamma[:, 0] = sheet[:, 1] + (sheet[:, 1] - sheet[:, 2]) * length[0] / length[1]
    gamma[:, -1] = sheet[:, -2] + (sheet[:, -2] - sheet[:, -3]) * length[-1] / length[-2]
    cp = 1.0 - gamma**2
    cp_mean = 0.5 * (cp[:, :-1] + cp[:, 1:])
    fx = np.sum(-cp_mean * ty * length, axis=1)
    fy = np.sum(cp_mean * tx * length, axis=1)
    # The base of a blunt trailing edge carries the mean trailing-edge Cp (closed contour).
    cp_base = 0.5 * (cp[:, 0] + cp[:, -1])
    base_x, base_y = x[0] - x[-1], y[0] - y[-1]
    fx = fx - cp_base * base_y
    fy = fy + cp_base * base_x
    te = np.array([0.5 * (x[0] + x[-1]), 0.5 * (y[0] + y[-1])])
    dist = np.hypot(x - te[0], y - te[1])
    k = int(np.argmax(dist))
    chord = dist[k]
    ref = np.array([x[k], y[k]]) + 0.25 * (te - np.array([x[k], y[k]]))
    moment = np.sum((mx - ref[0]) * (cp_mean * tx * length) - (my - ref[1]) * (-cp_mean * ty * length), axis=1)
    moment += (te[0] - ref[0]) * (cp_base * base_x) - (te[1] - ref[1]) * (-cp_base * base_y)
    circulation = np.sum(0.5 * (gamma[:, :-1] + gamma[:, 1:]) * length, axis=1)
    return {
        "alpha_deg": alphas,
        "sheet": sheet,
        "gamma": gamma,
        "cp": cp,
        "cl": (fy * np.cos(a) - fx * np.sin(a)) / chord,
        "cd_pressure": (fx * np.cos(a) + fy * np.sin(a)) / chord,
        "cm_c4": -moment / chord**2,
        "cl_circulation": 2.0 * circulation / chord,
        "cp_min": cp.min(axis=1),
    }


__all__ = ["influence_matrix", "solve"]
