"""Laminar closure table from the project's own Falkner–Skan similarity solutions.

Solves the Falkner–Skan equation (Schlichting & Gersten, *Boundary-Layer Theory*, ch. 7)

    f''' + f f'' + β (1 − f'²) = 0,   f(0) = f'(0) = 0,   f'(∞) = 1,

with η = y √((m+1)/2 · ue/(ν x)), u/ue = f'(η), β = 2m/(m+1), as a boundary-value problem
(scipy.integrate.solve_bvp) with continuation:

* attached branch, strongly accelerated flow β = 10 down to Blasius (β = 0), continuation in β;
* from Blasius through separation (f''(0) = 0, β ≈ −0.1988) onto the reversed-flow lower branch
  (Stewartson 1954, f''(0) < 0) towards β → 0⁻, continuation in the shape factor H, which is
  monotone along the combined branch while β turns round at separation.

Three running integrals are carried as extra unknowns so that every thickness comes out of the
same collocation solution: T = ∫ f'(1 − f') dη, E = ∫ f'(1 − f'²) dη, Q = ∫ f''² dη, and the
displacement D = lim (η − f). With g = √((m+1)/2 · ue/(ν x)) one has θ = T/g, δ* = D/g,
δ_E = E/g, τw = μ ue g f''(0), D_diss = μ ue² g Q, hence

    H = D/T,  H* = E/T,  Cf·Reθ = 2 f''(0) T,  CD·Reθ = Q T   (Cf = τw/(½ρue²), CD = D/(ρue³)),
    θ √(ue/(ν x)) = T √(2/|m+1|),  θ dReθ/dx = T²  (any Falkner–Skan flow).

Writes rust/solver/src/boundary_layer/data/falkner_skan_closure.csv. Fixed grids and
tolerances: rerunning gives the same file.  Run:  python scripts/falkner_skan_closures.py
"""

from __future__ import annotations

import argparse
from dataclasses import dataclass
from pathlib import Path

import numpy as np
from scipy.integrate import solve_bvp

ROOT = Path(__file__).resolve().parents[1]
OUTPUT = ROOT / "rust/solver/src/boundary_layer/data/falkner_skan_closure.csv"

BVP_TOLERANCE = 1e-9
MESH_POINTS = 400
MAX_NODES = 200_000

#: β values of the accelerated part of the attached branch (β = 2 itself, m = ∞, is skipped).
ACCELERATED_BETAS = [10.0, 8.0, 6.0, 5.0, 4.0, 3.0, 2.4, 1.8, 1.5, 1.2, 1.0, 0.8, 0.6, 0.5,
                     0.4, 0.3, 0.2, 0.15, 0.1, 0.06, 0.03, 0.0]


def _shape_factor_grid(h_max: float) -> list[float]:
    """H stations from just above Blasius to the reversed-flow end of the table."""
    grid = list(np.round(np.arange(2.62, 2.999, 0.04), 6))
    grid += list(np.round(np.arange(3.0, 4.999, 0.1), 6))
    grid += list(np.round(np.arange(5.0, 7.999, 0.25), 6))
    grid += list(np.round(np.arange(8.0, h_max + 1e-9, 0.5), 6))
    return [float(h) for h in grid]


@dataclass(frozen=True)
class Profile:
    """One Falkner–Skan solution: parameters, integral thicknesses in η and the profile itself."""

    beta: float
    wall_shear: float  # f''(0)
    displacement: float  # D = ∫(1 − f') dη
    momentum: float  # T
    energy: float  # E
    dissipation_integral: float  # Q
    eta: np.ndarray
    state: np.ndarray  # rows f, f', f'', T(η), E(η), Q(η)

    @property
    def m(self) -> float:
        return self.beta / (2.0 - self.beta)

    @property
    def shape_factor(self) -> float:
        return self.displacement / self.momentum

    @property
    def energy_shape_factor(self) -> float:
        return self.energy / self.momentum

    @property
    def skin_friction_re_theta(self) -> float:
        return 2.0 * self.wall_shear * self.momentum

    @property
    def dissipation_re_theta(self) -> float:
        return self.dissipation_integral * self.momentum

    @property
    def theta_similarity_k(self) -> float:
        """θ √(ue/(ν|x|)); for β > 2 (m < −1, sink-type flow) |x| and |m+1| are used."""
        return self.momentum * np.sqrt(2.0 / abs(self.m + 1.0))

    @property
    def re_theta_growth(self) -> float:
        """θ dReθ/dx = T², the same for every Falkner–Skan flow."""
        return self.momentum**2


def _rhs(eta, y, p):
    beta = p[0]
    f, fp, fpp = y[0], y[1], y[2]
    return np.vstack([fp, fpp, -f * fpp - beta * (1.0 - fp * fp),
                      fp * (1.0 - fp), fp * (1.0 - fp * fp), fpp * fpp])



def _solve(condition, guess_eta, guess_state, beta_guess, length):
    """solve_bvp on [0, length] with the unknown β and one extra condition(ya, yb, beta)."""

    def bc(ya, yb, p):
        return np.array([ya[0], ya[1], ya[3], ya[4], ya[5], yb[1] - 1.0,
                         condition(ya, yb, p[0], length)])

    eta = np.linspace(0.0, length, MESH_POINTS)
    state = np.vstack([np.interp(eta, guess_eta, row) for row in guess_state])
    beyond = eta > guess_eta[-1]
    if beyond.any():  # extend the guess with the free stream: f' = 1, f = η − D
        d = guess_eta[-1] - guess_state[0, -1]
        state[0, beyond] = eta[beyond] - d
        state[1, beyond] = 1.0
        state[2, beyond] = 0.0
        state[3:, beyond] = guess_state[3:, -1:]
    sol = solve_bvp(_rhs, bc, eta, state, p=[beta_guess], tol=BVP_TOLERANCE,
                    max_nodes=MAX_NODES)
    if not sol.success:
        raise RuntimeError(f"solve_bvp failed ({sol.message}) near beta={beta_guess:.5f}")
    return sol


def _profile(sol, length) -> Profile:
    yb = sol.y[:, -1]
    return Profile(beta=float(sol.p[0]), wall_shear=float(sol.y[2, 0]),
                   displacement=float(length - yb[0]), momentum=float(yb[3]),
                   energy=float(yb[4]), dissipation_integral=float(yb[5]),
                   eta=sol.x.copy(), state=sol.y.copy())


def _domain_length(displacement: float) -> float:
    """Outer edge in η: the free shear layer sits near η ≈ D on the reversed-flow branch."""
    return float(np.ceil(max(12.0, 1.15 * displacement + 12.0)))


def _blasius_guess():
    eta = np.linspace(0.0, 12.0, 200)
    fp = 1.0 - np.exp(-eta)
    f = eta - 1.0 + np.exp(-eta)
    fpp = np.exp(-eta)
    zeros = np.zeros_like(eta)
    return eta, np.vstack([f, fp, fpp, zeros, zeros, zeros])


def solve_at_beta(beta: float, guess: Profile | None = None, length: float = 12.0) -> Profile:
    """Attached-branch profile at a given β (continuation guess optional)."""

    def fixed_beta(ya, yb, b, _length):
        return b - beta

    eta, state = (guess.eta, guess.state) if guess else _blasius_guess()
    start = guess.beta if guess else 0.0
    return _profile(_solve(fixed_beta, eta, state, start, length), length)


def solve_at_shape_factor(h: float, guess: Profile) -> Profile:
    """Profile with prescribed H = D/T, from a neighbouring solution as the guess."""
    length = _domain_length(h * guess.momentum)

    def fixed_h(ya, yb, _b, lng):
        return (lng - yb[0]) - h * yb[3]

    return _profile(_solve(fixed_h, guess.eta, guess.state, guess.beta, length), length)


def solve_separation(guess: Profile) -> Profile:
    """The separation profile, f''(0) = 0."""
    length = _domain_length(guess.displacement)

    def zero_shear(ya, yb, _b, _lng):
        return ya[2]

    return _profile(_solve(zero_shear, guess.eta, guess.state, guess.beta, length), length)


def continue_in_h(start: Profile, targets: list[float], substeps: int = 4) -> list[Profile]:
    """March along the combined branch in H, with substeps between table stations."""
    out, current = [], start
    for h in targets:
        h0 = current.shape_factor
        for hh in np.linspace(h0, h, substeps + 1)[1:]:
            current = solve_at_shape_factor(float(hh), current)
        out.append(current)
    return out


def compute_table(h_max: float) -> list[tuple[Profile, str]]:
    """All rows of the shipped table, sorted by increasing H."""
    blasius = solve_at_beta(0.0)
    rows: list[tuple[Profile, str]] = []
    current = blasius
    for beta in sorted(ACCELERATED_BETAS):
        # continuation upward in β with intermediate steps, then record
        steps = np.linspace(current.beta, beta, 6)[1:] if beta > current.beta else [beta]
        for b in steps:
            current = solve_at_beta(float(b), current, length=12.0)
        rows.append((current, "attached"))
    grid = _shape_factor_grid(h_max)
    marched = continue_in_h(blasius, grid)
    separation = None
    for prof in marched:
        if prof.wall_shear < 0.0 and separation is None:
            prev = rows[-1][0]
            separation = solve_separation(prev)
            rows.append((separation, "separation"))
        rows.append((prof, "attached" if prof.wall_shear > 0.0 else "reversed"))
    rows.sort(key=lambda r: r[0].shape_factor)
    return rows


HEADER = """\
# Laminar closure from Falkner–Skan similarity solutions, f''' + f f'' + beta (1 - f'^2) = 0.
# Written by scripts/falkner_skan_closures.py (scipy.integrate.solve_bvp, tol {tol:g},
# continuation in beta on the accelerated attached branch and in the shape factor through
# separation onto the reversed-flow lower branch, Stewartson 1954). Do not edit by hand.
# shape_factor H = delta*/theta; energy_shape_factor H* = delta_E/theta;
# skin_friction_re_theta = Cf Re_theta with Cf = tau_w/(rho ue^2/2);
# dissipation_re_theta = CD Re_theta with CD = (1/(rho ue^3)) int mu (du/dy)^2 dy;
# m = beta/(2 - beta) (ue ~ x^m); theta_similarity_k = theta sqrt(ue/(nu |x|));
# re_theta_growth = theta dRe_theta/dx in the similar flow; branch attached/separation/reversed.
"""
COLUMNS = ["beta", "m", "shape_factor", "energy_shape_factor", "skin_friction_re_theta",
           "dissipation_re_theta", "theta_similarity_k", "re_theta_growth", "wall_shear_f2",
           "branch"]


def write_table(rows, path: Path) -> None:
    path.parent.mkdir(parents=True, exist_ok=True)
    lines = [HEADER.format(tol=BVP_TOLERANCE).rstrip("\n"), ",".join(COLUMNS)]
    for p, branch in rows:
        values = [p.beta, p.m, p.shape_factor, p.energy_shape_factor, p.skin_friction_re_theta,
                  p.dissipation_re_theta, p.theta_similarity_k, p.re_theta_growth, p.wall_shear]
        lines.append(",".join(f"{v:.8f}" for v in values) + f",{branch}")
    path.write_text("\n".join(lines) + "\n")


def main() -> None:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--h-max", type=float, default=16.0, help="largest shape factor")
    parser.add_argument("--output", type=Path, default=OUTPUT)
    args = parser.parse_args()
    rows = compute_table(args.h_max)
    write_table(rows, args.output)
    for p, branch in rows:
        print(f"{branch:10s} beta={p.beta:9.5f} H={p.shape_factor:7.4f} "
              f"H*={p.energy_shape_factor:6.4f} CfRe={p.skin_friction_re_theta:8.5f} "
              f"CDRe={p.dissipation_re_theta:7.5f} f''(0)={p.wall_shear:8.5f}")


if __name__ == "__main__":
    main()
