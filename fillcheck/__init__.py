"""fillcheck: real-gas checks of compressed-gas cylinder and pressure-vessel fills.

>>> import fillcheck
>>> f = fillcheck.fluid("CO2")
>>> f.name, f.model
('carbon dioxide', 'reference')
"""

from __future__ import annotations

__version__ = "0.1.0"

from typing import Any

from fillcheck.fluids.catalog import available_fluids
from fillcheck.thermo.fluid import Fluid, State, fluid

_MIXTURE_NAMES = ("MixtureFluid", "MixtureState", "mixture")


def __getattr__(name: str) -> Any:
    """The mixture engine is imported on first use (a pure-gas check never loads it)."""
    if name in _MIXTURE_NAMES:
        from fillcheck.thermo import mixture_fluid

        return getattr(mixture_fluid, name)
    raise AttributeError(f"module 'fillcheck' has no attribute {name!r}")


def check_records(records, **options):  # type: ignore[no-untyped-def]
    """Check vessels given as mappings of register columns (see :mod:`fillcheck.records`);
    yields one result mapping a vessel, with the keys of the JSON vessel object."""
    from fillcheck.records import check_records as run

    return run(records, **options)


__all__ = [
    "Fluid",
    "MixtureFluid",
    "MixtureState",
    "State",
    "__version__",
    "available_fluids",
    "check_records",
    "fluid",
    "mixture",
]
