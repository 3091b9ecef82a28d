"""The gases fillcheck knows: identities, constants, hazards and their sources."""

from fillcheck.fluids.catalog import (
    HAZARDS,
    SOURCE_KEYS,
    CatalogDataError,
    FluidData,
    IdealGasCp,
    all_fluids,
    available_fluids,
    lookup,
    user_fluid,
)

__all__ = [
    "HAZARDS",
    "SOURCE_KEYS",
    "CatalogDataError",
    "FluidData",
    "IdealGasCp",
    "all_fluids",
    "available_fluids",
    "lookup",
    "user_fluid",
]
