"""Time of one fill curve (thermo.fill_balance, thermo.fill_cascade) per heat-transfer model.

Run: ``python benchmarks/bench_fill.py``. Nitrogen, 50 L, 11 kg from the atmosphere, the best of
five runs of each (a measurement, not a test: the target for one lumped curve is well under
0.1 s; timed tests fail on a loaded machine, so none is in tests/).
"""

from __future__ import annotations

import time

import fillcheck
from fillcheck.thermo.fill_balance import FillSpec, fill_curve
from fillcheck.thermo.fill_cascade import Bank, cascade_fill


def _best(fn, k: int = 5) -> float:
    out = []
    for _ in range(k):
        t = time.perf_counter()
        fn()
        out.append(time.perf_counter() - t)
    return min(out)


def main() -> None:
    f = fillcheck.fluid("nitrogen")
    n = 11.0 / f.molar_mass
    base = dict(
        inlet_temperature_K=288.15,
        start_temperature_K=288.15,
        start_pressure_Pa=101325.0,
        duration_s=240.0,
        ambient_temperature_K=288.15,
    )
    cases = {
        "valve, adiabatic": FillSpec("supply", supply_pressure_Pa=331e5, **base),
        "valve, lumped": FillSpec(
            "supply",
            supply_pressure_Pa=331e5,
            wall_heat_capacity_J_K=27840.0,
            heat_transfer="lumped",
            **base,
        ),
        "compressor, lumped": FillSpec(
            "compressor",
            supply_pressure_Pa=None,
            wall_heat_capacity_J_K=27840.0,
            heat_transfer="lumped",
            **base,
        ),
        "valve, two-node": FillSpec(
            "supply",
            supply_pressure_Pa=331e5,
            wall_heat_capacity_J_K=27840.0,
            heat_transfer="two-node",
            gas_wall_conductance_W_K=150.0,
            **base,
        ),
        "valve, two-node, ramp": FillSpec(
            "supply",
            supply_pressure_Pa=331e5,
            wall_heat_capacity_J_K=27840.0,
            heat_transfer="two-node",
            gas_wall_conductance_W_K=150.0,
            flow="pressure-ramp",
            **base,
        ),
    }
    for name, spec in cases.items():
        print(f"{name:22s} {1e3 * _best(lambda s=spec: fill_curve(f, 0.05, n, s)):7.1f} ms")
    banks = [Bank(0.3, 288.15, 101e5), Bank(0.3, 288.15, 201e5), Bank(0.3, 288.15, 301e5)]
    spec = cases["valve, lumped"]
    t = _best(lambda: cascade_fill(f, 0.05, n, spec, banks), 3)
    print(f"{'cascade of 3, lumped':22s} {1e3 * t:7.1f} ms")


if __name__ == "__main__":
    main()
