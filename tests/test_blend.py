"""Blend recipes (assess.blend, INTERFACES.md §7) against CoolProp 8.0.0 and the ideal-gas law.

Reference: CoolProp 8.0.0 HEOS. fillcheck's default mixture model is the multi-fluid model of
the GERG-2008 form (Kunz, Wagner (2012), J. Chem. Eng. Data 57, 3032) with the pure fluids'
reference equations; CoolProp's HEOS backend evaluates the same model form from the same
published parameters (its mixtures, "A&B", and its pure fluids), so each step's stop pressure
at (T, ρ) must agree to the solvers' round-off. Every check below names CoolProp HEOS beside it.
"""

from __future__ import annotations

import itertools
import json
import math
import os
import subprocess
import sys
from pathlib import Path
from types import SimpleNamespace

import CoolProp.CoolProp as CP
import numpy as np
import pytest
from coolprop_cubic import coolprop_pr_name

import fillcheck
from fillcheck.assess.blend import (
    BLEND_PLAN_LIMIT,
    blend_bounded_plan,
    blend_cautions,
    blend_findings,
    blend_recipe,
    pressure_jacobian,
    weighing_jacobian,
)
from fillcheck.errors import InputError
from fillcheck.scenario.blend_input import BlendInput, ResidualInput
from fillcheck.scenario.resolve import load_scenario

P_ATM = 101_325.0
BAR = 1e5
V = 0.050  # m³
CP_NAME = {
    "nitrogen": "Nitrogen",
    "carbon dioxide": "CarbonDioxide",
    "argon": "Argon",
    "oxygen": "Oxygen",
    "helium": "Helium",
}


def _blend(order=None, T=288.15, residual=None, tare=None, scale=0.010, gauge=0.01):
    return BlendInput(order, T, tare, residual, scale, gauge, False, False)


def _vessel(fluid, blend, T_cold=None):
    """The few fields of a VesselInput a recipe reads."""
    return SimpleNamespace(
        fluid=fluid,
        water_capacity_m3=V,
        blend=blend,
        min_temperature_K=T_cold,
        atmospheric_pressure_Pa=P_ATM,
    )


def _heos(names, z, backend: str = "HEOS") -> CP.AbstractState:
    """CoolProp 8.0.0 HEOS, a mixture (GERG-2008 form) or a pure fluid's reference equation;
    or, with backend "PR", CoolProp's Peng–Robinson given the catalog's constants and kij = 0
    (what fillcheck uses where no kij is published)."""
    if backend == "PR":
        AS = CP.AbstractState("PR", "&".join(coolprop_pr_name(n) for n in names))
    else:
        AS = CP.AbstractState("HEOS", "&".join(CP_NAME[n] for n in names))
    if len(names) > 1:
        if backend == "PR":
            AS.set_binary_interaction_double(0, 1, "kij", 0.0)
        AS.set_mole_fractions(list(z))
    return AS


def _heos_charge(names, z, T, P, backend: str = "HEOS") -> float:
    """Total amount [mol] of the mixture in V at (T, P), by CoolProp 8.0.0 HEOS (PT flash)."""
    AS = _heos(names, z, backend)
    AS.update(CP.PT_INPUTS, P, T)
    return AS.rhomolar() * V


def _heos_pressure(amounts: dict[str, float], T: float, backend: str = "HEOS") -> float:
    """Pressure [Pa] of these amounts [mol] in V at T by CoolProp 8.0.0 HEOS (DmolarT)."""
    names = [n for n, a in amounts.items() if a > 0.0]
    n = np.array([amounts[k] for k in names])
    AS = _heos(names, n / n.sum(), backend)
    AS.update(CP.DmolarT_INPUTS, n.sum() / V, T)
    return AS.p()


# (composition by mole, order, blend temperature [K], final pressure [Pa abs], model)
# helium–oxygen has no published multi-fluid pair in fillcheck: its default is
# Peng–Robinson–Péneloux with kij = 0; CoolProp has no translated PR mixture, so the check runs
# the untranslated "pr" of the same family against CoolProp 8.0.0's "PR" backend given the
# catalog's constants (the gas constants differ by 2e-11).
CASES = [
    ({"nitrogen": 0.786, "carbon dioxide": 0.214}, ("carbon dioxide", "nitrogen"), 288.15, 201e5),
    ({"argon": 0.82, "carbon dioxide": 0.18}, ("carbon dioxide", "argon"), 293.15, 180e5),
    ({"argon": 0.98, "oxygen": 0.02}, ("oxygen", "argon"), 288.15, 201e5),
    ({"helium": 0.79, "oxygen": 0.21}, ("oxygen", "helium"), 288.15, 200e5, "pr"),
    (
        {"argon": 0.90, "carbon dioxide": 0.08, "oxygen": 0.02},
        ("carbon dioxide", "oxygen", "argon"),
        288.15,
        200e5,
    ),
]


@pytest.mark.parametrize("case", CASES, ids=lambda c: "-".join(c[0]))
def test_each_step_stop_pressure_against_coolprop_heos(case) -> None:
    """Source: CoolProp 8.0.0 HEOS (GERG-2008 mixtures, reference equations for one gas), or
    CoolProp 8.0.0 PR for helium–oxygen (see CASES)."""
    comp, order, T, P = case[:4]
    model = case[4] if len(case) > 4 else None
    backend, tol = ("PR", 1e-7) if model == "pr" else ("HEOS", 2e-6)
    f = fillcheck.mixture(comp, model=model)
    assert f.model == (model or "reference")
    names = list(comp)
    n_tot = _heos_charge(names, f.z, T, P, backend)
    target = dict(zip(names, n_tot * f.z, strict=True))
    mass = float(n_tot * f.molar_mass)
    r = blend_recipe(_vessel(f, _blend(order, T)), mass)
    assert r.error is None and [s.component for s in r.steps] == list(order)
    for k, s in enumerate(r.steps, start=1):
        amounts = {c: (target[c] if c in order[:k] else 0.0) for c in names}
        ref = _heos_pressure(amounts, T, backend)
        assert s.stop_pressure_Pa == pytest.approx(ref, rel=tol), (k, s.component)
        # Dalton: the ideal-gas partial-pressure recipe stops at the amount's share of P_final
        share = sum(amounts.values()) / n_tot
        assert s.ideal_stop_pressure_Pa == pytest.approx(share * P, rel=tol)
    assert r.steps[-1].stop_pressure_Pa == pytest.approx(P, rel=tol)


def test_low_pressure_steps_tend_to_the_ideal_gas() -> None:
    """Ideal-gas limit: each step's P/(n·R·T/V) − 1 (R: CODATA 2018, exact) is the second
    virial term, proportional to the density, so it shrinks tenfold with the charge and is
    below 0.5 % at 2 bar; the real and the partial-pressure stop pressures meet there."""
    f = fillcheck.mixture({"nitrogen": 0.7, "carbon dioxide": 0.3})
    T, R = 293.15, 8.314462618
    dev = []
    for P in (2e5, 0.2e5):
        n_tot = P * V / (R * T)
        r = blend_recipe(
            _vessel(f, _blend(("carbon dioxide", "nitrogen"), T)), n_tot * f.molar_mass
        )
        ideal = [n_tot * f.z[1] * R * T / V, P]
        d = [s.stop_pressure_Pa / i - 1.0 for s, i in zip(r.steps, ideal, strict=True)]
        assert all(-5e-3 < x < 0.0 for x in d)  # attraction lowers it
        assert r.steps[0].ideal_stop_pressure_Pa == pytest.approx(
            r.steps[0].stop_pressure_Pa, rel=5e-3
        )
        dev.append(d)
    for big, small in zip(*dev, strict=True):
        assert big / small == pytest.approx(10.0, rel=0.02)


def test_mass_balance_is_exact_with_residual_and_tare() -> None:
    """Residual 3 bara of the target mixture at 20 °C (amount by CoolProp 8.0.0 HEOS): the
    added masses plus the residual are the charge, each step's scale reading the tare plus
    the contents."""
    f = fillcheck.mixture({"argon": 0.98, "oxygen": 0.02})
    res = ResidualInput(3e5, 293.15, None)
    tare, charge = 58.5, 17.8
    r = blend_recipe(_vessel(f, _blend(("oxygen", "argon"), 293.15, res, tare)), charge)
    n_res = _heos_charge(["argon", "oxygen"], f.z, 293.15, 3e5)
    assert r.residual_mass_kg == pytest.approx(n_res * f.molar_mass, rel=1e-6)
    added = sum(s.added_mass_kg for s in r.steps)
    assert added + r.residual_mass_kg == pytest.approx(charge, rel=1e-12)
    assert r.steps[-1].cumulative_mass_kg == pytest.approx(charge, rel=1e-12)
    readings = [tare + r.residual_mass_kg] + [s.scale_reading_kg for s in r.steps]
    for k, s in enumerate(r.steps):
        assert readings[k + 1] - readings[k] == pytest.approx(s.added_mass_kg, abs=1e-9)
    # a residual of one component counts for that component only
    r2 = blend_recipe(
        _vessel(f, _blend(("oxygen", "argon"), 293.15, ResidualInput(3e5, 293.15, "argon"))),
        charge,
    )
    assert r2.residual_masses_kg["oxygen"] == 0.0
    assert sum(s.added_mass_kg for s in r2.steps) + r2.residual_mass_kg == pytest.approx(charge)


def test_beverage_gas_co2_first_check_values() -> None:
    """Fillcheck issue 14's check values: nitrogen–carbon dioxide 70/30 by mass to 200 barg at
    15 °C, carbon dioxide first: the CO2 step stops at about 34.3 barg by the real gas and at
    about 42.1 barg by an ideal-gas partial-pressure recipe. Computed here with CoolProp 8.0.0
    HEOS (GERG-2008 mixture for the charge, Span–Wagner CO2 for the first step)."""
    f = fillcheck.mixture({"nitrogen": 0.7, "carbon dioxide": 0.3}, basis="mass")
    T, P = 288.15, 200e5 + P_ATM
    n_tot = _heos_charge(["nitrogen", "carbon dioxide"], f.z, T, P)
    n_co2 = n_tot * f.z[1]
    real = _heos_pressure({"carbon dioxide": n_co2}, T)
    ideal = f.z[1] * P
    assert (real - P_ATM) / BAR == pytest.approx(34.3, abs=0.05)
    assert (ideal - P_ATM) / BAR == pytest.approx(42.1, abs=0.05)
    r = blend_recipe(_vessel(f, _blend(("carbon dioxide", "nitrogen"), T)), n_tot * f.molar_mass)
    assert r.steps[0].stop_pressure_Pa == pytest.approx(real, rel=2e-6)
    assert r.steps[0].ideal_stop_pressure_Pa == pytest.approx(ideal, rel=2e-6)
    assert not any(s.liquid_present for s in r.steps)
    assert blend_findings(r) == []


def test_co2_first_at_5_degC_condenses_and_nitrogen_first_does_not() -> None:
    """60/40 by mass to 200 barg (charge by CoolProp 8.0.0 HEOS at 15 °C), blended at 5 °C:
    the carbon dioxide alone lies between its saturated vapour and liquid densities at 5 °C
    (CoolProp 8.0.0 HEOS, Span–Wagner, QT_INPUTS), so the first step condenses."""
    f = fillcheck.mixture({"nitrogen": 0.6, "carbon dioxide": 0.4}, basis="mass")
    n_tot = _heos_charge(["nitrogen", "carbon dioxide"], f.z, 288.15, 200e5 + P_ATM)
    rho_co2 = n_tot * f.z[1] / V
    sat = CP.AbstractState("HEOS", "CarbonDioxide")
    sat.update(CP.QT_INPUTS, 1.0, 278.15)
    rho_v = sat.rhomolar()
    sat.update(CP.QT_INPUTS, 0.0, 278.15)
    assert rho_v < rho_co2 < sat.rhomolar()
    r = blend_recipe(
        _vessel(f, _blend(("carbon dioxide", "nitrogen"), 278.15)), n_tot * f.molar_mass
    )
    assert r.steps[0].liquid_present and not r.steps[1].liquid_present
    assert r.suggested_order == ("nitrogen", "carbon dioxide")
    codes = [(x.code, x.severity, x.data["step"]) for x in blend_findings(r)]
    assert ("blend-step-condenses", "fail", 1) in codes
    assert r.u_by_pressure is None  # a pressure cannot tell the amount where liquid is in
    # with no order entered, the suggested one is used and nothing condenses
    r2 = blend_recipe(_vessel(f, _blend(None, 278.15)), n_tot * f.molar_mass)
    assert r2.order == ("nitrogen", "carbon dioxide") and blend_findings(r2) == []


def test_condensing_only_in_the_cold_warns() -> None:
    """70/30 CO2 first, blend at 15 °C, storage down to −10 °C: CO2 alone at the step's density
    is below its saturated vapour density at 15 °C and above it at −10 °C (CoolProp 8.0.0 HEOS,
    Span–Wagner, QT_INPUTS): a warning, not a fail."""
    f = fillcheck.mixture({"nitrogen": 0.7, "carbon dioxide": 0.3}, basis="mass")
    n_tot = _heos_charge(["nitrogen", "carbon dioxide"], f.z, 288.15, 200e5 + P_ATM)
    rho_co2 = n_tot * f.z[1] / V
    sat = CP.AbstractState("HEOS", "CarbonDioxide")
    sat.update(CP.QT_INPUTS, 1.0, 288.15)
    assert rho_co2 < sat.rhomolar()
    sat.update(CP.QT_INPUTS, 1.0, 263.15)
    assert rho_co2 > sat.rhomolar()
    r = blend_recipe(
        _vessel(f, _blend(("carbon dioxide", "nitrogen"), 288.15), T_cold=263.15),
        n_tot * f.molar_mass,
    )
    found = {(x.code, x.severity) for x in blend_findings(r)}
    assert found == {("blend-step-condenses-cold", "warning")}
    assert r.suggested_order == ("nitrogen", "carbon dioxide")


def _x(N: np.ndarray) -> np.ndarray:
    return N / N.sum()


def test_weighing_tolerance_against_finite_differences() -> None:
    """∂x/∂R of the mole fractions by the scale readings against central differences of
    x = (m/M)/Σ(m/M) written out here (the composition law, nothing of fillcheck's)."""
    M = np.array([0.039948, 0.0319988, 0.0440095])  # argon, oxygen, CO2 [kg/mol]
    res = np.array([0.5, 0.01, 0.04])  # residual [mol]
    steps_of = [3, 2, 1]  # CO2 first, then oxygen, then argon
    readings = np.array([60.0, 60.7, 61.0, 78.0])  # R_0 … R_3 [kg]

    def N_of(R):
        N = res.copy()
        for i, s in enumerate(steps_of):
            N[i] += (R[s] - R[s - 1]) / M[i]
        return N

    J = weighing_jacobian(N_of(readings), steps_of, M)
    h = 1e-6
    for k in range(4):
        e = np.zeros(4)
        e[k] = h
        fd = (_x(N_of(readings + e)) - _x(N_of(readings - e))) / (2 * h)
        assert J[:, k] == pytest.approx(fd, rel=1e-6, abs=1e-9)


def test_pressure_tolerance_against_finite_differences_of_coolprop() -> None:
    """u(x) by the gauge: fillcheck's propagation against central differences of the amounts
    V·ρ(T, P_k; z_k) inverted by CoolProp 8.0.0 HEOS (PT_INPUTS) at each step's own
    composition, with u(P_k) = a·(P_k − P_atm)/√3."""
    comp = {"argon": 0.90, "carbon dioxide": 0.08, "oxygen": 0.02}
    order = ("carbon dioxide", "oxygen", "argon")
    T = 288.15
    f = fillcheck.mixture(comp)
    names = list(comp)
    n_tot = _heos_charge(names, f.z, T, 200e5)
    target = dict(zip(names, n_tot * f.z, strict=True))
    r = blend_recipe(_vessel(f, _blend(order, T, gauge=0.01)), n_tot * f.molar_mass)
    P = np.array([s.stop_pressure_Pa for s in r.steps])
    zs = []
    for k in range(3):
        a = {c: (target[c] if c in order[: k + 1] else 0.0) for c in names}
        zs.append(a)

    def amounts(Ps):
        ntot = []
        for k, a in enumerate(zs):
            present = [c for c in names if a[c] > 0]
            n = np.array([a[c] for c in present])
            AS = _heos(present, n / n.sum())
            AS.update(CP.PT_INPUTS, Ps[k], T)
            ntot.append(AS.rhomolar() * V)
        N = {}
        for k, c in enumerate(order):
            N[c] = ntot[k] - (ntot[k - 1] if k else 0.0)
        return np.array([N[c] for c in names])

    u_P = 0.01 * (P - P_ATM) / math.sqrt(3.0)
    var = np.zeros(3)
    for k in range(3):
        h = P[k] * 1e-6
        e = np.zeros(3)
        e[k] = h
        d = (_x(amounts(P + e)) - _x(amounts(P - e))) / (2 * h)
        var += (d * u_P[k]) ** 2
    u_ref = np.sqrt(var)
    got = np.array([r.u_by_pressure[c] for c in names])
    assert got == pytest.approx(u_ref, rel=1e-3)
    # a scale reading's resolution: r/√12 (GUM F.2.2.1), each step's mass from two readings
    assert r.u_by_weight["carbon dioxide"] > 0.0


def test_pressure_jacobian_sums_to_zero() -> None:
    """Mole fractions sum to one, so each column of ∂x/∂P sums to zero (identity)."""
    J = pressure_jacobian([2, 1], np.array([1e-3, 2e-3]), np.array([3.0, 1.0]))
    assert J.sum(axis=0) == pytest.approx(0.0, abs=1e-15)
    assert J[0, 1] != 0.0


def test_blending_cautions() -> None:
    """Oxygen in the blend: the oxygen-service caution; methane (flammable) after oxygen
    (oxidizing): the flammable-into-oxidizer caution, which methane first does not earn
    (hazard classes from the catalog)."""
    f = fillcheck.mixture({"methane": 0.05, "oxygen": 0.95})
    codes = [c.code for c in blend_cautions(f, ("oxygen", "methane"))]
    assert codes == ["blend-oxidizer-compression", "blend-flammable-into-oxidizer"]
    codes = [c.code for c in blend_cautions(f, ("methane", "oxygen"))]
    assert codes == ["blend-oxidizer-compression"]
    f2 = fillcheck.mixture({"nitrogen": 0.7, "carbon dioxide": 0.3})
    assert blend_cautions(f2, ("carbon dioxide", "nitrogen")) == []


BASE = """
[[vessel]]
id = "B-1"
gas = {gas}
water_capacity = "50 L"
fill = {{ settled_pressure = "200 barg", temperature = "15 degC" }}
storage = {{ max_temperature = "50 degC" }}
limits = {{ allowable_pressure = "300 barg" }}

[vessel.blend]
{blend}
"""
MIX = '{ nitrogen = "70 %", "carbon dioxide" = "30 %" }'


@pytest.mark.parametrize(
    ("gas", "blend", "field", "says"),
    [
        (
            MIX,
            'order = ["carbon dioxide", "argon"]\ntemperature = "15 degC"',
            "blend.order",
            "argon",
        ),
        (
            MIX,
            'order = ["carbon dioxide"]\ntemperature = "15 degC"',
            "blend.order",
            "leaves out nitrogen",
        ),
        ('"nitrogen"', 'temperature = "15 degC"', "blend", "single gas"),
        (MIX, 'temperature = "0 K"', "blend.temperature", "absolute zero"),
        (MIX, 'temperature = "-300 degC"', "blend.temperature", ""),
        (
            MIX,
            'order = ["carbon dioxide", "nitrogen"]',
            "blend.temperature",
            'required but missing; give it, e.g. temperature = "15 degC"',
        ),
    ],
    ids=["unknown", "missing", "pure", "zero", "below-zero", "no-temperature"],
)
def test_bad_blend_input_is_one_sentence(tmp_path, gas, blend, field, says) -> None:
    p = tmp_path / "bad.toml"
    p.write_text(BASE.format(gas=gas, blend=blend))
    with pytest.raises(InputError) as e:
        load_scenario(p)
    msg = str(e.value)
    assert msg.startswith("bad.toml: vessel 'B-1', field '" + field + "'"), msg
    assert says in msg and "\n" not in msg


DEMO = Path(__file__).resolve().parents[1] / "scenarios" / "blend_beverage_gas_shop.toml"


def test_cli_fails_a_condensing_step_and_refuses_bad_input(tmp_path) -> None:
    """The demo's 60/40 CO2-first blend at 5 °C condenses (exit 1, JSON blend key); bad input
    exits 2 with one line on stderr."""
    text = DEMO.read_text()
    one = tmp_path / "one.toml"  # the demo's condensing vessel alone (a quicker run)
    start = text.index('[[vessel]]\nid = "BEV-6040')
    end = text.index("[[vessel]]", start + 1)
    one.write_text(text[: text.index("[[vessel]]")] + text[start:end])
    run = subprocess.run(
        [sys.executable, "-m", "fillcheck", "check", str(one), "--json"],
        capture_output=True,
        text=True,
        timeout=120,
    )
    assert run.returncode == 1, run.stderr

    out = {v["id"]: v for v in json.loads(run.stdout)["vessels"]}
    cold = out["BEV-6040-CO2-FIRST-COLD"]
    assert "blend-step-condenses" in {f["code"] for f in cold["findings"]}
    assert cold["verdict"] == "fail"
    assert [s["liquid_present"] for s in cold["blend"]["steps"]] == [True, False]
    assert set(cold["blend"]["steps"][0]) >= {
        "component",
        "added_mass_kg",
        "cumulative_mass_kg",
        "stop_pressure_Pa",
        "ideal_stop_pressure_Pa",
        "liquid_present",
    }
    p = tmp_path / "bad.toml"
    p.write_text(BASE.format(gas=MIX, blend='order = ["nitrogen"]\ntemperature = "15 degC"'))
    bad = subprocess.run(
        [sys.executable, "-m", "fillcheck", "check", str(p)],
        capture_output=True,
        text=True,
        timeout=60,
    )
    assert bad.returncode == 2
    assert bad.stderr.strip().count("\n") == 0 and "blend.order" in bad.stderr


@pytest.mark.slow
@pytest.mark.parametrize("T", [263.15, 278.15, 293.15, 308.15])
def test_every_order_of_a_ternary_against_coolprop(T) -> None:
    """Every order of argon–CO2–oxygen at four blend temperatures: each step's stop pressure
    against CoolProp 8.0.0 HEOS where it is one phase."""
    comp = {"argon": 0.80, "carbon dioxide": 0.15, "oxygen": 0.05}
    f = fillcheck.mixture(comp)
    names = list(comp)
    n_tot = _heos_charge(names, f.z, 288.15, 200e5)
    target = dict(zip(names, n_tot * f.z, strict=True))
    for order in itertools.permutations(names):
        r = blend_recipe(_vessel(f, _blend(order, T)), n_tot * f.molar_mass)
        for k, s in enumerate(r.steps, start=1):
            if s.liquid_present:
                continue
            amounts = {c: (target[c] if c in order[:k] else 0.0) for c in names}
            assert s.stop_pressure_Pa == pytest.approx(_heos_pressure(amounts, T), rel=2e-6)


def test_step_beyond_the_model_range_asks_for_review() -> None:
    """Argon–oxygen blended to 450 bar at 15 °C (charge by CoolProp 8.0.0 HEOS) lies above
    the 35 MPa normal range of the GERG-2008 form (Kunz, Wagner 2012): review, no pass."""
    f = fillcheck.mixture({"argon": 0.98, "oxygen": 0.02})
    n_tot = _heos_charge(["argon", "oxygen"], f.z, 288.15, 450e5)
    r = blend_recipe(_vessel(f, _blend(("oxygen", "argon"), 288.15)), n_tot * f.molar_mass)
    found = [(x.code, x.severity, x.data["step"]) for x in blend_findings(r)]
    assert found == [("blend-outside-model-range", "review", 2)]


def test_a_blend_bounds_the_plan_where_a_step_would_condense(tmp_path) -> None:
    """60/40 by mass, carbon dioxide first at 5 °C: the 200 barg charge condenses in its first
    step, so the plan is the largest charge whose carbon dioxide alone stops below the liquid
    band at 5 °C: below 95 % (the gauge's 5 %) of its vapour pressure at 3 °C (the thermometer's
    2 K), CoolProp 8.0.0 HEOS (Span–Wagner, QT_INPUTS and DmassT_INPUTS); the demo's vessel
    filled by weight to that plan keeps every step gas (a plan followed passes its blend)."""
    f = fillcheck.mixture({"nitrogen": 0.6, "carbon dioxide": 0.4}, basis="mass")
    v = _vessel(f, _blend(("carbon dioxide", "nitrogen"), 278.15))
    full = _heos_charge(["nitrogen", "carbon dioxide"], f.z, 288.15, 200e5 + P_ATM)
    full_kg = full * f.molar_mass
    plan = blend_bounded_plan(v, full_kg, 0.01)
    assert plan is not None and plan < full_kg
    co2 = CP.AbstractState("HEOS", "CarbonDioxide")
    co2.update(CP.QT_INPUTS, 1.0, 276.15)
    floor = 0.95 * co2.p()

    def step_1(kg: float) -> float:  # the carbon dioxide alone in the vessel at 5 °C [Pa]
        co2.update(CP.DmassT_INPUTS, 0.4 * kg / V, 278.15)  # 0.4: its mass fraction
        return co2.p()

    assert step_1(plan) < floor <= step_1(plan + 0.02)
    assert blend_bounded_plan(v, plan, 0.01) == plan  # already within: unchanged
    # the whole check: the plan governs, and the vessel filled to it passes its blend
    from fillcheck.assess import assess_scenario
    from fillcheck.scenario.resolve import load_scenario

    text = DEMO.read_text()
    start = text.index('[[vessel]]\nid = "BEV-6040')
    end = text.index("[[vessel]]", start + 1)
    one = tmp_path / "one.toml"
    one.write_text(text[: text.index("[[vessel]]")] + text[start:end])
    a = assess_scenario(load_scenario(str(one))).vessels[0]
    assert a.governing_limit == BLEND_PLAN_LIMIT
    assert a.max_safe_charge_kg == pytest.approx(plan, abs=0.011)
    followed = tmp_path / "followed.toml"
    followed.write_text(
        one.read_text().replace(
            'fill = { settled_pressure = "200 barg", temperature = "15 degC" }',
            f'fill = {{ mass = "{a.max_safe_charge_kg:.2f} kg", temperature = "15 degC" }}',
        )
    )
    b = assess_scenario(load_scenario(str(followed))).vessels[0]
    assert not {x.code for x in b.findings} & {"blend-step-condenses"}
    assert b.verdict != "fail"


def test_every_command_plans_the_blend_bound_charge() -> None:
    """The blend's bound is part of the one largest-charge solver (assess.charge): `check`,
    `stop-table` and `reading` give the same plan for the demo's carbon-dioxide-first vessel
    at 5 °C (before, `stop-table` planned the allowable pressure's 18.18 kg while `check`
    planned 14.32 kg). The figure itself is checked against CoolProp in the test above."""
    from fillcheck.assess import assess_scenario
    from fillcheck.assess.planning import read_gauge, stop_table
    from fillcheck.scenario.resolve import load_scenario

    sc = load_scenario(DEMO)
    v = next(x for x in sc.vessels if x.id == "BEV-6040-CO2-FIRST-COLD")
    checked = next(a for a in assess_scenario(sc).vessels if a.id == v.id)
    assert checked.governing_limit == BLEND_PLAN_LIMIT
    table = stop_table(v, sc.reference_temperature_K, np.array([278.15, 288.15]))
    assert table.max_safe_charge_kg == pytest.approx(checked.max_safe_charge_kg, abs=1e-9)
    assert table.governing_limit == BLEND_PLAN_LIMIT
    r = read_gauge(v, sc.reference_temperature_K, 150e5, 288.15, 0.05, 2.0)
    assert r.fraction_of_max_safe == pytest.approx(r.charge_kg / checked.max_safe_charge_kg)


def test_register_rows_carry_a_blend(tmp_path) -> None:
    """A register row names a mixture and its blend: columns composition_basis, blend_order
    (components joined by '>') and blend_temperature give the same recipe as the scenario's
    [vessel.blend] table; an order that is not one, or an order without a temperature, is
    refused in one sentence naming row and column (exit 2)."""
    from fillcheck.assess import assess_scenario
    from fillcheck.scenario.register import load_register

    head = (
        "id,gas,composition_basis,water_capacity,settled_pressure,fill_temperature,"
        "max_temperature,allowable_pressure,blend_order,blend_temperature\n"
    )
    row = "MIX-1,nitrogen 70 % + carbon dioxide 30 %,mass,50 L,200 barg,15 degC,50 degC,300 barg,"
    good = tmp_path / "good.csv"
    good.write_text(head + row + "carbon dioxide > nitrogen,15 degC\n")
    a = assess_scenario(load_register(good)).vessels[0]
    assert a.blend is not None
    assert [s.component for s in a.blend.steps] == ["carbon dioxide", "nitrogen"]
    f = fillcheck.mixture({"nitrogen": 0.7, "carbon dioxide": 0.3}, basis="mass")
    v = _vessel(f, _blend(("carbon dioxide", "nitrogen"), 288.15))
    ref = blend_recipe(v, a.charged_mass_kg)
    for s, r in zip(a.blend.steps, ref.steps, strict=True):
        assert s.stop_pressure_Pa == pytest.approx(r.stop_pressure_Pa, rel=1e-9)
    for cells, says in (
        ("carbon dioxide nitrogen,15 degC", "column 'blend_order'"),
        (
            "carbon dioxide > nitrogen,",
            "column 'blend_temperature': is required but missing; give it, e.g. 15 degC",
        ),
    ):
        bad = tmp_path / "bad.csv"
        bad.write_text(head + row + cells + "\n")
        run = subprocess.run(
            [sys.executable, "-m", "fillcheck", "check", str(bad)],
            capture_output=True, text=True, timeout=120,
        )  # fmt: skip
        assert run.returncode == 2, run.stderr
        assert says in run.stderr and "row 2" in run.stderr and "Traceback" not in run.stderr


def test_register_report_prints_the_recipe_of_passing_blend_rows(tmp_path) -> None:
    """A passing blend row of a register is not shown in detail, but the blender still needs its
    recipe: the terminal and HTML reports list each step (add, contents, stop pressure at the
    blend temperature, ideal-gas stop) with the numbers of the JSON ``blend`` key."""
    from fillcheck.assess import assess_scenario
    from fillcheck.report.content import Formatter
    from fillcheck.scenario.register import load_register

    reg = tmp_path / "blends.csv"
    reg.write_text(
        "id,gas,composition_basis,water_capacity,settled_pressure,fill_temperature,"
        "max_temperature,allowable_pressure,blend_order,blend_temperature\n"
        "MIX-1,nitrogen 70 % + carbon dioxide 30 %,mass,50 L,200 barg,15 degC,50 degC,300 barg,"
        "carbon dioxide > nitrogen,15 degC\n"
        "MIX-2,argon 82 % + carbon dioxide 18 %,mole,50 L,200 barg,15 degC,50 degC,300 barg,,"
        "15 degC\n"
    )
    a = assess_scenario(load_register(reg), is_register=True)
    assert [v.verdict for v in a.vessels] == ["pass", "pass"]
    html = tmp_path / "blends.html"
    run = subprocess.run(
        [sys.executable, "-m", "fillcheck", "check", str(reg), "--html", str(html)],
        capture_output=True, text=True, timeout=300, env={**os.environ, "COLUMNS": "160"},
    )  # fmt: skip
    assert run.returncode == 0, run.stderr
    fmt = Formatter("metric", a.atmospheric_pressure_Pa)
    text, page = run.stdout, html.read_text()
    assert "Blend recipes of the vessels not shown in detail" in text
    assert "MIX-2 (order suggested)" in text
    for v in a.vessels:
        for k, s in enumerate(v.blend.steps, start=1):
            for shown in (
                f"{k}: {s.component}",
                fmt.m(s.added_mass_kg),
                fmt.m(s.cumulative_mass_kg),
                fmt.p(s.stop_pressure_Pa),
                fmt.p(s.ideal_stop_pressure_Pa),
            ):
                assert shown in text, shown
                assert shown in page, shown
    # on an 80-column terminal every figure still appears whole (words may wrap, figures not)
    import io

    from rich.console import Console

    from fillcheck.report.terminal import render_terminal

    out = io.StringIO()
    render_terminal(a, Console(width=80, file=out, color_system=None))
    narrow = out.getvalue()
    recipes = narrow[narrow.index("Blend recipes of the vessels not shown in detail") :]
    assert max(len(line) for line in recipes.splitlines()) <= 80
    for v in a.vessels:
        for s in v.blend.steps:
            for shown in (
                fmt.m(s.added_mass_kg),
                fmt.m(s.cumulative_mass_kg),
                fmt.p(s.stop_pressure_Pa),
                fmt.p(s.ideal_stop_pressure_Pa),
            ):
                assert shown in recipes, shown


def test_stop_table_gives_each_blend_step_by_gas_temperature() -> None:
    """stop-table prints, for a blend made in the vessel, each step's stop pressure by gas
    temperature (the contents after that step); the numbers are the check report's
    (JSON ``blend.steps[].stop_table_Pa``) at the temperatures both tables hold, "weigh it"
    (JSON null) where the contents hold liquid."""
    common = [str(DEMO), "--vessel", "BEV-6040-CO2-FIRST-COLD", "--json"]
    check = subprocess.run(
        [sys.executable, "-m", "fillcheck", "check", str(DEMO), "--json"],
        capture_output=True, text=True, timeout=300,
    )  # fmt: skip
    table = subprocess.run(
        [sys.executable, "-m", "fillcheck", "stop-table", *common, "--from", "-10 degC",
         "--to", "40 degC", "--step", "5 K"],
        capture_output=True, text=True, timeout=300,
    )  # fmt: skip
    assert table.returncode in (0, 1), table.stderr
    by_id = {v["id"]: v for v in json.loads(check.stdout)["vessels"]}
    blend = by_id["BEV-6040-CO2-FIRST-COLD"]["blend"]
    st = json.loads(table.stdout)["result"][0]
    assert st["blend_order"] == blend["order"] == ["carbon dioxide", "nitrogen"]
    T_check = blend["stop_table_temperatures_K"]
    T_stop = [r["gas_temperature_K"] for r in st["rows"]]
    assert T_stop == pytest.approx(T_check, abs=1e-9)
    for a, b in zip(blend["steps"], st["blend_steps"], strict=True):
        assert b["component"] == a["component"]
        assert b["cumulative_mass_kg"] == pytest.approx(a["cumulative_mass_kg"], rel=1e-12)
        for p, q in zip(a["stop_table_Pa"], b["stop_pressure_Pa"], strict=True):
            assert (p is None) == (q is None)
            if p is not None:
                assert q == pytest.approx(p, rel=1e-9)
    # the planned 15.75 kg is above the plan: the steps of the largest charge come as well
    largest = st["blend_steps_largest"]
    assert [s["component"] for s in largest] == st["blend_order"]
    assert largest[-1]["cumulative_mass_kg"] == pytest.approx(st["max_safe_charge_kg"], abs=1e-9)
    # step 1 (carbon dioxide alone, 6.3 kg in 50 L) holds liquid at 5 °C, the blend temperature
    assert st["blend_steps"][0]["liquid_at_blend_temperature"] is True
    assert st["blend_steps"][0]["stop_pressure_Pa"][T_stop.index(pytest.approx(278.15))] is None
    shown = subprocess.run(
        [sys.executable, "-m", "fillcheck", "stop-table", *common[:-1], "--width", "120"],
        capture_output=True, text=True, timeout=300,
    )  # fmt: skip
    assert "step 1: carbon dioxide" in shown.stdout and "weigh it" in shown.stdout
    assert "holds liquid at the blend temperature" in shown.stdout


def test_a_step_near_its_dew_point_is_weighed_and_the_plan_keeps_clear(tmp_path) -> None:
    """57/43 nitrogen–carbon dioxide by mass to 200 barg at 15 °C, carbon dioxide first: its step
    stops at 46.9 barg, gas at 15 °C but above 95 % of carbon dioxide's vapour pressure at 13 °C
    (45.0 barg; CoolProp 8.0.0 HEOS, Span–Wagner: P_sat(286.15 K) = 46.41 bar abs). A gas 2 K
    colder than read would condense, so the step is weighed (warning blend-step-near-dew), and
    the plan keeps the step below the band; the vessel filled to the plan has no such step."""
    from fillcheck.assess import assess_scenario
    from fillcheck.scenario.resolve import load_scenario

    co2 = CP.AbstractState("HEOS", "CarbonDioxide")
    co2.update(CP.QT_INPUTS, 1.0, 286.15)
    floor = 0.95 * co2.p()

    def scenario(fill: str) -> Path:
        p = tmp_path / "near.toml"
        p.write_text(
            BASE.replace("B-1", "NEAR")
            .format(
                gas='{ nitrogen = "57 %", "carbon dioxide" = "43 %" }',
                blend='order = ["carbon dioxide", "nitrogen"]\ntemperature = "15 degC"',
            )
            .replace('fill = { settled_pressure = "200 barg", temperature = "15 degC" }', fill)
            .replace("gas = {", 'composition_basis = "mass"\ngas = {', 1)
        )
        return p

    a = assess_scenario(load_scenario(scenario(
        'fill = { settled_pressure = "200 barg", temperature = "15 degC" }'
    ))).vessels[0]  # fmt: skip
    s1 = a.blend.steps[0]
    assert s1.component == "carbon dioxide" and not s1.liquid_present
    assert s1.stop_pressure_Pa >= floor and s1.in_liquid_band
    assert ("blend-step-near-dew", "warning") in [(f.code, f.severity) for f in a.findings]
    assert a.governing_limit == BLEND_PLAN_LIMIT and a.max_safe_charge_kg < a.charged_mass_kg
    b = assess_scenario(load_scenario(scenario(
        f'fill = {{ mass = "{a.max_safe_charge_kg!r} kg", temperature = "15 degC" }}'
    ))).vessels[0]  # fmt: skip
    assert not any(s.in_liquid_band or s.liquid_present for s in b.blend.steps)
    assert b.blend.steps[0].stop_pressure_Pa < floor
    assert b.verdict == "pass", [(f.code, f.severity) for f in b.findings]


def test_recipe_rows_say_what_cannot_be_read_or_made() -> None:
    """A condensing step has no stop pressure in JSON (null, with liquid_present), a residual
    richer than the target gives no negative addition but "cannot be made", and a 5 g scale
    resolution is printed as 5 g (not rounded to 0.01 kg)."""
    from fillcheck.report.blend_section import blend_dict, blend_rows, blend_table_rows
    from fillcheck.report.content import Formatter

    fmt = Formatter("metric", P_ATM)
    f = fillcheck.mixture({"nitrogen": 0.6, "carbon dioxide": 0.4}, basis="mass")
    v = _vessel(f, _blend(("carbon dioxide", "nitrogen"), 278.15, scale=0.005))
    r = blend_recipe(v, 15.75)
    assert r.steps[0].liquid_present
    a = SimpleNamespace(blend=r, model_name="m", model="reference")
    steps = blend_dict(a)["steps"]
    assert steps[0]["stop_pressure_Pa"] is None and steps[0]["liquid_present"] is True
    assert steps[1]["stop_pressure_Pa"] == pytest.approx(r.steps[1].stop_pressure_Pa)
    rows = dict(blend_rows(a, fmt))
    assert rows["scale resolution"] == "5 g"
    assert "no stop pressure (liquid forms): go by weight" in rows["step 1: carbon dioxide"]
    g = fillcheck.mixture({"argon": 0.82, "carbon dioxide": 0.18})
    res = ResidualInput(40e5 + P_ATM, 288.15, "carbon dioxide")
    r2 = blend_recipe(_vessel(g, _blend(("argon", "carbon dioxide"), 288.15, residual=res)), 20.0)
    assert r2.steps[1].added_mass_kg < 0.0
    rows2 = dict(blend_rows(SimpleNamespace(blend=r2, model_name="m", model="reference"), fmt))
    said = rows2["step 2: carbon dioxide"]
    assert said.startswith("cannot be made") and "vent" in said and "-" not in said
    a2 = SimpleNamespace(blend=r2, model_name="m", model="reference")
    _, table = blend_table_rows(a2, fmt)
    assert all(row[2] == "cannot be made" for row in table)  # no pressure copied from step 1
    assert blend_dict(a2)["steps"][1]["stop_pressure_Pa"] is None


def test_a_blend_tare_that_differs_from_the_marked_one_is_refused(tmp_path) -> None:
    """The recipe's scale readings and the fill plan's stop by weight must use one tare: a
    [vessel.blend] tare that differs from the marked tare_mass is refused in one sentence."""
    p = tmp_path / "tare.toml"
    p.write_text(
        BASE.format(gas=MIX, blend='temperature = "15 degC"\ntare = "60.0 kg"').replace(
            "[vessel.blend]", 'marking = { tare_mass = "58.2 kg" }\n\n[vessel.blend]'
        )
    )
    with pytest.raises(InputError) as e:
        load_scenario(p)
    msg = str(e.value)
    assert msg.startswith("tare.toml: vessel 'B-1', field 'blend.tare': '60.0 kg' differs"), msg
    assert "58.2 kg" in msg and "\n" not in msg
    p.write_text(p.read_text().replace('tare = "60.0 kg"', 'tare = "58.2 kg"'))
    assert load_scenario(p).vessels[0].blend.tare_mass_kg == pytest.approx(58.2)


@pytest.mark.parametrize("column", ["composition_basis", "blend_order", "blend_temperature"])
def test_register_refuses_mixture_columns_on_a_single_gas_row(tmp_path, column) -> None:
    """A row whose gas cell names one gas and fills a column that goes with a mixture only is
    refused in the register's terms: row, vessel and that column, with the cell syntax of a
    mixture (not the scenario file's table syntax)."""
    from fillcheck.scenario.register import load_register

    cells = {"composition_basis": "mole", "blend_order": "argon > nitrogen",
             "blend_temperature": "15 degC"}  # fmt: skip
    reg = tmp_path / "one.csv"
    reg.write_text(
        "id,gas,water_capacity,settled_pressure,fill_temperature,max_temperature,"
        f"allowable_pressure,{column}\nAR-1,argon,50 L,200 barg,15 degC,50 degC,300 barg,"
        f"{cells[column]}\n"
    )
    with pytest.raises(InputError) as e:
        load_register(reg)
    msg = str(e.value)
    assert msg.startswith(f"one.csv: row 2 (vessel 'AR-1'), column '{column}': "), msg
    assert "'nitrogen 70 % + carbon dioxide 30 %'" in msg and "{" not in msg


def test_stop_table_and_reading_of_a_blend_that_cannot_be_made(tmp_path) -> None:
    """A 40 barg carbon dioxide residual is more carbon dioxide than argon 82 % + carbon dioxide
    18 % to 200 barg needs: stop-table gives that step no stop pressure ("cannot be made"),
    and a gauge reading on a blended vessel says it reads the finished mixture."""
    import numpy as np

    from fillcheck.assess.planning import read_gauge, stop_table
    from fillcheck.scenario.resolve import load_scenario

    p = tmp_path / "res.toml"
    p.write_text(
        BASE.format(
            gas='{ argon = "82 %", "carbon dioxide" = "18 %" }',
            blend='temperature = "15 degC"\norder = ["argon", "carbon dioxide"]\n'
            'residual = { pressure = "40 barg", temperature = "15 degC", gas = "carbon dioxide" }',
        )
    )
    sc = load_scenario(p)
    v = sc.vessels[0]
    st = stop_table(v, sc.reference_temperature_K, np.array([283.15, 288.15]))
    co2 = st.blend_steps[1]
    assert co2.component == "carbon dioxide" and co2.cannot_be_made
    assert co2.stop_pressure_Pa == [None, None] and co2.added_mass_kg < 0.0
    assert not st.blend_steps[0].cannot_be_made and st.blend_steps[0].stop_pressure_Pa[1] > 0
    r = read_gauge(v, sc.reference_temperature_K, 150e5, 288.15, 0.05, 2.0)
    assert r.blended


@pytest.mark.parametrize(
    ("order", "T", "cautioned"),
    [
        (("nitrogen", "carbon dioxide"), 288.15, {2}),
        (("carbon dioxide", "nitrogen"), 288.15, set()),
        (("nitrogen", "carbon dioxide"), 308.15, set()),  # above CO2's Tc: not liquefied
    ],
)
def test_a_liquefied_gas_added_above_its_vapour_pressure_is_cautioned(order, T, cautioned):
    """A supply cylinder of carbon dioxide at the blend temperature stands at its vapour
    pressure (CoolProp 8.0.0, Span–Wagner: 50.9 bara at 15 °C), so a step adding it to a
    higher stop pressure cannot be decanted: caution blend-supply-below-stop, naming the step.
    Added first, its step stops below that (common practice: the most easily liquefied gas
    first). Above its critical temperature there is no vapour pressure to exceed."""
    f = fillcheck.mixture({"nitrogen": 0.7, "carbon dioxide": 0.3}, basis="mass")
    n_tot = _heos_charge(("nitrogen", "carbon dioxide"), f.z, 288.15, 200e5 + P_ATM)
    r = blend_recipe(_vessel(f, _blend(order, T)), n_tot * f.molar_mass)
    got = {c.facts["step"] for c in r.cautions if c.code == "blend-supply-below-stop"}
    assert got == cautioned
    k = order.index("carbon dioxide")
    stop = r.steps[k].stop_pressure_Pa
    if T < CP.PropsSI("Tcrit", "CarbonDioxide"):
        P_sat = CP.PropsSI("P", "T", T, "Q", 0, "CarbonDioxide")
        assert (stop > P_sat) == (k + 1 in cautioned)
        for c in r.cautions:
            if c.code == "blend-supply-below-stop":
                assert c.facts["vapour_pressure_Pa"] == pytest.approx(P_sat, rel=1e-6)


def test_a_suggested_order_that_needs_a_booster_says_so():
    """Nitrogen 60 % + carbon dioxide 40 % by mass blended at 5 °C to settle at 200 barg at
    15 °C: carbon dioxide first condenses (its step stops above its vapour pressure of 39.7
    bara at 5 °C, CoolProp 8.0.0), so the recipe suggests nitrogen first; that order's carbon
    dioxide step then stops far above the vapour pressure, and the caution says so for the
    suggested order."""
    f = fillcheck.mixture({"nitrogen": 0.6, "carbon dioxide": 0.4}, basis="mass")
    n_tot = _heos_charge(("nitrogen", "carbon dioxide"), f.z, 288.15, 200e5 + P_ATM)
    blend = _blend(("carbon dioxide", "nitrogen"), 278.15)
    r = blend_recipe(_vessel(f, blend), n_tot * f.molar_mass)
    assert r.steps[0].liquid_present
    assert r.suggested_order == ("nitrogen", "carbon dioxide")
    P_sat = CP.PropsSI("P", "T", 278.15, "Q", 0, "CarbonDioxide")
    got = [c.facts for c in r.cautions if c.code == "blend-supply-below-stop"]
    assert got == [
        {
            "step": 2,
            "component": "carbon dioxide",
            "vapour_pressure_Pa": pytest.approx(P_sat, rel=1e-6),
            "suggested_order": True,
        }
    ]
