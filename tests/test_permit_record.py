"""The permit-file record on every printout (INTERFACES.md §5; issue 12, point 3).

The input digest is checked against Python's hashlib (FIPS 180-4 SHA-256) over the file's bytes;
the time against datetime.fromisoformat (ISO 8601 with a UTC offset).
"""

from __future__ import annotations

import datetime as dt
import hashlib
import json
import re
from pathlib import Path

import pytest
from typer.testing import CliRunner

import fillcheck
from fillcheck.cli import app
from fillcheck.report.permit_record import gas_data_files
from fillcheck.scenario.resolve import load_scenario

RUNNER = CliRunner()

SCENARIO = """
title = "Record test"
site = "Quarrow Lane depot, bay 2"
permit_number = "WP-0001"
prepared_by = "A. Tester"

[[vessel]]
id = "N2-50-031"
gas = "nitrogen"
water_capacity = "50 L"
fill = { settled_pressure = "200 barg", temperature = "15 degC" }
storage = { max_temperature = "65 degC", min_temperature = "-20 degC" }
limits = { allowable_pressure = "300 barg" }
marking = { working_pressure = "200 barg", test_pressure = "300 barg", tare_mass = "58.5 kg" }
"""


@pytest.fixture
def scenario(tmp_path: Path) -> Path:
    f = tmp_path / "record.toml"
    f.write_text(SCENARIO, encoding="utf-8")
    return f


def _run(*args: str, env: dict[str, str] | None = None) -> tuple[int, str]:
    res = RUNNER.invoke(app, list(args), env=env)
    return res.exit_code, res.stdout


def test_json_record_fields(scenario: Path) -> None:
    code, out = _run("check", str(scenario), "--json")
    assert code == 0
    d = json.loads(out)
    assert d["input_file"] == str(scenario)
    assert d["input_sha256"] == hashlib.sha256(scenario.read_bytes()).hexdigest()
    when = dt.datetime.fromisoformat(d["generated_at"])
    assert when.tzinfo is not None and when.utcoffset() is not None
    assert abs((dt.datetime.now(dt.UTC) - when).total_seconds()) < 600
    assert re.fullmatch(r"FC-\d{8}T\d{6}Z-[0-9a-f]{8}", d["report_id"])
    assert d["report_id"].endswith(d["input_sha256"][:8])
    assert re.fullmatch(r"[0-9a-f]{64}", d["gas_data_sha256"])
    assert (d["site"], d["permit_number"], d["prepared_by"]) == (
        "Quarrow Lane depot, bay 2",
        "WP-0001",
        "A. Tester",
    )


def _has_header(text: str, digest: str) -> None:
    for words in (
        "report id",
        "FC-",
        "input SHA-256",
        digest,
        "gas data SHA-256",
        f"fillcheck {fillcheck.__version__}",
        "Quarrow Lane depot, bay 2",
        "WP-0001",
        "A. Tester",
        "Checked by",
        "Signature",
    ):
        assert words in text, words


def test_every_printout_has_the_header(scenario: Path, tmp_path: Path) -> None:
    digest = hashlib.sha256(scenario.read_bytes()).hexdigest()
    code, out = _run("check", str(scenario), "--width", "160")
    assert code == 0
    _has_header(out, digest)
    html = tmp_path / "r.html"
    code, _ = _run("check", str(scenario), "--html", str(html))
    assert code == 0
    _has_header(html.read_text(encoding="utf-8"), digest)
    code, out = _run("stop-table", str(scenario), "--width", "160")
    assert code == 0
    _has_header(out, digest)
    code, out = _run(
        "reading",
        str(scenario),
        "--vessel",
        "N2-50-031",
        "--pressure",
        "150 barg",
        "--temperature",
        "15 degC",
        "--width",
        "160",
    )
    assert code == 0
    _has_header(out, digest)
    for args in (
        ["stop-table", str(scenario), "--json"],
        [
            "reading",
            str(scenario),
            "--vessel",
            "N2-50-031",
            "--pressure",
            "150 barg",
            "--temperature",
            "15 degC",
            "--json",
        ],
    ):
        code, out = _run(*args)
        assert json.loads(out)["input_sha256"] == digest


def test_html_is_reproducible(scenario: Path, tmp_path: Path) -> None:
    env = {"SOURCE_DATE_EPOCH": "1796212800"}  # 2026-12-02T12:00:00Z
    a, b = tmp_path / "a.html", tmp_path / "b.html"
    assert _run("check", str(scenario), "--html", str(a), env=env)[0] == 0
    assert _run("check", str(scenario), "--html", str(b), env=env)[0] == 0
    assert a.read_bytes() == b.read_bytes()
    assert "2026-12-02T12:00:00+00:00" in a.read_text(encoding="utf-8")


def test_version_option() -> None:
    code, out = _run("--version")
    assert code == 0
    assert out.strip() == f"fillcheck {fillcheck.__version__}"


def test_gas_data_files_named_per_scenario(scenario: Path, tmp_path: Path) -> None:
    sc = load_scenario(scenario)
    assert gas_data_files(sc) == ("catalog.toml", "cubic_accuracy.json", "reference/nitrogen.json")
    mix = tmp_path / "mix.toml"
    mix.write_text(
        SCENARIO.replace('gas = "nitrogen"', 'gas = { argon = 0.82, "carbon dioxide" = 0.18 }')
        .replace('marking = { working_pressure = "200 barg", test_pressure = "300 barg", ', "")
        .replace('tare_mass = "58.5 kg" }', ""),
        encoding="utf-8",
    )
    files = gas_data_files(load_scenario(mix))
    assert "mixtures/multifluid_pairs.json" in files
    assert {"reference/argon.json", "reference/carbon_dioxide.json"} <= set(files)
