"""The shipped Falkner–Skan closure table against fresh, independent scipy solutions.

The table is made by scripts/falkner_skan_closures.py with scipy's collocation solver
(solve_bvp); here each profile is re-solved by shooting (solve_ivp + brentq on f''(0)), a
different numerical method, and compared row by row.
"""

from __future__ import annotations

import csv
from pathlib import Path

import numpy as np
import pytest
from scipy.integrate import solve_ivp
from scipy.optimize import brentq

TABLE = (Path(__file__).resolve().parents[2]
         / "rust/solver/src/boundary_layer/data/falkner_skan_closure.csv")


def _rows() -> list[dict[str, str]]:
    lines = [ln for ln in TABLE.read_text().splitlines() if ln and not ln.startswith("#")]
    return list(csv.DictReader(lines))


def _rhs(_eta, y, beta):
    f, fp, fpp = y[0], y[1], y[2]
    return [fp, fpp, -f * fpp - beta * (1.0 - fp * fp),
            fp * (1.0 - fp), fp * (1.0 - fp * fp), fpp * fpp]


def _blow_up(_eta, y, _beta):
    return abs(y[1] - 0.5) - 3.0


_blow_up.terminal = True


def _shoot(wall_shear: float, beta: float, length: float) -> np.ndarray:
    sol = solve_ivp(_rhs, (0.0, length), [0, 0, wall_shear, 0, 0, 0], args=(beta,),
                    method="DOP853", rtol=1e-11, atol=1e-12, events=_blow_up)
    return sol.y[:, -1]


def closure_by_shooting(beta: float, bracket: tuple[float, float], length: float) -> dict:
    """H, H*, Cf·Reθ, CD·Reθ of the Falkner–Skan profile at β whose f''(0) lies in bracket."""
    s = brentq(lambda s: _shoot(s, beta, length)[1] - 1.0, *bracket, xtol=1e-14, rtol=1e-14)
    f, _fp, _fpp, t, e, q = _shoot(s, beta, length)
    d = length - f
    return {"shape_factor": d / t, "energy_shape_factor": e / t,
            "skin_friction_re_theta": 2 * s * t, "dissipation_re_theta": q * t,
            "re_theta_growth": t * t, "wall_shear_f2": s}


def _row_near(beta: float, branch: str) -> dict[str, float]:
    rows = [r for r in _rows() if r["branch"] == branch]
    row = min(rows, key=lambda r: abs(float(r["beta"]) - beta))
    return {k: float(v) for k, v in row.items() if k != "branch"}


@pytest.mark.parametrize(
    ("beta", "branch", "length"),
    [(0.0, "attached", 12.0),        # Blasius
     (1.0, "attached", 10.0),        # plane stagnation flow (Hiemenz)
     (-0.1, "attached", 14.0),       # retarded flow, nearest table row (β ≈ −0.106)
     (-0.172, "reversed", 24.0)],    # Stewartson's lower branch, nearest row (H = 6)
)
def test_table_row_matches_fresh_scipy_solution(beta, branch, length):
    # Reference: scipy.integrate.solve_ivp + scipy.optimize.brentq (shooting), independent of
    # the collocation solution the table was written from.
    row = _row_near(beta, branch)
    s = row["wall_shear_f2"]
    fresh = closure_by_shooting(row["beta"], (s - 0.01, s + 0.01), length)
    for name, value in fresh.items():
        assert value == pytest.approx(row[name], rel=1e-5, abs=1e-7), name


def test_blasius_values():
    # Schlichting & Gersten, Boundary-Layer Theory, §7.2; White, Viscous Fluid Flow, §4-3:
    # Blasius H = 2.591, Cf·Reθ = 2 × 0.2205 = 0.441, H* = 1.572, f''(0) = 0.4696.
    row = _row_near(0.0, "attached")
    assert row["beta"] == 0.0
    assert row["shape_factor"] == pytest.approx(2.591, abs=5e-4)
    assert row["skin_friction_re_theta"] == pytest.approx(0.441, abs=5e-4)
    assert row["energy_shape_factor"] == pytest.approx(1.572, abs=1e-3)
    assert row["wall_shear_f2"] == pytest.approx(0.4696, abs=1e-4)
    assert row["theta_similarity_k"] == pytest.approx(0.6641, abs=1e-4)


def test_published_falkner_skan_values():
    # Falkner–Skan solutions (Schlichting & Gersten, Table 7.1; values from memory, as listed in
    # the project's reference-data notes): m = 1: H 2.2162, k 0.2923; separation β = −0.19884,
    # m = −0.0904, H 4.0292, k 0.8681.
    stagnation = _row_near(1.0, "attached")
    assert stagnation["shape_factor"] == pytest.approx(2.2162, abs=2e-4)
    assert stagnation["theta_similarity_k"] == pytest.approx(0.2923, abs=2e-4)
    separation = _row_near(-0.2, "separation")
    assert separation["beta"] == pytest.approx(-0.19884, abs=2e-5)
    assert separation["m"] == pytest.approx(-0.0904, abs=1e-4)
    assert separation["shape_factor"] == pytest.approx(4.0292, abs=5e-4)
    assert separation["theta_similarity_k"] == pytest.approx(0.8681, abs=5e-4)
    assert separation["skin_friction_re_theta"] == pytest.approx(0.0, abs=1e-8)


def test_shape_factor_is_monotone_along_the_combined_branch():
    # Structure of the Falkner–Skan family (Stewartson 1954): H increases from accelerated
    # flow through separation along the reversed-flow branch, so H indexes the table.
    h = [float(r["shape_factor"]) for r in _rows()]
    assert np.all(np.diff(h) > 0.0)
    assert max(h) >= 10.0
