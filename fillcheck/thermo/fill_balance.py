"""The energy balance of a fill: the gas temperature and pressure while a rigid vessel fills.

A rigid vessel of volume V holds n moles; gas flows in, with molar enthalpy h_in, at a stated
molar flow. The first law for this open system, with the wall and the heat to the ambient
(Çengel, Boles, *Thermodynamics: An Engineering Approach*, charging of a rigid tank, the
unsteady-flow energy balance; any edition), is

    d(n·u)/dt + C_w dT_w/dt = ṅ·h_in − Q̇_amb,

with u(T, ρ) and h(T, ρ) from the same equation of state as every other number
(:func:`fillcheck.thermo.properties.caloric` with the fluid's own ideal-gas part), C_w = m_w c_w
the wall's heat capacity [J/K] and T_w its temperature. The heat-transfer models:

- ``adiabatic``: the gas alone (C_w = 0, no heat to the ambient);
- ``lumped``: the wall at the gas temperature all along (T_w = T), no heat to the ambient;
- ``two-node``: the gas and the wall at their own temperatures, joined by a gas–wall
  conductance (hA)_gw [W/K], the wall losing heat to the ambient through (hA)_wa [W/K], over
  the fill's duration (backward Euler in time, one implicit step per time step).

Sources of gas:

- ``supply``: a supply held at a fixed state (T_s, P_s) through a valve. The valve is
  isenthalpic, so h_in = h(T_s, P_s) whatever the vessel's pressure (Çengel, Boles, as above).
- ``compressor``: gas delivered at the vessel's own pressure and a stated delivery
  temperature, h_in = h(T_d, P_vessel).

With a fixed h_in and no heat to the ambient (adiabatic or lumped), the balance integrates to
n₂u₂ − n₁u₁ + C_w(T₂ − T₁) = (n₂ − n₁)h_in, so the state at each time step depends on the mass
in the vessel alone: one monotone equation in T₂ (∂(nu)/∂T = n·cv > 0), solved for every time
step at once with :func:`fillcheck.thermo.bracketed.illinois`. A compressor's h_in depends on
the pressure: the cumulative energy in is summed with h_in at each step's mean pressure, iterated
to a fixed point. The two-node model steps in time.

Ideal-gas check (Çengel, Boles, as above): an evacuated vessel filled adiabatically from a
constant supply ends at T₂ = γ·T_s.

Every step conserves energy to round-off: ``energy_residual_J`` on the curve is
E_vessel(t) − E_vessel(0) − E_in(t) + Q_amb(t) with each term as the model computed it.
"""

from __future__ import annotations

from dataclasses import dataclass
from typing import Any, Literal

import numpy as np

from fillcheck.errors import ConvergenceError, StateError
from fillcheck.models.idealgas import IdealGasMixture
from fillcheck.models.multiparameter import ReferenceIdealGas
from fillcheck.thermo import properties as props
from fillcheck.thermo.bracketed import illinois
from fillcheck.thermo.limits import highest_temperature_K

HeatTransfer = Literal["adiabatic", "lumped", "two-node"]
Flow = Literal["constant-mass", "pressure-ramp"]
Source = Literal["supply", "compressor", "cascade"]

DEFAULT_STEPS = 120
"""Time steps of a fill curve (constant mass flow: equal mass per step)."""
TWO_NODE_STEPS = 60
"""Time steps of a two-node fill, solved one after the other (backward Euler: the curve moves
by well under 0.1 K against twice as many steps for a fill of minutes)."""
T_WIDTH_K = 1e-9
"""The bracket width the temperature of each step is solved to [K]."""
COMPRESSOR_PASSES = 4
"""Fixed-point passes for a compressor's delivery enthalpy at each step's mean pressure."""
RAMP_PASSES = 12
"""Fixed-point passes at most for the times of a pressure-ramp fill with the two-node model
(the times move the heat exchanged, which moves the pressures); stops when no time moves by
more than RAMP_TOLERANCE of the duration."""
RAMP_TOLERANCE = 1e-9
"""Relative change of the times [-] at which the pressure-ramp iteration stops."""


def ramp_times(P: np.ndarray, duration_s: float) -> np.ndarray:
    """The times [s] at which a fill whose pressure rises at a constant rate from P[0] to P[-1]
    over ``duration_s`` passes the pressures P [Pa] (made non-decreasing first)."""
    P = np.maximum.accumulate(np.asarray(P, dtype=float))
    span = P[-1] - P[0]
    if not span > 0.0:
        return np.linspace(0.0, duration_s, P.size)
    return duration_s * (P - P[0]) / span


class MixtureIdealGas:
    """The ideal-gas part of a mixture at a fixed composition, from its components' own parts.

    Each component keeps its own ideal-gas part (a reference equation's, or the catalog
    correlation for a cubic model) with its own gas constant; the mixture's molar h⁰ and cp⁰
    are the mole-fraction sums (ideal mixing: no enthalpy of mixing), s⁰ adds −Σ zᵢ ln zᵢ.
    """

    def __init__(self, parts: list[Any], gas_constants: list[float], z: np.ndarray, R: float):
        self.parts = parts
        self.Ri = np.asarray(gas_constants, dtype=float)
        self.z = np.asarray(z, dtype=float)
        self.R = R

    def cp0_over_R(self, T: Any) -> Any:
        """cp⁰/R of the mixture [-]."""
        return (
            sum(
                z * Ri * p.cp0_over_R(T)
                for z, Ri, p in zip(self.z, self.Ri, self.parts, strict=True)
            )
            / self.R
        )

    def h0_over_RT(self, T: Any) -> Any:
        """h⁰/(RT), each component in its own reference state [-]."""
        return (
            sum(
                z * Ri * p.h0_over_RT(T)
                for z, Ri, p in zip(self.z, self.Ri, self.parts, strict=True)
            )
            / self.R
        )

    def s0_over_R(self, T: Any, rho_mol: Any) -> Any:
        """s⁰/R at T [K] and molar density ρ [mol/m³], each component at its partial density."""
        return (
            sum(
                z * Ri * p.s0_over_R(T, z * np.asarray(rho_mol))
                for z, Ri, p in zip(self.z, self.Ri, self.parts, strict=True)
            )
            / self.R
        )


def ideal_part(fluid: Any) -> Any:
    """The ideal-gas part that goes with the fluid's model (pure fluid or mixture).

    A pure fluid's is :meth:`fillcheck.thermo.fluid.Fluid.ideal_gas`; a multi-fluid mixture
    takes each component's reference equation's own part, a cubic mixture each component's
    catalog correlation. Raises StateError where a component has none (user-defined gases)."""
    if not getattr(fluid, "is_mixture", False):
        try:
            return fluid.ideal_gas()
        except Exception as exc:  # a user-defined gas: no cp⁰ correlation
            raise StateError(str(exc)) from None
    pures = getattr(fluid.mixture, "pures", None)
    if pures is not None:
        parts: list[Any] = [ReferenceIdealGas(p) for p in pures]
        Ri = [p.R for p in pures]
    else:
        cps = [c.ideal_gas_cp for c in fluid.components]
        if any(c is None for c in cps):
            raise StateError(f"{fluid.name} has a component without an ideal-gas heat capacity")
        parts = [IdealGasMixture([c], np.array([1.0]), fluid.eos.R) for c in cps]
        Ri = [fluid.eos.R] * len(parts)
    return MixtureIdealGas(parts, Ri, fluid.z, fluid.eos.R)


class Properties:
    """Molar u, h and cv of one fluid from its model and ideal-gas part [J/mol, J/(mol·K)]."""

    def __init__(self, fluid: Any) -> None:
        self.fluid = fluid
        self.ideal = ideal_part(fluid)
        self.M = fluid.molar_mass

    def caloric(self, T: Any, rho_mol: Any) -> dict[str, Any]:
        """u, h [J/mol], cv [J/(mol·K)] at T [K], ρ [mol/m³] (single phase)."""
        with np.errstate(invalid="ignore"):  # the speed of sound at a bracket's far end
            return props.caloric(self.fluid.eos, self.ideal, T, rho_mol, self.M)

    def u(self, T: Any, rho_mol: Any) -> Any:
        """Molar internal energy [J/mol]."""
        return self.caloric(T, rho_mol)["u"]

    def h_TP(self, T: Any, P: Any) -> Any:
        """Molar enthalpy at T [K], P [Pa] (the stable phase's density) [J/mol]."""
        T = np.asarray(T, dtype=float)
        P = np.asarray(P, dtype=float)
        rho = self.fluid.density_molar(T, P)
        return self.caloric(T, rho)["h"]

    def pressure(self, T: Any, rho_mol: Any) -> Any:
        """P(T, ρ) [Pa] from the one pressure formula."""
        return props.pressure(self.fluid.eos, T, rho_mol)

    def pressure_or_zero(self, T: np.ndarray, rho_mol: np.ndarray) -> np.ndarray:
        """P(T, ρ) [Pa], 0 where ρ = 0 (an evacuated vessel)."""
        out = np.zeros(np.shape(T))
        m = rho_mol > 0.0
        out[m] = self.pressure(T[m], rho_mol[m])
        return out


@dataclass(frozen=True)
class FillSpec:
    """One fill, in SI.

    source : "supply" (through a valve) or "compressor"
    inlet_temperature_K : the supply's temperature, or the compressor's delivery temperature
    supply_pressure_Pa : the supply's pressure (a valve supply only) [Pa]
    start_temperature_K, start_pressure_Pa : the residual gas before the fill
    duration_s : the fill's duration [s]
    flow : "constant-mass" (equal mass per time step) or "pressure-ramp" (the vessel's pressure
        rising at a constant rate: the time of each step follows its pressure)
    ambient_temperature_K : for the two-node model's heat to the ambient [K]
    wall_heat_capacity_J_K : m_w·c_w, 0 for no wall [J/K]
    heat_transfer : "adiabatic" | "lumped" | "two-node"
    gas_wall_conductance_W_K, wall_ambient_conductance_W_K : (hA) of the two-node model [W/K]
    """

    source: Source
    inlet_temperature_K: float
    supply_pressure_Pa: float | None
    start_temperature_K: float
    start_pressure_Pa: float
    duration_s: float
    ambient_temperature_K: float
    wall_heat_capacity_J_K: float = 0.0
    heat_transfer: HeatTransfer = "adiabatic"
    gas_wall_conductance_W_K: float = 0.0
    wall_ambient_conductance_W_K: float = 0.0
    steps: int = DEFAULT_STEPS
    flow: Flow = "constant-mass"


@dataclass
class FillCurve:
    """A fill over time, arrays over the time steps (index 0 = the start), SI.

    time_s [s], moles [mol], temperature_K (gas) and wall_temperature_K [K], pressure_Pa [Pa],
    inlet_enthalpy_J_mol (of the gas that entered during each step; index 0 unused) [J/mol],
    energy_in_J (cumulative n·h_in), heat_out_J (cumulative heat to the ambient) and
    energy_residual_J (the first law's residual, round-off only) [J].
    """

    time_s: np.ndarray
    moles: np.ndarray
    temperature_K: np.ndarray
    wall_temperature_K: np.ndarray
    pressure_Pa: np.ndarray
    inlet_enthalpy_J_mol: np.ndarray
    energy_in_J: np.ndarray
    heat_out_J: np.ndarray
    energy_residual_J: np.ndarray


def _balance(pr: Properties, n: np.ndarray, rho: np.ndarray, target: np.ndarray, C: float) -> Any:
    """The residual n·u(T, ρ) + C·T − target [J] of elements ``j`` at T [K] (increasing in T)."""

    def energy(j: np.ndarray, T: np.ndarray) -> np.ndarray:
        return n[j] * pr.u(T, rho[j]) + C * T - target[j]

    return energy


def _gas_energy(pr: Properties, n: np.ndarray, T: np.ndarray, rho: np.ndarray) -> np.ndarray:
    """n·u [J] of each state, 0 for an evacuated vessel."""
    out = np.zeros(n.shape)
    m = n > 0.0
    out[m] = n[m] * pr.u(T[m], rho[m])
    return out


def _shifted(energy: Any, offset: float) -> Any:
    """``energy`` minus a constant [J]."""
    return lambda j, T: energy(j, T) - offset


def _newton_T(
    pr: Properties, n: float, rho: float, target: float, C: float, T0: float
) -> float | None:
    """Newton's method on n·u(T, ρ) + C·T = target from T0 [K], with ∂/∂T = n·cv + C > 0;
    None where it leaves 0.3·T0 to 3·T0 or does not settle to T_WIDTH_K in 30 steps."""
    x = T0
    for _ in range(30):
        c = pr.caloric(x, rho)
        step = (n * float(c["u"]) + C * x - target) / (n * float(c["cv"]) + C)
        x -= step
        if not (0.3 * T0 < x < 3.0 * T0) or not np.isfinite(x):
            return None
        if abs(step) <= T_WIDTH_K:
            return x
    return None


def _temperature_bracket(fluid: Any, T_seed: float) -> tuple[float, float]:
    lo = max(float(fluid.validity.T_min_K), float(getattr(fluid, "T_min_saturation", 0.0)), 1.0)
    hi = highest_temperature_K(fluid)
    return max(lo, 0.3 * T_seed), hi


def _solve_T(
    energy: Any,
    lo: np.ndarray,
    hi: np.ndarray,
    what: str,
) -> np.ndarray:
    """Solve energy(idx, T) = 0 for every element, bracketed in [lo, hi] (increasing in T)."""
    all_idx = np.arange(lo.size)
    f_lo = energy(all_idx, lo)
    f_hi = energy(all_idx, hi)
    if np.any(f_lo > 0.0) or np.any(f_hi < 0.0) or not np.all(np.isfinite(f_lo + f_hi)):
        raise ConvergenceError(
            f"the fill's energy balance has no root between {lo.min():.0f} K and "
            f"{hi.max():.0f} K ({what}): the fill leaves the model's temperature range"
        )
    br = illinois(energy, lo, hi, f_lo, f_hi, width=T_WIDTH_K, max_iter=200)
    if not np.all(br.converged):
        raise ConvergenceError(f"the fill's energy balance did not converge ({what})")
    # the end of the final bracket with the smaller true residual
    ra, rb = np.abs(energy(all_idx, br.a)), np.abs(energy(all_idx, br.b))
    return np.where(ra <= rb, br.a, br.b)


def fill_curve(fluid: Any, V_m3: float, n_end_mol: float, spec: FillSpec) -> FillCurve:
    """The fill of a rigid vessel of V [m³] to n_end [mol] at constant molar flow.

    Returns the curve from the start state to the end; raises StateError where the start
    holds more gas than the end and ConvergenceError where the balance leaves the model's range.
    """
    pr = Properties(fluid)
    rho1 = (
        float(np.asarray(fluid.density_molar(spec.start_temperature_K, spec.start_pressure_Pa)))
        if spec.start_pressure_Pa > 0.0
        else 0.0  # evacuated
    )
    n1 = rho1 * V_m3
    if n_end_mol <= n1:
        raise StateError(
            "the residual gas before the fill already holds the charge the fill asks for"
        )
    N = int(spec.steps if spec.heat_transfer != "two-node" else min(spec.steps, TWO_NODE_STEPS))
    frac = np.linspace(0.0, 1.0, N + 1)
    n = n1 + (n_end_mol - n1) * frac
    t = spec.duration_s * frac
    rho = n / V_m3
    T1 = spec.start_temperature_K
    u1 = float(pr.u(T1, rho1)) if n1 > 0.0 else 0.0
    Cw = spec.wall_heat_capacity_J_K if spec.heat_transfer != "adiabatic" else 0.0
    E0 = n1 * u1 + Cw * T1
    dn = np.diff(n)
    if spec.heat_transfer == "two-node":
        curve = _two_node(pr, fluid, spec, t, n, rho, T1, E0, Cw)
        for _ in range(RAMP_PASSES if spec.flow == "pressure-ramp" else 0):
            t_new = ramp_times(curve.pressure_Pa, spec.duration_s)
            moved = float(np.max(np.abs(t_new - curve.time_s)))
            curve = _two_node(pr, fluid, spec, t_new, n, rho, T1, E0, Cw)
            if moved <= RAMP_TOLERANCE * spec.duration_s:
                break
        return curve
    if spec.source == "supply":
        h_in = np.full(N, float(pr.h_TP(spec.inlet_temperature_K, spec.supply_pressure_Pa)))
        passes = 1
    else:
        h_in = np.full(N, float(pr.h_TP(spec.inlet_temperature_K, spec.start_pressure_Pa)))
        passes = COMPRESSOR_PASSES
    lo0, hi0 = _temperature_bracket(fluid, min(T1, spec.inlet_temperature_K))
    lo = np.full(N, lo0)
    hi = np.full(N, hi0)
    P = np.zeros(N + 1)
    for k in range(passes):
        if k > 0:  # a compressor: the delivery enthalpy at each step's mean pressure
            h_in = pr.h_TP(np.full(N, spec.inlet_temperature_K), 0.5 * (P[:-1] + P[1:]))
        E_in = np.concatenate([[0.0], np.cumsum(dn * h_in)])
        target = E0 + E_in[1:]
        energy = _balance(pr, n[1:], rho[1:], target, Cw)
        T = np.concatenate([[T1], _solve_T(energy, lo, hi, "a fill at constant mass flow")])
        P = pr.pressure_or_zero(T, rho)
    E = _gas_energy(pr, n, T, rho) + Cw * T
    if spec.flow == "pressure-ramp":  # no heat leaves: the states depend on the mass alone
        t = ramp_times(P, spec.duration_s)
    return FillCurve(
        time_s=t,
        moles=n,
        temperature_K=T,
        wall_temperature_K=T.copy() if Cw > 0 else np.full(N + 1, T1),
        pressure_Pa=P,
        inlet_enthalpy_J_mol=np.concatenate([[np.nan], h_in]),
        energy_in_J=E_in,
        heat_out_J=np.zeros(N + 1),
        energy_residual_J=E - E0 - E_in,
    )


def _two_node(
    pr: Properties,
    fluid: Any,
    spec: FillSpec,
    t: np.ndarray,
    n: np.ndarray,
    rho: np.ndarray,
    T1: float,
    E0: float,
    Cw: float,
) -> FillCurve:
    """Gas and wall nodes, backward Euler in time.

    Per step of Δt: C_w(T_w' − T_w) = Δt[(hA)_gw(T' − T_w') − (hA)_wa(T_w' − T_amb)] and
    n'u' − nu = Δn·h_in − Δt(hA)_gw(T' − T_w'). The wall equation gives T_w' linear in T';
    the gas equation is then monotone in T'."""
    N = t.size - 1
    Ggw, Gwa, Ta = (
        spec.gas_wall_conductance_W_K,
        spec.wall_ambient_conductance_W_K,
        (spec.ambient_temperature_K),
    )
    T = np.empty(N + 1)
    Tw = np.empty(N + 1)
    P = np.empty(N + 1)
    h_in = np.full(N + 1, np.nan)
    E_in = np.zeros(N + 1)
    Q_out = np.zeros(N + 1)
    T[0] = Tw[0] = T1
    P[0] = float(pr.pressure_or_zero(np.array([T1]), rho[:1])[0])
    U_gas = n[0] * float(pr.u(T1, rho[0]))
    lo0, hi0 = _temperature_bracket(fluid, min(T1, spec.inlet_temperature_K, Ta))
    h_supply = (
        float(pr.h_TP(spec.inlet_temperature_K, spec.supply_pressure_Pa))
        if spec.source == "supply"
        else None
    )
    for k in range(N):
        dt = t[k + 1] - t[k]
        dn = n[k + 1] - n[k]
        h = h_supply if h_supply is not None else float(pr.h_TP(spec.inlet_temperature_K, P[k]))
        h_in[k + 1] = h
        den = Cw + dt * (Ggw + Gwa)
        a_w = dt * Ggw / den  # Tw' = a_w·T' + b_w
        b_w = (Cw * Tw[k] + dt * Gwa * Ta) / den
        rhs = U_gas + dn * h
        nk, rk = n[k + 1], rho[k + 1]
        # gas energy plus the heat into the wall, the wall's temperature eliminated
        energy = _balance(pr, np.array([nk]), np.array([rk]), np.array([rhs]), dt * Ggw * (1 - a_w))
        rhs_w = dt * Ggw * b_w
        energy = _shifted(energy, rhs_w)  # for the bracketed fallback
        x = _newton_T(pr, nk, rk, rhs + rhs_w, dt * Ggw * (1 - a_w), T[k])
        if x is None:  # Newton left the range or stalled: the bracketed solver
            x = _solve_T(energy, np.array([lo0]), np.array([hi0]), "the two-node fill")[0]
        T[k + 1] = x
        Tw[k + 1] = a_w * x + b_w
        P[k + 1] = float(pr.pressure(x, rk))
        U_gas = nk * float(pr.u(x, rk))
        E_in[k + 1] = E_in[k] + dn * h
        Q_out[k + 1] = Q_out[k] + dt * Gwa * (Tw[k + 1] - Ta)
    E = _gas_energy(pr, n, T, rho) + Cw * Tw
    return FillCurve(
        time_s=t,
        moles=n,
        temperature_K=T,
        wall_temperature_K=Tw,
        pressure_Pa=P,
        inlet_enthalpy_J_mol=h_in,
        energy_in_J=E_in,
        heat_out_J=Q_out,
        energy_residual_J=E - E0 - E_in + Q_out,
    )
