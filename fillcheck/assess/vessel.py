"""One vessel: charge, closed-vessel path over the storage range, limits, findings, verdict.

A pure function of a validated :class:`~fillcheck.scenario.resolve.VesselInput`: it asks
:mod:`fillcheck.thermo` for states and returns a :class:`VesselAssessment`; it prints nothing.
"""

from __future__ import annotations

import numpy as np

from fillcheck import units
from fillcheck.assess.cautions import cautions_for
from fillcheck.assess.charge import largest_safe_density
from fillcheck.assess.findings import vessel_findings
from fillcheck.assess.result import EndState, VesselAssessment
from fillcheck.scenario.resolve import VesselInput
from fillcheck.thermo.fluid import Fluid
from fillcheck.thermo.vessel import VesselPath, saturation_crossing, vessel_path

GRID_STEP_K = 0.5
"""Spacing of the storage-range states [K]: fine enough to draw and to interpolate a limit."""


def fill_density_mol(v: VesselInput, T_ref: float) -> float:
    """The vessel's overall molar density from its fill specification [mol/m³]."""
    f, M = v.fluid, v.fluid.molar_mass
    if v.fill_kind == "pressure":
        return float(f.density_molar(np.array(v.fill_temperature_K), np.array(v.fill_value)))
    if v.fill_kind == "settled_pressure":
        return float(f.density_molar(np.array(T_ref), np.array(v.fill_value)))
    if v.fill_kind == "mass":
        return v.fill_value / v.water_capacity_m3 / M
    return v.fill_value / M  # filling ratio in kg/m³ of water capacity


def storage_grid(v: VesselInput, T_ref: float) -> np.ndarray:
    """Temperatures from the lowest to the highest storage temperature [K]."""
    lo = v.min_temperature_K
    if lo is None:
        lo = min(T_ref, v.fill_temperature_K or T_ref, v.max_temperature_K)
    hi = v.max_temperature_K
    n = max(2, int(np.ceil((hi - lo) / GRID_STEP_K)) + 1)
    return np.linspace(lo, hi, n)


def _crossing(path: VesselPath, limit: float | None) -> float | None:
    """Lowest temperature on the path where the pressure reaches ``limit`` [K] (interpolated)."""
    if limit is None:
        return None
    hit = np.flatnonzero(path.P >= limit)
    if hit.size == 0:
        return None
    i = hit[0]
    if i == 0:
        return float(path.T[0])
    T0, T1, P0, P1 = path.T[i - 1], path.T[i], path.P[i - 1], path.P[i]
    return float(T0 + (limit - P0) * (T1 - T0) / (P1 - P0))


def _end(path: VesselPath, i: int, R: float) -> EndState:
    Z = path.P[i] / (path.rho_mol[i] * R * path.T[i])
    return EndState(float(path.T[i]), float(path.P[i]), str(path.phase[i]), float(Z))


def _validity_text(f: Fluid, system: units.UnitSystem) -> str:
    """The model's validity range in the report's units."""
    val = f.validity
    P = units.format_pressure(val.P_max_Pa, system, gauge=False, digits=0)
    return (
        f"{units.format_temperature(val.T_min_K, system)} to "
        f"{units.format_temperature(val.T_max_K, system)}, up to {P} ({val.source})"
    )


def _saturation_curve(f: Fluid, grid: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
    """Saturation pressures over the storage range widened by 10 K, below Tc [K, Pa]."""
    Tc = f.model_critical[0]
    lo = max(f.T_min_saturation, grid[0] - 10.0)
    hi = min(Tc - 1e-3, grid[-1] + 10.0)
    if hi <= lo:
        return np.zeros(0), np.zeros(0)
    T = np.linspace(lo, hi, 80)
    return T, f.saturation_molar(T).P


def assess_vessel(
    v: VesselInput, T_ref: float, system: units.UnitSystem = "metric"
) -> VesselAssessment:
    """Assess one vessel against its limits over its storage range."""
    f = v.fluid
    R, M = f.eos.R, f.molar_mass
    rho_mol = fill_density_mol(v, T_ref)
    grid = storage_grid(v, T_ref)
    path = vessel_path(f, grid, rho_mol)
    settled = vessel_path(f, np.array([T_ref]), rho_mol)
    fill_P = fill_Z = None
    if v.fill_temperature_K is not None:
        fill_P = (
            v.fill_value
            if v.fill_kind == "pressure"
            else float(vessel_path(f, np.array([v.fill_temperature_K]), rho_mol).P[0])
        )
        fill_Z = fill_P / (rho_mol * R * v.fill_temperature_K)
    kind, T_cross = saturation_crossing(f, rho_mol)
    Tc = f.model_critical[0]
    if kind == "dew":
        liquid_below, full_above = T_cross, None
    else:
        liquid_below, full_above = Tc, T_cross
    lim = v.limits
    safe = largest_safe_density(f, v, T_ref)
    max_charge = safe.density_mol * M * v.water_capacity_m3 if safe else None
    safe_fill_P = None
    if safe is not None and v.fill_temperature_K is not None:
        safe_fill_P = float(vessel_path(f, np.array([v.fill_temperature_K]), safe.density_mol).P[0])
    a = VesselAssessment(
        id=v.id,
        gas=f.name,
        model=f.model,
        model_name=f.model_name,
        model_references=f.references,
        model_validity=_validity_text(f, system),
        data_sources=dict(f.data.sources),
        count=v.count,
        water_capacity_m3=v.water_capacity_m3,
        density_kg_m3=rho_mol * M,
        charged_mass_kg=rho_mol * M * v.water_capacity_m3,
        fill_temperature_K=v.fill_temperature_K,
        fill_pressure_Pa=fill_P,
        fill_Z=fill_Z,
        settled_pressure_Pa=float(settled.P[0]),
        reference_temperature_K=T_ref,
        path_T_K=path.T,
        path_P_Pa=path.P,
        path_phase=path.phase,
        max_state=_end(path, -1, R),
        min_state=_end(path, 0, R),
        dP_dT_at_max_Pa_K=float(path.dP_dT[-1]),
        liquid_forms_below_K=liquid_below,
        liquid_full_above_K=full_above,
        allowable_reached_at_K=_crossing(path, lim.allowable_pressure_Pa),
        relief_reached_at_K=_crossing(path, lim.relief_set_pressure_Pa),
        max_safe_charge_kg=max_charge,
        max_safe_fill_pressure_Pa=safe_fill_P,
        governing_limit=safe.governing if safe else None,
        entered=v.entered,
        limits_checked=[],
        hazards=tuple(sorted(f.data.hazards)),
    )
    a.saturation_T_K, a.saturation_P_Pa = _saturation_curve(f, grid)
    a.allowable_pressure_Pa = lim.allowable_pressure_Pa
    a.relief_set_pressure_Pa = lim.relief_set_pressure_Pa
    a.findings, a.limits_checked = vessel_findings(v, a, path, system)
    liquid = bool(np.any(np.isin(path.phase, ("two-phase", "liquid"))))
    near = any(x.code == "near-critical" for x in a.findings)
    a.cautions = cautions_for(a.hazards, liquid=liquid, near_critical=near)
    return a
