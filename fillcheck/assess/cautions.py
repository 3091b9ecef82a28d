"""Gas-specific cautions printed with every vessel, from the catalog's hazard classes.

The wording is fillcheck's own; the facts are common practice of the gas trade (no single
published source), and they never replace the gas supplier's safety data sheet.
"""

from __future__ import annotations

_BY_HAZARD = {
    "oxidizing": (
        "Oxidizer: use oxygen-clean valves, regulators and hoses free of oil and grease; open "
        "valves slowly and fill slowly: fast compression heats the gas and can ignite "
        "materials in its path."
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
    "asphyxiant": (
        "Asphyxiant: a leak displaces oxygen without warning; store and fill where the air "
        "is ventilated or monitored for oxygen."
    ),
}

LIQUEFIED = (
    "Liquefied in this vessel: fill by weight on a calibrated scale, never by pressure; the "
    "pressure shows only the vapour pressure and says nothing about how full the vessel is."
)
NEAR_CRITICAL = (
    "Near its critical temperature: the pressure of this gas changes steeply with temperature "
    "and charge; leave a wide margin."
)


COLD_DROPOUT = (
    "Liquid can condense from this mixture when it is cold: while it is present the gas drawn "
    "off is not the composition on the label. Keep the cylinder above the temperature the "
    "report gives, or warm it and let it re-mix (rolling helps) before use."
)


FIRE = (
    "Fire temperatures: fillcheck computes the pressure of the gas this hot, not the strength of "
    "the vessel, which steels and composites lose long before such temperatures; a cylinder "
    "exposed to fire is cooled from a safe distance and taken out of service until inspected."
)


def cautions_for(
    hazards: tuple[str, ...],
    *,
    liquid: bool,
    near_critical: bool,
    cold_dropout: bool = False,
    fire: bool = False,
) -> list[str]:
    """The cautions for a gas with these hazard classes in this vessel."""
    out = [
        _BY_HAZARD[h]
        for h in ("oxidizing", "flammable", "toxic", "corrosive", "asphyxiant")
        if h in hazards
    ]
    if liquid:
        out.append(LIQUEFIED)
    if cold_dropout:
        out.append(COLD_DROPOUT)
    if near_critical:
        out.append(NEAR_CRITICAL)
    if fire:
        out.append(FIRE)
    return out
