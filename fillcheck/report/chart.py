"""Pressure–temperature chart of one vessel as inline SVG (matplotlib, imported only here).

The chart shows the vessel's path over the storage range (solid where one phase, thicker where
liquid is present), the saturation curve, the allowable pressure and the relief setting, the
storage range as a band, the fill point, and where liquid forms or fills the vessel.
"""

from __future__ import annotations

import io
import logging
import warnings
from collections.abc import Iterator
from contextlib import contextmanager

import numpy as np

from fillcheck import units
from fillcheck.assess.result import VesselAssessment

_PSI = 6894.757293168361


def _axes_units(system: units.UnitSystem):
    if system == "us":
        return (
            lambda T: (np.asarray(T) - 273.15) * 1.8 + 32.0,
            "temperature [°F]",
            lambda P, atm: (np.asarray(P) - atm) / _PSI,
            "pressure [psig]",
        )
    return (
        lambda T: np.asarray(T) - 273.15,
        "temperature [°C]",
        lambda P, atm: (np.asarray(P) - atm) / 1e5,
        "pressure [barg]",
    )


def vessel_chart_svg(
    v: VesselAssessment,
    system: units.UnitSystem,
    atm: float,
    allowable_Pa: float | None,
    relief_Pa: float | None,
) -> str:
    """The chart as an SVG string (no XML declaration), sized for a printed page."""
    with _quiet():
        return _svg(vessel_figure(v, system, atm, allowable_Pa, relief_Pa))


def _legend_outside(ax, fontsize: float) -> None:
    """The legend to the right of the axes, never over a limit line or the vessel's path."""
    ax.legend(
        fontsize=fontsize,
        loc="upper left",
        bbox_to_anchor=(1.02, 1.0),
        borderaxespad=0.0,
        framealpha=0.9,
    )


def vessel_figure(
    v: VesselAssessment,
    system: units.UnitSystem,
    atm: float,
    allowable_Pa: float | None,
    relief_Pa: float | None,
) -> str:
    import matplotlib

    matplotlib.use("Agg")
    from matplotlib import pyplot as plt
    from matplotlib.figure import Figure

    plt.rcParams["svg.fonttype"] = "none"
    tx, tlabel, px, plabel = _axes_units(system)
    fig = Figure(figsize=(7.4, 3.6), dpi=100)
    ax = fig.add_subplot()
    T, P = v.path_T_K, v.path_P_Pa
    ax.axvspan(tx(T[0]), tx(T[-1]), color="#e8eef6", label="storage range", zorder=0)
    if v.saturation_T_K.size:
        ax.plot(
            tx(v.saturation_T_K),
            px(v.saturation_P_Pa, atm),
            color="#6a6a6a",
            lw=1.2,
            ls="--",
            label="saturation curve",
        )
    liquid = np.isin(v.path_phase, ("two-phase", "liquid"))
    ax.plot(tx(T), px(P, atm), color="#1f4e8c", lw=2.0, label="vessel path")
    if np.any(liquid):
        Pl = np.where(liquid, P, np.nan)
        ax.plot(tx(T), px(Pl, atm), color="#1f4e8c", lw=4.5, alpha=0.45, label="liquid present")
    for value, name, style in (
        (allowable_Pa, "allowable pressure", "-"),
        (relief_Pa, "relief set pressure", ":"),
    ):
        if value is not None:
            ax.axhline(px(value, atm), color="#b3261e", lw=1.3, ls=style, label=name)
    if v.fill_temperature_K is not None and v.fill_pressure_Pa is not None:
        ax.plot(
            [tx(v.fill_temperature_K)],
            [px(v.fill_pressure_Pa, atm)],
            marker="o",
            color="#0b7a3e",
            ls="none",
            label="fill point",
        )
    for x, name in (
        (v.liquid_forms_below_K, "liquid forms below"),
        (v.liquid_full_above_K, "liquid-full above"),
    ):
        if x is not None and T[0] <= x <= T[-1]:
            ax.axvline(tx(x), color="#7a4b00", lw=1.0, ls="-.", label=name)
    ax.set_xlabel(tlabel)
    ax.set_ylabel(plabel)
    # user text is shown as written: never read as mathtext ("$...$")
    ax.set_title(f"{v.id}: {v.gas} ({v.model})", fontsize=10, parse_math=False)
    ax.grid(True, lw=0.4, alpha=0.6)
    _legend_outside(ax, 7)
    fig.tight_layout()
    return fig


def margin_chart_svg(vessels: list[VesselAssessment]) -> str:
    """A register's margins to the allowable pressure as a histogram, coloured by verdict."""
    with _quiet():
        return _svg(margin_figure(vessels))


@contextmanager
def _quiet() -> Iterator[None]:
    """Drawing says nothing on stderr: matplotlib warns through ``warnings`` (a glyph missing
    from the font, e.g. for a Chinese or Arabic id) and through its loggers."""
    loggers = [logging.getLogger(n) for n in ("matplotlib", "matplotlib.font_manager")]
    levels = [lg.level for lg in loggers]
    with warnings.catch_warnings():
        warnings.simplefilter("ignore")
        for lg in loggers:
            lg.setLevel(logging.CRITICAL)
        try:
            yield
        finally:
            for lg, level in zip(loggers, levels, strict=True):
                lg.setLevel(level)


def margin_figure(vessels: list[VesselAssessment]):
    """The histogram of a register's margins (assess.result.pressure_margin) as a figure."""
    import matplotlib

    matplotlib.use("Agg")
    from matplotlib.figure import Figure

    margins = {
        k: [
            100.0 * v.margin_to_allowable
            for v in vessels
            if v.verdict == k and np.isfinite(v.margin_to_allowable)
        ]
        for k in ("pass", "review", "fail")
    }
    every = [m for ms in margins.values() for m in ms]
    lo, hi = min([*every, -5.0]), max([*every, 5.0])
    bins = np.linspace(lo, hi, 41)
    fig = Figure(figsize=(7.4, 2.8), dpi=100)
    ax = fig.add_subplot()
    colours = {"pass": "#2e7d4f", "review": "#c98a00", "fail": "#b3261e"}
    ax.hist(
        [margins[k] for k in colours],
        bins=bins,
        stacked=True,
        color=list(colours.values()),
        label=list(colours),
    )
    ax.axvline(0.0, color="#333", lw=1.0)
    ax.set_xlabel("margin to the allowable pressure, share of its gauge value [%]")
    ax.set_ylabel("vessels")
    _legend_outside(ax, 8)
    ax.grid(True, lw=0.4, alpha=0.6)
    fig.tight_layout()
    return fig


def _svg(fig) -> str:
    """A finished figure as an inline SVG element (no XML declaration), the same bytes for the
    same figure."""
    import matplotlib as mpl

    fig.tight_layout()
    buf = io.StringIO()
    # reproducible: element ids from a fixed salt, no creation date (the record carries it)
    with mpl.rc_context({"svg.hashsalt": "fillcheck"}):
        fig.savefig(buf, format="svg", metadata={"Date": None})
    svg = buf.getvalue()
    start = svg.find("<svg")
    return svg[start:] if start >= 0 else svg
