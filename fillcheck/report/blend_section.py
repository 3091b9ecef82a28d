"""The blend recipe on the reports: rows for the terminal and HTML, and the JSON ``blend`` key.

Renders an :class:`fillcheck.assess.blend.BlendRecipe`; computes nothing.
"""

from __future__ import annotations

import math
from typing import Any

from fillcheck import units
from fillcheck.assess.result import VesselAssessment
from fillcheck.report.content import Formatter

TOLERANCE_METHOD = (
    "first-order propagation of the scale's resolution and the gauge's accuracy (JCGM 100:2008, "
    "GUM); gravimetric preparation as in ISO 6142-1"
)
"""Reports print publications only; that ISO 6142-1 is cited from memory is said in
assess/blend.py and the README (tests/test_report_words.py bans recall remarks in reports)."""
ASSUMED = "assumed: common practice, no source"


def _order(names: tuple[str, ...] | list[str]) -> str:
    return ", then ".join(names)


def blend_rows(v: VesselAssessment, fmt: Formatter) -> list[tuple[str, str]]:
    """The recipe table: the order and conditions, one row a step, the tolerance."""
    r = v.blend
    if r is None:
        return []
    how = "as entered" if r.order_given else "suggested: none was entered"
    rows = [("order", f"{_order(r.order)} ({how})"), ("read at", fmt.t(r.temperature_K))]
    if r.error is not None:
        return [*rows, ("result", "not computed (see the finding blend-not-computed)")]
    if r.residual_mass_kg > 0.0:
        rows.append(("residual gas in the vessel", fmt.m(r.residual_mass_kg)))
    for k, s in enumerate(r.steps, start=1):
        if s.added_mass_kg < 0.0:
            rows.append(
                (
                    f"step {k}: {s.component}",
                    f"cannot be made: the residual holds {fmt.m(-s.added_mass_kg)} more "
                    f"{s.component} than the target; vent or evacuate the vessel first",
                )
            )
            continue
        scale = "" if s.scale_reading_kg is None else f"; scale reads {fmt.m(s.scale_reading_kg)}"
        rows.append(
            (
                f"step {k}: {s.component}",
                f"add {fmt.m(s.added_mass_kg)} (contents {fmt.m(s.cumulative_mass_kg)}){scale}; "
                f"{step_stop(s, fmt)} (ideal-gas recipe: {fmt.p(s.ideal_stop_pressure_Pa)})",
            )
        )
    if r.suggested_order is not None:
        rows.append(
            ("order that keeps every step clear of its dew point", _order(r.suggested_order))
        )
    mark_s = f" ({ASSUMED})" if r.default_scale else ""
    mark_g = f" ({ASSUMED})" if r.default_gauge else ""
    rows.append(("scale resolution", f"{_resolution(r.scale_resolution_kg, fmt)}{mark_s}"))
    rows.append(("gauge accuracy", f"{units.format_share(r.gauge_accuracy)} of reading{mark_g}"))
    for c, x in r.mole_fractions.items():
        by_p = (
            "by pressure: not meaningful (a step holds liquid)"
            if r.u_by_pressure is None
            else f"by pressure ± {100.0 * r.u_by_pressure[c]:.2g} %"
        )
        rows.append(
            (
                f"{c} (mole)",
                f"{100.0 * x:.4g} %; by weight ± {100.0 * r.u_by_weight[c]:.2g} %, {by_p} "
                "(standard uncertainty, points of mole %)",
            )
        )
    rows.append(("tolerance method", TOLERANCE_METHOD))
    rows.append(("model", f"{v.model_name} ({v.model}) for every step's contents"))
    return rows


def step_stop(s: Any, fmt: Formatter) -> str:
    """Where a step stops: its pressure, or "weigh it" where the pressure does not tell."""
    if s.liquid_present:
        return "no stop pressure (liquid forms): go by weight"
    if s.in_liquid_band:
        return f"weigh it (the stop pressure, {fmt.p(s.stop_pressure_Pa)}, is near the dew point)"
    return f"stop at {fmt.p(s.stop_pressure_Pa)}"


def _resolution(x: float, fmt: Formatter) -> str:
    """A scale's resolution with its own digits (a 5 g step is not "0.01 kg")."""
    if fmt.system == "metric":
        return f"{1000.0 * x:.6g} g" if x < 1.0 else f"{x:.6g} kg"
    return f"{x / 0.45359237:.3g} lb"


def blend_table_rows(v: VesselAssessment, fmt: Formatter) -> tuple[list[str], list[list[str]]]:
    """The stop pressure of each step by gas temperature: headers and rows."""
    r = v.blend
    if r is None or r.error is not None:
        return [], []
    head = ["gas temperature"] + [f"step {k}: {s.component}" for k, s in enumerate(r.steps, 1)]
    rows = []
    for i, T in enumerate(r.table_T_K):
        cells = [fmt.t(float(T))]
        for s in r.steps:
            P = float(s.table_P_Pa[i])
            if s.added_mass_kg < 0.0:
                cells.append("cannot be made")
            else:
                cells.append("weigh it" if math.isnan(P) else fmt.p(P))
        rows.append(cells)
    return head, rows


def _num(x: float) -> float | None:
    return None if not math.isfinite(x) else float(x)


def blend_dict(v: VesselAssessment) -> dict[str, Any] | None:
    """The JSON ``blend`` key (INTERFACES.md §7): SI, absolute pressures."""
    r = v.blend
    if r is None:
        return None
    return {
        "order": list(r.order),
        "order_given": r.order_given,
        "suggested_order": None if r.suggested_order is None else list(r.suggested_order),
        "temperature_K": r.temperature_K,
        "cold_temperature_K": r.cold_temperature_K,
        "residual_mass_kg": r.residual_mass_kg,
        "model": r.model,
        "error": r.error,
        "steps": [
            {
                "component": s.component,
                "added_mass_kg": s.added_mass_kg,
                "cumulative_mass_kg": s.cumulative_mass_kg,
                # null where the contents hold liquid: no pressure tells that step
                "stop_pressure_Pa": (
                    None if s.liquid_present or s.added_mass_kg < 0.0 else s.stop_pressure_Pa
                ),
                "ideal_stop_pressure_Pa": s.ideal_stop_pressure_Pa,
                "liquid_present": s.liquid_present,
                "liquid_present_cold": s.liquid_present_cold,
                "in_liquid_band": s.in_liquid_band,
                "scale_reading_kg": s.scale_reading_kg,
                "stop_table_Pa": [_num(float(p)) for p in s.table_P_Pa],
            }
            for s in r.steps
        ],
        "stop_table_temperatures_K": [float(t) for t in r.table_T_K],
        "mole_fractions": r.mole_fractions,
        "tolerance": {
            "by_weight": r.u_by_weight,
            "by_pressure": r.u_by_pressure,
            "scale_resolution_kg": r.scale_resolution_kg,
            "gauge_accuracy": r.gauge_accuracy,
            "scale_resolution_assumed": r.default_scale,
            "gauge_accuracy_assumed": r.default_gauge,
            "kind": "standard uncertainty of the mole fraction [-]",
        },
    }
