"""What only a mixture adds to the findings: liquid dropout, interaction parameters, notes.

A mixture cooled into its two-phase region drops a liquid richer in its heavier components, so
the gas drawn off from the top of the vessel is leaner in them than the label says, and richer
again as the liquid evaporates. The finding names the component that condenses (the one whose
share of the liquid over its share of the vapour, K = y/x, is the smallest) and gives the
compositions of both phases at the coldest two-phase state of the storage range. A liquefied
mixture (liquid already at the reference temperature, an LPG blend say) is two-phase by
design; there the finding says what the vapour drawn off is and how it drifts.
"""

from __future__ import annotations

from dataclasses import dataclass
from typing import TYPE_CHECKING

import numpy as np

from fillcheck.assess.result import Finding

if TYPE_CHECKING:
    from fillcheck.thermo.mixture_fluid import MixtureFluid
    from fillcheck.thermo.mixture_vessel import MixtureVesselPath


@dataclass(frozen=True)
class Dropout:
    """The two phases at the coldest two-phase state of a vessel's range.

    temperature_K [K]; liquid_x, vapour_y: mole fractions by component name [-];
    liquid_volume_fraction: the share of the vessel the liquid takes [-];
    condensing: the component that favours the liquid most (the smallest K = y/x).
    """

    temperature_K: float
    liquid_x: dict[str, float]
    vapour_y: dict[str, float]
    liquid_volume_fraction: float
    condensing: str


def dropout_at_coldest(f: MixtureFluid, path: MixtureVesselPath, rows: slice) -> Dropout | None:
    """The dropout of one vessel, from the rows of a batched path (None if never two-phase)."""
    phase = path.phase[rows]
    two = np.flatnonzero(phase == "two-phase")
    if two.size == 0:
        return None
    i = np.arange(path.T.size)[rows][two[np.argmin(path.T[rows][two])]]
    x, y = path.liquid_x[i], path.vapour_y[i]
    rho, rl, rv = path.rho_mol[i], path.rho_liquid[i], path.rho_vapor[i]
    names = f.component_names
    return Dropout(
        temperature_K=float(path.T[i]),
        liquid_x=dict(zip(names, map(float, x), strict=True)),
        vapour_y=dict(zip(names, map(float, y), strict=True)),
        liquid_volume_fraction=float((rho - rv) / (rl - rv)),
        condensing=names[int(np.argmin(y / x))],  # the smallest K = y/x: the heaviest
    )


def mixture_findings(
    f: MixtureFluid,
    dropout: Dropout | None,
    notes: tuple[str, ...],
    liquefied: bool | None = None,
) -> list[Finding]:
    """The findings a mixture adds to those of every vessel, as data (report.finding_words)."""
    out: list[Finding] = []
    if f.model != "reference" and f.kij_missing:
        out.append(
            Finding(
                "interaction-unknown",
                "review",
                "",
                {"pairs": tuple(f.kij_missing), "model": f.model},
            )
        )
    if dropout is not None:
        data = {
            "temperature_K": dropout.temperature_K,
            "liquid_x": dict(dropout.liquid_x),
            "vapour_y": dict(dropout.vapour_y),
            "liquid_volume_fraction": dropout.liquid_volume_fraction,
            "condensing": dropout.condensing,
            "liquefied": bool(liquefied),
        }
        out.append(Finding("liquid-dropout", "warning", "", data))
    out.extend(Finding("composition-note", "info", n) for n in notes)
    return out
