"""What a cylinder's markings add to its assessment: one more limit, and the scale reading.

- A marked working pressure (at 15 °C) or service pressure (at 70 °F) limits the settled
  pressure at that temperature: a charge whose pressure there is above the marked pressure
  (raised by the code's allowance, where the scenario gives one) fails with
  ``working-pressure-exceeded``, and the plan never goes above it. The marked pressure is the
  pressure a fill is read to on a gauge, not a strength limit, so a settled pressure exactly at
  it passes and the plan stops at it: neither the model's uncertainty nor a clearance is kept
  below it (the allowable pressure and the relief setting keep theirs).
- A marked tare gives the gross mass (tare + charge) and the scale reading to stop a fill by
  weight at (tare + the planned charge).

Findings are data here (code, severity and SI quantities in ``Finding.data``); their words are
written in :mod:`fillcheck.report.wording`.
"""

from __future__ import annotations

from collections.abc import Sequence
from dataclasses import dataclass
from typing import TYPE_CHECKING

import numpy as np

from fillcheck.assess.result import Finding, VesselAssessment
from fillcheck.thermo.vessel import vessel_path

if TYPE_CHECKING:
    from fillcheck.scenario.resolve import VesselInput
    from fillcheck.thermo.fluid import Fluid

RATED_TOLERANCE = 1e-7
"""Relative tolerance on the rated-pressure comparison [-]: a fill entered exactly at the marked
pressure is solved back to it within round-off, and passes."""


@dataclass(frozen=True)
class MarkingResult:
    """The markings of one vessel against its charge (SI: Pa absolute, K, kg)."""

    rated_kind: str | None
    """"working pressure" or "service pressure" (None where neither is marked)."""
    rated_pressure_Pa: float | None
    rated_limit_Pa: float | None
    """The marked pressure raised by the allowance [Pa abs]."""
    allowance: float
    rated_temperature_K: float | None
    settled_at_rated_Pa: float | None
    """The vessel's pressure at the rated temperature [Pa abs]."""
    test_pressure_Pa: float | None
    tare_mass_kg: float | None
    gross_mass_kg: float | None
    """Tare + charge [kg] (None without a tare)."""
    max_safe_gross_mass_kg: float | None
    """Tare + the planned (largest) charge: the scale reading to stop a fill by weight at [kg]."""


def governing_name(kind: str) -> str:
    """The governing-limit name of a marked rated pressure."""
    return f"marked {kind}"


def marking_bounds(fluid: Fluid, vs: Sequence[VesselInput]) -> list[tuple[np.ndarray, str]]:
    """Density bounds [mol/m³] from the vessels' marked working or service pressures, as
    (bound per vessel, governing name) pairs for the largest-charge solver (+inf where a vessel
    has no such marking)."""
    from fillcheck.assess.charge import pressure_bound

    out = []
    for kind in ("working pressure", "service pressure"):
        idx = [
            j for j, v in enumerate(vs) if v.marking is not None and v.marking.rated_kind == kind
        ]
        if not idx:
            continue
        r = np.full(len(vs), np.inf)
        T = np.array([vs[j].marking.rated_temperature_K for j in idx])  # type: ignore[union-attr]
        L = np.array([vs[j].marking.rated_limit_Pa for j in idx])  # type: ignore[union-attr]
        # a plain pressure bound (clearance 0: no uncertainty), on the branch that applies
        r[idx] = pressure_bound(fluid, T, L, 0.0)
        out.append((r, governing_name(kind)))
    return out


def rated_pressures(fluid: Fluid, vs: Sequence[VesselInput], rho: np.ndarray) -> np.ndarray:
    """Per vessel, the pressure at its rated temperature for overall density ρ [mol/m³] [Pa abs]
    (NaN where no working or service pressure is marked); one vectorised call."""
    out = np.full(len(vs), np.nan)
    idx = [j for j, v in enumerate(vs) if v.marking is not None and v.marking.rated_kind]
    if idx:
        T = np.array([vs[j].marking.rated_temperature_K for j in idx])  # type: ignore[union-attr]
        out[idx] = vessel_path(fluid, T, np.asarray(rho, dtype=float)[idx]).P
    return out


def apply_marking(v: VesselInput, a: VesselAssessment, settled_at_rated_Pa: float) -> None:
    """Attach the marking result to ``a`` and add its findings (nothing without a marking)."""
    m = v.marking
    if m is None:
        return
    settled = None if not np.isfinite(settled_at_rated_Pa) else float(settled_at_rated_Pa)
    gross = None if m.tare_mass_kg is None else m.tare_mass_kg + a.charged_mass_kg
    safe_gross = None
    if m.tare_mass_kg is not None and a.max_safe_charge_kg is not None:
        safe_gross = m.tare_mass_kg + a.max_safe_charge_kg
    a.marking = MarkingResult(
        m.rated_kind,
        m.rated_pressure_Pa,
        m.rated_limit_Pa,
        m.allowance,
        m.rated_temperature_K,
        settled,
        m.test_pressure_Pa,
        m.tare_mass_kg,
        gross,
        safe_gross,
    )
    a.findings += marking_findings(a.marking)


def marking_findings(r: MarkingResult) -> list[Finding]:
    """The findings of a marking result, as data (the words: report.wording)."""
    out: list[Finding] = []
    if r.rated_limit_Pa is not None and r.settled_at_rated_Pa is not None:
        data = {
            "settled_pressure_Pa": r.settled_at_rated_Pa,
            "temperature_K": float(r.rated_temperature_K or np.nan),
            "marked_pressure_Pa": float(r.rated_pressure_Pa or np.nan),
            "limit_Pa": r.rated_limit_Pa,
            "allowance": r.allowance,
            "marked": str(r.rated_kind),
        }
        if r.settled_at_rated_Pa > r.rated_limit_Pa * (1.0 + RATED_TOLERANCE):
            out.append(Finding("working-pressure-exceeded", "fail", "", data))
        out.append(Finding("margin-working", "info", "", data))
    if r.gross_mass_kg is not None:
        out.append(
            Finding(
                "gross-mass",
                "info",
                "",
                {
                    "tare_mass_kg": float(r.tare_mass_kg or 0.0),
                    "gross_mass_kg": r.gross_mass_kg,
                    "max_safe_gross_mass_kg": r.max_safe_gross_mass_kg,
                },
            )
        )
    return out
