"""Measured accuracy of the cubic models, and the fitted Péneloux volume shifts.

``data/cubic_accuracy.json`` is written by ``tools/measure_cubic_accuracy.py``, which compares
every cubic model of every catalog gas with the published reference equation of state of that
gas, as fillcheck itself evaluates it (tests/test_reference_equations.py proves that evaluation
against CoolProp 8.0.0). For each gas it holds:

- the Péneloux volume shift c [m³/mol] of the translated Peng–Robinson model, chosen to minimise
  the largest relative density error over the cylinder box (below);
- for each cubic model, the largest relative error over that box of the density at given (T, P),
  of the pressure at given (T, ρ) for gas and supercritical states, and of the saturation pressure.

The box (``validity``) is the model's validity range in fillcheck: outside it the error is not
known and a check says "review".
"""

from __future__ import annotations

import json
from dataclasses import dataclass
from functools import cache
from pathlib import Path

_DATA = Path(__file__).parent / "data" / "cubic_accuracy.json"


@dataclass(frozen=True)
class ModelError:
    """Largest relative errors of one model for one gas over the measured box [-]."""

    density: float
    pressure: float
    saturation_pressure: float | None
    table_density: float
    """Largest density error over −40…65 °C, 1…300 bar (700 bar for hydrogen) [-]."""
    pressure_dense: float
    """Largest error of the pressure at given (T, ρ) for states denser than critical, from
    10 MPa up (where a liquid-full vessel's limits lie) [-]."""
    saturated_liquid_density: float
    """Largest error of the saturated-liquid density at the box temperatures [-]."""


@dataclass(frozen=True)
class GasAccuracy:
    """Measured accuracy data of one catalog gas."""

    name: str
    volume_shift_m3_mol: float
    T_min_K: float
    T_max_K: float
    P_max_Pa: float
    errors: dict[str, ModelError]
    source: str


REFERENCE_DENSITY_UNCERTAINTY = 0.002
"""Density uncertainty fillcheck assumes for every reference equation of state [-].

The publications state 0.01–0.1 % in density for the wide-range reference equations (e.g. Span
et al. 2000 for nitrogen, Span & Wagner 1996 for carbon dioxide, Tegeler et al. 1999 for argon)
and about 0.1–0.5 % for the short industrial equations of Lemmon & Span (2006) at cylinder
conditions (figures from memory); fillcheck takes 0.2 % for all of them."""

REFERENCE_UNCERTAINTY = ModelError(
    density=REFERENCE_DENSITY_UNCERTAINTY,
    pressure=REFERENCE_DENSITY_UNCERTAINTY,
    saturation_pressure=REFERENCE_DENSITY_UNCERTAINTY,
    table_density=REFERENCE_DENSITY_UNCERTAINTY,
    pressure_dense=0.03,
    saturated_liquid_density=REFERENCE_DENSITY_UNCERTAINTY,
)
"""Nominal uncertainty of a reference equation of state as a ModelError [-]; the checks use
the state-dependent figure of assess.uncertainty (0.2 % in density, carried to the pressure by
the isotherm's stiffness)."""


@cache
def _load() -> dict[str, GasAccuracy]:
    if not _DATA.exists():
        return {}
    raw = json.loads(_DATA.read_text(encoding="utf-8"))
    source = raw["source"]
    out: dict[str, GasAccuracy] = {}
    for name, entry in raw["gases"].items():
        errors = {
            mid: ModelError(
                density=e["density"],
                pressure=e["pressure"],
                saturation_pressure=e.get("saturation_pressure"),
                table_density=e["table_density"],
                pressure_dense=e["pressure_dense"],
                saturated_liquid_density=e.get("saturated_liquid_density", 0.0),
            )
            for mid, e in entry["models"].items()
        }
        out[name] = GasAccuracy(
            name=name,
            volume_shift_m3_mol=float(entry["volume_shift_m3_mol"]),
            T_min_K=float(entry["box"]["T_min_K"]),
            T_max_K=float(entry["box"]["T_max_K"]),
            P_max_Pa=float(entry["box"]["P_max_Pa"]),
            errors=errors,
            source=f"{source}: {entry['reference']}",
        )
    return out


def accuracy_for(name: str) -> GasAccuracy | None:
    """The measured accuracy of a catalog gas's cubic models, or None if never measured."""
    return _load().get(name)
