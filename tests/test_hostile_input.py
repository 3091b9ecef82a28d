"""Hostile input: absurd numbers, deep nesting, huge cells, devices, control characters.

Every refusal here must end as the refusals of ``tests/test_bad_input.py`` do (its helpers are
reused): exit status 2, nothing on stdout, one sentence on one line of stderr naming the file,
the vessel and the field (for a register, the row and the column), no traceback and never
"could not complete". The plausibility bounds checked are those of
``fillcheck/scenario/bounds.py``.
"""

from __future__ import annotations

import ast
import json
import os
import stat
import subprocess
import sys
import warnings
from pathlib import Path

import pytest
from test_bad_input import (
    FILE_NAME,
    GOOD,
    REPO,
    Bad,
    assert_refusal,
    materialise,
    run_in_process,
    run_subprocess,
    scenario,
    subprocess_env,
    user_gas,
    vessel,
)
from typer.testing import CliRunner

from fillcheck import cli
from fillcheck.cli import app
from fillcheck.scenario import bounds
from fillcheck.scenario.text import neutralise

WELDING = REPO / "scenarios" / "welding_supply_refill.toml"
ESC = "\x1b"


def _fill(pressure: str) -> str:
    return f'{{ pressure = "{pressure}", temperature = "15 degC" }}'


def _limits(**extra: str) -> str:
    items = ['allowable_pressure = "300 barg"', *(f'{k} = "{v}"' for k, v in extra.items())]
    return "{ " + ", ".join(items) + " }"


def _refused(case: Bad, tmp_path: Path) -> str:
    """Run ``check`` on the case in-process, assert the refusal, return the message."""
    path = materialise(case, tmp_path)
    code, out, err, exc = run_in_process(path)
    assert exc is None, f"[{case.name}] an exception escaped: {exc!r}"
    assert_refusal(case, path, code, out, err)
    assert "could not complete" not in err and "internal error" not in err, err
    return err.strip()


# ---------------------------------------------------------------------------------------------
# 1, 2, 5, 10: scenario files
# ---------------------------------------------------------------------------------------------

CASES: list[Bad] = [
    # 1. nesting
    Bad(
        "toml_nested_10000_deep",
        "a = " + "[" * 10_000 + "]" * 10_000 + "\n" + GOOD,
        None,
        ("deep", "16"),
        vessel_id=None,
    ),
    Bad(
        "title_nested_50_deep",
        "title = " + "[" * 50 + "1" + "]" * 50 + "\n" + vessel(),
        "title",
        ("deep", "16"),
        vessel_id=None,
    ),
    # 2. count
    Bad("count_400_digits", scenario(vessel(count="9" * 400)), "count", ("1,000,000",)),
    Bad("count_1e50", scenario(vessel(count=str(10**50))), "count", ("1,000,000",)),
    Bad("count_just_above_the_bound", scenario(vessel(count="1000001")), "count", ("1,000,000",)),
    # 5. pressures
    Bad(
        "fill_pressure_1e6_bara",
        scenario(vessel(fill=_fill("1e6 bara"))),
        "fill.pressure",
        ("2000 bar", "plausib"),
    ),
    Bad(
        "fill_pressure_1e308_bara",
        scenario(vessel(fill=_fill("1e308 bara"))),
        "fill.pressure",
        ("2000 bar",),
    ),
    Bad(
        "settled_pressure_1e6_bara",
        scenario(vessel(fill='{ settled_pressure = "1e6 bara", temperature = "15 degC" }')),
        "fill.settled_pressure",
        ("2000 bar",),
    ),
    Bad(
        "allowable_pressure_1e308_bara",
        scenario(vessel(limits='{ allowable_pressure = "1e308 bara" }')),
        "limits.allowable_pressure",
        ("2000 bar",),
    ),
    Bad(
        "allowable_pressure_1e6_bara",
        scenario(vessel(limits='{ allowable_pressure = "1e6 bara" }')),
        "limits.allowable_pressure",
        ("2000 bar",),
    ),
    Bad(
        "relief_pressure_1e308_bara",
        scenario(vessel(limits=_limits(relief_set_pressure="1e308 bara"))),
        "limits.relief_set_pressure",
        ("2000 bar",),
    ),
    Bad(
        "test_pressure_1e6_bara",
        scenario(vessel() + 'rules = { set = "p200-compressed", test_pressure = "1e6 bara" }\n'),
        "rules.test_pressure",
        ("2000 bar",),
    ),
    Bad(
        "user_gas_critical_pressure_1e308",
        scenario(vessel(gas='"testgas"'), head=user_gas().replace("4.86 MPa(a)", "1e308 bara")),
        "gas[0].critical_pressure",
        ("2000 bar",),
        vessel_id=None,
    ),
    # 5. water capacity, mass, densities
    Bad(
        "water_capacity_1e300_L",
        scenario(vessel(water_capacity='"1e300 L"')),
        "water_capacity",
        ("1000 m³",),
    ),
    Bad(
        "water_capacity_of_a_thousandth_of_a_millilitre",
        scenario(vessel(water_capacity='"0.001 mL"')),
        "water_capacity",
        ("1 mL",),
    ),
    Bad(
        "fill_mass_1e300_kg",
        scenario(vessel(fill='{ mass = "1e300 kg" }')),
        "fill.mass",
        ("1,000,000 kg",),
    ),
    Bad(
        "filling_ratio_of_a_heavy_metal",
        scenario(vessel(fill='{ filling_ratio = "13 kg/L" }')),
        "fill.filling_ratio",
        ("5 kg/L",),
    ),
    Bad(
        "max_filling_ratio_1e300",
        scenario(vessel(limits=_limits(max_filling_ratio="1e300 kg/L"))),
        "limits.max_filling_ratio",
        ("5 kg/L",),
    ),
    # 5. temperatures
    Bad(
        "reference_temperature_1e9_K",
        scenario(head='reference_temperature = "1e9 K"'),
        "reference_temperature",
        ("-60", "+70"),
        vessel_id=None,
    ),
    Bad(
        "reference_temperature_in_a_freezer",
        scenario(head='reference_temperature = "-100 degC"'),
        "reference_temperature",
        ("-60",),
        vessel_id=None,
    ),
    Bad(
        "user_gas_critical_temperature_1e9_K",
        scenario(vessel(gas='"testgas"'), head=user_gas().replace('"150.7 K"', '"1e9 K"')),
        "gas[0].critical_temperature",
        ("1000 K",),
        vessel_id=None,
    ),
    Bad(
        "user_gas_molar_mass_1e-300",
        scenario(vessel(gas='"testgas"'), head=user_gas(molar_mass='"1e-300 g/mol"')),
        "gas[0].molar_mass",
        ("1 g/mol",),
        vessel_id=None,
    ),
    # 10. huge and odd numbers
    Bad(
        "pressure_1e400_barg",
        scenario(vessel(fill=_fill("1e400 barg"))),
        "fill.pressure",
        ("finite",),
    ),
    Bad(
        "pressure_nan_barg", scenario(vessel(fill=_fill("nan barg"))), "fill.pressure", ("finite",)
    ),
    Bad("water_capacity_inf_L", scenario(vessel(water_capacity='"inf L"')), "water_capacity", ()),
    Bad(
        "water_capacity_negative_zero",
        scenario(vessel(water_capacity='"-0 L"')),
        "water_capacity",
        ("zero",),
    ),
    Bad(
        "fill_pressure_negative_zero_absolute",
        scenario(vessel(fill=_fill("-0.0 bara"))),
        "fill.pressure",
        ("zero",),
    ),
    Bad(
        "integer_of_5000_digits",
        scenario(vessel(count="7" * 5000)),
        None,
        ("TOML",),
        vessel_id=None,
    ),
    Bad(
        "acentric_factor_of_400_digits",
        scenario(vessel(gas='"testgas"'), head=user_gas(acentric_factor="9" * 400)),
        "gas[0].acentric_factor",
        ("acentric",),
        vessel_id=None,
    ),
    Bad(
        "acentric_factor_nan",
        scenario(vessel(gas='"testgas"'), head=user_gas(acentric_factor="nan")),
        "gas[0].acentric_factor",
        ("finite",),
        vessel_id=None,
    ),
    Bad(
        "mixture_fraction_of_400_digits",
        scenario(vessel(gas="{ argon = " + "9" * 400 + ", nitrogen = 0.5 }")),
        "gas.argon",
        ("0 to 1",),
    ),
    Bad(
        "min_vapour_space_of_400_digits",
        scenario(
            vessel(
                limits='{ allowable_pressure = "300 barg", min_vapour_space = '
                + "9" * 400
                + ', vapour_space_temperature = "50 degC" }'
            )
        ),
        "limits.min_vapour_space",
        ("0 to 1",),
    ),
    Bad(
        "quantity_of_100000_characters",
        scenario(vessel(water_capacity='"' + "1" * 100_000 + ' L"')),
        "water_capacity",
        ("500",),
    ),
    Bad(
        "title_of_50000_numbers",
        "title = [" + "1, " * 50_000 + "]\n" + vessel(),
        "title",
        ("text",),
        vessel_id=None,
    ),
    # 10. the file itself
    Bad("empty_file", "", None, ("empty", "[[vessel]]"), vessel_id=None),
    Bad("whitespace_only", " \n\t\n", None, ("empty",), vessel_id=None),
    Bad("byte_order_mark_only", "\ufeff".encode(), None, ("empty",), vessel_id=None),
    Bad("binary_garbage", bytes(range(256)) * 40, None, ("UTF-8",), vessel_id=None),
    Bad(
        "invalid_utf8_in_a_title",
        b'title = "Lager \xff\xfe"\n' + vessel().encode(),
        None,
        ("UTF-8",),
        vessel_id=None,
    ),
    Bad(
        "nul_bytes",
        GOOD.encode().replace(b"argon", b"arg\x00on"),
        None,
        ("TOML",),
        vessel_id=None,
    ),
]


@pytest.mark.parametrize("case", CASES, ids=lambda c: c.name)
def test_hostile_scenario_is_refused(case: Bad, tmp_path: Path) -> None:
    _refused(case, tmp_path)


@pytest.mark.parametrize("name", ["count_400_digits", "title_of_50000_numbers"])
def test_huge_figures_never_reach_the_messages(name: str, tmp_path: Path) -> None:
    """A 400-digit number or a 50,000-item list is cut short in the sentence."""
    msg = _refused(next(c for c in CASES if c.name == name), tmp_path)
    assert len(msg) < 400, msg


def test_a_bound_itself_is_accepted(tmp_path: Path) -> None:
    """Values just inside the bounds are checked, not refused (exit 0 or 1, never 2)."""
    text = scenario(
        vessel(
            count=str(bounds.COUNT_MAX),
            fill=_fill("1900 bara"),
            limits='{ allowable_pressure = "1999 bara" }',
        ),
        head='reference_temperature = "69 degC"',
    )
    p = tmp_path / FILE_NAME
    p.write_text(text, encoding="utf-8")
    code, _, err, exc = run_in_process(p, "--json")
    assert exc is None
    assert code in (0, 1), err
    assert "could not complete" not in err


def test_every_bound_is_a_documented_plausibility_bound() -> None:
    """One module holds the bounds, each with a docstring that says what it is."""
    tree = ast.parse(Path(bounds.__file__).read_text(encoding="utf-8"))
    docs: dict[str, str] = {}
    for node, after in zip(tree.body, [*tree.body[1:], None], strict=True):
        if isinstance(node, ast.Assign) and isinstance(node.targets[0], ast.Name):
            doc = after.value.value if isinstance(after, ast.Expr) else None
            assert isinstance(doc, str), f"{node.targets[0].id} has no docstring"
            docs[node.targets[0].id] = doc
    plausibility = {n for n, d in docs.items() if d.startswith("Plausibility bound")}
    assert {
        "PRESSURE_MAX_Pa",
        "WATER_CAPACITY_MAX_m3",
        "COUNT_MAX",
        "MASS_MAX_kg",
        "REFERENCE_TEMPERATURE_MIN_K",
        "REFERENCE_TEMPERATURE_MAX_K",
    } <= plausibility
    assert "no source" in (ast.get_docstring(tree) or "")
    assert bounds.PRESSURE_MAX_Pa == 200e6 and bounds.COUNT_MAX == 1_000_000
    readme = (REPO / "README.md").read_text(encoding="utf-8")
    section = readme.split("### Plausibility bounds", 1)[1].split("\n### ", 1)[0]
    for words in ("2000 bar", "1000 m³", "1,000,000", "−60 to +70 °C", "20 MB"):
        assert words in section, words


# ---------------------------------------------------------------------------------------------
# 5: the `reading` and `stop-table` options
# ---------------------------------------------------------------------------------------------

OPTION_CASES = [
    (["--pressure", "215 barg", "--temperature", "2000 degC"], "--temperature", "above"),
    (["--pressure", "215 barg", "--temperature", "-250 degC"], "--temperature", "triple point"),
    (["--pressure", "1e6 bara", "--temperature", "20 degC"], "--pressure", "2000 bar"),
    (["--pressure", "1e308 bara", "--temperature", "20 degC"], "--pressure", "2000 bar"),
    (["--pressure", "nan barg", "--temperature", "20 degC"], "--pressure", "finite"),
]


@pytest.mark.parametrize(("args", "field", "word"), OPTION_CASES)
def test_reading_options_are_bounded(args: list[str], field: str, word: str) -> None:
    res = CliRunner().invoke(app, ["reading", str(WELDING), "--vessel", "AR-50-014", *args])
    case = Bad("reading", None, field, (word,), vessel_id="AR-50-014")
    assert_refusal(case, WELDING, res.exit_code, res.stdout, res.stderr)


def test_stop_table_temperatures_are_bounded() -> None:
    res = CliRunner().invoke(
        app, ["stop-table", str(WELDING), "--vessel", "AR-50-014", "--to", "3000 degC"]
    )
    case = Bad("stop-table", None, "--to", ("above",), vessel_id="AR-50-014")
    assert_refusal(case, WELDING, res.exit_code, res.stdout, res.stderr)


# ---------------------------------------------------------------------------------------------
# 3: registers
# ---------------------------------------------------------------------------------------------

CSV_HEADER = (
    "id,gas,water_capacity,fill_pressure,fill_temperature,max_temperature,allowable_pressure"
)


def _csv_row(vid: str = "R-1", water_capacity: str = "50 L", pressure: str = "150 barg") -> str:
    return f"{vid},argon,{water_capacity},{pressure},15 degC,50 degC,300 barg"


def _register(tmp_path: Path, *rows: str, raw: bytes | None = None) -> Path:
    p = tmp_path / "bay_7.csv"
    if raw is not None:
        p.write_bytes(raw)
    else:
        p.write_text("\n".join([CSV_HEADER, *rows]) + "\n", encoding="utf-8")
    return p


def _register_refused(path: Path, case: Bad) -> str:
    code, out, err, exc = run_in_process(path)
    assert exc is None
    assert_refusal(case, path, code, out, err)
    assert "could not complete" not in err
    return err.strip()


def test_register_cell_beyond_the_csv_field_limit(tmp_path: Path) -> None:
    cell = '"' + "1" * 131_073 + ' L"'
    p = _register(tmp_path, _csv_row(), _csv_row("R-2", water_capacity=cell))
    case = Bad("long_cell", None, "column 'water_capacity'", ("row 3", "500"), vessel_id="R-2")
    _register_refused(p, case)


def test_register_id_cell_too_long(tmp_path: Path) -> None:
    p = _register(tmp_path, _csv_row("X" * 200_000))
    case = Bad("long_id", None, "column 'id'", ("row 2",), vessel_id=None)
    assert len(_register_refused(p, case)) < 400


def test_register_value_beyond_a_bound_names_row_and_column(tmp_path: Path) -> None:
    p = _register(tmp_path, _csv_row(pressure="1e6 bara"))
    case = Bad("csv_pressure", None, "column 'fill_pressure'", ("row 2", "2000 bar"), "R-1")
    _register_refused(p, case)


def test_register_empty_and_garbage(tmp_path: Path) -> None:
    for raw, word in ((b"", "empty"), (b"\xff\xfe\x00garbage", "UTF-8")):
        p = _register(tmp_path, raw=raw)
        _register_refused(p, Bad("csv_file", None, None, (word,), vessel_id=None))


# ---------------------------------------------------------------------------------------------
# 4: devices, pipes and huge files
# ---------------------------------------------------------------------------------------------


@pytest.mark.skipif(not Path("/dev/zero").exists(), reason="no /dev/zero")
@pytest.mark.parametrize("device", ["/dev/zero", "/dev/null"])
def test_a_device_is_refused_unread(device: str) -> None:
    path = Path(device)
    code, out, err, exc = run_in_process(path)
    assert exc is None
    assert_refusal(Bad("device", None, None, ("regular file",), None), path, code, out, err)


def test_dev_zero_as_a_real_process() -> None:
    if not Path("/dev/zero").exists():
        pytest.skip("no /dev/zero")
    proc = subprocess.run(
        [sys.executable, "-m", "fillcheck.cli", "check", "/dev/zero"],
        cwd=REPO,
        env=subprocess_env(),
        capture_output=True,
        text=True,
        timeout=60,
        check=False,
    )
    case = Bad("dev_zero", None, None, ("regular file",), vessel_id=None)
    assert_refusal(case, Path("/dev/zero"), proc.returncode, proc.stdout, proc.stderr)


@pytest.mark.skipif(not hasattr(os, "mkfifo"), reason="no named pipes")
def test_a_named_pipe_is_refused_without_blocking(tmp_path: Path) -> None:
    fifo = tmp_path / FILE_NAME
    os.mkfifo(fifo)
    code, out, err, exc = run_in_process(fifo)
    assert exc is None
    assert_refusal(Bad("fifo", None, None, ("regular file",), None), fifo, code, out, err)


def test_a_file_over_20_mb_is_refused(tmp_path: Path) -> None:
    big = tmp_path / FILE_NAME
    with big.open("wb") as fh:
        fh.truncate(bounds.INPUT_BYTES_MAX + 1)  # sparse: nothing is written
    code, out, err, exc = run_in_process(big)
    assert exc is None
    assert_refusal(Bad("big", None, None, ("20 MB",), vessel_id=None), big, code, out, err)


# ---------------------------------------------------------------------------------------------
# 6: control characters
# ---------------------------------------------------------------------------------------------


def test_neutralise_makes_controls_visible_and_is_idempotent() -> None:
    raw = "A\x1b[2J\n\tB\x07\x9b\u202e\x7f"
    shown = neutralise(raw)
    assert shown == "A\\x1b[2J\\n\\tB\\x07\\x9b\\u202e\\x7f"
    assert neutralise(shown) == shown
    assert all(ord(c) >= 0x20 and not 0x7F <= ord(c) <= 0x9F for c in shown)
    for text in ("氢气瓶-甲", "أسطوانة ١", "N2-50-007 °C"):
        assert neutralise(text) == text


def test_control_characters_reach_no_renderer_raw(tmp_path: Path) -> None:
    gas = user_gas().replace('"testgas"', '"test\\u001b[31mgas"')
    text = scenario(
        vessel(id='"AR\\u001b[2J-1\\u009b"'),
        vessel(id='"N2\\n-2"', gas='"test\\u001b[31mgas"'),
        head=gas,
    ).replace('title = "Brevindle Lane', 'title = "Brevindle\\tLane\\u001b]0;pwned\\u0007')
    p = tmp_path / FILE_NAME
    p.write_text(text, encoding="utf-8")
    for extra in ((), ("--json",)):
        code, out, err, exc = run_in_process(p, *extra)
        assert exc is None
        assert code in (0, 1), err
        assert ESC not in out and "\x9b" not in out and "\x07" not in out
        assert "\\x1b" in out
    data = json.loads(run_in_process(p, "--json")[1])
    assert data["vessels"][0]["id"] == "AR\\x1b[2J-1\\x9b"
    assert data["vessels"][1]["id"] == "N2\\n-2"
    assert data["title"].startswith("Brevindle\\tLane\\x1b]0;pwned\\x07")
    html = tmp_path / "report.html"
    code, _, err, exc = run_in_process(p, "--html", str(html))
    assert exc is None and code in (0, 1), err
    page = html.read_text(encoding="utf-8")
    assert ESC not in page and "\x07" not in page and "\\x1b" in page


def test_a_newline_in_an_id_keeps_the_message_one_line(tmp_path: Path) -> None:
    case = Bad(
        "newline_id",
        scenario(vessel(id='"AR\\n50\\u001b[2J"', fill=_fill("200 bar"))),
        "fill.pressure",
        ("barg",),
        vessel_id="AR\\n50\\x1b[2J",
    )
    msg = _refused(case, tmp_path)
    assert ESC not in msg


def test_control_characters_in_a_register_cell(tmp_path: Path) -> None:
    p = _register(tmp_path, _csv_row('"R\x1b[2J\n1"', pressure="150 bar"))
    case = Bad("csv_ctrl", None, "column 'fill_pressure'", ("row 2",), vessel_id="R\\x1b[2J\\n1")
    assert ESC not in _register_refused(p, case)
    header = tmp_path / "header.csv"
    header.write_text("id,gas\x1b[31m,water_capacity\n", encoding="utf-8")
    msg = _register_refused(header, Bad("csv_header", None, "gas\\x1b[31m", (), vessel_id=None))
    assert ESC not in msg


def test_a_control_character_in_the_vessel_option(tmp_path: Path) -> None:
    res = CliRunner().invoke(
        app,
        [
            "reading",
            str(WELDING),
            "--vessel",
            "AR\x1b[2J",
            "--pressure",
            "1 barg",
            "--temperature",
            "20 degC",
        ],
    )
    case = Bad("vessel_option", None, None, ("no vessel",), vessel_id="AR\\x1b[2J")
    assert_refusal(case, WELDING, res.exit_code, res.stdout, res.stderr)


# ---------------------------------------------------------------------------------------------
# 7: --html destinations
# ---------------------------------------------------------------------------------------------


def _good(tmp_path: Path) -> Path:
    p = tmp_path / FILE_NAME
    p.write_text(GOOD, encoding="utf-8")
    return p


def _html_refused(tmp_path: Path, target: Path, *extra: str) -> str:
    p = _good(tmp_path)
    code, out, err, exc = run_in_process(p, "--html", str(target), *extra)
    assert exc is None
    msg = err.strip()
    assert code == 2 and out == "", (code, err)
    assert "\n" not in msg and "Traceback" not in msg and target.name in msg, msg
    return msg


@pytest.mark.skipif(not Path("/dev/null").exists(), reason="no /dev/null")
def test_html_force_never_replaces_a_device(tmp_path: Path) -> None:
    from fillcheck.report.html_report import destination_problem

    dev = Path("/dev/null")
    # asked of the function first, so that a regression cannot replace /dev/null
    assert destination_problem(dev, True) is not None
    before = os.stat(dev)
    assert "regular file" in _html_refused(tmp_path, dev, "--force")
    after = os.stat(dev)
    assert stat.S_ISCHR(after.st_mode) and after.st_ino == before.st_ino


def test_html_force_never_follows_or_replaces_a_symlink(tmp_path: Path) -> None:
    target = tmp_path / "precious.txt"
    target.write_text("keep me", encoding="utf-8")
    link = tmp_path / "report.html"
    link.symlink_to(target)
    assert "symbolic link" in _html_refused(tmp_path, link, "--force")
    assert link.is_symlink() and target.read_text(encoding="utf-8") == "keep me"


def test_html_force_never_replaces_a_folder_or_the_input(tmp_path: Path) -> None:
    folder = tmp_path / "report.html"
    folder.mkdir()
    assert "folder" in _html_refused(tmp_path, folder, "--force")
    assert folder.is_dir()
    source = _good(tmp_path)
    assert "input file" in _html_refused(tmp_path, source, "--force")
    assert source.read_text(encoding="utf-8") == GOOD


def test_html_without_force_never_overwrites(tmp_path: Path) -> None:
    existing = tmp_path / "report.html"
    existing.write_text("old", encoding="utf-8")
    assert "--force" in _html_refused(tmp_path, existing)
    assert existing.read_text(encoding="utf-8") == "old"
    code, _, err, _ = run_in_process(_good(tmp_path), "--html", str(existing), "--force")
    assert code == 0, err
    assert existing.read_text(encoding="utf-8").startswith("<!DOCTYPE html>")


# ---------------------------------------------------------------------------------------------
# 8: charts of non-Latin ids draw silently
# ---------------------------------------------------------------------------------------------


def test_chart_of_a_chinese_id_raises_no_warning(tmp_path: Path) -> None:
    from fillcheck.assess import assess_scenario
    from fillcheck.report.chart import vessel_chart_svg
    from fillcheck.scenario.resolve import scenario_from_dict

    raw = {
        "vessel": [
            {
                "id": "氢气瓶-甲 أسطوانة",
                "gas": "argon",
                "water_capacity": "50 L",
                "fill": {"pressure": "150 barg", "temperature": "15 degC"},
                "storage": {"max_temperature": "50 degC"},
                "limits": {"allowable_pressure": "300 barg"},
            }
        ]
    }
    v = assess_scenario(scenario_from_dict(raw)).vessels[0]
    with warnings.catch_warnings(record=True) as caught:
        warnings.simplefilter("always")
        svg = vessel_chart_svg(v, "metric", 101325.0, v.allowable_pressure_Pa, None)
    assert svg.startswith("<svg")
    assert not caught, [str(w.message) for w in caught]


def test_html_of_a_chinese_id_as_a_real_process(tmp_path: Path) -> None:
    p = tmp_path / FILE_NAME
    p.write_text(scenario(vessel(id='"氢气瓶-甲"')), encoding="utf-8")
    out = tmp_path / "report.html"
    proc = run_subprocess(p, "--html", str(out))
    assert proc.returncode == 0, proc.stderr
    assert proc.stderr.strip() == f"fillcheck: wrote {out}"
    assert "氢气瓶-甲" in out.read_text(encoding="utf-8")


def test_an_id_with_dollar_signs_is_not_mathtext(tmp_path: Path) -> None:
    p = tmp_path / FILE_NAME
    p.write_text(scenario(vessel(id="'A$\\frac{$1'")), encoding="utf-8")
    out = tmp_path / "report.html"
    code, _, err, exc = run_in_process(p, "--html", str(out))
    assert exc is None and code == 0, err
    assert "A$\\frac{$1" in out.read_text(encoding="utf-8")


# ---------------------------------------------------------------------------------------------
# 9: usage errors through the entry point
# ---------------------------------------------------------------------------------------------

USAGE = [
    (["check", "{file}", "--bogus"], "--bogus"),
    (["check"], "Missing argument"),
    (["check", "{file}", "--units", "imperial"], "--units"),
    (["check", "{file}", "--width", "10"], "--width"),
    (["inspect", "{file}"], "inspect"),
    (["--bogus"], "--bogus"),
]


@pytest.mark.parametrize(("args", "word"), USAGE)
def test_usage_error_is_one_sentence(
    args: list[str],
    word: str,
    tmp_path: Path,
    monkeypatch: pytest.MonkeyPatch,
    capsys: pytest.CaptureFixture[str],
) -> None:
    p = _good(tmp_path)
    monkeypatch.setattr(sys, "argv", ["fillcheck", *(a.replace("{file}", str(p)) for a in args)])
    with pytest.raises(SystemExit) as stop:
        cli.main()
    assert stop.value.code == 2
    out, err = capsys.readouterr()
    msg = err.strip()
    assert out == ""
    assert "\n" not in msg, msg
    assert msg.startswith("fillcheck: ") and "--help" in msg and word in msg, msg
    assert "Usage:" not in msg and "Traceback" not in msg


def test_usage_error_as_a_real_process(tmp_path: Path) -> None:
    proc = subprocess.run(
        [sys.executable, "-m", "fillcheck.cli", "check", str(_good(tmp_path)), "--jsn"],
        cwd=REPO,
        env=subprocess_env(),
        capture_output=True,
        text=True,
        timeout=60,
        check=False,
    )
    assert proc.returncode == 2 and proc.stdout == ""
    msg = proc.stderr.strip()
    assert "\n" not in msg and "--jsn" in msg and "fillcheck check --help" in msg, msg


def test_entry_point_keeps_the_exit_statuses(
    tmp_path: Path, monkeypatch: pytest.MonkeyPatch, capsys: pytest.CaptureFixture[str]
) -> None:
    monkeypatch.setattr(sys, "argv", ["fillcheck", "check", str(_good(tmp_path)), "--json"])
    with pytest.raises(SystemExit) as stop:
        cli.main()
    assert stop.value.code == 0
    assert json.loads(capsys.readouterr().out)["verdict"] == "pass"
    monkeypatch.setattr(sys, "argv", ["fillcheck", "gases"])
    with pytest.raises(SystemExit) as stop:
        cli.main()
    assert stop.value.code == 0
