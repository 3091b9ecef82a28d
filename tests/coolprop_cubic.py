"""CoolProp's Peng–Robinson given fillcheck's catalog constants: a shared test helper.

CoolProp's cubic library knows its own Tc, Pc and ω for each fluid; to compare fillcheck's cubic
with CoolProp's evaluation of the same equation, the catalog's constants are registered in
CoolProp under a name of the tests' own (``CP.add_fluids_as_JSON("PR", ...)``, CoolProp 8.0.0).
"""

from __future__ import annotations

import json
from functools import cache

import CoolProp.CoolProp as CP

from fillcheck.fluids.catalog import lookup


@cache
def coolprop_pr_name(name: str) -> str:
    """Register the catalog gas ``name`` in CoolProp's cubic library with the catalog's Tc [K],
    Pc [Pa], ω and molar mass [kg/mol]; the name to use in ``AbstractState("PR", ...)``."""
    d = lookup(name)
    ident = "FILLCHECK_TEST_" + name.replace(" ", "_").replace("-", "_").upper()
    entry = {
        "name": ident,
        "CAS": "fillcheck-test-" + name.replace(" ", "-"),
        "aliases": [],
        "Tc": d.critical_temperature_K,
        "Tc_units": "K",
        "pc": d.critical_pressure_Pa,
        "pc_units": "Pa",
        "acentric": d.acentric_factor,
        "molemass": d.molar_mass_kg_mol,
        "molemass_units": "kg/mol",
    }
    CP.add_fluids_as_JSON("PR", json.dumps([entry]))
    return ident
