"""Measure every cubic model of every catalog gas against its reference equation of state.

Development-time tool. The reference is fillcheck's own evaluation of each gas's published
reference equation of state (verified against CoolProp 8.0.0 in tests/test_reference_equations.py);
CoolProp is used here only for its melting lines, to leave solid states out. Writes
``fillcheck/fluids/data/cubic_accuracy.json`` (fitted Péneloux shifts and the errors that the
checks compare with their margins) and ``docs/accuracy.md`` (the published error table).

Run: ``python tools/measure_cubic_accuracy.py``  (about a minute).

Method
------
The *validity box* of a gas is T from max(223.15 K, triple point) to 343.15 K and P from 0.1 MPa
to 50 MPa (100 MPa for hydrogen, helium and neon). On a grid over it (5 K by 40 pressures,
log-spaced) the reference equation gives ρ_ref(T, P); states the reference places in a
different phase from the model (between the two saturation curves) are left out of the density
error and covered by the saturation-pressure error instead.

Péneloux shift. A constant translation c maps every Peng–Robinson volume to v − c without
changing pressures, so for each state the translated density is 1/(v_PR(T, P) − c). The shift
is chosen to minimise the mean absolute relative density error over the box grid plus the mean
absolute relative error of the saturated-liquid densities at the box temperatures below Tc (the
two groups weighted equally; a golden-section search on c).
"""

from __future__ import annotations

import json
import math
import sys
from pathlib import Path

import numpy as np

ROOT = Path(__file__).resolve().parents[1]
sys.path.insert(0, str(ROOT))

import CoolProp.CoolProp as CP  # noqa: E402

import fillcheck  # noqa: E402
from fillcheck.fluids.catalog import all_fluids  # noqa: E402
from fillcheck.models.cubic import CUBIC_MODEL_IDS, CubicComponent, CubicModel  # noqa: E402
from fillcheck.thermo.density import density_TP  # noqa: E402
from fillcheck.thermo.properties import pressure  # noqa: E402
from fillcheck.thermo.saturation import saturation_T  # noqa: E402

HIGH_PRESSURE_GASES = {"hydrogen", "helium", "neon"}
DENSE_PRESSURE_FLOOR_Pa = 10e6
"""The pressure error of states denser than critical is measured from 10 MPa up: that is where
the limits of a liquid-full vessel lie, and below it the relative error of a liquid's pressure
at given density is meaningless (a 1 % density error moves 1 bar to hundreds)."""


def box_for(name: str, T_triple: float) -> tuple[float, float, float]:
    return max(223.15, T_triple + 0.5), 343.15, (100e6 if name in HIGH_PRESSURE_GASES else 50e6)


def _solid(cp_name: str, T: float, P: float) -> bool:
    """Whether (T, P) lies beyond the melting line (CoolProp's melting-line data, the one use
    of CoolProp left here: fillcheck's reference equations carry no melting line)."""
    try:
        CP.PropsSI("D", "T", T, "P", P, cp_name)
    except ValueError as exc:
        return "melting" in str(exc)
    return False


def reference_grid(data, T_lo: float, T_hi: float, P_max: float, P_min: float = 1e5, nP: int = 40):
    """Reference densities on the box grid and saturation states, from fillcheck's own
    coefficient copy of the reference equation (tests/test_reference_equations.py proves it)."""
    ref = fillcheck.fluid(data.name, model="reference")
    Tc, _, rhoc = ref.model_critical
    Ts = np.arange(T_lo, T_hi + 1e-9, 5.0)
    if Ts[0] != T_lo:
        Ts = np.concatenate([[T_lo], Ts])
    Ps = np.geomspace(P_min, P_max, nP)
    TT, PP = (x.ravel() for x in np.meshgrid(Ts, Ps, indexing="ij"))
    keep = np.array([not _solid(data.coolprop_name, t, p) for t, p in zip(TT, PP, strict=True)])
    TT, PP = TT[keep], PP[keep]
    rho = ref.density_molar(TT, PP)
    rows = np.column_stack([TT, PP, rho])
    Tsat = Ts[Ts < Tc - 0.3]
    sat = ref.saturation_molar(Tsat)
    sat_rows = np.column_stack([Tsat, sat.P, sat.rho_liquid, sat.rho_vapor])
    return rows, sat_rows, rhoc


def cubic(data, kind: str, shift: float = 0.0) -> CubicModel:
    comp = CubicComponent(
        data.critical_temperature_K, data.critical_pressure_Pa, data.acentric_factor, shift
    )
    return CubicModel(kind, [comp])


def model_sat(model: CubicModel, data, T: np.ndarray):
    Tc, Pc, rhoc = model.critical_point()
    return saturation_T(model, T, Tc=Tc, Pc=Pc, rhoc=rhoc, T_min=data.triple_point_temperature_K)


def same_phase_mask(model, data, grid, sat_ref):
    """States that the model and the reference both place on the same side of saturation."""
    T, P = grid[:, 0], grid[:, 1]
    keep = np.ones(len(T), dtype=bool)
    if len(sat_ref) == 0:
        return keep
    Tc = data.critical_temperature_K
    below = (T < Tc * 0.999) & (T <= sat_ref[:, 0].max())
    if np.any(below):
        ms = model_sat(model, data, T[below])
        p_ref = np.interp(T[below], sat_ref[:, 0], sat_ref[:, 1])
        lo, hi = np.minimum(ms.P, p_ref), np.maximum(ms.P, p_ref)
        Pb = P[below]
        keep[below] = ~((Pb >= lo * 0.995) & (Pb <= hi * 1.005))
    return keep


def errors_for(model, data, grid, sat_ref, rhoc_ref):
    T, P, rho_ref = grid[:, 0], grid[:, 1], grid[:, 2]
    keep = same_phase_mask(model, data, grid, sat_ref)
    rho = density_TP(model, T[keep], P[keep])
    e_rho = np.abs(rho / rho_ref[keep] - 1.0)
    gas = keep & (rho_ref < rhoc_ref)
    dense = keep & ~gas & (P >= DENSE_PRESSURE_FLOOR_Pa)
    e_p = np.abs(pressure(model, T[gas], rho_ref[gas]) / P[gas] - 1.0)
    e_pd = np.abs(pressure(model, T[dense], rho_ref[dense]) / P[dense] - 1.0)
    out = {
        "density": float(e_rho.max()),
        "density_mean": float(e_rho.mean()),
        "pressure": float(e_p.max()) if e_p.size else 0.0,
        "pressure_dense": float(e_pd.max()) if e_pd.size else 0.0,
    }
    if len(sat_ref):
        ms = model_sat(model, data, sat_ref[:, 0])
        out["saturation_pressure"] = float(np.abs(ms.P / sat_ref[:, 1] - 1.0).max())
        out["saturated_liquid_density"] = float(np.abs(ms.rho_liquid / sat_ref[:, 2] - 1).max())
    return out


def fit_shift(data, grid, sat_ref) -> float:
    pr = cubic(data, "pr")
    keep = same_phase_mask(pr, data, grid, sat_ref)
    v_pr = 1.0 / density_TP(pr, grid[keep, 0], grid[keep, 1])
    v_ref = 1.0 / grid[keep, 2]
    groups = [(v_pr, v_ref)]
    if len(sat_ref):
        ms = model_sat(pr, data, sat_ref[:, 0])
        groups.append((1.0 / ms.rho_liquid, 1.0 / sat_ref[:, 2]))

    def cost(c: float) -> float:
        # equal weight to the single-phase grid and to the saturated liquid, so a liquefied
        # gas's liquid density (which sets filling ratios) is not outvoted by its gas states
        return float(sum(np.mean(np.abs(vr / (vp - c) - 1.0)) for vp, vr in groups))

    b = pr.b
    lo, hi = -0.5 * b, 0.5 * b
    g = (math.sqrt(5.0) - 1.0) / 2.0
    x1, x2 = hi - g * (hi - lo), lo + g * (hi - lo)
    f1, f2 = cost(x1), cost(x2)
    for _ in range(80):
        if f1 < f2:
            hi, x2, f2 = x2, x1, f1
            x1 = hi - g * (hi - lo)
            f1 = cost(x1)
        else:
            lo, x1, f1 = x1, x2, f2
            x2 = lo + g * (hi - lo)
            f2 = cost(x2)
    return 0.5 * (lo + hi)


def main() -> None:
    gases: dict[str, dict] = {}
    table_rows = []
    for data in all_fluids():
        if data.coolprop_name is None:
            print(f"skip {data.name}: no reference equation available to measure against")
            continue
        T_lo, T_hi, P_max = box_for(data.name, data.triple_point_temperature_K)
        grid, sat_ref, rhoc_ref = reference_grid(data, T_lo, T_hi, P_max)
        shift = fit_shift(data, grid, sat_ref)
        # the published table's box: -40..65 degC, 1..300 bar (700 bar for hydrogen)
        t_lo = max(233.15, data.triple_point_temperature_K + 0.5)
        tgrid, tsat, trhoc = reference_grid(
            data, t_lo, 338.15, 70e6 if data.name == "hydrogen" else 30e6
        )
        models, table = {}, {}
        for kind in CUBIC_MODEL_IDS:
            m = cubic(data, kind, shift if kind == "pr-peneloux" else 0.0)
            models[kind] = errors_for(m, data, grid, sat_ref, rhoc_ref)
            t = errors_for(m, data, tgrid, tsat, trhoc)
            table[kind] = t["density"]
            models[kind]["table_density"] = t["density"]
            models[kind]["table_density_mean"] = t["density_mean"]
        eos = fillcheck.fluid(data.name, model="reference").eos
        key = eos.publication
        gases[data.name] = {
            "volume_shift_m3_mol": shift,
            "box": {"T_min_K": T_lo, "T_max_K": T_hi, "P_max_Pa": P_max},
            "reference": key,
            "models": models,
        }
        table_rows.append((data.name, table, {k: models[k]["table_density_mean"] for k in table}))
        print(data.name, {k: round(v * 100, 2) for k, v in table.items()})
    out = {
        "source": "error measured against fillcheck's reference equation of state",
        "gases": gases,
    }
    path = ROOT / "fillcheck" / "fluids" / "data" / "cubic_accuracy.json"
    path.write_text(json.dumps(out, indent=1, sort_keys=True) + "\n", encoding="utf-8")
    write_table(table_rows)


def write_table(rows) -> None:
    kinds = list(CUBIC_MODEL_IDS)
    lines = [
        "# How accurate are the cubic models?",
        "",
        "Largest relative density error at given temperature and pressure, in per cent, over",
        "−40 … +65 °C and 1 … 300 bar (1 … 700 bar for hydrogen), measured against the published",
        "reference equation of state of each gas (fillcheck's own evaluation) on a grid of 5 K",
        "by 40 pressures. States that the model places on the other side of the saturation curve",
        "from the reference are left out here and measured as saturation-pressure error in",
        "`fillcheck/fluids/data/cubic_accuracy.json`. The Péneloux shift of `pr-peneloux` is",
        "fitted per gas (see `tools/measure_cubic_accuracy.py`). Regenerate with",
        "`python tools/measure_cubic_accuracy.py`.",
        "",
        "| gas | " + " | ".join(kinds) + " |",
        "|---|" + "---:|" * len(kinds),
    ]
    for name, table, _ in rows:
        best = min(table.values())
        cells = [
            (f"**{table[k] * 100:.2f}**" if table[k] == best else f"{table[k] * 100:.2f}")
            for k in kinds
        ]
        lines.append(f"| {name} | " + " | ".join(cells) + " |")
    lines += [
        "",
        "The largest errors sit next to the critical point of the gases whose critical",
        "temperature falls inside the range (carbon dioxide, ethane, xenon, the refrigerants).",
        "The mean error over the same grid shows the typical accuracy away from it:",
        "",
        "| gas | " + " | ".join(kinds) + " |",
        "|---|" + "---:|" * len(kinds),
    ]
    for name, _, mean in rows:
        lines.append(f"| {name} | " + " | ".join(f"{mean[k] * 100:.2f}" for k in kinds) + " |")
    lines += [
        "",
        "Every gas but nitrogen trifluoride now defaults to its published reference equation of",
        "state; the bold cubic is the one fillcheck orders first for a gas when a cubic is asked",
        "for, and the cubics' order in `fillcheck gases`. Nitrogen trifluoride has no reference",
        'equation to measure against: it uses Peng–Robinson, and its checks say "review".',
        "",
    ]
    (ROOT / "docs" / "accuracy.md").write_text("\n".join(lines), encoding="utf-8")


if __name__ == "__main__":
    main()
