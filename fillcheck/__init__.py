"""fillcheck: real-gas checks of compressed-gas cylinder and pressure-vessel fills.

>>> import fillcheck
>>> f = fillcheck.fluid("CO2")
>>> f.name, f.model
('carbon dioxide', 'reference')
"""

from __future__ import annotations

__version__ = "0.1.0"

from fillcheck.fluids.catalog import available_fluids
from fillcheck.thermo.fluid import Fluid, State, fluid
from fillcheck.thermo.mixture_fluid import MixtureFluid, MixtureState, mixture


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
