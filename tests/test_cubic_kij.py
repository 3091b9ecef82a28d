"""Published Peng–Robinson kᵢⱼ of catalog-gas pairs: the data file and its two functions.

The values come from the ChemSep Peng–Robinson library ``pr.ipd`` (H. A. Kooijman, R. Taylor;
Artistic License 2.0), whose records give the page of DECHEMA Chemistry Data Series Vol. VI
("Vapor–Liquid Equilibria for Mixtures of Low Boiling Substances") each value was taken from.
The raw records are kept in ``tools/data/chemsep_pr_catalog_pairs.ipd``; the checks below compare
the data file with that extract, and a few values with the published records named beside them.
"""

from __future__ import annotations

import importlib.util
import json
import sys
from pathlib import Path

import numpy as np
import pytest

from fillcheck.errors import InputError, UnknownFluidError
from fillcheck.fluids import available_fluids, mixing
from fillcheck.fluids.mixing import MixingDataError, cubic_kij, cubic_kij_matrix

ROOT = Path(__file__).resolve().parents[1]
EXTRACT = ROOT / "tools" / "data" / "chemsep_pr_catalog_pairs.ipd"
DEMO_PAIRS = [
    ("argon", "carbon dioxide"),
    ("argon", "oxygen"),
    ("nitrogen", "carbon dioxide"),
    ("nitrogen", "oxygen"),
    ("helium", "oxygen"),
    ("hydrogen", "nitrogen"),
    ("propane", "n-butane"),
    ("propane", "isobutane"),
    ("methane", "ethane"),
    ("methane", "nitrogen"),
    ("methane", "carbon dioxide"),
    ("argon", "nitrogen"),
]
#: Demo pairs the ChemSep/DECHEMA Peng–Robinson library does not list (no published value at hand).
DEMO_PAIRS_WITHOUT_PUBLISHED_KIJ = {("argon", "carbon dioxide"), ("helium", "oxygen")}
#: Pairs whose published |kij| reaches 0.5: helium–carbon monoxide, 0.5463 in the ChemSep pr.ipd
#: record for DECHEMA Vol. VI p. 203 (helium binaries carry large kij).
LARGE_KIJ = {frozenset({"helium", "carbon monoxide"}): 0.5463}


def _pairs() -> list[dict[str, object]]:
    return json.loads(mixing.DATA_FILE.read_text(encoding="utf-8"))["pairs"]


def _extract() -> dict[frozenset[str], float]:
    """The raw records by CAS pair: {CAS 1, CAS 2} -> k12 as written in the library."""
    out = {}
    for line in EXTRACT.read_text(encoding="utf-8").splitlines():
        if line.startswith("#") or not line.strip():
            continue
        cas_1, cas_2, k12 = line.split()[:3]
        out[frozenset((cas_1, cas_2))] = float(k12)
    return out


# --- data guard ----------------------------------------------------------------------------------


def test_every_entry_is_a_catalog_pair_with_a_published_source() -> None:
    names = set(available_fluids())
    seen: set[frozenset[str]] = set()
    for entry in _pairs():
        a, b = entry["a"], entry["b"]
        assert a in names and b in names and a != b
        key = frozenset((a, b))
        assert key not in seen, f"{a}–{b} listed twice"
        seen.add(key)
        assert entry["model"] == "pr"
        source = entry["source"]
        assert isinstance(source, str)
        for word in ("Kooijman", "Taylor", "ChemSep", "DECHEMA Chemistry Data Series Vol. VI"):
            assert word in source, f"{a}–{b}: source does not name {word!r}"
        assert "page " in source and "pair record:" in source


def test_values_are_small_and_symmetric() -> None:
    for entry in _pairs():
        a, b, k = entry["a"], entry["b"], entry["kij"]
        limit = LARGE_KIJ.get(frozenset((a, b)))
        if limit is None:
            assert abs(k) < 0.5, f"{a}–{b}: kij = {k}"
        else:
            assert k == limit
        assert cubic_kij(a, b) == cubic_kij(b, a) == (k, entry["source"])


def test_file_holds_exactly_the_raw_records_unchanged() -> None:
    # Every catalog-pair record of the stored pr.ipd extract is in the file, with the same value.
    from fillcheck.fluids import lookup

    raw = _extract()
    stored = {
        frozenset((lookup(str(e["a"])).cas, lookup(str(e["b"])).cas)): e["kij"] for e in _pairs()
    }
    assert stored == raw
    assert len(stored) == 66


def test_data_file_is_what_the_build_script_writes() -> None:
    spec = importlib.util.spec_from_file_location(
        "build_cubic_kij", ROOT / "tools/build_cubic_kij.py"
    )
    assert spec is not None and spec.loader is not None
    module = importlib.util.module_from_spec(spec)
    sys.modules[spec.name] = module  # its dataclass needs its module registered
    try:
        spec.loader.exec_module(module)
    finally:
        del sys.modules[spec.name]
    assert module.render(module.build(EXTRACT)) == mixing.DATA_FILE.read_text(encoding="utf-8")


# --- spot checks against the published records ----------------------------------------------------


@pytest.mark.parametrize(
    ("a", "b", "published"),
    [
        # ChemSep pr.ipd record "7727-37-9 7782-44-7 -.159e-1 Nitrogen/Oxygen ... p277"
        # (DECHEMA Chemistry Data Series Vol. VI, p. 277)
        ("nitrogen", "oxygen", -0.0159),
        # pr.ipd "74-82-8 124-38-9 .978e-1 Methane/Carbon Dioxide ... p399" (DECHEMA VI p. 399)
        ("methane", "carbon dioxide", 0.0978),
        # pr.ipd "7727-37-9 124-38-9 -.122e-1 Nitrogen/Carbon Dioxide ... p312" (DECHEMA VI p. 312)
        ("nitrogen", "carbon dioxide", -0.0122),
        # pr.ipd "1333-74-0 7727-37-9 .711e-1 Hydrogen/Nitrogen ... p210" (DECHEMA VI p. 210)
        ("hydrogen", "nitrogen", 0.0711),
        # pr.ipd "74-98-6 106-97-8 .33e-2 Propane/n-Butane p666" (DECHEMA VI p. 666)
        ("propane", "n-butane", 0.0033),
        # pr.ipd "7440-37-1 7782-44-7 .89e-2 Argon/Oxygen ... p362" (DECHEMA VI p. 362)
        ("argon", "oxygen", 0.0089),
        # pr.ipd "1333-74-0 106-97-8 -.3970 Hydrogen/n-Butane ... p247" (DECHEMA VI p. 247)
        ("hydrogen", "n-butane", -0.3970),
    ],
)
def test_spot_values(a: str, b: str, published: float) -> None:
    kij, source = cubic_kij(a, b)
    assert kij == published
    assert source is not None


def test_lookup_accepts_formulas_and_aliases() -> None:
    assert cubic_kij("CO2", "CH4")[0] == cubic_kij("methane", "carbon dioxide")[0]


def test_unpublished_pair_is_zero_without_source() -> None:
    assert cubic_kij("neon", "xenon") == (0.0, None)


def test_same_gas_and_unknown_gas_are_refused() -> None:
    with pytest.raises(InputError):
        cubic_kij("nitrogen", "N2")
    with pytest.raises(UnknownFluidError):
        cubic_kij("nitrogen", "unobtainium")


# --- the matrix ----------------------------------------------------------------------------------


def test_matrix_symmetric_zero_diagonal_missing_listed() -> None:
    names = ["nitrogen", "oxygen", "argon", "carbon dioxide"]
    k, missing = cubic_kij_matrix(names)
    assert k.shape == (4, 4)
    np.testing.assert_array_equal(k, k.T)
    np.testing.assert_array_equal(np.diag(k), 0.0)
    assert k[0, 1] == -0.0159  # pr.ipd p277, nitrogen/oxygen
    assert k[1, 2] == 0.0089  # pr.ipd p362, argon/oxygen
    assert k[0, 3] == -0.0122  # pr.ipd p312, nitrogen/carbon dioxide
    assert missing == ["oxygen–carbon dioxide", "argon–carbon dioxide"]
    assert k[1, 3] == k[2, 3] == 0.0


def test_matrix_of_one_gas_and_of_none() -> None:
    k, missing = cubic_kij_matrix(["methane"])
    assert k.shape == (1, 1) and k[0, 0] == 0.0 and missing == []
    k, missing = cubic_kij_matrix([])
    assert k.shape == (0, 0) and missing == []


def test_matrix_refuses_a_repeated_gas() -> None:
    with pytest.raises(InputError, match="listed once"):
        cubic_kij_matrix(["nitrogen", "oxygen", "N2"])


# --- the pairs fillcheck's demos use ------------------------------------------------------------


@pytest.mark.parametrize(("a", "b"), DEMO_PAIRS)
def test_demo_pairs(a: str, b: str) -> None:
    kij, source = cubic_kij(a, b)
    if (a, b) in DEMO_PAIRS_WITHOUT_PUBLISHED_KIJ:
        # A known gap of the source: when a published value is added, move the pair out of the set.
        assert (kij, source) == (0.0, None)
        assert cubic_kij_matrix([a, b])[1] == [f"{a}–{b}"]
    else:
        assert source is not None and "DECHEMA" in source


# --- a malformed file is refused ----------------------------------------------------------------

GOOD = {"a": "nitrogen", "b": "oxygen", "kij": -0.0159, "model": "pr", "source": "a publication"}


@pytest.mark.parametrize(
    ("pairs", "message"),
    [
        ([GOOD, {**GOOD, "a": "oxygen", "b": "nitrogen"}], "listed twice"),
        ([{k: v for k, v in GOOD.items() if k != "source"}], "missing keys"),
        ([{**GOOD, "source": "  "}], "source is missing"),
        ([{**GOOD, "kij": "0.1"}], "finite number"),
        ([{**GOOD, "kij": True}], "finite number"),
        ([{**GOOD, "kij": 1.5}], "exceeds"),
        ([{**GOOD, "a": "Nitrogen"}], "canonical name"),
        ([{**GOOD, "b": "unobtainium"}], "canonical name"),
        ([{**GOOD, "b": "nitrogen"}], "with itself"),
        ([{**GOOD, "model": "srk"}], "fitted for model"),
    ],
)
def test_malformed_file_is_refused(
    tmp_path: Path, monkeypatch: pytest.MonkeyPatch, pairs: list[dict[str, object]], message: str
) -> None:
    bad = tmp_path / "cubic_kij.json"
    bad.write_text(json.dumps({"model": "pr", "pairs": pairs}), encoding="utf-8")
    monkeypatch.setattr(mixing, "DATA_FILE", bad)
    mixing._table.cache_clear()
    try:
        with pytest.raises(MixingDataError, match=message):
            cubic_kij("nitrogen", "oxygen")
    finally:
        mixing._table.cache_clear()


def test_unreadable_file_is_refused(tmp_path: Path, monkeypatch: pytest.MonkeyPatch) -> None:
    bad = tmp_path / "cubic_kij.json"
    bad.write_text("{not json", encoding="utf-8")
    monkeypatch.setattr(mixing, "DATA_FILE", bad)
    mixing._table.cache_clear()
    try:
        with pytest.raises(MixingDataError, match="cannot read"):
            cubic_kij_matrix(["nitrogen", "oxygen"])
    finally:
        mixing._table.cache_clear()
