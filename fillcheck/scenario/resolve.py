"""Scenario file -> validated inputs in SI, or one clear sentence saying what is wrong.

Every refusal is an :class:`~fillcheck.errors.InputError` whose message names the file, the
vessel and the field, says what is wrong and what would be right, e.g.::

    bay4.toml: vessel 'AR-50-001', field 'fill.pressure': '200 bar' does not say whether it is
    gauge or absolute; write '200 barg' (gauge) or '200 bara' (absolute)
"""

from __future__ import annotations

import dataclasses
import difflib
import math
import re
import tomllib
from dataclasses import dataclass
from pathlib import Path
from typing import Any

import numpy as np
from pydantic import ValidationError

from fillcheck import units
from fillcheck.errors import InputError
from fillcheck.fluids.catalog import FluidData, lookup, user_fluid
from fillcheck.models.registry import has_reference_equation
from fillcheck.scenario import bounds
from fillcheck.scenario.area_input import AreaInput, check_vessel_areas, resolve_areas
from fillcheck.scenario.blend_input import BlendInput, resolve_blend
from fillcheck.scenario.filling_input import FillingInput, resolve_filling
from fillcheck.scenario.markings import Marking, resolve_marking
from fillcheck.scenario.schema import GasSpec, ScenarioSpec, VesselSpec
from fillcheck.scenario.source import read_input_with_digest
from fillcheck.scenario.text import neutralise
from fillcheck.thermo.fluid import Fluid
from fillcheck.thermo.limits import highest_temperature_K
from fillcheck.thermo.liquid_band import (
    GAUGE_UNCERTAINTY,
    THERMOMETER_UNCERTAINTY_K,
    in_liquid_band,
)
from fillcheck.thermo.mixture_fluid import FRACTION_SUM_TOLERANCE, MixtureFluid

PACKING_LIMIT = 0.98
"""Fraction of the model's covolume limit 1/(b − c) above which a charge is refused: no liquid
in a vessel is that dense, so such a charge is a typing error."""

FILL_KINDS = ("pressure", "mass", "filling_ratio", "settled_pressure")


@dataclass(frozen=True)
class Limits:
    """Limits in SI: pressures absolute [Pa], filling ratio [kg/m³], vapour space fraction [-]."""

    allowable_pressure_Pa: float
    relief_set_pressure_Pa: float | None = None
    max_filling_ratio_kg_m3: float | None = None
    min_vapour_space: float | None = None
    vapour_space_temperature_K: float | None = None
    relief_device: str | None = None
    """"valve" or "bursting disc"; None where the scenario does not say."""


@dataclass(frozen=True)
class Rules:
    """A named example rule set and the test pressure it works from [Pa absolute]."""

    set: str
    test_pressure_Pa: float


@dataclass(frozen=True)
class VesselInput:
    """One vessel of a scenario, validated, in SI."""

    id: str
    fluid: Fluid
    model_note: str | None
    water_capacity_m3: float
    count: int
    fill_kind: str
    fill_value: float
    fill_temperature_K: float | None
    max_temperature_K: float
    min_temperature_K: float | None
    limits: Limits
    entered: dict[str, str]
    """The user's own text of each quantity, keyed by field path, for the report."""
    atmospheric_pressure_Pa: float = 101_325.0
    """For gauge pressures on the report [Pa]."""
    rules: Rules | None = None
    """An example rule set the user named, or None."""
    notes: tuple[str, ...] = ()
    """Notes on how the input was read (a mixture's composition normalised, volume % read as
    mole %), shown on the report."""
    marking: Marking | None = None
    """What is stamped on the cylinder (scenario.markings), or None."""
    filling: FillingInput | None = None
    """How the fill is made (``[vessel.filling]``), or None."""
    area: str | None = None
    """The id of the storage area the vessel is in (``area``), or None."""
    blend: BlendInput | None = None
    """How the mixture is prepared in the vessel (``[vessel.blend]``), or None."""


@dataclass(frozen=True)
class Scenario:
    """A validated scenario."""

    source: str
    title: str | None
    reference_temperature_K: float
    atmospheric_pressure_Pa: float
    vessels: tuple[VesselInput, ...]
    site: str | None = None
    """Where the vessels are filled or stored, for the record (optional)."""
    permit_number: str | None = None
    """The work permit the check belongs to (optional)."""
    prepared_by: str | None = None
    """Who prepared the check (optional)."""
    input_sha256: str | None = None
    """Hex SHA-256 of the input file's bytes as read (None for a scenario not read from a
    file)."""
    units: str = "metric"
    """The unit system the report uses unless the command line says otherwise: the scenario's
    ``units``, else "us" for a file whose every quantity is in US units, else "metric"."""
    areas: tuple[AreaInput, ...] = ()
    """The storage areas (``[[area]]``), INTERFACES.md §8."""


def load_scenario(path: str | Path) -> Scenario:
    """Read and validate a TOML scenario file."""
    name = Path(path).name
    text, digest = read_input_with_digest(
        path, "scenario (.toml)", "save the scenario as UTF-8 TOML"
    )
    if not text.strip():
        raise InputError(f"{name}: is empty; a scenario needs at least one [[vessel]] table")
    try:
        raw = tomllib.loads(text)
    except tomllib.TOMLDecodeError as exc:
        raise InputError(
            f"{name}: is not valid TOML ({exc}); check quotes and brackets near that line"
        ) from None
    except RecursionError:
        raise InputError(
            f"{name}: nests arrays or tables thousands of levels deep; a scenario needs "
            f"{bounds.NESTING_MAX} levels at most"
        ) from None
    except ValueError as exc:  # e.g. an integer of more than 4300 digits
        raise InputError(
            f"{name}: is not valid TOML ({exc}); check the numbers in the file"
        ) from None
    return dataclasses.replace(scenario_from_dict(raw, name), input_sha256=digest)


def scenario_from_dict(
    raw: dict[str, Any],
    name: str = "<scenario>",
    columns: dict[str, str] | None = None,
    first_row: int = 2,
    areas: tuple[AreaInput, ...] | None = None,
) -> Scenario:
    """Validate a scenario given as a dictionary (as parsed from TOML).

    With ``columns`` (field path -> register column), vessel i is row i + ``first_row`` of a
    register (2: the row after the header) and messages name the row and the column.
    ``areas``: storage areas read from another file (a register's ``--areas``), in place of
    the dictionary's own ``area`` tables.
    """
    name = neutralise(name)
    if isinstance(raw, dict):
        raw = _clean(raw, raw, name, columns, first_row=first_row)
    try:
        spec = ScenarioSpec.model_validate(raw)
    except ValidationError as exc:
        raise InputError(_pydantic_sentence(exc, raw, name, columns, first_row)) from None
    where = _Where(name, columns=columns)
    T_ref = where.run("reference_temperature", units.parse_temperature, spec.reference_temperature)
    if not bounds.REFERENCE_TEMPERATURE_MIN_K <= T_ref <= bounds.REFERENCE_TEMPERATURE_MAX_K:
        raise where.fail(
            "reference_temperature",
            f"'{spec.reference_temperature}' is not an ambient temperature; a reference "
            f"temperature lies between {bounds.REFERENCE_TEMPERATURE_MIN_K - 273.15:.0f} and "
            f"+{bounds.REFERENCE_TEMPERATURE_MAX_K - 273.15:.0f} °C (15 degC is usual)",
        )
    P_atm = where.run("atmospheric_pressure", units.parse_pressure, spec.atmospheric_pressure)
    if units.parse_pressure(spec.atmospheric_pressure, 1.0) != P_atm:
        raise where.fail(
            "atmospheric_pressure",
            f"'{spec.atmospheric_pressure}' is a gauge pressure; the atmosphere is given "
            'absolute, e.g. "101.3 kPa absolute" or "1.013 bara"',
        )
    if not 50e3 <= P_atm <= 110e3:
        raise where.fail(
            "atmospheric_pressure",
            f"'{spec.atmospheric_pressure}' is not an atmospheric pressure; give the local "
            "value, between 50 and 110 kPa absolute",
        )
    user_gases = _user_gases(spec.gas, where)
    if areas is None:
        areas = resolve_areas(spec.area, name, InputError)
    seen: set[str] = set()
    vessels = []
    placed = []
    fluids: dict[Any, Any] = {}  # one Fluid per gas (or composition) and model
    for i, v in enumerate(spec.vessel):
        vid = str(v.id)
        if not vid.strip():
            raise where.vessel(vid, i + first_row if columns is not None else None).fail(
                "id", 'is empty; give every vessel an id, e.g. id = "AR-50-001"'
            )
        w = where.vessel(vid, i + first_row if columns is not None else None)
        if vid in seen:
            raise w.fail("id", "the id is used twice; give every vessel its own id")
        seen.add(vid)
        area = None if v.area is None else str(v.area)
        placed.append((vid, area, w))
        vessels.append(_vessel(v, w, P_atm, user_gases, fluids, T_ref))
    check_vessel_areas(
        placed,
        areas,
        name,
        InputError,
        "give the areas with --areas AREAS.toml"
        if columns is not None
        else "add an [[area]] table with that id",
    )
    return Scenario(
        name,
        spec.title,
        T_ref,
        P_atm,
        tuple(vessels),
        spec.site,
        None if spec.permit_number is None else str(spec.permit_number),
        spec.prepared_by,
        units=spec.units or preferred_units(vessels, raw if isinstance(raw, dict) else {}),
        areas=areas,
    )


_US_UNIT_RE = re.compile(
    r"(psi[ga]?|psi ?\(?[ga]\)?|°f|degf|deg f|fahrenheit|lbs?|gal|usgal|us gal|ft3|ft\^3|ft³|"
    r"cu ft)$",
    re.IGNORECASE,
)
_NUMBER_ONLY_RE = re.compile(r"^[\s+\-0-9.eE]*(%|percent|ppm)?\s*$", re.IGNORECASE)


def preferred_units(vessels: Any, raw: dict[str, Any]) -> str:
    """ "us" where every quantity the user wrote (fractions aside) is in a US unit (psig, psia,
    °F, lb, gal, ft³), else "metric"."""
    texts = [t for v in vessels for t in v.entered.values()]
    texts += [str(raw[k]) for k in ("reference_temperature", "atmospheric_pressure") if k in raw]
    quantities = [
        t.strip()
        for t in texts
        if isinstance(t, str)
        and t.strip()[:1] not in ("", *"abcdefghijklmnopqrstuvwxyz")
        and not _NUMBER_ONLY_RE.match(t)
    ]
    us = bool(quantities) and all(_US_UNIT_RE.search(t) for t in quantities)
    return "us" if us else "metric"


_PARSED: dict[tuple[Any, str, tuple[Any, ...]], float] = {}
"""Quantity texts already parsed, by parser, text and arguments: a register's repeated cells
('50 L', '65 degC') are parsed once. Only successes are kept; a refusal is raised each time with
its own row and column."""
_PARSED_MAX = 1 << 16


class _Where:
    """Prefixes messages with file, vessel and field (or, for a register, row and column)."""

    def __init__(
        self,
        file: str,
        vessel: str | None = None,
        row: int | None = None,
        columns: dict[str, str] | None = None,
    ) -> None:
        self.file, self.vessel_id, self.row, self.columns = file, vessel, row, columns

    def vessel(self, vid: str, row: int | None = None) -> _Where:
        return _Where(self.file, vid, row, self.columns)

    def fail(self, field: str, what: str) -> InputError:
        if self.columns is not None:
            at = f"row {self.row} (vessel '{self.vessel_id}'), " if self.row is not None else ""
            col = self.columns.get(field, self.columns.get(field.split(".")[0], field))
            return InputError(f"{self.file}: {at}column '{col}': {what}")
        at = f"vessel '{self.vessel_id}', " if self.vessel_id is not None else ""
        return InputError(f"{self.file}: {at}field '{field}': {what}")

    def run(self, field: str, parse: Any, text: Any, *args: Any) -> float:
        key = (parse, text, args) if isinstance(text, str) else None
        if key is not None and (hit := _PARSED.get(key)) is not None:
            return hit
        try:
            value = float(parse(text, *args))
        except InputError as exc:
            raise self.fail(field, str(exc)) from None
        if key is not None and len(_PARSED) < _PARSED_MAX:
            _PARSED[key] = value
        return value

    def pressure(self, field: str, text: str, P_atm: float = units.STANDARD_ATMOSPHERE_Pa) -> float:
        """A pressure [Pa absolute], refused above the plausibility bound."""
        P = self.run(field, units.parse_pressure, text, P_atm)
        if P > bounds.PRESSURE_MAX_Pa:
            raise self.fail(
                field,
                f"'{text}' is above {bounds.PRESSURE_MAX_Pa / 1e5:.0f} bar absolute "
                f"({bounds.PRESSURE_MAX_Pa / 1e6:.0f} MPa), the plausibility bound of every "
                "pressure fillcheck takes; check the number and the unit",
            )
        return P

    def bounded(self, field: str, text: str, value: float, high: float, what: str) -> float:
        """``value`` refused above the plausibility bound ``high`` (``what`` shows the bound)."""
        if value > high:
            raise self.fail(
                field,
                f"'{text}' is above {what}, the plausibility bound of this field; check the "
                "number and the unit",
            )
        return value


def option_temperature(scenario: Scenario, vessel: VesselInput, option: str, text: str) -> float:
    """A gas temperature given on the command line for ``vessel`` [K], refused where a storage
    temperature of the vessel would be (below the triple point, above the model's published
    range)."""
    where = _Where(scenario.source).vessel(vessel.id)
    return _temperature(text, option, where, vessel.fluid)


def option_pressure(scenario: Scenario, vessel: VesselInput, option: str, text: str) -> float:
    """A pressure given on the command line for ``vessel`` [Pa absolute], within the bounds."""
    where = _Where(scenario.source).vessel(vessel.id)
    return where.pressure(option, text, scenario.atmospheric_pressure_Pa)


def _user_gases(specs: list[GasSpec], where: _Where) -> dict[str, FluidData]:
    out: dict[str, FluidData] = {}
    for i, g in enumerate(specs):
        f = f"gas[{i}]"
        M = _molar_mass(g.molar_mass, where, f + ".molar_mass")
        Tc = where.run(f + ".critical_temperature", units.parse_temperature, g.critical_temperature)
        if not bounds.CRITICAL_TEMPERATURE_MIN_K <= Tc <= bounds.CRITICAL_TEMPERATURE_MAX_K:
            raise where.fail(
                f + ".critical_temperature",
                f"'{g.critical_temperature}' is outside "
                f"{bounds.CRITICAL_TEMPERATURE_MIN_K:.0f} to "
                f"{bounds.CRITICAL_TEMPERATURE_MAX_K:.0f} K, the plausibility bounds of a "
                "critical temperature; check the number and the unit",
            )
        Pc = where.pressure(f + ".critical_pressure", g.critical_pressure)
        rhoc = (
            where.bounded(
                f + ".critical_density",
                g.critical_density,
                where.run(f + ".critical_density", units.parse_density, g.critical_density),
                bounds.DENSITY_MAX_kg_m3,
                f"{bounds.DENSITY_MAX_kg_m3:.0f} kg/m³",
            )
            if g.critical_density
            else None
        )
        Tt = (
            where.run(
                f + ".triple_point_temperature", units.parse_temperature, g.triple_point_temperature
            )
            if g.triple_point_temperature
            else None
        )
        try:
            omega = float(g.acentric_factor)
        except OverflowError:
            omega = math.inf
        if not -0.5 < omega < 1.5:
            raise where.fail(
                f + ".acentric_factor",
                f"{_short(str(g.acentric_factor))} is not an acentric factor; gases lie between "
                "-0.5 and 1.5 (e.g. 0.152 for propane)",
            )
        try:
            lookup(g.name)
        except InputError:
            pass
        else:
            raise where.fail(
                f + ".name",
                f"'{g.name}' is already in the catalog; use gas = \"{g.name}\" in the vessel "
                "without a [[gas]] table, or give your gas another name",
            )
        try:
            data = user_fluid(
                g.name,
                M,
                Tc,
                Pc,
                omega,
                critical_density_kg_m3=rhoc,
                triple_point_temperature_K=Tt,
                hazards=g.hazards,
            )
        except InputError as exc:
            text = str(exc).rstrip(".")
            raise where.fail(f, text[:1].lower() + text[1:]) from None
        out[g.name.strip().casefold()] = data
    return out


_MOLAR_MASS_RE = re.compile(
    r"^\s*([+-]?\d+(?:\.\d*)?(?:[eE][+-]?\d+)?)\s*(g/mol|kg/mol)\s*$", re.IGNORECASE
)


def _molar_mass(text: str, where: _Where, field: str) -> float:
    m = _MOLAR_MASS_RE.match(text)
    if not m:
        raise where.fail(field, f"'{text}' is not a molar mass; write e.g. '44.01 g/mol'")
    value = float(m.group(1)) * (1e-3 if m.group(2).lower() == "g/mol" else 1.0)
    if value <= 0:
        raise where.fail(field, f"'{text}' must be positive")
    if not math.isfinite(value) or value < bounds.MOLAR_MASS_MIN_kg_mol:
        raise where.fail(
            field,
            f"'{text}' is below {bounds.MOLAR_MASS_MIN_kg_mol * 1e3:.0f} g/mol or not a finite "
            "number, outside the plausibility bounds of a molar mass (hydrogen has 2.016 g/mol)",
        )
    return value


def _fluid_for(
    v: VesselSpec,
    where: _Where,
    user_gases: dict[str, FluidData],
    fluids: dict[Any, Any],
) -> tuple[Fluid | MixtureFluid, str | None, tuple[str, ...]]:
    if isinstance(v.gas, dict):
        return _mixture_for(v, where, user_gases, fluids)
    if v.composition_basis is not None:
        raise where.fail(
            "composition_basis",
            "goes with a mixture only; remove it, or give the gas as a mixture, e.g. "
            'gas = { argon = 0.82, "carbon dioxide" = 0.18 }',
        )
    key = v.gas.strip().casefold()
    try:
        data = user_gases[key] if key in user_gases else lookup(v.gas)
    except InputError as exc:
        hint = "" if where.columns is not None else "; or define the gas in a [[gas]] table"
        raise where.fail("gas", str(exc) + hint) from None
    note = None
    model = v.model
    if model == "reference" and not has_reference_equation(data):
        model = None
        note = (
            f"model 'reference' was asked for, but fillcheck has no reference equation of "
            f"state for {data.name}; the most accurate model it has was used instead"
        )
    key3 = (data.name, data.user_defined, model)
    if key3 not in fluids:
        try:
            fluids[key3] = Fluid(data, model)
        except InputError as exc:
            raise where.fail("model", str(exc)) from None
    return fluids[key3], note, ()


def _mixture_for(
    v: VesselSpec, where: _Where, user_gases: dict[str, FluidData], fluids: dict[Any, Any]
) -> tuple[MixtureFluid, str | None, tuple[str, ...]]:
    """A mixture from a gas table: names to fractions, on the mole, mass or volume basis."""
    assert isinstance(v.gas, dict)
    basis = v.composition_basis or "mole"
    example = 'e.g. gas = { argon = 0.82, "carbon dioxide" = 0.18 }'
    if len(v.gas) < 2:
        raise where.fail("gas", f"a mixture needs at least two gases; {example}")
    datas: list[FluidData] = []
    fractions: list[float] = []
    for name, value in v.gas.items():
        field = f"gas.{name}"
        if name.strip().casefold() in user_gases:
            raise where.fail(
                field,
                "a gas defined in a [[gas]] table cannot be part of a mixture (only catalog "
                "gases have mixture parameters); mix catalog gases only",
            )
        try:
            data = lookup(name)
        except InputError as exc:
            raise where.fail(field, str(exc)) from None
        if data in datas:
            raise where.fail(field, f"names {data.name} a second time; list each gas once")
        x = where.run(field, units.parse_fraction, value)
        if x <= 0.0:
            raise where.fail(field, f"'{value}' must be larger than zero; leave the gas out")
        datas.append(data)
        fractions.append(x)
    total = sum(fractions)
    notes: list[str] = []
    if abs(total - 1.0) > FRACTION_SUM_TOLERANCE:
        raise where.fail(
            "gas",
            f"the fractions sum to {total:.6g} ({100 * total:.4g} %); they must sum to 1 "
            "(100 %) within 0.1 %",
        )
    if abs(total - 1.0) > 1e-9:
        notes.append(
            f"the {basis} fractions summed to {100 * total:.4g} % and were scaled to 100 %"
        )
    z = np.array(fractions) / total
    if basis == "mass":
        z = z / np.array([d.molar_mass_kg_mol for d in datas])
        z = z / z.sum()
        notes.append(
            "entered as mass fractions ("
            + " + ".join(f"{d.name} {100 * x:.4g} %" for d, x in zip(datas, fractions, strict=True))
            + " by mass); the report gives the mole fractions these make"
        )
    elif basis == "volume":
        notes.append(
            "volume % of a gas mixture is read as mole % (exact for ideal gases; the usual "
            "convention for gas-mixture certificates)"
        )
    model_note = None
    model = v.model
    key = (tuple(d.name for d in datas), tuple(np.round(z, 12)), model)
    if key not in fluids:
        try:
            fluids[key] = MixtureFluid(datas, z, model)
        except InputError as exc:
            if model != "reference":
                raise where.fail("model", str(exc)) from None
            fluids[key] = MixtureFluid(datas, z, None)
            model_note = f"model 'reference' was asked for, but {exc}; {fluids[key].model} used"
    return fluids[key], model_note, tuple(notes)


def _vessel(
    v: VesselSpec,
    where: _Where,
    P_atm: float,
    user_gases: dict[str, FluidData],
    fluids: dict[Any, Any],
    T_ref: float,
) -> VesselInput:
    fluid, note, notes = _fluid_for(v, where, user_gases, fluids)
    entered: dict[str, str] = {"water_capacity": v.water_capacity}
    V = where.run("water_capacity", _water_capacity, v.water_capacity)
    if V <= 0:
        raise where.fail("water_capacity", f"'{v.water_capacity}' must be larger than zero")
    if not bounds.WATER_CAPACITY_MIN_m3 <= V <= bounds.WATER_CAPACITY_MAX_m3:
        raise where.fail(
            "water_capacity",
            f"'{v.water_capacity}' is outside {bounds.WATER_CAPACITY_MIN_m3 * 1e6:.0f} mL to "
            f"{bounds.WATER_CAPACITY_MAX_m3:.0f} m³, the plausibility bounds of a water "
            "capacity; check the number and the unit",
        )
    if v.count < 1:
        raise where.fail("count", f"{v.count} is not a number of vessels; give 1 or more")
    if v.count > bounds.COUNT_MAX:
        raise where.fail(
            "count",
            f"{_short(str(v.count))} is above {bounds.COUNT_MAX:,}, the plausibility bound of "
            "a number of identical vessels; check the number",
        )
    given = [k for k in FILL_KINDS if getattr(v.fill, k) is not None]
    if len(given) != 1:
        if where.columns is not None:
            names = [where.columns[f"fill.{k}"] for k in FILL_KINDS]
            what = "none" if not given else " and ".join(where.columns[f"fill.{k}"] for k in given)
            raise InputError(
                f"{where.file}: row {where.row} (vessel '{where.vessel_id}'): fills {what} of the "
                f"columns {', '.join(names)}; fill exactly one"
            )
        what = "none of" if not given else f"{' and '.join(given)}, more than one of"
        raise where.fail(
            "fill",
            f"gives {what} pressure, mass, filling_ratio, settled_pressure; give exactly one",
        )
    kind = given[0]
    text = getattr(v.fill, kind)
    entered["fill." + kind] = text
    if kind.endswith("pressure"):
        value = where.pressure("fill." + kind, text, P_atm)
    else:
        parse = units.parse_mass if kind == "mass" else units.parse_filling_ratio
        value = where.run("fill." + kind, parse, text)
    if value <= 0:
        raise where.fail("fill." + kind, f"'{text}' must be larger than zero")
    if kind == "mass":
        where.bounded("fill.mass", text, value, bounds.MASS_MAX_kg, f"{bounds.MASS_MAX_kg:,.0f} kg")
    elif kind == "filling_ratio":
        where.bounded(
            "fill.filling_ratio",
            text,
            value,
            bounds.DENSITY_MAX_kg_m3,
            f"{bounds.DENSITY_MAX_kg_m3 / 1e3:.0f} kg/L",
        )
    if kind in ("mass", "filling_ratio"):
        rho = value / V if kind == "mass" else value
        rho_max = PACKING_LIMIT * fluid.eos.max_density_mol() * fluid.molar_mass
        if rho >= rho_max:
            raise where.fail(
                "fill." + kind,
                f"'{text}' in '{v.water_capacity}' is {rho:.0f} kg/m³, more {fluid.name} than "
                f"the vessel can hold even as liquid (the {fluid.model} model stops at "
                f"{rho_max:.0f} kg/m³); check the mass and the water capacity",
            )
    T_fill = None
    if v.fill.temperature is not None:
        entered["fill.temperature"] = v.fill.temperature
        T_fill = _temperature(v.fill.temperature, "fill.temperature", where, fluid)
    elif kind.endswith("pressure"):
        raise where.fail(
            "fill.temperature",
            f"is required with fill.{kind}: the gas temperature "
            'when the pressure is read, e.g. temperature = "15 degC"',
        )
    if kind.endswith("pressure"):
        T_read = T_fill if kind == "pressure" else T_ref
        _refuse_liquefied_pressure_fill(fluid, kind, value, T_read, text, where)
    entered["storage.max_temperature"] = v.storage.max_temperature
    T_max = _temperature(v.storage.max_temperature, "storage.max_temperature", where, fluid)
    T_min = None
    if v.storage.min_temperature is not None:
        entered["storage.min_temperature"] = v.storage.min_temperature
        T_min = _temperature(v.storage.min_temperature, "storage.min_temperature", where, fluid)
        if T_min >= T_max:
            raise where.fail(
                "storage.min_temperature",
                f"'{v.storage.min_temperature}' is not "
                f"below the maximum '{v.storage.max_temperature}'",
            )
    limits = _limits(v, where, P_atm, fluid, entered)
    marking = resolve_marking(v.marking, where, P_atm, entered)
    rules = _rules(v, where, P_atm, fluid, entered, marking)
    filling = resolve_filling(
        v.filling,
        v.limits.max_fill_temperature,
        where,
        P_atm,
        T_ref,
        lambda text, fld: _temperature(text, fld, where, fluid),
        entered,
        None if marking is None else marking.tare_mass_kg,
    )
    blend = resolve_blend(
        v.blend,
        fluid,
        where,
        P_atm,
        lambda text, fld: _temperature(text, fld, where, fluid),
        entered,
        None if marking is None else marking.tare_mass_kg,
    )
    return VesselInput(
        str(v.id),
        fluid,
        note,
        V,
        v.count,
        kind,
        value,
        T_fill,
        T_max,
        T_min,
        limits,
        entered,
        P_atm,
        rules,
        notes,
        marking,
        filling,
        None if v.area is None else str(v.area),
        blend,
    )


def _water_capacity(text: str) -> float:
    """A water capacity [m³]: a volume, or the weight of water the vessel holds in lb, as US
    cylinders are stamped (``"96.5 lb"``: that mass of water at 60 °F,
    units.WATER_DENSITY_60F_kg_m3)."""
    try:
        return units.parse_volume(text)
    except InputError as as_volume:
        if not re.search(r"\d\s*lbs?\s*$", text, re.IGNORECASE):
            raise  # a mass in kg is a typing error here, not a US stamp
        try:
            return units.parse_mass(text) / units.WATER_DENSITY_60F_kg_m3
        except InputError:
            raise as_volume from None


def _refuse_liquefied_pressure_fill(
    fluid: Fluid, kind: str, P: float, T: float, text: str, where: _Where
) -> None:
    """Refuse a fill by pressure (or settled pressure, read at the reference temperature) inside
    the band where the vessel may hold liquid (thermo.liquid_band, the rule every command
    shares): there the pressure does not tell the charge."""
    if not bool(in_liquid_band(fluid, np.array([T]), np.array([P]))[0]):
        return
    at = "the fill temperature" if kind == "pressure" else "the reference temperature"
    if isinstance(fluid, MixtureFluid):
        said = (
            f"lies where {fluid.name} may hold liquid at {at} (at or above the lower of its "
            f"dew and bubble pressures for a gas temperature within "
            f"{THERMOMETER_UNCERTAINTY_K:.0f} K, with {GAUGE_UNCERTAINTY:.0%} of gauge error)"
        )
    else:
        cold = max(T - THERMOMETER_UNCERTAINTY_K, fluid.T_min_saturation)
        Psat = float(fluid.saturation_molar(np.array([cold])).P[0])
        said = (
            f"is within {GAUGE_UNCERTAINTY:.0%} of the vapour pressure of {fluid.name} "
            f"{THERMOMETER_UNCERTAINTY_K:.0f} K below {at} ({Psat / 1e5:.2f} bara), or above it, "
            "where the vessel may hold liquid"
        )
    raise where.fail(
        "fill." + kind,
        f"'{text}' {said}: there the pressure does not tell the charge; give fill.mass (weigh "
        "the fill) or fill.filling_ratio instead",
    )


RULE_CLASSES = {
    "p200-compressed": (None, 223.15, "a critical temperature below −50 °C"),
    "p200-high-pressure-liquefied": (223.15, 338.15, "a critical temperature from −50 to 65 °C"),
    "p200-low-pressure-liquefied": (338.15, None, "a critical temperature above 65 °C"),
}


def _rules(
    v: VesselSpec,
    where: _Where,
    P_atm: float,
    fluid: Fluid,
    entered: dict[str, str],
    marking: Marking | None = None,
) -> Rules | None:
    if v.rules is None:
        return None
    if isinstance(fluid, MixtureFluid):
        raise where.fail(
            "rules.set",
            f"'{v.rules.set}' is an example rule set for single gases; P200 treats mixtures "
            "by provisions of their own, which fillcheck does not encode; remove [rules] and "
            "enter the limits the code gives for the mixture",
        )
    entered["rules.set"] = v.rules.set
    marked = None if marking is None else marking.test_pressure_Pa
    if v.rules.test_pressure is None:
        if marked is None:
            raise where.fail(
                "rules.test_pressure",
                "is required unless the cylinder's marking gives it; add "
                'test_pressure = "300 barg" to [rules] or to marking',
            )
        P = marked
    else:
        entered["rules.test_pressure"] = v.rules.test_pressure
        P = where.pressure("rules.test_pressure", v.rules.test_pressure, P_atm)
        if marked is not None and abs(P - marked) > 1e-9 * marked:
            raise where.fail(
                "rules.test_pressure",
                f"'{v.rules.test_pressure}' differs from marking.test_pressure "
                f"'{entered['marking.test_pressure']}'; "
                "give the test pressure once, as marked on the cylinder",
            )
    lo, hi, words = RULE_CLASSES[v.rules.set]
    Tc = fluid.model_critical[0]
    if (lo is not None and Tc < lo) or (hi is not None and Tc >= hi):
        fits = next(
            k
            for k, (a, b, _) in RULE_CLASSES.items()
            if (a is None or Tc >= a) and (b is None or Tc < b)
        )
        raise where.fail(
            "rules.set",
            f"'{v.rules.set}' is for gases with {words}, but {fluid.name} has "
            f"{Tc - 273.15:.1f} °C; its rule set is '{fits}'",
        )
    return Rules(v.rules.set, P)


def _temperature(text: str, field: str, where: _Where, fluid: Fluid) -> float:
    T = where.run(field, units.parse_temperature, text)
    Tt = fluid.T_min_saturation
    if T < Tt and isinstance(fluid, MixtureFluid):
        solid = max(fluid.components, key=lambda c: c.triple_point_temperature_K).name
        raise where.fail(
            field,
            f"'{text}' is below the triple point of {solid} ({Tt - 273.15:.1f} °C), which may "
            "freeze out of the mixture there; fillcheck's mixture models do not cover solids; "
            "give a higher temperature",
        )
    if T < Tt:
        raise where.fail(
            field,
            f"'{text}' is below the triple point of {fluid.name} "
            f"({Tt - 273.15:.1f} °C), where it is a solid; give a higher temperature",
        )
    T_top = highest_temperature_K(fluid)
    if T > T_top:
        raise where.fail(
            field,
            f"'{text}' is above {T_top - 273.15:.0f} °C, the highest temperature fillcheck "
            f"computes for {fluid.name} with the {fluid.model} model (the upper end of its "
            "published range); give a lower temperature",
        )
    return T


def _limits(
    v: VesselSpec, where: _Where, P_atm: float, fluid: Fluid, entered: dict[str, str]
) -> Limits:
    lim = v.limits
    entered["limits.allowable_pressure"] = lim.allowable_pressure
    allow = where.pressure("limits.allowable_pressure", lim.allowable_pressure, P_atm)
    relief = None
    if lim.relief_set_pressure is not None:
        entered["limits.relief_set_pressure"] = lim.relief_set_pressure
        relief = where.pressure("limits.relief_set_pressure", lim.relief_set_pressure, P_atm)
    fr = None
    if lim.max_filling_ratio is not None and lim.max_filling_density is not None:
        raise where.fail(
            "limits.max_filling_density",
            "states the same limit as max_filling_ratio; give one of them",
        )
    if lim.max_filling_density is not None:
        entered["limits.max_filling_density"] = str(lim.max_filling_density)
        pct = where.run("limits.max_filling_density", units.parse_fraction, lim.max_filling_density)
        if pct <= 0:
            raise where.fail(
                "limits.max_filling_density",
                f"'{lim.max_filling_density}' must be larger than zero, e.g. \"68 %\"",
            )
        fr = pct * units.WATER_DENSITY_60F_kg_m3
    if lim.max_filling_ratio is not None:
        entered["limits.max_filling_ratio"] = lim.max_filling_ratio
        fr = where.run("limits.max_filling_ratio", units.parse_filling_ratio, lim.max_filling_ratio)
        if fr <= 0:
            raise where.fail(
                "limits.max_filling_ratio", f"'{lim.max_filling_ratio}' must be larger than zero"
            )
        where.bounded(
            "limits.max_filling_ratio",
            lim.max_filling_ratio,
            fr,
            bounds.DENSITY_MAX_kg_m3,
            f"{bounds.DENSITY_MAX_kg_m3 / 1e3:.0f} kg/L",
        )
    vs = vs_T = None
    if (lim.min_vapour_space is None) != (lim.vapour_space_temperature is None):
        raise where.fail(
            "limits.min_vapour_space",
            "min_vapour_space and vapour_space_temperature go together; give both or neither",
        )
    if lim.min_vapour_space is not None:
        entered["limits.min_vapour_space"] = str(lim.min_vapour_space)
        vs = where.run("limits.min_vapour_space", units.parse_fraction, lim.min_vapour_space)
        if not 0.0 < vs < 1.0:
            raise where.fail(
                "limits.min_vapour_space", f"'{lim.min_vapour_space}' must lie between 0 and 100 %"
            )
        entered["limits.vapour_space_temperature"] = str(lim.vapour_space_temperature)
        vs_T = _temperature(
            str(lim.vapour_space_temperature), "limits.vapour_space_temperature", where, fluid
        )
    if lim.relief_device is not None:
        if relief is None:
            raise where.fail(
                "limits.relief_device",
                "names a relief device without its relief_set_pressure; give both or neither",
            )
        entered["limits.relief_device"] = lim.relief_device
    return Limits(allow, relief, fr, vs, vs_T, lim.relief_device)


def _pydantic_sentence(
    exc: ValidationError,
    raw: dict[str, Any],
    file: str,
    columns: dict[str, str] | None = None,
    first_row: int = 2,
) -> str:
    """The first pydantic error as one sentence naming file, vessel and field."""
    errors = exc.errors()
    # an unknown key explains a "missing" one next to it (a typo), so it is reported first
    err = next((e for e in errors if e["type"] == "extra_forbidden"), errors[0])
    vessel, loc = _vessel_of(list(err["loc"]), raw, columns, first_row)
    loc = [
        p
        for p in loc
        if not (
            isinstance(p, str)
            and (
                p.startswith("function-")
                or p in {"str", "int", "float", "dict[str,union[float,int,str]]"}
            )
        )
    ]
    field = _field_text(loc)
    kind = err["type"]
    leaf = str(loc[-1]) if loc else ""
    if kind == "missing":
        what = "is required but missing" + _missing_example(leaf, columns is not None)
    elif kind == "extra_forbidden":
        close = difflib.get_close_matches(leaf, _known_keys(loc), n=1, cutoff=0.6)
        hint = (
            f"; did you mean '{close[0]}'?"
            if close
            else ("; check the spelling against the README's scenario reference")
        )
        what = f"is not a key fillcheck knows{hint}"
    elif leaf == "vessel" and kind in ("list_type", "model_type"):
        what = "must be a list of tables: write [[vessel]] (double brackets) above each vessel"
    elif leaf == "gas" and len(loc) == 1 and kind in ("string_type", "dict_type", "list_type"):
        what = f"has {_shown(err.get('input'))}; each gas definition goes in a [[gas]] table"
    elif leaf == "gas" and kind in ("string_type", "dict_type", "int_type", "float_type"):
        what = f'has {_shown(err.get("input"))}, but needs a quoted gas name, e.g. gas = "argon"'
    elif leaf == "id":
        what = (
            f'has {_shown(err.get("input"))}, but needs a text or number id, e.g. id = "AR-50-001"'
        )
    elif leaf in ("name", "title") and kind == "string_type":
        what = f"has {_shown(err.get('input'))}, but needs quoted text"
    elif kind in ("string_type", "float_type", "int_type", "union_tag_invalid"):
        what = (
            f'has {_shown(err.get("input"))}, but needs a quoted quantity with a unit, e.g. "50 L"'
        )
        if field.endswith(("count",)):
            what = f"has {_shown(err.get('input'))}, but needs a whole number, e.g. 4"
        if field.endswith(("acentric_factor",)):
            what = f"has {_shown(err.get('input'))}, but needs a plain number, e.g. 0.152"
    elif kind == "too_short" and field == "vessel":
        what = "has no vessels; add at least one [[vessel]] table"
    elif kind == "literal_error":
        what = f"has {_shown(err.get('input'))}; {err['msg'].lower()}"
    elif kind == "model_type" or kind == "list_type":
        what = f"has {_shown(err.get('input'))}, but needs a table of keys"
    else:
        what = err["msg"]
    if columns is not None:
        return f"{file}: {vessel}column '{columns.get(field, field)}': {what}"
    return f"{file}: {vessel}field '{field}': {what}"


def _vessel_of(
    loc: list[Any], raw: Any, columns: dict[str, str] | None, first_row: int = 2
) -> tuple[str, list[Any]]:
    """The vessel (or register row) a location lies in, as message text, and the rest of it."""
    if len(loc) >= 2 and loc[0] == "area" and isinstance(loc[1], int):
        tables = raw.get("area") if isinstance(raw, dict) else None
        tables = tables if isinstance(tables, list) else []
        aid = (
            tables[loc[1]].get("id")
            if loc[1] < len(tables) and isinstance(tables[loc[1]], dict)
            else None
        )
        if isinstance(aid, str | int) and not isinstance(aid, bool):
            return f"area '{_short(neutralise(str(aid)))}', ", loc[2:]
        return f"area number {loc[1] + 1}, ", loc[2:]
    if not (len(loc) >= 2 and loc[0] == "vessel" and isinstance(loc[1], int)):
        return "", loc
    idx = loc[1]
    items = raw.get("vessel") if isinstance(raw, dict) else None
    items = items if isinstance(items, list) else []
    vid = items[idx].get("id") if idx < len(items) and isinstance(items[idx], dict) else None
    if isinstance(vid, str | int) and not isinstance(vid, bool):
        vid = _short(neutralise(str(vid)))
    else:
        vid = None
    vessel = f"vessel '{vid}', " if vid is not None else f"vessel number {idx + 1}, "
    if columns is not None:
        vessel = f"row {idx + first_row} (vessel '{vid}'), "
    return vessel, loc[2:]


#: What a required key's value looks like (quantity text, or a whole table), for the sentence
#: that says it is missing; a register cell gets the value alone.
_REQUIRED_EXAMPLES: dict[str, str] = {
    "id": '"AR-50-001"',
    "gas": '"argon"',
    "water_capacity": '"50 L"',
    "fill": '{ pressure = "200 barg", temperature = "15 degC" }',
    "storage": '{ max_temperature = "50 degC" }',
    "limits": '{ allowable_pressure = "300 barg" }',
    "max_temperature": '"50 degC"',
    "allowable_pressure": '"300 barg"',
    "set": '"p200-compressed"',
    "name": '"refrigerant blend X"',
    "molar_mass": '"150.0 g/mol"',
    "critical_temperature": '"120 degC"',
    "critical_pressure": '"30 bara"',
    "acentric_factor": "0.30",
    "temperature": '"15 degC"',
    "pressure": '"2 barg"',
    "delivery_temperature": '"40 degC"',
    "duration": '"4 min"',
    "coefficient": '"10 W/(m2 K)"',
    "area": '"0.8 m2"',
    "volume": '"60 m3"',
    "air_changes": '"1 /h"',
    "rate": '"0.2 kg/h"',
    "vessel": '"N2-50-W"',
}


def _missing_example(leaf: str, register: bool) -> str:
    """'; give it, e.g. …' for a required key with a known form, else ''."""
    ex = _REQUIRED_EXAMPLES.get(leaf)
    if ex is None or (register and ex.startswith("{")):
        return ""
    return f"; give it, e.g. {ex.strip(chr(34))}" if register else f"; give it, e.g. {leaf} = {ex}"


def _field_text(loc: list[Any]) -> str:
    field = ".".join(
        f"[{p}]" if isinstance(p, int) else _short(neutralise(str(p))) for p in loc
    ).replace(".[", "[")
    return field or "(top level)"


def _clean(
    value: Any,
    raw: dict[str, Any],
    file: str,
    columns: dict[str, str] | None,
    loc: tuple = (),
    first_row: int = 2,
) -> Any:
    """``value`` with every text neutralised (keys too), or an InputError where the input nests
    too deep, holds a text too long or a number that is not finite."""

    def fail(what: str) -> InputError:
        vessel, rest = _vessel_of(list(loc), raw, columns, first_row)
        field = _field_text(rest)
        if columns is not None:
            return InputError(f"{file}: {vessel}column '{columns.get(field, field)}': {what}")
        return InputError(f"{file}: {vessel}field '{field}': {what}")

    if len(loc) > bounds.NESTING_MAX:
        raise fail(
            f"nests arrays or tables more than {bounds.NESTING_MAX} levels deep; a scenario "
            "needs four levels at most"
        )
    if isinstance(value, str):
        if len(value) > bounds.TEXT_CHARS_MAX:
            raise fail(
                f"holds {len(value):,} characters, more than the {bounds.TEXT_CHARS_MAX} any "
                "text of a scenario may hold; check the file"
            )
        return neutralise(value)
    if isinstance(value, float) and not math.isfinite(value):
        raise fail(f"has {value!r}, which is not a finite number; give a number")
    if isinstance(value, dict):
        out: dict[Any, Any] = {}
        for k, v in value.items():
            key = _clean(k, raw, file, columns, (*loc, k), first_row) if isinstance(k, str) else k
            out[key] = _clean(v, raw, file, columns, (*loc, key), first_row)
        return out
    if isinstance(value, list):
        return [_clean(v, raw, file, columns, (*loc, i), first_row) for i, v in enumerate(value)]
    return value


def _short(text: str, n: int = 60) -> str:
    """``text`` cut to ``n`` characters (with an ellipsis) for a message."""
    return text if len(text) <= n else text[: n - 1] + "…"


def _known_keys(loc: list[Any]) -> list[str]:
    """The keys allowed where an unknown key ``loc`` was found."""
    from fillcheck.scenario import schema
    from fillcheck.scenario.area_input import AreaSpec, LeakSpec, ThresholdsSpec

    parents = [p for p in loc[:-1] if isinstance(p, str)]
    model: Any = schema.ScenarioSpec
    for p in parents:
        sub = {
            "vessel": schema.VesselSpec,
            "gas": schema.GasSpec,
            "fill": schema.FillSpec,
            "storage": schema.StorageSpec,
            "limits": schema.LimitsSpec,
            "rules": schema.RulesSpec,
            "marking": schema.MarkingSpec,
            "area": AreaSpec,
            "leak": LeakSpec,
            "thresholds": ThresholdsSpec,
        }.get(p)
        if sub is None:
            return []
        model = sub
    return list(model.model_fields)


def _shown(value: Any) -> str:
    if isinstance(value, str):
        return f"'{_short(value)}'"
    if isinstance(value, bool):
        return f"{str(value).lower()}"
    if value is None:
        return "no value"
    try:
        text = repr(value)
    except (RecursionError, ValueError):  # too deep, or an integer of too many digits
        text = type(value).__name__
    return f"the bare value {_short(neutralise(text))}"
