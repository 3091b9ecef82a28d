"""Mixture input, as a user writes it: scenario gas tables, register cells, notes and refusals.

Independent references: molar masses from the catalog's published values (mass-fraction
conversion checked by hand arithmetic below), CoolProp 8.0.0 HEOS for the charge of a vessel
filled by pressure.
"""

from __future__ import annotations

import json
from pathlib import Path

import numpy as np
import pytest
from typer.testing import CliRunner

from fillcheck.cli import app
from fillcheck.errors import InputError
from fillcheck.scenario.register import register_from_text
from fillcheck.scenario.resolve import scenario_from_dict

CP = pytest.importorskip("CoolProp.CoolProp")


def vessel(gas, **extra):
    v = {
        "id": "MIX-1",
        "gas": gas,
        "water_capacity": "50 L",
        "fill": {"pressure": "150 barg", "temperature": "15 degC"},
        "storage": {"max_temperature": "50 degC", "min_temperature": "0 degC"},
        "limits": {"allowable_pressure": "300 barg"},
    }
    v.update(extra)
    return v


def test_mass_fractions_become_mole_fractions():
    sc = scenario_from_dict(
        {"vessel": [vessel({"nitrogen": 0.3, "carbon dioxide": 0.7}, composition_basis="mass")]}
    )
    f = sc.vessels[0].fluid
    # by hand: 0.3/28.0134 and 0.7/44.0098 g/mol (catalog molar masses), normalised
    n_n2, n_co2 = 0.3 / 28.0134, 0.7 / 44.0098
    assert dict(zip(f.component_names, f.z, strict=True))["nitrogen"] == pytest.approx(
        n_n2 / (n_n2 + n_co2), rel=1e-4
    )


def test_fractions_off_by_less_than_a_tenth_of_a_percent_are_scaled_with_a_note():
    sc = scenario_from_dict({"vessel": [vessel({"argon": "82 %", "carbon dioxide": "17.95 %"})]})
    v = sc.vessels[0]
    assert np.sum(v.fluid.z) == pytest.approx(1.0, abs=1e-15)
    assert any("scaled to 100 %" in n for n in v.notes)


def test_volume_percent_is_read_as_mole_percent_with_a_note():
    gas = {"argon": "82 %", "carbon dioxide": "18 %"}
    sc = scenario_from_dict({"vessel": [vessel(gas, composition_basis="volume")]})
    assert any("read as mole %" in n for n in sc.vessels[0].notes)


def test_pressure_fill_of_a_liquefied_mixture_is_refused():
    with pytest.raises(InputError, match=r"fill\.pressure.*may hold liquid"):
        scenario_from_dict(
            {
                "vessel": [
                    vessel(
                        {"propane": 0.6, "n-butane": 0.4},
                        fill={"pressure": "6 barg", "temperature": "15 degC"},
                    )
                ]
            }
        )


def test_rule_sets_are_refused_for_mixtures():
    with pytest.raises(InputError, match=r"rules\.set.*single gases"):
        scenario_from_dict(
            {
                "vessel": [
                    vessel(
                        {"argon": 0.82, "carbon dioxide": 0.18},
                        rules={"set": "p200-compressed", "test_pressure": "300 barg"},
                    )
                ]
            }
        )


def test_register_mixture_cell_matches_the_scenario_table():
    text = (
        "id,gas,water_capacity,fill_pressure,fill_temperature,max_temperature,allowable_pressure\n"
        "W1,argon 82 % + carbon dioxide 18 %,50 L,150 barg,15 degC,50 degC,300 barg\n"
    )
    reg = register_from_text(text, "r.csv")
    sc = scenario_from_dict({"vessel": [vessel({"argon": "82 %", "carbon dioxide": "18 %"})]})
    np.testing.assert_allclose(reg.vessels[0].fluid.z, sc.vessels[0].fluid.z, rtol=1e-15)


def test_register_mixture_cell_without_a_fraction_names_row_and_column():
    text = (
        "id,gas,water_capacity,fill_pressure,fill_temperature,max_temperature,allowable_pressure\n"
        "W1,argon + carbon dioxide 18 %,50 L,150 barg,15 degC,50 degC,300 barg\n"
    )
    with pytest.raises(InputError, match=r"row 2, column 'gas'.*argon 82 %"):
        register_from_text(text, "r.csv")


def test_check_json_of_a_mixture_vessel(tmp_path: Path):
    scen = tmp_path / "mix.toml"
    scen.write_text(
        """
[[vessel]]
id = "ARC-18"
gas = { argon = 0.82, "carbon dioxide" = 0.18 }
water_capacity = "50 L"
fill = { pressure = "150 barg", temperature = "15 degC" }
storage = { max_temperature = "50 degC", min_temperature = "0 degC" }
limits = { allowable_pressure = "300 barg" }
""",
        encoding="utf-8",
    )
    res = CliRunner().invoke(app, ["check", str(scen), "--json"])
    assert res.exit_code == 0, res.output
    v = json.loads(res.output)["vessels"][0]
    assert v["model"] == "reference"
    assert v["composition"] == pytest.approx({"argon": 0.82, "carbon dioxide": 0.18})
    assert v["liquid_dropout"] is None
    # the charge against CoolProp 8.0.0 HEOS (GERG-2008-form argon–CO2) at the fill state
    state = CP.AbstractState("HEOS", "Argon&CarbonDioxide")
    state.set_mole_fractions([0.82, 0.18])
    state.update(CP.PT_INPUTS, 150e5 + 101325.0, 288.15)
    assert v["density_kg_m3"] == pytest.approx(state.rhomass(), rel=1e-8)
