"""Stand-ins for the compiled core in campaign tests: a fake section and a fake polar.

The fake polar is a made-up smooth function (not physics): a linear lift curve that stalls, a
parabolic drag polar, one non-converged angle for one section family, turbulent separation
near stall. It is deterministic, so any two runs of the same case give identical rows.
"""

from __future__ import annotations

import hashlib
import json
import time

import numpy as np
import polars as pl


class FakeSection:
    """Just what the runner and the catalog use of a section."""

    def __init__(self, family: str, parameters: dict, label: str = "fake"):
        self.family = family
        self.parameters = parameters
        self.name = label
        text = json.dumps([family, parameters], sort_keys=True)
        self.geometry_id = hashlib.sha256(text.encode()).hexdigest()[:16]
        beta = np.linspace(0.0, np.pi, 21)
        xc = 0.5 * (1.0 - np.cos(beta))
        t = self.thickness
        yt = (
            5
            * t
            * (0.2969 * np.sqrt(xc) - 0.126 * xc - 0.3516 * xc**2 + 0.2843 * xc**3 - 0.1036 * xc**4)
        )
        self.x = np.r_[xc[::-1], xc[1:]]
        self.y = np.r_[yt[::-1], -yt[1:]]

    @property
    def thickness(self) -> float:
        return float(self.parameters.get("thickness", 0.12))

    @property
    def camber(self) -> float:
        return float(self.parameters.get("camber", 0.0))

    def properties(self) -> dict:
        return {"thickness": self.thickness, "camber": self.camber, "area": 0.68 * self.thickness}


def build_fake(family, parameters, label, x, y):
    return FakeSection(family, parameters, label)


def fake_analyze(
    section,
    *,
    alpha_deg,
    reynolds,
    mach=0.0,
    n_factor=9.0,
    turbulence_intensity=None,
    trip_upper=None,
    trip_lower=None,
    panels=160,
    delay=0.0,
):
    """Made-up polar, deterministic in its inputs."""
    if delay:
        time.sleep(delay)
    a = np.asarray(alpha_deg, dtype=float)
    t, m = section.thickness, section.camber
    stall = 8.0 + 40.0 * t
    cl = 0.1 * (a + 90.0 * m) * np.where(a <= stall, 1.0, 0.7)
    trip = 1.3 if (trip_upper is not None or trip_lower is not None) else 1.0
    cd = trip * (0.006 + 0.01 * (cl - 0.3) ** 2 + 0.02 * t * (1e6 / reynolds) ** 0.5)
    converged = ~((np.abs(a - 2.0) < 1e-9) & (t > 0.15))
    separation = np.where(a > stall - 0.5, 0.85, np.nan)
    return pl.DataFrame(
        {
            "alpha_deg": a,
            "cl": cl,
            "cd": cd,
            "cd_squire_young": cd * 1.01,
            "cd_friction": 0.7 * cd,
            "cd_pressure": 0.3 * cd,
            "cm_c4": -0.02 - 1.1 * m,
            "cp_min": -1.0 - 1.5 * cl,
            "transition_upper": np.clip(0.6 - 0.04 * a, 0.05, 1.0),
            "transition_lower": np.clip(0.5 + 0.04 * a, 0.05, 1.0),
            "separation_upper": separation,
            "separation_lower": np.full(a.size, np.nan),
            "converged": converged,
            "iterations": np.full(a.size, 17),
            "residual": np.full(a.size, 1e-7),
            "wake_curvature": np.ones(a.size),
        }
    ).with_columns(pl.col("separation_upper", "separation_lower").fill_nan(None))


def slow_fake_analyze(section, **options):
    """The fake polar with a pause, so that a run can be killed half-way."""
    return fake_analyze(section, delay=0.15, **options)


def install(monkeypatch) -> None:
    """Replace section building and the default analysis by the fakes (in this process)."""
    import wakerank.cases
    import wakerank.runner

    monkeypatch.setattr(wakerank.cases, "_build", build_fake)
    monkeypatch.setattr(wakerank.runner, "_default_analysis", lambda: fake_analyze)


TINY_CAMPAIGN = """\
name = "tiny"
panels = 80
chunk_size = 2

[[sections]]
family = "naca4"
camber = [0.0, 0.02]
camber_position = [0.4]
thickness = [0.12, 0.16]

[[sections]]
family = "naca"
codes = ["23012"]

[conditions]
reynolds = [5e5, 1e6]
alpha_deg = {from = -2, to = 12, step = 1}
transition = ["free", {upper = 0.05, lower = 0.05}]

[design]
cl = [0.4, 0.6]
min_thickness = 0.1
"""
