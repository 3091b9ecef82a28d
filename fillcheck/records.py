"""A fleet as a stream: registers checked a chunk of vessels at a time.

``check_records`` takes mappings with the register's columns (one vessel each, e.g. a pandas
DataFrame's ``to_dict("records")``) and yields one result mapping a vessel, with the keys of the
JSON vessel object (README, "JSON reference"). ``stream_register`` does the same for the rows of
a CSV register, for ``fillcheck check REGISTER.csv --jsonl OUT``. Vessels are validated and
assessed CHUNK_ROWS at a time, so memory stays bounded by the chunk whatever the fleet's size;
the results of a chunk are the same as those of the vessels checked alone (one path for every
batch size, assess/batch.py).
"""

from __future__ import annotations

import math
from collections.abc import Iterable, Iterator, Mapping
from typing import Any

from fillcheck.errors import InputError
from fillcheck.units import UnitSystem

CHUNK_ROWS = 2000
"""Vessels validated and assessed together [-] (bounds memory; matches assess.batch's chunk)."""


def _cell(value: Any) -> str:
    """A record's value as register cell text: None, NaN and blanks are an empty (absent) cell."""
    if value is None:
        return ""
    if isinstance(value, float) and math.isnan(value):
        return ""
    return str(value).strip()


def check_records(
    records: Iterable[Mapping[str, Any]],
    *,
    source: str = "records",
    system: UnitSystem = "metric",
    chunk_rows: int = CHUNK_ROWS,
) -> Iterator[dict[str, Any]]:
    """Check vessels given as mappings of register columns; yield one result mapping each.

    Values are register cells: quantity strings with units (``"50 L"``, ``"200 barg"``); None,
    NaN and empty strings are absent values. Refused input raises InputError naming the record
    (as "row n", the n-th record), the vessel and the column, like a register's message.
    Results come in the order of the records, a chunk at a time."""
    yield from _stream(
        ((n, {str(k): _cell(v) for k, v in rec.items()}) for n, rec in enumerate(records, 1)),
        source,
        system,
        chunk_rows,
    )


def stream_register(
    rows: list[list[str]], name: str, system: UnitSystem = "metric"
) -> Iterator[dict[str, Any]]:
    """The vessels of a register's rows (header first, cells stripped), a chunk at a time."""
    from fillcheck.scenario.register import check_columns, checked_rows

    if not rows:
        raise InputError(f"{name}: is empty; the first row must name the columns")
    header = rows[0]
    check_columns(header, name)
    if len(rows) == 1:
        raise InputError(f"{name}: has a header but no vessels; add one vessel a row")

    records = (
        (n, dict(zip(header, row, strict=True))) for n, row in checked_rows(header, rows[1:], name)
    )
    yield from _stream(records, name, system, CHUNK_ROWS)


def _stream(
    numbered: Iterable[tuple[int, dict[str, str]]],
    name: str,
    system: UnitSystem,
    chunk_rows: int,
) -> Iterator[dict[str, Any]]:
    from fillcheck.assess.batch import assess_many
    from fillcheck.report.json_report import vessel_dict
    from fillcheck.scenario.register import COLUMNS, FIELDS, row_vessel
    from fillcheck.scenario.resolve import scenario_from_dict
    from fillcheck.scenario.text import neutralise

    seen: set[str] = set()
    chunk: list[dict[str, object]] = []
    first = 0

    def flush() -> Iterator[dict[str, Any]]:
        sc = scenario_from_dict({"vessel": chunk}, name, FIELDS, first_row=first)
        for i, v in enumerate(sc.vessels):
            if v.id in seen:
                row = first + i
                raise InputError(
                    f"{name}: row {row} (vessel '{v.id}'), column 'id': the id is used twice; "
                    "give every vessel its own id"
                )
            seen.add(v.id)
        for a in assess_many(sc.vessels, sc.reference_temperature_K):
            yield vessel_dict(a, sc.atmospheric_pressure_Pa, system)

    for n, record in numbered:
        unknown = [k for k in record if k not in COLUMNS]
        if unknown:
            raise InputError(
                f"{name}: row {n}: column '{neutralise(unknown[0])[:60]}' is not a register "
                f"column; the columns are {', '.join(COLUMNS)}"
            )
        header = [k for k, cell in record.items() if cell]
        if not chunk:
            first = n
        cells = [neutralise(record[k]) for k in header]
        chunk.append(row_vessel(header, cells, name, n))
        if len(chunk) >= chunk_rows:
            yield from flush()
            chunk = []
    if chunk:
        yield from flush()
    elif not seen:
        raise InputError(f"{name}: holds no vessels; give at least one")
