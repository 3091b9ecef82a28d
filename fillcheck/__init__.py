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

__all__ = [
    "Fluid",
    "MixtureFluid",
    "MixtureState",
    "State",
    "__version__",
    "available_fluids",
    "fluid",
    "mixture",
]
