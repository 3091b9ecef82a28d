"""Mixture phase boundaries and the cubic mixture's composition derivative.

Independent reference: CoolProp 8.0.0 HEOS mixtures (the same GERG-2008-form parameters as
fillcheck's multi-fluid data file), whose (T, Q) flash gives dew and bubble points. Physics:
the fugacity derivative of the cubic mixture against central differences of n·αʳ; a split
vessel's vapour fraction goes to 1 at the dew point and to 0 at the bubble point.
"""

from __future__ import annotations

import numpy as np
import pytest

import fillcheck
from fillcheck.errors import StateError
from fillcheck.models.cubic import CubicComponent, CubicModel
from fillcheck.models.cubic_mixture import CubicMixture

CP = pytest.importorskip("CoolProp.CoolProp")

# (fillcheck composition, CoolProp fluid string, temperatures [K]) — points inside each envelope
# (nitrogen–CO2 30/70 at 250 K lies close to that mixture's critical point)
CASES = [
    ({"propane": 0.6, "n-butane": 0.4}, "Propane&n-Butane", (250.0, 300.0, 350.0)),
    ({"methane": 0.3, "ethane": 0.7}, "Methane&Ethane", (200.0, 240.0)),
    ({"nitrogen": 0.3, "carbon dioxide": 0.7}, "Nitrogen&CarbonDioxide", (225.0, 250.0)),
]


def coolprop_point(fluid: str, z: np.ndarray, T: float, Q: float) -> tuple[float, float, list]:
    """CoolProp 8.0.0: pressure [Pa], mixture density [kg/m³] and incipient phase's mole
    fractions at the (T, Q) point."""
    state = CP.AbstractState("HEOS", fluid)
    state.set_mole_fractions(list(z))
    state.update(CP.QT_INPUTS, Q, T)
    incipient = state.mole_fractions_vapor() if Q == 0 else state.mole_fractions_liquid()
    return state.p(), state.rhomass(), list(incipient)


@pytest.mark.parametrize(("composition", "cp_name", "temperatures"), CASES)
def test_bubble_and_dew_points_against_coolprop(composition, cp_name, temperatures):
    m = fillcheck.mixture(composition)
    assert m.model == "reference"
    for T in temperatures:
        for Q, point in ((0.0, m.bubble_point(T)), (1.0, m.dew_point(T))):
            P, rho, w = coolprop_point(cp_name, m.z, T, Q)  # CoolProp 8.0.0
            assert point.P == pytest.approx(P, rel=1e-7), (T, Q)
            assert point.rho == pytest.approx(rho, rel=1e-7), (T, Q)
            got = np.array(list(point.incipient_composition.values()))
            np.testing.assert_allclose(got, w, rtol=1e-6, atol=1e-9)


def test_no_bubble_point_above_the_two_phase_region():
    m = fillcheck.mixture({"propane": 0.6, "n-butane": 0.4})
    with pytest.raises(StateError, match="one phase"):
        m.bubble_point(440.0)


def test_vapour_fraction_is_one_at_the_dew_point_and_zero_at_the_bubble_point():
    m = fillcheck.mixture({"propane": 0.6, "n-butane": 0.4})
    T = 300.0
    dew, bubble = m.dew_point(T), m.bubble_point(T)
    just_inside = m.state(
        T=np.array([T, T]), rho=np.array([dew.rho * (1 + 1e-5), bubble.rho * (1 - 1e-6)])
    )
    assert list(just_inside.phase) == ["two-phase", "two-phase"]
    beta = np.asarray(just_inside.vapour_fraction)
    assert beta[0] == pytest.approx(1.0, abs=1e-3)
    assert beta[1] == pytest.approx(0.0, abs=1e-3)
    # the split's pressure meets the boundary pressures there
    P = np.asarray(just_inside.P)
    assert P[0] == pytest.approx(dew.P, rel=1e-4)
    assert P[1] == pytest.approx(bubble.P, rel=1e-4)
    outside = m.state(
        T=np.array([T, T]), rho=np.array([dew.rho * (1 - 1e-4), bubble.rho * (1 + 1e-4)])
    )
    assert list(outside.phase) == ["gas", "liquid"]


COMPONENTS = [
    CubicComponent(150.687, 4.863e6, -0.002, 3e-6),  # invented inputs: derivative checks only
    CubicComponent(304.128, 7.3773e6, 0.225, 5e-6),
    CubicComponent(190.56, 4.599e6, 0.011, 1e-6),
]


@pytest.mark.parametrize("kind", ["vdw", "rk", "srk", "pr", "pr-peneloux"])
def test_cubic_fugacity_derivative_against_central_differences(kind):
    kij = np.array([[0.0, 0.1, 0.02], [0.1, 0.0, -0.05], [0.02, -0.05, 0.0]])
    m = CubicMixture(kind, COMPONENTS, kij)
    T, V = 250.0, 1.0 / 5000.0
    n = np.array([0.5, 0.3, 0.2])

    def n_alphar(moles: np.ndarray) -> float:
        N = moles.sum()
        return float(N * m.alphar(np.array(T), np.array(N / V), moles / N).a00)

    N = n.sum()
    got = m.dalphar_dn(np.array(T), np.array(N / V), n / N)
    a00 = n_alphar(n) / N
    h = 1e-6
    for i in range(3):
        e = np.eye(3)[i] * h
        fd = (n_alphar(n + e) - n_alphar(n - e)) / (2 * h) - a00
        assert got[i] == pytest.approx(fd, abs=1e-8)


@pytest.mark.parametrize("kind", ["vdw", "rk", "srk", "pr", "pr-peneloux"])
def test_cubic_mixture_of_one_component_is_the_pure_model(kind):
    pure = CubicModel(kind, COMPONENTS[:1])
    mix = CubicMixture(kind, COMPONENTS[:1])
    T = np.array([120.0, 200.0, 300.0])
    rho = np.array([100.0, 5000.0, 20000.0])
    a, b = pure.alphar(T, rho), mix.alphar(T, rho, np.ones((3, 1)))
    for name in ("a00", "a10", "a01", "a20", "a11", "a02"):
        np.testing.assert_allclose(getattr(b, name), getattr(a, name), rtol=1e-13)
