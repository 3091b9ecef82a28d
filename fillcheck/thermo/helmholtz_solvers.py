"""Density and saturation solvers for any Helmholtz model, using only αʳ and its derivatives.

The cubic models have their own fast paths (closed-form volume roots); a multiparameter
reference equation has none, so these solvers work from the model contract alone.

Saturation: Newton's method on the two saturated densities with equal pressure and equal Gibbs
energy, in the reduced form of Akasaka (2008), J. Thermal Sci. Tech. 3, 442: with
J(δ) = δ(1 + δαʳ_δ) and K(δ) = δαʳ_δ + αʳ + ln δ, solve J(δ'') = J(δ') and K(δ'') = K(δ'), whose
Jacobian needs only J' = 1 + 2δαʳ_δ + δ²αʳ_δδ and K' = J'/δ. Starting values come from the
ancillary equations of the fluid's data file.

Density from (T, P): below the critical temperature the saturation pressure decides the stable
phase, and the root is bracketed by the saturated density and a density where the pressure is
known to be higher (vapour: (0, ρ''], liquid: [ρ', ρ_hi)); above it the isotherm rises
monotonically. In the bracket, Newton steps that leave it are replaced by bisection.
"""

from __future__ import annotations

from collections.abc import Callable

import numpy as np

from fillcheck.errors import ConvergenceError
from fillcheck.models.base import FloatArray, HelmholtzModel
from fillcheck.thermo.properties import dP_drho_from, pressure, pressure_from
from fillcheck.thermo.saturation import Saturation

_MAX_ITER = 200
_STEP_TOL = 1e-10
"""A full Newton correction of the saturated densities this small (relative) ends the solve."""
_NOISE_MAX = 1e-6
"""Corrections that stop shrinking are round-off noise, accepted up to this size (relative)."""


def saturation_newton(
    model: HelmholtzModel,
    T: FloatArray,
    rho_liquid0: FloatArray,
    rho_vapor0: FloatArray,
    rho_r: float,
    *,
    step_tol: float = _STEP_TOL,
) -> Saturation:
    """Saturation at T [K] from starting densities [mol/m³] (Akasaka's Newton iteration).

    ``step_tol`` is the relative Newton correction that ends the solve; 0 iterates until the
    corrections stop shrinking, i.e. to the round-off floor of the equation (what the
    superancillary builder, tools/build_superancillaries.py, asks for).
    """
    T = np.asarray(T, dtype=float)
    dl = np.asarray(rho_liquid0, dtype=float) / rho_r
    dv = np.asarray(rho_vapor0, dtype=float) / rho_r
    done = np.zeros(T.shape, dtype=bool)
    previous = np.full(T.shape, np.inf)
    for _ in range(_MAX_ITER):
        if np.all(done):
            break
        rl = model.alphar(T, dl * rho_r)
        rv = model.alphar(T, dv * rho_r)
        Jl, Jv = dl * (1.0 + rl.a01), dv * (1.0 + rv.a01)
        Kl = np.log(dl) + rl.a00 + rl.a01
        Kv = np.log(dv) + rv.a00 + rv.a01
        dJl = 1.0 + 2.0 * rl.a01 + rl.a02
        dJv = 1.0 + 2.0 * rv.a01 + rv.a02
        dKl, dKv = dJl / dl, dJv / dv
        F1, F2 = Jv - Jl, Kv - Kl
        det = dJv * dKl - dJl * dKv
        with np.errstate(divide="ignore", invalid="ignore"):
            step_l = (dJv * F2 - F1 * dKv) / det
            step_v = (dJl * F2 - F1 * dKl) / det
        # keep δ' > δ'' > 0 by damping the step where it would cross
        scale = np.ones_like(T)
        for _ in range(30):
            nl, nv = dl + scale * step_l, dv + scale * step_v
            bad = ~((nv > 0) & (nl > nv) & np.isfinite(nl) & np.isfinite(nv))
            if not np.any(bad):
                break
            scale = np.where(bad, 0.5 * scale, scale)
        # Converged is judged on Newton's correction, the error estimate of the iterate, not on
        # the residuals: their round-off floor depends on the equation (R22's large, cancelling
        # terms leave ~1e-10 in K of the liquid at low temperature), and near Tc the Jacobian is
        # nearly singular, so a residual of 1e-12 there can still mean 1e-7 in the densities.
        # Newton converges quadratically: a full correction below _STEP_TOL leaves an error of
        # its square. Where the round-off floor of the corrections is above that (within a few
        # mK of Tc), corrections stop shrinking: they are noise, and the iterate is as good as
        # the equation allows in double precision.
        with np.errstate(invalid="ignore"):
            rel = np.maximum(np.abs(step_l) / dl, np.abs(step_v) / dv)
        full = scale == 1.0
        landed = full & (rel <= step_tol)
        stalled = full & (rel <= _NOISE_MAX) & (rel > 0.5 * previous)
        dl = np.where(done, dl, dl + scale * step_l)
        dv = np.where(done, dv, dv + scale * step_v)
        done = done | landed | stalled
        previous = np.where(full, rel, np.inf)
    ok = done & np.isfinite(dl) & np.isfinite(dv) & (dl > dv * (1 + 1e-12))
    # a pair that meets the conditions but sits on an unstable branch (∂P/∂ρ < 0, between the
    # spinodals) is not a saturation state: refuse it rather than return it
    rl_, rv_ = model.alphar(T, dl * rho_r), model.alphar(T, dv * rho_r)
    ok &= (1.0 + 2.0 * rl_.a01 + rl_.a02 > 0) & (1.0 + 2.0 * rv_.a01 + rv_.a02 > 0)
    if not np.all(ok):
        bad = np.asarray(T)[~ok].ravel()[0]
        raise ConvergenceError(f"{model.info.name}: saturation did not converge at {bad:.6g} K")
    rv = model.alphar(T, dv * rho_r)
    P = pressure_from(rv, model.R, T, dv * rho_r)
    return Saturation(T=T, P=P, rho_liquid=dl * rho_r, rho_vapor=dv * rho_r)


def density_bracketed(
    model: HelmholtzModel,
    T: FloatArray,
    P: FloatArray,
    *,
    Tc: float,
    rhoc: float,
    saturation: Callable[[FloatArray], Saturation],
) -> FloatArray:
    """Molar density of the stable phase at T [K], P [Pa] for any Helmholtz model [mol/m³]."""
    T, P = np.broadcast_arrays(np.asarray(T, dtype=float), np.asarray(P, dtype=float))
    T, P = T.ravel().copy(), P.ravel().copy()
    R = model.R
    lo = np.full_like(T, 1e-12)
    hi = np.full_like(T, np.nan)
    guess = P / (R * T)
    below = T < Tc
    if np.any(below):
        sat = saturation(T[below])
        vapour = P[below] < sat.P
        lo[below] = np.where(vapour, 1e-12, sat.rho_liquid)
        hi[below] = np.where(vapour, sat.rho_vapor, np.nan)
        guess[below] = np.where(
            vapour, np.minimum(guess[below], sat.rho_vapor), sat.rho_liquid * 1.001
        )
    # an upper bracket where none is set yet: expand until the pressure is exceeded
    need = ~np.isfinite(hi)
    if np.any(need):
        h = np.maximum(np.where(below, lo, rhoc), np.minimum(guess, model.max_density_mol()))[need]
        h = np.minimum(h * 1.05, model.max_density_mol())
        for _ in range(60):
            p_h = pressure(model, T[need], h)
            short = p_h < P[need]
            if not np.any(short):
                break
            h = np.where(short, np.minimum(h * 1.25, model.max_density_mol()), h)
        else:
            raise ConvergenceError(
                f"{model.info.name}: pressure {P[need].max():.6g} Pa is beyond the equation's reach"
            )
        hi[need] = h
    x = np.clip(guess, lo, hi)
    x = np.where((x <= lo) | (x >= hi), 0.5 * (lo + hi), x)
    done = np.zeros_like(T, dtype=bool)
    for _ in range(_MAX_ITER):
        d = model.alphar(T, x)
        f = pressure_from(d, R, T, x) - P
        df = dP_drho_from(d, R, T)
        done = done | (np.abs(f) <= 1e-12 * P)
        if np.all(done):
            break
        lo = np.where(f < 0, x, lo)
        hi = np.where(f > 0, x, hi)
        with np.errstate(divide="ignore", invalid="ignore"):
            newton = x - f / df
        inside = np.isfinite(newton) & (newton > lo) & (newton < hi) & (df > 0)
        x_new = np.where(inside, newton, 0.5 * (lo + hi))
        stalled = np.abs(hi - lo) <= 1e-15 * x
        done |= stalled
        x = np.where(done, x, x_new)
    if not np.all(done):
        i = int(np.flatnonzero(~done)[0])
        raise ConvergenceError(
            f"{model.info.name}: no density found at T = {T[i]:.6g} K, P = {P[i]:.6g} Pa"
        )
    return x


def loop_closure(
    model: HelmholtzModel, Tc_listed: float, rhoc: float
) -> tuple[float, float, float]:
    """The equation's own critical point, where its two-phase loop closes [K, Pa, mol/m³].

    For a pseudo-pure fluid (air) the listed critical point is the mixture's, and the pure-fluid
    equation's unstable region (∂P/∂ρ < 0 somewhere on the isotherm) ends at a lower temperature.
    Found by bisection on the sign of the isotherm's smallest slope near ρc.
    """
    rho = np.linspace(0.5 * rhoc, 1.6 * rhoc, 400)

    def slope(T: float) -> tuple[float, float]:
        d = model.alphar(np.full_like(rho, T), rho)
        s = 1.0 + 2.0 * d.a01 + d.a02
        i = int(np.argmin(s))
        return float(s[i]), float(rho[i])

    lo, hi = Tc_listed - 10.0, Tc_listed + 1.0
    if slope(hi)[0] < 0 or slope(lo)[0] > 0:
        return Tc_listed, float(pressure(model, np.array(Tc_listed), np.array(rhoc))), rhoc
    for _ in range(60):
        mid = 0.5 * (lo + hi)
        if slope(mid)[0] < 0:
            lo = mid
        else:
            hi = mid
    rho_c = slope(hi)[1]
    return hi, float(pressure(model, np.array(hi), np.array(rho_c))), rho_c
