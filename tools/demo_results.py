"""Write docs/demo_results.md: every demo vessel under its reference equation and its best cubic.

Run: ``python tools/demo_results.py``. Shows what the reference equations change: charge,
highest pressure and verdict of each demo vessel under the default model (the published
reference equation where the gas has one) and under the most accurate cubic model.
"""

from __future__ import annotations

import dataclasses
import sys
from pathlib import Path

ROOT = Path(__file__).resolve().parents[1]
sys.path.insert(0, str(ROOT))

from fillcheck.assess.vessel import assess_vessel  # noqa: E402
from fillcheck.errors import InputError  # noqa: E402
from fillcheck.models.registry import available_models  # noqa: E402
from fillcheck.scenario.resolve import load_scenario  # noqa: E402
from fillcheck.thermo.fluid import Fluid  # noqa: E402
from fillcheck.thermo.mixture_fluid import MixtureFluid  # noqa: E402


def main() -> None:
    lines = [
        "# Demo scenarios under the reference equations and under the best cubic",
        "",
        "Each demo vessel checked twice: with its default model (the published reference",
        "equation of state where the gas has one) and with the cubic model that has the smallest",
        "measured error for that gas (docs/accuracy.md). Pressures are gauge at the highest",
        "storage temperature. Regenerate with `python tools/demo_results.py`.",
        "",
        "| scenario | vessel | gas | model | charge / kg | highest pressure / barg | verdict |",
        "|---|---|---|---|---:|---:|---|",
    ]
    for path in sorted((ROOT / "scenarios").glob("*.toml")):
        sc = load_scenario(path)
        for v in sc.vessels:
            models = [v.fluid.model]
            mix = getattr(v.fluid, "is_mixture", False)
            if mix:
                if v.fluid.model == "reference":
                    models.append("pr-peneloux")
            else:
                cubics = [m for m in available_models(v.fluid.data) if m != "reference"]
                if v.fluid.model == "reference" and cubics:
                    models.append(cubics[0])
            for m in models:
                if mix:
                    try:
                        fl = MixtureFluid(v.fluid.components, v.fluid.z, m)
                    except InputError:  # no fitted Péneloux shift for a component
                        fl = MixtureFluid(v.fluid.components, v.fluid.z, "pr")
                        m = "pr"
                else:
                    fl = Fluid(v.fluid.data, m)
                vi = dataclasses.replace(v, fluid=fl)
                a = assess_vessel(vi, sc.reference_temperature_K)
                barg = (a.max_state.pressure_Pa - v.atmospheric_pressure_Pa) / 1e5
                lines.append(
                    f"| {path.stem} | {v.id} | {a.gas} | {m} | {a.charged_mass_kg:.3f} | "
                    f"{barg:.1f} | {a.verdict} |"
                )
    lines.append("")
    (ROOT / "docs" / "demo_results.md").write_text("\n".join(lines), encoding="utf-8")


if __name__ == "__main__":
    main()
