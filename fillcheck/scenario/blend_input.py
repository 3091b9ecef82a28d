"""The ``[vessel.blend]`` table (INTERFACES.md §7): preparing a mixture in the cylinder.

The table says in which order the components go in and at which gas temperature each step is
read; the vessel's ``gas`` (a mixture) and ``fill`` still give the target contents. Optional:
a ``tare`` (where no ``marking.tare_mass`` is given), the ``residual`` contents before the blend
starts, and the ``scale_resolution`` and ``gauge_accuracy`` the composition's tolerance is
worked from.
"""

from __future__ import annotations

from dataclasses import dataclass
from typing import Any

from pydantic import BaseModel, ConfigDict, StrictFloat, StrictInt, StrictStr

from fillcheck import units
from fillcheck.errors import InputError
from fillcheck.fluids.catalog import lookup

Quantity = StrictStr

DEFAULT_SCALE_RESOLUTION = "10 g"
"""Scale resolution assumed when none is given (common practice, no source)."""
DEFAULT_GAUGE_ACCURACY = "1 %"
"""Gauge accuracy, as a share of the reading, assumed when none is given (common practice, no
source)."""


class _Strict(BaseModel):
    model_config = ConfigDict(extra="forbid", frozen=True)


class ResidualSpec(_Strict):
    """Gas left in the vessel before the blend starts."""

    pressure: Quantity
    temperature: Quantity
    gas: StrictStr | None = None
    """One component of the mixture; omitted: the target mixture itself."""


class BlendSpec(_Strict):
    """``[vessel.blend]``: the order of the components and the blend temperature."""

    order: list[StrictStr] | None = None
    temperature: Quantity
    tare: Quantity | None = None
    residual: ResidualSpec | None = None
    scale_resolution: Quantity | None = None
    gauge_accuracy: Quantity | StrictFloat | StrictInt | None = None


@dataclass(frozen=True)
class ResidualInput:
    """Residual contents: pressure [Pa abs], temperature [K], gas (a component, None: the
    target mixture)."""

    pressure_Pa: float
    temperature_K: float
    gas: str | None


@dataclass(frozen=True)
class BlendInput:
    """``[vessel.blend]`` in SI.

    order : component names (catalog spelling) in the order they go in, or None (suggest one)
    temperature_K : gas temperature each step is read at [K]
    tare_mass_kg : the empty vessel's weight [kg] (the blend's own ``tare`` or the marked one)
    residual : gas in the vessel before the first step, or None (evacuated)
    scale_resolution_kg : the scale's resolution [kg]
    gauge_accuracy : the gauge's error limit as a share of the reading [-]
    default_scale, default_gauge : whether those two were assumed (not entered)
    """

    order: tuple[str, ...] | None
    temperature_K: float
    tare_mass_kg: float | None
    residual: ResidualInput | None
    scale_resolution_kg: float
    gauge_accuracy: float
    default_scale: bool
    default_gauge: bool


def _component(text: str, names: tuple[str, ...], field: str, where: Any) -> str:
    try:
        name = lookup(text).name
    except InputError:
        name = None
    if name not in names:
        raise where.fail(
            field,
            f"'{text}' is not a component of the vessel's gas; use one of {', '.join(names)}",
        )
    return name


def resolve_blend(
    spec: BlendSpec | None,
    fluid: Any,
    where: Any,
    P_atm: float,
    temperature: Any,
    entered: dict[str, str],
    tare_mass_kg: float | None = None,
) -> BlendInput | None:
    """Read ``[vessel.blend]`` into SI, refusing bad input in one sentence (exit 2).

    ``temperature(text, field)`` reads a gas temperature with the vessel's own bounds; a
    marked ``tare_mass_kg`` [kg] serves where the table gives no ``tare``.
    """
    if spec is None:
        return None
    if not getattr(fluid, "is_mixture", False):
        raise where.fail(
            "blend",
            f"the vessel's gas '{fluid.name}' is a single gas; a [vessel.blend] table needs a "
            'mixture, e.g. gas = { nitrogen = "70 %", "carbon dioxide" = "30 %" }',
        )
    names = tuple(fluid.component_names)
    order = None
    if spec.order is not None:
        got = [_component(t, names, "blend.order", where) for t in spec.order]
        if len(set(got)) != len(got):
            twice = next(n for n in got if got.count(n) > 1)
            raise where.fail("blend.order", f"names {twice} twice; name each component once")
        missing = [n for n in names if n not in got]
        if missing:
            raise where.fail(
                "blend.order",
                f"leaves out {', '.join(missing)}; name every component of the gas once",
            )
        order = tuple(got)
    text_T = spec.temperature
    T = where.run("blend.temperature", units.parse_temperature, text_T)
    if not T > 0.0:
        raise where.fail("blend.temperature", f"'{text_T}' is not above absolute zero")
    T = temperature(text_T, "blend.temperature")
    entered["blend.temperature"] = text_T
    tare = tare_mass_kg
    if spec.tare is not None:
        entered["blend.tare"] = spec.tare
        tare = where.run("blend.tare", units.parse_mass, spec.tare)
        if not tare > 0.0:
            raise where.fail("blend.tare", f"'{spec.tare}' must be larger than zero")
        if tare_mass_kg is not None and abs(tare - tare_mass_kg) > 1e-9 * tare_mass_kg:
            raise where.fail(
                "blend.tare",
                f"'{spec.tare}' differs from the marked tare_mass ({tare_mass_kg:.6g} kg), so "
                "the recipe and the fill plan would stop at different scale readings; give one "
                "of them (the marked tare serves the blend too)",
            )
    residual = None
    if spec.residual is not None:
        r = spec.residual
        P = where.run("blend.residual.pressure", units.parse_pressure, r.pressure, P_atm)
        if P < 0.0:
            raise where.fail("blend.residual.pressure", f"'{r.pressure}' is below vacuum")
        Tr = where.run("blend.residual.temperature", units.parse_temperature, r.temperature)
        if not Tr > 0.0:
            raise where.fail(
                "blend.residual.temperature", f"'{r.temperature}' is not above absolute zero"
            )
        Tr = temperature(r.temperature, "blend.residual.temperature")
        gas = None if r.gas is None else _component(r.gas, names, "blend.residual.gas", where)
        entered["blend.residual.pressure"] = r.pressure
        entered["blend.residual.temperature"] = r.temperature
        residual = ResidualInput(P, Tr, gas)
    scale_text = spec.scale_resolution or DEFAULT_SCALE_RESOLUTION
    scale = where.run("blend.scale_resolution", units.parse_mass, scale_text)
    if not scale > 0.0:
        raise where.fail("blend.scale_resolution", f"'{scale_text}' must be larger than zero")
    gauge_text = DEFAULT_GAUGE_ACCURACY if spec.gauge_accuracy is None else spec.gauge_accuracy
    gauge = where.run("blend.gauge_accuracy", units.parse_fraction, gauge_text)
    if not 0.0 < gauge < 1.0:
        raise where.fail(
            "blend.gauge_accuracy", f"'{gauge_text}' must be a share of the reading, e.g. \"1 %\""
        )
    entered["blend.scale_resolution"] = scale_text
    entered["blend.gauge_accuracy"] = str(gauge_text)
    return BlendInput(
        order,
        T,
        tare,
        residual,
        scale,
        gauge,
        spec.scale_resolution is None,
        spec.gauge_accuracy is None,
    )
