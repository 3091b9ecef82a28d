"""The fluid catalog: identities, constants, hazards and ideal-gas heat capacities of the gases.

The data live in ``data/catalog.toml`` (written by ``tools/build_catalog.py``), every figure with
its published source beside it. The file is read once, on first use, and checked as it is read: a
missing or unknown key, a ragged coefficient array, an unknown hazard word or two gases sharing an
identifier stop the load with :class:`CatalogDataError`.
"""

from __future__ import annotations

import difflib
import functools
import math
import tomllib
from collections.abc import Iterable, Mapping
from dataclasses import dataclass, field
from pathlib import Path
from types import MappingProxyType

import numpy as np

from fillcheck.errors import FillcheckError, InputError, UnknownFluidError

DATA_FILE = Path(__file__).parent / "data" / "catalog.toml"

#: The hazard words a gas may carry.
HAZARDS = frozenset({"flammable", "oxidizing", "toxic", "corrosive", "asphyxiant"})
#: The keys every gas's ``sources`` table holds.
SOURCE_KEYS = (
    "molar_mass",
    "critical",
    "acentric_factor",
    "triple_point",
    "normal_boiling_point",
    "hazards",
    "ideal_gas_cp",
)
_NUMBERS = (
    "molar_mass_kg_mol",
    "critical_temperature_K",
    "critical_pressure_Pa",
    "critical_density_kg_m3",
    "acentric_factor",
    "triple_point_temperature_K",
    "normal_boiling_point_K",
)
_KEYS = {
    "name",
    "formula",
    "aliases",
    "cas",
    "hazards",
    "coolprop_name",
    "sources",
    "ideal_gas_cp",
    *_NUMBERS,
}
_CP_FORMS = {"poling-polynomial": 5, "shomate": 5, "monatomic": 0}
_CP_KEYS = {"form", "a", "T_min_K", "T_max_K", "source"}
_R = 8.314462618  # J/(mol K), exact SI value; used only for the user-gas density estimate
_ATM = 101325.0  # Pa
_IGNORED = str.maketrans("", "", "-_ ")  # characters lookup ignores

DISSOLVED_GASES = {"acetylene": ("acetylene", "ethyne", "C2H2", "74-86-2")}
"""Gases sold dissolved in a solvent held in a porous mass, with the names they go by (common
practice, no source). Their charge and pressure follow the solvent and the mass, which no
equation of state for the gas describes, so fillcheck refuses them by name."""


class CatalogDataError(FillcheckError):
    """The catalog data file is malformed (a packaging fault, not a user error)."""


def _temperatures(T: np.ndarray | float, what: str = "temperature") -> np.ndarray:
    t = np.asarray(T, dtype=float)
    if not np.all(np.isfinite(t)) or np.any(t <= 0.0):
        raise InputError(f"{what} must be finite and positive, in K; got {T!r}")
    return t


@dataclass(frozen=True)
class IdealGasCp:
    """Ideal-gas isobaric heat capacity of one gas, as cp0/R.

    Forms (``T`` in K): ``"poling-polynomial"``: cp0/R = a0 + a1 T + a2 T² + a3 T³ + a4 T⁴;
    ``"shomate"``: cp0/R = a0 + a1 T + a2 T² + a3 T³ + a4/T²; ``"monatomic"``: cp0/R = 5/2.
    The fit holds from ``T_min_K`` to ``T_max_K``; the methods do not refuse temperatures
    outside it (see :meth:`covers`): the caller decides whether an extrapolation is acceptable.
    Non-finite or non-positive temperatures raise :class:`~fillcheck.errors.InputError`.
    """

    form: str
    coefficients: tuple[float, ...]
    T_min_K: float
    T_max_K: float
    source: str

    def __post_init__(self) -> None:
        if len(self.coefficients) != _CP_FORMS.get(self.form, -1):
            raise CatalogDataError(
                f"ideal-gas cp form {self.form!r} with "
                f"{len(self.coefficients)} coefficients is not known"
            )
        if not 0.0 < self.T_min_K < self.T_max_K:
            raise CatalogDataError(f"ideal-gas cp range {self.T_min_K}..{self.T_max_K} K is empty")

    def covers(self, T: np.ndarray | float) -> np.ndarray:
        """Whether each temperature ``T`` [K] lies in the fit's range (array of bool)."""
        t = np.asarray(T, dtype=float)
        return (t >= self.T_min_K) & (t <= self.T_max_K)

    def cp0_over_R(self, T: np.ndarray | float) -> np.ndarray:
        """Ideal-gas isobaric heat capacity over the gas constant, cp0/R [-], at ``T`` [K]."""
        t = _temperatures(T)
        a = self.coefficients
        if self.form == "monatomic":
            return np.full_like(t, 2.5)
        if self.form == "shomate":
            return a[0] + t * (a[1] + t * (a[2] + t * a[3])) + a[4] / t**2
        return a[0] + t * (a[1] + t * (a[2] + t * (a[3] + t * a[4])))

    def integral_cp0_over_R_dT(self, T0: np.ndarray | float, T: np.ndarray | float) -> np.ndarray:
        """∫ cp0/R dT from ``T0`` [K] to ``T`` [K]: the ideal-gas enthalpy change over R, [K]."""
        t0, t = _temperatures(T0, "lower temperature"), _temperatures(T)
        a = self.coefficients
        if self.form == "monatomic":
            return 2.5 * (t - t0)
        out = sum(a[k - 1] * (t**k - t0**k) / k for k in range(1, 5))
        if self.form == "shomate":
            return out - a[4] * (1.0 / t - 1.0 / t0)
        return out + a[4] * (t**5 - t0**5) / 5.0

    def integral_cp0_over_R_over_T_dT(
        self, T0: np.ndarray | float, T: np.ndarray | float
    ) -> np.ndarray:
        """∫ cp0/(R T) dT from ``T0`` [K] to ``T`` [K]: the ideal-gas entropy change over R, [-]."""
        t0, t = _temperatures(T0, "lower temperature"), _temperatures(T)
        a = self.coefficients
        if self.form == "monatomic":
            return 2.5 * np.log(t / t0)
        out = a[0] * np.log(t / t0) + sum(a[k] * (t**k - t0**k) / k for k in range(1, 4))
        if self.form == "shomate":
            return out - a[4] * (1.0 / t**2 - 1.0 / t0**2) / 2.0
        return out + a[4] * (t**4 - t0**4) / 4.0


@dataclass(frozen=True)
class FluidData:
    """One gas: identity, constants in SI units, hazards and where each figure comes from.

    Attributes carry their unit in their name: molar mass [kg/mol], temperatures [K],
    pressure [Pa], density [kg/m³]; the acentric factor is dimensionless. ``sources`` maps each
    of :data:`SOURCE_KEYS` to the publication of the figure.
    """

    name: str
    formula: str
    aliases: tuple[str, ...]
    cas: str
    molar_mass_kg_mol: float
    critical_temperature_K: float
    critical_pressure_Pa: float
    critical_density_kg_m3: float
    acentric_factor: float
    triple_point_temperature_K: float
    normal_boiling_point_K: float
    hazards: frozenset[str]
    sources: Mapping[str, str] = field(hash=False, repr=False)
    ideal_gas_cp: IdealGasCp | None = field(repr=False)
    coolprop_name: str | None = field(repr=False)
    user_defined: bool = False


def _normalize(identifier: str) -> str:
    return identifier.strip().casefold().translate(_IGNORED)


def _number(value: object, what: str) -> float:
    if isinstance(value, bool) or not isinstance(value, int | float) or not math.isfinite(value):
        raise CatalogDataError(f"{what} must be a finite number, got {value!r}")
    return float(value)


def _parse_cp(raw: object, where: str) -> IdealGasCp | None:
    if raw is None:
        return None
    if not isinstance(raw, dict) or set(raw) - _CP_KEYS or not {"form", "source"} <= set(raw):
        raise CatalogDataError(f"{where}: malformed ideal_gas_cp table {raw!r}")
    coefficients = raw.get("a", [])
    if not isinstance(coefficients, list):
        raise CatalogDataError(f"{where}: ideal_gas_cp.a must be an array")
    return IdealGasCp(
        str(raw["form"]),
        tuple(_number(c, f"{where}: a") for c in coefficients),
        _number(raw.get("T_min_K"), f"{where}: T_min_K"),
        _number(raw.get("T_max_K"), f"{where}: T_max_K"),
        str(raw["source"]),
    )


def _parse_fluid(raw: dict[str, object]) -> FluidData:
    where = f"catalog entry {raw.get('name', '?')!r}"
    missing = _KEYS - {"coolprop_name", "ideal_gas_cp"} - set(raw)
    if set(raw) - _KEYS or missing:
        raise CatalogDataError(
            f"{where}: unknown keys {sorted(set(raw) - _KEYS)} or missing keys {sorted(missing)}"
        )
    sources = raw["sources"]
    if (
        not isinstance(sources, dict)
        or set(sources) != set(SOURCE_KEYS)
        or not all(isinstance(v, str) and v.strip() for v in sources.values())
    ):
        raise CatalogDataError(f"{where}: sources must hold exactly {SOURCE_KEYS}, non-empty")
    hazards, aliases = raw["hazards"], raw["aliases"]
    if not isinstance(hazards, list) or set(hazards) - HAZARDS or not isinstance(aliases, list):
        raise CatalogDataError(
            f"{where}: hazards must be a list of {sorted(HAZARDS)} and aliases a list"
        )
    coolprop = raw.get("coolprop_name")
    numbers = {key: _number(raw[key], f"{where}: {key}") for key in _NUMBERS}
    return FluidData(
        name=str(raw["name"]),
        formula=str(raw["formula"]),
        aliases=tuple(map(str, aliases)),
        cas=str(raw["cas"]),
        **numbers,
        hazards=frozenset(hazards),
        sources=MappingProxyType(dict(sources)),
        ideal_gas_cp=_parse_cp(raw.get("ideal_gas_cp"), where),
        coolprop_name=None if coolprop is None else str(coolprop),
    )


@functools.cache
def _catalog() -> tuple[tuple[FluidData, ...], Mapping[str, FluidData]]:
    with DATA_FILE.open("rb") as fh:
        document = tomllib.load(fh)
    fluids = tuple(_parse_fluid(raw) for raw in document.get("fluid", []))
    index: dict[str, FluidData] = {}
    for fluid in fluids:
        for identifier in (fluid.name, fluid.formula, fluid.cas, *fluid.aliases):
            key = _normalize(identifier)
            if not key or key in index:
                other = index[key].name if key in index else "(empty)"
                raise CatalogDataError(
                    f"identifier {identifier!r} of {fluid.name!r} is empty or "
                    f"already used by {other!r}"
                )
            index[key] = fluid
    return fluids, MappingProxyType(index)


def all_fluids() -> tuple[FluidData, ...]:
    """Every catalog gas, in catalog order."""
    return _catalog()[0]


def available_fluids() -> list[str]:
    """The canonical names of the catalog gases, in catalog order."""
    return [fluid.name for fluid in all_fluids()]


def _refuse_dissolved(key: str) -> None:
    """UnknownFluidError if the normalised identifier names a dissolved gas."""
    for gas, names in DISSOLVED_GASES.items():
        if key in {_normalize(n) for n in names}:
            raise UnknownFluidError(
                f"{gas} is filled dissolved in a solvent in a porous mass; dissolved-gas "
                "cylinders are outside fillcheck, whose equations of state describe the gas "
                "alone: follow the cylinder supplier's filling procedure"
            )


def lookup(identifier: str) -> FluidData:
    """Find a catalog gas by canonical name, formula, alias or CAS number.

    Parameters
    ----------
    identifier : str
        E.g. ``"carbon dioxide"``, ``"CO2"``, ``"R744"`` or ``"124-38-9"``; case, surrounding
        whitespace and the characters ``-``, ``_`` and space are ignored.

    Returns
    -------
    FluidData

    Raises
    ------
    UnknownFluidError
        The identifier names no catalog gas; the message suggests up to three close names.
    """
    if not isinstance(identifier, str):
        raise UnknownFluidError(f"a gas is named by text; got {type(identifier).__name__}")
    fluids, index = _catalog()
    key = _normalize(identifier)
    if key in index:
        return index[key]
    _refuse_dissolved(key)
    listing = f"fillcheck knows {len(fluids)} gases: run 'fillcheck gases' to list them"
    if not key:
        raise UnknownFluidError(f"no gas named: the gas identifier is empty; {listing}")
    close = difflib.get_close_matches(key, list(index), n=12, cutoff=0.6)
    names = [f"'{n}'" for n in dict.fromkeys(index[k].name for k in close)][:3]
    if not names:
        raise UnknownFluidError(f"unknown gas '{identifier.strip()}'; {listing}")
    choice = names[0] if len(names) == 1 else f"{', '.join(names[:-1])} or {names[-1]}"
    raise UnknownFluidError(f"unknown gas '{identifier.strip()}'; did you mean {choice}?")


def _checked(
    value: object,
    what: str,
    unit: str,
    problems: list[str],
    low: float = 0.0,
    high: float = math.inf,
) -> float:
    """``value`` as a float if it is a number in the open interval (low, high), else NaN."""
    if isinstance(value, bool) or not isinstance(value, int | float) or not low < value < high:
        span = f"above {low:g}" + ("" if high == math.inf else f" and below {high:g}")
        problems.append(f"The {what} must be a number {span}{unit}; got {value!r}.")
        return math.nan
    return float(value)


def user_fluid(
    name: str,
    molar_mass_kg_mol: float,
    critical_temperature_K: float,
    critical_pressure_Pa: float,
    acentric_factor: float,
    *,
    critical_density_kg_m3: float | None = None,
    triple_point_temperature_K: float | None = None,
    normal_boiling_point_K: float | None = None,
    hazards: Iterable[str] = (),
) -> FluidData:
    """Define a gas the catalog lacks, from its critical constants (for the cubic models).

    Parameters
    ----------
    name : str
        A name no catalog gas uses (as name, formula, alias or CAS number).
    molar_mass_kg_mol, critical_temperature_K, critical_pressure_Pa, acentric_factor : float
        Molar mass [kg/mol], below 1; critical temperature [K]; critical pressure [Pa], above
        1 atm; Pitzer acentric factor [-], between -0.5 and 1.5.
    critical_density_kg_m3, triple_point_temperature_K, normal_boiling_point_K : float, optional
        [kg/m³], [K] (below Tc), [K]. If omitted: ρc from Zc = 0.2905 - 0.085 ω; 0.45 Tc recorded
        as a lower temperature limit (not a triple point); Tb from Edmister's relation
        log10(pc/1 atm) = (7/3)(1 + ω)(Tc/Tb - 1). The sources name each estimate.
    hazards : iterable of str
        Any of :data:`HAZARDS`.

    Returns
    -------
    FluidData
        ``user_defined=True``, no ideal-gas cp, no CoolProp name.

    Raises
    ------
    InputError
        One sentence per refused value.

    Notes
    -----
    Zc from ω: Reid, Prausnitz, Poling (1987), The Properties of Gases and Liquids, 4th ed.,
    eq. for Zc from ω (from memory). Edmister (1958), Petroleum Refiner 37(4), 173 (from memory).
    """
    if isinstance(name, str):
        _refuse_dissolved(_normalize(name))
    problems: list[str] = []
    label = name.strip() if isinstance(name, str) else ""
    known = _catalog()[1].get(_normalize(label))
    if not _normalize(label):
        problems.append("The user gas needs a name that is not empty.")
    elif known is not None:
        problems.append(
            f"The name '{label}' is already the catalog gas '{known.name}'; use "
            f"fillcheck.lookup('{known.name}') or choose another name."
        )
    M = _checked(molar_mass_kg_mol, "molar mass", " kg/mol", problems, high=1.0)
    Tc = _checked(critical_temperature_K, "critical temperature", " K", problems)
    pc = _checked(critical_pressure_Pa, "critical pressure", " Pa (1 atm)", problems, low=_ATM)
    w = _checked(acentric_factor, "acentric factor", "", problems, low=-0.5, high=1.5)
    Tt_max = Tc if math.isfinite(Tc) else math.inf
    rho_c, Tt, Tb = (
        None if v is None else _checked(v, what, unit, problems, high=high)
        for v, what, unit, high in (
            (critical_density_kg_m3, "critical density", " kg/m3", math.inf),
            (
                triple_point_temperature_K,
                "triple-point temperature",
                " K (below the critical temperature)",
                Tt_max,
            ),
            (normal_boiling_point_K, "normal boiling point", " K", math.inf),
        )
    )
    hazard_set = frozenset((hazards,) if isinstance(hazards, str) else hazards)
    if hazard_set - HAZARDS:
        problems.append(
            f"Unknown hazard {sorted(hazard_set - HAZARDS)}; use any of "
            f"{', '.join(sorted(HAZARDS))}."
        )
    if problems:
        raise InputError(" ".join(problems))

    sources = dict.fromkeys(SOURCE_KEYS, "entered by the user")
    sources["ideal_gas_cp"] = "none: a user-defined gas has no ideal-gas heat capacity"
    if rho_c is None:
        rho_c = pc * M / ((0.2905 - 0.085 * w) * _R * Tc)
        sources["critical"] = (
            "Tc and pc entered by the user; critical density estimated from "
            "Zc = 0.2905 - 0.085 ω (Reid, Prausnitz, Poling (1987), The "
            "Properties of Gases and Liquids, 4th ed.; from memory)"
        )
    if Tt is None:
        Tt = 0.45 * Tc
        sources["triple_point"] = (
            "not given by the user: 0.45 Tc is recorded as a lower "
            "temperature limit, not a triple point"
        )
    if Tb is None:
        Tb = Tc / (1.0 + 3.0 * math.log10(pc / _ATM) / (7.0 * (1.0 + w)))
        sources["normal_boiling_point"] = (
            "not given by the user: estimated with Edmister's "
            "relation (Edmister (1958), Petroleum Refiner 37(4), "
            "173; from memory)"
        )
    return FluidData(
        name=label,
        formula="",
        aliases=(),
        cas="",
        molar_mass_kg_mol=M,
        critical_temperature_K=Tc,
        critical_pressure_Pa=pc,
        critical_density_kg_m3=rho_c,
        acentric_factor=w,
        triple_point_temperature_K=Tt,
        normal_boiling_point_K=Tb,
        hazards=hazard_set,
        sources=MappingProxyType(sources),
        ideal_gas_cp=None,
        coolprop_name=None,
        user_defined=True,
    )
