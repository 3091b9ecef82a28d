"""Hazard classes of a gas mixture from its composition: flammable, oxidizing, asphyxiant.

A mixture is not the sum of its components: nitrogen with 5 % hydrogen does not burn in air,
synthetic air is neither an oxidizer nor an asphyxiant. The classes here follow the published
calculation methods for gas mixtures:

- **Flammability** by the method of ISO 10156 (Gas cylinders — Gases and gas mixtures —
  Determination of fire potential and oxidizing ability for the selection of cylinder valve
  outlets): the inert components are turned into a nitrogen equivalent with their coefficients
  Kₖ, and the mixture is flammable in air if Σᵢ Aᵢ / (Σᵢ Aᵢ + Σₖ Kₖ Bₖ) · 100 / Tciᵢ > 1, where
  Aᵢ are the mole fractions of the flammable components, Bₖ those of the inert ones, and Tciᵢ the
  largest content [%] of flammable gas i which, mixed with nitrogen, is not flammable in air.
- **Oxidizing ability** by the same standard: Σᵢ xᵢ Cᵢ with the oxygen-equivalent coefficients
  Cᵢ; the mixture is more oxidizing than air above 23.5 %.
- **Refrigerant blends** that carry an ISO 817 number are classified by the standard's published
  safety class (A1 not flammable; A2L, A2, A3 flammable) when the composition is the blend's
  within its tolerance: the blend was tested in its worst fractionated formulation, which no
  calculation from the components reproduces.

Coefficients from ISO 10156:2017, Tables 1 and 2, and classes from ISO 817:2014, Table (safety
group of each refrigerant), all from memory; the flammable-limit fallback uses lower flammable
limits in air from IEC 60079-20-1:2010 (from memory). A gas the tables do not list is treated
so that the mixture comes out the more hazardous: a flammable component without Tci takes its
lower flammable limit in air (always smaller than Tci), an inert one without Kₖ takes the
smallest Kₖ of the table.
"""

from __future__ import annotations

import math
from collections.abc import Mapping, Sequence
from dataclasses import dataclass

import numpy as np

ISO_10156 = "ISO 10156:2017, Gas cylinders — Determination of fire potential and oxidizing ability"
ISO_817 = "ISO 817:2014, Refrigerants — Designation and safety classification"

TCI: Mapping[str, float] = {
    "hydrogen": 0.055,
    "carbon monoxide": 0.20,
    "methane": 0.143,
    "ethane": 0.076,
    "ethylene": 0.060,
    "propane": 0.060,
    "n-butane": 0.057,
}
"""Tci [-]: the largest mole fraction of a flammable gas that, mixed with nitrogen, is not
flammable in air (ISO 10156:2017, Table 2; from memory)."""

LFL: Mapping[str, float] = {
    "hydrogen": 0.040,
    "carbon monoxide": 0.109,
    "methane": 0.044,
    "ethane": 0.024,
    "ethylene": 0.023,
    "propane": 0.017,
    "propylene": 0.020,
    "n-butane": 0.014,
    "isobutane": 0.013,
    "ammonia": 0.150,
    "hydrogen sulfide": 0.040,
    "dimethyl ether": 0.027,
    "R32": 0.144,
    "R152a": 0.039,
    "R1234yf": 0.062,
}
"""Lower flammable limit in air [mole fraction] at ambient conditions (IEC 60079-20-1:2010,
Table B.1; R32, R152a and R1234yf from ISO 817:2014; all from memory)."""

KK: Mapping[str, float] = {
    "nitrogen": 1.0,
    "carbon dioxide": 1.5,
    "helium": 0.9,
    "argon": 0.55,
    "neon": 0.7,
    "krypton": 0.5,
    "xenon": 0.5,
    "sulfur dioxide": 1.5,
    "sulfur hexafluoride": 4.0,
    "tetrafluoromethane": 2.0,
}
"""Kₖ [-]: the nitrogen equivalent of one mole of an inert gas (ISO 10156:2017, Table 1; from
memory)."""

KK_UNLISTED = min(KK.values())
"""Kₖ taken for an inert gas the table does not list: the smallest listed, so the mixture comes
out more flammable, never less (fillcheck's choice) [-]."""

CI: Mapping[str, float] = {
    "oxygen": 1.0,
    "nitrous oxide": 0.6,
    "nitrogen trifluoride": 1.6,
    "chlorine": 0.7,
}
"""Cᵢ [-]: the oxygen equivalent of one mole of an oxidizing gas (ISO 10156:2017, Table 3; from
memory)."""

OXIDIZING_THRESHOLD = 0.235
"""Oxygen equivalent above which a mixture is more oxidizing than air (ISO 10156:2017) [-]."""

OXYGEN_DEFICIENT = 0.195
"""Oxygen mole fraction below which an atmosphere is oxygen-deficient (US OSHA, 29 CFR
1910.134(b); from memory): a mixture with less oxygen than this asphyxiates [-]."""

AIR_OXYGEN = 0.2095
"""Oxygen mole fraction of dry air (US Standard Atmosphere 1976: 20.946 %; from memory) [-]."""

TRACE = 1e-3
"""Mole fraction at or above which a toxic or corrosive component makes the mixture's caution
(the lower of the GHS cut-off values, 0.1 %; from memory) [-]."""


@dataclass(frozen=True)
class Blend:
    """A numbered refrigerant blend: mass fractions [-], tolerance [-], ISO 817 safety class."""

    number: str
    mass_fractions: Mapping[str, float]
    tolerance: float
    safety_class: str


BLENDS = (
    Blend("R410A", {"R32": 0.50, "R125": 0.50}, 0.015, "A1"),
    Blend("R407C", {"R32": 0.23, "R125": 0.25, "R134a": 0.52}, 0.02, "A1"),
    Blend("R513A", {"R1234yf": 0.56, "R134a": 0.44}, 0.02, "A1"),
    Blend("R454B", {"R32": 0.689, "R1234yf": 0.311}, 0.01, "A2L"),
)
"""Refrigerant blends whose components fillcheck has, with the blend's nominal composition, a
tolerance taken on every mass fraction, and the safety class (ISO 817:2014; from memory)."""


@dataclass(frozen=True)
class MixtureClass:
    """What a mixture's composition makes of it.

    ``flammability_index`` is the ISO 10156 sum (flammable in air above 1; NaN where a blend's
    published class decides), ``oxidizing_power`` the oxygen equivalent Σ xᵢ Cᵢ [-],
    ``oxygen`` the oxygen mole fraction [-], ``blend`` the ISO 817 number that matched (or "")."""

    hazards: frozenset[str]
    flammability_index: float
    oxidizing_power: float
    oxygen: float
    blend: str = ""


def matching_blend(names: Sequence[str], mass_fractions: np.ndarray) -> Blend | None:
    """The numbered blend whose composition this is, within the blend's tolerance, or None."""
    w = dict(zip(names, map(float, mass_fractions), strict=True))
    for b in BLENDS:
        if set(w) == set(b.mass_fractions) and all(
            abs(w[n] - x) <= b.tolerance for n, x in b.mass_fractions.items()
        ):
            return b
    return None


def flammability_index(
    names: Sequence[str], z: np.ndarray, flammable: Sequence[bool], inert: Sequence[bool]
) -> float:
    """ISO 10156's sum for a mixture of flammable and inert gases at mole fractions ``z`` [-]:
    the mixture is flammable in air above 1 (0 when it holds no flammable gas)."""
    A = sum(float(x) for x, f in zip(z, flammable, strict=True) if f)
    if A == 0.0:
        return 0.0
    B = sum(KK.get(n, KK_UNLISTED) * float(x) for n, x, i in zip(names, z, inert, strict=True) if i)
    total = 0.0
    for n, x, f in zip(names, z, flammable, strict=True):
        if not f:
            continue
        limit = TCI.get(n) or LFL.get(n)
        if not limit:  # no published figure: counted flammable at any share (conservative)
            return math.inf
        total += float(x) / (A + B) / limit
    return total


def classify(
    names: Sequence[str],
    z: np.ndarray,
    molar_masses: np.ndarray,
    component_hazards: Sequence[frozenset[str]],
) -> MixtureClass:
    """The hazard classes of a mixture of catalog gases at mole fractions ``z`` [-].

    Flammable and oxidizing by ISO 10156 (or ISO 817 for a numbered refrigerant blend);
    asphyxiant when the oxygen is below OXYGEN_DEFICIENT and the mixture is not an oxidizer;
    toxic or corrosive when a component so classified is present at TRACE or more.
    """
    z = np.asarray(z, dtype=float)
    flam = ["flammable" in h for h in component_hazards]
    oxid = [n in CI or "oxidizing" in h for n, h in zip(names, component_hazards, strict=True)]
    inert = [not f and not o for f, o in zip(flam, oxid, strict=True)]
    oxygen = sum((float(x) for n, x in zip(names, z, strict=True) if n == "oxygen"), 0.0)
    power = sum(
        (CI.get(n, 1.0) * float(x) for n, x, o in zip(names, z, oxid, strict=True) if o), 0.0
    )
    w = z * molar_masses / float(z @ molar_masses)
    blend = matching_blend(names, w)
    if blend is not None:
        index = float("nan")
        flammable = blend.safety_class != "A1"
    else:
        index = flammability_index(names, z, flam, inert)
        flammable = index > 1.0
    out: set[str] = set()
    if flammable:
        out.add("flammable")
    if power > OXIDIZING_THRESHOLD:
        out.add("oxidizing")
    elif oxygen < OXYGEN_DEFICIENT:
        out.add("asphyxiant")
    for h in ("toxic", "corrosive"):
        if any(h in hz and x >= TRACE for hz, x in zip(component_hazards, z, strict=True)):
            out.add(h)
    return MixtureClass(frozenset(out), index, power, oxygen, blend.number if blend else "")
