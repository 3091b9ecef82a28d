"""Density from temperature and pressure: the stable root.

A cubic has up to three volume roots at a given (T, P); the middle one is mechanically unstable
and the outer two are compared by Gibbs energy, which at equal T and P differs by RT·Δln φ. The
root with the lower ln φ is the stable phase. No root at or below the covolume is ever returned.
"""

from __future__ import annotations

import numpy as np

from fillcheck.errors import ConvergenceError
from fillcheck.models.base import FloatArray, HelmholtzModel
from fillcheck.thermo.properties import dP_drho_from, pressure_from
from fillcheck.thermo.properties import ln_fugacity_coefficient_at_pressure as _ln_phi


def phase_roots(
    model: HelmholtzModel, T: FloatArray, P: FloatArray
) -> tuple[FloatArray, FloatArray]:
    """Vapour-like (smallest) and liquid-like (largest) density roots at (T, P) [mol/m³]."""
    roots = getattr(model, "density_roots", None)
    if roots is None:
        raise TypeError(f"model {model.info.id!r} offers no density solve at (T, P)")
    return roots(T, P)


def density_TP(model: HelmholtzModel, T: FloatArray, P: FloatArray) -> FloatArray:
    """Molar density of the stable phase at T [K] and P [Pa] [mol/m³].

    Raises
    ------
    ConvergenceError
        If a root cannot be found or does not reproduce the pressure to 1e-9 relative (or to
        the round-off floor of a liquid at very low pressure).
    """
    T, P = np.broadcast_arrays(np.asarray(T, dtype=float), np.asarray(P, dtype=float))
    lo, hi = phase_roots(model, T, P)
    with np.errstate(invalid="ignore"):
        g_lo = _ln_phi(model, T, lo, P)
        g_hi = _ln_phi(model, T, hi, P)
    rho = np.where(g_hi < g_lo, hi, lo)
    with np.errstate(invalid="ignore"):
        ok = np.isfinite(rho) & (rho > 0) & (rho < model.max_density_mol())
        # a liquid at low pressure forms P = ρRT(1 + δαʳ_δ) by cancellation, and one unit in
        # the last place of ρ moves P by ρ(∂P/∂ρ)_T·eps: eight such units are the floor
        d = model.alphar(T, np.where(ok, rho, 1.0))
        back = np.where(ok, pressure_from(d, model.R, T, rho), np.nan)
        slope = rho * dP_drho_from(d, model.R, T)
        ok &= np.abs(back - P) <= 1e-9 * P + 8.0 * np.finfo(float).eps * np.abs(slope)
    if not np.all(ok):
        i = np.flatnonzero(~ok.ravel())[0]
        raise ConvergenceError(
            f"{model.info.name}: no density found at T = {T.ravel()[i]:.6g} K, "
            f"P = {P.ravel()[i]:.6g} Pa"
        )
    return rho
