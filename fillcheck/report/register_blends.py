"""A register's blend recipes, one row a step, for the vessels its report does not show in
detail (a passing blend row still needs its recipe at the filling bay). Renders
:class:`fillcheck.assess.blend.BlendRecipe` objects; computes nothing."""

from __future__ import annotations

from fillcheck.assess.result import VesselAssessment
from fillcheck.report.content import DETAIL_LIMIT, VERDICT_WORD, Formatter

BLEND_COLUMNS = (
    "vessel",
    "verdict",
    "step",
    "add",
    "contents after",
    "read at",
    "stop at",
    "ideal-gas stop",
    "scale reads",
)
BLEND_TITLE = "Blend recipes of the vessels not shown in detail"


def register_blend_rows(
    vessels: list[VesselAssessment], shown: list[VesselAssessment], fmt: Formatter
) -> tuple[list[list[str]], int]:
    """Rows (BLEND_COLUMNS) for at most DETAIL_LIMIT blend vessels not in ``shown``, in register
    order, and how many more blend vessels there are."""
    seen = {id(v) for v in shown}
    blends = [v for v in vessels if v.blend is not None and id(v) not in seen]
    rows: list[list[str]] = []
    for v in blends[:DETAIL_LIMIT]:
        r = v.blend
        verdict = VERDICT_WORD[v.verdict]
        if r.error is not None:
            rows.append([v.id, verdict, "not computed (see blend-not-computed)"] + [""] * 6)
            continue
        for k, s in enumerate(r.steps, start=1):
            if s.liquid_present:
                stop = "weigh it (liquid forms)"
            elif s.in_liquid_band:
                stop = "weigh it (near the dew point)"
            else:
                stop = fmt.p(s.stop_pressure_Pa)
            added = (
                fmt.m(s.added_mass_kg) if s.added_mass_kg >= 0.0 else "cannot be made: vent first"
            )
            rows.append(
                [
                    (v.id if r.order_given else f"{v.id} (order suggested)") if k == 1 else "",
                    verdict if k == 1 else "",
                    f"{k}: {s.component}",
                    added,
                    fmt.m(s.cumulative_mass_kg),
                    fmt.t(r.temperature_K),
                    stop,
                    fmt.p(s.ideal_stop_pressure_Pa),
                    "—" if s.scale_reading_kg is None else fmt.m(s.scale_reading_kg),
                ]
            )
    return rows, max(0, len(blends) - DETAIL_LIMIT)
