"""A cylinder's markings (INTERFACES.md §5), validated and in SI, or one sentence saying why not.

``marking = { working_pressure, service_pressure, allowance, test_pressure, tare_mass }``:

- ``working_pressure``: the settled pressure of a full cylinder at 15 °C, the usual meaning of
  a marked working pressure on cylinders made to ISO 9809 and the European standards (from
  memory; cite the standard you use). ``service_pressure``: the same idea at 70 °F (21.1 °C),
  the meaning of the service pressure marked on US DOT cylinders (49 CFR 173.302a, from
  memory). A cylinder carries one of the two.
- ``allowance``: how far a code lets the settled pressure go above the marked pressure, as a
  fraction of it (the US "plus" mark allows 10 % over the service pressure: from memory, verify
  against the code). Never assumed: without it the marked pressure itself is the limit.
- ``test_pressure``: the marked test pressure; the rule sets use it where ``rules.test_pressure``
  is absent.
- ``tare_mass``: the empty cylinder's marked weight (valve included where the marking says so).
"""

from __future__ import annotations

from dataclasses import dataclass
from typing import TYPE_CHECKING, Literal

from fillcheck import units
from fillcheck.scenario import bounds

if TYPE_CHECKING:
    from fillcheck.scenario.resolve import _Where
    from fillcheck.scenario.schema import MarkingSpec

WORKING_PRESSURE_TEMPERATURE_K = 288.15
"""The temperature a marked working pressure refers to, 15 °C [K] (trade usage, from memory)."""
SERVICE_PRESSURE_TEMPERATURE_K = (70.0 - 32.0) * 5.0 / 9.0 + 273.15
"""The temperature a marked service pressure refers to, 70 °F = 294.26 K [K] (49 CFR 173.302a,
from memory)."""
ALLOWANCE_MAX = 0.5
"""Plausibility bound on ``marking.allowance`` [-] (common practice, no source: the largest
allowance the author knows of is 10 %)."""

RatedKind = Literal["working pressure", "service pressure"]


@dataclass(frozen=True)
class Marking:
    """A cylinder's markings in SI: pressures absolute [Pa], temperature [K], mass [kg]."""

    rated_kind: RatedKind | None = None
    """Which rated pressure is marked, or None."""
    rated_pressure_Pa: float | None = None
    """The marked working or service pressure, absolute [Pa]."""
    rated_temperature_K: float | None = None
    """The temperature the rated pressure refers to [K]."""
    allowance: float = 0.0
    """Fraction of the rated gauge pressure a code allows above it [-]."""
    test_pressure_Pa: float | None = None
    """The marked test pressure, absolute [Pa]."""
    tare_mass_kg: float | None = None
    """The marked empty weight [kg]."""
    atmospheric_pressure_Pa: float = units.STANDARD_ATMOSPHERE_Pa
    """For the gauge basis of the allowance [Pa]."""

    @property
    def rated_limit_Pa(self) -> float | None:
        """The highest settled pressure at the rated temperature, absolute [Pa]: the marked
        pressure raised by the allowance on its gauge value (None where none is marked)."""
        if self.rated_pressure_Pa is None:
            return None
        atm = self.atmospheric_pressure_Pa
        return atm + (self.rated_pressure_Pa - atm) * (1.0 + self.allowance)


def resolve_marking(
    spec: MarkingSpec | None, where: _Where, P_atm: float, entered: dict[str, str]
) -> Marking | None:
    """The vessel's markings in SI (None without a ``marking`` table); refusals name the field."""
    if spec is None:
        return None
    if spec.working_pressure is not None and spec.service_pressure is not None:
        raise where.fail(
            "marking.service_pressure",
            "a cylinder is marked with a working pressure (rated at 15 °C) or a service "
            "pressure (rated at 70 °F), not both; keep the one stamped on the cylinder",
        )
    kind: RatedKind | None = None
    rated = T_rated = None
    for key, name, T in (
        ("working_pressure", "working pressure", WORKING_PRESSURE_TEMPERATURE_K),
        ("service_pressure", "service pressure", SERVICE_PRESSURE_TEMPERATURE_K),
    ):
        text = getattr(spec, key)
        if text is None:
            continue
        field = "marking." + key
        entered[field] = text
        rated = where.pressure(field, text, P_atm)
        if rated <= P_atm:
            raise where.fail(
                field,
                f"'{text}' is not above the atmosphere; a marked {name} is a gauge pressure "
                'above zero, e.g. "200 barg"',
            )
        kind, T_rated = name, T  # type: ignore[assignment]
    allowance = 0.0
    if spec.allowance is not None:
        if kind is None:
            raise where.fail(
                "marking.allowance",
                "goes with a marked working_pressure or service_pressure; give the marked "
                "pressure too, or remove the allowance",
            )
        entered["marking.allowance"] = str(spec.allowance)
        allowance = where.run("marking.allowance", units.parse_fraction, spec.allowance)
        if not 0.0 <= allowance <= ALLOWANCE_MAX:
            raise where.fail(
                "marking.allowance",
                f"'{spec.allowance}' is not an allowance over the {kind}; give the fraction "
                f'your code allows, from 0 to {ALLOWANCE_MAX:.0%} (e.g. "10 %")',
            )
    test = None
    if spec.test_pressure is not None:
        entered["marking.test_pressure"] = spec.test_pressure
        test = where.pressure("marking.test_pressure", spec.test_pressure, P_atm)
        if rated is not None and test <= rated:
            raise where.fail(
                "marking.test_pressure",
                f"'{spec.test_pressure}' is not above the marked {kind}; a cylinder's test "
                "pressure lies above it (commonly 1.5 times a working pressure, 5/3 of a "
                "service pressure); check both markings",
            )
        if test <= P_atm:
            raise where.fail(
                "marking.test_pressure",
                f"'{spec.test_pressure}' is not above the atmosphere; give the gauge pressure "
                'stamped on the cylinder, e.g. "300 barg"',
            )
    tare = None
    if spec.tare_mass is not None:
        entered["marking.tare_mass"] = spec.tare_mass
        tare = where.run("marking.tare_mass", units.parse_mass, spec.tare_mass)
        if tare <= 0:
            raise where.fail(
                "marking.tare_mass",
                f"'{spec.tare_mass}' must be larger than zero; give the empty weight stamped on "
                'the cylinder, e.g. "58.5 kg"',
            )
        where.bounded(
            "marking.tare_mass",
            spec.tare_mass,
            tare,
            bounds.MASS_MAX_kg,
            f"{bounds.MASS_MAX_kg:,.0f} kg",
        )
    return Marking(kind, rated, T_rated, allowance, test, tare, P_atm)
