"""Quantity strings in, SI out (K, Pa absolute, kg, m³, kg/m³); SI in, display strings out.

``parse_*`` refuse missing, unknown or ambiguous units with a :class:`~fillcheck.errors.UnitError`
whose message is one sentence starting with the quoted input. Unit spellings match regardless of
case (no two accepted spellings clash) and whitespace runs inside a unit count as one space. Each
kind has one table of spelling -> ``(factor, offset)`` with ``SI = value * factor + offset``.
"""

from __future__ import annotations

import math
import numbers
import re
from typing import Literal, NoReturn

from fillcheck.errors import UnitError

STANDARD_ATMOSPHERE_Pa = 101_325.0
UnitSystem = Literal["metric", "us"]

_LB_kg = 0.45359237  # international avoirdupois pound, exact
_FT3_m3 = 0.3048**3  # cubic foot, exact by definition of the foot
_USGAL_m3 = 3.785411784e-3  # US liquid gallon (231 in³), exact
_PSI_Pa = _LB_kg * 9.80665 / 0.0254**2  # pound-force per square inch
_F_K = 5.0 / 9.0  # one degree Fahrenheit (or Rankine) in kelvin
WATER_DENSITY_60F_kg_m3 = 999.017
"""Density of water at 60 °F (15.56 °C) and 1 atm [kg/m³] (IAPWS-95, Wagner, Pruß (2002), J.
Phys. Chem. Ref. Data 31, 387, as evaluated by CoolProp 8.0.0: 999.0171). A US filling density
is the charge as a percentage of the weight of water the container holds at 60 °F (49 CFR
173.304a, from memory), so 1 % is 9.99017 kg per m³ of water capacity."""

_Table = dict[str, tuple[float, float]]


def _same(factor: float, offset: float, *spellings: str) -> _Table:
    return dict.fromkeys(spellings, (factor, offset))


_PER_LITRE = {**_same(1e3, 0.0, "kg/L"), **_same(1.0, 0.0, "g/L", "kg/m3", "kg/m^3", "kg/m³")}
_TABLES: dict[str, _Table] = {
    "pressure": {
        "Pa": (1.0, 0.0),
        "kPa": (1e3, 0.0),
        "MPa": (1e6, 0.0),
        "bar": (1e5, 0.0),
        "mbar": (1e2, 0.0),
        "psi": (_PSI_Pa, 0.0),
        "atm": (STANDARD_ATMOSPHERE_Pa, 0.0),
    },
    "temperature": {
        **_same(1.0, 0.0, "K", "kelvin"),
        **_same(1.0, 273.15, "degC", "°C", "deg C", "celsius"),
        **_same(_F_K, 459.67 * _F_K, "degF", "°F", "deg F", "fahrenheit"),
    },
    "volume": {
        **_same(1e-3, 0.0, "L", "litre", "liter"),
        "mL": (1e-6, 0.0),
        **_same(1.0, 0.0, "m3", "m^3", "m³"),
        **_same(_FT3_m3, 0.0, "ft3", "ft^3", "ft³", "cu ft"),
        **_same(_USGAL_m3, 0.0, "gal", "USgal", "US gal"),
    },
    "mass": {
        "kg": (1.0, 0.0),
        "g": (1e-3, 0.0),
        **_same(_LB_kg, 0.0, "lb", "lbs"),
        **_same(1e3, 0.0, "t", "tonne"),
    },
    "density": {**_PER_LITRE, **_same(_LB_kg / _FT3_m3, 0.0, "lb/ft3", "lb/ft^3", "lb/ft³")},
    "filling ratio": _PER_LITRE,
    "fraction": {**_same(1e-2, 0.0, "%", "percent"), "ppm": (1e-6, 0.0)},
    "duration": {
        **_same(1.0, 0.0, "s", "sec"),
        **_same(60.0, 0.0, "min"),
        **_same(3600.0, 0.0, "h"),
    },
    "specific heat": {
        **_same(1.0, 0.0, "J/(kg K)", "J/(kg·K)", "J/kg/K"),
        **_same(1e3, 0.0, "kJ/(kg K)", "kJ/(kg·K)", "kJ/kg/K"),
    },
    "heat transfer coefficient": {
        **_same(1.0, 0.0, "W/(m2 K)", "W/(m² K)", "W/(m²·K)", "W/(m2·K)", "W/m2/K"),
    },
    "area": {**_same(1.0, 0.0, "m2", "m^2", "m²"), **_same(1e-4, 0.0, "cm2", "cm^2", "cm²")},
    "rate": {
        **_same(1.0 / 3600.0, 0.0, "/h", "1/h", "per h", "per hour", "ACH"),
        **_same(1.0 / 60.0, 0.0, "/min", "1/min", "per min"),
        **_same(1.0, 0.0, "/s", "1/s", "per s"),
    },
    "mass flow": {
        **_same(1.0, 0.0, "kg/s"),
        **_same(1.0 / 60.0, 0.0, "kg/min"),
        **_same(1.0 / 3600.0, 0.0, "kg/h"),
        **_same(1e-3, 0.0, "g/s"),
        **_same(1e-3 / 60.0, 0.0, "g/min"),
        **_same(1e-3 / 3600.0, 0.0, "g/h"),
        **_same(_LB_kg / 3600.0, 0.0, "lb/h"),
        **_same(_LB_kg / 60.0, 0.0, "lb/min"),
    },
}
_LOOKUP = {kind: {k.casefold(): v for k, v in t.items()} for kind, t in _TABLES.items()}
_CANONICAL_PRESSURE = {k.casefold(): k for k in _TABLES["pressure"]}
_EXAMPLE = {
    "pressure": "200 barg",
    "pressure difference": "5 bar",
    "temperature": "15 °C",
    "temperature difference": "5 K",
    "volume": "50 L",
    "mass": "10 kg",
    "density": "100 kg/m3",
    "filling ratio": "0.75 kg/L",
    "fraction": "18 %",
    "duration": "4 min",
    "specific heat": "0.48 kJ/(kg K)",
    "heat transfer coefficient": "150 W/(m2 K)",
    "area": "0.8 m2",
    "rate": "1 /h",
    "mass flow": "0.5 kg/h",
}
_NUMBER_RE = re.compile(r"[+-]?(?:\d+(?:\.\d*)?|\.\d+)(?:[eE][+-]?\d+)?")
_NONFINITE_RE = re.compile(r"[+-]?(?:nan|inf(?:inity)?)(?![a-z])", re.IGNORECASE)
_PRESSURE_RE = re.compile(
    r"(pa|kpa|mpa|bar|mbar|psi|atm) ?(\( ?[ga] ?\)|gauge|gage|absolute|abs|g|a)?", re.IGNORECASE
)
_GLYPHS = (("℃", "°C"), ("℉", "°F"), ("º", "°"), ("˚", "°"))


def _split(text: object, kind: str, bare_ok: bool = False) -> tuple[float, str, str, str]:
    """Split quantity text into (value, quoted text, number text, normalised unit text)."""
    ex = _EXAMPLE[kind]
    if isinstance(text, numbers.Real) and not isinstance(text, bool) and not bare_ok:
        raise UnitError(f"'{text}' has no unit; write e.g. '{ex}'")
    if not isinstance(text, str):
        raise UnitError(f"'{text!r}' is not a quantity string; write e.g. '{ex}'")
    s = text.strip()
    q = f"'{s}'"
    if not s:
        raise UnitError(f"'' is empty; write a number and a unit, e.g. '{ex}'")
    if _NONFINITE_RE.match(s):
        raise UnitError(f"{q} is not a finite number; write e.g. '{ex}'")
    m = _NUMBER_RE.match(s)
    if m is None:
        raise UnitError(f"{q} does not start with a number; write e.g. '{ex}'")
    unit = " ".join(s[m.end() :].split())
    for glyph, plain in _GLYPHS:
        unit = unit.replace(glyph, plain)
    if unit[:1] in {",", "_"} or unit[:1].isdigit():
        raise UnitError(
            f"{q} has a thousands separator or a decimal comma; write plain digits "
            f"with '.' for decimals, e.g. '{ex}'"
        )
    if not unit and not bare_ok:
        raise UnitError(f"{q} has no unit; write e.g. '{ex}'")
    value = float(m.group())
    if not math.isfinite(value):
        raise UnitError(f"{q} is not a finite number; write e.g. '{ex}'")
    return value, q, m.group(), unit


def _kind_of(unit: str) -> str | None:
    """Name the kind of quantity ``unit`` belongs to, or None if it is no known unit."""
    if _PRESSURE_RE.fullmatch(unit):
        return "pressure"
    return next((kind for kind, t in _LOOKUP.items() if unit.casefold() in t), None)


def _refuse(table: str, unit: str, q: str, num: str, kind: str) -> NoReturn:
    """Raise the right UnitError for a unit that is not in ``table``."""
    ex = _EXAMPLE[kind]
    if table == "temperature" and unit.casefold() in {"c", "f"}:
        u = unit.upper()
        raise UnitError(f"{q} is ambiguous; write '{num} deg{u}' or '{num} °{u}'")
    other = _kind_of(unit)
    if other is not None:
        raise UnitError(f"{q} is a {other}, not a {kind}; write e.g. '{ex}'")
    accepted = ", ".join(_TABLES[table])
    raise UnitError(f"{q} has unknown unit '{unit}'; a {kind} takes one of: {accepted}")


def _lookup(
    table: str, unit: str, q: str, num: str, kind: str | None = None
) -> tuple[float, float]:
    """Return ``(factor, offset)`` for ``unit`` in ``table`` or raise UnitError."""
    hit = _LOOKUP[table].get(unit.casefold())
    if hit is None:
        _refuse(table, unit, q, num, kind or table)
    return hit


def _amount(text: str, kind: str) -> float:
    """Parse a quantity of ``kind`` that has no offset and cannot be negative."""
    value, q, num, unit = _split(text, kind)
    value *= _lookup(kind, unit, q, num)[0]
    if value < 0:
        raise UnitError(f"{q} is negative; a {kind} cannot be below zero")
    return value


def parse_pressure(text: str, atmospheric_pressure_Pa: float = STANDARD_ATMOSPHERE_Pa) -> float:
    """Parse a pressure that says whether it is gauge or absolute.

    Accepted: ``barg bara psig psia``, or any of ``Pa kPa MPa bar mbar psi atm`` followed, with
    or without a space, by ``g``/``a``, ``(g)``/``(a)`` or ``gauge``/``gage``/``absolute``/``abs``
    (e.g. ``"70 MPa(g)"``, ``"101.3 kPa absolute"``, ``"2 bar (a)"``). A bare unit is refused.

    Parameters
    ----------
    text : str
        Quantity text, e.g. ``"200 barg"``.
    atmospheric_pressure_Pa : float
        Ambient pressure [Pa] added to gauge readings.

    Returns
    -------
    float
        Absolute pressure [Pa], always > 0.
    """
    atm = float(atmospheric_pressure_Pa)
    if not (math.isfinite(atm) and atm > 0):
        raise UnitError(
            f"'{atmospheric_pressure_Pa} Pa' is not a valid atmospheric pressure; "
            "it must be a positive finite number of pascals"
        )
    value, q, num, unit = _split(text, "pressure")
    m = _PRESSURE_RE.fullmatch(unit)
    if m is None:
        _refuse("pressure", unit, q, num, "pressure")
    name = _CANONICAL_PRESSURE[m.group(1).casefold()]
    factor = _TABLES["pressure"][name][0]
    g, a = (
        (f"{name}g", f"{name}a") if name in {"bar", "mbar", "psi"} else (f"{name}(g)", f"{name}(a)")
    )
    if m.group(2) is None:
        raise UnitError(
            f"{q} does not say whether it is gauge or absolute; "
            f"write '{num} {g}' (gauge) or '{num} {a}' (absolute)"
        )
    gauge = m.group(2).strip("( )").lower().startswith("g")
    p = value * factor + (atm if gauge else 0.0)
    if not p > 0:
        limit = f" (a gauge pressure must be above '-{atm / factor:.6g} {g}')" if gauge else ""
        raise UnitError(
            f"{q} is at or below vacuum; an absolute pressure must be above zero{limit}"
        )
    return p


def parse_pressure_difference(text: str) -> float:
    """Parse a pressure span such as ``"5 bar"``, which is neither gauge nor absolute.

    Units: ``Pa kPa MPa bar mbar psi atm`` without a gauge/absolute label; may be negative.

    Returns
    -------
    float
        Pressure difference [Pa].
    """
    value, q, num, unit = _split(text, "pressure difference")
    m = _PRESSURE_RE.fullmatch(unit)
    if m is not None and m.group(2) is not None:
        name = _CANONICAL_PRESSURE[m.group(1).casefold()]
        raise UnitError(
            f"{q} is labelled gauge or absolute but a pressure difference is neither; "
            f"write '{num} {name}'"
        )
    return value * _lookup("pressure", unit, q, num, "pressure difference")[0]


def parse_temperature(text: str) -> float:
    """Parse a temperature in ``K kelvin degC °C 'deg C' celsius degF °F 'deg F' fahrenheit``.

    E.g. ``"15 °C"``; a bare ``C`` or ``F`` is refused as ambiguous.

    Returns
    -------
    float
        Thermodynamic temperature [K], always > 0.
    """
    value, q, num, unit = _split(text, "temperature")
    factor, offset = _lookup("temperature", unit, q, num)
    T = value * factor + offset
    if not T > 0:
        raise UnitError(
            f"{q} is at or below absolute zero; a temperature must be above "
            "0 K (-273.15 °C, -459.67 °F)"
        )
    return T


def parse_temperature_difference(text: str) -> float:
    """Parse a temperature difference: ``"5 K"``, ``"5 degC"`` and ``"9 degF"`` all give 5 K.

    Units: the temperature spellings, read as intervals; may be negative.

    Returns
    -------
    float
        Temperature difference [K].
    """
    value, q, num, unit = _split(text, "temperature difference")
    return value * _lookup("temperature", unit, q, num, "temperature difference")[0]


def parse_volume(text: str) -> float:
    """Parse a volume in ``L litre liter mL m3 m^3 m³ ft3 ft^3 ft³ 'cu ft' gal USgal 'US gal'``.

    E.g. ``"50 L"``; not negative. ``gal`` always means the US liquid gallon (3.785411784 L);
    imperial gallons are not accepted.

    Returns
    -------
    float
        Volume [m³].
    """
    return _amount(text, "volume")


def parse_mass(text: str) -> float:
    """Parse a mass in ``kg g lb lbs t tonne`` (``t`` is the metric tonne, 1000 kg).

    E.g. ``"10 kg"``; not negative.

    Returns
    -------
    float
        Mass [kg].
    """
    return _amount(text, "mass")


def parse_filling_ratio(text: str) -> float:
    """Parse a filling ratio (gas mass per water capacity) in ``kg/L g/L kg/m3``.

    E.g. ``"0.75 kg/L"`` (kg of gas per litre of water capacity); not negative.

    Returns
    -------
    float
        Filling ratio [kg/m³], e.g. 750.0 for ``"0.75 kg/L"``.
    """
    return _amount(text, "filling ratio")


def parse_density(text: str) -> float:
    """Parse a density in ``kg/m3 kg/m^3 kg/m³ kg/L g/L lb/ft3 lb/ft^3 lb/ft³``.

    E.g. ``"357.7 kg/m³"``; not negative.

    Returns
    -------
    float
        Density [kg/m³].
    """
    return _amount(text, "density")


def parse_duration(text: str) -> float:
    """Parse a duration in ``s sec min h``, e.g. ``"4 min"``; not negative.

    Returns
    -------
    float
        Duration [s].
    """
    return _amount(text, "duration")


def parse_specific_heat(text: str) -> float:
    """Parse a specific heat capacity in ``J/(kg K)`` or ``kJ/(kg K)`` (``·`` or ``/kg/K`` too).

    Returns
    -------
    float
        Specific heat capacity [J/(kg·K)].
    """
    return _amount(text, "specific heat")


def parse_heat_transfer_coefficient(text: str) -> float:
    """Parse a heat-transfer coefficient in ``W/(m2 K)`` (``m²``, ``·`` or ``/m2/K`` too).

    Returns
    -------
    float
        Heat-transfer coefficient [W/(m²·K)].
    """
    return _amount(text, "heat transfer coefficient")


def parse_area(text: str) -> float:
    """Parse an area in ``m2 m^2 m² cm2``, e.g. ``"0.8 m2"``; not negative.

    Returns
    -------
    float
        Area [m²].
    """
    return _amount(text, "area")


def parse_rate(text: str) -> float:
    """Parse a rate per unit time in ``/h 1/h ACH /min /s`` (``"per hour"`` too), e.g. a
    ventilation rate of ``"1 /h"`` air changes per hour; not negative.

    Returns
    -------
    float
        Rate [1/s].
    """
    return _amount(text, "rate")


def parse_mass_flow(text: str) -> float:
    """Parse a mass flow in ``kg/s kg/min kg/h g/s g/min g/h lb/h lb/min``, e.g.
    ``"0.5 kg/h"``; not negative.

    Returns
    -------
    float
        Mass flow [kg/s].
    """
    return _amount(text, "mass flow")


def parse_fraction(text: str | float | int) -> float:
    """Parse a fraction: a plain number (``0.18``, ``"0.18"``) or ``%``/``percent``/``ppm``.

    Unlike the other parsers a bare number is accepted, read as a fraction of one.

    Parameters
    ----------
    text : str or float or int
        E.g. ``"18 %"``, ``"0.18"`` or ``0.18``.

    Returns
    -------
    float
        Fraction [-], within [0, 1].
    """
    if isinstance(text, numbers.Real) and not isinstance(text, bool):
        shown = str(text) if len(str(text)) <= 40 else f"{str(text)[:39]}…"
        try:
            value, q = float(text), f"'{shown}'"
        except OverflowError:  # an integer beyond any float: far outside 0 to 1
            value, q = (2.0 if text > 0 else -2.0), f"'{shown}'"
        if not math.isfinite(value):
            raise UnitError(f"{q} is not a finite number; write e.g. '0.18' or '18 %'")
    else:
        value, q, num, unit = _split(text, "fraction", bare_ok=True)
        if unit:
            value *= _lookup("fraction", unit, q, num)[0]
    if not 0.0 <= value <= 1.0:
        raise UnitError(
            f"{q} is outside 0 to 1; write a fraction such as '0.18' or a percentage such as '18 %'"
        )
    return value


_SPELLING = {
    **dict.fromkeys(("degc", "°c", "deg c", "celsius"), "°C"),
    **dict.fromkeys(("degf", "°f", "deg f", "fahrenheit"), "°F"),
    "kelvin": "K",
    **dict.fromkeys(("m3", "m^3"), "m³"),
    **dict.fromkeys(("ft3", "ft^3", "cu ft"), "ft³"),
    **dict.fromkeys(("kg/m3", "kg/m^3"), "kg/m³"),
    **dict.fromkeys(("lb/ft3", "lb/ft^3"), "lb/ft³"),
    **dict.fromkeys(("litre", "liter"), "L"),
    **dict.fromkeys(("percent",), "%"),
    **dict.fromkeys(("m2", "m^2"), "m²"),
    **dict.fromkeys(("cm2", "cm^2"), "cm²"),
}
"""Other spellings of a unit and the one the reports print."""


def respell(text: str) -> str:
    """A quantity string with its unit spelled as the reports spell it, its number untouched.

    ``"15 degC"`` gives ``"15 °C"``, ``"200 bar(g)"`` and ``"200 bar gauge"`` give
    ``"200 barg"``, ``"50 m3"`` gives ``"50 m³"``. Text that is not one number and a known unit
    is returned as it is (the input has been read already; this only changes how it is shown).
    """
    s = " ".join(str(text).split())
    m = _NUMBER_RE.match(s)
    if m is None:
        return s
    num, unit = m.group(), s[m.end() :].strip()
    for glyph, plain in _GLYPHS:
        unit = unit.replace(glyph, plain)
    pressure = _PRESSURE_RE.fullmatch(unit)
    if pressure is not None:
        base = _CANONICAL_PRESSURE[pressure.group(1).casefold()]
        said = (pressure.group(2) or "").casefold().replace(" ", "").strip("()")
        if base in ("bar", "psi") and said in ("g", "gauge", "gage"):
            return f"{num} {base}g"
        if base in ("bar", "psi") and said in ("a", "absolute", "abs"):
            return f"{num} {base}a"
        mark = {"g": "(g)", "gauge": "(g)", "gage": "(g)", "a": "(a)", "absolute": "(a)"}
        return f"{num} {base}{mark.get(said, ' ' + said if said else '')}".rstrip()
    return f"{num} {_SPELLING.get(unit.casefold(), unit)}".rstrip()


def _num(value: float, digits: int) -> str:
    """Fixed-point text of ``value`` without a minus sign on a rounded zero."""
    if not math.isfinite(value):
        raise UnitError(f"'{value}' cannot be shown as a quantity; a finite number is needed")
    s = f"{value:.{digits}f}"
    return s[1:] if s.startswith("-") and float(s) == 0 else s


def _us(system: str) -> bool:
    if system not in ("metric", "us"):
        raise UnitError(f"'{system}' is not a unit system; use 'metric' or 'us'")
    return system == "us"


def format_pressure(
    Pa_abs: float,
    system: UnitSystem = "metric",
    *,
    gauge: bool = True,
    atmospheric_pressure_Pa: float = STANDARD_ATMOSPHERE_Pa,
    digits: int = 1,
) -> str:
    """Show an absolute pressure [Pa] as ``barg``/``bara`` (metric) or ``psig``/``psia`` (us).

    ``gauge=True`` subtracts ``atmospheric_pressure_Pa`` [Pa], e.g. ``"200.0 barg"``.
    """
    unit, factor = ("psi", _PSI_Pa) if _us(system) else ("bar", 1e5)
    p = Pa_abs - atmospheric_pressure_Pa if gauge else Pa_abs
    return f"{_num(p / factor, digits)} {unit}{'g' if gauge else 'a'}"


def format_temperature(K: float, system: UnitSystem = "metric", digits: int = 1) -> str:
    """Show a temperature [K] as ``°C`` (metric) or ``°F`` (us), e.g. ``"15.0 °C"``."""
    if _us(system):
        return f"{_num(K / _F_K - 459.67, digits)} °F"
    return f"{_num(K - 273.15, digits)} °C"


def format_temperature_difference(K: float, system: UnitSystem = "metric", digits: int = 1) -> str:
    """Show a temperature difference [K] as ``K`` (metric) or ``°F`` (us), e.g. ``"9.0 °F"``."""
    return f"{_num(K / _F_K, digits)} °F" if _us(system) else f"{_num(K, digits)} K"


def format_mass(
    kg: float, system: UnitSystem = "metric", digits: int = 2, down: bool = False
) -> str:
    """Show a mass [kg] as ``kg`` (metric) or ``lb`` (us), e.g. ``"8.87 kg"``.

    With ``down`` the figure is rounded down in the unit shown (a largest safe charge must never
    be printed above itself); a value already on the shown resolution, to 1e-9 of it, is kept."""
    x = kg / _LB_kg if _us(system) else kg
    if down and math.isfinite(x):
        q = 10.0 ** (-digits)
        x = math.floor(x / q + 1e-9) * q
    return f"{_num(x, digits)} lb" if _us(system) else f"{_num(x, digits)} kg"


def format_volume(m3: float, system: UnitSystem = "metric", digits: int = 1) -> str:
    """Show a volume [m³] as ``L`` (metric) or US ``gal`` (us), e.g. ``"50.0 L"``."""
    if _us(system):
        return f"{_num(m3 / _USGAL_m3, digits)} gal"
    return f"{_num(m3 * 1e3, digits)} L"


def format_room_volume(m3: float, system: UnitSystem = "metric", digits: int = 2) -> str:
    """Show a room's (or a released gas's) volume [m³] as ``m³`` (metric) or ``ft³`` (us),
    e.g. ``"9.38 m³"``."""
    if _us(system):
        return f"{_num(m3 / _FT3_m3, max(digits - 1, 0))} ft³"
    return f"{_num(m3, digits)} m³"


def format_duration(s: float | None) -> str:
    """Show a time [s] in minutes or hours and minutes (``"42 min"``, ``"1 h 55 min"``);
    ``None`` is "never"."""
    if s is None:
        return "never"
    if s < 30.0:
        return "under 1 min" if s > 0.0 else "0 min"
    minutes = round(s / 60.0)
    if minutes < 60:
        return f"{minutes} min"
    return f"{minutes // 60} h {minutes % 60} min"


def format_density(kg_m3: float, system: UnitSystem = "metric", digits: int | None = None) -> str:
    """Show a density [kg/m³] as ``kg/m³`` (metric, 1 digit) or ``lb/ft³`` (us, 2 digits)."""
    if _us(system):
        return f"{_num(kg_m3 * _FT3_m3 / _LB_kg, 2 if digits is None else digits)} lb/ft³"
    return f"{_num(kg_m3, 1 if digits is None else digits)} kg/m³"


def format_filling_ratio(
    kg_m3: float, system: UnitSystem = "metric", digits: int | None = None
) -> str:
    """Show a filling ratio [kg/m³] as ``kg/L`` (metric, 3 digits) or, in US units, as a
    filling density: the percentage of the water capacity's weight of water at 60 °F (1 digit),
    e.g. ``"68.0 % filling density"``."""
    if _us(system):
        return f"{format_filling_density(kg_m3, 1 if digits is None else digits)} filling density"
    return f"{_num(kg_m3 / 1e3, 3 if digits is None else digits)} kg/L"


def format_charge_density(kg_m3: float, system: UnitSystem = "metric") -> str:
    """Show a vessel's charge per water capacity [kg/m³] as a density in ``kg/m³`` (metric) or,
    as the US trade states it, a filling density (``"66.7 % filling density"``)."""
    return format_filling_ratio(kg_m3, system) if _us(system) else format_density(kg_m3, system)


def format_share(x: float, digits: int = 1, signed: bool = False) -> str:
    """Show a fraction [-] as a percentage with a space before the sign, as the reports write
    every percentage: ``"46.3 %"``, signed ``"+46.3 %"``."""
    return f"{_num(100.0 * x, digits) if not signed else f'{100.0 * x:+.{digits}f}'} %"


def format_filling_density(kg_m3: float, digits: int = 1) -> str:
    """Show a filling ratio [kg/m³] as a US filling density [%], e.g. ``"68.0 %"``."""
    return f"{_num(100.0 * kg_m3 / WATER_DENSITY_60F_kg_m3, digits)} %"


def pressure_rate_per_K(Pa_per_K: float, system: UnitSystem = "metric", digits: int = 1) -> str:
    """Show a pressure rise per temperature [Pa/K] as ``bar/K`` (metric) or ``psi/°F`` (us)."""
    if _us(system):
        return f"{_num(Pa_per_K * _F_K / _PSI_Pa, digits)} psi/°F"
    return f"{_num(Pa_per_K / 1e5, digits)} bar/K"
