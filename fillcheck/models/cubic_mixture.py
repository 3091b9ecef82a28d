"""The cubic family for mixtures: composition as an argument, and the fugacity derivative.

The mixture parameters follow the van der Waals one-fluid rules (Michelsen, Mollerup (2007),
*Thermodynamic Models: Fundamentals & Computational Aspects*, 2nd ed., ch. 4)::

    a = ΣΣ xᵢxⱼ √(aᵢaⱼ)(1 − kᵢⱼ),   b = Σ xᵢbᵢ,   c = Σ xᵢcᵢ

and αʳ is the one of :mod:`fillcheck.models.cubic`. For the fugacity coefficients the residual
Helmholtz energy of n moles in a volume V is written with quantities linear or quadratic in the
mole numbers (N = Σnᵢ, B = N(b − c), Eₖ = N(c + δₖb), 𝒜 = N²a)::

    nαʳ = −N ln(1 − B/V) − 𝒜/(RT) · L,   L = ln((V + E₁)/(V + E₂))/(E₁ − E₂)

(L = 1/(V + E) when E₁ = E₂, van der Waals), so that at N = 1, V = 1/ρ::

    ∂(nαʳ)/∂nᵢ = −ln(1 − Bρ) + ρ(bᵢ − cᵢ)/(1 − Bρ)
                 − [2 Σⱼ xⱼaᵢⱼ · F + a (L₁ e₁ᵢ + L₂ e₂ᵢ)]/(RT),
    eₖᵢ = cᵢ + δₖbᵢ,  L₁ = (ρ/(1 + D₁ρ) − F)/(D₁ − D₂),  L₂ = (F − ρ/(1 + D₂ρ))/(D₁ − D₂)

with F(ρ) of the pure form. n(∂αʳ/∂nᵢ) is that less αʳ.
"""

from __future__ import annotations

from collections.abc import Sequence

import numpy as np

from fillcheck.models.base import FloatArray, ModelInfo, ResidualDerivatives
from fillcheck.models.cubic import (
    KINDS,
    R_CUBIC,
    CubicComponent,
    _critical_omegas,
    cubic_density_roots,
    density_function,
    residual_from_parameters,
    soave_m,
    sqrt_attraction,
)


class CubicMixture:
    """A cubic equation of state with the composition as an argument.

    Parameters
    ----------
    kind : str
        ``"vdw"``, ``"rk"``, ``"srk"``, ``"pr"`` or ``"pr-peneloux"``.
    components : sequence of CubicComponent
        Corresponding-states inputs of each component.
    kij : array_like, optional
        Binary interaction parameters, symmetric with a zero diagonal [-]; default zeros.
    references : sequence of str, optional
        Publications of the interaction parameters, added to the model's references.
    """

    def __init__(
        self,
        kind: str,
        components: Sequence[CubicComponent],
        kij: FloatArray | None = None,
        references: Sequence[str] = (),
    ) -> None:
        if kind not in KINDS:
            raise ValueError(f"unknown cubic model {kind!r}; known: {', '.join(KINDS)}")
        self.kind = KINDS[kind]
        self.info = ModelInfo(
            self.kind.id, self.kind.name, (*self.kind.references, *dict.fromkeys(references))
        )
        self.R = R_CUBIC
        self.components = tuple(components)
        n = self.n_components = len(self.components)
        self.kij = np.zeros((n, n)) if kij is None else np.asarray(kij, dtype=float)
        if self.kij.shape != (n, n) or not np.allclose(self.kij, self.kij.T):
            raise ValueError("kij must be a symmetric n × n matrix")
        self._W = 1.0 - self.kij
        omega_a, omega_b, self.Zc = _critical_omegas(self.kind.delta1, self.kind.delta2)
        self._Tc = np.array([c.Tc for c in self.components])
        Pc = np.array([c.Pc for c in self.components])
        self._sqrt_ac = np.sqrt(omega_a * (self.R * self._Tc) ** 2 / Pc)
        if self.kind.alpha in ("soave-srk", "soave-pr"):
            self._m = np.array([soave_m(self.kind.alpha, c.omega) for c in self.components])
        else:
            self._m = np.zeros(n)
        self.bi = omega_b * self.R * self._Tc / Pc
        shifts = np.array([c.shift_m3_mol for c in self.components])
        self.ci = shifts if self.kind.translated else np.zeros(n)
        self._vc = self.Zc * self.R * self._Tc / Pc - self.ci

    # --- composition-dependent parameters ------------------------------------------------------
    def _sqrt_a(self, T: FloatArray) -> tuple[FloatArray, FloatArray, FloatArray]:
        """√aᵢ(T) and its first two T-derivatives, shape S + (n,)."""
        return sqrt_attraction(self.kind.alpha, self._sqrt_ac, self._Tc, self._m, T)

    def attraction(self, T: FloatArray, x: FloatArray) -> tuple[FloatArray, FloatArray, FloatArray]:
        """a(T, x), da/dT and d²a/dT² [Pa·m⁶/mol², per K, per K²], shape S."""
        q, q1, q2 = self._sqrt_a(T)
        xq, xq1, xq2 = x * q, x * q1, x * q2
        W = self._W
        a = np.einsum("...i,ij,...j->...", xq, W, xq)
        a1 = 2.0 * np.einsum("...i,ij,...j->...", xq1, W, xq)
        a2 = 2.0 * (
            np.einsum("...i,ij,...j->...", xq2, W, xq) + np.einsum("...i,ij,...j->...", xq1, W, xq1)
        )
        return a, a1, a2

    def _bc(self, x: FloatArray) -> tuple[FloatArray, FloatArray]:
        return x @ self.bi, x @ self.ci

    # --- the MixtureModel contract -------------------------------------------------------------
    def alphar(self, T: FloatArray, rho_mol: FloatArray, x: FloatArray) -> ResidualDerivatives:
        """αʳ and its scaled derivatives at T [K], ρ [mol/m³], mole fractions x [-]."""
        T, rho = np.broadcast_arrays(np.asarray(T, dtype=float), np.asarray(rho_mol, dtype=float))
        x = np.broadcast_to(np.asarray(x, dtype=float), (*T.shape, self.n_components))
        b, c = self._bc(x)
        D1, D2 = c + self.kind.delta1 * b, c + self.kind.delta2 * b
        return residual_from_parameters(T, rho, self.attraction(T, x), b - c, D1, D2, self.R)

    def dalphar_dn(self, T: FloatArray, rho_mol: FloatArray, x: FloatArray) -> FloatArray:
        """n (∂αʳ/∂nᵢ) at constant T, V, n_j≠i (module docstring), shape S + (n,) [-]."""
        T, rho = np.broadcast_arrays(np.asarray(T, dtype=float), np.asarray(rho_mol, dtype=float))
        x = np.broadcast_to(np.asarray(x, dtype=float), (*T.shape, self.n_components))
        q, _, _ = self._sqrt_a(T)
        a_i = q * np.einsum("ij,...j->...i", self._W, x * q)  # Σⱼ xⱼ aᵢⱼ
        a = np.einsum("...i,...i->...", x, a_i)
        b, c = self._bc(x)
        B = b - c
        d1, d2 = self.kind.delta1, self.kind.delta2
        D1, D2 = c + d1 * b, c + d2 * b
        F, _, _ = density_function(rho, D1, D2)
        e1, e2 = 1.0 + D1 * rho, 1.0 + D2 * rho
        if d1 == d2:
            L1 = -(rho**2) / e1**2
            L2 = 0.0 * L1
        else:
            L1 = (rho / e1 - F) / (D1 - D2)
            L2 = (F - rho / e2) / (D1 - D2)
        RT = self.R * T
        Brho = B * rho
        e1i = self.ci + d1 * self.bi
        e2i = self.ci + d2 * self.bi
        dn = (
            (-np.log1p(-Brho))[..., None]
            + (rho / (1.0 - Brho))[..., None] * (self.bi - self.ci)
            - (
                2.0 * a_i * F[..., None]
                + a[..., None] * (L1[..., None] * e1i + L2[..., None] * e2i)
            )
            / RT[..., None]
        )
        a00 = -np.log1p(-Brho) - a / RT * F
        return dn - a00[..., None]

    def max_density_mol(self, x: FloatArray) -> FloatArray:
        """The covolume limit 1/(b − c) at composition x [mol/m³]."""
        b, c = self._bc(np.asarray(x, dtype=float))
        return 1.0 / (b - c)

    def reducing(self, x: FloatArray) -> tuple[FloatArray, FloatArray]:
        """Pseudo-critical temperature [K] and density [mol/m³] by Kay's rule (molar averages
        of Tc and of the model's critical volumes; Kay (1936), Ind. Eng. Chem. 28, 1014)."""
        x = np.asarray(x, dtype=float)
        return x @ self._Tc, 1.0 / (x @ self._vc)

    # --- fast path ------------------------------------------------------------------------------
    def density_roots(
        self, T: FloatArray, P: FloatArray, x: FloatArray
    ) -> tuple[FloatArray, FloatArray]:
        """Smallest and largest molar densities solving P(T, ρ, x) = P [mol/m³]."""
        T, P = np.broadcast_arrays(np.asarray(T, dtype=float), np.asarray(P, dtype=float))
        x = np.broadcast_to(np.asarray(x, dtype=float), (*T.shape, self.n_components))
        a, _, _ = self.attraction(T, x)
        b, c = self._bc(x)
        return cubic_density_roots(self.kind, a, b, c, self.R * T, P)
