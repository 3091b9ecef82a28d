"""Properties from αʳ and its derivatives, written once for every model.

The formulas are the standard relations of a Helmholtz-explicit equation of state (Span (2000),
*Multiparameter Equations of State*, Springer, Table 3.1; Lemmon, Span (2006) J. Chem. Eng. Data
51, 785, Table 2). With Z = 1 + a01 and the scaled derivatives of :mod:`fillcheck.models.base`:

- P = ρRT(1 + a01)
- (∂P/∂T)_ρ = ρR(1 + a01 − a11),  (∂P/∂ρ)_T = RT(1 + 2a01 + a02)
- ln φ = αʳ + a01 − ln(1 + a01)  (pure fluid)
- u = u⁰ + RT·a10,  h = h⁰ + RT(a10 + a01),  s = s⁰ + R(a10 − αʳ)
- cv = cv⁰ − R·a20,  cp = cv + R(1 + a01 − a11)²/(1 + 2a01 + a02)
- w² = (RT/M)[1 + 2a01 + a02 + R(1 + a01 − a11)²/cv]

All functions take arrays (broadcast together) and molar densities [mol/m³].
"""

from __future__ import annotations

from typing import Any

import numpy as np

from fillcheck.models.base import FloatArray, HelmholtzModel, ResidualDerivatives
from fillcheck.models.idealgas import IdealGasMixture


def residual(model: HelmholtzModel, T: FloatArray, rho: FloatArray) -> ResidualDerivatives:
    """αʳ and its derivatives at T [K], ρ [mol/m³]."""
    return model.alphar(np.asarray(T, dtype=float), np.asarray(rho, dtype=float))


def pressure_from(d: Any, R: float, T: FloatArray, rho: FloatArray) -> FloatArray:
    """P = ρRT(1 + a01) [Pa] from derivatives ``d`` already evaluated at T [K], ρ [mol/m³]
    (pure fluid or mixture: any object with ``a01``); R [J/(mol·K)]. The one pressure formula."""
    return rho * R * T * (1.0 + d.a01)


def dP_dT_from(d: Any, R: float, rho: FloatArray) -> FloatArray:
    """(∂P/∂T)_ρ = ρR(1 + a01 − a11) [Pa/K] from evaluated derivatives ``d``."""
    return rho * R * (1.0 + d.a01 - d.a11)


def dP_drho_from(d: Any, R: float, T: FloatArray) -> FloatArray:
    """(∂P/∂ρ)_T = RT(1 + 2a01 + a02) [Pa·m³/mol] from evaluated derivatives ``d``."""
    return R * T * (1.0 + 2.0 * d.a01 + d.a02)


def pressure(model: HelmholtzModel, T: FloatArray, rho: FloatArray) -> FloatArray:
    """Pressure P(T, ρ) [Pa]."""
    return pressure_from(residual(model, T, rho), model.R, T, rho)


def compressibility(model: HelmholtzModel, T: FloatArray, rho: FloatArray) -> FloatArray:
    """Compressibility factor Z = P/(ρRT) [-]."""
    return 1.0 + residual(model, T, rho).a01


def dP_drho_at_constant_temperature(
    model: HelmholtzModel, T: FloatArray, rho: FloatArray
) -> FloatArray:
    """(∂P/∂ρ)_T [Pa·m³/mol]."""
    return dP_drho_from(residual(model, T, rho), model.R, np.asarray(T))


def ln_fugacity_coefficient(model: HelmholtzModel, T: FloatArray, rho: FloatArray) -> FloatArray:
    """ln φ of a pure fluid (or of the mixture as a pseudo-pure fluid) [-]."""
    d = residual(model, T, rho)
    return d.a00 + d.a01 - np.log1p(d.a01)


def ln_fugacity_coefficient_at_pressure(
    model: HelmholtzModel, T: FloatArray, rho: FloatArray, P: FloatArray
) -> FloatArray:
    """ln φ = αʳ + Z − 1 − ln Z with Z = P/(ρRT) taken from a known pressure P [Pa] [-].

    At a density root of a given pressure this avoids forming Z = 1 + a01 by cancellation,
    which loses all digits for a liquid at low pressure (Z ~ 1e-10).
    """
    Z = np.asarray(P) / (np.asarray(rho) * model.R * np.asarray(T))
    return residual(model, T, rho).a00 + Z - 1.0 - np.log(Z)


def residual_enthalpy_over_RT(model: HelmholtzModel, T: FloatArray, rho: FloatArray) -> FloatArray:
    """(h − h⁰)/(RT) at the same T [-]."""
    d = residual(model, T, rho)
    return d.a10 + d.a01


def residual_entropy_over_R(model: HelmholtzModel, T: FloatArray, rho: FloatArray) -> FloatArray:
    """(s − s⁰)/R at the same T and ρ [-]."""
    d = residual(model, T, rho)
    return d.a10 - d.a00


def caloric(
    model: HelmholtzModel,
    ideal: IdealGasMixture,
    T: FloatArray,
    rho: FloatArray,
    molar_mass: float,
) -> dict[str, FloatArray]:
    """Molar u, h, s, cv, cp and the speed of sound at T [K], ρ [mol/m³].

    Returns
    -------
    dict
        ``u`` and ``h`` [J/mol], ``s``, ``cv`` and ``cp`` [J/(mol·K)], ``w`` [m/s].
    """
    T = np.asarray(T, dtype=float)
    d = residual(model, T, rho)
    R = model.R
    h0 = ideal.h0_over_RT(T) * R * T
    cv0 = (ideal.cp0_over_R(T) - 1.0) * R
    cv = cv0 - R * d.a20
    x = 1.0 + d.a01 - d.a11
    y = 1.0 + 2.0 * d.a01 + d.a02
    return {
        "u": h0 - R * T + R * T * d.a10,
        "h": h0 + R * T * (d.a10 + d.a01),
        "s": ideal.s0_over_R(T, rho) * R + R * (d.a10 - d.a00),
        "cv": cv,
        "cp": cv + R * x * x / y,
        "w": np.sqrt(R * T / molar_mass * (y + R * x * x / cv)),
    }
