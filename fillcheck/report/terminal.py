"""The terminal report, laid out to be printed for a work-permit file (rich)."""

from __future__ import annotations

import datetime as _dt

from rich.console import Console, Group
from rich.panel import Panel
from rich.rule import Rule
from rich.table import Table
from rich.text import Text

from fillcheck import __version__, units
from fillcheck.assess.result import ScenarioAssessment, VesselAssessment

_VERDICT_STYLE = {"pass": "bold green", "fail": "bold red", "review": "bold yellow"}
_VERDICT_WORD = {"pass": "PASS", "fail": "FAIL", "review": "REVIEW"}
_SEVERITY_STYLE = {"fail": "red", "review": "yellow", "warning": "magenta", "info": "dim"}
_ENTERED_LABELS = {
    "water_capacity": "water capacity",
    "fill.pressure": "fill pressure",
    "fill.mass": "fill mass",
    "fill.filling_ratio": "filling ratio",
    "fill.settled_pressure": "settled pressure",
    "fill.temperature": "gas temperature at fill",
    "storage.min_temperature": "lowest storage temperature",
    "storage.max_temperature": "highest storage temperature",
    "limits.allowable_pressure": "allowable pressure",
    "limits.relief_set_pressure": "relief set pressure",
    "limits.max_filling_ratio": "maximum filling ratio",
    "limits.min_vapour_space": "minimum vapour space",
    "limits.vapour_space_temperature": "vapour space at",
}
CLOSING_CAUTION = (
    "fillcheck computes what the gas does; it does not inspect the vessel. Its verdict covers "
    "only the limits listed above, within its models' stated accuracy. The cylinder's markings, "
    "local codes and a licensed inspector decide; read SAFETY.md before acting on this report."
)


def _publication(source: str) -> str:
    """The publication part of a catalog source note (the rest stays in the catalog)."""
    return source.split(" [CoolProp key")[0].split(" (figures")[0]


def _verdict_text(verdict: str) -> Text:
    return Text(_VERDICT_WORD[verdict], style=_VERDICT_STYLE[verdict])


def _vessel_block(v: VesselAssessment, system: units.UnitSystem, atm: float) -> Group:
    def p(x: float | None, gauge: bool = True) -> str:
        if x is None:
            return "—"
        return units.format_pressure(x, system, gauge=gauge, atmospheric_pressure_Pa=atm)

    def t(x: float | None) -> str:
        return "—" if x is None else units.format_temperature(x, system)

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
    for key, label in _ENTERED_LABELS.items():
        if key in v.entered:
            entered.add_row(label, v.entered[key])
    entered.add_row("model", f"{v.model_name} ({v.model}); {'; '.join(v.model_references)}")
    entered.add_row("model range", v.model_validity)
    entered.add_row("gas data", _publication(v.data_sources.get("critical", "—")))

    res = Table(title="Results", title_justify="left", show_edge=False, expand=False)
    res.add_column("quantity")
    res.add_column("value", justify="right")
    res.add_row("charge per vessel", units.format_mass(v.charged_mass_kg, system))
    if v.count > 1:
        res.add_row(
            f"charge, {v.count} vessels", units.format_mass(v.charged_mass_kg * v.count, system)
        )
    res.add_row(
        "density (filling ratio)",
        f"{units.format_density(v.density_kg_m3, system)} "
        f"({units.format_filling_ratio(v.density_kg_m3, system)})",
    )
    if v.fill_pressure_Pa is not None:
        res.add_row(f"pressure at fill, {t(v.fill_temperature_K)}", p(v.fill_pressure_Pa))
        res.add_row("Z at fill", f"{v.fill_Z:.4f}")
    res.add_row(f"settled pressure at {t(v.reference_temperature_K)}", p(v.settled_pressure_Pa))
    for label, e in (("lowest", v.min_state), ("highest", v.max_state)):
        res.add_row(
            f"at {label} temperature {t(e.temperature_K)}", f"{p(e.pressure_Pa)}  {e.phase}"
        )
    res.add_row(f"Z at {t(v.max_state.temperature_K)}", f"{v.max_state.Z:.4f}")
    res.add_row(
        "pressure rise at highest temperature",
        units.pressure_rate_per_K(v.dP_dT_at_max_Pa_K, system),
    )
    lo, hi = v.min_state.temperature_K, v.max_state.temperature_K

    def where(x: float | None) -> str:
        if x is None:
            return "—"
        if x < lo:
            return f"{t(x)} (below the storage range)"
        if x > hi:
            return f"{t(x)} (above the storage range)"
        return t(x)

    res.add_row("liquid present below", where(v.liquid_forms_below_K))
    res.add_row("liquid-full above", where(v.liquid_full_above_K))
    res.add_row("allowable pressure reached at", t(v.allowable_reached_at_K))
    res.add_row("relief set pressure reached at", t(v.relief_reached_at_K))
    if v.max_safe_charge_kg is not None:
        stop = (
            f"; stop the fill at {p(v.max_safe_fill_pressure_Pa)} with the gas at "
            f"{t(v.fill_temperature_K)}"
            if v.max_safe_fill_pressure_Pa is not None
            else ""
        )
        res.add_row(
            "largest safe charge",
            f"{units.format_mass(v.max_safe_charge_kg, system)} "
            f"({v.governing_limit} governs){stop}",
        )

    findings = Table(title="Findings", title_justify="left", show_edge=False, show_header=False)
    findings.add_column(no_wrap=True)
    findings.add_column(no_wrap=True, style="dim")
    findings.add_column(ratio=1)
    order = {"fail": 0, "review": 1, "warning": 2, "info": 3}
    for f in sorted(v.findings, key=lambda f: order[f.severity]):
        findings.add_row(
            Text(f.severity.upper(), style=_SEVERITY_STYLE[f.severity]), f.code, f.message
        )

    parts: list = [head, entered, res, Text(_fill_plan(v, p, t, system), style="bold"), findings]
    checked = "; ".join(v.limits_checked)
    word = {"pass": "passes", "fail": "fails", "review": "needs review against"}[v.verdict]
    parts.append(
        Text(
            f"Verdict: {v.id} {word} the limits checked: {checked}.",
            style=_VERDICT_STYLE[v.verdict],
        )
    )
    if v.cautions:
        parts.append(Text("Cautions for this gas:", style="bold"))
        parts.extend(Text(f"  • {c}") for c in v.cautions)
    return Group(*parts)


def _fill_plan(v: VesselAssessment, p, t, system: units.UnitSystem) -> str:
    """The fill plan as plain sentences with units."""
    out = []
    if v.entered.get("fill.settled_pressure") and v.fill_pressure_Pa is not None:
        out.append(
            f"To settle at {p(v.settled_pressure_Pa)} at {t(v.reference_temperature_K)}, stop the "
            f"fill at {p(v.fill_pressure_Pa)} while the gas is at {t(v.fill_temperature_K)}."
        )
    if v.max_safe_charge_kg is None:
        out.append("No charge keeps every limit entered: do not fill this vessel.")
    else:
        s = f"Fill plan: up to {units.format_mass(v.max_safe_charge_kg, system)} per vessel"
        if v.max_safe_fill_pressure_Pa is not None:
            s += (
                f"; stop the fill at {p(v.max_safe_fill_pressure_Pa)} while the gas is at "
                f"{t(v.fill_temperature_K)}"
            )
        out.append(s + f" ({v.governing_limit} governs).")
    return " ".join(out)


def render_terminal(
    a: ScenarioAssessment,
    console: Console,
    system: units.UnitSystem = "metric",
    today: _dt.date | None = None,
) -> None:
    """Print the report of a whole scenario."""
    today = today or _dt.date.today()
    console.print(Rule(Text("fillcheck — cylinder fill and storage check", style="bold")))
    meta = Table.grid(padding=(0, 2))
    meta.add_column(style="dim")
    meta.add_column()
    meta.add_row("scenario", a.title or "(untitled)")
    meta.add_row("file", a.source)
    meta.add_row("date", today.isoformat())
    meta.add_row("tool", f"fillcheck {__version__}")
    meta.add_row(
        "units",
        "metric (barg = gauge, bara = absolute)"
        if system == "metric"
        else "US customary (psig = gauge, psia = absolute)",
    )
    meta.add_row(
        "atmospheric pressure",
        units.format_pressure(a.atmospheric_pressure_Pa, system, gauge=False, digits=3),
    )
    console.print(meta)
    for v in a.vessels:
        console.print(Rule())
        console.print(_vessel_block(v, system, a.atmospheric_pressure_Pa))
    console.print(Rule())
    counts = {k: sum(1 for v in a.vessels if v.verdict == k) for k in ("pass", "fail", "review")}
    console.print(
        Text.assemble(
            "Overall verdict: ",
            _verdict_text(a.verdict),
            f"   ({counts['pass']} pass, {counts['fail']} fail, {counts['review']} need review)",
        )
    )
    sign = Table(show_header=False, box=None, padding=(0, 1))
    sign.add_column()
    sign.add_column()
    for label in ("Prepared by", "Checked by", "Permit number", "Date"):
        sign.add_row(f"{label}:", "_" * 34)
    console.print(Panel(sign, title="Sign-off", title_align="left", expand=False))
    console.print(Text(CLOSING_CAUTION, style="italic"))
