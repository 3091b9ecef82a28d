"""The words of the cautions: what each one says, and the reason it was attached.

The cautions and their facts come from :mod:`fillcheck.assess.cautions`; the sentences are
fillcheck's own. They never replace the gas supplier's safety data sheet.
"""

from __future__ import annotations

import math
from collections.abc import Callable, Mapping

from fillcheck.assess.cautions import Caution

TEXT = {
    "blend-oxidizer-compression": (
        "Blending with an oxidizer: every valve, regulator, hose and the cylinder itself must be "
        "cleaned for oxygen service; open the valves slowly, because gas rushing into a dead end "
        "is compressed almost adiabatically and can heat a seat or a speck of grease to ignition."
    ),
    "blend-flammable-into-oxidizer": (
        "A flammable gas goes into a vessel already holding an oxidizer: the mixture passes "
        "through compositions that can burn; check the final and every intermediate mixture "
        "against its flammability limits before blending, and consider adding the flammable gas "
        "first."
    ),
    "blend-supply-below-stop": (
        "A gas that is liquefied at the blend temperature is added above its own vapour "
        "pressure: a supply cylinder of it at that temperature cannot push it in once the "
        "vessel stands above that pressure. Use a booster or a liquid pump rated for the gas, "
        "or add it earlier in the order, while the vessel's pressure is still below its "
        "vapour pressure."
    ),
    "oxygen-service": (
        "Oxygen service: use valves, regulators and hoses cleaned for oxygen and free of oil and "
        "grease; open valves slowly and fill slowly: fast compression heats the gas and can "
        "ignite materials in its path."
    ),
    "oxidizer": (
        "Oxidizer: it makes other materials burn fiercely; keep oil, grease and combustible "
        "materials away, and use only materials rated for this gas."
    ),
    "flammable": (
        "Flammable: keep ignition sources away, fill and store with ventilation, bond and "
        "earth the equipment, and check the connections for leaks."
    ),
    "toxic": (
        "Toxic: handle only with gas detection, ventilation and the protective and escape "
        "equipment the safety data sheet requires; never vent to an occupied space."
    ),
    "corrosive": (
        "Corrosive: use only materials rated for this gas, keep moisture out of the system, "
        "and inspect valves and vessels for corrosion before every fill."
    ),
    "carbon-dioxide": (
        "Carbon dioxide is toxic at a few per cent, long before the oxygen falls far enough to "
        "warn anyone: fit carbon dioxide detectors where it is filled and stored; an oxygen "
        "monitor alone does not warn in time."
    ),
    "asphyxiant": (
        "Asphyxiant: a leak displaces oxygen without warning; store and fill where the air "
        "is ventilated or monitored for oxygen."
    ),
    "flammable-with-oxidizer": (
        "A flammable gas and an oxidizer in one cylinder can form an explosive mixture, which "
        "fillcheck does not assess: follow the supplier's preparation procedure and the "
        "mixture's safety data sheet."
    ),
    "heavier-than-air": (
        "Heavier than air: a release collects low, in cellars, pits, drains and vehicle "
        "footwells, and stays there; ventilate at floor level and do not store below ground."
    ),
    "liquefied": (
        "Liquefied in this vessel: fill by weight on a calibrated scale, never by pressure; the "
        "pressure shows only the vapour pressure and says nothing about how full the vessel is."
    ),
    "cold-dropout": (
        "Liquid can condense from this mixture when it is cold: while it is present the gas "
        "drawn off is not the composition on the label. Keep the cylinder above the temperature "
        "the report gives, or warm it and let it re-mix (rolling helps) before use."
    ),
    "near-critical": (
        "Near its critical temperature: the pressure of this gas changes steeply with "
        "temperature and charge; leave a wide margin."
    ),
    "fire": (
        "Fire temperatures: fillcheck computes the pressure of the gas this hot, not the "
        "strength of the vessel, which steels and composites lose long before such "
        "temperatures; a cylinder exposed to fire is cooled from behind cover, at a distance, "
        "and taken out of service until inspected."
    ),
}
"""What each caution says, by code."""

ISO_10156 = "ISO 10156:2017"
ISO_817 = "ISO 817:2014"
GHS = "its GHS classification"


def _pct(x: float | str) -> str:
    return f"{100.0 * float(x):.3g} %"


def _oxidizing(f: dict[str, float | str]) -> str:
    power, limit = float(f["oxidizing_power"]), float(f["threshold"])
    if power > limit:
        return (
            f"oxygen equivalent {_pct(power)}, above the {_pct(limit)} beyond which a gas is "
            f"more oxidizing than air ({ISO_10156})"
        )
    return f"an oxidizer by {GHS}"


def _classed(what: str) -> Callable[[dict[str, float | str]], str]:
    def reason(f: dict[str, float | str]) -> str:
        if f.get("components"):
            return f"it holds {_mole(f['components'])}, classified {what}"
        return f"{what} by {GHS}"

    return reason


def _mole(parts: Mapping[str, float]) -> str:
    """{'hydrogen': 0.05, 'argon': 0.95} (mole fractions) as 'hydrogen 5 %, argon 95 % (mol)'."""
    return ", ".join(f"{name} {_pct(x)}" for name, x in parts.items()) + " (mol)"


def _flammable(f: dict[str, float | str]) -> str:
    if f.get("blend"):
        return (
            f"the composition is refrigerant blend {f['blend']}, flammable by its {ISO_817} class"
        )
    if "index" in f and math.isfinite(float(f["index"])):
        return (
            f"it holds {_mole(f['components'])}; by {ISO_10156}'s method for gas mixtures "
            f"its flammability index is {float(f['index']):.2f}, above 1: flammable in air"
        )
    return f"flammable by {GHS}"


REASON: dict[str, Callable[[dict[str, float | str]], str]] = {
    "oxygen-service": _oxidizing,
    "oxidizer": _oxidizing,
    "flammable": _flammable,
    "toxic": _classed("toxic"),
    "corrosive": _classed("corrosive"),
    "carbon-dioxide": lambda f: (
        f"carbon dioxide is {_pct(f['fraction'])} of the gas (mol); workplace exposure limits "
        f"are {_pct(f['long_term'])} over 8 hours and {_pct(f['short_term'])} over 15 minutes "
        "(UK HSE, EH40/2005)"
    ),
    "asphyxiant": lambda f: (
        (
            "it holds no oxygen"
            if float(f["oxygen"]) == 0.0
            else f"oxygen is {_pct(f['oxygen'])} of the gas (mol)"
        )
        + f", below the {_pct(f['limit'])} that marks an oxygen-deficient atmosphere "
        "(US OSHA, 29 CFR 1910.134)"
    ),
    "flammable-with-oxidizer": lambda f: (
        f"it holds {_mole(f['flammable'])} with {_mole(f['oxidizers'])}"
    ),
    "heavier-than-air": lambda f: (
        f"molar mass {1000.0 * float(f['molar_mass']):.1f} g/mol against air's "
        f"{1000.0 * float(f['air']):.2f} g/mol"
    ),
    "liquefied": lambda f: "liquid is present in the vessel within the checked range",
    "cold-dropout": lambda f: (
        "the mixture is filled as a gas but condenses within the checked range"
    ),
    "near-critical": lambda f: "a state of the checked range lies near the critical point",
    "fire": lambda f: "the checked range reaches fire temperatures",
    "blend-oxidizer-compression": lambda f: (
        f"the blend adds {', '.join(f['components'])}, an oxidizer, through the valves"
    ),
    "blend-supply-below-stop": lambda f: (
        ("in the suggested order, " if f.get("suggested_order") else "")
        + f"step {f['step']} adds {f['component']} to a stop pressure above its vapour "
        "pressure at the blend temperature"
    ),
    "blend-flammable-into-oxidizer": lambda f: (
        f"step {f['step']} adds {f['component']} (flammable) after "
        f"{', '.join(f['oxidizers'])} (oxidizing)"
    ),
}
"""Why each caution was attached, from its facts."""


def caution_text(c: Caution) -> str:
    """What a caution says."""
    return TEXT[c.code]


def caution_reason(c: Caution) -> str:
    """Why the caution was attached, as a phrase naming the published basis where one applies."""
    return REASON[c.code](c.facts)
