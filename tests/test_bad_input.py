"""Refused input: every kind of bad scenario must end with exit status 2 and one clear sentence.

Each case is run through the command line: all of them in-process (``typer.testing.CliRunner``
on ``fillcheck.cli.app``, fast) and a handful as real subprocesses (``python -m fillcheck.cli``),
which is what a user or a permit system runs. For every refusal the test asserts:

* exit status 2 and nothing on stdout;
* stderr is one line, one sentence, without a traceback;
* the sentence names the file, the vessel (where the problem is inside one) and the field, and
  contains a keyword of the right fix (e.g. ``barg`` for a bare ``bar``).

After each refusal a good scenario must still pass (no state left behind), and ``check`` must
write nothing to disk.
"""

from __future__ import annotations

import os
import re
import subprocess
import sys
from dataclasses import dataclass
from pathlib import Path

import pytest
from typer.testing import CliRunner

from fillcheck.cli import app

REPO = Path(__file__).resolve().parents[1]
VID = "AR-50-101"
"""The id of the vessel in the base scenario (invented)."""

# ---------------------------------------------------------------------------------------------
# Scenario text builders
# ---------------------------------------------------------------------------------------------

BASE_VESSEL: dict[str, str] = {
    "id": f'"{VID}"',
    "gas": '"argon"',
    "water_capacity": '"50 L"',
    "fill": '{ pressure = "150 barg", temperature = "15 degC" }',
    "storage": '{ max_temperature = "50 degC" }',
    "limits": '{ allowable_pressure = "300 barg" }',
}
"""A vessel that passes: argon, 50 L, 150 barg at 15 degC, up to 50 degC, allowable 300 barg.
Values are TOML value text; a builder call replaces or (with None) removes keys."""


def vessel(**changes: str | None) -> str:
    """A ``[[vessel]]`` table: the base vessel with some keys replaced (or removed by None)."""
    fields = {**BASE_VESSEL, **changes}
    lines = ["[[vessel]]"] + [f"{k} = {v}" for k, v in fields.items() if v is not None]
    return "\n".join(lines) + "\n"


def scenario(*vessels: str, head: str = "") -> str:
    """Scenario text: top-level keys and ``[[gas]]`` tables first, then the vessels."""
    body = "\n".join(vessels) if vessels else vessel()
    return f'title = "Brevindle Lane gas store, weekly check"\n{head}\n{body}'


def user_gas(molar_mass: str = '"39.9 g/mol"', acentric_factor: str = "0.0", **extra: str) -> str:
    """A ``[[gas]]`` table defining an invented gas by its corresponding-states inputs."""
    lines = [
        "[[gas]]",
        'name = "testgas"',
        f"molar_mass = {molar_mass}",
        'critical_temperature = "150.7 K"',
        'critical_pressure = "4.86 MPa(a)"',
        f"acentric_factor = {acentric_factor}",
        *(f"{k} = {v}" for k, v in extra.items()),
    ]
    return "\n".join(lines) + "\n"


GOOD = scenario()

# ---------------------------------------------------------------------------------------------
# The matrix
# ---------------------------------------------------------------------------------------------

Words = tuple[str | tuple[str, ...], ...]
"""Keywords the message must contain (case-insensitive); a tuple item means any one of them."""


@dataclass(frozen=True)
class Bad:
    """One kind of bad input and what its refusal must say."""

    name: str
    text: str | bytes | None
    """Scenario file content; None for the path cases (see ``path_kind``)."""
    field: str | tuple[str, ...] | None
    """The field the message must name (any of a tuple); None where there is no field."""
    says: Words
    vessel_id: str | None = VID
    """The vessel the message must name; None where the problem is outside any vessel."""
    forbid: tuple[str, ...] = ()
    """Text that must NOT appear (a wrong fix)."""
    path_kind: str = "file"
    """"file" (write ``text``), "missing" (no such file) or "directory"."""


def _co2(**changes: str | None) -> str:
    return vessel(gas='"carbon dioxide"', fill='{ mass = "20 kg" }', **changes)


CASES: list[Bad] = [
    # --- pressures without gauge/absolute, unknown and wrong units ---------------------------
    Bad(
        "bare_bar_pressure",
        scenario(vessel(fill='{ pressure = "200 bar", temperature = "15 degC" }')),
        "fill.pressure",
        ("200 bar", "200 barg", "200 bara", "gauge", "absolute"),
    ),
    Bad(
        "bare_psi_pressure",
        scenario(vessel(fill='{ pressure = "3000 psi", temperature = "59 degF" }')),
        "fill.pressure",
        ("3000 psi", "psig", "psia"),
    ),
    Bad(
        "bare_bar_relief_pressure",
        scenario(
            vessel(limits='{ allowable_pressure = "300 barg", relief_set_pressure = "330 bar" }')
        ),
        "limits.relief_set_pressure",
        ("barg",),
    ),
    Bad(
        "bare_bar_atmospheric_pressure",
        scenario(head='atmospheric_pressure = "1 bar"'),
        "atmospheric_pressure",
        ("bara",),
        vessel_id=None,
    ),
    Bad(
        "unknown_unit_qt",
        scenario(vessel(water_capacity='"50 qt"')),
        "water_capacity",
        ("qt", ("unknown", "not a unit")),
        forbid=("kg",),
    ),
    Bad(
        "unknown_unit_litres_question_mark",
        scenario(vessel(water_capacity='"50 litres?"')),
        "water_capacity",
        ("litres?", "unknown", " L"),
    ),
    Bad(
        "wrong_kind_of_unit_mass_as_volume",
        scenario(vessel(water_capacity='"50 kg"')),
        "water_capacity",
        ("mass", "volume", "50 L"),
    ),
    Bad(
        "wrong_kind_of_unit_filling_ratio",
        scenario(vessel(fill='{ filling_ratio = "0.3 kg" }')),
        "fill.filling_ratio",
        ("kg/L",),
    ),
    Bad(
        "number_without_unit",
        scenario(vessel(water_capacity="50")),
        "water_capacity",
        ("unit", "50 L"),
    ),
    Bad(
        "ambiguous_temperature_unit_c",
        scenario(vessel(fill='{ pressure = "150 barg", temperature = "15 C" }')),
        "fill.temperature",
        ("ambiguous", "degC"),
    ),
    Bad(
        "thousands_separator",
        scenario(vessel(water_capacity='"1,000 L"')),
        "water_capacity",
        ("1,000 L", "separator"),
    ),
    Bad(
        "empty_quantity", scenario(vessel(water_capacity='""')), "water_capacity", ("empty", "50 L")
    ),
    Bad(
        "not_a_number",
        scenario(vessel(fill='{ pressure = "nan barg", temperature = "15 degC" }')),
        "fill.pressure",
        ("finite",),
    ),
    # --- values out of range ---------------------------------------------------------------
    Bad(
        "negative_water_capacity",
        scenario(vessel(water_capacity='"-50 L"')),
        "water_capacity",
        ("-50 L", ("negative", "below zero", "larger than zero")),
    ),
    Bad(
        "zero_water_capacity",
        scenario(vessel(water_capacity='"0 L"')),
        "water_capacity",
        ("0 L", ("larger than zero", "positive", "above zero")),
    ),
    Bad(
        "zero_fill_mass",
        scenario(vessel(fill='{ mass = "0 kg" }')),
        "fill.mass",
        ("0 kg", ("larger than zero", "positive", "above zero")),
    ),
    Bad(
        "negative_fill_mass",
        scenario(vessel(fill='{ mass = "-3 kg" }')),
        "fill.mass",
        ("-3 kg", ("negative", "below zero", "larger than zero")),
    ),
    Bad(
        "fill_pressure_below_vacuum",
        scenario(vessel(fill='{ pressure = "-2 barg", temperature = "15 degC" }')),
        "fill.pressure",
        ("-2 barg", "vacuum"),
    ),
    Bad(
        "allowable_pressure_below_vacuum",
        scenario(vessel(limits='{ allowable_pressure = "-5 barg" }')),
        "limits.allowable_pressure",
        ("vacuum",),
    ),
    Bad(
        "temperature_below_absolute_zero",
        scenario(vessel(fill='{ pressure = "150 barg", temperature = "-300 degC" }')),
        "fill.temperature",
        ("-300 degC", "absolute zero"),
    ),
    Bad(
        "temperature_below_triple_point_co2",
        scenario(_co2(storage='{ max_temperature = "50 degC", min_temperature = "-80 degC" }')),
        "storage.min_temperature",
        ("-80 degC", "triple point", "carbon dioxide", "solid"),
    ),
    Bad(
        "vapour_space_temperature_below_triple_point",
        scenario(
            vessel(
                limits='{ allowable_pressure = "300 barg", min_vapour_space = "5 %", '
                'vapour_space_temperature = "-250 degC" }'
            )
        ),
        "limits.vapour_space_temperature",
        ("triple point",),
    ),
    Bad(
        "temperature_above_model_range",
        scenario(vessel(storage='{ max_temperature = "1800 degC" }')),
        "storage.max_temperature",
        ("1800 degC", ("range", "above")),
    ),
    Bad(
        "fill_temperature_above_model_range",
        scenario(vessel(fill='{ pressure = "150 barg", temperature = "1800 degC" }')),
        "fill.temperature",
        ("1800 degC", ("range", "above")),
    ),
    Bad(
        "min_temperature_above_max_temperature",
        scenario(vessel(storage='{ max_temperature = "50 degC", min_temperature = "60 degC" }')),
        ("storage.min_temperature", "storage.max_temperature"),
        ("60 degC", "maximum"),
    ),
    Bad(
        "count_zero",
        scenario(vessel(count="0")),
        "count",
        (("1 or more", "at least 1", "at least one", "positive"),),
    ),
    Bad("count_not_whole", scenario(vessel(count="2.5")), "count", ("whole number",)),
    Bad(
        "min_vapour_space_without_temperature",
        scenario(vessel(limits='{ allowable_pressure = "300 barg", min_vapour_space = "5 %" }')),
        ("limits.min_vapour_space", "limits.vapour_space_temperature"),
        ("vapour_space_temperature",),
    ),
    Bad(
        "min_vapour_space_150_percent",
        scenario(
            vessel(
                limits='{ allowable_pressure = "300 barg", min_vapour_space = "150 %", '
                'vapour_space_temperature = "50 degC" }'
            )
        ),
        "limits.min_vapour_space",
        ("150 %", ("100 %", "0 to 1", "between 0 and")),
    ),
    Bad(
        "max_filling_ratio_zero",
        scenario(
            vessel(limits='{ allowable_pressure = "300 barg", max_filling_ratio = "0 kg/L" }')
        ),
        "limits.max_filling_ratio",
        (("larger than zero", "positive", "above zero"),),
    ),
    Bad(
        "fill_mass_beyond_what_the_vessel_can_hold",
        # 1000 kg of argon in 50 L is 20 000 kg/m³, far denser than any state the models
        # describe (their co-volume limit is about 2 000 kg/m³): refuse, do not compute.
        scenario(vessel(fill='{ mass = "1000 kg" }')),
        "fill.mass",
        ("1000 kg",),
    ),
    # --- gas and model -----------------------------------------------------------------------
    Bad("unknown_gas_with_suggestion", scenario(vessel(gas='"argn"')), "gas", ("argn", "argon")),
    Bad("empty_gas_name", scenario(vessel(gas='""')), "gas", (("empty", "no gas"),)),
    Bad(
        "gas_name_is_a_number",
        scenario(vessel(gas="18")),
        "gas",
        (("name", "gas"),),
        forbid=("50 L",),
    ),
    Bad(
        "gas_mixture_fractions_do_not_sum_to_one",
        scenario(vessel(gas='{ argon = 0.80, "carbon dioxide" = 0.18 }')),
        "gas",
        ("0.98", "sum to 1"),
    ),
    Bad(
        "gas_mixture_of_one_gas", scenario(vessel(gas="{ argon = 1.0 }")), "gas", ("at least two",)
    ),
    Bad(
        "gas_mixture_unknown_component",
        scenario(vessel(gas='{ argon = 0.82, "carbon dioxyde" = 0.18 }')),
        "gas.carbon dioxyde",
        ("carbon dioxyde",),
    ),
    Bad(
        "gas_mixture_fraction_without_number",
        scenario(vessel(gas='{ argon = "most", "carbon dioxide" = 0.18 }')),
        "gas.argon",
        ("most",),
    ),
    Bad(
        "gas_mixture_fraction_over_one",
        scenario(vessel(gas='{ argon = "82", "carbon dioxide" = 0.18 }')),
        "gas.argon",
        ("82", "0 to 1"),
    ),
    Bad(
        "gas_mixture_same_gas_twice",
        scenario(vessel(gas="{ argon = 0.82, Ar = 0.18 }")),
        "gas.Ar",
        ("argon", "once"),
    ),
    Bad(
        "gas_mixture_with_user_gas",
        scenario(vessel(gas="{ testgas = 0.5, argon = 0.5 }"), head=user_gas()),
        "gas.testgas",
        ("[[gas]]", "catalog"),
    ),
    Bad(
        "gas_mixture_model_not_for_mixtures",
        scenario(vessel(gas='{ argon = 0.82, "carbon dioxide" = 0.18 }', model='"srk"')),
        "model",
        ("srk", "pr-peneloux"),
    ),
    Bad(
        "composition_basis_without_mixture",
        scenario(vessel(gas='"argon"', composition_basis='"mass"')),
        "composition_basis",
        ("mixture",),
    ),
    Bad(
        "unknown_model_id",
        scenario(vessel(model='"pengrobinson"')),
        "model",
        ("pengrobinson", "pr"),
    ),
    Bad(
        "user_gas_bad_acentric_factor",
        scenario(vessel(gas='"testgas"'), head=user_gas(acentric_factor="5.0")),
        ("gas[0].acentric_factor", "gas.0.acentric_factor"),
        ("5.0",),
        vessel_id=None,
    ),
    Bad(
        "user_gas_acentric_factor_as_text",
        scenario(vessel(gas='"testgas"'), head=user_gas(acentric_factor='"high"')),
        ("gas[0].acentric_factor", "gas.0.acentric_factor"),
        ("number",),
        vessel_id=None,
    ),
    Bad(
        "user_gas_molar_mass_without_per_mol",
        scenario(vessel(gas='"testgas"'), head=user_gas(molar_mass='"39.9 g"')),
        ("gas[0].molar_mass", "gas.0.molar_mass"),
        ("g/mol",),
        vessel_id=None,
    ),
    Bad(
        "user_gas_molar_mass_negative",
        scenario(vessel(gas='"testgas"'), head=user_gas(molar_mass='"-39.9 g/mol"')),
        ("gas[0].molar_mass", "gas.0.molar_mass"),
        ("positive",),
        vessel_id=None,
    ),
    Bad(
        "user_gas_bare_critical_pressure",
        scenario(vessel(gas='"testgas"'), head=user_gas().replace('"4.86 MPa(a)"', '"4.86 MPa"')),
        ("gas[0].critical_pressure", "gas.0.critical_pressure"),
        ("MPa(a)",),
        vessel_id=None,
    ),
    Bad(
        "user_gas_unknown_hazard",
        scenario(vessel(gas='"testgas"'), head=user_gas(hazards='["explosive"]')),
        ("gas[0].hazards", "gas.0.hazards"),
        ("explosive", "flammable"),
        vessel_id=None,
    ),
    Bad(
        "user_gas_missing_acentric_factor",
        scenario(vessel(gas='"testgas"'), head=user_gas().replace("acentric_factor = 0.0\n", "")),
        ("gas[0].acentric_factor", "gas.0.acentric_factor"),
        ("missing",),
        vessel_id=None,
    ),
    Bad(
        "user_gas_name_taken_by_catalog",
        scenario(vessel(), head=user_gas().replace('"testgas"', '"argon"')),
        ("gas[0]", "gas.0"),
        ("argon", "name"),
        vessel_id=None,
    ),
    # --- fill specification --------------------------------------------------------------------
    Bad(
        "missing_fill_specification",
        scenario(vessel(fill="{}")),
        "fill",
        ("exactly one", "pressure", "mass"),
    ),
    Bad(
        "fill_temperature_only",
        scenario(vessel(fill='{ temperature = "15 degC" }')),
        "fill",
        ("exactly one",),
    ),
    Bad(
        "two_fill_specifications",
        scenario(vessel(fill='{ pressure = "150 barg", mass = "5 kg", temperature = "15 degC" }')),
        "fill",
        ("pressure", "mass", "exactly one"),
    ),
    Bad(
        "fill_pressure_without_temperature",
        scenario(vessel(fill='{ pressure = "150 barg" }')),
        "fill.temperature",
        ("required", "degC"),
    ),
    Bad(
        "settled_pressure_without_temperature",
        scenario(vessel(fill='{ settled_pressure = "150 barg" }')),
        "fill.temperature",
        ("required",),
    ),
    Bad("fill_is_not_a_table", scenario(vessel(fill='"150 barg"')), "fill", ("table",)),
    # --- required keys, unknown keys ----------------------------------------------------------
    Bad(
        "missing_storage_max_temperature",
        scenario(vessel(storage='{ min_temperature = "-10 degC" }')),
        "storage.max_temperature",
        (("missing", "required"),),
    ),
    Bad(
        "missing_limits_allowable_pressure",
        scenario(vessel(limits='{ relief_set_pressure = "330 barg" }')),
        "limits.allowable_pressure",
        (("missing", "required"),),
    ),
    Bad(
        "unknown_key_typo_alone",
        # the misspelt key is the user's mistake: the sentence must point at it
        scenario(vessel(limits='{ allowable_presure = "300 barg" }')),
        "allowable_presure",
        (("spelling", "not a key", "unknown"),),
    ),
    Bad(
        "unknown_key_typo_beside_the_right_key",
        scenario(
            vessel(limits='{ allowable_pressure = "300 barg", allowable_presure = "250 barg" }')
        ),
        "limits.allowable_presure",
        (("spelling", "not a key", "unknown"),),
    ),
    Bad(
        "unknown_top_level_key",
        scenario(head='titel = "Brevindle Lane"'),
        "titel",
        (("spelling", "not a key", "unknown"),),
        vessel_id=None,
    ),
    Bad(
        "vessel_id_missing",
        scenario(vessel(id=None)),
        "id",
        (("missing", "required"),),
        vessel_id=None,
    ),
    Bad(
        "vessel_id_is_a_boolean",
        scenario(vessel(id="true")),
        "id",
        ("id",),
        vessel_id=None,
        forbid=("50 L",),
    ),
    Bad(
        "duplicate_vessel_ids",
        scenario(vessel(), vessel()),
        "id",
        (("twice", "duplicate", "unique", "own id"),),
    ),
    Bad(
        "no_vessel_at_all",
        'title = "Brevindle Lane, empty store"\n',
        "vessel",
        (("[[vessel]]", "required", "missing"),),
        vessel_id=None,
    ),
    Bad(
        "vessel_is_a_table_not_an_array",
        scenario().replace("[[vessel]]", "[vessel]"),
        "vessel",
        ("[[vessel]]",),
        vessel_id=None,
    ),
    # --- the file itself ----------------------------------------------------------------------
    Bad(
        "malformed_toml_unclosed_quote",
        scenario(vessel(water_capacity='"50 L')),
        None,
        ("TOML", "line"),
        vessel_id=None,
    ),
    Bad(
        "duplicate_toml_key",
        scenario(vessel(water_capacity='"50 L"\nwater_capacity = "40 L"')),
        None,
        ("TOML",),
        vessel_id=None,
    ),
    Bad(
        "non_utf8_file",
        scenario(head="# Lager S\u00fcd").encode("latin-1"),
        None,
        ("UTF-8",),
        vessel_id=None,
    ),
    Bad("utf16_file", scenario().encode("utf-16"), None, ("UTF-8",), vessel_id=None),
    Bad(
        "missing_file",
        None,
        None,
        (("no such file", "not found", "does not exist"),),
        vessel_id=None,
        path_kind="missing",
    ),
    Bad(
        "directory_instead_of_file",
        None,
        None,
        (("folder", "directory"),),
        vessel_id=None,
        path_kind="directory",
    ),
]

SUBPROCESS_CASES = (
    "bare_bar_pressure",
    "unknown_key_typo_beside_the_right_key",
    "malformed_toml_unclosed_quote",
    "non_utf8_file",
    "missing_file",
    "directory_instead_of_file",
)
"""Cases also run as a real ``python -m fillcheck.cli`` process (the rest run in-process)."""

_BY_NAME = {c.name: c for c in CASES}
assert len(_BY_NAME) == len(CASES), "case names must be unique"

# ---------------------------------------------------------------------------------------------
# Running and checking
# ---------------------------------------------------------------------------------------------


FILE_NAME = "bay_7.toml"
"""Every case is written under this neutral name, so no keyword can match the file name."""


def materialise(case: Bad, folder: Path) -> Path:
    """Put the case on disk in ``folder`` and return the path to pass to ``check``."""
    p = folder / FILE_NAME
    if case.path_kind == "missing":
        return p
    if case.path_kind == "directory":
        p.mkdir()
        return p
    if isinstance(case.text, bytes):
        p.write_bytes(case.text)
    else:
        assert case.text is not None
        p.write_text(case.text, encoding="utf-8")
    return p


def run_in_process(path: Path, *extra: str) -> tuple[int, str, str, BaseException | None]:
    """``fillcheck check PATH`` through typer's test runner: (exit, stdout, stderr, exception)."""
    res = CliRunner().invoke(app, ["check", str(path), *extra])
    exc = res.exception if not isinstance(res.exception, SystemExit) else None
    return res.exit_code, res.stdout, res.stderr, exc


def subprocess_env(**extra: str) -> dict[str, str]:
    env = dict(os.environ)
    env["PYTHONPATH"] = str(REPO)
    env.update(extra)
    return env


def run_subprocess(
    path: Path, *extra: str, env: dict[str, str] | None = None
) -> subprocess.CompletedProcess[str]:
    """``python -m fillcheck.cli check PATH`` as a separate process, from the repository root."""
    return subprocess.run(
        [sys.executable, "-m", "fillcheck.cli", "check", str(path), *extra],
        cwd=REPO,
        env=env or subprocess_env(),
        capture_output=True,
        text=True,
        encoding="utf-8",
        errors="replace",
        timeout=120,
        check=False,
    )


_SENTENCE_BREAK = re.compile(r"[.!?]\s+[A-Z]")


def assert_refusal(case: Bad, path: Path, code: int, out: str, err: str) -> None:
    """The checks every refusal must pass (see the module docstring)."""
    where = f"[{case.name}] stderr was: {err!r}"
    assert code == 2, f"exit status {code}, expected 2 (refused); {where}"
    assert "Traceback" not in err, where
    assert out == "", f"stdout must be empty on a refusal, got {out[:300]!r}; {where}"
    msg = err.strip()
    assert msg, f"no message on stderr; {where}"
    assert "\n" not in msg, f"the message must be one line; {where}"
    assert not _SENTENCE_BREAK.search(msg), f"the message must be one sentence; {where}"
    assert "Warning" not in msg, f"warnings leaked onto stderr; {where}"
    assert path.name in msg, f"the message must name the file {path.name!r}; {where}"
    # the rest is checked with the file's name and path taken out, so they cannot match
    rest = msg.replace(str(path), "<file>").replace(path.name, "<file>")
    if case.vessel_id is not None:
        assert f"'{case.vessel_id}'" in rest, f"the message must name the vessel; {where}"
    if case.field is not None:
        fields = (case.field,) if isinstance(case.field, str) else case.field
        assert any(f in rest for f in fields), f"the message must name the field {fields}; {where}"
    low = rest.casefold()
    for word in case.says:
        options = (word,) if isinstance(word, str) else word
        assert any(o.casefold() in low for o in options), (
            f"the message must say {' or '.join(map(repr, options))}; {where}"
        )
    for word in case.forbid:
        assert word.casefold() not in low, f"the message suggests a wrong fix {word!r}; {where}"


# ---------------------------------------------------------------------------------------------
# Tests
# ---------------------------------------------------------------------------------------------


def test_the_good_scenario_passes(tmp_path: Path) -> None:
    """The base every bad case is derived from is itself good (else the matrix proves nothing)."""
    p = tmp_path / "good.toml"
    p.write_text(GOOD, encoding="utf-8")
    code, out, err, exc = run_in_process(p, "--json")
    assert exc is None
    assert code == 0, err
    assert '"verdict": "pass"' in out


def test_the_matrix_is_large_enough() -> None:
    assert len(CASES) >= 25


@pytest.mark.parametrize("case", CASES, ids=lambda c: c.name)
def test_refused_in_process(case: Bad, tmp_path: Path) -> None:
    path = materialise(case, tmp_path)
    code, out, err, exc = run_in_process(path)
    assert exc is None, f"[{case.name}] an exception escaped the command: {exc!r}"
    assert_refusal(case, path, code, out, err)
    # --json must refuse the same way: nothing on stdout, the same sentence on stderr
    code_j, out_j, err_j, exc_j = run_in_process(path, "--json")
    assert exc_j is None
    assert (code_j, out_j, err_j) == (code, out, err)
    # and a good scenario still passes afterwards (nothing left behind by the refusal)
    good = tmp_path / "afterwards_good.toml"
    good.write_text(GOOD, encoding="utf-8")
    code_g, _, err_g, exc_g = run_in_process(good)
    assert exc_g is None
    assert code_g == 0, f"[{case.name}] the good scenario no longer passes: {err_g!r}"


@pytest.mark.parametrize("name", SUBPROCESS_CASES)
def test_refused_as_a_real_process(name: str, tmp_path: Path) -> None:
    case = _BY_NAME[name]
    path = materialise(case, tmp_path)
    proc = run_subprocess(path)
    assert_refusal(case, path, proc.returncode, proc.stdout, proc.stderr)


def test_utf8_file_with_byte_order_mark(tmp_path: Path) -> None:
    """Some Windows editors save UTF-8 with a byte-order mark: read it, or say so by name.

    A refusal that blames quotes and brackets on line 1 sends the user hunting for a typo that
    is not there.
    """
    p = tmp_path / "saved_by_notepad.toml"
    p.write_bytes("\ufeff".encode() + GOOD.encode("utf-8"))
    code, _, err, exc = run_in_process(p)
    assert exc is None
    if code == 2:
        msg = err.strip()
        assert "\n" not in msg and p.name in msg
        said = msg.replace(p.name, "").casefold()
        assert any(w in said for w in ("byte-order mark", "byte order mark", "bom")), (
            f"a UTF-8 byte-order mark is refused without saying so: {msg!r}"
        )
    else:
        assert code == 0, err


def test_windows_line_endings_are_fine(tmp_path: Path) -> None:
    p = tmp_path / "crlf.toml"
    p.write_bytes(GOOD.replace("\n", "\r\n").encode("utf-8"))
    code, _, err, exc = run_in_process(p)
    assert exc is None
    assert code == 0, err


def _listing(root: Path) -> list[tuple[str, int]]:
    """Every path under ``root`` with its size (directories as -1)."""
    return sorted(
        (str(p.relative_to(root)), -1 if p.is_dir() else p.stat().st_size) for p in root.rglob("*")
    )


def _top_level(root: Path) -> set[str]:
    return {p.name for p in root.iterdir()}


def test_check_writes_nothing_to_disk(tmp_path: Path) -> None:
    """Neither a good, a failing nor a refused check leaves a file behind anywhere we can see."""
    work = tmp_path / "work"
    home = tmp_path / "home"
    work.mkdir()
    home.mkdir()
    good = work / "good.toml"
    good.write_text(GOOD, encoding="utf-8")
    failing = work / "failing.toml"
    failing.write_text(
        scenario(
            vessel(
                gas='"nitrogen"',
                fill='{ pressure = "300 barg", temperature = "10 degC" }',
                storage='{ max_temperature = "65 degC" }',
            )
        ),
        encoding="utf-8",
    )
    bad = work / "bad.toml"
    bad.write_text(_BY_NAME["bare_bar_pressure"].text or "", encoding="utf-8")
    env = subprocess_env(HOME=str(home), PYTHONDONTWRITEBYTECODE="1")
    env.pop("XDG_CACHE_HOME", None)
    before_work, before_home = _listing(work), _listing(home)
    before_repo = (_top_level(REPO), _top_level(REPO / "scenarios"))
    codes = [
        run_subprocess(good, env=env).returncode,
        run_subprocess(failing, "--json", env=env).returncode,
        run_subprocess(bad, env=env).returncode,
    ]
    assert codes == [0, 1, 2]
    assert _listing(work) == before_work
    assert _listing(home) == before_home
    assert (_top_level(REPO), _top_level(REPO / "scenarios")) == before_repo
