"""The fill process (thermo.fill_balance, assess.fill_process, [vessel.filling]).

Independent references: the ideal-gas result for an evacuated vessel filled adiabatically from
a constant supply, T₂ = γ·T_supply (Çengel, Boles, *Thermodynamics: An Engineering Approach*,
charging of a rigid tank; a textbook result), and the same energy balance solved here by
bisection with CoolProp 8.0.0's internal energy and enthalpy (``PropsSI('U'/'H', ...)``,
``AbstractState`` for a mixture), whose reference states differ from fillcheck's and cancel in
the balance. Consistency: energy conserved to round-off along every curve, the two-node model's
limits (a huge gas–wall coefficient is the lumped wall; none is the gas alone).
"""

from __future__ import annotations

from pathlib import Path

import CoolProp.CoolProp as CP
import numpy as np
import pytest
from typer.testing import CliRunner

import fillcheck
from fillcheck.assess.vessel import assess_vessel
from fillcheck.cli import app
from fillcheck.scenario.resolve import load_scenario, scenario_from_dict
from fillcheck.thermo.fill_balance import FillSpec, fill_curve
from fillcheck.thermo.mixture_fluid import mixture

REPO = Path(__file__).resolve().parents[1]
DEMO = REPO / "scenarios" / "nitrogen_fast_fill.toml"
T15 = 288.15
ATM = 101_325.0
V50 = 0.050


def _bisect(g, a: float, b: float, n: int = 80) -> float:
    """A root of g (increasing) in [a, b] by bisection (independent of fillcheck's solver)."""
    for _ in range(n):
        m = 0.5 * (a + b)
        a, b = (a, m) if g(m) > 0 else (m, b)
    return 0.5 * (a + b)


def _coolprop_end_T(name: str, m_kg: float, P_supply: float, wall_J_K: float) -> float:
    """End temperature [K] of a fill from 1 atm, 15 °C to m_kg in 50 L from a supply at
    P_supply and 15 °C through a valve, wall at the gas temperature: CoolProp's U and H."""
    h_s = CP.PropsSI("H", "T", T15, "P", P_supply, name)
    u1 = CP.PropsSI("U", "T", T15, "P", ATM, name)
    m1 = CP.PropsSI("D", "T", T15, "P", ATM, name) * V50
    rho = m_kg / V50

    def g(T: float) -> float:
        u2 = CP.PropsSI("U", "T", T, "D", rho, name)
        return m_kg * u2 - m1 * u1 + wall_J_K * (T - T15) - (m_kg - m1) * h_s

    return _bisect(g, 200.0, 900.0)


FILLS = [
    {},
    {"wall_heat_capacity_J_K": 27840.0, "heat_transfer": "lumped"},
    {"source": "compressor", "inlet_temperature_K": 313.15, "supply_pressure_Pa": None},
    {
        "wall_heat_capacity_J_K": 27840.0,
        "heat_transfer": "two-node",
        "gas_wall_conductance_W_K": 150.0,
        "wall_ambient_conductance_W_K": 10.0,
    },
    {
        "source": "compressor",
        "inlet_temperature_K": 313.15,
        "supply_pressure_Pa": None,
        "wall_heat_capacity_J_K": 27840.0,
        "heat_transfer": "two-node",
        "gas_wall_conductance_W_K": 150.0,
    },
]
"""The fills of a 50 L nitrogen vessel that the curve tests run over (valve, compressor; each
heat-transfer model)."""
FILL_IDS = ["adiabatic", "lumped", "compressor", "two-node", "compressor-two-node"]


def _spec(**kw) -> FillSpec:
    base = dict(
        source="supply",
        inlet_temperature_K=T15,
        supply_pressure_Pa=331.01325e5,
        start_temperature_K=T15,
        start_pressure_Pa=ATM,
        duration_s=240.0,
        ambient_temperature_K=T15,
    )
    base.update(kw)
    return FillSpec(**base)


# --- the ideal-gas limit ----------------------------------------------------------------------


@pytest.mark.parametrize("gas", ["helium", "argon"])
def test_evacuated_adiabatic_fill_ends_at_gamma_times_supply_temperature(gas: str) -> None:
    # a monatomic gas has cp⁰ = 5/2 R exactly, γ = 5/3; at 1 kPa it is an ideal gas to 1e-5
    f = fillcheck.fluid(gas)
    spec = _spec(supply_pressure_Pa=1000.0, start_pressure_Pa=0.0)
    n_end = 0.05 * 300.0 / (8.314 * 400.0)  # about 300 Pa at the end
    c = fill_curve(f, V50, n_end, spec)
    assert c.temperature_K[-1] == pytest.approx(5.0 / 3.0 * T15, rel=3e-5)
    # every point of the curve: the evacuated start makes T independent of the mass in
    assert np.allclose(c.temperature_K[1:], 5.0 / 3.0 * T15, rtol=3e-5)


# --- real gas against CoolProp ----------------------------------------------------------------


@pytest.mark.parametrize(
    ("wall_J_K", "expected_K"),
    [
        # CoolProp 8.0.0 energy balance (_coolprop_end_T here, bisection to 1e-10 K):
        (0.0, 391.96423),  # 11.0 kg nitrogen, adiabatic
        (58.0 * 480.0, 312.58554),  # the same with a 58 kg steel wall at 0.48 kJ/(kg K)
    ],
)
def test_nitrogen_fill_against_coolprop(wall_J_K: float, expected_K: float) -> None:
    f = fillcheck.fluid("nitrogen")
    ht = "lumped" if wall_J_K else "adiabatic"
    c = fill_curve(
        f, V50, 11.0 / f.molar_mass, _spec(wall_heat_capacity_J_K=wall_J_K, heat_transfer=ht)
    )
    cp_T = _coolprop_end_T("Nitrogen", 11.0, 331.01325e5, wall_J_K)
    assert cp_T == pytest.approx(expected_K, abs=1e-4)
    assert c.temperature_K[-1] == pytest.approx(cp_T, abs=1e-6)
    rho = 11.0 / V50
    assert c.pressure_Pa[-1] == pytest.approx(
        CP.PropsSI("P", "T", cp_T, "D", rho, "Nitrogen"), rel=1e-8
    )


def test_issue_example_stop_at_300_barg() -> None:
    # the issue's example: nitrogen stopped at 300 barg after a fast fill, about 120 °C
    # adiabatic and 48 °C with a 58 kg steel wall, settling at about 198 and 256 barg
    # (energy balances with CoolProp's properties). Reproduced: the charge whose end of fill
    # is 300 barg, then its settled pressure, both by CoolProp.
    f = fillcheck.fluid("nitrogen")
    for wall, T_about, settled_about in ((0.0, 120.0, 198.0), (58 * 480.0, 48.0, 256.0)):
        ht = "lumped" if wall else "adiabatic"
        spec = _spec(wall_heat_capacity_J_K=wall, heat_transfer=ht, steps=1)

        def end_P(m: float, spec: FillSpec = spec) -> float:
            return fill_curve(f, V50, m / f.molar_mass, spec).pressure_Pa[-1] - 301.01325e5

        m = _bisect(end_P, 5.0, 20.0, 60)
        T_end = fill_curve(f, V50, m / f.molar_mass, spec).temperature_K[-1]
        assert T_end - 273.15 == pytest.approx(T_about, abs=1.0)
        assert T_end == pytest.approx(_coolprop_end_T("Nitrogen", m, 331.01325e5, wall), abs=1e-6)
        settled = CP.PropsSI("P", "T", T15, "D", m / V50, "Nitrogen")
        assert (settled - ATM) / 1e5 == pytest.approx(settled_about, abs=1.0)


def test_mixture_fill_against_coolprop() -> None:
    # argon–carbon dioxide 82/18 under the multi-fluid model; CoolProp's HEOS mixture evaluates
    # the same published model. 3000 mol/m³ in 50 L from 1 atm, supply at 200 bara, 15 °C.
    m = mixture({"argon": 0.82, "carbon dioxide": 0.18})
    assert m.model == "reference"
    c = fill_curve(m, V50, V50 * 3000.0, _spec(supply_pressure_Pa=200e5))
    AS = CP.AbstractState("HEOS", "Argon&CarbonDioxide")
    AS.set_mole_fractions([0.82, 0.18])
    AS.update(CP.PT_INPUTS, 200e5, T15)
    h_s = AS.hmolar()
    AS.update(CP.PT_INPUTS, ATM, T15)
    u1, n1 = AS.umolar(), AS.rhomolar() * V50
    n2 = V50 * 3000.0

    def g(T: float) -> float:
        AS.update(CP.DmolarT_INPUTS, 3000.0, T)
        return n2 * AS.umolar() - n1 * u1 - (n2 - n1) * h_s

    T_cp = _bisect(g, 250.0, 600.0)
    assert T_cp == pytest.approx(334.97463, abs=1e-4)  # CoolProp 8.0.0, this bisection
    # the components' ideal parts carry their own gas constants, which differ from the mixture
    # model's in the sixth digit: agreement to a millikelvin
    assert c.temperature_K[-1] == pytest.approx(T_cp, abs=1e-3)


# --- conservation and limits ------------------------------------------------------------------


@pytest.mark.parametrize("kw", FILLS, ids=FILL_IDS)
def test_energy_conserved_to_round_off_along_the_curve(kw: dict) -> None:
    f = fillcheck.fluid("nitrogen")
    c = fill_curve(f, V50, 11.0 / f.molar_mass, _spec(**kw))
    assert np.max(np.abs(c.energy_residual_J)) <= 1e-9 * c.energy_in_J[-1]
    assert np.all(np.diff(c.moles) > 0)  # constant mass flow
    assert np.allclose(np.diff(c.moles), np.diff(c.moles)[0], rtol=1e-9)


def test_two_node_limits_are_lumped_and_adiabatic() -> None:
    f = fillcheck.fluid("nitrogen")
    n = 11.0 / f.molar_mass
    lumped = fill_curve(f, V50, n, _spec(wall_heat_capacity_J_K=27840.0, heat_transfer="lumped"))
    alone = fill_curve(f, V50, n, _spec())
    tight = fill_curve(
        f,
        V50,
        n,
        _spec(
            wall_heat_capacity_J_K=27840.0, heat_transfer="two-node", gas_wall_conductance_W_K=1e9
        ),
    )
    loose = fill_curve(
        f,
        V50,
        n,
        _spec(
            wall_heat_capacity_J_K=27840.0, heat_transfer="two-node", gas_wall_conductance_W_K=1e-9
        ),
    )
    assert tight.temperature_K[-1] == pytest.approx(lumped.temperature_K[-1], abs=1e-3)
    assert loose.temperature_K[-1] == pytest.approx(alone.temperature_K[-1], abs=1e-3)
    # a real coefficient lies between, and heat to the ambient cools it further
    mid = fill_curve(
        f,
        V50,
        n,
        _spec(
            wall_heat_capacity_J_K=27840.0, heat_transfer="two-node", gas_wall_conductance_W_K=100.0
        ),
    )
    cooled = fill_curve(
        f,
        V50,
        n,
        _spec(
            wall_heat_capacity_J_K=27840.0,
            heat_transfer="two-node",
            gas_wall_conductance_W_K=100.0,
            wall_ambient_conductance_W_K=50.0,
        ),
    )
    assert lumped.temperature_K[-1] < mid.temperature_K[-1] < alone.temperature_K[-1]
    assert cooled.temperature_K[-1] < mid.temperature_K[-1]
    assert cooled.heat_out_J[-1] > 0.0


def test_compressor_curve_converges_with_steps() -> None:
    f = fillcheck.fluid("nitrogen")
    kw = {"source": "compressor", "inlet_temperature_K": 313.15, "supply_pressure_Pa": None}
    coarse = fill_curve(f, V50, 11.0 / f.molar_mass, _spec(steps=120, **kw))
    fine = fill_curve(f, V50, 11.0 / f.molar_mass, _spec(steps=480, **kw))
    # the delivery enthalpy at each step's mean pressure: second order in the step
    assert coarse.temperature_K[-1] == pytest.approx(fine.temperature_K[-1], abs=1e-3)
    # gas delivered at 40 °C into a vessel at its own pressure heats it above 40 °C
    assert fine.temperature_K[-1] > 313.15


# --- the scenario, the verdict and the stop pressure ------------------------------------------


def test_demo_fill_process_verdicts_and_stop_pressure_settles_at_target() -> None:
    sc = load_scenario(DEMO)
    steel, composite = (assess_vessel(v, sc.reference_temperature_K) for v in sc.vessels[:2])
    assert steel.verdict == "pass"
    assert composite.verdict == "fail"
    codes = {f.code for f in composite.findings if f.severity == "fail"}
    assert codes == {"allowable-exceeded", "fill-temperature-exceeded"}
    for a in (steel, composite):
        r = a.filling
        # the stop pressure, followed while the gas is at the end-of-fill temperature, gives
        # a charge that settles at the fill's 200 barg at 15 °C (CoolProp's reference equation)
        rho = CP.PropsSI("D", "T", r.stop_temperature_K, "P", r.stop_pressure_Pa, "Nitrogen")
        settled = CP.PropsSI("P", "T", T15, "D", rho, "Nitrogen")
        assert settled == pytest.approx(200e5 + ATM, rel=1e-8)
        # the hot end of the fill is the top of the checked range
        assert a.max_state.temperature_K == pytest.approx(
            max(r.stop_temperature_K, 323.15), abs=1e-9
        )
    assert steel.filling.peak_temperature_K < 85.0 + 273.15 < composite.filling.peak_temperature_K


def test_json_filling_key() -> None:
    import json

    res = CliRunner().invoke(app, ["check", str(DEMO), "--json"])
    assert res.exit_code == 1
    d = json.loads(res.stdout)
    f = d["vessels"][0]["filling"]
    for k in (
        "end_temperature_K",
        "end_pressure_Pa",
        "settled_pressure_Pa",
        "peak_temperature_K",
        "added_mass_kg",
        "stop_pressure_Pa",
        "curve",
    ):
        assert k in f
    assert f["curve"][0]["time_s"] == 0.0 and f["curve"][-1]["time_s"] == 240.0
    assert set(f["curve"][0]) >= {"time_s", "temperature_K", "pressure_Pa"}
    assert d["vessels"][0]["filling"]["complete"] is True


def _vessel(filling: dict, limits: dict | None = None) -> dict:
    return {
        "vessel": [
            {
                "id": "N2-TEST",
                "gas": "nitrogen",
                "water_capacity": "50 L",
                "fill": {"settled_pressure": "200 barg", "temperature": "15 degC"},
                "storage": {"max_temperature": "50 degC"},
                "limits": {"allowable_pressure": "300 barg", **(limits or {})},
                "filling": filling,
            }
        ]
    }


def test_supply_short_of_the_charge() -> None:
    # a 220 barg supply cannot put in a charge whose stop pressure is about 225 barg (lumped)
    raw = _vessel(
        {
            "supply": {"pressure": "220 barg", "temperature": "15 degC"},
            "duration": "4 min",
            "wall": {"mass": "58 kg", "specific_heat": "0.48 kJ/(kg K)"},
        }
    )
    sc = scenario_from_dict(raw, "short.toml")
    a = assess_vessel(sc.vessels[0], sc.reference_temperature_K)
    r = a.filling
    assert not r.complete
    assert r.end_pressure_Pa == pytest.approx(220e5 + ATM, rel=1e-7)
    assert r.stop_pressure_Pa > r.end_pressure_Pa
    assert "fill-supply-short" in {f.code for f in a.findings}
    assert r.settled_pressure_Pa < 200e5 + ATM


def test_liquefied_gas_fill_is_not_computed_but_reviewed() -> None:
    raw = {
        "vessel": [
            {
                "id": "CO2-TEST",
                "gas": "carbon dioxide",
                "water_capacity": "50 L",
                "fill": {"mass": "30 kg"},
                "storage": {"max_temperature": "25 degC"},
                "limits": {"allowable_pressure": "250 barg"},
                "filling": {
                    "supply": {"pressure": "60 barg", "temperature": "15 degC"},
                    "duration": "10 min",
                },
            }
        ]
    }
    sc = scenario_from_dict(raw, "co2.toml")
    a = assess_vessel(sc.vessels[0], sc.reference_temperature_K)
    assert a.filling.error is not None
    assert "fill-not-computed" in {f.code for f in a.findings}
    assert a.verdict != "pass"


# --- refused input ----------------------------------------------------------------------------

GOOD = {"supply": {"pressure": "330 barg", "temperature": "15 degC"}, "duration": "4 min"}


@pytest.mark.parametrize(
    ("filling", "limits", "field", "hint"),
    [
        (
            {**GOOD, "compressor": {"delivery_temperature": "40 degC"}},
            None,
            "filling",
            "exactly one",
        ),
        ({"duration": "4 min"}, None, "filling", "exactly one"),
        ({**GOOD, "duration": "4 bar"}, None, "filling.duration", "4 min"),
        ({**GOOD, "duration": "0 s"}, None, "filling.duration", "above zero"),
        ({**GOOD, "heat_transfer": "lumped"}, None, "filling.heat_transfer", "wall"),
        ({**GOOD, "wall": {"mass": "58 kg"}}, None, "filling.wall", "material"),
        (
            {**GOOD, "wall": {"mass": "58 kg", "specific_heat": "48 kJ/(kg K)"}},
            None,
            "filling.wall.specific_heat",
            "0.48",
        ),
        ({**GOOD, "start": {"pressure": "340 barg"}}, None, "filling.start.pressure", "below"),
        (
            {**GOOD, "supply": {"pressure": "300 bar", "temperature": "15 degC"}},
            None,
            "filling.supply.pressure",
            "barg",
        ),
        (
            {
                **GOOD,
                "wall": {"mass": "58 kg", "material": "steel"},
                "heat_transfer": {"coefficient": "150 W/(m2 K)", "area": "0 m2"},
            },
            None,
            "filling.heat_transfer.area",
            "m2",
        ),
        (GOOD, {"max_fill_temperature": "10 degC"}, "limits.max_fill_temperature", "85"),
        ({**GOOD, "flow": "steady"}, None, "filling.flow", "pressure-ramp"),
        # a wall without a mass needs the cylinder's marked tare to take it from
        ({**GOOD, "wall": {"material": "steel"}}, None, "filling.wall.mass", "tare_mass"),
    ],
)
def test_bad_filling_input_is_refused_in_one_sentence(
    tmp_path: Path, filling: dict, limits: dict | None, field: str, hint: str
) -> None:
    path = tmp_path / "bad.toml"
    path.write_text(_toml(_vessel(filling, limits)), encoding="utf-8")
    res = CliRunner().invoke(app, ["check", str(path)])
    assert res.exit_code == 2
    assert res.stdout == ""
    msg = res.stderr.strip()
    assert "\n" not in msg and "Traceback" not in msg
    assert "bad.toml" in msg and "N2-TEST" in msg and f"'{field}'" in msg, msg
    assert hint in msg, msg


def _toml(raw: dict) -> str:
    """A tiny TOML writer for the nested dicts of these tests (strings and tables only)."""
    v = raw["vessel"][0]
    lines = ["[[vessel]]"]
    for k, x in v.items():
        if not isinstance(x, dict):
            lines.append(f'{k} = "{x}"')
    for k, x in v.items():
        if isinstance(x, dict) and k != "filling":
            lines.append(f"{k} = {_inline(x)}")
    if "filling" in v:
        lines.append("[vessel.filling]")
        for k, x in v["filling"].items():
            lines.append(f"{k} = {_inline(x) if isinstance(x, dict) else chr(34) + x + chr(34)}")
    return "\n".join(lines) + "\n"


def _inline(d: dict) -> str:
    return (
        "{ "
        + ", ".join(
            f'"{k}" = {_inline(x) if isinstance(x, dict) else chr(34) + str(x) + chr(34)}'
            for k, x in d.items()
        )
        + " }"
    )


# --- cascade ----------------------------------------------------------------------------------


def test_cascade_mass_balance_exact_and_energy_conserved() -> None:
    from fillcheck.thermo.fill_cascade import Bank, cascade_fill

    f = fillcheck.fluid("nitrogen")
    banks = [Bank(0.3, T15, 101e5), Bank(0.3, T15, 201e5), Bank(0.3, T15, 301e5)]
    spec = _spec(
        supply_pressure_Pa=None,
        source="cascade",
        wall_heat_capacity_J_K=27840.0,
        heat_transfer="lumped",
    )
    r = cascade_fill(f, V50, 11.0 / f.molar_mass, spec, banks)
    c = r.curve
    assert r.complete
    added = c.moles[-1] - c.moles[0]
    assert sum(r.bank_moles_given) == pytest.approx(added, rel=1e-12)
    assert abs(r.system_energy_residual_J) <= 1e-9 * c.energy_in_J[-1]
    assert np.max(np.abs(c.energy_residual_J)) <= 1e-9 * c.energy_in_J[-1]
    # banks used in order, each ending within the switching difference of the vessel or above it
    assert list(np.unique(r.bank_in_use[1:])) == [0, 1, 2]
    assert np.all(np.diff(r.bank_in_use[1:]) >= 0)
    # each bank's gas expanded and cooled
    assert all(T < T15 for T in r.bank_end_temperature_K)


def test_cascade_of_one_huge_bank_is_a_supply_at_a_fixed_state() -> None:
    from fillcheck.thermo.fill_cascade import Bank, cascade_fill

    f = fillcheck.fluid("nitrogen")
    n = 11.0 / f.molar_mass
    supply = fill_curve(f, V50, n, _spec())
    r = cascade_fill(
        f,
        V50,
        n,
        _spec(source="cascade", supply_pressure_Pa=None),
        [Bank(1000.0, T15, 331.01325e5)],
    )
    # 1000 m³ loses 1e-5 of its gas: its state barely moves
    assert r.curve.temperature_K[-1] == pytest.approx(supply.temperature_K[-1], abs=1e-2)


def test_demo_cascade_vessel() -> None:
    sc = load_scenario(DEMO)
    v = next(x for x in sc.vessels if x.id == "N2-50-CASCADE")
    a = assess_vessel(v, sc.reference_temperature_K)
    r = a.filling
    assert r.complete and len(r.cascade) == 3
    assert sum(b["mass_given_kg"] for b in r.cascade) == pytest.approx(r.added_mass_kg, rel=1e-12)
    rho = CP.PropsSI("D", "T", r.stop_temperature_K, "P", r.stop_pressure_Pa, "Nitrogen")
    assert CP.PropsSI("P", "T", T15, "D", rho, "Nitrogen") == pytest.approx(200e5 + ATM, rel=1e-8)
    # the banks hold 0.9 m³ of nitrogen at 100–300 barg (CoolProp: about 138 kg); the vessels
    # filled one after another take far less, since the top bank must stay above the stop
    n = r.cascade_vessels_filled
    banks_kg = sum(
        CP.PropsSI("D", "T", T15, "P", P, "Nitrogen") * 0.3
        for P in (100e5 + ATM, 200e5 + ATM, 300e5 + ATM)
    )
    assert 1 <= n and n * r.added_mass_kg < banks_kg


@pytest.mark.parametrize(
    ("filling", "field"),
    [
        ({"cascade": [], "duration": "4 min"}, "filling.cascade"),
        ({**GOOD, "switch_difference": "5 bar"}, "filling.switch_difference"),
        (
            {
                "cascade": [
                    {"water_capacity": "300 L", "pressure": "0 barg", "temperature": "15 degC"}
                ],
                "duration": "4 min",
            },
            "filling.cascade[1].pressure",
        ),
        (
            {
                "cascade": [
                    {"water_capacity": "300 L", "pressure": "200 barg", "temperature": "15 degC"}
                ],
                "switch_difference": "500 bar",
                "duration": "4 min",
            },
            "filling.switch_difference",
        ),
        (
            {
                "cascade": [
                    {"water_capacity": "300 L", "pressure": "300 barg", "temperature": "15 degC"}
                ],
                "duration": "4 min",
                "flow": "pressure-ramp",
            },
            "filling.flow",
        ),
    ],
)
def test_bad_cascade_refused(filling: dict, field: str) -> None:
    from fillcheck.errors import InputError

    with pytest.raises(InputError) as e:
        scenario_from_dict(_vessel(filling), "bad.toml")
    msg = str(e.value)
    assert "bad.toml" in msg and "N2-TEST" in msg and f"'{field}'" in msg and "\n" not in msg, msg


def test_fill_plan_hot_warns_where_the_plan_filled_this_way_ends_over_the_limit() -> None:
    # 150 barg settled, filled in 90 s from 350 barg with the gas alone: the plan's larger
    # charge ends hotter than the charge asked for, and over 300 barg while hot
    raw = _vessel(
        {"supply": {"pressure": "350 barg", "temperature": "15 degC"}, "duration": "90 s"}
    )
    raw["vessel"][0]["fill"] = {"settled_pressure": "150 barg", "temperature": "15 degC"}
    sc = scenario_from_dict(raw, "hot.toml")
    a = assess_vessel(sc.vessels[0], sc.reference_temperature_K)
    assert a.verdict == "pass"
    hot = [f for f in a.findings if f.code == "fill-plan-hot"]
    assert len(hot) == 1 and hot[0].severity == "warning"
    # its neighbour: a steel wall sharing the heat keeps the plan's charge within the limit
    raw["vessel"][0]["filling"]["wall"] = {"mass": "58 kg", "material": "steel"}
    sc = scenario_from_dict(raw, "cool.toml")
    a = assess_vessel(sc.vessels[0], sc.reference_temperature_K)
    assert "fill-plan-hot" not in {f.code for f in a.findings}


def test_html_has_the_fill_process_and_its_chart(tmp_path: Path) -> None:
    out = tmp_path / "fill.html"
    res = CliRunner().invoke(app, ["check", str(DEMO), "--html", str(out)])
    assert res.exit_code == 1
    html = out.read_text(encoding="utf-8")
    n = len(load_scenario(DEMO).vessels)  # every demo vessel has a fill process
    assert html.count("<h3>Fill process</h3>") == n
    assert html.count("<svg") == 2 * n  # a pressure–temperature chart and a fill chart per vessel
    assert "gas temperature" in html


# --- the flow profile and the wall from the marked tare ---------------------------------------


@pytest.mark.parametrize("kw", FILLS, ids=FILL_IDS)
def test_pressure_ramp_rises_at_a_constant_rate(kw: dict) -> None:
    f = fillcheck.fluid("nitrogen")
    n = 11.0 / f.molar_mass
    ramp = fill_curve(f, V50, n, _spec(flow="pressure-ramp", **kw))
    P, t = ramp.pressure_Pa, ramp.time_s
    rate = (P[-1] - P[0]) / t[-1]
    # the definition of the profile: P(t) = P(0) + rate·t along the whole curve
    assert np.max(np.abs(P - P[0] - rate * t)) <= 1e-6 * (P[-1] - P[0])
    assert t[-1] == pytest.approx(240.0, rel=1e-12) and np.all(np.diff(t) > 0)
    assert np.max(np.abs(ramp.energy_residual_J)) <= 1e-9 * ramp.energy_in_J[-1]
    same = fill_curve(f, V50, n, _spec(**kw))
    if kw.get("heat_transfer") != "two-node":
        # no heat leaves the gas and wall: the states depend on the mass alone, not on time
        assert np.allclose(ramp.temperature_K, same.temperature_K, rtol=0, atol=1e-9)
    else:
        # the mass enters faster early in a pressure ramp (the pressure rises slowly while
        # the vessel is near empty), so the end state differs, but by little: the wall
        # exchanges heat over the same duration
        assert ramp.temperature_K[-1] != pytest.approx(same.temperature_K[-1], abs=1e-6)
        assert abs(ramp.temperature_K[-1] - same.temperature_K[-1]) < 5.0


def test_wall_from_the_marked_tare() -> None:
    raw = _vessel({**GOOD, "wall": {"material": "steel"}})
    raw["vessel"][0]["marking"] = {"tare_mass": "58.5 kg"}
    v = scenario_from_dict(raw, "tare.toml").vessels[0]
    # steel's specific heat 434 J/(kg K) (Incropera, DeWitt, Table A.1; from memory)
    assert v.filling.wall_heat_capacity_J_K == pytest.approx(58.5 * 434.0, rel=1e-12)
    assert "tare" in v.filling.wall_source
    given = _vessel({**GOOD, "wall": {"mass": "58.5 kg", "material": "steel"}})
    a = assess_vessel(v, 288.15)
    b = assess_vessel(scenario_from_dict(given, "mass.toml").vessels[0], 288.15)
    assert a.filling.end_temperature_K == pytest.approx(b.filling.end_temperature_K, abs=1e-12)


def test_demo_marked_vessel_ramp_settles_at_target() -> None:
    sc = load_scenario(DEMO)
    v = next(x for x in sc.vessels if x.id == "N2-50-MARKED")
    a = assess_vessel(v, sc.reference_temperature_K)
    r = a.filling
    rho = CP.PropsSI("D", "T", r.stop_temperature_K, "P", r.stop_pressure_Pa, "Nitrogen")
    assert CP.PropsSI("P", "T", T15, "D", rho, "Nitrogen") == pytest.approx(200e5 + ATM, rel=1e-8)
    assert a.verdict == "pass"


def test_stop_table_from_the_fill_process() -> None:
    import json

    res = CliRunner().invoke(app, ["stop-table", str(DEMO), "--from-fill", "--json"])
    tables = {t["vessel_id"]: t for t in json.loads(res.stdout)["result"]}
    sc = load_scenario(DEMO)
    assert set(tables) == {v.id for v in sc.vessels}  # every demo vessel has a fill process
    for v in sc.vessels:
        a = assess_vessel(v, sc.reference_temperature_K)
        t = tables[v.id]
        rows = t["rows"]
        # the rows run from the bay's ambient temperature to the computed end of the fill
        assert rows[0]["gas_temperature_K"] == pytest.approx(v.filling.ambient_temperature_K)
        assert rows[-1]["gas_temperature_K"] == t["fill_end_temperature_K"]
        assert t["fill_end_temperature_K"] == pytest.approx(a.filling.stop_temperature_K, abs=1e-9)
        # at the end temperature the table's stop pressure is the fill process's stop pressure
        assert rows[-1]["stop_pressure_Pa"] == pytest.approx(a.filling.stop_pressure_Pa, rel=1e-9)


def test_stop_table_from_fill_needs_a_fill_process(tmp_path: Path) -> None:
    res = CliRunner().invoke(
        app,
        ["stop-table", str(REPO / "scenarios" / "welding_supply_refill.toml"), "--from-fill"],
    )
    assert res.exit_code == 2 and "[vessel.filling]" in res.stderr
