"""Write ``fillcheck/fluids/data/mixtures/multifluid_pairs.json``: the multi-fluid binary pairs.

A dev-time script. For every pair of catalog gases that both have a reference equation of state
(``fillcheck/fluids/data/reference/*.json``, pseudo-pure air excepted), it asks CoolProp 8.0.0
for the pair's published parameters (``get_mixture_binary_pair_data``: reducing-function form and
parameters, F, departure-function name and the publication's BibTeX key) and writes them in
fillcheck's own schema, each pair naming its publication in full.

The departure-function coefficients are not exposed by CoolProp's Python API. They are the
table ``dev/mixtures/mixture_departure_functions.json`` of the CoolProp/CoolProp repository,
which CoolProp compiles into its library; this script reads that table from the installed
CoolProp 8.0.0 library (the copy CoolProp evaluates) and converts each function into typed term
blocks. The coefficients are carried over unchanged (same binary floats).

Pairs whose parameters are combining-rule estimates rather than fits to mixture data are written
but marked ``"estimate": true`` with the reason; the model refuses them by default.

Every pair is then evaluated with ``fillcheck.models.multifluid`` and compared with CoolProp's
HEOS mixture at states in gas and liquid-like densities (αʳ, δαʳ_δ, ταʳ_τ and ln φᵢ); the
largest relative deviation is kept in the pair's ``verification`` entry. A pair that misses
1e-8 is reported and the script exits 1.

Run from the repository root::

    .venv/bin/python tools/build_multifluid_pairs.py          # rewrites the file
    .venv/bin/python tools/build_multifluid_pairs.py --check  # exit 1 if out of date
"""

from __future__ import annotations

import argparse
import json
import math
import re
import sys
import tomllib
from itertools import combinations
from pathlib import Path

import CoolProp
import CoolProp.CoolProp as CP
import numpy as np

ROOT = Path(__file__).resolve().parents[1]
CATALOG = ROOT / "fillcheck" / "fluids" / "data" / "catalog.toml"
REF_DIR = ROOT / "fillcheck" / "fluids" / "data" / "reference"
OUT = ROOT / "fillcheck" / "fluids" / "data" / "mixtures" / "multifluid_pairs.json"
BIB = Path(CoolProp.__file__).parent / "CoolPropBibTeXLibrary.bib"
TOLERANCE = 1e-8

#: Where a BibTeX entry of CoolProp's library is a thesis later published in a journal, the
#: journal publication (citation recalled, not read from the BibTeX library).
PUBLISHED_AS = {
    "Gernert-Thesis-2013": "published as Gernert, Span (2016), EOS-CG, J. Chem. Thermodyn. 93, 274",
}

TERM_FORMS = {
    "power": "n * delta**d * tau**t * exp(-delta**l); no exponential where l = 0",
    "gerg_exponential": (
        "n * delta**d * tau**t * exp(-eta*(delta - epsilon)**2 - beta*(delta - gamma)) "
        "(the GERG-2008 departure terms, Kunz, Wagner (2012))"
    ),
    "gaussian": "n * delta**d * tau**t * exp(-eta*(delta - epsilon)**2 - beta*(tau - gamma)**2)",
}
REDUCING_FORMS = {
    "GERG-2008": (
        "Y_r = sum_i x_i**2 Y_i + sum_i<j 2 x_i x_j beta gamma Y_ij (x_i + x_j)/(beta**2 x_i "
        "+ x_j); T: Y_ij = sqrt(T_i T_j); 1/rho: Y_ij = (rho_i**(-1/3) + rho_j**(-1/3))**3/8; "
        "parameters oriented as 'components' (beta -> 1/beta for the reversed order)"
    ),
    "Lemmon-xi-zeta": (
        "T_r = sum_i x_i T_i + sum_i<j x_i x_j xi_ij; 1/rho_r = sum_i x_i/rho_i + sum_i<j "
        "x_i x_j zeta_ij (Lemmon, Jacobsen (2004), J. Phys. Chem. Ref. Data 33, 593)"
    ),
}


# --------------------------------------------------------------------------------------------
# Sources
# --------------------------------------------------------------------------------------------


def _latex_plain(s: str) -> str:
    s = s.replace('{\\"a}', "ä").replace('{\\"o}', "ö").replace('{\\"u}', "ü")
    s = s.replace('\\"a', "ä").replace('\\"o', "ö").replace('\\"u', "ü")
    return re.sub(r"[{}]", "", s).strip()


def bib_entry(key: str) -> dict[str, str]:
    text = BIB.read_text(encoding="utf-8", errors="replace")
    start = text.find("{" + key + ",")
    if start < 0:
        raise KeyError(key)
    end = text.find("\n@", start)
    body = text[start : end if end > 0 else None]
    fields = {}
    for m in re.finditer(r"^\s*(\w+)\s*=\s*\{(.*)\},?\s*$", body, flags=re.M):
        fields[m.group(1).lower()] = _latex_plain(m.group(2))
    return fields


def citation(key: str) -> str:
    """'Authors (year), Journal volume, first page' from CoolProp's BibTeX library."""
    f = bib_entry(key)
    surnames = []
    for a in f["author"].split(" and "):
        a = a.strip()
        surnames.append(a.split(",")[0].strip() if "," in a else a.split()[-1])
    who = ", ".join(surnames)
    if "school" in f:
        out = f"{who} ({f['year']}), {f['title']}, PhD thesis, {f['school']}"
    else:
        out = f"{who} ({f['year']}), {f['journal']}"
        if "volume" in f:
            out += f" {f['volume']}"
        if "pages" in f:
            out += f", {f['pages'].split('-')[0]}"
        elif "doi" in f:
            out += f", doi:{f['doi']}"
    if key in PUBLISHED_AS:
        out += f"; {PUBLISHED_AS[key]}"
    return out


def departure_table() -> dict[str, dict]:
    """CoolProp's departure-function table as compiled into the installed library."""
    lib = next(Path(CoolProp.__file__).parent.glob("CoolProp.*.so"))
    data = lib.read_bytes()
    anchor = data.find(b'"Name" : "Methane-Nitrogen"')
    start = data.rfind(b"[\n{", 0, anchor)
    end = data.find(b"\x00", start)
    table = json.loads(data[start:end].decode("utf-8"))
    return {f["Name"]: f for f in table}


def departure_blocks(f: dict) -> list[dict]:
    """CoolProp's departure function -> fillcheck term blocks (order kept)."""
    kind = f["type"]
    n = len(f["n"])
    npow = int(f.get("Npower", n)) if kind != "Exponential" else n
    zero = [0] * n
    blocks = []
    if npow:
        l = f.get("l", zero)
        blocks.append(
            {
                "type": "power",
                "n": f["n"][:npow],
                "d": f["d"][:npow],
                "t": f["t"][:npow],
                "l": l[:npow],
            }
        )
    if npow < n:
        if kind == "GERG-2008":
            rest = "gerg_exponential"
        elif kind == "Gaussian+Exponential":
            rest = "gaussian"
        else:
            raise ValueError(f"departure function {f['Name']}: unknown type {kind}")
        blocks.append(
            {"type": rest}
            | {k: f[k][npow:] for k in ("n", "d", "t", "eta", "epsilon", "beta", "gamma")}
        )
    return blocks


# --------------------------------------------------------------------------------------------
# Pairs
# --------------------------------------------------------------------------------------------


def catalog_fluids() -> dict[str, dict]:
    cat = tomllib.loads(CATALOG.read_text(encoding="utf-8"))
    cas = {f["name"]: f["cas"] for f in cat["fluid"]}
    out = {}
    for p in sorted(REF_DIR.glob("*.json")):
        spec = json.loads(p.read_text(encoding="utf-8"))
        if spec.get("pseudo_pure"):
            continue
        out[spec["fluid"]] = {
            "cas": cas[spec["fluid"]],
            "coolprop": spec["coolprop_name"],
            "T_r": spec["reducing"]["T / K"],
            "rho_r": spec["reducing"]["rhomolar / mol/m3"],
        }
    return out


def _get(c1: str, c2: str, key: str) -> str | None:
    try:
        return CP.get_mixture_binary_pair_data(c1, c2, key)
    except ValueError:
        return None


def estimate_basis(entry: dict, fluids: dict) -> str | None:
    """Why a pair's parameters are an estimate rather than a fit (None for a fit)."""
    r = entry["reducing"]
    if r["form"] != "GERG-2008" or entry["F"] != 0.0 or r["beta_T"] != 1 or r["beta_v"] != 1:
        return None
    if r["gamma_T"] == 1 and r["gamma_v"] == 1:
        return "Lorentz-Berthelot combining rule (all four parameters unity), no mixture data"
    a, b = (fluids[n] for n in entry["components"])
    gT = (a["T_r"] + b["T_r"]) / (2 * math.sqrt(a["T_r"] * b["T_r"]))
    va, vb = 1 / a["rho_r"], 1 / b["rho_r"]
    gv = 4 * (va + vb) / (va ** (1 / 3) + vb ** (1 / 3)) ** 3
    if abs(r["gamma_T"] / gT - 1) < 1e-4 and abs(r["gamma_v"] / gv - 1) < 2e-3:
        return "linear combining rule for T_r and v_r (gammas from the critical values)"
    if all(round(r[k], 2) == r[k] for k in ("gamma_T", "gamma_v")):
        return f"adopted round values (gamma_T = {r['gamma_T']}, others unity), not a fit"
    return None


def build_pairs(fluids: dict) -> tuple[list[dict], list[str]]:
    table = departure_table()
    pairs, absent = [], []
    for a, b in combinations(sorted(fluids), 2):
        c1, c2 = fluids[a]["cas"], fluids[b]["cas"]
        if _get(c1, c2, "name1") is None:
            c1, c2 = c2, c1
        name1 = _get(c1, c2, "name1")
        if name1 is None:
            absent.append(f"{a}/{b}")
            continue
        first, second = (a, b) if c1 == fluids[a]["cas"] else (b, a)
        kind = _get(c1, c2, "type")
        key = _get(c1, c2, "BibTeX")
        if kind == "GERG-2008":
            reducing = {"form": kind} | {
                k: float(_get(c1, c2, cpk))
                for k, cpk in (
                    ("beta_T", "betaT"),
                    ("gamma_T", "gammaT"),
                    ("beta_v", "betaV"),
                    ("gamma_v", "gammaV"),
                )
            }
        elif kind == "Lemmon-xi-zeta":
            reducing = {
                "form": kind,
                "xi / K": float(_get(c1, c2, "xi")),
                "zeta / m3/mol": float(_get(c1, c2, "zeta")),
            }
        else:
            raise ValueError(f"{a}/{b}: unknown reducing form {kind}")
        F = float(_get(c1, c2, "F"))
        fname = _get(c1, c2, "function")
        departure = None
        if F != 0.0 and fname:
            f = table[fname]
            departure = {
                "name": fname,
                "source": citation(f["BibTeX"]),
                "source_key": f["BibTeX"],
                "terms": departure_blocks(f),
            }
        entry = {
            "components": [first, second],
            "cas": [c1, c2],
            "reducing": reducing,
            "F": F,
            "departure": departure,
            "source": citation(key),
            "source_key": key,
            "estimate": False,
        }
        basis = estimate_basis(entry, fluids)
        if basis:
            entry["estimate"] = True
            entry["estimate_basis"] = basis
        pairs.append(entry)
    return pairs, absent


# --------------------------------------------------------------------------------------------
# Verification against CoolProp's HEOS mixtures
# --------------------------------------------------------------------------------------------


def verify(entry: dict, fluids: dict, states: int = 3) -> float:
    from fillcheck.models.multifluid import MultiFluidModel, parse_pairs

    names = tuple(entry["components"])
    model = MultiFluidModel(names, allow_estimates=True, pair_data=parse_pairs({"pairs": [entry]}))
    AS = CP.AbstractState("HEOS", "&".join(fluids[n]["coolprop"] for n in names))
    worst = 0.0
    for x1 in np.linspace(0.2, 0.8, states):
        x = np.array([x1, 1 - x1])
        AS.set_mole_fractions(list(x))
        Tr, rho_r = (float(v) for v in model.reducing(x))
        for tau, delta in ((0.5, 0.1), (0.8, 0.5), (0.9, 2.0)):
            T, rho = Tr / tau, delta * rho_r
            AS.specify_phase(CP.iphase_gas)
            AS.update(CP.DmolarT_INPUTS, rho, T)
            d = model.alphar(np.array(T), np.array(rho), x)
            got = (float(d.a00), float(d.a01), float(d.a10))
            ref = (AS.alphar(), AS.delta() * AS.dalphar_dDelta(), AS.tau() * AS.dalphar_dTau())
            if float(d.a01) > -1.0:  # ln φ where Z > 0 (a mechanically possible state)
                lnphi = float(d.a00) + model.dalphar_dn(np.array(T), np.array(rho), x)
                got = (*got, *(lnphi - math.log1p(float(d.a01))))
                ref = (*ref, *(math.log(AS.fugacity_coefficient(i)) for i in range(2)))
            for g, r in zip(got, ref, strict=True):
                worst = max(worst, abs(g - r) / max(abs(r), 1e-3))
            AS.unspecify_phase()
    return worst


def main() -> int:
    ap = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    ap.add_argument("--check", action="store_true", help="exit 1 if the file is out of date")
    args = ap.parse_args()
    fluids = catalog_fluids()
    pairs, absent = build_pairs(fluids)
    failed = []
    for entry in pairs:
        dev = verify(entry, fluids)
        entry["verification"] = {
            "against": f"CoolProp {CoolProp.__version__} HEOS mixture",
            "quantities": "alphar, delta*dalphar/ddelta, tau*dalphar/dtau, ln(phi_i)",
            "states": 9,
            "max_relative_deviation": float(f"{dev:.2e}"),
        }
        if not dev < TOLERANCE:
            failed.append(f"{'/'.join(entry['components'])}: {dev:.2e}")
    doc = {
        "description": (
            "Binary parameters of the multi-fluid mixture model (GERG-2008 form) for the "
            "catalog gases with reference equations: reducing-function parameters, departure "
            "weight F and departure function, each pair with its publication."
        ),
        "model": "Kunz, Wagner (2012), J. Chem. Eng. Data 57, 3032",
        "transcribed_from": (
            f"CoolProp {CoolProp.__version__}: get_mixture_binary_pair_data for the pair "
            "parameters, and the departure-function table of the CoolProp/CoolProp repository "
            "(dev/mixtures/mixture_departure_functions.json) as compiled into that release"
        ),
        "generated_by": "tools/build_multifluid_pairs.py",
        "reducing_forms": REDUCING_FORMS,
        "term_forms": TERM_FORMS,
        "pairs_without_published_parameters": absent,
        "pairs": pairs,
    }
    text = json.dumps(doc, indent=1, ensure_ascii=False) + "\n"
    if args.check:
        ok = OUT.exists() and OUT.read_text(encoding="utf-8") == text
        print("up to date" if ok else f"{OUT} is out of date")
        return 0 if ok and not failed else 1
    OUT.parent.mkdir(parents=True, exist_ok=True)
    OUT.write_text(text, encoding="utf-8")
    n_est = sum(p["estimate"] for p in pairs)
    print(f"wrote {len(pairs)} pairs ({n_est} marked estimates) to {OUT.relative_to(ROOT)}")
    for p in pairs:
        if p["estimate"]:
            print(f"  estimate: {'/'.join(p['components'])}: {p['estimate_basis']}")
    if failed:
        print("verification failed:\n  " + "\n  ".join(failed))
        return 1
    return 0


if __name__ == "__main__":
    sys.exit(main())
