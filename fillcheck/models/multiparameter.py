"""Multiparameter reference equations of state of pure fluids, read from their data files.

αʳ(τ, δ) is a sum of published term forms (power, exponential, Gaussian, Lemmon (2005), Gao
(2020) and the Span–Wagner non-analytic terms), evaluated by
:class:`fillcheck.models.helmholtz_terms.TermTable`; the ideal-gas part α⁰(τ) by
:class:`_IdealPart`. The term forms are those of Span (2000), *Multiparameter Equations of
State*, Springer, and of the publications named in each fluid's data file.

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
from fillcheck.models.helmholtz_terms import ReferenceDataError, TermTable, block_arrays

DATA_DIR = Path(__file__).resolve().parents[1] / "fluids" / "data" / "reference"


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
        self.residual_blocks = tuple(block_arrays(b, where) for b in spec["residual"])
        """The residual term blocks as (form, coefficient arrays), for tables of mixtures."""
        self._table = TermTable([(0, *b) for b in self.residual_blocks], 1)
        self.ideal = _IdealPart(spec.get("ideal", []), self.T_r, where)
        self.ancillaries = spec.get("ancillaries", {})
        self.pseudo_pure = bool(spec.get("pseudo_pure", False))
        self.fingerprint = equation_fingerprint(spec)
        """SHA-256 of the coefficients that fix the saturation curve (superancillary files)."""

    def alphar(self, T: FloatArray, rho_mol: FloatArray) -> ResidualDerivatives:
        """αʳ and its scaled derivatives at T [K] and molar density ρ [mol/m³]
        (:class:`fillcheck.models.helmholtz_terms.TermTable`)."""
        T, rho = np.broadcast_arrays(np.asarray(T, dtype=float), np.asarray(rho_mol, dtype=float))
        out = self._table.evaluate(self.T_r / T, rho / self.rho_r)
        return ResidualDerivatives(*(x.reshape(T.shape) for x in out[:, :, 0]))

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
