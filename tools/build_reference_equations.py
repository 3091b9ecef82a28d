"""Write ``fillcheck/fluids/data/reference/<gas>.json``: the reference equations of state.

A dev-time script. For every catalog gas that CoolProp 8.0.0 carries, it reads the published
reference equation of state from CoolProp's fluid file (the first entry of ``EOS``, the one
CoolProp evaluates) and writes it in fillcheck's own schema: residual and ideal-gas term blocks,
reducing, critical and triple-point states, validity range, gas constant, molar mass, the
saturation ancillaries (starting values for the saturation solver) and the publication. Nothing
under ``fillcheck/`` imports CoolProp; ``tests/test_reference_data.py`` checks the files against
CoolProp again, independently (alpha^r and alpha^0 at states over the whole fluid range).

Run from the repository root::

    /work/venv/bin/python tools/build_reference_equations.py          # rewrites the files
    /work/venv/bin/python tools/build_reference_equations.py --check  # exit 1 if out of date

The coefficients are carried over unchanged (same binary floats): they are the published figures
as CoolProp's fluid file holds them. Signs and parameter names follow fillcheck's schema, which
is stated with each block type below; where CoolProp writes a term differently (the
Planck-Einstein "function of T" form), the block is converted and the conversion is noted in the
file's ``notes``. A term type this script does not know stops that gas (reported, not written);
the other gases are still written.

Every ancillary written is evaluated here and compared with CoolProp's saturation state at three
temperatures; the result is kept in the ancillary's ``verification`` entry, and an ancillary that
misses the tolerance (1 % in pressure, 2 % in density) is written but marked, and reported.
"""

from __future__ import annotations

import argparse
import json
import math
import re
import sys
import tomllib
import unicodedata
from pathlib import Path

import CoolProp
import CoolProp.CoolProp as CP

ROOT = Path(__file__).resolve().parents[1]
CATALOG = ROOT / "fillcheck" / "fluids" / "data" / "catalog.toml"
OUT_DIR = ROOT / "fillcheck" / "fluids" / "data" / "reference"
BIB = Path(CoolProp.__file__).parent / "CoolPropBibTeXLibrary.bib"

TRANSCRIBED_FROM = (
    f"coefficients as carried by CoolProp {CoolProp.__version__}'s fluid file for this "
    "equation (first EOS entry of the fluid file, the one CoolProp evaluates)"
)

# --------------------------------------------------------------------------------------------
# Term blocks: CoolProp type -> (our type, parameter arrays in our order)
# --------------------------------------------------------------------------------------------

RESIDUAL_TYPES: dict[str, tuple[str, tuple[str, ...]]] = {
    "ResidualHelmholtzPower": ("power", ("n", "d", "t", "l")),
    "ResidualHelmholtzExponential": ("exponential", ("n", "d", "t", "g", "l")),
    "ResidualHelmholtzGaussian": ("gaussian", ("n", "d", "t", "eta", "epsilon", "beta", "gamma")),
    "ResidualHelmholtzNonAnalytic": ("nonanalytic", ("n", "a", "b", "beta", "A", "B", "C", "D")),
    "ResidualHelmholtzLemmon2005": ("lemmon2005", ("n", "d", "t", "l", "m")),
    "ResidualHelmholtzGaoB": ("gao_b", ("n", "d", "t", "eta", "epsilon", "beta", "gamma", "b")),
}

#: The term CoolProp evaluates for "ResidualHelmholtzGaoB", written out (established by
#: evaluating single terms against CoolProp's alphar; the test file proves it at every state).
#: eta and beta keep CoolProp's signs (eta is negative in the ammonia equation).
GAO_B_FORMULA = (
    "n * delta**d * tau**t * exp(eta*(delta - epsilon)**2 + 1/(beta*(tau - gamma)**2 + b))"
)

CP0_POLY_FORMULA = (
    "alpha0 contribution of cp0/R = sum_i c_i T**t_i, with T = T_r/tau: for each i, "
    "t_i not 0 or -1: -c T**t/(t (t+1)) - c T0**(t+1)/((t+1) T) + c T0**t/t; "
    "t_i = 0: c - c T0/T - c ln(T/T0); t_i = -1: (c/T) ln(T/T0) + c/T - c/T0 "
    "(i.e. [integral of cp0 dT from T0 to T]/(R T) - [integral of cp0/T dT from T0 to T]/R)"
)
CP0_CONSTANT_FORMULA = (
    "alpha0 contribution of constant cp0/R = c, with tau0 = T_r/T0: "
    "c - c tau/tau0 + c ln(tau/tau0)"
)


class UnknownTermError(Exception):
    """A CoolProp term type (or a parameter of it) this script does not transcribe."""


def _numbers(values: list, what: str) -> list:
    out = []
    for v in values:
        if isinstance(v, bool) or not isinstance(v, int | float) or not math.isfinite(v):
            raise UnknownTermError(f"{what}: non-numeric or non-finite value {v!r}")
        out.append(v)
    return out


def residual_block(block: dict) -> dict:
    """One CoolProp residual block in our schema (coefficients unchanged)."""
    kind = block.get("type")
    if kind not in RESIDUAL_TYPES:
        raise UnknownTermError(f"residual term type {kind!r}: parameters "
                               f"{sorted(k for k in block if k != 'type')}")
    ours, keys = RESIDUAL_TYPES[kind]
    extra = set(block) - set(keys) - {"type"}
    if extra:
        raise UnknownTermError(f"{kind} carries parameters not transcribed: {sorted(extra)}")
    out: dict = {"type": ours}
    for key in keys:
        out[key] = _numbers(list(block[key]), f"{kind}.{key}")
    if len({len(out[k]) for k in keys}) != 1:
        raise UnknownTermError(f"{kind}: arrays of unequal length")
    if ours == "gao_b":
        out["formula"] = GAO_B_FORMULA
    return out


def ideal_block(block: dict, T_r: float, notes: list[str]) -> dict:
    """One CoolProp ideal-gas block in our schema."""
    kind = block.get("type")
    params = {k: v for k, v in block.items() if k != "type" and not k.endswith("_units")}

    def need(*keys: str) -> None:
        extra = set(params) - set(keys)
        if extra:
            raise UnknownTermError(f"{kind} carries parameters not transcribed: {sorted(extra)}")

    if kind == "IdealGasHelmholtzLead":
        need("a1", "a2")
        return {"type": "lead", "a1": block["a1"], "a2": block["a2"]}
    if kind == "IdealGasHelmholtzLogTau":
        need("a")
        return {"type": "log_tau", "a": block["a"]}
    if kind == "IdealGasHelmholtzPower":
        need("n", "t")
        return {"type": "power", "n": _numbers(block["n"], kind), "t": _numbers(block["t"], kind)}
    if kind == "IdealGasHelmholtzPlanckEinstein":
        need("n", "t")
        return {"type": "planck_einstein", "n": _numbers(block["n"], kind),
                "t": _numbers(block["t"], kind)}
    if kind == "IdealGasHelmholtzPlanckEinsteinFunctionT":
        need("n", "v", "Tcrit")
        Tcrit = block["Tcrit"]
        t = [v / Tcrit for v in _numbers(block["v"], kind)]
        notes.append(
            f"ideal-gas Planck-Einstein terms given by CoolProp as characteristic temperatures "
            f"v = {block['v']} K over Tcrit = {Tcrit} K (IdealGasHelmholtzPlanckEinsteinFunctionT)"
            f" are written as planck_einstein with t = v/Tcrit"
            + ("" if Tcrit == T_r else f" (note: Tcrit differs from T_r = {T_r} K)")
        )
        return {"type": "planck_einstein", "n": _numbers(block["n"], kind), "t": t}
    if kind == "IdealGasHelmholtzPlanckEinsteinGeneralized":
        need("n", "t", "c", "d")
        return {"type": "planck_einstein_generalized",
                **{k: _numbers(block[k], kind) for k in ("n", "t", "c", "d")}}
    if kind == "IdealGasHelmholtzEnthalpyEntropyOffset":
        need("a1", "a2", "reference")
        notes.append(f"ideal-gas offset block: CoolProp's reference-state offset "
                     f"(reference state {block.get('reference')!r} of the fluid file)")
        return {"type": "offset", "a1": block["a1"], "a2": block["a2"]}
    if kind == "IdealGasHelmholtzCP0PolyT":
        need("c", "t", "Tc", "T0")
        return {"type": "cp0_poly", "c": _numbers(block["c"], kind),
                "t": _numbers(block["t"], kind), "T_r / K": block["Tc"],
                "T0 / K": block["T0"], "formula": CP0_POLY_FORMULA}
    if kind == "IdealGasHelmholtzCP0Constant":
        need("cp_over_R", "Tc", "T0")
        return {"type": "cp0_constant", "cp_over_R": block["cp_over_R"],
                "T_r / K": block["Tc"], "T0 / K": block["T0"],
                "formula": CP0_CONSTANT_FORMULA}
    raise UnknownTermError(f"ideal-gas term type {kind!r}: parameters {sorted(params)}")


# --------------------------------------------------------------------------------------------
# Saturation ancillaries
# --------------------------------------------------------------------------------------------

#: Our ancillary name -> (CoolProp key, saturated phase quality, quantity, unit, tolerance)
ANCILLARIES_PURE = {
    "saturation_pressure": ("pS", 0, "pressure", "Pa", 0.01),
    "saturated_liquid_density": ("rhoL", 0, "density", "mol/m3", 0.02),
    "saturated_vapour_density": ("rhoV", 1, "density", "mol/m3", 0.02),
}
#: A pseudo-pure fluid (air) has a bubble and a dew line instead of one saturation pressure.
ANCILLARIES_PSEUDO_PURE = {
    "bubble_pressure": ("pL", 0, "pressure", "Pa", 0.01),
    "dew_pressure": ("pV", 1, "pressure", "Pa", 0.01),
    "saturated_liquid_density": ("rhoL", 0, "density", "mol/m3", 0.02),
    "saturated_vapour_density": ("rhoV", 1, "density", "mol/m3", 0.02),
}
_EXP_FORMS = {"pL", "pV", "rhoL", "rhoV"}
_NOEXP_FORMS = {"rhoLnoexp", "rhoVnoexp"}


def ancillary_value(anc: dict, T: float) -> float:
    """Evaluate one ancillary in our schema at temperature ``T`` [K]."""
    theta = 1.0 - T / anc["T_r / K"]
    s = sum(n * theta**t for n, t in zip(anc["n"], anc["t"], strict=True))
    if anc["noexp"]:
        return anc["reducing_value"] * (1.0 + s)
    factor = anc["T_r / K"] / T if anc["using_tau_r"] else 1.0
    return anc["reducing_value"] * math.exp(factor * s)


def ancillary_formula(form: str, using_tau_r: bool, symbol: str) -> str:
    if form in _NOEXP_FORMS:
        return (f"{symbol}/reducing_value - 1 = sum_i n_i theta**t_i, theta = 1 - T/T_r "
                "(using_tau_r does not enter this form)")
    if using_tau_r:
        return f"ln({symbol}/reducing_value) = (T_r/T) sum_i n_i theta**t_i, theta = 1 - T/T_r"
    return f"ln({symbol}/reducing_value) = sum_i n_i theta**t_i, theta = 1 - T/T_r"


def check_temperatures(T_min: float, T_c: float) -> list[float]:
    """Three temperatures for checking an ancillary: low, middle and near (not at) T_c."""
    span = T_c - T_min
    return [T_min + 0.1 * span, T_min + 0.5 * span, min(T_min + 0.9 * span, T_c - 1.0)]


def ancillaries(cp_name: str, fluid_file: dict, state: CP.AbstractState,
                pseudo_pure: bool) -> tuple[dict, list[str]]:
    anc_in = fluid_file.get("ANCILLARIES", {})
    table = ANCILLARIES_PSEUDO_PURE if pseudo_pure else ANCILLARIES_PURE
    out: dict = {}
    failures: list[str] = []
    T_c = state.T_critical()
    for ours, (key, quality, quantity, unit, tol) in table.items():
        if key not in anc_in:
            continue
        a = anc_in[key]
        form = a["type"]
        if form not in _EXP_FORMS | _NOEXP_FORMS:
            raise UnknownTermError(f"ancillary {key} of form {form!r}")
        block = {
            "form": form,
            "quantity": quantity,
            "reducing_value": a["reducing_value"],
            "reducing_value_unit": unit,
            "T_r / K": a["T_r"],
            "n": _numbers(a["n"], key),
            "t": _numbers(a["t"], key),
            "using_tau_r": bool(a["using_tau_r"]),
            "noexp": form in _NOEXP_FORMS,
            "T_min / K": a["Tmin"],
            "T_max / K": a["Tmax"],
            "formula": ancillary_formula(form, bool(a["using_tau_r"]),
                                         "p" if quantity == "pressure" else "rho"),
        }
        temps = check_temperatures(max(a["Tmin"], state.Tmin()), min(a["Tmax"], T_c))
        errors = []
        for T in temps:
            state.update(CP.QT_INPUTS, quality, T)
            ref = state.p() if quantity == "pressure" else state.rhomolar()
            errors.append(ancillary_value(block, T) / ref - 1.0)
        ok = all(abs(e) <= tol for e in errors)
        block["verification"] = {
            "against": f"CoolProp {CoolProp.__version__} saturation state (QT_INPUTS, "
                       f"Q = {quality}) of this equation",
            "T / K": temps,
            "relative_error": [float(f"{e:.3e}") for e in errors],
            "tolerance": tol,
            "within_tolerance": ok,
        }
        if not ok:
            worst = max(errors, key=abs)
            failures.append(f"{cp_name} {ours} ({key}): relative error up to {worst:+.2%} "
                            f"at T = {temps[errors.index(worst)]:.3f} K (tolerance {tol:.0%})")
        out[ours] = block
    return out, failures


# --------------------------------------------------------------------------------------------
# Publications from CoolProp's BibTeX database
# --------------------------------------------------------------------------------------------

_ACCENTS = {'"': "\u0308", "'": "\u0301", "`": "\u0300", "^": "\u0302", "~": "\u0303"}

#: Remarks added to a publication where CoolProp's database is incomplete or dated.
PUBLICATION_REMARKS = {
    "OrtizVega-JPCRD-2019": (
        "CoolProp's BibTeX database lists this equation as unpublished, its coefficients taken "
        "from REFPROP 10 with permission; no journal reference is given there"
    ),
    "Thol-JPCRD-2019-Neon": (
        "CoolProp's BibTeX database lists it as submitted to J. Phys. Chem. Ref. Data (2019); "
        "it appeared as Int. J. Thermophys. 41, 81 (2020) (citation details from memory)"
    ),
    "Gao-JPCRD-2020": (
        "CoolProp's BibTeX database gives no volume or page; the equation was published as "
        "Gao, Wu, Bell, Harvey, Lemmon, J. Phys. Chem. Ref. Data 52, 013102 (2023) (citation "
        "details from memory); whether CoolProp's 2020 coefficients are identical to the "
        "printed ones has not been checked"
    ),
    "Gao-JCED-2016": (
        "CoolProp's BibTeX database gives no volume or page: 61, 2859 (citation details "
        "from memory)"
    ),
    "Lemmon-PROPYLENE-2013": (
        "CoolProp's BibTeX database lists this equation as unpublished (personal "
        "communication), dated 2010 there although its key says 2013"
    ),
}


def _delatex(text: str) -> str:
    def accent(m: re.Match) -> str:
        return unicodedata.normalize("NFC", m.group(2) + _ACCENTS[m.group(1)])

    text = re.sub(r"\{?\\([\"'`^~])\{?([A-Za-z])\}?\}?", accent, text)
    return re.sub(r"\s+", " ", text.replace("{", "").replace("}", "")).strip()


def _braced(text: str, start: int) -> tuple[str, int]:
    """The text inside the brace opened at ``text[start]``, and the index after its close."""
    depth = 0
    for i in range(start, len(text)):
        if text[i] == "{":
            depth += 1
        elif text[i] == "}":
            depth -= 1
            if depth == 0:
                return text[start + 1:i], i + 1
    raise ValueError("unbalanced braces in the BibTeX database")


def read_bibtex(path: Path = BIB) -> dict[str, dict[str, str]]:
    """Entries of a BibTeX file: key -> {'entry_type': ..., field (lower case): value}."""
    text = path.read_text(encoding="utf-8", errors="replace")
    entries: dict[str, dict[str, str]] = {}
    for m in re.finditer(r"@(\w+)\s*\{\s*([^,\s]+)\s*,", text):
        body, _ = _braced(text, text.index("{", m.start()))
        fields = {"entry_type": m.group(1).lower()}
        pos = body.index(",") + 1
        for f in re.finditer(r"(\w+)\s*=\s*", body[pos:]):
            i = pos + f.end()
            if body[i] == "{":
                value, _ = _braced(body, i)
            elif body[i] == '"':
                value = body[i + 1:body.index('"', i + 1)]
            else:
                value = re.match(r"[^,\s}]+", body[i:]).group(0)
            fields.setdefault(f.group(1).lower(), _delatex(value))
        entries[m.group(2)] = fields
    return entries


def _surname(author: str) -> str:
    author = author.strip()
    return author.split(",")[0].strip() if "," in author else author.split()[-1]


def cite(key: str, bib: dict[str, dict[str, str]]) -> str:
    """Authors (year), journal volume, first page -- from CoolProp's BibTeX database."""
    parts = []
    for k in key.split(","):
        e = bib.get(k.strip())
        if e is None:
            parts.append(f"[{k.strip()}: not in CoolProp's BibTeX database]")
            continue
        authors = ", ".join(_surname(a) for a in re.split(r"\s+and\s+", e.get("author", "")))
        year_m = re.match(r"\d{4}", e.get("year", ""))
        year = year_m.group(0) if year_m else e.get("year", "n.d.")
        status = e.get("year", "")[len(year):].strip(" ,").lower()
        kind = e["entry_type"]
        if kind == "article":
            s = f"{authors} ({year}), {e.get('journal', '?')}"
            if "volume" in e:
                s += f" {e['volume']}"
                if "pages" in e:
                    s += f", {re.split(r'[-:]', e['pages'])[0]}"
            if status:
                s += f" ({status})"
        elif kind == "book":
            s = f"{authors} ({year}), {e.get('title', '?')}, {e.get('publisher', '?')}"
        else:
            s = f"{authors} ({year}), {e.get('title', '?')}, unpublished"
        parts.append(s)
    return "; ".join(parts)


def remarks(key: str) -> str:
    return "; ".join(PUBLICATION_REMARKS[k] for k in key.split(",") if k in PUBLICATION_REMARKS)


# --------------------------------------------------------------------------------------------
# One gas
# --------------------------------------------------------------------------------------------


def file_name(gas: str) -> str:
    return gas.replace(" ", "_") + ".json"


def build(gas: str, cp_name: str, bib: dict) -> tuple[dict, list[str]]:
    fluid_file = json.loads(CP.get_fluid_param_string(cp_name, "JSON"))[0]
    eos = fluid_file["EOS"][0]
    state = CP.AbstractState("HEOS", cp_name)
    notes: list[str] = []
    key = eos["BibTeX_EOS"]
    if key != CP.get_fluid_param_string(cp_name, "BibTeX-EOS"):
        raise UnknownTermError(f"{cp_name}: first EOS entry is not the one CoolProp evaluates")
    cp0_key = eos.get("BibTeX_CP0", "") or key
    if not eos.get("BibTeX_CP0"):
        notes.append("CoolProp's BibTeX_CP0 is empty for this equation: the ideal-gas part is "
                     "that of the equation's own publication")
    for other in fluid_file["EOS"][1:]:
        notes.append(f"CoolProp's fluid file also carries the equation {other['BibTeX_EOS']} "
                     "(not evaluated by CoolProp by default; not transcribed)")
    reducing = eos["STATES"]["reducing"]
    T_r = reducing["T"]
    stated = fluid_file["STATES"]["critical"]
    T_min = state.Tmin()
    T_triple = eos["Ttriple"]
    p_triple = state.trivial_keyed_output(CP.iP_triple)
    sat_min_T = eos["STATES"]["sat_min_liquid"]["T"]
    notes.append(
        "validity T_min is CoolProp's Tmin() for this equation, the lowest saturation "
        "temperature of its fluid file (EOS STATES sat_min_liquid); the fluid file carries no "
        "separate minimum-temperature entry"
    )
    if abs(sat_min_T - T_triple) > 1e-9:
        notes.append(
            f"triple-point pressure is CoolProp's (saturated-liquid pressure at "
            f"{sat_min_T} K, the fluid file's lowest saturation state), not at the stated "
            f"triple-point temperature {T_triple} K"
        )
    notes.append(
        "critical is the equation's own critical point as CoolProp "
        f"{CoolProp.__version__} locates it (T_critical, p_critical, rhomolar_critical); "
        "critical_stated is the critical point the fluid file states"
    )
    residual = [residual_block(b) for b in eos["alphar"]]
    ideal = [ideal_block(b, T_r, notes) for b in eos["alpha0"]]
    anc, failures = ancillaries(cp_name, fluid_file, state, bool(eos.get("pseudo_pure")))
    if eos.get("pseudo_pure"):
        notes.append("pseudo-pure fluid: the ancillaries give a bubble and a dew pressure "
                     "(CoolProp pL, pV) instead of one saturation pressure")
    for f in failures:
        notes.append("ancillary outside tolerance: " + f)
    data = {
        "fluid": gas,
        "coolprop_name": cp_name,
        "publication": cite(key, bib),
        "publication_key": key,
        "ideal_gas_publication": cite(cp0_key, bib),
        "ideal_gas_publication_key": cp0_key,
        "transcribed_from": TRANSCRIBED_FROM,
        "pseudo_pure": bool(eos.get("pseudo_pure")),
        "gas_constant / J/(mol K)": eos["gas_constant"],
        "molar_mass / kg/mol": eos["molar_mass"],
        "reducing": {"T / K": T_r, "rhomolar / mol/m3": reducing["rhomolar"]},
        "critical": {"T / K": state.T_critical(), "p / Pa": state.p_critical(),
                     "rhomolar / mol/m3": state.rhomolar_critical()},
        "critical_stated": {"T / K": stated["T"], "p / Pa": stated["p"],
                            "rhomolar / mol/m3": stated["rhomolar"]},
        "triple_point": {"T / K": T_triple, "p / Pa": p_triple},
        "validity": {"T_min / K": T_min, "T_max / K": eos["T_max"], "p_max / Pa": eos["p_max"]},
        "residual": [b for b in residual if b["n"]],
        "ideal": ideal,
        "ancillaries": anc,
        "notes": notes,
    }
    if remarks(key):
        data["publication_note"] = remarks(key)
    return data, failures


# --------------------------------------------------------------------------------------------
# Output
# --------------------------------------------------------------------------------------------


def dumps(obj: object, level: int = 0) -> str:
    """JSON with one key (or string) per line and arrays of numbers on one line."""
    pad, inner = "  " * level, "  " * (level + 1)
    if isinstance(obj, dict):
        items = [f"{inner}{json.dumps(k)}: {dumps(v, level + 1)}" for k, v in obj.items()]
        return "{\n" + ",\n".join(items) + "\n" + pad + "}" if items else "{}"
    if isinstance(obj, list) and any(isinstance(v, dict | list | str) for v in obj):
        return "[\n" + ",\n".join(inner + dumps(v, level + 1) for v in obj) + "\n" + pad + "]"
    return json.dumps(obj, ensure_ascii=False, allow_nan=False)


def catalog_gases() -> list[tuple[str, str | None]]:
    with CATALOG.open("rb") as f:
        return [(g["name"], g.get("coolprop_name")) for g in tomllib.load(f)["fluid"]]


def main(argv: list[str] | None = None) -> int:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--check", action="store_true",
                        help="write nothing; exit 1 if any file differs from what would be written")
    args = parser.parse_args(argv)
    bib = read_bibtex()
    stale, stopped, out_of_tolerance = [], [], []
    OUT_DIR.mkdir(parents=True, exist_ok=True)
    for gas, cp_name in catalog_gases():
        if not cp_name:
            print(f"skip {gas}: no CoolProp equation")
            continue
        try:
            data, failures = build(gas, cp_name, bib)
        except UnknownTermError as exc:
            stopped.append(f"{gas}: {exc}")
            print(f"NOT WRITTEN {gas}: {exc}", file=sys.stderr)
            continue
        out_of_tolerance += failures
        text = dumps(data) + "\n"
        path = OUT_DIR / file_name(gas)
        if args.check:
            if not path.exists() or path.read_text(encoding="utf-8") != text:
                stale.append(path.name)
        else:
            path.write_text(text, encoding="utf-8")
            kinds = ", ".join(b["type"] for b in data["residual"])
            print(f"wrote {path.relative_to(ROOT)}  [{data['publication_key']}]  {kinds}")
    for f in out_of_tolerance:
        print("ancillary outside tolerance (written, marked):", f, file=sys.stderr)
    if stale:
        print("out of date:", ", ".join(stale), file=sys.stderr)
    return 1 if stale or stopped else 0


if __name__ == "__main__":
    sys.exit(main())
