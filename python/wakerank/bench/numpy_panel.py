"""The linear-vortex panel method in plain vectorised NumPy: the speed yardstick and slow oracle.

The same equations as the compiled core (Katz & Plotkin, *Low-Speed Aerodynamics*, §11.4):
nodes from the upper trailing edge round counter-clockwise, a clockwise-positive vortex sheet
varying linearly between node strengths γ, zero normal velocity at the panel midpoints, the
Kutta condition γ₀ + γ_{N−1} = 0 and, for a sharp trailing edge, the interior-rest condition
near the edge with its interior source (docs/method.md); two base solutions (α = 0°, 90°)
superposed for every angle. Written independently of the Rust code, so a test comparing the
two checks both.
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


def vortex_velocity(
    x: np.ndarray, y: np.ndarray, px: np.ndarray, py: np.ndarray, on_panel: bool
) -> tuple[np.ndarray, np.ndarray]:
    """Velocity (u, v) at points (px, py) per unit node strength, shape (points, nodes).
    ``on_panel``: point i is the midpoint of panel i (principal value on that panel)."""
    length, tx, ty, _, _ = _panel_geometry(x, y)
    rel_x = px[:, None] - x[None, :]
    rel_y = py[:, None] - y[None, :]
    angle = np.arctan2(rel_y, rel_x)
    log_r2 = np.log(np.maximum(rel_x**2 + rel_y**2, 1e-300))
    dtheta = angle[:, 1:] - angle[:, :-1]
    dtheta = np.where(dtheta > np.pi, dtheta - 2 * np.pi, dtheta)
    dtheta = np.where(dtheta < -np.pi, dtheta + 2 * np.pi, dtheta)
    if on_panel:
        np.fill_diagonal(dtheta, 0.0)
    log_ratio = 0.5 * (log_r2[:, :-1] - log_r2[:, 1:])
    xl = rel_x[:, :-1] * tx + rel_y[:, :-1] * ty
    yl = -rel_x[:, :-1] * ty + rel_y[:, :-1] * tx
    p = (xl * dtheta - yl * log_ratio) / length
    q = (xl * log_ratio + yl * dtheta) / length - 1.0
    ua, ub = (dtheta - p) * _INV_2PI, p * _INV_2PI
    va, vb = -(log_ratio - q) * _INV_2PI, -q * _INV_2PI
    u = np.zeros((px.size, x.size))
    v = np.zeros((px.size, x.size))
    # global velocity = u_local t̂ + v_local ŷ with ŷ = (−t_y, t_x)
    u[:, :-1] += ua * tx - va * ty
    v[:, :-1] += ua * ty + va * tx
    u[:, 1:] += ub * tx - vb * ty
    v[:, 1:] += ub * ty + vb * tx
    return u, v


def interior_control(x: np.ndarray, y: np.ndarray) -> tuple[bool, np.ndarray, np.ndarray, np.ndarray]:
    """(active, probe, direction, source) of the trailing-edge interior-rest condition."""
    length, tx, ty, mx, my = _panel_geometry(x, y)
    probe = np.array([0.5 * (mx[0] + mx[-1]), 0.5 * (my[0] + my[-1])])
    b = np.array([tx[-1] - tx[0], ty[-1] - ty[0]])
    direction = b / np.hypot(*b) if np.hypot(*b) > 1e-12 else np.array([1.0, 0.0])
    te = np.array([0.5 * (x[0] + x[-1]), 0.5 * (y[0] + y[-1])])
    le_index = int(np.argmax(np.hypot(x - te[0], y - te[1])))
    le = np.array([x[le_index], y[le_index]])
    chord_vec = te - le
    fraction = ((x - le[0]) * chord_vec[0] + (y - le[1]) * chord_vec[1]) / max(chord_vec @ chord_vec, 1e-300)
    upper = int(np.argmin(np.abs(fraction[: max(le_index, 1)] - 0.35)))
    lower = le_index + int(np.argmin(np.abs(fraction[le_index:] - 0.35)))
    source = np.array([0.5 * (x[upper] + x[lower]), 0.5 * (y[upper] + y[lower])])
    active = bool(np.hypot(x[0] - x[-1], y[0] - y[-1]) < 1e-3 * min(length[0], length[-1]))
    return active, probe, direction, source


def influence_matrix(x: np.ndarray, y: np.ndarray) -> np.ndarray:
    """The (N+1)² system: midpoint tangency rows, the Kutta row, the interior row."""
    length, tx, ty, mx, my = _panel_geometry(x, y)
    n = x.size
    nx, ny = ty, -tx
    active, probe, direction, source = interior_control(x, y)
    matrix = np.zeros((n + 1, n + 1))
    u, v = vortex_velocity(x, y, mx, my, on_panel=True)
    matrix[: n - 1, :n] = u * nx[:, None] + v * ny[:, None]
    rx, ry = mx - source[0], my - source[1]
    r2 = rx**2 + ry**2
    matrix[: n - 1, n] = _INV_2PI * (rx * nx + ry * ny) / r2
    matrix[n - 1, 0] = matrix[n - 1, n - 1] = 1.0
    if active:
        u, v = vortex_velocity(x, y, probe[:1], probe[1:], on_panel=False)
        matrix[n, :n] = u[0] * direction[0] + v[0] * direction[1]
        d = probe - source
        matrix[n, n] = _INV_2PI * (d @ direction) / (d @ d)
    else:
        matrix[n, n] = 1.0
    return matrix


def solve(x: np.ndarray, y: np.ndarray, alphas_deg: np.ndarray) -> dict[str, np.ndarray]:
    """γ, Cp and the integrated coefficients at each angle (incompressible, U∞ = 1)."""
    x = np.asarray(x, dtype=np.float64)
    y = np.asarray(y, dtype=np.float64)
    alphas = np.atleast_1d(np.asarray(alphas_deg, dtype=np.float64))
    length, tx, ty, mx, my = _panel_geometry(x, y)
    n = x.size
    active, _, direction, _ = interior_control(x, y)
    matrix = influence_matrix(x, y)
    rhs = np.zeros((n + 1, 2))
    rhs[: n - 1, 0] = -ty  # −n_x
    rhs[: n - 1, 1] = tx  # −n_y
    if active:
        rhs[n] = -direction
    base = np.linalg.solve(matrix, rhs)[:n]
    a = np.radians(alphas)
    gamma = np.cos(a)[:, None] * base[:, 0] + np.sin(a)[:, None] * base[:, 1]
    if not active:  # blunt trailing edge: corner speeds extrapolated from their neighbours
        gamma[:, 0] = gamma[:, 1] + (gamma[:, 1] - gamma[:, 2]) * length[0] / length[1]
        gamma[:, -1] = gamma[:, -2] + (gamma[:, -2] - gamma[:, -3]) * length[-1] / length[-2]
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
        "gamma": gamma,
        "cp": cp,
        "cl": (fy * np.cos(a) - fx * np.sin(a)) / chord,
        "cd_pressure": (fx * np.cos(a) + fy * np.sin(a)) / chord,
        "cm_c4": -moment / chord**2,
        "cl_circulation": 2.0 * circulation / chord,
        "cp_min": cp.min(axis=1),
    }


__all__ = ["influence_matrix", "interior_control", "solve", "vortex_velocity"]
