"""The scenario file as written by the user (pydantic v2): structure only, quantities as text.

Quantities stay strings here; :mod:`fillcheck.scenario.resolve` turns them into SI with the one
units module, so every unit message has the same wording wherever it comes from. Unknown keys are
refused (a misspelt limit must never be silently ignored).
"""

from __future__ import annotations

from typing import Literal

from pydantic import BaseModel, ConfigDict, Field, StrictFloat, StrictInt, StrictStr

from fillcheck.scenario.area_input import AreaSpec
from fillcheck.scenario.blend_input import BlendSpec
from fillcheck.scenario.filling_input import FillingSpec

Quantity = StrictStr
"""A number with a unit, e.g. ``"200 barg"``."""


class _Strict(BaseModel):
    model_config = ConfigDict(extra="forbid", frozen=True)


class FillSpec(_Strict):
    """How the vessel is filled: exactly one of pressure, mass, filling_ratio, settled_pressure."""

    pressure: Quantity | None = None
    mass: Quantity | None = None
    filling_ratio: Quantity | None = None
    settled_pressure: Quantity | None = None
    temperature: Quantity | None = None


class StorageSpec(_Strict):
    """The storage temperature range; the maximum is required."""

    max_temperature: Quantity
    min_temperature: Quantity | None = None


class LimitsSpec(_Strict):
    """Limits the fill must keep over the whole storage range."""

    allowable_pressure: Quantity
    relief_set_pressure: Quantity | None = None
    relief_device: Literal["valve", "bursting disc"] | None = None
    """What opens at the relief set pressure: a valve recloses, a bursting disc does not."""
    max_filling_ratio: Quantity | None = None
    max_filling_density: Quantity | StrictFloat | StrictInt | None = None
    """A US filling density: the charge as a percentage of the weight of water the vessel holds
    at 60 °F, e.g. "68 %" (instead of max_filling_ratio)."""
    min_vapour_space: Quantity | StrictFloat | StrictInt | None = None
    vapour_space_temperature: Quantity | None = None
    max_fill_temperature: Quantity | None = None
    """The peak gas temperature the fill must not pass (needs ``[vessel.filling]``)."""


class RulesSpec(_Strict):
    """A named example rule set and the vessel's test pressure (see assess.rules)."""

    set: Literal["p200-compressed", "p200-high-pressure-liquefied", "p200-low-pressure-liquefied"]
    test_pressure: Quantity | None = None
    """Optional where the vessel's ``marking`` gives ``test_pressure``."""


class MarkingSpec(_Strict):
    """What is stamped on the cylinder (INTERFACES.md §5); every key optional."""

    working_pressure: Quantity | None = None
    service_pressure: Quantity | None = None
    allowance: Quantity | StrictFloat | StrictInt | None = None
    test_pressure: Quantity | None = None
    tare_mass: Quantity | None = None


class GasSpec(_Strict):
    """A gas the catalog lacks, by its corresponding-states inputs (cubic models only)."""

    name: StrictStr
    molar_mass: Quantity
    critical_temperature: Quantity
    critical_pressure: Quantity
    acentric_factor: StrictFloat | StrictInt
    critical_density: Quantity | None = None
    triple_point_temperature: Quantity | None = None
    hazards: list[Literal["flammable", "oxidizing", "toxic", "corrosive", "asphyxiant"]] = Field(
        default_factory=list
    )


class VesselSpec(_Strict):
    """One vessel (or ``count`` identical vessels)."""

    id: StrictStr | StrictInt
    gas: StrictStr | dict[str, StrictFloat | StrictInt | StrictStr]
    composition_basis: Literal["mole", "mass", "volume"] | None = None
    water_capacity: Quantity
    model: StrictStr | None = None
    count: StrictInt = 1
    fill: FillSpec
    storage: StorageSpec
    limits: LimitsSpec
    rules: RulesSpec | None = None
    marking: MarkingSpec | None = None
    filling: FillingSpec | None = None
    """How the fill is made (scenario.filling_input): the fill process, INTERFACES.md §6."""
    area: StrictStr | StrictInt | None = None
    """The id of the ``[[area]]`` the vessel is stored in (INTERFACES.md §8), or None."""
    blend: BlendSpec | None = None
    """How a mixture is prepared in the vessel (scenario.blend_input), INTERFACES.md §7."""


class ScenarioSpec(_Strict):
    """A whole scenario file."""

    title: StrictStr | None = None
    site: StrictStr | None = None
    permit_number: StrictStr | StrictInt | None = None
    prepared_by: StrictStr | None = None
    units: Literal["metric", "us"] | None = None
    reference_temperature: Quantity = "15 degC"
    atmospheric_pressure: Quantity = "101.325 kPa absolute"
    gas: list[GasSpec] = Field(default_factory=list)
    vessel: list[VesselSpec] = Field(min_length=1)
    area: list[AreaSpec] = Field(default_factory=list)
    """Storage areas (scenario.area_input), INTERFACES.md §8."""
