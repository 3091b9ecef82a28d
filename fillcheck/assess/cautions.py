"""Which cautions a vessel's report carries, and why: each one a code with the facts behind it.

A caution is attached for a stated reason (a hazard class of the gas or mixture, a component at
a stated fraction, a state the vessel reaches); :mod:`fillcheck.report.caution_text` writes its
words. The classes of a pure gas are its catalog classes (GHS, common practice); those of a
mixture come from its composition by the published methods
(:mod:`fillcheck.fluids.classification`). None of them replaces the supplier's safety data sheet.
"""

from __future__ import annotations

from collections.abc import Sequence
from dataclasses import dataclass, field
from typing import Any

from fillcheck.fluids.catalog import lookup
from fillcheck.fluids.classification import CI, OXIDIZING_THRESHOLD, OXYGEN_DEFICIENT, TRACE

HEAVY_RATIO = 1.05
"""A gas at least this many times air's molar mass is said to collect low (a fillcheck choice:
gases within 5 % of air, such as nitrogen or ethane, mix rather than settle) [-]."""

CO2_EXPOSURE = (0.005, 0.015)
"""Carbon dioxide's workplace exposure limits as mole fractions: 8-hour and 15-minute (UK HSE
EH40/2005, Workplace exposure limits; from memory) [-]."""

OXYGEN_SERVICE_GASES = frozenset({"oxygen", "nitrous oxide"})
"""Oxidizers filled as compressed gases whose fast compression can ignite the materials in their
path (common practice of oxygen service, no source)."""


@dataclass(frozen=True)
class Caution:
    """One caution: a stable code and the facts it was attached for (SI, fractions [-])."""

    code: str
    facts: dict[str, Any] = field(default_factory=dict)


@dataclass(frozen=True)
class GasFacts:
    """What the caution rules read of a gas: its name, hazard classes, molar mass [kg/mol] and,
    for a mixture, its component names, mole fractions [-], component classes, oxygen
    equivalent [-] and flammability index (ISO 10156) or matched blend (ISO 817)."""

    name: str
    hazards: frozenset[str]
    molar_mass: float
    components: tuple[str, ...] = ()
    fractions: tuple[float, ...] = ()
    component_hazards: tuple[frozenset[str], ...] = ()
    oxidizing_power: float = 0.0
    flammability_index: float = 0.0
    blend: str = ""

    @property
    def is_mixture(self) -> bool:
        return bool(self.components)

    def fraction(self, name: str) -> float:
        """Mole fraction of a component [-] (1 for the pure gas itself, else 0)."""
        if not self.is_mixture:
            return 1.0 if name == self.name else 0.0
        return dict(zip(self.components, self.fractions, strict=True)).get(name, 0.0)

    def holding(self, hazard: str) -> list[tuple[str, float]]:
        """The components classified with ``hazard``, with their mole fractions."""
        return [
            (n, x)
            for n, x, h in zip(self.components, self.fractions, self.component_hazards, strict=True)
            if hazard in h and x >= TRACE
        ]


def gas_facts(fluid: object) -> GasFacts:
    """The facts of a Fluid or MixtureFluid that the caution rules read."""
    data = fluid.data  # type: ignore[attr-defined]
    if not getattr(fluid, "is_mixture", False):
        hz = frozenset(data.hazards)
        power = CI.get(data.name, 1.0) if "oxidizing" in hz else 0.0
        return GasFacts(data.name, hz, float(data.molar_mass_kg_mol), oxidizing_power=power)
    c = data.classification
    return GasFacts(
        name=data.name,
        hazards=frozenset(data.hazards),
        molar_mass=float(fluid.molar_mass),  # type: ignore[attr-defined]
        components=tuple(fluid.component_names),  # type: ignore[attr-defined]
        fractions=tuple(map(float, fluid.z)),  # type: ignore[attr-defined]
        component_hazards=tuple(frozenset(x.hazards) for x in data.components),
        oxidizing_power=c.oxidizing_power if c is not None else 0.0,
        flammability_index=c.flammability_index if c is not None else 0.0,
        blend=c.blend if c is not None else "",
    )


def _listing(parts: Sequence[tuple[str, float]]) -> dict[str, float]:
    """Components and their mole fractions [-], as data (report.caution_text words them)."""
    return {n: float(x) for n, x in parts}


def _hazard_cautions(g: GasFacts) -> list[Caution]:
    out: list[Caution] = []
    hz = g.hazards
    if "oxidizing" in hz:
        service = [n for n in OXYGEN_SERVICE_GASES if g.fraction(n) >= TRACE]
        basis = {"oxidizing_power": g.oxidizing_power, "threshold": OXIDIZING_THRESHOLD}
        if service:
            out.append(Caution("oxygen-service", {"gases": tuple(sorted(service)), **basis}))
        else:
            out.append(Caution("oxidizer", basis))
    if "flammable" in hz:
        facts: dict[str, Any] = {}
        if g.is_mixture:
            facts = {"components": _listing(g.holding("flammable")), "blend": g.blend}
            facts["index"] = g.flammability_index
        out.append(Caution("flammable", facts))
    for h in ("toxic", "corrosive"):
        if h in hz:
            out.append(Caution(h, {"components": _listing(g.holding(h))} if g.is_mixture else {}))
    co2 = g.fraction("carbon dioxide")
    if co2 >= CO2_EXPOSURE[0]:
        out.append(
            Caution(
                "carbon-dioxide",
                {"fraction": co2, "long_term": CO2_EXPOSURE[0], "short_term": CO2_EXPOSURE[1]},
            )
        )
    if "asphyxiant" in hz:
        out.append(
            Caution("asphyxiant", {"oxygen": g.fraction("oxygen"), "limit": OXYGEN_DEFICIENT})
        )
    if g.is_mixture and g.holding("flammable") and g.oxidizing_power >= TRACE:
        oxidizers = [(n, x) for n, x in zip(g.components, g.fractions, strict=True) if n in CI]
        out.append(
            Caution(
                "flammable-with-oxidizer",
                {"flammable": _listing(g.holding("flammable")), "oxidizers": _listing(oxidizers)},
            )
        )
    hazardous = (
        bool(hz & {"asphyxiant", "toxic", "flammable", "corrosive"}) or co2 >= CO2_EXPOSURE[0]
    )
    air = lookup("air").molar_mass_kg_mol  # the catalog's dry air (its source beside it)
    if hazardous and g.molar_mass >= HEAVY_RATIO * air:
        out.append(Caution("heavier-than-air", {"molar_mass": g.molar_mass, "air": air}))
    return out


def cautions_for(
    gas: GasFacts,
    *,
    liquid: bool,
    near_critical: bool,
    cold_dropout: bool = False,
    fire: bool = False,
) -> list[Caution]:
    """The cautions for this gas in this vessel, each with the facts it was attached for.

    ``liquid``: the vessel holds liquid in its checked range (a liquefied gas, filled by
    weight); ``near_critical``: a state of the range is near the critical point;
    ``cold_dropout``: a mixture filled as a gas condenses in the cold; ``fire``: the range
    reaches fire temperatures (fillcheck.thermo.limits)."""
    out = _hazard_cautions(gas)
    if liquid:
        out.append(Caution("liquefied"))
    if cold_dropout:
        out.append(Caution("cold-dropout"))
    if near_critical:
        out.append(Caution("near-critical"))
    if fire:
        out.append(Caution("fire"))
    return out
