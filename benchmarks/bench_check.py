"""Speed of one single-vessel check as a whole process, against starting Python with numpy.

Run: ``python benchmarks/bench_check.py [runs]``. The target (issue 3) is at most about 4× the
time of ``python -c "import numpy"``. This is a measurement, not a test: it prints and exits 0.
"""

from __future__ import annotations

import statistics
import subprocess
import sys
import tempfile
import time
from pathlib import Path

SCENARIO = """
[[vessel]]
id = "BENCH-1"
gas = "argon"
water_capacity = "50 L"
fill = { pressure = "200 barg", temperature = "15 degC" }
storage = { max_temperature = "65 degC", min_temperature = "-20 degC" }
limits = { allowable_pressure = "300 barg", relief_set_pressure = "330 barg" }
"""


def wall(cmd: list[str], runs: int) -> float:
    """Median wall time of a command [s]."""
    times = []
    for _ in range(runs):
        t0 = time.perf_counter()
        subprocess.run(cmd, stdout=subprocess.DEVNULL, stderr=subprocess.DEVNULL, check=False)
        times.append(time.perf_counter() - t0)
    return statistics.median(times)


def main() -> None:
    runs = int(sys.argv[1]) if len(sys.argv) > 1 else 7
    with tempfile.TemporaryDirectory() as tmp:
        path = Path(tmp) / "bench.toml"
        path.write_text(SCENARIO, encoding="utf-8")
        base = wall([sys.executable, "-c", "import numpy"], runs)
        report = wall([sys.executable, "-m", "fillcheck.cli", "check", str(path)], runs)
        as_json = wall([sys.executable, "-m", "fillcheck.cli", "check", str(path), "--json"], runs)
    print(f"python -c 'import numpy'      {base * 1e3:7.0f} ms")
    print(f"fillcheck check (report)      {report * 1e3:7.0f} ms   {report / base:4.1f}x")
    print(f"fillcheck check --json        {as_json * 1e3:7.0f} ms   {as_json / base:4.1f}x")
    print("target: at most about 4x")


if __name__ == "__main__":
    main()
