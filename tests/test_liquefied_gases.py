"""Liquefied gases: never planned, filled or read by pressure where liquid is present."""

from __future__ import annotations

from pathlib import Path

import CoolProp.CoolProp as CP
import pytest
from typer.testing import CliRunner

from fillcheck.assess import assess_scenario
from fillcheck.cli import app
from fillcheck.errors import InputError
from fillcheck.scenario.resolve import scenario_from_dict

ROOT = Path(__file__).resolve().parents[1]


def _scenario(fill: dict, gas: str = "propane", **top) -> dict:
    return {
        **top,
        "vessel": [
            {
                "id": "L1",
                "gas": gas,
                "water_capacity": "43 L",
                "fill": fill,
                "storage": {"max_temperature": "50 degC", "min_temperature": "-15 degC"},
                "limits": {"allowable_pressure": "30 barg"},
            }
        ],
    }


def test_a_pressure_fill_at_the_vapour_pressure_is_refused() -> None:
    # propane's vapour pressure at 15 °C is 7.32 bar absolute (Lemmon et al. 2009 via CoolProp)
    assert CP.PropsSI("P", "T", 288.15, "Q", 0, "Propane") == pytest.approx(7.32e5, rel=2e-3)
    with pytest.raises(InputError, match="weigh the fill"):
        scenario_from_dict(_scenario({"pressure": "7 barg", "temperature": "15 degC"}))
    # well below it the vessel holds only vapour, and the pressure does fix the charge
    scenario_from_dict(_scenario({"pressure": "3 barg", "temperature": "15 degC"}))


def test_the_plan_of_a_liquefied_gas_is_by_weight() -> None:
    a = assess_scenario(
        scenario_from_dict(_scenario({"mass": "15 kg", "temperature": "20 degC"}))
    ).vessels[0]
    assert a.fill_by_weight and a.max_safe_fill_pressure_Pa is None
    from fillcheck.report.content import Formatter, fill_plan

    assert "by weight" in fill_plan(a, Formatter("metric", 101325.0))


def test_a_gauge_reading_near_the_vapour_pressure_is_refused_even_off_by_a_kelvin() -> None:
    res = CliRunner().invoke(
        app,
        [
            "reading",
            str(ROOT / "scenarios" / "beverage_co2_cage.toml"),
            "--vessel",
            "CO2-13L-A",
            "--pressure",
            "55 barg",
            "--temperature",
            "20 degC",
        ],
    )
    assert res.exit_code == 2 and "weigh it" in res.output


def test_a_reading_below_the_triple_point_is_refused() -> None:
    res = CliRunner().invoke(
        app,
        [
            "reading",
            str(ROOT / "scenarios" / "welding_supply_refill.toml"),
            "--vessel",
            "AR-50-014",
            "--pressure",
            "215 barg",
            "--temperature",
            "-200 degC",
        ],
    )
    assert res.exit_code == 2 and "triple point" in res.output


def test_the_atmosphere_must_be_absolute() -> None:
    with pytest.raises(InputError, match="absolute"):
        scenario_from_dict(_scenario({"mass": "15 kg"}, atmospheric_pressure="1 barg"))


def test_stop_table_of_an_overfilled_plan_exits_1() -> None:
    res = CliRunner().invoke(
        app,
        [
            "stop-table",
            str(ROOT / "scenarios" / "welding_supply_refill.toml"),
            "--vessel",
            "N2-50-007",
            "--width",
            "100",
        ],
    )
    assert res.exit_code == 1 and "ABOVE the largest charge within the limits" in res.output
