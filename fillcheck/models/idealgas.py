"""The ideal-gas part of the Helmholtz energy, from an ideal-gas heat-capacity correlation.

With cp⁰(T) known, the ideal-gas enthalpy and entropy follow by integration from a reference
state; fillcheck uses h⁰ = 0 and s⁰ = 0 for the ideal gas at T₀ = 298.15 K and P₀ = 101 325 Pa.
Only property differences are physically meaningful, and every check in fillcheck uses
differences, so the choice of reference state never reaches a verdict.
"""

from __future__ import annotations

from typing import Protocol

import numpy as np

from fillcheck.models.base import FloatArray

T_REF_K = 298.15
"""Reference temperature of the ideal-gas enthalpy and entropy [K]."""
P_REF_PA = 101_325.0
"""Reference pressure of the ideal-gas entropy [Pa]."""


class HeatCapacityCorrelation(Protocol):
    """An ideal-gas heat capacity cp⁰/R with its two integrals (see fluids.catalog.IdealGasCp)."""

    T_min_K: float
    T_max_K: float
    source: str

    def cp0_over_R(self, T: FloatArray | float) -> FloatArray: ...

    def integral_cp0_over_R_dT(self, T0: float, T: FloatArray | float) -> FloatArray: ...

    def integral_cp0_over_R_over_T_dT(self, T0: float, T: FloatArray | float) -> FloatArray: ...


class IdealGasMixture:
    """Ideal-gas cp⁰, h⁰ and s⁰ of a mixture of components with known correlations.

    Parameters
    ----------
    correlations : sequence of HeatCapacityCorrelation
        One per component.
    x : array_like
        Mole fractions [-].
    R : float
        Molar gas constant of the accompanying residual model [J/(mol·K)].
    """

    def __init__(self, correlations: list[HeatCapacityCorrelation], x: FloatArray, R: float):
        self.correlations = tuple(correlations)
        self.x = np.asarray(x, dtype=float)
        self.R = R
        self.T_min_K = max(c.T_min_K for c in self.correlations)
        self.T_max_K = min(c.T_max_K for c in self.correlations)

    def cp0_over_R(self, T: FloatArray) -> FloatArray:
        """cp⁰/R of the mixture [-]."""
        return sum(xi * c.cp0_over_R(T) for xi, c in zip(self.x, self.correlations, strict=True))

    def h0_over_RT(self, T: FloatArray) -> FloatArray:
        """h⁰/(RT) relative to the reference state [-]."""
        integral = sum(
            xi * c.integral_cp0_over_R_dT(T_REF_K, T)
            for xi, c in zip(self.x, self.correlations, strict=True)
        )
        return integral / T

    def s0_over_R(self, T: FloatArray, rho_mol: FloatArray) -> FloatArray:
        """s⁰/R at T [K] and molar density ρ [mol/m³], including the mixing term [-]."""
        integral = sum(
            xi * c.integral_cp0_over_R_over_T_dT(T_REF_K, T)
            for xi, c in zip(self.x, self.correlations, strict=True)
        )
        P_ideal = rho_mol * self.R * T
        x = self.x[self.x > 0]
        return integral - np.log(P_ideal / P_REF_PA) - float(np.sum(x * np.log(x)))
