"""The terminal report, laid out to be printed for a work-permit file (rich)."""

from __future__ import annotations

import datetime as _dt
import re
from collections.abc import Iterator
from contextlib import contextmanager

from rich.console import Console, Group
from rich.panel import Panel
from rich.rule import Rule
from rich.table import Table
from rich.text import Text

from fillcheck import __version__, units
from fillcheck.assess.result import ScenarioAssessment, VesselAssessment
from fillcheck.report.blend_section import blend_rows, blend_table_rows
from fillcheck.report.caution_text import caution_reason, caution_text
from fillcheck.report.content import (
    CLOSING_CAUTION,
    DETAIL_LIMIT,
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
from fillcheck.report.fill_section import filling_curve_rows, filling_rows
from fillcheck.report.permit_record import Record, record_rows, sign_off_rows
from fillcheck.report.wording import finding_message

_VERDICT_STYLE = {"pass": "bold green", "fail": "bold red", "review": "bold yellow"}
_SEVERITY_STYLE = {"fail": "red", "review": "yellow", "warning": "magenta", "info": "dim"}

__all__ = ["CLOSING_CAUTION", "render_terminal"]


_LINE_END = re.compile(r"(?:[ \t]|\x1b\[[0-9;]*m)+$", re.MULTILINE)
_STYLE_CODE = re.compile(r"\x1b\[[0-9;]*m")


def without_trailing_spaces(text: str) -> str:
    """``text`` with the spaces at the end of each line removed (rich pads table cells and
    wrapped lines to their width); the style codes there are kept."""
    return _LINE_END.sub(lambda m: "".join(_STYLE_CODE.findall(m.group(0))), text)


@contextmanager
def trimmed(console: Console) -> Iterator[None]:
    """Print through ``console`` with no line ending in a space: what is printed inside is
    captured, trimmed line by line and written out at the end."""
    with console.capture() as captured:
        yield
    console.file.write(without_trailing_spaces(captured.get()))
    console.file.flush()


def _verdict_text(verdict: str) -> Text:
    return Text(VERDICT_WORD[verdict], style=_VERDICT_STYLE[verdict])


def _vessel_block(v: VesselAssessment, fmt: Formatter) -> Group:
    head = Text.assemble(
        (f"Vessel {v.id}", "bold"),
        f"  {v.gas}",
        f"  ×{v.count}" if v.count > 1 else "",
        "   verdict: ",
        _verdict_text(v.verdict),
    )
    entered = Table.grid(padding=(0, 2))
    entered.add_column(style="dim")
    entered.add_column()
    for row in entered_rows(v, fmt.system):
        entered.add_row(*row)
    res = Table(title="Results", title_justify="left", show_edge=False, expand=False)
    res.add_column("quantity")
    res.add_column("value", justify="right")
    for row in result_rows(v, fmt):
        res.add_row(*row)
    findings = Table(title="Findings", title_justify="left", show_edge=False, show_header=False)
    findings.add_column(no_wrap=True)
    findings.add_column(no_wrap=True, style="dim")
    findings.add_column(ratio=1)
    for f in sorted_findings(v):
        findings.add_row(
            Text(f.severity.upper(), style=_SEVERITY_STYLE[f.severity]),
            f.code,
            finding_message(f, fmt.system, fmt.atm),
        )
    parts: list = [head, entered, res]
    if v.filling is not None:  # the fill process (report.fill_section)
        parts.append(_filling_table(v, fmt))
    if v.blend is not None:  # the blend recipe (report.blend_section)
        parts += _blend_tables(v, fmt)
    parts += [Text(fill_plan(v, fmt), style="bold"), findings]
    parts.append(Text(verdict_sentence(v, fmt), style=_VERDICT_STYLE[v.verdict]))
    if v.cautions:
        parts.append(Text("Cautions for this gas:", style="bold"))
        for c in v.cautions:
            parts.append(Text(f"  • {caution_text(c)}"))
            parts.append(Text(f"    Why: {caution_reason(c)}.", style="dim"))
    return Group(*parts)


def _blend_tables(v: VesselAssessment, fmt: Formatter) -> list[Table]:
    t = Table(title="Blend recipe", title_justify="left", show_edge=False, expand=False)
    t.add_column("quantity")
    t.add_column("value")
    for row in blend_rows(v, fmt):
        t.add_row(*row)
    head, rows = blend_table_rows(v, fmt)
    if not rows:
        return [t]
    s = Table(
        title="Blend stop pressures by gas temperature",
        title_justify="left",
        show_edge=False,
        expand=False,
    )
    for h in head:
        s.add_column(h, justify="right")
    for r in rows:
        s.add_row(*r)
    return [t, s]


def _print_register_blends(
    console: Console, vessels: list[VesselAssessment], shown: list[VesselAssessment], fmt: Formatter
) -> None:
    from rich import box

    from fillcheck.report.register_blends import BLEND_COLUMNS, BLEND_TITLE, register_blend_rows

    rows, more = register_blend_rows(vessels, shown, fmt)
    if not rows:
        return
    # to fit 80 columns: the verdict and the blend temperature (one a vessel) join the vessel's
    # cell, the ideal-gas stop goes under the stop, the headers are short and long words wrap
    # instead of being cut
    names = ("vessel", "verdict", "read at", "stop at", "ideal-gas stop")
    vessel, verdict, read_at, stop, ideal = (BLEND_COLUMNS.index(c) for c in names)
    keep = [i for i in range(len(BLEND_COLUMNS)) if i not in (vessel, verdict, read_at, ideal)]
    short = {"contents after": "total", "stop at": "stop at\n(ideal gas)", "scale reads": "scale"}
    t = Table(title=BLEND_TITLE, title_justify="left", box=box.SIMPLE_HEAD, padding=(0, 1))
    t.add_column("vessel", overflow="fold", min_width=10)
    for i in keep:
        name = BLEND_COLUMNS[i]
        right = name in ("add", "contents after")
        words = name in ("step", "add", "stop at")  # may hold words ("weigh it (…)")
        t.add_column(
            short.get(name, name),
            justify="right" if right else "left",
            overflow="fold",
            no_wrap=not words,  # figures stay on one line
            min_width=11 if words else None,
        )
    for r in rows:
        at = f"at {r[read_at]}" if r[read_at] else ""
        first = "\n".join(c for c in (r[vessel], r[verdict], at) if c)
        cells = list(r)
        if r[ideal]:
            cells[stop] = f"{r[stop]}\n({r[ideal]})"
        t.add_row(first if r[vessel] else "", *(cells[i] for i in keep))
    console.print(t)
    if more:
        console.print(f"{more} more blend recipes in --json.")


def _filling_table(v: VesselAssessment, fmt: Formatter) -> Table:
    t = Table(title="Fill process", title_justify="left", show_edge=False, expand=False)
    t.add_column("quantity")
    t.add_column("value", justify="right")
    for row in filling_rows(v, fmt):
        t.add_row(*row)
    curve = filling_curve_rows(v, fmt)
    if curve:
        t.add_row("curve (time, gas, pressure)", "; ".join(" ".join(c) for c in curve))
    return t


def render_terminal(
    a: ScenarioAssessment,
    console: Console,
    system: units.UnitSystem = "metric",
    today: _dt.date | None = None,
    record: Record | None = None,
) -> None:
    """Print the report of a whole scenario (with the permit-file record where given); no
    printed line ends in a space."""
    with trimmed(console):
        _render(a, console, system, today or _dt.date.today(), record)


def _render(
    a: ScenarioAssessment,
    console: Console,
    system: units.UnitSystem,
    today: _dt.date,
    record: Record | None,
) -> None:
    fmt = Formatter(system, a.atmospheric_pressure_Pa)
    console.print(Rule(Text("fillcheck — cylinder fill and storage check", style="bold")))
    print_header(console, header_rows(a, system, today, record))
    shown = a.vessels
    if a.is_register:
        summary = register_summary(a.vessels)
        console.print(Rule(Text("Register summary", style="bold")))
        c = summary["counts"]
        console.print(
            f"{summary['total']} vessels: {c['pass']} pass, {c['fail']} fail, "
            f"{c['review']} need review."
        )
        worst = Table(title=SUMMARY_TITLE, title_justify="left")
        for col in SUMMARY_COLUMNS:
            worst.add_column(col, justify="right" if col in ("margin",) else "left")
        for v in summary["worst"]:
            worst.add_row(
                v.id,
                v.gas,
                fmt.p(float(max(v.path_P_Pa))),
                fmt.p(v.allowable_pressure_Pa),
                margin_text(v.margin_to_allowable),
                _verdict_text(v.verdict),
                failed_codes(v),
            )
        console.print(worst)
        shown = summary["flagged"][:DETAIL_LIMIT]
        _print_register_blends(console, a.vessels, shown, fmt)
        rest = len(summary["flagged"]) - len(shown)
        if shown:
            console.print(
                "Failing and review vessels in detail, worst first"
                + (f" (the first {len(shown)}; {rest} more in --json or --html)." if rest else ".")
            )
    for v in shown:
        console.print(Rule())
        console.print(_vessel_block(v, fmt))
    if a.areas:
        from fillcheck.report.area_section import area_terminal

        console.print(Rule(Text("Storage areas", style="bold")))
        for i, area in enumerate(a.areas):
            if i:
                console.print(Rule())
            console.print(area_terminal(area, fmt))
    console.print(Rule())
    console.print(Text.assemble("Overall verdict: ", _verdict_text(a.verdict), f"   ({tally(a)})"))
    print_sign_off(console, record)
    console.print(Text(CLOSING_CAUTION, style="italic"))


def print_header(console: Console, rows: list[tuple[str, str]]) -> None:
    """The title block: label and value rows."""
    meta = Table.grid(padding=(0, 2))
    meta.add_column(style="dim")
    meta.add_column()
    for row in rows:
        meta.add_row(*row)
    console.print(meta)


def print_sign_off(console: Console, record: Record | None) -> None:
    """The sign-off block, with the prepared-by and permit number the scenario gives."""
    sign = Table(show_header=False, box=None, padding=(0, 1))
    sign.add_column()
    sign.add_column()
    for label, given in sign_off_rows(record):
        sign.add_row(f"{label}:", given or "_" * 34)
    console.print(Panel(sign, title="Sign-off", title_align="left", expand=False))


def header_rows(
    a: ScenarioAssessment,
    system: units.UnitSystem,
    today: _dt.date,
    record: Record | None = None,
) -> list[tuple[str, str]]:
    """Title block rows: scenario, the record (report id, time, input and its digest, tool,
    gas data, site, permit, preparer; without a record: file and date), units, atmosphere."""
    if record is not None:
        said = record_rows(record)
    else:
        said = [
            ("file", a.source),
            ("date", today.isoformat()),
            ("tool", f"fillcheck {__version__}"),
        ]
    return [
        ("scenario", a.title or "(untitled)"),
        *said,
        (
            "units",
            "metric (barg = gauge, bara = absolute)"
            if system == "metric"
            else "US customary (psig = gauge, psia = absolute)",
        ),
        (
            "atmospheric pressure",
            units.format_pressure(a.atmospheric_pressure_Pa, system, gauge=False, digits=3),
        ),
    ]


def tally(a: ScenarioAssessment) -> str:
    """'n pass, n fail, n need review'."""
    counts = {k: sum(1 for v in a.vessels if v.verdict == k) for k in ("pass", "fail", "review")}
    said = f"{counts['pass']} pass, {counts['fail']} fail, {counts['review']} need review"
    if not a.areas:
        return said
    areas = {k: sum(1 for x in a.areas if x.verdict == k) for k in ("pass", "fail", "review")}
    return (
        f"vessels: {said}; storage areas: {areas['pass']} pass, {areas['fail']} fail, "
        f"{areas['review']} need review"
    )
