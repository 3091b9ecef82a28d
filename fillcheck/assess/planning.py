"""Fill planning at the station: stop-fill pressures by gas temperature, and reading a gauge.

A fill is planned as a charge (an overall density). While the gas is warm from compression its
pressure is higher than it will be once settled, so the pressure to stop at depends on the gas
temperature: it is the closed-vessel pressure P(T_gas, ρ_target). Read the other way, a measured
pressure and gas temperature give the charge, ρ(T, P), and from it the settled pressure.
"""

from __future__ import annotations

from dataclasses import dataclass
from typing import Any

import numpy as np

from fillcheck.assess.charge import largest_safe_density
from fillcheck.assess.vessel import fill_density_mol
from fillcheck.errors import InputError
from fillcheck.scenario.resolve import VesselInput
from fillcheck.thermo.liquid_band import (
    GAUGE_UNCERTAINTY,
    THERMOMETER_UNCERTAINTY_K,
    in_liquid_band,
)
from fillcheck.thermo.vessel import vessel_path


@dataclass(frozen=True)
class StopRow:
    """One row of a stop-fill table: gas temperature [K], stop pressure [Pa abs], phase."""

    gas_temperature_K: float
    stop_pressure_Pa: float
    phase: str
    safe_stop_pressure_Pa: float | None
    weigh: bool = False
    """The planned charge's stop pressure lies in the band near the vapour pressure
    (thermo.liquid_band): the pressure does not tell the charge there; weigh the fill."""
    outside_range: bool = False
    """The stop pressure lies outside the model's validity range: not vouched for (review)."""


@dataclass(frozen=True)
class BlendStopStep:
    """One step of a blend made in the vessel, by gas temperature: the component added, its
    mass and the contents' mass after it [kg], and the pressure to stop that step at
    [Pa abs] at each of the table's gas temperatures (None where the contents hold liquid, or
    a single gas's stop pressure lies in its liquid band: weigh that step)."""

    component: str
    added_mass_kg: float
    cumulative_mass_kg: float
    stop_pressure_Pa: list[float | None]
    liquid_at_blend_temperature: bool
    cannot_be_made: bool = False
    """The residual already holds more of the component than the target (vent first): the
    step has no stop pressure."""


@dataclass(frozen=True)
class StopTable:
    """The stop-fill table of one vessel."""

    vessel_id: str
    gas: str
    model: str
    model_name: str
    model_source: str
    target_density_kg_m3: float
    target_charge_kg: float
    settled_pressure_Pa: float
    reference_temperature_K: float
    max_safe_charge_kg: float | None
    governing_limit: str | None
    rows: list[StopRow]
    fill_end_temperature_K: float | None = None
    """Where the table's temperatures come from the fill process (``stop-table --from-fill``):
    the computed gas temperature at the end of the fill [K], one of the rows."""
    over_plan: bool = False
    """Whether the planned charge is above the largest charge keeping every limit before that
    is rounded down to the printed figure (a fill entered exactly at a marked working pressure
    is not over, though the printed figure lies up to 10 g below it)."""
    by_weight: bool = False
    """The vessel's fill is given by mass: it is stopped by the scale reading, and the printout
    gives that reading instead of a table of pressures per gas temperature."""
    tare_mass_kg: float | None = None
    """The marked empty weight [kg] (the scale reading is tare + charge), or None."""
    blend_order: list[str] | None = None
    """For a blend made in the vessel ([vessel.blend]): the order the recipe takes."""
    blend_temperature_K: float | None = None
    blend_steps: list[BlendStopStep] | None = None
    """Each blend step's stop pressure at the table's gas temperatures (``rows``)."""
    blend_steps_largest: list[BlendStopStep] | None = None
    """The same for the largest charge within the limits, where the planned charge is above it
    (the recipe to fill instead)."""


def fill_temperatures(v: VesselInput, T_ref: float, step_K: float) -> tuple[np.ndarray, float]:
    """The gas temperatures [K] a stop table takes from the vessel's fill process: from the
    ambient temperature (a slow fill, the gas cooled to the bay) to the computed end-of-fill
    temperature, in ``step_K``, that end temperature included; and the end temperature.

    Raises InputError where the vessel has no ``[vessel.filling]`` or its fill is not computed."""
    from fillcheck.assess.fill_process import fill_result
    from fillcheck.errors import InputError

    if v.filling is None:
        raise InputError(
            f"vessel {v.id}: --from-fill takes the gas temperatures from the fill process, but "
            "the vessel has no [vessel.filling] table; add one or give --from and --to"
        )
    r = fill_result(v, T_ref)
    T_end = r.stop_temperature_K if r is not None else None
    if T_end is None:
        raise InputError(
            f"vessel {v.id}: the fill process does not reach the charge the fill asks for, so "
            "it gives no end-of-fill temperature; give --from and --to"
        )
    lo = min(v.filling.ambient_temperature_K, T_end)
    T = np.arange(lo, T_end, step_K) if T_end > lo else np.zeros(0)
    T = T[T < T_end - 0.25 * step_K]  # no row a hair's breadth from the end temperature
    return np.append(T, T_end), float(T_end)


def stop_table(v: VesselInput, T_ref: float, temperatures_K: np.ndarray) -> StopTable:
    """Stop-fill pressures of the vessel's planned charge over gas temperatures [K]."""
    f = v.fluid
    rho = fill_density_mol(v, T_ref)
    T = np.asarray(temperatures_K, dtype=float)
    path = vessel_path(f, T, rho)
    safe = largest_safe_density(f, v, T_ref)
    safe_P = vessel_path(f, T, safe.density_mol).P if safe is not None else None
    liquid = np.isin(path.phase, ("two-phase", "liquid"))
    band = liquid | in_liquid_band(f, T, path.P)
    outside = ~f.validity.contains(T, path.P)
    if safe_P is not None:
        band |= in_liquid_band(f, T, safe_P)
        outside |= ~f.validity.contains(T, safe_P)
    rows = [
        StopRow(
            float(t),
            float(p),
            str(ph),
            None if safe_P is None or band[i] or outside[i] else float(safe_P[i]),
            bool(band[i]),
            bool(outside[i]),
        )
        for i, (t, p, ph) in enumerate(zip(path.T, path.P, path.phase, strict=True))
    ]
    M = f.molar_mass
    over = _over_plan(v, T_ref, rho)
    largest = None if safe is None else safe.density_mol * M * v.water_capacity_m3
    return StopTable(
        vessel_id=v.id,
        gas=f.name,
        model=f.model,
        model_name=f.model_name,
        model_source=_source(f),
        target_density_kg_m3=rho * M,
        target_charge_kg=rho * M * v.water_capacity_m3,
        settled_pressure_Pa=float(vessel_path(f, np.array([T_ref]), rho).P[0]),
        reference_temperature_K=T_ref,
        max_safe_charge_kg=None if safe is None else safe.density_mol * M * v.water_capacity_m3,
        governing_limit=None if safe is None else safe.governing,
        rows=rows,
        over_plan=over,
        by_weight=v.fill_kind == "mass",
        tare_mass_kg=None if v.marking is None else v.marking.tare_mass_kg,
        **_blend_steps(v, rho * M * v.water_capacity_m3, T, largest if over else None),
    )


def _blend_steps(
    v: VesselInput, charge_kg: float, T: np.ndarray, largest_kg: float | None
) -> dict[str, object]:
    """The StopTable fields of a blend: the recipe of the planned charge (assess.blend), each
    step followed over the gas temperatures T [K]; and the same for ``largest_kg`` [kg], the
    largest charge within the limits, where the plan is above it."""
    if getattr(v, "blend", None) is None:
        return {}
    from fillcheck.assess.blend import blend_recipe

    r = blend_recipe(v, charge_kg)
    if r.error is not None:
        return {}
    out: dict[str, object] = {
        "blend_order": list(r.order),
        "blend_temperature_K": r.temperature_K,
        "blend_steps": _step_pressures(v, r, T),
    }
    if largest_kg is not None and largest_kg > 0.0:
        r2 = blend_recipe(v, largest_kg)
        if r2.error is None and list(r2.order) == list(r.order):
            out["blend_steps_largest"] = _step_pressures(v, r2, T)
    return out


def _step_pressures(v: VesselInput, r: Any, T: np.ndarray) -> list[BlendStopStep]:
    """Each step of recipe ``r``: its contents rebuilt from the step masses and followed over
    the gas temperatures T [K] ("weigh it", None, where they hold liquid or a single gas lies in
    its liquid band)."""
    from fillcheck.assess.blend import LIQUID_PHASES, _content_fluid

    f = v.fluid
    names = list(f.component_names)
    masses = np.array([r.residual_masses_kg.get(c, 0.0) for c in names])
    steps = []
    for s in r.steps:
        if s.added_mass_kg < 0.0:
            steps.append(
                BlendStopStep(
                    s.component,
                    s.added_mass_kg,
                    s.cumulative_mass_kg,
                    [None] * T.size,
                    s.liquid_present,
                    cannot_be_made=True,
                )
            )
            continue
        masses[names.index(s.component)] += s.added_mass_kg
        n = masses / f.molar_masses
        g = _content_fluid(f, n > 0.0, n)
        path = vessel_path(g, T, np.full(T.shape, n.sum() / v.water_capacity_m3))
        liquid = np.isin(path.phase, LIQUID_PHASES)
        if not getattr(g, "is_mixture", False):  # the band of a single gas, as in its own table
            liquid |= in_liquid_band(g, T, path.P)
        steps.append(
            BlendStopStep(
                component=s.component,
                added_mass_kg=s.added_mass_kg,
                cumulative_mass_kg=s.cumulative_mass_kg,
                stop_pressure_Pa=[
                    None if q else float(P) for q, P in zip(liquid, path.P, strict=True)
                ],
                liquid_at_blend_temperature=s.liquid_present,
            )
        )
    return steps


def _over_plan(v: VesselInput, T_ref: float, rho: float) -> bool:
    """Whether a target density [mol/m³] is above the unrounded largest safe density."""
    exact = largest_safe_density(v.fluid, v, T_ref, round_down=False)
    return exact is None or rho > exact.density_mol * (1.0 + 1e-9)


@dataclass(frozen=True)
class Reading:
    """What a gauge reading says: charge [kg], settled pressure [Pa abs], fullness [-]."""

    vessel_id: str
    gas: str
    model: str
    model_name: str
    model_source: str
    measured_pressure_Pa: float
    gas_temperature_K: float
    phase: str
    charge_kg: float
    settled_pressure_Pa: float
    reference_temperature_K: float
    fraction_of_target: float
    fraction_of_max_safe: float | None
    charge_low_kg: float = float("nan")
    charge_high_kg: float = float("nan")
    """The charge band from the gauge's and the thermometer's errors [kg]."""
    gauge_uncertainty: float = GAUGE_UNCERTAINTY
    thermometer_uncertainty_K: float = THERMOMETER_UNCERTAINTY_K
    may_exceed_plan: bool = False
    """Whether the top of the charge band is above the largest safe charge."""
    blended: bool = False
    """The vessel is blended in the cylinder ([vessel.blend]): the reading is of the finished
    mixture; part-way through the blend the contents are not that mixture."""


def _source(f) -> str:
    """The model's publications, and a warning where no error is known for it."""
    refs = "; ".join(f.references)
    if f.data.user_defined:
        return refs + " — REVIEW: the gas is defined by the user; its numbers rest on user data"
    if f.model_error is None:
        return refs + " — REVIEW: this model's error is not known for this gas"
    missing = getattr(f, "kij_missing", None) if f.model != "reference" else None
    if missing:
        return refs + f" — REVIEW: no published kij for {', '.join(missing)} (kij = 0 used)"
    return refs


def read_gauge(
    v: VesselInput,
    T_ref: float,
    P_Pa: float,
    T_K: float,
    gauge: float = GAUGE_UNCERTAINTY,
    dT: float = THERMOMETER_UNCERTAINTY_K,
) -> Reading:
    """Interpret a measured pressure [Pa abs] at a gas temperature [K] for this vessel.

    The charge comes with a band: the corners of the gauge's relative error ``gauge`` and the
    thermometer's ``dT`` [K] (defaults: thermo.liquid_band, common practice, no source).
    Raises InputError where the reading cannot tell the charge: within the band near the vapour
    pressure (thermo.liquid_band, shared with the fill check and the stop table), where a
    liquefied gas shows its vapour pressure whatever its charge.
    """
    f = v.fluid
    if T_K < f.T_min_saturation:
        raise InputError(
            f"vessel '{v.id}': a gas temperature of {T_K - 273.15:.1f} °C is below the triple "
            f"point of {f.name}; check the thermometer reading"
        )
    if bool(in_liquid_band(f, np.array([T_K]), np.array([P_Pa]), gauge, dT)[0]):
        where = (
            f"between the dew and bubble pressures of {f.name}"
            if getattr(f, "is_mixture", False)
            else f"within the vapour pressure of {f.name}, or above it,"
        )
        raise InputError(
            f"vessel '{v.id}': the reading lies {where} for a gas temperature within "
            f"{dT:.0f} K of the one given (and {gauge:.0%} of gauge error), so the vessel may "
            "hold liquid and its pressure does not tell the charge; weigh it"
        )
    rho = float(f.density_molar(np.array([T_K]), np.array([P_Pa]))[0])
    corners_T = np.array([T_K + dT, T_K - dT])  # warm and high reading: least; cold: most
    corners_P = np.array([P_Pa * (1.0 - gauge), P_Pa * (1.0 + gauge)])
    corners_T = np.maximum(corners_T, f.T_min_saturation)
    rho_band = np.asarray(f.density_molar(corners_T, corners_P), dtype=float)
    st = vessel_path(f, np.array([T_K]), rho)
    settled = float(vessel_path(f, np.array([T_ref]), rho).P[0])
    target = fill_density_mol(v, T_ref)
    safe = largest_safe_density(f, v, T_ref)
    M = f.molar_mass
    V = v.water_capacity_m3
    return Reading(
        vessel_id=v.id,
        gas=f.name,
        model=f.model,
        model_name=f.model_name,
        model_source=_source(f),
        measured_pressure_Pa=P_Pa,
        gas_temperature_K=T_K,
        phase=str(st.phase[0]),
        charge_kg=rho * M * V,
        settled_pressure_Pa=settled,
        reference_temperature_K=T_ref,
        fraction_of_target=rho / target,
        fraction_of_max_safe=None if safe is None else rho / safe.density_mol,
        charge_low_kg=float(rho_band.min() * M * V),
        charge_high_kg=float(rho_band.max() * M * V),
        gauge_uncertainty=gauge,
        thermometer_uncertainty_K=dT,
        may_exceed_plan=safe is None or float(rho_band.max()) > safe.density_mol,
        blended=getattr(v, "blend", None) is not None,
    )
