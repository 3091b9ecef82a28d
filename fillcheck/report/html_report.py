"""The printable HTML report: one self-contained file with a chart per vessel.

Everything the terminal report says, laid out for A4 and Letter paper (the page margins and
column widths fit both), with an inline SVG pressure–temperature chart per vessel. Every piece
of user text is escaped. The file is written atomically and never overwrites without ``force``.
"""

from __future__ import annotations

import datetime as _dt
import html
from pathlib import Path

from fillcheck import units
from fillcheck.assess.result import ScenarioAssessment, VesselAssessment
from fillcheck.errors import InputError
from fillcheck.report.blend_section import blend_rows, blend_table_rows
from fillcheck.report.caution_text import caution_reason, caution_text
from fillcheck.report.chart import margin_chart_svg, vessel_chart_svg
from fillcheck.report.content import (
    CLOSING_CAUTION,
    SUMMARY_COLUMNS,
    SUMMARY_TITLE,
    VERDICT_WORD,
    Formatter,
    entered_rows,
    failed_codes,
    fill_plan,
    margin_text,
    register_summary,
    result_rows,
    sorted_findings,
    verdict_sentence,
)
from fillcheck.report.fill_section import filling_chart_svg, filling_rows
from fillcheck.report.output_file import destination_problem, replacing
from fillcheck.report.permit_record import Record, sign_off_rows
from fillcheck.report.terminal import header_rows, tally
from fillcheck.report.wording import finding_message

_CSS = """
body { font-family: "DejaVu Sans", Arial, sans-serif; font-size: 10pt; color: #111;
       max-width: 180mm; margin: 0 auto; }
h1 { font-size: 15pt; border-bottom: 2px solid #333; padding-bottom: 2mm; }
h2 { font-size: 12pt; margin-top: 6mm; border-bottom: 1px solid #999; }
table { border-collapse: collapse; width: 100%; margin: 2mm 0; }
td, th { border: 1px solid #bbb; padding: 1mm 2mm; text-align: left; vertical-align: top; }
th { background: #eee; }
td.num { text-align: right; white-space: nowrap; }
.verdict { font-weight: bold; padding: 0.5mm 2mm; border: 1.5px solid currentColor; }
.pass { color: #0b6b2e; } .fail { color: #a3160f; } .review { color: #8a5a00; }
.sev-fail { color: #a3160f; font-weight: bold; } .sev-review { color: #8a5a00; font-weight: bold; }
.sev-warning { color: #6b2c91; } .sev-info { color: #555; }
.plan { font-weight: bold; margin: 2mm 0; }
.chart svg { width: 100%; height: auto; }
.signoff td { height: 9mm; } .signoff td:first-child { width: 35mm; }
.caution { font-style: italic; margin-top: 4mm; }
section.vessel { break-inside: avoid-page; page-break-inside: avoid; }
@page { margin: 15mm; }
@media print { section.vessel { break-before: auto; } a { color: inherit; } }
"""


def _e(text: object) -> str:
    return html.escape(str(text), quote=True)


def _table(rows: list[tuple[str, str]], numeric: bool = False) -> str:
    cls = ' class="num"' if numeric else ""
    body = "".join(f"<tr><th>{_e(a)}</th><td{cls}>{_e(b)}</td></tr>" for a, b in rows)
    return f"<table>{body}</table>"


def _grid(head: list[str], rows: list[list[str]]) -> str:
    """A table with a header row (empty without rows)."""
    if not rows:
        return ""
    top = "".join(f"<th>{_e(h)}</th>" for h in head)
    body = "".join(
        "<tr>" + "".join(f'<td class="num">{_e(c)}</td>' for c in r) + "</tr>" for r in rows
    )
    return f"<table><tr>{top}</tr>{body}</table>"


def _vessel(v: VesselAssessment, fmt: Formatter) -> str:
    findings = "".join(
        f'<tr><td class="sev-{f.severity}">{_e(f.severity.upper())}</td><td>{_e(f.code)}</td>'
        f"<td>{_e(finding_message(f, fmt.system, fmt.atm))}</td></tr>"
        for f in sorted_findings(v)
    )
    chart = vessel_chart_svg(
        v, fmt.system, fmt.atm, v.allowable_pressure_Pa, v.relief_set_pressure_Pa
    )
    cautions = "".join(
        f'<li>{_e(caution_text(c))} <span class="why">Why: {_e(caution_reason(c))}.</span></li>'
        for c in v.cautions
    )
    count = f" ×{v.count}" if v.count > 1 else ""
    return (
        f'<section class="vessel"><h2>Vessel {_e(v.id)} — {_e(v.gas)}{_e(count)} '
        f'<span class="verdict {v.verdict}">{VERDICT_WORD[v.verdict]}</span></h2>'
        f"<h3>Inputs and model</h3>{_table(entered_rows(v, fmt.system))}"
        f"<h3>Results</h3>{_table(result_rows(v, fmt), numeric=True)}"
        + (
            f"<h3>Fill process</h3>{_table(filling_rows(v, fmt), numeric=True)}"
            f'<div class="chart">{filling_chart_svg(v, fmt.system, fmt.atm)}</div>'
            if v.filling is not None
            else ""
        )
        + (
            f"<h3>Blend recipe</h3>{_table(blend_rows(v, fmt))}"
            f"<h3>Blend stop pressures by gas temperature</h3>{_grid(*blend_table_rows(v, fmt))}"
            if v.blend is not None
            else ""
        )
        + f'<p class="plan">{_e(fill_plan(v, fmt))}</p>'
        f'<div class="chart">{chart}</div>'
        f"<h3>Findings</h3><table>{findings}</table>"
        f'<p class="verdict-line {v.verdict}"><b>{_e(verdict_sentence(v, fmt))}</b></p>'
        + (f"<h3>Cautions for this gas</h3><ul>{cautions}</ul>" if cautions else "")
        + "</section>"
    )


CHART_LIMIT = 50
"""A register's HTML report draws at most this many vessel charts (the worst first)."""


def _areas(a: ScenarioAssessment, fmt: Formatter) -> str:
    if not a.areas:
        return ""
    from fillcheck.report.area_section import area_html

    return "<h2>Storage areas</h2>" + "".join(area_html(x, fmt) for x in a.areas)


def _body(a: ScenarioAssessment, fmt: Formatter) -> str:
    return _vessels_body(a, fmt) + _areas(a, fmt)


def _vessels_body(a: ScenarioAssessment, fmt: Formatter) -> str:
    if not a.is_register:
        return "".join(_vessel(v, fmt) for v in a.vessels)
    summary = register_summary(a.vessels)
    c = summary["counts"]
    rows = "".join(
        f'<tr><td>{_e(v.id)}</td><td>{_e(v.gas)}</td><td class="num">'
        f'{_e(fmt.p(float(max(v.path_P_Pa))))}</td><td class="num">'
        f'{_e(fmt.p(v.allowable_pressure_Pa))}</td><td class="num">'
        f'{_e(margin_text(v.margin_to_allowable))}</td><td class="{v.verdict}">'
        f"{VERDICT_WORD[v.verdict]}</td><td>{_e(failed_codes(v))}</td></tr>"
        for v in summary["worst"]
    )
    flagged = summary["flagged"]
    shown = flagged[:CHART_LIMIT]
    more = len(flagged) - len(shown)
    note = (
        f"<p>{more} more failing or review vessels are listed in the JSON output.</p>"
        if more
        else ""
    )
    return (
        f"<h2>Register summary</h2><p>{summary['total']} vessels: {c['pass']} pass, "
        f"{c['fail']} fail, {c['review']} need review.</p>"
        f'<div class="chart">{margin_chart_svg(a.vessels)}</div>'
        f"<h3>{_e(SUMMARY_TITLE)}</h3><table><tr>"
        + "".join(f"<th>{_e(c)}</th>" for c in SUMMARY_COLUMNS)
        + f"</tr>{rows}</table>{_register_blends(a.vessels, shown, fmt)}"
        f"<h2>Failing and review vessels, worst first</h2>{note}"
        + "".join(_vessel(v, fmt) for v in shown)
    )


def _register_blends(vessels: list, shown: list, fmt: Formatter) -> str:
    from fillcheck.report.register_blends import BLEND_COLUMNS, BLEND_TITLE, register_blend_rows

    rows, more = register_blend_rows(vessels, shown, fmt)
    if not rows:
        return ""
    head = "".join(f"<th>{_e(c)}</th>" for c in BLEND_COLUMNS)
    body = "".join("<tr>" + "".join(f"<td>{_e(c)}</td>" for c in r) + "</tr>" for r in rows)
    tail = f"<p>{more} more blend recipes are listed in the JSON output.</p>" if more else ""
    return f"<h3>{_e(BLEND_TITLE)}</h3><table><tr>{head}</tr>{body}</table>{tail}"


def render_html(
    a: ScenarioAssessment,
    system: units.UnitSystem = "metric",
    today: _dt.date | None = None,
    record: Record | None = None,
) -> str:
    """The whole report as one HTML document (with the permit-file record where given)."""
    today = today or _dt.date.today()
    fmt = Formatter(system, a.atmospheric_pressure_Pa)
    sign = "".join(
        f"<tr><td>{_e(label)}</td><td>{_e(given)}</td></tr>"
        for label, given in sign_off_rows(record)
    )
    title = a.title or "(untitled)"
    return (
        '<!DOCTYPE html>\n<html lang="en"><head><meta charset="utf-8">'
        f"<title>fillcheck — {_e(title)}</title><style>{_CSS}</style></head><body>"
        "<h1>fillcheck — cylinder fill and storage check</h1>"
        f"{_table(header_rows(a, system, today, record))}"
        + _body(a, fmt)
        + f'<h2>Overall verdict: <span class="verdict {a.verdict}">{VERDICT_WORD[a.verdict]}</span>'
        f"</h2><p>{_e(tally(a))}</p>"
        f'<h2>Sign-off</h2><table class="signoff">{sign}</table>'
        f'<p class="caution">{_e(CLOSING_CAUTION)}</p></body></html>\n'
    )


def write_html(text: str, path: Path, force: bool) -> None:
    """Write the report atomically (report.output_file): a temporary file in the same folder,
    then a rename.

    Raises InputError if the file exists and ``force`` is not given, if it is not a regular file
    (a device, a folder, a symbolic link), or the folder is missing.
    """
    problem = destination_problem(Path(path), force)
    if problem is not None:
        raise InputError(problem)
    with replacing(Path(path), ".html") as fh:
        fh.write(text)
