"""Saturation of a pure fluid under a cubic equation of state, from its reduced saturation curve.

For one component, every member of the cubic family (``fillcheck.models.cubic``) has, in the
reduced variables

    T̃ = R T b / a(T),   p̃ = P b² / a(T),   ρ̃ = b / (v + c),

the pressure p̃ = T̃/(1/ρ̃ − 1) − 1/((1/ρ̃ + δ₁)(1/ρ̃ + δ₂)), which holds neither the gas nor the α
function: the reduced saturation curve p̃(T̃), ρ̃'(T̃), ρ̃''(T̃) is one curve for each pair (δ₁, δ₂).
Three curves therefore serve every gas under every cubic model (van der Waals; Redlich–Kwong and
Soave–Redlich–Kwong; Peng–Robinson with or without Péneloux translation, which moves both
densities and leaves the pressure). This is the observation and method of Bell and Deiters,
"Superancillary equations for cubic equations of state", Ind. Eng. Chem. Res. 60 (2021)
9983–9991, doi:10.1021/acs.iecr.1c00847.

The curves are Chebyshev expansions in s = √(T̃c − T̃) (data/cubic_saturation.json, written by
tools/build_cubic_saturation.py from 80-digit solutions of the equilibrium conditions), held in
:class:`fillcheck.fluids.superancillary.Superancillary` with T̃ in the place of T. They cover T̃
from 5 % of T̃c up to T̃c itself; a temperature outside (a very cold liquid of a strongly acentric
gas) is left to the iterative solver by :meth:`CubicSaturation.covers`.
"""

from __future__ import annotations

import functools
import json
import math
from pathlib import Path

import numpy as np

from fillcheck.fluids.superancillary import Superancillary
from fillcheck.models.cubic import KINDS, CubicModel, _critical_omegas

DATA = Path(__file__).resolve().parents[1] / "fluids" / "data" / "cubic_saturation.json"
CURVE_OF_KIND = {"vdw": "vdw", "rk": "rk", "srk": "rk", "pr": "pr", "pr-peneloux": "pr"}
"""The reduced curve each cubic model's (δ₁, δ₂) selects."""


@functools.cache
def reduced_curves() -> dict[str, Superancillary]:
    """The shipped reduced curves whose δ₁, δ₂, Ωa and Ωb match fillcheck's cubic (a curve that
    does not match is left out, so its models use the solver; the tests require all three)."""
    spec = json.loads(DATA.read_text(encoding="utf-8"))
    out: dict[str, Superancillary] = {}
    for cid, c in spec["curves"].items():
        kind = KINDS[cid]
        omega_a, omega_b, _ = _critical_omegas(kind.delta1, kind.delta2)
        if (
            c["delta1"] != kind.delta1
            or c["delta2"] != kind.delta2
            or not math.isclose(c["omega_a"], omega_a, rel_tol=1e-14)
            or not math.isclose(c["omega_b"], omega_b, rel_tol=1e-14)
        ):
            continue
        Tt_c = float(c["reduced_critical_temperature"])
        out[cid] = Superancillary(
            fluid=f"cubic:{cid}",
            fingerprint="",
            T_c=Tt_c,
            T_min=Tt_c - float(c["s_max"]) ** 2,
            T_top=Tt_c,
            s_edges=np.asarray(c["breaks"], dtype=float),
            coefficients=np.asarray(c["coefficients"], dtype=float),
        )
    return out


class CubicSaturation:
    """Saturation of one pure cubic model from its family's reduced curve.

    Offers the interface of :class:`~fillcheck.fluids.superancillary.Superancillary`:
    :meth:`covers`, :meth:`evaluate` (arrays) and :meth:`evaluate_scalar` (one float), pressures
    [Pa] and molar densities [mol/m³].
    """

    def __init__(self, model: CubicModel, curve: Superancillary, T_min: float) -> None:
        comp = model.components[0]
        self.curve = curve
        self.T_c = comp.Tc
        self._alpha = model.kind.alpha
        self._sqrt_ac = float(model._sqrt_ac[0])
        self._m = float(model._m[0])
        self._b = model.b
        self._c = model.c
        self._Rb = model.R * model.b
        self.T_min = max(T_min, self._temperature_of(curve.T_min))
        """Lowest temperature covered [K]: the gas's lowest saturation temperature or where its
        reduced temperature leaves the curve, whichever is higher."""
        self.T_top = self.T_c * (1.0 - 1e-12)
        """Highest temperature covered [K]: the curve reaches the critical point itself."""

    def _temperature_of(self, Tt: float) -> float:
        """The temperature [K] of reduced temperature Tt below the critical one (T̃ rises with T
        for every α of the family), by bisection."""
        lo, hi = 1e-9 * self.T_c, self.T_c
        for _ in range(200):
            mid = 0.5 * (lo + hi)
            if self._Rb * mid / self._a_scalar(mid) < Tt:
                lo = mid
            else:
                hi = mid
        return hi

    def _a(self, T: np.ndarray) -> np.ndarray:
        """a(T) [Pa·m⁶/mol²] (the α functions of fillcheck.models.cubic.sqrt_attraction)."""
        if self._alpha == "none":
            q = np.full_like(T, self._sqrt_ac)
        elif self._alpha == "rk":
            q = self._sqrt_ac * (T / self.T_c) ** -0.25
        else:
            q = self._sqrt_ac * (1.0 + self._m * (1.0 - np.sqrt(T / self.T_c)))
        return q * q

    def _a_scalar(self, T: float) -> float:
        if self._alpha == "none":
            q = self._sqrt_ac
        elif self._alpha == "rk":
            q = self._sqrt_ac * (T / self.T_c) ** -0.25
        else:
            q = self._sqrt_ac * (1.0 + self._m * (1.0 - math.sqrt(T / self.T_c)))
        return q * q

    def covers(self, T: np.ndarray) -> np.ndarray:
        """True where T [K] lies in [T_min, T_top] and its reduced temperature on the curve."""
        T = np.asarray(T, dtype=float)
        with np.errstate(invalid="ignore", divide="ignore"):
            Tt = self._Rb * T / self._a(T)
            return (T >= self.T_min) & (T <= self.T_top) & self.curve.covers(Tt)

    def evaluate(self, T: np.ndarray) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
        """Saturation pressure [Pa], liquid and vapour densities [mol/m³] at covered T [K]."""
        T = np.asarray(T, dtype=float)
        a = self._a(T)
        p, rl, rv = self.curve.evaluate(self._Rb * T / a)
        b, c = self._b, self._c
        return p * a / (b * b), 1.0 / (b / rl - c), 1.0 / (b / rv - c)

    def evaluate_scalar(self, T: float) -> tuple[float, float, float]:
        """The same for one covered temperature T [K], in plain Python floats."""
        a = self._a_scalar(T)
        p, rl, rv = self.curve.evaluate_scalar(self._Rb * T / a)
        b, c = self._b, self._c
        return p * a / (b * b), 1.0 / (b / rl - c), 1.0 / (b / rv - c)


def cubic_saturation(model: object, T_min: float) -> CubicSaturation | None:
    """The reduced-curve saturation of ``model`` if it is a pure cubic with a shipped curve."""
    if not isinstance(model, CubicModel) or len(model.components) != 1:
        return None
    curve = reduced_curves().get(CURVE_OF_KIND.get(model.kind.id, ""))
    return CubicSaturation(model, curve, T_min) if curve is not None else None
