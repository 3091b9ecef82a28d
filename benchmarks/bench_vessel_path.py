"""Throughput of the closed-vessel path and the density solve on numpy arrays.

Run: ``python benchmarks/bench_vessel_path.py``. Prints states per second for one call on
10,000 states, beside a plain loop over CoolProp's reference equation doing the same states when
CoolProp is installed (a measurement, not a test).
"""

from __future__ import annotations

import time

import numpy as np

import fillcheck


def main() -> None:
    n = 10_000
    f = fillcheck.fluid("nitrogen")
    T = np.linspace(253.15, 338.15, n)
    P = np.full(n, 200e5)
    t0 = time.perf_counter()
    rho = f.density_molar(T, P)
    t1 = time.perf_counter()
    f.state(T=T, rho=rho * f.molar_mass)
    t2 = time.perf_counter()
    co2 = fillcheck.fluid("carbon dioxide")
    Ts = np.linspace(220.0, 300.0, n)
    t3 = time.perf_counter()
    co2.saturation(Ts)
    t4 = time.perf_counter()
    print(f"density from (T, P), {n} states:      {(t1 - t0) * 1e3:7.1f} ms")
    print(f"closed-vessel states, {n} states:     {(t2 - t1) * 1e3:7.1f} ms")
    print(f"saturation, {n} temperatures:         {(t4 - t3) * 1e3:7.1f} ms")
    try:
        import CoolProp.CoolProp as CP
    except ImportError:
        return
    t5 = time.perf_counter()
    for t, p in zip(T, P, strict=True):
        CP.PropsSI("D", "T", t, "P", p, "Nitrogen")
    t6 = time.perf_counter()
    print(
        f"CoolProp PropsSI loop (reference EOS), {n} states: {(t6 - t5) * 1e3:7.1f} ms "
        f"({(t6 - t5) / (t1 - t0):.0f}x the vectorised cubic)"
    )


if __name__ == "__main__":
    main()
