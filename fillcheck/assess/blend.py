"""A recipe for preparing a mixture in the vessel, step by step, as data (INTERFACES.md §7).

The components go in one after another. After each step the vessel holds the residual gas and
the components added so far; that content, at the vessel's volume, gives by the vessel's
mixture model (the same model form and parameters as the vessel's own check) the pressure to
stop the step at for the stated blend temperature, and whether the content holds liquid there
(a fixed-volume phase split: :mod:`fillcheck.thermo.mixture_vessel`) and at the lowest storage
temperature. A stop pressure within the gauge's and the thermometer's error of the content's
dew pressure (the liquid band of :mod:`fillcheck.thermo.liquid_band`, the rule every command
uses) does not tell the amount in either: such a step is weighed, and the plan keeps every step
out of the band. Beside it is what an ideal-gas partial-pressure recipe says: the final pressure
times the share of the final amount in after the step (Dalton's law), n_k/n · P_final.

The content after a step depends on which components are in, not on the order they went in, so
each set of components is computed once and every order (at most
:data:`PERMUTED_COMPONENTS_MAX` components) is scored from the same states.

Tolerance of the final mole fractions (first-order propagation, JCGM 100:2008 "GUM" §5.1):
- by weight: each scale reading has the standard uncertainty r/√12 (a rectangular
  distribution over one resolution step r, GUM §4.3.7 and F.2.2.1), readings independent;
- by pressure: each stop-pressure reading has a/√3 of its gauge reading (an error limit ±a of
  the reading, rectangular, GUM §4.3.7); the amount after step k is V·ρ(T, P_k; z_k) with the
  content's composition z_k held at its value (its change with the reading is second order in
  the step's share), so ∂n_k/∂P_k = V/(∂P/∂ρ)_T,z.
The gravimetric preparation of calibration gas mixtures is ISO 6142-1:2015 (cited from memory),
which works the composition's uncertainty from the weighings in the same first-order way.
"""

from __future__ import annotations

import itertools
import math
from dataclasses import dataclass, field
from typing import Any

import numpy as np

from fillcheck.assess.cautions import Caution
from fillcheck.assess.result import Finding
from fillcheck.errors import FillcheckError
from fillcheck.thermo.fluid import Fluid
from fillcheck.thermo.liquid_band import in_liquid_band, liquid_band_floor
from fillcheck.thermo.mixture_fluid import MixtureFluid
from fillcheck.thermo.vessel import vessel_path

PERMUTED_COMPONENTS_MAX = 4
"""Orders are searched over every permutation up to this many components."""
TABLE_FROM_K = 263.15
TABLE_TO_K = 313.15
TABLE_STEP_K = 5.0
"""The stop-pressure table's gas temperatures [K]: −10 °C to 40 °C by 5 K."""
DRHO_REL = 1e-5
"""Relative density step of the central difference giving (∂P/∂ρ)_T [-]."""
LIQUID_PHASES = ("two-phase", "liquid")


@dataclass(frozen=True)
class Content:
    """The vessel's content after a set of components is in: amounts [mol] per component,
    the state at the blend temperature and (optionally) the coldest storage temperature."""

    amounts_mol: np.ndarray
    stop_pressure_Pa: float
    dP_drho: float
    liquid: bool
    liquid_cold: bool | None
    table_P_Pa: np.ndarray
    table_liquid: np.ndarray
    in_band: bool = False
    """Gas at the blend temperature, but its stop pressure lies in the liquid band."""


@dataclass
class BlendStep:
    """One step: the component added, its mass [kg], the content's mass after it [kg], the
    stop pressures [Pa abs] (real and ideal gas), liquid at the blend and coldest temperatures,
    the gross scale reading [kg] where a tare is known, and the stop pressure by gas
    temperature (``table_P_Pa`` [Pa abs] at :attr:`BlendRecipe.table_T_K`, NaN where the
    content holds liquid)."""

    component: str
    added_mass_kg: float
    cumulative_mass_kg: float
    stop_pressure_Pa: float
    ideal_stop_pressure_Pa: float
    liquid_present: bool
    liquid_present_cold: bool | None
    scale_reading_kg: float | None
    table_P_Pa: np.ndarray
    in_model_range: bool = True
    in_liquid_band: bool = False
    """The content is gas at the blend temperature but its stop pressure lies within the
    gauge's and the thermometer's error of its dew pressure (thermo.liquid_band): weigh it."""


@dataclass
class BlendRecipe:
    """The recipe of one vessel as data (SI), for report/blend_section."""

    order: tuple[str, ...]
    order_given: bool
    temperature_K: float
    cold_temperature_K: float | None
    residual_mass_kg: float
    residual_masses_kg: dict[str, float]
    steps: list[BlendStep]
    suggested_order: tuple[str, ...] | None
    """An order without condensing steps where the entered one has them (None otherwise)."""
    table_T_K: np.ndarray
    mole_fractions: dict[str, float]
    u_by_weight: dict[str, float]
    """Standard uncertainty of each final mole fraction from the scale [-]."""
    u_by_pressure: dict[str, float] | None
    """The same from the gauge (None where a step's content holds liquid) [-]."""
    scale_resolution_kg: float
    gauge_accuracy: float
    default_scale: bool
    default_gauge: bool
    model: str
    error: str | None = None
    cautions: list[Caution] = field(default_factory=list)


def _content_fluid(f: MixtureFluid, present: np.ndarray, n: np.ndarray) -> Any:
    idx = np.flatnonzero(present)
    if idx.size == 1:  # one gas: its reference equation, or the same cubic as the mixture's
        return Fluid(f.components[idx[0]], None if f.model == "reference" else f.model)
    z = n[idx] / n[idx].sum()
    return MixtureFluid([f.components[i] for i in idx], z, f.model)


def _evaluate(
    f: MixtureFluid, n: np.ndarray, V: float, T: float, T_cold: float | None, T_tab: np.ndarray
) -> Content:
    """The content of amounts n [mol] in V [m³] at T [K] (and T_cold, and the table)."""
    present = n > 0.0
    g = _content_fluid(f, present, n)
    rho = float(n.sum()) / V
    Ts = [T, T, T] + ([] if T_cold is None else [T_cold]) + list(T_tab)
    rhos = np.full(len(Ts), rho)
    rhos[1], rhos[2] = rho * (1.0 + DRHO_REL), rho * (1.0 - DRHO_REL)
    path = vessel_path(g, np.array(Ts), rhos)
    liquid = np.isin(path.phase, LIQUID_PHASES)
    k = 3 if T_cold is None else 4
    # the table marks the band of a single gas too (as stop-table does); a mixture content's
    # band is found at the blend temperature only (a dew-pressure search per temperature)
    weigh = liquid[k:].copy()
    if not getattr(g, "is_mixture", False):
        weigh |= in_liquid_band(g, np.asarray(T_tab, dtype=float), path.P[k:])
    return Content(
        amounts_mol=n,
        stop_pressure_Pa=float(path.P[0]),
        dP_drho=float((path.P[1] - path.P[2]) / (2.0 * rho * DRHO_REL)),
        liquid=bool(liquid[0]),
        liquid_cold=None if T_cold is None else bool(liquid[3]),
        table_P_Pa=np.where(weigh, np.nan, path.P[k:]),
        table_liquid=liquid[k:],
        in_band=bool(not liquid[0] and path.P[0] >= band_floor(g, T)),
    )


_FLOORS: dict[tuple[object, ...], float] = {}


def band_floor(g: Any, T: float) -> float:
    """The liquid band's lower end [Pa abs] for a step's content ``g`` read at T [K]
    (thermo.liquid_band; +inf where no liquid can form within the thermometer's error).
    Kept per content composition and temperature: the steps of an evacuated vessel have the
    same compositions whatever the charge."""
    key = (
        tuple(getattr(g, "component_names", (g.name,))),
        tuple(np.round(np.atleast_1d(getattr(g, "z", 1.0)), 14)),
        g.model,
        round(float(T), 9),
    )
    if key not in _FLOORS:
        if len(_FLOORS) > 4096:
            _FLOORS.clear()
        _FLOORS[key] = float(liquid_band_floor(g, np.array([float(T)]))[0][0])
    return _FLOORS[key]


def residual_amounts(f: MixtureFluid, residual: Any, V: float) -> np.ndarray:
    """Amounts [mol] per component of the residual gas in V [m³] (zero without one)."""
    n = np.zeros(f.z.size)
    if residual is None or residual.pressure_Pa <= 0.0:
        return n
    if residual.gas is None:
        rho = float(f.density_molar(residual.temperature_K, residual.pressure_Pa))
        return rho * V * f.z
    i = f.component_names.index(residual.gas)
    g = Fluid(f.components[i], None)
    n[i] = float(g.density_molar(residual.temperature_K, residual.pressure_Pa)) * V
    return n


def default_order(f: MixtureFluid) -> tuple[str, ...]:
    """The most easily liquefied component first (highest critical temperature), while the
    vessel's pressure is lowest and its supply can still push it in (common practice, no
    source)."""
    Tc = [c.critical_temperature_K for c in f.components]
    return tuple(f.component_names[i] for i in np.argsort(Tc)[::-1])


def mole_fraction_jacobian(N: np.ndarray, dN: np.ndarray) -> np.ndarray:
    """∂x_i/∂q_k for x_i = N_i/ΣN given ∂N_j/∂q_k = dN[j, k] [mol per unit of q]."""
    S = float(N.sum())
    x = N / S
    return (dN - x[:, None] * dN.sum(axis=0)[None, :]) / S


def weighing_jacobian(N: np.ndarray, steps_of: list[int], M: np.ndarray) -> np.ndarray:
    """∂x_i/∂R_k [1/kg] for the scale readings R_0 (before the first step) … R_n.

    Component ``i`` is added in step ``steps_of[i]`` (1-based), its amount being
    residual + (R_s − R_{s−1})/M_i."""
    n = len(steps_of)
    dN = np.zeros((n, n + 1))
    for i, s in enumerate(steps_of):
        dN[i, s] += 1.0 / M[i]
        dN[i, s - 1] -= 1.0 / M[i]
    return mole_fraction_jacobian(N, dN)


def pressure_jacobian(steps_of: list[int], dntot_dP: np.ndarray, N: np.ndarray) -> np.ndarray:
    """∂x_i/∂P_k [1/Pa] for the stop-pressure readings P_1 … P_n, where the content's total
    amount after step k has ∂n_k/∂P_k = dntot_dP[k−1] [mol/Pa] and component ``i`` (added in
    step s) has the amount residual + n_s − n_{s−1}."""
    n = len(steps_of)
    dN = np.zeros((n, n))
    for i, s in enumerate(steps_of):
        dN[i, s - 1] += dntot_dP[s - 1]
        if s >= 2:
            dN[i, s - 2] -= dntot_dP[s - 2]
    return mole_fraction_jacobian(N, dN)


def _score(contents: list[Content]) -> tuple[int, int]:
    """Steps that cannot be stopped by pressure (liquid, or in the liquid band) at the blend
    temperature, then steps that would hold liquid in the cold: the fewer the better."""
    return (
        sum(c.liquid or c.in_band for c in contents),
        sum(bool(c.liquid_cold) for c in contents),
    )


def blend_recipe(v: Any, charged_mass_kg: float) -> BlendRecipe:
    """The recipe for vessel ``v`` (a VesselInput with ``blend``) charged with
    ``charged_mass_kg`` [kg] of its mixture."""
    b = v.blend
    f: MixtureFluid = v.fluid
    V = v.water_capacity_m3
    names = list(f.component_names)
    M = f.molar_masses
    target = charged_mass_kg / f.molar_mass * f.z  # [mol] per component
    res = residual_amounts(f, b.residual, V)
    T, T_cold = b.temperature_K, v.min_temperature_K
    T_tab = np.arange(TABLE_FROM_K, TABLE_TO_K + 1e-9, TABLE_STEP_K)
    cache: dict[frozenset[int], Content] = {}

    def content(done: frozenset[int]) -> Content:
        if done not in cache:
            n = res.copy()
            for i in done:
                n[i] = max(target[i], res[i])
            cache[done] = _evaluate(f, n, V, T, T_cold, T_tab)
        return cache[done]

    def contents_of(order: tuple[str, ...]) -> list[Content]:
        idx = [names.index(c) for c in order]
        return [content(frozenset(idx[: k + 1])) for k in range(len(idx))]

    preferred = b.order or default_order(f)
    candidates = [preferred]
    if len(names) <= PERMUTED_COMPONENTS_MAX:
        candidates += [p for p in itertools.permutations(names) if p != preferred]
    res_mass = res * M
    base = dict(
        temperature_K=T,
        cold_temperature_K=T_cold,
        residual_mass_kg=float(res_mass.sum()),
        residual_masses_kg={c: float(m) for c, m in zip(names, res_mass, strict=True)},
        table_T_K=T_tab,
        mole_fractions={c: float(x) for c, x in zip(names, f.z, strict=True)},
        scale_resolution_kg=b.scale_resolution_kg,
        gauge_accuracy=b.gauge_accuracy,
        default_scale=b.default_scale,
        default_gauge=b.default_gauge,
        model=f.model,
    )
    try:
        chosen = contents_of(preferred)
        best, best_score = preferred, _score(chosen)
        if best_score != (0, 0):
            for p in candidates[1:]:
                s = _score(contents_of(p))
                if s < best_score:
                    best, best_score = p, s
                if s == (0, 0):
                    break
    except FillcheckError as exc:
        return BlendRecipe(
            order=preferred,
            order_given=b.order is not None,
            steps=[],
            suggested_order=None,
            u_by_weight={},
            u_by_pressure=None,
            error=str(exc),
            **base,
        )
    order = preferred if b.order is not None else best
    suggested = best if (b.order is not None and best != preferred) else None
    cs = contents_of(order)
    N = np.maximum(target, res)
    P_final = cs[-1].stop_pressure_Pa
    steps: list[BlendStep] = []
    for comp, c in zip(order, cs, strict=True):
        i = names.index(comp)
        mass = float(c.amounts_mol @ M)
        steps.append(
            BlendStep(
                component=comp,
                added_mass_kg=float((target[i] - res[i]) * M[i]),
                cumulative_mass_kg=mass,
                stop_pressure_Pa=c.stop_pressure_Pa,
                ideal_stop_pressure_Pa=float(c.amounts_mol.sum() / N.sum()) * P_final,
                liquid_present=c.liquid,
                liquid_present_cold=c.liquid_cold,
                scale_reading_kg=None if b.tare_mass_kg is None else b.tare_mass_kg + mass,
                # a step the residual already exceeds is not made: no pressure to stop it at
                table_P_Pa=c.table_P_Pa if target[i] >= res[i] else np.full(T_tab.size, np.nan),
                in_model_range=bool(f.validity.contains(T, c.stop_pressure_Pa)),
                in_liquid_band=c.in_band,
            )
        )
    supplies = supply_cautions(
        f, [(s.component, s.added_mass_kg, s.stop_pressure_Pa) for s in steps], T
    )
    if suggested is not None:  # the order the findings point to must say so too
        added = {c: float((target[i] - res[i]) * M[i]) for i, c in enumerate(names)}
        made = zip(suggested, contents_of(suggested), strict=True)
        supplies += supply_cautions(
            f, [(c, added[c], x.stop_pressure_Pa) for c, x in made], T, suggested=True
        )
    steps_of = [order.index(c) + 1 for c in names]
    u_R = b.scale_resolution_kg / math.sqrt(12.0)
    Jw = weighing_jacobian(N, steps_of, M)
    u_w = np.sqrt(((Jw * u_R) ** 2).sum(axis=1))
    u_p = None
    if not any(c.liquid for c in cs) and all(c.dP_drho > 0.0 for c in cs):
        dn_dP = np.array([V / c.dP_drho for c in cs])
        Jp = pressure_jacobian(steps_of, dn_dP, N)
        u_P = (
            b.gauge_accuracy
            * np.array([c.stop_pressure_Pa - v.atmospheric_pressure_Pa for c in cs])
            / math.sqrt(3.0)
        )
        u_pp = np.sqrt(((Jp * np.abs(u_P)[None, :]) ** 2).sum(axis=1))
        u_p = {c: float(u) for c, u in zip(names, u_pp, strict=True)}
    return BlendRecipe(
        order=order,
        order_given=b.order is not None,
        steps=steps,
        suggested_order=suggested,
        u_by_weight={c: float(u) for c, u in zip(names, u_w, strict=True)},
        u_by_pressure=u_p,
        cautions=blend_cautions(f, order) + supplies,
        **base,
    )


def blend_cautions(f: MixtureFluid, order: tuple[str, ...]) -> list[Caution]:
    """Cautions of the blending itself: an oxidizing component compressed through valves
    (adiabatic compression heating; oxygen service), and a flammable component added to a
    vessel already holding an oxidizer."""
    hazards = {c.name: c.hazards for c in f.components}
    out: list[Caution] = []
    oxidizers = [c for c in order if "oxidizing" in hazards[c]]
    if oxidizers:
        out.append(Caution("blend-oxidizer-compression", {"components": oxidizers}))
    for k, c in enumerate(order):
        before = [o for o in order[:k] if "oxidizing" in hazards[o]]
        if "flammable" in hazards[c] and before:
            out.append(
                Caution(
                    "blend-flammable-into-oxidizer",
                    {"step": k + 1, "component": c, "oxidizers": before},
                )
            )
    return out


def supply_cautions(
    f: MixtureFluid,
    steps: list[tuple[str, float, float]],
    T: float,
    suggested: bool = False,
) -> list[Caution]:
    """Steps (component, added mass [kg], stop pressure [Pa abs]) that add a gas which is
    liquefied at the blend temperature T [K] and stop above that gas's vapour pressure there: a
    supply cylinder of it at T stands at most at its vapour pressure, so it cannot be decanted
    in to the stop pressure (it needs a booster or a liquid pump, or an earlier place in the
    order). ``suggested`` marks the steps of a suggested order, not the entered one. Common
    practice, no source; the vapour pressure is the component's own model (its reference
    equation, or the mixture's cubic)."""
    out: list[Caution] = []
    names = list(f.component_names)
    model = None if f.model == "reference" else f.model
    for k, (comp, added, stop) in enumerate(steps, start=1):
        if added <= 0.0 or not math.isfinite(stop):
            continue
        g = Fluid(f.components[names.index(comp)], model)
        if not (g.T_min_saturation <= T < g.model_critical[0]):
            continue
        P_sat = float(g.saturation_molar(np.array([T])).P[0])
        if stop > P_sat:
            facts: dict[str, object] = {"step": k, "component": comp, "vapour_pressure_Pa": P_sat}
            if suggested:
                facts["suggested_order"] = True
            out.append(Caution("blend-supply-below-stop", facts))
    return out


def blend_findings(r: BlendRecipe) -> list[Finding]:
    """The recipe's findings as data: a step whose content holds liquid at the blend
    temperature fails; one that does in the coldest storage only warns; a residual holding
    more of a component than the target fails; a step stopping outside the model's range and a
    recipe not computed ask for review."""
    out: list[Finding] = []
    if r.error is not None:
        return [Finding("blend-not-computed", "review", "", {"error": r.error})]
    for k, s in enumerate(r.steps, start=1):
        data = {"step": k, "component": s.component, "temperature_K": r.temperature_K}
        if r.suggested_order is not None:
            data["suggested_order"] = list(r.suggested_order)
        if s.liquid_present:
            out.append(Finding("blend-step-condenses", "fail", "", data))
        if s.in_liquid_band:
            out.append(
                Finding(
                    "blend-step-near-dew",
                    "warning",
                    "",
                    {**data, "pressure_Pa": s.stop_pressure_Pa},
                )
            )
        if s.liquid_present_cold:
            out.append(
                Finding(
                    "blend-step-condenses-cold",
                    "warning",
                    "",
                    {**data, "temperature_K": r.cold_temperature_K},
                )
            )
        if not s.in_model_range:
            out.append(
                Finding(
                    "blend-outside-model-range",
                    "review",
                    "",
                    {
                        "step": k,
                        "pressure_Pa": s.stop_pressure_Pa,
                        "temperature_K": r.temperature_K,
                    },
                )
            )
        if s.added_mass_kg < 0.0:
            out.append(
                Finding(
                    "blend-residual-exceeds",
                    "fail",
                    "",
                    {"component": s.component, "excess_kg": -s.added_mass_kg},
                )
            )
    return out


BLEND_PLAN_LIMIT = "the blend recipe (every step clear of its dew point at the blend temperature)"
"""The name of the limit a blend puts on the plan, as reports show it."""

_PLAN_BISECTIONS = 14
"""Halvings of the charge bracket when the blend bounds the plan (2⁻¹⁴ of the plan: about a
gram in 20 kg, below PLAN_RESOLUTION_KG)."""
_PLAN_GRID = 24
"""Charges tried at once per round of the batched search for the blend's bound."""


def _blend_fails(v: Any, charge_kg: float) -> bool:
    """True where the recipe for ``charge_kg`` [kg] cannot be computed, or a step holds liquid
    at the blend temperature (the ``blend-step-condenses`` failure) or stops in the liquid band
    (``blend-step-near-dew``: the plan keeps the thermometer's and the gauge's margin)."""
    return _fails(blend_recipe(v, charge_kg))


def _fails(r: BlendRecipe) -> bool:
    return r.error is not None or any(s.liquid_present or s.in_liquid_band for s in r.steps)


def blend_bounded_plan(v: Any, plan_kg: float | None, resolution_kg: float) -> float | None:
    """The largest charge [kg] not above ``plan_kg`` whose recipe keeps every step gas at the
    blend temperature, its stop pressure below the liquid band, rounded down to
    ``resolution_kg``; None where no charge does.

    A step condenses once its contents are denser than their dew density, so the failing
    charges lie above one bound. Without residual contents each step's composition is the same
    for every charge, and the bound is bracketed on grids of charges evaluated together; with
    them, by bisection. Either way the charge returned is one whose full recipe was computed
    not to condense (a plan followed keeps its blend)."""
    if plan_kg is None:
        return None
    at_plan = blend_recipe(v, plan_kg)
    if any(s.added_mass_kg < 0.0 for s in at_plan.steps):
        # the residual already holds more of a component than the plan's charge asks for, and
        # a smaller charge asks for less still: no charge within the limits can be made from it
        return None
    if not _fails(at_plan):
        return plan_kg
    lo = _gas_bound_batched(v, plan_kg, resolution_kg)
    if lo is None:
        lo, hi = 0.0, plan_kg
        for _ in range(_PLAN_BISECTIONS):
            mid = 0.5 * (lo + hi)
            lo, hi = (mid, hi) if not _blend_fails(v, mid) else (lo, mid)
    out = math.floor(lo / resolution_kg + 1e-9) * resolution_kg
    for _ in range(3):  # the full recipe is the judge; step down where it disagrees at the edge
        if out <= 0.0:
            return None
        if not _blend_fails(v, out):
            return out
        out -= resolution_kg
    return None


def _recipe_orders(v: Any) -> list[tuple[str, ...]]:
    """The orders blend_recipe may take: the given one; or, where none is given, the preferred
    one and (up to PERMUTED_COMPONENTS_MAX components) every other."""
    f: MixtureFluid = v.fluid
    preferred = v.blend.order or default_order(f)
    if v.blend.order is not None or f.z.size > PERMUTED_COMPONENTS_MAX:
        return [preferred]
    return [preferred, *(p for p in itertools.permutations(f.component_names) if p != preferred)]


def _gas_bound_batched(v: Any, plan_kg: float, resolution_kg: float) -> float | None:
    """The largest charge [kg] of a grid search below ``plan_kg`` for which an order the recipe
    may take keeps every step gas at the blend temperature (0.0: none); None where the search
    does not apply (residual contents, or a state the model cannot give)."""
    if np.any(residual_amounts(v.fluid, v.blend.residual, v.water_capacity_m3) > 0.0):
        return None
    lo, hi = 0.0, plan_kg
    try:
        for _ in range(12):
            grid = np.linspace(lo, hi, _PLAN_GRID + 1)[1:]
            ok = _gas_at_blend_temperature(v, grid)
            if ok.all():  # the batched states disagree with the full recipe at the plan
                return None
            first = int(np.argmin(ok))
            lo, hi = (grid[first - 1] if first > 0 else lo), grid[first]
            if hi - lo < 0.1 * resolution_kg:
                break
    except FillcheckError:
        return None
    return lo


def _gas_at_blend_temperature(v: Any, charges_kg: np.ndarray) -> np.ndarray:
    """Per charge [kg] of an evacuated vessel: True where some order the recipe may take keeps
    every step's contents gas at the blend temperature, each stop pressure below the liquid
    band (the states of blend_recipe's steps)."""
    f: MixtureFluid = v.fluid
    names = list(f.component_names)
    T = np.full(charges_kg.size, v.blend.temperature_K)
    liquid_after: dict[frozenset[int], np.ndarray] = {}
    ok = np.zeros(charges_kg.size, dtype=bool)
    for order in _recipe_orders(v):
        idx = [names.index(c) for c in order]
        liquid = np.zeros(charges_kg.size, dtype=bool)
        for k in range(len(idx)):
            done = frozenset(idx[: k + 1])
            if done not in liquid_after:
                present = np.isin(np.arange(len(names)), sorted(done))
                share = f.z * present  # each component's moles per mole of the full charge
                g = _content_fluid(f, present, share)
                rho = charges_kg / f.molar_mass * float(share.sum()) / v.water_capacity_m3
                path = vessel_path(g, T, rho)
                floor = band_floor(g, float(T[0]))
                liquid_after[done] = np.isin(path.phase, LIQUID_PHASES) | (path.P >= floor)
            liquid |= liquid_after[done]
        ok |= ~liquid
        if ok.all():
            break
    return ok
