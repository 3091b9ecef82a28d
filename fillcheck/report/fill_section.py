"""The fill process on the reports: rows for the terminal and HTML, and the JSON ``filling`` key.

Renders an :class:`fillcheck.assess.fill_process.FillResult`; computes nothing.
"""

from __future__ import annotations

from typing import Any

import numpy as np

from fillcheck import units
from fillcheck.assess.fill_process import CASCADE_COUNT_MAX, CURVE_POINTS_SHOWN
from fillcheck.assess.result import VesselAssessment
from fillcheck.report.content import Formatter

ENTERED_FILLING_LABELS = {
    "filling.supply.pressure": "supply pressure",
    "filling.supply.temperature": "supply temperature",
    "filling.compressor.delivery_temperature": "compressor delivery temperature",
    "filling.switch_difference": "next bank below",
    "filling.start.pressure": "residual pressure at start",
    "filling.start.temperature": "residual gas temperature",
    "filling.duration": "fill duration",
    "filling.ambient_temperature": "ambient temperature",
    "filling.wall.mass": "wall mass",
    "filling.wall.specific_heat": "wall specific heat",
    "filling.wall.material": "wall material",
    "filling.heat_transfer": "heat transfer",
    "filling.heat_transfer.coefficient": "gas-wall coefficient",
    "filling.heat_transfer.area": "heat-transfer area",
    "filling.heat_transfer.ambient_coefficient": "wall-ambient coefficient",
    "limits.max_fill_temperature": "peak gas temperature limit",
}


def _shown_indices(n: int) -> np.ndarray:
    return np.unique(np.linspace(0, n - 1, min(n, CURVE_POINTS_SHOWN)).round().astype(int))


def filling_rows(v: VesselAssessment, fmt: Formatter) -> list[tuple[str, str]]:
    """The fill-process table: what was entered, then the results (empty without one)."""
    r = v.filling
    if r is None:
        return []
    rows = [
        (label, units.respell(v.entered[k]))
        for k, label in ENTERED_FILLING_LABELS.items()
        if k in v.entered
    ]
    if r.error is not None:
        return [*rows, ("result", "not computed (see the finding fill-not-computed)")]
    stop = (
        f"{fmt.p(r.stop_pressure_Pa)} (gas at {fmt.t(r.stop_temperature_K)})"
        if r.stop_pressure_Pa is not None
        else "not reached: the banks run out"
    )
    rows += [
        ("stop the fill at", stop),
        ("peak gas temperature", fmt.t(r.peak_temperature_K)),
        (
            "settled pressure",
            f"{fmt.p(r.settled_pressure_Pa)} at {fmt.t(v.reference_temperature_K)}",
        ),
        ("gas added", fmt.m(r.added_mass_kg)),
    ]
    for i, b in enumerate(r.cascade or [], start=1):
        rows.append(
            (
                f"bank {i}",
                f"gave {fmt.m(b['mass_given_kg'])}, ends at {fmt.p(b['end_pressure_Pa'])} and "
                f"{fmt.t(b['end_temperature_K'])}",
            )
        )
    if r.cascade_vessels_filled is not None:
        n = r.cascade_vessels_filled
        more = " or more" if n >= CASCADE_COUNT_MAX else ""
        rows.append(("vessels the banks fill", f"{n}{more} like this one, one after another"))
    if not r.complete:
        rows.append(
            (
                "fill ends short",
                f"at {fmt.p(r.end_pressure_Pa)} and {fmt.t(r.end_temperature_K)}",
            )
        )
    rows.append(("model", f"{v.model_name} ({v.model}), energy balance (thermo.fill_balance)"))
    return rows


def filling_curve_rows(v: VesselAssessment, fmt: Formatter) -> list[tuple[str, str, str]]:
    """(time, gas temperature, pressure) at a few points of the curve."""
    r = v.filling
    if r is None or r.curve is None:
        return []
    c = r.curve
    return [
        (f"{c.time_s[i]:.0f} s", fmt.t(float(c.temperature_K[i])), fmt.p(float(c.pressure_Pa[i])))
        for i in _shown_indices(c.time_s.size)[:: max(1, CURVE_POINTS_SHOWN // 6)]
    ]


def filling_dict(v: VesselAssessment) -> dict[str, Any] | None:
    """The JSON ``filling`` key (INTERFACES.md §6), SI, pressures absolute; None without one."""
    r = v.filling
    if r is None:
        return None
    out: dict[str, Any] = {
        "end_temperature_K": r.end_temperature_K,
        "end_pressure_Pa": r.end_pressure_Pa,
        "settled_pressure_Pa": r.settled_pressure_Pa,
        "peak_temperature_K": r.peak_temperature_K,
        "added_mass_kg": r.added_mass_kg,
        "stop_pressure_Pa": r.stop_pressure_Pa,
        "stop_temperature_K": r.stop_temperature_K,
        "complete": r.complete,
        "energy_in_J": r.energy_in_J,
        "max_energy_residual_J": r.max_energy_residual_J,
        "error": r.error,
        "curve": [],
        "cascade": r.cascade,
        "cascade_vessels_filled": r.cascade_vessels_filled,
    }
    if r.curve is not None:
        c = r.curve
        out["curve"] = [
            {
                "time_s": float(c.time_s[i]),
                "temperature_K": float(c.temperature_K[i]),
                "pressure_Pa": float(c.pressure_Pa[i]),
                "wall_temperature_K": float(c.wall_temperature_K[i]),
                "mass_kg": float(c.moles[i] * r.molar_mass),
            }
            for i in _shown_indices(c.time_s.size)
        ]
    return out


def filling_chart_svg(v: VesselAssessment, system: str, atm: float) -> str:
    """Gas temperature and pressure against time over the fill, an inline SVG ("" without a
    curve). matplotlib is imported only here, for ``--html``."""
    r = v.filling
    if r is None or r.curve is None:
        return ""
    from fillcheck.report.chart import _axes_units, _quiet, _svg

    with _quiet():
        import matplotlib

        matplotlib.use("Agg")
        from matplotlib.figure import Figure

        T_of, T_label, P_of, P_label = _axes_units(system)  # type: ignore[arg-type]
        c = r.curve
        fig = Figure(figsize=(6.3, 2.8), dpi=100)
        ax = fig.add_subplot()
        ax.plot(c.time_s, T_of(c.temperature_K), color="#b3261e", label="gas temperature")
        if np.any(c.wall_temperature_K != c.wall_temperature_K[0]):
            ax.plot(c.time_s, T_of(c.wall_temperature_K), color="#c98a00", ls="--", label="wall")
        ax.set_xlabel("time [s]")
        ax.set_ylabel(T_label)
        ax2 = ax.twinx()
        ax2.plot(c.time_s, P_of(c.pressure_Pa, atm), color="#1f4e79", label="pressure")
        ax2.set_ylabel(P_label)
        lines = ax.get_lines() + ax2.get_lines()
        ax.legend(lines, [ln.get_label() for ln in lines], fontsize=8, loc="upper left")
        ax.grid(True, lw=0.4, alpha=0.6)
        return _svg(fig)
