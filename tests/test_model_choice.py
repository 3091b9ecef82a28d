"""Which model a scenario gets: the reference equation by default, a stated substitute otherwise."""

from __future__ import annotations

from fillcheck.assess import assess_scenario
from fillcheck.scenario.resolve import scenario_from_dict


def _one(gas: str, model: str | None) -> dict:
    v = {
        "id": "V",
        "gas": gas,
        "water_capacity": "10 L",
        "fill": {"pressure": "100 barg", "temperature": "20 degC"},
        "storage": {"max_temperature": "40 degC"},
        "limits": {"allowable_pressure": "300 barg"},
    }
    if model is not None:
        v["model"] = model
    return {"vessel": [v]}


def test_reference_asked_for_a_gas_that_has_one_is_used_without_a_warning() -> None:
    a = assess_scenario(scenario_from_dict(_one("argon", "reference"))).vessels[0]
    assert a.model == "reference"
    assert "model-substituted" not in {f.code for f in a.findings}


def test_reference_asked_for_a_gas_without_one_is_substituted_with_a_warning() -> None:
    a = assess_scenario(scenario_from_dict(_one("NF3", "reference"))).vessels[0]
    assert a.model == "pr"
    codes = {f.code: f.severity for f in a.findings}
    assert codes["model-substituted"] == "warning"


def test_vessels_of_one_gas_share_one_fluid() -> None:
    raw = _one("argon", None)
    raw["vessel"].append({**raw["vessel"][0], "id": "W"})
    sc = scenario_from_dict(raw)
    assert sc.vessels[0].fluid is sc.vessels[1].fluid
