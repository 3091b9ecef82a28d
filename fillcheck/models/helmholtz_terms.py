"""The residual terms of multiparameter equations, evaluated as one table.

Every published term form but the non-analytic one is separable, n·D(δ)·T(τ), and here all of
them are written as one generalised term::

    f = n δ^d τ^t exp(−c δ^l − h τ^m − η(δ − ε)² − β(τ − γ)² − b_δ(δ − γ_δ) + 1/(β'(τ − γ')² + b'))

with the coefficients a form lacks set to zero. Its scaled derivatives follow from the
logarithmic derivatives k = x ∂ln f/∂x and x ∂k/∂x of each part (Span (2000), *Multiparameter
Equations of State*, Springer, section 3.1)::

    δ ∂f/∂δ = f k_δ,   δ² ∂²f/∂δ² = f [k_δ(k_δ − 1) + δ k_δ'],   τδ ∂²f/∂τ∂δ = f k_δ k_τ

(and the same in τ). The term forms and the factors each adds:

- power: n δ^d τ^t exp(−δ^l) (no exponential where l = 0)
- exponential: n δ^d τ^t exp(−g δ^l)
- lemmon2005: n δ^d τ^t exp(−δ^l − τ^m) (Lemmon, Jacobsen (2005), J. Phys. Chem. Ref. Data 34, 69)
- gaussian: n δ^d τ^t exp(−η(δ − ε)² − β(τ − γ)²)
- gao_b: n δ^d τ^t exp(η(δ − ε)² + 1/(β(τ − γ)² + b)) with η < 0 as published (Gao et al.
  (2020), J. Phys. Chem. Ref. Data 49, 043102, ammonia)
- gerg_exponential: n δ^d τ^t exp(−η(δ − ε)² − β(δ − γ)) (the departure terms of Kunz, Wagner
  (2012), J. Chem. Eng. Data 57, 3032)

The columns of a table are sorted by form so that every factor applies to one contiguous slice
of the (states × terms) arrays, and the terms of several equations (the components and binary
departure functions of a mixture) share one table, summed per equation by one matrix product:
a mixture's αʳ costs one pass over the arrays, not one per component.

The non-analytic terms n Δ^b δ ψ (Span, Wagner (1996), J. Phys. Chem. Ref. Data 25, 1509,
eqs. 6.4–6.6 and Table 32) are not separable and are evaluated on their own
(:class:`NonAnalytic`).
"""

from __future__ import annotations

from collections.abc import Sequence
from typing import Any

import numpy as np

from fillcheck.models.base import FloatArray

CHUNK = 4096
"""States per chunk of a table's evaluation (keeps the states × terms arrays in cache)."""

#: the separable forms in column order, with the factors each carries
_ORDER = ("plain", "power", "exponential", "lemmon2005", "gao_b", "gaussian", "gerg_exponential")
_KEYS: dict[str, tuple[str, ...]] = {
    "power": ("n", "d", "t", "l"),
    "exponential": ("n", "d", "t", "g", "l"),
    "lemmon2005": ("n", "d", "t", "l", "m"),
    "gaussian": ("n", "d", "t", "eta", "epsilon", "beta", "gamma"),
    "gao_b": ("n", "d", "t", "eta", "epsilon", "beta", "gamma", "b"),
    "gerg_exponential": ("n", "d", "t", "eta", "epsilon", "beta", "gamma"),
    "nonanalytic": ("n", "a", "b", "beta", "A", "B", "C", "D"),
}
SEPARABLE_FORMS = frozenset(_ORDER[1:])
FORMS = frozenset(_KEYS)


class ReferenceDataError(ValueError):
    """A reference-equation data file is malformed (a defect of the shipped data)."""


def block_arrays(block: dict[str, Any], where: str) -> tuple[str, dict[str, np.ndarray]]:
    """The form of a term block and its coefficient arrays, checked: a known form, every key
    present and every array one-dimensional and of one length."""
    kind = block.get("type")
    if kind not in _KEYS:
        raise ReferenceDataError(f"{where}: unknown residual term type {kind!r}")
    out = {}
    for k in _KEYS[kind]:
        if k not in block:
            raise ReferenceDataError(f"{where}: term block {kind!r} lacks {k!r}")
        out[k] = np.asarray(block[k], dtype=float)
    if len({v.shape for v in out.values()}) != 1 or any(v.ndim != 1 for v in out.values()):
        raise ReferenceDataError(f"{where}: arrays of block {kind!r} differ in length")
    if kind == "gao_b":
        # the data file keeps the publication's sign, exp(+η(δ − ε)² + …) with η < 0; the table
        # shares the Gaussian convention exp(−η(δ − ε)²)
        out["eta"] = -out["eta"]
    return str(kind), out


class NonAnalytic:
    """Span–Wagner non-analytic terms n Δ^b δ ψ (Span, Wagner (1996), J. Phys. Chem. Ref. Data
    25, 1509, eqs. 6.4–6.6 and Table 32), with θ = (1 − τ) + A((δ − 1)²)^(1/(2β)),
    Δ = θ² + B((δ − 1)²)^a and ψ = exp(−C(δ − 1)² − D(τ − 1)²).

    With P = ((δ − 1)²)^(1/(2β)) and Q = ((δ − 1)²)^a every power of (δ − 1)² in the derivatives
    of Δ is P or Q over a power of (δ − 1), and the derivatives of ψ are ψ times polynomials.
    """

    def __init__(self, n, a, b, beta, A, B, C, D) -> None:
        self.n, self.a, self.b, self.C, self.D, self.A, self.B = n, a, b, C, D, A, B
        self.p = 0.5 / beta  # P = sq^p
        self.k_dP = 2.0 * A / beta  # ∂Δ/∂δ = (k_dP θ P + k_dQ Q)/(δ − 1)
        self.k_dQ = 2.0 * B * a
        self.k_ddQ = 4.0 * B * a * (a - 1.0)  # the rest of ∂²Δ/∂δ², over (δ − 1)²
        self.k_ddPP = 2.0 * (A / beta) ** 2
        self.k_ddP = A * (4.0 / beta) * (0.5 / beta - 1.0)

    def terms(self, tau: np.ndarray, delta: np.ndarray) -> tuple[np.ndarray, ...]:
        """(a00, a10, a01, a20, a11, a02) summed over the terms, for τ, δ of shape (S, 1)."""
        # the terms are singular exactly at δ = 1; evaluate a hair away (1e-12 relative)
        delta = np.where(np.abs(delta - 1.0) < 1e-12, 1.0 + 1e-12, delta)
        b = self.b
        dm1 = delta - 1.0
        sq = dm1 * dm1
        lsq = np.log(sq)
        tm1 = tau - 1.0
        P = np.exp(lsq * self.p)
        Q = np.exp(lsq * self.a)
        theta = self.A * P - tm1
        Delta = theta * theta + self.B * Q
        # ψ and its derivatives over ψ
        pd, pt = (-2.0 * self.C) * dm1, (-2.0 * self.D) * tm1
        pdd = pd * pd - 2.0 * self.C
        ptt = pt * pt - 2.0 * self.D
        psi = np.exp(-self.C * sq - self.D * (tm1 * tm1))
        # Δ's δ-derivatives
        thP = theta * P
        Dd = (self.k_dP * thP + self.k_dQ * Q) / dm1
        Ddd = (Dd + (self.k_ddQ * Q + self.k_ddPP * P * P + self.k_ddP * thP) / dm1) / dm1
        # Δ^b and its derivatives
        Db = np.exp(b * np.log(Delta))
        Db1 = Db / Delta
        bDb1 = b * Db1
        bb1Db2 = (b - 1.0) * bDb1 / Delta
        Db_d = bDb1 * Dd
        Db_dd = bDb1 * Ddd + bb1Db2 * Dd * Dd
        Db_t = -2.0 * theta * bDb1
        Db_tt = 2.0 * bDb1 + 4.0 * theta * theta * bb1Db2
        Db_dt = -self.k_dP * bDb1 * P / dm1 - 2.0 * theta * bb1Db2 * Dd
        npsi = self.n * psi
        one_dpd = 1.0 + delta * pd
        f = npsi * Db  # without the factor δ
        f_d = npsi * (Db * one_dpd + Db_d * delta)
        f_dd = npsi * (Db * (2.0 * pd + delta * pdd) + 2.0 * Db_d * one_dpd + Db_dd * delta)
        f_t = npsi * (Db_t + Db * pt)  # without δ
        f_tt = npsi * (Db_tt + 2.0 * Db_t * pt + Db * ptt)  # without δ
        f_dt = npsi * (Db * pt * one_dpd + delta * Db_d * pt + Db_t * one_dpd + Db_dt * delta)
        d, t = delta[:, 0], tau[:, 0]
        return (
            d * f.sum(-1),
            t * d * f_t.sum(-1),
            d * f_d.sum(-1),
            t * t * d * f_tt.sum(-1),
            t * d * f_dt.sum(-1),
            d * d * f_dd.sum(-1),
        )


def _columns(kind: str, arr: dict[str, np.ndarray]) -> dict[str, np.ndarray]:
    """The generalised coefficients of a separable block's terms (zero where it lacks one)."""
    k = arr["n"].size
    zero = np.zeros(k)
    keys = ("c", "l", "h", "m", "eta", "eps", "bt", "gt", "bl", "gl", "br", "gr", "b")
    col = dict.fromkeys(keys, zero)
    col.update(n=arr["n"], d=arr["d"], t=arr["t"])
    if kind in ("power", "exponential", "lemmon2005"):
        on = arr["l"] > 0
        c = arr["g"] if kind == "exponential" else np.ones(k)
        col.update(c=np.where(on, c, 0.0), l=np.where(on, arr["l"], 0.0))
    if kind == "lemmon2005":
        on = arr["m"] > 0
        col.update(h=np.where(on, 1.0, 0.0), m=np.where(on, arr["m"], 0.0))
    if kind in ("gaussian", "gao_b", "gerg_exponential"):
        col.update(eta=arr["eta"], eps=arr["epsilon"])
    if kind == "gaussian":
        col.update(bt=arr["beta"], gt=arr["gamma"])
    if kind == "gerg_exponential":
        col.update(bl=arr["beta"], gl=arr["gamma"])
    if kind == "gao_b":
        col.update(br=arr["beta"], gr=arr["gamma"], b=arr["b"])
    return col


def _weights(d: np.ndarray, t: np.ndarray, c: np.ndarray, l: np.ndarray) -> tuple[np.ndarray, ...]:
    """Per-term weights of the six sums of terms n δ^d τ^t exp(−c δ^l), in the order
    (a00, a10, a01, a20, a11, a02), on f, f·x and f·x² with x = δ^l.

    With k_δ = d − cl·x, δk_δ' = −cl·l·x and k_τ = t every sum is a weighted sum of f, f·x and
    f·x², so no (states × terms) array of k_δ or k_τ is formed."""
    one, zero, cl = np.ones_like(d), np.zeros_like(d), c * l
    w0 = np.stack([one, t, d, t * (t - 1.0), d * t, d * (d - 1.0)])
    w1 = -np.stack([zero, zero, cl, zero, cl * t, cl * (2.0 * d - 1.0 + l)])
    w2 = np.stack([zero, zero, zero, zero, zero, cl * cl])
    return w0, w1, w2


def _minus_power(
    E: np.ndarray, k: np.ndarray, xk: np.ndarray, lnx: np.ndarray, sl: slice, c, p
) -> None:
    """Add the factor exp(−c x^p) of x = δ or τ to the exponents E and the logarithmic
    derivatives k = x ∂ln f/∂x and x ∂k/∂x of the columns ``sl`` (in place)."""
    cx = c * np.exp(lnx * p)
    E[:, sl] -= cx
    pcx = p * cx
    k[:, sl] -= pcx
    xk[:, sl] -= p * pcx


class TermTable:
    """The residual terms of G equations (groups) in one table, evaluated together.

    The columns are the terms, sorted by form: plain powers, powers and exponentials with
    exp(−c δ^l) (both summed through weights, :func:`_weights`), then the forms with
    Gaussian, Lemmon or Gao factors (summed from their logarithmic derivatives).

    Parameters
    ----------
    blocks : sequence of (group, form, arrays)
        The term blocks (:func:`block_arrays`) and the group 0 … G−1 each belongs to.
    groups : int
        The number of groups G.
    """

    def __init__(self, blocks: Sequence[tuple[int, str, dict[str, np.ndarray]]], groups: int):
        self.groups = groups
        self.special: list[tuple[int, NonAnalytic]] = []
        sorted_cols: dict[str, list[tuple[int, dict[str, np.ndarray]]]] = {k: [] for k in _ORDER}
        for g, kind, arr in blocks:
            if kind == "nonanalytic":
                self.special.append((g, NonAnalytic(*(arr[k] for k in _KEYS[kind]))))
                continue
            col = _columns(kind, arr)
            if kind == "power":  # l = 0: no exponential factor at all
                plain = col["c"] == 0.0
                sorted_cols["plain"].append((g, {k: v[plain] for k, v in col.items()}))
                col = {k: v[~plain] for k, v in col.items()}
            sorted_cols[kind].append((g, col))
        flat = [(g, c) for kind in _ORDER for g, c in sorted_cols[kind]]
        sizes = [sum(c["n"].size for _, c in sorted_cols[kind]) for kind in _ORDER]
        starts = np.cumsum([0, *sizes])
        at = {
            k: (int(lo), int(hi)) for k, lo, hi in zip(_ORDER, starts[:-1], starts[1:], strict=True)
        }

        def cat(key: str) -> np.ndarray:
            return np.concatenate([c[key] for _, c in flat]) if flat else np.zeros(0)

        self.size = int(starts[-1])
        self.n, self.d, self.t = cat("n"), cat("d"), cat("t")
        member = np.zeros((self.size, groups))  # column → group indicator
        i = 0
        for g, c in flat:
            member[i : i + c["n"].size, g] = 1.0
            i += c["n"].size
        # plain powers and exp(−c δ^l) terms: sums through weights (states × 6G per product)
        self._nw = at["exponential"][1]  # columns 0 … nw−1
        self._x0 = at["power"][0]  # columns x0 … nw−1 carry exp(−c δ^l)
        c, l = cat("c"), cat("l")
        w0, w1, w2 = _weights(self.d, self.t, c, l)

        def spread(w: np.ndarray, lo: int, hi: int) -> np.ndarray:
            # (6, K) weights and (K, G) membership → (K, 6G)
            return (
                (w[:, lo:hi, None] * member[None, lo:hi, :])
                .transpose(1, 0, 2)
                .reshape(hi - lo, 6 * groups)
            )

        self._w0 = spread(w0, 0, self._nw)
        self._w1 = spread(w1, self._x0, self._nw)
        self._w2 = spread(w2, self._x0, self._nw)
        self._cx = (c[self._x0 : self._nw], l[self._x0 : self._nw])
        # the other forms, on columns nw … K−1, with their factors on slices relative to nw
        lo = self._nw
        self._member_g = member[lo:]
        self._dg, self._tg = self.d[lo:], self.t[lo:]

        def part(a: int, b: int, *keys: str) -> tuple[Any, ...] | None:
            if b <= a:
                return None
            return (slice(a - lo, b - lo), *(cat(k)[a:b] for k in keys))

        self._dexp = part(*at["lemmon2005"], "c", "l")
        self._texp = part(*at["lemmon2005"], "h", "m")
        self._rational = part(*at["gao_b"], "br", "gr", "b")
        self._dgauss = part(at["gao_b"][0], at["gerg_exponential"][1], "eta", "eps")
        self._tgauss = part(*at["gaussian"], "bt", "gt")
        self._dlin = part(*at["gerg_exponential"], "bl", "gl")

    def evaluate(self, tau: FloatArray, delta: FloatArray) -> np.ndarray:
        """(a00, a10, a01, a20, a11, a02) of each group at τ, δ [-], shape (6, S, G) for S
        states (τ and δ flattened)."""
        tau = np.asarray(tau, dtype=float).reshape(-1, 1)
        delta = np.asarray(delta, dtype=float).reshape(-1, 1)
        s = tau.shape[0]
        if s <= CHUNK:
            return self._evaluate(tau, delta)
        out = np.empty((6, s, self.groups))
        for lo in range(0, s, CHUNK):
            out[:, lo : lo + CHUNK] = self._evaluate(tau[lo : lo + CHUNK], delta[lo : lo + CHUNK])
        return out

    def _evaluate(self, tau: np.ndarray, delta: np.ndarray) -> np.ndarray:
        lnd, lnt = np.log(delta), np.log(tau)
        E = lnd * self.d + lnt * self.t
        nw, x0 = self._nw, self._x0
        if nw > x0:
            c, l = self._cx
            x = np.exp(lnd * l)
            E[:, x0:nw] -= c * x
        # the Gaussian, Lemmon and Gao forms: their exponents and logarithmic derivatives
        g = self._general_parts(tau, delta, lnd, lnt, E[:, nw:])
        f = self.n * np.exp(E)
        fw = f[:, :nw]
        out = fw @ self._w0
        if nw > x0:
            fx = fw[:, x0:] * x
            out += fx @ self._w1 + (fx * x) @ self._w2
        out = out.reshape(-1, 6, self.groups).transpose(1, 0, 2)
        if g is not None:
            kD, kT, dkD, tkT = g
            fg = f[:, nw:]
            fkD, fkT = fg * kD, fg * kT
            M = self._member_g
            out = out + np.stack(
                [
                    fg @ M,
                    fkT @ M,
                    fkD @ M,
                    (fkT * (kT - 1.0) + fg * tkT) @ M,
                    (fkD * kT) @ M,
                    (fkD * (kD - 1.0) + fg * dkD) @ M,
                ]
            )
        for grp, term in self.special:
            out[:, :, grp] += np.asarray(term.terms(tau, delta))
        return out

    def _general_parts(self, tau, delta, lnd, lnt, E: np.ndarray) -> tuple[np.ndarray, ...] | None:
        """Add the Gaussian, Lemmon and Gao factors to the exponents E of their columns (in
        place) and return k_δ, k_τ, δk_δ', τk_τ' there (None where the table has none)."""
        if E.shape[1] == 0:
            return None
        shape = E.shape
        kD = np.empty(shape)
        kD[:] = self._dg
        kT = np.empty(shape)
        kT[:] = self._tg
        dkD = np.zeros(shape)  # δ ∂k_δ/∂δ
        tkT = np.zeros(shape)  # τ ∂k_τ/∂τ
        if self._dexp is not None:  # −c δ^l
            _minus_power(E, kD, dkD, lnd, *self._dexp)
        if self._texp is not None:  # −h τ^m
            _minus_power(E, kT, tkT, lnt, *self._texp)
        if self._dgauss is not None:  # −η(δ − ε)²
            sl, eta, eps = self._dgauss
            u = delta - eps
            e2d = (2.0 * eta) * delta
            E[:, sl] -= eta * u * u
            kD[:, sl] -= e2d * u
            dkD[:, sl] -= e2d * (2.0 * delta - eps)
        if self._tgauss is not None:  # −β(τ − γ)²
            sl, beta, gamma = self._tgauss
            u = tau - gamma
            b2t = (2.0 * beta) * tau
            E[:, sl] -= beta * u * u
            kT[:, sl] -= b2t * u
            tkT[:, sl] -= b2t * (2.0 * tau - gamma)
        if self._dlin is not None:  # −β(δ − γ)
            sl, beta, gamma = self._dlin
            bd = beta * delta
            E[:, sl] -= bd - beta * gamma
            kD[:, sl] -= bd
            dkD[:, sl] -= bd
        if self._rational is not None:  # +1/(β(τ − γ)² + b)
            sl, beta, gamma, b = self._rational
            u = tau - gamma
            D = beta * u * u + b
            E[:, sl] += 1.0 / D
            q = (-2.0 * beta) * tau / (D * D)
            kT[:, sl] += q * u
            tkT[:, sl] += q * (2.0 * tau - gamma) - 4.0 * tau * u * u * beta * q / D
        return kD, kT, dkD, tkT
