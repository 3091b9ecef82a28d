"""The contract every equation of state in fillcheck fulfils.

A model is a reduced residual Helmholtz energy αʳ(T, ρ) at a fixed composition, with its
derivatives named by order as in Span (2000), *Multiparameter Equations of State*, Springer::

    a00 = αʳ
    a10 = τ ∂αʳ/∂τ          a01 = δ ∂αʳ/∂δ
    a20 = τ² ∂²αʳ/∂τ²       a11 = τ δ ∂²αʳ/∂τ∂δ       a02 = δ² ∂²αʳ/∂δ²

with τ = T_r/T and δ = ρ/ρ_r. These scaled derivatives do not depend on the reducing values
T_r and ρ_r, so a model may compute them from T and ρ directly. Everything else (pressure,
fugacity, enthalpy, saturation, the closed-vessel path) is derived once, in :mod:`fillcheck.thermo`.
"""

from __future__ import annotations

from dataclasses import dataclass
from typing import Protocol, runtime_checkable

import numpy as np
from numpy.typing import NDArray

FloatArray = NDArray[np.float64]


@dataclass(frozen=True)
class ResidualDerivatives:
    """αʳ and its scaled derivatives up to second order, as arrays of one shape [-]."""

    a00: FloatArray
    a10: FloatArray
    a01: FloatArray
    a20: FloatArray
    a11: FloatArray
    a02: FloatArray


@dataclass(frozen=True)
class ModelInfo:
    """What a report prints about a model: its id, its name and the publications it rests on."""

    id: str
    name: str
    references: tuple[str, ...]


@runtime_checkable
class HelmholtzModel(Protocol):
    """A residual Helmholtz model at fixed composition (molar units inside, SI)."""

    info: ModelInfo
    R: float
    """Molar gas constant the model was built with [J/(mol·K)]."""

    def alphar(self, T: FloatArray, rho_mol: FloatArray) -> ResidualDerivatives:
        """αʳ and its derivatives at temperature T [K] and molar density ρ [mol/m³]."""
        ...

    def max_density_mol(self) -> float:
        """A density the model must never reach (the covolume limit for cubics) [mol/m³]."""
        ...
