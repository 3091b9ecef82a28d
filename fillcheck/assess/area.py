"""Storage areas (INTERFACES.md §8): the inventory by hazard class, and the worst single
release into the area, judged against the thresholds of its atmosphere.

For every vessel of the area, the whole charge of one vessel is released into the area and
mixed (assess.release states the model): the verdict takes the instantaneous release with pure
displacement, x = V_g/V_room, the upper bound; the gradual well-mixed release with outflow,
1 − exp(−V_g/V_room), is reported beside it. Each limit fails where any vessel's release breaks
it; the release reported as the area's is the one nearest to (or furthest past) a limit: the
largest x / x_limit. Ventilation then clears it as x₀·exp(−N t). Findings are data; report/
writes their words.
"""

from __future__ import annotations

import math
from collections.abc import Sequence
from dataclasses import dataclass, field
from typing import Any

import numpy as np

from fillcheck.assess import release as rel
from fillcheck.assess.cautions import CO2_EXPOSURE
from fillcheck.assess.result import Finding, Verdict, VesselAssessment, worst
from fillcheck.fluids.classification import LFL, OXYGEN_DEFICIENT
from fillcheck.scenario.area_input import AreaInput
from fillcheck.scenario.resolve import Scenario, VesselInput

HAZARD_CLASSES = ("asphyxiant", "oxidizing", "flammable", "toxic", "corrosive")
"""The hazard classes of the inventory, in the order reports list them (the catalog's words,
fluids.catalog.HAZARDS)."""

THRESHOLDS: dict[str, tuple[float, str]] = {
    # every figure and its definition recalled from memory: verify against the edition that
    # applies to you (reports print the publication only, as for every other source)
    "oxygen_minimum": (
        OXYGEN_DEFICIENT,
        "US OSHA 29 CFR 1910.134(b), definition of an oxygen-deficient atmosphere",
    ),
    "oxygen_maximum": (
        0.235,
        "US OSHA 29 CFR 1910.146(b), definition of an oxygen-enriched atmosphere",
    ),
    "carbon_dioxide_long_term": (
        CO2_EXPOSURE[0],
        "UK HSE EH40/2005, workplace exposure limit, 8-hour reference period",
    ),
    "carbon_dioxide_short_term": (
        CO2_EXPOSURE[1],
        "UK HSE EH40/2005, workplace exposure limit, 15-minute reference period",
    ),
    "lfl_share": (
        0.25,
        "common practice, no source (NFPA 69 keeps combustibles at or below 25 % of the LFL)",
    ),
}
"""Default thresholds of an area's atmosphere [mole fraction, or share of the LFL] and their
sources, all recalled from memory (the oxygen limits: US OSHA 29 CFR 1910.134 and 1910.146;
carbon dioxide: UK HSE EH40/2005, as assess.cautions; 25 % of the LFL: common practice, no
source, NFPA 69's figure recalled from memory); an area's ``thresholds`` table replaces any of
them ("entered")."""

CRITERIA = ("oxygen-deficient", "oxygen-enriched", "carbon-dioxide", "flammable")
"""The limits a release fails: oxygen below the minimum, oxygen equivalent above the maximum,
carbon dioxide above the short-term limit, flammable gas above the share of its LFL."""

CURVE_POINTS = 41
"""Points of the concentration–time curve after the reported release."""
CURVE_MIN_s = 3600.0
"""The curve covers at least an hour, and twice the time the release takes to clear."""
CURVE_MAX_s = 24 * 3600.0
"""... and at most a day."""


@dataclass(frozen=True)
class Limits:
    """The thresholds in force for one area [-] and where each comes from."""

    oxygen_minimum: float
    oxygen_maximum: float
    carbon_dioxide_long_term: float
    carbon_dioxide_short_term: float
    lfl_share: float
    sources: dict[str, str]

    def value(self, criterion: str) -> float:
        """The threshold a criterion (CRITERIA) is judged against [-]."""
        return {
            "oxygen-deficient": self.oxygen_minimum,
            "oxygen-enriched": self.oxygen_maximum,
            "carbon-dioxide": self.carbon_dioxide_short_term,
            "flammable": self.lfl_share,
        }[criterion]

    def source(self, criterion: str) -> str:
        return self.sources[
            {
                "oxygen-deficient": "oxygen_minimum",
                "oxygen-enriched": "oxygen_maximum",
                "carbon-dioxide": "carbon_dioxide_short_term",
                "flammable": "lfl_share",
            }[criterion]
        ]


def limits_for(area: AreaInput) -> Limits:
    """The area's thresholds: those it sets, the defaults (THRESHOLDS) for the rest."""
    values = {k: area.thresholds.get(k, v) for k, (v, _) in THRESHOLDS.items()}
    sources = {k: ("entered" if k in area.thresholds else s) for k, (_, s) in THRESHOLDS.items()}
    return Limits(**values, sources=sources)


@dataclass(frozen=True)
class InventoryLine:
    """One hazard class in an area: mass [kg], gas volume at the area's conditions [m³], number
    of vessels."""

    hazard: str
    mass_kg: float
    gas_volume_m3: float
    count: int


@dataclass(frozen=True)
class Release:
    """The whole charge of one vessel released into the area.

    gas_fraction: by the verdict's model (pure displacement); gas_fraction_mixed: gradual,
    well mixed with outflow. limit_fractions: per criterion, the largest gas fraction keeping
    it [-] (inf: never broken). ratio: gas_fraction over the smallest of them (1 or more: a
    limit is broken). clear_s: time for ventilation to bring the room back within every limit
    [s] (0: never out; None: never, no ventilation); oxygen_recovery_s: the same for the
    oxygen minimum alone."""

    vessel: str
    gas: str
    mass_kg: float
    moles: float
    volume: rel.ReleasedVolume
    gas_fraction: float
    gas_fraction_mixed: float
    air: rel.Atmosphere
    air_mixed: rel.Atmosphere
    mix: rel.GasMix
    limit_fractions: dict[str, float]
    ratio: float
    clear_s: float | None
    oxygen_recovery_s: float | None
    carbon_dioxide_long_term_s: float | None


@dataclass(frozen=True)
class Leak:
    """A continuous leak: vessel, mass flow [kg/s], gas volume flow [m³/s], steady gas
    fraction [-] and the room's air then, the limit it breaks first (or None) and when [s]."""

    vessel: str
    rate_kg_s: float
    volume_flow_m3_s: float
    steady_fraction: float
    air: rel.Atmosphere
    breaks: str | None
    reached_after_s: float | None


@dataclass
class AreaAssessment:
    """Everything the report shows about one storage area (SI)."""

    id: str
    volume_m3: float
    air_changes_per_s: float
    temperature_K: float
    atmospheric_pressure_Pa: float
    limits: Limits
    entered: dict[str, str]
    vessels: list[str]
    vessel_count: int
    total_mass_kg: float
    inventory: list[InventoryLine]
    releases: list[Release]
    release: Release | None
    """The reported release: the largest ratio to a limit (None for an empty area)."""
    curve_t_s: np.ndarray = field(default_factory=lambda: np.zeros(0))
    """Times after the reported release [s] (CURVE_POINTS of them)."""
    curve: list[rel.Atmosphere] = field(default_factory=list)
    """The area's air at those times, ventilated (x₀·exp(−N t))."""
    leak: Leak | None = None
    findings: list[Finding] = field(default_factory=list)

    @property
    def verdict(self) -> Verdict:
        """fail if any finding fails; review if any asks for review; pass otherwise."""
        return worst({f.severity for f in self.findings})


def _composition(fluid: Any) -> tuple[dict[str, float], dict[str, frozenset[str]]]:
    """Mole fractions and hazard classes by component of a Fluid or MixtureFluid."""
    if getattr(fluid, "is_mixture", False):
        names = fluid.component_names
        z = dict(zip(names, map(float, fluid.z), strict=True))
        return z, {c.name: frozenset(c.hazards) for c in fluid.components}
    return {fluid.name: 1.0}, {fluid.name: frozenset(fluid.data.hazards)}


def _release(
    v: VesselInput,
    a: VesselAssessment,
    area: AreaInput,
    P_atm: float,
    lim: Limits,
    per_mole: dict[int, rel.ReleasedVolume],
) -> Release:
    fluid = v.fluid
    moles = a.charged_mass_kg / float(fluid.molar_mass)
    if id(fluid) not in per_mole:  # one density solve per gas and model (vessels share Fluids)
        per_mole[id(fluid)] = rel.released_volume(fluid, 1.0, area.temperature_K, P_atm)
    one = per_mole[id(fluid)]
    vol = rel.ReleasedVolume(one.volume_m3 * moles, one.Z, one.flashed)
    z, hz = _composition(fluid)
    mix = rel.gas_mix(z, hz, LFL)
    x = rel.displacement_fraction(vol.volume_m3, area.volume_m3)
    xm = rel.mixed_outflow_fraction(vol.volume_m3, area.volume_m3)
    largest = rel.largest_fractions(
        mix, lim.oxygen_minimum, lim.oxygen_maximum, lim.carbon_dioxide_short_term, lim.lfl_share
    )
    x_lim = min(largest.values())
    N = area.air_changes_per_s
    co2_long = rel.largest_fractions(mix, 0.0, 1.0, lim.carbon_dioxide_long_term, math.inf)
    return Release(
        v.id,
        fluid.name,
        a.charged_mass_kg,
        moles,
        vol,
        x,
        xm,
        rel.atmosphere(x, mix),
        rel.atmosphere(xm, mix),
        mix,
        largest,
        x / x_lim if math.isfinite(x_lim) else 0.0,
        rel.time_to_fall(x, x_lim, N),
        rel.time_to_fall(x, largest["oxygen-deficient"], N),
        rel.time_to_fall(x, co2_long["carbon-dioxide"], N),
    )


def _breaks(r: Release, criterion: str, lim: Limits) -> bool:
    """Whether the release breaks a limit (judged on the atmosphere itself, not the ratio)."""
    air = r.air
    if criterion == "oxygen-deficient":
        return air.oxygen < lim.oxygen_minimum
    if criterion == "oxygen-enriched":
        return air.oxygen_equivalent > lim.oxygen_maximum
    if criterion == "carbon-dioxide":
        return air.carbon_dioxide > lim.carbon_dioxide_short_term
    return air.lfl_fraction > lim.lfl_share


def _value(air: rel.Atmosphere, criterion: str) -> float:
    return {
        "oxygen-deficient": air.oxygen,
        "oxygen-enriched": air.oxygen_equivalent,
        "carbon-dioxide": air.carbon_dioxide,
        "flammable": air.lfl_fraction,
    }[criterion]


def _leak(
    area: AreaInput, vin: VesselInput, P_atm: float, lim: Limits
) -> tuple[Leak, list[Finding]]:
    assert area.leak is not None
    fluid = vin.fluid
    moles_s = area.leak.rate_kg_s / float(fluid.molar_mass)
    per_mol = rel.released_volume(fluid, 1.0, area.temperature_K, P_atm).volume_m3
    q = moles_s * per_mol
    z, hz = _composition(fluid)
    mix = rel.gas_mix(z, hz, LFL)
    N, V = area.air_changes_per_s, area.volume_m3
    x_ss = rel.leak_steady_fraction(q, N, V)
    largest = rel.largest_fractions(
        mix, lim.oxygen_minimum, lim.oxygen_maximum, lim.carbon_dioxide_short_term, lim.lfl_share
    )
    first = min(largest, key=lambda k: largest[k])
    breaks = first if x_ss > largest[first] else None
    when = None if breaks is None else rel.leak_time_to(largest[first], q, N, V)
    leak = Leak(vin.id, area.leak.rate_kg_s, q, x_ss, rel.atmosphere(x_ss, mix), breaks, when)
    data = {
        "vessel": vin.id,
        "gas": fluid.name,
        "rate_kg_s": area.leak.rate_kg_s,
        "volume_flow_m3_s": q,
        "air_changes_per_s": N,
        "volume_m3": V,
        "steady_gas_fraction": x_ss,
        "steady_oxygen_fraction": leak.air.oxygen,
        "steady_carbon_dioxide_fraction": leak.air.carbon_dioxide,
        "steady_lfl_fraction": leak.air.lfl_fraction,
    }
    if breaks is None:
        return leak, [Finding("area-leak", "info", "", data)]
    data |= {
        "criterion": breaks,
        "value": _value(leak.air, breaks),
        "limit": lim.value(breaks),
        "limit_source": lim.source(breaks),
        "reached_after_s": when,
    }
    return leak, [Finding("area-leak-limit", "fail", "", data)]


def _findings(area: AreaInput, releases: Sequence[Release], lim: Limits) -> list[Finding]:
    out: list[Finding] = []
    N = area.air_changes_per_s
    breached = False
    for c in CRITERIA:
        hits = [r for r in releases if _breaks(r, c, lim)]
        if not hits:
            continue
        breached = True
        sign = 1.0 if c == "oxygen-deficient" else -1.0
        r = min(hits, key=lambda r: sign * _value(r.air, c))
        out.append(
            Finding(
                f"area-{c}",
                "fail",
                "",
                {
                    "vessel": r.vessel,
                    "gas": r.gas,
                    "value": _value(r.air, c),
                    "limit": lim.value(c),
                    "limit_source": lim.source(c),
                    "released_volume_m3": r.volume.volume_m3,
                    "volume_m3": area.volume_m3,
                    "gas_fraction": r.gas_fraction,
                    "value_mixed_outflow": _value(r.air_mixed, c),
                    "back_within_s": rel.time_to_fall(r.gas_fraction, r.limit_fractions[c], N),
                    "vessels": [h.vessel for h in hits],
                },
            )
        )
    over_long = [
        r
        for r in releases
        if lim.carbon_dioxide_long_term < r.air.carbon_dioxide <= lim.carbon_dioxide_short_term
    ]
    if over_long:
        r = max(over_long, key=lambda r: r.air.carbon_dioxide)
        out.append(
            Finding(
                "area-carbon-dioxide-long-term",
                "warning",
                "",
                {
                    "vessel": r.vessel,
                    "value": r.air.carbon_dioxide,
                    "limit": lim.carbon_dioxide_long_term,
                    "limit_source": lim.sources["carbon_dioxide_long_term"],
                    "back_within_s": r.carbon_dioxide_long_term_s,
                },
            )
        )
    toxic: dict[str, list[tuple[float, str]]] = {}
    unknown: dict[str, list[str]] = {}
    liquid: dict[str, list[Release]] = {}
    for r in releases:  # one finding a component (or gas), naming every vessel it concerns
        for name, x in r.air.toxic.items():
            toxic.setdefault(name, []).append((x, r.vessel))
        for name in r.mix.flammable_without_limit:
            unknown.setdefault(name, []).append(r.vessel)
        if not r.volume.flashed:
            liquid.setdefault(r.gas, []).append(r)
    for name, hits in toxic.items():
        x, vessel = max(hits)
        out.append(
            Finding(
                "area-toxic-release",
                "review",
                "",
                {
                    "vessel": vessel,
                    "component": name,
                    "fraction": x,
                    "vessels": [v for _, v in hits],
                },
            )
        )
    for name, vessels in unknown.items():
        out.append(
            Finding(
                "area-flammable-limit-unknown",
                "review",
                "",
                {"vessel": vessels[0], "component": name, "vessels": vessels},
            )
        )
    for gas, rs in liquid.items():
        r = max(rs, key=lambda r: r.volume.volume_m3)
        out.append(
            Finding(
                "area-release-liquid",
                "warning",
                "",
                {
                    "vessel": r.vessel,
                    "gas": gas,
                    "temperature_K": area.temperature_K,
                    "released_volume_m3": r.volume.volume_m3,
                    "vessels": [x.vessel for x in rs],
                },
            )
        )
    if breached and not N > 0.0:
        out.append(Finding("area-no-ventilation", "warning", "", {"volume_m3": area.volume_m3}))
    return out


def assess_area(
    area: AreaInput,
    members: Sequence[tuple[VesselInput, VesselAssessment]],
    atmospheric_pressure_Pa: float,
) -> AreaAssessment:
    """The inventory and the releases of one area with its vessels (input and assessment)."""
    lim = limits_for(area)
    T, P = area.temperature_K, atmospheric_pressure_Pa
    per_mole: dict[int, rel.ReleasedVolume] = {}
    releases = [_release(v, a, area, P, lim, per_mole) for v, a in members]
    inventory = []
    for h in HAZARD_CLASSES:
        rows = [(r, a) for r, (_, a) in zip(releases, members, strict=True) if h in a.hazards]
        if rows:
            inventory.append(
                InventoryLine(
                    h,
                    sum(a.charged_mass_kg * a.count for _, a in rows),
                    sum(r.volume.volume_m3 * a.count for r, a in rows),
                    sum(a.count for _, a in rows),
                )
            )
    reported = max(releases, key=lambda r: r.ratio, default=None)
    result = AreaAssessment(
        area.id,
        area.volume_m3,
        area.air_changes_per_s,
        T,
        P,
        lim,
        dict(area.entered),
        [v.id for v, _ in members],
        sum(a.count for _, a in members),
        sum(a.charged_mass_kg * a.count for _, a in members),
        inventory,
        releases,
        reported,
    )
    findings = _findings(area, releases, lim)
    if reported is not None:
        end = CURVE_MIN_s
        if reported.clear_s is not None:
            end = min(max(CURVE_MIN_s, 2.0 * reported.clear_s), CURVE_MAX_s)
        t = np.linspace(0.0, end, CURVE_POINTS)
        result.curve_t_s = t
        x = rel.decay(reported.gas_fraction, area.air_changes_per_s, t)
        result.curve = [rel.atmosphere(float(xi), reported.mix) for xi in x]
        findings.append(
            Finding(
                "area-release",
                "info",
                "",
                {
                    "vessel": reported.vessel,
                    "gas": reported.gas,
                    "mass_kg": reported.mass_kg,
                    "released_volume_m3": reported.volume.volume_m3,
                    "volume_m3": area.volume_m3,
                    "gas_fraction": reported.gas_fraction,
                    "gas_fraction_mixed_outflow": reported.gas_fraction_mixed,
                    "oxygen_fraction": reported.air.oxygen,
                    "oxygen_fraction_mixed_outflow": reported.air_mixed.oxygen,
                    "air_changes_per_s": area.air_changes_per_s,
                    "oxygen_recovery_s": reported.oxygen_recovery_s,
                    "clear_s": reported.clear_s,
                },
            )
        )
    if area.leak is not None:
        vin = next(v for v, _ in members if v.id == area.leak.vessel)
        result.leak, more = _leak(area, vin, P, lim)
        findings += more
    result.findings = findings
    return result


def assess_areas(scenario: Scenario, vessels: Sequence[VesselAssessment]) -> list[AreaAssessment]:
    """Every area of a scenario, with the vessels that name it (in the file's order)."""
    by_id = {a.id: a for a in vessels}
    out = []
    for area in scenario.areas:
        members = [(v, by_id[v.id]) for v in scenario.vessels if v.area == area.id]
        out.append(assess_area(area, members, scenario.atmospheric_pressure_Pa))
    return out
