"""The words of findings given as data (Finding.data), and of the limits they check.

The assessment yields a finding's code, severity and SI quantities; the sentence is written here,
in the report's unit system. A finding that still carries its own message is shown as it is.
"""

from __future__ import annotations

from collections.abc import Callable

from fillcheck import units
from fillcheck.assess.markings import RATED_TOLERANCE
from fillcheck.assess.result import Finding, VesselAssessment
from fillcheck.report.area_words import AREA_WORDS
from fillcheck.report.fill_words import FILL_WORDS
from fillcheck.report.finding_words import WORDS, Words, checked_text


def _p(system: units.UnitSystem, atm: float) -> Callable[[float], str]:
    return lambda x: units.format_pressure(x, system, gauge=True, atmospheric_pressure_Pa=atm)


def _span(dp: float, system: units.UnitSystem) -> str:
    """A pressure difference [Pa] in bar or psi."""
    return f"{dp / 1e5:.1f} bar" if system == "metric" else f"{dp / 6894.757293168361:.0f} psi"


def _pct(x: float) -> str:
    return f"{100.0 * x:.4g} %"


def _rated(data: dict, p: Callable[[float], str], t: Callable[[float], str]) -> str:
    """'the marked working pressure 200 barg at 15.0 °C' (with the allowance, if any)."""
    kind = data["marked"]
    said = f"the marked {kind} {p(data['marked_pressure_Pa'])} at {t(data['temperature_K'])}"
    if data["allowance"]:
        said += f" (with the code's allowance of {_pct(data['allowance'])}: {p(data['limit_Pa'])})"
    return said


def finding_message(f: Finding, system: units.UnitSystem = "metric", atm: float = 101325.0) -> str:
    """The sentence of a finding in ``system`` (its own message where it has one)."""
    if f.message or f.data is None:
        return f.message
    d = f.data
    words = WORDS.get(f.code) or FILL_WORDS.get(f.code) or AREA_WORDS.get(f.code)
    if words is not None:
        return words(d, Words(system, atm))
    p = _p(system, atm)

    def t(x: float) -> str:
        return units.format_temperature(x, system)

    def m(x: float) -> str:
        return units.format_mass(x, system)

    if f.code == "working-pressure-exceeded":
        return (
            f"the settled pressure at {t(d['temperature_K'])} is {p(d['settled_pressure_Pa'])}, "
            f"above {_rated(d, p, t)}: the cylinder is filled beyond what it is marked for"
        )
    if f.code == "margin-working":
        gauge = d["limit_Pa"] - atm
        margin = d["limit_Pa"] - d["settled_pressure_Pa"]
        # a fill entered at the marked pressure is solved back to it within round-off
        sign = "+" if margin >= -RATED_TOLERANCE * d["limit_Pa"] else "-"
        margin = max(margin, 0.0) if sign == "+" else margin
        share = (
            f" ({units.format_share(margin / gauge, signed=True)} of the gauge limit)"
            if gauge > 0
            else ""
        )
        return (
            f"{_rated(d, p, t)}: settled pressure there {p(d['settled_pressure_Pa'])}, margin "
            f"{sign}{_span(abs(margin), system)}{share}"
        )
    if f.code == "gross-mass":
        said = (
            f"gross mass {m(d['gross_mass_kg'])} (marked tare {m(d['tare_mass_kg'])} + charge "
            f"{m(d['gross_mass_kg'] - d['tare_mass_kg'])})"
        )
        if d.get("max_safe_gross_mass_kg") is not None:
            said += (
                "; stop a fill by weight at a scale reading of "
                f"{units.format_mass(d['max_safe_gross_mass_kg'], system, down=True)}"
            )
        return said
    return f.code


def marking_limits_checked(v: VesselAssessment, system: units.UnitSystem, atm: float) -> list[str]:
    """The limits a vessel's markings add to those the verdict covers."""
    r = v.marking
    if r is None or r.rated_limit_Pa is None:
        return []
    p = _p(system, atm)
    said = (
        f"marked {r.rated_kind} {p(r.rated_pressure_Pa)} at "
        f"{units.format_temperature(r.rated_temperature_K, system)}"
    )
    if r.allowance:
        said += f" with an allowance of {_pct(r.allowance)} ({p(r.rated_limit_Pa)})"
    return [said]


def limits_checked(v: VesselAssessment, system: units.UnitSystem, atm: float) -> list[str]:
    """Every limit the verdict of ``v`` covers, in words."""
    w = Words(system, atm)
    return [checked_text(c, w) for c in v.limits_checked] + marking_limits_checked(v, system, atm)
