"""The fill process of a vessel (INTERFACES.md §6): its end state, stop pressure and findings.

The vessel's ``fill`` gives the charge; ``[vessel.filling]`` says how it is put in. From the
energy balance of :mod:`fillcheck.thermo.fill_balance` this module gives the state at the end
of the fill (hot), the peak gas temperature, the settled pressure at the reference temperature
and the **stop pressure**: the pressure at the end of the fill, with the gas still hot, at
which the vessel holds exactly the charge the ``fill`` asks for, so that it settles there.

It feeds the verdict in two ways: the end-of-fill temperature joins the checked range
(:mod:`fillcheck.assess.checked_range`), so a fill that passes the allowable pressure or the
relief setting while it is hot fails even if it settles below them; and a peak gas temperature
above ``limits.max_fill_temperature`` fails (``fill-temperature-exceeded``).
"""

from __future__ import annotations

from dataclasses import dataclass
from typing import TYPE_CHECKING, Any

import numpy as np

from fillcheck.assess.result import Checked, Finding
from fillcheck.errors import FillcheckError
from fillcheck.thermo.bracketed import illinois
from fillcheck.thermo.fill_balance import FillCurve, FillSpec, fill_curve
from fillcheck.thermo.fill_cascade import Bank, cascade_fill
from fillcheck.thermo.vessel import vessel_path

if TYPE_CHECKING:
    from fillcheck.scenario.filling_input import FillingInput
    from fillcheck.scenario.resolve import VesselInput

CASCADE_COUNT_MAX = 50
"""The count of vessels a cascade fills is given up to this many (then "at least")."""
CURVE_POINTS_SHOWN = 25
"""Points of the time curve kept in the JSON and the report (every step is computed)."""


@dataclass
class FillResult:
    """The fill process of one vessel, SI (K, Pa absolute, kg, s, J).

    ``stop_pressure_Pa`` is the end-of-fill pressure at the charge the ``fill`` asks for (the
    pressure to stop at); ``end_*`` is where the fill really ends: the same state, unless the
    supply's pressure is reached first (``complete`` False: the fill stops short). ``error``
    says why the process could not be computed (then every number is None)."""

    end_temperature_K: float | None = None
    end_pressure_Pa: float | None = None
    settled_pressure_Pa: float | None = None
    peak_temperature_K: float | None = None
    added_mass_kg: float | None = None
    stop_pressure_Pa: float | None = None
    stop_temperature_K: float | None = None
    complete: bool = True
    curve: FillCurve | None = None
    molar_mass: float = 0.0
    max_energy_residual_J: float | None = None
    energy_in_J: float | None = None
    error: str | None = None
    model: str = ""
    cascade: list[dict[str, float]] | None = None
    """Per bank of a cascade: ``end_pressure_Pa``, ``end_temperature_K``, ``mass_given_kg``."""
    cascade_vessels_filled: int | None = None
    """How many vessels like this one the banks fill to the charge, one after another, before
    one falls short (banks not refilled and not warmed between fills), up to
    CASCADE_COUNT_MAX."""


def _spec(f: FillingInput, steps: int | None = None) -> FillSpec:
    kw: dict[str, Any] = {} if steps is None else {"steps": steps}
    return FillSpec(
        source=f.source,  # type: ignore[arg-type]
        inlet_temperature_K=f.inlet_temperature_K,
        supply_pressure_Pa=f.supply_pressure_Pa,
        start_temperature_K=f.start_temperature_K,
        start_pressure_Pa=f.start_pressure_Pa,
        duration_s=f.duration_s,
        ambient_temperature_K=f.ambient_temperature_K,
        wall_heat_capacity_J_K=f.wall_heat_capacity_J_K,
        heat_transfer=f.heat_transfer,  # type: ignore[arg-type]
        gas_wall_conductance_W_K=f.gas_wall_conductance_W_K,
        wall_ambient_conductance_W_K=f.wall_ambient_conductance_W_K,
        flow=f.flow,  # type: ignore[arg-type]
        **kw,
    )


def _single_phase(fluid: Any, T: np.ndarray, rho: np.ndarray) -> bool:
    """Whether every state (T [K], ρ [mol/m³]) is one phase (a mixture: ends and middle)."""
    if getattr(fluid, "is_mixture", False):
        pick = np.unique(np.linspace(0, T.size - 1, 3).astype(int))
        T, rho = T[pick], rho[pick]
    phase = vessel_path(fluid, T, rho).phase
    return not bool(np.any(np.isin(phase, ("two-phase",))))


def fill_result(v: VesselInput, T_ref: float) -> FillResult | None:
    """The fill process of vessel ``v`` (None without ``[vessel.filling]``); computed once."""
    f = v.filling
    if f is None:
        return None
    # one FillingInput may be shared by vessels of other charges (a plan checked as a fill)
    key = (T_ref, v.fill_kind, v.fill_value, v.fill_temperature_K, v.water_capacity_m3)
    if key in f.cache:
        return f.cache[key]
    from fillcheck.assess.batch import fill_densities  # batch imports the checked range

    fluid = v.fluid
    rho = float(fill_densities([v], T_ref)[0])
    V = v.water_capacity_m3
    M = fluid.molar_mass
    try:
        r = _compute(fluid, V, rho, f, T_ref)
    except FillcheckError as exc:
        r = FillResult(error=str(exc))
    except (ArithmeticError, ValueError) as exc:  # a state the model cannot give
        r = FillResult(error=f"the energy balance could not be evaluated ({exc})")
    r.molar_mass = M
    r.model = fluid.model
    f.cache[key] = r
    return r


def _cascade(fluid: Any, V: float, rho: float, f: FillingInput, T_ref: float) -> FillResult:
    M = fluid.molar_mass
    banks = [Bank(Vb, Tb, Pb) for Vb, Tb, Pb in f.banks]
    with np.errstate(invalid="ignore", divide="ignore", over="ignore"):
        r = cascade_fill(fluid, V, rho * V, _spec(f), banks, f.switch_difference_Pa or 0.0)
    c = r.curve
    if not _single_phase(fluid, c.temperature_K, c.moles / V):
        return FillResult(error=f"{fluid.name} holds liquid during this fill")
    n_end = float(c.moles[-1])
    settled = float(vessel_path(fluid, np.array([T_ref]), np.array([n_end / V])).P[0])
    T_end, P_end = float(c.temperature_K[-1]), float(c.pressure_Pa[-1])
    return FillResult(
        end_temperature_K=T_end,
        end_pressure_Pa=P_end,
        settled_pressure_Pa=settled,
        peak_temperature_K=float(np.max(c.temperature_K)),
        added_mass_kg=float((c.moles[-1] - c.moles[0]) * M),
        stop_pressure_Pa=P_end if r.complete else None,
        stop_temperature_K=T_end if r.complete else None,
        complete=r.complete,
        curve=c,
        max_energy_residual_J=max(
            float(np.max(np.abs(c.energy_residual_J))), abs(r.system_energy_residual_J)
        ),
        energy_in_J=float(c.energy_in_J[-1]),
        cascade_vessels_filled=_vessels_filled(fluid, V, rho, f, r) if r.complete else 0,
        cascade=[
            {"end_pressure_Pa": P, "end_temperature_K": T, "mass_given_kg": n * M}
            for P, T, n in zip(
                r.bank_end_pressure_Pa, r.bank_end_temperature_K, r.bank_moles_given, strict=True
            )
        ],
    )


def _vessels_filled(fluid: Any, V: float, rho: float, f: FillingInput, first: Any) -> int:
    """Vessels like this one filled one after another from the banks (the first included),
    each starting from the same residual gas, the banks left as the last fill left them (cold:
    a bank warmed back to the ambient between fills holds more pressure, so the count errs
    low). Trial fills use SEARCH_STEPS time steps."""
    count = 1
    states = list(zip(first.bank_end_temperature_K, first.bank_end_pressure_Pa, strict=True))
    while count < CASCADE_COUNT_MAX:
        banks = [Bank(Vb, T, P) for (Vb, _, _), (T, P) in zip(f.banks, states, strict=True)]
        with np.errstate(invalid="ignore", divide="ignore", over="ignore"):
            try:
                r = cascade_fill(
                    fluid, V, rho * V, _spec(f, SEARCH_STEPS), banks, f.switch_difference_Pa or 0.0
                )
            except (FillcheckError, ArithmeticError, ValueError):
                break
        if not r.complete:
            break
        count += 1
        states = list(zip(r.bank_end_temperature_K, r.bank_end_pressure_Pa, strict=True))
    return count


def _compute(fluid: Any, V: float, rho: float, f: FillingInput, T_ref: float) -> FillResult:
    M = fluid.molar_mass
    if f.source == "cascade":
        return _cascade(fluid, V, rho, f, T_ref)
    with np.errstate(invalid="ignore", divide="ignore", over="ignore"):
        c = fill_curve(fluid, V, rho * V, _spec(f))
    rho_c = c.moles / V
    if not _single_phase(fluid, c.temperature_K, rho_c):
        return FillResult(
            error=(
                f"{fluid.name} holds liquid during this fill; the fill process is computed for "
                "gas fills only (a liquefied gas is filled by weight)"
            )
        )
    T_stop, P_stop = float(c.temperature_K[-1]), float(c.pressure_Pa[-1])
    complete = True
    if f.supply_pressure_Pa is not None and P_stop > f.supply_pressure_Pa:
        complete = False
        c = _until_supply_pressure(fluid, V, c, f)
    n_end = float(c.moles[-1])
    settled = float(vessel_path(fluid, np.array([T_ref]), np.array([n_end / V])).P[0])
    return FillResult(
        end_temperature_K=float(c.temperature_K[-1]),
        end_pressure_Pa=float(c.pressure_Pa[-1]),
        settled_pressure_Pa=settled,
        peak_temperature_K=float(np.max(c.temperature_K)),
        added_mass_kg=float((c.moles[-1] - c.moles[0]) * M),
        stop_pressure_Pa=P_stop,
        stop_temperature_K=T_stop,
        complete=complete,
        curve=c,
        max_energy_residual_J=float(np.max(np.abs(c.energy_residual_J))),
        energy_in_J=float(c.energy_in_J[-1]),
    )


def _until_supply_pressure(fluid: Any, V: float, c: FillCurve, f: FillingInput) -> FillCurve:
    """The fill from a valve supply ends where the vessel reaches the supply's pressure: the
    moles there, solved on the balance's end state (path-independent without heat to the
    ambient; the two-node curve is cut at the step that reaches it)."""
    P_s = float(f.supply_pressure_Pa or 0.0)
    k = int(np.argmax(c.pressure_Pa >= P_s))
    if f.heat_transfer == "two-node" or k == 0:
        return _cut(c, k)
    n0 = float(c.moles[0])
    one = _spec(f, steps=1)

    def end_P(n: float) -> float:
        with np.errstate(invalid="ignore", divide="ignore", over="ignore"):
            e = fill_curve(fluid, V, n, one)
        return float(e.pressure_Pa[-1]) - P_s

    a, b = float(c.moles[k - 1]), float(c.moles[k])
    fa, fb = end_P(a) if a > n0 else float(c.pressure_Pa[0]) - P_s, end_P(b)
    br = illinois(
        lambda j, x: np.array([end_P(float(x[0]))]),
        np.array([a]),
        np.array([b]),
        np.array([fa]),
        np.array([fb]),
        width=1e-9 * b,
        max_iter=60,
    )
    n_end = float(br.a[0])
    with np.errstate(invalid="ignore", divide="ignore", over="ignore"):
        short = fill_curve(fluid, V, n_end, _spec(f, steps=max(k, 1)))
    # the time scale of the original flow: the fill stops early
    frac = (n_end - n0) / (float(c.moles[-1]) - n0)
    short.time_s = short.time_s * frac
    return short


def _cut(c: FillCurve, k: int) -> FillCurve:
    """The curve up to step k (k ≥ 1), or the start alone (k = 0)."""
    s = slice(0, max(k, 1) + 1)
    return FillCurve(*(np.asarray(getattr(c, name))[s] for name in c.__dataclass_fields__))


def hot_end_temperature_K(v: VesselInput, T_ref: float) -> float | None:
    """The gas temperature at the end of the fill at the vessel's charge [K] (None: no fill
    process, or it could not be computed). The checked range reaches up to it."""
    r = fill_result(v, T_ref)
    if r is None or r.end_temperature_K is None:
        return None
    return r.stop_temperature_K if r.stop_temperature_K is not None else r.end_temperature_K


def _how(f: FillingInput) -> dict[str, Any]:
    """How the vessel is filled, as data: the source and the heat model."""
    return {
        "source": "cascade"
        if f.source == "cascade"
        else ("valve" if f.supply_pressure_Pa is not None else "compressor"),
        "banks": len(f.banks) if f.source == "cascade" else 0,
        "supply_pressure_Pa": f.supply_pressure_Pa,
        "inlet_temperature_K": f.inlet_temperature_K,
        "heat_transfer": f.heat_transfer,
        "wall_heat_capacity_J_K": f.wall_heat_capacity_J_K,
    }


def filling_findings(v: VesselInput, r: FillResult | None) -> list[Finding]:
    """The fill process's findings (codes ``fill-process``, ``fill-temperature-exceeded``,
    ``fill-temperature-margin``, ``fill-supply-short``, ``fill-not-computed``), as data."""
    f = v.filling
    if f is None or r is None:
        return []
    if r.error is not None:
        out = [Finding("fill-not-computed", "review", "", {"error": r.error})]
        if f.max_fill_temperature_K is not None:
            out.append(
                Finding(
                    "fill-temperature-unknown",
                    "review",
                    "",
                    {"limit_K": f.max_fill_temperature_K},
                )
            )
        return out
    assert r.peak_temperature_K is not None and r.settled_pressure_Pa is not None
    how = _how(f)
    if r.stop_pressure_Pa is None:  # a cascade that runs out: the end state only
        assert r.end_pressure_Pa is not None and r.added_mass_kg is not None
        out = [
            Finding(
                "fill-supply-short",
                "warning",
                "",
                how
                | {
                    "banks_run_out": True,
                    "end_pressure_Pa": r.end_pressure_Pa,
                    "end_temperature_K": r.end_temperature_K or 0.0,
                    "added_mass_kg": r.added_mass_kg,
                    "settled_pressure_Pa": r.settled_pressure_Pa,
                    "peak_temperature_K": r.peak_temperature_K,
                },
            )
        ]
        return out + _peak_findings(f, r)
    out = [
        Finding(
            "fill-process",
            "info",
            "",
            how
            | {
                "stop_pressure_Pa": r.stop_pressure_Pa,
                "stop_temperature_K": r.stop_temperature_K,
                "peak_temperature_K": r.peak_temperature_K,
            },
        )
    ]
    if not r.complete:
        assert r.end_pressure_Pa is not None and r.added_mass_kg is not None
        out.append(
            Finding(
                "fill-supply-short",
                "warning",
                "",
                {
                    "banks_run_out": False,
                    "end_pressure_Pa": r.end_pressure_Pa,
                    "end_temperature_K": r.end_temperature_K or 0.0,
                    "added_mass_kg": r.added_mass_kg,
                    "settled_pressure_Pa": r.settled_pressure_Pa,
                    "stop_pressure_Pa": r.stop_pressure_Pa,
                },
            )
        )
    return out + _peak_findings(f, r)


def _peak_findings(f: FillingInput, r: FillResult) -> list[Finding]:
    """The peak gas temperature against ``limits.max_fill_temperature``."""
    limit = f.max_fill_temperature_K
    assert r.peak_temperature_K is not None
    if limit is None:
        return []
    data = {"peak_temperature_K": r.peak_temperature_K, "limit_K": limit}
    if r.peak_temperature_K > limit:
        return [Finding("fill-temperature-exceeded", "fail", "", data)]
    return [Finding("fill-temperature-margin", "info", "", data)]


def limits_checked(v: VesselInput) -> list[Checked]:
    """The fill-process limits the verdict covers."""
    f = v.filling
    if f is None or f.max_fill_temperature_K is None:
        return []
    return [Checked("peak-fill-temperature", f.max_fill_temperature_K)]


PLAN_CLEARANCE = 1e-3
"""The fill-process charge keeps its end-of-fill pressure this fraction below the limit [-]
(the plan's own 0.1 % clearance, assess.charge)."""
SEARCH_STEPS = 20
"""Time steps of each trial fill while searching the largest charge of a path-dependent fill."""


def plan_fill_findings(v: VesselInput, a: Any, T_ref: float) -> list[Finding]:
    """Keep the plan within the fill process: ``fill-plan-hot`` (warning).

    The plan (assess.charge) checks the hot end of the charge asked for; a larger charge filled
    the same way ends hotter. Where the plan's largest safe charge, filled as
    ``[vessel.filling]`` says, would end above the lower of the allowable pressure and the relief
    setting (less the model's uncertainty and the plan's clearance) or pass
    ``limits.max_fill_temperature``, the plan is lowered to the largest charge this fill keeps
    within them (its stop pressure at the fill temperature follows), or withdrawn where no charge
    does. So a plan followed, filled this way, passes."""
    f, r = v.filling, a.filling
    if f is None or r is None or r.error is not None or a.max_safe_charge_kg is None:
        return []
    lims = [("allowable pressure", v.limits.allowable_pressure_Pa)]
    if v.limits.relief_set_pressure_Pa is not None:
        lims.append(("relief set pressure", v.limits.relief_set_pressure_Pa))
    name, limit = min(lims, key=lambda x: x[1])
    u = float(a.pressure_uncertainty_at_top or 0.0)
    cap = limit * (1.0 - PLAN_CLEARANCE) / (1.0 + u)
    T_cap = f.max_fill_temperature_K
    fluid, V, M = v.fluid, v.water_capacity_m3, float(v.fluid.molar_mass)
    path_free = f.source == "supply" and f.heat_transfer != "two-node"
    steps = 1 if path_free else SEARCH_STEPS

    def end(m_kg: float) -> tuple[float, float, bool]:
        """End-of-fill pressure [Pa], peak gas temperature [K], whether the fill completes."""
        with np.errstate(invalid="ignore", divide="ignore", over="ignore"):
            if f.source == "cascade":
                banks = [Bank(Vb, Tb, Pb) for Vb, Tb, Pb in f.banks]
                c = cascade_fill(
                    fluid, V, m_kg / M, _spec(f, steps), banks, f.switch_difference_Pa or 0.0
                )
                cur, done = c.curve, c.complete
            else:
                cur, done = fill_curve(fluid, V, m_kg / M, _spec(f, steps)), True
        return float(cur.pressure_Pa[-1]), float(np.max(cur.temperature_K)), done

    def excess(m_kg: float) -> float:
        """> 0 where the charge breaks a limit at the end of this fill (increasing in m)."""
        P, T, _ = end(m_kg)
        g = P / cap - 1.0
        return max(g, T / T_cap - 1.0) if T_cap is not None else g

    m_plan = float(a.max_safe_charge_kg)
    try:
        P_plan, T_plan, done = end(m_plan)
        if not done or excess(m_plan) <= 0.0:
            return []
        c0 = r.curve
        m_lo = float(c0.moles[0] * M) * (1.0 + 1e-6) + 1e-9 if c0 is not None else 1e-9
        g_lo = excess(m_lo) if m_lo < m_plan else 1.0
        m_ok = None
        if g_lo <= 0.0:
            br = illinois(
                lambda j, x: np.array([excess(float(x[0]))]),
                np.array([m_lo]),
                np.array([m_plan]),
                np.array([g_lo]),
                np.array([excess(m_plan)]),
                width=1e-6 * m_plan,
                max_iter=40,
            )
            m_ok = float(br.a[0])
    except (FillcheckError, ArithmeticError, ValueError):
        return []
    data: dict[str, Any] = {
        "plan_mass_kg": m_plan,
        "plan_end_pressure_Pa": P_plan,
        "plan_peak_temperature_K": T_plan,
        "broken": "peak-temperature"
        if T_cap is not None and T_plan > T_cap and P_plan <= cap
        else name.split()[0],
    }
    if m_ok is None:
        a.max_safe_charge_kg = None
        a.max_safe_fill_pressure_Pa = None
        a.governing_limit = "the fill process"
        return [Finding("fill-plan-hot", "warning", "", data | {"lowered_mass_kg": None})]
    P_ok, T_ok, _ = end(m_ok)
    a.max_safe_charge_kg = round(m_ok, 9)
    a.governing_limit = f"{name} at the end of the fill"
    if T_cap is not None and T_ok >= T_cap * (1.0 - 1e-6):
        a.governing_limit = "peak fill temperature"
    if a.max_safe_fill_pressure_Pa is not None and v.fill_temperature_K is not None:
        a.max_safe_fill_pressure_Pa = float(
            vessel_path(fluid, np.array([v.fill_temperature_K]), np.array([m_ok / M / V])).P[0]
        )
    data |= {
        "lowered_mass_kg": m_ok,
        "lowered_end_pressure_Pa": P_ok,
        "lowered_peak_temperature_K": T_ok,
    }
    return [Finding("fill-plan-hot", "warning", "", data)]
