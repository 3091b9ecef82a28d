"""Scenario in, assessment out: pure functions, nothing printed."""

from __future__ import annotations

from collections.abc import Callable

from fillcheck.assess.batch import assess_many
from fillcheck.assess.result import Finding, ScenarioAssessment, VesselAssessment
from fillcheck.assess.vessel import assess_vessel
from fillcheck.scenario.resolve import Scenario


def assess_scenario(
    scenario: Scenario,
    progress: Callable[[int, int], None] | None = None,
    is_register: bool = False,
) -> ScenarioAssessment:
    """Assess every vessel of a validated scenario (findings as data: report/ words them)."""
    vessels = assess_many(scenario.vessels, scenario.reference_temperature_K, progress)
    areas = []
    if scenario.areas:
        from fillcheck.assess.area import assess_areas

        areas = assess_areas(scenario, vessels)
    return ScenarioAssessment(
        scenario.source,
        scenario.title,
        scenario.reference_temperature_K,
        scenario.atmospheric_pressure_Pa,
        vessels,
        is_register,
        areas,
    )


__all__ = [
    "Finding",
    "ScenarioAssessment",
    "VesselAssessment",
    "assess_many",
    "assess_scenario",
    "assess_vessel",
]
