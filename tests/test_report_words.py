"""The report's words: what it calls the largest charge, the values it prints beside each limit,
one basis for margins, the register summary, units spelled one way, no trailing spaces, chart
legends clear of the limit lines, the stop-table of a vessel filled by weight, and sources
printed as publications."""

from __future__ import annotations

import ast
import io
import re
from pathlib import Path

import numpy as np
import pytest
from rich.console import Console
from typer.testing import CliRunner

from fillcheck.assess import assess_scenario
from fillcheck.cli import app
from fillcheck.report.content import register_summary
from fillcheck.report.html_report import render_html
from fillcheck.report.terminal import render_terminal
from fillcheck.report.wording import finding_message
from fillcheck.scenario.register import register_from_text
from fillcheck.scenario.resolve import load_scenario, scenario_from_dict

REPO = Path(__file__).resolve().parents[1]
DEMOS = sorted((REPO / "scenarios").glob("*.toml"))
ATM = 101325.0  # standard atmosphere [Pa], by definition
BAR = 1e5  # [Pa], by definition


def _terminal(a, width: int = 100) -> str:
    buf = io.StringIO()
    render_terminal(a, Console(file=buf, width=width, color_system=None, highlight=False))
    return buf.getvalue()


@pytest.fixture(scope="module")
def demo_reports() -> dict[str, tuple[object, str]]:
    """Every demo scenario assessed and rendered through the terminal renderer."""
    out = {}
    for path in DEMOS:
        a = assess_scenario(load_scenario(path))
        out[path.stem] = (a, _terminal(a))
    return out


def _scenario(vessels: list[dict]):
    return assess_scenario(scenario_from_dict({"vessel": vessels}, "words.toml"))


# --- "safe" ------------------------------------------------------------------------------------

SAFE_WORD = re.compile(r"\bsafe\b", re.IGNORECASE)


def _printed_strings(path: Path) -> list[str]:
    """The string constants of a module that are not docstrings (what it may print)."""
    tree = ast.parse(path.read_text(encoding="utf-8"))
    docs = {
        id(node.body[0].value)
        for node in ast.walk(tree)
        if isinstance(node, ast.Module | ast.FunctionDef | ast.ClassDef)
        and node.body
        and isinstance(node.body[0], ast.Expr)
        and isinstance(node.body[0].value, ast.Constant)
    }
    return [
        n.value
        for n in ast.walk(tree)
        if isinstance(n, ast.Constant) and isinstance(n.value, str) and id(n) not in docs
    ]


def test_no_printed_sentence_calls_a_charge_or_pressure_safe() -> None:
    # SAFETY.md: the tool never says "safe" without the limits it checked. JSON keys such as
    # max_safe_charge_kg are contract and stay (no word boundary inside them).
    files = [*sorted((REPO / "fillcheck" / "report").glob("*.py")), REPO / "fillcheck" / "cli.py"]
    files.append(REPO / "fillcheck" / "assess" / "findings.py")
    said = [(f.name, s) for f in files for s in _printed_strings(f) if SAFE_WORD.search(s)]
    assert said == []
    readme = (REPO / "README.md").read_text(encoding="utf-8")
    assert "largest safe charge" not in readme.lower()


def test_no_demo_report_says_safe(demo_reports) -> None:
    # no printed word "safe" at all, cautions included (SAFETY.md)
    not_about_a_charge = re.compile(r"\bsafe\b", re.IGNORECASE)
    for name, (_, text) in demo_reports.items():
        assert not_about_a_charge.findall(text) == [], name
        assert "largest charge within the limits" in text, name


# --- the values found beside each limit ---------------------------------------------------------


def test_vapour_space_found_is_printed_with_its_margin() -> None:
    # Propane, 18 kg in 43 L at 50 °C. Saturated densities at 323.15 K from CoolProp 8.0.0
    # (Lemmon, McLinden, Wagner 2009): liquid share = (ρ − ρv)/(ρl − ρv).
    CP = pytest.importorskip("CoolProp.CoolProp")
    rho = 18.0 / 0.043
    rl = CP.PropsSI("D", "T", 323.15, "Q", 0, "propane")
    rv = CP.PropsSI("D", "T", 323.15, "Q", 1, "propane")
    left = 1.0 - (rho - rv) / (rl - rv)
    a = _scenario(
        [
            {
                "id": "C3",
                "gas": "propane",
                "water_capacity": "43 L",
                "fill": {"mass": "18 kg"},
                "storage": {"max_temperature": "50 degC", "min_temperature": "-15 degC"},
                "limits": {
                    "allowable_pressure": "30 barg",
                    "min_vapour_space": "5 %",
                    "vapour_space_temperature": "50 degC",
                },
            }
        ]
    )
    text = _terminal(a, width=140)
    row = re.search(
        r"vapour space at 50\.0 °C\s*│\s*(\d+\.\d) % of the vessel \(at least 5 %; "
        r"margin ([+-]\d+\.\d) points\)",
        text,
    )
    assert row is not None, text
    assert float(row.group(1)) == pytest.approx(100.0 * left, abs=0.06)
    assert float(row.group(2)) == pytest.approx(100.0 * left - 5.0, abs=0.06)
    html = render_html(a)
    assert "vapour space at 50.0 °C" in html and f"{row.group(1)} % of the vessel" in html


def test_rule_set_values_are_printed_with_margins_and_the_edition_note() -> None:
    # CO2 at 0.60 kg/L under p200-high-pressure-liquefied with a 190 barg test pressure: the
    # rule's largest charge is the density at 65 °C and the test pressure (CoolProp 8.0.0,
    # Span & Wagner 1996).
    CP = pytest.importorskip("CoolProp.CoolProp")
    limit = CP.PropsSI("D", "T", 338.15, "P", 190 * BAR + ATM, "CO2") / 1000.0  # [kg/L]
    a = _scenario(
        [
            {
                "id": "CO2",
                "gas": "CO2",
                "water_capacity": "50 L",
                "fill": {"filling_ratio": "0.60 kg/L"},
                "storage": {"max_temperature": "65 degC", "min_temperature": "-20 degC"},
                "limits": {"allowable_pressure": "250 barg"},
                "rules": {"set": "p200-high-pressure-liquefied", "test_pressure": "190 barg"},
            }
        ]
    )
    text = _terminal(a, width=200)
    row = re.search(
        r"p200-high-pressure-liquefied: pressure at 65 °C not above the test pressure\s*│\s*"
        r"0\.600 kg/L against at most (\d\.\d{3}) kg/L \(margin ([+-]\d+\.\d) %\)",
        text,
    )
    assert row is not None, text
    assert float(row.group(1)) == pytest.approx(limit, abs=0.0006)
    assert float(row.group(2)) == pytest.approx(100.0 * (limit - 0.6) / limit, abs=0.1)
    assert "verify against the edition that applies to you" in text
    assert "from memory" not in text
    assert "verify against the edition that applies to you" in render_html(a)


# --- margins: one basis -------------------------------------------------------------------------


def _nitrogen_row(i: int, bar_g: float) -> str:
    return f"N2-{i:02d},nitrogen,50 L,{bar_g:g} barg,,,,15 degC,65 degC,-20 degC,300 barg,,"


REGISTER_HEADER = (
    "id,gas,water_capacity,fill_pressure,fill_mass,filling_ratio,settled_pressure,"
    "fill_temperature,max_temperature,min_temperature,allowable_pressure,"
    "relief_set_pressure,max_filling_ratio"
)


def _summary_rows(text: str) -> dict[str, str]:
    """vessel id -> its margin in the register summary table of a terminal report."""
    head = text.index("Every failing vessel, then the smallest margins")
    end = text.find("Failing and review vessels in detail")  # printed only where some are
    end = end if end >= 0 else text.index("Overall verdict")
    out = {}
    for line in text[head:end].splitlines():
        cells = [c.strip() for c in line.strip().strip("│").split("│")]
        if len(cells) >= 7 and cells[0]:
            out[cells[0]] = cells[4]
    return out


def test_register_summary_margin_equals_the_vessel_detail_margin() -> None:
    # Nitrogen at 15 °C filled to pressures either side of the allowable pressure at 65 °C: the
    # margin is (allowable − highest)/(allowable − atmosphere), the pressure at 65 °C from
    # CoolProp 8.0.0 (Span et al. 2000) at the fill's density.
    CP = pytest.importorskip("CoolProp.CoolProp")
    fills = [150, 180, 210, 240, 270, 300, 330]
    rows = [_nitrogen_row(i, b) for i, b in enumerate(fills)]
    a = assess_scenario(
        register_from_text("\n".join([REGISTER_HEADER, *rows]), "r.csv"), is_register=True
    )
    text = _terminal(a, width=220)
    summary = _summary_rows(text)
    detail = {
        v.id: re.search(
            r"\(([+-]\d+\.\d) % of the gauge limit\)",
            next(finding_message(f) for f in v.findings if f.code == "margin-allowable"),
        ).group(1)
        for v in a.vessels
    }
    assert set(summary) == {v.id for v in a.vessels}
    for i, b in enumerate(fills):
        vid = f"N2-{i:02d}"
        assert summary[vid] == detail[vid] + " %", vid
        rho = CP.PropsSI("D", "T", 288.15, "P", b * BAR + ATM, "nitrogen")
        P_top = CP.PropsSI("P", "T", 338.15, "D", rho, "nitrogen")
        L = 300 * BAR + ATM
        assert float(summary[vid].rstrip(" %")) == pytest.approx(
            100.0 * (L - P_top) / (L - ATM), abs=0.06
        ), vid
    # JSON: the printed margin as limits.margin_to_allowable_gauge; the older key keeps its
    # absolute basis (allowable − highest)/allowable
    from fillcheck.report.json_report import vessel_dict

    for v in a.vessels:
        lim = vessel_dict(v, ATM)["limits"]
        assert f"{100.0 * lim['margin_to_allowable_gauge']:+.1f} %" == summary[v.id], v.id
        L, P_top = v.allowable_pressure_Pa, float(max(v.path_P_Pa))
        assert lim["margin_to_allowable"] == pytest.approx((L - P_top) / L, rel=1e-12)
    html = render_html(a)
    for vid, m in summary.items():
        row = re.search(rf"<tr><td>{vid}</td>(.*?)</tr>", html)
        assert row is not None and f'<td class="num">{m}</td>' in row.group(1), vid


def test_register_summary_lists_every_failing_vessel_whatever_limit_it_fails() -> None:
    # Twelve nitrogen vessels near their allowable pressure hold the twelve smallest pressure
    # margins; two CO2 vessels far below their allowable pressure fail only the filling ratio
    # (0.60 kg/L against 0.50 kg/L, both entered here).
    rows = [_nitrogen_row(i, 200 + 5 * i) for i in range(12)]
    rows += [
        f"CO2-F{i},carbon dioxide,13.4 L,,8.04 kg,,,,20 degC,-10 degC,250 barg,,0.50 kg/L"
        for i in (1, 2)
    ]
    a = assess_scenario(
        register_from_text("\n".join([REGISTER_HEADER, *rows]), "r.csv"), is_register=True
    )
    failing = {v.id for v in a.vessels if v.verdict == "fail"}
    assert {"CO2-F1", "CO2-F2"} <= failing
    for vid in ("CO2-F1", "CO2-F2"):
        v = next(x for x in a.vessels if x.id == vid)
        assert {f.code for f in v.findings if f.severity == "fail"} == {"filling-ratio-exceeded"}
    listed = {v.id for v in register_summary(a.vessels)["worst"]}
    assert failing <= listed
    text = _terminal(a, width=220)
    summary = _summary_rows(text)
    assert failing <= set(summary)
    assert "filling-ratio-exceeded" in text[: text.index("Failing and review vessels in detail")]
    html = render_html(a)
    for vid in failing:
        assert f"<td>{vid}</td>" in html


# --- Z, unit spellings, trailing spaces ---------------------------------------------------------


def test_no_compressibility_factor_for_a_two_phase_fill_state() -> None:
    # 4 kg of CO2 in 13.4 L (298.5 kg/m³) at 20 °C lies between the saturated vapour (194 kg/m³)
    # and liquid (773 kg/m³) densities there (CoolProp 8.0.0): two-phase.
    a = _scenario(
        [
            {
                "id": "CO2-2PH",
                "gas": "CO2",
                "water_capacity": "13.4 L",
                "fill": {"mass": "4 kg", "temperature": "20 degC"},
                "storage": {"max_temperature": "25 degC", "min_temperature": "-10 degC"},
                "limits": {"allowable_pressure": "250 barg"},
            }
        ]
    )
    assert a.vessels[0].fill_phase == "two-phase"
    text = _terminal(a, width=140)
    z_rows = [ln for ln in text.splitlines() if re.match(r"\s*Z at ", ln)]
    assert z_rows and all("— (two-phase)" in ln for ln in z_rows), z_rows
    assert not re.search(r"Z at fill.*\d\.\d{4}", render_html(a))


SPELLINGS = [("barg", "bar(g)"), ("kg/m³", "kg/m3"), ("°C", "degC"), ("°F", "degF"), ("m³", "m3")]
"""Pairs of spellings of one unit that may not meet in one report block."""


def _blocks(text: str) -> list[str]:
    """A terminal report cut at its horizontal rules (one block a vessel, the header...)."""
    return re.split(r"(?m)^─{10,}.*$", text)


def test_demo_reports_spell_each_unit_one_way_per_block_and_end_no_line_in_a_space(
    demo_reports,
) -> None:
    for name, (_, text) in demo_reports.items():
        ends = [ln for ln in text.splitlines() if ln != ln.rstrip()]
        assert ends == [], f"{name}: {ends[:3]}"
        for block in _blocks(text):
            for one, other in SPELLINGS:
                pattern = rf"(?<![\w/]){re.escape(other)}(?!\w)"
                assert not (one in block and re.search(pattern, block)), (name, one, other)
            # percentages: "46.3 %" throughout, as the entered limits are written ("5 %")
            assert not (re.search(r"\d %", block) and re.search(r"\d%", block)), name


def test_stop_table_and_reading_end_no_line_in_a_space() -> None:
    demo = str(REPO / "scenarios" / "welding_supply_refill.toml")
    for args in (
        ["stop-table", demo, "--width", "90"],
        [
            "reading",
            demo,
            "--vessel",
            "AR-50-014",
            "--pressure",
            "215 barg",
            "--temperature",
            "35 degC",
            "--width",
            "90",
        ],
    ):
        res = CliRunner().invoke(app, args)
        assert res.exit_code in (0, 1), res.output
        assert [ln for ln in res.stdout.splitlines() if ln != ln.rstrip()] == [], args[0]


# --- chart legends ------------------------------------------------------------------------------


def _overlaps(a, b) -> bool:
    return a.x0 < b.x1 and b.x0 < a.x1 and a.y0 < b.y1 and b.y0 < a.y1


def test_chart_legends_lie_outside_the_axes_and_their_limit_lines(demo_reports) -> None:
    from fillcheck.report.chart import margin_figure, vessel_figure

    a = demo_reports["propane_forklift_store"][0]
    for v in a.vessels:
        fig = vessel_figure(v, "metric", ATM, v.allowable_pressure_Pa, v.relief_set_pressure_Pa)
        fig.canvas.draw()
        ax = fig.axes[0]
        legend = ax.get_legend().get_window_extent()
        assert not _overlaps(legend, ax.get_window_extent()), v.id
        for line in ax.get_lines():
            if line.get_label() in ("allowable pressure", "relief set pressure"):
                assert not _overlaps(legend, line.get_window_extent()), (v.id, line.get_label())
        # the whole legend is on the page
        page = fig.bbox
        assert page.x0 <= legend.x0 and legend.x1 <= page.x1 + 0.5, v.id
    fig = margin_figure(a.vessels)
    fig.canvas.draw()
    ax = fig.axes[0]
    assert not _overlaps(ax.get_legend().get_window_extent(), ax.get_window_extent())


def test_check_does_not_import_matplotlib() -> None:
    import subprocess
    import sys

    code = (
        "import sys, io\n"
        "from rich.console import Console\n"
        "from fillcheck.assess import assess_scenario\n"
        "from fillcheck.scenario.resolve import load_scenario\n"
        "from fillcheck.report.terminal import render_terminal\n"
        f"a = assess_scenario(load_scenario({str(REPO / 'scenarios' / 'hydrogen_bank.toml')!r}))\n"
        "render_terminal(a, Console(file=io.StringIO()))\n"
        "print('matplotlib' in sys.modules)\n"
    )
    out = subprocess.run(
        [sys.executable, "-c", code],
        capture_output=True,
        text=True,
        cwd=REPO,
        check=True,
        env={**__import__("os").environ, "PYTHONPATH": str(REPO)},
    )
    assert out.stdout.strip() == "False"


# --- stop-table of a vessel filled by weight ----------------------------------------------------


def test_stop_table_of_a_vessel_filled_by_weight_is_one_scale_line() -> None:
    # FLT-18KG: 18 kg of propane, marked tare 15.4 kg (both in the demo file): 33.40 kg gross.
    demo = str(REPO / "scenarios" / "propane_forklift_store.toml")
    res = CliRunner().invoke(app, ["stop-table", demo, "--vessel", "FLT-18KG", "--width", "200"])
    assert res.exit_code == 0, res.output
    out = res.stdout
    assert "stop the fill at a scale reading of 33.40 kg (marked tare 15.40 kg + 18.00 kg)" in out
    assert "gas temperature" not in out and "weigh the fill" not in out
    # the largest charge's reading is rounded down like the charge: 15.4 kg + its 18.06 kg
    assert "never above 33.46 kg" in out
    # a vessel filled by pressure keeps its table
    weld = str(REPO / "scenarios" / "welding_supply_refill.toml")
    res = CliRunner().invoke(app, ["stop-table", weld, "--vessel", "AR-50-014", "--width", "200"])
    assert "gas temperature" in res.stdout and "scale reading" not in res.stdout


def test_stop_table_by_weight_without_a_tare_says_to_weigh_the_empty_vessel(tmp_path) -> None:
    p = tmp_path / "c3.toml"
    p.write_text(
        '[[vessel]]\nid = "C3"\ngas = "propane"\nwater_capacity = "43 L"\n'
        'fill = { mass = "18 kg" }\n'
        'storage = { max_temperature = "50 degC", min_temperature = "-15 degC" }\n'
        'limits = { allowable_pressure = "30 barg", max_filling_ratio = "0.42 kg/L" }\n',
        encoding="utf-8",
    )
    res = CliRunner().invoke(app, ["stop-table", str(p), "--width", "200"])
    assert res.exit_code == 0, res.output
    assert "when the scale shows 18.00 kg of gas added" in res.stdout
    assert "weigh the empty vessel first" in res.stdout
    assert "gas temperature" not in res.stdout


# --- sources as publications (the function itself: tests/test_citation.py) ---------------------

BANNED = ("CoolProp", "chemicals", "from memory")


def test_demo_reports_print_no_software_or_recall_as_a_source(demo_reports) -> None:
    for name, (a, text) in demo_reports.items():
        for word in BANNED:
            assert word not in text, (name, word)
        assert not np.any([b in render_html(a) for b in BANNED]), name


def test_the_scale_reading_of_the_largest_charge_is_rounded_down_in_us_units() -> None:
    # FLT-18KG: marked tare 15.4 kg (demo file) + the printed plan 18.06 kg = 33.46 kg
    # = 73.7666 lb (1 lb = 0.45359237 kg, exact by definition): printed 73.76 lb, never 73.77.
    demo = str(REPO / "scenarios" / "propane_forklift_store.toml")
    res = CliRunner().invoke(app, ["check", demo, "--units", "us", "--width", "250"])
    assert "up to 39.81 lb per vessel" in res.stdout
    assert 33.46 / 0.45359237 == pytest.approx(73.7666, abs=1e-4)
    assert "scale reading of 73.76 lb" in res.stdout
    assert "73.77 lb" not in res.stdout


def test_margin_below_model_error_is_said_in_pressure_not_a_third_share() -> None:
    # Hydrogen at 700 barg settled, stored up to 85 °C against 875 barg: the demo's roof bank,
    # whose margin is smaller than the model's uncertainty (README, hydrogen_bank.toml).
    a = assess_scenario(load_scenario(REPO / "scenarios" / "hydrogen_bank.toml"))
    said = [
        finding_message(f)
        for v in a.vessels
        for f in v.findings
        if f.code == "margin-below-model-error"
    ]
    assert said, "the demo's review case"
    for m in said:
        assert re.search(r"lies \d+\.\d bar below the ", m), m
        assert re.search(r"\d+\.\d bar at the limit", m), m


# --- findings as data: assess/ writes no words, report/ words every code ----------------------


def test_assess_writes_no_words_or_units() -> None:
    """The assessment yields findings as data: no module of fillcheck/assess imports the unit
    formatting (fillcheck.units) or takes a unit system."""
    root = REPO / "fillcheck" / "assess"
    for path in root.glob("*.py"):
        text = path.read_text(encoding="utf-8")
        assert "from fillcheck import units" not in text, path.name
        assert "UnitSystem" not in text, path.name


def test_every_finding_of_the_demos_is_worded(demo_reports) -> None:
    """Each finding given as data has a sentence in both unit systems (not its bare code)."""
    from fillcheck.report.fill_words import FILL_WORDS
    from fillcheck.report.finding_words import WORDS

    seen = set()
    for a, _ in demo_reports.values():
        for v in a.vessels:
            for f in v.findings:
                for system in ("metric", "us"):
                    said = finding_message(f, system, v.atmospheric_pressure_Pa)
                    assert said and said != f.code, (f.code, v.id)
                if not f.message:
                    seen.add(f.code)
    assert seen <= set(WORDS) | set(FILL_WORDS) | {
        "working-pressure-exceeded",
        "margin-working",
        "gross-mass",
    }
    assert {"charge", "margin-allowable", "liquid-present", "fill-process"} <= seen
