"""Expansion of a validated campaign into cases (section x condition) and content-named chunks.

Ids are short SHA-256 hashes of canonical JSON: a section's id is its geometry id, a
condition's id hashes every setting that changes the result (Reynolds number, Mach, N-factor or
turbulence intensity, trips, the angle grid, panel count), a case's id hashes both and a
chunk's id hashes its case ids in order. The same content therefore gets the same ids in any
campaign, on any night, so catalogs concatenate and an interrupted run resumes chunk by chunk.
Order is deterministic: sections as written (within a family, the nested loops in the order its
keys are documented), conditions as Reynolds x Mach x N-factor x transition.
"""

from __future__ import annotations

import glob
import hashlib
import itertools
import json
from dataclasses import dataclass
from functools import cached_property
from pathlib import Path
from typing import Any

import numpy as np

from wakerank._core import core_version
from wakerank.campaign import (
    Campaign,
    CstFamily,
    FileFamily,
    LoadedCampaign,
    Naca4Family,
    NacaCodesFamily,
    Trip,
    values_of,
)
from wakerank.errors import CampaignError, WakerankError

#: Default critical N-factor when a campaign gives neither n_factor nor turbulence_intensity
#: (the usual free-flight value for the e^N method; common practice).
DEFAULT_N_FACTOR = 9.0


def stable_hash(content: Any, length: int = 16) -> str:
    """Hex digest of the canonical JSON of `content` (sorted keys, repr floats)."""
    text = json.dumps(content, sort_keys=True, separators=(",", ":"), allow_nan=False)
    return hashlib.sha256(text.encode("utf-8")).hexdigest()[:length]


@dataclass(frozen=True)
class SectionSpec:
    """Everything needed to rebuild one section anywhere (picklable, no geometry objects).

    Parametric families are rebuilt from `parameters`; sections read from files carry their
    coordinates, so a worker never needs the campaign folder.
    """

    section_id: str
    family: str
    label: str
    parameters_json: str
    x: tuple[float, ...] = ()
    y: tuple[float, ...] = ()

    @property
    def parameters(self) -> dict[str, Any]:
        return json.loads(self.parameters_json)

    def build(self) -> Any:
        """The :class:`wakerank.Section` this spec describes."""
        return _build(self.family, self.parameters, self.label, self.x, self.y)


@dataclass(frozen=True)
class Condition:
    """One flight condition with its angle grid; `transition` is ``"free"`` or a trip label."""

    condition_id: str
    reynolds: float
    mach: float
    n_factor: float | None
    turbulence_intensity: float | None
    transition: str
    trip_upper: float | None
    trip_lower: float | None
    alpha_deg: tuple[float, ...]
    panels: int

    def analysis_options(self) -> dict[str, Any]:
        """Keyword arguments of :func:`wakerank.analyze` for this condition."""
        options: dict[str, Any] = {
            "alpha_deg": list(self.alpha_deg),
            "reynolds": self.reynolds,
            "mach": self.mach,
            "trip_upper": self.trip_upper,
            "trip_lower": self.trip_lower,
            "panels": self.panels,
        }
        if self.turbulence_intensity is not None:
            options["turbulence_intensity"] = self.turbulence_intensity
        else:
            options["n_factor"] = self.n_factor
        return options


@dataclass(frozen=True)
class Case:
    """One section at one condition: one polar."""

    section: SectionSpec
    condition: Condition

    @property
    def case_id(self) -> str:
        return stable_hash([self.section.section_id, self.condition.condition_id])


@dataclass(frozen=True)
class ChunkSpec:
    """A group of cases run and written together as one Parquet part."""

    chunk_id: str
    cases: tuple[Case, ...]

    @property
    def expected_rows(self) -> int:
        return sum(len(case.condition.alpha_deg) for case in self.cases)


@dataclass(frozen=True)
class CampaignPlan:
    """The expanded campaign: sections, conditions and chunks in their deterministic order."""

    name: str
    sections: tuple[SectionSpec, ...]
    conditions: tuple[Condition, ...]
    chunk_size: int

    @cached_property
    def chunks(self) -> tuple[ChunkSpec, ...]:
        cases = [Case(s, c) for s in self.sections for c in self.conditions]
        chunks = []
        for start in range(0, len(cases), self.chunk_size):
            group = tuple(cases[start : start + self.chunk_size])
            # The solver version is part of the identity: a catalog resumed by another
            # version recomputes its chunks (the old parts move to superseded/) instead of
            # mixing results of two solvers.
            identity = {"solver": core_version(), "cases": [case.case_id for case in group]}
            chunks.append(ChunkSpec(stable_hash(identity), group))
        return tuple(chunks)

    @property
    def case_count(self) -> int:
        return len(self.sections) * len(self.conditions)

    @property
    def point_count(self) -> int:
        return len(self.sections) * sum(len(c.alpha_deg) for c in self.conditions)


def expand(loaded: LoadedCampaign, chunk_size: int | None = None) -> CampaignPlan:
    """Expand a validated campaign into its plan; section problems raise CampaignError."""
    campaign = loaded.campaign
    source = loaded.path.name
    sections: list[SectionSpec] = []
    seen: set[str] = set()
    for index, family in enumerate(campaign.sections):
        where = f"{source}: sections[{index}]"
        for spec in _family_sections(family, where, loaded.directory):
            if spec.section_id not in seen:
                seen.add(spec.section_id)
                sections.append(spec)
    size = chunk_size if chunk_size is not None else campaign.chunk_size
    if size < 1:
        raise CampaignError(f"chunk size: expected an integer >= 1, got {size}")
    return CampaignPlan(campaign.name, tuple(sections), tuple(expand_conditions(campaign)), size)


def expand_conditions(campaign: Campaign) -> list[Condition]:
    """Every combination of the campaign's flight conditions, in deterministic order."""
    cond = campaign.conditions
    alphas = tuple(sorted(values_of(cond.alpha_deg)))
    if cond.turbulence_intensity is not None:
        levels = [(None, tu) for tu in values_of(cond.turbulence_intensity)]
    else:
        n_values = values_of(cond.n_factor) if cond.n_factor is not None else [DEFAULT_N_FACTOR]
        levels = [(n, None) for n in n_values]
    conditions = []
    for reynolds, mach, (n_factor, intensity), transition in itertools.product(
        values_of(cond.reynolds), values_of(cond.mach), levels, cond.transition
    ):
        trip_upper = transition.upper if isinstance(transition, Trip) else None
        trip_lower = transition.lower if isinstance(transition, Trip) else None
        label = transition.label if isinstance(transition, Trip) else "free"
        settings = {
            "reynolds": reynolds,
            "mach": mach,
            "n_factor": n_factor,
            "turbulence_intensity": intensity,
            "trip_upper": trip_upper,
            "trip_lower": trip_lower,
            "alpha_deg": list(alphas),
            "panels": campaign.panels,
        }
        conditions.append(
            Condition(
                condition_id=stable_hash(settings),
                reynolds=reynolds,
                mach=mach,
                n_factor=n_factor,
                turbulence_intensity=intensity,
                transition=label,
                trip_upper=trip_upper,
                trip_lower=trip_lower,
                alpha_deg=alphas,
                panels=campaign.panels,
            )
        )
    return conditions


# ---------------------------------------------------------------- section families


def _family_sections(family: Any, where: str, directory: Path) -> list[SectionSpec]:
    if isinstance(family, Naca4Family):
        return _naca4_sections(family, where)
    if isinstance(family, NacaCodesFamily):
        return [
            _spec("naca", {"code": code}, f"NACA {code}", f"{where}.codes[{i}]")
            for i, code in enumerate(family.codes)
        ]
    if isinstance(family, CstFamily):
        return _cst_sections(family, where)
    if isinstance(family, FileFamily):
        return _file_sections(family, where, directory)
    raise CampaignError(f"{where}: unsupported family {family!r}")  # pragma: no cover


def _naca4_sections(family: Naca4Family, where: str) -> list[SectionSpec]:
    specs = []
    symmetric_done: set[float] = set()
    for camber, position, thickness in itertools.product(
        values_of(family.camber), values_of(family.camber_position), values_of(family.thickness)
    ):
        if camber == 0.0:
            if thickness in symmetric_done:  # the camber position of a symmetric section is moot
                continue
            symmetric_done.add(thickness)
        parameters = {
            "camber": camber,
            "camber_position": position,
            "thickness": thickness,
            "closed_te": family.closed_te,
        }
        label = _naca4_label(camber, position, thickness)
        context = (
            f"{where}: camber = {camber:g}, camber_position = {position:g}, "
            f"thickness = {thickness:g}"
        )
        specs.append(_spec("naca4", parameters, label, context))
    return specs


def _naca4_label(camber: float, position: float, thickness: float) -> str:
    digits = (camber * 100, position * 10, thickness * 100)
    if all(abs(d - round(d)) < 1e-9 for d in digits) and camber >= 0 and round(digits[1]) < 10:
        m, p, t = (round(d) for d in digits)
        if camber == 0:
            p = 0
        if t < 100:
            return f"NACA {m}{p}{t:02d}"
    return f"NACA 4-digit m={camber:.4g} p={position:.4g} t={thickness:.4g}"


def latin_hypercube(count: int, low: np.ndarray, high: np.ndarray, seed: int) -> np.ndarray:
    """`count` points of a Latin hypercube sample in the box [low, high] (McKay, Beckman &
    Conover 1979): each dimension is cut into `count` equal strata, each stratum holds exactly
    one point at a uniform random position, and the strata are paired by independent random
    permutations. Deterministic for a given seed (numpy PCG64)."""
    rng = np.random.Generator(np.random.PCG64(seed))
    dims = len(low)
    unit = np.empty((count, dims))
    for j in range(dims):
        unit[:, j] = (rng.permutation(count) + rng.random(count)) / count
    return low + unit * (high - low)


def _cst_sections(family: CstFamily, where: str) -> list[SectionSpec]:
    n_upper = len(family.upper.low)
    low = np.array(family.upper.low + family.lower.low, dtype=float)
    high = np.array(family.upper.high + family.lower.high, dtype=float)
    points = latin_hypercube(family.sample.count, low, high, family.sample.seed)
    specs = []
    for k, point in enumerate(points):
        upper = [_tidy(v) for v in point[:n_upper]]
        lower = [_tidy(v) for v in point[n_upper:]]
        parameters = {"upper": upper, "lower": lower, "te_thickness": family.te_thickness}
        label = f"CST seed {family.sample.seed} #{k}"
        specs.append(_spec("cst", parameters, label, f"{where}: sample {k}"))
    return specs


def _tidy(value: float) -> float:
    return float(f"{value:.12g}")


def _file_sections(family: FileFamily, where: str, directory: Path) -> list[SectionSpec]:
    specs = []
    seen: set[Path] = set()
    for i, pattern in enumerate(family.paths):
        full = pattern if Path(pattern).is_absolute() else str(directory / pattern)
        matches = sorted(Path(p) for p in glob.glob(full, recursive=True))
        matches = [p for p in matches if p.is_file()]
        if not matches:
            raise CampaignError(f"{where}.paths[{i}]: {pattern!r} matches no file (in {directory})")
        for path in matches:
            if path in seen:
                continue
            seen.add(path)
            specs.append(_file_spec(path, f"{where}.paths[{i}]", directory))
    return specs


def _file_spec(path: Path, where: str, directory: Path) -> SectionSpec:
    import wakerank as wr

    try:
        section = wr.Section.from_file(path)
    except WakerankError as exc:
        raise CampaignError(f"{where}: {exc}") from None
    except (OSError, UnicodeDecodeError) as exc:
        raise CampaignError(f"{where}: {path}: cannot read the file: {exc}") from None
    x = tuple(float(v) for v in np.asarray(section.x, dtype=float))
    y = tuple(float(v) for v in np.asarray(section.y, dtype=float))
    try:
        relative = str(path.resolve().relative_to(directory.resolve()))
    except ValueError:
        relative = str(path)
    label = str(getattr(section, "name", "") or path.stem)
    parameters = {"file": relative}
    return SectionSpec(
        section_id=_section_id(section),
        family="file",
        label=label,
        parameters_json=json.dumps(parameters, sort_keys=True),
        x=x,
        y=y,
    )


def _spec(family: str, parameters: dict[str, Any], label: str, where: str) -> SectionSpec:
    try:
        section = _build(family, parameters, label, (), ())
    except WakerankError as exc:
        raise CampaignError(f"{where}: {exc}") from None
    return SectionSpec(
        section_id=_section_id(section),
        family=family,
        label=label,
        parameters_json=json.dumps(parameters, sort_keys=True),
    )


def _section_id(section: Any) -> str:
    return str(section.geometry_id)


def _build(
    family: str,
    parameters: dict[str, Any],
    label: str,
    x: tuple[float, ...],
    y: tuple[float, ...],
) -> Any:
    import wakerank as wr

    if family == "naca4":
        return wr.Section.naca4(
            parameters["camber"],
            parameters["camber_position"],
            parameters["thickness"],
            closed_te=parameters.get("closed_te", False),
        )
    if family == "naca":
        return wr.Section.naca(parameters["code"])
    if family == "cst":
        return wr.Section.cst(
            parameters["upper"], parameters["lower"], te_thickness=parameters["te_thickness"]
        )
    if family == "file":
        return wr.Section.from_coordinates(np.asarray(x), np.asarray(y), name=label)
    raise CampaignError(f"unknown section family {family!r}")


__all__ = [
    "DEFAULT_N_FACTOR",
    "CampaignPlan",
    "Case",
    "ChunkSpec",
    "Condition",
    "SectionSpec",
    "expand",
    "expand_conditions",
    "latin_hypercube",
    "stable_hash",
]
