"""A gas mixture of catalog gases with one mixture model, in the interface of a Fluid.

>>> import fillcheck
>>> m = fillcheck.mixture({"argon": 0.82, "carbon dioxide": 0.18}, model="pr")
>>> m.state(T=288.15, P=20.1e6).phase
'supercritical'

The default model is the multi-fluid Helmholtz model of the GERG-2008 form (Kunz, Wagner (2012),
J. Chem. Eng. Data 57, 3032) where every pair of components has published parameters, else
Peng–Robinson with the Péneloux volume translation and the published kᵢⱼ (kᵢⱼ = 0 where none is
published: the check then says "review").
"""

from __future__ import annotations

import re
from collections.abc import Mapping, Sequence
from dataclasses import dataclass, field

import numpy as np

from fillcheck.errors import ConvergenceError, InputError, ModelUnavailableError, StateError
from fillcheck.fluids.accuracy import ModelError, accuracy_for
from fillcheck.fluids.catalog import FluidData, lookup
from fillcheck.fluids.citation import citation
from fillcheck.fluids.classification import MixtureClass, classify
from fillcheck.fluids.mixing import cubic_kij, cubic_kij_matrix
from fillcheck.models.base import FloatArray
from fillcheck.models.cubic import CubicComponent
from fillcheck.models.cubic_mixture import CubicMixture
from fillcheck.models.mixture_base import FixedComposition, MixtureModel
from fillcheck.models.registry import has_reference_equation
from fillcheck.thermo import mixture_equilibrium as eq
from fillcheck.thermo import mixture_vessel as mv
from fillcheck.thermo.fluid import CriticalPoint, Validity, _out, _positive, state_inputs
from fillcheck.thermo.saturation import Saturation

MIXTURE_MODEL_IDS = ("reference", "pr-peneloux", "pr")
TWO_PHASE_LIMIT_FACTOR = 1.05
"""Above this multiple of the highest component critical temperature no stability test is
made (see MixtureFluid.two_phase_limit_K) [-]."""
"""Models a mixture can use."""

MULTIFLUID_RANGE = (90.0, 450.0, 35e6)
"""Normal range of the GERG-2008 model: T_min, T_max [K], P_max [Pa] (Kunz, Wagner (2012),
J. Chem. Eng. Data 57, 3032, section 1)."""

MIXTURE_REFERENCE_UNCERTAINTY = 0.005
"""Density uncertainty taken for the multi-fluid model [-]: Kunz and Wagner (2012) state 0.1 %
for the gas phase of well-measured natural-gas mixtures; fillcheck takes 0.5 % for every
mixture, since many pairs rest on fewer data."""


@dataclass(frozen=True)
class MixtureData:
    """What the assessment reads of a fluid's catalog data, for a mixture."""

    name: str
    sources: Mapping[str, str]
    hazards: frozenset[str]
    user_defined: bool = False
    components: tuple[FluidData, ...] = field(default=(), repr=False)
    classification: MixtureClass | None = field(default=None, repr=False)


def mixture_hazards(components: Sequence[FluidData], z: np.ndarray) -> frozenset[str]:
    """The hazard classes of a mixture from its composition, by the published methods for gas
    mixtures (:func:`fillcheck.fluids.classification.classify`: ISO 10156 for flammable and
    oxidizing, ISO 817 for a numbered refrigerant blend). The supplier's safety data sheet
    decides; these classes choose the cautions printed."""
    return classify_mixture(components, z).hazards


def classify_mixture(components: Sequence[FluidData], z: np.ndarray) -> MixtureClass:
    """The full classification of a mixture of catalog gases at mole fractions z [-]."""
    return classify(
        [c.name for c in components],
        np.asarray(z, dtype=float),
        np.array([c.molar_mass_kg_mol for c in components]),
        [c.hazards for c in components],
    )


def _publication(source: str) -> str:
    """The publication a catalog source note names (fluids.citation)."""
    return citation(source)


def _short_kij_source(source: str) -> str:
    """The citation of a kᵢⱼ as a report prints it (the data file keeps the full record)."""
    page = re.search(r"page (\d+)", source)
    at = f", p. {page.group(1)}" if page else ""
    return (
        f"DECHEMA Chemistry Data Series Vol. VI (1982){at}, as kept in the ChemSep "
        "Peng–Robinson library (Kooijman, Taylor)"
    )


def mixture_label(names: Sequence[str], z: np.ndarray) -> str:
    """A mixture's name from its components and mole fractions, e.g.
    "argon 82 % + carbon dioxide 18 % (mol)"."""
    parts = [f"{n} {100.0 * x:.4g} %" for n, x in zip(names, z, strict=True)]
    return " + ".join(parts) + " (mol)"


class MixtureFluid:
    """A mixture of catalog gases at a fixed overall composition (see :func:`mixture`)."""

    is_mixture = True

    def __init__(
        self, components: Sequence[FluidData], z: FloatArray, model: str | None = None
    ) -> None:
        self.components = tuple(components)
        self.component_names = tuple(c.name for c in self.components)
        self.z = np.asarray(z, dtype=float)
        if len(set(self.component_names)) != len(self.component_names):
            raise InputError("a mixture lists the same gas twice")
        if any(c.user_defined for c in self.components):
            raise InputError("a mixture can hold catalog gases only, not user-defined gases")
        self.molar_masses = np.array([c.molar_mass_kg_mol for c in self.components])
        self.molar_mass = float(self.z @ self.molar_masses)
        self.name = mixture_label(self.component_names, self.z)
        self.cas = None
        self.comps = eq.Components(
            Tc=np.array([c.critical_temperature_K for c in self.components]),
            Pc=np.array([c.critical_pressure_Pa for c in self.components]),
            omega=np.array([c.acentric_factor for c in self.components]),
        )
        self.kij_missing: list[str] = []
        self.starter = self._cubic("pr")
        self.model = model or self._default_model()
        self.mixture: MixtureModel = self._build(self.model)
        self.eos = FixedComposition(self.mixture, self.z)
        self.is_reference = self.model == "reference"
        T_r, rho_r = self.mixture.reducing(self.z)
        self.T_min_saturation = max(c.triple_point_temperature_K for c in self.components)
        self.classification = classify_mixture(self.components, self.z)
        self.data = MixtureData(
            name=self.name,
            sources={  # each figure's source, component by component
                k: "; ".join(f"{c.name}: {_publication(c.sources[k])}" for c in self.components)
                for k in self.components[0].sources
                if all(k in c.sources for c in self.components)
            },
            hazards=self.classification.hazards,
            components=self.components,
            classification=self.classification,
        )
        self._pseudo = (float(T_r), float(rho_r))
        self.critical = CriticalPoint(float(T_r), float("nan"), float(rho_r) * self.molar_mass)
        self.validity = self._validity()
        self.accuracy = None

    def __repr__(self) -> str:
        return f"<MixtureFluid {self.name} model={self.model}>"

    # --- models ------------------------------------------------------------------------------
    def _default_model(self) -> str:
        if self._multifluid_available():
            return "reference"
        if all(accuracy_for(c.name) is not None for c in self.components):
            return "pr-peneloux"
        return "pr"

    def _multifluid_available(self) -> bool:
        if not all(has_reference_equation(c) for c in self.components):
            return False
        try:
            from fillcheck.models.multifluid import covered
        except ImportError:
            return False
        return bool(covered(self.component_names))

    def _cubic(self, kind: str) -> CubicMixture:
        comps = []
        for c in self.components:
            acc = accuracy_for(c.name)
            shift = acc.volume_shift_m3_mol if (acc is not None and kind == "pr-peneloux") else 0.0
            comps.append(
                CubicComponent(
                    c.critical_temperature_K, c.critical_pressure_Pa, c.acentric_factor, shift
                )
            )
        kij, missing = cubic_kij_matrix(self.component_names)
        self.kij_missing = list(missing)
        names = self.component_names
        refs = [
            f"kij {a}–{b} = {kij[i, i + 1 + j]:+.4f}: {_short_kij_source(src)}"
            for i, a in enumerate(names)
            for j, b in enumerate(names[i + 1 :])
            if (src := cubic_kij(a, b)[1])
        ]
        return CubicMixture(kind, comps, kij, refs)

    def _build(self, model_id: str) -> MixtureModel:
        if model_id not in MIXTURE_MODEL_IDS:
            raise ModelUnavailableError(
                f"model '{model_id}' is not available for mixtures; use one of "
                f"{', '.join(MIXTURE_MODEL_IDS)}"
            )
        if model_id == "reference":
            if not self._multifluid_available():
                raise ModelUnavailableError(
                    f"no multi-fluid mixture model with published parameters for every pair "
                    f"of {self.name}; use model 'pr-peneloux' or 'pr'"
                )
            from fillcheck.models.multifluid import MultiFluidModel

            return MultiFluidModel(self.component_names)
        missing_shift = [c.name for c in self.components if accuracy_for(c.name) is None]
        if model_id == "pr-peneloux" and missing_shift:
            raise ModelUnavailableError(
                f"no fitted Péneloux shift for {', '.join(missing_shift)}; use model 'pr'"
            )
        return self._cubic(model_id)

    @property
    def model_name(self) -> str:
        """Full name of the model in use."""
        return self.mixture.info.name

    @property
    def references(self) -> tuple[str, ...]:
        """Publications of the model in use."""
        return self.mixture.info.references

    @property
    def model_error(self) -> ModelError | None:
        """The uncertainty taken for the model: a fixed figure for the multi-fluid model, the
        largest of the components' measured errors for a cubic (None if any is unknown)."""
        if self.is_reference:
            u = MIXTURE_REFERENCE_UNCERTAINTY
            return ModelError(u, u, u, u, u, u)
        errs = []
        for c in self.components:
            acc = accuracy_for(c.name)
            if acc is None or self.model not in acc.errors:
                return None
            errs.append(acc.errors[self.model])
        return ModelError(
            density=max(e.density for e in errs),
            pressure=max(e.pressure for e in errs),
            saturation_pressure=max((e.saturation_pressure or 0.0) for e in errs) or None,
            table_density=max(e.table_density for e in errs),
            pressure_dense=max(e.pressure_dense for e in errs),
            saturated_liquid_density=max(e.saturated_liquid_density for e in errs),
        )

    def _validity(self) -> Validity:
        T_lo, T_hi, P_hi = [], [], []
        for c in self.components:
            if self.is_reference:
                from fillcheck.models.multiparameter import load_reference_equation

                v = load_reference_equation(c.name).validity
                T_lo.append(v.T_min_K)
                T_hi.append(v.T_max_K)
                P_hi.append(v.P_max_Pa)
            else:
                acc = accuracy_for(c.name)
                if acc is not None:
                    T_lo.append(acc.T_min_K)
                    T_hi.append(acc.T_max_K)
                    P_hi.append(acc.P_max_Pa)
        if self.is_reference:
            T_lo.append(MULTIFLUID_RANGE[0])
            T_hi.append(MULTIFLUID_RANGE[1])
            P_hi.append(MULTIFLUID_RANGE[2])
            src = "normal range of the GERG-2008 model and of each component's equation"
        else:
            src = "where the components' cubic errors were measured (docs/accuracy.md)"
        if not T_lo:
            T_lo, T_hi, P_hi = [self.T_min_saturation], [3.0 * self._pseudo[0]], [30e6]
            src = "no measured error for these gases: results rest on corresponding states"
        return Validity(max(max(T_lo), self.T_min_saturation), min(T_hi), min(P_hi), src)

    # --- phase behaviour ---------------------------------------------------------------------
    @property
    def two_phase_limit_K(self) -> float:
        """A temperature above which the mixture holds one phase at any density [K]: 1.05
        times the highest critical temperature of its components. The two-phase region of a
        mixture of these gases ends below the critical temperature of its heaviest component
        (mixtures with gas–gas immiscibility, such as helium with xenon at thousands of bar,
        are outside fillcheck's range); above this no stability test is needed."""
        return TWO_PHASE_LIMIT_FACTOR * float(self.comps.Tc.max())

    @property
    def pseudo_critical_K(self) -> float:
        """Kay's pseudo-critical temperature [K]: above it a one-phase state is called
        "supercritical", below it "gas" or "liquid" by the pseudo-critical density."""
        return self._pseudo[0]

    @property
    def model_critical(self) -> tuple[float, float, float]:
        """(two-phase limit [K], NaN, pseudo-critical density [mol/m³]): where a pure fluid has
        its critical temperature, a mixture has the temperature above which it cannot hold two
        phases; the density that separates "gas" from "liquid" is Kay's pseudo-critical one."""
        return self.two_phase_limit_K, float("nan"), self._pseudo[1]

    def vessel_path(self, T: FloatArray, rho_mol: FloatArray) -> mv.MixtureVesselPath:
        """Closed-vessel states at T [K] and overall density ρ [mol/m³]."""
        return mv.mixture_vessel_path(self, T, rho_mol)

    def saturation_crossing(self, rho_mol: float) -> tuple[str, float | None]:
        """Where the isochore leaves the two-phase region (see mixture_vessel)."""
        return mv.isochore_crossing(self, rho_mol, self.T_min_saturation, self.two_phase_limit_K)

    def saturation_molar(self, T: FloatArray) -> Saturation:
        """The two-phase band at each T [K]: bubble pressure, band ends [mol/m³]."""
        return mv.two_phase_band(self, T)

    def bubble_point(self, T: float) -> BoundaryPoint:
        """The bubble point at T [K]: the mixture as a liquid just forming vapour (above the
        mixture's critical temperature, the upper dew point of the band)."""
        return self._boundary(T, upper=True)

    def dew_point(self, T: float) -> BoundaryPoint:
        """The dew point at T [K]: the mixture as a vapour just forming liquid."""
        return self._boundary(T, upper=False)

    def _boundary(self, T: float, upper: bool) -> BoundaryPoint:
        T_arr = _positive(T, "T")
        if T_arr.ndim != 0:
            raise InputError("give one temperature")
        lower, top, has = mv.band_ends(self, np.array([float(T_arr)]))
        b = top if upper else lower
        what = "bubble" if upper else "dew"
        if not has[0]:
            raise StateError(
                f"{self.name}: no {what} point at {float(T_arr):.6g} K with the {self.model} "
                "model: the mixture holds one phase at every density there"
            )
        if not b.converged[0]:
            raise ConvergenceError(f"{self.name}: the {what} point at {float(T_arr):.6g} K")
        w = b.w[0] / b.w[0].sum()
        return BoundaryPoint(
            T=float(T_arr),
            P=float(b.P[0]),
            rho=float(b.rho_feed[0] * self.molar_mass),
            incipient_composition=dict(zip(self.component_names, map(float, w), strict=True)),
            rho_incipient=float(b.rho_incipient[0] * float(w @ self.molar_masses)),
        )

    def density_molar(self, T: FloatArray, P: FloatArray) -> FloatArray:
        """Overall molar density at T [K], P [Pa]: the stable phase, or the overall density of
        the two phases in equilibrium [mol/m³]."""
        T, P = np.broadcast_arrays(np.asarray(T, dtype=float), np.asarray(P, dtype=float))
        shape = T.shape
        T, P = T.ravel(), P.ravel()
        z = np.broadcast_to(self.z, (T.size, self.z.size)).copy()
        rho = eq.stable_density(self.mixture, T, P, z, self.starter)
        st = eq.stability(self.mixture, T, P, z, rho, self.comps, self.starter)
        idx = np.flatnonzero(st.unstable & (T < self.two_phase_limit_K))
        if idx.size:
            with np.errstate(divide="ignore", invalid="ignore"):
                lnK = np.log(st.w[idx]) - np.log(z[idx])
            lnK = np.where((st.rho_trial[idx] > rho[idx])[:, None], -lnK, lnK)
            s, ok = eq.flash_TP(self.mixture, T[idx], P[idx], z[idx], lnK, self.starter)
            v = s.beta / s.rho_vapor + (1.0 - s.beta) / s.rho_liquid
            inside = ok & (s.beta > 0.0) & (s.beta < 1.0)
            rho[idx] = np.where(inside, 1.0 / v, rho[idx])
        return rho.reshape(shape)

    # --- states ------------------------------------------------------------------------------
    def state(
        self, *, T: FloatArray, rho: FloatArray | None = None, P: FloatArray | None = None
    ) -> MixtureState:
        """The state at T [K] and either overall density rho [kg/m³] or pressure P [Pa]."""
        return MixtureState(self, *state_inputs(self, T, rho, P))


@dataclass(frozen=True)
class BoundaryPoint:
    """A point of a mixture's phase envelope at T [K]: its pressure P [Pa], the mixture's
    density rho [kg/m³] there, and the incipient phase's mole fractions and density [kg/m³]."""

    T: float
    P: float
    rho: float
    incipient_composition: dict[str, float]
    rho_incipient: float


class MixtureState:
    """A closed-vessel state of a mixture (or an array of them), SI mass units.

    As :class:`fillcheck.thermo.fluid.State`, plus, where two-phase, the liquid and vapour
    compositions ``x`` and ``y`` (mole fractions, components on the last axis) and the vapour
    mole fraction ``vapour_fraction``.
    """

    def __init__(self, fluid: MixtureFluid, T: FloatArray, rho_mol: FloatArray) -> None:
        path = fluid.vessel_path(T, rho_mol)
        shape = np.broadcast(np.asarray(T), np.asarray(rho_mol)).shape
        n = fluid.z.size
        self.model = fluid.model
        self.T = _out(path.T.reshape(shape))
        self.P = _out(path.P.reshape(shape))
        self.rho = _out(path.rho_mol.reshape(shape) * fluid.molar_mass)
        self.Z = _out(path.P.reshape(shape) / (path.rho_mol * fluid.eos.R * path.T).reshape(shape))
        phase = path.phase.reshape(shape)
        self.phase = str(phase) if phase.ndim == 0 else phase
        q = path.quality.reshape(shape)
        self.quality = (None if np.isnan(q) else float(q)) if q.ndim == 0 else q
        self.dP_dT = _out(path.dP_dT.reshape(shape))
        self.in_range = _out(fluid.validity.contains(self.T, self.P))
        self.x = path.liquid_x.reshape((*shape, n))
        self.y = path.vapour_y.reshape((*shape, n))
        self.vapour_fraction = _out(path.vapour_fraction.reshape(shape))


def mixture(
    composition: Mapping[str, float], model: str | None = None, basis: str = "mole"
) -> MixtureFluid:
    """A mixture of catalog gases.

    Parameters
    ----------
    composition : mapping of str to float
        Gas (name, formula, alias or CAS) to its fraction [-]; fractions must sum to 1 within
        0.1 % and are then normalised.
    model : str, optional
        ``"reference"`` (multi-fluid), ``"pr-peneloux"`` or ``"pr"``; default the most accurate.
    basis : str
        ``"mole"`` (default) or ``"mass"`` fractions.
    """
    datas, z = mole_fractions(composition, basis)
    return MixtureFluid(datas, z, model)


FRACTION_SUM_TOLERANCE = 1e-3
"""Fractions must sum to 1 within this (0.1 %) [-]."""


def mole_fractions(
    composition: Mapping[str, float], basis: str = "mole"
) -> tuple[list[FluidData], np.ndarray]:
    """Catalog data and normalised mole fractions of a composition; InputError if invalid."""
    if basis not in ("mole", "mass"):
        raise InputError(f"composition basis '{basis}' is not known; use 'mole' or 'mass'")
    if len(composition) < 2:
        raise InputError("a mixture needs at least two gases")
    datas = [lookup(k) for k in composition]
    x = np.array([float(v) for v in composition.values()])
    if not np.all(np.isfinite(x)) or np.any(x <= 0.0):
        raise InputError("every fraction of a mixture must be a positive number")
    total = float(x.sum())
    if abs(total - 1.0) > FRACTION_SUM_TOLERANCE:
        raise InputError(
            f"the fractions sum to {total:.6g}; they must sum to 1 (100 %) within 0.1 %"
        )
    x = x / total
    if basis == "mass":
        x = x / np.array([d.molar_mass_kg_mol for d in datas])
        x = x / x.sum()
    return datas, x
