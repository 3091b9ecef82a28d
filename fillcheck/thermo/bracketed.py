"""One bracketed root solver for every vectorised root fillcheck solves.

The Illinois variant of regula falsi (Dowell & Jarratt, BIT 11 (1971) 168–174): a secant step
inside a bracket whose stale end has its residual halved, so it converges superlinearly and can
never leave the bracket. It runs over many elements at once (one residual call per step for the
elements not yet converged), so one vessel and a register of thousands follow the same
arithmetic and get the same answer.

Used by the saturation crossings of an isochore (thermo.vessel), the temperatures where an
isochore reaches a pressure limit (assess.batch) and the largest density that keeps a limit
(assess.charge).
"""

from __future__ import annotations

from collections.abc import Callable
from dataclasses import dataclass

import numpy as np

Residual = Callable[[np.ndarray, np.ndarray], np.ndarray]
"""``residual(idx, x)``: the residual of elements ``idx`` at abscissae ``x`` (same shape)."""


@dataclass
class Bracket:
    """Per element, the final bracket [a, b], the signs of its residuals, and whether it converged.

    ``fa`` keeps the sign the residual had at the starting ``a`` (an iterate whose residual is
    exactly zero counts as on a's side unless it stopped the element); ``b`` is on the other
    side. Their magnitudes are the Illinois-scaled ones: use their signs, not their values."""

    a: np.ndarray
    b: np.ndarray
    fa: np.ndarray
    fb: np.ndarray
    converged: np.ndarray


def illinois(
    residual: Residual,
    a: np.ndarray,
    b: np.ndarray,
    fa: np.ndarray,
    fb: np.ndarray,
    width: float | np.ndarray,
    ftol: float = 0.0,
    max_iter: int = 200,
) -> Bracket:
    """Shrink the brackets [a, b] (a < b, residuals of opposite sign) until b − a ≤ ``width``.

    ``width`` is absolute, per element or one for all. An element whose residual at an iterate
    is at most ``ftol`` in magnitude stops there (a = b = that iterate). Elements that do not
    converge in ``max_iter`` steps are returned with ``converged`` False; the caller decides."""
    a = np.array(a, dtype=float, copy=True)
    b = np.array(b, dtype=float, copy=True)
    fa = np.array(fa, dtype=float, copy=True)
    fb = np.array(fb, dtype=float, copy=True)
    width = np.broadcast_to(np.asarray(width, dtype=float), a.shape)
    a_positive = fa > 0.0  # which sign counts as a's side, per element
    side = np.zeros(a.shape)  # -1: a moved last, +1: b moved last
    active = (b - a) > width
    for _ in range(max_iter):
        j = np.flatnonzero(active)
        if j.size == 0:
            break
        with np.errstate(invalid="ignore", divide="ignore"):
            x = (a[j] * fb[j] - b[j] * fa[j]) / (fb[j] - fa[j])
        x = np.where((x > a[j]) & (x < b[j]), x, 0.5 * (a[j] + b[j]))
        fx = residual(j, x)
        exact = np.abs(fx) <= ftol
        on_a = ((fx > 0.0) == a_positive[j]) & ~exact
        on_b = ~on_a & ~exact
        k = j[on_a]
        a[k], fa[k] = x[on_a], fx[on_a]
        fb[k] = np.where(side[k] == -1, 0.5 * fb[k], fb[k])
        side[k] = -1
        k = j[on_b]
        b[k], fb[k] = x[on_b], fx[on_b]
        fa[k] = np.where(side[k] == 1, 0.5 * fa[k], fa[k])
        side[k] = 1
        k = j[exact]
        a[k] = b[k] = x[exact]
        fa[k] = fb[k] = fx[exact]
        active[j] = (b[j] - a[j]) > width[j]
    return Bracket(a, b, fa, fb, ~active)
