"""Fit the superancillary saturation expansions of every reference equation to fillcheck's solver.

Run: ``PYTHONPATH=. python tools/build_superancillaries.py [--only NAME ...] [--check]``.

For each pure fluid of the catalog with a multiparameter reference equation, the saturation
pressure and the two orthobaric densities are fitted, as ln P, ln ρ' and ln ρ'' against
s = √(Tc − T), by Chebyshev interpolants on intervals that are halved until each reproduces
fillcheck's own equilibrium solver (``Fluid.saturation_solved(..., to_round_off=True)``) to
TOLERANCE relative at the points midway between its nodes (the method of Bell and Deiters; see
fillcheck/fluids/superancillary.py for the publications and what fillcheck does differently).
The intervals run from the fluid's lowest saturation temperature towards Tc; close to Tc the
equilibrium conditions are resolved in double precision only to ~1e-13 K/(Tc − T), intervals
there stop passing, and the expansions end at the lowest edge of the run of passing intervals
that starts at the triple point (``T_top``). Every file records the coefficient fingerprint of
the equation it was fitted to, and the largest deviation from the solver found on a check grid of
VERIFY_POINTS random temperatures; a deviation above VERIFY_TOLERANCE stops the build (exit 1).

``--check`` rewrites nothing: it reports each shipped file as fitting or stale (exit 1 if any is
stale or missing) and re-measures its deviation from the solver.
"""

from __future__ import annotations

import argparse
import json
import math
import sys
import time

import numpy as np

import fillcheck
from fillcheck.errors import FillcheckError
from fillcheck.fluids.catalog import lookup
from fillcheck.fluids.superancillary import (
    DATA_DIR,
    FORMAT,
    QUANTITIES,
    Superancillary,
    chebyshev_coefficients,
    chebyshev_lobatto_nodes,
    clenshaw,
    data_path,
    parse,
    staleness,
)
from fillcheck.models.registry import available_models
from fillcheck.thermo.fluid import Fluid
from fillcheck.thermo.helmholtz_solvers import saturation_newton

DEGREE = 12
"""Degree of every expansion (13 Chebyshev–Lobatto nodes an interval)."""
TOLERANCE = 1e-12
"""An interval passes when its expansions reproduce the solver to this (relative, in P, ρ', ρ'')
at the points midway between its nodes, or to FLOOR_FACTOR times the solver's own round-off
floor there where that is larger (see solver_floor)."""
FLOOR_FACTOR = 4.0
"""How many times the solver's measured round-off floor an interval may deviate by."""
LARGEST_TOLERANCE = 1e-8
"""No interval is accepted on a looser tolerance than this: the expansions end there."""
VERIFY_FACTOR = 2.0
"""The random check grid may deviate from the solver by this many times the interval tolerance."""
VERIFY_POINTS = 2000
CLOSEST_K = 1e-3
"""The search for passing intervals starts this far below Tc (or ten times the fluid's own
saturation gap, whichever is more) [K]."""
MIN_WIDTH = 2.0**-14
"""No interval narrower than this share of the whole s-range is tried: it fails instead."""

CITATION = (
    "Method: I. H. Bell, U. K. Deiters, Ind. Eng. Chem. Res. 60 (2021) 9983, "
    "doi:10.1021/acs.iecr.1c00847; I. H. Bell et al., Int. J. Thermophys. 42 (2021) 75, "
    "doi:10.1007/s10765-021-02824-x; I. H. Bell, J. Phys. Chem. Ref. Data 53 (2024) 013102, "
    "doi:10.1063/5.0191228. Fitted to fillcheck's own saturation solver "
    "(Fluid.saturation_solved, iterated to round-off) by tools/build_superancillaries.py."
)


def reference_fluids() -> list[str]:
    """Canonical names of the catalog fluids whose default model is a reference equation."""
    return [n for n in fillcheck.available_fluids() if "reference" in available_models(lookup(n))]


def _solved(f: Fluid, s: np.ndarray) -> np.ndarray:
    """ln P, ln ρ', ln ρ'' from the solver at s = √(Tc − T), shape (3, len(s))."""
    T = f.model_critical[0] - s * s
    T = np.maximum(T, f.T_min_saturation)  # s_max² may round a hair below the lowest T
    sat = f.saturation_solved(T, to_round_off=True)
    return np.log(np.stack([sat.P, sat.rho_liquid, sat.rho_vapor]))


def _solved_each(f: Fluid, s: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
    """As _solved, one temperature at a time where the batch fails: (values, solved?)."""
    try:
        return _solved(f, s), np.ones(s.size, dtype=bool)
    except FillcheckError:
        out = np.full((3, s.size), np.nan)
        ok = np.zeros(s.size, dtype=bool)
        for i, si in enumerate(s):
            try:
                out[:, i] = _solved(f, np.array([si]))[:, 0]
                ok[i] = True
            except FillcheckError:
                pass
        return out, ok


def _spread(f: Fluid, T: np.ndarray) -> np.ndarray:
    """Relative spread of two solves iterated to round-off from starts 1e-5 apart [-]."""
    base = f.saturation_solved(T)
    out = []
    for sign in (1.0, -1.0):
        s = saturation_newton(
            f.eos,
            T,
            base.rho_liquid * (1.0 + sign * 1e-5),
            base.rho_vapor * (1.0 - sign * 1e-5),
            f.eos.rho_r,
            step_tol=0.0,
        )
        out.append(np.log(np.stack([s.P, s.rho_liquid, s.rho_vapor])))
    return np.abs(out[0] - out[1]).max(axis=0)


def solver_floor(f: Fluid) -> tuple[float, float]:
    """The round-off floor of the solver, measured: (far from Tc [-], near Tc [K]).

    Far from Tc: the largest spread of two solves at 12 temperatures from the lowest one to
    Tc − 1 K. Near Tc the conditions of equilibrium lose digits as their Jacobian becomes
    singular, and the spread grows like C/(Tc − T): C is the largest spread × (Tc − T) at 12
    temperatures from 1 K to 1 mK below Tc.
    """
    Tc = f.model_critical[0]
    far = _spread(f, np.linspace(f.T_min_saturation, Tc - 1.0, 12))
    dT = np.geomspace(1.0, max(CLOSEST_K, 10.0 * f.saturation_gap_K), 12)
    near = _spread(f, Tc - dT)
    return float(far.max()), float((near * dT).max())


def allowed_tolerance(
    T: np.ndarray, T_c: float, tol: float, floors: tuple[float, float]
) -> np.ndarray:
    """The deviation from the solver an interval may have at T [K] (relative): ``tol``, or
    FLOOR_FACTOR times the solver's round-off floor there (solver_floor) where that is more."""
    far, near = floors
    dT = np.maximum(T_c - np.asarray(T, dtype=float), 1e-300)
    return np.maximum(tol, FLOOR_FACTOR * np.maximum(far, near / dT))


def fit(
    f: Fluid, degree: int = DEGREE, tol: float = TOLERANCE
) -> tuple[Superancillary, tuple[float, float]]:
    """Adaptive piecewise expansions of one fluid (see the module docstring), with the solver's
    measured round-off floors (solver_floor) they were judged against."""
    Tc = f.model_critical[0]
    T_min = f.T_min_saturation
    s_max = math.sqrt(Tc - T_min)
    s_floor = math.sqrt(max(CLOSEST_K, 10.0 * f.saturation_gap_K))
    nodes = chebyshev_lobatto_nodes(degree)
    between = np.cos(np.pi * (np.arange(degree) + 0.5) / degree)
    w_min = MIN_WIDTH * (s_max - s_floor)
    floors = solver_floor(f)
    pending = [(s_floor, s_max)]
    leaves: list[tuple[float, float, np.ndarray | None]] = []  # (a, b, coefficients or None)
    while pending:
        a = np.array([p[0] for p in pending])
        b = np.array([p[1] for p in pending])
        mid, half = 0.5 * (a + b), 0.5 * (b - a)
        s_nodes = mid[:, None] + half[:, None] * nodes[None, :]
        s_check = mid[:, None] + half[:, None] * between[None, :]
        vals, ok = _solved_each(f, np.concatenate([s_nodes.ravel(), s_check.ravel()]))
        k = len(pending)
        vn = vals[:, : s_nodes.size].reshape(3, k, degree + 1)
        vc = vals[:, s_nodes.size :].reshape(3, k, degree)
        solved = np.concatenate(
            [ok[: s_nodes.size].reshape(k, -1), ok[s_nodes.size :].reshape(k, -1)], axis=1
        ).all(axis=1)
        c = chebyshev_coefficients(np.where(np.isfinite(vn), vn, 0.0))
        with np.errstate(invalid="ignore"):
            err = np.abs(clenshaw(c[:, :, None, :], between[None, :]) - vc).max(axis=0)
        limit = allowed_tolerance(Tc - s_check**2, Tc, tol, floors)
        passes = (err <= limit).all(axis=1) & (limit <= LARGEST_TOLERANCE).all(axis=1)
        nxt = []
        for i in range(k):
            if solved[i] and passes[i]:
                leaves.append((a[i], b[i], c[:, i, :]))
            elif b[i] - a[i] < w_min:
                leaves.append((a[i], b[i], None))
            else:
                nxt += [(a[i], mid[i]), (mid[i], b[i])]
        pending = nxt
    leaves.sort(key=lambda x: -x[0])
    kept = []
    for lo, hi, coeffs in leaves:  # the run of passing intervals from the triple point down in s
        if coeffs is None:
            break
        kept.append((lo, hi, coeffs))
    if not kept:
        raise SystemExit(f"{f.name}: no interval reproduces the solver to {tol:g}")
    kept.reverse()
    edges = np.array([kept[0][0]] + [hi for _, hi, _ in kept])
    edges[-1] = s_max
    s_top = float(edges[0])
    sa = Superancillary(
        fluid=f.name,
        fingerprint=f.eos.fingerprint,
        T_c=Tc,
        T_min=T_min,
        T_top=Tc - s_top * s_top,
        s_edges=edges,
        coefficients=np.stack([c for _, _, c in kept], axis=1),
    )
    return sa, floors


def deviation(
    f: Fluid, sa: Superancillary, tol: float, floors: tuple[float, float], n: int = VERIFY_POINTS
) -> dict[str, float]:
    """Deviations of the expansions from the solver on n random temperatures from T_min to T_top
    and the interval edges: the largest relative deviation where the tolerance is ``tol``
    ("strict_*") and where it is the solver's floor ("near_critical_*"), against the solver
    iterated to round-off, the same against the solver as fillcheck runs it ("*_default"), and
    the largest deviation in units of the allowed one ("worst_share")."""
    rng = np.random.default_rng(20261203)
    T_edges = sa.T_c - sa.s_edges**2
    T = np.concatenate([rng.uniform(sa.T_min, sa.T_top, n), np.clip(T_edges, sa.T_min, sa.T_top)])
    P, rl, rv = sa.evaluate(T)
    limit = allowed_tolerance(T, sa.T_c, tol, floors)
    strict = limit <= tol
    out: dict[str, float] = {}
    for label, kw in (("", {"to_round_off": True}), ("_default", {})):
        s = f.saturation_solved(T, **kw)
        dev = np.max(np.abs(np.stack([P / s.P, rl / s.rho_liquid, rv / s.rho_vapor]) - 1.0), axis=0)
        out[f"strict{label}"] = float(dev[strict].max()) if np.any(strict) else 0.0
        out[f"near_critical{label}"] = float(dev[~strict].max()) if np.any(~strict) else 0.0
        if not label:
            out["worst_share"] = float((dev / limit).max())
    return out


def to_json(
    sa: Superancillary, dev: dict[str, float], floors: tuple[float, float], degree: int, tol: float
) -> str:
    """The data file's text: one key a line, numbers as Python writes them (round-trip exact)."""
    far, near = floors
    # where FLOOR_FACTOR × near/(Tc − T) reaches tol: above it the tolerance is the solver's
    T_strict = min(sa.T_top, sa.T_c - FLOOR_FACTOR * near / tol)
    doc = {
        "format": FORMAT,
        "fluid": sa.fluid,
        "equation_sha256": sa.fingerprint,
        "method": CITATION,
        "variable": "s = sqrt(T_c - T) in K^0.5; each interval maps [s_lo, s_hi] onto [-1, 1]",
        "degree": degree,
        "tolerance": tol,
        "solver_round_off": {"far": float(f"{far:.2e}"), "near_critical / K": float(f"{near:.2e}")},
        "T_strict / K": T_strict,
        "T_c / K": sa.T_c,
        "T_min / K": sa.T_min,
        "T_top / K": sa.T_top,
        "deviation_from_solver": {k: float(f"{v:.2e}") for k, v in dev.items()},
        "s_edges / K^0.5": sa.s_edges.tolist(),
    }
    for q, name in enumerate(QUANTITIES):
        doc[name] = sa.coefficients[q].tolist()
    lines = [
        f"{json.dumps(k)}:{json.dumps(v, separators=(',', ':'), allow_nan=False)}"
        for k, v in doc.items()
    ]
    return "{\n" + ",\n".join(lines) + "\n}\n"


def main(argv: list[str] | None = None) -> int:
    ap = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    ap.add_argument("--only", nargs="*", help="canonical fluid names (default: every one)")
    ap.add_argument("--check", action="store_true", help="verify the shipped files, write none")
    ap.add_argument("--degree", type=int, default=DEGREE)
    ap.add_argument("--tolerance", type=float, default=TOLERANCE)
    args = ap.parse_args(argv)
    names = args.only or reference_fluids()
    DATA_DIR.mkdir(parents=True, exist_ok=True)
    bad = 0
    for name in names:
        t0 = time.perf_counter()
        f = fillcheck.fluid(name)
        Tc = f.model_critical[0]
        if args.check:
            why = staleness(name, f.eos.fingerprint, Tc, f.T_min_saturation)
            if why is not None:
                print(f"{name:22s} STALE: {why}")
                bad += 1
                continue
            spec = json.loads(data_path(name).read_text(encoding="utf-8"))
            sa = parse(spec, name)
            floor = spec["solver_round_off"]
            floors = (floor["far"], floor["near_critical / K"])
            tol = spec["tolerance"]
        else:
            sa, floors = fit(f, args.degree, args.tolerance)
            tol = args.tolerance
        dev = deviation(f, sa, tol, floors)
        ok = dev["worst_share"] <= VERIFY_FACTOR
        bad += not ok
        if not args.check and ok:
            data_path(name).write_text(to_json(sa, dev, floors, args.degree, tol), encoding="utf-8")
        print(
            f"{name:22s} {sa.s_edges.size - 1:3d} intervals, Tc - T_top = "
            f"{Tc - sa.T_top:.2g} K; from the solver: {dev['strict']:.0e} "
            f"(default {dev['strict_default']:.0e}), near Tc {dev['near_critical']:.0e} "
            f"(default {dev['near_critical_default']:.0e}); floors {floors[0]:.0e}, "
            f"{floors[1]:.0e} K; {time.perf_counter() - t0:.0f} s" + ("" if ok else "  FAILED"),
            flush=True,
        )
    return 1 if bad else 0


if __name__ == "__main__":
    sys.exit(main())
