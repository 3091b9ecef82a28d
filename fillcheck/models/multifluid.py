"""The multi-fluid Helmholtz mixture model in the GERG-2008 form.

The reduced residual Helmholtz energy of a mixture of n components at mole fractions x is
(Kunz, Wagner (2012), J. Chem. Eng. Data 57, 3032, sections 4 and 7)::

    αʳ(τ, δ, x) = Σᵢ xᵢ αʳ₀ᵢ(τ, δ) + Σᵢ<ⱼ xᵢ xⱼ Fᵢⱼ αʳᵢⱼ(τ, δ),
    τ = T_r(x)/T,   δ = ρ/ρ_r(x),

where αʳ₀ᵢ is component i's own reference equation (:mod:`fillcheck.models.multiparameter`)
evaluated at the mixture's τ and δ, αʳᵢⱼ a binary departure function and Fᵢⱼ its weight. The
reducing functions are::

    Y_r(x) = Σᵢ xᵢ² Yᵢ + Σᵢ<ⱼ 2 xᵢ xⱼ βᵢⱼ γᵢⱼ Yᵢⱼ (xᵢ + xⱼ)/(βᵢⱼ² xᵢ + xⱼ)

with Y = T (Yᵢ = T_r,i, Yᵢⱼ = √(T_r,i T_r,j)) and Y = 1/ρ (Yᵢ = 1/ρ_r,i,
Yᵢⱼ = (ρ_r,i^(−1/3) + ρ_r,j^(−1/3))³/8). The component values T_r,i, ρ_r,i are the reducing
values of the pure equations, as CoolProp 8.0.0 takes them for its mixtures.

The departure functions are sums of the term forms

- power: n δ^d τ^t exp(−δ^l) (no exponential where l = 0)
- gerg_exponential: n δ^d τ^t exp(−η(δ − ε)² − β(δ − γ)) (the GERG-2008 "special" terms)
- gaussian: n δ^d τ^t exp(−η(δ − ε)² − β(τ − γ)²)

The composition derivative n(∂αʳ/∂nᵢ) at constant T, V, n_j is analytic (Kunz, Wagner (2012),
section 7)::

    n(∂αʳ/∂nᵢ) = δαʳ_δ [1 − n(∂ρ_r/∂nᵢ)/ρ_r] + ταʳ_τ n(∂T_r/∂nᵢ)/T_r + αʳ_xᵢ − Σₖ xₖ αʳ_xₖ,
    n(∂Y_r/∂nᵢ) = ∂Y_r/∂xᵢ − Σₖ xₖ ∂Y_r/∂xₖ,

with the derivatives in xᵢ taken as if the mole fractions were independent.

The binary parameters live in ``fluids/data/mixtures/multifluid_pairs.json`` (written by
``tools/build_multifluid_pairs.py``); every pair names its publication. Pairs whose parameters
are combining-rule estimates rather than fits are kept in the file but marked, and the model
refuses them unless asked to accept estimates.

The gas constant is that of CoolProp 8.0.0 for every mixture, R = 8.31446261815324 J/(mol·K)
(CODATA 2018; Tiesinga et al. (2021), Rev. Mod. Phys. 93, 025010).
"""

from __future__ import annotations

import json
from collections.abc import Mapping, Sequence
from dataclasses import dataclass, field
from functools import cache
from itertools import combinations
from pathlib import Path
from typing import Any

import numpy as np

from fillcheck.errors import ModelUnavailableError
from fillcheck.models.base import FloatArray, ModelInfo, ResidualDerivatives
from fillcheck.models.helmholtz_terms import ReferenceDataError, TermTable, block_arrays
from fillcheck.models.multiparameter import (
    MultiparameterModel,
    available_reference_equations,
    load_reference_equation,
)

DATA_FILE = (
    Path(__file__).resolve().parents[1] / "fluids" / "data" / "mixtures" / ("multifluid_pairs.json")
)
GAS_CONSTANT = 8.31446261815324
"""Molar gas constant of every mixture [J/(mol·K)]: CODATA 2018, the value CoolProp 8.0.0
uses for mixtures (its ``R_U_CODATA`` with ``NORMALIZE_GAS_CONSTANTS`` on)."""

MODEL_PUBLICATION = "Kunz, Wagner (2012), J. Chem. Eng. Data 57, 3032"


class MixtureDataError(ReferenceDataError):
    """The binary-parameter data file is malformed (a defect of the shipped data)."""


_DEPARTURE_FORMS = ("power", "gerg_exponential", "gaussian")


def _departure_block(block: dict[str, Any], where: str) -> tuple[str, dict[str, np.ndarray]]:
    """A departure function's term block: its form and coefficient arrays."""
    kind = block.get("type")
    if kind not in _DEPARTURE_FORMS:
        raise MixtureDataError(f"{where}: unknown departure term type {kind!r}")
    try:
        return block_arrays(block, where)
    except ReferenceDataError as exc:
        raise MixtureDataError(str(exc)) from None


@dataclass(frozen=True)
class PairParameters:
    """The published binary parameters of one pair, oriented as ``names`` (GERG-2008 form).

    ``beta_T``, ``gamma_T``, ``beta_v``, ``gamma_v`` [-] enter the reducing functions; ``F``
    [-] weighs the departure function ``departure`` (a tuple of term blocks, empty if none).
    """

    names: tuple[str, str]
    beta_T: float
    gamma_T: float
    beta_v: float
    gamma_v: float
    F: float
    departure_name: str | None
    sources: tuple[str, ...]
    estimate: bool
    estimate_basis: str | None = None
    departure: tuple[Any, ...] = field(default=(), repr=False, compare=False)

    def reversed(self) -> PairParameters:
        """The same pair seen in the other order (β → 1/β, γ unchanged)."""
        return PairParameters(
            names=(self.names[1], self.names[0]),
            beta_T=1.0 / self.beta_T,
            gamma_T=self.gamma_T,
            beta_v=1.0 / self.beta_v,
            gamma_v=self.gamma_v,
            F=self.F,
            departure_name=self.departure_name,
            sources=self.sources,
            estimate=self.estimate,
            estimate_basis=self.estimate_basis,
            departure=self.departure,
        )


def _reducing_parameters(
    spec: dict[str, Any], names: tuple[str, str], where: str
) -> tuple[float, float, float, float]:
    form = spec.get("form")
    if form == "GERG-2008":
        return tuple(float(spec[k]) for k in ("beta_T", "gamma_T", "beta_v", "gamma_v"))
    if form == "Lemmon-xi-zeta":
        # T_r = Σ xᵢ T_r,i + Σ xᵢxⱼ ξᵢⱼ and v_r = Σ xᵢ v_r,i + Σ xᵢxⱼ ζᵢⱼ (Lemmon, Jacobsen
        # (2004), J. Phys. Chem. Ref. Data 33, 593) are the GERG form with β = 1 and
        # γ_T = (T_i + T_j + ξ)/(2√(T_i T_j)), γ_v = (v_i + v_j + ζ)/((v_i^⅓ + v_j^⅓)³/4).
        a, b = (load_reference_equation(n) for n in names)
        xi, zeta = float(spec["xi / K"]), float(spec["zeta / m3/mol"])
        va, vb = 1.0 / a.rho_r, 1.0 / b.rho_r
        gT = (a.T_r + b.T_r + xi) / (2.0 * np.sqrt(a.T_r * b.T_r))
        gv = (va + vb + zeta) / (0.25 * (va ** (1 / 3) + vb ** (1 / 3)) ** 3)
        return 1.0, float(gT), 1.0, float(gv)
    raise MixtureDataError(f"{where}: unknown reducing-function form {form!r}")


def parse_pairs(spec: dict[str, Any], where: str = "<data>") -> dict[frozenset, PairParameters]:
    """Parse the binary-parameter data (the JSON document) into pairs keyed by their names.

    Raises
    ------
    MixtureDataError
        On an unknown term type or reducing form, arrays of unequal length, a missing key or a
        pair without a source.
    """
    out: dict[frozenset, PairParameters] = {}
    for k, entry in enumerate(spec.get("pairs", [])):
        here = f"{where}: pair {k}"
        try:
            names = tuple(entry["components"])
            if len(names) != 2:
                raise MixtureDataError(f"{here}: a pair has two components")
            here = f"{where}: pair {names[0]}/{names[1]}"
            source = entry["source"]
            if not source or not str(source).strip():
                raise MixtureDataError(f"{here}: no source")
            params = _reducing_parameters(entry["reducing"], names, here)
            F = float(entry["F"])
            dep = entry.get("departure")
            terms: tuple[Any, ...] = ()
            dep_name = None
            sources = [str(source)]
            if dep is not None:
                terms = tuple(_departure_block(b, here) for b in dep["terms"])
                dep_name = str(dep["name"])
                if dep["source"] != source:
                    sources.append(str(dep["source"]))
            estimate = bool(entry["estimate"])
        except (KeyError, TypeError, ValueError) as exc:
            if isinstance(exc, MixtureDataError):
                raise
            raise MixtureDataError(f"{here}: missing or malformed key {exc}") from None
        out[frozenset(names)] = PairParameters(
            names,
            *params,
            F=F,
            departure_name=dep_name,
            sources=tuple(sources),
            estimate=estimate,
            estimate_basis=entry.get("estimate_basis"),
            departure=terms,
        )
    return out


@cache
def _pairs() -> dict[frozenset, PairParameters]:
    return parse_pairs(json.loads(DATA_FILE.read_text(encoding="utf-8")), DATA_FILE.name)


def pair_parameters(
    name_a: str,
    name_b: str,
    *,
    allow_estimates: bool = False,
    pair_data: Mapping[frozenset, PairParameters] | None = None,
) -> PairParameters | None:
    """The published parameters of a pair, oriented (name_a, name_b); None if there are none.

    A pair whose parameters are a combining-rule estimate rather than a fit counts as having
    none unless ``allow_estimates``. ``pair_data`` replaces the shipped data file (from
    :func:`parse_pairs`).
    """
    p = (_pairs() if pair_data is None else pair_data).get(frozenset((name_a, name_b)))
    if p is None or (p.estimate and not allow_estimates):
        return None
    return p if p.names == (name_a, name_b) else p.reversed()


def covered(names: Sequence[str], *, allow_estimates: bool = False) -> bool:
    """Whether every component has a reference equation and every pair a published set."""
    have = available_reference_equations()
    return all(n in have for n in names) and all(
        pair_parameters(a, b, allow_estimates=allow_estimates) is not None
        for a, b in combinations(names, 2)
    )


def _pair_factor(
    xi: FloatArray, xj: FloatArray, beta: float, derivatives: bool = True
) -> tuple[FloatArray, ...]:
    """f = xᵢxⱼ(xᵢ + xⱼ)/(β²xᵢ + xⱼ) and (if asked) its partial derivatives in xᵢ and xⱼ [-].

    Where xᵢ = xⱼ = 0 the pair contributes nothing, and f and both derivatives are 0 (every
    numerator is 0 there, so the denominator is taken as 1).
    """
    b2 = beta * beta
    D = b2 * xi + xj
    inv = 1.0 / (D + (D == 0.0))
    xx = xi * xj
    f = xx * (xi + xj) * inv
    if not derivatives:
        return f, None, None
    f_inv = f * inv
    fi = xj * (2.0 * xi + xj) * inv - b2 * f_inv
    fj = xi * (xi + 2.0 * xj) * inv - f_inv
    return f, fi, fj


class MultiFluidModel:
    """The multi-fluid mixture model (GERG-2008 form) of catalog gases with reference equations.

    Parameters
    ----------
    names : sequence of str
        Canonical catalog names of the components, e.g. ``("argon", "carbon dioxide")``.
    allow_estimates : bool
        Accept pairs whose published parameters are combining-rule estimates, not fits.
    pair_data : mapping, optional
        Binary parameters from :func:`parse_pairs` in place of the shipped data file.

    Raises
    ------
    ModelUnavailableError
        A component has no reference equation, or a pair has no published parameter set.

    Notes
    -----
    Implements :class:`fillcheck.models.mixture_base.MixtureModel`. References: Kunz, Wagner
    (2012), J. Chem. Eng. Data 57, 3032; every component's reference equation and every pair's
    publication (listed in ``info.references``).
    """

    def __init__(
        self,
        names: Sequence[str],
        *,
        allow_estimates: bool = False,
        pair_data: Mapping[frozenset, PairParameters] | None = None,
    ) -> None:
        self.names = tuple(names)
        if len(self.names) < 1 or len(set(self.names)) != len(self.names):
            raise ModelUnavailableError(
                f"a mixture needs distinct components, got {', '.join(self.names)}"
            )
        have = available_reference_equations()
        for n in self.names:
            if n not in have:
                raise ModelUnavailableError(f"{n} has no reference equation of state")
        self.pures: tuple[MultiparameterModel, ...] = tuple(
            load_reference_equation(n) for n in self.names
        )
        self.n_components = len(self.names)
        self.R = GAS_CONSTANT
        self.T_c = np.array([p.T_r for p in self.pures])
        self.v_c = np.array([1.0 / p.rho_r for p in self.pures])
        self.pairs: list[tuple[int, int, PairParameters]] = []
        for i, j in combinations(range(self.n_components), 2):
            a, b = self.names[i], self.names[j]
            p = pair_parameters(a, b, allow_estimates=allow_estimates, pair_data=pair_data)
            if p is None:
                found = pair_parameters(a, b, allow_estimates=True, pair_data=pair_data)
                why = (
                    f"only a combining-rule estimate exists ({found.estimate_basis})"
                    if found is not None
                    else "no published binary parameters"
                )
                raise ModelUnavailableError(
                    f"the multi-fluid model has no fitted parameters for {a}/{b}: {why}"
                )
            self.pairs.append((i, j, p))
        # per pair: β_T, βγ√(TᵢTⱼ), β_v, βγ(vᵢ^⅓ + vⱼ^⅓)³/8
        self._cT = [
            p.beta_T * p.gamma_T * np.sqrt(self.T_c[i] * self.T_c[j]) for i, j, p in self.pairs
        ]
        self._cv = [
            p.beta_v * p.gamma_v * (self.v_c[i] ** (1 / 3) + self.v_c[j] ** (1 / 3)) ** 3 / 8.0
            for i, j, p in self.pairs
        ]
        # one table of every component's terms (groups 0 … n−1) and every weighted departure
        # function's (groups n, n+1, …): αʳ in one pass at the mixture's τ and δ
        self._departing = [
            k for k, (_, _, p) in enumerate(self.pairs) if p.departure and p.F != 0.0
        ]
        blocks = [(i, *b) for i, pure in enumerate(self.pures) for b in pure.residual_blocks]
        for g, k in enumerate(self._departing, start=self.n_components):
            blocks += [(g, *b) for b in self.pairs[k][2].departure]
        self._table = TermTable(blocks, self.n_components + len(self._departing))
        refs = [MODEL_PUBLICATION]
        for pub in [p.publication for p in self.pures] + [
            s for _, _, p in self.pairs for s in p.sources
        ]:
            if pub not in refs:
                refs.append(pub)
        self.info = ModelInfo(
            "reference", "multi-fluid mixture model (GERG-2008 form)", tuple(refs)
        )

    # ------------------------------------------------------------------ reducing functions
    def _reducing_with_derivatives(
        self, x: FloatArray, derivatives: bool
    ) -> tuple[FloatArray, FloatArray, FloatArray | None, FloatArray | None]:
        """T_r, v_r = 1/ρ_r and (if asked) their derivatives in each xᵢ, shape S + (n,)."""
        x = np.asarray(x, dtype=float)
        Tr = x**2 @ self.T_c
        vr = x**2 @ self.v_c
        dT = 2.0 * x * self.T_c if derivatives else None
        dv = 2.0 * x * self.v_c if derivatives else None
        for (i, j, p), cT, cv in zip(self.pairs, self._cT, self._cv, strict=True):
            xi, xj = x[..., i], x[..., j]
            fT, fTi, fTj = _pair_factor(xi, xj, p.beta_T, derivatives)
            fv, fvi, fvj = _pair_factor(xi, xj, p.beta_v, derivatives)
            Tr = Tr + 2.0 * cT * fT
            vr = vr + 2.0 * cv * fv
            if derivatives:
                dT[..., i] += 2.0 * cT * fTi
                dT[..., j] += 2.0 * cT * fTj
                dv[..., i] += 2.0 * cv * fvi
                dv[..., j] += 2.0 * cv * fvj
        return Tr, vr, dT, dv

    def reducing(self, x: FloatArray) -> tuple[FloatArray, FloatArray]:
        """The reducing temperature T_r(x) [K] and density ρ_r(x) [mol/m³], shape S."""
        Tr, vr, _, _ = self._reducing_with_derivatives(x, False)
        return Tr, 1.0 / vr

    def max_density_mol(self, x: FloatArray) -> FloatArray:
        """Six times the reducing density at composition x, shape S [mol/m³] (the pure
        equations' limit, 6 ρ_r, at a pure composition)."""
        return 6.0 * self.reducing(x)[1]

    # ------------------------------------------------------------------ αʳ
    def _evaluate(self, T: FloatArray, rho_mol: FloatArray, x: FloatArray, need_parts: bool):
        """The six αʳ sums (a00, a10, a01, a20, a11, a02) and, if ``need_parts``, the pieces
        n(∂αʳ/∂nᵢ) is made of: each αʳ₀ᵢ, each pair's αʳᵢⱼ, T_r, v_r and their x-derivatives."""
        T, rho = np.broadcast_arrays(np.asarray(T, dtype=float), np.asarray(rho_mol, dtype=float))
        x = np.asarray(x, dtype=float)
        if x.shape[-1] != self.n_components:
            raise ValueError(f"x has {x.shape[-1]} components, the model {self.n_components}")
        shape = np.broadcast_shapes(T.shape, x.shape[:-1])
        T = np.broadcast_to(T, shape)
        rho = np.broadcast_to(rho, shape)
        x = np.broadcast_to(x, (*shape, self.n_components))
        Tr, vr, dT, dv = self._reducing_with_derivatives(x, need_parts)
        sums = self._table.evaluate(Tr / T, rho * vr)  # (6, states, groups)
        n = self.n_components
        flat = x.reshape(-1, n)
        weight = np.empty(sums.shape[1:])
        weight[:, :n] = flat
        for g, k in enumerate(self._departing, start=n):
            i, j, p = self.pairs[k]
            weight[:, g] = p.F * flat[:, i] * flat[:, j]
        tot = np.einsum("ksg,sg->ks", sums, weight).reshape((6, *shape))
        pure_a00 = sums[0, :, :n].reshape((*shape, n)) if need_parts else None
        dep_a00: list[FloatArray | None] = [None] * len(self.pairs)
        for g, k in enumerate(self._departing, start=n):
            dep_a00[k] = sums[0, :, g].reshape(shape)
        return tot, pure_a00, dep_a00, Tr, vr, dT, dv, x

    def alphar(self, T: FloatArray, rho_mol: FloatArray, x: FloatArray) -> ResidualDerivatives:
        """αʳ and its scaled τ, δ derivatives at constant composition.

        Parameters
        ----------
        T : array_like
            Temperature [K], shape S.
        rho_mol : array_like
            Molar density [mol/m³], shape S.
        x : array_like
            Mole fractions [-], shape S + (n,).

        Returns
        -------
        ResidualDerivatives
            a00 = αʳ, a10 = ταʳ_τ, a01 = δαʳ_δ, a20, a11, a02 [-], shape S.
        """
        tot = self._evaluate(T, rho_mol, x, False)[0]
        return ResidualDerivatives(*tot)

    def dalphar_dn(self, T: FloatArray, rho_mol: FloatArray, x: FloatArray) -> FloatArray:
        """n(∂αʳ/∂nᵢ) at constant T, V and n_j≠i, shape S + (n,) [-].

        Kunz, Wagner (2012), J. Chem. Eng. Data 57, 3032, section 7, with the derivatives of the
        reducing functions in each xᵢ written out for the GERG-2008 form (:func:`_pair_factor`).
        """
        tot, pure_a00, dep_a00, Tr, vr, dT, dv, x = self._evaluate(T, rho_mol, x, True)
        # ∂αʳ/∂xᵢ at constant τ, δ: αʳ₀ᵢ + Σⱼ xⱼ Fᵢⱼ αʳᵢⱼ
        ar_x = pure_a00.copy()
        for (i, j, p), dep in zip(self.pairs, dep_a00, strict=True):
            if dep is None:
                continue
            ar_x[..., i] += p.F * x[..., j] * dep
            ar_x[..., j] += p.F * x[..., i] * dep
        n_dT = dT - np.sum(x * dT, axis=-1, keepdims=True)
        n_dv = dv - np.sum(x * dv, axis=-1, keepdims=True)
        a10, a01 = tot[1][..., None], tot[2][..., None]
        return (
            a01 * (1.0 + n_dv / vr[..., None])
            + a10 * n_dT / Tr[..., None]
            + ar_x
            - np.sum(x * ar_x, axis=-1, keepdims=True)
        )
