"""The JSON result (INTERFACES.md §4): SI units, pressures absolute."""

from __future__ import annotations

import json
import math
from typing import Any

from fillcheck import __version__
from fillcheck.assess.result import EndState, Finding, ScenarioAssessment, VesselAssessment
from fillcheck.report.blend_section import blend_dict
from fillcheck.report.caution_text import caution_reason, caution_text
from fillcheck.report.fill_section import filling_dict
from fillcheck.report.permit_record import Record, record_json
from fillcheck.report.wording import finding_message, limits_checked
from fillcheck.units import UnitSystem


def _end(e: EndState) -> dict[str, Any]:
    return {
        "temperature_K": e.temperature_K,
        "pressure_Pa": e.pressure_Pa,
        "phase": e.phase,
        "Z": e.Z,
    }


def _finite(x: float) -> float | None:
    """A number, or null where it is not finite (JSON has no NaN)."""
    return x if math.isfinite(x) else None


def _finding(f: Finding, atm: float, system: UnitSystem) -> dict[str, Any]:
    """A finding: code, severity, message, and its SI quantities where it is given as data."""
    out: dict[str, Any] = {
        "code": f.code,
        "severity": f.severity,
        "message": finding_message(f, system, atm),
    }
    if f.data is not None:  # JSON has no NaN or infinity: null there
        out["data"] = {
            k: None if isinstance(x, float) and not math.isfinite(x) else x
            for k, x in f.data.items()
        }
    return out


def _marking(v: VesselAssessment) -> dict[str, Any]:
    """The keys a cylinder's markings add (INTERFACES.md §5); null without them."""
    r = v.marking
    gross = None if r is None else r.gross_mass_kg
    safe = None if r is None else r.max_safe_gross_mass_kg
    return {
        "gross_mass_kg": gross,
        "max_safe_gross_mass_kg": safe,
        "marking": None
        if r is None
        else {
            "rated": r.rated_kind,
            "rated_pressure_Pa": r.rated_pressure_Pa,
            "rated_temperature_K": r.rated_temperature_K,
            "allowance": r.allowance,
            "rated_limit_Pa": r.rated_limit_Pa,
            "settled_pressure_at_rated_temperature_Pa": r.settled_at_rated_Pa,
            "test_pressure_Pa": r.test_pressure_Pa,
            "tare_mass_kg": r.tare_mass_kg,
        },
    }


def vessel_dict(
    v: VesselAssessment, atm: float = 101325.0, system: UnitSystem = "metric"
) -> dict[str, Any]:
    """One vessel as the JSON contract lays it out (plus documented extensions); the numbers
    in SI, the sentences (findings' messages) in ``system``."""
    return {
        "id": v.id,
        "gas": v.gas,
        "model": v.model,
        "model_name": v.model_name,
        "model_references": list(v.model_references),
        "verdict": v.verdict,
        "count": v.count,
        "water_capacity_m3": v.water_capacity_m3,
        "charged_mass_kg": v.charged_mass_kg,
        "total_charged_mass_kg": v.charged_mass_kg * v.count,
        "density_kg_m3": v.density_kg_m3,
        "fill_temperature_K": v.fill_temperature_K,
        "fill_pressure_Pa": v.fill_pressure_Pa,
        "settled_pressure_Pa": v.settled_pressure_Pa,
        "reference_temperature_K": v.reference_temperature_K,
        "max_temperature": _end(v.max_state),
        "min_temperature": _end(v.min_state),
        "pressure_rise_at_max_Pa_per_K": v.dP_dT_at_max_Pa_K,
        "liquid_forms_below_K": v.liquid_forms_below_K,
        "liquid_full_above_K": v.liquid_full_above_K,
        "allowable_reached_at_K": v.allowable_reached_at_K,
        "relief_reached_at_K": v.relief_reached_at_K,
        "max_safe_charge_kg": v.max_safe_charge_kg,
        "max_safe_fill_pressure_Pa": v.max_safe_fill_pressure_Pa,
        "governing_limit": v.governing_limit,
        "max_safe_fill_by_weight": v.fill_by_weight,
        "limits": {
            "allowable_pressure_Pa": v.allowable_pressure_Pa,
            "relief_set_pressure_Pa": v.relief_set_pressure_Pa,
            "margin_to_allowable": v.margin_to_allowable_absolute,
            "margin_to_allowable_gauge": _finite(v.margin_to_allowable),
            "liquid_fraction_at_vapour_space_temperature": v.liquid_fraction_at_vapour_space_T,
        },
        "limits_checked": limits_checked(v, system, v.atmospheric_pressure_Pa),
        "findings": [_finding(f, v.atmospheric_pressure_Pa, system) for f in v.findings],
        "cautions": [caution_text(c) for c in v.cautions],
        "caution_details": [
            {"code": c.code, "text": caution_text(c), "reason": caution_reason(c)}
            for c in v.cautions
        ],
        "composition": v.composition,
        "liquid_dropout": None
        if v.dropout is None
        else {
            "temperature_K": v.dropout.temperature_K,
            "liquid_mole_fractions": v.dropout.liquid_x,
            "vapour_mole_fractions": v.dropout.vapour_y,
            "liquid_volume_fraction": v.dropout.liquid_volume_fraction,
            "condensing_component": v.dropout.condensing,
        },
        **_marking(v),
        "filling": filling_dict(v),
        "blend": blend_dict(v),
    }


def scenario_dict(
    a: ScenarioAssessment, record: Record | None = None, system: UnitSystem = "metric"
) -> dict[str, Any]:
    """The whole result (with the permit-file record's keys where given, INTERFACES.md §5)."""
    return {
        "fillcheck_version": __version__,
        **({} if record is None else record_json(record)),
        "source": a.source,
        "title": a.title,
        "verdict": a.verdict,
        "reference_temperature_K": a.reference_temperature_K,
        "atmospheric_pressure_Pa": a.atmospheric_pressure_Pa,
        "vessels": [vessel_dict(v, a.atmospheric_pressure_Pa, system) for v in a.vessels],
        "areas": _areas(a, system),
    }


def _areas(a: ScenarioAssessment, system: UnitSystem) -> list[dict[str, Any]]:
    """The storage areas (INTERFACES.md §8); an empty list where the scenario has none."""
    if not a.areas:
        return []
    from fillcheck.report.area_section import area_dict

    return [area_dict(x, system) for x in a.areas]


def render_json(
    a: ScenarioAssessment, record: Record | None = None, system: UnitSystem = "metric"
) -> str:
    """The JSON text (indented, UTF-8 characters kept; sentences in ``system``)."""
    return json.dumps(scenario_dict(a, record, system), indent=2, ensure_ascii=False)
