"""Speed of one single-vessel check as a whole process, against starting Python with numpy.

Run: ``python benchmarks/bench_check.py [runs]``. The target (issue 16) is at most 3× the time of
``python -c "import numpy"``. This is a measurement, not a test: it prints and exits 0.

The package's bytecode is compiled first (``compileall``) and one untimed run of each command
warms the file cache, so the figure is that of an installed tool: where ``PYTHONDONTWRITEBYTECODE``
is set (as in some sandboxes and CI images) Python would otherwise compile every fillcheck module
from source on each run, about 80 ms that a user's machine spends once.
"""

from __future__ import annotations

import compileall
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


def wall(cmd: list[str]) -> float:
    """Wall time of one run of a command [s]."""
    t0 = time.perf_counter()
    subprocess.run(cmd, stdout=subprocess.DEVNULL, stderr=subprocess.DEVNULL, check=False)
    return time.perf_counter() - t0


def main() -> None:
    runs = int(sys.argv[1]) if len(sys.argv) > 1 else 7
    import fillcheck

    compileall.compile_dir(Path(fillcheck.__file__).parent, quiet=1)
    with tempfile.TemporaryDirectory() as tmp:
        path = Path(tmp) / "bench.toml"
        path.write_text(SCENARIO, encoding="utf-8")
        numpy_cmd = [sys.executable, "-c", "import numpy"]
        report_cmd = [sys.executable, "-m", "fillcheck.cli", "check", str(path)]
        json_cmd = [*report_cmd, "--json"]
        for cmd in (numpy_cmd, report_cmd, json_cmd):
            wall(cmd)  # warm-up, not counted
        # In turn (numpy, report, json, numpy, ...) so that a drift in the machine's speed moves
        # all three alike; each ratio is taken within its own round, then the median of them.
        rounds = [(wall(numpy_cmd), wall(report_cmd), wall(json_cmd)) for _ in range(runs)]
    base = statistics.median(r[0] for r in rounds)
    report = statistics.median(r[1] for r in rounds)
    as_json = statistics.median(r[2] for r in rounds)
    report_x = statistics.median(r[1] / r[0] for r in rounds)
    json_x = statistics.median(r[2] / r[0] for r in rounds)
    print(f"python -c 'import numpy'      {base * 1e3:7.0f} ms   (median of {runs} rounds)")
    print(f"fillcheck check (report)      {report * 1e3:7.0f} ms   {report_x:4.1f}x")
    print(f"fillcheck check --json        {as_json * 1e3:7.0f} ms   {json_x:4.1f}x")
    print("target (issue 16): at most 3x (ratios: median over rounds of each round's ratio)")


if __name__ == "__main__":
    main()
