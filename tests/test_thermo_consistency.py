"""Thermodynamic consistency of the models and of the property layer built on them.

These checks need no reference data: each one is an identity every correct Helmholtz model
satisfies (Span (2000), Multiparameter Equations of State, Springer, ch. 3), so a failure is a
defect of the code, not a limitation of a model.

1. The analytic derivatives a10, a01, a20, a11, a02 against finite differences of αʳ.
2. The ideal-gas limit: Z → 1, αʳ → 0, and the second virial coefficient b − c − a/(RT).
3. Phase equilibrium at the saturation solution: equal fugacity and equal pressure.
4. Clausius–Clapeyron: the two-phase slope of the closed-vessel path against dPsat/dT.
5. Caloric properties: cp = (∂h/∂T)_P, cv = (∂u/∂T)_ρ, (∂s/∂T)_ρ = cv/T, a Maxwell relation,
   cp − cv, the speed of sound, and the ideal-gas heat capacity at vanishing density.
6. The closed-vessel path: phases, quality, dew and liquid-full temperatures, monotone pressure.
7. Typed errors, and no NaN returned.
"""

from __future__ import annotations

from collections.abc import Callable
from fractions import Fraction

import numpy as np
import pytest

import fillcheck
from fillcheck.errors import (
    FillcheckError,
    InputError,
    ModelUnavailableError,
    StateError,
    UnknownFluidError,
)
from fillcheck.fluids.catalog import all_fluids
from fillcheck.models.base import ResidualDerivatives
from fillcheck.models.cubic import CUBIC_MODEL_IDS, CubicModel
from fillcheck.models.registry import available_models
from fillcheck.thermo import properties as props
from fillcheck.thermo.vessel import saturation_crossing, vessel_path

MODELS = list(CUBIC_MODEL_IDS)  # vdw, rk, srk, pr, pr-peneloux
R = 8.314462618  # J/(mol·K), CODATA 2018 to the ten digits the cubic models use


def fluid(name: str, model: str) -> fillcheck.Fluid:
    return fillcheck.fluid(name, model=model)


# ---------------------------------------------------------------------------------------------
# 1. Analytic derivatives against finite differences
# ---------------------------------------------------------------------------------------------

# CubicModel.alphar converts its inputs with np.asarray(..., dtype=float), which drops the
# imaginary part of a complex step (numpy's ComplexWarning), so the complex-step derivative is not
# available; central differences in ln T and ln ρ with one Richardson extrapolation are used:
# truncation O(h⁴), rounding ~eps·|αʳ|/h^k. With h = 2e-3 (first derivatives) and 8e-3 (second)
# the measured excess over 1e-6·|value| is below 2e-13 (first) and 5e-10 (second) times
# max(1, |αʳ|), so the absolute floors below are 1e-11 and 1e-9 times that. The scaled
# derivatives enter every property added to 1 (Z = 1 + a01, cv/R = cv⁰/R − a20, ...), so such a
# floor is a relative error of at most 1e-9 in any property.


def numerical_derivatives(
    model: CubicModel, T: np.ndarray, rho: np.ndarray
) -> dict[str, np.ndarray]:
    """a10, a01, a20, a02, a11 from αʳ alone, by differences in x = ln T and y = ln ρ.

    τ∂/∂τ = −∂/∂x, δ∂/∂δ = ∂/∂y, so a10 = −∂αʳ/∂x, a01 = ∂αʳ/∂y,
    a20 = ∂²αʳ/∂x² + ∂αʳ/∂x, a02 = ∂²αʳ/∂y² − ∂αʳ/∂y, a11 = −∂²αʳ/∂x∂y.
    """
    x0, y0 = np.log(T), np.log(rho)

    def f(dx: float, dy: float) -> np.ndarray:
        return model.alphar(np.exp(x0 + dx), np.exp(y0 + dy)).a00

    def richardson(d: Callable[[float], np.ndarray], h: float) -> np.ndarray:
        return (4.0 * d(h / 2) - d(h)) / 3.0

    def fx(h: float) -> np.ndarray:
        return (f(h, 0) - f(-h, 0)) / (2 * h)

    def fy(h: float) -> np.ndarray:
        return (f(0, h) - f(0, -h)) / (2 * h)

    def fxx(h: float) -> np.ndarray:
        return (f(h, 0) - 2 * f(0, 0) + f(-h, 0)) / h**2

    def fyy(h: float) -> np.ndarray:
        return (f(0, h) - 2 * f(0, 0) + f(0, -h)) / h**2

    def fxy(h: float) -> np.ndarray:
        return (f(h, h) - f(h, -h) - f(-h, h) + f(-h, -h)) / (4 * h * h)

    h1, h2 = 2e-3, 8e-3
    dx, dy = richardson(fx, h1), richardson(fy, h1)
    return {
        "a10": -dx,
        "a01": dy,
        "a20": richardson(fxx, h2) + dx,
        "a02": richardson(fyy, h2) - dy,
        "a11": -richardson(fxy, h2),
    }


@pytest.mark.parametrize("model_id", MODELS)
@pytest.mark.parametrize("name", ["nitrogen", "carbon dioxide", "helium", "R134a", "propane"])
def test_derivatives_against_finite_differences(name: str, model_id: str) -> None:
    """Every analytic derivative to 1e-6 relative on a grid of T ∈ [0.45, 4]·Tc and ρ from 1e-6
    to 0.8 of the covolume limit (dilute gas to dense liquid)."""
    f = fluid(name, model_id)
    model = f.eos
    Tc = f.model_critical[0]
    T = np.array([0.45, 0.7, 1.0, 1.5, 4.0])[:, None] * Tc * np.ones((1, 6))
    x = np.array([1e-6, 1e-3, 0.05, 0.3, 0.6, 0.8])
    rho = x[None, :] * model.max_density_mol() * np.ones((5, 1))
    analytic = model.alphar(T, rho)
    numeric = numerical_derivatives(model, T, rho)
    size = np.maximum(1.0, np.abs(analytic.a00))
    for key, fd in numeric.items():
        an = getattr(analytic, key)
        floor = (1e-11 if key in ("a10", "a01") else 1e-9) * size
        excess = np.abs(fd - an) - (1e-6 * np.abs(an) + floor)
        assert np.all(excess <= 0), (key, np.unravel_index(np.argmax(excess), excess.shape))


@pytest.mark.parametrize("model_id", MODELS)
def test_mixed_derivative_symmetry(model_id: str) -> None:
    """a11 from ∂a10/∂ln ρ and from −∂a01/∂ln T (the analytic first derivatives differentiated
    once more): the two orders of differentiation agree (Schwarz), to 1e-7."""
    f = fluid("carbon dioxide", model_id)
    model = f.eos
    T = np.array([200.0, 250.0, 304.0, 400.0, 1000.0])[:, None] * np.ones((1, 4))
    rho = np.array([1.0, 1e3, 1e4, 2e4])[None, :] * np.ones((5, 1))
    h = 1e-4

    def d(dT: float, dr: float) -> ResidualDerivatives:
        return model.alphar(T * np.exp(dT), rho * np.exp(dr))

    via_rho = (d(0, h).a10 - d(0, -h).a10) / (2 * h)  # δ∂(τ∂αʳ/∂τ)/∂δ = a11
    via_T = -(d(h, 0).a01 - d(-h, 0).a01) / (2 * h)  # τ∂(δ∂αʳ/∂δ)/∂τ = a11
    a11 = model.alphar(T, rho).a11
    np.testing.assert_allclose(via_rho, a11, rtol=1e-7, atol=1e-12)
    np.testing.assert_allclose(via_T, a11, rtol=1e-7, atol=1e-12)


# ---------------------------------------------------------------------------------------------
# 2. The ideal-gas limit and the second virial coefficient
# ---------------------------------------------------------------------------------------------


@pytest.mark.parametrize("model_id", MODELS)
@pytest.mark.parametrize("name", ["nitrogen", "carbon dioxide", "propane"])
def test_ideal_gas_limit_and_second_virial(name: str, model_id: str) -> None:
    """As ρ → 0: Z → 1 and αʳ → 0 linearly, and (Z − 1)/ρ → B(T) = b − c − a/(RT), the second
    virial coefficient of any cubic of the family (expand P = RT/(v + c − b) − a/(...) in 1/v;
    for van der Waals B = b − a/(RT), van der Waals 1873; the translation enters as −c,
    Péneloux et al. 1982). (Z − 1)/ρ is extrapolated to ρ = 0 from two dilute densities."""
    f = fluid(name, model_id)
    model = f.eos
    T = np.array([0.6, 1.0, 2.0, 10.0]) * f.model_critical[0]
    a = model.attraction(T)[0]
    B = model.b - model.c - a / (model.R * T)
    rho1 = 1e-6 * model.max_density_mol()
    g1 = model.alphar(T, np.full_like(T, rho1)).a01 / rho1
    g2 = model.alphar(T, np.full_like(T, 2 * rho1)).a01 / (2 * rho1)
    # tolerances relative to the two terms that cancel in B (B = 0 at the Boyle temperature)
    scale = model.b + abs(model.c) + a / (model.R * T)
    np.testing.assert_array_less(np.abs(2 * g1 - g2 - B), 1e-9 * scale)
    # αʳ/ρ → B as well, less tightly: αʳ is formed from logarithms of numbers near 1, which
    # costs ~1e-16 absolute, ~1e-10 of αʳ at this density
    h1 = model.alphar(T, np.full_like(T, rho1)).a00 / rho1
    h2 = model.alphar(T, np.full_like(T, 2 * rho1)).a00 / (2 * rho1)
    np.testing.assert_array_less(np.abs(2 * h1 - h2 - B), 1e-7 * scale)
    tiny = np.full_like(T, 1e-12 * model.max_density_mol())
    Z = props.compressibility(model, T, tiny)
    np.testing.assert_allclose(Z, 1.0, atol=1e-11)
    # αʳ ≈ Bρ there (~1e-11), to within the absolute rounding of its logarithms of numbers
    # near 1 (~1e-15; αʳ only ever enters sums of order one: ln φ, s/R)
    np.testing.assert_allclose(model.alphar(T, tiny).a00, B * tiny, rtol=0, atol=1e-14)
    if model_id == "vdw":
        # the closed form itself: a = 27R²Tc²/(64Pc), b = RTc/(8Pc)
        Tc, Pc = f.data.critical_temperature_K, f.data.critical_pressure_Pa
        B_vdw = R * Tc / (8 * Pc) - 27 * R**2 * Tc**2 / (64 * Pc) / (R * T)
        np.testing.assert_array_less(np.abs(2 * g1 - g2 - B_vdw), 1e-9 * scale)


# ---------------------------------------------------------------------------------------------
# 3. Equal fugacity and equal pressure at saturation
# ---------------------------------------------------------------------------------------------


def exact_pressure(model: CubicModel, T: float, rho: float) -> float:
    """P(T, ρ) of the model evaluated in exact rational arithmetic on its float parameters [Pa]
    (the float formula ρRT(1 + a01) loses every digit for a liquid at low pressure)."""
    a = Fraction(float(model.attraction(np.array(T))[0]))
    T_, r = Fraction(T), Fraction(rho)
    B = Fraction(model.b) - Fraction(model.c)
    e1, e2 = 1 + Fraction(model.D1) * r, 1 + Fraction(model.D2) * r
    return float(r * Fraction(model.R) * T_ / (1 - B * r) - a * r * r / (e1 * e2))


SATURATION_GASES = ["nitrogen", "carbon dioxide", "propane", "R134a", "helium", "ammonia",
                    "hydrogen", "sulfur hexafluoride"]


@pytest.mark.parametrize("model_id", MODELS)
@pytest.mark.parametrize("name", SATURATION_GASES)
def test_saturation_equal_fugacity_and_pressure(name: str, model_id: str) -> None:
    """From the triple point to 0.999 Tc: |ln φ_l − ln φ_v| < 1e-10 (with ln φ from the known
    saturation pressure: for the liquid at low pressure Z ~ 1e-12 and 1 + a01 has no digits
    left) and both phases at the saturation pressure to 1e-9 (the vapour by the model's pressure,
    the liquid in exact arithmetic, allowing the rounding of ρ_l: eps·ρ(∂P/∂ρ)_T)."""
    f = fluid(name, model_id)
    model = f.eos
    Tc = f.model_critical[0]
    T = np.concatenate([np.linspace(f.T_min_saturation, 0.99 * Tc, 7), [0.999 * Tc]])
    sat = f.saturation_molar(T)
    assert np.all(sat.rho_liquid > sat.rho_vapor)
    ln_l = props.ln_fugacity_coefficient_at_pressure(model, T, sat.rho_liquid, sat.P)
    ln_v = props.ln_fugacity_coefficient_at_pressure(model, T, sat.rho_vapor, sat.P)
    np.testing.assert_array_less(np.abs(ln_l - ln_v), 1e-10)
    np.testing.assert_allclose(props.pressure(model, T, sat.rho_vapor), sat.P, rtol=1e-9)
    slope = props.dP_drho_at_constant_temperature(model, T, sat.rho_liquid)
    for i in range(T.size):
        rl, P = float(sat.rho_liquid[i]), float(sat.P[i])
        allowed = 1e-9 * P + 4 * 2.2e-16 * rl * abs(float(slope[i]))
        assert abs(exact_pressure(model, float(T[i]), rl) - P) <= allowed, T[i]
    # the saturation pressure rises with temperature and stays below Pc
    assert np.all(np.diff(sat.P) > 0)
    assert np.all(sat.P < f.model_critical[1])


# ---------------------------------------------------------------------------------------------
# 4. Clausius–Clapeyron
# ---------------------------------------------------------------------------------------------


@pytest.mark.parametrize(
    ("name", "model_id"),
    [(g, "pr") for g in ("nitrogen", "carbon dioxide", "R134a", "propane", "ammonia")]
    + [("carbon dioxide", m) for m in MODELS if m != "pr"],
)
def test_clausius_clapeyron(name: str, model_id: str) -> None:
    """The closed-vessel path's two-phase dP_dT (= Δh/(TΔv), Clapeyron 1834) equals a central
    difference of the saturation pressure, Richardson-extrapolated from steps of 1e-3 T and
    5e-4 T (truncation O(h⁴) ~ 1e-12; rounding ~1e-14·P/(h·dP/dT) ~ 1e-12), to 1e-6."""
    f = fluid(name, model_id)
    Tc = f.model_critical[0]
    T = np.linspace(1.02 * f.T_min_saturation, 0.98 * Tc, 6)
    sat = f.saturation_molar(T)
    rho = np.sqrt(sat.rho_liquid * sat.rho_vapor)  # inside the dome at every T
    path = vessel_path(f, T, rho)
    assert np.all(path.phase == "two-phase")
    np.testing.assert_allclose(path.P, sat.P, rtol=1e-14)

    def central(h: np.ndarray) -> np.ndarray:
        return (f.saturation_molar(T + h).P - f.saturation_molar(T - h).P) / (2 * h)

    h = 1e-3 * T
    slope = (4 * central(h / 2) - central(h)) / 3
    np.testing.assert_allclose(path.dP_dT, slope, rtol=1e-6)
    # and the State API reports the same slope
    s = f.state(T=T, rho=rho * f.molar_mass)
    np.testing.assert_allclose(s.dP_dT, path.dP_dT, rtol=1e-14)


# ---------------------------------------------------------------------------------------------
# 5. Caloric properties
# ---------------------------------------------------------------------------------------------


def _caloric_states(f: fillcheck.Fluid) -> tuple[np.ndarray, np.ndarray]:
    """Single-phase (T, P) states well away from saturation: dense, dilute and hot
    supercritical, subcritical gas, compressed liquid."""
    Tc, Pc, _ = f.model_critical
    T_liq = max(0.7 * Tc, 1.1 * f.T_min_saturation)
    T_gas = 0.85 * Tc
    P_gas = 0.3 * float(f.saturation(T_gas).P)
    P_liq = max(3.0 * float(f.saturation(T_liq).P), 0.5 * Pc)
    T = np.array([1.5 * Tc, 1.2 * Tc, 3.0 * Tc, T_gas, T_liq])
    P = np.array([2.0 * Pc, 0.1 * Pc, 5.0 * Pc, P_gas, P_liq])
    return T, P


_OFFSETS = np.array([1.0, -1.0, 0.5, -0.5])


def _derivative(values: np.ndarray, h: np.ndarray) -> np.ndarray:
    """Central differences from values at x + h·[1, −1, ½, −½] (leading axis), Richardson-
    extrapolated: (4·D(h/2) − D(h))/3, truncation O(h⁴)."""
    d_h = (values[0] - values[1]) / (2 * h)
    d_half = (values[2] - values[3]) / h
    return (4 * d_half - d_h) / 3


@pytest.mark.parametrize("model_id", MODELS)
@pytest.mark.parametrize("name", ["nitrogen", "argon", "sulfur hexafluoride", "carbon dioxide",
                                  "propane"])
def test_caloric_consistency(name: str, model_id: str) -> None:
    """At single-phase states, to 1e-7 relative (finite differences with Richardson steps of
    1e-3 T and 1e-3 ρ, truncation ~1e-10):
    - cp = (∂h/∂T)_P and cv = (∂u/∂T)_ρ (definitions);
    - (∂s/∂T)_ρ = cv/T (Gibbs equation at constant volume);
    - (∂s/∂ρ)_T = −(∂P/∂T)_ρ/ρ² (Maxwell relation (∂s/∂v)_T = (∂P/∂T)_v, mass units);
    - cp − cv = T(∂P/∂T)_ρ²/(ρ²(∂P/∂ρ)_T) and w² = (cp/cv)(∂P/∂ρ)_T (mass units);
    - State.dP_dT = (∂P/∂T)_ρ.
    The covered gases use all three ideal-gas forms (Poling polynomial, Shomate, monatomic)."""
    f = fluid(name, model_id)
    T, P = _caloric_states(f)
    s = f.state(T=T, P=P)
    assert not np.any(s.phase == "two-phase")
    rho = s.rho
    c = s.caloric()
    hT, hr = 1e-3 * T, 1e-3 * rho
    T_off = T + hT * _OFFSETS[:, None]  # (4, n)
    r_off = rho + hr * _OFFSETS[:, None]
    at_P = f.state(T=T_off, P=np.broadcast_to(P, T_off.shape))
    at_rho = f.state(T=T_off, rho=np.broadcast_to(rho, T_off.shape))
    at_T = f.state(T=np.broadcast_to(T, r_off.shape), rho=r_off)
    for states in (at_P, at_rho, at_T):
        assert not np.any(states.phase == "two-phase")
    cal_rho, cal_T = at_rho.caloric(), at_T.caloric()
    cp = _derivative(at_P.caloric()["h"], hT)
    cv = _derivative(cal_rho["u"], hT)
    ds_dT = _derivative(cal_rho["s"], hT)
    ds_drho = _derivative(cal_T["s"], hr)
    dP_dT = _derivative(at_rho.P, hT)
    dP_drho = _derivative(at_T.P, hr)
    np.testing.assert_allclose(c["cp"], cp, rtol=1e-7)
    np.testing.assert_allclose(c["cv"], cv, rtol=1e-7)
    np.testing.assert_allclose(c["cv"] / T, ds_dT, rtol=1e-7)
    np.testing.assert_allclose(ds_drho, -dP_dT / rho**2, rtol=1e-7)
    np.testing.assert_allclose(s.dP_dT, dP_dT, rtol=1e-7)
    np.testing.assert_allclose(c["cp"] - c["cv"], T * dP_dT**2 / (rho**2 * dP_drho), rtol=1e-7)
    np.testing.assert_allclose(c["w"] ** 2, c["cp"] / c["cv"] * dP_drho, rtol=1e-7)


@pytest.mark.parametrize("model_id", MODELS)
@pytest.mark.parametrize("name", ["nitrogen", "argon", "sulfur hexafluoride", "ammonia"])
def test_ideal_gas_heat_capacity_limit(name: str, model_id: str) -> None:
    """At vanishing density cp → cp⁰ of the catalog correlation and cp − cv → R/M (ideal gas);
    at ρ = 1e-9 kg/m³ the residual part is ~1e-12 of cp⁰."""
    f = fluid(name, model_id)
    corr = f.data.ideal_gas_cp
    assert corr is not None
    R_specific = f.eos.R / f.molar_mass
    for T in np.linspace(max(corr.T_min_K, f.T_min_saturation), min(corr.T_max_K, 1000.0), 5):
        c = f.state(T=float(T), rho=1e-9).caloric()
        assert c["cp"] / R_specific == pytest.approx(float(corr.cp0_over_R(T)), rel=1e-10)
        assert (c["cp"] - c["cv"]) / R_specific == pytest.approx(1.0, rel=1e-10)
        # and the ideal-gas speed of sound, w² = (cp⁰/cv⁰) R T / M
        w2 = float(corr.cp0_over_R(T)) / (float(corr.cp0_over_R(T)) - 1) * R_specific * T
        assert c["w"] ** 2 == pytest.approx(w2, rel=1e-10)


# ---------------------------------------------------------------------------------------------
# 6. The closed-vessel path
# ---------------------------------------------------------------------------------------------


def _expected_phase(f: fillcheck.Fluid, T: np.ndarray, rho: float) -> np.ndarray:
    """The phase words of INTERFACES §1, from the saturation curve directly."""
    Tc, _, rhoc = f.model_critical
    out = np.where(T >= Tc, "supercritical", "gas" if rho <= rhoc else "liquid").astype(object)
    below = T < Tc
    sat = f.saturation_molar(T[below])
    inside = (sat.rho_vapor < rho) & (rho < sat.rho_liquid)
    out[np.flatnonzero(below)[inside]] = "two-phase"
    return out


@pytest.mark.parametrize("model_id", ["pr", "pr-peneloux", "srk", "vdw"])
@pytest.mark.parametrize("name", ["carbon dioxide", "propane", "nitrogen"])
@pytest.mark.parametrize("rho_over_rhoc", [1e-3, 0.05, 0.6, 1.0, 1.6, 2.2, "full"])
def test_vessel_path(name: str, model_id: str, rho_over_rhoc: float | str) -> None:
    """Along an isochore from the triple point to 1.3 Tc:
    - the phase is "two-phase" exactly where ρ_v,sat < ρ < ρ_l,sat, "supercritical" at and
      above Tc, else "gas" (ρ < ρc) or "liquid" (INTERFACES §1);
    - quality x = (1/ρ − 1/ρ_l)/(1/ρ_v − 1/ρ_l) lies in [0, 1] in two phases, NaN (State: None)
      in one phase; P = Psat in two phases;
    - the pressure rises monotonically with temperature and dP_dT > 0;
    - the isochore meets the saturation curve at saturation_crossing: ρ_v,sat(T_dew) = ρ for
      ρ < ρc (dew), ρ_l,sat(T_full) = ρ for ρ > ρc (liquid-full), to 1e-9, with the phase
      changing there and the pressure continuous across it."""
    f = fluid(name, model_id)
    Tc, _, rhoc = f.model_critical
    if rho_over_rhoc == "full":  # denser than the saturated liquid at the triple point
        rl_min = f.saturation_molar(np.array([f.T_min_saturation])).rho_liquid[0]
        rho = 0.5 * (rl_min + f.eos.max_density_mol())
    else:
        rho = float(rho_over_rhoc) * rhoc
    T = np.linspace(f.T_min_saturation, 1.3 * Tc, 300)
    path = vessel_path(f, T, rho)
    np.testing.assert_array_equal(path.phase, _expected_phase(f, T, rho))
    two = path.phase == "two-phase"
    assert np.all(np.isnan(path.quality[~two]))
    assert np.all((path.quality[two] >= 0) & (path.quality[two] <= 1))
    if two.any():
        np.testing.assert_allclose(path.P[two], f.saturation_molar(T[two]).P, rtol=1e-14)
    assert np.all(np.diff(path.P) > 0)
    assert np.all(path.dP_dT > 0)
    assert np.all(np.isfinite(path.P))

    kind, T_cross = saturation_crossing(f, rho)
    assert kind == ("dew" if rho < rhoc else "liquid-full")
    if rho_over_rhoc == 1.0:
        assert T_cross == Tc
        return
    if T_cross is None:  # so dilute that no liquid forms above the triple point
        assert kind == "dew" and not two.any()
        assert f.saturation_molar(np.array([f.T_min_saturation])).rho_vapor[0] > rho
        return
    if rho_over_rhoc == "full":
        assert (kind, T_cross) == ("liquid-full", f.T_min_saturation)
    if kind == "liquid-full" and T_cross == f.T_min_saturation:
        # the liquid fills the vessel from the triple point on
        assert f.saturation_molar(np.array([f.T_min_saturation])).rho_liquid[0] <= rho
        assert not two.any()
        return
    branch = "rho_vapor" if kind == "dew" else "rho_liquid"
    sat_rho = getattr(f.saturation_molar(np.array([T_cross])), branch)[0]
    assert sat_rho == pytest.approx(rho, rel=1e-9)
    around = vessel_path(f, np.array([T_cross * (1 - 1e-6), T_cross * (1 + 1e-6)]), rho)
    single = "gas" if kind == "dew" else "liquid"
    assert list(around.phase) == ["two-phase", single]
    assert around.quality[0] == pytest.approx(1.0 if kind == "dew" else 0.0, abs=1e-4)
    # pressure continuous at the crossing: P(T, ρ) there equals Psat(T) there
    P_single = float(props.pressure(f.eos, np.array(T_cross), np.array(rho)))
    P_sat = float(f.saturation_molar(np.array([T_cross])).P[0])
    assert P_single == pytest.approx(P_sat, rel=1e-7)


@pytest.mark.parametrize("model_id", ["pr", "srk"])
def test_state_phase_and_quality_api(model_id: str) -> None:
    """State.quality is a float in two phases and None in one; State.P is Psat in two phases;
    State.Z is P/(ρRT) of the whole content."""
    f = fluid("carbon dioxide", model_id)
    Tc = f.model_critical[0]
    sat = f.saturation(T=280.0)
    mid = 0.5 * (sat.rho_liquid + sat.rho_vapor)
    s = f.state(T=280.0, rho=mid)
    assert s.phase == "two-phase"
    assert isinstance(s.quality, float) and 0.0 < s.quality < 1.0
    v, vl, vv = 1 / mid, 1 / sat.rho_liquid, 1 / sat.rho_vapor
    assert s.quality == pytest.approx((v - vl) / (vv - vl), rel=1e-12)
    assert s.P == pytest.approx(sat.P, rel=1e-14)
    assert s.Z == pytest.approx(s.P * f.molar_mass / (mid * f.eos.R * 280.0), rel=1e-14)
    for T, rho, phase in ((280.0, 0.5 * sat.rho_vapor, "gas"), (280.0, 1.05 * sat.rho_liquid,
                          "liquid"), (1.1 * Tc, mid, "supercritical")):
        s = f.state(T=T, rho=rho)
        assert s.phase == phase
        assert s.quality is None


# ---------------------------------------------------------------------------------------------
# 7. Typed errors; no NaN
# ---------------------------------------------------------------------------------------------


@pytest.mark.parametrize("model_id", MODELS)
def test_saturation_outside_its_range_raises_state_error(model_id: str) -> None:
    f = fluid("carbon dioxide", model_id)
    Tc = f.model_critical[0]
    for T in (Tc, 1.01 * Tc, 2 * Tc, 0.99 * f.T_min_saturation, 10.0):
        with pytest.raises(StateError):
            f.saturation(T)
        with pytest.raises(StateError):
            f.saturation_molar(np.array([250.0, T]))  # one bad temperature in an array


def test_bad_names_and_inputs_raise_typed_errors() -> None:
    with pytest.raises(UnknownFluidError):
        fillcheck.fluid("nonsense")
    with pytest.raises(UnknownFluidError):
        fillcheck.fluid("")
    with pytest.raises(ModelUnavailableError):
        fillcheck.fluid("argon", model="bwr")
    f = fillcheck.fluid("argon", model="pr")
    bad: list[dict[str, float]] = [
        {"T": -1.0, "P": 1e5},
        {"T": 0.0, "P": 1e5},
        {"T": float("nan"), "P": 1e5},
        {"T": float("inf"), "P": 1e5},
        {"T": 300.0, "P": -1e5},
        {"T": 300.0, "P": float("nan")},
        {"T": 300.0, "rho": 0.0},
        {"T": 300.0, "rho": -5.0},
        {"T": 300.0},
        {"T": 300.0, "P": 1e5, "rho": 1.0},
    ]
    for kwargs in bad:
        with pytest.raises(InputError):
            f.state(**kwargs)
    with pytest.raises(InputError):
        f.saturation(-5.0)
    with pytest.raises(StateError):  # denser than the covolume allows
        f.state(T=300.0, rho=2 * f.eos.max_density_mol() * f.molar_mass)
    # caloric properties need an ideal-gas heat capacity: R1234yf has none in the catalog
    gas = fillcheck.fluid("R1234yf", model="pr")
    assert gas.data.ideal_gas_cp is None
    with pytest.raises(InputError):
        gas.state(T=400.0, P=1e5).caloric()
    # caloric properties are single-phase properties
    sat = f.saturation(120.0)
    with pytest.raises(StateError):
        f.state(T=120.0, rho=0.5 * (sat.rho_liquid + sat.rho_vapor)).caloric()


def _finite_or_typed_error(f: fillcheck.Fluid, T: np.ndarray, **given: np.ndarray) -> None:
    """f.state over a grid is finite everywhere; if the grid as a whole raises, every point
    must either give a finite state or raise a FillcheckError on its own."""
    try:
        states = [f.state(T=T, **given)]
    except FillcheckError:
        states = []
        for i in range(T.size):
            try:
                states.append(f.state(T=T.flat[i], **{k: v.flat[i] for k, v in given.items()}))
            except FillcheckError:
                continue
    for s in states:
        for value in (s.P, s.rho, s.Z, s.dP_dT):
            assert np.all(np.isfinite(value))
        q = np.asarray(s.quality if s.quality is not None else np.nan, dtype=float)
        assert np.all(np.isnan(q) | ((q >= 0) & (q <= 1)))


@pytest.mark.parametrize("model_id", MODELS)
@pytest.mark.parametrize("name", ["nitrogen", "carbon dioxide", "helium", "R134a"])
def test_never_nan(name: str, model_id: str) -> None:
    """Over T from the triple point to 10 Tc and P from 1 Pa to 1 GPa, and over (T, ρ) up to
    0.99 of the covolume limit, every state is finite or a typed error: never NaN."""
    f = fluid(name, model_id)
    Tc = f.model_critical[0]
    T = np.geomspace(f.T_min_saturation, 10 * Tc, 25)
    TT, PP = np.meshgrid(T, np.geomspace(1.0, 1e9, 19))
    _finite_or_typed_error(f, TT, P=PP)
    rho = np.geomspace(1e-6, 0.99, 23) * f.eos.max_density_mol() * f.molar_mass
    TT, RR = np.meshgrid(T, rho)
    _finite_or_typed_error(f, TT, rho=RR)


def test_every_catalog_gas_builds_every_cubic_model() -> None:
    """Each catalog gas builds every cubic model the registry lists for it (the reference
    equations are tested elsewhere), and each one gives a finite supercritical state at 1.2 Tc
    and 0.5 Pc."""
    for data in all_fluids():
        cubics = [m for m in available_models(data) if m in MODELS]
        assert len(cubics) >= 4, data.name  # vdW, RK, SRK, PR for every gas
        for model_id in cubics:
            f = fillcheck.fluid(data.name, model=model_id)
            Tc, Pc, _ = f.model_critical
            s = f.state(T=1.2 * Tc, P=0.5 * Pc)
            assert np.isfinite(s.rho) and s.phase == "supercritical", (data.name, model_id)
