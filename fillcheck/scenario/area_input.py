"""The ``[[area]]`` tables (INTERFACES.md §8): storage areas, their reading into SI and the
thresholds a release into them is judged against.

An area is a room or enclosure where vessels are stored: its free air volume, its ventilation
in air changes per hour and its temperature. A vessel names its area with the key ``area``
(a register with the column ``area``, the areas then given with ``--areas FILE.toml``). Every
threshold is an input with a default that names where it comes from.
"""

from __future__ import annotations

import math
from collections.abc import Iterable, Sequence
from dataclasses import dataclass, field
from typing import Any

from pydantic import BaseModel, ConfigDict, StrictFloat, StrictInt, StrictStr

from fillcheck import units
from fillcheck.fluids.classification import AIR_OXYGEN

Quantity = StrictStr
Fraction = StrictStr | StrictFloat | StrictInt


THRESHOLD_NAMES = (
    "oxygen_minimum",
    "oxygen_maximum",
    "carbon_dioxide_long_term",
    "carbon_dioxide_short_term",
    "lfl_share",
)
"""The thresholds an area may set (their defaults and sources: assess.area.THRESHOLDS)."""

AREA_TEMPERATURE_MIN_K = 213.15
"""Plausibility bound: an area's temperature is at least −60 °C (common practice, no source)."""
AREA_TEMPERATURE_MAX_K = 343.15
"""Plausibility bound: an area's temperature is at most +70 °C (common practice, no source)."""
AREA_VOLUME_MAX_m3 = 1e6
"""Plausibility bound: an area's free air volume is at most 1,000,000 m³ (a large warehouse)."""
AIR_CHANGES_MAX_per_s = 100.0 / 3600.0
"""Plausibility bound: at most 100 air changes per hour (a fume cupboard reaches a few dozen)."""


class _Strict(BaseModel):
    model_config = ConfigDict(extra="forbid", frozen=True)


class LeakSpec(_Strict):
    """A continuous leak from one vessel of the area at a stated mass flow."""

    vessel: StrictStr | StrictInt
    rate: Quantity


class ThresholdsSpec(_Strict):
    """Thresholds a release is judged against (each optional: its default names its source)."""

    oxygen_minimum: Fraction | None = None
    oxygen_maximum: Fraction | None = None
    carbon_dioxide_long_term: Fraction | None = None
    carbon_dioxide_short_term: Fraction | None = None
    lfl_share: Fraction | None = None


class AreaSpec(_Strict):
    """One ``[[area]]`` table."""

    id: StrictStr | StrictInt
    volume: Quantity
    air_changes: Quantity
    temperature: Quantity
    leak: LeakSpec | None = None
    thresholds: ThresholdsSpec | None = None


@dataclass(frozen=True)
class LeakInput:
    """A continuous leak: the vessel it comes from and its mass flow [kg/s]."""

    vessel: str
    rate_kg_s: float


@dataclass(frozen=True)
class AreaInput:
    """One storage area in SI: free air volume [m³], air changes [1/s], temperature [K]."""

    id: str
    volume_m3: float
    air_changes_per_s: float
    temperature_K: float
    thresholds: dict[str, float] = field(default_factory=dict)
    """The thresholds the scenario sets [-] (the others take their defaults in assess.area)."""
    leak: LeakInput | None = None
    entered: dict[str, str] = field(default_factory=dict)
    """The user's own text of each quantity, keyed by field, for the report."""


class AreaWhere:
    """Prefixes messages with the file and the area (``where`` of scenario.resolve for
    vessels)."""

    def __init__(self, fail: Any, file: str, area: str | None = None) -> None:
        self._error, self.file, self.area = fail, file, area

    def fail(self, field: str, what: str) -> Exception:
        at = f"area '{self.area}', " if self.area is not None else ""
        return self._error(f"{self.file}: {at}field '{field}': {what}")

    def run(self, field: str, parse: Any, text: Any) -> float:
        try:
            return float(parse(text))
        except self._catch as exc:
            raise self.fail(field, str(exc)) from None

    _catch: type[Exception] = units.UnitError


def resolve_areas(specs: Sequence[AreaSpec], file: str, error: Any) -> tuple[AreaInput, ...]:
    """The areas of a scenario in SI, or ``error`` (the InputError class) with one sentence
    naming the file, the area and the field."""
    out: list[AreaInput] = []
    seen: set[str] = set()
    for spec in specs:
        aid = str(spec.id)
        w = AreaWhere(error, file, aid)
        if not aid.strip():
            raise AreaWhere(error, file).fail(
                "area.id", 'is empty; give every area an id, e.g. id = "CAGE-B"'
            )
        if aid in seen:
            raise w.fail("id", "the id is used twice; give every area its own id")
        seen.add(aid)
        out.append(_area(spec, w))
    return tuple(out)


def _area(spec: AreaSpec, w: AreaWhere) -> AreaInput:
    entered = {
        "volume": spec.volume,
        "air_changes": spec.air_changes,
        "temperature": spec.temperature,
    }
    V = w.run("volume", units.parse_volume, spec.volume)
    if not V > 0.0:
        raise w.fail("volume", f"'{spec.volume}' must be larger than zero, e.g. \"60 m3\"")
    if V > AREA_VOLUME_MAX_m3:
        raise w.fail(
            "volume",
            f"'{spec.volume}' is above {AREA_VOLUME_MAX_m3:,.0f} m³, the plausibility bound of "
            "a free air volume; check the number and the unit",
        )
    N = w.run("air_changes", units.parse_rate, spec.air_changes)
    if N > AIR_CHANGES_MAX_per_s:
        raise w.fail(
            "air_changes",
            f"'{spec.air_changes}' is above {AIR_CHANGES_MAX_per_s * 3600:.0f} air changes an "
            "hour, the plausibility bound of a ventilation rate; check the number and the unit",
        )
    T = w.run("temperature", units.parse_temperature, spec.temperature)
    if not AREA_TEMPERATURE_MIN_K <= T <= AREA_TEMPERATURE_MAX_K:
        raise w.fail(
            "temperature",
            f"'{spec.temperature}' is not a room temperature; an area's temperature lies "
            f"between {AREA_TEMPERATURE_MIN_K - 273.15:.0f} and "
            f"+{AREA_TEMPERATURE_MAX_K - 273.15:.0f} °C",
        )
    leak = None
    if spec.leak is not None:
        entered["leak.rate"] = spec.leak.rate
        G = w.run("leak.rate", units.parse_mass_flow, spec.leak.rate)
        if not G > 0.0:
            raise w.fail("leak.rate", f"'{spec.leak.rate}' must be larger than zero")
        leak = LeakInput(str(spec.leak.vessel), G)
    return AreaInput(str(spec.id), V, N, T, _thresholds(spec.thresholds, w, entered), leak, entered)


def _thresholds(
    spec: ThresholdsSpec | None, w: AreaWhere, entered: dict[str, str]
) -> dict[str, float]:
    if spec is None:
        return {}
    values: dict[str, float] = {}
    for name in THRESHOLD_NAMES:
        given = getattr(spec, name)
        if given is None:
            continue
        f = f"thresholds.{name}"
        x = w.run(f, units.parse_fraction, given)
        if not 0.0 < x < 1.0 or not math.isfinite(x):
            raise w.fail(f, f"'{given}' must lie between 0 and 100 %")
        entered[f] = str(given)
        values[name] = x
    if values.get("oxygen_minimum", 0.0) >= AIR_OXYGEN:
        raise w.fail(
            "thresholds.oxygen_minimum",
            f"'{spec.oxygen_minimum}' is not below air's 20.95 % oxygen; give e.g. \"19.5 %\"",
        )
    if values.get("oxygen_maximum", 1.0) <= AIR_OXYGEN:
        raise w.fail(
            "thresholds.oxygen_maximum",
            f"'{spec.oxygen_maximum}' is not above air's 20.95 % oxygen; give e.g. \"23.5 %\"",
        )
    long, short = values.get("carbon_dioxide_long_term"), values.get("carbon_dioxide_short_term")
    if long is not None and short is not None and long > short:
        raise w.fail(
            "thresholds.carbon_dioxide_long_term",
            "is above carbon_dioxide_short_term; an 8-hour limit is the lower of the two",
        )
    return values


def check_vessel_areas(
    vessels: Iterable[tuple[str, str | None, Any]],
    areas: Sequence[AreaInput],
    file: str,
    error: Any,
    no_areas_hint: str = "add an [[area]] table with that id",
) -> None:
    """Refuse a vessel whose ``area`` names no area, and a leak naming a vessel not in its area.

    ``vessels``: (vessel id, area id or None, where) with ``where.fail(field, what)`` naming the
    file and the vessel (or the register row and column)."""
    ids = [a.id for a in areas]
    members: dict[str, set[str]] = {a.id: set() for a in areas}
    for vid, aid, where in vessels:
        if aid is None:
            continue
        if aid not in members:
            known = (
                f"the areas are {', '.join(ids[:10])}"
                if ids
                else f"no areas are defined; {no_areas_hint}"
            )
            raise where.fail("area", f"'{aid}' is not a defined area; {known}")
        members[aid].add(vid)
    for a in areas:
        if a.leak is not None and a.leak.vessel not in members[a.id]:
            raise AreaWhere(error, file, a.id).fail(
                "leak.vessel",
                f"'{a.leak.vessel}' is not a vessel of this area; name a vessel whose area is "
                f"'{a.id}'",
            )
