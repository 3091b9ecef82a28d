"""A scenario of many small groups: 180 vessels over 30 gases and 6 models, whole process.

Run: ``python benchmarks/bench_many_groups.py [runs]`` (a measurement, not a test). Each of the
first 30 catalog gases gets six vessels, one under each of fillcheck's models (the reference
equation where the gas has one, and the five cubic models), each a group of one for the vectorised
path. Each vessel holds 40 % of its gas's critical density (a dense gas or a liquefied charge,
depending on the gas) with storage from -20 to 50 °C. The target (issue 16) is at most 5 ms a
vessel for the whole process; it prints the median wall time of ``fillcheck check FILE --json``.
"""

from __future__ import annotations

import statistics
import subprocess
import sys
import tempfile
import time
from pathlib import Path

from fillcheck.fluids.catalog import all_fluids
from fillcheck.models.registry import available_models


def scenario() -> tuple[str, int]:
    """The scenario text and its number of vessels."""
    parts = []
    for d in all_fluids()[:30]:
        ratio = 0.4 * d.critical_density_kg_m3 / 1000.0  # kg of gas per litre of water
        for model in available_models(d):
            parts.append(
                f'[[vessel]]\nid = "{d.name[:12].upper()}-{model}"\ngas = "{d.name}"\n'
                f'model = "{model}"\nwater_capacity = "50 L"\n'
                f'fill = {{ filling_ratio = "{ratio:.4f} kg/L" }}\n'
                'storage = { max_temperature = "50 degC", min_temperature = "-20 degC" }\n'
                'limits = { allowable_pressure = "250 barg" }\n'
            )
    return "\n".join(parts), len(parts)


def main() -> None:
    runs = int(sys.argv[1]) if len(sys.argv) > 1 else 3
    text, n = scenario()
    with tempfile.TemporaryDirectory() as tmp:
        path = Path(tmp) / "many_groups.toml"
        path.write_text(text, encoding="utf-8")
        cmd = [sys.executable, "-m", "fillcheck", "check", str(path), "--json"]
        times = []
        for _ in range(runs):
            t0 = time.perf_counter()
            proc = subprocess.run(cmd, capture_output=True, text=True)
            times.append(time.perf_counter() - t0)
            if proc.returncode not in (0, 1):
                raise SystemExit(proc.stderr[-600:])
    med = statistics.median(times)
    print(
        f"{n} vessels over 30 gases and their models: median {med:.2f} s of {runs} runs, "
        f"{med / n * 1e3:.1f} ms a vessel (target 5 ms)"
    )


if __name__ == "__main__":
    main()
