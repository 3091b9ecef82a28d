"""Storage areas (INTERFACES.md §8): the inventory, the worst single release and ventilation.

Independent sources: CoolProp 8.0.0 (densities at the area's conditions and in the vessels),
the `chemicals` package's copy of IEC 60079-20-1 (2010) lower flammable limits, numerical
integration (scipy) of the well-mixed room's differential equations, and the hand formulas of
the displacement and well-mixed models written out here. Every site and company is invented.
"""

from __future__ import annotations

import json
import math
import re
from pathlib import Path

import numpy as np
import pytest
from typer.testing import CliRunner

from fillcheck.assess import assess_scenario
from fillcheck.assess import release as rel
from fillcheck.cli import app
from fillcheck.errors import InputError
from fillcheck.fluids.catalog import all_fluids
from fillcheck.fluids.classification import LFL
from fillcheck.scenario.resolve import scenario_from_dict

CP = pytest.importorskip("CoolProp.CoolProp")

AIR_O2 = 0.2095  # dry air's oxygen mole fraction (US Standard Atmosphere 1976; from memory)
AIR_CO2 = 0.00042  # outdoor air, about 420 ppm (NOAA global mean 2023; from memory)
ATM = 101325.0  # [Pa], by definition
T20 = 293.15  # [K]


def _vessel(vid: str, gas: str, area: str | None = "ROOM", **kw) -> dict:
    v = {
        "id": vid,
        "gas": gas,
        "water_capacity": kw.pop("water_capacity", "50 L"),
        "fill": kw.pop("fill", {"pressure": "200 barg", "temperature": "15 degC"}),
        "storage": {"max_temperature": "40 degC"},
        "limits": {"allowable_pressure": "300 barg"},
        **kw,
    }
    if area is not None:
        v["area"] = area
    return v


def _area(aid: str = "ROOM", volume: str = "20 m3", air: str = "1 /h", **kw) -> dict:
    return {"id": aid, "volume": volume, "air_changes": air, "temperature": "20 degC", **kw}


def _assess(vessels: list[dict], areas: list[dict]):
    return assess_scenario(scenario_from_dict({"vessel": vessels, "area": areas}, "stores.toml"))


# --- the check --------------------------------------------------------------------------


def test_nitrogen_50_L_200_bar_into_20_m3_leaves_11_to_14_percent_oxygen() -> None:
    # Expectation from CoolProp (Span et al. 2000): the charge at 200 bar absolute and 20 °C
    # (the "200 bar" with the gas at the room's temperature), its gas volume at 20 °C
    # and 1 atm, then the two hand formulas. (At 200 barg and 15 °C the charge is 2.6 % larger
    # and the displacement estimate 10.9 %.)
    m = CP.PropsSI("D", "T", T20, "P", 200e5, "Nitrogen") * 0.050
    Vg = m / CP.PropsSI("D", "T", T20, "P", ATM, "Nitrogen")
    x_disp = Vg / 20.0  # pure displacement
    x_mixed = 1.0 - math.exp(-Vg / 20.0)  # well mixed with outflow
    fill = {"pressure": "200 bara", "temperature": "20 degC"}
    a = _assess([_vessel("N2-1", "nitrogen", fill=fill)], [_area()]).areas[0]
    r = a.release
    assert r.volume.volume_m3 == pytest.approx(Vg, rel=1e-7)
    assert r.air.oxygen == pytest.approx(AIR_O2 * (1 - x_disp), rel=1e-7)
    assert r.air_mixed.oxygen == pytest.approx(AIR_O2 * (1 - x_mixed), rel=1e-7)
    assert 0.11 <= r.air.oxygen <= 0.14 and 0.11 <= r.air_mixed.oxygen <= 0.14
    assert a.verdict == "fail"
    assert "area-oxygen-deficient" in {f.code for f in a.findings}


# --- the release: hand formulas and numerical integration --------------------------------------


@pytest.mark.parametrize("ratio", [0.01, 0.3, 0.9, 1.7])
def test_release_fractions_against_the_two_models(ratio: float) -> None:
    # Pure displacement: x = V_g/V (capped at 1). Well mixed with outflow: dx/dV_g = (1 - x)/V,
    # integrated numerically with scipy (independent of the closed form 1 - exp(-V_g/V)).
    from scipy.integrate import solve_ivp

    V = 20.0
    Vg = ratio * V
    assert rel.displacement_fraction(Vg, V) == pytest.approx(min(ratio, 1.0), rel=1e-15)
    sol = solve_ivp(lambda _v, x: (1 - x) / V, (0, Vg), [0.0], rtol=1e-11, atol=1e-13)
    assert rel.mixed_outflow_fraction(Vg, V) == pytest.approx(sol.y[0, -1], rel=1e-8)
    assert rel.mixed_outflow_fraction(Vg, V) <= rel.displacement_fraction(Vg, V)


def test_atmosphere_of_a_mixture_by_hand() -> None:
    # 70 % nitrogen, 30 % carbon dioxide (mol) at 40 % of the room: O2 = 0.2095 (1 - x),
    # CO2 = 420 ppm (1 - x) + 0.3 x; methane 5 % + propane 5 % in nitrogen: Le Chatelier
    # share = x (0.05/LFL_CH4 + 0.05/LFL_C3H8) with IEC 60079-20-1 limits via `chemicals`.
    from chemicals import safety

    hz = {"nitrogen": frozenset({"asphyxiant"}), "carbon dioxide": frozenset({"asphyxiant"})}
    mix = rel.gas_mix({"nitrogen": 0.7, "carbon dioxide": 0.3}, hz, LFL)
    air = rel.atmosphere(0.4, mix)
    assert air.oxygen == pytest.approx(AIR_O2 * 0.6, rel=1e-12)
    assert air.carbon_dioxide == pytest.approx(AIR_CO2 * 0.6 + 0.3 * 0.4, rel=1e-12)
    fl = frozenset({"flammable"})
    mix = rel.gas_mix(
        {"nitrogen": 0.9, "methane": 0.05, "propane": 0.05},
        {"nitrogen": frozenset(), "methane": fl, "propane": fl},
        LFL,
    )
    iec = "IEC 60079-20-1 (2010)"
    expected = 0.4 * (
        0.05 / safety.LFL(CASRN="74-82-8", method=iec)
        + 0.05 / safety.LFL(CASRN="74-98-6", method=iec)
    )
    assert rel.atmosphere(0.4, mix).lfl_fraction == pytest.approx(expected, rel=1e-9)


FLAMMABLE = [d for d in all_fluids() if "flammable" in d.hazards]
IEC = "IEC 60079-20-1 (2010)"


@pytest.mark.parametrize("data", FLAMMABLE, ids=[d.name for d in FLAMMABLE])
def test_lower_flammable_limit_of_every_flammable_catalog_gas(data) -> None:
    # The published table: IEC 60079-20-1 (2010) as the `chemicals` package (1.5.2) carries it.
    # The refrigerants R32, R152a and R1234yf are not in that table (their limits are ISO 817's,
    # from memory): for them only presence and a plausible range are checked.
    from chemicals import safety

    assert data.name in LFL, data.name  # else every release of it would be "review"
    if IEC in safety.LFL_methods(CASRN=data.cas):
        assert LFL[data.name] == pytest.approx(safety.LFL(CASRN=data.cas, method=IEC), rel=1e-9)
    else:
        assert data.name in {"R32", "R152a", "R1234yf"}
        assert 0.01 < LFL[data.name] < 0.2


# --- real-gas released volume against CoolProp ---------------------------------------------------


@pytest.mark.parametrize(
    ("gas", "coolprop", "T"),
    [
        ("nitrogen", "Nitrogen", 293.15),
        ("carbon dioxide", "CarbonDioxide", 293.15),
        ("propane", "Propane", 278.15),
        ("hydrogen", "Hydrogen", 303.15),
        ("sulfur hexafluoride", "SulfurHexafluoride", 293.15),
    ],
)
def test_released_volume_against_coolprop(gas: str, coolprop: str, T: float) -> None:
    # V_g = m / rho(T_area, 101325 Pa), rho from CoolProp's copy of the same reference equation
    import fillcheck

    f = fillcheck.fluid(gas)
    moles = 123.0
    v = rel.released_volume(f, moles, T, ATM)
    rho = CP.PropsSI("D", "T", T, "P", ATM, coolprop)
    assert v.flashed
    assert v.volume_m3 == pytest.approx(moles * f.molar_mass / rho, rel=1e-8)
    assert v.Z == pytest.approx(CP.PropsSI("Z", "T", T, "P", ATM, coolprop), rel=1e-8)


def test_a_charge_that_cannot_flash_is_counted_as_ideal_gas_and_warned() -> None:
    # n-butane boils at -0.5 °C at 1 atm (CoolProp: 272.66 K): in a store at -10 °C it stays
    # liquid. The release is counted as the ideal gas n R T / P, all the vapour it can make.
    assert CP.PropsSI("T", "P", ATM, "Q", 0, "n-Butane") > 263.15
    a = _assess(
        [_vessel("C4", "n-butane", fill={"mass": "10 kg"}, water_capacity="26 L")],
        [_area(temperature="-10 degC") | {"temperature": "-10 degC"}],
    ).areas[0]
    r = a.release
    assert not r.volume.flashed
    n = 10.0 / CP.PropsSI("M", "n-Butane")
    assert r.volume.volume_m3 == pytest.approx(n * 8.314462618 * 263.15 / ATM, rel=1e-9)
    assert "area-release-liquid" in {f.code for f in a.findings}


# --- ventilation --------------------------------------------------------------------------------


def test_ventilation_decay_against_the_differential_equation() -> None:
    # dx/dt = -N x (well-mixed dilution), integrated numerically; and the time to fall from x0
    # to a target, ln(x0/x)/N.
    from scipy.integrate import solve_ivp

    N = 2.5 / 3600.0
    t = np.linspace(0.0, 7200.0, 9)
    sol = solve_ivp(lambda _t, x: -N * x, (0, t[-1]), [0.4], t_eval=t, rtol=1e-11, atol=1e-14)
    assert np.allclose(rel.decay(0.4, N, t), sol.y[0], rtol=1e-8)
    t_back = rel.time_to_fall(0.4, 0.05, N)
    assert rel.decay(0.4, N, np.array([t_back]))[0] == pytest.approx(0.05, rel=1e-12)
    assert rel.time_to_fall(0.4, 0.05, 0.0) is None
    assert rel.time_to_fall(0.01, 0.05, N) == 0.0


def test_continuous_leak_against_the_differential_equation() -> None:
    # dx/dt = q/V (1 - x) - N x from clean air; steady state q/(q + N V), ≈ G/(N V) when small.
    from scipy.integrate import solve_ivp

    q, N, V = 0.002, 1.0 / 3600.0, 60.0
    t = np.linspace(0.0, 20000.0, 11)
    sol = solve_ivp(
        lambda _t, x: q / V * (1 - x) - N * x, (0, t[-1]), [0.0], t_eval=t, rtol=1e-11, atol=1e-14
    )
    assert np.allclose(rel.leak_fraction(q, N, V, t), sol.y[0], rtol=1e-7, atol=1e-12)
    x_ss = rel.leak_steady_fraction(q, N, V)
    assert x_ss == pytest.approx(q / (q + N * V), rel=1e-15)
    assert rel.leak_steady_fraction(1e-6, N, V) == pytest.approx(1e-6 / (N * V), rel=1e-4)
    t_half = rel.leak_time_to(0.5 * x_ss, q, N, V)
    assert rel.leak_fraction(q, N, V, np.array([t_half]))[0] == pytest.approx(0.5 * x_ss)
    assert rel.leak_time_to(2 * x_ss, q, N, V) is None


def test_recovery_time_of_the_area_matches_the_analytic_solution() -> None:
    a = _assess([_vessel("N2-1", "nitrogen")], [_area(air="3 /h")]).areas[0]
    r = a.release
    x_lim = (AIR_O2 - 0.195) / AIR_O2  # nitrogen holds no oxygen
    assert r.oxygen_recovery_s == pytest.approx(math.log(r.gas_fraction / x_lim) * 1200.0)
    o2 = [x.oxygen for x in a.curve]
    assert o2 == sorted(o2)  # the oxygen only recovers
    assert a.curve[0].oxygen == pytest.approx(r.air.oxygen)


# --- inventory ------------------------------------------------------------------------------------


def test_inventory_sums_masses_volumes_and_counts_by_hazard() -> None:
    # charges and gas volumes from CoolProp; propane is flammable and asphyxiant, so it counts
    # in both classes; the vessel outside the area counts in none.
    vessels = [
        _vessel("N2", "nitrogen", count=3),
        _vessel("C3", "propane", count=2, fill={"mass": "9 kg"}, water_capacity="26 L"),
        _vessel("CO2", "carbon dioxide", fill={"mass": "20 kg"}, water_capacity="40 L"),
        _vessel("AR-OUT", "argon", area=None),
    ]
    a = _assess(vessels, [_area(volume="300 m3")]).areas[0]
    m_n2 = CP.PropsSI("D", "T", 288.15, "P", 200e5 + ATM, "Nitrogen") * 0.050
    gas = {
        name: CP.PropsSI("D", "T", T20, "P", ATM, name)
        for name in ("Nitrogen", "Propane", "CarbonDioxide")
    }
    inv = {i.hazard: i for i in a.inventory}
    assert set(inv) == {"asphyxiant", "flammable"}
    assert inv["asphyxiant"].count == 6 and inv["flammable"].count == 2
    assert inv["asphyxiant"].mass_kg == pytest.approx(3 * m_n2 + 2 * 9 + 20, rel=1e-8)
    assert inv["flammable"].mass_kg == pytest.approx(18.0, rel=1e-12)
    V = 3 * m_n2 / gas["Nitrogen"] + 18 / gas["Propane"] + 20 / gas["CarbonDioxide"]
    assert inv["asphyxiant"].gas_volume_m3 == pytest.approx(V, rel=1e-7)
    assert a.vessel_count == 6 and a.vessels == ["N2", "C3", "CO2"]


# --- findings and verdicts --------------------------------------------------------------------


def test_carbon_dioxide_fails_above_its_short_term_limit_and_warns_above_8_hours() -> None:
    # 20 kg of CO2 is 11.0 m³ at 20 °C (CoolProp): 1.5 % of the air needs more than 733 m³.
    Vg = 20.0 / CP.PropsSI("D", "T", T20, "P", ATM, "CarbonDioxide")
    v = [_vessel("CO2", "carbon dioxide", fill={"mass": "20 kg"}, water_capacity="40 L")]
    fails = _assess(v, [_area(volume="500 m3")]).areas[0]
    assert "area-carbon-dioxide" in {f.code for f in fails.findings}
    assert fails.release.air.carbon_dioxide == pytest.approx(
        AIR_CO2 * (1 - Vg / 500) + Vg / 500, rel=1e-7
    )
    warns = _assess(v, [_area(volume="1500 m3")]).areas[0]
    codes = {f.code for f in warns.findings}
    assert "area-carbon-dioxide" not in codes and "area-carbon-dioxide-long-term" in codes
    assert warns.verdict == "pass"


def test_propane_fails_above_a_quarter_of_its_lfl() -> None:
    # 9 kg of propane at 20 °C is 4.93 m³ (CoolProp); LFL 1.7 % (IEC 60079-20-1): a quarter of
    # it is reached in any room below Vg / (0.25 * 0.017) = 1160 m³.
    Vg = 9.0 / CP.PropsSI("D", "T", T20, "P", ATM, "Propane")
    v = [_vessel("C3", "propane", fill={"mass": "9 kg"}, water_capacity="26 L")]
    small = _assess(v, [_area(volume=f"{Vg / 0.00425 * 0.99:.1f} m3")]).areas[0]
    big = _assess(v, [_area(volume=f"{Vg / 0.00425 * 1.01:.1f} m3")]).areas[0]
    assert "area-flammable" in {f.code for f in small.findings} and small.verdict == "fail"
    assert big.verdict == "pass"


def test_oxygen_release_fails_as_oxygen_enriched() -> None:
    a = _assess([_vessel("O2", "oxygen")], [_area(volume="40 m3")]).areas[0]
    assert "area-oxygen-enriched" in {f.code for f in a.findings}
    assert a.release.air.oxygen > 0.235


def test_toxic_release_asks_for_review_without_a_catalog_limit() -> None:
    v = [_vessel("NH3", "ammonia", fill={"mass": "5 kg"}, water_capacity="12 L")]
    a = _assess(v, [_area(volume="5000 m3")]).areas[0]
    assert "area-toxic-release" in {f.code for f in a.findings}
    assert a.verdict == "review"


def test_a_failing_area_fails_the_whole_result_though_every_vessel_passes() -> None:
    result = _assess([_vessel("N2-1", "nitrogen")], [_area()])
    assert {v.verdict for v in result.vessels} == {"pass"}
    assert result.verdict == "fail"


def test_thresholds_are_inputs_and_say_where_they_come_from() -> None:
    a = _assess(
        [_vessel("N2-1", "nitrogen")],
        [_area(volume="200 m3", thresholds={"oxygen_minimum": "20.5 %"})],
    ).areas[0]
    assert a.limits.oxygen_minimum == pytest.approx(0.205)
    assert a.limits.sources["oxygen_minimum"] == "entered"
    assert "EH40/2005" in a.limits.sources["carbon_dioxide_short_term"]  # UK HSE, from memory
    assert "no source" in a.limits.sources["lfl_share"]
    assert a.verdict == "fail"  # 200 m³ passes 19.5 % but not 20.5 %


def test_every_area_finding_is_worded() -> None:
    from fillcheck.report.wording import finding_message

    result = _assess(
        [
            _vessel("N2-1", "nitrogen"),
            _vessel("CO2", "carbon dioxide", fill={"mass": "20 kg"}, water_capacity="40 L"),
            _vessel("NH3", "ammonia", fill={"mass": "5 kg"}, water_capacity="12 L"),
        ],
        [_area(air="0 /h", leak={"vessel": "N2-1", "rate": "1 kg/h"})],
    )
    codes = set()
    for f in result.areas[0].findings:
        for system in ("metric", "us"):
            said = finding_message(f, system)
            assert said and said != f.code and not re.search(r"\bsafe\b", said)
        codes.add(f.code)
    assert {"area-no-ventilation", "area-leak-limit", "area-toxic-release"} <= codes


# --- input ------------------------------------------------------------------------------------


@pytest.mark.parametrize(
    ("vessels", "areas", "said"),
    [
        ([_vessel("V1", "nitrogen", area="NOPE")], [_area()], "vessel 'V1', field 'area'"),
        ([_vessel("V1", "nitrogen")], [_area(), _area()], "area 'ROOM', field 'id'"),
        ([_vessel("V1", "nitrogen")], [_area(volume="0 m3")], "area 'ROOM', field 'volume'"),
        ([_vessel("V1", "nitrogen")], [_area(air="-1 /h")], "area 'ROOM', field 'air_changes'"),
        ([_vessel("V1", "nitrogen")], [_area(air="1 h")], "area 'ROOM', field 'air_changes'"),
        ([_vessel("V1", "nitrogen")], [_area(volume="20")], "area 'ROOM', field 'volume'"),
        ([_vessel("V1", "nitrogen")], [_area(colour="red")], "area 'ROOM', field 'colour'"),
        (
            [_vessel("V1", "nitrogen")],
            [_area(leak={"vessel": "V9", "rate": "1 kg/h"})],
            "area 'ROOM', field 'leak.vessel'",
        ),
    ],
)
def test_bad_area_input_is_one_sentence_naming_file_area_and_field(vessels, areas, said) -> None:
    with pytest.raises(InputError) as err:
        scenario_from_dict({"vessel": vessels, "area": areas}, "stores.toml")
    msg = str(err.value)
    assert msg.startswith("stores.toml: ") and said in msg and "\n" not in msg, msg


SCENARIO = """
title = "Brellwick Gases, cage review"

[[area]]
id = "CAGE"
volume = "{volume}"
air_changes = "1 /h"
temperature = "20 degC"

[[vessel]]
id = "N2-1"
gas = "nitrogen"
water_capacity = "50 L"
area = "CAGE"
fill = {{ pressure = "200 barg", temperature = "15 degC" }}
storage = {{ max_temperature = "40 degC" }}
limits = {{ allowable_pressure = "300 barg" }}
"""


@pytest.mark.parametrize(("volume", "status"), [("20 m3", 1), ("400 m3", 0)])
def test_cli_exit_status_follows_the_area(tmp_path: Path, volume: str, status: int) -> None:
    path = tmp_path / "cage.toml"
    path.write_text(SCENARIO.format(volume=volume), encoding="utf-8")
    run = CliRunner().invoke(app, ["check", str(path), "--json"])
    assert run.exit_code == status, run.output
    data = json.loads(run.stdout)
    area = data["areas"][0]
    assert data["verdict"] == ("fail" if status else "pass") == area["verdict"]
    assert set(area) >= {"id", "volume_m3", "inventory", "release", "verdict", "findings"}
    assert set(area["release"]) >= {
        "vessel",
        "gas",
        "released_volume_m3",
        "oxygen_fraction",
        "carbon_dioxide_fraction",
        "lfl_fraction",
    }
    assert set(area["inventory"][0]) >= {"hazard", "mass_kg"}
    text = CliRunner().invoke(app, ["check", str(path), "--width", "100"])
    assert text.exit_code == status and "Storage areas" in text.stdout


def test_cli_refuses_an_unknown_area_with_status_2(tmp_path: Path) -> None:
    path = tmp_path / "cage.toml"
    path.write_text(
        SCENARIO.format(volume="20 m3").replace('area = "CAGE"', 'area = "CAGE-X"'),
        encoding="utf-8",
    )
    run = CliRunner().invoke(app, ["check", str(path)])
    assert run.exit_code == 2
    assert "vessel 'N2-1', field 'area'" in run.output and "Traceback" not in run.output


def test_register_column_area_with_an_areas_file(tmp_path: Path) -> None:
    reg = tmp_path / "reg.csv"
    reg.write_text(
        "id,gas,water_capacity,fill_pressure,fill_temperature,max_temperature,"
        "allowable_pressure,area\n"
        "N2-1,nitrogen,50 L,200 barg,15 degC,40 degC,300 barg,CAGE\n",
        encoding="utf-8",
    )
    areas = tmp_path / "areas.toml"
    areas.write_text(
        '[[area]]\nid = "CAGE"\nvolume = "20 m3"\nair_changes = "1 /h"\ntemperature = "20 degC"\n',
        encoding="utf-8",
    )
    run = CliRunner().invoke(app, ["check", str(reg), "--areas", str(areas), "--json"])
    assert run.exit_code == 1
    assert json.loads(run.stdout)["areas"][0]["verdict"] == "fail"
    alone = CliRunner().invoke(app, ["check", str(reg)])
    assert alone.exit_code == 2 and "column 'area'" in alone.output


def test_breathing_air_released_brings_its_own_oxygen() -> None:
    # Air (Lemmon et al. 2000 pseudo-pure equation) is 20.95 % oxygen: released into a small
    # room it changes nothing (hand formula: 0.2095 (1 - x) + 0.2095 x = 0.2095).
    a = _assess([_vessel("AIR", "air")], [_area(volume="12 m3")]).areas[0]
    assert a.release.gas_fraction > 0.5
    assert a.release.air.oxygen == pytest.approx(AIR_O2, rel=1e-12)
    assert a.verdict == "pass"


def test_one_finding_a_toxic_component_naming_every_vessel() -> None:
    v = [
        _vessel(f"NH3-{i}", "ammonia", fill={"mass": f"{i + 1} kg"}, water_capacity="12 L")
        for i in range(3)
    ]
    a = _assess(v, [_area(volume="5000 m3")]).areas[0]
    toxic = [f for f in a.findings if f.code == "area-toxic-release"]
    assert len(toxic) == 1
    assert toxic[0].data["vessel"] == "NH3-2" and len(toxic[0].data["vessels"]) == 3


def test_jsonl_of_a_scenario_with_a_failing_area_exits_1(tmp_path: Path) -> None:
    # the stream holds vessels only; the area's verdict still sets the exit status
    path = tmp_path / "cage.toml"
    path.write_text(SCENARIO.format(volume="20 m3"), encoding="utf-8")
    run = CliRunner().invoke(app, ["check", str(path), "--jsonl", "-"])
    assert run.exit_code == 1
    assert json.loads(run.stdout.splitlines()[0])["verdict"] == "pass"


def test_room_volumes_and_times_as_printed() -> None:
    from fillcheck import units

    # 1 ft = 0.3048 m exactly: 1 m³ = 35.31 ft³
    assert units.format_room_volume(1.0, "us") == "35.3 ft³"
    assert units.format_room_volume(9.381, "metric") == "9.38 m³"
    assert units.format_duration(6888.7) == "1 h 55 min"
    assert units.format_duration(None) == "never"


def test_html_report_has_an_area_section_with_its_chart() -> None:
    from fillcheck.report.html_report import render_html

    result = _assess([_vessel("N2-1", "nitrogen")], [_area()])
    page = render_html(result)
    area = page[page.index("<h2>Storage areas</h2>") :]
    assert "Area ROOM" in area and "<svg" in area and "area-oxygen-deficient" in area


def test_flammable_gas_without_a_known_limit_asks_for_review() -> None:
    """A [[gas]] entered by the user as flammable has no lower flammable limit in the catalog:
    the area cannot judge its release against the LFL share, so it asks for review
    (area-flammable-limit-unknown) naming the vessel and the component, and the whole result is
    not a pass. Every flammable catalog gas has its limit (IEC 60079-20-1, assess.area.LFL)."""
    from fillcheck.assess.area import LFL
    from fillcheck.fluids.catalog import all_fluids

    assert not [f.name for f in all_fluids() if "flammable" in f.hazards and f.name not in LFL]
    gas = {
        "name": "test fuel gas X",
        "molar_mass": "58.1 g/mol",
        "critical_temperature": "152 degC",
        "critical_pressure": "38 bara",
        "acentric_factor": 0.2,
        "hazards": ["flammable"],
    }
    v = [_vessel("FX-1", "test fuel gas X", fill={"mass": "1 kg"}, water_capacity="12 L")]
    v[0]["limits"] = {"allowable_pressure": "30 barg"}
    raw = {"gas": [gas], "vessel": v, "area": [_area(volume="5000 m3", air="6 /h")]}
    result = assess_scenario(scenario_from_dict(raw, "stores.toml"))
    area = result.areas[0]
    found = [f for f in area.findings if f.code == "area-flammable-limit-unknown"]
    assert len(found) == 1 and found[0].severity == "review"
    assert found[0].data["vessel"] == "FX-1"
    assert found[0].data["component"] == "test fuel gas X"
    assert area.verdict == "review" and result.verdict != "pass"
