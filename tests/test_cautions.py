"""The caution rules, gas by gas and mixture by mixture, each caution with its reason.

Expected classes: pure gases from their GHS classification as the catalog records it (common
practice, from memory); mixtures by the methods the cautions cite (ISO 10156:2017 for flammable
and oxidizing, ISO 817:2014 for numbered refrigerant blends; coefficients from memory), worked
here by hand beside each row.
"""

from __future__ import annotations

import json
import subprocess
import sys
from pathlib import Path

import numpy as np
import pytest

from fillcheck import fluid
from fillcheck.assess.cautions import Caution, cautions_for, gas_facts
from fillcheck.errors import UnknownFluidError
from fillcheck.fluids.catalog import lookup
from fillcheck.fluids.classification import KK, TCI, flammability_index
from fillcheck.report.caution_text import REASON, TEXT, caution_reason, caution_text
from fillcheck.thermo.mixture_fluid import mixture

HAZARD_CODES = {
    "oxygen-service",
    "oxidizer",
    "flammable",
    "toxic",
    "corrosive",
    "carbon-dioxide",
    "asphyxiant",
    "flammable-with-oxidizer",
    "heavier-than-air",
}

PURE = [
    # gas, the hazard cautions it must carry (and no others)
    ("oxygen", {"oxygen-service"}),
    ("nitrous oxide", {"oxygen-service"}),
    # chlorine is an oxidizer, but not one filled in oxygen service: no "fill slowly"
    ("chlorine", {"oxidizer", "toxic", "corrosive", "heavier-than-air"}),
    # carbon dioxide: toxic at a few per cent before the oxygen falls; molar mass 44 g/mol
    ("carbon dioxide", {"carbon-dioxide", "asphyxiant", "heavier-than-air"}),
    ("nitrogen", {"asphyxiant"}),  # 28.0 g/mol: mixes with air
    ("helium", {"asphyxiant"}),
    ("hydrogen", {"flammable", "asphyxiant"}),
    ("propane", {"flammable", "asphyxiant", "heavier-than-air"}),
    ("ammonia", {"flammable", "toxic", "corrosive"}),  # 17 g/mol: rises
    ("sulfur hexafluoride", {"asphyxiant", "heavier-than-air"}),
    ("air", set()),
]


def _codes(cs: list[Caution]) -> set[str]:
    return {c.code for c in cs} & HAZARD_CODES


@pytest.mark.parametrize(("gas", "expected"), PURE)
def test_pure_gas_cautions(gas: str, expected: set[str]) -> None:
    cs = cautions_for(gas_facts(fluid(gas, model="pr")), liquid=False, near_critical=False)
    assert _codes(cs) == expected
    for c in cs:
        assert caution_text(c) and caution_reason(c)


MIXTURES = [
    # composition, basis, expected hazard cautions
    # synthetic air: 21 % oxygen, between the 19.5 % of an oxygen-deficient atmosphere and the
    # 23.5 % of ISO 10156's oxidizing threshold: neither asphyxiant nor oxidizer
    ({"nitrogen": 0.79, "oxygen": 0.21}, "mole", set()),
    ({"helium": 0.80, "oxygen": 0.20}, "mole", set()),  # heliox 20 %
    # 30 % oxygen: oxygen equivalent 0.30 > 0.235 (ISO 10156)
    ({"nitrogen": 0.70, "oxygen": 0.30}, "mole", {"oxygen-service"}),
    # argon with 2 % oxygen: an asphyxiant, not an oxidizer; 39.8 g/mol
    ({"argon": 0.98, "oxygen": 0.02}, "mole", {"asphyxiant", "heavier-than-air"}),
    # forming gas: 5 % H2 in N2, index 0.05/(0.05 + 0.95·1.0)·100/5.5 = 0.909 < 1: not flammable
    ({"nitrogen": 0.95, "hydrogen": 0.05}, "mole", {"asphyxiant"}),
    # 5 % H2 in argon: index 0.05/(0.05 + 0.95·0.55)·100/5.5 = 1.59 > 1: flammable
    (
        {"argon": 0.95, "hydrogen": 0.05},
        "mole",
        {"flammable", "asphyxiant", "heavier-than-air"},
    ),
    # welding mix 82/18: carbon dioxide well above its 0.5 % exposure limit
    (
        {"argon": 0.82, "carbon dioxide": 0.18},
        "mole",
        {"carbon-dioxide", "asphyxiant", "heavier-than-air"},
    ),
    # R410A (R32/R125 50/50 by mass): ISO 817 class A1, not flammable, though R32 is
    ({"R32": 0.5, "R125": 0.5}, "mass", {"asphyxiant", "heavier-than-air"}),
    # R454B (R32/R1234yf 68.9/31.1 by mass): class A2L, flammable
    ({"R32": 0.689, "R1234yf": 0.311}, "mass", {"flammable", "asphyxiant", "heavier-than-air"}),
    # hydrogen with oxygen: not flammable in air by the index (0.05/0.95/0.055 = 0.957), but a
    # flammable gas beside an oxidizer gets its own caution
    (
        {"nitrogen": 0.90, "hydrogen": 0.05, "oxygen": 0.05},
        "mole",
        {"asphyxiant", "flammable-with-oxidizer"},
    ),
    # 1 % chlorine in nitrogen: toxic and corrosive above the 0.1 % cut-off
    ({"nitrogen": 0.99, "chlorine": 0.01}, "mole", {"toxic", "corrosive", "asphyxiant"}),
]


@pytest.mark.parametrize(("composition", "basis", "expected"), MIXTURES)
def test_mixture_cautions(composition: dict[str, float], basis: str, expected: set[str]) -> None:
    m = mixture(composition, model="pr", basis=basis)
    cs = cautions_for(gas_facts(m), liquid=False, near_critical=False)
    assert _codes(cs) == expected, [(c.code, caution_reason(c)) for c in cs]


def test_flammability_index_by_hand() -> None:
    # ISO 10156's sum written out for hydrogen 3 % + methane 4 % in carbon dioxide and argon
    names = ["hydrogen", "methane", "carbon dioxide", "argon"]
    z = np.array([0.03, 0.04, 0.43, 0.50])
    A = 0.07
    B = KK["carbon dioxide"] * 0.43 + KK["argon"] * 0.50
    hand = 0.03 / (A + B) / TCI["hydrogen"] + 0.04 / (A + B) / TCI["methane"]
    got = flammability_index(names, z, [True, True, False, False], [False, False, True, True])
    assert got == pytest.approx(hand, rel=1e-14)


def test_reasons_name_their_basis() -> None:
    m = mixture({"argon": 0.95, "hydrogen": 0.05}, model="pr")
    flam = next(c for c in cautions_for(gas_facts(m), liquid=False, near_critical=False))
    assert flam.code == "flammable"
    assert "ISO 10156" in caution_reason(flam) and "1.59" in caution_reason(flam)
    blend = mixture({"R32": 0.689, "R1234yf": 0.311}, model="pr", basis="mass")
    c = cautions_for(gas_facts(blend), liquid=False, near_critical=False)[0]
    assert "R454B" in caution_reason(c) and "ISO 817" in caution_reason(c)
    co2 = cautions_for(gas_facts(fluid("CO2", model="pr")), liquid=False, near_critical=False)
    assert "EH40" in caution_reason(next(x for x in co2 if x.code == "carbon-dioxide"))


def test_every_caution_has_words_and_a_reason_without_memory_notes() -> None:
    assert set(TEXT) == set(REASON)
    for code in TEXT:
        assert "from memory" not in TEXT[code]
    every = [
        cautions_for(
            gas_facts(fluid(g.name, model="pr")),
            liquid=True,
            near_critical=True,
            cold_dropout=True,
            fire=True,
        )
        for g in __import__("fillcheck.fluids.catalog", fromlist=["x"]).all_fluids()
    ]
    for cs in every:
        for c in cs:
            assert c.code in TEXT
            r = caution_reason(c)
            assert r and "from memory" not in r and not r.endswith(" ")


@pytest.mark.parametrize("name", ["acetylene", "C2H2", "ethyne", "74-86-2"])
def test_dissolved_gas_refused_by_name(name: str) -> None:
    with pytest.raises(UnknownFluidError, match="dissolved") as e:
        lookup(name)
    assert "did you mean" not in str(e.value)


def _run(tmp_path: Path, body: str, *args: str) -> subprocess.CompletedProcess[str]:
    f = tmp_path / "s.toml"
    f.write_text(body)
    return subprocess.run(
        [sys.executable, "-m", "fillcheck", "check", str(f), *args],
        capture_output=True,
        text=True,
        check=False,
    )


VESSEL = """
[[vessel]]
id = "{id}"
gas = "{gas}"
water_capacity = "50 L"
fill = {fill}
storage = {{ min_temperature = "-20 degC", max_temperature = "55 degC" }}
limits = {{ allowable_pressure = "{allow}", relief_set_pressure = "{relief}"{device} }}
"""


def test_acetylene_scenario_exits_2_with_one_sentence(tmp_path: Path) -> None:
    body = VESSEL.format(
        id="A1",
        gas="acetylene",
        fill='{ mass = "5 kg" }',
        allow="20 barg",
        relief="25 barg",
        device="",
    )
    r = _run(tmp_path, body)
    assert r.returncode == 2
    assert "dissolved" in r.stderr and "Traceback" not in r.stderr
    assert len(r.stderr.strip().splitlines()) == 1


def test_relief_says_what_comes_out(tmp_path: Path) -> None:
    # propane 23 kg in 50 L is liquid-full at 46.8 °C (CoolProp: 0.46 kg/L saturated liquid
    # there); the vapour pressure at 55 °C is about 18 bar, so 25 barg is reached only by the
    # liquid-full vessel: liquid comes out. Nitrogen 200 barg: gas. Propane 10 kg with the
    # relief below the vapour pressure at 55 °C: vapour.
    body = (
        VESSEL.format(
            id="P-FULL",
            gas="propane",
            fill='{ mass = "23 kg" }',
            allow="60 barg",
            relief="25 barg",
            device=', relief_device = "bursting disc"',
        )
        + VESSEL.format(
            id="N-GAS",
            gas="nitrogen",
            fill='{ pressure = "200 barg", temperature = "15 degC" }',
            allow="300 barg",
            relief="220 barg",
            device=', relief_device = "valve"',
        )
        + VESSEL.format(
            id="P-WET",
            gas="propane",
            fill='{ mass = "10 kg" }',
            allow="60 barg",
            relief="12 barg",
            device="",
        )
    )
    r = _run(tmp_path, body, "--json")
    doc = json.loads(r.stdout)
    got = {}
    for v in doc["vessels"]:
        f = next(x for x in v["findings"] if x["code"] == "relief-reached")
        got[v["id"]] = (f["data"]["discharge"], f["message"])
    assert got["P-FULL"][0] == "liquid" and "empties" in got["P-FULL"][1]
    assert got["N-GAS"][0] == "gas" and "recloses" in got["N-GAS"][1]
    assert got["P-WET"][0] == "vapour" and "bursting disc" in got["P-WET"][1]


def test_relief_device_needs_a_set_pressure(tmp_path: Path) -> None:
    body = """
[[vessel]]
id = "X"
gas = "nitrogen"
water_capacity = "50 L"
fill = { pressure = "200 barg", temperature = "15 degC" }
storage = { min_temperature = "-20 degC", max_temperature = "55 degC" }
limits = { allowable_pressure = "300 barg", relief_device = "valve" }
"""
    r = _run(tmp_path, body)
    assert r.returncode == 2 and "relief_set_pressure" in r.stderr


def test_json_caution_details(tmp_path: Path) -> None:
    body = VESSEL.format(
        id="C1",
        gas="carbon dioxide",
        fill='{ mass = "30 kg" }',
        allow="250 barg",
        relief="300 barg",
        device="",
    )
    doc = json.loads(_run(tmp_path, body, "--json").stdout)
    v = doc["vessels"][0]
    codes = [d["code"] for d in v["caution_details"]]
    assert "carbon-dioxide" in codes and "heavier-than-air" in codes
    assert v["cautions"] == [d["text"] for d in v["caution_details"]]
    assert all(d["reason"] for d in v["caution_details"])


def test_every_flammable_catalog_gas_has_a_limit_for_the_flammability_index() -> None:
    """ISO 10156's index needs each flammable component's Tci or its lower flammable limit; a
    flammable catalog gas without either would make every mixture holding it count as
    flammable whatever its share (the conservative fallback), so the catalog must give one."""
    from fillcheck import available_fluids
    from fillcheck.fluids.catalog import lookup
    from fillcheck.fluids.classification import LFL, TCI

    missing = [
        n
        for n in available_fluids()
        if "flammable" in lookup(n).hazards and not (TCI.get(n) or LFL.get(n))
    ]
    assert missing == []


def test_an_unlisted_flammable_component_counts_as_flammable() -> None:
    """The fallback itself: no Tci and no LFL gives an infinite index (flammable)."""
    import numpy as np

    from fillcheck.fluids.classification import flammability_index

    got = flammability_index(
        ["unlisted-fuel", "nitrogen"], np.array([1e-4, 1 - 1e-4]), [True, False], [False, True]
    )
    assert got == float("inf")
