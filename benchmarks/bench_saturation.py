"""Saturation speed: fillcheck's superancillary expansions, its solver, and CoolProp 8.0.0.

Run: ``python benchmarks/bench_saturation.py [n]`` (default 100,000 temperatures). For nitrogen,
carbon dioxide and propane it times

- saturation (P, ρ', ρ'') at n random temperatures from the triple point to 0.99 Tc in one call:
  ``Fluid.saturation_molar`` (the expansions, fluids/superancillary.py) and
  ``Fluid.saturation_solved`` (the phase equilibrium solved, on n/10 of them), against CoolProp's
  ``AbstractState.update(QT_INPUTS, 0, T)`` with ``p()`` and both saturated densities, in a
  Python loop (its fastest interface from Python);
- one temperature: ``Fluid.saturation(T)`` with a Python float (the plain-Python path), the
  solver for one temperature, and one CoolProp QT update;
- one state from (T, P): ``Fluid.state(T=, P=)`` (density solve, phase, Z and dP/dT) against one
  CoolProp ``update(PT_INPUTS)`` + ``rhomolar()``.

Each line gives the time per state and CoolProp's time over fillcheck's (above 1: fillcheck is
faster), with the largest relative difference of the results as a check that both computed the
same thing. Times are the best of a few repeats. A measurement, not a test: it prints and exits 0.
"""

from __future__ import annotations

import sys
import time
from collections.abc import Callable

import numpy as np

import fillcheck

GASES = ("nitrogen", "carbon dioxide", "propane")


def best(fn: Callable[[], object], repeats: int = 3) -> tuple[float, object]:
    """Shortest wall time of fn() over `repeats` calls [s] and the last result (a call over 2 s
    is not repeated)."""
    t_best, out = np.inf, None
    for _ in range(repeats):
        t0 = time.perf_counter()
        out = fn()
        t_best = min(t_best, time.perf_counter() - t0)
        if t_best > 2.0:
            break
    return t_best, out


def per_call(fn: Callable[[], object], calls: int) -> float:
    """Best time of one call over `calls` calls in a loop [s]."""

    def loop() -> None:
        for _ in range(calls):
            fn()

    return best(loop)[0] / calls


def line(what: str, seconds_per_state: float, ours: float | None = None) -> None:
    ratio = "" if ours is None else f"{seconds_per_state / ours:10.1f}x"
    print(f"  {what:<52s} {seconds_per_state * 1e6:10.3f} µs/state {ratio}")


def bench_gas(f: fillcheck.Fluid, T: np.ndarray, CP: object | None) -> None:
    """Every timing of one gas (module docstring); T: the random temperatures [K]."""
    n = T.size
    Tc = f.model_critical[0]
    print(f"\n{f.name}: {n} temperatures, {T.min():.2f}–{T.max():.2f} K")
    t_sa, sat = best(lambda: f.saturation_molar(T))
    m = max(1, n // 10)
    t_solver, solved = best(lambda: f.saturation_solved(T[:m]), 1)
    sa_s, solved_s = t_sa / n, t_solver / m
    dev = max(
        float(np.max(np.abs(sat.P[:m] / solved.P - 1.0))),
        float(np.max(np.abs(sat.rho_liquid[:m] / solved.rho_liquid - 1.0))),
        float(np.max(np.abs(sat.rho_vapor[:m] / solved.rho_vapor - 1.0))),
    )
    print(f" many temperatures in one call (expansions vs solver: {dev:.1e})")
    line("fillcheck saturation_molar(T): expansions", sa_s)
    line("fillcheck saturation_solved(T): solver", solved_s, sa_s)
    a = None if CP is None else CP.AbstractState("HEOS", f.data.coolprop_name)
    if a is not None:

        def loop() -> np.ndarray:
            out = np.empty((n, 3))
            for i in range(n):
                a.update(CP.QT_INPUTS, 0.0, T[i])
                out[i] = (
                    a.p(),
                    a.saturated_liquid_keyed_output(CP.iDmolar),
                    a.saturated_vapor_keyed_output(CP.iDmolar),
                )
            return out

        t_cp, ref = best(loop, 1)
        ref = np.asarray(ref)
        diff = max(
            float(np.max(np.abs(sat.rho_liquid / ref[:, 1] - 1.0))),
            float(np.max(np.abs(sat.rho_vapor / ref[:, 2] - 1.0))),
        )
        line(f"CoolProp update(QT) + p, ρ', ρ'', loop (ρ: {diff:.0e})", t_cp / n, sa_s)

    t1 = float(T[0])
    print(f" one temperature ({t1:.2f} K)")
    one_sa = per_call(lambda: f.saturation(t1), 20_000)
    line("fillcheck saturation(T) with a float", one_sa)
    line(
        "fillcheck saturation_solved([T])", per_call(lambda: f.saturation_solved([t1]), 50), one_sa
    )
    if a is not None:

        def qt() -> None:
            a.update(CP.QT_INPUTS, 0.0, t1)
            a.p()
            a.saturated_liquid_keyed_output(CP.iDmolar)
            a.saturated_vapor_keyed_output(CP.iDmolar)

        line("CoolProp one update(QT) + p, ρ', ρ''", per_call(qt, 20_000), one_sa)

    print(" one state from (T, P)")
    T_liq = 0.8 * Tc
    for what, T_, P_ in (
        (f"gas at {1.3 * Tc:.0f} K, 20 MPa", 1.3 * Tc, 20e6),
        (f"liquid at {T_liq:.0f} K", T_liq, 2.0 * float(f.saturation(T_liq).P)),
    ):
        ours = per_call(lambda T_=T_, P_=P_: f.state(T=T_, P=P_), 300)
        line(f"fillcheck state(T=, P=), {what}", ours)
        if a is not None:

            def pt(T_: float = T_, P_: float = P_) -> None:
                a.update(CP.PT_INPUTS, P_, T_)
                a.rhomolar()

            line(f"CoolProp update(PT) + rhomolar(), {what}", per_call(pt, 2000), ours)


def main() -> None:
    n = int(sys.argv[1]) if len(sys.argv) > 1 else 100_000
    try:
        import CoolProp.CoolProp as CP
    except ImportError:
        CP = None
        print("CoolProp not installed: fillcheck timings only")
    rng = np.random.default_rng(20261203)
    if CP is not None:
        print(f"CoolProp {CP.get_global_param_string('version')}, numpy {np.__version__}")
    print("ratio = CoolProp time / fillcheck time (above 1: fillcheck is faster)")
    for name in GASES:
        f = fillcheck.fluid(name)
        T = rng.uniform(f.T_min_saturation, 0.99 * f.model_critical[0], n)
        bench_gas(f, T, CP)


if __name__ == "__main__":
    main()
