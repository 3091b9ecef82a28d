"""Write ``fillcheck/fluids/data/catalog.toml`` from CoolProp 8.0.0 and chemicals 1.5.2.

A dev-time script: it is the only place where the catalog's figures are read from the two
reference packages, so that the data file can be rebuilt and reviewed line by line. Nothing under
``fillcheck/`` imports CoolProp or chemicals; the tests use them again, independently, to check
the file.

Run from the repository root::

    /work/venv/bin/python tools/build_catalog.py            # rewrites the data file
    /work/venv/bin/python tools/build_catalog.py --check    # exit 1 if the file is out of date

What is written by hand below (identities, aliases, hazards, the choice of heat-capacity source)
is the catalog's editorial content; every number comes from one of the two packages, and each is
rounded to 10 significant digits (a relative change below 5e-11).
"""

from __future__ import annotations

import argparse
import json
import math
import re
import sys
from dataclasses import dataclass, field
from pathlib import Path

import CoolProp
import CoolProp.CoolProp as CP
import numpy as np
from chemicals import acentric, critical, elements, phase_change, triple
from chemicals import heat_capacity as hc

ROOT = Path(__file__).resolve().parents[1]
OUT = ROOT / "fillcheck" / "fluids" / "data" / "catalog.toml"
BIB = Path(CoolProp.__file__).parent / "CoolPropBibTeXLibrary.bib"

#: Exact SI molar gas constant (2019 SI), used only to turn J/(mol K) fits into cp0/R.
R_SI = 8.314462618

HAZARD_ORDER = ("flammable", "oxidizing", "toxic", "corrosive", "asphyxiant")
HAZARD_SOURCE = "GHS classification of the pure gas, common practice (from memory)"

POLING_SOURCE = (
    "Poling, Prausnitz, O'Connell (2001), The Properties of Gases and Liquids, 5th ed., "
    "McGraw-Hill, Appendix A, Section C"
)
MONATOMIC_SOURCE = "monatomic ideal gas, translational degrees of freedom only (exact)"
SHOMATE_SOURCE = (
    "NIST Chemistry WebBook (SRD 69) Shomate fit, which the WebBook credits to Chase (1998), "
    "NIST-JANAF Thermochemical Tables, 4th ed., J. Phys. Chem. Ref. Data Monograph 9 (credit "
    "from memory); read from chemicals 1.5.2 (chemicals.heat_capacity."
    "WebBook_Shomate_coefficients, lowest range); coefficients divided by R = 8.314462618 "
    "J/(mol K)"
)

# Air as the pseudo-pure fluid of Lemmon et al. (2000): mole fractions (from memory).
AIR_COMPOSITION = {"nitrogen": 0.7812, "oxygen": 0.2096, "argon": 0.0092}


@dataclass
class Entry:
    """The hand-written part of one catalog row."""

    name: str
    formula: str
    cas: str
    aliases: list[str]
    hazards: list[str]
    coolprop: str | None
    cp: str  # "poling" | "monatomic" | "shomate" | "air" | "none"
    notes: dict[str, str] = field(default_factory=dict)


F, O, T, C, A = "flammable", "oxidizing", "toxic", "corrosive", "asphyxiant"

ENTRIES = [
    Entry("nitrogen", "N2", "7727-37-9", ["R728", "dinitrogen"], [A], "Nitrogen", "poling"),
    Entry("oxygen", "O2", "7782-44-7", ["R732", "dioxygen"], [O], "Oxygen", "poling"),
    Entry("argon", "Ar", "7440-37-1", ["R740"], [A], "Argon", "monatomic"),
    Entry("helium", "He", "7440-59-7", ["R704", "helium-4"], [A], "Helium", "monatomic"),
    Entry("hydrogen", "H2", "1333-74-0", ["R702", "normal hydrogen", "dihydrogen"], [F, A],
          "Hydrogen", "poling"),
    Entry("neon", "Ne", "7440-01-9", ["R720"], [A], "Neon", "monatomic"),
    Entry("krypton", "Kr", "7439-90-9", ["R784"], [A], "Krypton", "monatomic"),
    Entry("xenon", "Xe", "7440-63-3", [], [A], "Xenon", "monatomic"),
    Entry("air", "N2+O2+Ar", "132259-10-0", ["R729", "dry air"], [], "Air", "air"),
    Entry("carbon monoxide", "CO", "630-08-0", ["carbonic oxide"], [F, T], "CarbonMonoxide",
          "poling"),
    Entry("methane", "CH4", "74-82-8", ["R50", "marsh gas"], [F, A], "Methane", "poling"),
    Entry("carbon dioxide", "CO2", "124-38-9",
          ["R744", "carbonic acid gas", "carbonic anhydride"], [A], "CarbonDioxide", "poling"),
    Entry("nitrous oxide", "N2O", "10024-97-2",
          ["R744A", "laughing gas", "dinitrogen monoxide", "dinitrogen oxide"], [O],
          "NitrousOxide", "poling"),
    Entry("ethane", "C2H6", "74-84-0", ["R170"], [F, A], "Ethane", "poling"),
    Entry("ethylene", "C2H4", "74-85-1", ["R1150", "ethene"], [F, A], "Ethylene", "poling"),
    Entry("propane", "C3H8", "74-98-6", ["R290", "n-propane"], [F, A], "Propane", "poling"),
    Entry("propylene", "C3H6", "115-07-1", ["R1270", "propene"], [F, A], "Propylene", "poling"),
    Entry("n-butane", "n-C4H10", "106-97-8", ["R600", "butane", "normal butane"], [F, A],
          "n-Butane", "poling"),
    Entry("isobutane", "i-C4H10", "75-28-5", ["R600a", "i-butane", "2-methylpropane"], [F, A],
          "IsoButane", "poling"),
    Entry("sulfur hexafluoride", "SF6", "2551-62-4", ["R846", "sulphur hexafluoride"], [A],
          "SulfurHexafluoride", "shomate"),
    Entry("ammonia", "NH3", "7664-41-7", ["R717", "anhydrous ammonia"], [F, T, C], "Ammonia",
          "poling"),
    Entry("chlorine", "Cl2", "7782-50-5", ["dichlorine"], [O, T, C], "Chlorine", "poling",
          {"hazards": "; 'corrosive' as in its transport classification (UN 1017, subsidiary "
                      "hazard 8), the GHS classification itself naming skin and eye irritation "
                      "(from memory)"}),
    Entry("sulfur dioxide", "SO2", "7446-09-5", ["R764", "sulphur dioxide"], [T, C],
          "SulfurDioxide", "shomate"),
    Entry("hydrogen sulfide", "H2S", "7783-06-4", ["hydrogen sulphide", "sulfane"], [F, T],
          "HydrogenSulfide", "poling"),
    Entry("hydrogen chloride", "HCl", "7647-01-0", ["anhydrous hydrogen chloride"], [T, C],
          "HydrogenChloride", "poling"),
    Entry("dimethyl ether", "CH3OCH3", "115-10-6",
          ["DME", "RE170", "methyl ether", "methoxymethane"], [F, A], "DimethylEther", "poling"),
    Entry("nitrogen trifluoride", "NF3", "7783-54-2", ["trifluoramine"], [O, T], None, "shomate"),
    Entry("tetrafluoromethane", "CF4", "75-73-0",
          ["R14", "PFC-14", "carbon tetrafluoride", "perfluoromethane"], [A], "R14", "poling"),
    Entry("R134a", "CH2FCF3", "811-97-2", ["HFC-134a", "1,1,1,2-tetrafluoroethane", "norflurane"],
          [A], "R134a", "poling"),
    Entry("R32", "CH2F2", "75-10-5", ["HFC-32", "difluoromethane"], [F, A], "R32", "poling"),
    Entry("R125", "CHF2CF3", "354-33-6", ["HFC-125", "pentafluoroethane"], [A], "R125", "poling"),
    Entry("R1234yf", "CH2=CFCF3", "754-12-1", ["HFO-1234yf", "2,3,3,3-tetrafluoropropene"],
          [F, A], "R1234yf", "none"),
    Entry("R152a", "CH3CHF2", "75-37-6", ["HFC-152a", "1,1-difluoroethane"], [F, A], "R152a",
          "poling"),
    Entry("R22", "CHClF2", "75-45-6", ["HCFC-22", "chlorodifluoromethane"], [A], "R22", "poling"),
    Entry("R23", "CHF3", "75-46-7", ["HFC-23", "trifluoromethane", "fluoroform"], [A], "R23",
          "poling"),
]

# Citation details CoolProp's bundled bibliography lacks (all from memory).
BIB_EXTRA = {
    "Gao-JCED-2016": "61, 2859 (volume and page from memory)",
}


def sig10(x: float) -> float:
    """Round to 10 significant digits."""
    return float(f"{x:.10g}")


def fmt(x: float) -> str:
    """A TOML float literal."""
    text = repr(float(x))
    return text if any(c in text for c in ".en") else text + ".0"


def toml_str(s: str) -> str:
    return json.dumps(s, ensure_ascii=False)


# --- citations from CoolProp's bundled BibTeX file ------------------------------------------

def _bib_entries() -> dict[str, dict[str, str]]:
    text = BIB.read_text(encoding="utf-8", errors="replace")
    out: dict[str, dict[str, str]] = {}
    for m in re.finditer(r"@\w+\{\s*([^,\s]+)\s*,(.*?)\n\}", text, re.S):
        fields = {}
        for fm in re.finditer(r"(\w+)\s*=\s*\{(.*?)\},?\s*$", m.group(2), re.M):
            fields[fm.group(1).lower()] = fm.group(2).strip("{}").strip()
        out[m.group(1)] = fields
    return out


BIBS = _bib_entries()


def _surname(author: str) -> str:
    author = author.strip().replace('{\\"u}', "ü").replace('{\\"o}', "ö")
    if "," in author:
        return author.split(",")[0].strip()
    return author.split()[-1]


def citation(key: str) -> str:
    """'Span, Lemmon, ... (2000), J. Phys. Chem. Ref. Data 29, 1361' from a bibliography key."""
    e = BIBS[key]
    names = [_surname(a) for a in e["author"].split(" and ")]
    names = [n.replace("Buecker", "Bücker") for n in names]
    year = e.get("year", "").replace(", Submitted", "")
    text = f"{', '.join(names)} ({year})"
    if "publisher" in e and "journal" not in e:
        text += f", {e['title']}, {e['publisher']}"
    if "journal" in e:
        text += f", {e['journal'].replace('Chem Ref.', 'Chem. Ref.')}"
        if "volume" in e:
            page = e.get("pages", "").split("-")[0].split(":")[0]
            text += f" {e['volume']}, {page}" if page else f" {e['volume']}"
        elif key in BIB_EXTRA:
            text += f" {BIB_EXTRA[key]}"
        elif "Submitted" not in e.get("year", ""):
            text += " (volume and pages not in CoolProp's bibliography)"
    if "Submitted" in e.get("year", ""):
        text += " (submitted when CoolProp's bibliography was written)"
    note = e.get("note")
    if note:
        text += f" (CoolProp's bibliography notes: '{note}')"
    return text


def eos_citation(cp_name: str) -> str:
    keys = CP.get_fluid_param_string(cp_name, "BibTeX-EOS").split(",")
    cites = "; ".join(citation(k) for k in keys)
    return f"{cites} [CoolProp key {','.join(keys)}]"


# --- one CoolProp fluid ----------------------------------------------------------------------

def coolprop_figures(e: Entry) -> tuple[dict[str, float], dict[str, str]]:
    n = e.coolprop
    assert n is not None
    js = json.loads(CP.get_fluid_param_string(n, "JSON"))
    js = js[0] if isinstance(js, list) else js
    eos = js["EOS"][0]
    crit = js["STATES"]["critical"]
    M = CP.PropsSI("molar_mass", n)
    vals = {
        "molar_mass_kg_mol": M,
        "critical_temperature_K": CP.PropsSI("Tcrit", n),
        "critical_pressure_Pa": CP.PropsSI("pcrit", n),
        "critical_density_kg_m3": CP.PropsSI("rhocrit", n),
        "acentric_factor": CP.PropsSI("acentric", n),
        "triple_point_temperature_K": CP.PropsSI("Ttriple", n),
        "normal_boiling_point_K": CP.PropsSI("T", "P", 101325.0, "Q", 0.0, n),
    }
    cite = eos_citation(n)
    carried = "(figures as carried by CoolProp 8.0.0)"
    src: dict[str, str] = {"molar_mass": f"{cite} {carried}"}

    Tc, pc, rhoc = (vals[k] for k in ("critical_temperature_K", "critical_pressure_Pa",
                                      "critical_density_kg_m3"))
    file_T, file_p, file_rho = crit["T"], crit["p"], crit["rhomolar"] * M
    text = (f"{cite} {carried}: the critical point of this equation as CoolProp 8.0.0 locates "
            "it on the equation (PropsSI 'Tcrit', 'pcrit', 'rhocrit')")
    dev = max(abs(Tc / file_T - 1), abs(pc / file_p - 1), abs(rhoc / file_rho - 1))
    if dev > 1e-7:
        text += (f"; CoolProp's fluid file states Tc = {file_T:.10g} K, pc = {file_p:.10g} Pa, "
                 f"rhoc = {file_rho:.7g} kg/m3 (largest relative difference {dev:.1e})")
    src["critical"] = text

    # acentric factor: stated with the equation, or computed from it?
    w = vals["acentric_factor"]
    psat = CP.PropsSI("P", "T", 0.7 * Tc, "Q", 0.0, n)
    w_calc = -math.log10(psat / pc) - 1.0
    how = f"{cite} {carried}: CoolProp's 'acentric'"
    if e.name == "air":
        how += (" (CoolProp's fluid file: undefined for a pseudo-pure fluid, the value is "
                "approximate); -log10(psat(0.7 Tc)/pc) - 1 on the equation's bubble line gives "
                f"{w_calc:.4f}, which is not meaningful for a mixture")
    elif w == round(w, 5):
        how += (f", the rounded value given with the equation; -log10(psat(0.7 Tc)/pc) - 1 "
                f"recomputed here on the equation gives {w_calc:.6f} "
                f"(difference {w - w_calc:+.1e})")
    elif abs(w - w_calc) < 1e-5:
        how += (", a value computed from the equation: -log10(psat(0.7 Tc)/pc) - 1 recomputed "
                f"here on the equation gives {w_calc:.6f} (difference {w - w_calc:+.1e})")
    else:
        how += (f", a computed value that -log10(psat(0.7 Tc)/pc) - 1 recomputed here on the "
                f"equation reproduces only to {w - w_calc:+.1e} ({w_calc:.6f}); presumably "
                "computed with other critical parameters")
    src["acentric_factor"] = how

    tt = vals["triple_point_temperature_K"]
    file_tt = eos.get("Ttriple")
    if e.name == "tetrafluoromethane":
        # PropsSI('Ttriple') returns the lowest saturation state CoolProp holds (120 K, the lower
        # limit of the equation), not the triple point its fluid file states (89.54 K).
        vals["triple_point_temperature_K"] = float(file_tt)
        src["triple_point"] = (
            f"{cite} {carried}: the triple point stated in CoolProp's fluid file ('Ttriple'); "
            f"CoolProp's PropsSI('Ttriple') returns {tt:g} K, the lowest temperature of the "
            "equation's saturation data (its lower limit), not the triple point")
    else:
        text = (f"{cite} {carried}: PropsSI('Ttriple'), the lowest saturation temperature of the "
                "equation")
        if file_tt is not None and abs(float(file_tt) - tt) > 1e-9:
            text += f"; CoolProp's fluid file states Ttriple = {file_tt} K"
        if e.name == "air":
            text = (f"{cite} {carried}: air, a mixture, has no triple point; this is the lowest "
                    "temperature of the pseudo-pure equation (PropsSI('Ttriple'))")
        src["triple_point"] = text

    metastable = (f"; CoolProp's saturation temperature at 101325 Pa, "
                  f"{vals['normal_boiling_point_K']:.2f} K, extrapolates the liquid below the "
                  "triple point and is not used")
    if e.name == "carbon dioxide":
        vals["normal_boiling_point_K"] = 194.686
        src["normal_boiling_point"] = (
            "carbon dioxide has no normal boiling point (it sublimes at 1 atm): this is the "
            "sublimation temperature at 101325 Pa, 194.686 K, from the sublimation-pressure "
            "equation of Span, Wagner (1996), J. Phys. Chem. Ref. Data 25, 1509 (coefficients "
            "from memory; solving it at 101325 Pa gives 194.6855 K)" + metastable)
    elif e.name == "sulfur hexafluoride":
        assert phase_change.Tb_methods(e.cas)[0] == "WEBBOOK"
        vals["normal_boiling_point_K"] = phase_change.Tb(e.cas)
        src["normal_boiling_point"] = (
            "sulfur hexafluoride has no normal boiling point (its triple-point pressure, "
            f"{CP.PropsSI('ptriple', n) / 1e3:.0f} kPa, is above 1 atm: it sublimes): this is "
            "the sublimation temperature at 1 atm of the NIST Chemistry WebBook (SRD 69), via "
            "chemicals 1.5.2 (chemicals.phase_change.Tb, default method 'WEBBOOK')" + metastable)
    elif e.name == "air":
        dew = CP.PropsSI("T", "P", 101325.0, "Q", 1.0, n)
        src["normal_boiling_point"] = (
            f"{cite} {carried}: bubble-point temperature of air at 101325 Pa "
            f"(PropsSI('T','P',101325,'Q',0)); the dew point there is {dew:.3f} K")
    else:
        src["normal_boiling_point"] = (
            f"{cite} {carried}: saturation temperature at 101325 Pa computed by CoolProp 8.0.0 "
            "(PropsSI('T','P',101325,'Q',0))")
    if e.name == "air":
        M_mix = sum(x * CP.PropsSI("molar_mass", k.capitalize())
                    for k, x in AIR_COMPOSITION.items())
        src["molar_mass"] += (
            f"; the composition N2 0.7812, O2 0.2096, Ar 0.0092 (mole fractions, from memory) "
            f"gives {M_mix:.7f} kg/mol")
    return vals, src


def nf3_figures(e: Entry) -> tuple[dict[str, float], dict[str, str]]:
    cas = e.cas
    M = elements.molecular_weight(elements.simple_formula_parser("NF3")) / 1000.0
    methods = {
        "Tc": critical.Tc_methods(cas)[0], "Pc": critical.Pc_methods(cas)[0],
        "Vc": critical.Vc_methods(cas)[0], "omega": acentric.omega_methods(cas)[0],
        "Tb": phase_change.Tb_methods(cas)[0], "Tt": triple.Tt_methods(cas)[0],
    }
    assert set(methods.values()) == {"HEOS"}, methods
    vals = {
        "molar_mass_kg_mol": M,
        "critical_temperature_K": critical.Tc(cas),
        "critical_pressure_Pa": critical.Pc(cas),
        "critical_density_kg_m3": M / critical.Vc(cas),
        "acentric_factor": acentric.omega(cas),
        "triple_point_temperature_K": triple.Tt(cas),
        "normal_boiling_point_K": phase_change.Tb(cas),
    }
    heos = ("NIST REFPROP's nitrogen trifluoride fluid file (its equation believed to be "
            "Younglove (1982), J. Phys. Chem. Ref. Data 11, Suppl. 1; citation details from "
            "memory), as compiled in chemicals 1.5.2 (Misc/heos_constants.tsv)")
    src = {
        "molar_mass": ("chemicals 1.5.2 chemicals.elements.molecular_weight of NF3 with the "
                       "atomic weights of the Open Babel element table (O'Boyle et al. (2011), "
                       "J. Cheminform. 3, 33)"),
        "critical": (f"{heos}, default method 'HEOS' of chemicals.critical.Tc, Pc and Vc; "
                     "critical density = molar mass / Vc"),
        "acentric_factor": f"{heos}, default method 'HEOS' of chemicals.acentric.omega",
        "triple_point": f"{heos}, default method 'HEOS' of chemicals.triple.Tt",
        "normal_boiling_point": f"{heos}, default method 'HEOS' of chemicals.phase_change.Tb",
    }
    return vals, src


# --- ideal-gas heat capacity -----------------------------------------------------------------

def ideal_gas_cp(e: Entry, by_name: dict[str, Entry]) -> dict[str, object] | None:
    poling = hc.Cp_data_Poling
    if e.cp == "monatomic":
        return {"form": "monatomic", "T_min_K": 1.0, "T_max_K": 10000.0,
                "source": MONATOMIC_SOURCE}
    if e.cp == "poling":
        row = poling.loc[e.cas]
        return {"form": "poling-polynomial",
                "a": [float(row[f"a{i}"]) for i in range(5)],
                "T_min_K": float(row["Tmin"]), "T_max_K": float(row["Tmax"]),
                "source": POLING_SOURCE}
    if e.cp == "air":
        a = np.zeros(5)
        t_min, t_max = 0.0, math.inf
        for name, x in AIR_COMPOSITION.items():
            other = by_name[name]
            if other.cp == "monatomic":
                a[0] += x * 2.5
            else:
                row = poling.loc[other.cas]
                a += x * np.array([float(row[f"a{i}"]) for i in range(5)])
                t_min, t_max = max(t_min, float(row["Tmin"])), min(t_max, float(row["Tmax"]))
        return {"form": "poling-polynomial", "a": [sig10(v) for v in a],
                "T_min_K": t_min, "T_max_K": t_max,
                "source": ("mole-fraction-weighted sum of the ideal-gas cp0/R of nitrogen and "
                           "oxygen (" + POLING_SOURCE + ") and argon (monatomic, exact), with "
                           "the air composition N2 0.7812, O2 0.2096, Ar 0.0092 of Lemmon, "
                           "Jacobsen, Penoncello, Friend (2000), J. Phys. Chem. Ref. Data 29, "
                           "331 (composition from memory); exact for an ideal-gas mixture")}
    if e.cp == "shomate":
        hc.WebBook_Shomate_gases  # noqa: B018  (triggers chemicals' lazy data load)
        low = hc.WebBook_Shomate_coefficients[e.cas][2][0]
        return {"form": "shomate", "a": [sig10(v / R_SI) for v in low[2:]],
                "T_min_K": float(low[0]), "T_max_K": float(low[1]), "source": SHOMATE_SOURCE}
    return None


NO_CP = {
    "R1234yf": ("none: chemicals 1.5.2 holds no published ideal-gas heat-capacity polynomial for "
                "R1234yf (absent from Poling's Appendix A, the TRC gas-phase table and the NIST "
                "WebBook Shomate set)"),
}
CP_NOTES = {
    "sulfur dioxide": ("; Poling's polynomial for sulfur dioxide as held by chemicals 1.5.2 "
                       "gives cp0 5.8 % above CoolProp's Gao et al. (2016) ideal-gas part and "
                       "5.4 % above the same table's own 298.15 K value, so it is not used"),
}


def build() -> str:
    by_name = {e.name: e for e in ENTRIES}
    out = [
        "# fillcheck fluid catalog: identities, critical constants, acentric factors, molar",
        "# masses, hazards and ideal-gas heat capacities of the gases fillcheck knows.",
        "#",
        "# Generated by tools/build_catalog.py from CoolProp 8.0.0 and chemicals 1.5.2; edit",
        "# the script, not this file. Every figure carries its source in [fluid.sources]. SI",
        "# units, named in the keys. Figures read from CoolProp are rounded to 10 significant",
        "# digits.",
        "#",
        "# hazards: 'asphyxiant' marks the gases whose main hazard in a closed space is that",
        "# they displace oxygen (inert gases, carbon dioxide, the fluorinated gases and the",
        "# non-toxic flammables); gases classified toxic or oxidizing are not marked with it,",
        "# although any gas but oxygen can suffocate. Air is not classified (empty list).",
        "#",
        "# ideal_gas_cp forms: 'poling-polynomial': cp0/R = a0 + a1 T + a2 T^2 + a3 T^3 + a4 T^4;",
        "# 'shomate': cp0/R = a0 + a1 T + a2 T^2 + a3 T^3 + a4 / T^2; 'monatomic': cp0/R = 5/2.",
        "# T in K; each valid from T_min_K to T_max_K.",
        "",
    ]
    for e in ENTRIES:
        vals, src = coolprop_figures(e) if e.coolprop else nf3_figures(e)
        cp = ideal_gas_cp(e, by_name)
        src["hazards"] = HAZARD_SOURCE + e.notes.get("hazards", "")
        src["ideal_gas_cp"] = (str(cp["source"]) if cp else NO_CP[e.name]) + CP_NOTES.get(
            e.name, "")
        hazards = [h for h in HAZARD_ORDER if h in e.hazards]
        out.append("[[fluid]]")
        out.append(f"name = {toml_str(e.name)}")
        out.append(f"formula = {toml_str(e.formula)}")
        out.append(f"aliases = [{', '.join(toml_str(a) for a in e.aliases)}]")
        out.append(f"cas = {toml_str(e.cas)}")
        for key in ("molar_mass_kg_mol", "critical_temperature_K", "critical_pressure_Pa",
                    "critical_density_kg_m3", "acentric_factor", "triple_point_temperature_K",
                    "normal_boiling_point_K"):
            out.append(f"{key} = {fmt(sig10(vals[key]))}")
        out.append(f"hazards = [{', '.join(toml_str(h) for h in hazards)}]")
        if e.coolprop:
            out.append(f"coolprop_name = {toml_str(e.coolprop)}")
        else:
            out.append("# no coolprop_name: CoolProp 8.0.0 has no nitrogen trifluoride")
        out.append("[fluid.sources]")
        for key in ("molar_mass", "critical", "acentric_factor", "triple_point",
                    "normal_boiling_point", "hazards", "ideal_gas_cp"):
            out.append(f"{key} = {toml_str(src[key])}")
        if cp is None:
            out.append("# no [fluid.ideal_gas_cp] table: see sources.ideal_gas_cp")
        else:
            out.append("[fluid.ideal_gas_cp]")
            out.append(f"form = {toml_str(str(cp['form']))}")
            if "a" in cp:
                coeffs = cp["a"]
                assert isinstance(coeffs, list)
                out.append(f"a = [{', '.join(fmt(v) for v in coeffs)}]")
            out.append(f"T_min_K = {fmt(float(cp['T_min_K']))}")  # type: ignore[arg-type]
            out.append(f"T_max_K = {fmt(float(cp['T_max_K']))}")  # type: ignore[arg-type]
            out.append(f"source = {toml_str(str(cp['source']))}")
        out.append("")
    return "\n".join(out)


def main() -> int:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--check", action="store_true", help="only compare with the file")
    args = parser.parse_args()
    text = build()
    if args.check:
        same = OUT.exists() and OUT.read_text(encoding="utf-8") == text
        print("catalog.toml is up to date" if same else "catalog.toml is out of date")
        return 0 if same else 1
    OUT.parent.mkdir(parents=True, exist_ok=True)
    OUT.write_text(text, encoding="utf-8")
    print(f"wrote {OUT.relative_to(ROOT)} ({len(ENTRIES)} fluids)")
    return 0


if __name__ == "__main__":
    sys.exit(main())
