"""Cylinder markings (INTERFACES.md §5): working and service pressure, test pressure, tare.

Check values come from CoolProp 8.0.0's evaluation of the published reference equations
(nitrogen: Span, Lemmon, Jacobsen, Wagner, Yokozeki 2000; argon: Tegeler, Span, Wagner 1999;
carbon dioxide: Span, Wagner 1996), named beside each value; 70 °F = 294.261 K is the exact
conversion (70 − 32)·5/9 + 273.15.
"""

from __future__ import annotations

import json
from pathlib import Path

import CoolProp.CoolProp as CP
import pytest
from typer.testing import CliRunner

from fillcheck.assess import assess_scenario
from fillcheck.assess.planning import stop_table
from fillcheck.cli import app
from fillcheck.errors import InputError
from fillcheck.report.wording import finding_message
from fillcheck.scenario.register import register_from_text
from fillcheck.scenario.resolve import scenario_from_dict

ATM = 101_325.0
PSI = 6894.757293168361  # Pa per psi (NIST SP 811)
T15 = 288.15
T70F = (70.0 - 32.0) * 5.0 / 9.0 + 273.15
V = 0.05  # 50 L water capacity [m³]


def _vessel(gas: str, fill: dict, marking: dict | None = None, **extra) -> dict:
    v = {
        "id": "CYL-1",
        "gas": gas,
        "water_capacity": "50 L",
        "fill": fill,
        "storage": {"max_temperature": "65 degC", "min_temperature": "-20 degC"},
        "limits": {"allowable_pressure": "300 barg"},
        **extra,
    }
    if marking is not None:
        v["marking"] = marking
    return v


def _assess(*vessels: dict):
    sc = scenario_from_dict({"vessel": list(vessels)}, "marks.toml")
    return assess_scenario(sc).vessels, sc


def _codes(a) -> set[str]:
    return {f.code for f in a.findings}


def _mass_kg(fluid: str, T: float, P: float) -> float:
    """Charge of a 50 L vessel at (T, P) by CoolProp's reference equation [kg]."""
    return CP.PropsSI("D", "T", T, "P", P, fluid) * V


# --- working pressure (15 °C) ------------------------------------------------------------


def test_fill_exactly_at_working_pressure_passes_and_5_percent_over_fails() -> None:
    # charges from CoolProp (Span et al. 2000) at 15 °C and 200 barg, and at 210 barg (5 % over)
    at = _mass_kg("Nitrogen", T15, 200e5 + ATM)
    over = _mass_kg("Nitrogen", T15, 210e5 + ATM)
    mark = {"working_pressure": "200 barg"}
    (a, b), _ = _assess(
        _vessel("nitrogen", {"mass": f"{at!r} kg"}, mark),
        {**_vessel("nitrogen", {"mass": f"{over!r} kg"}, mark), "id": "CYL-2"},
    )
    assert "working-pressure-exceeded" not in _codes(a)
    assert a.verdict == "pass"
    assert a.marking.settled_at_rated_Pa == pytest.approx(200e5 + ATM, rel=1e-9)
    assert "working-pressure-exceeded" in _codes(b)
    assert b.verdict == "fail"
    assert b.marking.settled_at_rated_Pa == pytest.approx(210e5 + ATM, rel=1e-9)


def test_settled_pressure_fill_at_working_pressure_passes() -> None:
    (a,), _ = _assess(
        _vessel(
            "nitrogen",
            {"settled_pressure": "200 barg", "temperature": "15 degC"},
            {"working_pressure": "200 barg"},
        )
    )
    assert a.verdict == "pass"
    margin = next(f for f in a.findings if f.code == "margin-working")
    assert "margin +0.0 bar" in finding_message(margin)


def test_plan_stops_at_the_working_pressure() -> None:
    # The plan is the charge at the working pressure (CoolProp, Span et al. 2000), rounded down
    # to the 10 g the reports print; with a 300 barg allowable the marking governs.
    full = _mass_kg("Nitrogen", T15, 200e5 + ATM)
    v = _vessel(
        "nitrogen",
        {"pressure": "150 barg", "temperature": "15 degC"},
        {"working_pressure": "200 barg"},
    )
    (a,), sc = _assess(v)
    assert a.governing_limit == "marked working pressure"
    assert full - 0.01 - 1e-9 <= a.max_safe_charge_kg <= full
    # the stop pressure at 15 °C is the working pressure less the 10 g rounding (< 0.1 %)
    stop = a.max_safe_fill_pressure_Pa
    assert 200e5 + ATM - 0.001 * 200e5 <= stop <= 200e5 + ATM
    # stop-table plans the same largest charge
    table = stop_table(sc.vessels[0], sc.reference_temperature_K, [T15])
    assert table.max_safe_charge_kg == pytest.approx(a.max_safe_charge_kg, abs=1e-9)
    # and that plan, checked as a fill by mass, passes
    (b,), _ = _assess(
        _vessel(
            "nitrogen", {"mass": f"{a.max_safe_charge_kg!r} kg"}, {"working_pressure": "200 barg"}
        )
    )
    assert b.verdict == "pass"


def test_without_marking_the_allowable_governs() -> None:
    (a,), _ = _assess(_vessel("nitrogen", {"pressure": "150 barg", "temperature": "15 degC"}))
    assert a.governing_limit == "allowable pressure"
    assert a.marking is None


# --- service pressure (70 °F) and an allowance ---------------------------------------------


def test_service_pressure_at_70F_against_coolprop() -> None:
    # argon (Tegeler et al. 1999 via CoolProp): charge at 2015 psig and 70 °F passes, the charge
    # at 5 % over (2115.75 psig) fails; the plan is the charge at 2015 psig
    P = 2015 * PSI + ATM
    at = _mass_kg("Argon", T70F, P)
    over = _mass_kg("Argon", T70F, 2015 * 1.05 * PSI + ATM)
    mark = {"service_pressure": "2015 psig"}
    (a, b), _ = _assess(
        _vessel("argon", {"mass": f"{at!r} kg"}, mark),
        {**_vessel("argon", {"mass": f"{over!r} kg"}, mark), "id": "CYL-2"},
    )
    assert a.verdict == "pass"
    assert a.marking.rated_temperature_K == pytest.approx(294.261111, abs=1e-6)
    assert a.marking.settled_at_rated_Pa == pytest.approx(P, rel=1e-9)
    assert b.verdict == "fail" and "working-pressure-exceeded" in _codes(b)
    assert a.governing_limit == "marked service pressure"
    assert at - 0.01 - 1e-9 <= a.max_safe_charge_kg <= at


def test_allowance_is_an_input_never_a_default() -> None:
    # 2200 psig settled at 70 °F: over a 2015 psig service pressure, within its 10 % allowance
    # (2216.5 psig); charge by CoolProp (Tegeler et al. 1999)
    m = _mass_kg("Argon", T70F, 2200 * PSI + ATM)
    plain, _ = _assess(_vessel("argon", {"mass": f"{m!r} kg"}, {"service_pressure": "2015 psig"}))
    allowed, _ = _assess(
        _vessel(
            "argon", {"mass": f"{m!r} kg"}, {"service_pressure": "2015 psig", "allowance": "10 %"}
        )
    )
    assert "working-pressure-exceeded" in _codes(plain[0])
    assert "working-pressure-exceeded" not in _codes(allowed[0])
    assert allowed[0].marking.rated_limit_Pa == pytest.approx(2015 * 1.1 * PSI + ATM, rel=1e-12)


def test_liquefied_gas_settles_at_its_vapour_pressure() -> None:
    # carbon dioxide at 0.68 kg/L in a cylinder marked 1800 psig service pressure: at 70 °F it is
    # two-phase at its vapour pressure, 5.87 MPa by CoolProp (Span & Wagner 1996), well below
    Psat = CP.PropsSI("P", "T", T70F, "Q", 0, "CO2")
    (a,), _ = _assess(
        {
            **_vessel(
                "carbon dioxide", {"filling_ratio": "0.68 kg/L"}, {"service_pressure": "1800 psig"}
            ),
            "storage": {"max_temperature": "50 degC", "min_temperature": "-20 degC"},
            "limits": {"allowable_pressure": "250 barg"},
        }
    )
    assert a.marking.settled_at_rated_Pa == pytest.approx(Psat, rel=1e-6)
    assert "working-pressure-exceeded" not in _codes(a)
    assert a.governing_limit != "marked service pressure"


# --- test pressure and tare --------------------------------------------------------------


def test_marked_test_pressure_feeds_the_rule_set() -> None:
    fill = {"pressure": "200 barg", "temperature": "15 degC"}
    rules = {"set": "p200-compressed"}
    (a,), _ = _assess(
        _vessel("nitrogen", fill, {"test_pressure": "300 barg"}, rules=rules),
    )
    (b,), _ = _assess(
        _vessel("nitrogen", fill, rules={"set": "p200-compressed", "test_pressure": "300 barg"}),
    )
    assert a.max_safe_charge_kg == b.max_safe_charge_kg
    assert a.limits_checked == b.limits_checked
    # two thirds of 300 barg (gauge, as the rule states it) settled at 15 °C: CoolProp density
    two_thirds = _mass_kg("Nitrogen", T15, 200e5 + ATM)
    assert a.max_safe_charge_kg <= two_thirds


def test_gross_mass_is_tare_plus_charge() -> None:
    (a,), _ = _assess(
        _vessel(
            "nitrogen",
            {"settled_pressure": "200 barg", "temperature": "15 degC"},
            {"working_pressure": "200 barg", "tare_mass": "58.5 kg"},
        )
    )
    assert a.marking.gross_mass_kg == pytest.approx(58.5 + a.charged_mass_kg, abs=1e-12)
    assert a.marking.max_safe_gross_mass_kg == pytest.approx(58.5 + a.max_safe_charge_kg, abs=1e-12)
    # a tare in lb as stamped: 129 lb = 58.513 kg (1 lb = 0.45359237 kg exactly)
    (b,), _ = _assess(_vessel("nitrogen", {"mass": "10 kg"}, {"tare_mass": "129 lb"}))
    assert b.marking.gross_mass_kg == pytest.approx(129 * 0.45359237 + 10.0, abs=1e-9)


# --- command line, JSON and register -----------------------------------------------------

RUNNER = CliRunner()

SCENARIO = """
[[vessel]]
id = "N2-50-031"
gas = "nitrogen"
water_capacity = "50 L"
fill = { settled_pressure = "200 barg", temperature = "15 degC" }
storage = { max_temperature = "65 degC", min_temperature = "-20 degC" }
limits = { allowable_pressure = "300 barg" }
marking = { working_pressure = "200 barg", test_pressure = "300 barg", tare_mass = "58.5 kg" }
"""


def test_json_and_report_carry_the_markings(tmp_path: Path) -> None:
    f = tmp_path / "m.toml"
    f.write_text(SCENARIO, encoding="utf-8")
    res = RUNNER.invoke(app, ["check", str(f), "--json"])
    assert res.exit_code == 0, res.output
    v = json.loads(res.stdout)["vessels"][0]
    assert v["gross_mass_kg"] == pytest.approx(58.5 + v["charged_mass_kg"], abs=1e-12)
    assert v["max_safe_gross_mass_kg"] == pytest.approx(58.5 + v["max_safe_charge_kg"], abs=1e-12)
    assert v["governing_limit"] == "marked working pressure"
    assert v["marking"]["rated_pressure_Pa"] == pytest.approx(200e5 + ATM)
    codes = {x["code"]: x for x in v["findings"]}
    assert codes["margin-working"]["message"].startswith("the marked working pressure 200.0 barg")
    assert codes["margin-working"]["data"]["limit_Pa"] == pytest.approx(200e5 + ATM)
    assert any("marked working pressure" in s for s in v["limits_checked"])
    res = RUNNER.invoke(app, ["check", str(f), "--width", "120"])
    assert res.exit_code == 0
    assert "scale reading of 69.70 kg" in res.stdout
    assert "marked working pressure governs" in res.stdout


def test_register_columns() -> None:
    text = (
        "id,gas,water_capacity,settled_pressure,fill_temperature,max_temperature,"
        "allowable_pressure,working_pressure,test_pressure,tare_mass\n"
        "A1,nitrogen,50 L,200 barg,15 degC,65 degC,300 barg,200 barg,300 barg,58.5 kg\n"
        "A2,nitrogen,50 L,210 barg,15 degC,65 degC,300 barg,200 barg,300 barg,58.5 kg\n"
        "A3,argon,50 L,2015 psig,70 degF,65 degC,300 barg,,,\n"
    )
    sc = register_from_text(text + "A4,argon,50 L,2015 psig,70 degF,65 degC,300 barg,,,\n", "r.csv")
    sc2 = register_from_text(
        "id,gas,water_capacity,settled_pressure,fill_temperature,max_temperature,"
        "allowable_pressure,service_pressure\n"
        "B1,argon,50 L,2015 psig,70 degF,65 degC,300 barg,2015 psig\n",
        "r2.csv",
    )
    a = assess_scenario(sc).vessels
    assert [x.verdict for x in a[:2]] == ["pass", "fail"]
    assert a[2].marking is None
    b = assess_scenario(sc2).vessels[0]
    # settled at 70 °F: the register's settled pressure is at the reference temperature, 15 °C,
    # so at 70 °F the pressure is higher and the 2015 psig service pressure is exceeded
    assert b.marking.settled_at_rated_Pa > 2015 * PSI + ATM
    assert "working-pressure-exceeded" in _codes(b)


@pytest.mark.parametrize(
    ("marking", "field", "words"),
    [
        (
            '{ working_pressure = "200 barg", service_pressure = "2900 psig" }',
            "marking.service_pressure",
            "not both",
        ),
        ('{ allowance = "10 %" }', "marking.allowance", "goes with a marked"),
        (
            '{ service_pressure = "2015 psig", allowance = "60 %" }',
            "marking.allowance",
            "from 0 to 50",
        ),
        (
            '{ working_pressure = "200 barg", test_pressure = "200 barg" }',
            "marking.test_pressure",
            "not above",
        ),
        ('{ working_pressure = "0 barg" }', "marking.working_pressure", "not above the atmosphere"),
        ('{ working_pressure = "200 bar" }', "marking.working_pressure", "gauge or absolute"),
        ('{ tare_mass = "0 kg" }', "marking.tare_mass", "larger than zero"),
        ('{ tare_mass = "58 furlongs" }', "marking.tare_mass", "furlongs"),
        (
            '{ working_presure = "200 barg" }',
            "marking.working_presure",
            "did you mean 'working_pressure'",
        ),
    ],
)
def test_bad_markings_are_refused_in_one_sentence(
    tmp_path: Path, marking: str, field: str, words: str
) -> None:
    head = SCENARIO.split("marking = ")[0]
    text = head + f"marking = {marking}\n"
    f = tmp_path / "bad.toml"
    f.write_text(text, encoding="utf-8")
    res = RUNNER.invoke(app, ["check", str(f)])
    assert res.exit_code == 2
    err = res.stderr.strip()
    assert "\n" not in err and "Traceback" not in err
    assert f"bad.toml: vessel 'N2-50-031', field '{field}'" in err
    assert words in err


def test_rules_need_a_test_pressure_from_somewhere() -> None:
    fill = {"pressure": "200 barg", "temperature": "15 degC"}
    with pytest.raises(InputError, match=r"field 'rules.test_pressure': is required unless"):
        _assess(_vessel("nitrogen", fill, rules={"set": "p200-compressed"}))
    with pytest.raises(InputError, match=r"differs from marking.test_pressure '300 barg'"):
        _assess(
            _vessel(
                "nitrogen",
                fill,
                {"test_pressure": "300 barg"},
                rules={"set": "p200-compressed", "test_pressure": "250 barg"},
            )
        )


def test_dense_supercritical_gas_gets_no_vapour_space_warning() -> None:
    # nitrogen filled cold to 300 barg at 0 degC: 328.3 kg/m³ by CoolProp (Span et al. 2000),
    # above its critical density 313.3 kg/m³, yet far above its critical temperature (126.2 K)
    # all through the range: there is no liquid and no vapour space to warn about
    rho = CP.PropsSI("D", "T", 273.15, "P", 300e5 + ATM, "Nitrogen")
    assert rho > CP.PropsSI("rhocrit", "Nitrogen")
    (a,), _ = _assess(
        {
            **_vessel("nitrogen", {"pressure": "300 barg", "temperature": "0 degC"}),
            "limits": {"allowable_pressure": "450 barg"},
        }
    )
    assert a.density_kg_m3 == pytest.approx(rho, rel=1e-9)
    assert "vapour-space-low" not in _codes(a)
    assert a.verdict == "pass"
