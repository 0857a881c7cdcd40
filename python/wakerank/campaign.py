"""Campaign files: the TOML model (pydantic v2) and the one-line error a malformed file gets.

A campaign says which section families to screen, at which flight conditions, and what the
design point is. :func:`load_campaign` reads and validates it; :mod:`wakerank.cases` expands a
validated :class:`Campaign` into cases and chunks. Every key is checked: an unknown key, a wrong
type or an empty range raises :class:`wakerank.CampaignError` whose message names the file, the
key path and what was expected, e.g.
``campaign.toml: sections[2].thickness.count: expected an integer >= 1, got 'four'``.
"""

from __future__ import annotations

import difflib
import math
import sys
from pathlib import Path
from typing import Annotated, Any, Literal

from pydantic import (
    BaseModel,
    ConfigDict,
    Discriminator,
    Field,
    Tag,
    ValidationError,
    field_validator,
    model_validator,
)

from wakerank.errors import CampaignError

if sys.version_info >= (3, 11):
    import tomllib
else:  # pragma: no cover - exercised on Python 3.10 only
    import tomli as tomllib

#: Cases per chunk when neither the campaign nor the command line says otherwise.
DEFAULT_CHUNK_SIZE = 8


class _Model(BaseModel):
    """Strict base: unknown keys are errors and TOML types are taken as written."""

    model_config = ConfigDict(extra="forbid", strict=True, frozen=True, populate_by_name=True)


class CountRange(_Model):
    """``{from, to, count}``: `count` evenly spaced values from `from` to `to` inclusive."""

    start: float = Field(alias="from")
    stop: float = Field(alias="to")
    count: int = Field(ge=1)

    def values(self) -> list[float]:
        if self.count == 1:
            return [self.start]
        step = (self.stop - self.start) / (self.count - 1)
        return [_tidy(self.start + k * step) for k in range(self.count)]


class StepRange(_Model):
    """``{from, to, step}``: `from`, `from + step`, ... up to and including `to`."""

    start: float = Field(alias="from")
    stop: float = Field(alias="to")
    step: float = Field(gt=0)

    @model_validator(mode="after")
    def _not_empty(self) -> StepRange:
        if self.stop < self.start:
            raise ValueError(
                f"empty range: from = {self.start:g} is above to = {self.stop:g} "
                f"(give from <= to with a positive step)"
            )
        return self

    def values(self) -> list[float]:
        count = math.floor((self.stop - self.start) / self.step + 1e-9) + 1
        return [_tidy(self.start + k * self.step) for k in range(count)]


def _tidy(value: float) -> float:
    """Round away float noise of range arithmetic (12 significant digits)."""
    return float(f"{value:.12g}")


def _value_set_kind(value: Any) -> str | None:
    if isinstance(value, bool):
        return None
    if isinstance(value, (int, float)):
        return "number"
    if isinstance(value, list):
        return "list"
    if isinstance(value, dict):
        return "step" if "step" in value else "count"
    return None


#: Tags of the value-set forms; they never appear in error key paths.
_VALUE_SET_TAGS = ("number", "list", "count", "step")

ValueSet = Annotated[
    Annotated[float, Tag("number")]
    | Annotated[list[float], Field(min_length=1), Tag("list")]
    | Annotated[CountRange, Tag("count")]
    | Annotated[StepRange, Tag("step")],
    Discriminator(
        _value_set_kind,
        custom_error_type="value_set",
        custom_error_message="expected a number, a list of numbers, {from, to, count} "
        "or {from, to, step}",
    ),
]
"""A set of numbers: one number, a list, ``{from, to, count}`` or ``{from, to, step}``."""


def values_of(value_set: float | list[float] | CountRange | StepRange) -> list[float]:
    """The numbers a :data:`ValueSet` stands for, in the order written."""
    if isinstance(value_set, (CountRange, StepRange)):
        return value_set.values()
    if isinstance(value_set, list):
        return [float(v) for v in value_set]
    return [float(value_set)]


class Naca4Family(_Model):
    """NACA four-digit sections from ranges of camber, camber position and thickness (chord
    fractions; Abbott & von Doenhoff 1959, sec. 6.4)."""

    family: Literal["naca4"]
    camber: ValueSet
    camber_position: ValueSet
    thickness: ValueSet
    closed_te: bool = False


class NacaCodesFamily(_Model):
    """Sections named by NACA designation, four or five digits (``"2412"``, ``"23012"``)."""

    family: Literal["naca", "naca5"]
    codes: list[Annotated[str, Field(pattern=r"^\d{4,5}$")]] = Field(min_length=1)

    @model_validator(mode="after")
    def _five_digits_for_naca5(self) -> NacaCodesFamily:
        if self.family == "naca5":
            for i, code in enumerate(self.codes):
                if len(code) != 5:
                    raise ValueError(f"codes[{i}]: expected a five-digit code, got {code!r}")
        return self


class Bounds(_Model):
    """Lower and upper bounds of the CST weights of one surface (Kulfan 2008)."""

    low: list[float] = Field(min_length=1)
    high: list[float] = Field(min_length=1)

    @model_validator(mode="after")
    def _consistent(self) -> Bounds:
        if len(self.low) != len(self.high):
            raise ValueError(
                f"low has {len(self.low)} weights but high has {len(self.high)}: "
                "expected the same number"
            )
        for i, (lo, hi) in enumerate(zip(self.low, self.high)):
            if lo > hi:
                raise ValueError(f"weight {i}: low = {lo:g} is above high = {hi:g}")
        return self


class Sample(_Model):
    """How many sections to draw and the seed that makes the draw repeatable."""

    count: int = Field(ge=1)
    seed: int = Field(ge=0)


class CstFamily(_Model):
    """Class-shape-transformation sections (Kulfan 2008) drawn by Latin hypercube sampling
    (McKay, Beckman & Conover 1979) inside the weight bounds."""

    family: Literal["cst"]
    sample: Sample
    upper: Bounds
    lower: Bounds
    te_thickness: float = Field(default=0.0, ge=0.0, le=0.05)


class FileFamily(_Model):
    """Sections read from coordinate files; `paths` are globs relative to the campaign file."""

    family: Literal["file"]
    paths: list[str] = Field(min_length=1)


SectionFamily = Annotated[
    Naca4Family | NacaCodesFamily | CstFamily | FileFamily,
    Field(discriminator="family"),
]


class Trip(_Model):
    """Forced transition at chord fractions on either surface (a trip strip)."""

    upper: float | None = Field(default=None, gt=0.0, le=1.0)
    lower: float | None = Field(default=None, gt=0.0, le=1.0)

    @model_validator(mode="after")
    def _one_side_at_least(self) -> Trip:
        if self.upper is None and self.lower is None:
            raise ValueError("a trip needs upper, lower or both (chord fractions)")
        return self

    @property
    def label(self) -> str:
        parts = []
        if self.upper is not None:
            parts.append(f"upper {self.upper:g}")
        if self.lower is not None:
            parts.append(f"lower {self.lower:g}")
        return "trip " + " ".join(parts)


Transition = Annotated[
    Annotated[Literal["free"], Tag("free")] | Annotated[Trip, Tag("trip")],
    Discriminator(
        lambda v: "free" if isinstance(v, str) else "trip" if isinstance(v, (dict, Trip)) else None,
        custom_error_type="transition",
        custom_error_message='expected "free" or {upper = x/c, lower = x/c}',
    ),
]


class Conditions(_Model):
    """Flight conditions: every combination is run for every section."""

    reynolds: ValueSet
    mach: ValueSet = 0.0
    n_factor: ValueSet | None = None
    turbulence_intensity: ValueSet | None = None
    alpha_deg: ValueSet
    transition: list[Transition] = Field(default_factory=lambda: ["free"], min_length=1)

    @field_validator("reynolds")
    @classmethod
    def _positive_reynolds(cls, value: Any) -> Any:
        for re_ in values_of(value):
            if not (1e3 <= re_ <= 1e9):
                raise ValueError(f"expected Reynolds numbers between 1e3 and 1e9, got {re_:g}")
        return value

    @field_validator("mach")
    @classmethod
    def _subsonic(cls, value: Any) -> Any:
        for mach in values_of(value):
            if not (0.0 <= mach < 0.7):
                raise ValueError(f"expected Mach numbers in [0, 0.7), got {mach:g}")
        return value

    @field_validator("n_factor")
    @classmethod
    def _n_factor(cls, value: Any) -> Any:
        for n in values_of(value) if value is not None else []:
            if not (0.0 < n <= 20.0):
                raise ValueError(f"expected critical N-factors in (0, 20], got {n:g}")
        return value

    @field_validator("turbulence_intensity")
    @classmethod
    def _intensity(cls, value: Any) -> Any:
        for tu in values_of(value) if value is not None else []:
            if not (0.0 < tu <= 0.05):
                raise ValueError(
                    f"expected turbulence intensities as fractions in (0, 0.05], got {tu:g}"
                )
        return value

    @field_validator("alpha_deg")
    @classmethod
    def _angles(cls, value: Any) -> Any:
        angles = values_of(value)
        for alpha in angles:
            if not (-30.0 <= alpha <= 30.0):
                raise ValueError(f"expected angles between -30 and 30 degrees, got {alpha:g}")
        if len(set(angles)) != len(angles):
            raise ValueError("expected each angle once, got repeated angles")
        return value

    @model_validator(mode="after")
    def _one_transition_model(self) -> Conditions:
        if self.n_factor is not None and self.turbulence_intensity is not None:
            raise ValueError(
                "give either n_factor or turbulence_intensity (the core derives the critical "
                "N-factor from the turbulence intensity), not both"
            )
        return self


class Design(_Model):
    """The design point(s) and constraints `wakerank rank` uses by default."""

    cl: ValueSet
    weights: list[Annotated[float, Field(gt=0.0)]] | None = None
    min_thickness: float | None = Field(default=None, ge=0.0, lt=1.0)
    max_abs_cm: float | None = Field(default=None, gt=0.0)
    min_stall_margin: float | None = Field(default=None, ge=0.0)

    @model_validator(mode="after")
    def _weights_match(self) -> Design:
        if self.weights is not None and len(self.weights) != len(values_of(self.cl)):
            raise ValueError(
                f"weights has {len(self.weights)} entries but cl has {len(values_of(self.cl))}: "
                "expected one weight per design cl"
            )
        return self


class Campaign(_Model):
    """A whole campaign file."""

    name: str = Field(pattern=r"^[A-Za-z0-9][A-Za-z0-9._-]*$", max_length=80)
    description: str = ""
    panels: int = Field(default=160, ge=40, le=1000)
    chunk_size: int = Field(default=DEFAULT_CHUNK_SIZE, ge=1)
    sections: list[SectionFamily] = Field(min_length=1)
    conditions: Conditions
    design: Design | None = None


class LoadedCampaign(BaseModel):
    """A validated campaign with where it came from (paths resolve against `directory`)."""

    model_config = ConfigDict(frozen=True, arbitrary_types_allowed=True)

    campaign: Campaign
    path: Path
    text: str

    @property
    def directory(self) -> Path:
        return self.path.parent


def parse_campaign(text: str, source: str = "campaign.toml") -> Campaign:
    """Validate campaign TOML `text`; `source` names it in error messages."""
    try:
        data = tomllib.loads(text)
    except tomllib.TOMLDecodeError as exc:
        raise CampaignError(f"{source}: not valid TOML: {exc}") from None
    try:
        return Campaign.model_validate(data)
    except ValidationError as exc:
        raise CampaignError(f"{source}: {describe_first_error(exc)}") from None


def load_campaign(path: str | Path) -> LoadedCampaign:
    """Read and validate the campaign file at `path` (nothing is written)."""
    path = Path(path)
    try:
        text = path.read_text(encoding="utf-8")
    except FileNotFoundError:
        raise CampaignError(f"{path}: no such campaign file") from None
    except (OSError, UnicodeDecodeError) as exc:
        raise CampaignError(f"{path}: cannot read the campaign file: {exc}") from None
    campaign = parse_campaign(text, source=path.name)
    return LoadedCampaign(campaign=campaign, path=path.resolve(), text=text)


# ---------------------------------------------------------------- error messages

#: What a key holds, used when its value has the wrong type.
_EXPECTED_BY_KEY = {
    "count": "an integer >= 1",
    "seed": "an integer >= 0",
    "panels": "an integer between 40 and 1000",
    "chunk_size": "an integer >= 1",
    "name": "a name of letters, digits, '.', '_' or '-'",
    "codes": 'a list of NACA codes such as "2412" or "23012"',
    "paths": "a list of file globs",
}

_TYPE_PHRASES = {
    "int_type": "an integer",
    "int_parsing": "an integer",
    "int_from_float": "an integer",
    "float_type": "a number",
    "float_parsing": "a number",
    "string_type": "a string",
    "bool_type": "true or false",
    "list_type": "a list",
    "dict_type": "a table",
    "model_type": "a table",
    "model_attributes_type": "a table",
    "string_pattern_mismatch": None,
    "finite_number": "a finite number",
}


def _known_keys() -> set[str]:
    keys: set[str] = set()
    for model in (
        Campaign,
        Naca4Family,
        NacaCodesFamily,
        CstFamily,
        FileFamily,
        Bounds,
        Sample,
        Conditions,
        Trip,
        Design,
        CountRange,
        StepRange,
    ):
        for name, field in model.model_fields.items():
            keys.add(field.alias or name)
    return keys


#: Fields holding a ValueSet: the union tag after them never appears in key paths.
_VALUE_SET_FIELDS = {
    "camber",
    "camber_position",
    "thickness",
    "reynolds",
    "mach",
    "n_factor",
    "turbulence_intensity",
    "alpha_deg",
    "cl",
}
_FAMILY_TAGS = {"naca4", "naca", "naca5", "cst", "file"}


def _key_path(loc: tuple[Any, ...]) -> str:
    """``sections[2].thickness.count`` from pydantic's location tuple, without union tags."""
    parts: list[str] = []
    for i, item in enumerate(loc):
        before = loc[i - 1] if i > 0 else None
        if isinstance(item, int):
            parts.append(f"[{item}]")
            continue
        if item in _FAMILY_TAGS and isinstance(before, int) and i >= 2 and loc[i - 2] == "sections":
            continue
        if item in _VALUE_SET_TAGS and before in _VALUE_SET_FIELDS:
            continue
        if (
            item in ("free", "trip")
            and isinstance(before, int)
            and i >= 2
            and loc[i - 2] == "transition"
        ):
            continue
        if "[" in item or "," in item:  # union member names such as list[float]
            continue
        parts.append(("." if parts else "") + item)
    return "".join(parts)


def describe_first_error(exc: ValidationError) -> str:
    """One line for the first validation error: key path, what was expected, what was given."""
    errors = exc.errors(include_url=False)
    # A misspelt key also makes the intended key "missing": name the misspelling first.
    errors = sorted(errors, key=lambda e: e["type"] != "extra_forbidden")
    error = errors[0]
    text = _describe(error)
    if len(errors) > 1:
        text += f" (and {len(errors) - 1} more problem{'s' if len(errors) > 2 else ''})"
    return text


def _describe(error: dict[str, Any]) -> str:
    loc = tuple(error["loc"])
    kind = error["type"]
    ctx = error.get("ctx") or {}
    given = error.get("input")
    path = _key_path(loc)
    where = f"{path}: " if path else ""
    if kind == "extra_forbidden":
        parent = _key_path(loc[:-1])
        key = str(loc[-1])
        hint = difflib.get_close_matches(key, sorted(_known_keys()), n=1)
        suggestion = f" (did you mean {hint[0]!r}?)" if hint else ""
        return f"{parent + ': ' if parent else ''}unknown key {key!r}{suggestion}"
    if kind == "missing":
        parent = _key_path(loc[:-1])
        return f"{parent + ': ' if parent else ''}missing required key {str(loc[-1])!r}"
    if kind == "union_tag_invalid":
        return (
            f"{path}.family: unknown family {ctx.get('tag')!r}; expected one of "
            f"{ctx.get('expected_tags')}"
        )
    if kind == "union_tag_not_found":
        key = str(ctx.get("discriminator", "family")).strip("'")
        return f"{where}missing required key {key!r}"
    if kind in ("value_error", "assertion_error"):
        message = error["msg"].removeprefix("Value error, ").removeprefix("Assertion failed, ")
        return f"{where}{message}"
    if kind in ("value_set", "transition"):
        return f"{where}{error['msg']}, got {given!r}"
    last = next((str(item) for item in reversed(loc) if isinstance(item, str)), "")
    if kind in _TYPE_PHRASES:
        expected = _EXPECTED_BY_KEY.get(last) or _TYPE_PHRASES[kind] or "a different value"
        if kind == "string_pattern_mismatch" and last not in _EXPECTED_BY_KEY:
            expected = f"text matching {ctx.get('pattern')}"
        if kind == "string_pattern_mismatch" and loc and isinstance(loc[-1], int):
            expected = "a NACA code of four or five digits"
        return f"{where}expected {expected}, got {given!r}"
    bounds = {
        "greater_than_equal": ">=",
        "greater_than": ">",
        "less_than_equal": "<=",
        "less_than": "<",
    }
    if kind in bounds:
        limit = next(iter(ctx.values()))
        noun = (
            "an integer" if isinstance(limit, int) and not isinstance(limit, bool) else "a number"
        )
        return f"{where}expected {noun} {bounds[kind]} {limit:g}, got {given!r}"
    if kind == "too_short":
        return f"{where}expected at least {ctx.get('min_length', 1)} entry, got an empty list"
    if kind == "literal_error":
        return f"{where}expected {ctx.get('expected')}, got {given!r}"
    return f"{where}{error['msg'][0].lower()}{error['msg'][1:]}, got {given!r}"


__all__ = [
    "DEFAULT_CHUNK_SIZE",
    "Campaign",
    "Conditions",
    "CstFamily",
    "Design",
    "FileFamily",
    "LoadedCampaign",
    "Naca4Family",
    "NacaCodesFamily",
    "Trip",
    "ValueSet",
    "describe_first_error",
    "load_campaign",
    "parse_campaign",
    "values_of",
]
