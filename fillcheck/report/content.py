"""What every report says about a vessel, as plain text rows: shared by terminal and HTML.

The renderers only lay these rows out; the words and the unit formatting live here once.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

from fillcheck import units
from fillcheck.assess.result import Finding, VesselAssessment
from fillcheck.assess.rules import RULES_PUBLICATION, VERIFY_EDITION
from fillcheck.fluids.citation import citation
from fillcheck.report.finding_words import validity_text
from fillcheck.report.wording import limits_checked

ENTERED_LABELS = {
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
    "limits.max_filling_density": "maximum filling density (of water at 60 °F)",
    "limits.min_vapour_space": "minimum vapour space",
    "limits.vapour_space_temperature": "vapour space at",
    "rules.set": "rule set",
    "rules.test_pressure": "test pressure",
    "marking.working_pressure": "marked working pressure (15 °C)",
    "marking.service_pressure": "marked service pressure (70 °F)",
    "marking.allowance": "allowance over the marked pressure",
    "marking.test_pressure": "marked test pressure",
    "marking.tare_mass": "marked tare",
}
CLOSING_CAUTION = (
    "fillcheck computes what the gas does; it does not inspect the vessel. Its verdict covers "
    "only the limits listed above, within its models' stated accuracy. The cylinder's markings, "
    "local codes and a licensed inspector decide; read SAFETY.md before acting on this report."
)
VERDICT_WORD = {"pass": "PASS", "fail": "FAIL", "review": "REVIEW"}
SEVERITY_ORDER = {"fail": 0, "review": 1, "warning": 2, "info": 3}


@dataclass(frozen=True)
class Formatter:
    """Unit formatting in one unit system with the scenario's atmospheric pressure."""

    system: units.UnitSystem
    atm: float

    def p(self, x: float | None, gauge: bool = True) -> str:
        if x is None:
            return "—"
        return units.format_pressure(x, self.system, gauge=gauge, atmospheric_pressure_Pa=self.atm)

    def t(self, x: float | None) -> str:
        return "—" if x is None else units.format_temperature(x, self.system)

    def m(self, x: float) -> str:
        return units.format_mass(x, self.system)

    def m_down(self, x: float) -> str:
        """A largest safe charge: rounded down in the unit shown."""
        return units.format_mass(x, self.system, down=True)


def publication(source: str) -> str:
    """The publication a catalog source note names (the rest stays in the catalog)."""
    return citation(source)


def entered_rows(v: VesselAssessment, system: units.UnitSystem = "metric") -> list[tuple[str, str]]:
    """The user's inputs in their own units, then the model and its sources."""
    rows = [
        (label, units.respell(v.entered[key]))
        for key, label in ENTERED_LABELS.items()
        if key in v.entered
    ]
    if v.composition is not None:
        rows.insert(0, ("composition (mole)", v.gas.removesuffix(" (mol)")))
    rows.append(("model", f"{v.model_name} ({v.model}); {'; '.join(v.model_references)}"))
    rows.append(("model range", validity_text(v.model_validity, system)))
    rows.append(("gas data", publication(v.data_sources.get("critical", "—"))))
    return rows


def result_rows(v: VesselAssessment, fmt: Formatter) -> list[tuple[str, str]]:
    """The results table."""
    p, t, s = fmt.p, fmt.t, fmt.system
    rows = [("charge per vessel", fmt.m(v.charged_mass_kg))]
    if v.count > 1:
        rows.append((f"charge, {v.count} vessels", fmt.m(v.charged_mass_kg * v.count)))
    if s == "us":
        rows.append(
            ("filling density (of water at 60 °F)", units.format_filling_density(v.density_kg_m3))
        )
    else:
        density = units.format_density(v.density_kg_m3, s)
        ratio = units.format_filling_ratio(v.density_kg_m3, s)
        rows.append(("density (filling ratio)", f"{density} ({ratio})"))
    if v.fill_pressure_Pa is not None:
        rows.append((f"pressure at fill, {t(v.fill_temperature_K)}", p(v.fill_pressure_Pa)))
        rows.append(("Z at fill", _z(v.fill_Z, v.fill_phase)))
    rows.append((f"settled pressure at {t(v.reference_temperature_K)}", p(v.settled_pressure_Pa)))
    for label, e in (("lowest", v.min_state), ("highest", v.max_state)):
        rows.append(
            (f"at {label} temperature {t(e.temperature_K)}", f"{p(e.pressure_Pa)}  {e.phase}")
        )
    rows.append((f"Z at {t(v.max_state.temperature_K)}", _z(v.max_state.Z, v.max_state.phase)))
    rows.append(
        ("pressure rise at highest temperature", units.pressure_rate_per_K(v.dP_dT_at_max_Pa_K, s))
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

    rows.append(("liquid present below", where(v.liquid_forms_below_K)))
    rows.append(("liquid-full above", where(v.liquid_full_above_K)))
    rows.append(("allowable pressure reached at", t(v.allowable_reached_at_K)))
    rows.append(("relief set pressure reached at", t(v.relief_reached_at_K)))
    r = v.marking
    if (
        r is not None
        and r.settled_at_rated_Pa is not None
        and abs(r.rated_temperature_K - v.reference_temperature_K) > 1e-6
    ):
        rows.append(
            (
                f"settled pressure at {t(r.rated_temperature_K)} (marked {r.rated_kind})",
                p(r.settled_at_rated_Pa),
            )
        )
    if r is not None and r.gross_mass_kg is not None:
        rows.append(("gross mass (marked tare + charge)", fmt.m(r.gross_mass_kg)))
    rows += limit_value_rows(v, fmt)
    if v.max_safe_charge_kg is not None:
        rows.append(
            (
                "largest charge within the limits",
                f"{fmt.m_down(v.max_safe_charge_kg)} ({v.governing_limit} governs)",
            )
        )
    return rows


def _z(Z: float | None, phase: str | None) -> str:
    """The compressibility factor [-], or a dash where the state is two-phase (an overall
    density of liquid and vapour together has no compressibility factor worth printing)."""
    if Z is None:
        return "—"
    return "— (two-phase)" if phase == "two-phase" else f"{Z:.4f}"


def _share(x: float, digits: str = ".1f") -> str:
    """A fraction [-] as the Results rows print it: '4.7 %' (a space before the sign, as the
    entered limits are written)."""
    return f"{100.0 * x:{digits}} %"


def limit_value_rows(v: VesselAssessment, fmt: Formatter) -> list[tuple[str, str]]:
    """What the checks found against the vapour-space limit and each rule of a named rule set:
    the value found, the limit and the margin (the rule values beside the code they come from)."""
    rows: list[tuple[str, str]] = []
    if v.min_vapour_space is not None and v.vapour_space_temperature_K is not None:
        liquid = v.liquid_fraction_at_vapour_space_T or 0.0
        left = max(0.0, 1.0 - liquid)
        need = v.min_vapour_space
        rows.append(
            (
                f"vapour space at {fmt.t(v.vapour_space_temperature_K)}",
                f"{_share(left)} of the vessel (at least {_share(need, '.4g')}; margin "
                f"{100.0 * (left - need):+.1f} points)",
            )
        )
    if v.rule_checks:
        ratio = units.format_filling_ratio(v.density_kg_m3, fmt.system)
        for r in v.rule_checks:
            if r.max_density_kg_m3 is None:
                said = f"no charge meets it (this charge {ratio})"
            elif math.isinf(r.max_density_kg_m3):
                said = "met by any charge"
            else:
                limit = units.format_filling_ratio(r.max_density_kg_m3, fmt.system)
                margin = (r.max_density_kg_m3 - v.density_kg_m3) / r.max_density_kg_m3
                said = f"{ratio} against at most {limit} (margin {_share(margin, '+.1f')})"
            rows.append((f"{r.rule_set}: {r.text}", said))
        rows.append(("rule set taken from", f"{RULES_PUBLICATION}: {VERIFY_EDITION}"))
    return rows


def fill_plan(v: VesselAssessment, fmt: Formatter) -> str:
    """The fill plan as plain sentences with units."""
    p, t = fmt.p, fmt.t
    out = []
    if v.entered.get("fill.settled_pressure") and v.fill_pressure_Pa is not None:
        out.append(
            f"To settle at {p(v.settled_pressure_Pa)} at {t(v.reference_temperature_K)}, stop the "
            f"fill at {p(v.fill_pressure_Pa)} while the gas is at {t(v.fill_temperature_K)}."
        )
    r = v.filling  # the fill process (assess.fill_process): where to stop while hot
    if r is not None and r.stop_pressure_Pa is not None:
        out.append(
            f"Filled as [vessel.filling] says, stop at {p(r.stop_pressure_Pa)} while the gas "
            f"is at {t(r.stop_temperature_K)} (end of fill)."
        )
    if v.max_safe_charge_kg is None:
        out.append("No charge keeps every limit entered: do not fill this vessel.")
    else:
        s = "The largest charge keeping every limit: " if out else "Fill plan: "
        s += f"up to {fmt.m_down(v.max_safe_charge_kg)} per vessel"
        if v.fill_by_weight:
            s += (
                ", filled by weight: at this charge the vessel holds liquid at the fill "
                "temperature, so its pressure does not measure the charge"
            )
        elif v.max_safe_fill_pressure_Pa is not None:
            s += (
                f"; stop the fill at {p(v.max_safe_fill_pressure_Pa)} while the gas is at "
                f"{t(v.fill_temperature_K)}"
            )
        out.append(s + f" ({v.governing_limit} governs).")
        r = v.marking
        if r is not None and r.max_safe_gross_mass_kg is not None:
            out.append(
                f"By weight: stop at a scale reading of {fmt.m_down(r.max_safe_gross_mass_kg)} "
                f"(marked tare {fmt.m(r.tare_mass_kg)} + {fmt.m_down(v.max_safe_charge_kg)})."
            )
    return " ".join(out)


def sorted_findings(v: VesselAssessment) -> list[Finding]:
    """Findings, most severe first."""
    return sorted(v.findings, key=lambda f: SEVERITY_ORDER[f.severity])


def verdict_sentence(v: VesselAssessment, fmt: Formatter | None = None) -> str:
    """The verdict, always with the limits it covers, and for a fail what broke."""
    fmt = fmt or Formatter("metric", units.STANDARD_ATMOSPHERE_Pa)
    checked = "; ".join(limits_checked(v, fmt.system, fmt.atm))
    if v.verdict == "fail":
        broken = ", ".join(f.code for f in v.findings if f.severity == "fail")
        return f"Verdict: {v.id} FAILS ({broken}). Limits checked: {checked}."
    if v.verdict == "review":
        why = ", ".join(f.code for f in v.findings if f.severity == "review")
        return f"Verdict: {v.id} NEEDS REVIEW ({why}). Limits checked: {checked}."
    return f"Verdict: {v.id} passes the limits checked: {checked}."


DETAIL_LIMIT = 25
"""A register report shows this many failing and review vessels in detail, worst first."""


SUMMARY_SMALLEST = 10
"""A register summary lists every failing vessel and, beside them, this many of the smallest
margins to the allowable pressure."""


def margin_text(x: float) -> str:
    """A pressure margin (assess.result.pressure_margin) as every report prints it."""
    return "—" if math.isnan(x) else f"{units.format_share(x, signed=True)}"


SUMMARY_TITLE = "Every failing vessel, then the smallest margins to the allowable pressure"
SUMMARY_COLUMNS = ("vessel", "gas", "highest pressure", "allowable", "margin", "verdict", "fails")


def failed_codes(v: VesselAssessment) -> str:
    """The codes of a vessel's failing findings ('—' for none)."""
    return ", ".join(f.code for f in v.findings if f.severity == "fail") or "—"


def register_summary(vessels: list[VesselAssessment]) -> dict[str, object]:
    """Counts, every failing vessel, and the smallest margins of a register (both renderers).

    ``worst`` lists every failing vessel, whatever limit it fails, then the vessels with the
    smallest margins to the allowable pressure up to SUMMARY_SMALLEST more: failing first,
    each group by its margin."""
    counts = {k: sum(1 for v in vessels if v.verdict == k) for k in ("pass", "fail", "review")}

    def margin(v: VesselAssessment) -> float:
        x = v.margin_to_allowable
        return -math.inf if math.isnan(x) else x

    failing = sorted((v for v in vessels if v.verdict == "fail"), key=margin)
    others = sorted((v for v in vessels if v.verdict != "fail"), key=margin)
    worst = failing + others[:SUMMARY_SMALLEST]
    flagged = sorted(
        (v for v in vessels if v.verdict != "pass"),
        key=lambda v: (v.verdict != "fail", margin(v)),
    )
    return {"counts": counts, "worst": worst, "flagged": flagged, "total": len(vessels)}
