"""The verdict rules: findings with a code, a severity and a message.

- fail: pressure above the allowable pressure, or at the relief setting, anywhere in the storage
  range; a filling ratio above its limit; too little vapour space.
- review: a state outside the model's validity range; a model whose measured error is larger
  than the margin to a limit; a gas resting on user-entered data or without measured accuracy.
- warning: liquid in the vessel within the range; liquid-full within the range; a state close
  to the critical point; a model substituted for the one asked for.
- info: the charge; the margin to each limit, in pressure and in temperature.
"""

from __future__ import annotations

from collections.abc import Callable
from typing import TYPE_CHECKING

import numpy as np

from fillcheck import units
from fillcheck.assess.result import Finding, RuleCheck, VesselAssessment, pressure_margin
from fillcheck.assess.rules import RULES_PUBLICATION, VERIFY_EDITION, rule_limits
from fillcheck.assess.uncertainty import pressure_uncertainty
from fillcheck.thermo.vessel import VesselPath

if TYPE_CHECKING:
    from fillcheck.scenario.resolve import Limits, VesselInput

NEAR_CRITICAL_T = 0.03
"""|T/Tc − 1| below which a state counts as near-critical (with the density test) [-]."""
NEAR_CRITICAL_RHO = 0.35
"""|ρ/ρc − 1| below which a state counts as near-critical (with the temperature test) [-]."""


def vessel_findings(
    v: VesselInput, a: VesselAssessment, path: VesselPath, system: units.UnitSystem = "metric"
) -> tuple[list[Finding], list[str]]:
    """All findings of one assessed vessel and the list of limits that were checked."""
    atm = v.atmospheric_pressure_Pa

    def p(x: float) -> str:
        return units.format_pressure(x, system, gauge=True, atmospheric_pressure_Pa=atm)

    def t(x: float) -> str:
        return units.format_temperature(x, system)

    def fr(x: float) -> str:
        return units.format_filling_ratio(x, system)

    out: list[Finding] = []
    checked: list[str] = []
    lim, f = v.limits, v.fluid
    P_top = float(path.P.max())
    i_top = int(path.P.argmax())
    T_range = f"{t(path.T[0])} to {t(path.T[-1])}"

    # --- fail ---------------------------------------------------------------------------------
    checked.append(f"allowable pressure {p(lim.allowable_pressure_Pa)}")
    if P_top > lim.allowable_pressure_Pa:
        out.append(
            Finding(
                "allowable-exceeded",
                "fail",
                f"the pressure reaches {p(P_top)} at {t(path.T[i_top])}, above the allowable "
                f"pressure {p(lim.allowable_pressure_Pa)} "
                f"(reached at {t(a.allowable_reached_at_K)})",
            )
        )
    if lim.relief_set_pressure_Pa is not None:
        checked.append(f"relief set pressure {p(lim.relief_set_pressure_Pa)}")
        if P_top >= lim.relief_set_pressure_Pa:
            out.append(_relief_finding(lim, a, path, p, t))
    if lim.max_filling_ratio_kg_m3 is not None:
        checked.append(f"maximum filling ratio {fr(lim.max_filling_ratio_kg_m3)}")
        if a.density_kg_m3 > lim.max_filling_ratio_kg_m3 * (1 + 1e-12):
            out.append(
                Finding(
                    "filling-ratio-exceeded",
                    "fail",
                    f"the filling ratio {fr(a.density_kg_m3)} is above "
                    f"the limit {fr(lim.max_filling_ratio_kg_m3)}",
                )
            )
    if lim.min_vapour_space is not None and lim.vapour_space_temperature_K is not None:
        Tv = lim.vapour_space_temperature_K
        checked.append(f"vapour space at least {_pct(lim.min_vapour_space)} at {t(Tv)}")
        liquid = a.liquid_fraction_at_vapour_space_T or 0.0
        allowed = 1.0 - lim.min_vapour_space
        me = f.model_error
        err = me.saturated_liquid_density if me is not None else None
        within = err is not None and 0.0 < liquid < 1.0 and abs(allowed / liquid - 1.0) < err
        said = (
            f"at {t(Tv)} liquid fills {100.0 * liquid:.1f} % of the vessel, leaving "
            f"{100.0 * max(0.0, 1 - liquid):.1f} % vapour space; at least "
            f"{_pct(lim.min_vapour_space)} is required"
        )
        if within:
            out.append(
                Finding(
                    "vapour-space-uncertain",
                    "review",
                    f"{said}. The difference is within the {f.model} model's measured "
                    f"saturated-liquid density error for {f.name} ({units.format_share(err)}): "
                    "weigh the charge "
                    "against the code's filling ratio or use a reference equation of state",
                )
            )
        elif liquid > allowed:
            out.append(Finding("vapour-space-too-small", "fail", said))

    out += _top_liquid_findings(v, a, path, t, p, checked, system)
    if v.rules is not None:
        out += _rule_findings(v, a, p, checked)

    # --- review -------------------------------------------------------------------------------
    span = _outside_validity(f, a, path)
    if span is not None:
        out.append(
            Finding(
                "outside-validity",
                "review",
                f"states from {t(span[0])} to {t(span[1])} lie outside the range where the "
                f"{f.model} model's error was measured ({a.model_validity.split(' (')[0]}); "
                "its numbers there are not vouched for",
            )
        )
    if f.data.user_defined:
        out.append(
            Finding(
                "user-defined-gas",
                "review",
                f"{f.name} is defined in the scenario by its critical constants and acentric "
                "factor; "
                "results rest on user data and a cubic model with no measured error",
            )
        )
    elif f.model_error is None:
        out.append(
            Finding(
                "accuracy-unknown",
                "review",
                f"the error of the {f.model} model has not been measured for {f.name} "
                "(no reference "
                "equation to compare with); treat the numbers as estimates",
            )
        )
    else:
        u_top = a.pressure_uncertainty_at_top
        if u_top is None:
            u_top = float(
                pressure_uncertainty(f, path.T[i_top], path.rho_mol[i_top], path.phase[i_top])
            )
        source = (
            "the reference equation's uncertainty"
            if f.is_reference
            else f"the {f.model} model's error measured for {f.name}"
        )
        limits = [("allowable pressure", lim.allowable_pressure_Pa)]
        if lim.relief_set_pressure_Pa is not None:
            limits.append(("relief set pressure", lim.relief_set_pressure_Pa))
        limits += _rule_pressure_limits(v)
        for name, L in limits:
            # the margin against the relative uncertainty: (L − P)/L < u, i.e. L − P < u·L, as
            # the sentence prints it (both in bar or psi)
            margin = (L - P_top) / L
            if 0.0 <= margin < u_top:
                out.append(
                    Finding(
                        "margin-below-model-error",
                        "review",
                        f"the highest pressure, {p(P_top)} at {t(path.T[i_top])}, lies "
                        f"{_span(L - P_top, system)} below the {name} {p(L)}: less than "
                        f"{source} there ({units.format_share(u_top)} of the pressure, "
                        f"{_span(u_top * L, system)} at the limit; {path.phase[i_top]}), so the "
                        "margin cannot be vouched for",
                    )
                )

    # --- warning ------------------------------------------------------------------------------
    if v.model_note:
        out.append(Finding("model-substituted", "warning", v.model_note))
    out += _liquid_warnings(f, a, path, t, system)
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
                f"states near {t(near_lo)} lie close to the critical point of {f.name} "
                f"({t(Tc)}): pressure and phase change steeply there and every model is least sure",
            )
        )

    # --- info ---------------------------------------------------------------------------------
    out.append(
        Finding(
            "charge",
            "info",
            f"charge {units.format_mass(a.charged_mass_kg, system)} per vessel"
            + (
                f", {units.format_mass(a.charged_mass_kg * a.count, system)} for {a.count} vessels"
                if a.count > 1
                else ""
            )
            + f" ({units.format_charge_density(a.density_kg_m3, system)}); "
            f"pressure {p(a.max_state.pressure_Pa)} at {t(a.max_state.temperature_K)}, "
            f"{p(a.min_state.pressure_Pa)} at {t(a.min_state.temperature_K)} "
            f"(range {T_range})",
        )
    )
    out.append(_margin("allowable pressure", lim.allowable_pressure_Pa, v, a, path, p, t, system))
    if lim.relief_set_pressure_Pa is not None:
        out.append(
            _margin("relief set pressure", lim.relief_set_pressure_Pa, v, a, path, p, t, system)
        )
    if lim.max_filling_ratio_kg_m3 is not None:
        m = lim.max_filling_ratio_kg_m3 - a.density_kg_m3
        out.append(
            Finding(
                "margin-filling-ratio",
                "info",
                f"filling ratio {fr(a.density_kg_m3)} against the limit "
                f"{fr(lim.max_filling_ratio_kg_m3)} "
                f"(margin {units.format_share(m / lim.max_filling_ratio_kg_m3, signed=True)})",
            )
        )
    return out, checked


def _margin(
    name: str,
    limit: float,
    v: VesselInput,
    a: VesselAssessment,
    path: VesselPath,
    p: Callable[[float], str],
    t: Callable[[float], str],
    system: units.UnitSystem,
) -> Finding:
    P_top = float(path.P.max())
    margin = limit - P_top
    T_reach = a.limit_reached_K.get(name.split()[0])
    if T_reach is None:
        when = (
            f"not reached up to {t(a.highest_computed_K)}, the highest temperature fillcheck "
            "computes for this model"
        )
    elif T_reach <= path.T[-1]:
        when = f"reached at {t(T_reach)}"
    else:
        when = (
            f"would be reached at {t(T_reach)}, "
            f"{units.format_temperature_difference(T_reach - path.T[-1], system)} above the "
            "maximum storage temperature"
        )
    code = "margin-" + name.split()[0]
    sign = "+" if margin >= 0 else "-"
    share_of_gauge = pressure_margin(limit, P_top, v.atmospheric_pressure_Pa)
    share = (
        ""
        if np.isnan(share_of_gauge)
        else f"{units.format_share(share_of_gauge, signed=True)} of the gauge limit"
    )
    return Finding(
        code,
        "info",
        f"{name} {p(limit)}: highest pressure {p(P_top)}, "
        f"margin {sign}{_span(abs(margin), system)}"
        + (f" ({share})" if share else "")
        + f"; {when}",
    )


def _rule_pressure_limits(v: VesselInput) -> list[tuple[str, float]]:
    """Pressure limits of a rule set that apply over the storage range (at 65 °C)."""
    if v.rules is None or v.max_temperature_K < 338.15 - 1e-9:
        return []
    return [(f"test pressure ({v.rules.set})", v.rules.test_pressure_Pa)]


def _rule_findings(
    v: VesselInput, a: VesselAssessment, p: Callable[[float], str], checked: list[str]
) -> list[Finding]:
    """Fail findings for every rule of the vessel's named rule set that its charge breaks."""
    assert v.rules is not None
    out = [
        Finding(
            "rule-set",
            "info",
            f"rule set '{v.rules.set}' with test pressure {p(v.rules.test_pressure_Pa)}, "
            f"an example after {RULES_PUBLICATION}: {VERIFY_EDITION}",
        )
    ]
    rho = a.density_kg_m3 / v.fluid.molar_mass
    M = v.fluid.molar_mass
    for r in rule_limits(v.fluid, v.rules.set, v.rules.test_pressure_Pa, v.atmospheric_pressure_Pa):
        checked.append(f"{v.rules.set}: {r.text}")
        a.rule_checks.append(
            RuleCheck(v.rules.set, r.text, None if r.density_mol is None else r.density_mol * M)
        )
        if r.density_mol is None or rho > r.density_mol * (1 + 1e-12):
            out.append(
                Finding(
                    "rule-broken",
                    "fail",
                    f"the charge breaks the rule '{r.text}' of {v.rules.set} "
                    f"(test pressure {p(v.rules.test_pressure_Pa)}): the filling ratio is "
                    f"{rho * M / 1000:.3f} kg/L, the rule allows "
                    + (
                        "no charge at all"
                        if r.density_mol is None or r.density_mol <= 0
                        else f"at most {r.density_mol * M / 1000:.3f} kg/L"
                    ),
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


_DISCHARGE = {
    "gas": "the relief device would open and vent gas",
    "liquid": (
        "the vessel is then full of liquid, so the relief device would open and discharge "
        "liquid, which flashes to a large volume of cold gas"
    ),
    "vapour": (
        "the relief device would open and vent vapour, or liquid where liquid wets it (a "
        "vessel lying down or nearly full)"
    ),
}
_DEVICE = {
    "valve": "a relief valve recloses once the pressure falls below its reseat pressure",
    "bursting disc": "a bursting disc does not reclose: the vessel empties",
    None: "a relief valve recloses when the pressure falls; a bursting disc does not, and the "
    "vessel empties",
}


def _relief_finding(
    lim: Limits,
    a: VesselAssessment,
    path: VesselPath,
    p: Callable[[float], str],
    t: Callable[[float], str],
) -> Finding:
    P_set = float(lim.relief_set_pressure_Pa)  # type: ignore[arg-type]
    out = relief_discharge(path, P_set)
    return Finding(
        "relief-reached",
        "fail",
        f"the pressure reaches the relief set pressure {p(P_set)} at "
        f"{t(a.relief_reached_at_K)}: {_DISCHARGE[out]}; {_DEVICE[lim.relief_device]}",
        data={"discharge": out, "relief_device": lim.relief_device},
    )


def _pct(x: float) -> str:
    """A fraction as a percentage with the digits the user gave (5 %, 4.6 %, 12.25 %)."""
    return f"{100.0 * x:.4g} %"


def _span(dp: float, system: units.UnitSystem) -> str:
    return f"{dp / 1e5:.1f} bar" if system == "metric" else f"{dp / 6894.757293168361:.0f} psi"


VAPOUR_SPACE_WARNING = 0.05
"""Vapour space at the top of the checked range below which a liquefied charge gets a warning
where the scenario sets no vapour-space limit of its own [-] (common practice, no source; the
plan's built-in floor, assess.charge.DEFAULT_VAPOUR_SPACE)."""


def _top_liquid_findings(
    v: VesselInput,
    a: VesselAssessment,
    path: VesselPath,
    t: Callable[[float], str],
    p: Callable[[float], str],
    checked: list[str],
    system: units.UnitSystem,
) -> list[Finding]:
    """Liquid at the top of the checked range: liquid-full fails; too little vapour space warns.

    A vessel full of liquid below its critical temperature at the highest temperature it may
    see is a few kelvin from any limit: its pressure then rises by bar per kelvin."""
    T_top = float(path.T[-1])
    checked.append(f"not liquid-full at {t(T_top)}")
    out: list[Finding] = []
    if str(path.phase[-1]) == "liquid":
        reach = a.limit_reached_K.get("allowable")
        if reach is None:
            then = f"the allowable pressure is not reached up to {t(a.highest_computed_K)}"
        elif reach <= T_top:
            then = f"the allowable pressure is reached already at {t(reach)}"
        else:
            then = (
                f"the allowable pressure {p(v.limits.allowable_pressure_Pa)} would be reached "
                f"{units.format_temperature_difference(reach - T_top, system)} above it"
            )
        full = a.liquid_full_above_K
        since = f"above {t(full)}" if full is not None else "over the whole range"
        out.append(
            Finding(
                "liquid-full-at-top",
                "fail",
                f"liquid fills the whole vessel {since}, so at the top of the checked range, "
                f"{t(T_top)}, no vapour space is left: the pressure rises by "
                f"{units.pressure_rate_per_K(a.dP_dT_at_max_Pa_K, system)} there and {then}",
            )
        )
        return out
    liquid = a.liquid_fraction_at_top
    # only a vessel holding liquid and vapour at the top has a vapour space to lose; a dense
    # supercritical charge there has none and is judged by the pressure limits
    two_phase_at_top = a.max_state.phase == "two-phase"
    if v.limits.min_vapour_space is None and two_phase_at_top and liquid is not None:
        left = 1.0 - liquid
        if left < VAPOUR_SPACE_WARNING:
            out.append(
                Finding(
                    "vapour-space-low",
                    "warning",
                    f"at {t(T_top)} liquid fills {units.format_share(liquid)} of the vessel, "
                    f"leaving {units.format_share(left)} vapour space, less than the "
                    f"{units.format_share(VAPOUR_SPACE_WARNING, 0)} fillcheck keeps in "
                    "its plans; a few kelvin more and the vessel is liquid-full",
                )
            )
    return out


def _liquid_warnings(
    f, a: VesselAssessment, path: VesselPath, t: Callable[[float], str], system
) -> list[Finding]:
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
    said = (
        "the mixture was filled as a gas, and while liquid is present the gas drawn off "
        "is not the composition on the label"
        if a.liquefied is False
        else "the gas drawn off changes as liquid evaporates, and a liquefied gas must be "
        "filled by weight"
    )
    out.append(
        Finding(
            "liquid-present",
            "warning",
            f"liquid is present from {t(lo_liq)} to {t(hi_liq)}: {said}",
        )
    )
    if window and str(path.phase[-1]) != "liquid":
        upto = min(T_hi, f.model_critical[0]) if not mixture else T_hi
        out.append(
            Finding(
                "liquid-full",
                "warning",
                f"liquid fills the whole vessel from {t(a.liquid_full_above_K)} to {t(upto)}, "
                "below the top of the checked range; the pressure there stays below the top "
                "pressure, which the limits judge",
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
