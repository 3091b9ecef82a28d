"""How hot fillcheck computes a vessel: up to each model's published range.

Below FIRE_TEMPERATURE_K every model may be evaluated (outside its measured range the check says
"review"); above it, up to the upper temperature of the model's published validity range, where
an equation of state fitted to data that hot exists (nitrogen's to 2000 K). A vessel that hot is
in a fire: its pressure is computed, its strength is not (SAFETY.md).
"""

from __future__ import annotations

from typing import Any

FIRE_TEMPERATURE_K = 500.0
"""Temperatures above this (227 °C) are fire exposure: computed where the model's published range
reaches them, with a caution that the vessel's strength is not checked [K] (common practice,
no source: steels of gas cylinders lose strength well below 500 °C)."""


def highest_temperature_K(fluid: Any) -> float:
    """The highest temperature fillcheck computes for this fluid and model [K]."""
    return max(FIRE_TEMPERATURE_K, float(fluid.validity.T_max_K))
