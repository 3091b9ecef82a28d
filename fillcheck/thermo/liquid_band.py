"""The band near the vapour pressure where a pressure does not tell a charge.

A pressure read at a gas temperature fixes the charge only where the gas is surely one vapour-like
phase. With a thermometer that may be off by ±dT and a gauge off by ±g of its reading, a pure gas
may hold liquid once the reading comes within the gauge's error of the vapour pressure at the
coldest temperature the gas may really have, P ≥ (1 − g)·P_sat(T − dT); above it, the vessel may
be full of liquid, whose pressure changes by bar per kelvin. For a mixture the band starts at the
lower of the dew pressure at T − dT and the bubble pressure at T + dT, less the gauge error;
above the band lies the compressed liquid, which is refused for the same reason.

One rule for every command: a fill by pressure or by settled pressure (`check`), a gauge reading
(`reading`) and a stop pressure (`stop-table`, the plan's stop pressure) all use this band.
"""

from __future__ import annotations

from typing import Any

import numpy as np

GAUGE_UNCERTAINTY = 0.05
"""Relative error of a fill gauge's reading assumed where none is given [-] (common practice, no
source: a class 1.6 gauge on a 400 bar scale is ±6.4 bar, about 3 % at 200 bar)."""
THERMOMETER_UNCERTAINTY_K = 2.0
"""How far a gas temperature may be off (thermometer, gradients in the vessel) [K] (common
practice, no source)."""


def liquid_band_floor(
    fluid: Any,
    T: np.ndarray,
    gauge: float = GAUGE_UNCERTAINTY,
    dT: float = THERMOMETER_UNCERTAINTY_K,
) -> tuple[np.ndarray, np.ndarray]:
    """The band [Pa abs] at gas temperatures T [K] where the vessel may hold liquid.

    Returns ``(lo, hi)``: at or above ``lo`` a reading may hold liquid; ``hi`` is the top of the
    two-phase band (+inf for a pure gas, whose compressed liquid lies above it). Where no liquid
    can form within ``dT`` (a pure gas above Tc + dT, a mixture with no band), lo = +inf."""
    T = np.atleast_1d(np.asarray(T, dtype=float))
    lo = np.full(T.shape, np.inf)
    hi = np.full(T.shape, np.inf)
    if getattr(fluid, "is_mixture", False):
        from fillcheck.thermo.mixture_vessel import band_ends

        for i, Ti in enumerate(T):
            dew, bubble, _ = band_ends(fluid, np.array([Ti - dT, Ti + dT]))
            d, b = float(dew.P[0]), float(bubble.P[1])
            if np.isfinite(d):
                lo[i] = (1.0 - gauge) * d
            if np.isfinite(b):
                hi[i] = (1.0 + gauge) * b
                lo[i] = min(lo[i], (1.0 - gauge) * b)
        return lo, hi
    Tc = fluid.model_critical[0]
    cold = np.maximum(T - dT, fluid.T_min_saturation)
    near = cold < Tc
    if np.any(near):
        lo[near] = (1.0 - gauge) * fluid.saturation_molar(cold[near]).P
    return lo, hi


def in_liquid_band(
    fluid: Any,
    T: np.ndarray,
    P: np.ndarray,
    gauge: float = GAUGE_UNCERTAINTY,
    dT: float = THERMOMETER_UNCERTAINTY_K,
) -> np.ndarray:
    """True where a pressure P [Pa abs] read at T [K] may belong to a vessel holding liquid."""
    lo, _ = liquid_band_floor(fluid, T, gauge, dT)
    return np.asarray(P, dtype=float) >= lo
