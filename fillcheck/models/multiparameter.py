"""Multiparameter reference equations of state: αʳ(τ, δ) as a sum of published term types.

Every term except the non-analytic one is a product of a δ-part and a τ-part, so its scaled
derivatives follow from the logarithmic derivatives k = x ∂ln f/∂x and x ∂k/∂x of each part::

    δ ∂f/∂δ = f k_δ,   δ² ∂²f/∂δ² = f [k_δ(k_δ − 1) + δ k_δ'],   τδ ∂²f/∂τ∂δ = f k_δ k_τ

(and the same in τ). The term forms are those of Span (2000), *Multiparameter Equations of State*,
Springer, and of the publications named in each fluid's data file:

- power: n δ^d τ^t exp(−δ^l) (no exponential where l = 0)
- exponential: n δ^d τ^t exp(−g δ^l)
- gaussian: n δ^d τ^t exp(−η(δ − ε)² − β(τ − γ)²)
- lemmon2005: n δ^d τ^t exp(−δ^l − τ^m) (Lemmon, Jacobsen (2005), J. Phys. Chem. Ref. Data 34, 69)
- gao_b: n δ^d τ^t exp(η(δ − ε)² + 1/(β(τ − γ)² + b)) with η < 0 as published (Gao et al.
  (2020), ammonia)
- nonanalytic: n Δ^b δ ψ (Span, Wagner (1996), J. Phys. Chem. Ref. Data 25, 1509, eqs. 6.4–6.6
  and Table 32), with θ = (1 − τ) + A((δ − 1)²)^(1/(2β)), Δ = θ² + B((δ − 1)²)^a,
  ψ = exp(−C(δ − 1)² − D(τ − 1)²).

The data files are read by :func:`load_reference_equation`; an unknown term type or arrays of
unequal length stop the load.
"""

from __future__ import annotations

import json
from dataclasses import dataclass
from functools import cache
from pathlib import Path
from typing import Any

import numpy as np

from fillcheck.fluids.superancillary import equation_fingerprint
from fillcheck.models.base import FloatArray, ModelInfo, ResidualDerivatives

DATA_DIR = Path(__file__).resolve().parents[1] / "fluids" / "data" / "reference"
_CHUNK = 4096
"""States per chunk in αʳ evaluations (keeps the states × terms arrays in cache)."""


class ReferenceDataError(ValueError):
    """A reference-equation data file is malformed (a defect of the shipped data)."""


def _arrays(block: dict[str, Any], keys: tuple[str, ...], where: str) -> dict[str, np.ndarray]:
    out = {}
    for k in keys:
        if k not in block:
            raise ReferenceDataError(f"{where}: term block {block.get('type')!r} lacks {k!r}")
        out[k] = np.asarray(block[k], dtype=float)
    lengths = {v.shape for v in out.values()}
    if len(lengths) != 1 or any(v.ndim != 1 for v in out.values()):
        raise ReferenceDataError(f"{where}: arrays of block {block.get('type')!r} differ in length")
    return out


class _Separable:
    """Terms n·D(δ)·T(τ); subclasses add factors to ln D, k_δ, δk_δ' and ln T, k_τ, τk_τ'."""

    def __init__(self, n: np.ndarray, d: np.ndarray, t: np.ndarray) -> None:
        self.n, self.d, self.t = n, d, t

    def delta_part(self, delta: FloatArray) -> tuple[FloatArray, FloatArray, FloatArray]:
        return self.d * np.log(delta), self.d, 0.0

    def tau_part(self, tau: FloatArray) -> tuple[FloatArray, FloatArray, FloatArray]:
        return self.t * np.log(tau), self.t, 0.0

    def terms(self, tau: FloatArray, delta: FloatArray) -> tuple[FloatArray, ...]:
        lD, kD, dkD = self.delta_part(delta)
        lT, kT, tkT = self.tau_part(tau)
        f = self.n * np.exp(lD + lT)
        parts = (
            f,
            f * kD,
            f * (kD * (kD - 1.0) + dkD),
            f * kT,
            f * (kT * (kT - 1.0) + tkT),
            f * kD * kT,
        )
        return tuple(np.sum(x, axis=-1) for x in parts)


class _Power:
    """n δ^d τ^t exp(−g δ^l) (g = 0 where l = 0), summed with matrix–vector products.

    With x = δ^l per term: k_δ = d − g l x, δk_δ' = −g l² x, k_τ = t, so every derivative is a
    weighted sum of f, f·x and f·x², and only one exponential of the (states × terms) array is
    needed.
    """

    def __init__(self, n, d, t, g, l) -> None:
        self.n, self.d, self.t = n, d, t
        self.g = np.where(l > 0, g, 0.0)
        self.l = l
        self.has_exp = bool(np.any(self.g != 0))
        gl = self.g * l
        self.w_d, self.w_t = d, t
        self.w_dd, self.w_tt, self.w_dt = d * (d - 1.0), t * (t - 1.0), d * t
        self.w_x1 = gl  # for a01
        self.w_xdd = gl * (2.0 * d - 1.0) + self.g * l * l  # for a02 (terms in f·x)
        self.w_xx = gl * gl  # for a02 (terms in f·x²)
        self.w_xt = gl * t  # for a11

    def terms(self, tau: FloatArray, delta: FloatArray) -> tuple[FloatArray, ...]:
        lnd, lnt = np.log(delta), np.log(tau)
        expo = lnd * self.d + lnt * self.t
        if self.has_exp:
            x = np.exp(lnd * self.l)
            expo = expo - self.g * x
        f = self.n * np.exp(expo)
        a00 = f.sum(-1)
        a01 = f @ self.w_d
        a02 = f @ self.w_dd
        a10 = f @ self.w_t
        a20 = f @ self.w_tt
        a11 = f @ self.w_dt
        if self.has_exp:
            fx = f * x
            a01 = a01 - fx @ self.w_x1
            a02 = a02 - fx @ self.w_xdd + (fx * x) @ self.w_xx
            a11 = a11 - fx @ self.w_xt
        return a00, a01, a02, a10, a20, a11


class _Gaussian(_Separable):
    def __init__(self, n, d, t, eta, eps, beta, gamma) -> None:
        super().__init__(n, d, t)
        self.eta, self.eps, self.beta, self.gamma = eta, eps, beta, gamma

    def delta_part(self, delta: FloatArray) -> tuple[FloatArray, FloatArray, FloatArray]:
        lD, kD, dkD = super().delta_part(delta)
        e, x = self.eta, delta - self.eps
        return (
            lD - e * x * x,
            kD - 2.0 * e * delta * x,
            dkD - 2.0 * e * delta * (2.0 * delta - self.eps),
        )

    def tau_part(self, tau: FloatArray) -> tuple[FloatArray, FloatArray, FloatArray]:
        lT, kT, tkT = super().tau_part(tau)
        b, y = self.beta, tau - self.gamma
        return (
            lT - b * y * y,
            kT - 2.0 * b * tau * y,
            tkT - 2.0 * b * tau * (2.0 * tau - self.gamma),
        )


class _GaoB(_Gaussian):
    def __init__(self, n, d, t, eta, eps, beta, gamma, b) -> None:
        super().__init__(n, d, t, eta, eps, beta, gamma)
        self.b = b

    def tau_part(self, tau: FloatArray) -> tuple[FloatArray, FloatArray, FloatArray]:
        lT, kT, tkT = _Separable.tau_part(self, tau)
        beta, y = self.beta, tau - self.gamma
        D = beta * y * y + self.b
        q = -2.0 * beta * tau * y / D**2
        tq = (
            -2.0 * beta * tau * (2.0 * tau - self.gamma) / D**2
            + 8.0 * beta**2 * tau**2 * y * y / D**3
        )
        return lT + 1.0 / D, kT + q, tkT + tq


class _Lemmon2005(_Separable):
    def __init__(self, n, d, t, l, m) -> None:
        super().__init__(n, d, t)
        self.l, self.m = l, m

    def delta_part(self, delta: FloatArray) -> tuple[FloatArray, FloatArray, FloatArray]:
        lD, kD, dkD = super().delta_part(delta)
        on = self.l > 0
        dl = np.where(on, delta**self.l, 0.0)
        return lD - dl, kD - self.l * dl, dkD - self.l**2 * dl

    def tau_part(self, tau: FloatArray) -> tuple[FloatArray, FloatArray, FloatArray]:
        lT, kT, tkT = super().tau_part(tau)
        on = self.m > 0
        tm = np.where(on, tau**self.m, 0.0)
        return lT - tm, kT - self.m * tm, tkT - self.m**2 * tm


class _NonAnalytic:
    """Span–Wagner non-analytic terms n Δ^b δ ψ (Span & Wagner 1996, Table 32)."""

    def __init__(self, n, a, b, beta, A, B, C, D) -> None:
        self.n, self.a, self.b, self.beta = n, a, b, beta
        self.A, self.B, self.C, self.D = A, B, C, D

    def terms(self, tau: FloatArray, delta: FloatArray) -> tuple[FloatArray, ...]:
        # the terms are singular exactly at δ = 1; evaluate a hair away (1e-12 relative)
        delta = np.where(np.abs(delta - 1.0) < 1e-12, 1.0 + 1e-12, delta)
        n, a, b, beta, A, B, C, D = (
            self.n,
            self.a,
            self.b,
            self.beta,
            self.A,
            self.B,
            self.C,
            self.D,
        )
        dm1 = delta - 1.0
        sq = dm1 * dm1
        theta = (1.0 - tau) + A * sq ** (0.5 / beta)
        Delta = theta * theta + B * sq**a
        psi = np.exp(-C * sq - D * (tau - 1.0) ** 2)
        dDelta_d = dm1 * (
            A * theta * (2.0 / beta) * sq ** (0.5 / beta - 1.0) + 2.0 * B * a * sq ** (a - 1.0)
        )
        d2Delta_dd = dDelta_d / dm1 + sq * (
            4.0 * B * a * (a - 1.0) * sq ** (a - 2.0)
            + 2.0 * A**2 * (1.0 / beta) ** 2 * (sq ** (0.5 / beta - 1.0)) ** 2
            + A * theta * (4.0 / beta) * (0.5 / beta - 1.0) * sq ** (0.5 / beta - 2.0)
        )
        Db = Delta**b
        Db1 = Delta ** (b - 1.0)
        Db2 = Delta ** (b - 2.0)
        Db_d = b * Db1 * dDelta_d
        Db_dd = b * (Db1 * d2Delta_dd + (b - 1.0) * Db2 * dDelta_d**2)
        Db_t = -2.0 * theta * b * Db1
        Db_tt = 2.0 * b * Db1 + 4.0 * theta**2 * b * (b - 1.0) * Db2
        Db_dt = (
            -A * b * (2.0 / beta) * Db1 * dm1 * sq ** (0.5 / beta - 1.0)
            - 2.0 * theta * b * (b - 1.0) * Db2 * dDelta_d
        )
        psi_d = -2.0 * C * dm1 * psi
        psi_dd = (2.0 * C * sq - 1.0) * 2.0 * C * psi
        psi_t = -2.0 * D * (tau - 1.0) * psi
        psi_tt = (2.0 * D * (tau - 1.0) ** 2 - 1.0) * 2.0 * D * psi
        psi_dt = 4.0 * C * D * dm1 * (tau - 1.0) * psi
        f = n * Db * delta * psi
        f_d = n * (Db * (psi + delta * psi_d) + Db_d * delta * psi)
        f_dd = n * (
            Db * (2.0 * psi_d + delta * psi_dd)
            + 2.0 * Db_d * (psi + delta * psi_d)
            + Db_dd * delta * psi
        )
        f_t = n * delta * (Db_t * psi + Db * psi_t)
        f_tt = n * delta * (Db_tt * psi + 2.0 * Db_t * psi_t + Db * psi_tt)
        f_dt = n * (
            Db * (psi_t + delta * psi_dt)
            + delta * Db_d * psi_t
            + Db_t * (psi + delta * psi_d)
            + Db_dt * delta * psi
        )
        parts = (f, delta * f_d, delta**2 * f_dd, tau * f_t, tau**2 * f_tt, tau * delta * f_dt)
        return tuple(np.sum(x, axis=-1) for x in parts)


_RESIDUAL_TYPES: dict[str, tuple[type, tuple[str, ...]]] = {
    "power": (_Power, ("n", "d", "t", "l")),
    "exponential": (_Power, ("n", "d", "t", "g", "l")),
    "gaussian": (_Gaussian, ("n", "d", "t", "eta", "epsilon", "beta", "gamma")),
    "gao_b": (_GaoB, ("n", "d", "t", "eta", "epsilon", "beta", "gamma", "b")),
    "lemmon2005": (_Lemmon2005, ("n", "d", "t", "l", "m")),
    "nonanalytic": (_NonAnalytic, ("n", "a", "b", "beta", "A", "B", "C", "D")),
}


def _residual_block(block: dict[str, Any], where: str) -> Any:
    kind = block.get("type")
    if kind not in _RESIDUAL_TYPES:
        raise ReferenceDataError(f"{where}: unknown residual term type {kind!r}")
    cls, keys = _RESIDUAL_TYPES[kind]
    arr = _arrays(block, keys, where)
    if kind == "power":
        return _Power(arr["n"], arr["d"], arr["t"], np.ones_like(arr["n"]), arr["l"])
    if kind == "gao_b":
        # the data file keeps the publication's sign, exp(+η(δ − ε)² + …) with η < 0; the
        # class shares the Gaussian convention exp(−η(δ − ε)²)
        arr["eta"] = -arr["eta"]
    return cls(*(arr[k] for k in keys))


@dataclass(frozen=True)
class IdealDerivatives:
    """α⁰ and its τ-derivatives τ∂α⁰/∂τ, τ²∂²α⁰/∂τ² (the δ-part is ln δ) [-]."""

    a00: FloatArray
    a10: FloatArray
    a20: FloatArray


class _IdealPart:
    """The ideal-gas Helmholtz energy α⁰(τ, δ) in its published forms."""

    def __init__(self, blocks: list[dict[str, Any]], T_r: float, where: str) -> None:
        self.blocks = blocks
        self.T_r = T_r
        known = {
            "lead",
            "log_tau",
            "power",
            "planck_einstein",
            "planck_einstein_generalized",
            "cp0_poly",
            "cp0_constant",
            "offset",
        }
        for b in blocks:
            if b.get("type") not in known:
                raise ReferenceDataError(f"{where}: unknown ideal-gas term type {b.get('type')!r}")

    def evaluate(self, tau: FloatArray) -> IdealDerivatives:
        a0 = np.zeros_like(tau)
        a1 = np.zeros_like(tau)
        a2 = np.zeros_like(tau)
        for b in self.blocks:
            kind = b["type"]
            if kind in ("lead", "offset"):
                a0 = a0 + b["a1"] + b["a2"] * tau
                a1 = a1 + b["a2"] * tau
            elif kind == "log_tau":
                a0 = a0 + b["a"] * np.log(tau)
                a1 = a1 + b["a"]
                a2 = a2 - b["a"]
            elif kind == "power":
                n, t = np.asarray(b["n"]), np.asarray(b["t"])
                x = n * tau[..., None] ** t
                a0, a1, a2 = a0 + x.sum(-1), a1 + (t * x).sum(-1), a2 + (t * (t - 1) * x).sum(-1)
            elif kind == "planck_einstein":
                n, t = np.asarray(b["n"]), np.asarray(b["t"])
                e = np.exp(-t * tau[..., None])
                a0 = a0 + (n * np.log1p(-e)).sum(-1)
                a1 = a1 + (n * t * tau[..., None] * e / (1 - e)).sum(-1)
                a2 = a2 - (n * (t * tau[..., None]) ** 2 * e / (1 - e) ** 2).sum(-1)
            elif kind == "planck_einstein_generalized":
                n, t, c, d = (np.asarray(b[k]) for k in ("n", "t", "c", "d"))
                e = d * np.exp(t * tau[..., None])
                g = c + e
                a0 = a0 + (n * np.log(np.abs(g))).sum(-1)
                a1 = a1 + (n * t * tau[..., None] * e / g).sum(-1)
                a2 = a2 + (n * (t * tau[..., None]) ** 2 * c * e / g**2).sum(-1)
            else:  # cp0_poly / cp0_constant: α⁰ from ∫cp⁰ with the block's reference T0
                c_, t_ = _cp0_coefficients(b)
                Tr, T0 = b["T_r / K"], b["T0 / K"]
                a0_, a1_, a2_ = _cp0_alpha(c_, t_, Tr, T0, tau)
                a0, a1, a2 = a0 + a0_, a1 + a1_, a2 + a2_
        return IdealDerivatives(a0, a1, a2)


def _cp0_coefficients(b: dict[str, Any]) -> tuple[np.ndarray, np.ndarray]:
    if b["type"] == "cp0_constant":
        return np.array([b["cp_over_R"]]), np.array([0.0])
    return np.asarray(b["c"], dtype=float), np.asarray(b["t"], dtype=float)


def _cp0_alpha(
    c: np.ndarray, t: np.ndarray, Tr: float, T0: float, tau: FloatArray
) -> tuple[FloatArray, FloatArray, FloatArray]:
    """α⁰ part of cp⁰/R = Σ c T^t: H/T − S with H = ∫cp⁰/R dT and S = ∫cp⁰/(RT) dT from T0.

    Its derivatives are τ∂/∂τ = H/T and τ²∂²/∂τ² = −cp⁰/R (the −1 of cv⁰ = cp⁰ − R and the
    ln δ sit in the lead and log-τ terms).
    """
    T = Tr / tau
    a0 = np.zeros_like(tau)
    a1 = np.zeros_like(tau)
    a2 = np.zeros_like(tau)
    for ci, ti in zip(c, t, strict=True):
        if ti == 0.0:
            # h/RT = c (T − T0)/T ; s/R = c ln(T/T0)
            h = ci * (T - T0) / T
            s = ci * np.log(T / T0)
            cv = ci
        elif ti == -1.0:
            h = ci * np.log(T / T0) / T
            s = ci * (1.0 / T0 - 1.0 / T)
            cv = ci / T
        else:
            h = ci * (T ** (ti + 1) - T0 ** (ti + 1)) / (ti + 1) / T
            s = ci * (T**ti - T0**ti) / ti
            cv = ci * T**ti
        # α⁰ = h/RT − 1 − s/R (the −1 and the ln δ live in the lead term); τα⁰_τ = −T ∂α⁰/∂T
        a0 = a0 + h - s
        a1 = a1 + h  # τ∂(h/RT − s/R)/∂τ = h/RT for a cp integral
        a2 = a2 - cv  # τ²∂²α⁰/∂τ² = −cv⁰/R contribution
    return a0, a1, a2


@dataclass(frozen=True)
class ReferenceValidity:
    """The published range of the equation: T_min..T_max [K], p up to p_max [Pa]."""

    T_min_K: float
    T_max_K: float
    P_max_Pa: float


class MultiparameterModel:
    """A published multiparameter Helmholtz equation of state for one pure fluid."""

    def __init__(self, spec: dict[str, Any], where: str = "<data>") -> None:
        try:
            self.R = float(spec["gas_constant / J/(mol K)"])
            self.molar_mass = float(spec["molar_mass / kg/mol"])
            self.T_r = float(spec["reducing"]["T / K"])
            self.rho_r = float(spec["reducing"]["rhomolar / mol/m3"])
            crit = spec["critical"]
            self.critical = (
                float(crit["T / K"]),
                float(crit["p / Pa"]),
                float(crit["rhomolar / mol/m3"]),
            )
            self.T_triple = float(spec["triple_point"]["T / K"])
            v = spec["validity"]
            self.validity = ReferenceValidity(
                float(v["T_min / K"]), float(v["T_max / K"]), float(v["p_max / Pa"])
            )
            publication = spec["publication"]
        except (KeyError, TypeError, ValueError) as exc:
            raise ReferenceDataError(f"{where}: missing or malformed key {exc}") from None
        self.publication = publication
        self.info = ModelInfo("reference", "reference equation of state", (publication,))
        self._terms = [_residual_block(b, where) for b in spec["residual"]]
        self.ideal = _IdealPart(spec.get("ideal", []), self.T_r, where)
        self.ancillaries = spec.get("ancillaries", {})
        self.pseudo_pure = bool(spec.get("pseudo_pure", False))
        self.fingerprint = equation_fingerprint(spec)
        """SHA-256 of the coefficients that fix the saturation curve (superancillary files)."""

    def alphar(self, T: FloatArray, rho_mol: FloatArray) -> ResidualDerivatives:
        """αʳ and its scaled derivatives at T [K] and molar density ρ [mol/m³].

        Large arrays are evaluated in chunks of states, so that the (states × terms)
        intermediates stay in the processor's cache.
        """
        T, rho = np.broadcast_arrays(np.asarray(T, dtype=float), np.asarray(rho_mol, dtype=float))
        shape = T.shape
        tau = (self.T_r / T).reshape(-1, 1)
        delta = (rho / self.rho_r).reshape(-1, 1)
        n = tau.shape[0]
        out = np.zeros((6, n))
        for lo in range(0, n, _CHUNK):
            hi = min(n, lo + _CHUNK)
            t, d = tau[lo:hi], delta[lo:hi]
            for term in self._terms:
                out[:, lo:hi] += np.asarray(term.terms(t, d))
        a00, a01, a02, a10, a20, a11 = (x.reshape(shape) for x in out)
        return ResidualDerivatives(a00=a00, a10=a10, a01=a01, a20=a20, a11=a11, a02=a02)

    def alpha0(self, T: FloatArray) -> IdealDerivatives:
        """The ideal-gas part's τ-derivatives at T [K] (without the ln δ of the lead term)."""
        return self.ideal.evaluate(self.T_r / np.asarray(T, dtype=float))

    def max_density_mol(self) -> float:
        """A density no state of the fluid reaches (six times the reducing density) [mol/m³]."""
        return 6.0 * self.rho_r

    def critical_point(self) -> tuple[float, float, float]:
        """The equation's critical point: T [K], P [Pa], ρ [mol/m³]."""
        return self.critical


@cache
def available_reference_equations() -> frozenset[str]:
    """Canonical names of the fluids with a reference-equation data file."""
    if not DATA_DIR.exists():
        return frozenset()
    return frozenset(
        json.loads(p.read_text(encoding="utf-8"))["fluid"] for p in DATA_DIR.glob("*.json")
    )


@cache
def load_reference_equation(name: str) -> MultiparameterModel:
    """The reference equation of a catalog fluid by its canonical name."""
    path = DATA_DIR / f"{name.replace(' ', '_')}.json"
    if not path.exists():
        raise ReferenceDataError(f"no reference equation data for {name}")
    return MultiparameterModel(json.loads(path.read_text(encoding="utf-8")), path.name)


class ReferenceIdealGas:
    """The equation's own ideal-gas part in the interface of models.idealgas.IdealGasMixture.

    With α⁰ = α⁰(τ) + ln δ: cp⁰/R = 1 − τ²α⁰_ττ, h⁰/(RT) = 1 + τα⁰_τ, s⁰/R = τα⁰_τ − α⁰, in the
    publication's own reference state.
    """

    def __init__(self, model: MultiparameterModel) -> None:
        self.model = model
        self.T_min_K = model.validity.T_min_K
        self.T_max_K = model.validity.T_max_K

    def cp0_over_R(self, T: FloatArray) -> FloatArray:
        return 1.0 - self.model.alpha0(T).a20

    def h0_over_RT(self, T: FloatArray) -> FloatArray:
        return 1.0 + self.model.alpha0(T).a10

    def s0_over_R(self, T: FloatArray, rho_mol: FloatArray) -> FloatArray:
        d = self.model.alpha0(T)
        return d.a10 - d.a00 - np.log(np.asarray(rho_mol) / self.model.rho_r)


def ancillary_value(spec: dict[str, Any], T: FloatArray) -> FloatArray:
    """Evaluate a saturation ancillary equation at T [K].

    With θ = 1 − T/T_r and S = Σ nᵢ θ^tᵢ: value = v_r (1 + S) for the non-exponential form, and
    v_r exp(S), or v_r exp(S T_r/T) when ``using_tau_r``, for the exponential forms.
    """
    T = np.asarray(T, dtype=float)
    Tr = float(spec["T_r / K"])
    theta = np.clip(1.0 - T / Tr, 0.0, None)
    n = np.asarray(spec["n"], dtype=float)
    t = np.asarray(spec["t"], dtype=float)
    S = (n * theta[..., None] ** t).sum(-1)
    ref = float(spec["reducing_value"])
    if spec.get("noexp", False):
        return ref * (1.0 + S)
    if spec.get("using_tau_r", False):
        S = S * Tr / T
    return ref * np.exp(S)
