"""Mutation run over fillcheck's safety-critical lines: one change at a time, the chosen tests each.

Each mutant names a file, an exact piece of its text (which must occur exactly once), the text
that replaces it, why the line matters, and the test that kills it. For each mutant the script
writes the change, runs pytest (``-x``: the first failure kills), restores the file byte for byte
(also on Ctrl-C or a crash) and prints a table: killed / survived / error, with the time.

    python tools/mutants.py                   # every mutant, the default tests (see DEVELOPERS.md)
    python tools/mutants.py --list            # the list, with the killer of each mutant
    python tools/mutants.py --only plan-rounds-to-nearest relief-only-above
    python tools/mutants.py --without-new     # the default tests less tests/test_safety_margins.py

Run it from the repository root with the package importable from this checkout
(``PYTHONPATH=.``); it refuses to start if ``fillcheck`` would be imported from elsewhere.
Bytecode is kept out of the source tree (PYTHONPYCACHEPREFIX in a temporary folder per mutant),
so a stale .pyc can never stand in for a mutated file.
"""

from __future__ import annotations

import argparse
import os
import subprocess
import sys
import tempfile
import time
from dataclasses import dataclass
from pathlib import Path

ROOT = Path(__file__).resolve().parents[1]

NEW_TESTS = "tests/test_safety_margins.py"
DEFAULT_TESTS = (
    NEW_TESTS,
    "tests/test_planning.py",
    "tests/test_liquefied_gases.py",
    "tests/test_register.py",
    "tests/test_cli.py",
    "tests/test_demos.py",
)
"""The tests each mutant runs against: the behavioural safety tests first (they kill fastest),
then the planning, liquefied-gas, register, command-line and demo tests."""


@dataclass(frozen=True)
class Mutant:
    """One change to one file."""

    name: str
    path: str
    original: str
    replacement: str
    why: str
    killer: str
    """The test that kills it (file::test), or why it is equivalent."""


SM = "tests/test_safety_margins.py::"
LOG_DIR: Path | None = None
"""Where each mutant's pytest output is written (--logs), or None."""

MUTANTS: tuple[Mutant, ...] = (
    # --- the six survivors of issue 17, at their current places --------------------------------
    Mutant(
        "plan-rounds-to-nearest",
        "fillcheck/assess/charge.py",
        "return math.floor(m / q + 1e-9) * q / kg_per_density",
        "return round(m / q) * q / kg_per_density",
        "the printed plan must be rounded down, never up past the largest safe charge",
        SM + "test_plan_pressure_bound_against_coolprop[relief]",
    ),
    Mutant(
        "relief-only-above",
        "fillcheck/assess/findings.py",
        "if P_top >= lim.relief_set_pressure_Pa:",
        "if P_top > lim.relief_set_pressure_Pa:",
        "reaching the relief setting opens the device: at the setting itself is a fail",
        SM + "test_relief_reached_exactly_at_the_setting_fails",
    ),
    Mutant(
        "plan-clearance-removed",
        "fillcheck/assess/charge.py",
        "return st.P - P_limit * (1.0 - u - clearance)",
        "return st.P - P_limit * (1.0 - u)",
        "the plan keeps 0.1 % below every pressure limit beyond the model's uncertainty",
        SM + "test_plan_pressure_bound_against_coolprop[allowable]",
    ),
    Mutant(
        "liquid-full-margin-sign",
        "fillcheck/assess/charge.py",
        "rl = sat.rho_liquid * (1.0 - _liquid_u(fluid))",
        "rl = sat.rho_liquid * (1.0 + _liquid_u(fluid))",
        "the built-in vapour-space bound takes the saturated liquid density less its uncertainty",
        SM + "test_built_in_vapour_space_plan_against_coolprop",
    ),
    Mutant(
        "vapour-space-2pct-slack",
        "fillcheck/assess/findings.py",
        "elif liquid > allowed:",
        "elif liquid > allowed + 0.02:",
        "the vapour-space rule fails as soon as the liquid takes more than 1 − f of the vessel",
        SM + "test_every_finding_code_both_ways[vapour-space-too-small]",
    ),
    Mutant(
        "relief-clearance-removed",
        "fillcheck/assess/charge.py",
        "relief[has] * (1.0 - RELIEF_CLEARANCE)",
        "relief[has]",
        "the plan keeps a clearance below the relief setting: reaching the setting fails",
        SM + "test_plan_pressure_bound_against_coolprop[relief]",
    ),
    # --- verdict rules (assess/findings.py) -----------------------------------------------------
    Mutant(
        "allowable-0.1pct-slack",
        "fillcheck/assess/findings.py",
        "if P_top > lim.allowable_pressure_Pa:",
        "if P_top > lim.allowable_pressure_Pa * 1.001:",
        "a pressure just above the allowable pressure fails",
        SM + "test_allowable_just_under_passes_just_over_fails",
    ),
    Mutant(
        "filling-ratio-slack",
        "fillcheck/assess/findings.py",
        "if a.density_kg_m3 > lim.max_filling_ratio_kg_m3 * (1 + 1e-12):",
        "if a.density_kg_m3 > lim.max_filling_ratio_kg_m3 * (1 + 1e-3):",
        "a filling ratio just above its limit fails",
        SM + "test_filling_ratio_at_its_limit",
    ),
    Mutant(
        "liquid-full-at-top-never",
        "fillcheck/assess/findings.py",
        'if str(path.phase[-1]) == "liquid":\n        reach',
        'if str(path.phase[-1]) == "liquid-full":\n        reach',
        "a vessel full of liquid at the top of its checked range fails (issue 11)",
        SM + "test_liquid_full_at_top_just_under_and_just_over",
    ),
    Mutant(
        "vapour-space-low-threshold",
        "fillcheck/assess/findings.py",
        "if left < VAPOUR_SPACE_WARNING:",
        "if left < 0.5 * VAPOUR_SPACE_WARNING:",
        "less than 5 % vapour space at the top of the range warns",
        SM + "test_vapour_space_low_warning_at_five_percent",
    ),
    Mutant(
        "margin-review-halved",
        "fillcheck/assess/findings.py",
        "if 0.0 <= margin < u_top:",
        "if 0.0 <= margin < 0.5 * u_top:",
        "a margin smaller than the model's uncertainty cannot be vouched for: review",
        SM + "test_every_finding_code_both_ways[margin-below-model-error]",
    ),
    Mutant(
        "validity-pressure-ignored",
        "fillcheck/assess/findings.py",
        "if float(path.P[-1]) > val.P_max_Pa:",
        "if float(path.P[-1]) > 2.0 * val.P_max_Pa:",
        "a pressure above the model's validity range is not vouched for: review",
        SM + "test_every_finding_code_both_ways[outside-validity]",
    ),
    Mutant(
        "vapour-space-uncertain-off",
        "fillcheck/assess/findings.py",
        "within = err is not None and 0.0 < liquid < 1.0 and abs(allowed / liquid - 1.0) < err",
        "within = False",
        "a vapour-space call within a cubic's liquid-density error asks for review",
        SM + "test_every_finding_code_both_ways[vapour-space-uncertain]",
    ),
    Mutant(
        "findings-ignore-site-atmosphere",
        "fillcheck/assess/findings.py",
        "return units.format_pressure(x, system, gauge=True, atmospheric_pressure_Pa=atm)",
        "return units.format_pressure(x, system, gauge=True)",
        "gauge figures in findings use the scenario's atmospheric pressure, not 1 atm",
        SM + "test_gauge_figures_use_the_sites_atmosphere",
    ),
    # --- the plan (assess/charge.py, assess/checked_range.py) -----------------------------------
    Mutant(
        "plan-ignores-uncertainty",
        "fillcheck/assess/charge.py",
        "u = np.clip(u, 0.0, MAX_UNCERTAINTY) if clearance > 0 else 0.0 * u",
        "u = 0.0 * u",
        "the plan keeps the model's pressure uncertainty below each pressure limit",
        SM + "test_plan_pressure_bound_against_coolprop[allowable]",
    ),
    Mutant(
        "plan-filling-ratio-over",
        "fillcheck/assess/charge.py",
        'cands.append((fr / fluid.molar_mass, "maximum filling ratio"))',
        'cands.append((fr * 1.001 / fluid.molar_mass, "maximum filling ratio"))',
        "the plan never exceeds the maximum filling ratio",
        SM + "test_filling_ratio_at_its_limit",
    ),
    Mutant(
        "plan-own-vapour-space-ignored",
        "fillcheck/assess/charge.py",
        "r[own] = vapour_space_bound(fluid, Tv[own], frac[own], own=True)",
        "r[own] = vapour_space_bound(fluid, Tv[own], 0.0 * frac[own], own=True)",
        "the plan keeps the scenario's own minimum vapour space at its own temperature",
        SM + "test_min_vapour_space_at_its_limit",
    ),
    Mutant(
        "plan-built-in-floor-swapped",
        "fillcheck/assess/charge.py",
        "floor = np.where(own, 0.0, DEFAULT_VAPOUR_SPACE)",
        "floor = np.where(own, DEFAULT_VAPOUR_SPACE, 0.0)",
        "the built-in 5 % vapour space applies where the scenario sets none",
        SM + "test_min_vapour_space_at_its_limit",
    ),
    Mutant(
        "plan-top-is-storage-max",
        "fillcheck/assess/charge.py",
        "T_top = checked_ranges(vs, T_ref)[1]",
        "T_top = np.array([v.max_temperature_K for v in vs])",
        "the plan keeps every limit at a fill hotter than the storage range (issue 11)",
        SM + "test_hot_fill_is_planned_at_its_own_temperature",
    ),
    Mutant(
        "checked-range-drops-hot-fill",
        "fillcheck/assess/checked_range.py",
        "highs.append(v.fill_temperature_K)",
        "pass",
        "a fill hotter than the storage range is checked at its own state (issue 11)",
        SM + "test_hot_fill_is_planned_at_its_own_temperature",
    ),
    # --- the batch engine (assess/batch.py) -----------------------------------------------------
    Mutant(
        "reach-reported-1K-past-range",
        "fillcheck/assess/batch.py",
        "return None if not np.isfinite(T) or T > T_hi + 1e-9 else float(T)",
        "return None if not np.isfinite(T) or T > T_hi + 1.0 else float(T)",
        "a limit reached above the checked range is not reported as reached in it",
        SM + "test_allowable_just_under_passes_just_over_fails",
    ),
    Mutant(
        "reach-solver-loose",
        "fillcheck/assess/batch.py",
        "width=1e-3 if mixture else 1e-6,",
        "width=1e-3 if mixture else 5.0,",
        "the temperature where a limit is reached is solved on the isochore itself",
        SM + "test_allowable_reached_at_against_coolprop",
    ),
    Mutant(
        "liquid-fraction-wrong",
        "fillcheck/assess/batch.py",
        "two = (rho - st.rho_vapor) / (st.rho_liquid - st.rho_vapor)",
        "two = (rho - st.rho_vapor) / st.rho_liquid",
        "the liquid's share of the vessel decides the vapour-space rules",
        SM + "test_every_finding_code_both_ways[vapour-space-too-small]",
    ),
    Mutant(
        "vapour-space-low-at-bottom",
        "fillcheck/assess/batch.py",
        "frac_top = _liquid_fraction(f, T_hi, rho)",
        "frac_top = _liquid_fraction(f, TT[:, 0], rho)",
        "the vapour space left is judged at the top of the checked range",
        SM + "test_vapour_space_low_warning_at_five_percent",
    ),
    Mutant(
        "stop-pressure-for-liquid",
        "fillcheck/assess/batch.py",
        "np.where(liquid_at_fill | ~inside | ~has_fill_T[ok], np.nan, st.P)",
        "np.where(~inside | ~has_fill_T[ok], np.nan, st.P)",
        "no stop pressure where the plan holds liquid at the fill temperature (weigh it)",
        "tests/test_liquefied_gases.py::test_the_plan_of_a_liquefied_gas_is_by_weight",
    ),
    Mutant(
        "pressure-fill-read-at-reference",
        "fillcheck/assess/batch.py",
        '(("pressure", T_fill), ("settled_pressure"',
        '(("pressure", np.full(len(vs), T_ref)), ("settled_pressure"',
        "a fill by pressure is converted at its own gas temperature",
        "tests/test_cli.py::test_json_is_si_with_absolute_pressures",
    ),
    # --- the closed-vessel path (thermo/vessel.py) ----------------------------------------------
    Mutant(
        "two-phase-band-narrowed",
        "fillcheck/thermo/vessel.py",
        "inside = (rho[below] > sat.rho_vapor) & (rho[below] < sat.rho_liquid)",
        "inside = (rho[below] > sat.rho_vapor) & (rho[below] < sat.rho_liquid * 0.97)",
        "a nearly liquid-full vessel is two-phase at the vapour pressure, not a metastable liquid",
        SM + "test_liquid_full_at_top_just_under_and_just_over",
    ),
    Mutant(
        "crossing-solver-loose",
        "fillcheck/thermo/vessel.py",
        "ftol=1e-13,",
        "ftol=1e-3,",
        "the liquid-full temperature a finding prints is the exact crossing",
        SM + "test_liquid_full_at_top_just_under_and_just_over",
    ),
    Mutant(
        "clapeyron-slope-wrong",
        "fillcheck/thermo/vessel.py",
        "dPdT[idx] = dh * model.R / (1.0 / v - 1.0 / l)",
        "dPdT[idx] = dh * model.R / (1.0 / v)",
        "the pressure rise per kelvin in two phases (printed and in JSON)",
        SM + "test_two_phase_pressure_rise_against_coolprop",
    ),
    # --- gauge and absolute (units.py) ----------------------------------------------------------
    Mutant(
        "gauge-not-added",
        "fillcheck/units.py",
        "p = value * factor + (atm if gauge else 0.0)",
        "p = value * factor",
        "a gauge pressure is the absolute pressure less the atmosphere",
        SM + "test_plan_pressure_bound_against_coolprop[allowable]",
    ),
    Mutant(
        "gauge-shown-as-absolute",
        "fillcheck/units.py",
        "p = Pa_abs - atmospheric_pressure_Pa if gauge else Pa_abs",
        "p = Pa_abs",
        "every printed barg/psig figure is absolute less the atmosphere",
        SM + "test_gauge_figures_use_the_sites_atmosphere",
    ),
    Mutant(
        "site-atmosphere-ignored",
        "fillcheck/units.py",
        "p = value * factor + (atm if gauge else 0.0)",
        "p = value * factor + (STANDARD_ATMOSPHERE_Pa if gauge else 0.0)",
        "a gauge pressure at a site below 1 atm adds the site's atmosphere",
        SM + "test_gauge_figures_use_the_sites_atmosphere",
    ),
)


def _imports_from_here() -> bool:
    code = "import fillcheck, sys; sys.stdout.write(fillcheck.__file__)"
    env = {**os.environ, "PYTHONPATH": str(ROOT)}
    out = subprocess.run(
        [sys.executable, "-c", code], env=env, capture_output=True, text=True, check=False
    )
    return Path(out.stdout.strip()).resolve().is_relative_to(ROOT / "fillcheck")


def run_one(m: Mutant, tests: list[str], workers: int, timeout_s: float) -> tuple[str, float]:
    """Apply one mutant, run the tests, restore the file. Returns (outcome, seconds)."""
    path = ROOT / m.path
    original = path.read_bytes()
    text = original.decode("utf-8")
    if text.count(m.original) != 1:
        return f"stale ({text.count(m.original)} matches)", 0.0
    stat = path.stat()
    t0 = time.perf_counter()
    try:
        path.write_text(text.replace(m.original, m.replacement), encoding="utf-8")
        with tempfile.TemporaryDirectory(prefix="fillcheck-mutant-") as cache:
            env = {**os.environ, "PYTHONPATH": str(ROOT), "PYTHONPYCACHEPREFIX": cache}
            cmd = [sys.executable, "-m", "pytest", "-x", "-q", "-p", "no:cacheprovider"]
            if workers > 1:
                cmd += ["-n", str(workers)]
            try:
                res = subprocess.run(
                    [*cmd, *tests],
                    cwd=ROOT,
                    env=env,
                    capture_output=True,
                    text=True,
                    timeout=timeout_s,
                    check=False,
                )
            except subprocess.TimeoutExpired:
                return "killed (timeout)", time.perf_counter() - t0
    finally:
        path.write_bytes(original)
        os.utime(path, ns=(stat.st_atime_ns, stat.st_mtime_ns))
    dt = time.perf_counter() - t0
    if LOG_DIR is not None:
        (LOG_DIR / f"{m.name}.log").write_text(res.stdout + res.stderr, encoding="utf-8")
    # pytest exits 0 when every test passed and 1 when one failed; with -x under xdist a failure
    # ends the session as "interrupted" (2), so the summary line decides; anything else
    # (a collection error, a crash) is an error, which does not count as a kill
    lines = res.stdout.splitlines()
    failed = next((ln for ln in lines if ln.startswith("FAILED")), None)
    if res.returncode == 0:
        return "SURVIVED", dt
    if res.returncode in (1, 2) and failed is not None:
        return f"killed  {failed.removeprefix('FAILED ').split(' - ')[0]}", dt
    return f"error (rc {res.returncode}; see the log)", dt


def main(argv: list[str] | None = None) -> int:
    ap = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    ap.add_argument("--list", action="store_true", help="print the mutants and their killers")
    ap.add_argument("--only", nargs="+", metavar="NAME", help="run only these mutants")
    ap.add_argument("--tests", nargs="+", default=list(DEFAULT_TESTS), help="test files to run")
    ap.add_argument("--without-new", action="store_true", help=f"leave out {NEW_TESTS}")
    ap.add_argument("-n", "--workers", type=int, default=2, help="pytest-xdist workers (2)")
    ap.add_argument("--timeout", type=float, default=900.0, help="seconds per mutant (900)")
    ap.add_argument("--logs", type=Path, help="write each mutant's pytest output to this folder")
    args = ap.parse_args(argv)
    global LOG_DIR
    if args.logs is not None:
        args.logs.mkdir(parents=True, exist_ok=True)
        LOG_DIR = args.logs
    chosen = [m for m in MUTANTS if not args.only or m.name in args.only]
    if args.only and len(chosen) != len(set(args.only)):
        known = {m.name for m in MUTANTS}
        ap.error(f"unknown mutant(s): {', '.join(sorted(set(args.only) - known))}")
    if args.list:
        for m in chosen:
            print(f"{m.name:34} {m.path}\n    {m.why}\n    killed by: {m.killer}")
        return 0
    if not _imports_from_here():
        print(f"fillcheck is not imported from {ROOT}; run from the checkout", file=sys.stderr)
        return 2
    tests = [t for t in args.tests if not (args.without_new and t == NEW_TESTS)]
    print(f"{len(chosen)} mutants; tests: {' '.join(tests)}", flush=True)
    t_all = time.perf_counter()
    survived = 0
    for m in chosen:
        outcome, dt = run_one(m, tests, args.workers, args.timeout)
        survived += not outcome.startswith("killed")
        print(f"{m.name:34} {dt:7.1f} s  {outcome}", flush=True)
    total = time.perf_counter() - t_all
    print(f"{len(chosen) - survived} killed, {survived} not killed, {total:.0f} s in all")
    return 1 if survived else 0


if __name__ == "__main__":
    sys.exit(main())
