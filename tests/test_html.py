"""The printable HTML report: well-formed, a chart per vessel, hostile text escaped, safe writes."""

from __future__ import annotations

from html.parser import HTMLParser
from pathlib import Path

import pytest
from typer.testing import CliRunner

from fillcheck.cli import app

ROOT = Path(__file__).resolve().parents[1]

HOSTILE = """
title = "<script>alert('t')</script> & Sons"

[[vessel]]
id = "<img src=x onerror=alert(1)>"
gas = "argon"
water_capacity = "50 L"
fill = { pressure = "200 barg", temperature = "15 degC" }
storage = { max_temperature = "65 degC", min_temperature = "-20 degC" }
limits = { allowable_pressure = "300 barg", relief_set_pressure = "330 barg" }

[[vessel]]
id = "CO2-</td>"
gas = "carbon dioxide"
water_capacity = "13.4 L"
fill = { mass = "10 kg" }
storage = { max_temperature = "60 degC", min_temperature = "-10 degC" }
limits = { allowable_pressure = "250 barg" }
"""


class _Collect(HTMLParser):
    def __init__(self) -> None:
        super().__init__()
        self.tags: list[str] = []
        self.stack: list[str] = []
        self.scripts = 0
        self.text: list[str] = []

    def handle_starttag(self, tag: str, attrs: list) -> None:
        self.tags.append(tag)
        if tag == "script":
            self.scripts += 1
        if tag in ("section", "table", "svg"):
            self.stack.append(tag)

    def handle_endtag(self, tag: str) -> None:
        if tag in ("section", "table", "svg"):
            assert self.stack and self.stack[-1] == tag, f"unbalanced </{tag}>"
            self.stack.pop()

    def handle_data(self, data: str) -> None:
        self.text.append(data)


def _run(tmp_path: Path, body: str, *args: str) -> tuple[int, Path]:
    scen = tmp_path / "store.toml"
    scen.write_text(body, encoding="utf-8")
    out = tmp_path / "report.html"
    res = CliRunner().invoke(app, ["check", str(scen), "--html", str(out), *args])
    return res.exit_code, out


def test_html_parses_has_a_chart_per_vessel_and_escapes_user_text(tmp_path: Path) -> None:
    code, out = _run(tmp_path, HOSTILE)
    assert code in (0, 1)
    text = out.read_text(encoding="utf-8")
    p = _Collect()
    p.feed(text)
    p.close()
    assert not p.stack  # every section, table and svg closed
    assert p.scripts == 0  # the hostile <script> is text, not a tag
    assert "img" not in p.tags
    assert p.tags.count("svg") == 2  # one chart per vessel
    joined = "".join(p.text)
    assert "<script>alert('t')</script> & Sons" in joined  # shown as text, escaped in the file
    assert "Sign-off" in joined and "SAFETY.md" in joined
    assert "Span, Wagner (1996)" in joined  # the model's publication for carbon dioxide


def test_html_is_not_overwritten_without_force(tmp_path: Path) -> None:
    body = (ROOT / "scenarios" / "welding_supply_refill.toml").read_text(encoding="utf-8")
    _run(tmp_path, body)
    out = tmp_path / "report.html"
    out.write_text("keep me", encoding="utf-8")
    code, _ = _run(tmp_path, body)
    assert code == 2
    assert out.read_text(encoding="utf-8") == "keep me"
    code, _ = _run(tmp_path, body, "--force")
    assert code == 1 and out.read_text(encoding="utf-8").startswith("<!DOCTYPE html>")
    assert not list(tmp_path.glob(".fillcheck-*"))  # no temporary file left behind


def test_html_into_a_missing_folder_is_refused(tmp_path: Path) -> None:
    scen = tmp_path / "s.toml"
    scen.write_text(HOSTILE, encoding="utf-8")
    res = CliRunner().invoke(app, ["check", str(scen), "--html", str(tmp_path / "no" / "r.html")])
    assert res.exit_code == 2
    assert "does not exist" in res.output


@pytest.mark.parametrize("units", ["metric", "us"])
def test_html_in_both_unit_systems(tmp_path: Path, units: str) -> None:
    body = (ROOT / "scenarios" / "propane_forklift_store.toml").read_text(encoding="utf-8")
    _, out = _run(tmp_path, body, "--units", units)
    text = out.read_text(encoding="utf-8")
    assert ("psig" in text) == (units == "us")  # results in the chosen units
    assert ("°F" in text) == (units == "us")  # (inputs stay in the user's own units)
