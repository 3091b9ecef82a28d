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
"""

from __future__ import annotations

from dataclasses import dataclass
from typing import TYPE_CHECKING

import numpy as np

from fillcheck.assess.rules import rule_limits

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


def largest_safe_density(fluid: Fluid, v: VesselInput, T_ref: float) -> SafeCharge | None:
    """The greatest overall density keeping every limit of ``v`` over its storage range."""
    lim = v.limits
    T_max = np.array([v.max_temperature_K])
    candidates: list[tuple[float, str]] = []
    candidates.append(
        (
            float(fluid.density_molar(T_max, np.array([lim.allowable_pressure_Pa]))[0]),
            "allowable pressure",
        )
    )
    if lim.relief_set_pressure_Pa is not None:
        P = lim.relief_set_pressure_Pa * (1.0 - RELIEF_CLEARANCE)
        candidates.append(
            (float(fluid.density_molar(T_max, np.array([P]))[0]), "relief set pressure")
        )
    if lim.max_filling_ratio_kg_m3 is not None:
        candidates.append((lim.max_filling_ratio_kg_m3 / fluid.molar_mass, "maximum filling ratio"))
    if lim.min_vapour_space is not None and lim.vapour_space_temperature_K is not None:
        Tc, _, rhoc = fluid.model_critical
        Tv = lim.vapour_space_temperature_K
        if Tv < Tc:
            sat = fluid.saturation_molar(np.array([Tv]))
            l, g = float(sat.rho_liquid[0]), float(sat.rho_vapor[0])
            rho_vs = g + (1.0 - lim.min_vapour_space) * (l - g)
        else:
            rho_vs = rhoc  # above Tc there is no vapour space to keep: stay below critical
        candidates.append((rho_vs, "minimum vapour space"))
    if v.rules is not None:
        for r in rule_limits(
            fluid, v.rules.set, v.rules.test_pressure_Pa, v.atmospheric_pressure_Pa
        ):
            candidates.append(
                (0.0 if r.density_mol is None else r.density_mol, f"{v.rules.set}: {r.name}")
            )
    rho, governing = min(candidates)
    if not np.isfinite(rho) or rho <= 0:
        return None
    return SafeCharge(rho, governing)
