"""Speed of mixture checks: one vessel as a whole process, and the mixture layer's pieces.

Run: ``python benchmarks/bench_mixture.py [runs]``. A mixture state needs a stability test
and, where it splits, a phase split, so a mixture check costs more than a pure-gas check; this
prints where the time goes. CoolProp (a test dependency) is timed beside the same bubble-point
calculation for scale. A measurement, not a test: it prints and exits 0.
"""

from __future__ import annotations

import statistics
import subprocess
import sys
import tempfile
import time
from pathlib import Path

import numpy as np

SCENARIOS = {
    "argon-CO2 82/18 by pressure (gas)": """
[[vessel]]
id = "ARC-1"
gas = { argon = 0.82, "carbon dioxide" = 0.18 }
water_capacity = "50 L"
fill = { pressure = "200 barg", temperature = "15 degC" }
storage = { max_temperature = "65 degC", min_temperature = "-20 degC" }
limits = { allowable_pressure = "300 barg" }
""",
    "propane-n-butane 60/40 by weight (two-phase)": """
[[vessel]]
id = "LPG-1"
gas = { propane = 0.6, "n-butane" = 0.4 }
water_capacity = "26 L"
fill = { mass = "11 kg" }
storage = { max_temperature = "55 degC", min_temperature = "-20 degC" }
[vessel.limits]
allowable_pressure = "25 barg"
min_vapour_space = "5 %"
vapour_space_temperature = "50 degC"
""",
}


def wall(cmd: list[str], runs: int) -> float:
    """Median wall time of a command [s]."""
    times = []
    for _ in range(runs):
        t0 = time.perf_counter()
        subprocess.run(cmd, stdout=subprocess.DEVNULL, stderr=subprocess.DEVNULL, check=False)
        times.append(time.perf_counter() - t0)
    return statistics.median(times)


def timed(fn, runs: int) -> float:
    """Median time of a call [s]."""
    times = []
    for _ in range(runs):
        t0 = time.perf_counter()
        fn()
        times.append(time.perf_counter() - t0)
    return statistics.median(times)


def main() -> None:
    runs = int(sys.argv[1]) if len(sys.argv) > 1 else 3
    base = wall([sys.executable, "-c", "import numpy"], runs)
    print(f"python -c 'import numpy'                        {base * 1e3:8.0f} ms")
    with tempfile.TemporaryDirectory() as tmp:
        for name, text in SCENARIOS.items():
            path = Path(tmp) / "bench.toml"
            path.write_text(text, encoding="utf-8")
            t = wall([sys.executable, "-m", "fillcheck.cli", "check", str(path), "--json"], runs)
            print(f"fillcheck check --json, {name:24s} {t * 1e3:8.0f} ms  {t / base:5.1f}x")

    import fillcheck

    m = fillcheck.mixture({"propane": 0.6, "n-butane": 0.4})
    T = np.linspace(250.0, 330.0, 41)
    rho = np.full(T.size, 423.0)
    t = timed(lambda: m.state(T=T, rho=rho), runs)
    print(f"41 closed-vessel states (two-phase), multi-fluid  {t * 1e3:8.0f} ms")
    t = timed(lambda: m.bubble_point(300.0), runs)
    print(f"one bubble point, multi-fluid                     {t * 1e3:8.0f} ms")
    try:
        import CoolProp.CoolProp as CP
    except ImportError:
        return
    state = CP.AbstractState("HEOS", "Propane&n-Butane")
    state.set_mole_fractions([0.6, 0.4])
    t = timed(lambda: state.update(CP.QT_INPUTS, 0.0, 300.0), runs)
    print(f"one bubble point, CoolProp 8.0.0                  {t * 1e3:8.0f} ms")


if __name__ == "__main__":
    main()
