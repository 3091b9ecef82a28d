"""Superancillary saturation: piecewise Chebyshev expansions of a reference equation's own VLE.

The method is that of Bell and Deiters: the saturation pressure and the two orthobaric densities
of an equation of state are represented, as functions of temperature, by Chebyshev expansions on
intervals that are subdivided until each one reproduces the equation's iterative phase
equilibrium to about double precision; evaluating them needs no iteration and cannot fail.

- I. H. Bell, U. K. Deiters, "Superancillary equations for cubic equations of state",
  Ind. Eng. Chem. Res. 60 (2021) 9983–9991, doi:10.1021/acs.iecr.1c00847.
- I. H. Bell et al., "Efficient and precise representation of pure fluid phase equilibria with
  Chebyshev expansions", Int. J. Thermophys. 42 (2021) 75, doi:10.1007/s10765-021-02824-x.
- I. H. Bell, "Superancillary equations for the multiparameter equations of state in
  REFPROP 10.0", J. Phys. Chem. Ref. Data 53 (2024) 013102, doi:10.1063/5.0191228.

What fillcheck does (its own choices, written for it):

- The independent variable is s = √(Tc − T) [K^½], not T. An analytic equation of state has a
  classical coexistence curve, ρ' − ρc and ρc − ρ'' ∝ √(Tc − T) near Tc, which a polynomial in T
  cannot follow; in s the curve is smooth up to the critical point, and the intervals need not
  crowd towards Tc as they would in T.
- Each interval carries expansions of ln P, ln ρ' and ln ρ'' (so the error of an expansion is a
  relative error, and the vapour density and pressure, which span many decades between the
  triple point and Tc, are represented evenly).
- The expansions are fitted by tools/build_superancillaries.py to fillcheck's own saturation
  solver (``Fluid.saturation_solved``, iterated to the round-off floor of the equation), not to
  another program. Intervals are halved until the expansion reproduces the solver to 1e-12
  relative between its nodes. Close to Tc the equilibrium conditions themselves are resolved in
  double precision only to ~1e-13 K/(Tc − T) (the Jacobian of the conditions is near-singular),
  so the expansions stop at ``T_top``, the highest temperature up to which every interval
  reproduces the solver to that tolerance (a few tenths of a kelvin below Tc for most fluids);
  above it fillcheck solves the phase equilibrium itself.
- Every data file carries the SHA-256 of the equation's coefficients (:func:`equation_fingerprint`)
  and the critical and lowest temperatures it was fitted for. A file whose fingerprint or
  temperatures do not match the equation loaded is stale: it is refused and the solver is used
  (tests/test_superancillary.py fails on a stale shipped file).

Evaluation is the Clenshaw recurrence, vectorised in numpy for arrays and in plain Python for one
temperature (:meth:`Superancillary.evaluate_scalar`, no array machinery). Nothing here imports
scipy.
"""

from __future__ import annotations

import bisect
import functools
import hashlib
import json
import math
from dataclasses import dataclass
from pathlib import Path
from typing import Any

import numpy as np

DATA_DIR = Path(__file__).resolve().parent / "data" / "superancillary"
FORMAT = "fillcheck-superancillary-1"
"""The data-file format this module reads (written by tools/build_superancillaries.py)."""

FINGERPRINT_KEYS = (
    "gas_constant / J/(mol K)",
    "reducing",
    "critical",
    "triple_point",
    "residual",
    "pseudo_pure",
)
"""The parts of a reference-equation data file that fix its saturation curve (the ideal-gas part
and the ancillaries do not)."""

QUANTITIES = ("ln_p / ln(Pa)", "ln_rho_liquid / ln(mol/m3)", "ln_rho_vapour / ln(mol/m3)")
"""The expanded quantities, in the order of :meth:`Superancillary.evaluate`'s results."""

TEMPERATURE_MATCH = 1e-9
"""A file fits a fluid whose critical and lowest temperatures agree with its own to this
relative difference (the critical temperature of a pseudo-pure fluid is found by bisection, and
its last bits may differ between machines) [-]."""


def equation_fingerprint(spec: dict[str, Any]) -> str:
    """SHA-256 (hex) of the coefficients that determine an equation's saturation curve.

    ``spec`` is a reference-equation data file as read from JSON; the keys of FINGERPRINT_KEYS
    are serialised canonically (sorted keys, no whitespace, floats as Python writes them), so
    any change of a coefficient, exponent, reducing value, critical or triple point changes it.
    """
    part = {k: spec.get(k) for k in FINGERPRINT_KEYS}
    text = json.dumps(part, sort_keys=True, separators=(",", ":"), allow_nan=False)
    return hashlib.sha256(text.encode("utf-8")).hexdigest()


def chebyshev_lobatto_nodes(degree: int) -> np.ndarray:
    """The degree + 1 Chebyshev–Lobatto points x_k = cos(πk/degree) on [−1, 1], from +1 down."""
    return np.cos(np.pi * np.arange(degree + 1) / degree)


def chebyshev_coefficients(values: np.ndarray) -> np.ndarray:
    """Coefficients c_j of the interpolant Σ c_j T_j(x) through values at the Lobatto nodes.

    ``values[..., k]`` is the function at x_k = cos(πk/N) (N = degree); the coefficients are the
    discrete cosine transform c_j = (2/N) Σ'' f_k cos(πjk/N), the end terms of the sum and the
    first and last coefficients halved (Trefethen, *Approximation Theory and Approximation
    Practice*, SIAM 2013, ch. 3).
    """
    f = np.asarray(values, dtype=float)
    N = f.shape[-1] - 1
    k = np.arange(N + 1)
    w = np.ones(N + 1)
    w[0] = w[-1] = 0.5
    C = np.cos(np.pi * np.outer(k, k) / N)  # C[j, k]
    c = (2.0 / N) * (f * w) @ C.T
    c[..., 0] *= 0.5
    c[..., -1] *= 0.5
    return c


def clenshaw(coefficients: np.ndarray, x: np.ndarray) -> np.ndarray:
    """Σ_j c_j T_j(x) by Clenshaw's recurrence, vectorised: ``coefficients[..., j]``, ``x[...]``."""
    c = np.asarray(coefficients, dtype=float)
    x = np.asarray(x, dtype=float)
    b1 = np.zeros(np.broadcast_shapes(c.shape[:-1], x.shape))
    b2 = np.zeros_like(b1)
    x2 = 2.0 * x
    for j in range(c.shape[-1] - 1, 0, -1):
        b1, b2 = c[..., j] + x2 * b1 - b2, b1
    return c[..., 0] + x * b1 - b2


def clenshaw_scalar(coefficients: list[float], x: float) -> float:
    """Σ_j c_j T_j(x) for one x, in plain Python floats."""
    b1 = b2 = 0.0
    x2 = 2.0 * x
    for j in range(len(coefficients) - 1, 0, -1):
        b1, b2 = coefficients[j] + x2 * b1 - b2, b1
    return coefficients[0] + x * b1 - b2


@dataclass(frozen=True)
class Superancillary:
    """The saturation expansions of one reference equation.

    Attributes
    ----------
    fluid : canonical fluid name
    fingerprint : equation_fingerprint of the equation the expansions were fitted to
    T_c : the critical temperature s is measured from [K]
    T_min : lowest temperature covered (the fluid's lowest saturation temperature) [K]
    T_top : highest temperature covered [K]; above it the solver is used
    s_edges : interval edges in s = √(T_c − T), ascending [K^½]
    coefficients : shape (3, intervals, degree + 1): ln P [ln Pa], ln ρ' and ln ρ''
        [ln(mol/m³)] in Chebyshev coefficients on each interval
    """

    fluid: str
    fingerprint: str
    T_c: float
    T_min: float
    T_top: float
    s_edges: np.ndarray
    coefficients: np.ndarray

    @functools.cached_property
    def _lists(self) -> tuple[list[float], list[list[list[float]]]]:
        edges = [float(e) for e in self.s_edges]
        rows = [
            [list(map(float, self.coefficients[q, i])) for q in range(3)]
            for i in range(self.coefficients.shape[1])
        ]
        return edges, rows

    def covers(self, T: np.ndarray) -> np.ndarray:
        """True where T [K] lies in [T_min, T_top] (T_min less 1e-12 relative)."""
        T = np.asarray(T, dtype=float)
        return (T >= self.T_min * (1.0 - 1e-12)) & (T <= self.T_top)

    def evaluate(self, T: np.ndarray) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
        """Saturation pressure [Pa] and liquid and vapour densities [mol/m³] at T [K] (arrays,
        every T covered: see :meth:`covers`).

        The temperatures are grouped by interval, and each group runs Clenshaw's recurrence with
        that interval's coefficients as scalars (no gathered coefficient arrays)."""
        T = np.asarray(T, dtype=float)
        shape = T.shape
        s = np.sqrt(np.maximum(self.T_c - T.ravel(), 0.0))
        edges = self.s_edges
        i = np.clip(np.searchsorted(edges, s, side="right") - 1, 0, edges.size - 2)
        out = np.empty((3, s.size))
        counts = np.bincount(i, minlength=edges.size - 1)
        if np.count_nonzero(counts) == 1:
            groups = [(int(i[0]), slice(None))]
        else:
            order = np.argsort(i, kind="stable")
            starts = np.concatenate([[0], np.cumsum(counts)])
            groups = [(int(k), order[starts[k] : starts[k + 1]]) for k in np.flatnonzero(counts)]
        C = self.coefficients
        for k, idx in groups:
            a, b = edges[k], edges[k + 1]
            x = np.clip((2.0 * s[idx] - (a + b)) / (b - a), -1.0, 1.0)
            out[:, idx] = clenshaw(C[:, k, None, :], x[None, :])
        out = np.exp(out)
        return out[0].reshape(shape), out[1].reshape(shape), out[2].reshape(shape)

    def evaluate_scalar(self, T: float) -> tuple[float, float, float]:
        """The same for one covered temperature T [K], in plain Python floats (no numpy)."""
        edges, rows = self._lists
        s = math.sqrt(max(self.T_c - T, 0.0))
        i = min(max(bisect.bisect_right(edges, s) - 1, 0), len(edges) - 2)
        a, b = edges[i], edges[i + 1]
        x = min(1.0, max(-1.0, (2.0 * s - (a + b)) / (b - a)))
        row = rows[i]
        return (
            math.exp(clenshaw_scalar(row[0], x)),
            math.exp(clenshaw_scalar(row[1], x)),
            math.exp(clenshaw_scalar(row[2], x)),
        )


def data_path(name: str) -> Path:
    """The data file of a fluid's expansions (it may not exist)."""
    return DATA_DIR / f"{name.replace(' ', '_')}.json"


class SuperancillaryDataError(ValueError):
    """A superancillary data file is malformed (a defect of the shipped data)."""


def parse(spec: dict[str, Any], where: str) -> Superancillary:
    """A Superancillary from a data file's content; malformed content raises
    SuperancillaryDataError."""
    try:
        if spec["format"] != FORMAT:
            raise SuperancillaryDataError(f"{where}: format {spec['format']!r}, not {FORMAT!r}")
        edges = np.asarray(spec["s_edges / K^0.5"], dtype=float)
        coeffs = np.asarray([spec[q] for q in QUANTITIES], dtype=float)
        sa = Superancillary(
            fluid=str(spec["fluid"]),
            fingerprint=str(spec["equation_sha256"]),
            T_c=float(spec["T_c / K"]),
            T_min=float(spec["T_min / K"]),
            T_top=float(spec["T_top / K"]),
            s_edges=edges,
            coefficients=coeffs,
        )
    except (KeyError, TypeError, ValueError) as exc:
        if isinstance(exc, SuperancillaryDataError):
            raise
        raise SuperancillaryDataError(f"{where}: missing or malformed key {exc}") from None
    ok = (
        edges.ndim == 1
        and edges.size >= 2
        and bool(np.all(np.diff(edges) > 0))
        and coeffs.ndim == 3
        and coeffs.shape[1] == edges.size - 1
        and coeffs.shape[2] >= 2
        and bool(np.all(np.isfinite(coeffs)))
        and sa.T_min < sa.T_top < sa.T_c
        # T_top = T_c − s_top² loses digits to cancellation: its edge is checked loosely
        and math.isclose(edges[0], math.sqrt(sa.T_c - sa.T_top), rel_tol=1e-6)
        and math.isclose(edges[-1], math.sqrt(sa.T_c - sa.T_min), rel_tol=1e-12)
    )
    if not ok:
        raise SuperancillaryDataError(f"{where}: intervals or coefficients are inconsistent")
    return sa


@functools.cache
def _read(name: str) -> Superancillary | None:
    path = data_path(name)
    if not path.exists():
        return None
    return parse(json.loads(path.read_text(encoding="utf-8")), path.name)


def staleness(name: str, fingerprint: str, T_c: float, T_min: float) -> str | None:
    """Why the shipped expansions of ``name`` do not fit the equation loaded, or None if they
    do: "missing", or a sentence naming the mismatch (fingerprint, critical or lowest
    temperature)."""
    sa = _read(name)
    if sa is None:
        return "missing"
    if sa.fingerprint != fingerprint:
        return (
            f"{data_path(name).name} was fitted to another equation (coefficient fingerprint "
            f"{sa.fingerprint[:12]}…, the equation loaded has {fingerprint[:12]}…)"
        )
    if not math.isclose(sa.T_c, T_c, rel_tol=TEMPERATURE_MATCH):
        return f"{data_path(name).name}: critical temperature {sa.T_c!r} K, the fluid's {T_c!r} K"
    if not math.isclose(sa.T_min, T_min, rel_tol=TEMPERATURE_MATCH):
        return f"{data_path(name).name}: lowest temperature {sa.T_min!r} K, the fluid's {T_min!r} K"
    return None


def load_superancillary(
    name: str, fingerprint: str, T_c: float, T_min: float
) -> Superancillary | None:
    """The expansions of ``name`` if a shipped file fits the equation loaded (same coefficient
    fingerprint, critical and lowest temperatures), else None (the solver is used)."""
    if staleness(name, fingerprint, T_c, T_min) is not None:
        return None
    return _read(name)
