"""Round-trip sweeps: (T, P) → density → (T, density) → P, where the solvers are hardest.

The grid hugs the saturation curve (pressures 1e-6 and 1e-3 relative above and below Psat(T),
from the triple point to 0.999 Tc) and the critical point (T within 0.1 % of Tc, P within 1 % of
Pc). At every state: no error, no NaN, a single-phase result (a stable root at a pressure off
the saturation pressure is never inside the two-phase dome, up to rounding), and the pressure
back to 1e-8.

Why 1e-8: density_TP accepts a root only if it reproduces P to 1e-9 (above a round-off floor),
and the closed-vessel path recomputes P from (T, ρ) the same way, so anything worse than that
is a solver or phase-classification fault. On top of 1e-8·P the check allows
8·eps·ρ(∂P/∂ρ)_T: the density is a double, and one unit in its last place moves P by
eps·ρ(∂P/∂ρ)_T, which for a liquid near its triple point (P ~ 1e-3 Pa, ρ(∂P/∂ρ)_T ~ 1e9 Pa)
is far more than 1e-8·P. No double-precision solver can do better than that; the allowance is
negligible everywhere else.

By default a sample runs (four gases, two models); the whole catalog with every cubic model
is marked slow (``pytest -m slow``). A property-based round trip (hypothesis) covers one gas.
"""

from __future__ import annotations

import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

import fillcheck
from fillcheck.errors import ConvergenceError
from fillcheck.fluids.catalog import all_fluids
from fillcheck.models.cubic import CUBIC_MODEL_IDS
from fillcheck.models.registry import available_models
from fillcheck.thermo import properties as props

EPS = float(np.finfo(float).eps)
SAT_OFFSETS = np.array([-1e-3, -1e-6, 1e-6, 1e-3])
"""Relative offsets of the pressure from Psat(T)."""
CRIT_T = np.array([-1e-3, -3e-4, -1e-4, 0.0, 1e-4, 3e-4, 1e-3])
"""Relative offsets of T from Tc (within 0.1 %)."""
CRIT_P = np.array([-1e-2, -3e-3, -1e-3, 0.0, 1e-3, 3e-3, 1e-2])
"""Relative offsets of P from Pc (within 1 %)."""


def sweep_states(f: fillcheck.Fluid) -> tuple[np.ndarray, np.ndarray]:
    """The (T, P) grid of one fluid and model [K], [Pa]."""
    Tc, Pc, _ = f.model_critical
    T_sat = np.concatenate([np.linspace(f.T_min_saturation, 0.99 * Tc, 10),
                            Tc * np.array([0.995, 0.998, 0.999])])
    P_sat = f.saturation_molar(T_sat).P
    T1 = np.repeat(T_sat, SAT_OFFSETS.size)
    P1 = np.outer(P_sat, 1.0 + SAT_OFFSETS).ravel()
    TT, PP = np.meshgrid(Tc * (1.0 + CRIT_T), Pc * (1.0 + CRIT_P))
    return np.concatenate([T1, TT.ravel()]), np.concatenate([P1, PP.ravel()])


def check_round_trip(f: fillcheck.Fluid, T: np.ndarray, P: np.ndarray) -> None:
    """(T, P) → ρ → (T, ρ) → P at every state, as one array call of the public API."""
    rho_mol = f.density_molar(T, P)
    assert np.all(np.isfinite(rho_mol)) and np.all(rho_mol > 0)
    assert np.all(rho_mol < f.eos.max_density_mol())
    back = f.state(T=T, rho=rho_mol * f.molar_mass)
    for value in (back.P, back.Z, back.dP_dT):
        assert np.all(np.isfinite(value))
    slope = props.dP_drho_at_constant_temperature(f.eos, T, rho_mol)
    allowed = 1e-8 * P + 8 * EPS * rho_mol * np.abs(slope)
    # A stable root off the saturation pressure lies outside the dome. The one exception is a
    # liquid so stiff that P 1e-6 above Psat moves ρ by less than one unit in its last place
    # (propane at its triple point): ρ is then the saturated-liquid density itself, and the
    # state at the edge of the dome may read "two-phase", but only with P = Psat inside the
    # rounding allowance.
    two = np.asarray(back.phase) == "two-phase"
    assert not (two & (np.abs(np.asarray(back.P) - P) > allowed)).any()
    bad = np.abs(np.asarray(back.P) - P) > allowed
    assert not bad.any(), list(zip(T[bad], P[bad], strict=True))[:5]
    # and the (T, P) entry point gives the same state
    direct = f.state(T=T, P=P)
    np.testing.assert_array_less(np.abs(np.asarray(direct.P) - P), allowed * (1 + 1e-12))
    np.testing.assert_allclose(direct.rho, rho_mol * f.molar_mass, rtol=1e-14)


def _phases_are_consistent(f: fillcheck.Fluid, T: np.ndarray, P: np.ndarray) -> None:
    """Below Tc, the stable root of a pressure above Psat is the liquid, below it the gas
    (except where P − Psat is inside the rounding allowance: see check_round_trip)."""
    s = f.state(T=T, P=P)
    phase = np.asarray(s.phase)
    Tc = f.model_critical[0]
    below = T < Tc
    P_sat = f.saturation_molar(T[below]).P
    rho_mol = np.asarray(s.rho)[below] / f.molar_mass
    slope = props.dP_drho_at_constant_temperature(f.eos, T[below], rho_mol)
    resolved = np.abs(P[below] - P_sat) > 1e-8 * P_sat + 8 * EPS * rho_mol * np.abs(slope)
    expected = np.where(P[below] > P_sat, "liquid", "gas")
    np.testing.assert_array_equal(phase[below][resolved], expected[resolved])
    assert np.all(phase[~below] == "supercritical")


SAMPLE_GASES = ["nitrogen", "carbon dioxide", "propane", "helium"]
SAMPLE_MODELS = ["pr", "srk"]


@pytest.mark.parametrize("model_id", SAMPLE_MODELS)
@pytest.mark.parametrize("name", SAMPLE_GASES)
def test_round_trip_sample(name: str, model_id: str) -> None:
    f = fillcheck.fluid(name, model=model_id)
    T, P = sweep_states(f)
    check_round_trip(f, T, P)
    _phases_are_consistent(f, T, P)


@pytest.mark.parametrize("model_id", ["pr", "srk", "pr-peneloux"])
@pytest.mark.parametrize("name", ["propane", "propylene", "isobutane", "n-butane"])
def test_liquid_density_at_low_pressure(name: str, model_id: str) -> None:
    """Compressed liquid below ~100 Pa, from the triple point to 0.45 Tc, at P = Psat·(1 + k)
    for k = 1e-6, 1e-3, 1 and 100: the stable root is the liquid root of the cubic, and
    density_TP must return it, not raise ConvergenceError.

    Such a liquid has Z ~ 1e-13, so P(T, ρ) is formed by cancellation, and a density that is
    right to a few units in its last place (it is: see test_cubic_models' exact-arithmetic
    checks) reproduces P only to ~k·eps·ρ(∂P/∂ρ)_T, about 1e-13·ρRT here.
    """
    f = fillcheck.fluid(name, model=model_id)
    T = np.linspace(f.T_min_saturation, 0.45 * f.model_critical[0], 15)
    P_sat = f.saturation_molar(T).P
    TT = np.repeat(T, 4)
    PP = np.outer(P_sat, 1.0 + np.array([1e-6, 1e-3, 1.0, 100.0])).ravel()
    _, liquid = f.eos.density_roots(TT, PP)
    failures = []
    for t, p, rho in zip(TT, PP, liquid, strict=True):
        try:
            got = float(f.density_molar(np.array([t]), np.array([p]))[0])
        except ConvergenceError:
            failures.append((float(t), float(p)))
            continue
        assert got == pytest.approx(float(rho), rel=1e-14)
    assert not failures, f"ConvergenceError at {len(failures)} liquid states, e.g. {failures[:3]}"


def _all_cases() -> list[object]:
    return [
        pytest.param(d.name, m, id=f"{d.name}-{m}")
        for d in all_fluids()
        for m in available_models(d)
        if m in CUBIC_MODEL_IDS
    ]


@pytest.mark.slow
@pytest.mark.parametrize(("name", "model_id"), _all_cases())
def test_round_trip_full(name: str, model_id: str) -> None:
    """Every catalog gas with every cubic model it offers, on the same grid densified 3×
    along the saturation curve."""
    f = fillcheck.fluid(name, model=model_id)
    T, P = sweep_states(f)
    Tc = f.model_critical[0]
    T_more = np.linspace(f.T_min_saturation, 0.999 * Tc, 40)
    P_more = np.outer(f.saturation_molar(T_more).P, 1.0 + SAT_OFFSETS).ravel()
    T = np.concatenate([T, np.repeat(T_more, SAT_OFFSETS.size)])
    P = np.concatenate([P, P_more])
    check_round_trip(f, T, P)
    _phases_are_consistent(f, T, P)


# ---------------------------------------------------------------------------------------------
# Property-based round trips on one gas
# ---------------------------------------------------------------------------------------------

CO2 = fillcheck.fluid("carbon dioxide", model="pr-peneloux")
CO2_TC, CO2_PC, CO2_RHOC = CO2.model_critical
CO2_TMIN = CO2.T_min_saturation


@settings(max_examples=50, deadline=None)
@given(
    T=st.floats(CO2_TMIN, 3.0 * CO2_TC),
    log10_P=st.floats(3.0, 8.0),
)
def test_round_trip_property_anywhere(T: float, log10_P: float) -> None:
    """Any (T, P) from the triple point to 3 Tc and 1 kPa to 100 MPa."""
    check_round_trip(CO2, np.array([T]), np.array([10.0**log10_P]))


@settings(max_examples=50, deadline=None)
@given(
    T_frac=st.floats(0.0, 0.999),
    log10_offset=st.floats(-9.0, -1.0),
    above=st.booleans(),
)
def test_round_trip_property_near_saturation(
    T_frac: float, log10_offset: float, above: bool
) -> None:
    """Pressures from 1e-9 to 0.1 relative above or below Psat(T), T from the triple point to
    0.999 Tc."""
    T = CO2_TMIN + T_frac * (CO2_TC - CO2_TMIN)
    P_sat = float(CO2.saturation_molar(np.array([T])).P[0])
    P = P_sat * (1.0 + (1.0 if above else -1.0) * 10.0**log10_offset)
    check_round_trip(CO2, np.array([T]), np.array([P]))
    phase = CO2.state(T=T, P=P).phase
    assert phase == ("liquid" if above else "gas")


@settings(max_examples=50, deadline=None)
@given(T=st.floats(CO2_TMIN, 3.0 * CO2_TC), rho_frac=st.floats(1e-6, 0.95))
def test_density_round_trip_property(T: float, rho_frac: float) -> None:
    """(T, ρ) → P → ρ for single-phase states: the stable root at P(T, ρ) is ρ again (outside
    the dome a single-phase state is the stable one), to 1e-9."""
    rho = rho_frac * CO2.eos.max_density_mol()
    s = CO2.state(T=T, rho=rho * CO2.molar_mass)
    if s.phase == "two-phase":
        return  # inside the dome (T, ρ) has no single-phase pressure to invert
    back = float(CO2.density_molar(np.array([T]), np.array([s.P]))[0])
    if T < CO2_TC:
        P_sat = float(CO2.saturation_molar(np.array([T])).P[0])
        if abs(s.P / P_sat - 1) < 1e-10:
            return  # at coexistence both roots are equally stable
    assert back == pytest.approx(rho, rel=1e-9)
