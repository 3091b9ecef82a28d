"""The sentences of the verdict's findings and of the limits it covers.

assess/ yields each finding as a code, a severity and its SI quantities (``Finding.data``,
keys naming their units); this module writes the sentence in the report's unit system, and
only for what is printed. ``WORDS`` maps a finding's code to the function that words it.
"""

from __future__ import annotations

import math
from collections.abc import Callable
from dataclasses import dataclass
from typing import TYPE_CHECKING, Any

from fillcheck import units
from fillcheck.assess.result import Checked
from fillcheck.assess.rules import RULES_PUBLICATION, VERIFY_EDITION

if TYPE_CHECKING:
    from fillcheck.thermo.fluid import Validity


@dataclass(frozen=True)
class Words:
    """Quantities in one unit system, gauge pressures over one atmosphere [Pa]."""

    system: units.UnitSystem
    atm: float

    def p(self, x: float) -> str:
        """A pressure [Pa abs] as a gauge pressure."""
        return units.format_pressure(x, self.system, gauge=True, atmospheric_pressure_Pa=self.atm)

    def t(self, x: float) -> str:
        return units.format_temperature(x, self.system)

    def dt(self, x: float) -> str:
        return units.format_temperature_difference(x, self.system)

    def fr(self, x: float) -> str:
        return units.format_filling_ratio(x, self.system)

    def m(self, x: float, down: bool = False) -> str:
        return units.format_mass(x, self.system, down=down)

    def span(self, dp: float) -> str:
        """A pressure difference [Pa] in bar or psi."""
        if self.system == "metric":
            return f"{dp / 1e5:.1f} bar"
        return f"{dp / 6894.757293168361:.0f} psi"

    def rate(self, x: float) -> str:
        return units.pressure_rate_per_K(x, self.system)


def pct(x: float) -> str:
    """A fraction as a percentage with the digits the user gave (5 %, 4.6 %, 12.25 %)."""
    return f"{100.0 * x:.4g} %"


_LIMIT_NAME = {"allowable": "allowable pressure", "relief": "relief set pressure"}


def _limit_name(d: dict[str, Any]) -> str:
    if d["limit"] == "test":
        return f"test pressure ({d['rule_set']})"
    return _LIMIT_NAME[d["limit"]]


# --- fail --------------------------------------------------------------------------------------
def _allowable_exceeded(d: dict[str, Any], w: Words) -> str:
    return (
        f"the pressure reaches {w.p(d['pressure_Pa'])} at {w.t(d['temperature_K'])}, above the "
        f"allowable pressure {w.p(d['limit_Pa'])} (reached at {w.t(d['reached_K'])})"
    )


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


def _relief_reached(d: dict[str, Any], w: Words) -> str:
    return (
        f"the pressure reaches the relief set pressure {w.p(d['limit_Pa'])} at "
        f"{w.t(d['reached_K'])}: {_DISCHARGE[d['discharge']]}; {_DEVICE[d['relief_device']]}"
    )


def _filling_ratio_exceeded(d: dict[str, Any], w: Words) -> str:
    return (
        f"the filling ratio {w.fr(d['density_kg_m3'])} is above the limit {w.fr(d['limit_kg_m3'])}"
    )


def _vapour_space_said(d: dict[str, Any], w: Words) -> str:
    liquid = d["liquid_fraction"]
    return (
        f"at {w.t(d['temperature_K'])} liquid fills {100.0 * liquid:.1f} % of the vessel, "
        f"leaving {100.0 * max(0.0, 1 - liquid):.1f} % vapour space; at least "
        f"{pct(d['required'])} is required"
    )


def _vapour_space_uncertain(d: dict[str, Any], w: Words) -> str:
    return (
        f"{_vapour_space_said(d, w)}. The difference is within the {d['model']} model's "
        f"measured saturated-liquid density error for {d['gas']} "
        f"({units.format_share(d['model_error'])}): weigh the charge against the code's filling "
        "ratio or use a reference equation of state"
    )


def _liquid_full_at_top(d: dict[str, Any], w: Words) -> str:
    reach, top = d["reached_K"], d["top_K"]
    if reach is None:
        then = f"the allowable pressure is not reached up to {w.t(d['highest_computed_K'])}"
    elif reach <= top:
        then = f"the allowable pressure is reached already at {w.t(reach)}"
    else:
        then = (
            f"the allowable pressure {w.p(d['limit_Pa'])} would be reached "
            f"{w.dt(reach - top)} above it"
        )
    full = d["full_above_K"]
    since = f"above {w.t(full)}" if full is not None else "over the whole range"
    return (
        f"liquid fills the whole vessel {since}, so at the top of the checked range, "
        f"{w.t(top)}, no vapour space is left: the pressure rises by "
        f"{w.rate(d['dP_dT_Pa_K'])} there and {then}"
    )


def _rule_set(d: dict[str, Any], w: Words) -> str:
    return (
        f"rule set '{d['rule_set']}' with test pressure {w.p(d['test_pressure_Pa'])}, "
        f"an example after {RULES_PUBLICATION}: {VERIFY_EDITION}"
    )


def _rule_broken(d: dict[str, Any], w: Words) -> str:
    allowed = d["allowed_kg_m3"]
    return (
        f"the charge breaks the rule '{d['rule']}' of {d['rule_set']} "
        f"(test pressure {w.p(d['test_pressure_Pa'])}): the filling ratio is "
        f"{d['density_kg_m3'] / 1000:.3f} kg/L, the rule allows "
        + (
            "no charge at all"
            if allowed is None or allowed <= 0
            else f"at most {allowed / 1000:.3f} kg/L"
        )
    )


# --- review ------------------------------------------------------------------------------------
def _range(T_min_K: float, T_max_K: float, P_max_Pa: float, system: units.UnitSystem) -> str:
    P = units.format_pressure(P_max_Pa, system, gauge=False, digits=0)
    t = units.format_temperature
    return f"{t(T_min_K, system)} to {t(T_max_K, system)}, up to {P}"


def validity_text(val: Validity, system: units.UnitSystem) -> str:
    """A model's validity range and its source, in ``system``."""
    return f"{_range(val.T_min_K, val.T_max_K, val.P_max_Pa, system)} ({val.source})"


def _outside_validity(d: dict[str, Any], w: Words) -> str:
    rng = _range(d["T_min_K"], d["T_max_K"], d["P_max_Pa"], w.system)
    return (
        f"states from {w.t(d['from_K'])} to {w.t(d['to_K'])} lie outside the range where the "
        f"{d['model']} model's error was measured ({rng}); its numbers there are not vouched for"
    )


def _user_defined_gas(d: dict[str, Any], w: Words) -> str:
    return (
        f"{d['gas']} is defined in the scenario by its critical constants and acentric factor; "
        "results rest on user data and a cubic model with no measured error"
    )


def _accuracy_unknown(d: dict[str, Any], w: Words) -> str:
    return (
        f"the error of the {d['model']} model has not been measured for {d['gas']} (no "
        "reference equation to compare with); treat the numbers as estimates"
    )


def _margin_below_model_error(d: dict[str, Any], w: Words) -> str:
    L, P, u = d["limit_Pa"], d["pressure_Pa"], d["uncertainty"]
    source = (
        "the reference equation's uncertainty"
        if d["reference"]
        else f"the {d['model']} model's error measured for {d['gas']}"
    )
    return (
        f"the highest pressure, {w.p(P)} at {w.t(d['temperature_K'])}, lies "
        f"{w.span(L - P)} below the {_limit_name(d)} {w.p(L)}: less than "
        f"{source} there ({units.format_share(u)} of the pressure, "
        f"{w.span(u * L)} at the limit; {d['phase']}), so the margin cannot be vouched for"
    )


# --- warning -----------------------------------------------------------------------------------
def _vapour_space_low(d: dict[str, Any], w: Words) -> str:
    liquid = d["liquid_fraction"]
    return (
        f"at {w.t(d['temperature_K'])} liquid fills {units.format_share(liquid)} of the vessel, "
        f"leaving {units.format_share(1.0 - liquid)} vapour space, less than the "
        f"{units.format_share(d['threshold'], 0)} fillcheck keeps in its plans; a few kelvin "
        "more and the vessel is liquid-full"
    )


def _liquid_present(d: dict[str, Any], w: Words) -> str:
    said = (
        "the mixture was filled as a gas, and while liquid is present the gas drawn off "
        "is not the composition on the label"
        if d["filled_as_gas"]
        else "the gas drawn off changes as liquid evaporates, and a liquefied gas must be "
        "filled by weight"
    )
    return f"liquid is present from {w.t(d['from_K'])} to {w.t(d['to_K'])}: {said}"


def _liquid_full(d: dict[str, Any], w: Words) -> str:
    return (
        f"liquid fills the whole vessel from {w.t(d['from_K'])} to {w.t(d['to_K'])}, below "
        "the top of the checked range; the pressure there stays below the top pressure, which "
        "the limits judge"
    )


def _near_critical(d: dict[str, Any], w: Words) -> str:
    return (
        f"states near {w.t(d['temperature_K'])} lie close to the critical point of {d['gas']} "
        f"({w.t(d['critical_temperature_K'])}): pressure and phase change steeply there and "
        "every model is least sure"
    )


# --- info --------------------------------------------------------------------------------------
def _charge(d: dict[str, Any], w: Words) -> str:
    m, n = d["charged_mass_kg"], d["count"]
    each = f"charge {w.m(m)} per vessel" + (f", {w.m(m * n)} for {n} vessels" if n > 1 else "")
    return (
        each + f" ({units.format_charge_density(d['density_kg_m3'], w.system)}); "
        f"pressure {w.p(d['max_pressure_Pa'])} at {w.t(d['max_temperature_K'])}, "
        f"{w.p(d['min_pressure_Pa'])} at {w.t(d['min_temperature_K'])} "
        f"(range {w.t(d['range_from_K'])} to {w.t(d['range_to_K'])})"
    )


def _margin(kind: str) -> Callable[[dict[str, Any], Words], str]:
    def words(d: dict[str, Any], w: Words) -> str:
        L, P, reach, top = d["limit_Pa"], d["pressure_Pa"], d["reached_K"], d["top_K"]
        if reach is None:
            when = (
                f"not reached up to {w.t(d['highest_computed_K'])}, the highest temperature "
                "fillcheck computes for this model"
            )
        elif reach <= top:
            when = f"reached at {w.t(reach)}"
        else:
            when = (
                f"would be reached at {w.t(reach)}, {w.dt(reach - top)} above the maximum "
                "storage temperature"
            )
        margin = L - P
        sign = "+" if margin >= 0 else "-"
        share = d["share_of_gauge"]
        share_said = (
            ""
            if share is None or math.isnan(share)
            else f" ({units.format_share(share, signed=True)} of the gauge limit)"
        )
        return (
            f"{_LIMIT_NAME[kind]} {w.p(L)}: highest pressure {w.p(P)}, "
            f"margin {sign}{w.span(abs(margin))}{share_said}; {when}"
        )

    return words


def _margin_filling_ratio(d: dict[str, Any], w: Words) -> str:
    rho, L = d["density_kg_m3"], d["limit_kg_m3"]
    return (
        f"filling ratio {w.fr(rho)} against the limit {w.fr(L)} "
        f"(margin {units.format_share((L - rho) / L, signed=True)})"
    )


def _composition(c: dict[str, float]) -> str:
    return " + ".join(f"{name} {100.0 * v:.3g} %" for name, v in c.items())


def _interaction_unknown(d: dict[str, Any], w: Words) -> str:
    return (
        f"no published binary interaction parameter for {', '.join(d['pairs'])}: the "
        f"{d['model']} model used kij = 0 there, and the phase behaviour and density of the "
        "mixture are estimates"
    )


def _liquid_dropout(d: dict[str, Any], w: Words) -> str:
    t, x, y, heavy = w.t(d["temperature_K"]), d["liquid_x"], d["vapour_y"], d["condensing"]
    if d["liquefied"]:
        lightest = max(y, key=lambda k: y[k] / x[k])
        return (
            f"this liquefied mixture is two-phase by design; at {t} the vapour drawn off is "
            f"{_composition(y)}, richer in {lightest} than the liquid ({_composition(x)}), and "
            f"as vapour is drawn the liquid left grows richer in {heavy}: a vapour-draw "
            "appliance receives a changing composition"
        )
    return (
        f"at {t} the mixture splits: a liquid rich in {heavy} takes "
        f"{units.format_share(d['liquid_volume_fraction'])} of the vessel (liquid "
        f"{_composition(x)}), and the gas drawn off is {_composition(y)}, not the composition "
        "on the label; warm the vessel and roll or wait before use so the liquid re-mixes"
    )


def _order(names: list[str]) -> str:
    return ", then ".join(names)


def _blend_step_condenses(d: dict[str, Any], w: Words) -> str:
    then = (
        f"; the order {_order(d['suggested_order'])} keeps every step gas"
        if d.get("suggested_order")
        else ""
    )
    return (
        f"after step {d['step']} of the blend ({d['component']} added) the contents hold liquid "
        f"at {w.t(d['temperature_K'])}: the stop pressure does not tell the amount in, and the "
        f"mixture's composition is not what the recipe says{then}"
    )


def _blend_step_near_dew(d: dict[str, Any], w: Words) -> str:
    return (
        f"after step {d['step']} of the blend ({d['component']} added) the stop pressure "
        f"{w.p(d['pressure_Pa'])} at {w.t(d['temperature_K'])} lies within the gauge's and the "
        "thermometer's error of the contents' dew pressure: a gas a little colder than read "
        "would condense, so the pressure does not tell the amount in; weigh this step"
    )


def _blend_step_condenses_cold(d: dict[str, Any], w: Words) -> str:
    return (
        f"the contents after step {d['step']} of the blend ({d['component']} added) would hold "
        f"liquid at {w.t(d['temperature_K'])}, the lowest storage temperature: do not leave the "
        "vessel part-blended in the cold"
    )


def _blend_residual_exceeds(d: dict[str, Any], w: Words) -> str:
    return (
        f"the residual gas already holds {w.m(d['excess_kg'])} more {d['component']} than the "
        "target mixture: vent or evacuate the vessel before blending"
    )


def _blend_outside_model_range(d: dict[str, Any], w: Words) -> str:
    return (
        f"step {d['step']} of the blend stops at {w.p(d['pressure_Pa'])} and "
        f"{w.t(d['temperature_K'])}, outside the model's range: its stop pressure is not checked"
    )


def _blend_not_computed(d: dict[str, Any], w: Words) -> str:
    return f"the blend recipe could not be computed ({d['error']}); check it by hand"


WORDS: dict[str, Callable[[dict[str, Any], Words], str]] = {
    "blend-step-condenses": _blend_step_condenses,
    "blend-step-condenses-cold": _blend_step_condenses_cold,
    "blend-step-near-dew": _blend_step_near_dew,
    "blend-residual-exceeds": _blend_residual_exceeds,
    "blend-not-computed": _blend_not_computed,
    "blend-outside-model-range": _blend_outside_model_range,
    "interaction-unknown": _interaction_unknown,
    "liquid-dropout": _liquid_dropout,
    "allowable-exceeded": _allowable_exceeded,
    "relief-reached": _relief_reached,
    "filling-ratio-exceeded": _filling_ratio_exceeded,
    "vapour-space-uncertain": _vapour_space_uncertain,
    "vapour-space-too-small": _vapour_space_said,
    "liquid-full-at-top": _liquid_full_at_top,
    "rule-set": _rule_set,
    "rule-broken": _rule_broken,
    "outside-validity": _outside_validity,
    "user-defined-gas": _user_defined_gas,
    "accuracy-unknown": _accuracy_unknown,
    "margin-below-model-error": _margin_below_model_error,
    "vapour-space-low": _vapour_space_low,
    "liquid-present": _liquid_present,
    "liquid-full": _liquid_full,
    "near-critical": _near_critical,
    "charge": _charge,
    "margin-allowable": _margin("allowable"),
    "margin-relief": _margin("relief"),
    "margin-filling-ratio": _margin_filling_ratio,
}
"""A finding's code to the function that writes its sentence from its data."""


def checked_text(c: Checked, w: Words) -> str:
    """One limit the verdict covers, in words."""
    if c.kind == "allowable":
        return f"allowable pressure {w.p(c.value)}"  # type: ignore[arg-type]
    if c.kind == "relief":
        return f"relief set pressure {w.p(c.value)}"  # type: ignore[arg-type]
    if c.kind == "filling-ratio":
        return f"maximum filling ratio {w.fr(c.value)}"  # type: ignore[arg-type]
    if c.kind == "vapour-space":
        return f"vapour space at least {pct(c.value)} at {w.t(c.temperature_K)}"  # type: ignore[arg-type]
    if c.kind == "not-liquid-full":
        return f"not liquid-full at {w.t(c.temperature_K)}"  # type: ignore[arg-type]
    if c.kind == "peak-fill-temperature":
        return f"peak gas temperature during the fill {w.t(c.value)}"  # type: ignore[arg-type]
    return c.text or c.kind
