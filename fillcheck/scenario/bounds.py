"""Every plausibility bound on the input, and the limits on the input file itself, in one place.

The plausibility bounds are common practice with no source: they are far outside what any
cylinder, vessel or storage site holds, so a value beyond one is a typing error (a unit or an
exponent slipped), not a vessel. They are not safety limits and say nothing about what a vessel
may hold; they only keep absurd numbers away from the models, which would otherwise fail with a
message that blames the equation instead of the input. The storage temperatures are bounded in
:func:`fillcheck.scenario.resolve._temperature` (from the gas's triple point up to the highest
temperature its model is used at), not here.

The input limits (file size, nesting, text length) keep a hostile or mistaken file from making
fillcheck read forever or recurse without end.
"""

from __future__ import annotations

# --- plausibility bounds (common practice, no source) -------------------------------------

PRESSURE_MAX_Pa = 200e6
"""Plausibility bound: any pressure entered (fill, settled, allowable, relief, test, critical,
a gauge reading), absolute, is at most 2000 bar (200 MPa). The highest demo pressure is 90 MPa
gauge; the highest-pressure storage vessels in service are rated near 100 MPa."""

WATER_CAPACITY_MIN_m3 = 1e-6
"""Plausibility bound: a water capacity is at least 1 mL (a small gas cartridge holds about
10 mL)."""

WATER_CAPACITY_MAX_m3 = 1000.0
"""Plausibility bound: a water capacity is at most 1000 m³ (a large bulk storage tank)."""

COUNT_MAX = 1_000_000
"""Plausibility bound: ``count`` (identical vessels of one entry) is from 1 to 1,000,000."""

MASS_MAX_kg = 1e6
"""Plausibility bound: a charge (``fill.mass``) is at most 1,000,000 kg (1000 t)."""

DENSITY_MAX_kg_m3 = 5000.0
"""Plausibility bound: a filling ratio (``fill.filling_ratio``, ``limits.max_filling_ratio``)
and a critical density are at most 5 kg/L; no liquefied gas is denser than about 3 kg/L."""

REFERENCE_TEMPERATURE_MIN_K = 213.15
"""Plausibility bound: ``reference_temperature`` is an ambient temperature, at least −60 °C."""

REFERENCE_TEMPERATURE_MAX_K = 343.15
"""Plausibility bound: ``reference_temperature`` is an ambient temperature, at most +70 °C."""

MOLAR_MASS_MIN_kg_mol = 1e-3
"""Plausibility bound: a user-defined gas's molar mass is at least 1 g/mol (hydrogen has
2.016 g/mol); the catalog's own check keeps it below 1 kg/mol."""

CRITICAL_TEMPERATURE_MIN_K = 1.0
"""Plausibility bound: a user-defined gas's critical temperature is at least 1 K (helium-4 has
5.2 K)."""

CRITICAL_TEMPERATURE_MAX_K = 1000.0
"""Plausibility bound: a user-defined gas's critical temperature is at most 1000 K (far above
any substance stored as a compressed or liquefied gas)."""

# --- limits on the input file -------------------------------------------------------------

INPUT_BYTES_MAX = 20 * 1024 * 1024
"""A scenario or register file is at most 20 MiB (a register of 100,000 vessels is about
10 MB); a larger file, or anything that is not a regular file, is refused unread."""

NESTING_MAX = 16
"""Arrays and tables in a scenario nest at most this deep (a valid scenario needs four)."""

TEXT_CHARS_MAX = 500
"""Any text in a scenario (an id, a title, a gas name, a quantity) and any register cell holds
at most this many characters."""

FILL_DURATION_MAX_s = 24 * 3600.0
"""The longest fill duration taken ([vessel.filling] duration) [s]."""
