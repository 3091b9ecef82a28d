"""The contract of a mixture model: αʳ at any composition, and its composition derivative.

A :class:`MixtureModel` is the Helmholtz model of :mod:`fillcheck.models.base` with the
composition made a variable. Arrays broadcast as follows: ``T`` and ``rho_mol`` have one shape S,
the mole fractions ``x`` have shape S + (n,) (components on the last axis, rows summing to 1).

Besides αʳ and its scaled derivatives in τ and δ at constant composition, a mixture model gives

    n (∂αʳ/∂nᵢ) at constant T, V and n_j≠i     ("dalphar_dn", shape S + (n,))

from which the shared layer derives the fugacity coefficients (Michelsen, Mollerup (2007),
*Thermodynamic Models: Fundamentals & Computational Aspects*, 2nd ed., ch. 2; Kunz, Wagner (2012),
J. Chem. Eng. Data 57, 3032, eq. 7.27)::

    ln φᵢ = αʳ + n (∂αʳ/∂nᵢ) − ln Z.

:class:`FixedComposition` turns a mixture model at one composition into the single-fluid
:class:`~fillcheck.models.base.HelmholtzModel` that the rest of fillcheck already uses (pressure,
the closed-vessel path in one phase, caloric properties).
"""

from __future__ import annotations

from typing import Protocol, runtime_checkable

import numpy as np

from fillcheck.models.base import FloatArray, ModelInfo, ResidualDerivatives


@runtime_checkable
class MixtureModel(Protocol):
    """A residual Helmholtz model whose composition is an argument (molar units, SI)."""

    info: ModelInfo
    R: float
    """Molar gas constant of the mixture model [J/(mol·K)]."""
    n_components: int

    def alphar(self, T: FloatArray, rho_mol: FloatArray, x: FloatArray) -> ResidualDerivatives:
        """αʳ and its scaled τ, δ derivatives at T [K], ρ [mol/m³], mole fractions x [-]."""
        ...

    def dalphar_dn(self, T: FloatArray, rho_mol: FloatArray, x: FloatArray) -> FloatArray:
        """n (∂αʳ/∂nᵢ) at constant T, V, n_j≠i, shape S + (n,) [-]."""
        ...

    def max_density_mol(self, x: FloatArray) -> FloatArray:
        """A density no state at composition x reaches, shape S [mol/m³]."""
        ...

    def reducing(self, x: FloatArray) -> tuple[FloatArray, FloatArray]:
        """A temperature [K] and density [mol/m³] that scale states at composition x (the
        reducing functions of a multi-fluid model; pseudo-critical values for a cubic)."""
        ...


class FixedComposition:
    """A mixture model at one composition, seen as a single-fluid Helmholtz model.

    Parameters
    ----------
    model : MixtureModel
        The mixture model.
    z : array_like
        Mole fractions [-], one per component.
    """

    def __init__(self, model: MixtureModel, z: FloatArray) -> None:
        self.mixture = model
        self.z = np.asarray(z, dtype=float)
        self.info = model.info
        self.R = model.R

    def _x(self, shape: tuple[int, ...]) -> FloatArray:
        return np.broadcast_to(self.z, (*shape, self.z.size))

    def alphar(self, T: FloatArray, rho_mol: FloatArray) -> ResidualDerivatives:
        """αʳ and its scaled derivatives at T [K] and ρ [mol/m³] (broadcast)."""
        T, rho = np.broadcast_arrays(np.asarray(T, dtype=float), np.asarray(rho_mol, dtype=float))
        return self.mixture.alphar(T, rho, self._x(T.shape))

    def max_density_mol(self) -> float:
        """The mixture model's density limit at this composition [mol/m³]."""
        return float(self.mixture.max_density_mol(self.z))
