"""Airfoil sections as users see them: the families, coordinate files and their properties.

A :class:`Section` holds an outline in one ordering convention (upper trailing edge, forward
over the upper surface, round the leading edge, back along the lower surface) as read-only
float64 arrays, with its family, family parameters and geometric properties. The geometry is
built and checked by the compiled core; bad geometry raises :class:`wakerank.GeometryError`.

>>> import wakerank as wr
>>> s = wr.Section.naca("2412")
>>> round(s.thickness, 3), round(s.camber, 3)
(0.12, 0.02)
"""

from __future__ import annotations

import hashlib
import re
from collections.abc import Sequence
from pathlib import Path
from typing import TYPE_CHECKING, Any

import numpy as np

from wakerank import _core
from wakerank.errors import InputError

if TYPE_CHECKING:
    import polars as pl

#: Points per surface of the analytic families unless chosen (the leading-edge point is shared).
DEFAULT_POINTS_PER_SIDE = 200
#: Panels of :meth:`Section.repanel` unless chosen.
DEFAULT_PANELS: int = _core.DEFAULT_PANELS

_DESIGNATION = re.compile(r"^\s*(naca)?[\s_-]*\d{4,5}(\s*-\s*\d\d)?\s*$", re.IGNORECASE)


def _readonly(values: Any) -> np.ndarray:
    array = np.array(values, dtype=np.float64, copy=True)
    array.setflags(write=False)
    return array


def _as_float_array(values: Any, what: str) -> np.ndarray:
    try:
        array = np.ascontiguousarray(values, dtype=np.float64)
    except (TypeError, ValueError) as exc:
        raise InputError(f"{what} must be a sequence of numbers: {exc}") from None
    if array.ndim != 1:
        raise InputError(f"{what} must be one-dimensional, got shape {array.shape}")
    return array


class Section:
    """An airfoil section outline with its family, parameters and geometric properties.

    Build one with :meth:`naca`, :meth:`naca4`, :meth:`naca4_modified`, :meth:`naca5`,
    :meth:`cst`, :meth:`from_file`, :meth:`from_coordinates` or :meth:`from_spec`. The
    constructor itself takes arrays already in the core's ordering convention and checks them.
    """

    __slots__ = ("_family", "_name", "_parameters", "_properties", "_x", "_y")

    def __init__(
        self,
        x: Any,
        y: Any,
        name: str = "section",
        *,
        family: str = "coordinates",
        parameters: dict[str, Any] | None = None,
        _checked: bool = False,
    ) -> None:
        xa = _as_float_array(x, "x")
        ya = _as_float_array(y, "y")
        if not _checked:
            if xa.shape != ya.shape:
                raise InputError(f"x has {xa.size} values but y has {ya.size}")
            _core.section_validate(xa, ya, name)
        self._name = str(name)
        self._x = _readonly(xa)
        self._y = _readonly(ya)
        self._family = family
        self._parameters = dict(parameters or {})
        self._properties: dict[str, float] | None = None

    @classmethod
    def _from_core(cls, triple: tuple[str, np.ndarray, np.ndarray], family: str, parameters: dict[str, Any]) -> Section:
        name, x, y = triple
        return cls(x, y, name, family=family, parameters=parameters, _checked=True)

    # ---- families -------------------------------------------------------------------------

    @classmethod
    def naca(cls, code: str, *, closed_te: bool = False, points: int = DEFAULT_POINTS_PER_SIDE) -> Section:
        """A NACA section from its designation: "2412", "0012-34", "23012", "23112" (reflexed)."""
        parameters = dict(_core.naca_designation(code))
        family = parameters.pop("family")
        parameters.update(code=code.strip(), closed_te=closed_te, points_per_side=points)
        return cls._from_core(_core.section_naca(code, closed_te, points), family, parameters)

    @classmethod
    def naca4(
        cls,
        camber: float,
        camber_position: float,
        thickness: float,
        *,
        closed_te: bool = False,
        points: int = DEFAULT_POINTS_PER_SIDE,
    ) -> Section:
        """NACA 4-digit section (NACA Report 460) from its parameters, fractions of chord."""
        parameters = dict(
            camber=float(camber),
            camber_position=float(camber_position),
            thickness=float(thickness),
            closed_te=closed_te,
            points_per_side=points,
        )
        core = _core.section_naca4(float(camber), float(camber_position), float(thickness), closed_te, points)
        return cls._from_core(core, "naca4", parameters)

    @classmethod
    def naca4_modified(
        cls,
        camber: float,
        camber_position: float,
        thickness: float,
        le_radius_index: float,
        max_thickness_position: float,
        *,
        points: int = DEFAULT_POINTS_PER_SIDE,
    ) -> Section:
        """NACA modified 4-digit section ("0012-34"; NACA Report 492, Abbott & von Doenhoff §6.4)."""
        parameters = dict(
            camber=float(camber),
            camber_position=float(camber_position),
            thickness=float(thickness),
            le_radius_index=float(le_radius_index),
            max_thickness_position=float(max_thickness_position),
            points_per_side=points,
        )
        core = _core.section_naca4_modified(
            float(camber),
            float(camber_position),
            float(thickness),
            float(le_radius_index),
            float(max_thickness_position),
            points,
        )
        return cls._from_core(core, "naca4_modified", parameters)

    @classmethod
    def naca5(
        cls,
        design_cl: float,
        max_camber_position: float,
        thickness: float,
        *,
        reflexed: bool = False,
        closed_te: bool = False,
        points: int = DEFAULT_POINTS_PER_SIDE,
    ) -> Section:
        """NACA 5-digit section (NACA Report 610), standard or reflexed mean line."""
        parameters = dict(
            design_cl=float(design_cl),
            max_camber_position=float(max_camber_position),
            reflexed=reflexed,
            thickness=float(thickness),
            closed_te=closed_te,
            points_per_side=points,
        )
        core = _core.section_naca5(
            float(design_cl), float(max_camber_position), reflexed, float(thickness), closed_te, points
        )
        return cls._from_core(core, "naca5", parameters)

    @classmethod
    def cst(
        cls,
        upper: Sequence[float],
        lower: Sequence[float],
        te_thickness: float = 0.0,
        *,
        n1: float = 0.5,
        n2: float = 1.0,
        points: int = DEFAULT_POINTS_PER_SIDE,
        name: str | None = None,
    ) -> Section:
        """CST section (Kulfan 2008): Bernstein coefficients per surface (lower ones usually negative)."""
        up = [float(v) for v in upper]
        lo = [float(v) for v in lower]
        parameters = dict(upper=up, lower=lo, te_thickness=float(te_thickness), n1=float(n1), n2=float(n2), points_per_side=points)
        core_name, x, y = _core.section_cst(up, lo, float(te_thickness), float(n1), float(n2), points)
        return cls(x, y, name or core_name, family="cst", parameters=parameters, _checked=True)

    # ---- coordinates ----------------------------------------------------------------------

    @classmethod
    def from_file(cls, path: str | Path, *, normalise: bool = True) -> Section:
        """Read a coordinate file (x y columns, whitespace or commas; a loop in either
        direction or the two surfaces listed from the leading edge, with or without a count
        line). Errors name the file and line. The name is the file's name line or its stem."""
        path = Path(path)
        text = path.read_text(encoding="utf-8", errors="replace")
        source = str(path)
        name, x, y = _core.section_parse_coordinates(text, source, normalise)
        if name == source:
            name = path.stem
        return cls(x, y, name, family="file", parameters={"path": source, "normalise": normalise}, _checked=True)

    @classmethod
    def from_coordinates(cls, x: Any, y: Any, name: str = "coordinates", *, normalise: bool = False) -> Section:
        """A section from point arrays in any accepted order; reordered to the convention and
        checked, optionally normalised to unit chord with the leading edge at the origin."""
        xa = _as_float_array(x, "x")
        ya = _as_float_array(y, "y")
        if xa.shape != ya.shape:
            raise InputError(f"x has {xa.size} values but y has {ya.size}")
        core = _core.section_from_points(xa, ya, str(name), normalise)
        return cls._from_core(core, "coordinates", {"normalise": normalise})

    @classmethod
    def from_spec(cls, spec: str, *, points: int = DEFAULT_POINTS_PER_SIDE, closed_te: bool = False) -> Section:
        """A NACA designation ("2412", "NACA 23012", "0012-34") or the path of a coordinate file."""
        text = str(spec)
        path = Path(text)
        if _DESIGNATION.match(text) and not path.is_file():
            return cls.naca(text, closed_te=closed_te, points=points)
        if path.is_file():
            return cls.from_file(path)
        raise InputError(
            f"'{text}' is neither a NACA designation (e.g. 2412, 23012, 0012-34) nor an existing file"
        )

    # ---- data -----------------------------------------------------------------------------

    @property
    def name(self) -> str:
        """Human-readable name."""
        return self._name

    @property
    def x(self) -> np.ndarray:
        """Abscissae (read-only float64), in the core's ordering convention."""
        return self._x

    @property
    def y(self) -> np.ndarray:
        """Ordinates (read-only float64)."""
        return self._y

    @property
    def family(self) -> str:
        """"naca4", "naca4_modified", "naca5", "naca5_modified", "cst", "file" or "coordinates"."""
        return self._family

    @property
    def parameters(self) -> dict[str, Any]:
        """The family parameters (a copy), for campaign catalogs."""
        return dict(self._parameters)

    @property
    def geometry_id(self) -> str:
        """Stable short id of the outline: sha256 of the coordinates rounded to 1e-9 (name
        excluded), first 16 hex digits."""
        digest = hashlib.sha256()
        for values in (self._x, self._y):
            digest.update(np.round(values * 1e9).astype("<i8").tobytes())
        return digest.hexdigest()[:16]

    def properties(self) -> dict[str, float]:
        """Geometric properties (fractions of chord; area in chord²; angle in degrees)."""
        if self._properties is None:
            self._properties = dict(_core.section_properties(self._x, self._y, self._name))
        return dict(self._properties)

    def _property(self, key: str) -> float:
        if self._properties is None:
            self.properties()
        assert self._properties is not None
        return float(self._properties[key])

    @property
    def thickness(self) -> float:
        """Maximum thickness perpendicular to the chord line, fraction of chord."""
        return self._property("thickness")

    @property
    def thickness_position(self) -> float:
        """Chordwise position of the maximum thickness."""
        return self._property("thickness_position")

    @property
    def camber(self) -> float:
        """Maximum camber (signed), fraction of chord."""
        return self._property("camber")

    @property
    def camber_position(self) -> float:
        """Chordwise position of the maximum camber."""
        return self._property("camber_position")

    @property
    def leading_edge_radius(self) -> float:
        """Leading-edge radius of curvature, fraction of chord."""
        return self._property("leading_edge_radius")

    @property
    def trailing_edge_thickness(self) -> float:
        """Trailing-edge thickness (distance between the two end points), fraction of chord."""
        return self._property("trailing_edge_thickness")

    @property
    def trailing_edge_angle_deg(self) -> float:
        """Included angle between the surfaces at the trailing edge, degrees."""
        return self._property("trailing_edge_angle_deg")

    @property
    def area(self) -> float:
        """Enclosed area, fraction of chord²."""
        return self._property("area")

    @property
    def chord(self) -> float:
        """Chord length in the section's own units."""
        return self._property("chord")

    # ---- operations -----------------------------------------------------------------------

    def repanel(self, panels: int = DEFAULT_PANELS) -> Section:
        """A new section with `panels` panels along a spline through this one's points,
        concentrated at the leading edge, the trailing edge and high curvature."""
        name, x, y = _core.section_repanel(self._x, self._y, self._name, int(panels))
        parameters = dict(self._parameters, repanelled_to=int(panels))
        return Section(x, y, name, family=self._family, parameters=parameters, _checked=True)

    def to_frame(self) -> pl.DataFrame:
        """The outline as a polars DataFrame with columns x, y."""
        import polars as pl

        return pl.DataFrame({"x": self._x, "y": self._y})

    def __len__(self) -> int:
        return int(self._x.size)

    def __repr__(self) -> str:
        return f"Section({self._name!r}, family={self._family!r}, points={self._x.size}, id={self.geometry_id})"


__all__ = ["DEFAULT_PANELS", "DEFAULT_POINTS_PER_SIDE", "Section"]
