"""Which models a fluid has, which one is its default, and how each is built from its data.

A fluid with a published reference equation of state has it as its default ("reference"); the
cubics follow, ordered by their measured error.

Every model family is one entry of ``FAMILIES``: its ids, whether a fluid can have it, and how
to build it. A new model joins fillcheck by adding one entry (DEVELOPERS.md, "Add a model").
"""

from __future__ import annotations

from collections.abc import Callable
from dataclasses import dataclass

from fillcheck.errors import ModelUnavailableError
from fillcheck.fluids.accuracy import accuracy_for
from fillcheck.fluids.catalog import FluidData
from fillcheck.models.cubic import CUBIC_MODEL_IDS, CubicComponent, CubicModel
from fillcheck.models.multiparameter import (
    MultiparameterModel,
    available_reference_equations,
    load_reference_equation,
)


@dataclass(frozen=True)
class ModelFamily:
    """A family of models: its ids (scenario and API words), whether a fluid can have it, and
    how one of its ids is built for a fluid."""

    ids: tuple[str, ...]
    offered: Callable[[FluidData], bool]
    build: Callable[[FluidData, str], CubicModel | MultiparameterModel]


def _build_reference(data: FluidData, model_id: str) -> MultiparameterModel:
    return load_reference_equation(data.name)


def _build_cubic(data: FluidData, model_id: str) -> CubicModel:
    acc = accuracy_for(data.name)
    shift = acc.volume_shift_m3_mol if (acc is not None and model_id == "pr-peneloux") else 0.0
    comp = CubicComponent(
        Tc=data.critical_temperature_K,
        Pc=data.critical_pressure_Pa,
        omega=data.acentric_factor,
        shift_m3_mol=shift,
    )
    return CubicModel(model_id, [comp])


def has_reference_equation(data: FluidData) -> bool:
    """Whether a reference equation of state ships for this fluid."""
    return not data.user_defined and data.name in available_reference_equations()


FAMILIES: tuple[ModelFamily, ...] = (
    ModelFamily(("reference",), has_reference_equation, _build_reference),
    ModelFamily(CUBIC_MODEL_IDS, lambda data: True, _build_cubic),
)
"""Every model family, the most accurate kind first."""

MODEL_IDS: tuple[str, ...] = tuple(i for fam in FAMILIES for i in fam.ids)
"""Every model id fillcheck knows, in the words of the scenario file and the API."""

_PREFERENCE = ("pr", "srk", "rk", "vdw")
"""Order among the cubics for a gas without measured accuracy (user-defined gases, nitrogen
trifluoride): Peng–Robinson first, the usual choice for corresponding-states estimates."""


def available_models(data: FluidData) -> tuple[str, ...]:
    """Model ids that can be built for this fluid, most accurate first.

    For a gas with measured accuracy the order is by the largest density error over the
    published error table's range (docs/accuracy.md); the translated Peng–Robinson model needs
    the fitted shift, so only measured gases have it.
    """
    ref = tuple(i for fam in FAMILIES[:1] if fam.offered(data) for i in fam.ids)
    acc = accuracy_for(data.name)
    if acc is None:
        return ref + _PREFERENCE
    return ref + tuple(sorted(acc.errors, key=lambda m: acc.errors[m].table_density))


def default_model_id(data: FluidData) -> str:
    """The most accurate model this fluid has."""
    return available_models(data)[0]


def build_model(data: FluidData, model_id: str) -> CubicModel | MultiparameterModel:
    """Build the model ``model_id`` for one fluid.

    Raises
    ------
    ModelUnavailableError
        For an unknown id, or an id the fluid lacks (with the ids it has).
    """
    have = available_models(data)
    if model_id not in have:
        if model_id not in MODEL_IDS:
            why = f"unknown model '{model_id}'; known models are {', '.join(MODEL_IDS)}"
        elif model_id == "reference":
            why = (
                f"no reference equation of state for {data.name} in this version of "
                f"fillcheck; available: {', '.join(have)}"
            )
        else:
            why = (
                f"model '{model_id}' is not available for {data.name}; available: {', '.join(have)}"
            )
        raise ModelUnavailableError(why)
    family = next(fam for fam in FAMILIES if model_id in fam.ids)
    return family.build(data, model_id)
