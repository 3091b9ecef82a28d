"""Renderers for fill planning: the printable stop-fill table and a gauge reading (rich, JSON)."""

from __future__ import annotations

import dataclasses
import json
from typing import Any

from rich.console import Console
from rich.rule import Rule
from rich.table import Table
from rich.text import Text

from fillcheck import __version__, units
from fillcheck.assess.planning import Reading, StopTable
from fillcheck.report.permit_record import Record, record_json, record_rows

PLANNING_CAUTION = (
    "fillcheck computes what the gas does; it does not inspect the vessel. These figures are only "
    "as good as the pressure gauge, the thermometer and the scale; the cylinder's markings, local "
    "codes and a licensed inspector decide. Read SAFETY.md before filling to them."
)


def _head(console: Console, what: str, record: Record | None) -> None:
    """The rule and the permit-file record's header of a planning printout."""
    from fillcheck.report.terminal import print_header

    console.print(Rule(Text(f"fillcheck {__version__} — {what}", style="bold")))
    if record is not None:
        print_header(console, record_rows(record))


def _foot(console: Console, record: Record | None) -> None:
    from fillcheck.report.terminal import print_sign_off

    print_sign_off(console, record)
    console.print(Text(PLANNING_CAUTION, style="italic"))


def render_stop_tables(
    tables: list[StopTable],
    console: Console,
    system: units.UnitSystem,
    atm: float,
    record: Record | None = None,
) -> None:
    """Print one stop-fill table per vessel, made to hang at the filling station."""
    from fillcheck.report.terminal import trimmed

    with trimmed(console):
        _stop_tables(tables, console, system, atm, record)


def _stop_tables(
    tables: list[StopTable],
    console: Console,
    system: units.UnitSystem,
    atm: float,
    record: Record | None,
) -> None:

    def p(x: float | None) -> str:
        return "—" if x is None else units.format_pressure(x, system, atmospheric_pressure_Pa=atm)

    def t(x: float) -> str:
        return units.format_temperature(x, system)

    _head(console, "stop-fill table", record)
    for st in tables:
        console.print(
            Text.assemble(
                (f"Vessel {st.vessel_id}", "bold"),
                f"  {st.gas}  (model: {st.model})",
            )
        )
        console.print(
            f"Target: {units.format_mass(st.target_charge_kg, system)} "
            f"({units.format_filling_ratio(st.target_density_kg_m3, system)}), settling at "
            f"{p(st.settled_pressure_Pa)} at {t(st.reference_temperature_K)}."
        )
        if st.max_safe_charge_kg is not None:
            plan = units.format_mass(st.max_safe_charge_kg, system, down=True)
            console.print(
                f"Largest charge within the limits: {plan} ({st.governing_limit} governs)."
            )
            if st.over_plan:
                console.print(
                    Text(
                        "The planned charge is ABOVE the largest charge within the limits: do "
                        "not fill to this plan; "
                        + (
                            "fill at most the largest charge."
                            if st.by_weight
                            else "use the right-hand column."
                        ),
                        style="bold red",
                    )
                )
        else:
            console.print(
                Text(
                    "No charge keeps every limit entered: do not fill this vessel.",
                    style="bold red",
                )
            )
        if st.by_weight:
            console.print(Text(by_weight_line(st, system), style="bold"))
            if st.blend_steps:
                _blend_stop_table(console, st, p, t, system)
            console.print(f"Model: {st.model_name} ({st.model}); {st.model_source}")
            continue
        table = Table(show_edge=True)
        table.add_column("gas temperature", justify="right")
        table.add_column("stop the fill at", justify="right")
        table.add_column("phase")
        table.add_column("never above (largest charge)", justify="right")
        for r in st.rows:
            weigh = r.weigh or r.phase in ("two-phase", "liquid")
            shown = "weigh the fill" if weigh else p(r.stop_pressure_Pa)
            if (
                st.fill_end_temperature_K is not None
                and r.gas_temperature_K == st.fill_end_temperature_K
            ):
                shown += " (end of fill, computed)"
            if r.outside_range and not weigh:
                shown += " (REVIEW: outside the model's range)"
            table.add_row(
                t(r.gas_temperature_K),
                shown,
                r.phase,
                "weigh the fill" if weigh else p(r.safe_stop_pressure_Pa),
            )
        console.print(table)
        if st.blend_steps:
            _blend_stop_table(console, st, p, t, system)
        console.print(f"Model: {st.model_name} ({st.model}); {st.model_source}")
        if st.fill_end_temperature_K is not None:
            console.print(
                f"Gas temperatures from the fill process: from the ambient temperature (a slow "
                f"fill) to {t(st.fill_end_temperature_K)}, the computed end of this fill."
            )
        if any(r.outside_range for r in st.rows):
            console.print(
                Text(
                    "REVIEW: some stop pressures lie outside the range where the model's "
                    "numbers are vouched for; no stop pressure for the largest charge is "
                    "printed there.",
                    style="bold",
                )
            )
        if any(r.weigh or r.phase in ("two-phase", "liquid") for r in st.rows):
            console.print(
                Text(
                    "Liquid is present at some of these temperatures: fill this gas by weight "
                    "there; its pressure is the vapour pressure and does not measure the charge.",
                    style="bold",
                )
            )
    _foot(console, record)


def _blend_stop_table(
    console: Console, st: StopTable, p: Any, t: Any, system: units.UnitSystem
) -> None:
    """Each blend step's stop pressure by gas temperature (the contents after that step), for
    the planned charge and, where that is above the plan, for the largest charge."""
    head = (
        f"Blend made in the vessel ({', then '.join(st.blend_order or [])}; the recipe is "
        f"read at {t(st.blend_temperature_K)})"
    )
    _step_table(console, st, st.blend_steps or [], f"{head}: stop each step at", p, t, system)
    if st.blend_steps_largest:
        largest = units.format_mass(st.max_safe_charge_kg or 0.0, system, down=True)
        _step_table(
            console,
            st,
            st.blend_steps_largest,
            f"For the largest charge within the limits ({largest}), fill this instead: stop "
            "each step at",
            p,
            t,
            system,
        )


def _step_table(
    console: Console,
    st: StopTable,
    steps: list[Any],
    title: str,
    p: Any,
    t: Any,
    system: units.UnitSystem,
) -> None:
    console.print(Text(title, style="bold"))
    table = Table(show_edge=True)
    table.add_column("gas temperature", justify="right")
    for k, s in enumerate(steps, start=1):
        table.add_column(
            f"step {k}: {s.component}\n"
            f"(contents {units.format_mass(s.cumulative_mass_kg, system)})",
            justify="right",
        )
    for i, r in enumerate(st.rows):
        table.add_row(
            t(r.gas_temperature_K),
            *(
                "cannot be made"
                if s.cannot_be_made
                else ("weigh it" if s.stop_pressure_Pa[i] is None else p(s.stop_pressure_Pa[i]))
                for s in steps
            ),
        )
    console.print(table)
    bad = [k for k, s in enumerate(steps, start=1) if s.liquid_at_blend_temperature]
    if bad:
        console.print(
            Text(
                f"Step {', '.join(map(str, bad))} holds liquid at the blend temperature: its "
                "pressure does not tell the amount in, and the mixture is not the recipe's "
                "(see the check report's finding blend-step-condenses).",
                style="bold red",
            )
        )


def by_weight_line(st: StopTable, system: units.UnitSystem) -> str:
    """The one line of a vessel filled by weight: stop by the scale, at tare + charge where the
    tare is marked (the largest charge's reading rounded down, like the charge itself)."""
    target = units.format_mass(st.target_charge_kg, system)
    if st.tare_mass_kg is None:
        said = (
            f"Filled by weight: stop the fill when the scale shows {target} of gas added "
            "(no tare is marked: weigh the empty vessel first and add it)"
        )
        if st.max_safe_charge_kg is not None:
            said += (
                f"; never more than {units.format_mass(st.max_safe_charge_kg, system, down=True)}"
            )
        return said + "."
    gross = units.format_mass(st.tare_mass_kg + st.target_charge_kg, system)
    tare = units.format_mass(st.tare_mass_kg, system)
    said = (
        f"Filled by weight: stop the fill at a scale reading of {gross} "
        f"(marked tare {tare} + {target})"
    )
    if st.max_safe_charge_kg is not None:
        top = units.format_mass(st.tare_mass_kg + st.max_safe_charge_kg, system, down=True)
        said += f"; never above {top} (tare + the largest charge within the limits)"
    return said + ". No table of stop pressures: the scale, not the gauge, measures this charge."


def render_reading(
    r: Reading,
    console: Console,
    system: units.UnitSystem,
    atm: float,
    record: Record | None = None,
) -> None:
    """Print what a gauge reading means for the vessel."""
    from fillcheck.report.terminal import trimmed

    with trimmed(console):
        _reading(r, console, system, atm, record)


def _reading(
    r: Reading,
    console: Console,
    system: units.UnitSystem,
    atm: float,
    record: Record | None,
) -> None:
    p = lambda x: units.format_pressure(x, system, atmospheric_pressure_Pa=atm)  # noqa: E731
    t = lambda x: units.format_temperature(x, system)  # noqa: E731
    _head(console, "gauge reading", record)
    console.print(
        f"Vessel {r.vessel_id} ({r.gas}, model {r.model}): {p(r.measured_pressure_Pa)} with the "
        f"gas at {t(r.gas_temperature_K)} ({r.phase}) means a charge of "
        f"{units.format_mass(r.charge_kg, system)}, settling at {p(r.settled_pressure_Pa)} at "
        f"{t(r.reference_temperature_K)}."
    )
    console.print(
        f"With the gauge within ±{units.format_share(r.gauge_uncertainty, 0)} of its reading "
        "and the gas "
        f"temperature within ±{r.thermometer_uncertainty_K:g} K, the charge lies between "
        f"{units.format_mass(r.charge_low_kg, system)} and "
        f"{units.format_mass(r.charge_high_kg, system)}."
    )
    line = f"That is {units.format_share(r.fraction_of_target)} of the planned charge"
    if r.fraction_of_max_safe is not None:
        line += (
            f" and {units.format_share(r.fraction_of_max_safe)} of the largest charge within "
            "the limits"
        )
    console.print(line + ".")
    if r.fraction_of_max_safe is not None and r.fraction_of_max_safe > 1.0:
        console.print(
            Text(
                "Above the largest charge within the limits: do not store it this full.",
                style="bold red",
            )
        )
    elif r.may_exceed_plan:
        console.print(
            Text(
                "Within the gauge's and the thermometer's errors the charge may be over the "
                "largest charge within the limits: weigh it before storing it.",
                style="bold red",
            )
        )
    if r.blended:
        console.print(
            Text(
                "This vessel is blended in the cylinder: the reading is of the finished "
                "mixture. Part-way through the blend the contents are not that mixture; read a "
                "step against its stop pressure in the recipe (check or stop-table).",
                style="bold",
            )
        )
    console.print(f"Model: {r.model_name} ({r.model}); {r.model_source}")
    _foot(console, record)


def planning_json(obj: list[StopTable] | Reading, record: Record | None = None) -> str:
    """JSON of a stop-fill table list or a reading (SI units, pressures absolute)."""
    body: Any = (
        [dataclasses.asdict(x) for x in obj] if isinstance(obj, list) else dataclasses.asdict(obj)
    )
    return json.dumps(
        {
            "fillcheck_version": __version__,
            **({} if record is None else record_json(record)),
            "result": body,
        },
        indent=2,
        ensure_ascii=False,
    )
