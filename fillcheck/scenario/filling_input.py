"""The ``[vessel.filling]`` table (INTERFACES.md §6): its structure and its reading into SI.

The table describes how the fill is made (the source of the gas, the residual gas at the start,
the duration, the wall and the heat transfer); the vessel's ``fill`` still gives the charge.
``limits.max_fill_temperature`` (a peak gas temperature the fill must not pass) needs it.
"""

from __future__ import annotations

from dataclasses import dataclass, field
from typing import Any, Literal

from pydantic import BaseModel, ConfigDict, StrictStr

from fillcheck import units
from fillcheck.scenario import bounds

Quantity = StrictStr


class _Strict(BaseModel):
    model_config = ConfigDict(extra="forbid", frozen=True)


class SupplySpec(_Strict):
    """A supply held at a fixed state, feeding the vessel through a valve."""

    pressure: Quantity
    temperature: Quantity


class CompressorSpec(_Strict):
    """A compressor delivering at the vessel's own pressure and this temperature."""

    delivery_temperature: Quantity


class BankSpec(_Strict):
    """One bank of a cascade: its volume and the state of its gas before the fill."""

    water_capacity: Quantity
    pressure: Quantity
    temperature: Quantity


class StartSpec(_Strict):
    """The residual gas in the vessel before the fill."""

    pressure: Quantity
    temperature: Quantity | None = None


class WallSpec(_Strict):
    """The vessel's wall: its mass (omitted: the marked tare) and either its specific heat or a
    material name."""

    mass: Quantity | None = None
    specific_heat: Quantity | None = None
    material: Literal["steel", "aluminium", "composite"] | None = None


class HeatTransferSpec(_Strict):
    """The two-node model: gas–wall coefficient over an area, optional wall–ambient one."""

    coefficient: Quantity
    area: Quantity
    ambient_coefficient: Quantity | None = None


class FillingSpec(_Strict):
    """``[vessel.filling]``: how the fill is made."""

    supply: SupplySpec | None = None
    compressor: CompressorSpec | None = None
    cascade: list[BankSpec] | None = None
    switch_difference: Quantity | None = None
    start: StartSpec | None = None
    duration: Quantity
    flow: Literal["constant-mass", "pressure-ramp"] | None = None
    """How the charge enters over the duration: at a constant mass flow (default), or so that
    the vessel's pressure rises at a constant rate."""
    ambient_temperature: Quantity | None = None
    wall: WallSpec | None = None
    heat_transfer: Literal["adiabatic", "lumped"] | HeatTransferSpec | None = None


@dataclass(frozen=True)
class WallMaterial:
    """A wall material: density [kg/m³] and specific heat [J/(kg·K)] at room temperature."""

    density_kg_m3: float
    specific_heat_J_kgK: float
    source: str


WALL_MATERIALS: dict[str, WallMaterial] = {
    "steel": WallMaterial(
        7854.0,
        434.0,
        "plain carbon steel at 300 K: Incropera, DeWitt, Fundamentals of Heat and Mass "
        "Transfer, Table A.1 (from memory; cylinder steels of Cr–Mo grades lie within a few %)",
    ),
    "aluminium": WallMaterial(
        2770.0,
        875.0,
        "aluminium alloy 2024-T6 at 300 K: Incropera, DeWitt, Fundamentals of Heat and Mass "
        "Transfer, Table A.1 (from memory; 6061, the usual cylinder alloy, is close)",
    ),
    "composite": WallMaterial(
        1550.0,
        1000.0,
        "carbon-fibre–epoxy laminate with a polymer liner: an approximate, common-practice "
        "figure with no source (from memory); enter the maker's specific heat where known",
    ),
}
"""Wall materials by name (specific heats at room temperature; the fill's wall warms by tens of
kelvin, over which they change by a few per cent)."""


@dataclass(eq=False)
class FillingInput:
    """``[vessel.filling]`` in SI (temperatures [K], pressures [Pa abs], s, J/K, W/K)."""

    source: str
    inlet_temperature_K: float
    supply_pressure_Pa: float | None
    start_temperature_K: float
    start_pressure_Pa: float
    duration_s: float
    ambient_temperature_K: float
    wall_heat_capacity_J_K: float
    wall_source: str | None
    heat_transfer: str
    flow: str = "constant-mass"
    """"constant-mass" or "pressure-ramp" (see FillingSpec.flow)."""
    gas_wall_conductance_W_K: float = 0.0
    wall_ambient_conductance_W_K: float = 0.0
    max_fill_temperature_K: float | None = None
    banks: tuple[tuple[float, float, float], ...] = ()
    """A cascade's banks in order: (volume [m³], temperature [K], pressure [Pa abs])."""
    switch_difference_Pa: float | None = None
    cache: dict[Any, Any] = field(default_factory=dict, repr=False)
    """Computed results by reference temperature (assess.fill_process), filled on first use."""


def resolve_filling(
    spec: FillingSpec | None,
    max_fill_temperature: str | None,
    where: Any,
    P_atm: float,
    T_ref: float,
    temperature: Any,
    entered: dict[str, str],
    tare_mass_kg: float | None = None,
) -> FillingInput | None:
    """Read ``[vessel.filling]`` into SI, refusing bad input in one sentence (exit 2).

    ``temperature(text, field)`` reads a gas temperature with the vessel's own bounds;
    ``tare_mass_kg`` is the marked tare [kg], the wall's mass where the wall gives none."""
    if spec is None:
        if max_fill_temperature is not None:
            raise where.fail(
                "limits.max_fill_temperature",
                "needs a [vessel.filling] table to compute the peak gas temperature of the "
                "fill; add one (supply or compressor, duration) or remove the limit",
            )
        return None
    given = [k for k in ("supply", "compressor", "cascade") if getattr(spec, k) is not None]
    if len(given) != 1:
        what = ("both " if len(given) == 2 else "") + " and ".join(given) or "no source of gas"
        raise where.fail(
            "filling",
            f"gives {what}; give exactly one of supply, compressor, cascade, e.g. "
            'supply = { pressure = "300 barg", temperature = "15 degC" }',
        )
    banks: tuple[tuple[float, float, float], ...] = ()
    switch = None
    if spec.switch_difference is not None and spec.cascade is None:
        raise where.fail(
            "filling.switch_difference",
            "is for a cascade of banks; remove it or give cascade = [ ... ]",
        )
    if spec.flow == "pressure-ramp" and spec.cascade is not None:
        raise where.fail(
            "filling.flow",
            "'pressure-ramp' is for a supply or a compressor; a cascade's flow follows its "
            "banks, so remove flow or give a supply",
        )
    if spec.cascade is not None:
        source, P_supply, T_in = "cascade", None, T_ref
        banks = _banks(spec.cascade, where, P_atm, temperature, entered)
        switch = 5e5
        if spec.switch_difference is not None:
            entered["filling.switch_difference"] = spec.switch_difference
            switch = where.run(
                "filling.switch_difference",
                units.parse_pressure_difference,
                spec.switch_difference,
            )
            if not 0.0 <= switch <= 100e5:
                raise where.fail(
                    "filling.switch_difference",
                    f"'{spec.switch_difference}' is not a switching difference; give 0 to "
                    '100 bar, e.g. "5 bar"',
                )
    elif spec.supply is not None:
        source = "supply"
        entered["filling.supply.pressure"] = spec.supply.pressure
        entered["filling.supply.temperature"] = spec.supply.temperature
        P_supply = where.pressure("filling.supply.pressure", spec.supply.pressure, P_atm)
        T_in = temperature(spec.supply.temperature, "filling.supply.temperature")
        if P_supply <= P_atm:
            raise where.fail(
                "filling.supply.pressure",
                f"'{spec.supply.pressure}' is not above the atmosphere; a supply that fills a "
                "vessel is at a higher pressure",
            )
    else:
        assert spec.compressor is not None
        source, P_supply = "compressor", None
        entered["filling.compressor.delivery_temperature"] = spec.compressor.delivery_temperature
        T_in = temperature(
            spec.compressor.delivery_temperature, "filling.compressor.delivery_temperature"
        )
    T_amb = T_ref
    if spec.ambient_temperature is not None:
        entered["filling.ambient_temperature"] = spec.ambient_temperature
        T_amb = temperature(spec.ambient_temperature, "filling.ambient_temperature")
    P_start, T_start = P_atm, T_amb
    if spec.start is not None:
        entered["filling.start.pressure"] = spec.start.pressure
        P_start = where.pressure("filling.start.pressure", spec.start.pressure, P_atm)
        if spec.start.temperature is not None:
            entered["filling.start.temperature"] = spec.start.temperature
            T_start = temperature(spec.start.temperature, "filling.start.temperature")
    if banks and P_start >= max(P for _, _, P in banks):
        raise where.fail(
            "filling.start.pressure",
            "is not below the pressure of any bank of the cascade; gas flows in only from a "
            "higher pressure",
        )
    if P_supply is not None and P_start >= P_supply:
        raise where.fail(
            "filling.start.pressure",
            f"'{spec.start.pressure if spec.start else P_start}' is not below the supply "
            f"pressure '{spec.supply.pressure if spec.supply else ''}'; gas flows in only from "
            "a higher pressure",
        )
    entered["filling.duration"] = spec.duration
    duration = where.run("filling.duration", units.parse_duration, spec.duration)
    if not 0.0 < duration <= bounds.FILL_DURATION_MAX_s:
        raise where.fail(
            "filling.duration",
            f"'{spec.duration}' is not a fill's duration; give a time above zero and at most "
            f'{bounds.FILL_DURATION_MAX_s / 3600:.0f} h, e.g. "4 min"',
        )
    Cw, wall_source = 0.0, None
    if spec.flow is not None:
        entered["filling.flow"] = spec.flow
    if spec.wall is not None:
        Cw, wall_source = _wall(spec.wall, where, entered, tare_mass_kg)
    ht = spec.heat_transfer
    Ggw = Gwa = 0.0
    if ht is None:
        kind = "lumped" if spec.wall is not None else "adiabatic"
    elif isinstance(ht, str):
        kind = ht
        entered["filling.heat_transfer"] = ht
        if ht == "lumped" and spec.wall is None:
            raise where.fail(
                "filling.heat_transfer",
                "'lumped' shares the heat with the wall, but no wall is given; add "
                'wall = { mass = "58 kg", material = "steel" } or use "adiabatic"',
            )
    else:
        kind = "two-node"
        if spec.wall is None:
            raise where.fail(
                "filling.heat_transfer",
                "a coefficient carries heat from the gas into the wall, but no wall is given; "
                'add wall = { mass = "58 kg", material = "steel" }',
            )
        Ggw, Gwa = _two_node(ht, where, entered)
    limit_K = None
    if max_fill_temperature is not None:
        entered["limits.max_fill_temperature"] = max_fill_temperature
        limit_K = where.run(
            "limits.max_fill_temperature", units.parse_temperature, max_fill_temperature
        )
        if limit_K <= T_amb:
            raise where.fail(
                "limits.max_fill_temperature",
                f"'{max_fill_temperature}' is not above the ambient temperature; a peak gas "
                "temperature limit lies above it (composite cylinders commonly 85 degC)",
            )
    return FillingInput(
        source=source,
        inlet_temperature_K=T_in,
        supply_pressure_Pa=P_supply,
        start_temperature_K=T_start,
        start_pressure_Pa=P_start,
        duration_s=duration,
        ambient_temperature_K=T_amb,
        wall_heat_capacity_J_K=Cw,
        wall_source=wall_source,
        heat_transfer=kind,
        flow=spec.flow or "constant-mass",
        gas_wall_conductance_W_K=Ggw,
        wall_ambient_conductance_W_K=Gwa,
        max_fill_temperature_K=limit_K,
        banks=banks,
        switch_difference_Pa=switch,
    )


def _banks(
    specs: list[BankSpec], where: Any, P_atm: float, temperature: Any, entered: dict[str, str]
) -> tuple[tuple[float, float, float], ...]:
    """A cascade's banks in SI, refusing an empty list and banks at or below the atmosphere."""
    if not 1 <= len(specs) <= 20:
        raise where.fail(
            "filling.cascade",
            f"lists {len(specs)} banks; a cascade has 1 to 20, each "
            '{ water_capacity = "300 L", pressure = "200 barg", temperature = "15 degC" }',
        )
    out = []
    for i, b in enumerate(specs, start=1):
        at = f"filling.cascade[{i}]"
        entered[f"{at}.water_capacity"] = b.water_capacity
        entered[f"{at}.pressure"] = b.pressure
        V = where.run(f"{at}.water_capacity", units.parse_volume, b.water_capacity)
        if not bounds.WATER_CAPACITY_MIN_m3 <= V <= bounds.WATER_CAPACITY_MAX_m3:
            raise where.fail(
                f"{at}.water_capacity",
                f"'{b.water_capacity}' is outside 1 mL to 1000 m³; check the number and the unit",
            )
        P = where.pressure(f"{at}.pressure", b.pressure, P_atm)
        if P <= P_atm:
            raise where.fail(
                f"{at}.pressure",
                f"'{b.pressure}' is not above the atmosphere; a bank that fills is at a "
                "higher pressure",
            )
        T = temperature(b.temperature, f"{at}.temperature")
        out.append((V, T, P))
    return tuple(out)


def _wall(
    w: WallSpec, where: Any, entered: dict[str, str], tare_mass_kg: float | None
) -> tuple[float, str]:
    """The wall's heat capacity m·c [J/K] and where its specific heat comes from.

    Without a mass the wall is the marked tare: the empty cylinder with its valve, the valve
    counted with the wall (it shares some of the heat; common practice, no source)."""
    if w.mass is None:
        if tare_mass_kg is None:
            raise where.fail(
                "filling.wall.mass",
                "is missing and the cylinder has no marked tare to take it from; give "
                'wall = { mass = "58 kg", ... } or marking = { tare_mass = "58 kg" }',
            )
        mass = tare_mass_kg
        entered["filling.wall.mass"] = f"the marked tare, {tare_mass_kg:.4g} kg"
        return _wall_capacity(w, mass, where, entered, "wall mass from the marked tare")
    entered["filling.wall.mass"] = w.mass
    mass = where.run("filling.wall.mass", units.parse_mass, w.mass)
    if not 0.0 < mass <= bounds.MASS_MAX_kg:
        raise where.fail(
            "filling.wall.mass",
            f"'{w.mass}' is not a wall's mass; give a mass above zero, e.g. \"58 kg\"",
        )
    return _wall_capacity(w, mass, where, entered, "")


def _wall_capacity(
    w: WallSpec, mass: float, where: Any, entered: dict[str, str], note: str
) -> tuple[float, str]:
    """m·c [J/K] of a wall of ``mass`` [kg] and the source of its specific heat."""
    said = f"; {note}" if note else ""
    if (w.specific_heat is None) == (w.material is None):
        what = "both" if w.material is not None else "neither"
        raise where.fail(
            "filling.wall",
            f"gives {what} of specific_heat and material; give one, e.g. "
            'specific_heat = "0.48 kJ/(kg K)" or material = "steel"',
        )
    if w.material is not None:
        entered["filling.wall.material"] = w.material
        m = WALL_MATERIALS[w.material]
        return mass * m.specific_heat_J_kgK, m.source + said
    assert w.specific_heat is not None
    entered["filling.wall.specific_heat"] = w.specific_heat
    c = where.run("filling.wall.specific_heat", units.parse_specific_heat, w.specific_heat)
    if not 50.0 <= c <= 5000.0:
        raise where.fail(
            "filling.wall.specific_heat",
            f"'{w.specific_heat}' is not a solid's specific heat; metals and composites lie "
            'between 0.05 and 5 kJ/(kg K) (steel about "0.48 kJ/(kg K)")',
        )
    return mass * c, "as entered" + said


def _two_node(ht: HeatTransferSpec, where: Any, entered: dict[str, str]) -> tuple[float, float]:
    """(hA) gas–wall and wall–ambient [W/K]."""
    entered["filling.heat_transfer.coefficient"] = ht.coefficient
    entered["filling.heat_transfer.area"] = ht.area
    h = where.run(
        "filling.heat_transfer.coefficient", units.parse_heat_transfer_coefficient, ht.coefficient
    )
    A = where.run("filling.heat_transfer.area", units.parse_area, ht.area)
    if not 0.0 < A <= 1e4:
        raise where.fail(
            "filling.heat_transfer.area",
            f"'{ht.area}' is not a vessel's inner area; give an area above zero, e.g. \"0.8 m2\"",
        )
    if not 0.0 < h <= 1e5:
        raise where.fail(
            "filling.heat_transfer.coefficient",
            f"'{ht.coefficient}' is not a gas-side coefficient; give a value above zero and at "
            'most 100000 W/(m2 K), e.g. "150 W/(m2 K)"',
        )
    h_a = 0.0
    if ht.ambient_coefficient is not None:
        entered["filling.heat_transfer.ambient_coefficient"] = ht.ambient_coefficient
        h_a = where.run(
            "filling.heat_transfer.ambient_coefficient",
            units.parse_heat_transfer_coefficient,
            ht.ambient_coefficient,
        )
        if h_a > 1e5:
            raise where.fail(
                "filling.heat_transfer.ambient_coefficient",
                f"'{ht.ambient_coefficient}' is above 100000 W/(m2 K); still air gives about "
                '"10 W/(m2 K)"',
            )
    return h * A, h_a * A
