"""Write ``fillcheck/fluids/data/mixtures/cubic_kij.json``: published Peng–Robinson kᵢⱼ.

A dev-time script. It reads the ChemSep Peng–Robinson interaction-parameter library (``pr.ipd``,
H. A. Kooijman and R. Taylor, Artistic License 2.0), keeps the records whose two components are
both catalog gases (matched by CAS number), and writes one JSON entry a pair: the two canonical
catalog names, the value exactly as published, the model it was fitted for ("pr"), the full
citation with the page of the DECHEMA compilation the value comes from, and the record itself.

No value is fitted, rounded or estimated here: a pair the library lacks is simply absent from the
file, and ``fillcheck.fluids.mixing`` reports it as having no published value.

The machine this was written on has no network access, so by default the script reads the raw
extract ``tools/data/chemsep_pr_catalog_pairs.ipd`` (the library's catalog-gas records, copied
unchanged, with the source in its header). ``--ipd`` reads any other copy of the library, e.g. the
whole ``pr.ipd`` of ChemSep or of the CalebBell/thermo repository; the result is the same.

Run from the repository root::

    python tools/build_cubic_kij.py            # rewrites the data file
    python tools/build_cubic_kij.py --check    # exit 1 if the data file is out of date
    python tools/build_cubic_kij.py --ipd /path/to/pr.ipd
"""

from __future__ import annotations

import argparse
import json
import re
import sys
from dataclasses import dataclass
from pathlib import Path

ROOT = Path(__file__).resolve().parents[1]
sys.path.insert(0, str(ROOT))

from fillcheck.fluids.catalog import all_fluids  # noqa: E402

EXTRACT = ROOT / "tools" / "data" / "chemsep_pr_catalog_pairs.ipd"
OUT = ROOT / "fillcheck" / "fluids" / "data" / "mixtures" / "cubic_kij.json"

#: The publication every value of the file comes from.
CHEMSEP_PR = (
    "H. A. Kooijman and R. Taylor, ChemSep Interaction Parameters Data (IPD), Peng-Robinson "
    "library pr.ipd, 'DECHEMA Peng-Robinson Parameters' (created by A. L. Dill, 1996; updated "
    "and corrected by H. A. Kooijman, 2009), distributed under the Artistic License 2.0; copy "
    "read: github.com/CalebBell/thermo, 'thermo/Interaction Parameters/ChemSep/pr.ipd' at commit "
    "5697d0c002b2283c12087df0bf7f0412c30b08c7. The values are those of DECHEMA Chemistry Data "
    "Series Vol. VI, 'Vapor-Liquid Equilibria for Mixtures of Low Boiling Substances' (H. Knapp, "
    "R. Döring, L. Oellrich, U. Plöcker, J. M. Prausnitz, DECHEMA, Frankfurt/Main, 1982; authors "
    "and year from memory), Peng-Robinson binary parameter fitted to the binary's "
    "vapour-liquid equilibrium data"
)
MIXING_RULE = (
    "van der Waals one-fluid: a = sum_i sum_j x_i x_j sqrt(a_i a_j) (1 - k_ij), "
    "b = sum_i x_i b_i; k_ij = k_ji, k_ii = 0"
)

_CAS = re.compile(r"^\d{2,7}-\d{2}-\d$")
_PAGE = re.compile(r"^p(\d+)$")
_T_RANGE = re.compile(r"\bT=([0-9.]+)-([0-9.]+)K?\b")
_P_RANGE = re.compile(r"\bP=([0-9.]+)(?:-([0-9.]+))?bar\b")


@dataclass(frozen=True)
class Record:
    """One data line of a ChemSep ``.ipd`` library."""

    cas_1: str
    cas_2: str
    k12_text: str
    comment: str
    line: str

    @property
    def kij(self) -> float:
        """The published value as a float (the decimal text converted, nothing else) [-]."""
        return float(self.k12_text)

    @property
    def page(self) -> str:
        """The page reference ``pNNN`` that ends the record's comment."""
        words = self.comment.split()
        if not words or not _PAGE.match(words[-1]):
            raise ValueError(f"record without a page reference: {self.line!r}")
        return words[-1]

    def temperature_range_K(self) -> list[float] | None:
        """The temperature range of the fitted data, when the record states it [K]."""
        m = _T_RANGE.search(self.comment)
        return None if m is None else [float(m.group(1)), float(m.group(2))]

    def pressure_range_bar(self) -> list[float] | None:
        """The pressure range of the fitted data, when the record states it [bar]."""
        m = _P_RANGE.search(self.comment)
        if m is None:
            return None
        low = float(m.group(1))
        return [low, float(m.group(2)) if m.group(2) else low]


def read_ipd(path: Path) -> list[Record]:
    """Every data line of an ``.ipd`` file (banner, section and comment lines skipped)."""
    records = []
    for raw in path.read_text(encoding="utf-8").splitlines():
        words = raw.split(maxsplit=3)
        if len(words) < 3 or not (_CAS.match(words[0]) and _CAS.match(words[1])):
            continue
        records.append(
            Record(words[0], words[1], words[2], words[3] if len(words) > 3 else "", raw)
        )
    if not records:
        raise SystemExit(f"{path}: no interaction-parameter records found")
    return records


def build(path: Path) -> dict[str, object]:
    """The data file's content from the library at ``path``."""
    fluids = all_fluids()
    by_cas = {f.cas: f.name for f in fluids}
    order = {f.name: i for i, f in enumerate(fluids)}
    entries: dict[frozenset[str], dict[str, object]] = {}
    for rec in read_ipd(path):
        if rec.cas_1 not in by_cas or rec.cas_2 not in by_cas:
            continue
        a, b = sorted((by_cas[rec.cas_1], by_cas[rec.cas_2]), key=order.__getitem__)
        if a == b:
            raise SystemExit(f"{path}: a record pairs a gas with itself: {rec.line!r}")
        key = frozenset((a, b))
        if key in entries:
            raise SystemExit(f"{path}: the pair {a}/{b} is listed twice: {rec.line!r}")
        record = " ".join(rec.line.split())
        entries[key] = {
            "a": a,
            "b": b,
            "kij": rec.kij,
            "model": "pr",
            "source": f"{CHEMSEP_PR}; page {rec.page[1:]} of that volume; pair record: '{record}'",
            "record": record,
            "T_range_K": rec.temperature_range_K(),
            "P_range_bar": rec.pressure_range_bar(),
        }
    pairs = sorted(entries.values(), key=lambda e: (order[str(e["a"])], order[str(e["b"])]))
    return {
        "about": (
            "Published Peng-Robinson binary interaction parameters k_ij between fillcheck's "
            "catalog gases, as published (not refitted). Written by tools/build_cubic_kij.py; "
            "do not edit by hand. T_range_K and P_range_bar are the ranges of the data the "
            "value was fitted to, where the record states them."
        ),
        "model": "pr",
        "mixing_rule": MIXING_RULE,
        "pairs": pairs,
    }


def render(content: dict[str, object]) -> str:
    """The file's text: indented JSON, one pair a block, trailing newline."""
    return json.dumps(content, indent=1, ensure_ascii=False) + "\n"


def main(argv: list[str] | None = None) -> int:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--ipd", type=Path, default=EXTRACT, help="the ChemSep pr.ipd to read")
    parser.add_argument("--check", action="store_true", help="exit 1 if the file is out of date")
    args = parser.parse_args(argv)
    content = build(args.ipd)
    text = render(content)
    pairs = content["pairs"]
    assert isinstance(pairs, list)
    if args.check:
        current = OUT.read_text(encoding="utf-8") if OUT.exists() else ""
        if current != text:
            print(f"{OUT.relative_to(ROOT)} is out of date; run tools/build_cubic_kij.py")
            return 1
        print(f"{OUT.relative_to(ROOT)} is up to date ({len(pairs)} pairs)")
        return 0
    OUT.parent.mkdir(parents=True, exist_ok=True)
    OUT.write_text(text, encoding="utf-8")
    n = len(all_fluids())
    print(f"wrote {OUT.relative_to(ROOT)}: {len(pairs)} of {n * (n - 1) // 2} catalog pairs")
    return 0


if __name__ == "__main__":
    raise SystemExit(main())
