"""The cases that once passed wrongly, each with its numbers from an independent reference.

Every expected figure is recomputed here with CoolProp 8.0.0's evaluation of the same published
equation (Span & Wagner 1996 for carbon dioxide and 2003 for nitrogen; Lemmon et al. 2009 for
propane; Guder & Wagner 2009 for sulfur hexafluoride; Gao et al. 2020 for ammonia), not taken
from fillcheck. Migration notes in README.md list the same cases.
"""

from __future__ import annotations

import CoolProp.CoolProp as CP
import numpy as np
import pytest

from fillcheck.assess.charge import DEFAULT_VAPOUR_SPACE
from fillcheck.assess.planning import read_gauge, stop_table
from fillcheck.assess.vessel import assess_vessel
from fillcheck.errors import InputError
from fillcheck.report.caution_text import caution_text
from fillcheck.scenario.resolve import scenario_from_dict

ATM = 101_325.0
BAR = 1e5


def _assess(gas: str, volume_L: float, fill: dict, storage: dict, limits: dict):
    raw = {
        "vessel": [
            {
                "id": "SV-1",
                "gas": gas,
                "water_capacity": f"{volume_L} L",
                "fill": fill,
                "storage": storage,
                "limits": limits,
            }
        ]
    }
    sc = scenario_from_dict(raw, "cases.toml")
    v = sc.vessels[0]
    return v, sc.reference_temperature_K, assess_vessel(v, sc.reference_temperature_K)


def _codes(a) -> dict[str, str]:
    return {f.code: f.severity for f in a.findings}


def test_a_fill_hotter_than_storage_is_checked_at_its_own_state() -> None:
    # Nitrogen 50 L at 305 barg with the gas at 75 °C; storage to 65 °C; allowable 300 barg.
    # The fill state itself is 305 barg > 300 barg (the stated fill), so the check must fail.
    _v, _T_ref, a = _assess(
        "nitrogen",
        50,
        {"pressure": "305 barg", "temperature": "75 degC"},
        {"max_temperature": "65 degC", "min_temperature": "-20 degC"},
        {"allowable_pressure": "300 barg"},
    )
    assert a.verdict == "fail"
    assert _codes(a)["allowable-exceeded"] == "fail"
    rho = CP.PropsSI("D", "T", 348.15, "P", 305 * BAR + ATM, "Nitrogen")
    assert a.density_kg_m3 == pytest.approx(rho, rel=1e-9)
    # the allowable is reached below the fill temperature, on the isochore (CoolProp)
    T_reach = a.allowable_reached_at_K
    assert T_reach is not None and T_reach < 348.15
    assert CP.PropsSI("P", "T", T_reach, "D", rho, "Nitrogen") == pytest.approx(
        300 * BAR + ATM, rel=1e-7
    )
    # and the plan, if it gives a stop pressure at 75 °C, gives one below the allowable
    if a.max_safe_fill_pressure_Pa is not None:
        assert a.max_safe_fill_pressure_Pa < 300 * BAR + ATM


@pytest.mark.parametrize(
    ("gas", "cp_name", "volume_L", "fill", "top_C", "allowable_barg"),
    [
        # liquid-full above about 22.1 °C, still below Tc = 31.0 °C at the top
        ("carbon dioxide", "CO2", 50, {"filling_ratio": "0.75 kg/L"}, 30.0, 250),
        # liquid-full above about 46.8 °C
        ("propane", "Propane", 50, {"filling_ratio": "0.455 kg/L"}, 50.0, 30),
        ("sulfur hexafluoride", "SulfurHexafluoride", 10, {"mass": "15.6 kg"}, 14.0, 100),
    ],
)
def test_liquid_full_at_the_top_fails(gas, cp_name, volume_L, fill, top_C, allowable_barg) -> None:
    _v, _T_ref, a = _assess(
        gas,
        volume_L,
        fill,
        {"max_temperature": f"{top_C} degC", "min_temperature": "0 degC"},
        {"allowable_pressure": f"{allowable_barg} barg"},
    )
    assert _codes(a).get("liquid-full-at-top") == "fail"
    assert a.verdict == "fail"
    rho = a.density_kg_m3
    # the liquid-full temperature: where the saturated liquid density equals the charge's
    # density (CoolProp), below the top of the range
    T_full = a.liquid_full_above_K
    assert T_full is not None and T_full < top_C + 273.15
    assert CP.PropsSI("D", "T", T_full, "Q", 0, cp_name) == pytest.approx(rho, rel=1e-8)
    # the pressure then rises by bar per kelvin (CoolProp's (∂P/∂T)ρ at the top)
    dPdT = CP.PropsSI("d(P)/d(T)|Dmass", "T", top_C + 273.15, "D", rho, cp_name)
    assert dPdT > 1e5
    assert a.dP_dT_at_max_Pa_K == pytest.approx(dPdT, rel=1e-6)
    # the finding names how far above the top the allowable is reached (CoolProp, on the
    # isochore); the plan keeps the built-in vapour space, so it is below this charge
    assert a.max_safe_charge_kg is not None
    assert a.max_safe_charge_kg < a.charged_mass_kg


def test_liquid_full_window_below_a_supercritical_top_stays_a_warning() -> None:
    # Carbon dioxide 0.75 kg/L to 65 °C: full of liquid from about 22.1 °C to the critical
    # temperature; at the top it is supercritical and the pressure limit judges it.
    _v, _T_ref, a = _assess(
        "carbon dioxide",
        50,
        {"filling_ratio": "0.75 kg/L"},
        {"max_temperature": "65 degC", "min_temperature": "0 degC"},
        {"allowable_pressure": "300 barg"},
    )
    codes = _codes(a)
    assert "liquid-full-at-top" not in codes
    assert codes.get("liquid-full") == "warning"
    P_top = CP.PropsSI("P", "T", 338.15, "D", 750.0, "CO2")
    assert a.max_state.pressure_Pa == pytest.approx(P_top, rel=1e-9)
    assert a.verdict == ("pass" if P_top < 300 * BAR + ATM else "fail")


def test_ammonia_plan_does_not_collapse_to_the_vapour_density() -> None:
    # Ammonia 100 L, allowable 29 barg, storage to 50 °C. The vapour pressure at 50 °C is
    # 20.3 bara (CoolProp), well below the allowable: the limit binds only on the liquid
    # branch, so the plan is set by the vapour space kept at 50 °C, not by the vapour density.
    _v, _T_ref, a = _assess(
        "ammonia",
        100,
        {"mass": "50 kg"},
        {"max_temperature": "50 degC", "min_temperature": "-20 degC"},
        {"allowable_pressure": "29 barg"},
    )
    assert a.verdict == "pass"
    T = 323.15
    rl = CP.PropsSI("D", "T", T, "Q", 0, "Ammonia")
    rv = CP.PropsSI("D", "T", T, "Q", 1, "Ammonia")
    at_floor = (rv + (1 - DEFAULT_VAPOUR_SPACE) * (rl - rv)) * 0.1  # kg in 100 L
    assert a.max_safe_charge_kg is not None
    assert a.max_safe_charge_kg > 50.0
    assert a.max_safe_charge_kg <= at_floor
    # the liquid-density uncertainty is applied to the built-in rule, so within a few percent
    assert a.max_safe_charge_kg > 0.95 * at_floor
    assert a.max_safe_charge_kg > 20 * rv * 0.1  # far above the vapour-density collapse


def test_plan_of_a_liquefied_gas_keeps_vapour_space_at_the_top() -> None:
    # Propane 50 L, no filling-ratio limit: the plan keeps 5 % vapour space at 50 °C.
    _v, _T_ref, a = _assess(
        "propane",
        50,
        {"mass": "20 kg"},
        {"max_temperature": "50 degC", "min_temperature": "-20 degC"},
        {"allowable_pressure": "30 barg"},
    )
    T = 323.15
    rl = CP.PropsSI("D", "T", T, "Q", 0, "Propane")
    rv = CP.PropsSI("D", "T", T, "Q", 1, "Propane")
    plan = a.max_safe_charge_kg
    assert plan is not None
    rho = plan / 0.05
    liquid_share = (rho - rv) / (rl - rv)  # lever rule at 50 °C (CoolProp densities)
    assert liquid_share <= 1 - DEFAULT_VAPOUR_SPACE
    # followed as a fill by mass, the plan passes and is not liquid-full at 50 °C
    _, _, b = _assess(
        "propane",
        50,
        {"mass": f"{plan} kg"},
        {"max_temperature": "50 degC", "min_temperature": "-20 degC"},
        {"allowable_pressure": "30 barg"},
    )
    assert b.verdict == "pass", [f.code for f in b.findings]
    assert b.liquid_full_above_K is None or b.liquid_full_above_K > T


def test_a_charge_with_little_vapour_space_at_the_top_is_warned() -> None:
    # Propane at 97 % liquid by volume at 50 °C (lever rule on CoolProp's saturated densities).
    T = 323.15
    rl = CP.PropsSI("D", "T", T, "Q", 0, "Propane")
    rv = CP.PropsSI("D", "T", T, "Q", 1, "Propane")
    kg = (rv + 0.97 * (rl - rv)) * 0.05
    _v, _T_ref, a = _assess(
        "propane",
        50,
        {"mass": f"{kg:.4f} kg"},
        {"max_temperature": "50 degC", "min_temperature": "-20 degC"},
        {"allowable_pressure": "30 barg"},
    )
    assert _codes(a).get("vapour-space-low") == "warning"
    assert a.liquid_fraction_at_top == pytest.approx(0.97, abs=1e-4)


def test_settled_pressure_fill_of_dense_co2_is_refused() -> None:
    # CO2 settled at 150 barg at 15 °C: far above the vapour pressure at 13 °C (CoolProp
    # 46.9 bara), where the vessel is full of liquid and a 2 K error overfills it.
    with pytest.raises(InputError, match=r"fill\.settled_pressure"):
        _assess(
            "carbon dioxide",
            50,
            {"settled_pressure": "150 barg", "temperature": "15 degC"},
            {"max_temperature": "50 degC"},
            {"allowable_pressure": "250 barg"},
        )


def test_check_and_reading_refuse_the_same_co2_pressure() -> None:
    # CO2 at 55 barg, 20 °C: the vapour pressure at 18 °C is 54.0 bara (CoolProp), so 56.0 bara
    # lies above (1 − 5 %) of it: both the fill check and the gauge reading refuse it.
    Psat = CP.PropsSI("P", "T", 291.15, "Q", 0, "CO2")
    assert 56.0e5 > 0.95 * Psat
    with pytest.raises(InputError, match=r"fill\.pressure"):
        _assess(
            "carbon dioxide",
            50,
            {"pressure": "55 barg", "temperature": "20 degC"},
            {"max_temperature": "50 degC"},
            {"allowable_pressure": "250 barg"},
        )
    v, T_ref, _ = _assess(
        "carbon dioxide",
        13.4,
        {"mass": "10 kg"},
        {"max_temperature": "50 degC"},
        {"allowable_pressure": "250 barg"},
    )
    with pytest.raises(InputError, match="vapour pressure"):
        read_gauge(v, T_ref, 55 * BAR + ATM, 293.15)


def test_reading_gives_a_band_from_gauge_and_thermometer() -> None:
    # CO2 13.4 L read at 150 barg, 40 °C: the charge at the four corners of ±5 % and ±2 K,
    # each from CoolProp's density.
    v, T_ref, _ = _assess(
        "carbon dioxide",
        13.4,
        {"mass": "10 kg"},
        {"max_temperature": "50 degC"},
        {"allowable_pressure": "250 barg"},
    )
    P = 150 * BAR + ATM
    r = read_gauge(v, T_ref, P, 313.15)
    corners = [
        CP.PropsSI("D", "T", 313.15 + dT, "P", P * (1 + g), "CO2") * 0.0134
        for dT in (-2.0, 2.0)
        for g in (-0.05, 0.05)
    ]
    assert r.charge_kg == pytest.approx(CP.PropsSI("D", "T", 313.15, "P", P, "CO2") * 0.0134)
    assert r.charge_low_kg == pytest.approx(min(corners), rel=1e-6)
    assert r.charge_high_kg == pytest.approx(max(corners), rel=1e-6)


def test_fire_temperatures_inside_the_equation_range_are_computed() -> None:
    # Nitrogen to 400 °C: inside Span et al. (2000)'s range (to 2000 K); computed, with the fire
    # caution, pressure from CoolProp on the same isochore.
    _v, _T_ref, a = _assess(
        "nitrogen",
        50,
        {"pressure": "200 barg", "temperature": "15 degC"},
        {"max_temperature": "400 degC"},
        {"allowable_pressure": "300 barg"},
    )
    rho = CP.PropsSI("D", "T", 288.15, "P", 200 * BAR + ATM, "Nitrogen")
    P_top = CP.PropsSI("P", "T", 673.15, "D", rho, "Nitrogen")
    assert a.max_state.pressure_Pa == pytest.approx(P_top, rel=1e-9)
    assert a.verdict == "fail"  # about 490 bara at 400 °C against 300 barg
    assert any(c.code == "fire" and "strength" in caution_text(c) for c in a.cautions)


def test_a_dense_supercritical_charge_gets_no_vapour_space_warning() -> None:
    # Air at 300 barg, 15 °C is denser than its critical density (CoolProp: 10.4 mol/dm³ ×
    # 28.96 g/mol ≈ 302 kg/m³) but at 65 °C it is 2.5 times its critical temperature: there is
    # no liquid and no vapour space to keep.
    _v, _T_ref, a = _assess(
        "air",
        50,
        {"pressure": "300 barg", "temperature": "15 degC"},
        {"max_temperature": "65 degC"},
        {"allowable_pressure": "500 barg"},
    )
    assert "vapour-space-low" not in _codes(a)
    assert a.verdict == "pass"


@pytest.mark.parametrize(("gas", "fill_barg", "allowable_barg"), [("oxygen", 300, 1000)])
def test_plan_and_stop_table_respect_the_model_range(gas, fill_barg, allowable_barg) -> None:
    # An allowable pressure above the model's published upper pressure (oxygen: Schmidt &
    # Wagner 1985, 80 MPa, as listed with the equation): the plan is bounded by the range and no
    # stop pressure is printed above it.
    v, T_ref, a = _assess(
        gas,
        50,
        {"pressure": f"{fill_barg} barg", "temperature": "15 degC"},
        {"max_temperature": "65 degC"},
        {"allowable_pressure": f"{allowable_barg} barg"},
    )
    P_max = v.fluid.validity.P_max_Pa
    if a.max_safe_fill_pressure_Pa is not None:
        assert a.max_safe_fill_pressure_Pa <= P_max * (1 + 1e-9)
    assert allowable_barg * BAR > P_max
    assert a.governing_limit == "the model's validity range"
    # the plan's pressure at the top of the range is at most the range's upper pressure
    rho = a.max_safe_charge_kg / 0.05
    assert CP.PropsSI("P", "T", 338.15, "D", rho, "Oxygen") <= P_max * (1 + 1e-9)
    table = stop_table(v, T_ref, np.arange(263.15, 333.16, 10.0))
    for row in table.rows:
        if row.safe_stop_pressure_Pa is not None:
            assert row.safe_stop_pressure_Pa <= P_max * (1 + 1e-9)
        if row.stop_pressure_Pa > P_max:
            assert row.outside_range


def test_check_and_stop_table_print_the_same_plan() -> None:
    # Argon 50 L, 200 barg settled at 15 °C, to 65 °C, allowable 300 barg.
    v, T_ref, a = _assess(
        "argon",
        50,
        {"settled_pressure": "200 barg", "temperature": "15 degC"},
        {"max_temperature": "65 degC", "min_temperature": "-20 degC"},
        {"allowable_pressure": "300 barg"},
    )
    table = stop_table(v, T_ref, np.arange(263.15, 333.16, 10.0))
    assert table.max_safe_charge_kg == a.max_safe_charge_kg
    assert round(a.max_safe_charge_kg * 100) == pytest.approx(a.max_safe_charge_kg * 100, abs=1e-6)


def test_a_liquid_full_window_just_below_the_critical_temperature_is_found() -> None:
    # R22 at 538.5 kg/m³ (Kamei et al. 1995): liquid-full from about 369.29 K, just below its
    # critical temperature of 369.295 K; CoolProp's saturated-liquid density gives the crossing.
    from scipy.optimize import brentq

    rho = 538.5
    Tc = CP.PropsSI("Tcrit", "R22")
    T_cp = brentq(lambda T: CP.PropsSI("D", "T", T, "Q", 0, "R22") - rho, 360.0, Tc - 1e-4)
    _, _, a = _assess(
        "R22",
        10,
        {"mass": f"{rho * 0.01} kg"},
        {"max_temperature": "100 degC", "min_temperature": "0 degC"},
        {"allowable_pressure": "100 barg"},
    )
    assert a.liquid_full_above_K == pytest.approx(T_cp, abs=1e-5)
    assert "liquid-full" in _codes(a)


def _register(gas: str, rows: list[dict]) -> list:
    raw = {"vessel": rows}
    sc = scenario_from_dict(raw, "register.toml")
    from fillcheck.assess import assess_scenario

    return assess_scenario(sc).vessels


def test_findings_of_a_vessel_do_not_depend_on_its_neighbours() -> None:
    # Hydrogen chloride 50 L at 0.6 kg/L to 60 °C: liquid-full from about 321 K, below its
    # critical temperature (324.7 K, CoolProp), supercritical at the top. Alone and among 60
    # copies with other charges, the same findings.
    def row(i: int, ratio: float) -> dict:
        return {
            "id": f"HCL-{i}",
            "gas": "hydrogen chloride",
            "water_capacity": "50 L",
            "fill": {"filling_ratio": f"{ratio} kg/L"},
            "storage": {"max_temperature": "60 degC", "min_temperature": "-10 degC"},
            "limits": {"allowable_pressure": "150 barg"},
        }

    alone = _register("hydrogen chloride", [row(0, 0.6)])[0]
    crowd = _register(
        "hydrogen chloride", [row(0, 0.6)] + [row(i, 0.2 + 0.007 * i) for i in range(1, 60)]
    )[0]
    assert "liquid-full" in {f.code for f in alone.findings}
    assert [(f.code, f.severity) for f in alone.findings] == [
        (f.code, f.severity) for f in crowd.findings
    ]
    assert alone.liquid_full_above_K == pytest.approx(crowd.liquid_full_above_K, abs=1e-9)
    assert alone.max_safe_charge_kg == crowd.max_safe_charge_kg
