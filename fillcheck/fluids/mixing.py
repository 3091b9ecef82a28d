"""Published binary interaction parameters kᵢⱼ of the cubic mixture model.

The cubic mixture model of fillcheck is Peng–Robinson (plain, or with the Péneloux volume
translation, which leaves ``a`` untouched) with the van der Waals one-fluid mixing rules

    a = Σᵢ Σⱼ xᵢ xⱼ √(aᵢ aⱼ) (1 − kᵢⱼ),        b = Σᵢ xᵢ bᵢ,

with kᵢⱼ = kⱼᵢ and kᵢᵢ = 0. The kᵢⱼ between catalog gases live in ``data/mixtures/cubic_kij.json``
(written by ``tools/build_cubic_kij.py``), one entry a pair, each with the publication it comes
from. A pair the file does not hold has no published value: it gets kᵢⱼ = 0 and is reported as
such, never silently filled in.

The file is read once, on first use, and checked as it is read: a pair listed twice, a gas that is
not a catalog gas (by canonical name), a missing source, or a kᵢⱼ that is not a finite number of
magnitude at most 1 stop the load with :class:`MixingDataError`.

References
----------
D.-Y. Peng and D. B. Robinson, "A New Two-Constant Equation of State", Ind. Eng. Chem. Fundam. 15
(1976) 59–64.
A. Péneloux, E. Rauzy and R. Fréze, "A consistent correction for Redlich–Kwong–Soave volumes",
Fluid Phase Equilib. 8 (1982) 7–23.
H. A. Kooijman and R. Taylor, ChemSep Interaction Parameters Data, Peng–Robinson library
``pr.ipd`` (2009), Artistic License 2.0: the values of DECHEMA Chemistry Data Series Vol. VI,
"Vapor–Liquid Equilibria for Mixtures of Low Boiling Substances" (the source of every value in
the data file; each entry names its page).
"""

from __future__ import annotations

import functools
import json
import math
from collections.abc import Mapping, Sequence
from pathlib import Path
from types import MappingProxyType

import numpy as np

from fillcheck.errors import InputError
from fillcheck.fluids.catalog import CatalogDataError, available_fluids, lookup

DATA_FILE = Path(__file__).parent / "data" / "mixtures" / "cubic_kij.json"

#: The cubic model the kᵢⱼ of the data file were fitted for.
KIJ_MODEL = "pr"
#: Largest magnitude of kᵢⱼ the loader accepts [-].
KIJ_LIMIT = 1.0

_REQUIRED = {"a", "b", "kij", "model", "source"}
_OPTIONAL = {"record", "T_range_K", "P_range_bar"}
_DASH = "–"  # en dash, between the two names of a pair


class MixingDataError(CatalogDataError):
    """The interaction-parameter data file is malformed (a packaging fault, not a user error)."""


def _parse_pair(
    raw: object, index: int, names: frozenset[str]
) -> tuple[frozenset[str], float, str]:
    where = f"cubic_kij.json pair #{index}"
    if not isinstance(raw, dict):
        raise MixingDataError(f"{where}: expected a table, got {raw!r}")
    keys = set(raw)
    if not _REQUIRED <= keys or keys - _REQUIRED - _OPTIONAL:
        raise MixingDataError(
            f"{where}: missing keys {sorted(_REQUIRED - keys)} or unknown keys "
            f"{sorted(keys - _REQUIRED - _OPTIONAL)}"
        )
    a, b = raw["a"], raw["b"]
    for name in (a, b):
        if not isinstance(name, str) or name not in names:
            raise MixingDataError(f"{where}: {name!r} is not the canonical name of a catalog gas")
    if a == b:
        raise MixingDataError(f"{where}: pairs {a!r} with itself")
    kij = raw["kij"]
    if isinstance(kij, bool) or not isinstance(kij, int | float) or not math.isfinite(kij):
        raise MixingDataError(f"{where} ({a}{_DASH}{b}): kij must be a finite number, got {kij!r}")
    if abs(kij) > KIJ_LIMIT:
        raise MixingDataError(f"{where} ({a}{_DASH}{b}): |kij| = {abs(kij)} exceeds {KIJ_LIMIT}")
    if raw["model"] != KIJ_MODEL:
        raise MixingDataError(
            f"{where} ({a}{_DASH}{b}): fitted for model {raw['model']!r}, expected {KIJ_MODEL!r}"
        )
    source = raw["source"]
    if not isinstance(source, str) or not source.strip():
        raise MixingDataError(f"{where} ({a}{_DASH}{b}): the source is missing or empty")
    return frozenset((a, b)), float(kij), source


@functools.cache
def _table() -> Mapping[frozenset[str], tuple[float, str]]:
    try:
        document = json.loads(DATA_FILE.read_text(encoding="utf-8"))
    except (OSError, json.JSONDecodeError) as exc:
        raise MixingDataError(f"cannot read {DATA_FILE.name}: {exc}") from exc
    if not isinstance(document, dict) or not isinstance(document.get("pairs"), list):
        raise MixingDataError(f"{DATA_FILE.name}: expected a 'pairs' list at the top level")
    if document.get("model") != KIJ_MODEL:
        raise MixingDataError(
            f"{DATA_FILE.name}: model {document.get('model')!r}, expected {KIJ_MODEL!r}"
        )
    names = frozenset(available_fluids())
    table: dict[frozenset[str], tuple[float, str]] = {}
    for index, raw in enumerate(document["pairs"]):
        key, kij, source = _parse_pair(raw, index, names)
        if key in table:
            a, b = sorted(key)
            raise MixingDataError(f"{DATA_FILE.name}: the pair {a}{_DASH}{b} is listed twice")
        table[key] = (kij, source)
    return MappingProxyType(table)


def cubic_kij(name_a: str, name_b: str) -> tuple[float, str | None]:
    """Published Peng–Robinson binary interaction parameter of two catalog gases.

    Parameters
    ----------
    name_a, name_b : str
        Two different catalog gases, by canonical name, formula, alias or CAS number (as
        :func:`fillcheck.fluids.catalog.lookup` accepts them). The order does not matter.

    Returns
    -------
    kij : float
        kᵢⱼ of the van der Waals one-fluid rule, a_ij = √(aᵢ aⱼ)(1 − kᵢⱼ) [-]; 0.0 where no
        value is published.
    source : str or None
        The full citation of the value and the record it comes from, or ``None`` where the data
        file holds no published value for the pair.

    Raises
    ------
    UnknownFluidError
        A name is not a catalog gas.
    InputError
        Both names are the same gas (kᵢᵢ = 0 by definition; it is not a pair).
    MixingDataError
        The data file is malformed.

    References
    ----------
    Kooijman and Taylor, ChemSep Peng–Robinson library ``pr.ipd``, after DECHEMA Chemistry Data
    Series Vol. VI (see the module docstring); each source string names the page.
    """
    a, b = lookup(name_a).name, lookup(name_b).name
    if a == b:
        raise InputError(
            f"{name_a!r} and {name_b!r} are the same gas ({a}); kij needs two different gases"
        )
    found = _table().get(frozenset((a, b)))
    if found is None:
        return 0.0, None
    return found


def cubic_kij_matrix(names: Sequence[str]) -> tuple[np.ndarray, list[str]]:
    """Matrix of published Peng–Robinson kᵢⱼ for the gases of a mixture.

    Parameters
    ----------
    names : sequence of str
        The mixture's gases, each once, by canonical name, formula, alias or CAS number; the
        matrix rows and columns follow this order.

    Returns
    -------
    kij : numpy.ndarray, shape (n, n)
        Symmetric, with a zero diagonal; 0.0 for a pair without a published value [-].
    missing : list of str
        The pairs without a published value, as ``"a–b"`` (canonical names joined by an en
        dash, in the order of ``names``); empty when every pair is covered.

    Raises
    ------
    UnknownFluidError
        A name is not a catalog gas.
    InputError
        A gas is listed twice.
    MixingDataError
        The data file is malformed.

    References
    ----------
    Kooijman and Taylor, ChemSep Peng–Robinson library ``pr.ipd``, after DECHEMA Chemistry Data
    Series Vol. VI (see the module docstring).
    """
    canonical = [lookup(name).name for name in names]
    if len(set(canonical)) != len(canonical):
        repeated = sorted({n for n in canonical if canonical.count(n) > 1})
        raise InputError(f"each gas of a mixture must be listed once; repeated: {repeated}")
    n = len(canonical)
    kij = np.zeros((n, n))
    missing: list[str] = []
    table = _table()
    for i in range(n):
        for j in range(i + 1, n):
            found = table.get(frozenset((canonical[i], canonical[j])))
            if found is None:
                missing.append(f"{canonical[i]}{_DASH}{canonical[j]}")
            else:
                kij[i, j] = kij[j, i] = found[0]
    return kij, missing
