"""The command line as users and scripts see it (INTERFACES.md §3–4).

Exit statuses, help text, the JSON contract (keys, SI units, absolute pressures, finite numbers,
argon charge against CoolProp's reference equation) and the terminal report (plain text without
colour, narrow terminals, US units, model sources, date and version). Most runs are in-process
with typer's test runner; the ones that depend on the process environment (NO_COLOR, COLUMNS, a
terminal) run ``python -m fillcheck.cli`` as a subprocess from the repository root.
"""

from __future__ import annotations

import datetime as dt
import json
import math
import os
import re
import subprocess
import sys
from pathlib import Path
from typing import Any

import pytest
from typer.testing import CliRunner

import fillcheck
from fillcheck.cli import app

REPO = Path(__file__).resolve().parents[1]
ACCURACY = REPO / "fillcheck" / "fluids" / "data" / "cubic_accuracy.json"
ATM = 101_325.0

# ---------------------------------------------------------------------------------------------
# Scenarios (all names invented)
# ---------------------------------------------------------------------------------------------

PASSING = """
title = "Quorvath Fabrication, argon rack"

[[vessel]]
id = "AR-50-201"
gas = "argon"
water_capacity = "50 L"
fill = { pressure = "150 barg", temperature = "15 degC" }
storage = { max_temperature = "50 degC" }
limits = { allowable_pressure = "300 barg" }
"""

FAILING = """
title = "Quorvath Fabrication, nitrogen bank"

[[vessel]]
id = "N2-50-202"
gas = "nitrogen"
water_capacity = "50 L"
fill = { pressure = "300 barg", temperature = "10 degC" }
storage = { max_temperature = "65 degC" }
limits = { allowable_pressure = "300 barg" }
"""

REVIEW = """
title = "Quorvath Fabrication, test gas"

[[gas]]
name = "marlow test gas"
molar_mass = "39.9 g/mol"
critical_temperature = "150.7 K"
critical_pressure = "4.86 MPa(a)"
acentric_factor = 0.0

[[vessel]]
id = "TG-10-203"
gas = "marlow test gas"
water_capacity = "10 L"
fill = { pressure = "50 barg", temperature = "15 degC" }
storage = { max_temperature = "40 degC" }
limits = { allowable_pressure = "200 barg" }
"""

REFUSED = PASSING.replace('"150 barg"', '"150 bar"')

CONTRACT = """
title = "Ostrava Road depot, weekly storage review"
reference_temperature = "15 degC"

[[vessel]]
id = "AR-50-204"
gas = "argon"
water_capacity = "50 L"
fill = { pressure = "200 barg", temperature = "15 degC" }
storage = { max_temperature = "65 degC", min_temperature = "-20 degC" }
limits = { allowable_pressure = "300 barg", relief_set_pressure = "330 barg" }

[[vessel]]
id = "N2-50-205"
gas = "nitrogen"
water_capacity = "50 L"
count = 3
fill = { pressure = "300 barg", temperature = "10 degC" }
storage = { max_temperature = "65 degC", min_temperature = "-20 degC" }
limits = { allowable_pressure = "300 barg" }

[[vessel]]
id = "CO2-40-206"
gas = "carbon dioxide"
water_capacity = "40 L"
fill = { mass = "25 kg" }
storage = { max_temperature = "50 degC", min_temperature = "-20 degC" }
limits = { allowable_pressure = "250 barg" }
"""
"""Three gases, a pass, a fail and a liquefied gas, for the JSON contract and the report."""

US_CUSTOMARY = """
title = "Fort Calder shop, argon"

[[vessel]]
id = "AR-1.7-301"
gas = "argon"
water_capacity = "1.77 ft3"
fill = { pressure = "2900 psig", temperature = "59 degF" }
storage = { max_temperature = "122 degF", min_temperature = "-4 degF" }
limits = { allowable_pressure = "4350 psig", relief_set_pressure = "4800 psig" }
"""
"""A scenario entered entirely in US customary units."""


# ---------------------------------------------------------------------------------------------
# Helpers
# ---------------------------------------------------------------------------------------------


def write(tmp_path: Path, text: str, name: str = "scenario.toml") -> Path:
    p = tmp_path / name
    p.write_text(text, encoding="utf-8")
    return p


def invoke(*args: str, env: dict[str, str] | None = None) -> tuple[int, str, str]:
    """Run the command line in-process: (exit status, stdout, stderr); no exception may escape."""
    res = CliRunner().invoke(app, list(args), env=env)
    if res.exception is not None and not isinstance(res.exception, SystemExit):
        raise AssertionError(f"exception escaped the command line: {res.exception!r}")
    return res.exit_code, res.stdout, res.stderr


def run(*args: str, **env: str) -> subprocess.CompletedProcess[str]:
    """``python -m fillcheck.cli ARGS`` as a real process from the repository root."""
    full_env = dict(os.environ)
    full_env["PYTHONPATH"] = str(REPO)
    full_env.update(env)
    return subprocess.run(
        [sys.executable, "-m", "fillcheck.cli", *args],
        cwd=REPO,
        env=full_env,
        capture_output=True,
        text=True,
        encoding="utf-8",
        timeout=120,
        check=False,
    )


def _no_constant(name: str) -> float:
    raise AssertionError(f"the JSON holds the non-standard constant {name}")


def json_result(path: Path, *extra: str) -> tuple[int, dict[str, Any], str]:
    """Run ``check --json``; return (exit status, parsed JSON, raw text). NaN/Infinity refused."""
    code, out, err = invoke("check", str(path), "--json", *extra)
    assert code in (0, 1), f"exit status {code}: {err}"
    return code, json.loads(out, parse_constant=_no_constant), out


def report(path: Path, *extra: str) -> str:
    """The terminal report text (in-process, so never coloured)."""
    code, out, err = invoke("check", str(path), *extra)
    assert code in (0, 1), f"exit status {code}: {err}"
    return out


def numbers_in(obj: Any) -> list[float]:
    """Every number anywhere in a parsed JSON value."""
    if isinstance(obj, bool):
        return []
    if isinstance(obj, (int, float)):
        return [float(obj)]
    if isinstance(obj, dict):
        return [x for v in obj.values() for x in numbers_in(v)]
    if isinstance(obj, list):
        return [x for v in obj for x in numbers_in(v)]
    return []


# ---------------------------------------------------------------------------------------------
# Exit statuses and help
# ---------------------------------------------------------------------------------------------


@pytest.mark.parametrize(
    ("text", "status", "verdict"),
    [(PASSING, 0, "pass"), (FAILING, 1, "fail"), (REVIEW, 1, "review")],
    ids=["pass", "fail", "review"],
)
def test_exit_status_follows_the_verdict(
    tmp_path: Path, text: str, status: int, verdict: str
) -> None:
    p = write(tmp_path, text)
    code, _, err = invoke("check", str(p))
    assert code == status, err
    assert err == ""
    code_j, data, _ = json_result(p)
    assert code_j == status
    assert data["verdict"] == verdict
    assert [v["verdict"] for v in data["vessels"]] == [verdict]
    if verdict == "review":
        # "review" must say why (INTERFACES.md §4)
        assert any(f["severity"] == "review" for f in data["vessels"][0]["findings"])


def test_exit_status_fail_when_one_of_several_fails(tmp_path: Path) -> None:
    both = PASSING + FAILING.split("\n", 2)[2]  # the passing vessel, then the failing one
    code, data, _ = json_result(write(tmp_path, both))
    assert code == 1
    assert data["verdict"] == "fail"
    assert [v["verdict"] for v in data["vessels"]] == ["pass", "fail"]


def test_exit_status_refused_is_2(tmp_path: Path) -> None:
    code, out, err = invoke("check", str(write(tmp_path, REFUSED)))
    assert code == 2
    assert out == ""
    assert "barg" in err


def test_exit_status_as_a_real_process(tmp_path: Path) -> None:
    """The installed entry point (``main``) passes the statuses through unchanged."""
    ok, bad = write(tmp_path, PASSING, "ok.toml"), write(tmp_path, REFUSED, "bad.toml")
    assert run("check", str(ok)).returncode == 0
    proc = run("check", str(bad))
    assert proc.returncode == 2
    assert "Traceback" not in proc.stderr


def test_root_help_shows_examples() -> None:
    code, out, _ = invoke("--help")
    assert code == 0
    assert "check" in out
    assert "Example" in out, f"`fillcheck --help` shows no examples:\n{out}"
    assert re.search(r"fillcheck check \S+\.toml", out)


def test_check_help_shows_examples_and_exit_statuses() -> None:
    code, out, _ = invoke("check", "--help")
    assert code == 0
    assert "Example" in out
    assert re.search(r"fillcheck check \S+\.toml", out)
    assert "--json" in out and "--units" in out
    flat = " ".join(out.split())
    assert "Exit status" in flat
    for status, meaning in (("0", "pass"), ("1", "fail"), ("1", "review"), ("2", "refused")):
        assert re.search(rf"\b{status}\b[^.;]*{meaning}", flat), (status, meaning, flat)


def test_help_examples_name_scenarios_that_exist() -> None:
    _, out, _ = invoke("check", "--help")
    named = re.findall(r"fillcheck check (\S+\.toml)", out)
    assert named
    missing = [n for n in named if not (REPO / n).is_file()]
    assert not missing, f"examples in `check --help` name files that do not exist: {missing}"


@pytest.mark.parametrize(
    "args",
    [
        ["check", "{file}", "--bogus"],
        ["--bogus"],
        ["check"],
        ["check", "{file}", "--units", "imperial"],
        ["check", "{file}", "--width", "sixty"],
        ["inspect", "{file}"],
    ],
    ids=[
        "unknown-option",
        "unknown-root-option",
        "missing-file-argument",
        "bad-units",
        "bad-width",
        "unknown-command",
    ],
)
def test_usage_errors_exit_2(tmp_path: Path, args: list[str]) -> None:
    p = write(tmp_path, PASSING)
    code, _, err = invoke(*(a.replace("{file}", str(p)) for a in args))
    assert code == 2
    assert "Traceback" not in err


def test_unknown_option_as_a_real_process(tmp_path: Path) -> None:
    proc = run("check", str(write(tmp_path, PASSING)), "--bogus")
    assert proc.returncode == 2
    assert "--bogus" in proc.stderr
    assert "Traceback" not in proc.stderr
    assert proc.stdout == ""


# ---------------------------------------------------------------------------------------------
# JSON
# ---------------------------------------------------------------------------------------------

TOP_KEYS = {"fillcheck_version", "title", "verdict", "vessels"}
VESSEL_KEYS = {
    "id",
    "gas",
    "model",
    "verdict",
    "water_capacity_m3",
    "charged_mass_kg",
    "density_kg_m3",
    "fill_temperature_K",
    "fill_pressure_Pa",
    "settled_pressure_Pa",
    "max_temperature",
    "min_temperature",
    "liquid_forms_below_K",
    "liquid_full_above_K",
    "allowable_reached_at_K",
    "max_safe_charge_kg",
    "max_safe_fill_pressure_Pa",
    "findings",
}
END_KEYS = {"temperature_K", "pressure_Pa", "phase"}
FINDING_KEYS = {"code", "severity", "message"}
NULLABLE = {
    "fill_temperature_K",
    "fill_pressure_Pa",
    "liquid_forms_below_K",
    "liquid_full_above_K",
    "allowable_reached_at_K",
    "max_safe_charge_kg",
    "max_safe_fill_pressure_Pa",
}


@pytest.fixture(scope="module")
def contract_json(tmp_path_factory: pytest.TempPathFactory) -> tuple[dict[str, Any], str]:
    p = write(tmp_path_factory.mktemp("contract"), CONTRACT)
    code, data, text = json_result(p)
    assert code == 1  # the nitrogen vessel fails
    return data, text


def test_json_has_the_contract_keys(contract_json: tuple[dict[str, Any], str]) -> None:
    data, _ = contract_json
    assert TOP_KEYS <= data.keys(), TOP_KEYS - data.keys()
    assert data["fillcheck_version"] == fillcheck.__version__
    assert data["title"] == "Ostrava Road depot, weekly storage review"
    assert [v["id"] for v in data["vessels"]] == ["AR-50-204", "N2-50-205", "CO2-40-206"]
    for v in data["vessels"]:
        assert VESSEL_KEYS <= v.keys(), (v["id"], VESSEL_KEYS - v.keys())
        for end in ("max_temperature", "min_temperature"):
            assert END_KEYS <= v[end].keys(), (v["id"], end)
        assert v["findings"], v["id"]
        for f in v["findings"]:
            assert FINDING_KEYS <= f.keys()
            assert isinstance(f["message"], str) and f["message"]
        for key in VESSEL_KEYS - NULLABLE - {"findings"}:
            assert v[key] is not None, (v["id"], key)
    assert [v["gas"] for v in data["vessels"]] == ["argon", "nitrogen", "carbon dioxide"]


def test_json_words_and_numbers(contract_json: tuple[dict[str, Any], str]) -> None:
    data, text = contract_json
    assert not re.search(r"\b(NaN|-?Infinity)\b", text)
    assert all(math.isfinite(x) for x in numbers_in(data))
    assert data["verdict"] in {"pass", "fail", "review"}
    phases = {"gas", "liquid", "supercritical", "two-phase"}
    for v in data["vessels"]:
        assert v["verdict"] in {"pass", "fail", "review"}
        assert {f["severity"] for f in v["findings"]} <= {"fail", "review", "warning", "info"}
        for end in ("max_temperature", "min_temperature"):
            assert v[end]["phase"] in phases
    verdicts = [v["verdict"] for v in data["vessels"]]
    assert verdicts[:2] == ["pass", "fail"]
    # the overall verdict is the worst one
    assert data["verdict"] == "fail"


def test_json_is_si_with_absolute_pressures(contract_json: tuple[dict[str, Any], str]) -> None:
    data, _ = contract_json
    ar, n2, co2 = data["vessels"]
    assert ar["water_capacity_m3"] == pytest.approx(0.050, rel=1e-12)
    assert co2["water_capacity_m3"] == pytest.approx(0.040, rel=1e-12)
    assert ar["fill_pressure_Pa"] == pytest.approx(200e5 + ATM, rel=1e-12)
    assert n2["fill_pressure_Pa"] == pytest.approx(300e5 + ATM, rel=1e-12)
    assert ar["fill_temperature_K"] == pytest.approx(288.15, abs=1e-9)
    assert n2["fill_temperature_K"] == pytest.approx(283.15, abs=1e-9)
    for v in (ar, n2, co2):
        assert v["max_temperature"]["temperature_K"] == pytest.approx(
            338.15 if v is not co2 else 323.15, abs=1e-9
        )
        assert v["min_temperature"]["temperature_K"] == pytest.approx(253.15, abs=1e-9)
        # charge and density agree, per vessel (not multiplied by count)
        assert v["charged_mass_kg"] == pytest.approx(
            v["density_kg_m3"] * v["water_capacity_m3"], rel=1e-9
        )
        # pressure rises with temperature in a closed vessel
        assert v["max_temperature"]["pressure_Pa"] > v["min_temperature"]["pressure_Pa"] > 0
    assert co2["charged_mass_kg"] == pytest.approx(25.0, rel=1e-12)
    assert co2["fill_pressure_Pa"] is None and co2["fill_temperature_K"] is None
    # filled at the reference temperature: the settled pressure is the fill pressure
    assert ar["settled_pressure_Pa"] == pytest.approx(ar["fill_pressure_Pa"], rel=1e-6)
    # nitrogen filled cold to the allowable pressure reaches it at the fill temperature
    assert n2["allowable_reached_at_K"] == pytest.approx(283.15, abs=0.5)
    assert n2["max_safe_charge_kg"] < n2["charged_mass_kg"]
    assert n2["max_safe_fill_pressure_Pa"] < n2["fill_pressure_Pa"]
    assert ar["max_safe_charge_kg"] > ar["charged_mass_kg"]


def test_json_argon_charge_against_the_reference_equation(
    contract_json: tuple[dict[str, Any], str],
) -> None:
    """50 L argon at 200 barg, 15 °C: to round-off against the same equation in CoolProp, or
    within the density error measured for a cubic model."""
    cp = pytest.importorskip("CoolProp.CoolProp")
    ar = contract_json[0]["vessels"][0]
    assert ar["id"] == "AR-50-204"
    model = ar["model"]
    reference_kg = cp.PropsSI("D", "T", 288.15, "P", 200e5 + ATM, "Argon") * 0.05
    if model == "reference":
        tolerance = 1e-9  # Tegeler et al. (1999) in both: agreement to solver tolerance
        P_top = cp.PropsSI("P", "T", 338.15, "D", reference_kg / 0.05, "Argon")
        assert ar["max_temperature"]["pressure_Pa"] == pytest.approx(P_top, rel=1e-9)
    else:
        models = json.loads(ACCURACY.read_text(encoding="utf-8"))["gases"]["argon"]["models"]
        assert model in models, f"no measured accuracy for argon with model {model!r}"
        tolerance = models[model]["density"]
    assert 0 < tolerance < 0.2 or model == "reference"
    assert ar["charged_mass_kg"] == pytest.approx(reference_kg, rel=tolerance), (
        f"{model}: {ar['charged_mass_kg']} kg vs reference {reference_kg} kg (±{tolerance:.2%})"
    )


def test_json_pressure_spellings(tmp_path: Path) -> None:
    """ "70 MPa(g)" and "101.3 kPa absolute" are accepted and read as gauge and absolute."""
    text = PASSING.replace(
        'allowable_pressure = "300 barg"', 'allowable_pressure = "90 MPa(g)"'
    ).replace('"150 barg"', '"70 MPa(g)"')
    text += """
[[vessel]]
id = "AR-50-207"
gas = "argon"
water_capacity = "50 L"
fill = { pressure = "101.3 kPa absolute", temperature = "15 degC" }
storage = { max_temperature = "50 degC" }
limits = { allowable_pressure = "300 barg" }
"""
    _, data, _ = json_result(write(tmp_path, text))
    high, empty = data["vessels"]
    assert high["fill_pressure_Pa"] == pytest.approx(70e6 + ATM, rel=1e-12)
    assert empty["fill_pressure_Pa"] == pytest.approx(101.3e3, rel=1e-12)
    assert empty["verdict"] == "pass"


def test_json_atmospheric_pressure_shifts_gauge_readings(tmp_path: Path) -> None:
    """At a high-altitude site (invented: 80 kPa) "200 barg" is 200e5 + 80e3 Pa absolute."""
    one = CONTRACT.split("[[vessel]]")[0] + "[[vessel]]" + CONTRACT.split("[[vessel]]")[1]
    _, std, _ = json_result(write(tmp_path, one, "std.toml"))
    high = 'atmospheric_pressure = "80 kPa absolute"\n' + one
    _, alt, _ = json_result(write(tmp_path, high, "alt.toml"))
    p_std = std["vessels"][0]["fill_pressure_Pa"]
    p_alt = alt["vessels"][0]["fill_pressure_Pa"]
    assert p_std == pytest.approx(200e5 + ATM, rel=1e-12)
    assert p_alt == pytest.approx(200e5 + 80e3, rel=1e-12)
    # less gas goes in at the lower absolute pressure
    assert alt["vessels"][0]["charged_mass_kg"] < std["vessels"][0]["charged_mass_kg"]


# ---------------------------------------------------------------------------------------------
# The terminal report
# ---------------------------------------------------------------------------------------------

ANSI = re.compile(r"\x1b[\[\]()]|\x1b")


def test_no_color_gives_plain_text(tmp_path: Path) -> None:
    proc = run("check", str(write(tmp_path, CONTRACT)), NO_COLOR="1", TERM="xterm-256color")
    assert proc.returncode == 1
    assert not ANSI.search(proc.stdout)
    assert "Overall verdict" in proc.stdout


@pytest.mark.skipif(sys.platform == "win32", reason="needs a pseudo-terminal")
def test_no_color_on_a_terminal_gives_plain_text(tmp_path: Path) -> None:
    """With NO_COLOR=1 even a real terminal gets no escape sequences at all."""
    import pty

    master, slave = pty.openpty()
    env = dict(os.environ, PYTHONPATH=str(REPO), NO_COLOR="1", TERM="xterm-256color")
    env.pop("FORCE_COLOR", None)
    proc = subprocess.Popen(
        [sys.executable, "-m", "fillcheck.cli", "check", str(write(tmp_path, PASSING))],
        cwd=REPO,
        env=env,
        stdout=slave,
        stderr=subprocess.PIPE,
    )
    os.close(slave)
    chunks = []
    while True:
        try:
            chunk = os.read(master, 65536)
        except OSError:  # the terminal closes when the process ends
            break
        if not chunk:
            break
        chunks.append(chunk)
    os.close(master)
    assert proc.wait(timeout=120) == 0
    text = b"".join(chunks).decode("utf-8", errors="replace")
    assert "verdict" in text
    found = sorted(set(re.findall(r"\x1b\[[0-9;]*m", text)))
    assert not found, f"NO_COLOR=1 on a terminal still emits escape sequences: {found}"


def _assert_narrow(text: str, width: int) -> None:
    long_lines = [line for line in text.splitlines() if len(line) > width]
    assert not long_lines, f"{len(long_lines)} lines longer than {width}: {long_lines[:3]}"
    assert "Overall verdict" in text
    assert "FAIL" in text
    assert "Sign-off" in text
    # the closing caution, pointing to SAFETY.md, is the last thing printed
    tail = " ".join(text.split()[-60:])
    assert "SAFETY.md" in tail


def test_narrow_terminal_from_columns(tmp_path: Path) -> None:
    proc = run("check", str(write(tmp_path, CONTRACT)), COLUMNS="60", NO_COLOR="1")
    assert proc.returncode == 1
    _assert_narrow(proc.stdout, 60)


@pytest.mark.parametrize("width", [60, 72])
def test_narrow_report_from_width_option(tmp_path: Path, width: int) -> None:
    _assert_narrow(report(write(tmp_path, CONTRACT), "--width", str(width)), width)


def test_the_demo_scenario_at_60_columns() -> None:
    _assert_narrow(report(REPO / "scenarios" / "welding_supply_refill.toml", "--width", "60"), 60)


def test_us_units_show_psig_and_fahrenheit(tmp_path: Path) -> None:
    text = report(write(tmp_path, PASSING), "--units", "us", "--width", "200")
    assert "psig" in text
    assert "°F" in text
    # the computed fill pressure is shown in psig: 150 barg = 2175.6 psig
    assert re.search(r"217[56]\.\d psig", text), text


def test_us_units_report_has_no_metric_numbers(tmp_path: Path) -> None:
    """A file entered in psig/°F/ft³ and shown with --units us mixes in no bar or °C.

    Mixed units on a printed safety report invite exactly the misreading the unit switch is
    there to prevent.
    """
    text = report(write(tmp_path, US_CUSTOMARY), "--units", "us", "--width", "250")
    metric = [
        line.strip()
        for line in text.splitlines()
        if re.search(r"\d\s*(bar[ga]?|MPa|°C|kg/m³)\b", line) or re.search(r"\d\s*°C", line)
    ]
    assert not metric, "metric values in a --units us report:\n" + "\n".join(metric)


def test_report_names_model_and_source_for_each_gas(tmp_path: Path) -> None:
    p = write(tmp_path, CONTRACT)
    _, data, _ = json_result(p)
    text = report(p, "--width", "1000")
    blocks = re.split(r"(?m)^Vessel ", text)[1:]
    assert len(blocks) == len(data["vessels"])
    for block, v in zip(blocks, data["vessels"], strict=True):
        assert block.startswith(v["id"]) and v["gas"] in block.splitlines()[0]
        assert f"({v['model']})" in block, (v["id"], v["model"])
        if "model_name" in v:
            assert v["model_name"] in block
        refs = v.get("model_references") or []
        assert refs, f"{v['id']}: the JSON names no source for model {v['model']}"
        for ref in refs:
            assert ref in block, (v["id"], ref)
        # and where the gas data come from
        assert re.search(r"(?m)^gas data\s+\S", block), v["id"]


def test_report_has_date_and_version(tmp_path: Path) -> None:
    before = dt.date.today()
    text = report(write(tmp_path, PASSING))
    after = dt.date.today()
    assert before.isoformat() in text or after.isoformat() in text
    assert f"fillcheck {fillcheck.__version__}" in text
    assert "Quorvath Fabrication, argon rack" in text
    assert "scenario.toml" in text


def test_report_and_json_agree_on_the_verdict(tmp_path: Path) -> None:
    for name, text, word in (
        ("p.toml", PASSING, "PASS"),
        ("f.toml", FAILING, "FAIL"),
        ("r.toml", REVIEW, "REVIEW"),
    ):
        out = report(write(tmp_path, text, name))
        assert re.search(rf"Overall verdict:\s+{word}\b", out), (name, out[-800:])


@pytest.mark.parametrize("args", [["--version"], ["--help"], ["gases"]])
def test_light_commands_import_neither_pydantic_nor_the_mixture_engine(args: list[str]) -> None:
    # -X importtime lists every module a process imports, on stderr.
    out = subprocess.run(
        [sys.executable, "-X", "importtime", "-m", "fillcheck", *args],
        capture_output=True,
        text=True,
        cwd=REPO,
        env={**os.environ, "PYTHONPATH": str(REPO)},
    )
    assert out.returncode == 0, out.stderr[-500:]
    imported = {line.rsplit("|", 1)[-1].strip() for line in out.stderr.splitlines() if "|" in line}
    assert "fillcheck" in imported  # the listing works
    heavy = {m for m in imported if m.split(".")[0] in ("pydantic", "scipy", "matplotlib")}
    assert not heavy, sorted(heavy)[:5]
    assert not {m for m in imported if "mixture" in m}
