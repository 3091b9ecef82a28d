"""Source notes as the publications a printed report cites (fluids.citation): for every gas of
the catalog, no printed source names software or a recall note."""

from __future__ import annotations

import re

import pytest

import fillcheck
from fillcheck.fluids.citation import citation

BANNED = ("CoolProp", "chemicals", "from memory")


def test_every_catalog_source_prints_as_a_publication() -> None:
    for name in fillcheck.available_fluids():
        f = fillcheck.fluid(name)
        for key, note in f.data.sources.items():
            said = citation(note)
            assert not any(b.lower() in said.lower() for b in BANNED), (name, key, said)
        printed = [citation(f.data.sources["critical"]), *f.references, f.validity.source]
        for s in printed:
            assert not any(b.lower() in s.lower() for b in BANNED), (name, s)
        # a publication: authors and a year
        assert re.search(r"\(\d{4}\)", printed[0]), (name, printed[0])


@pytest.mark.parametrize(
    ("note", "cited"),
    [
        # the catalog's own notes (fillcheck/fluids/data/catalog.toml)
        (
            "Lemmon, Span (2006), J. Chem. Eng. Data 51, 785 [CoolProp key Lemmon-JCED-2006] "
            "(figures as carried by CoolProp 8.0.0): PropsSI('Ttriple'), the lowest saturation "
            "temperature of the equation",
            "Lemmon, Span (2006), J. Chem. Eng. Data 51, 785",
        ),
        (
            "Ortiz-Vega, Hall, Holste, Arp, Harvey, Lemmon (2019) (CoolProp's bibliography notes: "
            "'Unpublished - coefficients from REPROP 10 with permission') [CoolProp key "
            "OrtizVega-JPCRD-2019] (figures as carried by CoolProp 8.0.0)",
            "Ortiz-Vega, Hall, Holste, Arp, Harvey, Lemmon (2019), unpublished",
        ),
        (
            "Gao, Wu, Zhang, Lemmon (2016), J. Chem. Eng. Data 61, 2859 (volume and page from "
            "memory) [CoolProp key X] (figures as carried by CoolProp 8.0.0)",
            "Gao, Wu, Zhang, Lemmon (2016), J. Chem. Eng. Data 61, 2859",
        ),
        ("entered by the user", "entered by the user"),
    ],
)
def test_citation_of_a_source_note(note: str, cited: str) -> None:
    assert citation(note) == cited


def test_nitrogen_trifluoride_cites_the_equation_not_the_library() -> None:
    said = citation(fillcheck.fluid("nitrogen trifluoride").data.sources["critical"])
    assert said.startswith("Younglove (1982), J. Phys. Chem. Ref. Data 11, Suppl. 1")
    assert "chemicals" not in said and "REFPROP" not in said


def test_a_mixture_prints_each_component_s_publication() -> None:
    # helium and neon carry CoolProp's bibliography remarks in the catalog; the mixture's gas-data
    # line names each component's publication without them
    said = fillcheck.mixture({"helium": 0.5, "neon": 0.5}).data.sources["critical"]
    assert said.startswith("helium: Ortiz-Vega, Hall, Holste, Arp, Harvey, Lemmon (2019)")
    assert "; neon: Thol, Beckmüller, Weiss, Harvey, Lemmon, Jacobsen, Span (2019)" in said
    assert not any(b.lower() in said.lower() for b in BANNED), said
