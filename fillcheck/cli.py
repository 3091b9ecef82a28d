"""The command line: parse arguments, call the library, choose the renderer, set the exit status.

Exit status: 0 every vessel passes; 1 at least one fails or needs review; 2 the input was
refused (one sentence on stderr, no traceback).
"""

from __future__ import annotations

import os
import sys
from collections.abc import Callable, Iterator
from contextlib import contextmanager
from enum import StrEnum
from pathlib import Path
from typing import Annotated, Any

import typer

from fillcheck.errors import FillcheckError, InputError
from fillcheck.scenario.text import neutralise

EXIT_PASS, EXIT_FINDINGS, EXIT_REFUSED = 0, 1, 2
PROGRESS_FROM = 500
"""Registers with at least this many vessels show a progress bar on stderr."""

app = typer.Typer(
    add_completion=False,
    no_args_is_help=True,
    rich_markup_mode=None,
    pretty_exceptions_enable=False,
)


class Units(StrEnum):
    metric = "metric"
    us = "us"


def _version(value: bool) -> None:
    if value:
        from fillcheck import __version__

        typer.echo(f"fillcheck {__version__}")
        raise typer.Exit(EXIT_PASS)


@app.callback()
def _root(
    version: Annotated[
        bool,
        typer.Option(
            "--version", callback=_version, is_eager=True, help="Print the version and exit."
        ),
    ] = False,
) -> None:
    """Real-gas checks of cylinder and pressure-vessel fills against their limits.

    \b
    Examples:
      fillcheck check scenarios/welding_supply_refill.toml
      fillcheck check scenarios/beverage_co2_cage.toml --units us
      fillcheck check scenarios/hydrogen_bank.toml --json > result.json
      fillcheck check scenarios/propane_forklift_store.toml --html report.html
      fillcheck check my_register.csv
      fillcheck stop-table scenarios/welding_supply_refill.toml --vessel AR-50-014
      fillcheck reading scenarios/welding_supply_refill.toml --vessel AR-50-014
          --pressure "215 barg" --temperature "35 degC"
      fillcheck gases

    Exit status: 0 all vessels pass, 1 a vessel fails or needs review, 2 the input was refused.
    """


@app.command()
def check(
    file: Annotated[
        Path, typer.Argument(help="Scenario file (.toml) or register (.csv).", show_default=False)
    ],
    json_out: Annotated[
        bool,
        typer.Option(
            "--json",
            help="Print the result as JSON (SI units, absolute pressures) instead of the report.",
        ),
    ] = False,
    units: Annotated[
        Units | None,
        typer.Option(
            "--units",
            help="Display units of the report (default: the scenario's units, else US units "
            "for a file written in US units only, else metric).",
        ),
    ] = None,
    html_out: Annotated[
        Path | None,
        typer.Option("--html", help="Also write a printable HTML report with a chart per vessel."),
    ] = None,
    force: Annotated[
        bool, typer.Option("--force", help="Replace an existing --html file.")
    ] = False,
    width: Annotated[
        int | None,
        typer.Option(
            "--width", min=40, help="Report width in characters (default: the terminal's)."
        ),
    ] = None,
    jsonl_out: Annotated[
        str | None,
        typer.Option(
            "--jsonl",
            help="Write one JSON object a vessel, a line each, as it computes ('-': stdout); "
            "no report, memory bounded for any register.",
        ),
    ] = None,
    jobs: Annotated[
        int,
        typer.Option(
            "--jobs",
            min=1,
            max=64,
            help="With --jsonl and a register: check it in this many worker processes "
            "(same results, in the register's order).",
        ),
    ] = 1,
    areas_file: Annotated[
        Path | None,
        typer.Option(
            "--areas",
            help="With a register (.csv): a TOML file of [[area]] tables that the register's "
            "column 'area' names.",
        ),
    ] = None,
) -> None:
    """Check every vessel of a scenario and print the report.

    \b
    Examples:
      fillcheck check scenarios/welding_supply_refill.toml
      fillcheck check scenarios/beverage_co2_cage.toml --units us
      fillcheck check scenarios/hydrogen_bank.toml --json > result.json

    Exit status: 0 all vessels pass, 1 a vessel fails or needs review, 2 the input was refused.
    """
    from fillcheck.assess import assess_scenario

    if file.suffix.lower() == ".csv":  # a register: BLAS threads cost more than they give
        from fillcheck.records import one_blas_thread

        one_blas_thread()
    if areas_file is not None and file.suffix.lower() != ".csv":
        _refuse(
            "--areas goes with a register (.csv); a scenario file holds its own [[area]] tables"
        )
    if jsonl_out is not None:
        if json_out or html_out is not None:
            _refuse("give --jsonl alone: it replaces the report, --json and --html")
        if areas_file is not None:
            _refuse(
                "--areas does not go with --jsonl (the stream holds vessels only); check the "
                "register with its areas without --jsonl"
            )
        _check_jsonl(file, jsonl_out, force, units, jobs)
    if jobs != 1:
        _refuse("--jobs applies to --jsonl only; add --jsonl OUT, or leave --jobs out")
    if json_out and html_out is None and areas_file is None and file.suffix.lower() == ".csv":
        _check_json_streamed(file, units)
    if html_out is not None:
        from fillcheck.report.output_file import destination_problem

        problem = destination_problem(html_out, force, source=file)
        if problem is not None:
            _refuse(problem)
    with _guarded("the check", file):
        register = file.suffix.lower() == ".csv"
        if register:
            from fillcheck.scenario.register import load_register

            _refuse_large_register(file, html_out is not None or areas_file is not None)

            areas = () if areas_file is None else _areas(areas_file)
            scenario = load_register(file, areas=areas)
        else:
            from fillcheck.scenario.resolve import load_scenario

            scenario = load_scenario(file)
        with _progress(len(scenario.vessels)) as tick:
            system = _system(units, scenario)
            result = assess_scenario(scenario, tick, is_register=register)
        record = _record(scenario, file)
    if html_out is not None:
        from fillcheck.report.html_report import render_html, write_html

        try:
            write_html(render_html(result, system, record=record), html_out, force)
        except InputError as exc:
            _refuse(str(exc))
        except OSError as exc:
            _refuse(f"{html_out}: cannot be written ({exc.strerror}); choose another path")
        typer.echo(f"fillcheck: wrote {neutralise(str(html_out))}", err=True)
    if json_out:
        from fillcheck.report.json_report import render_json

        typer.echo(render_json(result, record, system))
    else:
        from fillcheck.report.terminal import render_terminal

        render_terminal(result, _console(width), system, record=record)
    raise typer.Exit(EXIT_PASS if result.verdict == "pass" else EXIT_FINDINGS)


def _refuse_large_register(file: Path, whole_only: bool) -> None:
    """A register too large to be read whole for a report is refused with the way that has no
    size limit (the streamed outputs read it a row at a time); ``whole_only``: --html or
    --areas was given, which need the whole register."""
    from fillcheck.scenario.bounds import INPUT_BYTES_MAX

    try:
        size = file.stat().st_size
    except OSError:
        return  # the reader says what is wrong with the path
    if size > INPUT_BYTES_MAX:
        way = (
            "--html and --areas need the whole register: split the file, or leave them out and "
            "stream it with --jsonl OUT.jsonl or --json (a row at a time, no size limit)"
            if whole_only
            else "stream it with --jsonl OUT.jsonl or --json (a row at a time, no size limit), "
            "or split the file"
        )
        _refuse(
            f"{neutralise(file.name)}: is larger than {INPUT_BYTES_MAX // (1024 * 1024)} MB, more "
            f"than is read whole for a report; {way}"
        )


def _check_jsonl(file: Path, out: str, force: bool, units: Units | None, jobs: int = 1) -> None:
    """``check --jsonl``: stream one JSON line a vessel to ``out`` ('-' for stdout), written to
    a temporary file and renamed when complete (a refused or failed run leaves nothing)."""
    import contextlib
    import json

    from fillcheck.records import stream_register

    if jobs != 1 and file.suffix.lower() != ".csv":
        _refuse("--jobs applies to registers (.csv); a scenario file is checked in one process")
    to_stdout = out == "-"
    if not to_stdout:
        from fillcheck.report.output_file import destination_problem

        problem = destination_problem(Path(out), force, source=file, kind_of_file=".jsonl file")
        if problem is not None:
            _refuse(problem)
    counts = {"pass": 0, "fail": 0, "review": 0}
    area_verdicts: list[str] = []
    with contextlib.ExitStack() as stack:
        if to_stdout:
            sink = sys.stdout
        else:
            from fillcheck.report.output_file import replacing

            sink = stack.enter_context(replacing(Path(out), ".jsonl"))
        with _guarded("the check", file):
            if file.suffix.lower() == ".csv":
                from fillcheck.scenario.register import stream_rows

                system = units.value if units is not None else "metric"
                results = stream_register(stream_rows(file), file.name, system, jobs)  # type: ignore[arg-type]
            else:
                from fillcheck.assess.batch import assess_many
                from fillcheck.report.json_report import vessel_dict
                from fillcheck.scenario.resolve import load_scenario

                sc = load_scenario(file)
                system = _system(units, sc)
                assessed = assess_many(sc.vessels, sc.reference_temperature_K)
                results = (
                    vessel_dict(a, sc.atmospheric_pressure_Pa, system)  # type: ignore[arg-type]
                    for a in assessed
                )
                if sc.areas:  # the stream holds vessels; the areas' verdicts set the status
                    from fillcheck.assess.area import assess_areas

                    area_verdicts = [x.verdict for x in assess_areas(sc, assessed)]
            for result in results:
                sink.write(json.dumps(result, ensure_ascii=False) + "\n")
                counts[result["verdict"]] += 1
    total = sum(counts.values())
    areas_said = ""
    if area_verdicts:
        n = {k: area_verdicts.count(k) for k in ("pass", "fail", "review")}
        areas_said = (
            f"; {len(area_verdicts)} storage areas (not in the stream): {n['pass']} pass, "
            f"{n['fail']} fail, {n['review']} review"
        )
    typer.echo(
        f"fillcheck: {total} vessels: {counts['pass']} pass, {counts['fail']} fail, "
        f"{counts['review']} review"
        + areas_said
        + ("" if to_stdout else f"; wrote {neutralise(out)}"),
        err=True,
    )
    every_pass = total == counts["pass"] and all(v == "pass" for v in area_verdicts)
    raise typer.Exit(EXIT_PASS if every_pass else EXIT_FINDINGS)


def _check_json_streamed(file: Path, units: Units | None) -> None:
    """``check REGISTER.csv --json``: the whole result's JSON document, its vessels written as
    they are computed a chunk at a time (fillcheck.records), so memory does not grow with the
    register. It is spooled to a temporary file and copied to stdout once complete: a refused
    row prints its sentence and nothing else. The keys are those of the JSON result; the
    verdict and the permit-file record, known at the end, come after the vessels."""
    import hashlib
    import json
    import shutil
    import tempfile
    from types import SimpleNamespace

    from fillcheck import __version__
    from fillcheck import units as u
    from fillcheck.records import stream_register
    from fillcheck.report.permit_record import make_record, record_json
    from fillcheck.scenario.register import stream_rows
    from fillcheck.scenario.schema import ScenarioSpec

    defaults = {k: f.default for k, f in ScenarioSpec.model_fields.items()}

    system = units.value if units is not None else "metric"
    counts = {"pass": 0, "fail": 0, "review": 0}
    gases: dict[tuple[str, ...], Any] = {}
    with tempfile.TemporaryFile("w+", encoding="utf-8") as spool:
        with _guarded("the check", file):
            digest = hashlib.sha256()  # of the bytes the rows are read from, as they are read
            rows = stream_rows(file, digest)  # refuses a missing file, a folder, a pipe at once
            head = {
                "fillcheck_version": __version__,
                "source": neutralise(file.name),
                "title": None,
                # a register has no top-level keys: the scenario file's defaults hold
                "reference_temperature_K": u.parse_temperature(defaults["reference_temperature"]),
                "atmospheric_pressure_Pa": u.parse_pressure(defaults["atmospheric_pressure"]),
            }
            spool.write(json.dumps(head, indent=2, ensure_ascii=False)[:-2] + ',\n  "vessels": [')
            for i, v in enumerate(stream_register(rows, file.name, system)):
                text = json.dumps(v, indent=2, ensure_ascii=False).replace("\n", "\n    ")
                spool.write(("\n    " if i == 0 else ",\n    ") + text)
                counts[v["verdict"]] += 1
                names = tuple(v["composition"]) if v.get("composition") else (str(v["gas"]),)
                gases.setdefault(names, _gas_stand_in(names, bool(v.get("composition"))))
            record = make_record(
                SimpleNamespace(
                    vessels=[SimpleNamespace(fluid=g) for g in gases.values()],
                    input_sha256=digest.hexdigest(),
                    site=None,
                    permit_number=None,
                    prepared_by=None,
                ),
                neutralise(str(file)),
            )
        verdict = "fail" if counts["fail"] else ("review" if counts["review"] else "pass")
        tail = {"areas": [], "verdict": verdict, **record_json(record)}
        spool.write("\n  ],\n" + json.dumps(tail, indent=2, ensure_ascii=False)[2:] + "\n")
        spool.seek(0)
        shutil.copyfileobj(spool, sys.stdout)
    raise typer.Exit(EXIT_PASS if verdict == "pass" else EXIT_FINDINGS)


def _gas_stand_in(names: tuple[str, ...], mixture: bool) -> Any:
    """What report.permit_record.gas_data_files reads of a vessel's fluid, from its JSON."""
    from types import SimpleNamespace

    if mixture:
        return SimpleNamespace(is_mixture=True, component_names=names)
    return SimpleNamespace(is_mixture=False, name=names[0])


def _areas(path: Path) -> Any:
    """The areas of an --areas file; a refusal names that file."""
    from fillcheck.scenario.register import load_areas

    try:
        return load_areas(path)
    except InputError as exc:
        msg = str(exc)
        names = (path.name, neutralise(path.name))
        _refuse(msg if msg.startswith(names) else f"{path.name}: {msg}")


def _system(option: Units | None, scenario: Any) -> Any:
    """The unit system of a printout: the option, else the scenario's."""
    return option.value if option is not None else scenario.units


def _record(scenario: Any, file: Path) -> Any:
    """The permit-file record of a printout of ``scenario`` read from ``file``."""
    from fillcheck.report.permit_record import make_record

    return make_record(scenario, neutralise(str(file)))


def _console(width: int | None) -> object:
    from rich.console import Console

    plain = bool(os.environ.get("NO_COLOR"))
    return Console(
        width=width, highlight=False, no_color=plain, color_system=None if plain else "auto"
    )


@contextmanager
def _guarded(what: str, file: Path) -> Iterator[None]:
    """One way out for every command: refused input exits 2 with its sentence (prefixed with
    the file name where the message lacks it); a computation that cannot finish, or a defect,
    exits 1 with one line, never a traceback and never a silent pass."""
    try:
        yield
    except InputError as exc:
        msg = str(exc)
        names = (file.name, str(file), neutralise(file.name), neutralise(str(file)))
        _refuse(msg if msg.startswith(names) else f"{file.name}: {msg}")
    except FillcheckError as exc:
        _say(f"could not complete {what}: {exc}")
        raise typer.Exit(EXIT_FINDINGS) from None
    except typer.Exit:
        raise
    except BrokenPipeError:  # the reader of stdout stopped (``| head``): not a defect
        _stdout_gone()
    except Exception as exc:  # a defect in fillcheck
        _say(
            f"internal error ({type(exc).__name__}: {exc}); no result was "
            "reached. Please report this with the scenario file."
        )
        raise typer.Exit(EXIT_FINDINGS) from None


@contextmanager
def _progress(total: int) -> Iterator[Callable[[int, int], None] | None]:
    """A progress bar on stderr for long registers (nothing for short ones)."""
    if total < PROGRESS_FROM:
        yield None
        return
    from rich.console import Console
    from rich.progress import Progress

    with Progress(console=Console(stderr=True), transient=True) as bar:
        task = bar.add_task("checking vessels", total=total)
        yield lambda done, _total: bar.update(task, completed=done)


def _pick(scenario: object, vessel: str | None) -> list:
    vessels = list(scenario.vessels)  # type: ignore[attr-defined]
    if vessel is None:
        return vessels
    chosen = [v for v in vessels if v.id == neutralise(vessel)]
    if not chosen:
        ids = ", ".join(v.id for v in vessels[:10])
        has = f"{len(vessels)} vessels, the first {ids}" if len(vessels) > 10 else ids
        raise InputError(f"{scenario.source}: no vessel '{vessel}'; the file has {has}")  # type: ignore[attr-defined]
    return chosen


@app.command("stop-table")
def stop_table_command(
    file: Annotated[Path, typer.Argument(help="Scenario file (.toml).", show_default=False)],
    vessel: Annotated[str | None, typer.Option("--vessel", help="Only this vessel id.")] = None,
    start: Annotated[str, typer.Option("--from", help="Lowest gas temperature.")] = "-10 degC",
    stop: Annotated[str, typer.Option("--to", help="Highest gas temperature.")] = "60 degC",
    step: Annotated[str, typer.Option("--step", help="Temperature step.")] = "5 K",
    from_fill: Annotated[
        bool,
        typer.Option(
            "--from-fill",
            help="Gas temperatures from each vessel's fill process: ambient to end of fill.",
        ),
    ] = False,
    json_out: Annotated[bool, typer.Option("--json", help="JSON instead of the table.")] = False,
    units: Annotated[
        Units | None, typer.Option("--units", help="Display units (default: the scenario's).")
    ] = None,
    width: Annotated[
        int | None, typer.Option("--width", min=40, help="Width in characters.")
    ] = None,
) -> None:
    """Print the pressure to stop a fill at, by gas temperature, for each vessel's planned charge.

    \b
    Examples:
      fillcheck stop-table scenarios/welding_supply_refill.toml --vessel AR-50-014
      fillcheck stop-table scenarios/hydrogen_bank.toml --from "0 degC" --to "50 degC" --step "10 K"
      fillcheck stop-table scenarios/nitrogen_fast_fill.toml --from-fill
    """
    import dataclasses

    import numpy as np

    from fillcheck import units as u
    from fillcheck.assess.planning import fill_temperatures, stop_table
    from fillcheck.report.planning_report import planning_json, render_stop_tables
    from fillcheck.scenario.resolve import load_scenario, option_temperature

    with _guarded("the table", file):
        sc = load_scenario(file)
        picked = _pick(sc, vessel)
        dT = _option(u.parse_temperature_difference, step, "--step")
        if from_fill:
            if not dT > 0:
                raise InputError(f"--step '{step}' must be positive")
            tables = []
            if vessel is None:  # the vessels whose fill process is described
                picked = [v for v in picked if v.filling is not None] or picked[:1]
            for v in picked:
                temps, T_end = fill_temperatures(v, sc.reference_temperature_K, dT)
                if temps.size > 400:
                    raise InputError(
                        f"--step '{step}' gives more than 400 rows; choose a larger step"
                    )
                st = stop_table(v, sc.reference_temperature_K, temps)
                tables.append(dataclasses.replace(st, fill_end_temperature_K=T_end))
        else:
            for v in picked:  # within every vessel's storage-temperature bounds
                lo = option_temperature(sc, v, "--from", start)
                hi = option_temperature(sc, v, "--to", stop)
            if not (hi > lo and dT > 0):
                raise InputError(
                    f"--from '{start}' must be below --to '{stop}' and --step positive"
                )
            if (hi - lo) / dT > 400:
                raise InputError(f"--step '{step}' gives more than 400 rows; choose a larger step")
            temps = np.arange(lo, hi + 1e-9, dT)
            tables = [stop_table(v, sc.reference_temperature_K, temps) for v in picked]
        record = _record(sc, file)
    if json_out:
        typer.echo(planning_json(tables, record))
    else:
        render_stop_tables(
            tables, _console(width), _system(units, sc), sc.atmospheric_pressure_Pa, record
        )
    over = any(t.max_safe_charge_kg is None or t.over_plan for t in tables)
    raise typer.Exit(EXIT_FINDINGS if over else EXIT_PASS)


@app.command("reading")
def reading_command(
    file: Annotated[Path, typer.Argument(help="Scenario file (.toml).", show_default=False)],
    vessel: Annotated[str, typer.Option("--vessel", help="The vessel id.", show_default=False)],
    pressure: Annotated[
        str,
        typer.Option("--pressure", help="Measured pressure, e.g. '180 barg'.", show_default=False),
    ],
    temperature: Annotated[
        str,
        typer.Option("--temperature", help="Gas temperature, e.g. '30 degC'.", show_default=False),
    ],
    gauge_error: Annotated[
        str,
        typer.Option(
            "--gauge-error", help="The gauge's error as a share of its reading, e.g. '2 %'."
        ),
    ] = "5 %",
    thermometer_error: Annotated[
        str,
        typer.Option("--thermometer-error", help="How far the gas temperature may be off."),
    ] = "2 K",
    json_out: Annotated[bool, typer.Option("--json", help="JSON instead of text.")] = False,
    units: Annotated[
        Units | None, typer.Option("--units", help="Display units (default: the scenario's).")
    ] = None,
    width: Annotated[
        int | None, typer.Option("--width", min=40, help="Width in characters.")
    ] = None,
) -> None:
    """Read a gauge: the charge, the settled pressure and how full the vessel is.

    The charge is given as a band from the gauge's and the thermometer's errors (defaults 5 %
    and 2 K, common practice); near the vapour pressure the reading is refused: weigh it.

    \b
    Example:
      fillcheck reading scenarios/welding_supply_refill.toml --vessel AR-50-014 \\
          --pressure "215 barg" --temperature "35 degC"
    """
    from fillcheck import units as u
    from fillcheck.assess.planning import read_gauge
    from fillcheck.report.planning_report import planning_json, render_reading
    from fillcheck.scenario.resolve import load_scenario, option_pressure, option_temperature

    with _guarded("the reading", file):
        sc = load_scenario(file)
        v = _pick(sc, vessel)[0]
        P = option_pressure(sc, v, "--pressure", pressure)
        T = option_temperature(sc, v, "--temperature", temperature)
        g = _option(u.parse_fraction, gauge_error, "--gauge-error")
        dT = _option(u.parse_temperature_difference, thermometer_error, "--thermometer-error")
        if not 0.0 <= g <= 0.25:
            raise InputError(f"option --gauge-error: {gauge_error!r} is not between 0 % and 25 %")
        if not 0.0 <= dT <= 20.0:
            raise InputError(
                f"option --thermometer-error: {thermometer_error!r} is not between 0 K and 20 K"
            )
        r = read_gauge(v, sc.reference_temperature_K, P, T, g, dT)

        r = read_gauge(v, sc.reference_temperature_K, P, T)
        record = _record(sc, file)
    if json_out:
        typer.echo(planning_json(r, record))
    else:
        render_reading(r, _console(width), _system(units, sc), sc.atmospheric_pressure_Pa, record)
    over = r.fraction_of_max_safe is None or r.fraction_of_max_safe > 1.0 or r.may_exceed_plan
    raise typer.Exit(EXIT_FINDINGS if over else EXIT_PASS)


def _option(parse: object, text: str, name: str) -> float:
    try:
        return float(parse(text))  # type: ignore[operator]
    except InputError as exc:
        raise InputError(f"option {name}: {exc}") from None


@app.command("gases")
def gases() -> None:
    """List the gases fillcheck knows, with their default model."""
    from fillcheck.fluids.catalog import all_fluids
    from fillcheck.models.registry import default_model_id

    typer.echo(f"{'gas':24s} {'formula':10s} {'CAS':12s} default model")
    for d in all_fluids():
        typer.echo(f"{d.name:24s} {d.formula:10s} {d.cas:12s} {default_model_id(d)}")


def _say(message: str) -> None:
    """One line on stderr: the message with any control character made visible."""
    typer.echo(f"fillcheck: {neutralise(message)}", err=True)


def _refuse(message: str) -> None:
    _say(message)
    raise typer.Exit(EXIT_REFUSED)


def _cli_errors() -> tuple[Any, Any, tuple[Any, ...], Any]:
    """The command-line library's errors: any, a usage error, "no arguments: show the help"
    and an abort (end of input)."""
    try:
        from typer._click import exceptions as ce  # typer vendors click from 0.2x on
    except ImportError:  # pragma: no cover - older typer on click
        from click import exceptions as ce  # type: ignore[no-redef]
    help_error = getattr(ce, "NoArgsIsHelpError", None)
    helps = (help_error,) if help_error is not None else ()
    return ce.ClickException, ce.UsageError, helps, getattr(ce, "Abort", typer.Abort)


def main() -> None:
    """Entry point: a usage error (unknown option, missing argument) is one sentence on stderr
    and exit status 2."""
    if sys.argv[1:] == ["gases"]:
        # A command without options runs without the option parser, which (typer 0.2x) imports
        # pydantic to coerce options: listing the gases should cost little more than the catalog.
        gases()
        sys.exit(0)
    any_error, usage_error, help_errors, abort = _cli_errors()
    try:
        code = app(standalone_mode=False, prog_name="fillcheck")
    except help_errors as exc:
        exc.show()
        sys.exit(EXIT_REFUSED)
    except usage_error as exc:
        ctx = getattr(exc, "ctx", None)
        command = ctx.command_path if ctx is not None else "fillcheck"
        _say(f"{_one_line(exc.format_message())}; see {command} --help")
        sys.exit(EXIT_REFUSED)
    except any_error as exc:
        _say(_one_line(exc.format_message()))
        sys.exit(exc.exit_code)
    except (abort, typer.Abort):
        _say("aborted")
        sys.exit(EXIT_FINDINGS)
    except SystemExit as exc:
        sys.exit(exc.code)
    except BrokenPipeError:
        _stdout_gone()
    sys.exit(code if isinstance(code, int) else 0)


def _stdout_gone() -> None:
    """The reader of stdout closed it (``fillcheck check ... --jsonl - | head``): stop quietly
    with status 1 (what was written is not the whole result), and point stdout at the null
    device so that Python's flush at exit does not fail again."""
    devnull = os.open(os.devnull, os.O_WRONLY)
    os.dup2(devnull, sys.stdout.fileno())
    os.close(devnull)
    raise SystemExit(EXIT_FINDINGS)


def _one_line(text: str) -> str:
    return " ".join(str(text).split()).rstrip(".")


if __name__ == "__main__":
    main()
