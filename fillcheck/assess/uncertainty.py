"""How far fillcheck trusts a computed pressure: the model's uncertainty at a vessel state.

- A reference equation of state: its density uncertainty (REFERENCE_DENSITY_UNCERTAINTY; for the
  multi-fluid mixture model, MIXTURE_REFERENCE_UNCERTAINTY of thermo.mixture_fluid) carried
  to the pressure at fixed density by the isotherm's stiffness, u_P = u_ρ · max(1, ∂ln P/∂ln ρ);
  in two phases, the same figure for the saturation pressure. A gas at cylinder pressures has a
  stiffness of 1–3; a liquid-full vessel 10–30, which is why its pressure is so uncertain.
- A cubic model: its errors measured against the reference equation for this gas
  (fluids/data/cubic_accuracy.json): of the saturation pressure in two phases, of the pressure at
  given density for liquid and for dense fluid near the critical temperature, of the pressure of
  the gas otherwise.
- Anything else (a user-defined gas, nitrogen trifluoride): unknown, NaN, and checks say
  "review" for that reason alone.
"""

from __future__ import annotations

import numpy as np

from fillcheck.fluids.accuracy import REFERENCE_DENSITY_UNCERTAINTY
from fillcheck.models.base import FloatArray
from fillcheck.thermo.fluid import Fluid
from fillcheck.thermo.properties import residual

__all__ = ["REFERENCE_DENSITY_UNCERTAINTY", "pressure_uncertainty"]

DENSE_BELOW_REDUCED_T = 1.25
"""A state denser than critical below this T/Tc counts as dense fluid for the cubic errors."""


def pressure_uncertainty(
    fluid: Fluid, T: FloatArray, rho_mol: FloatArray, phase: np.ndarray
) -> np.ndarray:
    """Relative uncertainty of the pressure at closed-vessel states [-] (NaN: unknown)."""
    T, rho = np.broadcast_arrays(np.asarray(T, dtype=float), np.asarray(rho_mol, dtype=float))
    two = np.asarray(phase) == "two-phase"
    if fluid.is_reference:
        d = residual(fluid.eos, T, rho)
        stiff = (1.0 + 2.0 * d.a01 + d.a02) / (1.0 + d.a01)
        u_rho = fluid.model_error.density  # 0.2 % for a pure gas, 0.5 % for a mixture
        return np.where(two, u_rho, u_rho * np.maximum(1.0, stiff))
    err = fluid.model_error
    if err is None:
        return np.full(T.shape, np.nan)
    Tc, _, rhoc = fluid.model_critical
    dense = (rho >= rhoc) & ((np.asarray(phase) == "liquid") | (T < DENSE_BELOW_REDUCED_T * Tc))
    single = np.where(dense, err.pressure_dense, err.pressure)
    return np.where(two, err.saturation_pressure or 0.0, single)
