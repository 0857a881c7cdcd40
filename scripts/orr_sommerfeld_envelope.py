"""Envelope of e^N amplification for the Falkner–Skan family, from our own Orr–Sommerfeld solutions.

For each Falkner–Skan profile (scripts/falkner_skan_closures.py) this script

1. solves the temporal Orr–Sommerfeld problem for parallel flow, lengths in momentum thickness θ,
   R = Reθ (Orszag 1971; Schmid & Henningson, *Stability and Transition in Shear Flows*, §3),

       [α U (D² − α²) − α U''] φ − (D² − α²)² φ / (iR) = ω (D² − α²) φ,   φ = φ' = 0 at y = 0, ∞,

   by Chebyshev collocation on the mapped domain y = a(1+ξ)/(b−ξ), with φ = (1 − ξ²) ψ so that
   the clamped conditions hold exactly and no spurious modes appear (Trefethen, *Spectral Methods
   in MATLAB*, ch. 14); scipy.linalg.eigvals of the generalised problem; the least stable mode;
2. turns temporal into spatial waves: for each real frequency the complex wavenumber α is solved
   for directly (a first step with the complex group velocity, Gaster 1962, then secant
   iterations on ω(α) = ω_r), giving the spatial rate −α_i;
3. finds the critical Reynolds number Reθ,0(H), the lowest R with a growing wave;
4. integrates N = ∫ −α_i dx along waves of fixed physical frequency of the similar flow
   (ue ∝ x^m: ωθ/ue = F·Reθ^p, p = (1 − 3m)/(1 + m); dReθ/dx = T²/θ with T² = θ dReθ/dx from
   the Falkner–Skan table, so dN/dReθ = (−α_i θ)/T²) and takes the envelope over F;
5. tabulates the envelope slope dN/dReθ at fixed ratios ρ = Reθ/Reθ,0.

Writes rust/solver/src/boundary_layer/data/amplification_envelope.csv (long format: one row per
(H, ρ)). Fixed grids: rerunning gives the same file. Run:  python scripts/orr_sommerfeld_envelope.py
"""

from __future__ import annotations

import argparse
import sys
from dataclasses import dataclass
from pathlib import Path

import numpy as np
import scipy.linalg as sl
from scipy.integrate import cumulative_trapezoid
from scipy.interpolate import CubicHermiteSpline

sys.path.insert(0, str(Path(__file__).resolve().parent))
import falkner_skan_closures as fs

ROOT = Path(__file__).resolve().parents[1]
OUTPUT = ROOT / "rust/solver/src/boundary_layer/data/amplification_envelope.csv"

COLLOCATION_POINTS = 48
#: Shape factors of the profiles analysed (β = 1 stagnation flow up to the reversed-flow branch).
SHAPE_FACTORS = [2.2162, 2.27, 2.33, 2.40, 2.47, 2.53, 2.5911, 2.66, 2.74, 2.83, 2.94, 3.06,
                 3.2, 3.4, 3.65, 4.0292, 4.5, 5.2, 6.0, 7.0, 8.0]
#: Ratios Reθ/Reθ,0 at which the envelope slope is tabulated.
TABLE_RATIOS = [1.0, 1.05, 1.1, 1.2, 1.35, 1.5, 1.75, 2.0, 2.5, 3.0, 4.0, 5.0, 6.5, 8.0,
                10.0, 13.0, 16.0, 20.0]
#: Reθ grid points per factor e of ρ used for the N-factor integration.
INTEGRATION_POINTS_PER_E = 12
FREQUENCY_FAMILIES = 90
HIGHEST_RE_THETA = 6.0e4


def _cheb(n: int):
    """Chebyshev differentiation matrix and Gauss–Lobatto points (Trefethen 2000, cheb.m)."""
    x = np.cos(np.pi * np.arange(n + 1) / n)
    c = np.hstack([2.0, np.ones(n - 1), 2.0]) * (-1.0) ** np.arange(n + 1)
    dx = x[:, None] - x[None, :]
    d = np.outer(c, 1.0 / c) / (dx + np.eye(n + 1))
    return d - np.diag(d.sum(axis=1)), x


class OrrSommerfeld:
    """Temporal Orr–Sommerfeld operator of one Falkner–Skan profile (lengths in θ)."""

    def __init__(self, profile: fs.Profile, points: int = COLLOCATION_POINTS):
        self.profile = profile
        d, x = _cheb(points)
        d2, inner = d @ d, slice(1, points)
        d3, d4 = d2 @ d, d2 @ d2
        xi, w = x[inner], 1.0 - x[inner] ** 2
        dg = np.diag
        # derivatives in ξ of φ = (1 − ξ²) ψ, acting on ψ at the inner points
        self._p = [dg(w),
                   dg(w) @ d[inner, inner] - 2 * dg(xi),
                   dg(w) @ d2[inner, inner] - 4 * dg(xi) @ d[inner, inner] - 2 * np.eye(points - 1),
                   dg(w) @ d3[inner, inner] - 6 * dg(xi) @ d2[inner, inner] - 6 * d[inner, inner],
                   dg(w) @ d4[inner, inner] - 8 * dg(xi) @ d3[inner, inner] - 12 * d2[inner, inner]]
        self._xi = xi
        self._velocity = _profile_functions(profile)
        self._cache: dict[float, tuple] = {}

    def _operators(self, y_max: float):
        if y_max in self._cache:
            return self._cache[y_max]
        y_half = 2.5 * max(self.profile.shape_factor, 2.6)  # half of the points below y_half
        a = y_half * y_max / (y_max - 2.0 * y_half)
        b = 1.0 + 2.0 * a / y_max
        xi = self._xi
        y = a * (1.0 + xi) / (b - xi)
        k = a * (b + 1.0)
        x1, x2 = k / (y + a) ** 2, -2 * k / (y + a) ** 3
        x3, x4 = 6 * k / (y + a) ** 4, -24 * k / (y + a) ** 5
        p0, p1, p2, p3, p4 = self._p
        dg = np.diag
        y2 = dg(x1**2) @ p2 + dg(x2) @ p1
        y4 = (dg(x1**4) @ p4 + dg(6 * x1**2 * x2) @ p3 + dg(3 * x2**2 + 4 * x1 * x3) @ p2
              + dg(x4) @ p1)
        t = self.profile.momentum
        u, upp = self._velocity(y * t)
        ops = (p0, y2, y4, u, upp * t * t)
        self._cache[y_max] = ops
        return ops

    def eigenvalues(self, alpha: complex, re_theta: float) -> np.ndarray:
        """All finite temporal eigenvalues ω at (possibly complex) wavenumber α."""
        y_max = float(np.clip(np.round(10.0 / abs(alpha.real), 0), 50.0, 600.0))
        p0, y2, y4, u, upp = self._operators(y_max)
        lap = y2 - alpha**2 * p0
        a = (alpha * (u[:, None] * lap - upp[:, None] * p0)
             - (y4 - 2 * alpha**2 * y2 + alpha**4 * p0) / (1j * re_theta))
        w = sl.eigvals(a, lap, check_finite=False)
        return w[np.isfinite(w)]

    def least_stable(self, alpha: float, re_theta: float) -> complex:
        """Temporal eigenvalue ω = αc of the least stable wave with 0 < c_r < 0.95 (the upper bound
        keeps out the continuous spectrum, c_r ≈ 1, of the free stream)."""
        w = self.eigenvalues(complex(alpha), re_theta)
        c = w.real / alpha
        w = w[(c > 0.0) & (c < 0.95)]
        return complex(w[np.argmax(w.imag)]) if w.size else complex(0.0, -1.0)

    def nearest(self, alpha: complex, re_theta: float, guess: complex) -> complex:
        """The eigenvalue ω nearest to `guess` (follows one mode as α moves into the complex plane)."""
        w = self.eigenvalues(alpha, re_theta)
        return complex(w[np.argmin(np.abs(w - guess))])


def _profile_functions(profile: fs.Profile):
    """U(η) and d²U/dη² from the collocation solution (cubic Hermite in f, f', f'')."""
    f, fp, fpp = profile.state[0], profile.state[1], profile.state[2]
    beta = profile.beta
    f3 = -f * fpp - beta * (1.0 - fp * fp)
    sf = CubicHermiteSpline(profile.eta, f, fp)
    sfp = CubicHermiteSpline(profile.eta, fp, fpp)
    sfpp = CubicHermiteSpline(profile.eta, fpp, f3)
    edge = profile.eta[-1]

    def velocity(eta):
        e = np.minimum(eta, edge)
        ff, ffp, ffpp = sf(e), sfp(e), sfpp(e)
        inside = eta <= edge
        return (np.where(inside, ffp, 1.0),
                np.where(inside, -ff * ffpp - beta * (1.0 - ffp * ffp), 0.0))

    return velocity


def _golden_max(fun, lo: float, hi: float, iterations: int) -> tuple[float, float]:
    """Maximum of a unimodal function on [lo, hi] by golden-section search."""
    g = (np.sqrt(5.0) - 1.0) / 2.0
    a, b = lo, hi
    c, d = b - g * (b - a), a + g * (b - a)
    fc, fd = fun(c), fun(d)
    for _ in range(iterations):
        if fc > fd:
            b, d, fd = d, c, fc
            c = b - g * (b - a)
            fc = fun(c)
        else:
            a, c, fc = c, d, fd
            d = a + g * (b - a)
            fd = fun(d)
    return (c, fc) if fc > fd else (d, fd)


ALPHA_SCAN = np.exp(np.linspace(np.log(0.004), np.log(2.0), 28))


def max_temporal_growth(os_: OrrSommerfeld, re_theta: float) -> tuple[float, float]:
    """(α, ω_i) of the fastest temporally growing wave at Reθ (log-α scan + golden section)."""
    growth = np.array([os_.least_stable(a, re_theta).imag for a in ALPHA_SCAN])
    i = int(np.clip(np.argmax(growth), 1, len(ALPHA_SCAN) - 2))
    la, fa = _golden_max(lambda s: os_.least_stable(np.exp(s), re_theta).imag,
                         np.log(ALPHA_SCAN[i - 1]), np.log(ALPHA_SCAN[i + 1]), 14)
    return float(np.exp(la)), float(fa)


def max_temporal_growth_near(os_: OrrSommerfeld, re_theta: float, alpha_guess: float):
    """Fastest temporal growth at Reθ, searched within a factor 3 of a neighbouring peak."""
    return _golden_max_alpha(os_, re_theta, alpha_guess / 3.0, alpha_guess * 3.0)


def _golden_max_alpha(os_, re_theta, lo, hi):
    la, fa = _golden_max(lambda s: os_.least_stable(np.exp(s), re_theta).imag,
                         np.log(lo), np.log(hi), 16)
    return float(np.exp(la)), float(fa)


def critical_re_theta(os_: OrrSommerfeld) -> tuple[float, float]:
    """Lowest Reθ with a temporally growing wave, and its wavenumber αθ (bisection in ln R)."""
    lo, hi = np.log(1.0), np.log(HIGHEST_RE_THETA)
    alpha, growth = max_temporal_growth(os_, np.exp(hi))
    if growth <= 0.0:
        raise RuntimeError(f"H={os_.profile.shape_factor:.4f}: stable up to Reθ {HIGHEST_RE_THETA}")
    guess = alpha
    for _ in range(18):
        mid = 0.5 * (lo + hi)
        a, g = max_temporal_growth_near(os_, np.exp(mid), guess)
        if g <= 0.0:  # confirm stability over the whole α range
            a, g = max_temporal_growth(os_, np.exp(mid))
        guess = a
        if g > 0.0:
            hi, alpha = mid, a
        else:
            lo = mid
    return float(np.exp(hi)), float(alpha)


def _neutral_alpha(os_: OrrSommerfeld, re_theta: float, unstable: float, stable: float) -> float:
    """Neutral wavenumber between an unstable and a stable α (bisection in ln α)."""
    lu, ls = np.log(unstable), np.log(stable)
    for _ in range(12):
        mid = 0.5 * (lu + ls)
        if os_.least_stable(np.exp(mid), re_theta).imag > 0.0:
            lu = mid
        else:
            ls = mid
    return float(np.exp(0.5 * (lu + ls)))


#: Smallest wavenumber αθ considered for spatial waves (wavelengths up to ~300 θ).
ALPHA_FLOOR = 0.02
#: Waves with a smaller group velocity (units of ue) are given no spatial growth.
GROUP_VELOCITY_FLOOR = 0.05


def spatial_wavenumber(os_: OrrSommerfeld, re_theta: float, alpha_r: float, omega: complex,
                       slope: complex) -> complex | None:
    """Complex α with real frequency ω_r = Re ω(α_r) on the mode through (α_r, ω).

    The first step uses the complex group velocity dω/dα (the analytic derivative, taken along the
    real axis), which is Gaster's (1962) estimate; secant iterations then solve ω(α) = ω_r
    exactly. Returns None if the iteration does not settle.
    """
    target = omega.real
    a0, f0 = complex(alpha_r), omega - target
    a1 = a0 - f0 / slope
    for _ in range(8):
        w1 = os_.nearest(a1, re_theta, omega + slope * (a1 - alpha_r))
        f1 = w1 - target
        if abs(f1) < 1e-10 * max(1.0, abs(target)):
            return a1
        if f1 == f0:
            return None
        a0, a1, f0 = a1, a1 - f1 * (a1 - a0) / (f1 - f0), f1
        if abs(a1 - alpha_r) > 0.5 * alpha_r:
            return None
    return None


def spatial_rates(os_: OrrSommerfeld, re_theta: float, alpha_peak: float, samples: int = 18):
    """Unstable band at Reθ: real frequencies ω_r and spatial rates −α_i across the band.

    The spatial wavenumber of each wave is solved for directly (`spatial_wavenumber`). Where the
    group velocity falls below GROUP_VELOCITY_FLOOR (the spatial branches approach a pinch point
    and a convective growth rate loses its meaning) or the iteration fails, the wave contributes
    no growth.
    """
    lo, hi = alpha_peak, alpha_peak
    while lo > ALPHA_FLOOR and os_.least_stable(lo, re_theta).imag > 0.0:
        lo /= 1.6
    while hi < 5.0 and os_.least_stable(hi, re_theta).imag > 0.0:
        hi *= 1.6
    if lo > ALPHA_FLOOR or os_.least_stable(ALPHA_FLOOR, re_theta).imag <= 0.0:
        lo = _neutral_alpha(os_, re_theta, alpha_peak, max(lo, ALPHA_FLOOR))
    else:
        lo = ALPHA_FLOOR
    hi = _neutral_alpha(os_, re_theta, alpha_peak, hi)
    s = 0.5 * (1.0 - np.cos(np.pi * np.arange(samples) / (samples - 1)))
    alphas = np.exp(np.log(lo) + s * (np.log(hi) - np.log(lo)))
    w = np.array([os_.least_stable(a, re_theta) for a in alphas])
    slope = np.gradient(w, alphas)
    rate = np.zeros(samples)
    for i in range(1, samples - 1):
        if w[i].imag <= 0.0 or slope[i].real <= GROUP_VELOCITY_FLOOR:
            continue
        alpha = spatial_wavenumber(os_, re_theta, alphas[i], w[i], slope[i])
        if alpha is not None:
            rate[i] = max(-alpha.imag, 0.0)
    order = np.argsort(w.real)
    return w.real[order], rate[order]


@dataclass
class Envelope:
    """Envelope N-factor of one similar flow: Reθ grid, N_env and its slope."""

    shape_factor: float
    critical_re_theta: float
    critical_alpha: float
    re_theta: np.ndarray
    n_factor: np.ndarray
    slope: np.ndarray


def envelope_for(profile: fs.Profile, points: int = COLLOCATION_POINTS) -> Envelope:
    """Critical Reθ and envelope N(Reθ) of the similar flow with this profile."""
    os_ = OrrSommerfeld(profile, points)
    r0, alpha0 = critical_re_theta(os_)
    rho_max = min(TABLE_RATIOS[-1], HIGHEST_RE_THETA / r0)
    count = int(np.ceil(np.log(rho_max) * INTEGRATION_POINTS_PER_E)) + 1
    re_grid = r0 * np.exp(np.linspace(0.0, np.log(rho_max), count))
    bands, alpha_peak = [], alpha0
    for r in re_grid:
        alpha_peak, _ = max_temporal_growth_near(os_, r, alpha_peak)
        bands.append(spatial_rates(os_, r, alpha_peak))
    m = profile.m
    p = (1.0 - 3.0 * m) / (1.0 + m)
    f_lo = min(band[0][band[1] > 0].min() / r**p for band, r in zip(bands, re_grid)
               if (band[1] > 0).any())
    f_hi = max(band[0][band[1] > 0].max() / r**p for band, r in zip(bands, re_grid)
               if (band[1] > 0).any())
    families = np.exp(np.linspace(np.log(f_lo), np.log(f_hi), FREQUENCY_FAMILIES))
    growth = profile.re_theta_growth
    rates = np.array([[np.interp(F * r**p, band[0], band[1], left=0.0, right=0.0)
                       for band, r in zip(bands, re_grid)] for F in families])
    n_curves = cumulative_trapezoid(rates / growth, re_grid, axis=1, initial=0.0)
    n_env = n_curves.max(axis=0)
    slope = np.gradient(n_env, re_grid)
    slope[0] = 0.0
    return Envelope(profile.shape_factor, r0, alpha0, re_grid, n_env, slope)


def profiles_at(shape_factors: list[float]) -> list[fs.Profile]:
    """Falkner–Skan profiles with the given shape factors (continuation from β = 1)."""
    out, current = [], fs.solve_at_beta(1.0, fs.solve_at_beta(0.5, fs.solve_at_beta(0.0)))
    for h in shape_factors:
        if abs(h - current.shape_factor) > 1e-9:
            current = fs.continue_in_h(current, [h], substeps=3)[0]
        out.append(current)
    return out


HEADER = """\
# Envelope of e^N amplification for Falkner–Skan flows from our own Orr–Sommerfeld solutions.
# Written by scripts/orr_sommerfeld_envelope.py (Chebyshev collocation, {points} points, mapped
# domain; temporal eigenvalues continued to complex α for spatial rates; envelope over waves of
# fixed physical frequency of each similar flow). Do not edit by hand.
# shape_factor H; critical_re_theta = lowest Re_theta with a growing wave; re_theta_ratio =
# Re_theta / critical_re_theta; envelope_slope = dN/dRe_theta of the envelope; envelope_n = N.
"""
COLUMNS = ["shape_factor", "critical_re_theta", "re_theta_ratio", "envelope_slope", "envelope_n"]


def write_table(envelopes: list[Envelope], path: Path) -> None:
    lines = [HEADER.format(points=COLLOCATION_POINTS).rstrip("\n"), ",".join(COLUMNS)]
    for env in envelopes:
        ratio = env.re_theta / env.critical_re_theta
        for rho in TABLE_RATIOS:
            if rho > ratio[-1] * (1 + 1e-9):
                break
            slope = float(np.interp(rho, ratio, env.slope))
            n = float(np.interp(rho, ratio, env.n_factor))
            lines.append(f"{env.shape_factor:.6f},{env.critical_re_theta:.6e},{rho:.4f},"
                         f"{slope:.6e},{n:.6f}")
    path.write_text("\n".join(lines) + "\n")


def main() -> None:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--output", type=Path, default=OUTPUT)
    parser.add_argument("--points", type=int, default=COLLOCATION_POINTS)
    args = parser.parse_args()
    envelopes = []
    for prof in profiles_at(SHAPE_FACTORS):
        env = envelope_for(prof, args.points)
        envelopes.append(env)
        i9 = np.searchsorted(env.n_factor, 9.0)
        r9 = env.re_theta[i9] if i9 < len(env.re_theta) else float("nan")
        print(f"H={env.shape_factor:.4f} Reθ0={env.critical_re_theta:9.2f} "
              f"Reδ*0={env.critical_re_theta * env.shape_factor:9.2f} αθ0={env.critical_alpha:.4f} "
              f"N_max={env.n_factor[-1]:6.2f} Reθ(N=9)={r9:9.1f}", flush=True)
    write_table(envelopes, args.output)


if __name__ == "__main__":
    main()
