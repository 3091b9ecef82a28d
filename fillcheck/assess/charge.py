"""The largest safe charge: the greatest density that keeps every limit over the checked range.

Along a closed vessel's isochore the pressure rises with temperature, and at a fixed temperature
it rises (or, in two phases, stays level) with density. So the pressure limits bind at the top
of the checked range, T_top (the highest of the maximum storage and fill temperatures, see
:mod:`fillcheck.assess.checked_range`). Each limit gives one density bound, on the branch that
physically applies at T_top:

- a pressure limit P_L (allowable, relief setting): the largest ρ with
  P(T_top, ρ) ≤ P_L · (1 − u(ρ) − c), u the model's pressure uncertainty at that state
  (assess.uncertainty) and c a clearance of 0.1 %, so that the plan followed to its printed,
  rounded-down figures passes without a review. Below the critical temperature, where the vapour
  pressure keeps that margin, the limit does not bind before the vessel is liquid-full (the
  vapour-space rule below governs); where it does not, the bound lies on the vapour branch,
  below the saturated vapour density. The uncertainty is applied to the margin on the branch
  that applies, never used to move a target across the vapour pressure, so the bound cannot
  jump between the liquid and the vapour as the limit moves. Above the critical temperature the
  bound is the root of a monotone function of ρ, found by bisection.
- the filling ratio bounds the density directly;
- vapour space: at T_top below the critical temperature the liquid may fill at most 1 − f of
  the vessel, ρ ≤ ρ_v + (1 − f)(ρ_l − ρ_v), with the saturated-liquid density reduced by its
  uncertainty. f is 5 % unless the scenario sets its own `min_vapour_space` (common practice,
  no source; the P200 rule for low-pressure liquefied gases, which keeps the vessel from being
  liquid-full at 50 °C, is its published cousin: UN Model Regulations, packing instruction P200,
  from memory). A scenario's own vapour-space limit applies at its own temperature, and the
  built-in one then keeps the vessel from being liquid-full at T_top;
- the model's validity range: the largest ρ whose pressure at T_top stays inside it;
- a named rule set (assess.rules) adds its own largest densities.

The plan is the least of the bounds, rounded down once to what the reports print
(PLAN_RESOLUTION_KG), and the limit that gives it governs. Each bound is monotone in its limit,
so the plan never shrinks when a limit is loosened.
"""

from __future__ import annotations

import math
from collections.abc import Sequence
from dataclasses import dataclass
from typing import TYPE_CHECKING, Any

import numpy as np

from fillcheck.assess.checked_range import checked_ranges
from fillcheck.assess.markings import marking_bounds
from fillcheck.assess.rules import rule_limits
from fillcheck.assess.uncertainty import pressure_uncertainty
from fillcheck.thermo.bracketed import illinois
from fillcheck.thermo.vessel import vessel_path

if TYPE_CHECKING:
    from fillcheck.scenario.resolve import VesselInput
    from fillcheck.thermo.fluid import Fluid

RELIEF_CLEARANCE = 1e-4
"""Relative clearance below the relief setting [-]: reaching the setting itself fails."""
MAX_UNCERTAINTY = 0.5
"""Largest model uncertainty the planned charge is reduced by [-]."""
SAFETY_CLEARANCE = 1e-3
"""Relative clearance kept below every pressure limit beyond the model's uncertainty [-], so that
a plan followed to its printed (rounded) figures still passes."""
DEFAULT_VAPOUR_SPACE = 0.05
"""Vapour space kept at the top of the checked range where the scenario sets none [-]
(common practice, no source)."""
PLAN_RESOLUTION_KG = 0.01
"""A planned charge is rounded down to this mass [kg], the figure every report prints."""
DENSITY_TOLERANCE = 1e-12
"""Relative width of the density bracket a bound is solved to [-]."""
MIXTURE_TOLERANCE = 1e-6
"""The same for a mixture, each of whose states needs a phase-stability test [-]."""

BUILT_IN_VAPOUR_SPACE = "vapour space at the top of the checked range (built in)"
"""The name of the built-in vapour-space limit, as reports show it."""


@dataclass(frozen=True)
class SafeCharge:
    """The largest safe overall density [mol/m³] and the limit that governs it."""

    density_mol: float
    governing: str


def largest_safe_densities(
    fluid: Fluid, vs: Sequence[VesselInput], T_ref: float, round_down: bool = True
) -> tuple[np.ndarray, list[str | None]]:
    """The greatest overall densities [mol/m³] keeping every limit of each vessel (one gas).

    Returns the densities, rounded down to the planned mass unless ``round_down`` is False
    (NaN where no charge keeps the limits), and the governing limits.
    """
    n = len(vs)
    lim = [v.limits for v in vs]
    T_top = checked_ranges(vs, T_ref)[1]
    inf = np.full(n, np.inf)
    allow = np.array([x.allowable_pressure_Pa for x in lim])
    cands: list[tuple[np.ndarray, str]] = [
        (pressure_bound(fluid, T_top, allow), "allowable pressure")
    ]
    relief = np.array(
        [np.nan if x.relief_set_pressure_Pa is None else x.relief_set_pressure_Pa for x in lim]
    )
    has = ~np.isnan(relief)
    if np.any(has):
        r = inf.copy()
        r[has] = pressure_bound(fluid, T_top[has], relief[has] * (1.0 - RELIEF_CLEARANCE))
        cands.append((r, "relief set pressure"))
    own = np.array([x.min_vapour_space is not None for x in lim])
    floor = np.where(own, 0.0, DEFAULT_VAPOUR_SPACE)
    cands.append((vapour_space_bound(fluid, T_top, floor), BUILT_IN_VAPOUR_SPACE))
    fr = np.array(
        [np.inf if x.max_filling_ratio_kg_m3 is None else x.max_filling_ratio_kg_m3 for x in lim]
    )
    cands.append((fr / fluid.molar_mass, "maximum filling ratio"))
    Tv = np.array(
        [
            np.nan if x.vapour_space_temperature_K is None else x.vapour_space_temperature_K
            for x in lim
        ]
    )
    if np.any(own):
        r = inf.copy()
        frac = np.array([x.min_vapour_space or 0.0 for x in lim])
        r[own] = vapour_space_bound(fluid, Tv[own], frac[own], own=True)
        cands.append((r, "minimum vapour space"))
    P_max = fluid.validity.P_max_Pa
    over = np.maximum(allow, np.nan_to_num(relief, nan=0.0)) > P_max
    if np.any(over):  # a limit above the model's range: the range bounds the plan instead
        r = inf.copy()
        r[over] = pressure_bound(fluid, T_top[over], np.full(int(over.sum()), P_max), 0.0)
        cands.append((r, "the model's validity range"))
    for j, v in enumerate(vs):
        if v.rules is None:
            continue
        for rl in rule_limits(
            fluid, v.rules.set, v.rules.test_pressure_Pa, v.atmospheric_pressure_Pa
        ):
            r = inf.copy()
            r[j] = 0.0 if rl.density_mol is None else rl.density_mol
            cands.append((r, f"{v.rules.set}: {rl.name}"))
    cands += marking_bounds(fluid, vs)  # a marked working or service pressure
    stack = np.vstack([c for c, _ in cands])
    best = stack.argmin(axis=0)
    rho = stack[best, np.arange(n)]
    V = np.array([v.water_capacity_m3 for v in vs])
    if round_down:
        rho = np.array([rounded_down(r, fluid.molar_mass * x) for r, x in zip(rho, V, strict=True)])
    names = [cands[b][1] for b in best]
    for j, v in enumerate(vs):  # a blend whose recipe would condense bounds the plan further
        if getattr(v, "blend", None) is not None and np.isfinite(rho[j]) and rho[j] > 0:
            rho[j], names[j] = _blend_bound(fluid, v, float(rho[j]), names[j], round_down)
    bad = ~np.isfinite(rho) | (rho <= 0)
    return np.where(bad, np.nan, rho), [None if b else nm for b, nm in zip(bad, names, strict=True)]


def _blend_bound(
    fluid: Fluid, v: VesselInput, rho_mol: float, name: str, round_down: bool
) -> tuple[float, str]:
    """The density [mol/m³] and governing limit once the blend recipe bounds the plan: the
    largest charge not above ``rho_mol`` whose every step stays gas at the blend temperature
    (assess.blend.blend_bounded_plan; imported here, so a pure gas never loads the blend)."""
    from fillcheck.assess.blend import BLEND_PLAN_LIMIT, blend_bounded_plan

    kg_per_density = fluid.molar_mass * v.water_capacity_m3
    plan = rho_mol * kg_per_density
    step = PLAN_RESOLUTION_KG if round_down else PLAN_RESOLUTION_KG / 1000.0
    bounded = blend_bounded_plan(v, plan, step)
    if bounded == plan:
        return rho_mol, name
    return (np.nan if bounded is None else bounded / kg_per_density), BLEND_PLAN_LIMIT


def rounded_down(rho_mol: float, kg_per_density: float) -> float:
    """A density [mol/m³] whose charge is rounded down to PLAN_RESOLUTION_KG (NaN kept)."""
    if not np.isfinite(rho_mol) or rho_mol <= 0:
        return float(rho_mol)
    m = rho_mol * kg_per_density
    q = PLAN_RESOLUTION_KG if m >= PLAN_RESOLUTION_KG else PLAN_RESOLUTION_KG / 100.0
    return math.floor(m / q + 1e-9) * q / kg_per_density


def _margin_excess(
    fluid: Fluid, T: np.ndarray, rho: np.ndarray, P_limit: np.ndarray, clearance: float
) -> np.ndarray:
    """P(T, ρ) − P_L (1 − u − c) on the closed-vessel path [Pa]: ≤ 0 where the margin holds."""
    st = vessel_path(fluid, T, rho)
    u = np.nan_to_num(pressure_uncertainty(fluid, T, rho, st.phase))
    # a cubic's error for a dense fluid can exceed 100 %: past MAX_UNCERTAINTY the plan is
    # only an estimate, and the check says "review" for the margin in any case
    u = np.clip(u, 0.0, MAX_UNCERTAINTY) if clearance > 0 else 0.0 * u
    return st.P - P_limit * (1.0 - u - clearance)


def pressure_bound(
    fluid: Fluid, T: np.ndarray, P_limit: np.ndarray, clearance: float = SAFETY_CLEARANCE
) -> np.ndarray:
    """The largest overall density [mol/m³] whose pressure at T [K] keeps P_limit [Pa] with the
    model's uncertainty and ``clearance`` (with clearance 0, uncertainty is not applied: a plain
    pressure bound, as for the validity range). +inf where the limit cannot bind before the
    vessel is liquid-full at T."""
    T = np.asarray(T, dtype=float).ravel()
    P_limit = np.asarray(P_limit, dtype=float).ravel()
    n = T.size
    out = np.full(n, np.nan)
    if n == 0:
        return out
    mixture = getattr(fluid, "is_mixture", False)
    hi = np.asarray(fluid.density_molar(T, P_limit), dtype=float).ravel()
    lo = np.zeros(n)
    todo = np.ones(n, dtype=bool)
    Tc = fluid.model_critical[0]
    below = (T < Tc) & (T >= fluid.T_min_saturation) & (not mixture)
    if np.any(below):
        # the branch that applies: the vapour pressure itself keeps the margin (then the limit
        # binds only past liquid-full, which the vapour-space rule forbids), or it does not
        # (then the bound lies on the vapour branch, below the saturated vapour density)
        sat = _saturation(fluid, T[below])
        mid = 0.5 * (sat.rho_vapor + sat.rho_liquid)
        keeps = _margin_excess(fluid, T[below], mid, P_limit[below], clearance) <= 0.0
        b = np.flatnonzero(below)
        out[b[keeps]] = np.inf
        todo[b[keeps]] = False
        hi[b[~keeps]] = np.minimum(hi[b[~keeps]], sat.rho_vapor[~keeps])
        at_dew = _margin_excess(
            fluid, T[b[~keeps]], sat.rho_vapor[~keeps] * (1 - 1e-12), P_limit[b[~keeps]], clearance
        )
        dew_ok = at_dew <= 0.0
        out[b[~keeps][dew_ok]] = sat.rho_vapor[~keeps][dew_ok] * (1 - 1e-12)
        todo[b[~keeps][dew_ok]] = False
    if mixture:
        # a mixture's pressure rises across its two-phase band, to the bubble pressure at the
        # liquid end: where that keeps the margin, so does every two-phase charge, and the limit
        # binds only past liquid-full (the vapour-space rule); otherwise the bound lies below
        # the liquid end
        sat = _saturation(fluid, T)
        band = np.isfinite(sat.rho_liquid) & np.isfinite(sat.rho_vapor)
        if np.any(band):
            b = np.flatnonzero(band)
            end = sat.rho_liquid[band] * (1.0 - 1e-9)
            keeps = _margin_excess(fluid, T[b], end, P_limit[b], clearance) <= 0.0
            out[b[keeps]] = np.inf
            todo[b[keeps]] = False
            hi[b[~keeps]] = np.minimum(hi[b[~keeps]], sat.rho_liquid[band][~keeps])
    idx = np.flatnonzero(todo)
    if idx.size:
        # a start close below the root: the density at the limit less the uncertainty there
        # (the uncertainty grows with density, so this start nearly always keeps the margin)
        j = idx
        st = vessel_path(fluid, T[j], hi[j])
        u = np.clip(np.nan_to_num(pressure_uncertainty(fluid, T[j], hi[j], st.phase)), 0, 0.5)
        u = u if clearance > 0 else 0.0 * u
        guess = np.asarray(
            fluid.density_molar(T[j], P_limit[j] * (1.0 - u - clearance)), dtype=float
        ).ravel()
        guess = np.minimum(guess, hi[j])
        at_guess = _margin_excess(fluid, T[j], guess, P_limit[j], clearance)
        keeps = at_guess <= 0.0
        lo[j] = np.where(keeps, guess, lo[j])
        f_lo = np.where(keeps, at_guess, -P_limit[j])  # at ρ → 0 the pressure vanishes
        out[idx] = _last_keeping(
            lambda j, r: _margin_excess(fluid, T[j], r, P_limit[j], clearance),
            lo[idx],
            hi[idx],
            MIXTURE_TOLERANCE if mixture else DENSITY_TOLERANCE,
            f_lo,
        )
    return out


def _last_keeping(
    excess, a: np.ndarray, c: np.ndarray, tol: float, fa: np.ndarray | None = None
) -> np.ndarray:
    """Per element, the largest density in [a, c] with excess ≤ 0, to a relative ``tol``.

    ``excess(idx, rho)`` rises with ρ (it may jump up where a phase ends); a is known to keep the
    margin and c not. The shared bracketed solver (thermo.bracketed) shrinks the bracket and
    the keeping end is returned, so the answer is on the safe side of the root."""
    all_idx = np.arange(a.size)
    fa = excess(all_idx, np.maximum(a, 1e-300)) if fa is None else fa
    fc = excess(all_idx, c)
    whole = fc <= 0.0  # the whole bracket keeps the margin (to round-off)
    out = np.array(c, dtype=float, copy=True)
    j = np.flatnonzero(~whole)
    if j.size:
        found = illinois(lambda k, r: excess(j[k], r), a[j], c[j], fa[j], fc[j], width=tol * c[j])
        out[j] = found.a
    return np.where(np.isfinite(out), out, np.nan)


def vapour_space_bound(
    fluid: Fluid, T: np.ndarray, fraction: np.ndarray, own: bool = False
) -> np.ndarray:
    """The largest overall density [mol/m³] whose liquid fills at most 1 − fraction of the
    vessel at T [K]: ρ_v + (1 − f)(ρ_l − ρ_v), with the liquid density reduced by its
    uncertainty, so that the check of the plan finds the vapour space beyond the band it
    reviews (vapour-space-uncertain). At or above the critical temperature (and where a mixture
    has no two-phase band at T) there is no vapour space to keep: the built-in rule does not
    bind there, and a scenario's ``own`` rule keeps the density strictly below the critical
    density."""
    T = np.asarray(T, dtype=float).ravel()
    fraction = np.broadcast_to(np.asarray(fraction, dtype=float), T.shape)
    Tc, _, rhoc = fluid.model_critical
    out = np.full(T.shape, rhoc * (1.0 - 1e-9) if own else np.inf)
    below = T < Tc
    if np.any(below):
        sat = _saturation(fluid, T[below])
        rl = sat.rho_liquid * (1.0 - _liquid_u(fluid))
        r = sat.rho_vapor + (1.0 - fraction[below]) * (rl - sat.rho_vapor)
        out[below] = np.where(np.isnan(r), out[below], r)  # NaN: a mixture with no band at T
    return out


_SATURATION_CACHE: dict[tuple[int, bytes], Any] = {}


def _saturation(fluid: Fluid, T: np.ndarray) -> Any:
    """fluid.saturation_molar(T), remembered for the last few calls: every bound of a plan asks
    for the saturation at the same top temperatures, and a mixture's costs a flash per point."""
    key = (id(fluid), np.ascontiguousarray(T, dtype=float).tobytes())
    if key not in _SATURATION_CACHE:
        if len(_SATURATION_CACHE) >= 8:
            _SATURATION_CACHE.pop(next(iter(_SATURATION_CACHE)))
        _SATURATION_CACHE[key] = (fluid, fluid.saturation_molar(T))
    held, sat = _SATURATION_CACHE[key]
    if held is not fluid:  # an id reused by a new object: compute afresh
        sat = fluid.saturation_molar(T)
        _SATURATION_CACHE[key] = (fluid, sat)
    return sat


def _liquid_u(fluid: Fluid) -> float:
    """Relative uncertainty of the saturated-liquid density [-]."""
    if fluid.is_reference:
        return fluid.model_error.density
    err = fluid.model_error
    return 0.0 if err is None else err.saturated_liquid_density


def largest_safe_density(
    fluid: Fluid, v: VesselInput, T_ref: float, round_down: bool = True
) -> SafeCharge | None:
    """The greatest overall density keeping every limit of ``v`` over its checked range."""
    rho, names = largest_safe_densities(fluid, [v], T_ref, round_down)
    if names[0] is None:
        return None
    return SafeCharge(float(rho[0]), names[0])
