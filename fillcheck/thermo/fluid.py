"""The public face of a fluid: catalog data, one model, and states in SI mass units.

>>> import fillcheck
>>> f = fillcheck.fluid("argon", model="pr")
>>> s = f.state(T=288.15, P=20.1e6)
>>> s.phase
'supercritical'
"""

from __future__ import annotations

from dataclasses import dataclass
from typing import Any

import numpy as np

from fillcheck.errors import ConvergenceError, FillcheckError, InputError, StateError
from fillcheck.fluids.accuracy import REFERENCE_UNCERTAINTY, GasAccuracy, ModelError, accuracy_for
from fillcheck.fluids.catalog import FluidData, lookup
from fillcheck.fluids.superancillary import Superancillary, load_superancillary
from fillcheck.models.base import FloatArray
from fillcheck.models.cubic_saturation import CubicSaturation, cubic_saturation
from fillcheck.models.idealgas import IdealGasMixture
from fillcheck.models.multiparameter import (
    MultiparameterModel,
    ReferenceIdealGas,
    ancillary_value,
)
from fillcheck.models.registry import build_model, default_model_id
from fillcheck.thermo import properties as props
from fillcheck.thermo.density import density_TP
from fillcheck.thermo.helmholtz_solvers import (
    density_bracketed,
    loop_closure,
    saturation_newton,
)
from fillcheck.thermo.saturation import Saturation, saturation_T
from fillcheck.thermo.vessel import vessel_path

SATURATION_GAPS_K = (2e-5, 1e-4, 1e-3, 1e-2)
"""Trial distances below Tc for Fluid.saturation_gap_K, smallest first [K]."""

SCALAR_SATURATION_SIZE = 8
"""Saturation expansions for at most this many temperatures are evaluated one by one in plain
Python (faster than numpy's per-call overhead for so few)."""

NEAR_CRITICAL_SPAN_K = 1.0
"""Below Tc by less than this, reference saturation starts from critical scaling [K]."""
CRITICAL_BETA = 0.325
"""The critical exponent of the coexistence curve of real fluids, ρ' − ρ'' ∝ (Tc − T)^β
(Sengers, Levelt Sengers (1986), Annu. Rev. Phys. Chem. 37, 189), for starting densities [-]."""


def _out(x: Any) -> Any:
    """A 0-d array as a Python scalar, anything else unchanged."""
    arr = np.asarray(x)
    return arr.item() if arr.ndim == 0 else arr


@dataclass(frozen=True)
class CriticalPoint:
    """A critical point: T [K], P [Pa], rho [kg/m³]."""

    T: float
    P: float
    rho: float


@dataclass(frozen=True)
class Validity:
    """Where a model's numbers are vouched for: T_min..T_max [K], P up to P_max [Pa]."""

    T_min_K: float
    T_max_K: float
    P_max_Pa: float
    source: str

    def contains(self, T: FloatArray, P: FloatArray) -> np.ndarray:
        """True where (T, P) lies inside the range."""
        T, P = np.asarray(T), np.asarray(P)
        return (T >= self.T_min_K - 1e-9) & (T <= self.T_max_K + 1e-9) & (P <= self.P_max_Pa)


class State:
    """A state (or an array of states) of one fluid, in SI mass units.

    Attributes
    ----------
    T : temperature [K];  P : pressure [Pa];  rho : overall density [kg/m³]
    Z : compressibility factor P/(ρRT) [-] (of the whole content when two-phase)
    phase : "gas" | "liquid" | "supercritical" | "two-phase"
    quality : vapour mass fraction when two-phase, else None [-]
    dP_dT : pressure rise per kelvin at constant overall density [Pa/K]
    in_range : whether the state lies inside the model's validity range
    """

    def __init__(self, fluid: Fluid, T: FloatArray, rho_mol: FloatArray) -> None:
        path = vessel_path(fluid, T, rho_mol)
        shape = np.broadcast(np.asarray(T), np.asarray(rho_mol)).shape
        self._fluid = fluid
        self._rho_mol = path.rho_mol.reshape(shape)
        self.model = fluid.model
        self.T = _out(path.T.reshape(shape))
        self.P = _out(path.P.reshape(shape))
        self.rho = _out(self._rho_mol * fluid.molar_mass)
        R = fluid.eos.R
        self.Z = _out(path.P.reshape(shape) / (self._rho_mol * R * path.T.reshape(shape)))
        phase = path.phase.reshape(shape)
        self.phase = str(phase) if phase.ndim == 0 else phase
        q = path.quality.reshape(shape)
        self.quality = (None if np.isnan(q) else float(q)) if q.ndim == 0 else q
        self.dP_dT = _out(path.dP_dT.reshape(shape))
        self.in_range = _out(fluid.validity.contains(self.T, self.P))

    def _single_phase(self, what: str) -> None:
        if np.any(np.asarray(self.phase) == "two-phase"):
            raise StateError(f"{what} is a single-phase property; this state is two-phase")

    @property
    def ln_phi(self) -> Any:
        """ln of the fugacity coefficient (single phase) [-]."""
        self._single_phase("the fugacity coefficient")
        return _out(props.ln_fugacity_coefficient(self._fluid.eos, self.T, self._rho_mol))

    def caloric(self) -> dict[str, Any]:
        """Specific u, h [J/kg], s, cv, cp [J/(kg·K)] and speed of sound w [m/s] (single phase).

        Raises StateError in two phases and InputError for a fluid without an ideal-gas
        heat-capacity correlation (user-defined gases).
        """
        self._single_phase("caloric properties")
        ideal = self._fluid.ideal_gas()
        M = self._fluid.molar_mass
        c = props.caloric(self._fluid.eos, ideal, self.T, self._rho_mol, M)
        return {k: _out(v if k == "w" else v / M) for k, v in c.items()}


class Fluid:
    """One fluid with one model (see :func:`fillcheck.fluid`)."""

    def __init__(self, data: FluidData, model: str | None = None) -> None:
        self.data = data
        self.model = model or default_model_id(data)
        self.eos = build_model(data, self.model)
        self.name = data.name
        self.cas = data.cas
        self.formula = data.formula
        self.molar_mass = data.molar_mass_kg_mol
        self.critical = CriticalPoint(
            data.critical_temperature_K, data.critical_pressure_Pa, data.critical_density_kg_m3
        )
        Tc, Pc, rhoc_mol = self.eos.critical_point()
        self.model_critical = (Tc, Pc, rhoc_mol)
        self.is_reference = isinstance(self.eos, MultiparameterModel)
        if self.is_reference and self.eos.pseudo_pure:
            # a pseudo-pure mixture (air): its equation's own two-phase loop closes below the
            # listed critical point, and the saturation of the equation ends there
            Tc, Pc, rhoc_mol = loop_closure(self.eos, Tc, rhoc_mol)
            self.model_critical = (Tc, Pc, rhoc_mol)
        self.T_min_saturation = (
            max(self.eos.T_triple, data.triple_point_temperature_K)
            if self.is_reference
            else data.triple_point_temperature_K
        )
        self.superancillary: Superancillary | CubicSaturation | None = (
            load_superancillary(
                self.name, self.eos.fingerprint, self.model_critical[0], self.T_min_saturation
            )
            if self.is_reference
            else cubic_saturation(self.eos, self.T_min_saturation)
        )
        """The saturation expansions fitted to this equation (fluids/superancillary.py), or for
        a cubic model its family's reduced curve (models/cubic_saturation.py); None where none
        is shipped or the shipped file is stale (then the solver is used)."""
        self.accuracy: GasAccuracy | None = (
            accuracy_for(data.name) if not data.user_defined else None
        )
        self.validity = self._validity()

    def __repr__(self) -> str:
        return f"<Fluid {self.name} model={self.model}>"

    @property
    def model_error(self) -> ModelError | None:
        """The error the model in use is known to have for this gas, or None if unknown."""
        if self.is_reference:
            return REFERENCE_UNCERTAINTY
        if self.accuracy is None:
            return None
        return self.accuracy.errors.get(self.model)

    def _validity(self) -> Validity:
        if self.is_reference:
            v = self.eos.validity
            return Validity(
                v.T_min_K, v.T_max_K, v.P_max_Pa, f"published range of {self.eos.publication}"
            )
        acc = self.accuracy
        if acc is not None:
            return Validity(
                max(acc.T_min_K, self.T_min_saturation), acc.T_max_K, acc.P_max_Pa, acc.source
            )
        return Validity(
            self.T_min_saturation,
            3.0 * self.critical.T,
            10.0 * self.critical.P,
            "no measured error for this gas and model: results rest on corresponding states alone",
        )

    @property
    def model_name(self) -> str:
        """Full name of the model in use."""
        return self.eos.info.name

    @property
    def references(self) -> tuple[str, ...]:
        """Publications of the model in use."""
        return self.eos.info.references

    def ideal_gas(self) -> IdealGasMixture | ReferenceIdealGas:
        """The ideal-gas part: the reference equation's own, else the catalog correlation."""
        if self.is_reference:
            return ReferenceIdealGas(self.eos)
        if self.data.ideal_gas_cp is None:
            raise InputError(f"{self.name} has no ideal-gas heat capacity in the catalog")
        return IdealGasMixture([self.data.ideal_gas_cp], np.array([1.0]), self.eos.R)

    # --- states ------------------------------------------------------------------------------
    def state(
        self, *, T: FloatArray, rho: FloatArray | None = None, P: FloatArray | None = None
    ) -> State:
        """The state at T [K] and either overall density rho [kg/m³] or pressure P [Pa]."""
        return State(self, *state_inputs(self, T, rho, P))

    def density_molar(self, T: FloatArray, P: FloatArray) -> FloatArray:
        """Molar density of the stable phase at T [K], P [Pa] [mol/m³]."""
        if self.is_reference:
            Tc, _, rhoc = self.model_critical
            return density_bracketed(
                self.eos, T, P, Tc=Tc, rhoc=rhoc, saturation=self.saturation_molar
            ).reshape(np.broadcast(np.asarray(T), np.asarray(P)).shape)
        return density_TP(self.eos, T, P)

    def saturation_molar(self, T: FloatArray) -> Saturation:
        """Saturation in molar densities at T [K] (array).

        A reference equation with shipped expansions (``self.superancillary``) is evaluated from
        them from its lowest saturation temperature up to their ``T_top``; above that the phase
        equilibrium is solved by continuation from their top. A pure cubic model is evaluated
        from its family's reduced curve where that covers T, elsewhere solved; every other
        model is solved (:meth:`saturation_solved`).
        """
        T = np.atleast_1d(np.asarray(T, dtype=float))
        sa = self.superancillary
        if sa is None:
            return self.saturation_solved(T)
        self._check_saturation_range(T)
        fast = sa.covers(T)
        if np.all(fast):
            if T.size <= SCALAR_SATURATION_SIZE:  # array machinery costs more than it saves
                P, rl, rv = np.array([sa.evaluate_scalar(t) for t in T.ravel().tolist()]).T
                P, rl, rv = P.reshape(T.shape), rl.reshape(T.shape), rv.reshape(T.shape)
            else:
                P, rl, rv = sa.evaluate(T)
            return Saturation(T=T, P=P, rho_liquid=rl, rho_vapor=rv)
        out_p, out_l, out_v = np.empty_like(T), np.empty_like(T), np.empty_like(T)
        if np.any(fast):
            out_p[fast], out_l[fast], out_v[fast] = sa.evaluate(T[fast])
        # near Tc the solver runs once per distinct temperature (a register's vessels share them)
        T_unique, back = np.unique(T[~fast], return_inverse=True)
        if self.is_reference:
            s = self._above_expansions(T_unique)
        else:  # a cubic below its curve's coldest point, or within 1e-12 of Tc
            s = self.saturation_solved(T_unique)
        out_p[~fast], out_l[~fast], out_v[~fast] = s.P[back], s.rho_liquid[back], s.rho_vapor[back]
        return Saturation(T=T, P=out_p, rho_liquid=out_l, rho_vapor=out_v)

    def saturation_solved(self, T: FloatArray, *, to_round_off: bool = False) -> Saturation:
        """Saturation at T [K] (array) by solving the phase equilibrium, never from expansions.

        A reference equation is solved by Newton's method on the two densities (Akasaka's
        form, thermo.helmholtz_solvers), started from its ancillary equations and, within
        NEAR_CRITICAL_SPAN_K of Tc, by continuation from below; ``to_round_off`` iterates each
        solution further, until Newton's corrections stop shrinking (what the superancillary
        builder fits to). Other models: the bracketed Newton iteration in ln P
        (thermo.saturation).
        """
        Tc, Pc, rhoc = self.model_critical
        T = np.atleast_1d(np.asarray(T, dtype=float))
        if self.is_reference:
            s = self._reference_saturation(T)
            if to_round_off:
                s = saturation_newton(
                    self.eos, T, s.rho_liquid, s.rho_vapor, self.eos.rho_r, step_tol=0.0
                )
            return s
        with np.errstate(divide="ignore"):
            guess = np.log(Pc) + 5.373 * (1.0 + self.data.acentric_factor) * (1.0 - Tc / T)
        return saturation_T(
            self.eos, T, Tc=Tc, Pc=Pc, rhoc=rhoc, T_min=self.T_min_saturation, ln_P_guess=guess
        )

    def _check_saturation_range(self, T: np.ndarray) -> None:
        Tc = self.model_critical[0]
        T_min = self.T_min_saturation
        bad = (T >= Tc) | (T < T_min * (1 - 1e-12)) | ~np.isfinite(T)
        if np.any(bad):
            raise StateError(
                f"no saturation state at {T[bad][0]:.6g} K: saturation exists from the triple "
                f"point {T_min:.6g} K up to the critical temperature {Tc:.6g} K"
            )

    def _reference_saturation(self, T: np.ndarray) -> Saturation:
        Tc = self.model_critical[0]
        self._check_saturation_range(T)
        anc = self.eos.ancillaries
        rl = ancillary_value(anc["saturated_liquid_density"], T)
        rv = ancillary_value(anc["saturated_vapour_density"], T)
        near = T > Tc - NEAR_CRITICAL_SPAN_K
        far = ~near
        out_l, out_v, out_p = np.empty_like(T), np.empty_like(T), np.empty_like(T)
        if np.any(far):
            s = saturation_newton(self.eos, T[far], rl[far], rv[far], self.eos.rho_r)
            out_l[far], out_v[far], out_p[far] = s.rho_liquid, s.rho_vapor, s.P
        if np.any(near):
            s = self._near_critical_saturation(T[near])
            out_l[near], out_v[near], out_p[near] = s.rho_liquid, s.rho_vapor, s.P
        return Saturation(T=T, P=out_p, rho_liquid=out_l, rho_vapor=out_v)

    @property
    def saturation_gap_K(self) -> float:
        """How close below the critical temperature saturation converges for this model [K]:
        the first of SATURATION_GAPS_K at which it does (found once, then remembered). Closer
        than this the phase-equilibrium conditions are not resolved in double precision (most
        reference equations converge at Tc − 10 µK; that of R22 only at Tc − 1 mK). Judged by
        the solver itself (:meth:`saturation_solved`), whatever start saturation_molar takes."""
        gap = getattr(self, "_saturation_gap", None)
        if gap is None:
            Tc = self.model_critical[0]
            gap = SATURATION_GAPS_K[-1]
            for trial in SATURATION_GAPS_K:
                try:
                    with np.errstate(all="ignore"):  # a trial that fails may overflow on the way
                        sat = self.saturation_solved(np.array([Tc - trial]))
                except FillcheckError:
                    continue
                if np.isfinite(sat.P[0]) and sat.rho_liquid[0] > sat.rho_vapor[0]:
                    gap = trial
                    break
            self._saturation_gap = gap
        return gap

    def _near_critical_saturation(
        self, T: np.ndarray, start: tuple[float, Saturation] | None = None
    ) -> Saturation:
        """Saturation close to Tc by continuation: from NEAR_CRITICAL_SPAN_K below Tc, steps
        that shrink the distance to Tc threefold, each started from the last solution scaled
        with the critical exponent β ≈ 0.325 of real fluids (Sengers, Levelt Sengers (1986),
        Annu. Rev. Phys. Chem. 37, 189), so every start lies outside the spinodals. All the
        temperatures step together (vectorised). ``start`` = (distance below Tc [K], the
        saturation there, one value for all) begins the steps there instead."""
        Tc, _, rhoc = self.model_critical
        target = Tc - np.asarray(T, dtype=float)
        if start is None:
            anc = self.eos.ancillaries
            dT = np.full(target.shape, NEAR_CRITICAL_SPAN_K)
            T1 = Tc - dT
            s = saturation_newton(
                self.eos,
                T1,
                ancillary_value(anc["saturated_liquid_density"], T1),
                ancillary_value(anc["saturated_vapour_density"], T1),
                self.eos.rho_r,
            )
        else:
            dT = np.full(target.shape, start[0])
            one = start[1]
            s = Saturation(
                T=Tc - dT,
                P=np.full(target.shape, one.P[0]),
                rho_liquid=np.full(target.shape, one.rho_liquid[0]),
                rho_vapor=np.full(target.shape, one.rho_vapor[0]),
            )
        while np.any(dT > target):
            new = np.maximum(dT / 3.0, target)
            x = (new / dT) ** CRITICAL_BETA
            s = saturation_newton(
                self.eos,
                Tc - new,
                rhoc + (s.rho_liquid - rhoc) * x,
                rhoc + (s.rho_vapor - rhoc) * x,
                self.eos.rho_r,
            )
            dT = new
        return s

    def _above_expansions(self, T: np.ndarray) -> Saturation:
        """Saturation between the top of the expansions and Tc (a few mK at most): Newton's
        method at each temperature, started from the expansions at their top scaled to it
        with the critical exponent (as each step of _near_critical_saturation is; one solve
        instead of a continuation). A temperature whose solve fails from that start is solved
        alone and, failing again, by the continuation from the top, so no temperature's result
        depends on the others solved with it."""
        sa = self.superancillary
        assert sa is not None
        Tc, _, rhoc = self.model_critical
        T_top = np.array([sa.T_top])
        P, rl, rv = sa.evaluate(T_top)
        x = ((Tc - T) / (Tc - sa.T_top)) ** CRITICAL_BETA
        try:
            return saturation_newton(
                self.eos, T, rhoc + (rl[0] - rhoc) * x, rhoc + (rv[0] - rhoc) * x, self.eos.rho_r
            )
        except ConvergenceError:
            if T.size > 1:
                parts = [self._above_expansions(T[i : i + 1]) for i in range(T.size)]
                return Saturation(
                    T=T,
                    P=np.concatenate([p.P for p in parts]),
                    rho_liquid=np.concatenate([p.rho_liquid for p in parts]),
                    rho_vapor=np.concatenate([p.rho_vapor for p in parts]),
                )
        top = Saturation(T=T_top, P=P, rho_liquid=rl, rho_vapor=rv)
        return self._near_critical_saturation(T, start=(Tc - sa.T_top, top))

    def saturation(self, T: FloatArray) -> SaturationState:
        """Saturation pressure [Pa] and saturated densities [kg/m³] at T [K] below Tc.

        One temperature (a Python or numpy float) that the fluid's saturation expansions cover
        is evaluated in plain Python, without array machinery; anything else goes through
        :meth:`saturation_molar`.
        """
        sa = self.superancillary
        if sa is not None and isinstance(T, float | int) and not isinstance(T, bool):
            t = float(T)
            if sa.T_min * (1.0 - 1e-12) <= t <= sa.T_top:
                P, rl, rv = sa.evaluate_scalar(t)
                M = self.molar_mass
                return SaturationState(T=t, P=P, rho_liquid=rl * M, rho_vapor=rv * M)
        T_arr = _positive(T, "T")
        sat = self.saturation_molar(np.ravel(T_arr))
        shape = np.shape(T_arr)
        M = self.molar_mass
        return SaturationState(
            T=_out(sat.T.reshape(shape)),
            P=_out(sat.P.reshape(shape)),
            rho_liquid=_out(sat.rho_liquid.reshape(shape) * M),
            rho_vapor=_out(sat.rho_vapor.reshape(shape) * M),
        )


@dataclass(frozen=True)
class SaturationState:
    """Saturation at T [K]: pressure P [Pa], liquid and vapour densities [kg/m³]."""

    T: Any
    P: Any
    rho_liquid: Any
    rho_vapor: Any


def state_inputs(
    fluid: Any, T: FloatArray, rho: FloatArray | None, P: FloatArray | None
) -> tuple[np.ndarray, np.ndarray]:
    """Temperature [K] and overall molar density [mol/m³] from T and either rho [kg/m³] or
    P [Pa] (refused unless exactly one is given, all positive and finite)."""
    if (rho is None) == (P is None):
        raise InputError("give exactly one of rho (kg/m³) or P (Pa) with T")
    T_arr = _positive(T, "T")
    if rho is not None:
        return T_arr, _positive(rho, "rho") / fluid.molar_mass
    return T_arr, fluid.density_molar(T_arr, _positive(P, "P"))


def _positive(x: FloatArray, name: str) -> np.ndarray:
    arr = np.asarray(x, dtype=float)
    if not np.all(np.isfinite(arr)) or np.any(arr <= 0):
        raise InputError(f"{name} must be a positive finite number, got {x!r}")
    return arr


def fluid(name: str, model: str | None = None) -> Fluid:
    """A catalog fluid with a model: by canonical name, formula, alias or CAS, any case.

    Parameters
    ----------
    name : str
        e.g. ``"CO2"``, ``"R744"``, ``"124-38-9"``, ``"carbon dioxide"``.
    model : str, optional
        ``"pr-peneloux"``, ``"pr"``, ``"srk"``, ``"rk"``, ``"vdw"``; default: the most accurate.
    """
    return Fluid(lookup(name), model)
