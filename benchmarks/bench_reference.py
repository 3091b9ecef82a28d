"""Speed of fillcheck's reference-equation evaluation against CoolProp 8.0.0 called from Python.

Run: ``python benchmarks/bench_reference.py [n_pressure] [n_saturation] [n_density]`` (defaults
100000, 100000, 10000). For nitrogen and carbon dioxide it times

- the pressure at n_pressure (T, ρ) states in one vectorised call, against CoolProp's
  ``AbstractState.update(DmolarT_INPUTS, …)`` + ``p()`` in a Python loop (with and without the
  phase imposed, which skips CoolProp's phase determination);
- saturation at n_saturation temperatures (``Fluid.saturation_molar``) against
  ``update(QT_INPUTS, 0, T)`` with ``p()`` and both saturated densities, in a loop;
- density from (T, P) at n_density cylinder states (``Fluid.density_molar`` and the whole
  ``Fluid.state``) against ``AbstractState.update(PT_INPUTS, …)`` in a loop, ``PropsSI`` in a loop,
  and ``PropsSI`` given whole arrays (its loop runs in C++).

Each line gives the time per state and CoolProp's time over fillcheck's (above 1: fillcheck is
faster), and the largest relative difference of the results, as a check that both computed the
same thing. Times are the best of a few repeats. This is a measurement, not a test: it prints and
exits 0.
"""

from __future__ import annotations

import sys
import time
from collections.abc import Callable

import CoolProp.CoolProp as CP
import numpy as np

import fillcheck
from fillcheck.thermo.properties import pressure

GASES = ("nitrogen", "carbon dioxide")


def best_time(fn: Callable[[], object], repeats: int) -> tuple[float, object]:
    """The shortest of up to `repeats` wall times of fn() [s], and its last result.

    A call longer than 2 s is not repeated.
    """
    best, out = np.inf, None
    for _ in range(repeats):
        t0 = time.perf_counter()
        out = fn()
        best = min(best, time.perf_counter() - t0)
        if best > 2.0:
            break
    return best, out


def line(what: str, n: int, seconds: float, ours: float | None = None) -> None:
    per = seconds / n * 1e6
    ratio = "" if ours is None else f"{seconds / ours:9.2f}x"
    print(f"  {what:<46s} {per:10.3f} µs/state {ratio}")


def single_phase_states(f: fillcheck.Fluid, n: int, rng: np.random.Generator) -> tuple:
    """Random single-phase (T, ρ [mol/m³]): supercritical isotherms and compressed liquid."""
    Tc, _, rhoc = f.model_critical
    half = n // 2
    T_sc = rng.uniform(1.05 * Tc, min(3.0 * Tc, f.eos.validity.T_max_K), half)
    rho_sc = rhoc * np.exp(rng.uniform(np.log(1e-3), np.log(2.5), half))
    T_l = rng.uniform(f.T_min_saturation, 0.9 * Tc, n - half)
    rho_l = f.saturation_molar(T_l).rho_liquid * rng.uniform(1.001, 1.05, n - half)
    return np.concatenate([T_sc, T_l]), np.concatenate([rho_sc, rho_l])


def bench_pressure(f: fillcheck.Fluid, n: int, rng: np.random.Generator) -> None:
    T, rho = single_phase_states(f, n, rng)
    ours_s, P = best_time(lambda: pressure(f.eos, T, rho), 3)
    a = CP.AbstractState("HEOS", f.data.coolprop_name)

    def loop(phase: int | None) -> np.ndarray:
        out = np.empty(n)
        if phase is not None:
            a.specify_phase(phase)
        try:
            for i in range(n):
                a.update(CP.DmolarT_INPUTS, rho[i], T[i])
                out[i] = a.p()
        finally:
            a.unspecify_phase()
        return out

    cp_s, P_cp = best_time(lambda: loop(None), 1)
    cp_phase_s, _ = best_time(lambda: loop(CP.iphase_gas), 1)
    diff = np.max(np.abs(np.asarray(P) / np.asarray(P_cp) - 1.0))
    print(f" pressure P(T, ρ), {n} states (max relative difference {diff:.1e})")
    line("fillcheck pressure(eos, T, ρ), one call", n, ours_s)
    line("CoolProp update(DmolarT) + p(), loop", n, cp_s, ours_s)
    line("CoolProp same, phase imposed, loop", n, cp_phase_s, ours_s)


def bench_saturation(f: fillcheck.Fluid, n: int, rng: np.random.Generator) -> None:
    Tc = f.model_critical[0]
    T = rng.uniform(f.T_min_saturation, 0.99 * Tc, n)
    ours_s, sat = best_time(lambda: f.saturation_molar(T), 2)
    a = CP.AbstractState("HEOS", f.data.coolprop_name)

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

    cp_s, ref = best_time(loop, 1)
    ref = np.asarray(ref)
    diff = max(
        np.max(np.abs(sat.rho_liquid / ref[:, 1] - 1.0)),
        np.max(np.abs(sat.rho_vapor / ref[:, 2] - 1.0)),
    )
    print(f" saturation at T, {n} states (max relative difference in ρ', ρ'' {diff:.1e})")
    line("fillcheck saturation_molar(T), one call", n, ours_s)
    line("CoolProp update(QT) + p(), ρ', ρ'', loop", n, cp_s, ours_s)


def bench_density(f: fillcheck.Fluid, n: int, rng: np.random.Generator) -> None:
    T_lo = max(220.0, f.T_min_saturation + 1.0)
    T = rng.uniform(T_lo, 345.0, n)
    P = np.exp(rng.uniform(np.log(1e5), np.log(50e6), n))
    cp_name = str(f.data.coolprop_name)
    a = CP.AbstractState("HEOS", cp_name)
    # CoolProp refuses states above its melting line (carbon dioxide below ~225 K at 50 MPa):
    # leave those out of every timing
    keep = np.ones(n, dtype=bool)
    for i in range(n):
        try:
            a.update(CP.PT_INPUTS, P[i], T[i])
        except ValueError:
            keep[i] = False
    T, P = T[keep], P[keep]
    n = int(keep.sum())
    ours_s, rho = best_time(lambda: f.density_molar(T, P), 3)
    state_s, _ = best_time(lambda: f.state(T=T, P=P), 3)

    def loop_abstract() -> np.ndarray:
        out = np.empty(n)
        for i in range(n):
            a.update(CP.PT_INPUTS, P[i], T[i])
            out[i] = a.rhomolar()
        return out

    def loop_propssi() -> np.ndarray:
        return np.array([CP.PropsSI("Dmolar", "T", T[i], "P", P[i], cp_name) for i in range(n)])

    as_s, ref = best_time(loop_abstract, 1)
    ps_s, _ = best_time(loop_propssi, 1)
    vec_s, _ = best_time(lambda: CP.PropsSI("Dmolar", "T", T, "P", P, cp_name), 1)
    diff = np.max(np.abs(np.asarray(rho) / np.asarray(ref) - 1.0))
    print(
        f" density from (T, P), {n} states, {T_lo:.0f}–345 K, 0.1–50 MPa, {np.sum(~keep)} "
        f"refused by CoolProp left out (max relative difference {diff:.1e})"
    )
    line("fillcheck density_molar(T, P), one call", n, ours_s)
    line("fillcheck state(T=, P=) (phase, Z, dP/dT too)", n, state_s)
    line("CoolProp update(PT) + rhomolar(), loop", n, as_s, ours_s)
    line("CoolProp PropsSI('Dmolar', 'T', 'P'), loop", n, ps_s, ours_s)
    line("CoolProp PropsSI given arrays (C++ loop)", n, vec_s, ours_s)


def main() -> None:
    args = [int(x) for x in sys.argv[1:4]]
    n_p, n_sat, n_rho = [*args, *(100_000, 100_000, 10_000)[len(args) :]]
    rng = np.random.default_rng(20240601)
    print(f"CoolProp {CP.get_global_param_string('version')}, numpy {np.__version__}")
    print("ratio = CoolProp time / fillcheck time (above 1: fillcheck is faster)")
    for name in GASES:
        f = fillcheck.fluid(name)
        print(f"\n{name} ({f.eos.publication})")
        bench_pressure(f, n_p, rng)
        bench_saturation(f, n_sat, rng)
        bench_density(f, n_rho, rng)


if __name__ == "__main__":
    main()
