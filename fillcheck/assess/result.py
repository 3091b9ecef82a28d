"""What an assessment finds: plain data for the renderers (SI inside, no formatting)."""

from __future__ import annotations

from dataclasses import dataclass, field
from typing import TYPE_CHECKING, Any, Literal

import numpy as np

if TYPE_CHECKING:
    from fillcheck.assess.cautions import Caution
    from fillcheck.thermo.fluid import Validity

Severity = Literal["fail", "review", "warning", "info"]
Verdict = Literal["pass", "fail", "review"]


def worst(words: set[str]) -> Verdict:
    """fail before review before pass (severities "warning" and "info" count as pass)."""
    if "fail" in words:
        return "fail"
    if "review" in words:
        return "review"
    return "pass"


@dataclass(frozen=True)
class Finding:
    """One finding: a stable code, a severity and a message for people.

    A finding given as data has an empty ``message`` and its SI quantities in ``data`` (keys
    carry their units: ``limit_Pa``, ``temperature_K``); report.wording writes its words."""

    code: str
    severity: Severity
    message: str
    data: dict[str, Any] | None = field(default=None, compare=False, hash=False)


@dataclass(frozen=True)
class Checked:
    """One limit a verdict covers, as data (report.finding_words names it).

    kind: "allowable", "relief", "filling-ratio", "vapour-space", "not-liquid-full", "rule"
    (``text`` holds the rule) or "peak-fill-temperature"; value: the limit in SI (Pa, kg/m³,
    a fraction, K) or None; temperature_K: where it applies [K] or None."""

    kind: str
    value: float | None = None
    temperature_K: float | None = None
    text: str | None = None


def pressure_margin(limit_Pa: float, highest_Pa: float, atmospheric_pressure_Pa: float) -> float:
    """The margin of a pressure limit, the one basis every report prints [-].

    (limit − highest pressure) / (limit − atmosphere): a share of the gauge limit, as limits
    are marked and stated; negative when the limit is exceeded. Pressures [Pa abs]. NaN where
    the limit is not above the atmosphere (no gauge limit to take a share of).
    """
    gauge_limit = limit_Pa - atmospheric_pressure_Pa
    if not gauge_limit > 0.0:
        return float("nan")
    return (limit_Pa - highest_Pa) / gauge_limit


@dataclass(frozen=True)
class RuleCheck:
    """One rule of a named rule set against the charge: its words and the largest charge per
    water capacity it allows [kg/m³] (inf: it limits no charge; None: no charge meets it)."""

    rule_set: str
    text: str
    max_density_kg_m3: float | None


@dataclass(frozen=True)
class EndState:
    """The vessel at one temperature: T [K], P [Pa abs], phase, Z [-]."""

    temperature_K: float
    pressure_Pa: float
    phase: str
    Z: float


@dataclass
class VesselAssessment:
    """Everything the report shows about one vessel."""

    id: str
    gas: str
    model: str
    model_name: str
    model_references: tuple[str, ...]
    model_validity: Validity
    data_sources: dict[str, str]
    count: int
    water_capacity_m3: float
    density_kg_m3: float
    charged_mass_kg: float
    fill_temperature_K: float | None
    fill_pressure_Pa: float | None
    fill_Z: float | None
    settled_pressure_Pa: float
    reference_temperature_K: float
    path_T_K: np.ndarray
    path_P_Pa: np.ndarray
    path_phase: np.ndarray
    max_state: EndState
    min_state: EndState
    dP_dT_at_max_Pa_K: float
    liquid_forms_below_K: float | None
    liquid_full_above_K: float | None
    allowable_reached_at_K: float | None
    relief_reached_at_K: float | None
    max_safe_charge_kg: float | None
    max_safe_fill_pressure_Pa: float | None
    governing_limit: str | None
    entered: dict[str, str]
    limits_checked: list[Checked]
    hazards: tuple[str, ...]
    pressure_uncertainty_at_top: float | None = None
    """The model's relative pressure uncertainty at the highest-pressure state [-]."""
    fill_by_weight: bool = False
    """Whether the largest safe charge holds liquid at the fill temperature (so its stop
    pressure is withheld: a liquefied gas is filled by weight)."""
    liquid_fraction_at_vapour_space_T: float | None = None
    """Fraction of the vessel taken by liquid at the vapour-space temperature [-]."""
    liquid_fraction_at_top: float | None = None
    """Fraction of the vessel taken by liquid at the top of the checked range [-]."""
    limit_reached_K: dict[str, float | None] = field(default_factory=dict)
    """Per pressure limit ("allowable", "relief", and "validity": the model's upper pressure),
    where the isochore reaches it, looking past the checked range up to the highest temperature
    fillcheck computes for the model [K]; None if never."""
    highest_computed_K: float = 500.0
    """The highest temperature fillcheck computes for this gas and model [K]."""
    allowable_pressure_Pa: float | None = None
    relief_set_pressure_Pa: float | None = None
    saturation_T_K: np.ndarray = field(default_factory=lambda: np.zeros(0))
    saturation_P_Pa: np.ndarray = field(default_factory=lambda: np.zeros(0))
    """The saturation curve near the storage range, for the chart (empty above Tc)."""
    findings: list[Finding] = field(default_factory=list)
    cautions: list[Caution] = field(default_factory=list)
    """The cautions attached, each with its reason's facts (report.caution_text words them)."""
    liquefied: bool | None = None
    """For a mixture: whether it holds liquid at the reference temperature (a liquefied gas,
    filled by weight) rather than only in the cold; None for a pure gas."""
    composition: dict[str, float] | None = None
    """A mixture's mole fractions by component (None for a pure gas) [-]."""
    dropout: Any = None
    """A mixture's liquid dropout at the coldest two-phase state of the range
    (assess.mixture_findings.Dropout), or None."""
    marking: Any = None
    """The cylinder's markings against its charge (assess.markings.MarkingResult), or None."""
    filling: Any = None
    """The fill process (assess.fill_process.FillResult) where ``[vessel.filling]`` is given."""
    blend: Any = None
    """The blend recipe (assess.blend.BlendRecipe) where ``[vessel.blend]`` is given."""

    atmospheric_pressure_Pa: float = 101325.0
    """The scenario's atmospheric pressure [Pa], the zero of its gauge pressures."""
    fill_phase: str | None = None
    """The phase at the fill state (None without a fill temperature)."""
    min_vapour_space: float | None = None
    """The entered vapour-space limit [-] (the vapour share of the vessel), or None."""
    vapour_space_temperature_K: float | None = None
    """The temperature at which the vapour-space limit applies [K], or None."""
    rule_checks: list[RuleCheck] = field(default_factory=list)
    """The rules of the vessel's named rule set, each with the charge it allows."""

    @property
    def margin_to_allowable(self) -> float:
        """The margin of the allowable pressure over the highest pressure in the range, as a
        share of the gauge allowable pressure (pressure_margin) [-]; negative when exceeded."""
        allow = self.allowable_pressure_Pa or float("nan")
        return pressure_margin(allow, float(np.max(self.path_P_Pa)), self.atmospheric_pressure_Pa)

    @property
    def margin_to_allowable_absolute(self) -> float:
        """(allowable − highest pressure)/allowable, both absolute [-]: the JSON key
        ``limits.margin_to_allowable`` keeps this basis for the scripts that read it."""
        allow = self.allowable_pressure_Pa or float("nan")
        return (allow - float(np.max(self.path_P_Pa))) / allow

    @property
    def verdict(self) -> Verdict:
        """fail if any finding fails; review if any asks for review; pass otherwise."""
        return worst({f.severity for f in self.findings})


@dataclass
class ScenarioAssessment:
    """The assessment of a whole scenario."""

    source: str
    title: str | None
    reference_temperature_K: float
    atmospheric_pressure_Pa: float
    vessels: list[VesselAssessment]
    is_register: bool = False
    """Whether the input was a register (summary first, details only for fail and review)."""
    areas: list[Any] = field(default_factory=list)
    """The storage areas (assess.area.AreaAssessment), INTERFACES.md §8."""

    @property
    def verdict(self) -> Verdict:
        """The worst verdict of the vessels and the storage areas: a failing area fails the
        whole result as a failing vessel does."""
        return worst({v.verdict for v in self.vessels} | {a.verdict for a in self.areas})
