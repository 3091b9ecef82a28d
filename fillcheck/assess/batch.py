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

from fillcheck.assess.blend import (
    blend_findings,
    blend_recipe,
)
from fillcheck.assess.cautions import cautions_for, gas_facts
from fillcheck.assess.charge import largest_safe_densities
from fillcheck.assess.checked_range import checked_ranges
from fillcheck.assess.fill_process import fill_result, filling_findings, plan_fill_findings
from fillcheck.assess.fill_process import limits_checked as fill_limits_checked
from fillcheck.assess.findings import vessel_findings
from fillcheck.assess.markings import apply_marking, rated_pressures
from fillcheck.assess.mixture_findings import dropout_at_coldest, mixture_findings
from fillcheck.assess.result import EndState, VesselAssessment
from fillcheck.assess.uncertainty import pressure_uncertainty
from fillcheck.scenario.resolve import VesselInput
from fillcheck.thermo.bracketed import illinois
from fillcheck.thermo.fluid import Fluid
from fillcheck.thermo.limits import FIRE_TEMPERATURE_K, highest_temperature_K
from fillcheck.thermo.vessel import VesselPath, saturation_crossings, vessel_path

FINE_POINTS = 161
"""Grid points per vessel of a small batch (a scenario file): enough to draw its chart."""
MIXTURE_POINTS = 41
"""Grid points per mixture vessel, each of whose states needs a stability test."""
COARSE_POINTS = 25
"""Grid points per vessel in a large batch (a register, which draws no chart)."""
SMALL_BATCH = 50
"""Up to this many vessels of one gas, the grid is fine enough for charts. Every finding and
every number a report or JSON shows is solved exactly, whatever the batch size."""


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


def _grids(vs: Sequence[VesselInput], T_ref: float, small: bool, mixture: bool) -> np.ndarray:
    """Temperatures over each vessel's checked range: the grid draws the charts and brackets
    the limit crossings, which are then solved exactly. A pure gas's findings do not rest on it
    (crossings and ranges are exact), so a large batch takes a coarser grid; a mixture's
    two-phase window is read off its grid, so a mixture takes the same grid at every batch
    size, and its findings never depend on its neighbours."""
    lo, hi = checked_ranges(vs, T_ref)
    k = MIXTURE_POINTS if mixture else (FINE_POINTS if small else COARSE_POINTS)
    return lo[:, None] + (hi - lo)[:, None] * np.linspace(0.0, 1.0, k)[None, :]


def _bracket(
    T: np.ndarray, P: np.ndarray, limit: np.ndarray
) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
    """Per row, the interpolated first T where P reaches ``limit`` and the grid bracket around
    it (T below, T at or above); NaN where never reached."""
    hit = P >= limit[:, None]
    any_hit = hit.any(axis=1)
    i = np.where(any_hit, hit.argmax(axis=1), 0)
    rows = np.arange(len(T))
    i0 = np.maximum(i - 1, 0)
    T0, T1, P0, P1 = T[rows, i0], T[rows, i], P[rows, i0], P[rows, i]
    with np.errstate(invalid="ignore", divide="ignore"):
        x = np.where(i == 0, T[:, 0], T0 + (limit - P0) * (T1 - T0) / (P1 - P0))
    nan = np.nan
    return np.where(any_hit, x, nan), np.where(any_hit, T0, nan), np.where(any_hit, T1, nan)


def exact_reach(
    f: Fluid, rho: np.ndarray, T: np.ndarray, P: np.ndarray, limit: np.ndarray
) -> np.ndarray:
    """Per row, the lowest temperature [K] where the isochore's pressure reaches ``limit`` [Pa]
    (NaN where it does not on the grid's span), solved on the isochore itself.

    The grid only brackets the crossing; the root of P(T, ρ) = limit is then refined by the
    shared bracketed solver (thermo.bracketed), all vessels together, to a millikelvin for a
    mixture and a microkelvin otherwise, and the upper end of the final bracket is returned
    (the limit is reached there, never below the root). Along an isochore P rises with T, so
    the bracket holds one root; a vessel at or above the limit at the bottom of the grid
    reaches it there."""
    x, a, b = _bracket(T, P, limit)
    out = x.copy()
    idx = np.flatnonzero(np.isfinite(x) & (b > a))
    if idx.size == 0:
        return out
    mixture = getattr(f, "is_mixture", False)
    a, b, r, L = a[idx], b[idx], rho[idx], limit[idx]
    found = illinois(
        lambda j, t: vessel_path(f, t, r[j]).P - L[j],
        a,
        b,
        vessel_path(f, a, r).P - L,
        vessel_path(f, b, r).P - L,
        width=1e-3 if mixture else 1e-6,
        max_iter=60,
    )
    # the first T at which P ≥ limit: the bracket's upper end, where the limit is reached
    out[idx] = found.b
    return out


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
            for i, a in zip(chunk, _assess_group(vs, T_ref, small), strict=True):
                out[i] = a
            done += len(chunk)
            if progress is not None:
                progress(done, len(vessels))
    return [a for a in out if a is not None]


def _crossings(f: Fluid, rho: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
    """Per vessel, (liquid-full?, crossing temperature [K] or NaN), solved exactly."""
    if getattr(f, "is_mixture", False):
        pairs = [f.saturation_crossing(float(r)) for r in rho]
        full = np.array([k == "liquid-full" for k, _ in pairs], dtype=bool)
        T = np.array([np.nan if t is None else t for _, t in pairs], dtype=float)
        return full, T
    return saturation_crossings(f, rho)


def _assess_group(vs: Sequence[VesselInput], T_ref: float, small: bool) -> list[VesselAssessment]:
    f = vs[0].fluid
    n = len(vs)
    R, M = f.eos.R, f.molar_mass
    rho = fill_densities(vs, T_ref)
    mixture = getattr(f, "is_mixture", False)
    TT = _grids(vs, T_ref, small, mixture)
    T_hi = TT[:, -1]
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
    at_fill = vessel_path(f, T_fill, rho)
    fill_P = at_fill.P
    is_p = np.array([v.fill_kind == "pressure" for v in vs])
    fill_P = np.where(is_p, [v.fill_value for v in vs], fill_P)
    allow = np.array([v.limits.allowable_pressure_Pa for v in vs])
    relief = np.array([v.limits.relief_set_pressure_Pa or np.nan for v in vs])
    relief_or_inf = np.where(np.isnan(relief), np.inf, relief)
    reach = _reach(
        f,
        TT,
        PP,
        rho,
        {"allowable": allow, "relief": relief_or_inf, "validity": np.full(n, f.validity.P_max_Pa)},
    )
    full, T_cross = _crossings(f, rho)
    vs_T = np.array([v.limits.vapour_space_temperature_K or np.nan for v in vs])
    has_vs = ~np.isnan(vs_T)
    frac = np.full(n, np.nan)
    if np.any(has_vs):
        frac[has_vs] = _liquid_fraction(f, vs_T[has_vs], rho[has_vs])
    frac_top = _liquid_fraction(f, T_hi, rho)
    safe, governing = largest_safe_densities(f, vs, T_ref)
    safe_fill_P = np.full(n, np.nan)
    by_weight = np.zeros(n, dtype=bool)
    ok = np.isfinite(safe)
    if np.any(ok):
        st = vessel_path(f, T_fill[ok], safe[ok])
        liquid_at_fill = np.isin(st.phase, ("two-phase", "liquid"))
        # with liquid in the vessel the pressure does not measure the charge: no stop pressure
        # (nor where the stop pressure would lie outside the model's range)
        inside = f.validity.contains(T_fill[ok], st.P)
        safe_fill_P[ok] = np.where(liquid_at_fill | ~inside | ~has_fill_T[ok], np.nan, st.P)
        by_weight[ok] = liquid_at_fill
    Tc = f.model_critical[0]
    sat_curve = _saturation_curve(f, TT)
    rows = np.arange(n)
    u_top = pressure_uncertainty(f, T_hi, rho, phase[rows, -1])
    T_upper = highest_temperature_K(f)
    rated = rated_pressures(f, vs, rho)
    results = []
    facts = gas_facts(f)
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
        T_c = None if np.isnan(T_cross[j]) else float(T_cross[j])
        # a dense charge holds liquid up to the critical temperature (for a mixture, up to
        # Kay's pseudo-critical one, where its one-phase states stop being called liquid)
        T_top = f.pseudo_critical_K if mixture else Tc
        liquid_below, full_above = (T_top, T_c) if full[j] else (T_c, None)
        if full_above is not None and Tc <= TT[j, 0]:
            full_above = None  # liquid-full only below Tc, and the whole range is above it
        fP = float(fill_P[j]) if has_fill_T[j] else None
        a = VesselAssessment(
            id=v.id,
            gas=f.name,
            model=f.model,
            model_name=f.model_name,
            model_references=f.references,
            model_validity=f.validity,
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
            allowable_reached_at_K=_within(reach["allowable"][j], T_hi[j]),
            relief_reached_at_K=_within(reach["relief"][j], T_hi[j]),
            max_safe_charge_kg=None
            if not np.isfinite(safe[j])
            else round(float(safe[j] * M * v.water_capacity_m3), 9),
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
            liquid_fraction_at_top=_num(frac_top[j]),
            limit_reached_K={
                name: _num(reach[name][j]) for name in ("allowable", "relief", "validity")
            },
            highest_computed_K=T_upper,
            atmospheric_pressure_Pa=v.atmospheric_pressure_Pa,
            fill_phase=str(at_fill.phase[j]) if has_fill_T[j] else None,
            min_vapour_space=v.limits.min_vapour_space,
            vapour_space_temperature_K=v.limits.vapour_space_temperature_K,
        )
        a.saturation_T_K, a.saturation_P_Pa = sat_curve[j]
        # a mixture filled as a gas that only condenses in the cold is not a liquefied gas
        a.liquefied = bool(liquefied_at_ref[j]) if mixture else None
        a.findings, a.limits_checked = vessel_findings(v, a, p_j)
        apply_marking(v, a, rated[j])
        if v.filling is not None:  # the fill process (assess.fill_process)
            a.filling = fill_result(v, T_ref)
            a.findings += filling_findings(v, a.filling)
            a.findings += plan_fill_findings(v, a, T_ref)
            a.limits_checked += fill_limits_checked(v)
        if mixture:
            a.composition = dict(zip(f.component_names, map(float, f.z), strict=True))
            a.dropout = dropout_at_coldest(f, path, slice(j * k, (j + 1) * k))
            a.findings += mixture_findings(f, a.dropout, v.notes, a.liquefied)
        if mixture and v.blend is not None:  # the blend recipe (assess.blend)
            a.blend = blend_recipe(v, a.charged_mass_kg)
            a.findings += blend_findings(a.blend)
        liquid = any(x.code in ("liquid-present", "liquid-full-at-top") for x in a.findings)
        near = any(x.code == "near-critical" for x in a.findings)
        a.cautions = cautions_for(
            facts,
            liquid=liquid if a.liquefied is None else a.liquefied,
            near_critical=near,
            cold_dropout=liquid and a.liquefied is False,
            fire=float(T_hi[j]) > FIRE_TEMPERATURE_K,
        )
        if a.blend is not None:
            a.cautions += a.blend.cautions
        results.append(a)
    return results


def _reach(
    f: Fluid, TT: np.ndarray, PP: np.ndarray, rho: np.ndarray, limits: dict[str, np.ndarray]
) -> dict[str, np.ndarray]:
    """Per limit [Pa], the exact temperature [K] where each vessel's isochore reaches it, looking
    past the checked range up to the highest temperature fillcheck computes (NaN: never)."""
    n = len(rho)
    T_end = highest_temperature_K(f)
    k = 24
    ext_T = TT[:, -1:] + np.maximum(T_end - TT[:, -1:], 0.0) * np.linspace(0.0, 1.0, k)[None, :]
    tops = PP[:, -1]
    need = np.zeros(n, dtype=bool)
    for L in limits.values():
        need |= np.isfinite(L) & (tops < L)
    ext_P = np.full((n, k), -np.inf)
    if np.any(need):
        ext_P[need] = vessel_path(f, ext_T[need].ravel(), np.repeat(rho[need], k)).P.reshape(-1, k)
    T_all = np.concatenate([TT, ext_T[:, 1:]], axis=1)
    P_all = np.concatenate([PP, ext_P[:, 1:]], axis=1)
    return {name: exact_reach(f, rho, T_all, P_all, L) for name, L in limits.items()}


def _within(T: float, T_hi: float) -> float | None:
    """A reach temperature inside the checked range, else None."""
    return None if not np.isfinite(T) or T > T_hi + 1e-9 else float(T)


def _num(x: float) -> float | None:
    return None if not np.isfinite(x) else float(x)


def _end(T, P, phase, rho, R, i) -> EndState:
    return EndState(float(T[i]), float(P[i]), str(phase[i]), float(P[i] / (rho * R * T[i])))


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
