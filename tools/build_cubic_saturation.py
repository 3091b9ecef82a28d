"""Write ``fillcheck/fluids/data/cubic_saturation.json``: each cubic's reduced saturation curve.

A dev-time script. For a pure fluid under any member of the cubic family (module docstring of
``fillcheck.models.cubic``), the saturation state in the reduced variables

    T̃ = R T b / a(T),   p̃ = P b² / a(T),   ṽ = (v + c) / b

depends on δ₁ and δ₂ alone: p̃ = T̃/(ṽ − 1) − 1/((ṽ + δ₁)(ṽ + δ₂)). So three curves serve every gas
and every α function: van der Waals (δ = 0, 0), Redlich–Kwong and Soave (1, 0), Peng–Robinson with
or without volume translation (1 ± √2); a translation c moves both densities and leaves the
pressure (Péneloux et al. 1982). This is the observation of Bell and Deiters (2021), "Superancillary
equations for cubic equations of state", Ind. Eng. Chem. Res. 60, 9983 (cited from memory), whose
method (Chebyshev expansions fitted to extended-precision equilibrium solutions) is followed here.

Each curve is solved here in 60-digit decimal arithmetic (Python's ``decimal``: no dependency) by
Newton's method on the two equilibrium conditions, equal pressure and equal Gibbs energy, in the
unknowns ln(ṽ_l − 1) and ln ṽ_v, by continuation from the critical point. The independent variable
of the expansions is s = √(T̃c − T̃): a cubic is a mean-field model, so its coexisting densities
go as ±√(T̃c − T̃) and are analytic in s, down to s = 0 at the critical point itself. Fitted in s on
[0, s_max] (T̃ from 5 % of T̃c to T̃c) are ln p̃, ln ρ̃_l and ln ρ̃_v (ρ̃ = 1/ṽ), each interval
bisected until the expansions reproduce the decimal solution at the midpoints between nodes to
1e-14 (absolute in each logarithm, relative where its magnitude exceeds 1). The file's layout is
that of fillcheck.fluids.superancillary, with T̃ in the place of T.

The file records, per curve, δ₁, δ₂ and the Ωa, Ωb fillcheck's cubic derives from them, so a
change there is detected (``fillcheck.models.cubic_saturation`` then falls back to the solver and
the tests fail).

Run from the repository root::

    python tools/build_cubic_saturation.py            # rewrites the data file
    python tools/build_cubic_saturation.py --check    # exit 1 if the data file is out of date
"""

from __future__ import annotations

import argparse
import json
import sys
from decimal import Decimal, getcontext
from pathlib import Path

import numpy as np

ROOT = Path(__file__).resolve().parents[1]
sys.path.insert(0, str(ROOT))

from fillcheck.models.cubic import KINDS, _critical_omegas  # noqa: E402

OUT = ROOT / "fillcheck" / "fluids" / "data" / "cubic_saturation.json"
getcontext().prec = 80
DEGREE = 16
TOLERANCE = 1e-14
LOWEST_FRACTION = 0.05  # the curves reach down to T̃ = 0.05 T̃c
FAMILIES = {"vdw": "vdw", "rk": "rk", "pr": "pr"}  # curve id -> a model kind with its δ₁, δ₂
D = Decimal


class Curve:
    """The reduced equilibrium of one (δ₁, δ₂), solved in decimal arithmetic."""

    def __init__(self, delta1: float, delta2: float) -> None:
        self.d1, self.d2 = D(repr(delta1)), D(repr(delta2))
        omega_a, omega_b, _ = _critical_omegas(delta1, delta2)
        self.omega_a, self.omega_b = omega_a, omega_b
        self.Tc, self.vc = self._critical()
        self.path: list[tuple[Decimal, Decimal, Decimal]] = []  # (s, y_l, y_v), s ascending

    # p̃(ṽ) and its ṽ-derivatives; G̃ = G/(RT) up to a function of T̃
    def q(self, v: Decimal) -> Decimal:
        return (v + self.d1) * (v + self.d2)

    def p(self, T: Decimal, v: Decimal) -> Decimal:
        return T / (v - 1) - 1 / self.q(v)

    def dp(self, T: Decimal, v: Decimal) -> Decimal:
        return -T / (v - 1) ** 2 + (2 * v + self.d1 + self.d2) / self.q(v) ** 2

    def g(self, T: Decimal, v: Decimal) -> Decimal:
        if self.d1 == self.d2:
            attraction = 1 / (v + self.d1)
        else:
            attraction = ((v + self.d1) / (v + self.d2)).ln() / (self.d1 - self.d2)
        return -(v - 1).ln() - attraction / T + self.p(T, v) * v / T

    def _critical(self) -> tuple[Decimal, Decimal]:
        """T̃c and ṽc: ∂p̃/∂ṽ = ∂²p̃/∂ṽ² = 0, by Newton from the double-precision Ω values."""
        T = D(repr(self.omega_b / self.omega_a))
        v = D(repr((1.0 + self.omega_b * (1.0 - float(self.d1 + self.d2))) / 3.0 / self.omega_b))
        h = D(10) ** -25
        for _ in range(60):
            f1 = self.dp(T, v)
            f2 = (self.dp(T, v + h) - self.dp(T, v - h)) / (2 * h)
            # Jacobian by central differences in decimal (h² ~ 1e-50 is below the precision used)
            j11 = f2
            j12 = (self.dp(T + h, v) - self.dp(T - h, v)) / (2 * h)
            g_v = (self.dp(T, v + 2 * h) - 2 * f1 + self.dp(T, v - 2 * h)) / (4 * h * h)
            j21 = g_v
            j22 = (
                (self.dp(T + h, v + h) - self.dp(T + h, v - h))
                - (self.dp(T - h, v + h) - self.dp(T - h, v - h))
            ) / (4 * h * h)
            det = j11 * j22 - j12 * j21
            dv = (f1 * j22 - j12 * f2) / det
            dT = (j11 * f2 - j21 * f1) / det
            v, T = v - dv, T - dT
            if abs(dv) < D(10) ** -40 and abs(dT) < D(10) ** -40:
                break
        return T, v

    def solve(self, s: Decimal, guess: tuple[Decimal, Decimal]) -> tuple[Decimal, Decimal]:
        """(ln(ṽ_l − 1), ln ṽ_v) at s by Newton from ``guess``."""
        T = self.Tc - s * s
        yl, yv = guess
        for _ in range(200):
            vl, vv = 1 + yl.exp(), yv.exp()
            f1 = self.p(T, vl) - self.p(T, vv)
            f2 = self.g(T, vl) - self.g(T, vv)
            pl, pv = self.dp(T, vl), self.dp(T, vv)
            a11, a12 = pl * (vl - 1), -pv * vv
            a21, a22 = vl / T * pl * (vl - 1), -vv / T * pv * vv
            det = a11 * a22 - a12 * a21
            d_l = (f1 * a22 - a12 * f2) / det
            d_v = (a11 * f2 - a21 * f1) / det
            step = D(1)
            while step > D(10) ** -6:
                nl, nv = yl - step * d_l, yv - step * d_v
                if 1 + nl.exp() < nv.exp():
                    break
                step /= 2
            yl, yv = nl, nv
            if abs(d_l) + abs(d_v) < D(10) ** -32:
                return yl, yv
        raise RuntimeError(f"no equilibrium at s = {s}")

    def build_path(self, s_max: Decimal, n: int = 3000) -> None:
        """Solutions from just below the critical point up to s_max, for guesses."""
        # mean field: p̃ ≈ p̃c + p̃_T t + p̃_vT t δv + p̃_vvv δv³/6 gives δv = ±√(6 p̃_vT/p̃_vvv) s
        v, T = self.vc, self.Tc
        p_vT = -1 / (v - 1) ** 2
        q, q1 = self.q(v), 2 * v + self.d1 + self.d2
        p_vvv = -6 * T / (v - 1) ** 4 - 6 * q1 / q**3 - 6 * q1 * (q - q1 * q1) / q**4
        self.k = (6 * p_vT / p_vvv).sqrt()
        s0 = D(10) ** -4
        guess = self._mean_field(s0)
        ss = [s0 * (s_max / s0) ** (D(i) / D(n)) for i in range(n + 1)]
        prev: list[tuple[Decimal, Decimal, Decimal]] = []
        for s in ss:
            if len(prev) >= 2:
                (sa, la, va), (sb, lb, vb) = prev[-2], prev[-1]
                w = (s - sb) / (sb - sa)
                guess = (lb + w * (lb - la), vb + w * (vb - va))
            yl, yv = self.solve(s, guess)
            prev.append((s, yl, yv))
        self.path = prev

    def _mean_field(self, s: Decimal) -> tuple[Decimal, Decimal]:
        return (self.vc - self.k * s - 1).ln(), (self.vc + self.k * s).ln()

    def _guess(self, s: Decimal) -> tuple[Decimal, Decimal]:
        """Linear interpolation in s along the path (the mean-field form below its start)."""
        path = self.path
        if s <= path[0][0]:
            return self._mean_field(s)
        lo, hi = 0, len(path) - 1
        while hi - lo > 1:
            mid = (lo + hi) // 2
            lo, hi = (mid, hi) if path[mid][0] <= s else (lo, mid)
        (sa, la, va), (sb, lb, vb) = path[lo], path[hi]
        w = (s - sa) / (sb - sa)
        return la + w * (lb - la), va + w * (vb - va)

    def at(self, s: Decimal) -> tuple[float, float, float]:
        """ln p̃, ln ρ̃_l and ln ρ̃_v at s (s = 0: the critical point)."""
        if s == 0:
            v = self.vc
            return float(self.p(self.Tc, v).ln()), float(-(v.ln())), float(-(v.ln()))
        yl, yv = self.solve(s, self._guess(s))
        T = self.Tc - s * s
        vl = 1 + yl.exp()
        return float(self.p(T, vl).ln()), float(-(vl.ln())), float(-yv)


def _nodes(a: float, b: float) -> np.ndarray:
    """The DEGREE + 1 Chebyshev–Lobatto nodes on [a, b]."""
    return 0.5 * (a + b) + 0.5 * (b - a) * np.cos(np.pi * np.arange(DEGREE + 1) / DEGREE)


def _coefficients(values: np.ndarray) -> np.ndarray:
    """Chebyshev coefficients from values at the Lobatto nodes (discrete cosine transform)."""
    n = DEGREE
    k = np.arange(n + 1)
    w = np.ones(n + 1)
    w[0] = w[-1] = 0.5
    c = 2.0 / n * (np.cos(np.pi * np.outer(k, k) / n) @ (w * values))
    c[0] *= 0.5
    c[-1] *= 0.5
    return c


def _fit(curve: Curve, a: float, b: float, out: list[tuple[float, float, np.ndarray]]) -> None:
    xs = _nodes(a, b)
    vals = np.array([curve.at(D(repr(float(x)))) for x in xs])  # (nodes, 3)
    coef = np.stack([_coefficients(vals[:, j]) for j in range(3)])
    mids = 0.5 * (xs[1:] + xs[:-1])
    check = np.array([curve.at(D(repr(float(x)))) for x in mids])
    t = (2.0 * mids - (a + b)) / (b - a)
    fit = np.stack([np.polynomial.chebyshev.chebval(t, coef[j]) for j in range(3)], axis=1)
    err = np.abs(fit - check) / np.maximum(np.abs(check), 1.0)
    if err.max() > TOLERANCE and b - a > 1e-6:
        m = 0.5 * (a + b)
        _fit(curve, a, m, out)
        _fit(curve, m, b, out)
        return
    out.append((a, b, coef))


def build() -> dict[str, object]:
    curves: dict[str, object] = {}
    for cid, kind_id in FAMILIES.items():
        kind = KINDS[kind_id]
        curve = Curve(kind.delta1, kind.delta2)
        s_max = ((1 - D(repr(LOWEST_FRACTION))) * curve.Tc).sqrt()
        curve.build_path(s_max)
        pieces: list[tuple[float, float, np.ndarray]] = []
        _fit(curve, 0.0, float(s_max), pieces)
        pieces.sort(key=lambda p: p[0])
        curves[cid] = {
            "delta1": kind.delta1,
            "delta2": kind.delta2,
            "omega_a": curve.omega_a,
            "omega_b": curve.omega_b,
            "reduced_critical_temperature": float(curve.Tc),
            "reduced_critical_volume": float(curve.vc),
            "s_max": float(s_max),
            "breaks": [p[0] for p in pieces] + [pieces[-1][1]],
            # [ln p̃, ln ρ̃_l, ln ρ̃_v] × intervals × (DEGREE + 1) Chebyshev coefficients
            "coefficients": [[[float(c) for c in p[2][q]] for p in pieces] for q in range(3)],
        }
        print(f"{cid}: T̃c = {float(curve.Tc):.17g}, {len(pieces)} intervals", file=sys.stderr)
    return {
        "about": (
            "Reduced saturation curves of the cubic equations of state (Chebyshev expansions in "
            "s = sqrt(T̃c − T̃)); written by tools/build_cubic_saturation.py; method of Bell and "
            "Deiters (2021), Ind. Eng. Chem. Res. 60, 9983 (cited from memory)"
        ),
        "degree": DEGREE,
        "tolerance": TOLERANCE,
        "curves": curves,
    }


def main() -> int:
    ap = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    ap.add_argument("--check", action="store_true", help="exit 1 if the data file is stale")
    args = ap.parse_args()
    text = json.dumps(build(), indent=1) + "\n"
    if args.check:
        current = OUT.read_text(encoding="utf-8") if OUT.exists() else ""
        if current != text:
            print(f"{OUT} is out of date: run tools/build_cubic_saturation.py", file=sys.stderr)
            return 1
        return 0
    OUT.write_text(text, encoding="utf-8")
    print(f"wrote {OUT}", file=sys.stderr)
    return 0


if __name__ == "__main__":
    sys.exit(main())
