"""Example rule sets that set limits the way a transport code does (never applied by default).

They follow the filling rules for pressure receptacles of packing instruction P200 in the UN
Recommendations on the Transport of Dangerous Goods, Model Regulations (22nd revised edition,
2021, section 4.1.4.1, P200 (3)); the wording of the paragraphs is recalled from memory, so each
rule is an example for the user to verify against the edition of the code that applies to them:

- ``p200-compressed`` (gases with a critical temperature below −50 °C): the pressure developed at
  65 °C must not exceed the test pressure, and the working pressure (the settled pressure at
  15 °C) must not exceed two thirds of the test pressure;
- ``p200-high-pressure-liquefied`` (critical temperature from −50 °C to 65 °C): the pressure
  developed at 65 °C must not exceed the test pressure;
- ``p200-low-pressure-liquefied`` (critical temperature above 65 °C): the vapour pressure at
  65 °C must not exceed the test pressure, the liquid must not fill the receptacle at 60 °C, and
  the charge must not exceed 95 % of the liquid's density at 50 °C.
"""

from __future__ import annotations

from dataclasses import dataclass
from typing import TYPE_CHECKING

import numpy as np

from fillcheck.errors import StateError

if TYPE_CHECKING:
    from fillcheck.thermo.fluid import Fluid

RULE_SETS = ("p200-compressed", "p200-high-pressure-liquefied", "p200-low-pressure-liquefied")
RULES_PUBLICATION = (
    "UN Recommendations on the Transport of Dangerous Goods, Model Regulations, 22nd revised "
    "edition (2021), 4.1.4.1 P200 (3)"
)
"""The code the rule sets follow, as a printed report cites it."""
VERIFY_EDITION = "verify against the edition that applies to you"
"""What a printed report says beside every value taken from a code."""
RULES_SOURCE = RULES_PUBLICATION + " (rule wording from memory: verify against your code)"
"""The full record of the rules' source (documentation and tests; never printed)."""
T_65C, T_60C, T_50C, T_15C = 338.15, 333.15, 323.15, 288.15


@dataclass(frozen=True)
class RuleLimit:
    """One rule as a largest density [mol/m³] (None: no charge satisfies it) and its words."""

    name: str
    density_mol: float | None
    text: str


def rule_limits(
    fluid: Fluid, rule_set: str, test_pressure_Pa: float, atmospheric_pressure_Pa: float
) -> list[RuleLimit]:
    """The largest overall density each rule of ``rule_set`` allows for this gas and vessel.

    Pressures [Pa] are absolute; the two-thirds rule is applied to gauge pressures, as codes
    state test and working pressures.
    """
    P_test = test_pressure_Pa
    atm = atmospheric_pressure_Pa
    if rule_set == "p200-compressed":
        return [
            RuleLimit(
                "developed pressure at 65 °C",
                _density(fluid, T_65C, P_test),
                "pressure at 65 °C not above the test pressure",
            ),
            RuleLimit(
                "working pressure",
                _density(fluid, T_15C, atm + 2.0 / 3.0 * (P_test - atm)),
                "settled pressure at 15 °C not above two thirds of the test pressure",
            ),
        ]
    if rule_set == "p200-high-pressure-liquefied":
        return [
            RuleLimit(
                "developed pressure at 65 °C",
                _density(fluid, T_65C, P_test),
                "pressure at 65 °C not above the test pressure",
            )
        ]
    if rule_set == "p200-low-pressure-liquefied":
        Tc = fluid.model_critical[0]
        if Tc <= T_65C:
            raise StateError(
                f"{fluid.name} has its critical temperature below 65 °C: it is not a "
                "low-pressure liquefied gas; use p200-high-pressure-liquefied"
            )
        sat = fluid.saturation_molar(np.array([T_65C, T_60C, T_50C]))
        vapour_ok = float(sat.P[0]) <= P_test
        return [
            RuleLimit(
                "vapour pressure at 65 °C",
                np.inf if vapour_ok else None,
                "vapour pressure at 65 °C not above the test pressure",
            ),
            RuleLimit(
                "liquid-full at 60 °C",
                float(sat.rho_liquid[1]),
                "liquid not filling the vessel at 60 °C",
            ),
            RuleLimit(
                "95 % of liquid density at 50 °C",
                0.95 * float(sat.rho_liquid[2]),
                "charge at most 95 % of the liquid density at 50 °C",
            ),
        ]
    raise ValueError(f"unknown rule set {rule_set!r}")


def _density(fluid: Fluid, T: float, P: float) -> float:
    return float(fluid.density_molar(np.array([T]), np.array([P]))[0])
