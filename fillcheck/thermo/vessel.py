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
from fillcheck.thermo.bracketed import illinois
from fillcheck.thermo.properties import dP_dT_from, pressure_from, residual_enthalpy_over_RT

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
        P[one] = pressure_from(d, model.R, T[one], rho[one])
        dPdT[one] = dP_dT_from(d, model.R, rho[one])
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

    One vessel is a batch of one of :func:`saturation_crossings`. A mixture finds where its
    isochore leaves the two-phase region by its own stability test.
    """
    if getattr(fluid, "is_mixture", False):
        return fluid.saturation_crossing(rho_mol)
    full, T = saturation_crossings(fluid, np.array([float(rho_mol)]))
    return ("liquid-full" if full[0] else "dew"), (None if np.isnan(T[0]) else float(T[0]))


CRITICAL_GAP_K = 2e-5
"""The least distance below the critical temperature at which saturation is solved for a
crossing [K]; a model whose saturation is not resolved that close (Fluid.saturation_gap_K)
uses its own, larger gap. A crossing inside the gap is reported at its safe end."""


def saturation_crossings(fluid: Fluid, rho_mol: FloatArray) -> tuple[np.ndarray, np.ndarray]:
    """Where the isochores of overall densities ρ [mol/m³] meet the saturation curve (pure fluid).

    Returns ``(full, T)``: ``full`` is True where ρ ≥ ρc (the crossing is the liquid-full
    temperature, liquid fills the vessel above it) and False where ρ < ρc (the dew temperature,
    liquid is present below it); ``T`` [K] is NaN where a dew isochore stays gas down to the
    triple point, and the triple-point temperature where a dense isochore is liquid-full there.

    The saturated density is monotone in temperature and, near the critical point, close to
    linear in s = √(Tc − T); each root is found in s by the shared bracketed solver
    (thermo.bracketed), all vessels together, so one vessel and a register of thousands follow
    the same arithmetic and get the same crossing. Where the fluid has saturation expansions
    (fluids/superancillary.py), each root is first placed on one side of their top: one below
    it is searched on the expansions alone, one above it between the top and the least gap
    below Tc, where the phase equilibrium is solved.
    """
    rho = np.atleast_1d(np.asarray(rho_mol, dtype=float)).ravel()
    Tc, _, rhoc = fluid.model_critical
    T_min = fluid.T_min_saturation
    full = rho >= rhoc
    n = rho.size
    T_out = np.full(n, np.nan)

    def f(s: np.ndarray, idx: np.ndarray) -> np.ndarray:
        out = np.log(rhoc / rho[idx])  # at the critical point to round-off
        ok = s * s > 1e-10 * Tc
        if np.any(ok):
            sat = fluid.saturation_molar(Tc - s[ok] ** 2)
            branch = np.where(full[idx][ok], sat.rho_liquid, sat.rho_vapor)
            out[ok] = np.log(branch / rho[idx][ok])
        return out

    all_idx = np.arange(n)
    s_hi = np.full(n, float(np.sqrt(Tc - T_min)))
    f_hi = f(s_hi, all_idx)
    # dew: ρ_v,sat falls as s grows (cooling); liquid-full: ρ_l,sat rises as s grows.
    gas_at_triple = ~full & (f_hi >= 0.0)
    full_at_triple = full & (f_hi <= 0.0)
    T_out[full_at_triple] = T_min
    critical = np.abs(rho / rhoc - 1.0) < 1e-9  # the critical isochore meets the curve at Tc
    T_out[critical & ~gas_at_triple & ~full_at_triple] = Tc
    active = ~(gas_at_triple | full_at_triple | critical)
    s_lo = np.full(n, np.nan)
    f_lo = np.full(n, np.nan)
    s_up, f_up = s_hi.copy(), f_hi.copy()
    near = active.copy()
    s_top = _expansions_top(fluid)
    if s_top is not None and np.any(active):
        # a crossing below the top of the saturation expansions is searched on them alone
        i = np.flatnonzero(active)
        f_top = f(np.full(i.size, s_top), i)
        on_them = (f_top > 0.0) != (f_hi[i] > 0.0)
        s_lo[i[on_them]] = s_top
        f_lo[i[on_them]] = f_top[on_them]
        near[i[on_them]] = False
        s_up[i[~on_them]] = s_top  # the others cross above the top: search there only
        f_up[i[~on_them]] = f_top[~on_them]
    if np.any(near):
        # the search stops CRITICAL_GAP_K below Tc, closer than which a saturation solve is not
        # resolved in double precision; a crossing inside the gap is put at its safe end (below)
        gap = max(CRITICAL_GAP_K, float(getattr(fluid, "saturation_gap_K", CRITICAL_GAP_K)))
        s_min = float(np.sqrt(gap))
        i = np.flatnonzero(near)
        f_min = f(np.full(i.size, s_min), i)
        in_gap = (f_min > 0.0) == (f_up[i] > 0.0)
        inside_gap = np.zeros(n, dtype=bool)
        inside_gap[i[in_gap]] = True
        # liquid-full: from the gap's lower end (earlier is the safe side); dew: at Tc
        T_out[inside_gap & full] = Tc - gap
        T_out[inside_gap & ~full] = Tc
        active &= ~inside_gap
        s_lo[i[~in_gap]] = s_min
        f_lo[i[~in_gap]] = f_min[~in_gap]
    idx = np.flatnonzero(active)
    found = illinois(
        lambda j, s: f(s, idx[j]),
        s_lo[idx],
        s_up[idx],
        f_lo[idx],
        f_up[idx],
        width=1e-9,  # ΔT = 2 s Δs: a bracket of 1e-9 √K in s is far below a microkelvin
        ftol=1e-13,
    )
    s = 0.5 * (found.a + found.b)
    T_out[idx] = Tc - s**2
    if np.all(found.converged):
        return full, T_out
    active[:] = False
    active[idx[~found.converged]] = True
    raise ConvergenceError(
        f"saturation crossing of the isochore at {rho[active][0]:.6g} mol/m³ did not converge"
    )


def _expansions_top(fluid: Fluid) -> float | None:
    """s = √(Tc − T) [K^½] at the top of the fluid's saturation expansions, rounded up so that
    Tc − s² is covered by them; None for a fluid without them."""
    sa = getattr(fluid, "superancillary", None)
    if sa is None:
        return None
    Tc = fluid.model_critical[0]
    s = float(np.sqrt(Tc - sa.T_top))
    while Tc - s * s > sa.T_top:
        s = float(np.nextafter(s, np.inf))
    return s
