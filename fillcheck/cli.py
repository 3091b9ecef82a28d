"""The command line: parse arguments, call the library, choose the renderer, set the exit status.

Exit status: 0 every vessel passes; 1 at least one fails or needs review; 2 the input was
refused (one sentence on stderr, no traceback).
"""

from __future__ import annotations

import os
import sys
from enum import StrEnum
from pathlib import Path
from typing import Annotated

import typer

from fillcheck.errors import FillcheckError, InputError

EXIT_PASS, EXIT_FINDINGS, EXIT_REFUSED = 0, 1, 2

app = typer.Typer(
    add_completion=False,
    no_args_is_help=True,
    rich_markup_mode=None,
    pretty_exceptions_enable=False,
)


class Units(StrEnum):
    metric = "metric"
    us = "us"


@app.callback()
def _root() -> None:
    """Real-gas checks of cylinder and pressure-vessel fills against their limits.

    \b
    Examples:
      fillcheck check scenarios/welding_supply_refill.toml
      fillcheck check scenarios/beverage_co2_cage.toml --units us
      fillcheck check scenarios/hydrogen_bank.toml --json > result.json
      fillcheck gases

    Exit status: 0 all vessels pass, 1 a vessel fails or needs review, 2 the input was refused.
    """


@app.command()
def check(
    file: Annotated[Path, typer.Argument(help="Scenario file (.toml).", show_default=False)],
    json_out: Annotated[
        bool,
        typer.Option(
            "--json",
            help="Print the result as JSON (SI units, absolute pressures) instead of the report.",
        ),
    ] = False,
    units: Annotated[
        Units, typer.Option("--units", help="Display units of the report.")
    ] = Units.metric,
    width: Annotated[
        int | None,
        typer.Option("--width", help="Report width in characters (default: the terminal's)."),
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
    from fillcheck.scenario.resolve import load_scenario

    try:
        scenario = load_scenario(file)
        result = assess_scenario(scenario, units.value)
    except InputError as exc:
        _refuse(str(exc))
    except FillcheckError as exc:
        typer.echo(f"fillcheck: could not complete the check: {exc}", err=True)
        raise typer.Exit(EXIT_FINDINGS) from None
    except Exception as exc:  # a defect in fillcheck: never a silent pass, never a traceback
        typer.echo(
            f"fillcheck: internal error ({type(exc).__name__}: {exc}); no verdict was "
            "reached. Please report this with the scenario file.",
            err=True,
        )
        raise typer.Exit(EXIT_FINDINGS) from None
    if json_out:
        from fillcheck.report.json_report import render_json

        typer.echo(render_json(result))
    else:
        from rich.console import Console

        from fillcheck.report.terminal import render_terminal

        plain = bool(os.environ.get("NO_COLOR"))
        console = Console(
            width=width, highlight=False, no_color=plain, color_system=None if plain else "auto"
        )
        render_terminal(result, console, units.value)
    raise typer.Exit(EXIT_PASS if result.verdict == "pass" else EXIT_FINDINGS)


@app.command("gases")
def gases() -> None:
    """List the gases fillcheck knows, with their default model."""
    from fillcheck.fluids.catalog import all_fluids
    from fillcheck.models.registry import default_model_id

    for d in all_fluids():
        typer.echo(f"{d.name:24s} {d.formula:10s} {d.cas:12s} {default_model_id(d)}")


def _refuse(message: str) -> None:
    typer.echo(f"fillcheck: {message}", err=True)
    raise typer.Exit(EXIT_REFUSED)


def main() -> None:
    """Entry point: usage errors (unknown option, missing argument) also exit with status 2."""
    try:
        app(standalone_mode=True)
    except SystemExit as exc:
        sys.exit(exc.code)


if __name__ == "__main__":
    main()
