"""Type stubs of the compiled module wakerank._core (an implementation detail)."""

def core_version() -> str: ...

import numpy as np
import numpy.typing as npt

_Array = npt.NDArray[np.float64]
# Viscous conditions: reynolds (required), mach, n_factor, turbulence_intensity, trip_upper,
# trip_lower, panels (as wakerank.viscous.condition_keywords writes them).
_Conditions = dict[str, float | int | None]
_CoreSection = tuple[str, _Array, _Array]

DEFAULT_PANELS: int

def section_naca4(camber: float, camber_position: float, thickness: float, closed_te: bool, points_per_side: int) -> _CoreSection: ...
def section_naca4_modified(
    camber: float,
    camber_position: float,
    thickness: float,
    le_radius_index: float,
    max_thickness_position: float,
    points_per_side: int,
) -> _CoreSection: ...
def section_naca5(
    design_cl: float, max_camber_position: float, reflexed: bool, thickness: float, closed_te: bool, points_per_side: int
) -> _CoreSection: ...
def section_naca(code: str, closed_te: bool, points_per_side: int) -> _CoreSection: ...
def naca_designation(code: str) -> dict[str, float | bool | str]: ...
def section_cst(upper: list[float], lower: list[float], te_thickness: float, n1: float, n2: float, points_per_side: int) -> _CoreSection: ...
def section_parse_coordinates(text: str, source: str, normalise: bool) -> _CoreSection: ...
def section_from_points(x: _Array, y: _Array, name: str, normalise: bool) -> _CoreSection: ...
def section_validate(x: _Array, y: _Array, name: str) -> None: ...
def section_repanel(x: _Array, y: _Array, name: str, panels: int) -> _CoreSection: ...
def section_properties(x: _Array, y: _Array, name: str) -> dict[str, float]: ...

# Inviscid panel method (rust/bindings/src/inviscid.rs)
def inviscid_polar(
    x: _Array, y: _Array, alphas_deg: _Array, panels: int, mach: float, name: str = "section"
) -> dict[str, npt.NDArray[np.float64] | npt.NDArray[np.bool_] | int]: ...
def inviscid_polar_batch(
    sections: list[tuple[str, _Array, _Array]],
    alphas_deg: _Array,
    panels: int,
    mach: float,
    threads: int | None = None,
) -> list[dict[str, npt.NDArray[np.float64] | npt.NDArray[np.bool_] | int] | Exception]: ...
def inviscid_surface_arrays(
    x: _Array, y: _Array, alpha_deg: float, panels: int, mach: float, name: str = "section"
) -> dict[str, _Array]: ...
def critical_pressure_coefficient(mach: float) -> float: ...
def karman_trefftz_exact(
    center_x: float, center_y: float, trailing_edge_angle_deg: float, n_points: int, alpha_deg: float
) -> tuple[str, _Array, _Array, _Array, float]: ...
def karman_trefftz_wake_speeds(
    center_x: float, trailing_edge_angle_deg: float, panels: int, distances: list[float]
) -> tuple[float, _Array, _Array]: ...

# Viscous analysis (rust/bindings/src/viscous.rs); each releases the GIL while it runs.
def viscous_sweep(
    name: str,
    x: _Array,
    y: _Array,
    alpha_deg: _Array,
    conditions: _Conditions,
) -> dict[str, _Array]: ...
def viscous_solve_for_cl(
    name: str,
    x: _Array,
    y: _Array,
    cl: float,
    conditions: _Conditions,
) -> dict[str, _Array]: ...
def viscous_boundary_layer(
    name: str,
    x: _Array,
    y: _Array,
    alpha_deg: float,
    conditions: _Conditions,
) -> dict[str, _Array | bool]: ...
def viscous_batch(
    sections: list[tuple[str, _Array, _Array]],
    conditions: list[_Conditions],
    alpha_deg: _Array,
    threads: int = 0,
) -> dict[str, _Array]: ...
def flat_plate_drag(reynolds: float, *, tripped: bool = False, n_factor: float = 9.0) -> float: ...
