"""Section analysis as polars tables: :func:`analyze` (one row per angle) and :func:`surface`;
the viscous :func:`solve_for_cl` and :func:`boundary_layer` live in ``wakerank.viscous``.

Without a Reynolds number the analysis is inviscid: the compiled linear-vortex panel method
(Katz & Plotkin, *Low-Speed Aerodynamics*, §11.4) with the Kutta condition and, for mach > 0,
the Kármán–Tsien correction. The viscous analysis plugs into :func:`analyze` through
:func:`_analyze_viscous`; everything that is not physics (angle parsing, section lookup,
checks) is shared.

>>> import wakerank as wr
>>> from wakerank.karman_trefftz import KarmanTrefftzSection
>>> kt = KarmanTrefftzSection(-0.1, 0.05, trailing_edge_angle_deg=8.0)
>>> table = wr.analyze(kt, alpha_deg="0:4:2", panels=None)
>>> table.columns[:3], table.height
(['alpha_deg', 'cl', 'cl_circulation'], 3)
"""

from __future__ import annotations

import warnings
from typing import Any, Sequence, Union

import numpy as np
import polars as pl

from wakerank import _core
from wakerank.errors import InputError

#: Panels of the analysis unless chosen.
DEFAULT_PANELS = 160
#: Mach number above which the Kármán–Tsien correction is outside its validated range.
MACH_VALIDATED = 0.7

#: What ``alpha_deg`` may be: a number, a sequence or array of numbers, or a range string
#: "start:stop:step" (stop included), "start:stop" (step 1) or "a,b,c".
AlphaSpec = Union[float, int, Sequence[float], np.ndarray, str]

#: Column order of the inviscid polar table.
INVISCID_COLUMNS = [
    "alpha_deg",
    "cl",
    "cl_circulation",
    "cm_c4",
    "cd_pressure",
    "cp_min",
    "critical_mach_reached",
    "mach",
    "panels",
]


def parse_alpha(alpha_deg: AlphaSpec) -> np.ndarray:
    """Angles of attack in degrees as a float64 array (see :data:`AlphaSpec`)."""
    if isinstance(alpha_deg, str):
        text = alpha_deg.strip()
        try:
            if ":" in text:
                parts = [float(p) for p in text.split(":")]
                if len(parts) not in (2, 3):
                    raise ValueError
                start, stop = parts[0], parts[1]
                step = parts[2] if len(parts) == 3 else 1.0
                if step <= 0 or stop < start:
                    raise InputError(
                        f"alpha_deg range '{alpha_deg}' needs start <= stop and a positive step"
                    )
                count = int(np.floor((stop - start) / step + 1e-9)) + 1
                if count > 100_000:
                    raise InputError(f"alpha_deg range '{alpha_deg}' has more than 100000 angles")
                values = start + step * np.arange(count)
            else:
                values = np.array([float(p) for p in text.split(",") if p.strip()])
        except ValueError:
            raise InputError(
                f"alpha_deg '{alpha_deg}' is not a number, a list 'a,b,c' or a range 'start:stop:step'"
            ) from None
    else:
        try:
            values = np.atleast_1d(np.asarray(alpha_deg, dtype=np.float64)).ravel()
        except (TypeError, ValueError):
            raise InputError(f"alpha_deg must be numbers, got {alpha_deg!r}") from None
    if values.size == 0:
        raise InputError("alpha_deg is empty: give at least one angle")
    if not np.all(np.isfinite(values)):
        raise InputError("alpha_deg must be finite numbers")
    if np.any(np.abs(values) > 90.0):
        raise InputError("alpha_deg must be within [-90, 90] degrees")
    return np.ascontiguousarray(values, dtype=np.float64)


def resolve_section(section: Any) -> tuple[str, np.ndarray, np.ndarray]:
    """(name, x, y) of a section: anything with ``.x`` and ``.y`` arrays (a ``wr.Section``), or
    a specification string such as "2412" read by ``Section.from_spec``."""
    if isinstance(section, str):
        from wakerank.sections import Section  # the families live there

        section = Section.from_spec(section)
    try:
        x = np.ascontiguousarray(section.x, dtype=np.float64)
        y = np.ascontiguousarray(section.y, dtype=np.float64)
    except AttributeError:
        raise InputError(
            f"section must be a wakerank Section (or have x and y arrays), got {type(section).__name__}"
        ) from None
    if x.ndim != 1 or x.shape != y.shape:
        raise InputError(f"section x and y must be 1-D arrays of equal length, got {x.shape} and {y.shape}")
    name = str(getattr(section, "name", "section"))
    return name, x, y


def panels_argument(panels: int | None) -> int:
    """Panel count for the core: None keeps the section's own points (0 for the core)."""
    if panels is None:
        return 0
    if isinstance(panels, bool) or not isinstance(panels, (int, np.integer)):
        raise InputError(f"panels must be an integer or None, got {panels!r}")
    if not 20 <= int(panels) <= 2000:
        raise InputError(f"panels must be between 20 and 2000, got {panels}")
    return int(panels)


def check_mach(mach: float) -> float:
    """Mach number as a float; 0 <= mach < 0.9, with a warning above the validated 0.7."""
    try:
        value = float(mach)
    except (TypeError, ValueError):
        raise InputError(f"mach must be a number, got {mach!r}") from None
    if not (0.0 <= value < 0.9):
        raise InputError(f"mach must be in [0, 0.9) for the Karman-Tsien correction, got {mach}")
    if value > MACH_VALIDATED:
        warnings.warn(
            f"mach {value} is above {MACH_VALIDATED}: the Karman-Tsien correction is outside its "
            "validated range",
            stacklevel=3,
        )
    return value


def _analyze_inviscid(
    name: str, x: np.ndarray, y: np.ndarray, alphas: np.ndarray, panels: int, mach: float
) -> pl.DataFrame:
    columns = _core.inviscid_polar(x, y, alphas, panels, mach, name)
    return polar_frame(columns)


def polar_frame(columns: dict[str, Any]) -> pl.DataFrame:
    """The inviscid polar table from the core's dict of columns (columns in table order)."""
    height = len(columns["alpha_deg"])
    data = {key: columns[key] for key in INVISCID_COLUMNS[:-1]}
    data["panels"] = np.full(height, int(columns["panels"]), dtype=np.int64)
    return pl.DataFrame(data)


def _analyze_viscous(
    name: str,
    x: np.ndarray,
    y: np.ndarray,
    alphas: np.ndarray,
    panels: int,
    mach: float,
    reynolds: float,
    **viscous_options: Any,
) -> pl.DataFrame:
    """The viscous analysis (panel method + integral boundary layer, far-wake drag)."""
    from wakerank.viscous import viscous_polar

    return viscous_polar(name, x, y, alphas, panels, mach, reynolds, **viscous_options)


def analyze(
    section: Any,
    alpha_deg: AlphaSpec,
    *,
    panels: int | None = DEFAULT_PANELS,
    mach: float = 0.0,
    reynolds: float | None = None,
    **viscous_options: Any,
) -> pl.DataFrame:
    """Analyse a section at each angle of attack; one row per angle.

    With ``reynolds=None`` the analysis is inviscid: columns alpha_deg, cl (pressure
    integration), cl_circulation (Kutta–Joukowski), cm_c4, cd_pressure, cp_min,
    critical_mach_reached, mach, panels. ``panels=None`` uses the section's own points as
    panel nodes. Raises :class:`wakerank.InputError` for out-of-range arguments and
    :class:`wakerank.GeometryError` for unusable geometry.

    With a Reynolds number (1e4 to 1e8) the analysis is viscous: the panel method coupled to
    the integral boundary layer (coupled Newton solution), drag from the far wake.
    Options: ``n_factor`` (critical N, 1–20, default 9), ``turbulence_intensity`` (a fraction,
    0.0001–0.05, turned into N by Mack's relation), ``trip_upper`` / ``trip_lower`` (forced
    transition at x/c in [0, 1] on the upper / lower surface; a trip trips whichever layer
    passes over it, so at high angles of attack the lower trip, ahead of the stagnation
    point, trips the upper layer); mach 0–0.7. Columns: alpha_deg, cl, cd (far wake, 2θ∞/c),
    cd_squire_young, cd_friction, cd_pressure, cm_c4, cp_min, transition_upper,
    transition_lower (x/c), separation_upper, separation_lower (x/c of turbulent separation,
    null when none), converged, iterations, residual, wake_curvature (whether the row includes
    the wake-curvature pressure jump; false where only the first-order wake converged), then
    l_over_d, critical_mach_reached (cp_min below the critical Cp: the flow turns locally
    supersonic, outside the model's validity, no wave drag counted), reynolds, mach,
    n_factor, panels. Rows that did not converge are kept with ``converged`` false.
    """
    alphas = parse_alpha(alpha_deg)
    mach_value = check_mach(mach)
    core_panels = panels_argument(panels)
    name, x, y = resolve_section(section)
    if reynolds is None:
        if viscous_options:
            names = ", ".join(sorted(viscous_options))
            raise InputError(f"{names}: viscous options need a Reynolds number (reynolds=...)")
        return _analyze_inviscid(name, x, y, alphas, core_panels, mach_value)
    return _analyze_viscous(name, x, y, alphas, core_panels, mach_value, reynolds, **viscous_options)


def surface(
    section: Any,
    alpha_deg: float = 4.0,
    *,
    panels: int | None = DEFAULT_PANELS,
    mach: float = 0.0,
) -> pl.DataFrame:
    """Inviscid surface distribution at one angle: one row per panel node, from the upper
    trailing edge round the leading edge to the lower trailing edge.

    Columns x, y, s (arc length from the upper trailing edge), cp, edge_velocity (signed
    surface speed / U∞: positive towards the upper trailing edge, negative on the lower
    surface of a lifting section).
    """
    alphas = parse_alpha(alpha_deg)
    if alphas.size != 1:
        raise InputError("surface takes one angle of attack (alpha_deg)")
    mach_value = check_mach(mach)
    core_panels = panels_argument(panels)
    name, x, y = resolve_section(section)
    columns = _core.inviscid_surface_arrays(x, y, float(alphas[0]), core_panels, mach_value, name)
    return pl.DataFrame({key: columns[key] for key in ("x", "y", "s", "cp", "edge_velocity")})


__all__ = ["analyze", "surface", "parse_alpha", "DEFAULT_PANELS"]
