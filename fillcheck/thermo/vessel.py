"""The closed-vessel path: a fixed overall density followed through temperature.

Mass and volume fix the overall density ρ. At each temperature T, for a pure fluid:

- below the critical temperature, with ρ_v,sat(T) < ρ < ρ_l,sat(T): two-phase; the pressure is
  the saturation pressure and the vapour mass fraction (quality) follows from specific volumes,
  x = (1/ρ − 1/ρ_l)/(1/ρ_v − 1/ρ_l);
- otherwise one phase, P = P(T, ρ) straight from the model (no root finding).

The pressure rise per kelvin is (∂P/∂T)_ρ in one phase and the slope of the saturation curve,
dP_sat/dT = Δh/(T Δv) (Clausius–Clapeyron), in two phases. The isochore meets the saturation curve
where ρ_v,sat(T) = ρ (ρ below critical: the dew temperature, liquid forms on cooling) or where
ρ_l,sat(T) = ρ (ρ above critical: the liquid-full temperature, liquid fills the vessel on heating).
"""

from __future__ import annotations

from dataclasses import dataclass
from typing import TYPE_CHECKING, Literal

import numpy as np

from fillcheck.errors import ConvergenceError, StateError
from fillcheck.models.base import FloatArray
from fillcheck.thermo.properties import residual_enthalpy_over_RT

if TYPE_CHECKING:
    from fillcheck.thermo.fluid import Fluid


@dataclass(frozen=True)
class VesselPath:
    """States of a closed vessel along temperature (molar densities inside).

    Attributes
    ----------
    T : temperatures [K]
    rho_mol : overall molar density [mol/m³] (the same at every T)
    P : pressure [Pa]
    phase : array of "gas" | "liquid" | "supercritical" | "two-phase"
    quality : vapour mass fraction where two-phase, NaN elsewhere [-]
    dP_dT : pressure rise per kelvin along the isochore [Pa/K]
    rho_liquid, rho_vapor : saturated densities where two-phase, NaN elsewhere [mol/m³]
    """

    T: FloatArray
    rho_mol: FloatArray
    P: FloatArray
    phase: np.ndarray
    quality: FloatArray
    dP_dT: FloatArray
    rho_liquid: FloatArray
    rho_vapor: FloatArray


def vessel_path(fluid: Fluid, T: FloatArray, rho_mol: FloatArray) -> VesselPath:
    """States of a closed vessel at temperatures T [K] and molar density ρ [mol/m³].

    T and ρ broadcast together, so one density at many temperatures (a storage range) and
    many densities at one temperature (a register) are both one call. A mixture follows its
    own fixed-volume phase split (:mod:`fillcheck.thermo.mixture_vessel`).
    """
    if getattr(fluid, "is_mixture", False):
        return fluid.vessel_path(T, rho_mol)
    T, rho = np.broadcast_arrays(np.asarray(T, dtype=float), np.asarray(rho_mol, dtype=float))
    T, rho = T.astype(float).ravel(), rho.astype(float).ravel()
    if np.any(rho >= fluid.eos.max_density_mol()) or np.any(rho <= 0.0):
        raise StateError(
            f"{fluid.name}: a density of {rho.max() * fluid.molar_mass:.6g} kg/m³ is beyond what "
            f"the {fluid.model} model allows "
            f"(0 to {fluid.eos.max_density_mol() * fluid.molar_mass:.6g})"
        )
    model = fluid.eos
    Tc, _, rhoc = fluid.model_critical
    P = np.empty_like(T)
    dPdT = np.empty_like(T)
    quality = np.full_like(T, np.nan)
    rl = np.full_like(T, np.nan)
    rv = np.full_like(T, np.nan)
    below = T < Tc
    two = np.zeros_like(below)
    if np.any(below):
        # vessels of a register share their temperatures: solve each temperature once
        T_unique, back = np.unique(T[below], return_inverse=True)
        s = fluid.saturation_molar(T_unique)
        sat = type(s)(
            T=T[below], P=s.P[back], rho_liquid=s.rho_liquid[back], rho_vapor=s.rho_vapor[back]
        )
        inside = (rho[below] > sat.rho_vapor) & (rho[below] < sat.rho_liquid)
        two[below] = inside
        rl[below] = np.where(inside, sat.rho_liquid, np.nan)
        rv[below] = np.where(inside, sat.rho_vapor, np.nan)
        idx = np.flatnonzero(below)[inside]
        if idx.size:
            Ts, l, v = T[idx], sat.rho_liquid[inside], sat.rho_vapor[inside]
            P[idx] = sat.P[inside]
            quality[idx] = (1.0 / rho[idx] - 1.0 / l) / (1.0 / v - 1.0 / l)
            dh = residual_enthalpy_over_RT(model, Ts, v) - residual_enthalpy_over_RT(model, Ts, l)
            dPdT[idx] = dh * model.R / (1.0 / v - 1.0 / l)
    one = ~two
    if np.any(one):
        d = model.alphar(T[one], rho[one])
        P[one] = rho[one] * model.R * T[one] * (1.0 + d.a01)
        dPdT[one] = rho[one] * model.R * (1.0 + d.a01 - d.a11)
    if not (np.all(np.isfinite(P)) and np.all(np.isfinite(dPdT))):
        raise ConvergenceError(f"{model.info.name}: closed-vessel state not finite")
    phase = np.where(
        two, "two-phase", np.where(T >= Tc, "supercritical", np.where(rho > rhoc, "liquid", "gas"))
    )
    return VesselPath(T, rho, P, phase, quality, dPdT, rl, rv)


SaturationCrossing = Literal["dew", "liquid-full"]


def saturation_crossing(fluid: Fluid, rho_mol: float) -> tuple[SaturationCrossing, float | None]:
    """Where the isochore of overall density ρ [mol/m³] meets the saturation curve.

    Returns
    -------
    kind : "dew" when ρ < ρc (liquid is present below the temperature), "liquid-full" when
        ρ ≥ ρc (liquid fills the vessel above the temperature)
    temperature : the crossing [K]; None when the isochore does not meet the saturation curve
        between the triple point and the critical temperature. For "liquid-full", a vessel that
        is liquid-full already at the triple point returns the triple-point temperature.

    The saturated density is monotone in temperature and, near the critical point, close to
    linear in √(Tc − T); the root is found by the Illinois variant of regula falsi in
    s = √(Tc − T), which converges superlinearly and cannot leave its bracket. A mixture finds
    where its isochore leaves the two-phase region by its own stability test.
    """
    if getattr(fluid, "is_mixture", False):
        return fluid.saturation_crossing(rho_mol)
    Tc, _, rhoc = fluid.model_critical
    T_min = fluid.T_min_saturation
    kind: SaturationCrossing = "dew" if rho_mol < rhoc else "liquid-full"
    branch = "rho_vapor" if kind == "dew" else "rho_liquid"

    def f(s: float) -> float:
        if s * s <= 1e-10 * Tc:  # at the critical point to round-off
            return float(np.log(rhoc / rho_mol))
        sat = fluid.saturation_molar(np.array([Tc - s * s]))
        return float(np.log(getattr(sat, branch)[0] / rho_mol))

    s_hi = float(np.sqrt(Tc - T_min))
    f_hi = f(s_hi)
    # dew: ρ_v,sat falls as s grows (cooling); liquid-full: ρ_l,sat rises as s grows.
    if kind == "dew" and f_hi >= 0.0:
        return kind, None  # still all gas at the triple point
    if kind == "liquid-full" and f_hi <= 0.0:
        return kind, T_min  # liquid-full already at the triple point
    if abs(rho_mol / rhoc - 1.0) < 1e-9:  # the critical isochore meets the curve at Tc
        return kind, Tc
    s_lo, f_lo = 0.0, f(0.0)
    side = 0
    for _ in range(200):
        s = (s_lo * f_hi - s_hi * f_lo) / (f_hi - f_lo)
        if not (s_lo < s < s_hi):
            s = 0.5 * (s_lo + s_hi)
        fs = f(s)
        # ΔT = 2 s Δs: a bracket of 1e-9 √K in s is far below a microkelvin
        if abs(fs) < 1e-13 or (s_hi - s_lo) < 1e-9:
            return kind, Tc - s * s
        if (fs > 0.0) == (f_lo > 0.0):
            s_lo, f_lo = s, fs
            if side == -1:
                f_hi *= 0.5
            side = -1
        else:
            s_hi, f_hi = s, fs
            if side == 1:
                f_lo *= 0.5
            side = 1
    raise ConvergenceError(f"saturation crossing of the isochore at {rho_mol:.6g} mol/m³")
