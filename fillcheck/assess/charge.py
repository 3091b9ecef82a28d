"""The largest safe charge: the greatest density that keeps every entered limit.

Along a closed vessel's isochore the pressure rises with temperature, and at a fixed temperature
it rises (or, in two phases, stays level) with density. So the pressure limits bind at the
highest storage temperature, and the largest density that keeps P(T_max, ρ) at or below a limit
is the stable-root density at (T_max, P_limit): vapour-like where the limit is under the vapour
pressure at T_max, compressed liquid where it is above (the vessel may then be nearly
liquid-full at T_max). The filling ratio limits the density directly, and the vapour space at
its temperature T_v limits the liquid volume fraction (ρ − ρ_v)/(ρ_l − ρ_v) to 1 − fraction.
A named rule set (assess.rules) adds its own largest densities. The smallest of these densities
is the answer; the limit that gives it governs.

Two rules are built in: every pressure limit is kept with the model's pressure uncertainty at
that state plus a clearance of 0.1 % (assess.uncertainty), so that the plan, followed, passes;
and the vessel must not be liquid-full at its highest storage temperature, where a few kelvin
more would raise the pressure by tens of bar.
"""

from __future__ import annotations

from collections.abc import Sequence
from dataclasses import dataclass
from typing import TYPE_CHECKING

import numpy as np

from fillcheck.assess.rules import rule_limits
from fillcheck.assess.uncertainty import pressure_uncertainty
from fillcheck.thermo.vessel import vessel_path

if TYPE_CHECKING:
    from fillcheck.scenario.resolve import VesselInput
    from fillcheck.thermo.fluid import Fluid

RELIEF_CLEARANCE = 1e-4
"""Relative clearance below the relief setting [-]: reaching the setting itself fails."""


@dataclass(frozen=True)
class SafeCharge:
    """The largest safe overall density [mol/m³] and the limit that governs it."""

    density_mol: float
    governing: str


def largest_safe_densities(
    fluid: Fluid, vs: Sequence[VesselInput], T_ref: float
) -> tuple[np.ndarray, list[str | None]]:
    """The greatest overall densities [mol/m³] keeping every limit of each vessel (one gas).

    Returns the densities (NaN where no charge keeps the limits) and the governing limits.
    """
    n = len(vs)
    lim = [v.limits for v in vs]
    T_max = np.array([v.max_temperature_K for v in vs])
    inf = np.full(n, np.inf)
    cands: list[tuple[np.ndarray, str]] = [
        (
            _under(fluid, T_max, np.array([x.allowable_pressure_Pa for x in lim])),
            "allowable pressure",
        )
    ]
    relief = np.array(
        [np.nan if x.relief_set_pressure_Pa is None else x.relief_set_pressure_Pa for x in lim]
    )
    has = ~np.isnan(relief)
    if np.any(has):
        r = inf.copy()
        r[has] = _under(fluid, T_max[has], relief[has] * (1.0 - RELIEF_CLEARANCE))
        cands.append((r, "relief set pressure"))
    below = T_max < fluid.model_critical[0]
    if np.any(below):
        r = inf.copy()
        rl = fluid.saturation_molar(T_max[below]).rho_liquid  # NaN: a mixture with no band
        r[below] = np.nan_to_num(rl, nan=np.inf) * (1.0 - _liquid_u(fluid))
        cands.append((r, "liquid-full at the highest storage temperature (built in)"))
    fr = (
        np.array(
            [
                np.inf if x.max_filling_ratio_kg_m3 is None else x.max_filling_ratio_kg_m3
                for x in lim
            ]
        )
        / fluid.molar_mass
    )
    cands.append((fr, "maximum filling ratio"))
    Tv = np.array(
        [
            np.nan if x.vapour_space_temperature_K is None else x.vapour_space_temperature_K
            for x in lim
        ]
    )
    has = ~np.isnan(Tv)
    if np.any(has):
        Tc, _, rhoc = fluid.model_critical
        frac = np.array([x.min_vapour_space or 0.0 for x in lim])
        r = inf.copy()
        below = has & (Tv < Tc)
        if np.any(below):
            sat = fluid.saturation_molar(Tv[below])
            r[below] = sat.rho_vapor + (1.0 - frac[below]) * (sat.rho_liquid - sat.rho_vapor)
        # above Tc there is no vapour space to keep: stay (strictly) below the critical density
        # (also where a mixture has no two-phase band at T_v)
        r[has & ~below] = rhoc * (1.0 - 1e-9)
        r[has] = np.where(np.isnan(r[has]), rhoc * (1.0 - 1e-9), r[has])
        cands.append((r, "minimum vapour space"))
    for j, v in enumerate(vs):
        if v.rules is None:
            continue
        for rl in rule_limits(
            fluid, v.rules.set, v.rules.test_pressure_Pa, v.atmospheric_pressure_Pa
        ):
            r = inf.copy()
            r[j] = 0.0 if rl.density_mol is None else rl.density_mol
            cands.append((r, f"{v.rules.set}: {rl.name}"))
    stack = np.vstack([c for c, _ in cands])
    best = stack.argmin(axis=0)
    rho = stack[best, np.arange(n)]
    names = [cands[b][1] for b in best]
    bad = ~np.isfinite(rho) | (rho <= 0)
    return np.where(bad, np.nan, rho), [None if b else nm for b, nm in zip(bad, names, strict=True)]


MAX_UNCERTAINTY = 0.5
"""Largest model uncertainty the planned charge is reduced by [-]."""
SAFETY_CLEARANCE = 1e-3
"""Relative clearance kept below every pressure limit beyond the model's uncertainty [-], so that
a plan followed to its printed (rounded) figures still passes."""


def _under(fluid: Fluid, T: np.ndarray, P: np.ndarray) -> np.ndarray:
    """The largest density whose pressure at T stays below P by the model's uncertainty."""
    rho = fluid.density_molar(T, P)
    for _ in range(2):
        u = np.nan_to_num(pressure_uncertainty(fluid, T, rho, vessel_path(fluid, T, rho).phase))
        # a cubic's error for a dense fluid can exceed 100 %: past MAX_UNCERTAINTY the plan is
        # only an estimate, and the check says "review" for the margin in any case
        u = np.clip(u, 0.0, MAX_UNCERTAINTY)
        rho = fluid.density_molar(T, P * (1.0 - u - SAFETY_CLEARANCE))
    return rho


def _liquid_u(fluid: Fluid) -> float:
    """Relative uncertainty of the saturated-liquid density [-]."""
    if fluid.is_reference:
        return fluid.model_error.density
    err = fluid.model_error
    return 0.0 if err is None else err.saturated_liquid_density


def largest_safe_density(fluid: Fluid, v: VesselInput, T_ref: float) -> SafeCharge | None:
    """The greatest overall density keeping every limit of ``v`` over its storage range."""
    rho, names = largest_safe_densities(fluid, [v], T_ref)
    if names[0] is None:
        return None
    return SafeCharge(float(rho[0]), names[0])
