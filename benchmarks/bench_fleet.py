"""A fleet register, whole process: ``fillcheck check REG.csv --jsonl`` beside a CoolProp loop.

Run: ``python benchmarks/bench_fleet.py [rows] [--jobs N]`` (default 10,000 rows; a measurement,
not a test). It writes a register of invented vessels (argon, nitrogen, oxygen and helium filled by
pressure; propane and carbon dioxide filled by mass, in the proportions of a mixed industrial
fleet), then runs, each as its own process:

- fillcheck: ``python -m fillcheck check REG.csv --jsonl OUT --force`` (every limit, saturation,
  the plan, findings and one JSON line a vessel);
- the CoolProp loop: the same CSV read with the standard library and, for each vessel, with
  CoolProp's AbstractState (its fastest Python interface, the same reference equations): the
  charge (from the fill pressure and temperature, or the fill mass), the pressure at the highest
  storage temperature, and the saturation pressure there where the gas is below its critical
  temperature. It does much less than fillcheck (no limits over the range, no plan, no output),
  so the ratio flatters CoolProp.

It prints the wall time and peak memory (the operating system's ``ru_maxrss`` of each child) of
both and their ratio. Quote medians of several runs: a shared machine is noisy.
"""

from __future__ import annotations

import os
import random
import subprocess
import sys
import tempfile
import time
from pathlib import Path

HEADER = (
    "id,gas,water_capacity,fill_pressure,fill_mass,fill_temperature,max_temperature,"
    "min_temperature,allowable_pressure,relief_set_pressure"
)
BY_PRESSURE = ("argon", "nitrogen", "oxygen", "helium")
# name in fillcheck -> CoolProp fluid name
COOLPROP = {
    "argon": "Argon",
    "nitrogen": "Nitrogen",
    "oxygen": "Oxygen",
    "helium": "Helium",
    "propane": "Propane",
    "carbon dioxide": "CarbonDioxide",
}


def write_register(path: Path, n: int, seed: int = 7) -> None:
    """An invented fleet of ``n`` 50 L vessels, written as a fillcheck register CSV a line at a
    time (so that this process stays small: a child's peak memory, ``ru_maxrss``, starts from
    the size of the process it was forked from)."""
    rnd = random.Random(seed)
    with path.open("w", encoding="utf-8") as out:
        out.write(HEADER + "\n")
        for i in range(n):
            r = rnd.random()
            t_fill = rnd.choice([10, 15, 20, 30])
            if r < 0.66:
                gas = BY_PRESSURE[int(r / 0.165)]
                p = rnd.uniform(150.0, 300.0)
                line = (
                    f"V{i},{gas},50 L,{p:.1f} barg,,{t_fill} degC,65 degC,-20 degC,300 barg,"
                    "330 barg"
                )
            elif r < 0.83:
                m = rnd.uniform(15.0, 21.0)
                line = f"V{i},propane,50 L,,{m:.2f} kg,15 degC,60 degC,-20 degC,30 barg,"
            else:
                m = rnd.uniform(15.0, 33.0)
                line = f"V{i},carbon dioxide,50 L,,{m:.2f} kg,15 degC,50 degC,-20 degC,250 barg,"
            out.write(line + "\n")


def _number(cell: str) -> float:
    return float(cell.split()[0])


def coolprop_loop(path: Path) -> None:
    """The bare loop over the register's rows (run in its own process by ``main``)."""
    import csv

    import CoolProp.CoolProp as CP

    states = {g: CP.AbstractState("HEOS", c) for g, c in COOLPROP.items()}
    tcrit = {g: a.T_critical() for g, a in states.items()}
    volume = 0.050
    out = 0.0
    with path.open(newline="", encoding="utf-8") as fh:
        for row in csv.DictReader(fh):
            a = states[row["gas"]]
            t_top = _number(row["max_temperature"]) + 273.15
            if row["fill_pressure"]:
                a.update(
                    CP.PT_INPUTS,
                    _number(row["fill_pressure"]) * 1e5 + 101325.0,
                    _number(row["fill_temperature"]) + 273.15,
                )
                rho = a.rhomass()
            else:
                rho = _number(row["fill_mass"]) / volume
            a.update(CP.DmassT_INPUTS, rho, t_top)
            out += a.p() + rho * volume
            if t_top < tcrit[row["gas"]]:
                a.update(CP.QT_INPUTS, 0.0, t_top)
                out += a.p()
    print(f"{out:.6e}")


def _child(cmd: list[str]) -> tuple[float, float]:
    """Wall seconds and peak memory [MiB] of one child process (its own ``ru_maxrss``)."""
    t0 = time.perf_counter()
    proc = subprocess.Popen(cmd, stdout=subprocess.DEVNULL, stderr=subprocess.PIPE)
    _, status, usage = os.wait4(proc.pid, 0)
    wall = time.perf_counter() - t0
    code = os.waitstatus_to_exitcode(status)
    if code not in (0, 1):
        err = proc.stderr.read().decode() if proc.stderr else ""
        raise SystemExit(f"{cmd[:4]} failed ({code}): {err[-400:]}")
    return wall, usage.ru_maxrss / 1024.0


def main() -> None:
    args = sys.argv[1:]
    if args[:1] == ["--coolprop"]:
        coolprop_loop(Path(args[1]))
        return
    jobs = "1"
    if "--jobs" in args:
        k = args.index("--jobs")
        jobs = args[k + 1]
        del args[k : k + 2]
    n = int(args[0]) if args else 10_000
    with tempfile.TemporaryDirectory() as tmp:
        reg = Path(tmp) / "fleet.csv"
        write_register(reg, n)
        env_cmd = [sys.executable]
        fc = [
            *env_cmd,
            "-m",
            "fillcheck",
            "check",
            str(reg),
            "--jsonl",
            str(Path(tmp) / "o.jsonl"),
            "--force",
            "--jobs",
            jobs,
        ]
        cp = [*env_cmd, os.path.abspath(__file__), "--coolprop", str(reg)]
        t_cp, m_cp = _child(cp)
        t_fc, m_fc = _child(fc)
    print(f"register: {n} rows (mixed fleet), fillcheck --jobs {jobs}")
    print(
        f"fillcheck, whole process: {t_fc:8.2f} s  {t_fc / n * 1e6:8.1f} µs a row  "
        f"peak {m_fc:7.1f} MiB"
    )
    print(
        f"CoolProp loop, whole process: {t_cp:8.2f} s  {t_cp / n * 1e6:8.1f} µs a row  "
        f"peak {m_cp:7.1f} MiB"
    )
    print(f"ratio fillcheck / CoolProp loop: {t_fc / t_cp:.2f}")


if __name__ == "__main__":
    main()
