"""Safety invariants of verdicts and fill plans (issue 11), as hypothesis properties.

Random vessels are built in-process through the public scenario path (``scenario_from_dict``,
the same validation a TOML file gets) and assessed with ``assess_scenario``. The gases: permanent
gases (nitrogen, argon, air, hydrogen, helium, methane), liquefied gases (carbon dioxide, propane,
ammonia, R134a, sulfur hexafluoride, hydrogen sulfide, n-butane) and mixtures (argon + carbon
dioxide, nitrogen + carbon dioxide, nitrogen + oxygen, propane + n-butane), all with their
default (most accurate) model; half the compressed mixtures are made in the cylinder, with a
``[vessel.blend]`` table (an order or none, a blend temperature, sometimes gas left in the
vessel).
Every generated value stays inside the README's plausibility bounds and inside what real
cylinders hold: water capacity 1–1000 L, temperatures −40…+70 °C, allowable pressures scaled to
the gas (to its fill pressure for a permanent gas, to its vapour pressure for a liquefied one).

Invariants:

(a) PASS ⇒ on an independent grid over the checked range (from the lowest of the minimum
    storage, fill and reference temperatures to the highest of the maximum storage and fill
    temperatures), 400 interior points plus both ends, with the pressures computed here from the
    public ``fillcheck.fluid(...).state(T=..., rho=...)`` / ``fillcheck.mixture(...)`` API and the
    density computed here from the fill specification (the assessment's path arrays are not
    used), no limit is broken, the states are inside the model's stated range, and the vessel is
    not liquid-full at the top of the range. For pure gases a sample of the grid is recomputed
    with CoolProp 8.0.0 (``PropsSI('P', 'T', T, 'D', rho, name)``), the independent evaluation
    of the same published reference equations.
(b) The plan (``max_safe_charge_kg``), entered as ``fill.mass`` (with the same fill temperature,
    so the checked range is the same) in a new scenario, gives verdict "pass". Decision: "review"
    is accepted only where its every review finding is one that does not depend on the charge
    or that the plan cannot avoid, and is explained in the finding itself: ``outside-validity``
    for temperatures outside the model's range (never for the pressure: the plan keeps the
    range's pressure), ``accuracy-unknown`` and ``interaction-unknown``. A
    ``margin-below-model-error`` review of the plan is a defect: the plan keeps the model's
    uncertainty plus a clearance by construction. The re-assessed vessel must also print the
    same plan.
(c) The plan never decreases when the allowable pressure, the relief set pressure or the
    maximum filling ratio is raised, or the maximum storage temperature lowered. For a gas with
    a critical temperature in the storage range, the temperature step is kept on one side of it:
    the built-in vapour-space floor (5 % at the top of the checked range, issue 11) exists only
    below the critical temperature, so moving the top across it adds or removes a limit on
    purpose (a deliberate step of the plan), not a loosening.
(d) No charge that passes with every margin above the stated uncertainty exceeds the plan by
    more than its rounding (0.01 kg). "Every margin above the stated uncertainty": each pressure
    limit's margin at the top exceeds the uncertainty the assessment states there
    (``pressure_uncertainty_at_top``) plus the plan's clearance (0.1 %, and 0.01 % more below a
    relief setting, fillcheck.assess.charge); the filling ratio is within its limit; below the
    critical temperature the liquid leaves the built-in vapour space (5 %, or 0 where the
    scenario sets its own vapour-space limit) with the saturated-liquid density reduced by its
    uncertainty (0.2 % for a reference equation, 0.5 % for the multi-fluid mixture model); and
    a blend's every step stops below its liquid band (the band, the gauge's and the
    thermometer's error around the dew pressure, is the blend limit's margin: a step inside it
    passes with a warning to weigh it, and the plan keeps clear of it). Tested on the random
    vessel itself and on charges drawn just above its plan.
(e) A vessel's findings (codes and severities, in order) and its JSON numbers are the same when
    it is checked alone and among 60 vessels of its gas with other charges (the batch path of
    assess/batch.py switches grids above 50 vessels). Numbers agree to 1e-9 relative; a
    temperature found by the exact crossing solve agrees to its solve tolerance (1 µK for a
    pure gas, 1 mK for a mixture, assess.batch.exact_reach).
(f) A blended vessel that passes has a recipe that keeps its limits: the masses its steps add
    come to the charge (residual included) and give the mixture's composition; and each step's
    contents, rebuilt here from the step masses and evaluated with the public
    ``fillcheck.mixture(...)`` / ``fillcheck.fluid(...)`` API at the blend temperature, hold no
    liquid and stand at the recipe's stop pressure. With (b), the plan followed by weight keeps
    its blend (the plan is bounded by the blend, assess.charge).

Default run: a few hundred scenarios in total, derandomized (reproducible in CI). The same
properties over 10,000 scenarios: ``python -m pytest -m slow tests/test_safety_invariants.py``.

Defects found by these properties are kept as plain tests with the minimal scenario at the end
of this file (both found so far are mended: a plan governed by the scenario's own vapour-space
rule was 'review' when followed; a charge near the critical density could not be assessed).
"""

from __future__ import annotations

import math
import os
from dataclasses import dataclass, field
from typing import Any

import CoolProp.CoolProp as CP
import numpy as np
import pytest
from hypothesis import HealthCheck, event, given, reject, settings
from hypothesis import strategies as st

import fillcheck
from fillcheck.assess import assess_scenario
from fillcheck.assess.result import VesselAssessment
from fillcheck.errors import ConvergenceError, InputError
from fillcheck.report.json_report import vessel_dict
from fillcheck.scenario.resolve import scenario_from_dict

ATM = 101_325.0
"""The scenario's default atmosphere [Pa] (ScenarioSpec.atmospheric_pressure, 101.325 kPa)."""
ZERO_C = 273.15

PERMANENT = ("nitrogen", "argon", "air", "hydrogen", "helium", "methane")
LIQUEFIED = (
    "carbon dioxide",
    "propane",
    "ammonia",
    "R134a",
    "sulfur hexafluoride",
    "hydrogen sulfide",
    "n-butane",
)
#: CoolProp 8.0.0 names of the gases' reference equations (the ``coolprop_name`` of each file in
#: fillcheck/fluids/data/reference/; CoolProp is the independent evaluation of those equations).
COOLPROP = {
    "nitrogen": "Nitrogen",
    "argon": "Argon",
    "air": "Air",
    "hydrogen": "Hydrogen",
    "helium": "Helium",
    "methane": "Methane",
    "carbon dioxide": "CarbonDioxide",
    "propane": "Propane",
    "ammonia": "Ammonia",
    "R134a": "R134a",
    "sulfur hexafluoride": "SulfurHexafluoride",
    "hydrogen sulfide": "HydrogenSulfide",
    "n-butane": "n-Butane",
}
#: Highest allowable pressure drawn for a permanent gas [bar gauge]: hydrogen and helium are
#: stored higher than the rest (tube trailers, 700 bar vehicle tanks); far inside the 2000 bar
#: plausibility bound.
PERMANENT_ALLOWABLE_MAX_BARG = {"hydrogen": 950.0, "helium": 600.0}

PLAN_ROUNDING_KG = 0.01
"""The plan is rounded down to this [kg] (assess.charge.PLAN_RESOLUTION_KG, the printed figure)."""
PLAN_CLEARANCE = 1e-3
"""Relative clearance the plan keeps below a pressure limit beyond the model's uncertainty [-]
(assess.charge.SAFETY_CLEARANCE)."""
RELIEF_CLEARANCE = 1e-4
"""Further clearance below a relief setting [-] (assess.charge.RELIEF_CLEARANCE)."""
BUILT_IN_VAPOUR_SPACE = 0.05
"""Vapour space the plan keeps at the top of the checked range (issue 11; common practice)."""
LIQUID_DENSITY_U_PURE = 0.002
"""Density uncertainty of a pure gas's reference equation [-] (fillcheck.fluids.accuracy,
REFERENCE_DENSITY_UNCERTAINTY), applied by the plan to the saturated-liquid density."""
LIQUID_DENSITY_U_MIXTURE = 0.005
"""The same for the multi-fluid mixture model [-] (thermo.mixture_fluid)."""
REVIEW_OK = frozenset({"outside-validity", "accuracy-unknown", "interaction-unknown"})
"""Review findings a followed plan may carry (invariant (b), see the module docstring)."""
BATCH = 60


# --- scenarios ---------------------------------------------------------------------------------


@dataclass
class Case:
    """One random vessel: its scenario dict and the SI values it was written from."""

    gas: str | dict[str, float]
    raw: dict[str, Any]
    T_ref: float
    T_fill: float | None
    T_min: float | None
    T_max: float
    fill_kind: str
    fill_value: float
    """kg for a mass, kg/m³ for a filling ratio, Pa absolute for a pressure."""
    V_m3: float
    allow_Pa: float
    relief_Pa: float | None = None
    fr_kg_m3: float | None = None
    vs_fraction: float | None = None
    vs_T: float | None = None
    ref_text: str | None = None
    extra: dict[str, Any] = field(default_factory=dict)

    @property
    def mixture(self) -> bool:
        return isinstance(self.gas, dict)

    @property
    def checked_range(self) -> tuple[float, float]:
        """Lowest of min storage, fill and reference temperatures; highest of max storage and
        fill temperatures (issue 11, "the checked range"); a blend's temperature at both ends
        [K]."""
        lows = [self.T_ref, self.T_max]
        highs = [self.T_max]
        if self.T_min is not None:
            lows.append(self.T_min)
        if self.T_fill is not None:
            lows.append(self.T_fill)
            highs.append(self.T_fill)
        if "blend" in self.extra:  # the full charge at the blend temperature, its last step
            T_blend = float(self.extra["blend"]["temperature"].split()[0]) + ZERO_C
            lows.append(T_blend)
            highs.append(T_blend)
        return min(lows), max(highs)


def _fluid(gas: str | dict[str, float]) -> Any:
    return fillcheck.mixture(gas) if isinstance(gas, dict) else fillcheck.fluid(gas)


_FLUIDS: dict[str, Any] = {}


def _public_fluid(gas: str | dict[str, float]) -> Any:
    """The public Fluid / MixtureFluid of a gas (cached: building one is not under test)."""
    key = repr(sorted(gas.items())) if isinstance(gas, dict) else gas
    if key not in _FLUIDS:
        _FLUIDS[key] = _fluid(gas)
    return _FLUIDS[key]


def _c(T: float) -> str:
    return f"{T - ZERO_C:.2f} degC"


def _barg(P_abs: float) -> str:
    return f"{(P_abs - ATM) / 1e5:.4f} barg"


def _round_T(x: float) -> float:
    """A temperature [°C] as the scenario text gives it (0.01 K), back in K."""
    return round(x, 2) + ZERO_C


def _round_P(P_abs: float) -> float:
    """A pressure [Pa abs] as the scenario text gives it (0.1 mbar gauge)."""
    return round((P_abs - ATM) / 1e5, 4) * 1e5 + ATM


def vessel_raw(c: Case, vid: str = "V1") -> dict[str, Any]:
    """The scenario table of one vessel, written from the case's SI values."""
    fill: dict[str, str] = {}
    if c.fill_kind == "mass":
        fill["mass"] = f"{c.fill_value!r} kg"
    elif c.fill_kind == "filling_ratio":
        fill["filling_ratio"] = f"{c.fill_value!r} kg/m3"
    else:
        fill[c.fill_kind] = _barg(c.fill_value)
    if c.T_fill is not None:
        fill["temperature"] = _c(c.T_fill)
    storage = {"max_temperature": _c(c.T_max)}
    if c.T_min is not None:
        storage["min_temperature"] = _c(c.T_min)
    limits: dict[str, Any] = {"allowable_pressure": _barg(c.allow_Pa)}
    if c.relief_Pa is not None:
        limits["relief_set_pressure"] = _barg(c.relief_Pa)
    if c.fr_kg_m3 is not None:
        limits["max_filling_ratio"] = f"{c.fr_kg_m3!r} kg/m3"
    if c.vs_fraction is not None and c.vs_T is not None:
        limits["min_vapour_space"] = c.vs_fraction
        limits["vapour_space_temperature"] = _c(c.vs_T)
    out = {
        "id": vid,
        "gas": c.gas,
        "water_capacity": f"{c.V_m3 * 1000.0!r} L",
        "fill": fill,
        "storage": storage,
        "limits": limits,
    }
    if "blend" in c.extra:
        out["blend"] = c.extra["blend"]
    return out


def scenario_raw(c: Case, vessels: list[dict[str, Any]] | None = None) -> dict[str, Any]:
    raw: dict[str, Any] = {"vessel": vessels if vessels is not None else [vessel_raw(c)]}
    if c.ref_text is not None:
        raw["reference_temperature"] = c.ref_text
    return raw


def assess_raw(raw: dict[str, Any], complete: bool = False) -> list[VesselAssessment]:
    """The public scenario path: validate as a TOML file would be, then assess.

    A scenario fillcheck cannot complete (ConvergenceError: the report says "could not
    complete", exit status 1, never a PASS) is not a scenario of the invariants, which are about
    verdicts and plans; it is rejected here so that the search goes on for wrong verdicts. The
    crash itself is a defect: ``test_assessment_completes`` looks for it (``complete=True``
    lets it fail the test) and the cases at the end of this file pin what was found."""
    try:
        return assess_scenario(scenario_from_dict(raw, "invariants.toml")).vessels
    except ConvergenceError:
        if complete:
            raise
        reject()


def with_(c: Case, **changes: Any) -> Case:
    """A copy of the case with some fields changed (its raw dict rewritten)."""
    d = {k: getattr(c, k) for k in c.__dataclass_fields__}
    d.update(changes)
    new = Case(**d)
    new.raw = scenario_raw(new)
    return new


def _temperatures(
    draw: st.DrawFn, fill_T_needed: bool
) -> tuple[float, float | None, float, float | None, str | None]:
    """(T_max, T_min, T_ref, T_fill, reference text), all within −40…+70 °C [K]."""
    t_max = draw(st.floats(-30.0, 70.0))
    t_min = draw(st.one_of(st.none(), st.floats(-40.0, t_max - 1.0)))
    ref = draw(st.one_of(st.none(), st.floats(-10.0, 35.0)))
    want_fill = fill_T_needed or draw(st.booleans())
    t_fill = draw(st.floats(-40.0, 70.0)) if want_fill else None
    T_ref = ZERO_C + 15.0 if ref is None else _round_T(ref)
    ref_text = None if ref is None else _c(T_ref)
    return (
        _round_T(t_max),
        None if t_min is None else _round_T(t_min),
        T_ref,
        None if t_fill is None else _round_T(t_fill),
        ref_text,
    )


@st.composite
def permanent_cases(draw: st.DrawFn) -> Case:
    """A permanent gas (critical temperature far below −40 °C) filled by pressure or charge."""
    gas = draw(st.sampled_from(PERMANENT))
    f = _public_fluid(gas)
    kind = draw(st.sampled_from(("pressure", "settled_pressure", "mass", "filling_ratio")))
    T_max, T_min, T_ref, T_fill, ref_text = _temperatures(draw, kind == "pressure")
    top = PERMANENT_ALLOWABLE_MAX_BARG.get(gas, 450.0)
    allow = _round_P(draw(st.floats(20.0, top)) * 1e5 + ATM)
    # the fill pressure against the allowable: below, at and above it, so PASS and FAIL both occur
    P_fill = _round_P(ATM + draw(st.floats(0.15, 1.15)) * (allow - ATM))
    V = draw(st.floats(0.0, 3.0).map(lambda u: round(10.0**u, 3))) / 1000.0
    T_read = T_fill if kind == "pressure" else T_ref
    rho = float(f.state(T=T_read if T_read is not None else T_ref, P=P_fill).rho)
    value = {
        "pressure": P_fill,
        "settled_pressure": P_fill,
        "mass": round(rho * V, 6),
        "filling_ratio": round(rho, 4),
    }[kind]
    c = Case(gas, {}, T_ref, T_fill, T_min, T_max, kind, value, V, allow, ref_text=ref_text)
    _limits(draw, c, rho)
    c.raw = scenario_raw(c)
    return c


@st.composite
def liquefied_cases(draw: st.DrawFn, allow_k: tuple[float, float] = (0.6, 4.0)) -> Case:
    """A liquefied gas filled by weight (mass or filling ratio), or as a gas by pressure, with an
    allowable pressure of ``allow_k`` times the vapour pressure at the top of the range (below
    Tc; at Tc − 0.5 K above it)."""
    gas = draw(st.sampled_from(LIQUEFIED))
    f = _public_fluid(gas)
    Tc = f.critical.T
    kind = draw(st.sampled_from(("mass", "filling_ratio", "mass", "filling_ratio", "pressure")))
    T_max, T_min, T_ref, T_fill, ref_text = _temperatures(draw, kind == "pressure")
    V = draw(st.floats(0.0, 3.0).map(lambda u: round(10.0**u, 3))) / 1000.0
    rho_l15 = float(f.saturation(T=min(ZERO_C + 15.0, Tc - 1.0)).rho_liquid)
    if kind == "pressure":
        assert T_fill is not None
        Tp = min(T_fill - 2.0, Tc - 1.0)
        psat = float(f.saturation(T=max(Tp, f.critical.T * 0.6)).P)
        P_fill = _round_P(max(1.2 * ATM, draw(st.floats(0.1, 0.95)) * psat))
        rho = float(f.state(T=T_fill, P=P_fill).rho)
        value = P_fill
    else:
        rho = draw(st.floats(0.02, 1.02)) * rho_l15
        value = round(rho * V, 6) if kind == "mass" else round(rho, 4)
        rho = value / V if kind == "mass" else value
    T_top = max(T_max, T_fill or T_max)
    psat_top = float(f.saturation(T=min(T_top, Tc - 0.5)).P)
    allow = draw(st.floats(*allow_k)) * psat_top
    allow = _round_P(min(max(allow, ATM + 1e5), 1500e5))
    c = Case(gas, {}, T_ref, T_fill, T_min, T_max, kind, value, V, allow, ref_text=ref_text)
    _limits(draw, c, rho, rho_l15)
    if draw(st.integers(0, 4)) == 0:
        lo = c.checked_range[0]
        c.vs_fraction = round(draw(st.floats(0.02, 0.2)), 4)
        c.vs_T = _round_T(draw(st.floats(lo - ZERO_C, T_max - ZERO_C)))
    c.raw = scenario_raw(c)
    return c


#: Mixtures: (components, the varying component, its mole-fraction range, liquefied?).
MIXTURES = (
    (("argon", "carbon dioxide"), (0.05, 0.3), False),
    (("nitrogen", "carbon dioxide"), (0.05, 0.4), False),
    (("nitrogen", "oxygen"), (0.05, 0.5), False),
    (("propane", "n-butane"), (0.1, 0.9), True),
)


@st.composite
def mixture_cases(draw: st.DrawFn, blends: bool = True) -> Case:
    """A binary mixture: a compressed gas mixture filled by pressure or (with ``blends``) a
    liquefied blend by weight. A liquefied blend's check costs up to ten seconds (a stability
    test at every two-phase state), so the default run leaves blends to the slow sweep."""
    (a, b), (lo, hi), liquefied = draw(st.sampled_from(MIXTURES if blends else MIXTURES[:2]))
    x = round(draw(st.floats(lo, hi)), 3)
    gas = {a: round(1.0 - x, 3), b: x}
    f = _public_fluid(gas)
    V = draw(st.floats(0.0, 3.0).map(lambda u: round(10.0**u, 3))) / 1000.0
    if liquefied:
        kind = draw(st.sampled_from(("mass", "filling_ratio")))
        T_max, T_min, T_ref, T_fill, ref_text = _temperatures(draw, False)
        # propane's and n-butane's saturated liquids at 15 °C hold about 0.51 and 0.58 kg/L
        # (CoolProp 8.0.0: 507.8 and 583.5 kg/m³); 0.53 kg/L is a blend's round figure
        rho = draw(st.floats(0.02, 1.0)) * 530.0
        value = round(rho * V, 6) if kind == "mass" else round(rho, 4)
        rho = value / V if kind == "mass" else value
        allow = _round_P(ATM + draw(st.floats(6.0, 45.0)) * 1e5)
    else:
        kind = draw(st.sampled_from(("pressure", "settled_pressure", "mass")))
        T_max, T_min, T_ref, T_fill, ref_text = _temperatures(draw, kind == "pressure")
        allow = _round_P(ATM + draw(st.floats(60.0, 400.0)) * 1e5)
        P_fill = _round_P(ATM + draw(st.floats(0.2, 1.1)) * (allow - ATM))
        T_read = T_fill if kind == "pressure" and T_fill is not None else T_ref
        try:
            rho = float(f.state(T=T_read, P=P_fill).rho)
        except Exception:  # a state the mixture solver cannot give is not a scenario to build
            reject()
        value = round(rho * V, 6) if kind == "mass" else P_fill
    c = Case(gas, {}, T_ref, T_fill, T_min, T_max, kind, value, V, allow, ref_text=ref_text)
    if not liquefied and draw(st.booleans()):
        c.extra["blend"] = draw(blend_tables((a, b)))
    _limits(draw, c, rho, 530.0 if liquefied else None)
    c.raw = scenario_raw(c)
    return c


@st.composite
def blend_tables(draw: st.DrawFn, names: tuple[str, ...]) -> dict[str, Any]:
    """A ``[vessel.blend]`` table: the components' order (or none: the tool suggests one), a
    blend temperature from -10 to 35 °C, and in one case in four gas left in the vessel (one
    component or the mixture, 0.5 to 5 bar gauge)."""
    table: dict[str, Any] = {"temperature": _c(ZERO_C + round(draw(st.floats(-10.0, 35.0)), 1))}
    if draw(st.booleans()):
        table["order"] = list(draw(st.permutations(names)))
    if draw(st.integers(0, 3)) == 0:
        res: dict[str, Any] = {
            "pressure": f"{round(draw(st.floats(0.5, 5.0)), 2)} barg",
            "temperature": _c(ZERO_C + round(draw(st.floats(0.0, 30.0)), 1)),
        }
        gas = draw(st.sampled_from((None, *names)))
        if gas is not None:
            res["gas"] = gas
        table["residual"] = res
    return table


def _limits(draw: st.DrawFn, c: Case, rho: float, rho_liquid: float | None = None) -> None:
    """Optional relief setting and filling-ratio limit around the case's own numbers."""
    if draw(st.booleans()):
        c.relief_Pa = _round_P(ATM + draw(st.floats(0.9, 1.4)) * (c.allow_Pa - ATM))
    if draw(st.integers(0, 2)) == 0:
        base = rho_liquid if rho_liquid is not None else rho
        c.fr_kg_m3 = round(draw(st.floats(0.3, 1.5)) * base, 3)


def any_case() -> st.SearchStrategy[Case]:
    """Permanent and liquefied gases; one draw in three a liquefied gas whose allowable pressure
    lies within −10…+15 % of its vapour pressure at the top of the range, where the plan once
    jumped between the liquid and the vapour branch (issue 11, point 3)."""
    return st.one_of(permanent_cases(), liquefied_cases(), liquefied_cases(allow_k=(0.9, 1.15)))


def assessed(c: Case) -> VesselAssessment:
    """Assess a case; a scenario the tool refuses (InputError) is not one of the invariants'."""
    try:
        return assess_raw(c.raw)[0]
    except InputError:
        reject()


# --- independent numbers -----------------------------------------------------------------------


def independent_density(c: Case) -> float:
    """The overall density [kg/m³] from the fill specification, by the public Fluid API."""
    if c.fill_kind == "mass":
        return c.fill_value / c.V_m3
    if c.fill_kind == "filling_ratio":
        return c.fill_value
    T = c.T_fill if c.fill_kind == "pressure" else c.T_ref
    return float(_public_fluid(c.gas).state(T=T, P=c.fill_value).rho)


def independent_grid(c: Case) -> np.ndarray:
    """400 interior points (cell midpoints, so no point falls on the assessment's own grid
    nodes) plus both ends of the checked range [K]."""
    lo, hi = c.checked_range
    mid = lo + (hi - lo) * (np.arange(400) + 0.5) / 400.0
    return np.concatenate([[lo], mid, [hi]])


def liquid_fraction(f: Any, T: float, rho: float) -> float:
    """Volume fraction of the vessel filled by liquid at T below Tc, from the public saturation
    API: (ρ − ρ_v)/(ρ_l − ρ_v), clipped to [0, 1] [-]."""
    sat = f.saturation(T=T)
    return float(np.clip((rho - sat.rho_vapor) / (sat.rho_liquid - sat.rho_vapor), 0.0, 1.0))


def coolprop_pressure(name: str, T: float, rho: float) -> float | None:
    try:
        return float(CP.PropsSI("P", "T", T, "D", rho, name))
    except ValueError:
        return None


# --- invariant (a) -----------------------------------------------------------------------------


def check_pass_is_safe(c: Case, a: VesselAssessment | None = None) -> None:
    a = a or assessed(c)
    rho = independent_density(c)
    assert a.density_kg_m3 == pytest.approx(rho, rel=1e-8), "the charge the fill specifies"
    event(f"verdict {a.verdict}")
    if a.verdict != "pass":
        return
    f = _public_fluid(c.gas)
    T = independent_grid(c)
    s = f.state(T=T, rho=np.full(T.shape, rho))
    P = np.asarray(s.P, dtype=float)
    phase = np.asarray(s.phase)
    where = f"{c.raw}"
    assert np.all(np.isfinite(P)), where
    assert P.max() <= c.allow_Pa, f"PASS but {P.max():.6g} Pa > allowable {c.allow_Pa}: {where}"
    if c.relief_Pa is not None:
        assert P.max() < c.relief_Pa, f"PASS but relief {c.relief_Pa} reached: {where}"
    if c.fr_kg_m3 is not None:
        assert rho <= c.fr_kg_m3 * (1 + 1e-12), f"PASS above the filling ratio: {where}"
    val = f.validity
    assert P.max() <= val.P_max_Pa and T[0] >= val.T_min_K - 1e-9 and T[-1] <= val.T_max_K, (
        f"PASS with states outside the model's range ({val}): {where}"
    )
    Tc = f.model_critical[0] if c.mixture else f.critical.T
    T_top = float(T[-1])
    if T_top < Tc:
        assert str(phase[-1]) != "liquid", f"PASS but liquid-full at {T_top} K: {where}"
        if not c.mixture:
            sat = f.saturation(T=T_top)
            assert rho < sat.rho_liquid, f"PASS but ρ ≥ ρ_l,sat at {T_top} K: {where}"
            # CoolProp 8.0.0, saturated liquid of the same reference equation at T_top
            rho_l = CP.PropsSI("D", "T", T_top, "Q", 0, COOLPROP[c.gas])
            if abs(rho / rho_l - 1.0) > 1e-6:
                assert rho < rho_l, f"PASS but liquid-full at {T_top} K by CoolProp: {where}"
    if not c.mixture and c.vs_fraction is not None and c.vs_T is not None and c.vs_T < Tc:
        frac = liquid_fraction(f, c.vs_T, rho)
        assert frac <= 1.0 - c.vs_fraction + 1e-12, f"PASS with vapour space {1 - frac}: {where}"
    if "blend" in c.extra:
        check_blend_keeps_its_limits(c, a)
    if not c.mixture:
        # a sample of the grid by CoolProp 8.0.0's evaluation of the same reference equation
        name = COOLPROP[c.gas]
        for i in [*range(0, T.size, 67), T.size - 1]:  # six inner points and the top
            ref = coolprop_pressure(name, float(T[i]), rho)
            if ref is not None:
                assert P[i] == pytest.approx(ref, rel=2e-6), (float(T[i]), rho, where)


# --- invariant (f) -----------------------------------------------------------------------------


def check_blend_keeps_its_limits(c: Case, a: VesselAssessment) -> None:
    """Invariant (f) for a passing blended vessel (module docstring)."""
    r = a.blend
    where = f"{c.raw}"
    assert r is not None and r.error is None, f"PASS without a recipe: {where}"
    f = _public_fluid(c.gas)
    names = list(f.component_names)
    masses = dict.fromkeys(names, 0.0)
    for k, v in r.residual_masses_kg.items():
        masses[k] += v
    assert [s.component for s in r.steps] == list(r.order), where
    for s in r.steps:
        masses[s.component] += s.added_mass_kg
        total = sum(masses.values())
        assert s.cumulative_mass_kg == pytest.approx(total, rel=1e-12), where
        present = {k: m for k, m in masses.items() if m > 0.0}
        moles = {k: m / float(f.molar_masses[names.index(k)]) for k, m in present.items()}
        n = sum(moles.values())
        g = (
            fillcheck.fluid(next(iter(present)))
            if len(present) == 1
            else fillcheck.mixture({k: x / n for k, x in moles.items()})
        )
        st_ = g.state(T=r.temperature_K, rho=total / c.V_m3)
        assert str(st_.phase) not in ("two-phase", "liquid"), (
            f"PASS but step {s.component} holds liquid at the blend temperature: {where}"
        )
        assert s.stop_pressure_Pa == pytest.approx(float(st_.P), rel=1e-6), where
    assert sum(masses.values()) == pytest.approx(a.charged_mass_kg, rel=1e-9), where
    M = f.molar_masses
    x = np.array([masses[k] / float(M[i]) for i, k in enumerate(names)])
    assert np.allclose(x / x.sum(), f.z, rtol=0.0, atol=1e-9), f"recipe makes {x / x.sum()}"


# --- invariant (b) -----------------------------------------------------------------------------


def plan_case(c: Case, m: float) -> Case:
    """The same vessel filled by weight with ``m`` kg, at the same fill temperature (so its
    checked range is the case's)."""
    return with_(c, fill_kind="mass", fill_value=float(m))


def review_explained(c: Case, a: VesselAssessment) -> bool:
    """Whether every review finding is one the plan may carry (module docstring, (b))."""
    f = _public_fluid(c.gas)
    for x in a.findings:
        if x.severity != "review":
            continue
        if x.code not in REVIEW_OK:
            return False
        if x.code == "outside-validity" and a.max_state.pressure_Pa > f.validity.P_max_Pa:
            return False
    return True


def check_plan_passes(c: Case) -> None:
    a = assessed(c)
    plan = a.max_safe_charge_kg
    if plan is None:
        return
    p = plan_case(c, plan)
    b = assess_raw(p.raw)[0]
    found = [(x.code, x.severity) for x in b.findings if x.severity in ("fail", "review")]
    assert b.verdict == "pass" or (b.verdict == "review" and review_explained(p, b)), (
        f"the plan {plan} kg checked as a fill gives {b.verdict}: {found}; {p.raw}"
    )
    assert b.max_safe_charge_kg == plan, "a plan does not depend on the charge"
    if b.verdict == "pass":
        check_pass_is_safe(p, b)


# --- invariant (c) -----------------------------------------------------------------------------


def _plan(c: Case) -> float | None:
    try:
        return assess_raw(c.raw)[0].max_safe_charge_kg
    except InputError:
        return None


@st.composite
def loosenings(draw: st.DrawFn) -> dict[str, float]:
    return {
        "allow": draw(st.floats(0.0005, 0.6)),
        "relief": draw(st.floats(0.0005, 0.6)),
        "fr": draw(st.floats(0.0005, 0.6)),
        "dT": round(draw(st.floats(0.05, 30.0)), 2),
    }


def check_plan_monotone(c: Case, k: dict[str, float]) -> None:
    a = assessed(c)
    p0 = a.max_safe_charge_kg
    f = _public_fluid(c.gas)
    Tc = f.model_critical[0] if c.mixture else f.critical.T
    variants: list[tuple[str, Case]] = []
    allow = _round_P(ATM + (c.allow_Pa - ATM) * (1 + k["allow"]))
    if allow < 1999e5:
        variants.append(("allowable raised", with_(c, allow_Pa=allow)))
    if c.relief_Pa is not None:
        relief = _round_P(ATM + (c.relief_Pa - ATM) * (1 + k["relief"]))
        if relief < 1999e5:
            variants.append(("relief raised", with_(c, relief_Pa=relief)))
    if c.fr_kg_m3 is not None:
        variants.append(
            ("filling ratio raised", with_(c, fr_kg_m3=round(c.fr_kg_m3 * (1 + k["fr"]), 3)))
        )
    T_max = round(c.T_max - k["dT"] - ZERO_C, 2) + ZERO_C
    if T_max >= ZERO_C - 40.0 and (c.T_min is None or T_max > c.T_min):
        v = with_(c, T_max=T_max)
        if c.vs_T is not None and c.vs_T > T_max:
            # the vapour-space temperature kept inside the new range (moving it down loosens
            # that limit too: less liquid at a lower temperature)
            v = with_(v, vs_T=T_max)
        top0, top1 = c.checked_range[1], v.checked_range[1]
        if (top0 < Tc) == (top1 < Tc):  # the deliberate step at Tc, see the module docstring
            variants.append(("top temperature lowered", v))
    for what, v in variants:
        p1 = _plan(v)
        if p0 is None:
            continue
        assert p1 is not None and p1 >= p0 - 1e-9, (
            f"{what}: plan {p0} kg -> {p1} kg; before {c.raw}; after {v.raw}"
        )


# --- invariant (d) -----------------------------------------------------------------------------


def passes_with_margins(c: Case, a: VesselAssessment) -> bool:
    """PASS with every margin above the stated uncertainty (module docstring, (d))."""
    if a.verdict != "pass":
        return False
    u = a.pressure_uncertainty_at_top
    if u is None or not math.isfinite(u):
        return False
    P_top = float(a.max_state.pressure_Pa)
    if (c.allow_Pa - P_top) / c.allow_Pa <= u + PLAN_CLEARANCE:
        return False
    if c.relief_Pa is not None and (c.relief_Pa - P_top) / c.relief_Pa <= (
        u + PLAN_CLEARANCE + RELIEF_CLEARANCE
    ):
        return False
    rho = a.density_kg_m3
    if c.fr_kg_m3 is not None and rho > c.fr_kg_m3:
        return False
    if a.blend is not None and any(s.in_liquid_band for s in a.blend.steps):
        return False
    f = _public_fluid(c.gas)
    T_top = c.checked_range[1]
    Tc = f.model_critical[0] if c.mixture else f.critical.T
    floor = 0.0 if c.vs_fraction is not None else BUILT_IN_VAPOUR_SPACE
    if T_top < Tc:
        if c.mixture:
            lf = a.liquid_fraction_at_top
            if lf is None:
                return True
            # ρ_v ≤ ρ_l/2 in a blend's band at storage temperatures, so reducing ρ_l by u
            # moves the liquid's share by at most 2u of itself
            return lf <= (1.0 - floor) * (1.0 - 2.0 * LIQUID_DENSITY_U_MIXTURE)
        sat = f.saturation(T=T_top)
        rl = sat.rho_liquid * (1.0 - LIQUID_DENSITY_U_PURE)
        if rho > sat.rho_vapor + (1.0 - floor) * (rl - sat.rho_vapor):
            return False
    return True


def check_no_passing_charge_above_plan(c: Case, steps: list[float]) -> None:
    a = assessed(c)
    plan = a.max_safe_charge_kg
    cands = [(c, a)]
    base = plan if plan is not None else 0.0
    for s in steps:
        m = round(base + PLAN_ROUNDING_KG + max(base, 0.05) * s, 6)
        v = plan_case(c, m)
        try:
            cands.append((v, assess_scenario(scenario_from_dict(v.raw, "d.toml")).vessels[0]))
        except (InputError, ConvergenceError):  # e.g. more than the vessel can hold as liquid
            continue
    event(f"plan governed by {a.governing_limit}")
    for i, (v, b) in enumerate(cands):
        event(f"{'random charge' if i == 0 else 'above the plan'}: {b.verdict}")
        if passes_with_margins(v, b):
            event(f"{'random charge' if i == 0 else 'above the plan'}: passes with margins")
            m = b.charged_mass_kg
            assert plan is not None and m <= plan + PLAN_ROUNDING_KG + 1e-9, (
                f"{m} kg passes with every margin above the model's uncertainty "
                f"(u = {b.pressure_uncertainty_at_top:.4g}, top {b.max_state.pressure_Pa:.6g} Pa"
                f") but the plan is {plan} kg ({a.governing_limit}): {v.raw}"
            )


# --- invariant (e) -----------------------------------------------------------------------------


def _same(x: Any, y: Any, path: str, t_tol: float) -> None:
    if isinstance(x, dict):
        assert isinstance(y, dict) and x.keys() == y.keys(), path
        for k in x:
            if k != "id":
                _same(x[k], y[k], f"{path}.{k}", t_tol)
    elif isinstance(x, list):
        assert isinstance(y, list) and len(x) == len(y), path
        for i, (p, q) in enumerate(zip(x, y, strict=True)):
            _same(p, q, f"{path}[{i}]", t_tol)
    elif isinstance(x, float) and isinstance(y, float):
        tol = t_tol if path.endswith("_K") else 0.0
        assert math.isclose(x, y, rel_tol=1e-9, abs_tol=tol) or (math.isnan(x) and math.isnan(y)), (
            f"{path}: alone {x!r}, among {BATCH}: {y!r}"
        )
    elif path.endswith(".message"):
        return  # the words carry numbers rounded for display; codes and numbers are compared
    else:
        assert x == y, f"{path}: alone {x!r}, among {BATCH}: {y!r}"


def check_batch_independent(c: Case, fractions: list[float]) -> None:
    alone = assessed(c)
    rho0 = alone.density_kg_m3
    others = []
    for i, q in enumerate(fractions):
        other = with_(c, fill_kind="mass", fill_value=round(rho0 * c.V_m3 * q, 6))
        others.append(vessel_raw(other, f"N{i:02d}"))
    raw = scenario_raw(c, [vessel_raw(c), *others])
    try:
        among = assess_raw(raw)[0]
    except InputError:
        reject()
    assert [(x.code, x.severity) for x in alone.findings] == [
        (x.code, x.severity) for x in among.findings
    ], f"findings differ alone and among {BATCH}: {c.raw}"
    t_tol = 2e-3 if c.mixture else 2e-6
    _same(vessel_dict(alone), vessel_dict(among), "vessel", t_tol)


# --- the properties ----------------------------------------------------------------------------

COMMON = {
    "deadline": None,
    "database": None,
    "suppress_health_check": [HealthCheck.too_slow, HealthCheck.filter_too_much],
}


def _default(n: int) -> Any:
    return settings(max_examples=n, derandomize=True, **COMMON)


def _slow(n: int) -> Any:
    """The slow sweep's share ``n`` of the 10,000 scenarios, or one shard of it: with
    ``FILLCHECK_SWEEP_SHARDS=S`` each run draws ⌈n/S⌉, and ``--hypothesis-seed=k`` makes shard k
    its own draw (tools/slow_sweep.py runs the shards and keeps the tally)."""
    shards = max(1, int(os.environ.get("FILLCHECK_SWEEP_SHARDS", "1")))
    return settings(max_examples=math.ceil(n / shards), derandomize=False, **COMMON)


def _batch_fractions() -> st.SearchStrategy[list[float]]:
    return st.lists(st.floats(0.05, 1.1), min_size=BATCH - 1, max_size=BATCH - 1)


def _steps() -> st.SearchStrategy[list[float]]:
    return st.lists(st.floats(0.0, 0.25), min_size=3, max_size=3)


# (a) PASS is safe on an independent grid
@_default(100)
@given(any_case())
def test_pass_is_safe(c: Case) -> None:
    check_pass_is_safe(c)


@_default(3)
@given(mixture_cases(blends=False))
def test_pass_is_safe_mixtures(c: Case) -> None:
    check_pass_is_safe(c)


# (b) the plan, followed by weight, passes
@_default(60)
@given(any_case())
def test_plan_passes(c: Case) -> None:
    check_plan_passes(c)


@_default(2)
@given(mixture_cases(blends=False))
def test_plan_passes_mixtures(c: Case) -> None:
    check_plan_passes(c)


# (c) the plan never shrinks when a limit is loosened or the top temperature lowered
@_default(40)
@given(any_case(), loosenings())
def test_plan_monotone(c: Case, k: dict[str, float]) -> None:
    check_plan_monotone(c, k)


# (d) no charge passing with margins above the uncertainty exceeds the plan
@_default(60)
@given(any_case(), _steps())
def test_no_passing_charge_above_plan(c: Case, steps: list[float]) -> None:
    check_no_passing_charge_above_plan(c, steps)


# (e) findings alone and among 60 vessels of the gas
@_default(20)
@given(any_case(), _batch_fractions())
def test_batch_independent(c: Case, fractions: list[float]) -> None:
    check_batch_independent(c, fractions)


# --- 10,000 scenarios: python -m pytest -m slow tests/test_safety_invariants.py ----------------


def _mixed() -> st.SearchStrategy[Case]:
    # one scenario in twenty a mixture (each costs about a second to assess)
    return st.one_of(*([permanent_cases(), liquefied_cases()] * 19), *([mixture_cases()] * 2))


@pytest.mark.slow
@_slow(3000)
@given(_mixed())
def test_pass_is_safe_slow(c: Case) -> None:
    check_pass_is_safe(c)


@pytest.mark.slow
@_slow(2500)
@given(_mixed())
def test_plan_passes_slow(c: Case) -> None:
    check_plan_passes(c)


@pytest.mark.slow
@_slow(2000)
@given(_mixed(), loosenings())
def test_plan_monotone_slow(c: Case, k: dict[str, float]) -> None:
    check_plan_monotone(c, k)


@pytest.mark.slow
@_slow(2000)
@given(_mixed(), _steps())
def test_no_passing_charge_above_plan_slow(c: Case, steps: list[float]) -> None:
    check_no_passing_charge_above_plan(c, steps)


@pytest.mark.slow
@_slow(500)
@given(any_case(), _batch_fractions())
def test_batch_independent_slow(c: Case, fractions: list[float]) -> None:
    check_batch_independent(c, fractions)


# --- every plausible scenario completes ----------------------------------------------------------


@st.composite
def near_critical_cases(draw: st.DrawFn) -> Case:
    """A pure gas charged within 1 % of its critical density (a 300 bar nitrogen cylinder at
    15 °C holds about 320 kg/m³, its critical density is 313.3 kg/m³)."""
    c = draw(st.one_of(permanent_cases(), liquefied_cases()))
    rho_c = _public_fluid(c.gas).critical.rho
    rho = round(rho_c * (1.0 + draw(st.floats(-0.01, 0.01))), 4)
    c.fill_kind, c.fill_value = "filling_ratio", rho
    c.fr_kg_m3 = None if c.fr_kg_m3 is None else max(c.fr_kg_m3, rho)
    c.raw = scenario_raw(c)
    return c


@_default(30)
@given(st.one_of(any_case(), near_critical_cases()))
def test_assessment_completes(c: Case) -> None:
    try:
        assess_raw(c.raw, complete=True)
    except InputError:
        reject()


# --- defects found by the properties, now mended (minimal scenarios) -------------------------


def _one(gas: str, V: str, fill: dict[str, str], storage: dict[str, str], limits: dict[str, Any]):
    raw = {
        "vessel": [
            {
                "id": "V1",
                "gas": gas,
                "water_capacity": V,
                "fill": fill,
                "storage": storage,
                "limits": limits,
            }
        ]
    }
    return assess_raw(raw, complete=True)[0]


def test_plan_with_own_vapour_space_passes() -> None:
    # CO2 at 0 °C (CoolProp 8.0.0, the Span–Wagner equation): ρ_l = 927.43 kg/m³,
    # ρ_v = 97.647 kg/m³, so 87.5 % liquid in 10 L is 8.2371 kg; the plan keeps the liquid
    # density's 0.2 % uncertainty as well (8.22 kg), so the check of it does not review it
    storage = {"max_temperature": "0 degC"}
    limits = {
        "allowable_pressure": "100 barg",
        "min_vapour_space": 0.125,
        "vapour_space_temperature": "0 degC",
    }
    first = _one("carbon dioxide", "10 L", {"mass": "5 kg"}, storage, limits)
    plan = first.max_safe_charge_kg
    assert plan == pytest.approx(8.23, abs=0.01)
    a = _one("carbon dioxide", "10 L", {"mass": f"{plan!r} kg"}, storage, limits)
    assert a.verdict == "pass", [(x.code, x.severity) for x in a.findings]


def test_near_critical_density_completes() -> None:
    # nitrogen's critical density is 313.3 kg/m³ (Span et al. 2000, as in CoolProp 8.0.0);
    # 313.0 kg/m³ is 290 bar at 5 °C (CoolProp 8.0.0: P(278.15 K, 313 kg/m³) = 289.87 bar),
    # an everyday 300 bar cylinder
    a = _one(
        "nitrogen",
        "1 L",
        {"filling_ratio": "313.0 kg/m3"},
        {"max_temperature": "40 degC"},
        {"allowable_pressure": "450 barg"},
    )
    assert a.verdict in ("pass", "fail", "review")


def test_blend_temperature_joins_the_checked_range() -> None:
    # argon 89.5 % + carbon dioxide 10.5 % (mol) blended at 25.7 °C into 1 L stored at most at
    # 0 °C: the plan once kept the model's 350 bar range up to 15 °C only, so its last blend
    # step stopped above the range at 25.7 °C and the plan followed asked for review
    # (blend-outside-model-range); the blend temperature is a state of the vessel now
    raw = {
        "vessel": [
            {
                "id": "V1",
                "gas": {"argon": 0.895, "carbon dioxide": 0.105},
                "water_capacity": "1.0 L",
                "fill": {"mass": "0.330144 kg"},
                "storage": {"max_temperature": "0.00 degC"},
                "limits": {"allowable_pressure": "394.4185 barg"},
                "blend": {"temperature": "25.70 degC"},
            }
        ]
    }
    plan = assess_raw(raw, complete=True)[0].max_safe_charge_kg
    raw["vessel"][0]["fill"] = {"mass": f"{plan!r} kg"}
    b = assess_raw(raw, complete=True)[0]
    assert b.verdict == "pass", [(x.code, x.severity) for x in b.findings]
    assert b.max_state.temperature_K == pytest.approx(ZERO_C + 25.7)
    assert max(s.stop_pressure_Pa for s in b.blend.steps) <= 350e5


def test_a_blend_step_in_its_liquid_band_is_no_margin() -> None:
    # found by the slow sweep (invariant (d)): nitrogen 60 % + carbon dioxide 40 % (mol),
    # carbon dioxide first, blended at 0 °C into 4.195 L. A charge of 0.717 kg passes with
    # blend-step-near-dew (its carbon dioxide step stops inside the liquid band: the pressure
    # is no way to stop it, weigh it) while the plan, 0.67 kg, keeps every step below the band.
    # Inside the band is inside the blend limit's margin, so that charge does not count as
    # passing with margins; the plan followed passes without the warning.
    raw = {
        "vessel": [
            {
                "id": "V1",
                "gas": {"nitrogen": 0.6, "carbon dioxide": 0.4},
                "water_capacity": "4.195 L",
                "fill": {"mass": "0.717115 kg", "temperature": "0.00 degC"},
                "storage": {"max_temperature": "38.39 degC", "min_temperature": "18.25 degC"},
                "limits": {
                    "allowable_pressure": "148.5775 barg",
                    "max_filling_ratio": "386.482 kg/m3",
                },
                "blend": {"temperature": "0.00 degC", "order": ["carbon dioxide", "nitrogen"]},
            }
        ]
    }
    a = assess_raw(raw, complete=True)[0]
    assert a.verdict == "pass"
    assert [f.code for f in a.findings if f.severity == "warning"] == ["blend-step-near-dew"]
    plan = a.max_safe_charge_kg
    assert plan is not None and plan < 0.717115 - PLAN_ROUNDING_KG
    raw["vessel"][0]["fill"]["mass"] = f"{plan!r} kg"
    b = assess_raw(raw, complete=True)[0]
    assert b.verdict == "pass"
    assert not any(s.in_liquid_band for s in b.blend.steps)
