"""Safety margins that bite: every limit at equality, just under and just over, and the plan.

Each at-the-limit charge is computed here independently, with CoolProp 8.0.0 evaluating the same
reference equation fillcheck uses (Span et al. 2000 for nitrogen, Span and Wagner 1996 for carbon
dioxide, Lemmon, McLinden and Wagner 2009 for propane), and a root finder of scipy; fillcheck and
CoolProp agree to about 1e-11 on the same states, so the checks are tight (1e-7 relative), far
below the effect of any of the mutants of ``tools/mutants.py``, which names the test that kills
each one. The plan's rule is the README's: the model's uncertainty (0.2 % in density for a
reference equation, carried to the pressure by the isotherm's stiffness ∂ln P/∂ln ρ) and a 0.1 %
clearance below every pressure limit, a further 0.01 % below the relief setting
(assess/charge.py RELIEF_CLEARANCE), 5 % vapour space at the top of the checked range for a
liquefied gas with the saturated-liquid density less its 0.2 % uncertainty, rounded down to 10 g.

The second half is a table of every finding code of ``fillcheck/assess``, each asserted both
ways: a scenario where it appears with its severity and a neighbouring one where it does not.
"""

from __future__ import annotations

import math
import re
from typing import Any

import CoolProp.CoolProp as CP
import pytest
from scipy.optimize import brentq

from fillcheck.assess import assess_scenario
from fillcheck.assess.charge import BUILT_IN_VAPOUR_SPACE, largest_safe_density
from fillcheck.assess.result import VesselAssessment
from fillcheck.report.content import Formatter, fill_plan
from fillcheck.report.json_report import vessel_dict
from fillcheck.report.wording import finding_message
from fillcheck.scenario.resolve import scenario_from_dict

ATM = 101_325.0
U_RHO = 0.002  # density uncertainty of a reference equation (README, "Models and accuracy")
CLEARANCE = 1e-3  # the plan's clearance below every pressure limit (README, "Fill planning")
RELIEF_CLEARANCE = 1e-4  # the further clearance below the relief setting (assess/charge.py)
VAPOUR_SPACE = 0.05  # the built-in vapour space of a liquefied gas's plan (issue 11)
T65 = 338.15  # 65 °C [K]


def _vessel(
    gas: str | dict,
    fill: dict,
    limits: dict,
    storage: dict | None = None,
    capacity: str = "50 L",
    vid: str = "V1",
    **extra: Any,
) -> dict:
    return {
        "id": vid,
        "gas": gas,
        "water_capacity": capacity,
        "fill": fill,
        "storage": storage or {"max_temperature": "65 degC", "min_temperature": "-20 degC"},
        "limits": limits,
        **extra,
    }


def _assess(vessels: list[dict], **top: Any) -> list[VesselAssessment]:
    sc = scenario_from_dict({**top, "vessel": vessels}, "margins.toml")
    return assess_scenario(sc).vessels


def _one(*args: Any, top: dict | None = None, **kw: Any) -> VesselAssessment:
    return _assess([_vessel(*args, **kw)], **(top or {}))[0]


def _fails(a: VesselAssessment) -> set[str]:
    return {f.code for f in a.findings if f.severity == "fail"}


def _codes(a: VesselAssessment) -> dict[str, str]:
    return {f.code: f.severity for f in a.findings}


def _kg(x: float) -> str:
    return f"{x!r} kg"


def _pa(x: float) -> str:
    return f"{x!r} Pa(a)"


# --- independent figures: CoolProp on the same reference equations ----------------------------


def _cp_P(T: float, rho: float, name: str) -> float:
    return CP.PropsSI("P", "T", T, "Dmass", rho, name)


def _cp_stiffness(T: float, rho: float, name: str) -> float:
    """∂ln P/∂ln ρ at constant T, by CoolProp."""
    return rho / _cp_P(T, rho, name) * CP.PropsSI("d(P)/d(Dmass)|T", "T", T, "Dmass", rho, name)


def _cp_plan_density(T: float, P_limit: float, name: str) -> float:
    """The largest density [kg/m³] whose pressure at T keeps P_limit less the model's
    uncertainty and the clearance, in one phase above the critical temperature."""

    def excess(rho: float) -> float:
        u = U_RHO * max(1.0, _cp_stiffness(T, rho, name))
        return _cp_P(T, rho, name) - P_limit * (1.0 - u - CLEARANCE)

    hi = CP.PropsSI("Dmass", "T", T, "P", P_limit, name)
    return brentq(excess, 0.5 * hi, hi, xtol=1e-12, rtol=1e-14)


def _cp_density_at(T: float, P: float, name: str) -> float:
    return CP.PropsSI("Dmass", "T", T, "P", P, name)


N2_FILL = {"pressure": "200 barg", "temperature": "15 degC"}
RHO_N2 = _cp_density_at(288.15, 200e5 + ATM, "Nitrogen")  # 200 barg at 15 °C, by CoolProp


# --- the plan against CoolProp --------------------------------------------------------------


@pytest.mark.parametrize("limit", ["allowable", "relief"])
def test_plan_pressure_bound_against_coolprop(limit: str) -> None:
    if limit == "allowable":
        limits = {"allowable_pressure": "300 barg"}
        P_L, governing = 300e5 + ATM, "allowable pressure"
    else:
        limits = {"allowable_pressure": "400 barg", "relief_set_pressure": "330 barg"}
        P_L, governing = (330e5 + ATM) * (1.0 - RELIEF_CLEARANCE), "relief set pressure"
    sc = scenario_from_dict({"vessel": [_vessel("nitrogen", N2_FILL, limits)]}, "plan.toml")
    v = sc.vessels[0]
    safe = largest_safe_density(v.fluid, v, sc.reference_temperature_K, round_down=False)
    assert safe is not None and safe.governing == governing
    expected = _cp_plan_density(T65, P_L, "Nitrogen")  # CoolProp, Span et al. (2000)
    assert safe.density_mol * v.fluid.molar_mass == pytest.approx(expected, rel=1e-8)
    # the printed plan: that charge rounded down to 10 g
    a = assess_scenario(sc).vessels[0]
    assert a.max_safe_charge_kg == pytest.approx(math.floor(expected * 0.05 * 100) / 100, abs=1e-9)


def test_printed_plan_is_rounded_down_never_up() -> None:
    # One plan density (CoolProp, Span et al. 2000), many capacities: the charge printed in JSON
    # is the exact one rounded down to 10 g, never up. A capacity whose exact charge lies in the
    # upper half of its 10 g step is among them, so rounding to nearest would show.
    exact_rho = _cp_plan_density(T65, 300e5 + ATM, "Nitrogen")
    caps = [40.0 + 0.37 * i for i in range(24)]
    vs = [
        _vessel(
            "nitrogen",
            N2_FILL,
            {"allowable_pressure": "300 barg"},
            capacity=f"{c!r} L",
            vid=f"N{i}",
        )
        for i, c in enumerate(caps)
    ]
    upper_half = 0
    for c, a in zip(caps, _assess(vs), strict=True):
        exact = exact_rho * c / 1000.0
        printed = vessel_dict(a)["max_safe_charge_kg"]
        assert exact - 0.01 < printed <= exact, (c, exact, printed)
        assert printed == pytest.approx(math.floor(exact * 100.0) / 100.0, abs=1e-9)
        upper_half += (exact * 100.0) % 1.0 >= 0.5
    assert upper_half >= 3


def test_printed_plan_sentence_shows_the_json_figure() -> None:
    caps = [4.5, 8.0, 32.0, 37.5]
    vs = [
        _vessel(
            "nitrogen", N2_FILL, {"allowable_pressure": "300 barg"}, capacity=f"{c} L", vid=f"N{i}"
        )
        for i, c in enumerate(caps)
    ]
    for a in _assess(vs):
        said = re.search(r"up to ([0-9.]+) kg", fill_plan(a, Formatter("metric", ATM)))
        assert said is not None and said.group(1) == f"{vessel_dict(a)['max_safe_charge_kg']:.2f}"


def test_hot_fill_is_planned_at_its_own_temperature() -> None:
    # Issue 11, case 1: 305 barg with the gas at 75 °C, storage to 65 °C, allowable 300 barg.
    a = _one(
        "nitrogen",
        {"pressure": "305 barg", "temperature": "75 degC"},
        {"allowable_pressure": "300 barg"},
    )
    assert "allowable-exceeded" in _fails(a) and a.verdict == "fail"
    assert a.max_state.temperature_K == pytest.approx(348.15, abs=1e-9)
    expected = _cp_plan_density(348.15, 300e5 + ATM, "Nitrogen")  # CoolProp, at 75 °C
    assert a.max_safe_charge_kg == pytest.approx(math.floor(expected * 0.05 * 100) / 100, abs=1e-9)
    # the stop pressure at 75 °C of that printed charge, by CoolProp
    stop = _cp_P(348.15, a.max_safe_charge_kg / 0.05, "Nitrogen")
    assert a.max_safe_fill_pressure_Pa == pytest.approx(stop, rel=1e-8)


# --- each pressure limit: at equality, just under, just over --------------------------------


def test_allowable_just_under_passes_just_over_fails() -> None:
    # the charge whose pressure at 65 °C is the allowable 300 barg (CoolProp, Span et al. 2000)
    rho_star = brentq(lambda r: _cp_P(T65, r, "Nitrogen") - (300e5 + ATM), 100.0, 400.0, xtol=1e-13)
    limits = {"allowable_pressure": "300 barg"}
    under, over = (
        _one("nitrogen", {"mass": _kg(rho_star * f * 0.05)}, limits) for f in (1 - 1e-6, 1 + 1e-6)
    )
    assert "allowable-exceeded" not in _codes(under) and not _fails(under)
    assert under.allowable_reached_at_K is None
    # just under is inside the model's uncertainty: review, never pass and never fail
    assert _codes(under).get("margin-below-model-error") == "review" and under.verdict == "review"
    assert _codes(over).get("allowable-exceeded") == "fail" and over.verdict == "fail"
    assert over.allowable_reached_at_K == pytest.approx(T65, abs=1e-3)


def test_allowable_at_equality_is_not_exceeded() -> None:
    first = _one("nitrogen", N2_FILL, {"allowable_pressure": "400 barg"})
    P_top = first.max_state.pressure_Pa
    assert P_top == pytest.approx(_cp_P(T65, RHO_N2, "Nitrogen"), rel=1e-9)  # CoolProp
    at = _one("nitrogen", N2_FILL, {"allowable_pressure": _pa(P_top)})
    assert "allowable-exceeded" not in _codes(at)  # the rule: above the allowable fails
    assert at.allowable_reached_at_K == pytest.approx(T65, abs=1e-4)


def test_relief_reached_exactly_at_the_setting_fails() -> None:
    first = _one("nitrogen", N2_FILL, {"allowable_pressure": "400 barg"})
    P_top = first.max_state.pressure_Pa
    assert P_top == pytest.approx(_cp_P(T65, RHO_N2, "Nitrogen"), rel=1e-9)  # CoolProp
    limits = {"allowable_pressure": "400 barg"}
    at = _one("nitrogen", N2_FILL, {**limits, "relief_set_pressure": _pa(P_top)})
    assert _codes(at).get("relief-reached") == "fail" and at.verdict == "fail"
    assert at.relief_reached_at_K == pytest.approx(T65, abs=1e-4)
    above = _one("nitrogen", N2_FILL, {**limits, "relief_set_pressure": _pa(P_top * (1 + 1e-9))})
    assert "relief-reached" not in _codes(above) and not _fails(above)


def test_allowable_reached_at_against_coolprop() -> None:
    # inside the range: the temperature where the isochore of 200 barg at 15 °C reaches 240 barg
    T_star = brentq(lambda T: _cp_P(T, RHO_N2, "Nitrogen") - (240e5 + ATM), 288.15, T65, xtol=1e-12)
    a = _one("nitrogen", N2_FILL, {"allowable_pressure": "240 barg"})
    assert vessel_dict(a)["allowable_reached_at_K"] == pytest.approx(T_star, abs=1e-5)
    # 0.5 K above the top of the range: not reached in it, and the margin says how far above
    P_above = _cp_P(T65 + 0.5, RHO_N2, "Nitrogen")  # CoolProp
    b = _one("nitrogen", N2_FILL, {"allowable_pressure": _pa(P_above)})
    assert vessel_dict(b)["allowable_reached_at_K"] is None and "allowable-exceeded" not in _codes(
        b
    )
    assert b.limit_reached_K["allowable"] == pytest.approx(T65 + 0.5, abs=1e-5)
    margin = next(finding_message(f) for f in b.findings if f.code == "margin-allowable")
    assert "0.5 K above the maximum storage temperature" in margin


def test_gauge_figures_use_the_sites_atmosphere() -> None:
    # a yard at 0.85 bar absolute (an invented high site): gauge figures add 0.85 bar, not 1 atm
    a = _one(
        "nitrogen",
        N2_FILL,
        {"allowable_pressure": "300 barg"},
        top={"atmospheric_pressure": "0.85 bara"},
    )
    d = vessel_dict(a)
    assert d["limits"]["allowable_pressure_Pa"] == pytest.approx(300.85e5, rel=1e-12)
    rho = _cp_density_at(288.15, 200.85e5, "Nitrogen")  # CoolProp, 200 barg + 0.85 bar
    assert d["charged_mass_kg"] == pytest.approx(rho * 0.05, rel=1e-9)
    margin = next(
        finding_message(f, "metric", a.atmospheric_pressure_Pa)
        for f in a.findings
        if f.code == "margin-allowable"
    )
    assert margin.startswith("allowable pressure 300.0 barg")
    P_top = _cp_P(T65, rho, "Nitrogen")
    assert f"highest pressure {(P_top - 0.85e5) / 1e5:.1f} barg" in margin


# --- filling ratio ---------------------------------------------------------------------------


def test_filling_ratio_at_its_limit() -> None:
    limits = {"allowable_pressure": "250 barg", "max_filling_ratio": "0.67 kg/L"}
    storage = {"max_temperature": "50 degC", "min_temperature": "-20 degC"}
    at, over = (
        _one("carbon dioxide", {"filling_ratio": fr}, limits, storage)
        for fr in ("0.67 kg/L", "0.67000067 kg/L")
    )
    assert "filling-ratio-exceeded" not in _codes(at) and not _fails(at)
    assert _codes(over).get("filling-ratio-exceeded") == "fail" and over.verdict == "fail"
    # the plan: the limit itself (the pressure at 50 °C, 139 bar by CoolProp, is far below)
    assert _cp_P(323.15, 670.0, "CO2") < 200e5
    sc = scenario_from_dict(
        {"vessel": [_vessel("carbon dioxide", {"filling_ratio": "0.6 kg/L"}, limits, storage)]}
    )
    v = sc.vessels[0]
    safe = largest_safe_density(v.fluid, v, sc.reference_temperature_K, round_down=False)
    assert safe is not None and safe.governing == "maximum filling ratio"
    assert safe.density_mol * v.fluid.molar_mass == pytest.approx(670.0, rel=1e-12)
    assert at.max_safe_charge_kg == pytest.approx(33.5, abs=1e-9)


# --- vapour space and liquid-full -------------------------------------------------------------


def _cp_sat(T: float, name: str) -> tuple[float, float]:
    """Saturated liquid and vapour densities [kg/m³] at T, by CoolProp."""
    return CP.PropsSI("Dmass", "T", T, "Q", 0, name), CP.PropsSI("Dmass", "T", T, "Q", 1, name)


PROPANE_50 = {"max_temperature": "50 degC", "min_temperature": "-15 degC"}


def test_min_vapour_space_at_its_limit() -> None:
    # 5 % vapour space at 50 °C: the liquid may fill 95 % of the vessel (saturated densities of
    # Lemmon et al. 2009 via CoolProp). Within the model's 0.2 % saturated-liquid density
    # uncertainty of that share the call is "review"; beyond it, below passes and above fails.
    rl, rv = _cp_sat(323.15, "Propane")

    def charge(liquid_share: float) -> str:
        return _kg((rv + liquid_share * (rl - rv)) * 0.05)

    limits = {
        "allowable_pressure": "30 barg",
        "min_vapour_space": "5 %",
        "vapour_space_temperature": "50 degC",
    }
    lo, hi = 0.95 / (1.0 + U_RHO), 0.95 / (1.0 - U_RHO)
    below, in_lo, in_hi, above = _assess(
        [
            _vessel("propane", {"mass": charge(share)}, limits, PROPANE_50, vid=f"P{i}")
            for i, share in enumerate(
                (lo * (1 - 1e-6), lo * (1 + 1e-6), hi * (1 - 1e-6), hi * (1 + 1e-6))
            )
        ]
    )
    assert not {"vapour-space-too-small", "vapour-space-uncertain"} & set(_codes(below))
    assert below.verdict == "pass"
    for a in (in_lo, in_hi):
        assert _codes(a).get("vapour-space-uncertain") == "review" and a.verdict == "review"
    assert _codes(above).get("vapour-space-too-small") == "fail" and above.verdict == "fail"
    assert above.liquid_fraction_at_vapour_space_T == pytest.approx(hi, rel=1e-5)
    # the plan leaves 5 % beyond the liquid density's uncertainty: the scenario's own limit governs
    sc = scenario_from_dict({"vessel": [_vessel("propane", {"mass": "10 kg"}, limits, PROPANE_50)]})
    v = sc.vessels[0]
    safe = largest_safe_density(v.fluid, v, sc.reference_temperature_K, round_down=False)
    assert safe is not None and safe.governing == "minimum vapour space"
    # planned with the liquid density less its uncertainty, as the built-in rule (issue 11)
    expected = rv + 0.95 * (rl * (1.0 - U_RHO) - rv)
    assert safe.density_mol * v.fluid.molar_mass == pytest.approx(expected, rel=1e-8)


def test_built_in_vapour_space_plan_against_coolprop() -> None:
    # no vapour-space limit entered: the plan keeps 5 % at 50 °C, with the saturated liquid
    # density less its 0.2 % uncertainty (Lemmon et al. 2009 via CoolProp)
    rl, rv = _cp_sat(323.15, "Propane")
    expected = rv + (1.0 - VAPOUR_SPACE) * (rl * (1.0 - U_RHO) - rv)
    sc = scenario_from_dict(
        {
            "vessel": [
                _vessel("propane", {"mass": "10 kg"}, {"allowable_pressure": "30 barg"}, PROPANE_50)
            ]
        }
    )
    v = sc.vessels[0]
    safe = largest_safe_density(v.fluid, v, sc.reference_temperature_K, round_down=False)
    assert safe is not None and safe.governing == BUILT_IN_VAPOUR_SPACE
    assert safe.density_mol * v.fluid.molar_mass == pytest.approx(expected, rel=1e-8)
    a = assess_scenario(sc).vessels[0]
    assert a.max_safe_charge_kg == pytest.approx(math.floor(expected * 0.05 * 100) / 100, abs=1e-9)


def test_vapour_space_low_warning_at_five_percent() -> None:
    rl, rv = _cp_sat(323.15, "Propane")  # Lemmon et al. 2009 via CoolProp
    rho5 = rv + 0.95 * (rl - rv)  # 5 % vapour space left at 50 °C
    under, over = (
        _one(
            "propane", {"mass": _kg(rho5 * f * 0.05)}, {"allowable_pressure": "30 barg"}, PROPANE_50
        )
        for f in (1 - 1e-5, 1 + 1e-5)
    )
    assert "vapour-space-low" not in _codes(under)
    assert _codes(over).get("vapour-space-low") == "warning" and over.verdict == "pass"
    assert over.liquid_fraction_at_top == pytest.approx(0.95, abs=1e-4)


def test_liquid_full_at_top_just_under_and_just_over() -> None:
    # carbon dioxide to 20 °C: liquid-full at the top exactly where the charge is the saturated
    # liquid density at 20 °C, 773.39 kg/m³ (Span and Wagner 1996 via CoolProp)
    rl, _ = _cp_sat(293.15, "CO2")
    storage = {"max_temperature": "20 degC", "min_temperature": "-20 degC"}
    under, over = (
        _one(
            "carbon dioxide",
            {"mass": _kg(rl * f * 0.05)},
            {"allowable_pressure": "250 barg"},
            storage,
        )
        for f in (1 - 1e-6, 1 + 1e-6)
    )
    assert "liquid-full-at-top" not in _codes(under) and not _fails(under)
    assert _codes(under).get("vapour-space-low") == "warning"
    assert _codes(over).get("liquid-full-at-top") == "fail" and over.verdict == "fail"
    assert over.liquid_full_above_K == pytest.approx(293.15, abs=1e-4)


def test_liquid_full_temperature_against_coolprop() -> None:
    # carbon dioxide at 0.75 kg/L: liquid-full above 22.06 °C (Span and Wagner 1996 via CoolProp)
    T_full = CP.PropsSI("T", "Dmass", 750.0, "Q", 0, "CO2")
    storage = {"max_temperature": "30 degC", "min_temperature": "-20 degC"}
    a = _one(
        "carbon dioxide",
        {"filling_ratio": "0.75 kg/L"},
        {"allowable_pressure": "250 barg"},
        storage,
    )
    assert vessel_dict(a)["liquid_full_above_K"] == pytest.approx(T_full, abs=1e-6)
    top = next(finding_message(f) for f in a.findings if f.code == "liquid-full-at-top")
    assert f"above {T_full - 273.15:.1f} °C" in top


def test_two_phase_pressure_rise_against_coolprop() -> None:
    # propane two-phase at 50 °C: the rise is the slope of the vapour-pressure curve there,
    # a central difference of CoolProp's saturation pressures (Lemmon et al. 2009)
    a = _one("propane", {"mass": "15 kg"}, {"allowable_pressure": "30 barg"}, PROPANE_50)
    assert a.max_state.phase == "two-phase"
    h = 1e-3
    slope = (
        CP.PropsSI("P", "T", 323.15 + h, "Q", 0, "Propane")
        - CP.PropsSI("P", "T", 323.15 - h, "Q", 0, "Propane")
    ) / (2 * h)
    assert vessel_dict(a)["pressure_rise_at_max_Pa_per_K"] == pytest.approx(slope, rel=1e-5)


# --- every finding code, both ways ------------------------------------------------------------

CO2_50 = {"max_temperature": "50 degC", "min_temperature": "-20 degC"}
P200_CO2 = {"set": "p200-high-pressure-liquefied", "test_pressure": "190 barg"}
USER_GAS = {
    "name": "fluoroether X7",
    "molar_mass": "150.0 g/mol",
    "critical_temperature": "120 degC",
    "critical_pressure": "30 bara",
    "acentric_factor": 0.30,
}
VS_5_AT_50 = {"min_vapour_space": "5 %", "vapour_space_temperature": "50 degC"}
_RL50, _RV50 = _cp_sat(323.15, "Propane")  # Lemmon et al. 2009 via CoolProp
_P_TOP_N2 = _cp_P(T65, RHO_N2, "Nitrogen")  # 200 barg at 15 °C, at 65 °C (CoolProp)
_U_TOP_N2 = U_RHO * max(1.0, _cp_stiffness(T65, RHO_N2, "Nitrogen"))


def _n2(limits: dict, **kw: Any) -> dict:
    return _vessel("nitrogen", N2_FILL, {"allowable_pressure": "300 barg", **limits}, **kw)


def _propane(mass: float | str, limits: dict | None = None, **kw: Any) -> dict:
    m = mass if isinstance(mass, str) else _kg(mass)
    return _vessel(
        "propane",
        {"mass": m},
        {"allowable_pressure": "30 barg", **(limits or {})},
        PROPANE_50,
        **kw,
    )


def _co2(ratio: str, limits: dict | None = None, storage: dict | None = None, **kw: Any) -> dict:
    lim = {"allowable_pressure": "500 barg", **(limits or {})}
    return _vessel("carbon dioxide", {"filling_ratio": ratio}, lim, storage or CO2_50, **kw)


def _nf3(**kw: Any) -> dict:
    fill = {"pressure": "50 barg", "temperature": "15 degC"}
    storage = {"max_temperature": "50 degC"}
    return _vessel("nitrogen trifluoride", fill, {"allowable_pressure": "150 barg"}, storage, **kw)


def _n2_pr(bar: int) -> dict:
    fill = {"pressure": f"{bar} barg", "temperature": "15 degC"}
    limits = {"allowable_pressure": "700 barg"}
    return _vessel("nitrogen", fill, limits, {"max_temperature": "65 degC"}, model="pr")


def _mix(gas: dict, storage: dict | None = None, **kw: Any) -> dict:
    st = storage or {"max_temperature": "40 degC", "min_temperature": "-10 degC"}
    fill = {"pressure": "200 barg", "temperature": "15 degC"}
    return _vessel(gas, fill, {"allowable_pressure": "300 barg"}, st, **kw)


_CASES: list[tuple[str, str, dict, dict | None, dict]] = [
    # code, severity, a vessel where it appears, a neighbour where it does not (None: the code
    # is on every vessel), the scenario's top-level keys
    ("allowable-exceeded", "fail", _n2({"allowable_pressure": "240 barg"}), _n2({}), {}),
    (
        "relief-reached",
        "fail",
        _n2({"allowable_pressure": "400 barg", "relief_set_pressure": "240 barg"}),
        _n2({"allowable_pressure": "400 barg", "relief_set_pressure": "330 barg"}),
        {},
    ),
    (
        "filling-ratio-exceeded",
        "fail",
        _co2("0.70 kg/L", {"max_filling_ratio": "0.67 kg/L"}),
        _co2("0.70 kg/L", {"max_filling_ratio": "0.75 kg/L"}),
        {},
    ),
    (
        # 21.6 kg in 50 L: liquid fills 95.9 % at 50 °C, beyond the 0.2 % band around 95 %
        "vapour-space-too-small",
        "fail",
        _propane(21.6, VS_5_AT_50),
        _propane(20.0, VS_5_AT_50),
        {},
    ),
    (
        # Peng–Robinson–Péneloux, whose saturated-liquid density error for propane is 7.8 %:
        # liquid fills 94.8 % at 50 °C, within that error of the 95 % allowed
        "vapour-space-uncertain",
        "review",
        {**_propane(20.5, VS_5_AT_50), "model": "pr-peneloux"},
        {**_propane(15.0, VS_5_AT_50), "model": "pr-peneloux"},
        {},
    ),
    (
        # Peng–Robinson for nitrogen was measured up to 500 bar: 450 barg at 15 °C passes it at
        # 65 °C, 380 barg does not
        "outside-validity",
        "review",
        _n2_pr(450),
        _n2_pr(380),
        {},
    ),
    (
        "user-defined-gas",
        "review",
        _vessel(
            "fluoroether X7",
            {"pressure": "1 barg", "temperature": "15 degC"},
            {"allowable_pressure": "30 barg"},
            {"max_temperature": "50 degC", "min_temperature": "10 degC"},
        ),
        _n2({}),
        {"gas": [USER_GAS]},
    ),
    ("accuracy-unknown", "review", _nf3(), _n2({}), {}),
    (
        # a margin of 0.9 u to the allowable, u the reference equation's pressure uncertainty
        # there (0.2 % in density times the stiffness, CoolProp); 1.1 u in the neighbour
        "margin-below-model-error",
        "review",
        _n2({"allowable_pressure": _pa(_P_TOP_N2 / (1.0 - 0.9 * _U_TOP_N2))}),
        _n2({"allowable_pressure": _pa(_P_TOP_N2 / (1.0 - 1.1 * _U_TOP_N2))}),
        {},
    ),
    ("model-substituted", "warning", _nf3(model="reference"), _nf3(), {}),
    (
        # carbon dioxide at about its critical density, through 31 °C
        "near-critical",
        "warning",
        _co2("0.47 kg/L", storage={"max_temperature": "40 degC", "min_temperature": "-20 degC"}),
        _co2("0.47 kg/L", storage={"max_temperature": "0 degC", "min_temperature": "-20 degC"}),
        {},
    ),
    (
        "liquid-present",
        "warning",
        _propane(15.0),
        _vessel(
            "propane",
            {"pressure": "1 barg", "temperature": "15 degC"},
            {"allowable_pressure": "30 barg"},
            PROPANE_50,
        ),
        {},
    ),
    (
        # 0.75 kg/L to 65 °C: full of liquid from 22.1 °C to 31 °C, supercritical at the top
        "liquid-full",
        "warning",
        _co2("0.75 kg/L", storage={"max_temperature": "65 degC", "min_temperature": "-20 degC"}),
        _co2("0.40 kg/L", storage={"max_temperature": "65 degC", "min_temperature": "-20 degC"}),
        {},
    ),
    (
        "liquid-full-at-top",
        "fail",
        _co2("0.75 kg/L", storage={"max_temperature": "30 degC", "min_temperature": "-20 degC"}),
        _co2("0.75 kg/L", storage={"max_temperature": "20 degC", "min_temperature": "-20 degC"}),
        {},
    ),
    (
        # 4.9 % vapour space left at 50 °C, against 5.1 %
        "vapour-space-low",
        "warning",
        _propane((_RV50 + 0.951 * (_RL50 - _RV50)) * 0.05),
        _propane((_RV50 + 0.949 * (_RL50 - _RV50)) * 0.05),
        {},
    ),
    ("charge", "info", _n2({}), None, {}),
    ("margin-allowable", "info", _n2({}), None, {}),
    ("margin-relief", "info", _n2({"relief_set_pressure": "330 barg"}), _n2({}), {}),
    (
        "margin-filling-ratio",
        "info",
        _co2("0.60 kg/L", {"max_filling_ratio": "0.75 kg/L"}),
        _co2("0.60 kg/L"),
        {},
    ),
    ("rule-set", "info", _co2("0.60 kg/L", rules=P200_CO2), _co2("0.60 kg/L"), {}),
    (
        # P200 allows 0.68 kg/L of carbon dioxide at a test pressure of 190 bar
        "rule-broken",
        "fail",
        _co2("0.72 kg/L", rules=P200_CO2),
        _co2("0.60 kg/L", rules=P200_CO2),
        {},
    ),
    (
        # Peng–Robinson: no published kᵢⱼ for argon–carbon dioxide; nitrogen–argon has one
        # (DECHEMA via ChemSep pr.ipd)
        "interaction-unknown",
        "review",
        {**_mix({"argon": 0.82, "carbon dioxide": 0.18}), "model": "pr"},
        {**_mix({"argon": 0.82, "nitrogen": 0.18}), "model": "pr"},
        {},
    ),
    (
        # 99.95 % is scaled to 100 % and said so
        "composition-note",
        "info",
        _mix({"argon": 0.82, "carbon dioxide": 0.1795}),
        _mix({"argon": 0.82, "carbon dioxide": 0.18}),
        {},
    ),
    (
        # the 60/40 (mass) beverage gas drops a carbon-dioxide-rich liquid below about −36 °C
        "liquid-dropout",
        "warning",
        _mix(
            {"nitrogen": 0.60, "carbon dioxide": 0.40},
            {"max_temperature": "40 degC", "min_temperature": "-40 degC"},
            composition_basis="mass",
        ),
        _mix(
            {"nitrogen": 0.60, "carbon dioxide": 0.40},
            {"max_temperature": "40 degC", "min_temperature": "-20 degC"},
            composition_basis="mass",
        ),
        {},
    ),
]


def _n2_filled(filling: dict | None, limits: dict | None = None, **kw: Any) -> dict:
    """Nitrogen settled at 200 barg at 15 °C, filled as ``filling`` says (INTERFACES §6)."""
    v = _vessel(
        "nitrogen",
        {"settled_pressure": "200 barg", "temperature": "15 degC"},
        {"allowable_pressure": "300 barg", **(limits or {})},
        {"max_temperature": "50 degC", "min_temperature": "-20 degC"},
        **kw,
    )
    return v if filling is None else {**v, "filling": filling}


_LUMPED = {
    "supply": {"pressure": "330 barg", "temperature": "15 degC"},
    "duration": "4 min",
    "wall": {"mass": "58 kg", "specific_heat": "0.48 kJ/(kg K)"},
    "heat_transfer": "lumped",
}
_ADIABATIC = {
    "supply": {"pressure": "350 barg", "temperature": "15 degC"},
    "duration": "90 s",
    "heat_transfer": "adiabatic",
}
_CO2_BY_SUPPLY = {
    **_vessel(
        "carbon dioxide",
        {"filling_ratio": "0.60 kg/L"},
        {"allowable_pressure": "250 barg"},
        {"max_temperature": "50 degC"},
    ),
    "filling": {"supply": {"pressure": "60 barg", "temperature": "20 degC"}, "duration": "5 min"},
}

_CASES += [
    # the settled pressure at 15 °C is 200 barg (the fill itself): above a 190 barg marking
    (
        "working-pressure-exceeded",
        "fail",
        _n2({}, marking={"working_pressure": "190 barg"}),
        _n2({}, marking={"working_pressure": "210 barg"}),
        {},
    ),
    ("margin-working", "info", _n2({}, marking={"working_pressure": "210 barg"}), _n2({}), {}),
    (
        "gross-mass",
        "info",
        _n2({}, marking={"working_pressure": "210 barg", "tare_mass": "60 kg"}),
        _n2({}, marking={"working_pressure": "210 barg"}),
        {},
    ),
    ("fill-process", "info", _n2_filled(_LUMPED), _n2_filled(None), {}),
    # an adiabatic fast fill ends near 119 °C (tests/test_fill_process.py, CoolProp balance)
    (
        "fill-temperature-exceeded",
        "fail",
        _n2_filled(_ADIABATIC, {"max_fill_temperature": "85 degC"}),
        _n2_filled(_ADIABATIC, {"max_fill_temperature": "150 degC"}),
        {},
    ),
    (
        "fill-temperature-margin",
        "info",
        _n2_filled(_ADIABATIC, {"max_fill_temperature": "150 degC"}),
        _n2_filled(_ADIABATIC),
        {},
    ),
    (
        "fill-plan-hot",
        "warning",
        _n2_filled(_ADIABATIC, {"max_fill_temperature": "85 degC"}),
        _n2_filled(_LUMPED),
        {},
    ),
    # a 150 barg supply cannot bring the vessel to a charge that settles at 200 barg
    (
        "fill-supply-short",
        "warning",
        _n2_filled({**_LUMPED, "supply": {"pressure": "150 barg", "temperature": "15 degC"}}),
        _n2_filled(_LUMPED),
        {},
    ),
    # carbon dioxide holds liquid during the fill: the fill process is not computed
    ("fill-not-computed", "review", _CO2_BY_SUPPLY, _n2_filled(_LUMPED), {}),
    (
        "fill-temperature-unknown",
        "review",
        {
            **_CO2_BY_SUPPLY,
            "limits": {"allowable_pressure": "250 barg", "max_fill_temperature": "85 degC"},
        },
        _CO2_BY_SUPPLY,
        {},
    ),
]


def test_the_table_names_every_finding_code_of_assess() -> None:
    # every vessel code written in fillcheck/assess (Finding("code", ...) or the margin-<limit>
    # codes); a storage area's findings (assess/area.py) and a blend recipe's (assess/blend.py)
    # are exercised scenario by scenario in tests/test_areas.py and tests/test_blend.py
    from pathlib import Path

    root = Path(__file__).resolve().parents[1] / "fillcheck" / "assess"
    text = "\n".join(
        p.read_text(encoding="utf-8")
        for p in root.glob("*.py")
        if p.name not in ("area.py", "blend.py")
    )
    written = set(re.findall(r'Finding\(\s*"([a-z-]+)"', text))
    written -= {"margin-"}  # Finding("margin-" + kind, ...): the two codes below
    written |= {"margin-allowable", "margin-relief"}
    assert written == {c for c, *_ in _CASES}


@pytest.mark.parametrize(
    ("code", "severity", "present", "absent", "top"), _CASES, ids=[c[0] for c in _CASES]
)
def test_every_finding_code_both_ways(
    code: str, severity: str, present: dict, absent: dict | None, top: dict
) -> None:
    vessels = [{**present, "id": "HAS"}] + ([] if absent is None else [{**absent, "id": "NOT"}])
    found = _assess(vessels, **top)
    assert _codes(found[0]).get(code) == severity, _codes(found[0])
    if severity in ("fail", "review"):
        assert found[0].verdict == severity or found[0].verdict == "fail"
    if absent is not None:
        assert code not in _codes(found[1]), _codes(found[1])


def test_no_vapour_space_warning_for_a_supercritical_gas() -> None:
    fill = {"pressure": "380 barg", "temperature": "15 degC"}
    a = _one("nitrogen", fill, {"allowable_pressure": "600 barg"})
    assert a.max_state.phase == "supercritical"
    rho = _cp_density_at(288.15, 380e5 + ATM, "Nitrogen")  # CoolProp: denser than critical
    assert rho > CP.PropsSI("rhocrit", "Nitrogen")
    assert "vapour-space-low" not in _codes(a)
