"""Vapour–liquid saturation of a pure fluid: equal pressure and equal Gibbs energy.

At a temperature below the critical one, the saturation pressure is the one pressure at which
the vapour-like and liquid-like density roots have equal fugacity. Between the two spinodals
ln φ_liquid − ln φ_vapour falls strictly as P rises (its slope is (Z_l − Z_v)/P < 0), so the
pressure is bracketed and found by Newton's method in ln P (slope Z_l − Z_v) safeguarded by
bisection: a Newton step that leaves the bracket, or lands where only one root exists, is
replaced by halving the bracket, so the solve cannot fail and converges to round-off. A
pressure with only one root is classified by that root: vapour-like (below ρc) means the
pressure is too low, liquid-like too high.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from fillcheck.errors import ConvergenceError, StateError
from fillcheck.models.base import FloatArray, HelmholtzModel
from fillcheck.thermo.density import phase_roots
from fillcheck.thermo.properties import ln_fugacity_coefficient_at_pressure as _ln_phi

_MAX_ITERATIONS = 300


@dataclass(frozen=True)
class Saturation:
    """A saturation state (arrays of one shape).

    Attributes
    ----------
    T : temperature [K]
    P : saturation pressure [Pa]
    rho_liquid, rho_vapor : saturated liquid and vapour molar densities [mol/m³]
    """

    T: FloatArray
    P: FloatArray
    rho_liquid: FloatArray
    rho_vapor: FloatArray


def saturation_T(
    model: HelmholtzModel,
    T: FloatArray,
    *,
    Tc: float,
    Pc: float,
    rhoc: float,
    T_min: float,
    ln_P_guess: FloatArray | None = None,
) -> Saturation:
    """Saturation at temperature(s) T [K] of a pure fluid with the model's critical point.

    Parameters
    ----------
    model : the equation of state (a pure fluid)
    T : temperature(s) [K], T_min ≤ T < Tc
    Tc, Pc, rhoc : the model's own critical temperature [K], pressure [Pa], density [mol/m³]
    T_min : the lowest temperature of the fluid's liquid (its triple point) [K]
    ln_P_guess : optional starting value of ln(P/Pa), e.g. from a vapour-pressure estimate

    Raises
    ------
    StateError
        A temperature at or above Tc, or below T_min.
    ConvergenceError
        The saturation pressure could not be bracketed (never for a well-formed model).
    """
    T = np.atleast_1d(np.asarray(T, dtype=float))
    if np.any(T >= Tc) or np.any(T < T_min * (1 - 1e-12)) or not np.all(np.isfinite(T)):
        bad = T[(T >= Tc) | (T < T_min * (1 - 1e-12)) | ~np.isfinite(T)][0]
        raise StateError(
            f"no saturation state at {bad:.6g} K: saturation exists from the triple point "
            f"{T_min:.6g} K up to the critical temperature {Tc:.6g} K"
        )
    ln_lo = np.full(T.shape, np.log(Pc) - 46.0)
    ln_hi = np.full(T.shape, np.log(Pc))
    ln_P = 0.5 * (ln_lo + ln_hi) if ln_P_guess is None else np.clip(ln_P_guess, ln_lo, ln_hi)
    done = np.zeros(T.shape, dtype=bool)
    for _ in range(_MAX_ITERATIONS):
        P = np.exp(ln_P)
        rv, rl = phase_roots(model, T, P)
        three = rl > rv * (1.0 + 1e-10)
        with np.errstate(invalid="ignore", divide="ignore"):
            delta = _ln_phi(model, T, rl, P) - _ln_phi(model, T, rv, P)
            slope = P / (model.R * T) * (1.0 / rl - 1.0 / rv)  # d(Δ)/d(ln P) = Z_l − Z_v
        go_up = np.where(three, delta > 0.0, rv < rhoc)
        ln_lo = np.where(go_up & ~done, ln_P, ln_lo)
        ln_hi = np.where(~go_up & ~done, ln_P, ln_hi)
        done |= (three & (np.abs(delta) < 1e-13)) | (ln_hi - ln_lo < 1e-14)
        if np.all(done):
            break
        with np.errstate(invalid="ignore", divide="ignore"):
            newton = ln_P - delta / slope
        inside = three & np.isfinite(newton) & (newton > ln_lo) & (newton < ln_hi)
        ln_P = np.where(done, ln_P, np.where(inside, newton, 0.5 * (ln_lo + ln_hi)))
    else:
        bad = T[~done][0]
        raise ConvergenceError(f"{model.info.name}: saturation did not converge at {bad:.6g} K")
    P = np.exp(ln_P)
    rv, rl = phase_roots(model, T, P)
    ok = np.isfinite(P) & np.isfinite(rv) & np.isfinite(rl) & (rl >= rv)
    # converged means a genuine pair of roots with equal fugacity, whichever side the
    # iteration approached from (a Newton path from above never moves the lower bracket)
    with np.errstate(invalid="ignore", divide="ignore"):
        gap = np.abs(_ln_phi(model, T, rl, P) - _ln_phi(model, T, rv, P))
    ok &= (rl > rv * (1.0 + 1e-10)) & (gap < 1e-9)
    if not np.all(ok):
        bad = T[~ok][0]
        raise ConvergenceError(f"{model.info.name}: saturation not bracketed at {bad:.6g} K")
    return Saturation(T=T, P=P, rho_liquid=rl, rho_vapor=rv)
