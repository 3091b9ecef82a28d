"""The checked range: every temperature a vessel is known to pass through.

It runs from the lowest of the minimum storage, fill and reference (settling) temperatures to the
highest of the maximum storage and fill temperatures and, with a fill process
(``[vessel.filling]``), the gas temperature at the end of the fill; a blend made in the vessel
(``[vessel.blend]``) adds its blend temperature at both ends. A fill made hotter than the
storage range is checked at its own state; a settled pressure read at the reference temperature
is a state of the vessel too, and so is the full charge at the blend temperature, where its last
step stops. Every limit is checked over the whole range, and the plan keeps
every limit over it.
"""

from __future__ import annotations

from collections.abc import Sequence
from typing import TYPE_CHECKING

import numpy as np

if TYPE_CHECKING:
    from fillcheck.scenario.resolve import VesselInput


def checked_range(v: VesselInput, T_ref: float) -> tuple[float, float]:
    """The lowest and highest temperature of the vessel's checked range [K]."""
    lows = [T_ref, v.max_temperature_K]
    highs = [v.max_temperature_K]
    if v.min_temperature_K is not None:
        lows.append(v.min_temperature_K)
    if v.fill_temperature_K is not None:
        lows.append(v.fill_temperature_K)
        highs.append(v.fill_temperature_K)
    blend = getattr(v, "blend", None)
    if blend is not None:
        lows.append(blend.temperature_K)
        highs.append(blend.temperature_K)
    if v.filling is not None:
        from fillcheck.assess.fill_process import hot_end_temperature_K  # it imports batch

        T_hot = hot_end_temperature_K(v, T_ref)
        if T_hot is not None:
            highs.append(T_hot)
    lo, hi = min(lows), max(highs)
    return lo, hi


def checked_ranges(vs: Sequence[VesselInput], T_ref: float) -> tuple[np.ndarray, np.ndarray]:
    """Per vessel, the lowest and highest temperature of the checked range [K]."""
    pairs = np.array([checked_range(v, T_ref) for v in vs], dtype=float).reshape(-1, 2)
    return pairs[:, 0], pairs[:, 1]
