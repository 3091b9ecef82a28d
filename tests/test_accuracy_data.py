"""The measured-accuracy file is honest: errors re-measured off its grid stay within it.

``fillcheck/fluids/data/cubic_accuracy.json`` is written by tools/measure_cubic_accuracy.py
against the reference equations of state evaluated by CoolProp 8.0.0. Here states *between* the
grid points of that tool (shifted by half a step in temperature and in log pressure) are
measured again for gases whose critical point lies far from the box, where the error surface is
smooth; they must not exceed the stored largest error by more than a tenth of it.
"""

from __future__ import annotations

import CoolProp.CoolProp as CP
import numpy as np
import pytest

import fillcheck
from fillcheck.models.cubic import CUBIC_MODEL_IDS

SMOOTH_GASES = ["nitrogen", "argon", "hydrogen", "helium", "air", "carbon monoxide"]


@pytest.mark.parametrize("gas", SMOOTH_GASES)
@pytest.mark.parametrize("model", CUBIC_MODEL_IDS)
def test_density_error_within_stored_maximum(gas: str, model: str) -> None:
    f = fillcheck.fluid(gas, model=model)
    acc = f.accuracy
    assert acc is not None
    T = np.arange(acc.T_min_K + 2.5, acc.T_max_K, 10.0)
    P = np.geomspace(1e5, acc.P_max_Pa, 40)[:-1] * np.sqrt(
        np.geomspace(1e5, acc.P_max_Pa, 40)[1] / 1e5
    )
    TT, PP = np.meshgrid(T, P)
    rho = f.state(T=TT.ravel(), P=PP.ravel()).rho
    ref = np.array(
        [
            CP.PropsSI("D", "T", t, "P", p, f.data.coolprop_name)
            for t, p in zip(TT.ravel(), PP.ravel(), strict=True)
        ]
    )
    worst = float(np.max(np.abs(rho / ref - 1.0)))
    assert worst <= 1.1 * acc.errors[model].density


def test_peneloux_shift_translates_volumes_only() -> None:
    # Péneloux, Rauzy & Fréze (1982): v = v_PR − c at the same (T, P); phase equilibrium unchanged.
    pr = fillcheck.fluid("propane", model="pr")
    pen = fillcheck.fluid("propane", model="pr-peneloux")
    c = pen.accuracy.volume_shift_m3_mol
    T, P = np.array([250.0, 300.0, 330.0]), np.array([5e6, 2e6, 2.5e6])
    v_pr = 1.0 / pr.density_molar(T, P)
    assert 1.0 / pen.density_molar(T, P) == pytest.approx(v_pr - c, rel=1e-10)
    assert pen.saturation(T).P == pytest.approx(pr.saturation(T).P, rel=1e-10)


def test_default_model_is_the_most_accurate_available() -> None:
    from fillcheck.models.registry import available_models

    for name in fillcheck.available_fluids():
        f = fillcheck.fluid(name)
        if f.data.coolprop_name is not None:
            # a published reference equation ships for every gas CoolProp carries
            assert f.model == "reference"
        elif f.accuracy is None:
            assert f.model == "pr"
        cubics = [m for m in available_models(f.data) if m != "reference"]
        if f.accuracy is not None:
            errors = [f.accuracy.errors[m].table_density for m in cubics]
            assert errors == sorted(errors)  # cubics ordered by their measured error
