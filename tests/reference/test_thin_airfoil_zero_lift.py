"""Zero-lift angle of cambered NACA sections against thin-airfoil theory.

Thin-airfoil theory (Abbott & von Doenhoff, Theory of Wing Sections, §4.3; reference data [C]):
α_L0 = −(1/π)∫₀^π (dz_c/dx)(cos θ − 1) dθ with x = (1 − cos θ)/2, evaluated with
scipy.integrate.quad on the NACA Report 460 mean line. Acceptance criterion: within 0.3°.
"""

from __future__ import annotations

import numpy as np
import pytest
from scipy.integrate import quad

import wakerank as wr


def report_460_slope(x: float, m: float, p: float) -> float:
    """dz_c/dx of the NACA 4-digit mean line (NACA Report 460)."""
    if x < p:
        return 2 * m / p**2 * (p - x)
    return 2 * m / (1 - p) ** 2 * (p - x)


def thin_airfoil_zero_lift_deg(m: float, p: float) -> float:
    def integrand(theta: float) -> float:
        return report_460_slope(0.5 * (1 - np.cos(theta)), m, p) * (np.cos(theta) - 1)

    theta_p = np.arccos(1 - 2 * p)  # the slope has a kink there
    value = quad(integrand, 0, theta_p)[0] + quad(integrand, theta_p, np.pi)[0]
    return float(np.degrees(-value / np.pi))


@pytest.mark.parametrize("code, m, p", [("2412", 0.02, 0.4), ("4412", 0.04, 0.4)])
def test_zero_lift_angle_matches_thin_airfoil_theory(code: str, m: float, p: float) -> None:
    expected = thin_airfoil_zero_lift_deg(m, p)
    assert expected == pytest.approx({"2412": -2.077, "4412": -4.154}[code], abs=2e-3)  # reference data [C]
    table = wr.analyze(wr.Section.naca(code), alpha_deg=[-5.0, 0.0], panels=160)
    a0, a1 = table["alpha_deg"].to_numpy()
    c0, c1 = table["cl"].to_numpy()
    zero_lift = a0 - c0 * (a1 - a0) / (c1 - c0)  # cl is linear in α in potential flow
    assert abs(zero_lift - expected) < 0.3, f"NACA {code}: {zero_lift:.3f} vs thin-airfoil {expected:.3f}"
