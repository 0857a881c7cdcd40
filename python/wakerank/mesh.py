"""A 2-D far-field mesh around one section with gmsh, written as Gmsh .msh and SU2 .su2.

The section's coordinates are the wall (one straight segment between neighbouring points, so
the mesh nodes on the wall are exactly the exported coordinates); a circle of
``farfield_radius`` chords centred on mid-chord is the far field. Stretched quadrilateral
layers grow from the wall (gmsh BoundaryLayer field) from the first-cell height of the y+
estimate, at a constant growth ratio, up to the flat-plate boundary-layer thickness; outside
them triangles grow linearly with distance from the wall up to the far-field size.

Physical groups (boundary markers in both files): ``airfoil`` (the wall curves),
``farfield`` (the circle) and ``fluid`` (the surface). Requires the optional extra
``wakerank[mesh]`` (the gmsh package from PyPI).
"""

from __future__ import annotations

import math
from dataclasses import dataclass
from pathlib import Path

import numpy as np

from wakerank.errors import GeometryError, InputError

#: The far field must be at least this many chords from the section.
MIN_FARFIELD_RADIUS = 50.0


@dataclass(frozen=True)
class MeshSettings:
    """Sizes of the mesh, in chords; defaults suit a first RANS run at y+ ~ 1."""

    first_cell_height: float
    layer_thickness: float
    growth_ratio: float = 1.2
    farfield_radius: float = 100.0
    farfield_cell_size: float = 10.0
    quad_layers: bool = True

    def check(self) -> None:
        """Reject sizes that cannot give a valid mesh, naming the setting."""
        if not (self.first_cell_height > 0.0):
            raise InputError(f"first-cell height {self.first_cell_height!r} must be positive")
        if not (self.layer_thickness > self.first_cell_height):
            raise InputError("boundary-layer mesh thickness must exceed the first-cell height")
        if not (1.0 < self.growth_ratio < 2.0):
            raise InputError(f"growth ratio {self.growth_ratio!r} must lie between 1 and 2")
        if not (self.farfield_radius >= MIN_FARFIELD_RADIUS):
            raise InputError(
                f"far-field radius {self.farfield_radius!r} chords must be at least "
                f"{MIN_FARFIELD_RADIUS:g} chords"
            )
        if not (0.0 < self.farfield_cell_size < self.farfield_radius):
            raise InputError("far-field cell size must be positive and below the far-field radius")


@dataclass(frozen=True)
class MeshSummary:
    """What was written: files and counts."""

    msh_path: Path
    su2_path: Path
    nodes: int
    elements_2d: int
    wall_layers: int
    farfield_radius: float


def _import_gmsh():  # type: ignore[no-untyped-def]
    try:
        import gmsh
    except ImportError as exc:  # pragma: no cover - depends on the installation
        raise InputError("--mesh needs gmsh: pip install 'wakerank[mesh]'") from exc
    return gmsh


def layer_count(settings: MeshSettings) -> int:
    """Number of stretched layers from first-cell height to layer thickness (geometric series)."""
    h, t, r = settings.first_cell_height, settings.layer_thickness, settings.growth_ratio
    return math.ceil(math.log(1.0 + t * (r - 1.0) / h) / math.log(r))


def build_mesh(
    x: np.ndarray,
    y: np.ndarray,
    settings: MeshSettings,
    out_stem: Path,
    *,
    name: str = "section",
) -> MeshSummary:
    """Mesh the section given by closed-loop coordinates and write ``out_stem``.msh/.su2.

    ``x, y`` run once around the section (trailing edge -> leading edge -> trailing edge); a
    repeated last point closes a sharp trailing edge, otherwise the base is a wall segment.
    """
    settings.check()
    x = np.asarray(x, dtype=float)
    y = np.asarray(y, dtype=float)
    if x.shape != y.shape or x.ndim != 1 or x.size < 8:
        raise InputError(f"{name}: need matching 1-D coordinate arrays with at least 8 points")
    sharp = math.hypot(x[-1] - x[0], y[-1] - y[0]) < 1e-12
    if sharp:
        x, y = x[:-1], y[:-1]
    segments = np.hypot(np.diff(x), np.diff(y))
    if np.any(segments < 1e-12):
        first = int(np.argmax(segments < 1e-12))
        raise GeometryError(f"{name}: points {first} and {first + 1} coincide; the wall needs distinct points")
    gmsh = _import_gmsh()
    gmsh.initialize(readConfigFiles=False, interruptible=False)
    try:
        gmsh.option.setNumber("General.Terminal", 0)
        gmsh.model.add(name)
        summary = _mesh_into_model(gmsh, x, y, sharp, settings, Path(out_stem))
    except OSError:
        raise
    except Exception as exc:  # gmsh reports every failure as a plain Exception
        raise GeometryError(f"{name}: gmsh could not mesh the section: {exc}") from None
    finally:
        gmsh.finalize()
    return summary


def _mesh_into_model(gmsh, x, y, sharp, settings, out_stem):  # type: ignore[no-untyped-def]
    geo = gmsh.model.geo
    spacing = np.hypot(np.diff(np.r_[x, x[0]]), np.diff(np.r_[y, y[0]]))
    local = np.maximum(np.minimum(spacing, np.roll(spacing, 1)), 1e-6)
    wall_points = [geo.addPoint(float(px), float(py), 0.0, float(h)) for px, py, h in zip(x, y, local)]
    n = len(wall_points)
    # closing segment: for a sharp edge it returns to the first point, for a blunt one it is the base
    wall_curves = [geo.addLine(wall_points[i], wall_points[(i + 1) % n]) for i in range(n)]
    for curve in wall_curves:
        geo.mesh.setTransfiniteCurve(curve, 2)

    centre_x = 0.5 * (float(np.min(x)) + float(np.max(x)))
    radius, far_size = settings.farfield_radius, settings.farfield_cell_size
    centre = geo.addPoint(centre_x, 0.0, 0.0, far_size)
    rim = [
        geo.addPoint(centre_x + radius * math.cos(a), radius * math.sin(a), 0.0, far_size)
        for a in (0.0, 0.5 * math.pi, math.pi, 1.5 * math.pi)
    ]
    far_curves = [geo.addCircleArc(rim[i], centre, rim[(i + 1) % 4]) for i in range(4)]

    outer = geo.addCurveLoop(far_curves)
    inner = geo.addCurveLoop(wall_curves)
    fluid = geo.addPlaneSurface([outer, inner])
    geo.synchronize()
    geo.remove([(0, centre)])
    geo.synchronize()

    gmsh.model.addPhysicalGroup(1, wall_curves, name="airfoil")
    gmsh.model.addPhysicalGroup(1, far_curves, name="farfield")
    gmsh.model.addPhysicalGroup(2, [fluid], name="fluid")

    field = gmsh.model.mesh.field
    layers = field.add("BoundaryLayer")
    field.setNumbers(layers, "CurvesList", wall_curves)
    field.setNumber(layers, "Size", settings.first_cell_height)
    field.setNumber(layers, "Ratio", settings.growth_ratio)
    field.setNumber(layers, "Thickness", settings.layer_thickness)
    field.setNumber(layers, "Quads", 1 if settings.quad_layers else 0)
    field.setNumber(layers, "SizeFar", float(np.max(local)))
    if sharp:
        field.setNumbers(layers, "FanPointsList", [wall_points[0]])
    field.setAsBoundaryLayer(layers)

    distance = field.add("Distance")
    field.setNumbers(distance, "CurvesList", wall_curves)
    field.setNumber(distance, "Sampling", 4)
    growth = field.add("Threshold")
    field.setNumber(growth, "InField", distance)
    field.setNumber(growth, "SizeMin", float(np.max(local)))
    field.setNumber(growth, "SizeMax", far_size)
    field.setNumber(growth, "DistMin", 0.05)
    field.setNumber(growth, "DistMax", radius)
    field.setAsBackgroundMesh(growth)

    gmsh.option.setNumber("Mesh.MeshSizeExtendFromBoundary", 0)
    gmsh.option.setNumber("Mesh.MeshSizeFromPoints", 1)
    gmsh.option.setNumber("Mesh.Algorithm", 6)
    gmsh.option.setNumber("Mesh.SaveAll", 0)
    gmsh.model.mesh.generate(2)

    msh_path = out_stem.with_suffix(".msh")
    su2_path = out_stem.with_suffix(".su2")
    gmsh.option.setNumber("Mesh.MshFileVersion", 4.1)
    gmsh.write(str(msh_path))
    gmsh.write(str(su2_path))
    node_tags, _, _ = gmsh.model.mesh.getNodes()
    _, element_tags, _ = gmsh.model.mesh.getElements(dim=2)
    return MeshSummary(
        msh_path=msh_path,
        su2_path=su2_path,
        nodes=len(node_tags),
        elements_2d=int(sum(len(t) for t in element_tags)),
        wall_layers=layer_count(settings),
        farfield_radius=radius,
    )
