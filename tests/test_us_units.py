"""US conventions (issue 12, point 2): water capacity and tare in lb as stamped, filling density
as a percentage of the water capacity's weight of water, service pressure at 70 °F, and a file
written in US units reporting in US units.

Water at 60 °F: 999.017 kg/m³ (IAPWS-95, Wagner & Pruß 2002, evaluated by CoolProp 8.0.0 and
recomputed below); 1 lb = 0.45359237 kg exactly (international pound).
"""

from __future__ import annotations

from pathlib import Path

import CoolProp.CoolProp as CP
import pytest
from typer.testing import CliRunner

from fillcheck import units
from fillcheck.assess import assess_scenario
from fillcheck.cli import app
from fillcheck.scenario.resolve import load_scenario, scenario_from_dict

ROOT = Path(__file__).resolve().parents[1]
DOCK = ROOT / "scenarios" / "us_cylinder_dock.toml"
LB = 0.45359237
T60F = (60.0 - 32.0) * 5.0 / 9.0 + 273.15


def test_water_density_at_60F_against_coolprop() -> None:
    rho = CP.PropsSI("D", "T", T60F, "P", 101_325.0, "Water")
    assert units.WATER_DENSITY_60F_kg_m3 == pytest.approx(rho, abs=1e-3)


def test_filling_density_by_hand() -> None:
    # 50 lb of CO2 in a cylinder of 75 lb water capacity: 50/75 = 66.67 % (a hand calculation:
    # the water density cancels)
    sc = load_scenario(DOCK)
    a = next(v for v in assess_scenario(sc).vessels if v.id == "CO2-50LB-0610")
    V = 75 * LB / units.WATER_DENSITY_60F_kg_m3
    assert a.water_capacity_m3 == pytest.approx(V, rel=1e-12)
    assert a.charged_mass_kg == pytest.approx(50 * LB, rel=1e-12)
    assert 100 * a.density_kg_m3 / units.WATER_DENSITY_60F_kg_m3 == pytest.approx(
        200 / 3, rel=1e-12
    )
    assert units.format_filling_density(a.density_kg_m3) == "66.7 %"
    assert a.verdict == "pass"
    # 53/75 = 70.7 % is above the 68 % the limit allows
    b = next(v for v in assess_scenario(sc).vessels if v.id == "CO2-50LB-0611")
    assert "filling-ratio-exceeded" in {f.code for f in b.findings}
    # the plan is 68 % of 75 lb = 51.0 lb, rounded down to 10 g
    assert b.max_safe_charge_kg == pytest.approx(0.68 * 75 * LB, abs=0.01)
    assert b.max_safe_charge_kg <= 0.68 * 75 * LB


def test_a_file_in_us_units_reports_in_us_units() -> None:
    assert load_scenario(DOCK).units == "us"
    assert load_scenario(ROOT / "scenarios" / "welding_supply_refill.toml").units == "metric"
    res = CliRunner().invoke(app, ["check", str(DOCK), "--width", "120"])
    assert res.exit_code == 1  # one cylinder over its service pressure, one over 68 %
    assert "psig" in res.stdout and "barg" not in res.stdout
    assert "66.7 %" in res.stdout and "lb/ft³" not in res.stdout
    res = CliRunner().invoke(app, ["check", str(DOCK), "--width", "120", "--units", "metric"])
    assert "barg" in res.stdout


def test_scenario_level_units_choice() -> None:
    vessel = {
        "id": "V1",
        "gas": "argon",
        "water_capacity": "50 L",
        "fill": {"pressure": "200 barg", "temperature": "15 degC"},
        "storage": {"max_temperature": "65 degC"},
        "limits": {"allowable_pressure": "300 barg"},
    }
    assert scenario_from_dict({"vessel": [vessel]}).units == "metric"
    assert scenario_from_dict({"units": "us", "vessel": [vessel]}).units == "us"


def test_plus_mark_allowance_in_the_demo() -> None:
    # 2196 psig is 9 % over the 2015 psig service pressure: inside the "+" mark's 10 %
    sc = load_scenario(DOCK)
    got = {v.id: v for v in assess_scenario(sc).vessels}
    assert got["AR-3AA-0142-PLUS"].verdict == "pass"
    assert got["AR-3AA-0143"].verdict == "fail"
    assert "working-pressure-exceeded" in {f.code for f in got["AR-3AA-0143"].findings}
