"""The cubic family of equations of state as residual Helmholtz energies.

All members share one pressure form (Michelsen and Mollerup (2007), *Thermodynamic Models:
Fundamentals & Computational Aspects*, 2nd ed., ch. 4)::

    P = R T / (v + c - b) - a(T) / ((v + c + δ₁ b)(v + c + δ₂ b))

with a volume translation ``c`` (zero except for Péneloux-translated Peng–Robinson). Integrating
P − RT/v from infinite volume gives the reduced residual Helmholtz energy::

    αʳ = -ln(1 - (b - c) ρ) - a(T)/(R T) · F(ρ),
    F(ρ) = ln((1 + D₁ρ)/(1 + D₂ρ)) / (D₁ - D₂),   D₁,₂ = c + δ₁,₂ b
    F(ρ) = ρ / (1 + D ρ)                            when D₁ = D₂ = D (van der Waals)

The mixture parameters follow the van der Waals one-fluid rules: a = ΣΣ xᵢxⱼ√(aᵢaⱼ)(1 − kᵢⱼ),
b = Σ xᵢbᵢ, c = Σ xᵢcᵢ. A pure fluid is a mixture of one component.

References
----------
van der Waals (1873), *Over de Continuiteit van den Gas- en Vloeistoftoestand*, Leiden.
Redlich, Kwong (1949), Chem. Rev. 44, 233.
Soave (1972), Chem. Eng. Sci. 27, 1197.
Peng, Robinson (1976), Ind. Eng. Chem. Fundam. 15, 59.
Robinson, Peng (1978), GPA Research Report RR-28 (α correlation for ω > 0.49).
Péneloux, Rauzy, Fréze (1982), Fluid Phase Equilib. 8, 7 (volume translation).
"""

from __future__ import annotations

import math
from collections.abc import Sequence
from dataclasses import dataclass

import numpy as np

from fillcheck.models.base import FloatArray, ModelInfo, ResidualDerivatives

R_CUBIC = 8.314462618
"""Molar gas constant used by every cubic model [J/(mol·K)] (CODATA 2018, exact since the 2019
SI redefinition: N_A·k)."""


@dataclass(frozen=True)
class CubicComponent:
    """The corresponding-states inputs of one component of a cubic model.

    Attributes
    ----------
    Tc : float
        Critical temperature [K].
    Pc : float
        Critical pressure [Pa].
    omega : float
        Acentric factor [-].
    shift_m3_mol : float
        Péneloux volume translation c [m³/mol]; the translated molar volume is v = v_cubic − c.
    """

    Tc: float
    Pc: float
    omega: float
    shift_m3_mol: float = 0.0


@dataclass(frozen=True)
class CubicKind:
    """One member of the cubic family: δ₁, δ₂, the α(T) function and its references."""

    id: str
    name: str
    delta1: float
    delta2: float
    alpha: str  # "none" | "rk" | "soave-srk" | "soave-pr"
    references: tuple[str, ...]
    translated: bool = False


def _critical_omegas(delta1: float, delta2: float) -> tuple[float, float, float]:
    """Ωa, Ωb and Zc of a cubic with the given δ₁, δ₂ from the triple-root condition.

    At the critical point the cubic in Z has a triple root; eliminating Ωa and Zc leaves one
    equation in Ωb, solved here by bisection (it has one root in (0, 0.3)).
    """
    u, w = delta1 + delta2, delta1 * delta2

    def zc(b: float) -> float:
        return (1.0 + b * (1.0 - u)) / 3.0

    def f(b: float) -> float:
        z = zc(b)
        return z**3 / b - (w + u) * b - u * b * b - 3.0 * z * z

    lo, hi = 1e-6, 0.3
    for _ in range(200):
        mid = 0.5 * (lo + hi)
        if f(lo) * f(mid) <= 0.0:
            hi = mid
        else:
            lo = mid
    b = 0.5 * (lo + hi)
    z = zc(b)
    a = z**3 / b - w * b - w * b * b
    return a, b, z


_S2 = math.sqrt(2.0)
KINDS: dict[str, CubicKind] = {
    "vdw": CubicKind(
        "vdw",
        "van der Waals",
        0.0,
        0.0,
        "none",
        ("van der Waals (1873), Over de Continuiteit van den Gas- en Vloeistoftoestand, Leiden",),
    ),
    "rk": CubicKind(
        "rk",
        "Redlich–Kwong",
        1.0,
        0.0,
        "rk",
        ("Redlich, Kwong (1949), Chem. Rev. 44, 233",),
    ),
    "srk": CubicKind(
        "srk",
        "Soave–Redlich–Kwong",
        1.0,
        0.0,
        "soave-srk",
        ("Soave (1972), Chem. Eng. Sci. 27, 1197",),
    ),
    "pr": CubicKind(
        "pr",
        "Peng–Robinson",
        1.0 + _S2,
        1.0 - _S2,
        "soave-pr",
        (
            "Peng, Robinson (1976), Ind. Eng. Chem. Fundam. 15, 59",
            "Robinson, Peng (1978), GPA Research Report RR-28 (α for ω > 0.49)",
        ),
    ),
    "pr-peneloux": CubicKind(
        "pr-peneloux",
        "Peng–Robinson with Péneloux volume translation",
        1.0 + _S2,
        1.0 - _S2,
        "soave-pr",
        (
            "Peng, Robinson (1976), Ind. Eng. Chem. Fundam. 15, 59",
            "Robinson, Peng (1978), GPA Research Report RR-28 (α for ω > 0.49)",
            "Péneloux, Rauzy, Fréze (1982), Fluid Phase Equilib. 8, 7",
        ),
        translated=True,
    ),
}
CUBIC_MODEL_IDS: tuple[str, ...] = tuple(KINDS)


def soave_m(alpha: str, omega: float) -> float:
    """Slope m of the Soave-type α = [1 + m(1 − √Tr)]² [-].

    SRK: m = 0.480 + 1.574ω − 0.176ω² (Soave 1972).
    PR: m = 0.37464 + 1.54226ω − 0.26992ω² for ω ≤ 0.49 (Peng and Robinson 1976), and
    m = 0.379642 + 1.48503ω − 0.164423ω² + 0.016666ω³ above (Robinson and Peng 1978).
    """
    if alpha == "soave-srk":
        return 0.480 + 1.574 * omega - 0.176 * omega**2
    if alpha == "soave-pr":
        if omega <= 0.49:
            return 0.37464 + 1.54226 * omega - 0.26992 * omega**2
        return 0.379642 + 1.48503 * omega - 0.164423 * omega**2 + 0.016666 * omega**3
    raise ValueError(f"no Soave slope for α form {alpha!r}")


class CubicModel:
    """A cubic equation of state at fixed composition, exposing αʳ and its derivatives.

    Parameters
    ----------
    kind : str
        Model id: ``"vdw"``, ``"rk"``, ``"srk"``, ``"pr"`` or ``"pr-peneloux"``.
    components : sequence of CubicComponent
        Corresponding-states inputs of each component.
    x : sequence of float, optional
        Mole fractions [-]; default a pure fluid ``[1.0]``.
    kij : array_like, optional
        Binary interaction parameters (symmetric, zero diagonal) [-]; default zeros.
    """

    def __init__(
        self,
        kind: str,
        components: Sequence[CubicComponent],
        x: Sequence[float] | None = None,
        kij: FloatArray | None = None,
    ) -> None:
        if kind not in KINDS:
            raise ValueError(f"unknown cubic model {kind!r}; known: {', '.join(KINDS)}")
        self.kind = KINDS[kind]
        self.info = ModelInfo(self.kind.id, self.kind.name, self.kind.references)
        self.R = R_CUBIC
        self.components = tuple(components)
        n = len(self.components)
        self.x = np.asarray([1.0] * n if x is None and n == 1 else x, dtype=float)
        if self.x.shape != (n,) or not math.isclose(float(self.x.sum()), 1.0, abs_tol=1e-9):
            raise ValueError("mole fractions must have one entry per component and sum to 1")
        self.kij = np.zeros((n, n)) if kij is None else np.asarray(kij, dtype=float)
        omega_a, omega_b, self.Zc = _critical_omegas(self.kind.delta1, self.kind.delta2)
        Tc = np.array([c.Tc for c in self.components])
        Pc = np.array([c.Pc for c in self.components])
        self._Tc = Tc
        self._sqrt_ac = np.sqrt(omega_a * (self.R * Tc) ** 2 / Pc)
        if self.kind.alpha in ("soave-srk", "soave-pr"):
            self._m = np.array([soave_m(self.kind.alpha, c.omega) for c in self.components])
        else:
            self._m = np.zeros(n)
        bi = omega_b * self.R * Tc / Pc
        ci = np.array([c.shift_m3_mol for c in self.components]) if self.kind.translated else 0 * bi
        self.b = float(self.x @ bi)
        self.c = float(self.x @ ci)
        self.D1 = self.c + self.kind.delta1 * self.b
        self.D2 = self.c + self.kind.delta2 * self.b
        self._weights = np.outer(self.x, self.x) * (1.0 - self.kij)

    # --- temperature part -------------------------------------------------------------------
    def _sqrt_a(self, T: FloatArray) -> tuple[FloatArray, FloatArray, FloatArray]:
        """√aᵢ(T) and its first two T-derivatives, shape (n, *T.shape) [√(Pa·m⁶/mol²), per K]."""
        q = sqrt_attraction(self.kind.alpha, self._sqrt_ac, self._Tc, self._m, T)
        return tuple(np.moveaxis(x, -1, 0) for x in q)  # type: ignore[return-value]

    def attraction(self, T: FloatArray) -> tuple[FloatArray, FloatArray, FloatArray]:
        """The mixture's a(T), da/dT and d²a/dT² [Pa·m⁶/mol², per K, per K²]."""
        q, q1, q2 = self._sqrt_a(T)
        w = self._weights
        a = np.einsum("ij,i...,j...->...", w, q, q)
        a1 = 2.0 * np.einsum("ij,i...,j...->...", w, q1, q)
        a2 = 2.0 * np.einsum("ij,i...,j...->...", w, q2, q) + 2.0 * np.einsum(
            "ij,i...,j...->...", w, q1, q1
        )
        return a, a1, a2

    def alphar(self, T: FloatArray, rho_mol: FloatArray) -> ResidualDerivatives:
        """αʳ and its scaled derivatives at T [K] and molar density ρ [mol/m³] (broadcast)."""
        T, rho = np.broadcast_arrays(np.asarray(T, dtype=float), np.asarray(rho_mol, dtype=float))
        return residual_from_parameters(
            T, rho, self.attraction(T), self.b - self.c, self.D1, self.D2, self.R
        )

    def max_density_mol(self) -> float:
        """The covolume limit 1/(b − c) [mol/m³]; no root lies at or above it."""
        return 1.0 / (self.b - self.c)

    def critical_point(self) -> tuple[float, float, float]:
        """The model's own critical point of a pure fluid: T [K], P [Pa], ρ [mol/m³].

        For every member of the family with α(Tc) = 1 this is (Tc, Pc) of the inputs; the
        density is Pc/(Zc R Tc) moved by the volume translation.
        """
        if len(self.components) != 1:
            raise ValueError("the critical point of a mixture is not a single-fluid property")
        comp = self.components[0]
        v_cubic = self.Zc * self.R * comp.Tc / comp.Pc
        return comp.Tc, comp.Pc, 1.0 / (v_cubic - self.c)

    # --- fast path: the cubic's own volume roots --------------------------------------------
    def density_roots(self, T: FloatArray, P: FloatArray) -> tuple[FloatArray, FloatArray]:
        """Smallest and largest molar densities solving P(T, ρ) = P [mol/m³].

        Solves the cubic in Z' = P(v + c)/(RT) in closed form (trigonometric form where three
        real roots exist, Cardano's otherwise). Where one real root exists both returns are
        equal. Roots at or below the covolume are discarded.
        """
        T, P = np.broadcast_arrays(np.asarray(T, dtype=float), np.asarray(P, dtype=float))
        a, _, _ = self.attraction(T)
        return cubic_density_roots(self.kind, a, self.b, self.c, self.R * T, P)


def cubic_density_roots(
    kind: CubicKind, a: FloatArray, b: FloatArray, c: FloatArray, RT: FloatArray, P: FloatArray
) -> tuple[FloatArray, FloatArray]:
    """Smallest and largest molar densities of a cubic with parameters a, b, c at RT and P.

    a [Pa·m⁶/mol²], b and c [m³/mol], RT [J/mol] and P [Pa] broadcast together; returns
    [mol/m³] (see :meth:`CubicModel.density_roots`).
    """
    A = a * P / RT**2
    B = b * P / RT
    u = kind.delta1 + kind.delta2
    w = kind.delta1 * kind.delta2
    c2 = (u - 1.0) * B - 1.0
    c1 = A + (w - u) * B * B - u * B
    c0 = -(A * B + w * B * B + w * B**3)
    z_lo, z_hi, three = _cubic_real_roots(c2, c1, c0, B)
    # The liquid root of a cubic in Z is ill-conditioned at low pressure (Z_l ~ B << 1);
    # in η = B/Z it is the largest root of a well-conditioned cubic, η in (0, 1).
    usable = c0 < -1e-12 * np.abs(A * B)
    safe_c0 = np.where(usable, c0, -1.0)
    _, e_hi, e_three = _cubic_real_roots(
        c1 * B / safe_c0, c2 * B * B / safe_c0, B**3 / safe_c0, np.zeros_like(B)
    )
    liquid_eta = usable & e_three & (e_hi < 1.0) & (e_hi > 0.0)
    z_lo = np.where(liquid_eta, B / np.where(liquid_eta, e_hi, 1.0), z_lo)
    z_lo = np.where(three | liquid_eta, z_lo, z_hi)
    v_hi = z_lo * RT / P - c
    v_lo = z_hi * RT / P - c
    return 1.0 / v_lo, 1.0 / v_hi


def sqrt_attraction(
    alpha: str, sqrt_ac: np.ndarray, Tc: np.ndarray, m: np.ndarray, T: FloatArray
) -> tuple[FloatArray, FloatArray, FloatArray]:
    """√aᵢ(T) and its first two T-derivatives, components on the last axis, shape S + (n,)
    [√(Pa·m⁶/mol²), per K, per K²]: constant (van der Waals), √ac (T/Tc)^(−1/4) (Redlich–Kwong)
    or the Soave form √ac [1 + m(1 − √(T/Tc))]."""
    Tb = np.asarray(T, dtype=float)[..., None]
    if alpha == "none":
        q = sqrt_ac * np.ones_like(Tb)
        return q, 0.0 * q, 0.0 * q
    if alpha == "rk":
        q = sqrt_ac * (Tb / Tc) ** -0.25
        return q, -0.25 * q / Tb, 0.3125 * q / Tb**2
    root = np.sqrt(Tb * Tc)
    q = sqrt_ac * (1.0 + m * (1.0 - np.sqrt(Tb / Tc)))
    return q, -sqrt_ac * m / (2.0 * root), sqrt_ac * m / (4.0 * Tb * root)


def density_function(
    rho: FloatArray, D1: FloatArray, D2: FloatArray
) -> tuple[FloatArray, FloatArray, FloatArray]:
    """F(ρ), ρF'(ρ) and ρ²F''(ρ) of the attraction term (module docstring) [-].

    D₁ and D₂ may be arrays (a mixture at varying composition); where they are equal (van der
    Waals) F = ρ/(1 + Dρ).
    """
    e1, e2 = 1.0 + D1 * rho, 1.0 + D2 * rho
    dD = np.asarray(D1 - D2)
    with np.errstate(divide="ignore", invalid="ignore"):
        F = np.where(dD == 0.0, rho / e1, np.log(e1 / e2) / np.where(dD == 0.0, 1.0, dD))
    rF1 = rho / (e1 * e2)
    r2F2 = -(rho**2) * (D1 + D2 + 2.0 * D1 * D2 * rho) / (e1 * e2) ** 2
    return F, rF1, r2F2


def residual_from_parameters(
    T: FloatArray,
    rho: FloatArray,
    attraction: tuple[FloatArray, FloatArray, FloatArray],
    covolume: FloatArray,
    D1: FloatArray,
    D2: FloatArray,
    R: float,
) -> ResidualDerivatives:
    """αʳ and its scaled derivatives from the cubic's parameters at T [K], ρ [mol/m³].

    ``attraction`` is (a, da/dT, d²a/dT²) [Pa·m⁶/mol², per K, per K²]; ``covolume`` is b − c
    [m³/mol]; D₁,₂ = c + δ₁,₂ b [m³/mol] (all broadcast with T and ρ).
    """
    a, a1, a2 = attraction
    RT = R * T
    A = a / RT
    TA_T = (T * a1 - a) / RT
    T2A_TT = (T * T * a2 - 2.0 * T * a1 + 2.0 * a) / RT
    Brho = covolume * rho
    F, rF1, r2F2 = density_function(rho, D1, D2)
    return ResidualDerivatives(
        a00=-np.log1p(-Brho) - A * F,
        a10=TA_T * F,
        a01=Brho / (1.0 - Brho) - A * rF1,
        a20=-(T2A_TT + 2.0 * TA_T) * F,
        a11=TA_T * rF1,
        a02=(Brho / (1.0 - Brho)) ** 2 - A * r2F2,
    )


def _cubic_real_roots(
    c2: FloatArray, c1: FloatArray, c0: FloatArray, floor: FloatArray
) -> tuple[FloatArray, FloatArray, FloatArray]:
    """Smallest and largest real roots above ``floor`` of z³ + c2 z² + c1 z + c0 (vectorised).

    Returns the two roots and a mask of where three distinct real roots exist.
    """
    p = c1 - c2 * c2 / 3.0
    q = 2.0 * c2**3 / 27.0 - c2 * c1 / 3.0 + c0
    disc = (q / 2.0) ** 2 + (p / 3.0) ** 3
    shift = -c2 / 3.0
    with np.errstate(invalid="ignore", divide="ignore", over="ignore"):
        # one real root (Cardano)
        sq = np.sqrt(np.maximum(disc, 0.0))
        one = np.cbrt(-q / 2.0 + sq) + np.cbrt(-q / 2.0 - sq) + shift
        # three real roots (trigonometric form)
        r = 2.0 * np.sqrt(np.maximum(-p / 3.0, 0.0))
        arg = np.clip(_safe_div(3.0 * q, p * r), -1.0, 1.0)
        phi = np.arccos(arg) / 3.0
        z0 = r * np.cos(phi) + shift
        z2 = r * np.cos(phi - 4.0 * np.pi / 3.0) + shift
    three = (disc < 0.0) & (p < 0.0)
    hi = np.where(three, z0, one)
    lo = np.where(three, z2, one)
    three &= lo > floor
    lo = np.where(three, lo, hi)
    # polish each root with Newton steps on the cubic itself, keeping a step only where it
    # lowers |f| (at a triple root, the critical point, f and f' are both round-off)
    with np.errstate(invalid="ignore", divide="ignore", over="ignore"):
        for z in (lo, hi):
            for _ in range(3):
                f = ((z + c2) * z + c1) * z + c0
                df = (3.0 * z + 2.0 * c2) * z + c1
                ok = np.isfinite(f) & np.isfinite(df) & (df != 0.0)
                trial = z - np.where(ok, f / np.where(ok, df, 1.0), 0.0)
                f_trial = ((trial + c2) * trial + c1) * trial + c0
                better = np.isfinite(f_trial) & (np.abs(f_trial) < np.abs(f))
                z[...] = np.where(better, trial, z)
    return lo, hi, three


def _safe_div(num: FloatArray, den: FloatArray) -> FloatArray:
    out = np.zeros(np.broadcast(num, den).shape)
    np.divide(num, den, out=out, where=den != 0.0)
    return out
