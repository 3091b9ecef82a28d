"""Many vessels at once: the numbers of every assessment, vectorised over vessels with numpy.

Vessels are grouped by their fluid and model; for each group every quantity is one array call:
the fill densities, the closed-vessel states on a temperature grid per vessel (a vessels ×
points array), the pressures where each limit is reached, the liquid volume at the vapour-space
temperature, and the largest safe charge. Only the words of the findings are then written vessel
by vessel. A single check is a batch of one with a finer grid and exact saturation crossings.
"""

from __future__ import annotations

from collections import defaultdict
from collections.abc import Callable, Sequence

import numpy as np

from fillcheck import units
from fillcheck.assess.cautions import cautions_for
from fillcheck.assess.charge import largest_safe_densities
from fillcheck.assess.findings import vessel_findings
from fillcheck.assess.mixture_findings import dropout_at_coldest, mixture_findings
from fillcheck.assess.result import EndState, VesselAssessment
from fillcheck.assess.uncertainty import pressure_uncertainty
from fillcheck.scenario.resolve import T_HARD_MAX_K, VesselInput
from fillcheck.thermo.fluid import Fluid
from fillcheck.thermo.vessel import VesselPath, saturation_crossing, vessel_path

FINE_STEP_K = 0.5
"""Grid step of a small batch (a scenario file) [K]: fine enough to draw and interpolate."""
MIXTURE_STEP_K = 2.0
"""Grid step for a mixture, each of whose states needs a stability test [K]."""
COARSE_POINTS = 25
"""Points per vessel in a large batch (a register)."""
SMALL_BATCH = 50
"""Up to this many vessels of one gas, crossings are solved exactly and the grid is fine."""


def fill_densities(vs: Sequence[VesselInput], T_ref: float) -> np.ndarray:
    """Overall molar densities from the fill specifications [mol/m³] (one gas and model)."""
    f = vs[0].fluid
    M = f.molar_mass
    kind = np.array([v.fill_kind for v in vs])
    value = np.array([v.fill_value for v in vs])
    V = np.array([v.water_capacity_m3 for v in vs])
    T_fill = np.array([v.fill_temperature_K or T_ref for v in vs])
    rho = np.where(kind == "mass", value / V / M, value / M)
    for k, T in (("pressure", T_fill), ("settled_pressure", np.full(len(vs), T_ref))):
        m = kind == k
        if np.any(m):
            rho[m] = f.density_molar(T[m], value[m])
    return rho


def _grids(vs: Sequence[VesselInput], T_ref: float, small: bool, step: float) -> np.ndarray:
    lo = np.array(
        [
            v.min_temperature_K
            if v.min_temperature_K is not None
            else min(T_ref, v.fill_temperature_K or T_ref, v.max_temperature_K)
            for v in vs
        ]
    )
    hi = np.array([v.max_temperature_K for v in vs])
    k = int(np.clip(np.ceil((hi - lo).max() / step) + 1, 2, 1000)) if small else COARSE_POINTS
    return lo[:, None] + (hi - lo)[:, None] * np.linspace(0.0, 1.0, k)[None, :]


def _first_crossing(T: np.ndarray, P: np.ndarray, limit: np.ndarray) -> np.ndarray:
    """Per row, the lowest T where P reaches ``limit`` (linear interpolation); NaN if never."""
    hit = P >= limit[:, None]
    any_hit = hit.any(axis=1)
    i = np.where(any_hit, hit.argmax(axis=1), 0)
    rows = np.arange(len(T))
    i0 = np.maximum(i - 1, 0)
    T0, T1, P0, P1 = T[rows, i0], T[rows, i], P[rows, i0], P[rows, i]
    with np.errstate(invalid="ignore", divide="ignore"):
        x = np.where(i == 0, T[:, 0], T0 + (limit - P0) * (T1 - T0) / (P1 - P0))
    return np.where(any_hit, x, np.nan)


def _saturation_table_crossings(f: Fluid, rho: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
    """Dew and liquid-full temperatures by interpolation in a saturation table [K] (NaN: none).

    The table is uniform in √(Tc − T), where the saturated densities are close to linear.
    """
    Tc, _, rhoc = f.model_critical
    table = getattr(f, "_crossing_table", None)
    if table is None:
        s = np.linspace(np.sqrt(Tc - f.T_min_saturation), np.sqrt(1e-3), 400)
        table = (Tc - s * s, f.saturation_molar(Tc - s * s))
        f._crossing_table = table  # type: ignore[attr-defined]  # per Fluid, computed once
    T, sat = table
    dew = np.interp(rho, sat.rho_vapor, T, left=np.nan, right=Tc)  # ρ'' rises with T
    full = np.interp(-rho, -sat.rho_liquid, T, left=f.T_min_saturation, right=Tc)  # ρ' falls
    dew = np.where(rho < rhoc, dew, np.nan)
    full = np.where(rho >= rhoc, full, np.nan)
    return dew, full


def _liquid_fraction(f: Fluid, T: np.ndarray, rho: np.ndarray) -> np.ndarray:
    """Volume fraction of liquid at T [K] for overall densities ρ [mol/m³] [-]."""
    st = vessel_path(f, T, rho)
    with np.errstate(invalid="ignore"):
        two = (rho - st.rho_vapor) / (st.rho_liquid - st.rho_vapor)
    rhoc = f.model_critical[2]
    single = np.where(
        st.phase == "liquid", 1.0, np.where((st.phase == "supercritical") & (rho > rhoc), 1.0, 0.0)
    )
    return np.where(st.phase == "two-phase", two, single)


CHUNK_VESSELS = 2000
"""Vessels per vectorised call in a large batch (bounds memory; paces the progress bar)."""


def assess_many(
    vessels: Sequence[VesselInput],
    T_ref: float,
    system: units.UnitSystem = "metric",
    progress: Callable[[int, int], None] | None = None,
) -> list[VesselAssessment]:
    """Assess vessels (in their order), vectorised per gas and model.

    ``progress(done, total)`` is called after each vectorised chunk, if given.
    """
    groups: dict[int, list[int]] = defaultdict(list)
    for i, v in enumerate(vessels):
        groups[id(v.fluid)].append(i)
    out: list[VesselAssessment | None] = [None] * len(vessels)
    done = 0
    for idx in groups.values():
        for lo in range(0, len(idx), CHUNK_VESSELS):
            chunk = idx[lo : lo + CHUNK_VESSELS]
            small = len(idx) <= SMALL_BATCH
            vs = [vessels[i] for i in chunk]
            for i, a in zip(chunk, _assess_group(vs, T_ref, system, small), strict=True):
                out[i] = a
            done += len(chunk)
            if progress is not None:
                progress(done, len(vessels))
    return [a for a in out if a is not None]


def _assess_group(
    vs: Sequence[VesselInput], T_ref: float, system: units.UnitSystem, small: bool
) -> list[VesselAssessment]:
    f = vs[0].fluid
    n = len(vs)
    R, M = f.eos.R, f.molar_mass
    rho = fill_densities(vs, T_ref)
    mixture = getattr(f, "is_mixture", False)
    TT = _grids(vs, T_ref, small, MIXTURE_STEP_K if mixture else FINE_STEP_K)
    k = TT.shape[1]
    path = vessel_path(f, TT.ravel(), np.repeat(rho, k))
    PP = path.P.reshape(n, k)
    phase = path.phase.reshape(n, k)
    dPdT = path.dP_dT.reshape(n, k)
    at_ref = vessel_path(f, np.full(n, T_ref), rho)
    settled = at_ref.P
    liquefied_at_ref = np.isin(at_ref.phase, ("two-phase", "liquid"))
    T_fill = np.array([v.fill_temperature_K or T_ref for v in vs])
    has_fill_T = np.array([v.fill_temperature_K is not None for v in vs])
    fill_P = vessel_path(f, T_fill, rho).P
    is_p = np.array([v.fill_kind == "pressure" for v in vs])
    fill_P = np.where(is_p, [v.fill_value for v in vs], fill_P)
    allow = np.array([v.limits.allowable_pressure_Pa for v in vs])
    relief = np.array([v.limits.relief_set_pressure_Pa or np.nan for v in vs])
    reach_allow = _first_crossing(TT, PP, allow)
    reach_relief = _first_crossing(TT, PP, np.where(np.isnan(relief), np.inf, relief))
    beyond_allow, beyond_relief = _reach_beyond(f, vs, TT, PP, rho, allow, relief, small)
    if small or mixture:
        crossings = [saturation_crossing(f, float(r)) for r in rho]
    else:
        dew, full = _saturation_table_crossings(f, rho)
        crossings = [
            ("dew", None if np.isnan(d) else float(d))
            if np.isnan(fu)
            else ("liquid-full", float(fu))
            for d, fu in zip(dew, full, strict=True)
        ]
    vs_T = np.array([v.limits.vapour_space_temperature_K or np.nan for v in vs])
    has_vs = ~np.isnan(vs_T)
    frac = np.full(n, np.nan)
    if np.any(has_vs):
        frac[has_vs] = _liquid_fraction(f, vs_T[has_vs], rho[has_vs])
    safe, governing = largest_safe_densities(f, vs, T_ref)
    safe_fill_P = np.full(n, np.nan)
    by_weight = np.zeros(n, dtype=bool)
    ok = np.isfinite(safe) & has_fill_T
    if np.any(ok):
        st = vessel_path(f, T_fill[ok], safe[ok])
        liquid_at_fill = np.isin(st.phase, ("two-phase", "liquid"))
        # with liquid in the vessel the pressure does not measure the charge: no stop pressure
        safe_fill_P[ok] = np.where(liquid_at_fill, np.nan, st.P)
        by_weight[ok] = liquid_at_fill
    Tc = f.model_critical[0]
    sat_curve = _saturation_curve(f, TT)
    i_top = PP.argmax(axis=1)
    rows = np.arange(n)
    u_top = pressure_uncertainty(f, TT[rows, i_top], rho, phase[rows, i_top])
    results = []
    for j, v in enumerate(vs):
        p_j = VesselPath(
            TT[j],
            np.full(k, rho[j]),
            PP[j],
            phase[j],
            np.full(k, np.nan),
            dPdT[j],
            np.full(k, np.nan),
            np.full(k, np.nan),
        )
        kind, T_cross = crossings[j]
        # a dense charge holds liquid up to the critical temperature (for a mixture, up to
        # Kay's pseudo-critical one, where its one-phase states stop being called liquid)
        T_top = f.pseudo_critical_K if mixture else Tc
        liquid_below, full_above = (T_cross, None) if kind == "dew" else (T_top, T_cross)
        if full_above is not None and Tc <= TT[j, 0]:
            full_above = None  # liquid-full only below Tc, and the whole range is above it
        fP = float(fill_P[j]) if has_fill_T[j] else None
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
            density_kg_m3=float(rho[j] * M),
            charged_mass_kg=float(rho[j] * M * v.water_capacity_m3),
            fill_temperature_K=v.fill_temperature_K,
            fill_pressure_Pa=fP,
            fill_Z=None if fP is None else fP / (rho[j] * R * v.fill_temperature_K),
            settled_pressure_Pa=float(settled[j]),
            reference_temperature_K=T_ref,
            path_T_K=TT[j],
            path_P_Pa=PP[j],
            path_phase=phase[j],
            max_state=_end(TT[j], PP[j], phase[j], rho[j], R, -1),
            min_state=_end(TT[j], PP[j], phase[j], rho[j], R, 0),
            dP_dT_at_max_Pa_K=float(dPdT[j, -1]),
            liquid_forms_below_K=liquid_below,
            liquid_full_above_K=full_above,
            allowable_reached_at_K=_num(reach_allow[j]),
            relief_reached_at_K=_num(reach_relief[j]),
            max_safe_charge_kg=None
            if not np.isfinite(safe[j])
            else float(safe[j] * M * v.water_capacity_m3),
            max_safe_fill_pressure_Pa=_num(safe_fill_P[j]),
            fill_by_weight=bool(by_weight[j]),
            pressure_uncertainty_at_top=float(u_top[j]),
            governing_limit=governing[j],
            entered=v.entered,
            limits_checked=[],
            hazards=tuple(sorted(f.data.hazards)),
            allowable_pressure_Pa=float(allow[j]),
            relief_set_pressure_Pa=v.limits.relief_set_pressure_Pa,
            liquid_fraction_at_vapour_space_T=_num(frac[j]),
            limit_reached_K={"allowable": _num(beyond_allow[j]), "relief": _num(beyond_relief[j])},
        )
        a.saturation_T_K, a.saturation_P_Pa = sat_curve[j]
        # a mixture filled as a gas that only condenses in the cold is not a liquefied gas
        a.liquefied = bool(liquefied_at_ref[j]) if mixture else None
        a.findings, a.limits_checked = vessel_findings(v, a, p_j, system)
        if mixture:
            a.composition = dict(zip(f.component_names, map(float, f.z), strict=True))
            a.dropout = dropout_at_coldest(f, path, slice(j * k, (j + 1) * k))
            a.findings += mixture_findings(f, a.dropout, v.notes, system, a.liquefied)
        liquid = bool(np.any(np.isin(phase[j], ("two-phase", "liquid"))))
        near = any(x.code == "near-critical" for x in a.findings)
        a.cautions = cautions_for(
            a.hazards,
            liquid=liquid if a.liquefied is None else a.liquefied,
            near_critical=near,
            cold_dropout=liquid and a.liquefied is False,
        )
        results.append(a)
    return results


def _reach_beyond(f: Fluid, vs, TT, PP, rho, allow, relief, small):
    """Temperatures where the isochore reaches each limit, looking past the range to 500 K."""
    k = (40 if getattr(f, "is_mixture", False) else 200) if small else 24
    n = len(vs)
    ext_T = TT[:, -1:] + (T_HARD_MAX_K - TT[:, -1:]) * np.linspace(0.0, 1.0, k)[None, :]
    need = ~(
        (PP >= allow[:, None]).any(1)
        & ((PP >= np.nan_to_num(relief, nan=np.inf)[:, None]).any(1) | np.isnan(relief))
    )
    ext_P = np.full((n, k), -np.inf)
    if np.any(need):
        ext_P[need] = vessel_path(f, ext_T[need].ravel(), np.repeat(rho[need], k)).P.reshape(-1, k)
    T_all = np.concatenate([TT, ext_T], axis=1)
    P_all = np.concatenate([PP, ext_P], axis=1)
    return (
        _first_crossing(T_all, P_all, allow),
        _first_crossing(T_all, P_all, np.where(np.isnan(relief), np.inf, relief)),
    )


def _num(x: float) -> float | None:
    return None if not np.isfinite(x) else float(x)


def _end(T, P, phase, rho, R, i) -> EndState:
    return EndState(float(T[i]), float(P[i]), str(phase[i]), float(P[i] / (rho * R * T[i])))


def _validity_text(f: Fluid, system: units.UnitSystem) -> str:
    """The model's validity range in the report's units."""
    val = f.validity
    P = units.format_pressure(val.P_max_Pa, system, gauge=False, digits=0)
    return (
        f"{units.format_temperature(val.T_min_K, system)} to "
        f"{units.format_temperature(val.T_max_K, system)}, up to {P} ({val.source})"
    )


def _saturation_curve(f: Fluid, TT: np.ndarray) -> list[tuple[np.ndarray, np.ndarray]]:
    """Per vessel, the saturation curve over its range widened by 10 K, below Tc [K, Pa].

    A mixture has no single saturation curve; its bubble-point curve would cost a two-phase
    band scan per point, more than the rest of its check, so its chart shows the vessel's path
    (with the liquid-present part marked) without one."""
    if getattr(f, "is_mixture", False):
        return [(np.zeros(0), np.zeros(0))] * len(TT)
    Tc = f.model_critical[0]
    lo = max(f.T_min_saturation, float(TT[:, 0].min()) - 10.0)
    hi = min(Tc - 1e-3, float(TT[:, -1].max()) + 10.0)
    if hi <= lo:
        return [(np.zeros(0), np.zeros(0))] * len(TT)
    T = np.linspace(lo, hi, 80)
    P = f.saturation_molar(T).P
    out = []
    for row in TT:
        m = (T >= row[0] - 10.0) & (T <= row[-1] + 10.0)
        out.append((T[m], P[m]))
    return out
