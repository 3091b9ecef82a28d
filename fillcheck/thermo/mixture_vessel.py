"""The closed-vessel path of a mixture: the fixed-volume phase split along temperature.

Mass and volume fix the overall density ρ and the composition z. At each temperature the
homogeneous state (T, ρ, z) is tested for stability at its own pressure (a state with
(∂P/∂ρ)_T ≤ 0 is unstable outright); where it is stable the pressure is P(T, ρ, z) straight from
the model, and where it is not the vessel holds two phases whose pressure, amounts and
compositions come from :func:`~fillcheck.thermo.mixture_equilibrium.split_TV`.

The isochore meets the phase envelope where the stability changes. Found by bisection on
temperature, the crossing is a dew point where the incipient phase is denser than the vessel's
content (liquid forms on cooling) and a bubble point where it is lighter (the vessel is full of
one dense phase above it: "liquid-full"). At fixed temperature the two-phase states of one
composition span a band of overall densities, from the dew-point vapour to the bubble-point
liquid (or the upper dew point in the retrograde region); its ends are found the same way in ρ.
"""

from __future__ import annotations

from dataclasses import dataclass
from typing import TYPE_CHECKING

import numpy as np

from fillcheck.errors import ConvergenceError, StateError
from fillcheck.models.base import FloatArray
from fillcheck.thermo import mixture_equilibrium as eq
from fillcheck.thermo.properties import dP_dT_from, pressure_from
from fillcheck.thermo.saturation import Saturation
from fillcheck.thermo.vessel import VesselPath

if TYPE_CHECKING:
    from fillcheck.thermo.mixture_fluid import MixtureFluid

DT_SLOPE_K = 0.02
"""Temperature step of the central difference giving dP/dT in two phases [K]."""
BAND_POINTS = 28
"""Densities scanned per temperature for the two-phase band."""
BAND_TOL = 1e-5
"""Relative tolerance of the band's ends in density [-]."""


@dataclass(frozen=True)
class MixtureVesselPath(VesselPath):
    """A :class:`~fillcheck.thermo.vessel.VesselPath` with the two phases' compositions.

    liquid_x, vapour_y : mole fractions of the phases where two-phase, NaN elsewhere (m, n)
    vapour_fraction : vapour mole fraction where two-phase, NaN elsewhere [-]
    """

    liquid_x: np.ndarray | None = None
    vapour_y: np.ndarray | None = None
    vapour_fraction: np.ndarray | None = None


def _feed(f: MixtureFluid, m: int) -> np.ndarray:
    return np.broadcast_to(f.z, (m, f.z.size)).copy()


def homogeneous(f: MixtureFluid, T: np.ndarray, rho: np.ndarray):
    """Pressure [Pa], (∂P/∂T)_ρ [Pa/K] and mechanical stability of the one-phase states."""
    m = f.mixture
    z = _feed(f, T.size)
    d = m.alphar(T, rho, z)
    P = pressure_from(d, m.R, T, rho)
    dPdT = dP_dT_from(d, m.R, rho)
    mech = (1.0 + 2.0 * d.a01 + d.a02 > 0.0) & (P > 0.0)
    return P, dPdT, mech


def unstable(
    f: MixtureFluid, T: np.ndarray, rho: np.ndarray, skip: np.ndarray | None = None
) -> tuple[np.ndarray, eq.Stability]:
    """Whether the homogeneous states (T, ρ) split, and the stability result (where tested).
    States marked in ``skip`` are taken as stable without a test."""
    P, _, mech = homogeneous(f, T, rho)
    if skip is not None:
        mech = mech | skip
        P = np.where(skip, 1.0, P)
    z = _feed(f, T.size)
    tested = mech & (skip is None or ~skip)
    idx = np.flatnonzero(tested)
    if idx.size:
        # a state lying between the outer (vapour and liquid) roots of its own pressure is on
        # an inner loop of the isotherm: within the two-phase region, whatever its slope (a
        # multiparameter equation far outside its range can rise there, even to GPa)
        inner = _on_inner_loop(f, T[idx], rho[idx], P[idx], z[idx])
        mech[idx[inner]] = False
        idx = idx[~inner]
    out = ~mech
    tm = np.full(T.size, -np.inf)
    w = np.full(z.shape, np.nan)
    rw = np.full(T.size, np.nan)
    if idx.size:
        st = eq.stability(f.mixture, T[idx], P[idx], z[idx], rho[idx], f.comps, f.starter)
        out[idx] = st.unstable
        tm[idx], w[idx], rw[idx] = st.tm, st.w, st.rho_trial
    return out, eq.Stability(out, tm, w, rw)


def _on_inner_loop(f: MixtureFluid, T, rho, P, z) -> np.ndarray:
    """Whether one-phase states (T, ρ) with pressure P lie on an inner loop of their isotherm.

    Such a state is denser than the vapour root at its own pressure (or there is none) and
    lighter than the liquid root (or there is none): no stable one-phase state of the mixture
    is. Above SCAN_PRESSURE_CAP_PA the test is against the liquid root at the cap instead (a
    state beyond the cap must be a liquid denser than that root), which catches the huge
    pressures a multiparameter equation can show far outside its range."""
    if hasattr(f.mixture, "density_roots"):  # a cubic: no inner loops but its own
        return np.zeros(T.size, dtype=bool)
    rv, rl = eq.density_roots(f.mixture, T, P, z, f.starter, strict=False, fill=False)
    with np.errstate(invalid="ignore"):
        above_v = np.isnan(rv) | (rho > rv * (1 + 1e-6))
        below_l = np.isnan(rl) | (rho < rl * (1 - 1e-6))
        # (no outer root at all: the state itself would have been found on an outer branch)
        inner = above_v & below_l
        high = P > SCAN_PRESSURE_CAP_PA
        if np.any(high):
            cap = np.full(int(high.sum()), SCAN_PRESSURE_CAP_PA)
            _, rl_cap = eq.density_roots(
                f.mixture, T[high], cap, z[high], f.starter, strict=False, fill=False
            )
            inner[high] = rho[high] < rl_cap * (1 - 1e-6)
    return inner


def _split(f: MixtureFluid, T: np.ndarray, rho: np.ndarray, st: eq.Stability) -> eq.Split:
    """The split of unstable states, started from the stability test's incipient phase: at
    the homogeneous pressure where that phase is denser (the vessel's content is a vapour),
    at Raoult's bubble pressure with Wilson's vapour pressures where it is lighter (the
    content is a liquid, whose homogeneous pressure says little)."""
    z = _feed(f, T.size)
    ln_psat = f.comps.ln_wilson_k(T, np.ones(T.size))  # ln of Wilson's vapour pressure [Pa]
    P_bubble = np.sum(z * np.exp(ln_psat), axis=1)
    P_dew = 1.0 / np.sum(z * np.exp(-ln_psat), axis=1)
    tested = np.isfinite(st.rho_trial)
    dense_trial = tested & (st.rho_trial > rho)
    with np.errstate(divide="ignore", invalid="ignore"):
        lnK_s = np.log(st.w) - np.log(z)
    lnK_s = np.where(dense_trial[:, None], -lnK_s, lnK_s)
    P_hom, _, _ = homogeneous(f, T, rho)
    P0 = np.where(dense_trial, np.where(P_hom > 0.0, P_hom, P_dew), P_bubble)
    lnK0 = np.where(tested[:, None], lnK_s, f.comps.ln_wilson_k(T, P0))
    s, good = eq.split_TV(f.mixture, T, rho, z, lnK0, P0, f.starter)
    if np.all(good):
        return s
    # near a pure fluid a (T, P) flash barely splits; start instead from the nearer end of the
    # two-phase band, whose incipient phase and densities are solved directly
    bad = np.flatnonzero(~good)
    s2 = _split_from_band(f, T[bad], rho[bad])
    ok2 = eq.split_ok(s2, rho[bad], z[bad], f.mixture, T[bad], f.starter)
    if not np.all(ok2):
        i = bad[int(np.flatnonzero(~ok2)[0])]
        raise ConvergenceError(
            f"{f.model_name}: no two-phase split of {f.name} found at T = {T[i]:.6g} K, "
            f"ρ = {rho[i]:.6g} mol/m³, although the one-phase state there is unstable"
        )
    return eq.merge_rows(bad, s2, ok2, s)


def _split_from_band(f: MixtureFluid, T: np.ndarray, rho: np.ndarray) -> eq.Split:
    """Closed-vessel splits started from the band end nearer each state (in ln ρ): at the dew
    end the vapour is the feed and the liquid the incipient phase; at the bubble end the
    reverse."""
    lower, upper, _ = band_ends(f, T)
    z = _feed(f, T.size)
    dew_side = np.abs(np.log(rho / lower.rho_feed)) <= np.abs(np.log(upper.rho_feed / rho))
    b = eq.Boundary(
        *(
            np.where(dew_side.reshape((-1,) + (1,) * (np.ndim(x) - 1)), x, y)
            for x, y in zip(
                (lower.rho_feed, lower.w, lower.rho_incipient, lower.P),
                (upper.rho_feed, upper.w, upper.rho_incipient, upper.P),
                strict=True,
            )
        ),
        converged=np.where(dew_side, lower.converged, upper.converged),
    )
    w = b.w / b.w.sum(axis=1, keepdims=True)
    feed_lighter = b.rho_feed < b.rho_incipient
    start = eq.Split(
        P=b.P,
        beta=np.full(T.size, 0.5),
        x=np.where(feed_lighter[:, None], w, z),
        y=np.where(feed_lighter[:, None], z, w),
        rho_liquid=np.where(feed_lighter, b.rho_incipient, b.rho_feed),
        rho_vapor=np.where(feed_lighter, b.rho_feed, b.rho_incipient),
    )
    s, good = eq._split_newton_TV(f.mixture, T, rho, z, start)
    good &= eq.split_ok(s, rho, z, f.mixture, T, f.starter)
    if np.all(good):
        return s
    # Newton did not converge: bracket the split's pressure between the band's end pressures
    bad = np.flatnonzero(~good)
    with np.errstate(divide="ignore", invalid="ignore"):
        lnK = np.log(start.y[bad] / start.x[bad])
    s2 = eq.split_in_band(
        f.mixture, T[bad], rho[bad], z[bad], lower.P[bad], upper.P[bad], lnK, f.starter
    )
    return eq.merge_rows(bad, s2, np.ones(bad.size, bool), s)


def mixture_vessel_path(f: MixtureFluid, T: FloatArray, rho_mol: FloatArray) -> MixtureVesselPath:
    """Closed-vessel states of a mixture at T [K] and overall density ρ [mol/m³] (broadcast)."""
    T, rho = np.broadcast_arrays(np.asarray(T, dtype=float), np.asarray(rho_mol, dtype=float))
    T, rho = T.astype(float).ravel(), rho.astype(float).ravel()
    rho_max = f.eos.max_density_mol()
    if np.any(rho >= rho_max) or np.any(rho <= 0.0):
        raise StateError(
            f"{f.name}: a density of {rho.max() * f.molar_mass:.6g} kg/m³ is beyond what the "
            f"{f.model} model allows (0 to {rho_max * f.molar_mass:.6g})"
        )
    n = f.z.size
    P, dPdT, _ = homogeneous(f, T, rho)
    m = T.size
    quality = np.full(m, np.nan)
    rl, rv, beta = np.full(m, np.nan), np.full(m, np.nan), np.full(m, np.nan)
    xs, ys = np.full((m, n), np.nan), np.full((m, n), np.nan)
    cand = np.flatnonzero(T < f.two_phase_limit_K)
    two = np.zeros(m, dtype=bool)
    if cand.size:
        u, st = unstable(f, T[cand], rho[cand])
        idx = cand[u]
        two[idx] = True
        if idx.size:
            sub = eq.Stability(st.unstable[u], st.tm[u], st.w[u], st.rho_trial[u])
            s = _split(f, T[idx], rho[idx], sub)
            P[idx], rl[idx], rv[idx], beta[idx] = s.P, s.rho_liquid, s.rho_vapor, s.beta
            xs[idx], ys[idx] = s.x, s.y
            Mv = s.y @ f.molar_masses
            Mx = s.x @ f.molar_masses
            quality[idx] = s.beta * Mv / (s.beta * Mv + (1.0 - s.beta) * Mx)
            dPdT[idx] = _two_phase_slope(f, T[idx], rho[idx], s)
    if not (np.all(np.isfinite(P)) and np.all(np.isfinite(dPdT))):
        raise ConvergenceError(f"{f.model_name}: closed-vessel state of {f.name} not finite")
    T_pc, rho_pc = f._pseudo  # Kay's pseudo-critical point names the one-phase states
    phase = np.where(
        two,
        "two-phase",
        np.where(T >= T_pc, "supercritical", np.where(rho > rho_pc, "liquid", "gas")),
    )
    return MixtureVesselPath(T, rho, P, phase, quality, dPdT, rl, rv, xs, ys, beta)


def _two_phase_slope(f: MixtureFluid, T: np.ndarray, rho: np.ndarray, s: eq.Split) -> np.ndarray:
    """dP/dT along the isochore in two phases by a central difference of splits started from
    the split s at T [Pa/K]; a side that no longer splits takes the one-phase pressure."""
    TT = np.concatenate([T - DT_SLOPE_K, T + DT_SLOPE_K])
    rr = np.concatenate([rho, rho])
    z = _feed(f, TT.size)
    both = eq.Split(
        *(np.concatenate([v, v]) for v in (s.P, s.beta, s.x, s.y)),
        np.tile(s.rho_liquid, 2),
        np.tile(s.rho_vapor, 2),
    )
    w, _ = eq.split_TV(f.mixture, TT, rr, z, np.log(both.y / both.x), both.P, f.starter, start=both)
    P = np.where((w.beta >= 0.0) & (w.beta <= 1.0), w.P, homogeneous(f, TT, rr)[0])
    k = T.size
    return (P[k:] - P[:k]) / (2.0 * DT_SLOPE_K)


def _bisect(flag, lo: np.ndarray, hi: np.ndarray, flag_lo: np.ndarray, tol: np.ndarray):
    """Vectorised bisection for where ``flag`` changes between lo and hi."""
    for _ in range(60):
        if np.all(np.abs(hi - lo) <= tol):
            break
        mid = 0.5 * (lo + hi)
        fm = flag(mid)
        same = fm == flag_lo
        lo = np.where(same, mid, lo)
        hi = np.where(same, hi, mid)
    return lo, hi


def isochore_crossing(f: MixtureFluid, rho_mol: float, T_lo: float, T_hi: float):
    """Where the isochore ρ [mol/m³] leaves the two-phase region on heating, between T_lo and
    T_hi [K]: ("dew" | "liquid-full", T or None).

    "dew": liquid is present below T; "liquid-full": the vessel is full of one dense phase
    above T. None when no liquid is present at T_lo (then "dew", None), or the vessel is still
    two-phase at T_hi (the upper end of the range is returned).
    """
    T_hi = min(T_hi, f.two_phase_limit_K)
    grid = np.linspace(T_lo, T_hi, 24)
    u, st = unstable(f, grid, np.full(grid.size, rho_mol))
    if not np.any(u):
        return "dew", None
    i = int(np.flatnonzero(u)[-1])
    if i == grid.size - 1:
        kind = "dew" if _incipient_dense(st, i, rho_mol) else "liquid-full"
        return kind, float(T_hi)
    # Newton on the boundary equations from the last two-phase grid point; where it does not
    # land inside the grid interval, bisection on the stability test
    rr = np.array([rho_mol])
    T_new, bd = eq.isochore_boundary(
        f.mixture,
        rr,
        _feed(f, 1),
        np.array([0.5 * (grid[i] + grid[i + 1])]),
        st.w[i : i + 1],
        st.rho_trial[i : i + 1],
    )
    inside = bd.converged[0] and np.isfinite(st.rho_trial[i])
    inside = inside and grid[i] - 1e-9 <= T_new[0] <= grid[i + 1] + 1e-9
    if inside:
        T_cross = float(T_new[0])
        kind = "dew" if bd.rho_incipient[0] > rho_mol else "liquid-full"
        return kind, T_cross
    lo, hi = _bisect(
        lambda T: unstable(f, T, np.full(T.size, rho_mol))[0],
        np.array([grid[i]]),
        np.array([grid[i + 1]]),
        np.array([True]),
        np.array([1e-3]),
    )
    T_cross = float(0.5 * (lo[0] + hi[0]))
    _, st2 = unstable(f, lo, rr)
    kind = "dew" if _incipient_dense(st2, 0, rho_mol) else "liquid-full"
    return kind, T_cross


def _incipient_dense(st: eq.Stability, i: int, rho: float) -> bool:
    """Whether the second phase at state i is denser than the vessel's content."""
    rt = st.rho_trial[i]
    return bool(not np.isfinite(rt) or rt > rho)


SCAN_PRESSURE_CAP_PA = 100e6
"""Scanned densities whose one-phase pressure, and that of every denser scanned state, is above
this are compressed liquid, not part of a two-phase band [Pa]: a multiparameter equation far
beyond its range may show spurious loops there."""


def beyond_liquid(f: MixtureFluid, T: np.ndarray, rho: np.ndarray) -> np.ndarray:
    """For a scan laid out as (temperatures × BAND_POINTS), the states above the cap (see
    SCAN_PRESSURE_CAP_PA)."""
    P = homogeneous(f, T, rho)[0].reshape(-1, BAND_POINTS)
    top_min = np.minimum.accumulate(P[:, ::-1], axis=1)[:, ::-1]
    return (top_min > SCAN_PRESSURE_CAP_PA).ravel()


def density_scan(f: MixtureFluid) -> np.ndarray:
    """Overall densities scanned for two-phase states [mol/m³]: from a thousandth of the
    pseudo-critical density to 0.9/b of the Peng–Robinson starter (denser than any liquid of
    the mixture in a vessel), evenly in ln ρ."""
    top = min(0.98 * f.eos.max_density_mol(), 0.9 * float(f.starter.max_density_mol(f.z)))
    return np.geomspace(1e-3 * f._pseudo[1], top, BAND_POINTS)


def _band_end(f: MixtureFluid, T: np.ndarray, a: np.ndarray, b: np.ndarray) -> eq.Boundary:
    """The band's end between densities a (one phase) and b (two phases) at each T: a few
    bisections on the stability test, then Newton's method on the phase-boundary equations
    (:func:`~fillcheck.thermo.mixture_equilibrium.phase_boundary`); where that does not
    converge inside the bracket, bisection to BAND_TOL (``converged`` False there, and the
    incipient phase unknown)."""
    m, n = T.size, f.z.size
    # the incipient phase found at the two-phase end of the bracket (NaN: none found)
    st_b = eq.Stability(np.zeros(m, bool), np.zeros(m), np.full((m, n), np.nan), np.full(m, np.nan))
    for _ in range(4):
        mid = np.sqrt(a * b)
        u, st = unstable(f, T, mid)
        a = np.where(u, a, mid)
        b = np.where(u, mid, b)
        st_b = eq.Stability(
            st_b.unstable | u,
            np.where(u, st.tm, st_b.tm),
            np.where(u[:, None], st.w, st_b.w),
            np.where(u, st.rho_trial, st_b.rho_trial),
        )
    z = _feed(f, T.size)
    # where the state inside was not tested (a stretched liquid: no pressure to test at), the
    # incipient phase from Wilson's K-factors at Raoult's bubble or dew pressure
    liquid_side = a > b
    ln_psat = f.comps.ln_wilson_k(T, np.ones(T.size))
    P_b = np.sum(z * np.exp(ln_psat), axis=1)
    P_d = 1.0 / np.sum(z * np.exp(-ln_psat), axis=1)
    P0 = np.where(liquid_side, P_b, P_d)
    lnK = f.comps.ln_wilson_k(T, P0)
    w_w = z * np.exp(np.where(liquid_side[:, None], lnK, -lnK))
    w_w /= w_w.sum(axis=1, keepdims=True)
    rv0, rl0 = f.starter.density_roots(T, P0, w_w)
    tested = np.isfinite(st_b.rho_trial)
    w0 = np.where(tested[:, None], st_b.w, w_w)
    rw0 = np.where(tested, st_b.rho_trial, np.where(liquid_side, rv0, rl0))
    bd = eq.phase_boundary(f.mixture, T, z, np.sqrt(a * b), w0, rw0)
    lo, hi = np.minimum(a, b), np.maximum(a, b)
    ok = bd.converged & (bd.rho_feed >= lo * (1 - 1e-9)) & (bd.rho_feed <= hi * (1 + 1e-9))
    if np.all(ok):
        return bd
    flag = lambda r: unstable(f, T[~ok], r)[0]  # noqa: E731
    x, y = _bisect(flag, a[~ok], b[~ok], np.zeros((~ok).sum(), bool), BAND_TOL * a[~ok])
    rho = bd.rho_feed.copy()
    rho[~ok] = 0.5 * (x + y)
    P = bd.P.copy()
    P[~ok] = homogeneous(f, T[~ok], rho[~ok])[0]
    return eq.Boundary(rho, bd.w, bd.rho_incipient, P, ok)


def band_ends(f: MixtureFluid, T: FloatArray) -> tuple[eq.Boundary, eq.Boundary, np.ndarray]:
    """At each T [K], the lower and upper ends of the two-phase band (the dew point of the
    mixture as a vapour; its bubble point as a liquid, or its upper dew point above the
    mixture's critical temperature) and a mask of the temperatures where a band was found.
    Where none was, the Boundary rows are NaN."""
    T = np.atleast_1d(np.asarray(T, dtype=float))
    m, n = T.size, f.z.size
    nan = np.full(m, np.nan)
    lower = eq.Boundary(nan.copy(), np.full((m, n), np.nan), nan.copy(), nan.copy(), nan > 0)
    upper = eq.Boundary(nan.copy(), np.full((m, n), np.nan), nan.copy(), nan.copy(), nan > 0)
    grid = density_scan(f)
    TT = np.repeat(T, BAND_POINTS)
    RR = np.tile(grid, m)
    below = np.repeat(T < f.two_phase_limit_K, BAND_POINTS)
    skip = beyond_liquid(f, TT, RR) | ~below
    u = unstable(f, TT, RR, skip)[0].reshape(m, BAND_POINTS)
    has = u.any(axis=1)
    if not np.any(has):
        return lower, upper, has
    u = u[has]
    first = u.argmax(axis=1)
    last = BAND_POINTS - 1 - u[:, ::-1].argmax(axis=1)
    lo = _band_end(f, T[has], grid[np.maximum(first - 1, 0)], grid[first])
    hi = _band_end(f, T[has], grid[np.minimum(last + 1, BAND_POINTS - 1)], grid[last])
    for whole, part in ((lower, lo), (upper, hi)):
        for key in ("rho_feed", "w", "rho_incipient", "P", "converged"):
            getattr(whole, key)[has] = getattr(part, key)
    return lower, upper, has


def two_phase_band(f: MixtureFluid, T: FloatArray) -> Saturation:
    """At each T [K], the band of overall densities in which the vessel holds two phases.

    Returns a Saturation with rho_vapor and rho_liquid the band's lower and upper ends
    [mol/m³] (the dew-point vapour and the bubble-point liquid) and P the pressure at the upper
    end (the bubble pressure) [Pa]; NaN at temperatures where the scan finds no two-phase
    state (near or above the cricondentherm, where the band is narrower than the scan).
    """
    T = np.atleast_1d(np.asarray(T, dtype=float))
    lower, upper, _ = band_ends(f, T)
    return Saturation(T=T, P=upper.P, rho_liquid=upper.rho_feed, rho_vapor=lower.rho_feed)
