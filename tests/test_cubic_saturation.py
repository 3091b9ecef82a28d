"""Saturation of pure cubic models from their family's reduced curve (models/cubic_saturation.py).

Checks: the curves reproduce fillcheck's iterative saturation solver (thermo.saturation, a
bracketed Newton iteration on the fugacities, independent of the expansions) for every catalog gas
under every cubic model; at the expansions' own states the equilibrium conditions (equal pressure,
equal fugacity, computed from the model's residual Helmholtz energy) hold, up to Tc; the reduced
curve of van der Waals meets the published reduced critical point (Tc b R/a = 8/27, van der Waals
1873) and Peng–Robinson's its published Ωb/Ωa (0.07780/0.45724, Peng and Robinson 1976); CoolProp's
own Peng–Robinson and SRK saturation fall on the same reduced curves; a curve whose constants do
not match the model is refused.
"""

from __future__ import annotations

import json
import math
from pathlib import Path

import numpy as np
import pytest

from fillcheck.fluids.catalog import all_fluids
from fillcheck.models import cubic_saturation as cs
from fillcheck.models.cubic_saturation import CubicSaturation, reduced_curves
from fillcheck.models.registry import available_models
from fillcheck.thermo.fluid import fluid
from fillcheck.thermo.properties import ln_fugacity_coefficient_at_pressure, pressure

CUBICS = ("vdw", "rk", "srk", "pr", "pr-peneloux")
PAIRS = [(d.name, m) for d in all_fluids() for m in available_models(d) if m != "reference"]
rng = np.random.default_rng(20261203)


def test_three_curves_ship_and_match_the_models() -> None:
    assert set(reduced_curves()) == {"vdw", "rk", "pr"}


@pytest.mark.parametrize(("gas", "model"), PAIRS)
def test_every_pure_cubic_uses_its_curve_and_matches_the_solver(gas: str, model: str) -> None:
    f = fluid(gas, model=model)
    sa = f.superancillary
    assert isinstance(sa, CubicSaturation)
    Tc = f.model_critical[0]
    # from the triple point to 0.5 K below Tc (closer, the solver's densities lose digits:
    # its density roots sit near a triple root; the conditions test below goes up to Tc)
    T = np.sort(rng.uniform(f.T_min_saturation, Tc - 0.5, 40))
    fast = f.saturation_molar(T)
    slow = f.saturation_solved(T)
    for q in ("P", "rho_liquid", "rho_vapor"):
        np.testing.assert_allclose(getattr(fast, q), getattr(slow, q), rtol=1e-9, atol=0, err_msg=q)


@pytest.mark.parametrize("model", CUBICS)
@pytest.mark.parametrize("gas", ["nitrogen", "carbon dioxide", "propane", "ammonia", "R134a"])
def test_equilibrium_conditions_hold_up_to_the_critical_point(gas: str, model: str) -> None:
    f = fluid(gas, model=model)
    Tc = f.model_critical[0]
    T = Tc - np.geomspace(1e-6, 0.8 * (Tc - f.T_min_saturation), 60)
    s = f.saturation_molar(T)
    eos = f.eos
    P_l, P_v = pressure(eos, T, s.rho_liquid), pressure(eos, T, s.rho_vapor)
    # the pressure of a stiff liquid moves ~1/κ per unit density: judge it against ρ ∂P/∂ρ
    np.testing.assert_allclose(P_v, s.P, rtol=1e-11)
    assert np.all(s.rho_liquid > s.rho_vapor)
    d_ln_phi = ln_fugacity_coefficient_at_pressure(
        eos, T, s.rho_liquid, s.P
    ) - ln_fugacity_coefficient_at_pressure(eos, T, s.rho_vapor, s.P)
    assert np.max(np.abs(d_ln_phi)) < 1e-10
    assert np.max(np.abs(P_l / s.P - 1.0)) < 1e-6


def test_reduced_critical_points_are_the_published_ones() -> None:
    c = reduced_curves()
    # van der Waals (1873): Tc = 8a/(27 R b), vc = 3b, so T̃c = 8/27 and ρ̃c = 1/3
    assert c["vdw"].T_c == pytest.approx(8.0 / 27.0, rel=1e-15)
    _, rho_l, rho_v = c["vdw"].evaluate(np.array([8.0 / 27.0]))
    assert rho_l[0] == pytest.approx(1.0 / 3.0, rel=1e-12)
    assert rho_v[0] == pytest.approx(1.0 / 3.0, rel=1e-12)
    # Redlich–Kwong (1949): Ωa = 0.42748, Ωb = 0.08664 (as published, 5 digits)
    assert c["rk"].T_c == pytest.approx(0.08664 / 0.42748, rel=1e-4)
    # Peng–Robinson (1976): Ωa = 0.45724, Ωb = 0.07780 (as published; 5 digits: 1e-4)
    assert c["pr"].T_c == pytest.approx(0.07780 / 0.45724, rel=1e-4)


def test_van_der_waals_reduced_saturation_pressure_at_tr_0_9() -> None:
    # the van der Waals coexistence curve at T/Tc = 0.9: P/Pc = 0.6470 (tabulated in Lekner
    # (1982), Am. J. Phys. 50, 161, "Parametric solution of the van der Waals liquid-vapor
    # coexistence curve" — from memory)
    c = reduced_curves()["vdw"]
    ln_p = np.log(c.evaluate(np.array([0.9 * 8.0 / 27.0]))[0][0])
    Pr = math.exp(ln_p) / (1.0 / 27.0)  # p̃c = b²Pc/a = 1/27
    assert Pr == pytest.approx(0.6470, abs=2e-4)


@pytest.mark.parametrize("backend", ["PR", "SRK"])
@pytest.mark.parametrize("name", ["Nitrogen", "Propane", "CarbonDioxide"])
def test_coolprop_cubic_saturation_falls_on_the_reduced_curve(backend: str, name: str) -> None:
    CP = pytest.importorskip("CoolProp.CoolProp")
    a = CP.AbstractState(backend, name)
    Tc, Pc, w = a.T_critical(), a.p_critical(), a.acentric_factor()
    R = 8.314462618
    if backend == "PR":
        omega_a, omega_b, curve = 0.45723553, 0.07779607, reduced_curves()["pr"]
        m = 0.37464 + 1.54226 * w - 0.26992 * w * w
    else:
        omega_a, omega_b, curve = 0.42748023, 0.08664035, reduced_curves()["rk"]
        m = 0.480 + 1.574 * w - 0.176 * w * w
    for Tr in (0.6, 0.8, 0.95):
        T = Tr * Tc
        a.update(CP.QT_INPUTS, 0.0, T)
        P, rho_l = a.p(), a.rhomolar()
        alpha = (1.0 + m * (1.0 - math.sqrt(Tr))) ** 2
        A = omega_a * (R * Tc) ** 2 / Pc * alpha
        b = omega_b * R * Tc / Pc
        p_t, rl_t, _ = curve.evaluate(np.array([R * T * b / A]))
        # Ω here to 8 digits, and CoolProp's own R and Ω: agreement to a few 1e-6 (a wrong
        # curve, or one for another δ₁, δ₂, is off by per cents)
        assert p_t[0] * A / b**2 == pytest.approx(P, rel=2e-5)
        assert rl_t[0] / b == pytest.approx(rho_l, rel=2e-5)


def test_a_curve_whose_constants_differ_is_refused(tmp_path: Path, monkeypatch) -> None:
    spec = json.loads(cs.DATA.read_text(encoding="utf-8"))
    spec["curves"]["pr"]["omega_b"] *= 1.0 + 1e-9
    bad = tmp_path / "cubic_saturation.json"
    bad.write_text(json.dumps(spec), encoding="utf-8")
    monkeypatch.setattr(cs, "DATA", bad)
    cs.reduced_curves.cache_clear()
    try:
        assert set(cs.reduced_curves()) == {"vdw", "rk"}
        assert cs.cubic_saturation(fluid("propane", model="pr").eos, 85.5) is None
    finally:
        monkeypatch.undo()
        cs.reduced_curves.cache_clear()


def test_scalar_path_gives_the_array_numbers() -> None:
    f = fluid("propane", model="pr-peneloux")
    sa = f.superancillary
    for T in (90.0, 250.0, 369.0):
        P, rl, rv = sa.evaluate(np.array([T]))
        assert sa.evaluate_scalar(T) == pytest.approx((P[0], rl[0], rv[0]), rel=1e-15)


@pytest.mark.slow
def test_data_file_is_what_the_builder_writes() -> None:
    import subprocess
    import sys

    root = Path(__file__).resolve().parents[1]
    out = subprocess.run(
        [sys.executable, str(root / "tools" / "build_cubic_saturation.py"), "--check"],
        capture_output=True,
        text=True,
    )
    assert out.returncode == 0, out.stderr
