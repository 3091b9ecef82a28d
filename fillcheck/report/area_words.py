"""The sentences of the storage-area findings (assess.area), written only when printed."""

from __future__ import annotations

from collections.abc import Callable
from typing import Any

from fillcheck import units
from fillcheck.report.finding_words import Words

_WHAT = {
    "oxygen-deficient": "the oxygen falls to",
    "oxygen-enriched": "the oxygen (with other oxidizers as oxygen equivalent) rises to",
    "carbon-dioxide": "carbon dioxide reaches",
    "flammable": "the flammable gas reaches",
}
_LIMIT = {
    "oxygen-deficient": "below the {limit} that marks an oxygen-deficient atmosphere",
    "oxygen-enriched": "above the {limit} that marks an oxygen-enriched atmosphere",
    "carbon-dioxide": "above its {limit} short-term exposure limit",
    "flammable": "above the {limit} of its lower flammable limit allowed",
}


def share(x: float) -> str:
    """A mole fraction [-] as a percentage with one decimal (three below 1 %)."""
    return units.format_share(x, 3 if abs(x) < 0.01 else 1)


def _value(criterion: str, x: float) -> str:
    return f"{share(x)} of its LFL" if criterion == "flammable" else share(x)


def _back(d: dict[str, Any], key: str = "back_within_s") -> str:
    t = d.get(key)
    if t is None:
        return "without ventilation it stays so"
    return f"the ventilation brings it back within the limit after {units.format_duration(t)}"


def _others(d: dict[str, Any]) -> str:
    rest = [v for v in d.get("vessels", []) if v != d["vessel"]]
    if not rest:
        return ""
    shown = ", ".join(rest[:5]) + (f" and {len(rest) - 5} more" if len(rest) > 5 else "")
    return f"; the release of {shown} breaks it too"


def _also(d: dict[str, Any]) -> str:
    rest = [v for v in d.get("vessels", []) if v != d["vessel"]]
    if not rest:
        return ""
    shown = ", ".join(rest[:5]) + (f" and {len(rest) - 5} more" if len(rest) > 5 else "")
    return f" (also {shown})"


def _breach(criterion: str) -> Callable[[dict[str, Any], Words], str]:
    def words(d: dict[str, Any], w: Words) -> str:
        limit = _LIMIT[criterion].format(limit=share(d["limit"]))
        return (
            f"the whole charge of {d['vessel']} ({d['gas']}, "
            f"{units.format_room_volume(d['released_volume_m3'], w.system)} of gas) released "
            f"into the area's {units.format_room_volume(d['volume_m3'], w.system)}: "
            f"{_WHAT[criterion]} {_value(criterion, d['value'])}, {limit} ({d['limit_source']}); "
            f"released gradually into the mixed room, {_value(criterion, d['value_mixed_outflow'])}"
            f"; {_back(d)}{_others(d)}"
        )

    return words


def _long_term(d: dict[str, Any], w: Words) -> str:
    return (
        f"a release of {d['vessel']} brings carbon dioxide to {share(d['value'])}, above its "
        f"{share(d['limit'])} 8-hour exposure limit ({d['limit_source']}) though not its "
        f"short-term limit; {_back(d)}"
    )


def _toxic(d: dict[str, Any], w: Words) -> str:
    return (
        f"a release of {d['vessel']} brings {d['component']} to {share(d['fraction'])} of the "
        "area's air; fillcheck's catalog holds no exposure limit for it, so the release is "
        f"not judged: compare it with the supplier's safety data sheet{_also(d)}"
    )


def _no_limit(d: dict[str, Any], w: Words) -> str:
    return (
        f"{d['component']} in {d['vessel']} is flammable but fillcheck has no lower flammable "
        f"limit for it, so its release is not judged against one{_also(d)}"
    )


def _liquid(d: dict[str, Any], w: Words) -> str:
    return (
        f"{d['gas']} from {d['vessel']} does not boil off completely at {w.t(d['temperature_K'])} "
        "and atmospheric pressure: part of it lies as a cold liquid pool that gives off gas "
        "for a long time; the release is counted as "
        f"{units.format_room_volume(d['released_volume_m3'], w.system)} of ideal gas, all the "
        f"vapour the charge can make{_also(d)}"
    )


def _no_ventilation(d: dict[str, Any], w: Words) -> str:
    return (
        "the area has no ventilation (0 air changes an hour): a release that breaks a limit "
        "stays until the area is ventilated"
    )


def _release(d: dict[str, Any], w: Words) -> str:
    N = d["air_changes_per_s"] * 3600.0
    said = (
        f"the release nearest a limit is the whole charge of {d['vessel']} ({d['gas']}, "
        f"{w.m(d['mass_kg'])}, {units.format_room_volume(d['released_volume_m3'], w.system)} "
        f"of gas): {share(d['gas_fraction'])} of the area's air at once (pure displacement), "
        f"oxygen {share(d['oxygen_fraction'])}; released gradually into the mixed room, "
        f"{share(d['gas_fraction_mixed_outflow'])}, oxygen "
        f"{share(d['oxygen_fraction_mixed_outflow'])}"
    )
    if d["clear_s"] == 0.0:
        return said + "; every limit holds"
    if N > 0:
        return said + (
            f"; at {N:.3g} air change{'' if N == 1 else 's'} an hour the oxygen is back above "
            "the limit after "
            f"{units.format_duration(d['oxygen_recovery_s'])} and every limit holds again after "
            f"{units.format_duration(d['clear_s'])}"
        )
    return said + "; without ventilation it does not clear"


def _leak(d: dict[str, Any], w: Words) -> str:
    said = (
        f"a continuous leak from {d['vessel']} ({d['gas']}) of "
        f"{w.m(d['rate_kg_s'] * 3600.0)} an hour settles at {share(d['steady_gas_fraction'])} "
        f"of the area's air: oxygen {share(d['steady_oxygen_fraction'])}, carbon dioxide "
        f"{share(d['steady_carbon_dioxide_fraction'])}"
    )
    if d["steady_lfl_fraction"] > 0:
        said += f", {share(d['steady_lfl_fraction'])} of the LFL"
    if d["air_changes_per_s"] > 0 and d["steady_gas_fraction"] < 0.05:
        small = d["volume_flow_m3_s"] / d["air_changes_per_s"] / d["volume_m3"]
        said += f" (≈ G/(N·V) = {share(small)})"
    return said


def _leak_limit(d: dict[str, Any], w: Words) -> str:
    c = d["criterion"]
    when = d["reached_after_s"]
    return (
        _leak(d, w)
        + f"; {_WHAT[c]} {_value(c, d['value'])} in the end, "
        + _LIMIT[c].format(limit=share(d["limit"]))
        + f" ({d['limit_source']}), reached after {units.format_duration(when)}"
    )


AREA_WORDS: dict[str, Callable[[dict[str, Any], Words], str]] = {
    **{f"area-{c}": _breach(c) for c in _WHAT},
    "area-carbon-dioxide-long-term": _long_term,
    "area-toxic-release": _toxic,
    "area-flammable-limit-unknown": _no_limit,
    "area-release-liquid": _liquid,
    "area-no-ventilation": _no_ventilation,
    "area-release": _release,
    "area-leak": _leak,
    "area-leak-limit": _leak_limit,
}
"""The storage-area codes to the functions that write their sentences."""
