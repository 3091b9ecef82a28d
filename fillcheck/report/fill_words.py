"""The sentences of the fill process's findings (assess.fill_process gives them as data)."""

from __future__ import annotations

from collections.abc import Callable
from typing import Any

from fillcheck.report.finding_words import Words


def _heat(d: dict[str, Any]) -> str:
    return {
        "adiabatic": "the gas alone (adiabatic)",
        "lumped": f"the wall sharing the heat ({d['wall_heat_capacity_J_K'] / 1e3:.1f} kJ/K)",
        "two-node": "gas and wall nodes with heat transfer",
    }[d["heat_transfer"]]


def _source(d: dict[str, Any], w: Words) -> str:
    if d["source"] == "cascade":
        return f"a cascade of {d['banks']} banks"
    if d["source"] == "valve":
        return (
            f"a supply at {w.p(d['supply_pressure_Pa'])} and {w.t(d['inlet_temperature_K'])} "
            "through a valve"
        )
    return f"a compressor delivering at {w.t(d['inlet_temperature_K'])}"


def _not_computed(d: dict[str, Any], w: Words) -> str:
    return (
        f"The fill process could not be computed: {d['error']}; the end-of-fill state is not "
        "in the checked range."
    )


def _temperature_unknown(d: dict[str, Any], w: Words) -> str:
    return (
        f"The peak gas temperature is unknown, so the limit of {w.t(d['limit_K'])} is not checked."
    )


def _supply_short(d: dict[str, Any], w: Words) -> str:
    end = (
        f"the fill ends at {w.p(d['end_pressure_Pa'])} and {w.t(d['end_temperature_K'])} "
        f"with {w.m(d['added_mass_kg'])} added, settling at {w.p(d['settled_pressure_Pa'])}"
    )
    if d["banks_run_out"]:
        return (
            f"Filled from {_source(d, w)}, {_heat(d)}: the banks run out before the charge is "
            f"in; {end}; peak gas temperature {w.t(d['peak_temperature_K'])}."
        )
    return (
        f"The supply's pressure is reached before the charge is in: {end}; the charge needs a "
        f"stop at {w.p(d['stop_pressure_Pa'])} (a higher supply pressure or a cascade)."
    )


def _process(d: dict[str, Any], w: Words) -> str:
    return (
        f"Filled from {_source(d, w)}, {_heat(d)}: stop the fill at "
        f"{w.p(d['stop_pressure_Pa'])} while the gas is at {w.t(d['stop_temperature_K'])} (the "
        "checked range reaches this hot state); peak gas temperature "
        f"{w.t(d['peak_temperature_K'])}."
    )


def _exceeded(d: dict[str, Any], w: Words) -> str:
    return (
        f"The gas reaches {w.t(d['peak_temperature_K'])} during the fill, above the limit of "
        f"{w.t(d['limit_K'])}: fill more slowly, cool the supply or fill in stages."
    )


def _margin(d: dict[str, Any], w: Words) -> str:
    peak, limit = d["peak_temperature_K"], d["limit_K"]
    return (
        f"Peak gas temperature {w.t(peak)}, {w.dt(limit - peak)} below the limit of {w.t(limit)}."
    )


_BROKEN = {
    "peak-temperature": "the peak gas temperature limit",
    "allowable": "the allowable pressure",
    "relief": "the relief set pressure",
}


def _plan_hot(d: dict[str, Any], w: Words) -> str:
    said = (
        "Filled this way, the largest charge the storage range allows, "
        f"{w.m(d['plan_mass_kg'], down=True)}, would end the fill at "
        f"{w.p(d['plan_end_pressure_Pa'])} with the gas at "
        f"{w.t(d['plan_peak_temperature_K'])}, beyond {_BROKEN[d['broken']]} (with the model's "
        "uncertainty); "
    )
    if d["lowered_mass_kg"] is None:
        return said + (
            "no charge keeps it filled this way: change the fill (slower, cooler supply, a "
            "wall that shares the heat)."
        )
    return said + (
        f"the plan is lowered to {w.m(d['lowered_mass_kg'], down=True)}, whose fill ends at "
        f"{w.p(d['lowered_end_pressure_Pa'])} with the gas at "
        f"{w.t(d['lowered_peak_temperature_K'])}."
    )


FILL_WORDS: dict[str, Callable[[dict[str, Any], Words], str]] = {
    "fill-not-computed": _not_computed,
    "fill-temperature-unknown": _temperature_unknown,
    "fill-supply-short": _supply_short,
    "fill-process": _process,
    "fill-temperature-exceeded": _exceeded,
    "fill-temperature-margin": _margin,
    "fill-plan-hot": _plan_hot,
}
"""The fill process's codes to the functions that write their sentences."""
