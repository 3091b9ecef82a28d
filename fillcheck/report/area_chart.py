"""Concentration–time chart of an area's reported release as inline SVG (matplotlib, imported
only here): the oxygen and the released gas's share of the air as ventilation clears it, with
the oxygen threshold, and carbon dioxide or the share of the LFL where the gas has them."""

from __future__ import annotations

import numpy as np

from fillcheck.assess.area import AreaAssessment
from fillcheck.report.chart import _legend_outside, _quiet, _svg


def area_chart_svg(a: AreaAssessment) -> str:
    """The chart as an SVG string (no XML declaration)."""
    with _quiet():
        return _svg(area_figure(a))


def area_figure(a: AreaAssessment):  # type: ignore[no-untyped-def]
    import matplotlib

    matplotlib.use("Agg")
    from matplotlib import pyplot as plt
    from matplotlib.figure import Figure

    plt.rcParams["svg.fonttype"] = "none"
    assert a.release is not None
    t = np.asarray(a.curve_t_s) / 60.0
    fig = Figure(figsize=(7.4, 3.4), dpi=100)
    ax = fig.add_subplot()
    ax.plot(t, [100 * x.oxygen for x in a.curve], color="#1f4e8c", lw=2.0, label="oxygen")
    ax.plot(
        t,
        [100 * x.gas_fraction for x in a.curve],
        color="#6a6a6a",
        lw=1.2,
        ls="--",
        label="released gas",
    )
    ax.axhline(
        100 * a.limits.oxygen_minimum, color="#b3261e", lw=1.2, label="oxygen-deficient below"
    )
    if a.release.mix.carbon_dioxide > 0:
        ax.plot(
            t,
            [100 * x.carbon_dioxide for x in a.curve],
            color="#7a4b00",
            lw=1.5,
            label="carbon dioxide",
        )
        ax.axhline(
            100 * a.limits.carbon_dioxide_short_term,
            color="#7a4b00",
            lw=1.0,
            ls=":",
            label="CO₂ 15-min limit",
        )
    if a.release.mix.lfl_sum > 0:
        ax.plot(
            t,
            [100 * x.lfl_fraction for x in a.curve],
            color="#c98a00",
            lw=1.5,
            label="share of LFL",
        )
        ax.axhline(
            100 * a.limits.lfl_share, color="#c98a00", lw=1.0, ls=":", label="LFL share allowed"
        )
    ax.set_xlabel("time after the release [min]")
    ax.set_ylabel("share of the area's air [%]")
    ax.set_ylim(bottom=0.0)
    ax.set_title(
        f"{a.id}: {a.release.vessel} released, {a.air_changes_per_s * 3600:.3g} air changes/h",
        fontsize=10,
        parse_math=False,
    )
    ax.grid(True, lw=0.4, alpha=0.6)
    _legend_outside(ax, 7)
    fig.tight_layout()
    return fig
