"""A fill from a cascade of banks used in order (INTERFACES.md §6, ``cascade``).

Each bank is a rigid vessel of its own gas at a starting state. Gas flows from the bank in use
through a valve into the vessel (isenthalpic: it enters with the bank's molar enthalpy h_b). The
bank's own gas expands and cools by its own balances: per step, n_b' = n_b − Δn and
n_b'·u_b' = n_b·u_b − Δn·h_b, with the bank adiabatic (a bank's wall is taken to share no heat
over a fill: it makes the bank colder and its gas's enthalpy lower than a bank warmed by its
wall would give, so the vessel is computed slightly cooler than a warmed bank makes it). The
vessel's side is that of :mod:`fillcheck.thermo.fill_balance` (adiabatic, lumped or two-node).
The next bank is taken when the bank in use is less than ``switch_difference`` above the vessel's
pressure; with none left, the fill ends short.

h_b of each step is taken at the mean of the bank's states at its start and end (one corrector
pass), and the same Δn·h_b leaves the bank and enters the vessel, so the mass balance is exact
and the energy of banks, vessel and wall, less the heat to the ambient, is conserved to
round-off.
"""

from __future__ import annotations

from dataclasses import dataclass
from typing import Any

import numpy as np

from fillcheck.errors import ConvergenceError
from fillcheck.thermo.fill_balance import (
    TWO_NODE_STEPS,
    FillCurve,
    FillSpec,
    Properties,
    _newton_T,
)

DEFAULT_SWITCH_DIFFERENCE_Pa = 5e5
"""Switch to the next bank when the bank in use is less than this above the vessel [Pa]
(5 bar: common practice, no source; the scenario's ``switch_difference`` overrides it)."""


@dataclass(frozen=True)
class Bank:
    """One supply bank: volume [m³], starting temperature [K] and pressure [Pa abs]."""

    volume_m3: float
    temperature_K: float
    pressure_Pa: float


@dataclass
class CascadeFill:
    """A cascade fill: the vessel's curve and, per bank, its end state and the gas it gave."""

    curve: FillCurve
    bank_end_pressure_Pa: list[float]
    bank_end_temperature_K: list[float]
    bank_moles_given: list[float]
    bank_moles_start: list[float]
    complete: bool
    bank_in_use: np.ndarray
    """Per step (index 0 unused: −1), the bank the step drew from."""
    system_energy_residual_J: float = 0.0
    """Banks, vessel and wall at the end, less the start, plus the heat to the ambient [J]."""


def _solve(pr: Properties, n: float, rho: float, target: float, C: float, T0: float) -> float:
    x = _newton_T(pr, n, rho, target, C, T0)
    if x is None:
        raise ConvergenceError(
            f"the cascade fill's energy balance did not converge near {T0:.1f} K"
        )
    return x


def cascade_fill(
    fluid: Any,
    V_m3: float,
    n_end_mol: float,
    spec: FillSpec,
    banks: list[Bank],
    switch_difference_Pa: float = DEFAULT_SWITCH_DIFFERENCE_Pa,
) -> CascadeFill:
    """Fill a rigid vessel of V [m³] to n_end [mol] from ``banks`` in order, constant flow."""
    pr = Properties(fluid)
    B = len(banks)
    nb = np.array(
        [float(fluid.density_molar(b.temperature_K, b.pressure_Pa)) * b.volume_m3 for b in banks]
    )
    nb0 = nb.copy()
    Tb = np.array([b.temperature_K for b in banks])
    Vb = np.array([b.volume_m3 for b in banks])
    Pb = np.array([b.pressure_Pa for b in banks])
    ub = np.array([float(pr.u(Tb[i], nb[i] / Vb[i])) for i in range(B)])
    rho1 = (
        float(fluid.density_molar(spec.start_temperature_K, spec.start_pressure_Pa))
        if spec.start_pressure_Pa > 0.0
        else 0.0
    )
    n1 = rho1 * V_m3
    N = int(min(spec.steps, TWO_NODE_STEPS))
    dn = (n_end_mol - n1) / N
    dt = spec.duration_s / N
    T1 = spec.start_temperature_K
    Cw = spec.wall_heat_capacity_J_K if spec.heat_transfer != "adiabatic" else 0.0
    Ggw, Gwa, Ta = (
        spec.gas_wall_conductance_W_K,
        spec.wall_ambient_conductance_W_K,
        spec.ambient_temperature_K,
    )
    n, T, Tw, P = [n1], [T1], [T1], [float(pr.pressure(T1, rho1)) if n1 > 0 else 0.0]
    E_in, Q_out, used = [0.0], [0.0], [-1]
    U = n1 * float(pr.u(T1, rho1)) if n1 > 0 else 0.0
    E_banks0 = float(np.sum(nb * ub))
    E0 = U + Cw * T1 + E_banks0
    b = 0
    complete = True
    for _ in range(N):
        while b < B and Pb[b] - P[-1] < switch_difference_Pa:
            b += 1
        if b == B:
            complete = False
            break
        # the bank: its gas expands; h at the mean of the step's start and end states
        h0 = float(pr.caloric(Tb[b], nb[b] / Vb[b])["h"])
        nb_new = nb[b] - dn
        if nb_new <= 0.0:
            complete = False
            break
        h = h0
        for _ in range(2):
            Tb_new = _solve(pr, nb_new, nb_new / Vb[b], nb[b] * ub[b] - dn * h, 0.0, Tb[b])
            h = 0.5 * (h0 + float(pr.caloric(Tb_new, nb_new / Vb[b])["h"]))
        Tb_new = _solve(pr, nb_new, nb_new / Vb[b], nb[b] * ub[b] - dn * h, 0.0, Tb[b])
        ub[b] = float(pr.u(Tb_new, nb_new / Vb[b]))
        nb[b], Tb[b] = nb_new, Tb_new
        Pb[b] = float(pr.pressure(Tb_new, nb_new / Vb[b]))
        # the vessel
        n_new = n[-1] + dn
        rho = n_new / V_m3
        if spec.heat_transfer == "two-node":
            den = Cw + dt * (Ggw + Gwa)
            a_w = dt * Ggw / den
            b_w = (Cw * Tw[-1] + dt * Gwa * Ta) / den
            x = _solve(pr, n_new, rho, U + dn * h + dt * Ggw * b_w, dt * Ggw * (1 - a_w), T[-1])
            tw = a_w * x + b_w
            Q_out.append(Q_out[-1] + dt * Gwa * (tw - Ta))
        else:
            x = _solve(pr, n_new, rho, U + Cw * T[-1] + dn * h, Cw, T[-1])
            tw = x if Cw > 0 else T1
            Q_out.append(0.0)
        U = n_new * float(pr.u(x, rho))
        n.append(n_new)
        T.append(x)
        Tw.append(tw)
        P.append(float(pr.pressure(x, rho)))
        E_in.append(E_in[-1] + dn * h)
        used.append(b)
    na, Ta_, Twa, Pa = (np.array(v, dtype=float) for v in (n, T, Tw, P))
    t = dt * np.arange(na.size)
    rho_a = na / V_m3
    E_gas = np.where(na > 0, na * pr.u(Ta_, np.where(na > 0, rho_a, 1.0)), 0.0)
    E_vessel = E_gas + Cw * Twa
    residual = E_vessel - E_vessel[0] - np.array(E_in) + np.array(Q_out)
    curve = FillCurve(
        time_s=t,
        moles=na,
        temperature_K=Ta_,
        wall_temperature_K=Twa,
        pressure_Pa=Pa,
        inlet_enthalpy_J_mol=np.full(na.size, np.nan),
        energy_in_J=np.array(E_in),
        heat_out_J=np.array(Q_out),
        energy_residual_J=residual,
    )
    return CascadeFill(
        curve=curve,
        bank_end_pressure_Pa=[float(x) for x in Pb],
        bank_end_temperature_K=[float(x) for x in Tb],
        bank_moles_given=[float(x) for x in nb0 - nb],
        bank_moles_start=[float(x) for x in nb0],
        complete=complete,
        bank_in_use=np.array(used),
        system_energy_residual_J=float(E_vessel[-1] + np.sum(nb * ub) + Q_out[-1] - E0),
    )
