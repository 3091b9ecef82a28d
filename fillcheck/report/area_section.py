"""The storage areas in the reports: JSON (INTERFACES.md §8), rows for the terminal and HTML.

The renderers lay these rows out; the assessment (assess.area) computed every number.
"""

from __future__ import annotations

import html
import math
from typing import Any

from fillcheck import units
from fillcheck.assess.area import AreaAssessment, Release
from fillcheck.assess.release import Atmosphere
from fillcheck.report.area_words import share
from fillcheck.report.content import SEVERITY_ORDER, VERDICT_WORD, Formatter
from fillcheck.report.wording import finding_message

MODEL = (
    "the whole charge of one vessel released into the area and mixed through it, the area "
    "held at the atmosphere's pressure (air leaves as gas enters); gas volume from the vessel's "
    "equation of state at the area's temperature and the atmosphere's pressure. Verdict: an "
    "instantaneous release with pure displacement, gas fraction = V_gas/V_area, the upper bound "
    "(the simple estimate of industrial-gas guidance on oxygen depletion, e.g. BCGA GN11); "
    "shown beside it: a gradual release into the mixed area with outflow, "
    "1 − exp(−V_gas/V_area). Ventilation: C(t) = C0·exp(−N t). Well mixed: heavy or cold gas "
    "collects low and may be far richer there (SAFETY.md)"
)
"""The model in one sentence, printed under every area (BCGA Guidance Note GN11's formula
recalled from memory; the report names the publication only)."""

ENTERED = {
    "volume": "free air volume",
    "air_changes": "ventilation",
    "temperature": "temperature",
    "leak.rate": "leak rate",
}


def _finite(x: float | None) -> float | None:
    return x if x is not None and math.isfinite(x) else None


def _air(a: Atmosphere) -> dict[str, Any]:
    return {
        "gas_fraction": a.gas_fraction,
        "oxygen_fraction": a.oxygen,
        "oxygen_equivalent_fraction": a.oxygen_equivalent,
        "carbon_dioxide_fraction": a.carbon_dioxide,
        "lfl_fraction": a.lfl_fraction,
        "toxic_fractions": dict(a.toxic),
    }


def release_dict(r: Release) -> dict[str, Any]:
    """One release, the contract's keys first (INTERFACES.md §8), then additions."""
    return {
        "vessel": r.vessel,
        "gas": r.gas,
        "released_volume_m3": r.volume.volume_m3,
        "oxygen_fraction": r.air.oxygen,
        "carbon_dioxide_fraction": r.air.carbon_dioxide,
        "lfl_fraction": r.air.lfl_fraction,
        "model": "instantaneous-displacement",
        "mass_kg": r.mass_kg,
        "amount_mol": r.moles,
        "Z": r.volume.Z,
        "fully_flashed": r.volume.flashed,
        "gas_fraction": r.gas_fraction,
        "oxygen_equivalent_fraction": r.air.oxygen_equivalent,
        "toxic_fractions": dict(r.air.toxic),
        "mixed_outflow": _air(r.air_mixed),
        "largest_gas_fractions": {k: _finite(x) for k, x in r.limit_fractions.items()},
        "ratio_to_limit": r.ratio,
        "oxygen_recovery_s": r.oxygen_recovery_s,
        "clear_s": r.clear_s,
    }


def area_dict(a: AreaAssessment, system: units.UnitSystem = "metric") -> dict[str, Any]:
    """One area as JSON (SI); findings worded in ``system``."""
    release = None
    if a.release is not None:
        release = release_dict(a.release) | {
            "curve": [
                {"time_s": float(t)} | _air(x) for t, x in zip(a.curve_t_s, a.curve, strict=True)
            ]
        }
    findings = []
    for f in a.findings:
        out: dict[str, Any] = {
            "code": f.code,
            "severity": f.severity,
            "message": finding_message(f, system, a.atmospheric_pressure_Pa),
        }
        if f.data is not None:
            out["data"] = {
                k: None if isinstance(x, float) and not math.isfinite(x) else x
                for k, x in f.data.items()
            }
        findings.append(out)
    lim = a.limits
    return {
        "id": a.id,
        "volume_m3": a.volume_m3,
        "inventory": [
            {
                "hazard": i.hazard,
                "mass_kg": i.mass_kg,
                "gas_volume_m3": i.gas_volume_m3,
                "count": i.count,
            }
            for i in a.inventory
        ],
        "release": release,
        "verdict": a.verdict,
        "findings": findings,
        "air_changes_per_h": a.air_changes_per_s * 3600.0,
        "temperature_K": a.temperature_K,
        "vessels": a.vessels,
        "vessel_count": a.vessel_count,
        "total_mass_kg": a.total_mass_kg,
        "releases": [release_dict(r) for r in a.releases],
        "leak": None
        if a.leak is None
        else {
            "vessel": a.leak.vessel,
            "rate_kg_s": a.leak.rate_kg_s,
            "volume_flow_m3_s": a.leak.volume_flow_m3_s,
            "steady": _air(a.leak.air),
            "breaks": a.leak.breaks,
            "reached_after_s": a.leak.reached_after_s,
        },
        "thresholds": {
            name: {"value": getattr(lim, name), "source": lim.sources[name]} for name in lim.sources
        },
    }


def area_head(a: AreaAssessment, fmt: Formatter) -> str:
    """'Area CAGE-B: 60.00 m³, 1 air change an hour, 20.0 °C, 4 vessels'."""
    N = a.air_changes_per_s * 3600.0
    changes = "no ventilation" if N == 0 else f"{N:.3g} air change{'' if N == 1 else 's'} an hour"
    vessels = f"{a.vessel_count} vessel{'' if a.vessel_count == 1 else 's'}"
    return (
        f"Area {a.id}: {units.format_room_volume(a.volume_m3, fmt.system)}, {changes}, "
        f"{fmt.t(a.temperature_K)}, {vessels}"
    )


def inventory_rows(a: AreaAssessment, fmt: Formatter) -> list[tuple[str, str, str, str]]:
    """(hazard, vessels, mass, gas volume at the area's conditions), then the total."""
    rows = [
        (
            i.hazard,
            str(i.count),
            fmt.m(i.mass_kg),
            units.format_room_volume(i.gas_volume_m3, fmt.system),
        )
        for i in a.inventory
    ]
    rows.append(("all gases", str(a.vessel_count), fmt.m(a.total_mass_kg), ""))
    return rows


def release_rows(a: AreaAssessment, fmt: Formatter) -> list[tuple[str, str]]:
    """The reported release as label–value rows."""
    r = a.release
    if r is None:
        return [("release", "no vessels in this area")]
    lim = a.limits
    atm = units.format_pressure(a.atmospheric_pressure_Pa, fmt.system, gauge=False, digits=3)
    rows = [
        ("vessel", f"{r.vessel} ({r.gas}), {fmt.m(r.mass_kg)}"),
        (
            "gas released",
            f"{units.format_room_volume(r.volume.volume_m3, fmt.system)} at "
            f"{fmt.t(a.temperature_K)} and {atm} "
            + (f"(Z = {r.volume.Z:.4f})" if r.volume.flashed else "(ideal gas: not all flashes)"),
        ),
        (
            "gas in the area's air",
            f"{share(r.gas_fraction)} at once; {share(r.gas_fraction_mixed)} released gradually",
        ),
        (
            "oxygen",
            f"{share(r.air.oxygen)} ({share(r.air_mixed.oxygen)} gradually); limits "
            f"{share(lim.oxygen_minimum)} to {share(lim.oxygen_maximum)}",
        ),
        (
            "carbon dioxide",
            f"{share(r.air.carbon_dioxide)} ({share(r.air_mixed.carbon_dioxide)} gradually); "
            f"limits {share(lim.carbon_dioxide_long_term)} over 8 h, "
            f"{share(lim.carbon_dioxide_short_term)} over 15 min",
        ),
        (
            "flammable gas",
            f"{share(r.air.lfl_fraction)} of the LFL ({share(r.air_mixed.lfl_fraction)} "
            f"gradually); limit {share(lim.lfl_share)} of the LFL"
            if r.mix.lfl_sum > 0
            else "none in this gas",
        ),
        ("oxygen back above its limit", units.format_duration(r.oxygen_recovery_s)),
        ("every limit holds again", units.format_duration(r.clear_s)),
    ]
    if a.leak is not None:
        rows.append(
            (
                "continuous leak",
                f"{a.leak.vessel}, {fmt.m(a.leak.rate_kg_s * 3600.0)} an hour: steady "
                f"{share(a.leak.steady_fraction)} of the air, oxygen {share(a.leak.air.oxygen)}",
            )
        )
    return rows


def threshold_rows(a: AreaAssessment) -> list[tuple[str, str]]:
    """Each threshold and its source."""
    lim = a.limits
    names = {
        "oxygen_minimum": "oxygen at least",
        "oxygen_maximum": "oxygen at most",
        "carbon_dioxide_long_term": "carbon dioxide, 8 hours",
        "carbon_dioxide_short_term": "carbon dioxide, 15 minutes",
        "lfl_share": "flammable gas, share of the LFL",
    }
    return [(names[k], f"{share(getattr(lim, k))}: {lim.sources[k]}") for k in names]


def area_findings(a: AreaAssessment) -> list:
    """The area's findings, most severe first."""
    return sorted(a.findings, key=lambda f: SEVERITY_ORDER[f.severity])


def area_verdict_sentence(a: AreaAssessment) -> str:
    """The area's verdict and what it covers."""
    word = VERDICT_WORD[a.verdict]
    return (
        f"{word}: area {a.id}, the whole charge of any one of its vessels released into it, "
        "judged against the oxygen, carbon dioxide and flammable limits above (a well-mixed "
        "estimate: it does not replace oxygen monitoring or a risk assessment)"
    )


def _e(text: object) -> str:
    return html.escape(str(text), quote=True)


def area_html(a: AreaAssessment, fmt: Formatter) -> str:
    """One area as an HTML section, with its concentration–time chart."""
    from fillcheck.report.area_chart import area_chart_svg

    inv = "".join(
        "<tr>" + "".join(f"<td>{_e(c)}</td>" for c in row) + "</tr>"
        for row in inventory_rows(a, fmt)
    )
    kv = "".join(f"<tr><th>{_e(k)}</th><td>{_e(v)}</td></tr>" for k, v in release_rows(a, fmt))
    th = "".join(f"<tr><th>{_e(k)}</th><td>{_e(v)}</td></tr>" for k, v in threshold_rows(a))
    findings = "".join(
        f'<tr><td class="sev-{f.severity}">{_e(f.severity.upper())}</td><td>{_e(f.code)}</td>'
        f"<td>{_e(finding_message(f, fmt.system, fmt.atm))}</td></tr>"
        for f in area_findings(a)
    )
    chart = area_chart_svg(a) if a.release is not None else ""
    return (
        f'<section class="vessel"><h2>{_e(area_head(a, fmt))} '
        f'<span class="verdict {a.verdict}">{VERDICT_WORD[a.verdict]}</span></h2>'
        "<h3>Inventory by hazard class</h3><table><tr><th>hazard</th><th>vessels</th>"
        f"<th>mass</th><th>as gas at the area's conditions</th></tr>{inv}</table>"
        f"<h3>Worst single release</h3><table>{kv}</table>"
        f'<div class="chart">{chart}</div>'
        f"<h3>Thresholds</h3><table>{th}</table>"
        f"<h3>Findings</h3><table>{findings}</table>"
        f"<p><i>Model: {_e(MODEL)}.</i></p>"
        f'<p class="verdict-line {a.verdict}"><b>{_e(area_verdict_sentence(a))}</b></p>'
        "</section>"
    )


def area_terminal(a: AreaAssessment, fmt: Formatter) -> Any:
    """One area as a rich Group for the terminal report."""
    from rich.console import Group
    from rich.table import Table
    from rich.text import Text

    style = {"pass": "bold green", "fail": "bold red", "review": "bold yellow"}
    sev = {"fail": "red", "review": "yellow", "warning": "magenta", "info": "dim"}
    head = Text.assemble(
        (area_head(a, fmt), "bold"),
        "   verdict: ",
        (VERDICT_WORD[a.verdict], style[a.verdict]),
    )
    inv = Table(title="Inventory by hazard class", title_justify="left", show_edge=False)
    for col in ("hazard", "vessels", "mass", "as gas at the area's conditions"):
        inv.add_column(col, justify="left" if col == "hazard" else "right")
    for row in inventory_rows(a, fmt):
        inv.add_row(*row)
    rel = Table(title="Worst single release", title_justify="left", show_edge=False)
    rel.add_column("quantity")
    rel.add_column("value")
    for row in release_rows(a, fmt):
        rel.add_row(*row)
    th = Table(title="Thresholds", title_justify="left", show_edge=False, show_header=False)
    th.add_column(style="dim")
    th.add_column()
    for row in threshold_rows(a):
        th.add_row(*row)
    findings = Table(title="Findings", title_justify="left", show_edge=False, show_header=False)
    findings.add_column(no_wrap=True)
    findings.add_column(no_wrap=True, style="dim")
    findings.add_column(ratio=1)
    for f in area_findings(a):
        findings.add_row(
            Text(f.severity.upper(), style=sev[f.severity]),
            f.code,
            finding_message(f, fmt.system, fmt.atm),
        )
    return Group(
        head,
        inv,
        rel,
        th,
        findings,
        Text(f"Model: {MODEL}.", style="dim"),
        Text(area_verdict_sentence(a), style=style[a.verdict]),
    )
