"""The verdict rules: findings with a code, a severity and their SI quantities (data).

- fail: pressure above the allowable pressure, or at the relief setting, anywhere in the storage
  range; a filling ratio above its limit; too little vapour space.
- review: a state outside the model's validity range; a model whose measured error is larger
  than the margin to a limit; a gas resting on user-entered data or without measured accuracy.
- warning: liquid in the vessel within the range; liquid-full within the range; a state close
  to the critical point; a model substituted for the one asked for.
- info: the charge; the margin to each limit, in pressure and in temperature.

No words and no units here: each finding carries its quantities in ``Finding.data`` (keys name
their units) and report.finding_words writes its sentence in the report's unit system. The
limits a verdict covers are data too (:class:`fillcheck.assess.result.Checked`).
"""

from __future__ import annotations

from typing import TYPE_CHECKING

import numpy as np

from fillcheck.assess.result import Checked, Finding, RuleCheck, VesselAssessment, pressure_margin
from fillcheck.assess.rules import rule_limits
from fillcheck.assess.uncertainty import pressure_uncertainty
from fillcheck.thermo.vessel import VesselPath

if TYPE_CHECKING:
    from fillcheck.scenario.resolve import Limits, VesselInput

NEAR_CRITICAL_T = 0.03
"""|T/Tc − 1| below which a state counts as near-critical (with the density test) [-]."""
NEAR_CRITICAL_RHO = 0.35
"""|ρ/ρc − 1| below which a state counts as near-critical (with the temperature test) [-]."""


def vessel_findings(
    v: VesselInput, a: VesselAssessment, path: VesselPath
) -> tuple[list[Finding], list[Checked]]:
    """All findings of one assessed vessel and the limits that were checked."""
    out: list[Finding] = []
    checked: list[Checked] = []
    lim, f = v.limits, v.fluid
    P_top = float(path.P.max())
    i_top = int(path.P.argmax())
    T_top_state = float(path.T[i_top])

    # --- fail ---------------------------------------------------------------------------------
    checked.append(Checked("allowable", lim.allowable_pressure_Pa))
    if P_top > lim.allowable_pressure_Pa:
        out.append(
            Finding(
                "allowable-exceeded",
                "fail",
                "",
                {
                    "pressure_Pa": P_top,
                    "temperature_K": T_top_state,
                    "limit_Pa": lim.allowable_pressure_Pa,
                    "reached_K": a.allowable_reached_at_K,
                },
            )
        )
    if lim.relief_set_pressure_Pa is not None:
        checked.append(Checked("relief", lim.relief_set_pressure_Pa))
        if P_top >= lim.relief_set_pressure_Pa:
            out.append(_relief_finding(lim, a, path))
    if lim.max_filling_ratio_kg_m3 is not None:
        checked.append(Checked("filling-ratio", lim.max_filling_ratio_kg_m3))
        if a.density_kg_m3 > lim.max_filling_ratio_kg_m3 * (1 + 1e-12):
            out.append(
                Finding(
                    "filling-ratio-exceeded",
                    "fail",
                    "",
                    {"density_kg_m3": a.density_kg_m3, "limit_kg_m3": lim.max_filling_ratio_kg_m3},
                )
            )
    if lim.min_vapour_space is not None and lim.vapour_space_temperature_K is not None:
        Tv = lim.vapour_space_temperature_K
        checked.append(Checked("vapour-space", lim.min_vapour_space, Tv))
        liquid = a.liquid_fraction_at_vapour_space_T or 0.0
        allowed = 1.0 - lim.min_vapour_space
        me = f.model_error
        err = me.saturated_liquid_density if me is not None else None
        within = err is not None and 0.0 < liquid < 1.0 and abs(allowed / liquid - 1.0) < err
        data = {"temperature_K": Tv, "liquid_fraction": liquid, "required": lim.min_vapour_space}
        if within:
            data |= {"model": f.model, "gas": f.name, "model_error": err}
            out.append(Finding("vapour-space-uncertain", "review", "", data))
        elif liquid > allowed:
            out.append(Finding("vapour-space-too-small", "fail", "", data))

    out += _top_liquid_findings(v, a, path, checked)
    if v.rules is not None:
        out += _rule_findings(v, a, checked)

    # --- review -------------------------------------------------------------------------------
    span = _outside_validity(f, a, path)
    if span is not None:
        val = f.validity
        out.append(
            Finding(
                "outside-validity",
                "review",
                "",
                {
                    "from_K": span[0],
                    "to_K": span[1],
                    "model": f.model,
                    "T_min_K": val.T_min_K,
                    "T_max_K": val.T_max_K,
                    "P_max_Pa": val.P_max_Pa,
                },
            )
        )
    if f.data.user_defined:
        out.append(Finding("user-defined-gas", "review", "", {"gas": f.name}))
    elif f.model_error is None:
        out.append(Finding("accuracy-unknown", "review", "", {"gas": f.name, "model": f.model}))
    else:
        u_top = a.pressure_uncertainty_at_top
        if u_top is None:
            u_top = float(
                pressure_uncertainty(f, path.T[i_top], path.rho_mol[i_top], path.phase[i_top])
            )
        limits = [("allowable", lim.allowable_pressure_Pa, None)]
        if lim.relief_set_pressure_Pa is not None:
            limits.append(("relief", lim.relief_set_pressure_Pa, None))
        limits += _rule_pressure_limits(v)
        for kind, L, rule_set in limits:
            # the margin against the relative uncertainty: (L − P)/L < u, i.e. L − P < u·L, as
            # the sentence prints it (both in bar or psi)
            margin = (L - P_top) / L
            if 0.0 <= margin < u_top:
                out.append(
                    Finding(
                        "margin-below-model-error",
                        "review",
                        "",
                        {
                            "limit": kind,
                            "rule_set": rule_set,
                            "limit_Pa": L,
                            "pressure_Pa": P_top,
                            "temperature_K": T_top_state,
                            "uncertainty": u_top,
                            "phase": str(path.phase[i_top]),
                            "reference": f.is_reference,
                            "model": f.model,
                            "gas": f.name,
                        },
                    )
                )

    # --- warning ------------------------------------------------------------------------------
    if v.model_note:
        out.append(Finding("model-substituted", "warning", v.model_note))
    out += _liquid_warnings(f, a, path)
    Tc, _, rhoc = f.model_critical
    near_lo = max(float(path.T[0]), (1.0 - NEAR_CRITICAL_T) * Tc)
    near_hi = min(float(path.T[-1]), (1.0 + NEAR_CRITICAL_T) * Tc)
    dense_near = abs(float(path.rho_mol[0]) / rhoc - 1.0) < NEAR_CRITICAL_RHO
    # a mixture's critical point is not computed
    if near_lo <= near_hi and dense_near and not getattr(f, "is_mixture", False):
        out.append(
            Finding(
                "near-critical",
                "warning",
                "",
                {"temperature_K": near_lo, "gas": f.name, "critical_temperature_K": Tc},
            )
        )

    # --- info ---------------------------------------------------------------------------------
    out.append(
        Finding(
            "charge",
            "info",
            "",
            {
                "charged_mass_kg": a.charged_mass_kg,
                "count": a.count,
                "density_kg_m3": a.density_kg_m3,
                "max_pressure_Pa": a.max_state.pressure_Pa,
                "max_temperature_K": a.max_state.temperature_K,
                "min_pressure_Pa": a.min_state.pressure_Pa,
                "min_temperature_K": a.min_state.temperature_K,
                "range_from_K": float(path.T[0]),
                "range_to_K": float(path.T[-1]),
            },
        )
    )
    out.append(_margin("allowable", lim.allowable_pressure_Pa, v, a, path))
    if lim.relief_set_pressure_Pa is not None:
        out.append(_margin("relief", lim.relief_set_pressure_Pa, v, a, path))
    if lim.max_filling_ratio_kg_m3 is not None:
        out.append(
            Finding(
                "margin-filling-ratio",
                "info",
                "",
                {"density_kg_m3": a.density_kg_m3, "limit_kg_m3": lim.max_filling_ratio_kg_m3},
            )
        )
    return out, checked


def _margin(
    kind: str, limit: float, v: VesselInput, a: VesselAssessment, path: VesselPath
) -> Finding:
    """The margin to a pressure limit (``kind`` "allowable" or "relief"), as data."""
    P_top = float(path.P.max())
    return Finding(
        "margin-" + kind,
        "info",
        "",
        {
            "limit_Pa": limit,
            "pressure_Pa": P_top,
            "reached_K": a.limit_reached_K.get(kind),
            "top_K": float(path.T[-1]),
            "highest_computed_K": a.highest_computed_K,
            "share_of_gauge": pressure_margin(limit, P_top, v.atmospheric_pressure_Pa),
        },
    )


def _rule_pressure_limits(v: VesselInput) -> list[tuple[str, float, str | None]]:
    """Pressure limits of a rule set that apply over the storage range (at 65 °C)."""
    if v.rules is None or v.max_temperature_K < 338.15 - 1e-9:
        return []
    return [("test", v.rules.test_pressure_Pa, v.rules.set)]


def _rule_findings(v: VesselInput, a: VesselAssessment, checked: list[Checked]) -> list[Finding]:
    """Fail findings for every rule of the vessel's named rule set that its charge breaks."""
    assert v.rules is not None
    out = [
        Finding(
            "rule-set",
            "info",
            "",
            {"rule_set": v.rules.set, "test_pressure_Pa": v.rules.test_pressure_Pa},
        )
    ]
    rho = a.density_kg_m3 / v.fluid.molar_mass
    M = v.fluid.molar_mass
    for r in rule_limits(v.fluid, v.rules.set, v.rules.test_pressure_Pa, v.atmospheric_pressure_Pa):
        checked.append(Checked("rule", None, text=f"{v.rules.set}: {r.text}"))
        a.rule_checks.append(
            RuleCheck(v.rules.set, r.text, None if r.density_mol is None else r.density_mol * M)
        )
        if r.density_mol is None or rho > r.density_mol * (1 + 1e-12):
            out.append(
                Finding(
                    "rule-broken",
                    "fail",
                    "",
                    {
                        "rule": r.text,
                        "rule_set": v.rules.set,
                        "test_pressure_Pa": v.rules.test_pressure_Pa,
                        "density_kg_m3": rho * M,
                        "allowed_kg_m3": None if r.density_mol is None else r.density_mol * M,
                    },
                )
            )
    return out


def relief_discharge(path: VesselPath, P_set: float) -> str:
    """What a relief device set at P_set [Pa] lets out when it first opens along the path:
    "gas" (a one-phase gas or supercritical state), "liquid" (liquid-full), or "vapour"
    (two-phase: vapour from the vapour space, liquid where the valve is wetted)."""
    i = int(np.argmax(path.P >= P_set))
    phase = str(path.phase[i])
    if phase == "liquid":
        return "liquid"
    return "vapour" if phase == "two-phase" else "gas"


def _relief_finding(lim: Limits, a: VesselAssessment, path: VesselPath) -> Finding:
    P_set = float(lim.relief_set_pressure_Pa)  # type: ignore[arg-type]
    return Finding(
        "relief-reached",
        "fail",
        "",
        {
            "limit_Pa": P_set,
            "reached_K": a.relief_reached_at_K,
            "discharge": relief_discharge(path, P_set),
            "relief_device": lim.relief_device,
        },
    )


VAPOUR_SPACE_WARNING = 0.05
"""Vapour space at the top of the checked range below which a liquefied charge gets a warning
where the scenario sets no vapour-space limit of its own [-] (common practice, no source; the
plan's built-in floor, assess.charge.DEFAULT_VAPOUR_SPACE)."""


def _top_liquid_findings(
    v: VesselInput, a: VesselAssessment, path: VesselPath, checked: list[Checked]
) -> list[Finding]:
    """Liquid at the top of the checked range: liquid-full fails; too little vapour space warns.

    A vessel full of liquid below its critical temperature at the highest temperature it may
    see is a few kelvin from any limit: its pressure then rises by bar per kelvin."""
    T_top = float(path.T[-1])
    checked.append(Checked("not-liquid-full", None, T_top))
    out: list[Finding] = []
    if str(path.phase[-1]) == "liquid":
        out.append(
            Finding(
                "liquid-full-at-top",
                "fail",
                "",
                {
                    "full_above_K": a.liquid_full_above_K,
                    "top_K": T_top,
                    "dP_dT_Pa_K": a.dP_dT_at_max_Pa_K,
                    "reached_K": a.limit_reached_K.get("allowable"),
                    "highest_computed_K": a.highest_computed_K,
                    "limit_Pa": v.limits.allowable_pressure_Pa,
                },
            )
        )
        return out
    liquid = a.liquid_fraction_at_top
    # only a vessel holding liquid and vapour at the top has a vapour space to lose; a dense
    # supercritical charge there has none and is judged by the pressure limits
    two_phase_at_top = a.max_state.phase == "two-phase"
    unset = v.limits.min_vapour_space is None
    if unset and two_phase_at_top and liquid is not None and 1.0 - liquid < VAPOUR_SPACE_WARNING:
        out.append(
            Finding(
                "vapour-space-low",
                "warning",
                "",
                {
                    "temperature_K": T_top,
                    "liquid_fraction": liquid,
                    "threshold": VAPOUR_SPACE_WARNING,
                },
            )
        )
    return out


def _liquid_warnings(f, a: VesselAssessment, path: VesselPath) -> list[Finding]:
    """Liquid present in the checked range, and a liquid-full window below its top."""
    out: list[Finding] = []
    T_lo, T_hi = float(path.T[0]), float(path.T[-1])
    mixture = getattr(f, "is_mixture", False)
    if mixture:
        has_liquid = np.isin(path.phase, ("two-phase", "liquid"))
        if not np.any(has_liquid):
            return out
        T_liq = path.T[has_liquid]
        lo_liq, hi_liq = float(T_liq.min()), float(T_liq.max())
        edge = a.liquid_forms_below_K
        if edge is not None and hi_liq < T_hi and edge > hi_liq:
            hi_liq = min(edge, T_hi)  # the exact crossing, not the grid point
        window = np.any(path.phase[:-1] == "liquid")
    else:
        edge = a.liquid_forms_below_K  # dew temperature, or Tc for a dense charge
        if edge is None or edge <= T_lo:
            return out
        lo_liq, hi_liq = T_lo, min(edge, T_hi)
        full = a.liquid_full_above_K
        window = full is not None and full < min(T_hi, f.model_critical[0])
    out.append(
        Finding(
            "liquid-present",
            "warning",
            "",
            {"from_K": lo_liq, "to_K": hi_liq, "filled_as_gas": a.liquefied is False},
        )
    )
    if window and str(path.phase[-1]) != "liquid":
        upto = min(T_hi, f.model_critical[0]) if not mixture else T_hi
        out.append(
            Finding(
                "liquid-full",
                "warning",
                "",
                {"from_K": a.liquid_full_above_K, "to_K": upto},
            )
        )
    return out


def _outside_validity(f, a: VesselAssessment, path: VesselPath) -> tuple[float, float] | None:
    """The span of the checked range [K] outside the model's validity range, or None.

    Along an isochore the pressure rises with temperature, so the span is exact: below the
    range's lowest temperature, above its highest, and above the temperature where the
    pressure reaches the range's upper pressure."""
    val = f.validity
    T_lo, T_hi = float(path.T[0]), float(path.T[-1])
    parts = []
    if T_lo < val.T_min_K - 1e-9:
        parts.append((T_lo, min(T_hi, val.T_min_K)))
    if T_hi > val.T_max_K + 1e-9:
        parts.append((max(T_lo, val.T_max_K), T_hi))
    if float(path.P[-1]) > val.P_max_Pa:
        reach = a.limit_reached_K.get("validity")
        parts.append((T_lo if reach is None else max(T_lo, reach), T_hi))
    if not parts:
        return None
    return min(x for x, _ in parts), max(y for _, y in parts)
