"""Phase equilibrium of mixtures for any mixture model: density, fugacity, stability, splits.

Everything is vectorised over a batch of m states (T, P or ρ of shape (m,), compositions of
shape (m, n)); the iterations run in lockstep with masks, so a storage range or a register is one
call. The methods are the standard ones of Michelsen, Mollerup (2007), *Thermodynamic Models:
Fundamentals & Computational Aspects*, 2nd ed., Tie-Line Publications:

- density at (T, P, x): the model's closed-form cubic roots where it has them, else Newton in
  ln ρ from a vapour-like and a liquid-like start (the starts from a Peng–Robinson "starter"
  model of the same components); of two roots the one with the lower Gibbs energy,
  gʳ/RT = αʳ + Z − 1 − ln Z, is stable (ch. 3);
- ln φᵢ = αʳ + n(∂αʳ/∂nᵢ) − ln Z (ch. 2);
- stability by the tangent-plane distance (Michelsen (1982), Fluid Phase Equilib. 9, 1):
  successive substitution ln Wᵢ ← ln zᵢ + ln φᵢ(z) − ln φᵢ(w) from Wilson K-factor starts in both
  directions and from near-pure trial phases, unstable where tm = 1 + Σ Wᵢ(ln Wᵢ + ln φᵢ(w) −
  dᵢ − 1) < 0; every ACCELERATE_EVERY-th step is extrapolated by the dominant eigenvalue
  (Crowe, Nishio (1975), AIChE J. 21, 528; Michelsen, Mollerup ch. 9), kept only where it
  lowers tm (otherwise the plain step is taken);
- the split at (T, P): Rachford–Rice (1952) with successive substitution of the K-factors
  (ch. 10), the negative flash of Whitson, Michelsen (1989), Fluid Phase Equilib. 53, 51;
- the split of a closed vessel at (T, ρ): Newton's method in (T, ρ) variables on equal
  chemical potentials, equal pressures and the vessel's component and volume balances; failing
  that, the pressure at which the (T, P) split's molar volume equals the vessel's, bracketed
  between the two-phase band's end pressures (the volume of the equilibrium system falls
  monotonically with pressure at fixed T and overall composition).
"""

from __future__ import annotations

from dataclasses import dataclass
from typing import Any

import numpy as np

from fillcheck.errors import ConvergenceError
from fillcheck.models.base import FloatArray
from fillcheck.models.mixture_base import MixtureModel
from fillcheck.thermo.properties import dP_drho_from, pressure_from

TRIVIAL_TOL = 1e-8
"""Squared distance Σ(wᵢ − zᵢ)² below which a trial phase is the feed itself."""
TRIVIAL_SHARE = 1e-12
"""A split leaving a phase less than this share of the content is the feed alone [-] (a state
that near its phase boundary has |tm| far below TM_UNSTABLE and is tested stable)."""
TM_UNSTABLE = -1e-9
"""A tangent-plane distance below this marks the state unstable [-]."""
STARTER_RATIO = 0.5
"""A liquid root of a model without closed-form roots is taken only within this ratio (either
way) of the cubic starter's liquid root; a vapour root beyond it only on the vapour branch [-]."""
LNK_MAX = 50.0
"""Bound on |ln K| in the iterations (a component absent from a phase to e⁻⁵⁰) [-]."""
ACCELERATE_EVERY = 5
"""Successive-substitution steps between two dominant-eigenvalue extrapolations."""
LAMBDA_MAX = 0.95
"""Largest dominant eigenvalue extrapolated (a jump of at most λ/(1 − λ) = 19 steps) [-]."""


@dataclass(frozen=True)
class Components:
    """What the starting values need of each component: Tc [K], Pc [Pa], ω [-]."""

    Tc: np.ndarray
    Pc: np.ndarray
    omega: np.ndarray

    def ln_wilson_k(self, T: FloatArray, P: FloatArray) -> FloatArray:
        """ln of Wilson's K-factor estimate, shape (m, n) (Wilson (1968), AIChE Meeting)."""
        T, P = np.asarray(T)[..., None], np.asarray(P)[..., None]
        return np.log(self.Pc / P) + 5.373 * (1.0 + self.omega) * (1.0 - self.Tc / T)


# --- one phase -----------------------------------------------------------------------------
def ln_phi(model: MixtureModel, T: FloatArray, rho: FloatArray, x: FloatArray) -> FloatArray:
    """ln φᵢ at T [K], ρ [mol/m³], x [-], shape (m, n)."""
    d = model.alphar(T, rho, x)
    return (d.a00 - np.log1p(d.a01))[..., None] + model.dalphar_dn(T, rho, x)


def pressure(model: MixtureModel, T: FloatArray, rho: FloatArray, x: FloatArray) -> FloatArray:
    """P(T, ρ, x) [Pa]."""
    return pressure_from(model.alphar(T, rho, x), model.R, T, rho)


def _gibbs_residual(model: MixtureModel, T, rho, x) -> FloatArray:
    d = model.alphar(T, rho, x)
    Z = 1.0 + d.a01
    return d.a00 + Z - 1.0 - np.log(Z)


def _newton_density(model: MixtureModel, T, P, x, rho0, liquid: bool) -> FloatArray:
    """One root of P(T, ρ, x) = P by Newton's method from its outer side [mol/m³].

    On the rising vapour branch P(ρ) is concave, so Newton steps in ρ from below (P(ρ) < P)
    climb to the lowest root without passing it; on the rising liquid branch P is convex (in
    ln ρ too), so steps in ln ρ from above descend to the highest root. Starting on the outer
    side keeps the iteration away from the extra loops a multiparameter equation may have
    inside the two-phase region. A step landing where (∂P/∂ρ)_T ≤ 0 means the branch has no
    root (the vapour branch of a compressed liquid, say): NaN there. Only the states not yet
    converged are evaluated at each step.
    """
    T, P = np.broadcast_arrays(np.asarray(T, dtype=float), np.asarray(P, dtype=float))
    T, P = T.ravel(), P.ravel()
    x = np.asarray(x, dtype=float).reshape(T.size, -1)
    top = 0.999 * model.max_density_mol(x)
    sign = 1.0 if liquid else -1.0  # sign·f ≥ 0 on the outer side of the root

    def evaluate(idx: np.ndarray, rho: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
        d = model.alphar(T[idx], rho, x[idx])
        return pressure_from(d, model.R, T[idx], rho) - P[idx], dP_drho_from(d, model.R, T[idx])

    rho = np.minimum(np.asarray(rho0, dtype=float).ravel() * np.ones(T.size), top)
    out = np.full(T.size, np.nan)
    act = np.arange(T.size)
    for _ in range(40):  # a start on the outer side, on a rising part of the isotherm
        f, slope = evaluate(act, rho[act])
        bad = ~((sign * f >= 0.0) & (slope > 0.0))
        if not np.any(bad):
            break
        rho[act[bad]] = np.minimum(rho[act[bad]] * (1.1 if liquid else 0.5), top[act[bad]])
    for _ in range(60):
        done = np.abs(f) <= 1e-10 * P[act]
        out[act[done]] = rho[act[done]]
        lost = (slope <= 0.0) | (sign * f < 0.0)
        keep = ~done & ~lost
        act, f, slope = act[keep], f[keep], slope[keep]
        if act.size == 0:
            break
        r = rho[act]
        if liquid:
            new = r * np.exp(np.maximum(-f / (r * slope), -0.5))
        else:
            new = np.minimum(r - f / slope, 4.0 * r)
        rho[act] = np.minimum(new, top[act])
        f, slope = evaluate(act, rho[act])
        # round-off at the root may put the last iterate a hair past it
        f = np.where(np.abs(f) <= 1e-10 * P[act], 0.0, f)
    return out


def density_roots(
    model: MixtureModel,
    T: FloatArray,
    P: FloatArray,
    x: FloatArray,
    starter: Any = None,
    strict: bool = True,
    guess: tuple[FloatArray, FloatArray] | None = None,
    fill: bool = True,
) -> tuple[FloatArray, FloatArray]:
    """Vapour-like and liquid-like densities at (T, P, x) [mol/m³]; equal where one root.

    ``starter`` is a model with closed-form ``density_roots(T, P, x)`` (a cubic of the same
    components) whose roots start the Newton iterations of a model without them; ``guess``
    (vapour, liquid; NaN where unknown), the roots of a nearby state, start them closer. Where
    no root is found, ConvergenceError is raised, or NaN returned when not ``strict`` (for
    trial phases, which may be far outside any state a vessel reaches). Where one branch has
    no root, it takes the other branch's, unless not ``fill``.
    """
    if hasattr(model, "density_roots"):
        return model.density_roots(T, P, x)
    if starter is not None:
        v_pr, l_pr = starter.density_roots(T, P, x)
    else:
        _, rho_r = model.reducing(x)
        v_pr, l_pr = P / (model.R * T), 2.8 * rho_r
    v0 = 0.5 * np.minimum(v_pr, P / (model.R * T))
    l0 = 1.15 * l_pr  # Peng–Robinson liquids are up to ~10 % too light
    if guess is not None:
        # a guess may only move a start further out: a root found before on a spurious
        # inner loop must not become the start of the next search
        near_v = np.isfinite(guess[0]) & (np.abs(np.log(guess[0] / v_pr)) < 0.3)
        near_l = np.isfinite(guess[1]) & (np.abs(np.log(guess[1] / l_pr)) < 0.3)
        v0 = np.where(near_v, np.minimum(0.99 * guess[0], v0), v0)
        l0 = np.where(near_l, np.maximum(1.01 * guess[1], l0), l0)
    rv = _newton_density(model, T, P, x, v0, liquid=False)
    rl = _newton_density(model, T, P, x, l0, liquid=True)
    # far beyond its range a multiparameter equation can have extra loops whose rising parts
    # a Newton step may land on; a real liquid root lies within tens of per cent of the
    # starter's (cubic) root of the same branch, a spurious one does not
    with np.errstate(invalid="ignore"):
        rl = np.where(np.abs(np.log(rl / l_pr)) > -np.log(STARTER_RATIO), np.nan, rl)
        far_v = np.isfinite(rv) & (np.abs(np.log(rv / v_pr)) > -np.log(STARTER_RATIO))
    # a vapour root is the root on the isotherm's vapour branch, rising from zero density,
    # which the ratio cannot tell near a critical point: there the cubic's density is off by
    # a factor of two for a small shift of its critical point, or the cubic has only a
    # liquid-like root where the equation has a vapour. A vapour root far from the starter's
    # is kept if the isotherm rises all the way to it.
    if np.any(far_v):
        i = np.flatnonzero(far_v)
        Tb = np.broadcast_to(np.asarray(T, dtype=float), rv.shape)[i]
        xb = np.asarray(x, dtype=float).reshape(rv.size, -1)[i]
        rv[i] = np.where(_on_vapour_branch(model, Tb, xb, rv[i]), rv[i], np.nan)
    # a Newton step from the liquid side can jump over the flat stretch near the liquid
    # spinodal onto a rising part of an inner loop (Span–Wagner carbon dioxide at 280 K rises
    # to 2 GPa at 12,500 mol/m³, inside the two-phase dome); a root well below its start is
    # kept only if the isotherm rises all the way from it to the start
    with np.errstate(invalid="ignore"):
        far_l = np.isfinite(rl) & (rl < LIQUID_CHECK_RATIO * l0)
    if np.any(far_l):
        i = np.flatnonzero(far_l)
        Tb = np.broadcast_to(np.asarray(T, dtype=float), rl.shape)[i]
        Pb = np.broadcast_to(np.asarray(P, dtype=float), rl.shape)[i]
        xb = np.asarray(x, dtype=float).reshape(rl.size, -1)[i]
        l0b = np.broadcast_to(l0, rl.shape)[i]
        rl[i] = _liquid_branch_root(model, Tb, Pb, xb, rl[i], l0b)
    if not fill:  # the two branches as found (NaN: no root on that branch)
        return rv, rl
    rv = np.where(np.isnan(rv), rl, rv)
    rl = np.where(np.isnan(rl), rv, rl)
    if strict and np.any(np.isnan(rv)):
        i = int(np.flatnonzero(np.isnan(rv))[0])
        raise ConvergenceError(
            f"{model.info.name}: no density at T = {np.ravel(T)[i]:.6g} K, "
            f"P = {np.ravel(P)[i]:.6g} Pa"
        )
    return rv, rl


def _liquid_branch_root(model: MixtureModel, T, P, x, rl, top) -> np.ndarray:
    """The root on the liquid branch of the isotherm at P [Pa], given a root ρ_l found below
    the outer start ``top`` [mol/m³]: ρ_l itself where (∂P/∂ρ)_T > 0 all the way from ρ_l
    to ``top``; otherwise the root between the highest density where the isotherm does not
    rise and ``top``, by bisection in ln ρ, or NaN where the pressure there is already above
    P (no liquid root at P: the branch starts above it)."""
    g = _LIQUID_BRANCH_GRID
    k = g.size
    lo, hi = np.log(rl), np.log(top)
    r = np.exp(lo[:, None] + (hi - lo)[:, None] * g[None, :])
    TT, xx = np.repeat(T, k), np.repeat(x, k, axis=0)
    with np.errstate(invalid="ignore", over="ignore"):
        d = model.alphar(TT, r.ravel(), xx)
        rising = (1.0 + 2.0 * d.a01 + d.a02).reshape(-1, k) > 0.0
    out = rl.copy()
    bad = ~np.all(rising, axis=1)
    if not np.any(bad):
        return out
    b = np.flatnonzero(bad)
    # the first grid point above the last one that does not rise
    last = k - 1 - np.argmax(~rising[b, ::-1], axis=1)
    start = np.minimum(last + 1, k - 1)
    a = np.log(r[b, start])
    c = np.full(b.size, hi[b])
    Tb, Pb, xb = T[b], P[b], x[b]
    f_a = pressure(model, Tb, np.exp(a), xb) - Pb
    found = f_a <= 0.0
    for _ in range(60):
        m = 0.5 * (a + c)
        above = pressure(model, Tb, np.exp(m), xb) - Pb > 0.0
        c = np.where(above, m, c)
        a = np.where(above, a, m)
    out[b] = np.where(found, np.exp(0.5 * (a + c)), np.nan)
    return out


LIQUID_CHECK_RATIO = 0.8
"""A liquid root below this fraction of its outer start is checked to lie on the liquid
branch (the start is 1.15 times the cubic's liquid root; real liquid roots lie within about
10 % of that root)."""

_LIQUID_BRANCH_GRID = np.linspace(0.0, 1.0, 41)
"""Fractions of the ln ρ interval from a liquid root to its outer start that are checked."""

_VAPOUR_BRANCH_GRID = np.linspace(0.02, 0.995, 40)
"""Fractions of a vapour root's density at which the isotherm is checked to rise."""


def _on_vapour_branch(model: MixtureModel, T, x, rho) -> np.ndarray:
    """Whether ρ [mol/m³] lies on the vapour branch of its isotherm: (∂P/∂ρ)_T > 0 at densities
    from 2 % to 99.5 % of ρ, so the pressure rises from zero to ρ with no spinodal between (a
    root reached past a spinodal lies on an inner loop of the two-phase region)."""
    g = _VAPOUR_BRANCH_GRID
    k = g.size
    r = (rho[:, None] * g[None, :]).ravel()
    with np.errstate(invalid="ignore", over="ignore"):
        d = model.alphar(np.repeat(T, k), r, np.repeat(x, k, axis=0))
        return np.all((1.0 + 2.0 * d.a01 + d.a02).reshape(-1, k) > 0.0, axis=1)


def stable_density(
    model: MixtureModel,
    T: FloatArray,
    P: FloatArray,
    x: FloatArray,
    starter: Any = None,
    strict: bool = True,
) -> FloatArray:
    """The density of lowest Gibbs energy at (T, P, x) [mol/m³] (NaN where none is found and
    not ``strict``)."""
    return _stable_pair(model, T, P, x, starter, strict)[0]


def _stable_pair(model, T, P, x, starter, strict, guess=None):
    """The stable density and both roots (for warm starts)."""
    rv, rl = density_roots(model, T, P, x, starter, strict, guess)
    with np.errstate(invalid="ignore"):
        gv = _gibbs_residual(model, T, np.nan_to_num(rv, nan=1.0), x)
        gl = _gibbs_residual(model, T, np.nan_to_num(rl, nan=1.0), x)
    return np.where(gl < gv, rl, rv), rv, rl


# --- stability -----------------------------------------------------------------------------
@dataclass(frozen=True)
class Stability:
    """Result of a stability test of m states.

    unstable : whether a second phase lowers the Gibbs energy
    tm : the smallest tangent-plane distance found [-]
    w : the composition of that trial phase, shape (m, n) [-]
    rho_trial : its density [mol/m³]
    """

    unstable: np.ndarray
    tm: np.ndarray
    w: np.ndarray
    rho_trial: np.ndarray


def stability(
    model: MixtureModel,
    T: FloatArray,
    P: FloatArray,
    z: FloatArray,
    rho_z: FloatArray,
    comps: Components,
    starter: Any = None,
    max_iter: int = 100,
) -> Stability:
    """Tangent-plane stability test of feeds z at density ρ_z [mol/m³] and its pressure P [Pa]
    (module docstring). A trial phase of the feed's own composition at another density counts:
    it finds a homogeneous state that is metastable."""
    T, P = np.asarray(T, dtype=float), np.asarray(P, dtype=float)
    m, n = z.shape
    d = np.log(z) + ln_phi(model, T, rho_z, z)
    lnK = comps.ln_wilson_k(T, P)
    trials = [np.log(z) + lnK, np.log(z) - lnK]
    for j in range(n):
        pure = np.full((m, n), np.log(1e-3 / max(n - 1, 1)))
        pure[:, j] = np.log(0.999)
        trials.append(pure)
    t = len(trials)
    lnW = np.concatenate(trials)  # (t·m, n)
    TT, PP, dd, zz = np.tile(T, t), np.tile(P, t), np.tile(d, (t, 1)), np.tile(z, (t, 1))
    rr = np.tile(np.asarray(rho_z, dtype=float), t)
    active = np.ones(t * m, dtype=bool)
    tm = np.zeros(t * m)
    rho_w = np.zeros(t * m)
    g_v, g_l = np.full(t * m, np.nan), np.full(t * m, np.nan)
    step = np.zeros_like(lnW)  # the last plain step, for the eigenvalue estimate
    plain = np.zeros_like(lnW)  # where an extrapolated row goes back to if tm rose
    tm_before = np.full(t * m, np.inf)
    jumped = np.zeros(t * m, dtype=bool)
    for it in range(max_iter):
        a = np.flatnonzero(active)
        if a.size == 0:
            break
        lnW[a] = np.clip(lnW[a], -LNK_MAX * 10.0, 50.0)
        W = np.exp(lnW[a])
        w = W / W.sum(axis=1, keepdims=True)
        rho, g_v[a], g_l[a] = _stable_pair(model, TT[a], PP[a], w, starter, False, (g_v[a], g_l[a]))
        lost = np.isnan(rho)
        rho = np.where(lost, rr[a], rho)
        lp = np.where(lost[:, None], 0.0, ln_phi(model, TT[a], rho, w))
        tm_a = 1.0 + np.sum(W * (lnW[a] + lp - dd[a] - 1.0), axis=1)
        # an extrapolation that raised tm (or lost its density) is undone: the row takes the
        # plain step it replaced, evaluated next time round
        undo = jumped[a] & (lost | ~(tm_a <= tm_before[a]))
        jumped[a] = False
        if np.any(undo):
            u = a[undo]
            lnW[u] = plain[u]
            keep = ~undo
            a, W, w, rho, lost, lp, tm_a = (v[keep] for v in (a, W, w, rho, lost, lp, tm_a))
        tm[a] = tm_a
        rho_w[a] = rho
        new = dd[a] - lp
        change = np.max(np.abs(new - lnW[a]), axis=1)
        last, step[a] = step[a], new - lnW[a]
        lnW[a] = new
        trivial = (np.sum((w - zz[a]) ** 2, axis=1) < TRIVIAL_TOL) & (
            np.abs(rho / rr[a] - 1.0) < 1e-6
        )
        stop = (change < 1e-8) | (tm[a] < -1e-4) | trivial | lost
        tm[a] = np.where((trivial & (tm[a] > TM_UNSTABLE)) | lost, 0.0, tm[a])
        active[a[stop]] = False
        if it % ACCELERATE_EVERY == ACCELERATE_EVERY - 1:
            with np.errstate(invalid="ignore", divide="ignore"):
                lam = np.sum(step[a] * last, axis=1) / np.sum(last * last, axis=1)
            go = np.isfinite(lam) & (lam > 0.0) & (lam < LAMBDA_MAX) & ~stop
            if np.any(go):
                g = a[go]
                plain[g] = new[go]
                tm_before[g] = tm_a[go]
                jumped[g] = True
                lnW[g] = new[go] + step[g] * (lam[go] / (1.0 - lam[go]))[:, None]
    tm_all = tm.reshape(t, m)
    best = np.argmin(tm_all, axis=0)
    rows = best * m + np.arange(m)
    W = np.exp(np.minimum(lnW[rows], 50.0))
    return Stability(
        unstable=tm_all[best, np.arange(m)] < TM_UNSTABLE,
        tm=tm_all[best, np.arange(m)],
        w=W / W.sum(axis=1, keepdims=True),
        rho_trial=rho_w[rows],
    )


# --- splits --------------------------------------------------------------------------------
def rachford_rice(z: FloatArray, K: FloatArray) -> FloatArray:
    """Vapour fraction β solving Σ zᵢ(Kᵢ − 1)/(1 + β(Kᵢ − 1)) = 0, negative flash allowed [-].

    Bisection safeguarded Newton inside the window between the asymptotes
    1/(1 − K_max) < β < 1/(1 − K_min).
    """
    km1 = K - 1.0
    kmax, kmin = K.max(axis=1), K.min(axis=1)
    with np.errstate(divide="ignore"):
        lo = np.where(kmax > 1.0, 1.0 / (1.0 - kmax), -1e6) + 1e-12
        hi = np.where(kmin < 1.0, 1.0 / (1.0 - kmin), 1e6) - 1e-12
    beta = np.clip(0.5, lo, hi)
    for _ in range(100):
        den = 1.0 + beta[:, None] * km1
        g = np.sum(z * km1 / den, axis=1)
        dg = -np.sum(z * km1**2 / den**2, axis=1)
        lo = np.where(g > 0.0, beta, lo)
        hi = np.where(g < 0.0, beta, hi)
        with np.errstate(divide="ignore", invalid="ignore"):
            nb = beta - g / dg
        nb = np.where((nb > lo) & (nb < hi) & np.isfinite(nb), nb, 0.5 * (lo + hi))
        if np.all(np.abs(nb - beta) < 1e-14 * np.maximum(1.0, np.abs(beta))):
            beta = nb
            break
        beta = nb
    return beta


@dataclass(frozen=True)
class Split:
    """Two coexisting phases of m states.

    P : pressure [Pa];  beta : vapour mole fraction [-] (between 0 and 1 in a true split)
    x, y : liquid and vapour compositions (m, n) [-];  rho_liquid, rho_vapor [mol/m³]
    """

    P: np.ndarray
    beta: np.ndarray
    x: np.ndarray
    y: np.ndarray
    rho_liquid: np.ndarray
    rho_vapor: np.ndarray


def flash_TP(
    model: MixtureModel,
    T: FloatArray,
    P: FloatArray,
    z: FloatArray,
    lnK: FloatArray,
    starter: Any = None,
    max_iter: int = 200,
) -> tuple[Split, np.ndarray]:
    """The (T, P) split from starting ln K by successive substitution; also a mask of the
    states where it converged to two distinct phases."""
    lnK = np.clip(np.nan_to_num(np.array(lnK, dtype=float), nan=0.0), -LNK_MAX, LNK_MAX)
    m = z.shape[0]
    conv = np.zeros(m, dtype=bool)
    for _ in range(max_iter):
        s = _split_state(model, T, z, lnK, np.log(P), starter)
        lost = np.isnan(s.rho_liquid) | np.isnan(s.rho_vapor)
        rl = np.where(lost, 1.0, s.rho_liquid)
        rv = np.where(lost, 1.0, s.rho_vapor)
        new = ln_phi(model, T, rl, s.x) - ln_phi(model, T, rv, s.y)
        new = np.where(lost[:, None], 0.0, np.clip(new, -LNK_MAX, LNK_MAX))
        change = np.max(np.abs(new - lnK), axis=1)
        lnK = new
        conv = change < 1e-11
        if np.all(conv | (np.max(np.abs(lnK), axis=1) < 1e-6)):
            break
    distinct = np.max(np.abs(lnK), axis=1) > 1e-6
    P = np.asarray(P, dtype=float) * np.ones(m)
    s = _split_state(model, T, z, lnK, np.log(P), starter)
    found = ~(np.isnan(s.rho_liquid) | np.isnan(s.rho_vapor))
    return _denser_is_liquid(s), conv & distinct & found


def _split_state(model, T, z, lnK, lnP, starter):
    """The (T, P) split for given K-factors and pressure (one pass, no iteration); NaN
    densities where a phase has none."""
    K = np.exp(np.clip(lnK, -LNK_MAX, LNK_MAX))
    beta = rachford_rice(z, K)
    x = z / (1.0 + beta[:, None] * (K - 1.0))
    x = x / x.sum(axis=1, keepdims=True)
    y = K * x
    y = y / y.sum(axis=1, keepdims=True)
    P = np.exp(lnP)
    # each phase on its own branch (the usual flash convention): on the lowest-Gibbs root a
    # vapour composition just inside its dew pressure would be taken as a liquid, and the
    # iteration would collapse onto the feed
    rl = density_roots(model, T, P, x, starter, strict=False)[1]
    rv = density_roots(model, T, P, y, starter, strict=False)[0]
    return Split(P=P, beta=beta, x=x, y=y, rho_liquid=rl, rho_vapor=rv)


def _newton_fd(residual, u: np.ndarray, tol: float, admissible=None, max_iter: int = 40):
    """Newton's method, row by row, on ``residual(u) -> (r, extra)`` with a forward-difference
    Jacobian; each step is scaled to at most 0.5 in any unknown and halved (up to eight times)
    until the sum of squared residuals falls and ``admissible(u)`` holds; converged where the
    largest residual is below ``tol``. ``extra`` is a dict of arrays
    (one row per state) kept for the accepted iterate. Returns u, r and extra."""
    r, extra = residual(u)
    k = u.shape[1]
    for _ in range(max_iter):
        norm = np.max(np.abs(r), axis=1)
        norm = np.where(np.isfinite(norm), norm, np.inf)
        if np.all(norm < tol):
            break
        merit = np.sum(r * r, axis=1)  # steps are accepted on the 2-norm, converged on max
        merit = np.where(np.isfinite(merit), merit, np.inf)
        J = np.empty((u.shape[0], k, k))
        for j in range(k):
            du = u.copy()
            du[:, j] += 1e-7
            J[:, :, j] = (residual(du)[0] - r) / 1e-7
        with np.errstate(invalid="ignore", over="ignore"):
            try:
                step = -np.linalg.solve(J, r[..., None])[..., 0]
            except np.linalg.LinAlgError:
                break
        step = np.where(np.isfinite(step), step, 0.0)
        step *= np.minimum(1.0, 0.5 / np.maximum(np.max(np.abs(step), axis=1), 1e-300))[:, None]
        lam = np.ones(u.shape[0])
        for _ in range(8):
            u_new = u + lam[:, None] * step
            with np.errstate(invalid="ignore", over="ignore", divide="ignore"):
                r_new, x_new = residual(u_new)
            n_new = np.sum(r_new * r_new, axis=1)
            better = np.isfinite(n_new) & (n_new < merit)
            if admissible is not None:
                better &= admissible(u_new)
            if np.all(better | (norm < tol)):
                break
            lam = np.where(better, lam, 0.5 * lam)
        take = better & (norm >= tol)
        if not np.any(take):
            break
        u = np.where(take[:, None], u_new, u)
        r = np.where(take[:, None], r_new, r)
        extra = {
            key: np.where(take.reshape((-1,) + (1,) * (v.ndim - 1)), x_new[key], v)
            for key, v in extra.items()
        }
    return u, r, extra


def _chemical_potentials(model, T, rho, x):
    """ln(xᵢρ) + ∂(nαʳ)/∂nᵢ (the (T, ρ)-dependent part of μᵢ/RT) and P [Pa]."""
    xn = x / x.sum(axis=1, keepdims=True)
    d = model.alphar(T, rho, xn)
    mu = np.log(x) + np.log(rho)[:, None] + d.a00[:, None] + model.dalphar_dn(T, rho, xn)
    return mu, pressure_from(d, model.R, T, rho)


def _split_newton_TV(model, T, rho, z, start: Split) -> tuple[Split, np.ndarray]:
    """The closed-vessel split by Newton's method in (T, ρ) variables from a starting split.

    Unknowns u = (ln y, ln x, ln ρ_v, ln ρ_l, β); equations: equal μᵢ, equal pressures,
    Σy = 1, the component balances βyᵢ + (1 − β)xᵢ = zᵢ and the volume balance
    β/ρ_v + (1 − β)/ρ_l = 1/ρ. No density is solved from a pressure. Returns the split and
    a mask of the states where it converged to two distinct phases with 0 ≤ β ≤ 1."""
    n = z.shape[1]

    def residual(u):
        y, x = np.exp(u[:, :n]), np.exp(u[:, n : 2 * n])
        rv, rl, beta = np.exp(u[:, 2 * n]), np.exp(u[:, 2 * n + 1]), u[:, 2 * n + 2]
        mv_, Pv = _chemical_potentials(model, T, rv, y)
        ml, Pl = _chemical_potentials(model, T, rl, x)
        r = np.concatenate(
            [
                mv_ - ml,
                ((Pv - Pl) / (rho * model.R * T))[:, None],
                (y.sum(axis=1) - 1.0)[:, None],
                beta[:, None] * y + (1.0 - beta[:, None]) * x - z,
                (rho * (beta / rv + (1.0 - beta) / rl) - 1.0)[:, None],
            ],
            axis=1,
        )
        return r, {"P": 0.5 * (Pv + Pl)}

    with np.errstate(divide="ignore", invalid="ignore"):
        beta0 = (1.0 / rho - 1.0 / start.rho_liquid) / (
            1.0 / start.rho_vapor - 1.0 / start.rho_liquid
        )
    beta0 = np.clip(np.nan_to_num(beta0, nan=0.5), 1e-4, 1.0 - 1e-4)
    u0 = np.concatenate(
        [
            np.log(np.clip(start.y, 1e-300, None)),
            np.log(np.clip(start.x, 1e-300, None)),
            np.log(start.rho_vapor)[:, None],
            np.log(start.rho_liquid)[:, None],
            beta0[:, None],
        ],
        axis=1,
    )
    u0 = np.nan_to_num(u0, nan=0.0, posinf=0.0, neginf=-690.0)
    u, r, extra = _newton_fd(residual, u0, 1e-11)
    y, x = np.exp(u[:, :n]), np.exp(u[:, n : 2 * n])
    rv, rl, beta = np.exp(u[:, 2 * n]), np.exp(u[:, 2 * n + 1]), u[:, 2 * n + 2]
    distinct = np.abs(np.log(rl / rv)) > 1e-6
    ok = (np.max(np.abs(r), axis=1) < 1e-9) & distinct & (beta >= 0.0) & (beta <= 1.0)
    out = Split(
        P=extra["P"],
        beta=beta,
        x=x / x.sum(axis=1, keepdims=True),
        y=y / y.sum(axis=1, keepdims=True),
        rho_liquid=rl,
        rho_vapor=rv,
    )
    return _denser_is_liquid(out), ok


def split_TV(
    model: MixtureModel,
    T: FloatArray,
    rho: FloatArray,
    z: FloatArray,
    lnK0: FloatArray,
    P0: FloatArray,
    starter: Any = None,
    start: Split | None = None,
) -> tuple[Split, np.ndarray]:
    """The two-phase state of closed vessels at T [K], overall density ρ [mol/m³], feed z.

    ``lnK0`` (vapour over liquid) and ``P0`` [Pa] start the iterations: a few successive
    substitutions of a (T, P) flash at P0, then Newton's method in (T, ρ) variables
    (:func:`_split_newton_TV`); ``start``, a split of nearby states, replaces the successive
    substitutions. Returns the splits and a mask of those that pass :func:`split_ok`; the
    others need a better start (the closed-vessel path starts them from the two-phase band's
    ends and brackets them with :func:`split_in_band`).
    """
    T, rho, z = np.asarray(T, dtype=float), np.asarray(rho, dtype=float), np.asarray(z, float)
    if start is None:
        P0 = np.asarray(P0, dtype=float) * np.ones(T.size)
        start, _ = flash_TP(model, T, P0, z, np.array(lnK0, dtype=float), starter, max_iter=8)
    s, good = _split_newton_TV(model, T, rho, z, start)
    return s, good & split_ok(s, rho, z, model, T, starter)


def split_in_band(
    model: MixtureModel,
    T: FloatArray,
    rho: FloatArray,
    z: FloatArray,
    P_lo: FloatArray,
    P_hi: FloatArray,
    lnK0: FloatArray,
    starter: Any = None,
) -> Split:
    """The closed-vessel split between the band's end pressures at T: P_lo at the lower end
    (dew) and P_hi at the upper end [Pa]. The pressure of the two-phase states of one
    composition rises with the overall density across the band, so the split is bracketed; the
    Illinois variant of regula falsi on ln P with a (T, P) flash at each step (K-factors carried
    from step to step) finds it, then Newton's method in (T, ρ) variables polishes it."""
    T, rho = np.asarray(T, dtype=float), np.asarray(rho, dtype=float)
    v_t = 1.0 / rho
    a, b = np.log(np.asarray(P_lo, float)), np.log(np.asarray(P_hi, float))
    lnK = np.array(lnK0, dtype=float)

    def f(lnP: np.ndarray) -> tuple[np.ndarray, Split]:
        s, _ = flash_TP(model, T, np.exp(lnP), z, lnK, starter, max_iter=100)
        with np.errstate(invalid="ignore", divide="ignore"):
            v = s.beta / s.rho_vapor + (1.0 - s.beta) / s.rho_liquid
        return v / v_t - 1.0, s

    fa = np.full(T.size, 1.0)  # above the vessel's volume at the lower end (by construction)
    fb = np.full(T.size, -1.0)
    side = np.zeros(T.size)
    s = None
    for _ in range(60):
        c = np.where(
            np.isfinite(fa) & np.isfinite(fb) & (fa != fb),
            (a * fb - b * fa) / (fb - fa),
            0.5 * (a + b),
        )
        c = np.where((c > np.minimum(a, b)) & (c < np.maximum(a, b)), c, 0.5 * (a + b))
        fc, s = f(c)
        with np.errstate(divide="ignore", invalid="ignore"):
            ok = np.isfinite(np.log(s.y / s.x)).all(axis=1)
            lnK = np.where(ok[:, None], np.log(s.y / s.x), lnK)
        fc = np.where(np.isfinite(fc), fc, 0.0)
        if np.all((np.abs(fc) < 1e-10) | (np.abs(b - a) < 1e-12)):
            break
        low = fc > 0.0
        a, fa = np.where(low, c, a), np.where(low, fc, fa)
        b, fb = np.where(low, b, c), np.where(low, fb, fc)
        fb = np.where(low & (side == 1), 0.5 * fb, fb)
        fa = np.where(~low & (side == -1), 0.5 * fa, fa)
        side = np.where(low, 1, -1)
    polished, good = _split_newton_TV(model, T, rho, z, s)
    return _merge(good, polished, s)


def split_ok(
    s: Split,
    rho: FloatArray,
    z: FloatArray,
    model: MixtureModel | None = None,
    T=None,
    starter: Any = None,
) -> np.ndarray:
    """Which splits are real: finite, 0 < β < 1 (not within TRIVIAL_SHARE of either end: the
    trivial solution), two phases of different density, the
    vessel's volume kept (β/ρ_v + (1 − β)/ρ_l = 1/ρ) and every component's amount
    (βyᵢ + (1 − β)xᵢ = zᵢ). Given the model (one without closed-form
    roots), each phase must also sit on the outer root of its own branch at the split's
    pressure: Newton's method in (T, ρ) variables can otherwise settle on an inner loop."""
    with np.errstate(invalid="ignore", divide="ignore"):
        v = s.beta / s.rho_vapor + (1.0 - s.beta) / s.rho_liquid
        ok = (
            np.isfinite(v)
            & (s.beta >= 0.0)
            & (s.beta <= 1.0)
            & (np.abs(np.log(s.rho_liquid / s.rho_vapor)) > 1e-6)
            & (np.abs(v * np.asarray(rho) - 1.0) < 1e-8)
        )
        ok &= (
            np.max(np.abs(s.beta[:, None] * s.y + (1.0 - s.beta[:, None]) * s.x - z), axis=1) < 1e-8
        )
        # the trivial solution: one phase is the feed itself and the other has no share (its
        # chemical potentials can equal the feed's at a stationary point of the tangent plane
        # that is not the split); a real split of an unstable state leaves both phases a share
        ok &= (s.beta > TRIVIAL_SHARE) & (s.beta < 1.0 - TRIVIAL_SHARE)
    if model is None or hasattr(model, "density_roots") or not np.any(ok):
        return ok
    i = np.flatnonzero(ok)
    Ti = np.asarray(T, dtype=float)[i]
    # the branch's own root, or the other branch's where this one has none (a fluid with a
    # single root at that pressure may be reached from either side)
    rv = density_roots(model, Ti, s.P[i], s.y[i], starter, strict=False)[0]
    rl = density_roots(model, Ti, s.P[i], s.x[i], starter, strict=False)[1]
    with np.errstate(invalid="ignore"):
        outer = (np.abs(s.rho_vapor[i] / rv - 1.0) < 1e-6) & (
            np.abs(s.rho_liquid[i] / rl - 1.0) < 1e-6
        )
    ok[i] = outer
    return ok


def merge_rows(idx: np.ndarray, part: Split, take: np.ndarray, whole: Split) -> Split:
    """``whole`` with its rows idx replaced by the rows of ``part`` marked in ``take``."""
    return _merge(
        np.isin(np.arange(whole.P.size), idx),
        _scatter(idx, _pick(part, take), whole),
        whole,
    )


def _pick(s: Split, take: np.ndarray) -> Split:
    return Split(*(getattr(s, f)[take] for f in ("P", "beta", "x", "y", "rho_liquid", "rho_vapor")))


def _merge(mask: np.ndarray, a: Split, b: Split) -> Split:
    """Split a where mask, else b."""
    m1, m2 = mask, mask[:, None]
    return Split(
        P=np.where(m1, a.P, b.P),
        beta=np.where(m1, a.beta, b.beta),
        x=np.where(m2, a.x, b.x),
        y=np.where(m2, a.y, b.y),
        rho_liquid=np.where(m1, a.rho_liquid, b.rho_liquid),
        rho_vapor=np.where(m1, a.rho_vapor, b.rho_vapor),
    )


def _scatter(idx: np.ndarray, part: Split, like: Split) -> Split:
    """A Split shaped like ``like`` holding ``part`` at rows idx."""
    out = {k: np.array(getattr(like, k), copy=True) for k in like.__dataclass_fields__}
    for k in out:
        out[k][idx] = getattr(part, k)
    return Split(**out)


def _denser_is_liquid(s: Split) -> Split:
    swap = s.rho_vapor > s.rho_liquid
    return Split(
        P=s.P,
        beta=np.where(swap, 1.0 - s.beta, s.beta),
        x=np.where(swap[:, None], s.y, s.x),
        y=np.where(swap[:, None], s.x, s.y),
        rho_liquid=np.where(swap, s.rho_vapor, s.rho_liquid),
        rho_vapor=np.where(swap, s.rho_liquid, s.rho_vapor),
    )


# --- phase boundaries ------------------------------------------------------------------------
@dataclass(frozen=True)
class Boundary:
    """A point of the phase envelope: the feed z just able to form an incipient phase w.

    rho_feed, rho_incipient [mol/m³]; w (m, n) [-]; P [Pa]; converged: mask of solved states.
    """

    rho_feed: np.ndarray
    w: np.ndarray
    rho_incipient: np.ndarray
    P: np.ndarray
    converged: np.ndarray


def _boundary_equations(model, T, z, ln_w, rz, rw):
    """Residuals of a phase-boundary point: equal chemical potentials in (T, ρ) form,
    ln(wᵢρ_w) + ∂(nαʳ)/∂nᵢ(w, ρ_w) = ln(zᵢρ_z) + ∂(nαʳ)/∂nᵢ(z, ρ_z), equal pressures, Σw = 1;
    and the feed's pressure."""
    w = np.exp(ln_w)
    mz, Pz = _chemical_potentials(model, T, rz, z)
    mw, Pw = _chemical_potentials(model, T, rw, w)
    r_P = (Pw - Pz) / (rz * model.R * T)
    return np.concatenate([mw - mz, r_P[:, None], (w.sum(axis=1) - 1.0)[:, None]], axis=1), Pz


def _boundary_residual(model, T, z, u):
    """:func:`_boundary_equations` in u = (ln w, ln ρ_z, ln ρ_w) at fixed T."""
    n = z.shape[1]
    return _boundary_equations(model, T, z, u[:, :n], np.exp(u[:, n]), np.exp(u[:, n + 1]))


def isochore_boundary(
    model: MixtureModel,
    rho_feed: FloatArray,
    z: FloatArray,
    T0: FloatArray,
    w: FloatArray,
    rho_incipient: FloatArray,
) -> tuple[np.ndarray, Boundary]:
    """Where a closed vessel's isochore meets the phase envelope: the temperature [K] at which
    the feed at density ρ_z [mol/m³] is just able to form an incipient phase, by Newton's
    method in u = (ln w, ln T, ln ρ_w) from a nearby T0 and incipient phase (as
    :func:`phase_boundary`, with the temperature unknown instead of the feed's density)."""
    z = np.asarray(z, dtype=float)
    rz = np.asarray(rho_feed, dtype=float)
    n = z.shape[1]

    def residual(u):
        T = np.exp(u[:, n])
        r, P = _boundary_equations(model, T, z, u[:, :n], rz, np.exp(u[:, n + 1]))
        return r, {"P": P}

    u0 = np.concatenate(
        [
            np.log(np.clip(w, 1e-300, None)),
            np.log(np.asarray(T0, float))[:, None],
            np.log(np.asarray(rho_incipient, float))[:, None],
        ],
        axis=1,
    )
    u, r, extra = _newton_fd(residual, u0, 1e-11)
    w_out, T, rw = np.exp(u[:, :n]), np.exp(u[:, n]), np.exp(u[:, n + 1])
    trivial = (np.max(np.abs(w_out - z), axis=1) < 1e-6) & (np.abs(rw / rz - 1.0) < 1e-6)
    ok = (np.max(np.abs(r), axis=1) < 1e-9) & ~trivial
    return T, Boundary(rho_feed=rz, w=w_out, rho_incipient=rw, P=extra["P"], converged=ok)


def phase_boundary(
    model: MixtureModel,
    T: FloatArray,
    z: FloatArray,
    rho_feed: FloatArray,
    w: FloatArray,
    rho_incipient: FloatArray,
) -> Boundary:
    """Dew, bubble and retrograde points at T [K] by Newton's method in (T, ρ) variables.

    Unknowns: the incipient phase's composition w and density ρ_w and the feed's density ρ_z
    (no density has to be solved from a pressure, which keeps stiff liquids well behaved);
    equations: equal chemical potentials of every component, equal pressures, Σw = 1. The
    Jacobian is by forward differences, steps are halved until the residual falls. The
    starting values come from a stability test near the boundary. States that do not converge,
    or converge to the trivial solution w = z, ρ_w = ρ_z, are marked in ``converged``.
    """
    T = np.asarray(T, dtype=float)
    z = np.asarray(z, dtype=float)
    n = z.shape[1]
    u = np.concatenate(
        [
            np.log(np.clip(w, 1e-300, None)),
            np.log(np.asarray(rho_feed, float))[:, None],
            np.log(np.asarray(rho_incipient, float))[:, None],
        ],
        axis=1,
    )
    u, r, _ = _newton_fd(lambda v: (_boundary_residual(model, T, z, v)[0], {}), u, 1e-11)
    P = _boundary_residual(model, T, z, u)[1]
    w_out = np.exp(u[:, :n])
    rz, rw = np.exp(u[:, n]), np.exp(u[:, n + 1])
    trivial = (np.max(np.abs(w_out - z), axis=1) < 1e-6) & (np.abs(rw / rz - 1.0) < 1e-6)
    ok = (np.max(np.abs(r), axis=1) < 1e-9) & ~trivial
    return Boundary(rho_feed=rz, w=w_out, rho_incipient=rw, P=P, converged=ok)
