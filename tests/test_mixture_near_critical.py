"""A closed vessel of a mixture heated past its mixture critical point, against CoolProp 8.0.0.

R125 10 % / R152a 73 % / propane 17 % (mol) at 227 kg/m³: CoolProp's HEOS mixture puts the
mixture critical point at 372.745 K, 4.4697 MPa, 5501 mol/m³ (``all_critical_points()``), and
its (T, ρ) flash finds the vessel two-phase at 370.0 K (vapour fraction 0.97807) and one
vapour phase at 370.5 K: the isochore of 3352 mol/m³ meets the dew curve between the two.
The path once raised "no two-phase split found" from 359 K up: near the critical point the
Peng–Robinson starter has only a liquid-like root where the multi-fluid model has its vapour
root, and the vapour root, more than a factor of two from the starter's, was discarded as a
spurious one (a homogeneous vapour was then taken for a state on an inner loop).
"""

from __future__ import annotations

import CoolProp.CoolProp as CP
import numpy as np
import pytest

import fillcheck
from fillcheck.thermo import mixture_equilibrium as eq

COMPOSITION = {"R125": 0.10, "R152a": 0.73, "propane": 0.17}
CP_FLUIDS = "R125&R152a&Propane"  # CoolProp 8.0.0 names of the three gases
RHO_KG_M3 = 227.0


@pytest.fixture(scope="module")
def fluid() -> fillcheck.MixtureFluid:
    return fillcheck.mixture(COMPOSITION)


def _heos() -> CP.AbstractState:
    a = CP.AbstractState("HEOS", CP_FLUIDS)
    a.set_mole_fractions(list(COMPOSITION.values()))
    return a


def test_the_path_from_250_to_373_K_completes_and_matches_coolprop(fluid) -> None:
    """Source: CoolProp 8.0.0 HEOS, DmolarT_INPUTS, where its flash reports a result it can
    stand behind (two-phase with a vapour fraction, or one phase outside the dew curve: its
    one-phase answers between 320 and 362 K are failed flashes, the state lying inside its own
    phase envelope)."""
    assert fluid.model == "reference"
    rho = RHO_KG_M3 / fluid.molar_mass
    T = np.concatenate([np.arange(250.0, 370.0, 5.0), [365.0, 370.0, 370.5, 371.0, 372.0, 373.0]])
    path = fluid.vessel_path(T, np.full(T.shape, rho))
    two = path.phase == "two-phase"
    assert np.all(two[T <= 370.0]) and not np.any(two[T >= 370.5])
    a = _heos()
    for i in np.flatnonzero(np.isin(T, [250.0, 280.0, 300.0, 365.0, 370.0])):
        a.update(CP.DmolarT_INPUTS, rho, float(T[i]))
        assert a.phase() == CP.iphase_twophase
        assert path.P[i] == pytest.approx(a.p(), rel=1e-7)
        assert path.vapour_fraction[i] == pytest.approx(a.Q(), rel=1e-6)
    for i in np.flatnonzero(T >= 370.5):
        a.update(CP.DmolarT_INPUTS, rho, float(T[i]))
        assert a.phase() != CP.iphase_twophase
        assert path.P[i] == pytest.approx(a.p(), rel=1e-10)


def test_the_isochore_leaves_the_envelope_at_a_dew_point_between_370_and_370_5_K(fluid) -> None:
    """Source: CoolProp 8.0.0 HEOS (T, ρ) flash: two-phase at 370.0 K, vapour at 370.5 K."""
    kind, T_cross = fluid.saturation_crossing(RHO_KG_M3 / fluid.molar_mass)
    assert kind == "dew"
    assert 370.0 < T_cross < 370.5


def test_a_near_critical_vapour_root_is_kept_where_the_cubic_starter_has_none(fluid) -> None:
    """Source: CoolProp 8.0.0 HEOS, PT_INPUTS at 373 K: 3352.254 mol/m³ at 4.316129 MPa, a
    vapour; Peng–Robinson puts a single liquid-like root above 7000 mol/m³ there."""
    T, P = np.array([373.0]), np.array([4316129.390567611])
    z = fluid.z[None, :]
    v_pr, l_pr = fluid.starter.density_roots(T, P, z)
    assert v_pr[0] == l_pr[0] > 7000.0
    rv, _ = eq.density_roots(fluid.mixture, T, P, z, fluid.starter, strict=False, fill=False)
    a = _heos()
    a.update(CP.PT_INPUTS, float(P[0]), float(T[0]))
    assert rv[0] == pytest.approx(a.rhomolar(), rel=1e-9)
    assert fluid.density_molar(T, P)[0] == pytest.approx(a.rhomolar(), rel=1e-9)


def test_a_root_past_a_spinodal_is_still_refused() -> None:
    """A compressed liquid (propane 80 % / n-butane 20 % at 233.15 K, 200 bar; CoolProp 8.0.0
    HEOS: 13058.92 mol/m³) has no vapour root; the rising part of an inner loop of the
    two-phase region reaches the pressure at a lower density, past the vapour spinodal, and must
    not be taken for one."""
    f = fillcheck.mixture({"propane": 0.8, "n-butane": 0.2})
    T, P = np.array([233.15]), np.array([200e5])
    rv, rl = eq.density_roots(f.mixture, T, P, f.z[None, :], f.starter, strict=False, fill=False)
    assert np.isnan(rv[0])
    assert rl[0] == pytest.approx(13058.924256897173, rel=1e-8)
