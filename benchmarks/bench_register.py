"""Register throughput: fillcheck's vectorised check beside a per-vessel loop over CoolProp.

Run: ``python benchmarks/bench_register.py [rows]`` (default 2,000 rows; a measurement, not a
test). The CoolProp loop does the core of the same computation for each vessel — the fill
density from its pressure and temperature, and the pressure along its isochore at the 25
temperatures of a register's storage grid — with CoolProp's AbstractState (its fastest Python
interface), so the ratio understates what fillcheck does more (limits, saturation, findings).
"""

from __future__ import annotations

import random
import sys
import time

import numpy as np

from fillcheck.assess import assess_scenario
from fillcheck.scenario.register import register_from_text

HEADER = (
    "id,gas,water_capacity,fill_pressure,fill_temperature,max_temperature,"
    "min_temperature,allowable_pressure,relief_set_pressure"
)
GASES = {"argon": "Argon", "nitrogen": "Nitrogen", "oxygen": "Oxygen", "helium": "Helium"}


def rows(n: int) -> list[tuple[str, str, float, float]]:
    rnd = random.Random(7)
    out = []
    for i in range(n):
        gas = rnd.choice(list(GASES))
        out.append((f"V{i}", gas, rnd.uniform(150, 300), rnd.choice([10.0, 15.0, 20.0, 30.0])))
    return out


def main() -> None:
    n = int(sys.argv[1]) if len(sys.argv) > 1 else 2000
    data = rows(n)
    text = "\n".join(
        [HEADER]
        + [
            f"{i},{g},50 L,{p:.1f} barg,{t} degC,65 degC,-20 degC,300 barg,330 barg"
            for i, g, p, t in data
        ]
    )
    t0 = time.perf_counter()
    sc = register_from_text(text, "bench.csv")
    t1 = time.perf_counter()
    assess_scenario(sc, is_register=True)
    t2 = time.perf_counter()
    print(
        f"fillcheck: {n} rows, read {t1 - t0:.2f} s, checked {t2 - t1:.2f} s "
        f"({(t2 - t0) / n * 1e3:.2f} ms per vessel)"
    )
    try:
        import CoolProp.CoolProp as CP
    except ImportError:
        print("CoolProp not installed: no comparison")
        return
    states = {g: CP.AbstractState("HEOS", cp) for g, cp in GASES.items()}
    grid = np.linspace(253.15, 338.15, 25)
    t3 = time.perf_counter()
    for _, g, p, t in data:
        a = states[g]
        a.update(CP.PT_INPUTS, p * 1e5 + 101325.0, t + 273.15)
        rho = a.rhomolar()
        for T in grid:
            a.update(CP.DmolarT_INPUTS, rho, T)
            a.p()
    t4 = time.perf_counter()
    print(
        f"CoolProp loop (density + 25 isochore pressures per vessel): {t4 - t3:.2f} s "
        f"({(t4 - t3) / n * 1e3:.2f} ms per vessel)"
    )
    print(f"ratio, CoolProp loop / fillcheck check: {(t4 - t3) / (t2 - t0):.2f}")


if __name__ == "__main__":
    main()
