"""Streams of vessels: ``fillcheck.check_records`` and ``check --jsonl``; crossings next to the
critical point at register scale.

Reference values: CoolProp 8.0.0's evaluation of the same published equations (Span et al.
2000 for nitrogen, Tegeler et al. 1999 for argon).
"""

from __future__ import annotations

import json
import os
import subprocess
import sys
from pathlib import Path

import CoolProp.CoolProp as CP
import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

import fillcheck
from fillcheck.errors import InputError
from fillcheck.thermo.vessel import CRITICAL_GAP_K, saturation_crossings

ATM = 101_325.0


def _row(i: int, barg: float) -> dict[str, object]:
    return {
        "id": f"N2-{i:05d}",
        "gas": "nitrogen",
        "water_capacity": "50 L",
        "fill_pressure": f"{barg} barg",
        "fill_temperature": "15 degC",
        "max_temperature": "65 degC",
        "allowable_pressure": "300 barg",
        "relief_set_pressure": float("nan"),  # a DataFrame's empty cell
    }


def test_check_records_gives_the_json_vessel_of_each_record() -> None:
    rows = [_row(i, 150 + i) for i in range(30)]
    out = list(fillcheck.check_records(rows, chunk_rows=7))
    assert [r["id"] for r in out] == [r["id"] for r in rows]
    for r, row in zip(out, rows, strict=True):
        P = float(str(row["fill_pressure"]).split()[0]) * 1e5 + ATM
        rho = CP.PropsSI("D", "T", 288.15, "P", P, "Nitrogen")
        assert r["charged_mass_kg"] == pytest.approx(rho * 0.05, rel=1e-9)
        P_top = CP.PropsSI("P", "T", 338.15, "D", rho, "Nitrogen")
        assert r["max_temperature"]["pressure_Pa"] == pytest.approx(P_top, rel=1e-9)
        assert r["verdict"] == ("pass" if P_top < 0.99 * (300e5 + ATM) else r["verdict"])
    # the same results checked in one chunk or one at a time (to round-off: numpy may sum
    # arrays of different lengths in a different order)
    alone = list(fillcheck.check_records(rows[12:13]))
    assert len(alone) == 1
    _same(alone[0], out[12])


def _same(a: object, b: object) -> None:
    if isinstance(a, dict):
        assert isinstance(b, dict) and a.keys() == b.keys()
        for k in a:
            _same(a[k], b[k])
    elif isinstance(a, list):
        assert isinstance(b, list) and len(a) == len(b)
        for x, y in zip(a, b, strict=True):
            _same(x, y)
    elif isinstance(a, float) and isinstance(b, float):
        assert a == pytest.approx(b, rel=1e-12, abs=1e-12)
    else:
        assert a == b


@pytest.mark.parametrize(
    ("records", "says"),
    [
        (
            [{**_row(0, 200), "water_capacity": "50"}],
            "row 1 (vessel 'N2-00000'), column 'water_capacity'",
        ),
        ([_row(0, 200), _row(1, 200), _row(0, 210)], "row 3 (vessel 'N2-00000'), column 'id'"),
        ([{**_row(0, 200), "gass": "argon"}], "row 1: column 'gass'"),
    ],
    ids=["no-unit", "id-twice-across-chunks", "unknown-column"],
)
def test_check_records_refuses_in_one_sentence(records, says) -> None:
    with pytest.raises(InputError, match=r"^records: ") as exc:
        list(fillcheck.check_records(records, chunk_rows=2))
    assert says in str(exc.value)
    assert "\n" not in str(exc.value)


def test_crossings_next_to_the_critical_point_complete_and_match_coolprop() -> None:
    # 2001 nitrogen isochores across ρc ± 1 %: each crossing of the saturation curve (dew below
    # ρc, liquid-full above), vectorised in one call, against CoolProp's saturated densities.
    f = fillcheck.fluid("nitrogen")
    Tc, _, rhoc = f.model_critical
    rho = rhoc * (1.0 + np.linspace(-0.01, 0.01, 2001))
    full, T = saturation_crossings(f, rho)
    assert np.all(np.isfinite(T)) and np.all(T <= Tc)
    M = f.molar_mass
    resolved = T < Tc - CRITICAL_GAP_K
    for i in np.flatnonzero(resolved)[::50]:
        q = 0 if full[i] else 1
        ref = CP.PropsSI("D", "T", T[i], "Q", q, "Nitrogen") / M
        assert ref == pytest.approx(rho[i], rel=1e-6)
    # inside the gap the crossing is within CRITICAL_GAP_K of Tc, on its safe side
    assert np.all(Tc - T[~resolved] <= CRITICAL_GAP_K * (1 + 1e-9))


def _cli(*args: str, cwd: Path) -> subprocess.CompletedProcess[str]:
    code = "import sys; from fillcheck.cli import app; sys.argv[0] = 'fillcheck'; app()"
    return subprocess.run(
        [sys.executable, "-c", code, *args], capture_output=True, text=True, cwd=cwd, check=False
    )


def test_check_jsonl_streams_one_line_a_vessel(tmp_path: Path) -> None:
    reg = tmp_path / "fleet.csv"
    head = "id,gas,water_capacity,fill_pressure,fill_temperature,max_temperature,allowable_pressure"
    lines = [head] + [
        f"N2-{i},nitrogen,50 L,{150 + i % 200} barg,15 degC,65 degC,300 barg" for i in range(300)
    ]
    reg.write_text("\n".join(lines) + "\n", encoding="utf-8")
    out = tmp_path / "fleet.jsonl"
    r = _cli("check", str(reg), "--jsonl", str(out), cwd=tmp_path)
    assert r.returncode == 1, r.stderr  # the fuller ones exceed 300 barg at 65 °C
    got = [json.loads(x) for x in out.read_text(encoding="utf-8").splitlines()]
    assert [g["id"] for g in got] == [f"N2-{i}" for i in range(300)]
    assert "300 vessels" in r.stderr
    # the same vessel as the JSON of the whole register
    whole = json.loads(_cli("check", str(reg), "--json", cwd=tmp_path).stdout)["vessels"]
    _same(whole[17], got[17])
    # an existing file is not replaced without --force; nothing half-written is left
    again = _cli("check", str(reg), "--jsonl", str(out), cwd=tmp_path)
    assert again.returncode == 2 and "--force" in again.stderr
    assert not list(tmp_path.glob(".fillcheck-*"))
    bad = tmp_path / "bad.csv"
    bad.write_text("id,gas\nA,argon\n", encoding="utf-8")
    r = _cli("check", str(bad), "--jsonl", "-", cwd=tmp_path)
    assert r.returncode == 2 and r.stdout == "" and "water_capacity" in r.stderr


def test_a_model_whose_saturation_stops_short_of_tc_still_gives_crossings() -> None:
    # R22 (Kamei et al. 1995): saturation is resolved to 1 mK below Tc, not to 20 µK (round-off
    # in the equilibrium conditions). Isochores across ρc ± 0.5 % still cross, and a resolved
    # crossing matches CoolProp's saturated density there.
    f = fillcheck.fluid("R22")
    Tc, _, rhoc = f.model_critical
    gap = f.saturation_gap_K
    assert CRITICAL_GAP_K <= gap <= 1e-2
    rho = rhoc * (1.0 + np.linspace(-0.005, 0.005, 101))
    full, T = saturation_crossings(f, rho)
    assert np.all(np.isfinite(T)) and np.all(Tc - T >= 0.0)
    resolved = T < Tc - gap
    for i in np.flatnonzero(resolved)[::10]:
        ref = CP.PropsSI("D", "T", T[i], "Q", 0 if full[i] else 1, "R22") / f.molar_mass
        assert ref == pytest.approx(rho[i], rel=1e-6)


def test_jobs_give_the_results_and_refusals_of_one_process() -> None:
    # several worker processes: the same vessels in the same order, value for value, and the
    # same refusal (a later chunk's id repeating an earlier chunk's) as one process gives
    rows = [_row(i, 150 + 3 * i) for i in range(23)]
    one = list(fillcheck.check_records(rows, chunk_rows=5))
    two = list(fillcheck.check_records(rows, chunk_rows=5, jobs=2))
    _same(one, two)
    twice = [*rows, _row(3, 180)]
    for jobs in (1, 2):
        with pytest.raises(InputError, match=r"row 24 \(vessel 'N2-00003'\), column 'id'"):
            list(fillcheck.check_records(twice, chunk_rows=5, jobs=jobs))
    bad = [*rows[:12], {**_row(12, 200), "fill_pressure": "200"}, *rows[13:]]
    with pytest.raises(InputError, match=r"row 13 \(vessel 'N2-00012'\), column 'fill_pressure'"):
        list(fillcheck.check_records(bad, chunk_rows=5, jobs=2))


def test_jobs_option_through_the_command_line(tmp_path: Path) -> None:
    reg = tmp_path / "fleet.csv"
    head = "id,gas,water_capacity,fill_pressure,fill_temperature,max_temperature,allowable_pressure"
    lines = [head] + [
        f"AR-{i},argon,50 L,{150 + i % 150} barg,15 degC,65 degC,300 barg" for i in range(2500)
    ]
    reg.write_text("\n".join(lines) + "\n", encoding="utf-8")
    one = _cli("check", str(reg), "--jsonl", "-", cwd=tmp_path)
    two = _cli("check", str(reg), "--jsonl", "-", "--jobs", "2", cwd=tmp_path)
    assert one.returncode == two.returncode == 1, two.stderr
    _same(
        [json.loads(x) for x in one.stdout.splitlines()],
        [json.loads(x) for x in two.stdout.splitlines()],
    )
    alone = _cli("check", str(reg), "--jobs", "2", cwd=tmp_path)
    assert alone.returncode == 2 and "--jobs applies to --jsonl" in alone.stderr
    toml = tmp_path / "one.toml"
    toml.write_text(
        '[[vessel]]\nid = "A"\ngas = "argon"\nwater_capacity = "50 L"\n'
        'fill = { pressure = "200 barg", temperature = "15 degC" }\n'
        'storage = { max_temperature = "65 degC" }\nlimits = { allowable_pressure = "300 barg" }\n',
        encoding="utf-8",
    )
    r = _cli("check", str(toml), "--jsonl", "-", "--jobs", "2", cwd=tmp_path)
    assert r.returncode == 2 and "registers (.csv)" in r.stderr and r.stdout == ""


def test_register_json_is_streamed_and_equals_the_whole_result(tmp_path: Path) -> None:
    """`check REGISTER.csv --json` writes the vessels as they are computed (memory bounded by a
    chunk, INTERFACES §9) and gives the document of the whole-register result: every key and
    value the same (the report id and its time aside), verdict and record after the vessels.
    A refused row prints its sentence only: nothing on stdout, exit 2."""
    from fillcheck.assess import assess_scenario
    from fillcheck.report.json_report import scenario_dict
    from fillcheck.report.permit_record import make_record
    from fillcheck.scenario.register import load_register

    reg = tmp_path / "fleet.csv"
    head = "id,gas,water_capacity,fill_pressure,fill_mass,fill_temperature,max_temperature,"
    head += "allowable_pressure\n"
    reg.write_text(
        head
        + "N-1,nitrogen,50 L,200 barg,,15 degC,50 degC,300 barg\n"
        + "C-1,carbon dioxide,50 L,,40 kg,15 degC,50 degC,150 barg\n"
        + "M-1,argon 82 % + carbon dioxide 18 %,50 L,200 barg,,15 degC,50 degC,300 barg\n"
    )
    run = subprocess.run(
        [sys.executable, "-m", "fillcheck", "check", str(reg), "--json"],
        capture_output=True, text=True, timeout=300,
    )  # fmt: skip
    assert run.returncode == 1, run.stderr  # the overfilled carbon dioxide fails
    got = json.loads(run.stdout)
    sc = load_register(reg)
    whole = json.loads(
        json.dumps(scenario_dict(assess_scenario(sc, is_register=True), make_record(sc, reg)))
    )
    assert sorted(got) == sorted(whole)
    for k in whole:
        if k not in ("report_id", "generated_at"):
            assert got[k] == whole[k], k
    keys = list(got)
    assert keys.index("verdict") > keys.index("vessels")  # known once every vessel is in
    bad = tmp_path / "bad.csv"
    bad.write_text(head + "N-1,nitrogen,50 L,200 barg,,15 degC,50 degC,300 barg\n"
                   + "N-2,nitrogen,50 L,200 bar,,15 degC,50 degC,300 barg\n")  # fmt: skip
    run = subprocess.run(
        [sys.executable, "-m", "fillcheck", "check", str(bad), "--json"],
        capture_output=True, text=True, timeout=300,
    )  # fmt: skip
    assert run.returncode == 2 and run.stdout == ""
    assert "row 3 (vessel 'N-2'), column 'fill_pressure'" in run.stderr


def _argon_register(path: Path, n: int) -> None:
    head = "id,gas,water_capacity,fill_pressure,fill_temperature,max_temperature,allowable_pressure"
    rows = [f"AR-{i},argon,50 L,{150 + i} barg,15 degC,65 degC,300 barg" for i in range(n)]
    path.write_text("\n".join([head, *rows]) + "\n", encoding="utf-8")


def test_a_streamed_register_is_not_bound_by_the_whole_file_limit(tmp_path, monkeypatch) -> None:
    """`--jsonl` and `check REGISTER.csv --json` read a register a row at a time, so a register
    above the limit on files read whole (20 MB, scenario/bounds.py; lowered here to 1 kB so the
    test stays small) is checked in full, with the same vessels as below it; the report, which
    reads the file whole, refuses it in one sentence that names the streamed outputs."""
    from typer.testing import CliRunner

    from fillcheck.cli import app

    reg = tmp_path / "fleet.csv"
    _argon_register(reg, 40)
    below = CliRunner().invoke(app, ["check", str(reg), "--jsonl", "-"])
    assert below.exit_code == 0, below.output
    monkeypatch.setattr("fillcheck.scenario.bounds.INPUT_BYTES_MAX", 1024)
    monkeypatch.setattr("fillcheck.scenario.source.INPUT_BYTES_MAX", 1024)
    assert reg.stat().st_size > 1024
    above = CliRunner().invoke(app, ["check", str(reg), "--jsonl", "-"])
    assert above.exit_code == 0, above.output
    lines = [json.loads(x) for x in above.stdout.splitlines() if x.startswith("{")]
    assert [v["id"] for v in lines] == [f"AR-{i}" for i in range(40)]
    _same(lines, [json.loads(x) for x in below.stdout.splitlines() if x.startswith("{")])
    whole = CliRunner().invoke(app, ["check", str(reg), "--json"])
    assert whole.exit_code == 0, whole.output
    assert [v["id"] for v in json.loads(whole.stdout)["vessels"]] == [v["id"] for v in lines]
    report = CliRunner().invoke(app, ["check", str(reg)])
    assert report.exit_code == 2
    said = " ".join(report.output.split())
    assert "fleet.csv: is larger than" in said and "--jsonl" in said, said


_HEAD = b"id,gas,water_capacity,fill_pressure,fill_temperature,max_temperature,allowable_pressure\n"
_ROW = b"AR-%d,argon,50 L,200 barg,15 degC,65 degC,300 barg\n"


@pytest.mark.parametrize(
    ("content", "says"),
    [
        # common practice, no source: the refusals a streamed register gives by line or row
        (_HEAD + _ROW % 1 + _ROW % 2 + _ROW % 3 + b"B,\xff\n", r"bad\.csv: line 5: is not UTF-8"),
        (_HEAD + b"A," + b"x" * 70_000 + b"\n", r"bad\.csv: line 2: is longer than 65,536 bytes"),
        (
            _HEAD + b"A," + b"y" * 600 + b"\n",
            r"row 2 \(vessel 'A'\), column 'gas': the cell holds 600",
        ),
        # a quoted cell running on over many lines stops at the csv module's field limit
        (_HEAD + b'A,"' + (b"z" * 60_000 + b"\n") * 3, r"bad\.csv: row 2: is not valid CSV"),
        (b"", r"bad\.csv: is empty"),
        (_HEAD, r"bad\.csv: has a header but no vessels"),
    ],
)
def test_a_streamed_register_refuses_bad_lines_by_number(tmp_path, content, says) -> None:
    from fillcheck.records import stream_register
    from fillcheck.scenario.register import stream_rows

    bad = tmp_path / "bad.csv"
    bad.write_bytes(content)
    with pytest.raises(InputError, match=says):
        list(stream_register(stream_rows(bad), "bad.csv"))


def test_stream_rows_reads_as_it_is_used(tmp_path: Path) -> None:
    # the rows come from the file as they are taken: the first rows are read before a bad byte
    # far down the file is reached, and the same rows as the whole-file reader's come out
    from fillcheck.scenario.register import _rows, stream_rows

    reg = tmp_path / "fleet.csv"
    _argon_register(reg, 5000)
    text = reg.read_text(encoding="utf-8")
    assert list(stream_rows(reg)) == _rows(text, "fleet.csv")
    with reg.open("ab") as fh:
        fh.write(b"AR-X,\xff\n")
    rows = stream_rows(reg)
    first = [next(rows) for _ in range(3)]
    assert first[1][0] == "AR-0"
    with pytest.raises(InputError, match="line 5002: is not UTF-8"):
        list(rows)
    missing = tmp_path / "none.csv"
    with pytest.raises(InputError, match=r"none\.csv: no such file"):
        stream_rows(missing)
    with pytest.raises(InputError, match="is a folder"):
        stream_rows(tmp_path)


def test_a_register_runs_numpys_blas_on_one_thread(tmp_path: Path) -> None:
    # common practice, no source: the command line checks a register with one BLAS thread
    # (records.one_blas_thread; its small matrix products gain nothing from more), and leaves
    # a caller's own process alone when it only imports fillcheck
    threadpoolctl = pytest.importorskip("threadpoolctl")
    del threadpoolctl
    reg = tmp_path / "fleet.csv"
    _argon_register(reg, 5)
    code = (
        "import json, sys, threadpoolctl\n"
        "from fillcheck.cli import main\n"
        "before = [p['num_threads'] for p in threadpoolctl.threadpool_info()"
        " if p['user_api'] == 'blas']\n"
        f"sys.argv = ['fillcheck', 'check', {str(reg)!r}, '--jsonl', '-']\n"
        "try:\n    main()\nexcept SystemExit:\n    pass\n"
        "after = [p['num_threads'] for p in threadpoolctl.threadpool_info()"
        " if p['user_api'] == 'blas']\n"
        "print('BLAS ' + json.dumps([before, after]), file=sys.stderr)\n"
    )
    env = {k: v for k, v in os.environ.items() if not k.endswith("_NUM_THREADS")}
    env["OPENBLAS_NUM_THREADS"] = "2"  # two threads before, on any machine
    r = subprocess.run(
        [sys.executable, "-c", code], capture_output=True, text=True, env=env, check=False
    )
    said = r.stderr.strip().splitlines()[-1]
    assert said.startswith("BLAS"), r.stderr
    before, after = json.loads(said[5:])  # BLAS libraries' thread counts, before and after
    assert before and after == [1] * len(before), said
    assert max(before) > 1 or "openblas" not in r.stderr.lower(), said


def test_streamed_json_refuses_a_bad_path_and_reads_byte_order_marks_as_before(tmp_path) -> None:
    # common practice, no source: `check REG.csv --json` refuses a missing file, a folder and a
    # pipe in one sentence (exit 2, never waiting on the pipe), and a register behind byte-order
    # marks reads as the whole-file reader reads it
    fifo = tmp_path / "fifo.csv"
    os.mkfifo(fifo)
    for path, says in [
        (tmp_path / "none.csv", "no such file"),
        (tmp_path, "is a folder"),
        (fifo, "is not a regular file"),
    ]:
        r = subprocess.run(
            [sys.executable, "-m", "fillcheck", "check", str(path), "--json"],
            capture_output=True, text=True, timeout=60, check=False,
        )  # fmt: skip
        assert r.returncode == 2 and says in r.stderr and r.stdout == "", r.stderr
        assert "Traceback" not in r.stderr and "internal error" not in r.stderr
    from fillcheck.records import stream_register
    from fillcheck.scenario.register import stream_rows

    marks = tmp_path / "marks.csv"
    marks.write_bytes(b"\xef\xbb\xbf\xef\xbb\xbf" + _HEAD + _ROW % 1)
    assert [v["id"] for v in stream_register(stream_rows(marks), "marks.csv")] == ["AR-1"]
    only = tmp_path / "only.csv"
    only.write_bytes(b"\xef\xbb\xbf")
    with pytest.raises(InputError, match=r"only\.csv: is empty"):
        list(stream_register(stream_rows(only), "only.csv"))


def test_a_stream_cut_short_by_its_reader_stops_quietly(tmp_path: Path) -> None:
    # `--jsonl - | head`: the reader closes the pipe; fillcheck stops with status 1 and no
    # "internal error" (common practice, no source)
    reg = tmp_path / "fleet.csv"
    _argon_register(reg, 60)  # about 4 kB a line: more than a pipe holds, so the writer waits
    proc = subprocess.Popen(
        [sys.executable, "-m", "fillcheck", "check", str(reg), "--jsonl", "-"],
        stdout=subprocess.PIPE, stderr=subprocess.PIPE,
    )  # fmt: skip
    assert proc.stdout is not None and proc.stderr is not None
    proc.stdout.read(10)
    proc.stdout.close()
    err = proc.stderr.read().decode()
    assert proc.wait(timeout=120) == 1, err
    assert "internal error" not in err and "Traceback" not in err, err


_PIECES = [*'ab,"\n\r ;é€\u2028\x1b\t\ufeff', "\r\n", "x" * 497]  # cells near 500 characters
_CSV_TEXT = st.lists(st.sampled_from(_PIECES), max_size=60).map("".join)


@settings(max_examples=150, deadline=None)
@given(text=_CSV_TEXT, marks=st.integers(0, 2))
def test_the_streamed_reader_reads_as_the_whole_file_reader(tmp_path_factory, text, marks):
    """One path (common practice, no source): for any text, the line-at-a-time reader gives the
    rows the whole-file reader gives, cell for cell, or the same refusal."""
    from fillcheck.scenario.register import _rows, stream_rows

    path = tmp_path_factory.mktemp("csv") / "r.csv"
    path.write_bytes(b"\xef\xbb\xbf" * marks + text.encode("utf-8"))
    try:
        whole: object = _rows(text.lstrip("\ufeff"), "r.csv")
    except InputError as exc:
        whole = str(exc)
    try:
        streamed: object = list(stream_rows(path))
    except InputError as exc:
        streamed = str(exc)
    assert streamed == whole
