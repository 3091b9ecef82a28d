"""The multi-fluid mixture model (GERG-2008 form) against CoolProp 8.0.0 and against itself.

CoolProp 8.0.0's HEOS mixtures evaluate the same model from the same published parameters
(Kunz, Wagner (2012), J. Chem. Eng. Data 57, 3032 and the pair publications named in
``fluids/data/mixtures/multifluid_pairs.json``), so a faithful evaluator agrees with it to
round-off. The checks:

1. αʳ and its five scaled derivatives and the pressure at gas and liquid-like densities, for the
   mixtures a cylinder may hold, against CoolProp: 1e-9 relative (plus 1e-12 absolute).
2. ln φᵢ = αʳ + n(∂αʳ/∂nᵢ) − ln Z against ln of CoolProp's ``fugacity_coefficient(i)``.
3. Every derivative against central finite differences of the model itself (τ, δ, and the
   nᵢ-derivative of n·αʳ at constant T and V).
4. A pure composition gives the pure reference equation; the order of components is immaterial;
   the arrays broadcast.
5. The data file: every pair has a source, the parameters are CoolProp's, and the loader refuses
   an unknown term type, an unknown reducing form and ragged arrays.
"""

from __future__ import annotations

import copy
import json
import math
from itertools import combinations

import CoolProp.CoolProp as CP
import numpy as np
import pytest

from fillcheck.errors import ModelUnavailableError
from fillcheck.models.mixture_base import FixedComposition, MixtureModel
from fillcheck.models.multifluid import (
    DATA_FILE,
    GAS_CONSTANT,
    MixtureDataError,
    MultiFluidModel,
    covered,
    pair_parameters,
    parse_pairs,
)
from fillcheck.models.multiparameter import load_reference_equation

DATA = json.loads(DATA_FILE.read_text(encoding="utf-8"))

#: (components, allow_estimates): the mixtures compared with CoolProp. Helium/oxygen is a
#: combining-rule estimate in GERG-2008 (all four parameters unity), accepted only on request.
MIXTURES = [
    (("argon", "carbon dioxide"), False),
    (("nitrogen", "carbon dioxide"), False),
    (("oxygen", "nitrogen"), False),
    (("helium", "oxygen"), True),
    (("hydrogen", "nitrogen"), False),
    (("methane", "ethane"), False),
    (("propane", "n-butane"), False),
    (("argon", "oxygen"), False),
    (("argon", "helium"), False),  # Gaussian departure terms (Tkaczuk et al. 2020)
    (("R32", "R125"), False),  # ξ/ζ reducing form (Lemmon, Jacobsen 2004)
    (("nitrogen", "oxygen", "argon"), False),
    (("methane", "nitrogen", "carbon dioxide", "ethane"), False),
]
#: (τ, δ) at which each mixture is evaluated: dilute gas, dense gas, liquid-like density
REDUCED_STATES = ((0.4, 0.02), (0.8, 0.6), (1.05, 2.4), (0.95, 1.3))


def _ids(m):
    return "-".join(m[0])


def _composition(n: int) -> np.ndarray:
    x = np.linspace(1.0, 2.0, n) ** 2
    return x / x.sum()


def _coolprop(names: tuple[str, ...], x: np.ndarray) -> CP.AbstractState:
    AS = CP.AbstractState("HEOS", "&".join(_cp_name(n) for n in names))
    AS.set_mole_fractions(list(x))
    AS.specify_phase(CP.iphase_gas)  # single-phase evaluation at the given (T, ρ)
    return AS


def _cp_name(name: str) -> str:
    path = DATA_FILE.parents[1] / "reference" / f"{name.replace(' ', '_')}.json"
    return json.loads(path.read_text(encoding="utf-8"))["coolprop_name"]


@pytest.fixture(scope="module", params=MIXTURES, ids=_ids)
def mixture(request):
    names, est = request.param
    return MultiFluidModel(names, allow_estimates=est)


def _states(model: MultiFluidModel) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
    x = _composition(model.n_components)
    Tr, rho_r = (float(v) for v in model.reducing(x))
    T = np.array([Tr / t for t, _ in REDUCED_STATES])
    rho = np.array([d * rho_r for _, d in REDUCED_STATES])
    return T, rho, np.broadcast_to(x, (T.size, x.size))


# --------------------------------------------------------------------------------------------
# 1–2. Against CoolProp 8.0.0
# --------------------------------------------------------------------------------------------


def test_alphar_and_pressure_match_coolprop(mixture):
    """Source of every reference value: CoolProp 8.0.0, HEOS mixture, DmolarT inputs."""
    T, rho, x = _states(mixture)
    AS = _coolprop(mixture.names, x[0])
    assert math.isclose(AS.gas_constant(), GAS_CONSTANT, rel_tol=1e-15)
    got = mixture.alphar(T, rho, x)
    Tr, rho_r = mixture.reducing(x)
    for k in range(T.size):
        AS.update(CP.DmolarT_INPUTS, rho[k], T[k])
        tau, delta = AS.tau(), AS.delta()
        assert math.isclose(Tr[k], AS.T_reducing(), rel_tol=1e-13)
        assert math.isclose(rho_r[k], AS.rhomolar_reducing(), rel_tol=1e-13)
        ref = {
            "a00": AS.alphar(),
            "a10": tau * AS.dalphar_dTau(),
            "a01": delta * AS.dalphar_dDelta(),
            "a20": tau**2 * AS.d2alphar_dTau2(),
            "a11": tau * delta * AS.d2alphar_dDelta_dTau(),
            "a02": delta**2 * AS.d2alphar_dDelta2(),
        }
        for key, value in ref.items():
            np.testing.assert_allclose(
                getattr(got, key)[k], value, rtol=1e-9, atol=1e-12, err_msg=f"{key} at {k}"
            )
        P = rho[k] * GAS_CONSTANT * T[k] * (1.0 + got.a01[k])
        np.testing.assert_allclose(P, AS.p(), rtol=1e-9, atol=1e-9 * rho[k] * 8.3 * T[k])


def test_ln_fugacity_coefficients_match_coolprop(mixture):
    """Source: CoolProp 8.0.0 ``fugacity_coefficient(i)`` at the same (T, ρ, x)."""
    T, rho, x = _states(mixture)
    AS = _coolprop(mixture.names, x[0])
    d = mixture.alphar(T, rho, x)
    dn = mixture.dalphar_dn(T, rho, x)
    assert dn.shape == x.shape
    for k in range(T.size):
        Z = 1.0 + d.a01[k]
        if Z <= 0.0:  # no fugacity at a mechanically impossible state
            continue
        AS.update(CP.DmolarT_INPUTS, rho[k], T[k])
        ln_phi = d.a00[k] + dn[k] - math.log(Z)
        ref = [math.log(AS.fugacity_coefficient(i)) for i in range(mixture.n_components)]
        np.testing.assert_allclose(ln_phi, ref, rtol=1e-9, atol=1e-11)


def test_covered_pairs_all_agree_with_coolprop_at_one_state():
    """Every pair in the file, at one dense-gas state and x = (0.3, 0.7): αʳ, δαʳ_δ and ln φ
    against CoolProp 8.0.0 (the build script checks nine states a pair)."""
    pairs = parse_pairs(DATA)
    x = np.array([0.3, 0.7])
    for p in pairs.values():
        m = MultiFluidModel(p.names, allow_estimates=True)
        Tr, rho_r = (float(v) for v in m.reducing(x))
        T, rho = Tr / 0.7, 0.8 * rho_r
        AS = _coolprop(p.names, x)
        AS.update(CP.DmolarT_INPUTS, rho, T)
        d = m.alphar(np.array(T), np.array(rho), x)
        ln_phi = float(d.a00) + m.dalphar_dn(np.array(T), np.array(rho), x) - math.log1p(d.a01)
        ref = [math.log(AS.fugacity_coefficient(i)) for i in range(2)]
        np.testing.assert_allclose(float(d.a00), AS.alphar(), rtol=1e-9, atol=1e-12)
        np.testing.assert_allclose(ln_phi, ref, rtol=1e-9, atol=1e-11, err_msg=str(p.names))


# --------------------------------------------------------------------------------------------
# 3. Finite differences of the model itself
# --------------------------------------------------------------------------------------------


def test_tau_delta_derivatives_match_finite_differences(mixture):
    T, rho, x = _states(mixture)
    h = 1e-5
    d = mixture.alphar(T, rho, x)

    def at(s_tau: float, s_delta: float):
        # ln τ shifted by s_tau (T → T e^(−s)), ln δ by s_delta; composition fixed
        return mixture.alphar(T * math.exp(-s_tau), rho * math.exp(s_delta), x)

    tp, tm, dp, dm = at(h, 0), at(-h, 0), at(0, h), at(0, -h)
    a10 = (tp.a00 - tm.a00) / (2 * h)
    a01 = (dp.a00 - dm.a00) / (2 * h)
    a20 = (tp.a10 - tm.a10) / (2 * h) - d.a10
    a02 = (dp.a01 - dm.a01) / (2 * h) - d.a01
    a11 = (tp.a01 - tm.a01) / (2 * h)
    for got, fd in ((d.a10, a10), (d.a01, a01), (d.a20, a20), (d.a02, a02), (d.a11, a11)):
        np.testing.assert_allclose(got, fd, rtol=1e-7, atol=1e-9)


def test_mole_number_derivative_matches_finite_differences(mixture):
    """∂(nαʳ)/∂nᵢ at constant T, V = αʳ + n(∂αʳ/∂nᵢ), by central differences in nᵢ."""
    T, rho, x = _states(mixture)
    V = 1.0 / rho  # for n = 1 mol
    h = 1e-6
    d = mixture.alphar(T, rho, x)
    dn = mixture.dalphar_dn(T, rho, x)
    for i in range(mixture.n_components):
        vals = []
        for s in (h, -h):
            n = x.copy()
            n[:, i] += s
            ntot = n.sum(-1)
            vals.append(ntot * mixture.alphar(T, ntot / V, n / ntot[:, None]).a00)
        fd = (vals[0] - vals[1]) / (2 * h)
        np.testing.assert_allclose(d.a00 + dn[:, i], fd, rtol=1e-7, atol=1e-9)


# --------------------------------------------------------------------------------------------
# 4. Pure limits, permutation, broadcasting, the contract
# --------------------------------------------------------------------------------------------


@pytest.mark.parametrize("names", [("argon", "carbon dioxide"), ("nitrogen", "oxygen", "argon")])
def test_pure_composition_is_the_pure_reference_equation(names):
    m = MultiFluidModel(names)
    T = np.array([120.0, 300.0, 450.0])
    rho = np.array([50.0, 9000.0, 20000.0])
    for i, name in enumerate(names):
        x = np.zeros((T.size, len(names)))
        x[:, i] = 1.0
        got, ref = m.alphar(T, rho, x), load_reference_equation(name).alphar(T, rho)
        for key in ("a00", "a10", "a01", "a20", "a11", "a02"):
            np.testing.assert_allclose(getattr(got, key), getattr(ref, key), rtol=1e-13)
        pure = load_reference_equation(name)
        Tr, rho_r = m.reducing(x)
        np.testing.assert_allclose(Tr, pure.T_r, rtol=1e-15)
        np.testing.assert_allclose(rho_r, pure.rho_r, rtol=1e-15)


def test_order_of_components_is_immaterial():
    names = ("nitrogen", "oxygen", "argon")
    T, rho = np.array([90.0, 300.0]), np.array([30000.0, 400.0])
    x = np.array([[0.78, 0.21, 0.01], [0.2, 0.3, 0.5]])
    m = MultiFluidModel(names)
    d, dn = m.alphar(T, rho, x), m.dalphar_dn(T, rho, x)
    for perm in ((2, 0, 1), (1, 2, 0), (0, 2, 1)):
        mp = MultiFluidModel(tuple(names[k] for k in perm))
        dp, dnp = mp.alphar(T, rho, x[:, perm]), mp.dalphar_dn(T, rho, x[:, perm])
        for key in ("a00", "a10", "a01", "a20", "a11", "a02"):
            np.testing.assert_allclose(getattr(dp, key), getattr(d, key), rtol=1e-13)
        np.testing.assert_allclose(dnp, dn[:, perm], rtol=1e-12, atol=1e-14)


def test_arrays_broadcast_without_loops():
    m = MultiFluidModel(("argon", "carbon dioxide"))
    T = np.array([[250.0], [320.0]]) * np.ones((2, 3))
    rho = np.array([100.0, 5000.0, 15000.0]) * np.ones((2, 3))
    x = np.stack([np.full((2, 3), 0.4), np.full((2, 3), 0.6)], axis=-1)
    d, dn = m.alphar(T, rho, x), m.dalphar_dn(T, rho, x)
    assert d.a00.shape == (2, 3) and dn.shape == (2, 3, 2)
    one = m.alphar(np.array(320.0), np.array(5000.0), np.array([0.4, 0.6]))
    assert float(one.a01) == pytest.approx(d.a01[1, 1], rel=1e-15)
    assert m.max_density_mol(x).shape == (2, 3)


def test_contract_and_references():
    m = MultiFluidModel(("argon", "carbon dioxide"))
    assert isinstance(m, MixtureModel)
    assert m.info.id == "reference" and "GERG-2008" in m.info.name
    refs = m.info.references
    assert refs[0] == "Kunz, Wagner (2012), J. Chem. Eng. Data 57, 3032"
    assert load_reference_equation("argon").publication in refs
    assert load_reference_equation("carbon dioxide").publication in refs
    assert any("Gernert" in r for r in refs)  # the Ar/CO2 pair (EOS-CG)
    # the fixed-composition view gives the same αʳ
    fixed = FixedComposition(m, np.array([0.5, 0.5]))
    a = fixed.alphar(np.array([300.0]), np.array([1000.0]))
    b = m.alphar(np.array([300.0]), np.array([1000.0]), np.array([[0.5, 0.5]]))
    assert float(a.a00[0]) == float(b.a00[0])


def test_missing_and_estimated_pairs_are_refused():
    with pytest.raises(ModelUnavailableError, match="argon/chlorine"):
        MultiFluidModel(("argon", "chlorine"))
    with pytest.raises(ModelUnavailableError, match=r"helium/oxygen.*estimate"):
        MultiFluidModel(("helium", "oxygen"))
    with pytest.raises(ModelUnavailableError, match="reference equation"):
        MultiFluidModel(("argon", "no such gas"))
    assert pair_parameters("argon", "chlorine") is None
    assert pair_parameters("helium", "oxygen") is None
    assert pair_parameters("helium", "oxygen", allow_estimates=True) is not None
    assert covered(("nitrogen", "oxygen", "argon"))
    assert not covered(("nitrogen", "oxygen", "argon", "helium"))
    assert covered(("helium", "oxygen"), allow_estimates=True)


def test_pair_orientation_inverts_the_betas():
    a, b = pair_parameters("argon", "carbon dioxide"), pair_parameters("carbon dioxide", "argon")
    assert a.names == ("argon", "carbon dioxide") and b.names == ("carbon dioxide", "argon")
    assert a.beta_T == pytest.approx(1.0 / b.beta_T, rel=1e-15)
    assert a.beta_v == pytest.approx(1.0 / b.beta_v, rel=1e-15)
    assert (a.gamma_T, a.gamma_v, a.F) == (b.gamma_T, b.gamma_v, b.F)


# --------------------------------------------------------------------------------------------
# 5. The data file
# --------------------------------------------------------------------------------------------


def test_every_pair_has_a_source_and_coolprop_parameters():
    """Source: CoolProp 8.0.0 ``get_mixture_binary_pair_data`` (CAS order as CoolProp keeps it)."""
    assert DATA["pairs"]
    for entry in DATA["pairs"]:
        where = "/".join(entry["components"])
        assert entry["source"].strip() and entry["source_key"], where
        assert entry["source"][0].isupper() and "(" in entry["source"], where
        if entry["departure"] is not None:
            assert entry["departure"]["source"].strip(), where
        if entry["estimate"]:
            assert entry["estimate_basis"], where
        assert entry["verification"]["max_relative_deviation"] < 1e-8, where
        c1, c2 = entry["cas"]
        r = entry["reducing"]
        assert float(CP.get_mixture_binary_pair_data(c1, c2, "F")) == entry["F"], where
        if r["form"] == "GERG-2008":
            for key, cp_key in (("beta_T", "betaT"), ("gamma_T", "gammaT"), ("beta_v", "betaV")):
                assert float(CP.get_mixture_binary_pair_data(c1, c2, cp_key)) == r[key], where
    names = {n for e in DATA["pairs"] for n in e["components"]}
    for a, b in combinations(sorted(names), 2):
        listed = f"{a}/{b}" in DATA["pairs_without_published_parameters"]
        assert listed == (pair_parameters(a, b, allow_estimates=True) is None), (a, b)


def _one_pair(mutate) -> dict:
    doc = {"pairs": [copy.deepcopy(next(e for e in DATA["pairs"] if e["departure"]))]}
    mutate(doc["pairs"][0])
    return doc


def test_loader_refuses_unknown_term_type():
    def bad(e):
        e["departure"]["terms"][0]["type"] = "polynomial"

    with pytest.raises(MixtureDataError, match="unknown departure term type"):
        parse_pairs(_one_pair(bad))


def test_loader_refuses_ragged_arrays():
    def bad(e):
        e["departure"]["terms"][-1]["n"] = e["departure"]["terms"][-1]["n"][:-1]

    with pytest.raises(MixtureDataError, match="differ in length"):
        parse_pairs(_one_pair(bad))


def test_loader_refuses_unknown_reducing_form_and_missing_source():
    def form(e):
        e["reducing"]["form"] = "van der Waals"

    def source(e):
        e["source"] = " "

    with pytest.raises(MixtureDataError, match="unknown reducing-function form"):
        parse_pairs(_one_pair(form))
    with pytest.raises(MixtureDataError, match="no source"):
        parse_pairs(_one_pair(source))
