"""Tests of fillcheck.units: conversion factors against pint, the parsing contract, the refusal
messages, and parse(format(x)) round trips."""

from __future__ import annotations

import ast
import math
from pathlib import Path

import pint
import pytest
from hypothesis import assume, given
from hypothesis import strategies as st

from fillcheck import units
from fillcheck.errors import InputError, UnitError
from fillcheck.units import (
    STANDARD_ATMOSPHERE_Pa,
    format_density,
    format_filling_ratio,
    format_mass,
    format_pressure,
    format_temperature,
    format_temperature_difference,
    format_volume,
    parse_density,
    parse_filling_ratio,
    parse_fraction,
    parse_mass,
    parse_pressure,
    parse_pressure_difference,
    parse_temperature,
    parse_temperature_difference,
    parse_volume,
    pressure_rate_per_K,
)

UREG = pint.UnitRegistry()
REL = 1e-12

# Every spelling in the module's tables, with the pint unit it must equal and pint's SI unit.
PINT_NAMES: dict[str, tuple[dict[str, str], str]] = {
    "pressure": ({"Pa": "Pa", "kPa": "kPa", "MPa": "MPa", "bar": "bar", "mbar": "mbar",
                  "psi": "psi", "atm": "atm"}, "Pa"),
    "temperature": ({"K": "kelvin", "kelvin": "kelvin", "degC": "degC", "°C": "degC",
                     "deg C": "degC", "celsius": "degC", "degF": "degF", "°F": "degF",
                     "deg F": "degF", "fahrenheit": "degF"}, "kelvin"),
    "volume": ({"L": "L", "litre": "L", "liter": "L", "mL": "mL", "m3": "m**3", "m^3": "m**3",
                "m³": "m**3", "ft3": "ft**3", "ft^3": "ft**3", "ft³": "ft**3", "cu ft": "ft**3",
                "gal": "gallon", "USgal": "gallon", "US gal": "gallon"}, "m**3"),
    "mass": ({"kg": "kg", "g": "g", "lb": "lb", "lbs": "lb", "t": "t", "tonne": "tonne"}, "kg"),
    "density": ({"kg/m3": "kg/m**3", "kg/m^3": "kg/m**3", "kg/m³": "kg/m**3", "kg/L": "kg/L",
                 "g/L": "g/L", "lb/ft3": "lb/ft**3", "lb/ft^3": "lb/ft**3",
                 "lb/ft³": "lb/ft**3"}, "kg/m**3"),
    "filling ratio": ({"kg/L": "kg/L", "g/L": "g/L", "kg/m3": "kg/m**3", "kg/m^3": "kg/m**3",
                       "kg/m³": "kg/m**3"}, "kg/m**3"),
    "fraction": ({"%": "percent", "percent": "percent", "ppm": "ppm"}, "dimensionless"),
    "duration": ({"s": "s", "sec": "s", "min": "min", "h": "hour"}, "s"),
    "specific heat": ({"J/(kg K)": "J/(kg*K)", "J/(kg·K)": "J/(kg*K)", "J/kg/K": "J/(kg*K)",
                       "kJ/(kg K)": "kJ/(kg*K)", "kJ/(kg·K)": "kJ/(kg*K)",
                       "kJ/kg/K": "kJ/(kg*K)"}, "J/(kg*K)"),
    "heat transfer coefficient": ({"W/(m2 K)": "W/(m**2*K)", "W/(m² K)": "W/(m**2*K)",
                                   "W/(m²·K)": "W/(m**2*K)", "W/(m2·K)": "W/(m**2*K)",
                                   "W/m2/K": "W/(m**2*K)"}, "W/(m**2*K)"),
    "area": ({"m2": "m**2", "m^2": "m**2", "m²": "m**2", "cm2": "cm**2", "cm^2": "cm**2",
              "cm²": "cm**2"}, "m**2"),
    "rate": ({"/h": "1/hour", "1/h": "1/hour", "per h": "1/hour", "per hour": "1/hour",
              "ACH": "1/hour", "/min": "1/min", "1/min": "1/min", "per min": "1/min",
              "/s": "1/s", "1/s": "1/s", "per s": "1/s"}, "1/s"),
    "mass flow": ({"kg/s": "kg/s", "kg/min": "kg/min", "kg/h": "kg/hour", "g/s": "g/s",
                   "g/min": "g/min", "g/h": "g/hour", "lb/h": "lb/hour",
                   "lb/min": "lb/min"}, "kg/s"),
}
PARSERS = {"volume": parse_volume, "mass": parse_mass, "density": parse_density,
           "filling ratio": parse_filling_ratio}
TABLE_ENTRIES = [(kind, spelling) for kind, (names, _) in PINT_NAMES.items() for spelling in names]


def pint_si(value: float, unit: str, si: str) -> float:
    return float(UREG.Quantity(value, unit).to(si).magnitude)


def refused(call, *args) -> str:
    with pytest.raises(UnitError) as info:
        call(*args)
    return str(info.value)


# --- factors and offsets against pint ------------------------------------------------------


def test_every_table_spelling_has_a_pint_reference():
    assert {k: set(t) for k, t in units._TABLES.items()} == {
        k: set(names) for k, (names, _) in PINT_NAMES.items()}


@pytest.mark.parametrize(("kind", "spelling"), TABLE_ENTRIES)
def test_table_factor_and_offset_match_pint(kind, spelling):
    names, si = PINT_NAMES[kind]
    factor, offset = units._TABLES[kind][spelling]
    for x in (-40.0, 0.0, 1.0, 15.0, 1234.5):
        assert x * factor + offset == pytest.approx(pint_si(x, names[spelling], si), rel=REL,
                                                     abs=1e-12)


@pytest.mark.parametrize("spelling", list(PINT_NAMES["pressure"][0]))
@pytest.mark.parametrize("x", [0.5, 3.0, 250.0])
def test_parse_pressure_absolute_and_difference_match_pint(spelling, x):
    expected = pint_si(x, PINT_NAMES["pressure"][0][spelling], "Pa")
    assert parse_pressure(f"{x} {spelling}(a)") == pytest.approx(expected, rel=REL)
    assert parse_pressure(f"{x} {spelling} absolute") == pytest.approx(expected, rel=REL)
    assert parse_pressure_difference(f"{x} {spelling}") == pytest.approx(expected, rel=REL)


@pytest.mark.parametrize("spelling", list(PINT_NAMES["temperature"][0]))
@pytest.mark.parametrize("x", [-40.0, 15.0, 300.0])
def test_parse_temperature_matches_pint(spelling, x):
    unit = PINT_NAMES["temperature"][0][spelling]
    expected = pint_si(x, unit, "kelvin")
    if expected <= 0:
        pytest.skip("below absolute zero; refusal is tested separately")
    assert parse_temperature(f"{x} {spelling}") == pytest.approx(expected, rel=REL)
    delta = unit if unit == "kelvin" else f"delta_{unit}"
    assert parse_temperature_difference(f"{x} {spelling}") == pytest.approx(
        pint_si(x, delta, "kelvin"), rel=REL)


@pytest.mark.parametrize("kind", list(PARSERS))
def test_parse_amounts_match_pint(kind):
    names, si = PINT_NAMES[kind]
    for spelling, unit in names.items():
        assert PARSERS[kind](f"2.5 {spelling}") == pytest.approx(pint_si(2.5, unit, si), rel=REL)


def test_documented_constants():
    assert parse_volume("1 gal") == pytest.approx(3.785411784e-3, rel=REL)
    assert parse_filling_ratio("0.75 kg/L") == pytest.approx(750.0, rel=REL)
    assert parse_pressure("1 atm(a)") == STANDARD_ATMOSPHERE_Pa
    assert parse_temperature("0 °C") == pytest.approx(273.15, rel=REL)
    assert parse_temperature("32 degF") == pytest.approx(273.15, rel=REL)
    assert parse_temperature_difference("9 degF") == pytest.approx(5.0, rel=REL)


def test_spellings_do_not_clash_when_case_is_ignored():
    for kind, table in units._TABLES.items():
        folded = {}
        for spelling, value in table.items():
            assert folded.setdefault(spelling.casefold(), value) == value, (kind, spelling)
    seen: dict[str, str] = {}
    for kind, table in units._TABLES.items():
        for spelling in table:
            other = seen.setdefault(spelling.casefold(), kind)
            assert other == kind or {other, kind} == {"density", "filling ratio"}, spelling


# --- accepted spellings ------------------------------------------------------------------


@pytest.mark.parametrize(("text", "expected"), [
    ("200 barg", 200e5 + STANDARD_ATMOSPHERE_Pa),
    ("200 bara", 200e5),
    ("200barg", 200e5 + STANDARD_ATMOSPHERE_Pa),
    ("  200 BARG  ", 200e5 + STANDARD_ATMOSPHERE_Pa),
    ("200 bar g", 200e5 + STANDARD_ATMOSPHERE_Pa),
    ("70 MPa(g)", 70e6 + STANDARD_ATMOSPHERE_Pa),
    ("70 mpa (G)", 70e6 + STANDARD_ATMOSPHERE_Pa),
    ("70 MPag", 70e6 + STANDARD_ATMOSPHERE_Pa),
    ("101.3 kPa absolute", 101.3e3),
    ("101.3 kPa ABSOLUTE", 101.3e3),
    ("101.3 kPa abs", 101.3e3),
    ("2 bar (a)", 2e5),
    ("2 bar( a )", 2e5),
    ("1.5e7 Pa(a)", 1.5e7),
    ("1.5E+7Pa(a)", 1.5e7),
    ("+.5 bara", 0.5e5),
    ("3000 psi gauge", 3000 * units._PSI_Pa + STANDARD_ATMOSPHERE_Pa),
    ("3000 psi gage", 3000 * units._PSI_Pa + STANDARD_ATMOSPHERE_Pa),
    ("3000 psig", 3000 * units._PSI_Pa + STANDARD_ATMOSPHERE_Pa),
    ("14.7 psia", 14.7 * units._PSI_Pa),
    ("500 mbarg", 500e2 + STANDARD_ATMOSPHERE_Pa),
    ("1 atm(a)", STANDARD_ATMOSPHERE_Pa),
    ("0 atm(g)", STANDARD_ATMOSPHERE_Pa),
    ("-0.5 barg", STANDARD_ATMOSPHERE_Pa - 0.5e5),
])
def test_parse_pressure_accepts(text, expected):
    assert parse_pressure(text) == pytest.approx(expected, rel=REL)


@pytest.mark.parametrize(("text", "expected"), [
    ("15 °C", 288.15), ("15°C", 288.15), ("15 degC", 288.15), ("15 deg C", 288.15),
    ("15 DEGC", 288.15), ("15 Celsius", 288.15), ("15 ℃", 288.15), ("15 ºC", 288.15),
    ("59 °F", 288.15), ("59 degF", 288.15), ("59 Fahrenheit", 288.15), ("59 ℉", 288.15),
    ("288.15 K", 288.15), ("288.15 kelvin", 288.15), ("-40 °F", 233.15), ("-40 °C", 233.15),
])
def test_parse_temperature_accepts(text, expected):
    assert parse_temperature(text) == pytest.approx(expected, rel=REL)


@pytest.mark.parametrize(("text", "expected"), [
    ("50 L", 0.05), ("50 l", 0.05), ("50 litre", 0.05), ("50 LITER", 0.05), ("50L", 0.05),
    ("500 mL", 5e-4), ("500 ml", 5e-4), ("0.05 m3", 0.05), ("0.05 m^3", 0.05),
    ("0.05 m³", 0.05), ("1 cu  ft", 0.3048**3), ("1 USgal", 3.785411784e-3),
    ("0 L", 0.0),
])
def test_parse_volume_accepts(text, expected):
    assert parse_volume(text) == pytest.approx(expected, rel=REL)


@pytest.mark.parametrize(("text", "expected"), [
    ("18 %", 0.18), ("18%", 0.18), ("18 percent", 0.18), ("0.18", 0.18), (0.18, 0.18),
    (1, 1.0), ("0", 0.0), ("100 %", 1.0), ("250 ppm", 250e-6),
])
def test_parse_fraction_accepts(text, expected):
    assert parse_fraction(text) == pytest.approx(expected, rel=REL)


def test_parse_pressure_difference_and_signs():
    assert parse_pressure_difference("5 bar") == pytest.approx(5e5, rel=REL)
    assert parse_pressure_difference("-2 psi") == pytest.approx(-2 * units._PSI_Pa, rel=REL)
    assert parse_temperature_difference("-5 degC") == pytest.approx(-5.0, rel=REL)


# --- gauge and absolute with a non-standard atmosphere ---------------------------------------


def test_gauge_uses_given_atmospheric_pressure_and_absolute_ignores_it():
    atm = 84_000.0  # roughly 1600 m above sea level
    assert parse_pressure("200 barg", atm) == pytest.approx(200e5 + atm, rel=REL)
    assert parse_pressure("10 kPa(g)", atmospheric_pressure_Pa=atm) == pytest.approx(
        10e3 + atm, rel=REL)
    assert parse_pressure("200 bara", atm) == pytest.approx(200e5, rel=REL)
    assert parse_pressure("-0.9 barg") == pytest.approx(STANDARD_ATMOSPHERE_Pa - 0.9e5)
    assert "below vacuum" in refused(parse_pressure, "-0.9 barg", atm)
    assert format_pressure(200e5 + atm, atmospheric_pressure_Pa=atm) == "200.0 barg"
    assert format_pressure(200e5 + atm, gauge=False, atmospheric_pressure_Pa=atm) == "200.8 bara"


@pytest.mark.parametrize("atm", [0.0, -1.0, math.nan, math.inf])
def test_bad_atmospheric_pressure_is_refused(atm):
    assert "atmospheric pressure" in refused(parse_pressure, "1 barg", atm)


# --- refusals and their messages ---------------------------------------------------------


def test_bare_bar_and_psi_and_atm_are_refused():
    assert refused(parse_pressure, "200 bar") == (
        "'200 bar' does not say whether it is gauge or absolute; "
        "write '200 barg' (gauge) or '200 bara' (absolute)")
    assert refused(parse_pressure, " 3000 PSI ") == (
        "'3000 PSI' does not say whether it is gauge or absolute; "
        "write '3000 psig' (gauge) or '3000 psia' (absolute)")
    assert refused(parse_pressure, "70 MPa") == (
        "'70 MPa' does not say whether it is gauge or absolute; "
        "write '70 MPa(g)' (gauge) or '70 MPa(a)' (absolute)")
    assert "gauge or absolute" in refused(parse_pressure, "1 atm")


def test_no_unit_and_empty_are_refused():
    assert refused(parse_volume, "50") == "'50' has no unit; write e.g. '50 L'"
    assert refused(parse_volume, 50) == "'50' has no unit; write e.g. '50 L'"
    assert refused(parse_pressure, "200") == "'200' has no unit; write e.g. '200 barg'"
    assert refused(parse_volume, "") == "'' is empty; write a number and a unit, e.g. '50 L'"
    assert refused(parse_temperature, "   ").startswith("'' is empty")
    assert refused(parse_mass, None).startswith("'None' is not a quantity string")


def test_unknown_unit_names_it_and_lists_accepted_ones():
    message = refused(parse_volume, "50 furlongs")
    assert message.startswith("'50 furlongs' has unknown unit 'furlongs'; a volume takes one of:")
    for spelling in ("L", "mL", "m3", "ft3", "gal"):
        assert spelling in message
    assert "'5 ton'" in refused(parse_mass, "5 ton")
    assert "unknown unit 'hPa(g)'" in refused(parse_pressure, "5 hPa(g)")


def test_wrong_kind_says_what_was_expected():
    assert refused(parse_volume, "50 kg") == "'50 kg' is a mass, not a volume; write e.g. '50 L'"
    assert refused(parse_pressure, "50 K") == (
        "'50 K' is a temperature, not a pressure; write e.g. '200 barg'")
    assert refused(parse_temperature, "200 barg") == (
        "'200 barg' is a pressure, not a temperature; write e.g. '15 °C'")
    assert "is a volume, not a density" in refused(parse_density, "1 L")
    assert "is a pressure, not a fraction" in refused(parse_fraction, "5 bara")
    assert "neither" in refused(parse_pressure_difference, "5 barg")


def test_below_vacuum_and_absolute_zero_are_refused():
    assert refused(parse_pressure, "-2 barg").startswith("'-2 barg' is at or below vacuum;")
    assert "below vacuum" in refused(parse_pressure, "0 bara")
    assert "below vacuum" in refused(parse_pressure, "-14.8 psig")
    assert refused(parse_temperature, "-300 °C").startswith(
        "'-300 °C' is at or below absolute zero;")
    assert "below absolute zero" in refused(parse_temperature, "0 K")
    assert "below absolute zero" in refused(parse_temperature, "-460 degF")


@pytest.mark.parametrize("text", ["nan L", "NaN L", "inf L", "-inf L", "Infinity L", "1e400 L"])
def test_non_finite_numbers_are_refused(text):
    assert refused(parse_volume, text) == f"'{text}' is not a finite number; write e.g. '50 L'"


@pytest.mark.parametrize("value", [math.nan, math.inf, -0.1, 1.5, "18", "-1 %", True])
def test_bad_fractions_are_refused(value):
    refused(parse_fraction, value)


@pytest.mark.parametrize("text", ["1,000 L", "1 000 L", "1,5 L", "1_000 L"])
def test_thousands_separators_and_decimal_commas_are_refused(text):
    message = refused(parse_volume, text)
    assert message.startswith(f"'{text}' has a thousands separator or a decimal comma;")


@pytest.mark.parametrize("text", ["15 C", "59 F", "15 c"])
def test_bare_celsius_and_fahrenheit_letters_are_refused(text):
    assert "is ambiguous" in refused(parse_temperature, text)


@pytest.mark.parametrize(("kind", "text"), [("volume", "-1 L"), ("mass", "-2 kg"),
                                            ("filling ratio", "-0.1 kg/L"),
                                            ("density", "-5 kg/m3")])
def test_negative_amounts_are_refused(kind, text):
    assert refused(PARSERS[kind], text) == f"'{text}' is negative; a {kind} cannot be below zero"


@pytest.mark.parametrize("text", ["__import__('os') L", "abc", "L 50", "(50) L", ". L"])
def test_non_numbers_are_refused(text):
    assert "does not start with a number" in refused(parse_volume, text)


def test_expressions_are_not_evaluated():
    assert "unknown unit '*3 L'" in refused(parse_volume, "2*3 L")
    assert "unknown unit '.3 L'" in refused(parse_volume, "1.2.3 L")


def test_unit_error_is_an_input_error_and_value_error():
    with pytest.raises(InputError):
        parse_volume("5")
    with pytest.raises(ValueError):
        parse_volume("5")


def test_module_imports_only_the_standard_library():
    tree = ast.parse(Path(units.__file__).read_text(encoding="utf-8"))
    imported = {alias.name for node in ast.walk(tree) if isinstance(node, ast.Import)
                for alias in node.names}
    imported |= {node.module for node in ast.walk(tree) if isinstance(node, ast.ImportFrom)}
    assert imported <= {"__future__", "math", "numbers", "re", "typing", "fillcheck.errors"}
    assert "eval(" not in Path(units.__file__).read_text(encoding="utf-8")


# --- formatting ----------------------------------------------------------------------------


def test_format_examples():
    atm = STANDARD_ATMOSPHERE_Pa
    assert format_pressure(200e5 + atm) == "200.0 barg"
    assert format_pressure(200e5 + atm, "us") == "2900.8 psig"
    assert format_pressure(201.3e5, gauge=False) == "201.3 bara"
    assert format_pressure(2915.5 * units._PSI_Pa, "us", gauge=False) == "2915.5 psia"
    assert format_pressure(atm + 1e-3) == "0.0 barg"  # no '-0.0'
    assert format_pressure(atm - 1e-3) == "0.0 barg"
    assert format_temperature(288.15) == "15.0 °C"
    assert format_temperature(288.15, "us") == "59.0 °F"
    assert format_temperature_difference(5.0) == "5.0 K"
    assert format_temperature_difference(5.0, "us") == "9.0 °F"
    assert format_mass(8.87) == "8.87 kg"
    assert format_mass(8.87, "us") == "19.56 lb"
    assert format_volume(0.05) == "50.0 L"
    assert format_volume(0.05, "us") == "13.2 gal"
    assert format_density(357.7) == "357.7 kg/m³"
    assert format_density(357.7, "us") == "22.33 lb/ft³"
    assert format_density(357.7, digits=0) == "358 kg/m³"
    assert format_filling_ratio(750.0) == "0.750 kg/L"
    # US filling density: 750 kg/m³ over water at 60 °F, 999.017 kg/m³ (IAPWS-95 via CoolProp)
    assert format_filling_ratio(750.0, "us") == "75.1 % filling density"
    assert pressure_rate_per_K(1.2e5) == "1.2 bar/K"
    assert pressure_rate_per_K(1.2e5, "us") == "9.7 psi/°F"


def test_format_refuses_non_finite_and_unknown_system():
    with pytest.raises(UnitError):
        format_mass(math.nan)
    with pytest.raises(UnitError):
        format_temperature(math.inf)
    with pytest.raises(UnitError):
        format_volume(1.0, "imperial")  # type: ignore[arg-type]


# --- round trips ---------------------------------------------------------------------------

systems = st.sampled_from(["metric", "us"])
digit_counts = st.integers(min_value=0, max_value=4)


@given(p=st.floats(1e2, 1e9), system=systems, gauge=st.booleans(), digits=digit_counts,
       atm=st.floats(7e4, 1.1e5))
def test_pressure_round_trip(p, system, gauge, digits, atm):
    unit_Pa = units._PSI_Pa if system == "us" else 1e5
    tol = 0.5 * 10.0**-digits * unit_Pa * (1 + 1e-9) + 1e-12 * p
    assume(p > tol)  # rounding a near-vacuum gauge reading could cross vacuum
    text = format_pressure(p, system, gauge=gauge, atmospheric_pressure_Pa=atm, digits=digits)
    assert text.endswith("g" if gauge else "a")
    assert abs(parse_pressure(text, atm) - p) <= tol


@given(T=st.floats(0.5, 5000.0), system=systems, digits=digit_counts)
def test_temperature_round_trip(T, system, digits):
    unit_K = 5 / 9 if system == "us" else 1.0
    tol = 0.5 * 10.0**-digits * unit_K * (1 + 1e-9) + 1e-12 * T
    assume(tol < T)
    assert abs(parse_temperature(format_temperature(T, system, digits)) - T) <= tol


@given(dT=st.floats(-500.0, 500.0), system=systems, digits=digit_counts)
def test_temperature_difference_round_trip(dT, system, digits):
    tol = 0.5 * 10.0**-digits * (5 / 9 if system == "us" else 1.0) * (1 + 1e-9) + 1e-12
    text = format_temperature_difference(dT, system, digits)
    assert abs(parse_temperature_difference(text) - dT) <= tol


@given(x=st.floats(0.0, 1e4), system=systems, digits=digit_counts)
def test_amount_round_trips(x, system, digits):
    us = system == "us"
    cases = [
        (format_mass, parse_mass, units._LB_kg if us else 1.0),
        (format_volume, parse_volume, units._USGAL_m3 if us else 1e-3),
        (format_density, parse_density, units._LB_kg / units._FT3_m3 if us else 1.0),
    ]
    for fmt, parse, unit_si in cases:
        tol = 0.5 * 10.0**-digits * unit_si * (1 + 1e-9) + 1e-12 * x
        assert abs(parse(fmt(x, system, digits)) - x) <= tol
    tol = 0.5 * 10.0**-digits * 1e3 * (1 + 1e-9) + 1e-12 * x
    assert abs(parse_filling_ratio(format_filling_ratio(x, "metric", digits)) - x) <= tol
