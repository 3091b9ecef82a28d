"""A gas released into a room: its volume at the room's conditions, what it does to the air,
and how ventilation takes it away. Pure functions of SI numbers.

The model (well mixed, the room held at the atmosphere's pressure):

- **The released volume** V_g = n / ρ(T_room, P_atm), with n the moles of the whole charge
  and ρ the molar density of the gas from the vessel's own equation of state at the room's
  temperature and the atmosphere's pressure (a liquefied charge taken as fully flashed to gas).
- **Instantaneous release, pure displacement** (the verdict's model): the gas pushes out its
  own volume of air, so the gas's mole fraction in the room is x = V_g / V_room (at most 1).
  This is the upper bound of the two and the simple estimate used in industrial-gas guidance
  on oxygen depletion (e.g. BCGA Guidance Note GN11, oxygen = 20.9 % × (V_room − V_g)/V_room;
  from memory).
- **Gradual release, well mixed with outflow** (reported beside it): the gas enters a room
  that stays mixed while the mixture leaves at the rate the gas enters, dx/dV_g = (1 − x)/V_room,
  so x = 1 − exp(−V_g / V_room) (the continuously stirred room of the well-mixed box model,
  e.g. AIHA, *Mathematical Models for Estimating Occupational Exposure to Chemicals*; from
  memory).
- **The atmosphere** at gas fraction x: oxygen a_O2·(1 − x) + x·z_O2, carbon dioxide
  a_CO2·(1 − x) + x·z_CO2 (a: air, z: the released gas), the flammable gases as a share of
  the lower flammable limit Σ x·z_i / LFL_i (Le Chatelier's rule, which makes the mixture's
  share the sum of its components' shares).
- **Ventilation** with N air changes per unit time (air in, mixture out, well mixed):
  x(t) = x₀·exp(−N t) after a release; a continuous leak of gas volume flow q gives
  dx/dt = q/V (1 − x) − N x, so x(t) = x_ss (1 − exp(−(N + q/V) t)) with the steady state
  x_ss = q / (q + N V) (≈ q/(N V) for a small leak).
"""

from __future__ import annotations

import math
from collections.abc import Mapping
from dataclasses import dataclass

import numpy as np

from fillcheck.errors import FillcheckError
from fillcheck.fluids.classification import AIR_OXYGEN, CI

R = 8.314462618
"""Molar gas constant [J/(mol K)] (CODATA 2018, exact in the SI since 2019)."""

AIR_CARBON_DIOXIDE = 0.00042
"""Carbon dioxide mole fraction of outdoor air (about 420 ppm, NOAA global mean for 2023;
from memory) [-]."""
LIQUID_Z = 0.5
"""A compressibility factor below this at the room's conditions marks a liquid root: the gas
does not exist at the atmosphere's pressure there (fillcheck's choice; gases at 1 atm have Z
above 0.9) [-]."""


@dataclass(frozen=True)
class ReleasedVolume:
    """The volume a charge takes as gas at the room's conditions.

    volume_m3 [m³]; Z [-] (1 where the ideal gas stood in); flashed: whether the gas exists at
    the room's temperature and the atmosphere's pressure (False: it would stay partly liquid,
    and the volume given is the ideal gas's, the upper bound of the vapour it can make)."""

    volume_m3: float
    Z: float
    flashed: bool


def released_volume(fluid: object, moles: float, T_K: float, P_Pa: float) -> ReleasedVolume:
    """The gas volume of ``moles`` of the fluid at T [K], P [Pa] by its own model [m³]."""
    ideal = moles * R * T_K / P_Pa
    try:
        rho = float(np.asarray(fluid.density_molar(np.array([T_K]), np.array([P_Pa]))).ravel()[0])  # type: ignore[attr-defined]
    except (FillcheckError, ValueError, ArithmeticError):
        return ReleasedVolume(ideal, 1.0, False)
    if not (math.isfinite(rho) and rho > 0.0):
        return ReleasedVolume(ideal, 1.0, False)
    Z = P_Pa / (rho * float(getattr(getattr(fluid, "eos", None), "R", R)) * T_K)  # model's own R
    if Z < LIQUID_Z:
        return ReleasedVolume(ideal, 1.0, False)
    return ReleasedVolume(moles / rho, Z, True)


def displacement_fraction(gas_m3: float, room_m3: float) -> float:
    """Gas mole fraction after an instantaneous release, pure displacement: V_g/V_room, at most
    1 [-]."""
    return min(gas_m3 / room_m3, 1.0)


def mixed_outflow_fraction(gas_m3: float, room_m3: float) -> float:
    """Gas mole fraction after a gradual release into a well-mixed room with outflow:
    1 − exp(−V_g/V_room) [-]."""
    return -math.expm1(-gas_m3 / room_m3)


@dataclass(frozen=True)
class Atmosphere:
    """The room's air at one gas fraction (mole fractions [-]).

    oxygen_equivalent: oxygen plus every other oxidizer by its ISO 10156 coefficient Cᵢ;
    lfl_fraction: the flammable gases as a share of their lower flammable limit (Le
    Chatelier); toxic: the toxic components' mole fractions in the room."""

    gas_fraction: float
    oxygen: float
    oxygen_equivalent: float
    carbon_dioxide: float
    lfl_fraction: float
    toxic: dict[str, float]


@dataclass(frozen=True)
class GasMix:
    """What of a released gas changes the air: its mole fractions of oxygen, of oxidizers (as
    oxygen equivalent), of carbon dioxide; Σ z_i/LFL_i of its flammable components [-]; its
    toxic components' mole fractions; and its flammable components without a limit."""

    oxygen: float
    oxygen_equivalent: float
    carbon_dioxide: float
    lfl_sum: float
    toxic: dict[str, float]
    flammable_without_limit: tuple[str, ...]


def gas_mix(
    fractions: Mapping[str, float],
    hazards: Mapping[str, frozenset[str]],
    lfl: Mapping[str, float],
) -> GasMix:
    """The parts of a gas of mole ``fractions`` (by component name) that act on the air, with
    each component's hazard classes and the lower flammable limits [mole fraction] known."""
    # air (a catalog gas of its own, breathing air) brings its own oxygen
    oxygen = float(fractions.get("oxygen", 0.0)) + AIR_OXYGEN * float(fractions.get("air", 0.0))
    equivalent = oxygen + sum(
        CI.get(n, 1.0) * x
        for n, x in fractions.items()
        if n != "oxygen" and (n in CI or "oxidizing" in hazards.get(n, frozenset()))
    )
    lfl_sum = 0.0
    missing: list[str] = []
    toxic: dict[str, float] = {}
    for n, x in fractions.items():
        h = hazards.get(n, frozenset())
        if "flammable" in h:
            if n in lfl:
                lfl_sum += x / lfl[n]
            else:
                missing.append(n)
        if "toxic" in h:
            toxic[n] = float(x)
    return GasMix(
        oxygen,
        equivalent,
        float(fractions.get("carbon dioxide", 0.0)),
        lfl_sum,
        toxic,
        tuple(missing),
    )


def atmosphere(x: float, gas: GasMix) -> Atmosphere:
    """The room's air at gas mole fraction ``x`` [-] of the released ``gas``."""
    return Atmosphere(
        x,
        AIR_OXYGEN * (1.0 - x) + x * gas.oxygen,
        AIR_OXYGEN * (1.0 - x) + x * gas.oxygen_equivalent,
        AIR_CARBON_DIOXIDE * (1.0 - x) + x * gas.carbon_dioxide,
        x * gas.lfl_sum,
        {n: x * z for n, z in gas.toxic.items()},
    )


def largest_fractions(
    gas: GasMix,
    oxygen_minimum: float,
    oxygen_maximum: float,
    carbon_dioxide_limit: float,
    lfl_share: float,
) -> dict[str, float]:
    """Per limit, the largest gas mole fraction in the room that keeps it [-] (inf: this gas
    never breaks it): "oxygen-deficient", "oxygen-enriched", "carbon-dioxide", "flammable"."""
    out = {}
    drop = AIR_OXYGEN - gas.oxygen
    out["oxygen-deficient"] = (AIR_OXYGEN - oxygen_minimum) / drop if drop > 0 else math.inf
    rise = gas.oxygen_equivalent - AIR_OXYGEN
    out["oxygen-enriched"] = (oxygen_maximum - AIR_OXYGEN) / rise if rise > 0 else math.inf
    rise = gas.carbon_dioxide - AIR_CARBON_DIOXIDE
    out["carbon-dioxide"] = (
        (carbon_dioxide_limit - AIR_CARBON_DIOXIDE) / rise if rise > 0 else math.inf
    )
    out["flammable"] = lfl_share / gas.lfl_sum if gas.lfl_sum > 0 else math.inf
    return out


def decay(x0: float, air_changes_per_s: float, t_s: np.ndarray) -> np.ndarray:
    """Gas fraction after a release, ventilated: x₀·exp(−N t) [-]."""
    return x0 * np.exp(-air_changes_per_s * np.asarray(t_s, dtype=float))


def time_to_fall(x0: float, x_target: float, air_changes_per_s: float) -> float | None:
    """Time for the gas fraction to fall from x₀ to x_target by ventilation [s]: 0 where it is
    there already, ln(x₀/x_target)/N, None where it never does (no ventilation)."""
    if x0 <= x_target:
        return 0.0
    if not air_changes_per_s > 0.0 or not x_target > 0.0:
        return None
    return math.log(x0 / x_target) / air_changes_per_s


def leak_steady_fraction(q_m3_s: float, air_changes_per_s: float, room_m3: float) -> float:
    """Steady gas fraction of a continuous leak of q [m³/s] into a ventilated room:
    q / (q + N V) [-] (≈ q/(N V) for a small leak; 1 without ventilation)."""
    return q_m3_s / (q_m3_s + air_changes_per_s * room_m3)


def leak_fraction(
    q_m3_s: float, air_changes_per_s: float, room_m3: float, t_s: np.ndarray
) -> np.ndarray:
    """Gas fraction t seconds after a continuous leak starts: x_ss (1 − exp(−(N + q/V) t)) [-]."""
    k = air_changes_per_s + q_m3_s / room_m3
    return leak_steady_fraction(q_m3_s, air_changes_per_s, room_m3) * -np.expm1(
        -k * np.asarray(t_s, dtype=float)
    )


def leak_time_to(
    x_target: float, q_m3_s: float, air_changes_per_s: float, room_m3: float
) -> float | None:
    """Time for a continuous leak to bring the gas fraction to x_target [s]; None where its
    steady state stays below it."""
    x_ss = leak_steady_fraction(q_m3_s, air_changes_per_s, room_m3)
    if x_target >= x_ss:
        return None
    k = air_changes_per_s + q_m3_s / room_m3
    return -math.log1p(-x_target / x_ss) / k
