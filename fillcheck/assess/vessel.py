"""One vessel: the single check is a batch of one (see :mod:`fillcheck.assess.batch`)."""

from __future__ import annotations

from fillcheck.assess.batch import assess_many, fill_densities
from fillcheck.assess.result import VesselAssessment
from fillcheck.scenario.resolve import VesselInput


def fill_density_mol(v: VesselInput, T_ref: float) -> float:
    """The vessel's overall molar density from its fill specification [mol/m³]."""
    return float(fill_densities([v], T_ref)[0])


def assess_vessel(v: VesselInput, T_ref: float) -> VesselAssessment:
    """Assess one vessel against its limits over its storage range."""
    return assess_many([v], T_ref)[0]
