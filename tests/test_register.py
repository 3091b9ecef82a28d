"""Registers (CSV): the same answers as a scenario file, refusals by row and column, the report."""

from __future__ import annotations

import json
from pathlib import Path

import pytest
from typer.testing import CliRunner

from fillcheck.assess import assess_scenario
from fillcheck.cli import app
from fillcheck.errors import InputError
from fillcheck.scenario.register import register_from_text
from fillcheck.scenario.resolve import scenario_from_dict

HEADER = (
    "id,gas,water_capacity,fill_pressure,fill_mass,filling_ratio,settled_pressure,"
    "fill_temperature,max_temperature,min_temperature,allowable_pressure,"
    "relief_set_pressure,max_filling_ratio"
)
ROWS = [
    "AR-1,argon,50 L,200 barg,,,,15 degC,65 degC,-20 degC,300 barg,330 barg,",
    "N2-1,nitrogen,50 L,300 barg,,,,10 degC,65 degC,-20 degC,300 barg,345 barg,",
    "CO2-1,carbon dioxide,13.4 L,,10 kg,,,,60 degC,-10 degC,250 barg,,0.75 kg/L",
    "C3-1,propane,43 L,,18 kg,,,,50 degC,-15 degC,30 barg,25.9 barg,0.42 kg/L",
    "H2-1,hydrogen,300 L,,,,700 barg,40 degC,50 degC,-20 degC,875 barg,900 barg,",
    "CO2-2,R744,13.4 L,,,0.70 kg/L,,,60 degC,-10 degC,250 barg,,0.75 kg/L",
]


def _as_toml_dict(rows: list[str]) -> dict:
    cols = HEADER.split(",")
    fields = {
        "fill_pressure": ("fill", "pressure"),
        "fill_mass": ("fill", "mass"),
        "filling_ratio": ("fill", "filling_ratio"),
        "settled_pressure": ("fill", "settled_pressure"),
        "fill_temperature": ("fill", "temperature"),
        "max_temperature": ("storage", "max_temperature"),
        "min_temperature": ("storage", "min_temperature"),
        "allowable_pressure": ("limits", "allowable_pressure"),
        "relief_set_pressure": ("limits", "relief_set_pressure"),
        "max_filling_ratio": ("limits", "max_filling_ratio"),
    }
    vessels = []
    for row in rows:
        v: dict = {"fill": {}, "storage": {}, "limits": {}}
        for c, cell in zip(cols, row.split(","), strict=True):
            if not cell:
                continue
            if c in fields:
                v[fields[c][0]][fields[c][1]] = cell
            else:
                v[c] = cell
        vessels.append(v)
    return {"vessel": vessels}


def test_register_gives_the_same_results_as_the_same_vessels_in_a_scenario() -> None:
    reg = assess_scenario(register_from_text("\n".join([HEADER, *ROWS]), "r.csv"))
    toml = assess_scenario(scenario_from_dict(_as_toml_dict(ROWS), "s.toml"))
    for a, b in zip(reg.vessels, toml.vessels, strict=True):
        assert a.id == b.id and a.verdict == b.verdict
        assert a.charged_mass_kg == pytest.approx(b.charged_mass_kg, rel=1e-12)
        assert a.max_state.pressure_Pa == pytest.approx(b.max_state.pressure_Pa, rel=1e-12)
        assert a.max_safe_charge_kg == pytest.approx(b.max_safe_charge_kg, rel=1e-9)


def test_a_large_register_is_vectorised_and_agrees_with_single_checks() -> None:
    # 60 rows of one gas exceed the small-batch size: coarse grid and tabulated crossings
    rows = [
        f"V{i},propane,43 L,,{12 + 0.1 * i:.1f} kg,,,,50 degC,-15 degC,30 barg,25.9 barg,"
        for i in range(60)
    ]
    big = assess_scenario(register_from_text("\n".join([HEADER, *rows]), "r.csv"))
    few = assess_scenario(register_from_text("\n".join([HEADER, rows[0], rows[59]]), "r.csv"))
    for a, b in ((big.vessels[0], few.vessels[0]), (big.vessels[59], few.vessels[1])):
        assert a.verdict == b.verdict
        assert a.max_state.pressure_Pa == pytest.approx(b.max_state.pressure_Pa, rel=1e-9)
        if b.liquid_full_above_K is not None:
            assert a.liquid_full_above_K == pytest.approx(b.liquid_full_above_K, abs=0.05)


@pytest.mark.parametrize(
    ("text", "words"),
    [
        (HEADER + ",colour\n" + ROWS[0] + ",red", ["column 'colour'", "register column"]),
        (
            HEADER.replace(",allowable_pressure", "") + "\nA,argon,50 L,200 barg,,,,15 degC,"
            "65 degC,-20 degC,330 barg,",
            ["required column 'allowable_pressure'"],
        ),
        (
            HEADER + "\n" + ROWS[0].replace("300 barg", "300 bar"),
            ["row 2", "vessel 'AR-1'", "column 'allowable_pressure'", "barg"],
        ),
        (
            HEADER + "\n" + ROWS[0] + "\n" + ROWS[1].replace("nitrogen", "nitrgen"),
            ["row 3", "column 'gas'", "nitrogen"],
        ),
        (HEADER + "\n" + ROWS[0] + "\n" + ROWS[0], ["row 3", "column 'id'", "twice"]),
        (
            HEADER + "\nA,argon,50 L,,,,,,65 degC,,300 barg,,",
            ["row 2", "fill_pressure", "fill exactly one"],
        ),
        (HEADER + "\n" + ROWS[0] + ",extra", ["row 2", "cells"]),
        (HEADER + "\n", ["no vessels"]),
    ],
)
def test_bad_rows_are_refused_with_row_and_column(text: str, words: list[str]) -> None:
    with pytest.raises(InputError) as err:
        register_from_text(text, "r.csv")
    msg = str(err.value)
    for w in words:
        assert w in msg, msg
    assert "\n" not in msg


def test_register_through_the_cli(tmp_path: Path) -> None:
    path = tmp_path / "store.csv"
    path.write_text("\n".join([HEADER, *ROWS]) + "\n", encoding="utf-8")
    res = CliRunner().invoke(app, ["check", str(path), "--width", "120"])
    assert res.exit_code == 1
    assert "Register summary" in res.output and "6 vessels" in res.output
    js = CliRunner().invoke(app, ["check", str(path), "--json"])
    data = json.loads(js.stdout)
    assert [v["id"] for v in data["vessels"]] == [r.split(",")[0] for r in ROWS]
    html = tmp_path / "r.html"
    CliRunner().invoke(app, ["check", str(path), "--html", str(html)])
    text = html.read_text(encoding="utf-8")
    flagged = sum(1 for v in data["vessels"] if v["verdict"] != "pass")
    assert text.count("<svg") == flagged + 1  # one chart per flagged vessel, one summary chart
