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

import itertools
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
    jobs: int = 1,
) -> Iterator[dict[str, Any]]:
    """Check vessels given as mappings of register columns; yield one result mapping each.

    Values are register cells: quantity strings with units (``"50 L"``, ``"200 barg"``); None,
    NaN and empty strings are absent values. Refused input raises InputError naming the record
    (as "row n", the n-th record), the vessel and the column, like a register's message.
    Results come in the order of the records, a chunk at a time; ``jobs`` > 1 checks chunks in
    that many worker processes (the results and refusals are the same as with one)."""
    yield from _stream(
        ((n, {str(k): _cell(v) for k, v in rec.items()}) for n, rec in enumerate(records, 1)),
        source,
        system,
        chunk_rows,
        jobs,
    )


def stream_register(
    rows: Iterable[list[str]], name: str, system: UnitSystem = "metric", jobs: int = 1
) -> Iterator[dict[str, Any]]:
    """The vessels of a register's rows (header first, cells stripped), a chunk at a time;
    ``rows`` may be a list or a stream (scenario.register.stream_rows), consumed as it goes."""
    from fillcheck.scenario.register import check_columns, checked_rows

    it = iter(rows)
    header = next(it, None)
    if header is None:
        raise InputError(f"{name}: is empty; the first row must name the columns")
    check_columns(header, name)
    first = next(it, None)
    if first is None:
        raise InputError(f"{name}: has a header but no vessels; add one vessel a row")

    records = (
        (n, dict(zip(header, row, strict=True)))
        for n, row in checked_rows(header, itertools.chain([first], it), name)
    )
    yield from _stream(records, name, system, CHUNK_ROWS, jobs)


Chunk = tuple[int, list[dict[str, object]]]
"""The row number of a chunk's first vessel and its vessels as ``[[vessel]]`` tables."""


def _chunks(
    numbered: Iterable[tuple[int, dict[str, str]]], name: str, chunk_rows: int
) -> Iterator[Chunk]:
    """Group numbered records into chunks of vessel tables, refusing an unknown column."""
    from fillcheck.scenario.register import COLUMNS, row_vessel
    from fillcheck.scenario.text import neutralise

    chunk: list[dict[str, object]] = []
    first = 0
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
            yield first, chunk
            chunk = []
    if chunk:
        yield first, chunk


def checked_chunk(chunk: Chunk, name: str, system: UnitSystem) -> list[dict[str, Any]]:
    """Validate and assess one chunk; the JSON vessel object of each of its vessels (a
    worker process's whole task with ``jobs`` > 1, so it is a module-level function)."""
    from fillcheck.assess.batch import assess_many
    from fillcheck.report.json_report import vessel_dict
    from fillcheck.scenario.register import FIELDS
    from fillcheck.scenario.resolve import scenario_from_dict

    first, vessels = chunk
    sc = scenario_from_dict({"vessel": vessels}, name, FIELDS, first_row=first)
    return [
        vessel_dict(a, sc.atmospheric_pressure_Pa, system)
        for a in assess_many(sc.vessels, sc.reference_temperature_K)
    ]


def _stream(
    numbered: Iterable[tuple[int, dict[str, str]]],
    name: str,
    system: UnitSystem,
    chunk_rows: int,
    jobs: int = 1,
) -> Iterator[dict[str, Any]]:
    seen: set[str] = set()
    for first, results in _checked_chunks(_chunks(numbered, name, chunk_rows), name, system, jobs):
        for i, result in enumerate(results):
            vid = str(result["id"])
            if vid in seen:
                raise InputError(
                    f"{name}: row {first + i} (vessel '{vid}'), column 'id': the id is used "
                    "twice; give every vessel its own id"
                )
            seen.add(vid)
            yield result
    if not seen:
        raise InputError(f"{name}: holds no vessels; give at least one")


def one_blas_thread() -> None:
    """Run numpy's BLAS (the matrix products of models/helmholtz_terms.py) on one thread in this
    process. Its products are a few thousand states by a few dozen terms: BLAS threads there
    spend more time waiting than working (a 3,000-row register took 1.4 times the CPU time with
    OpenBLAS's default threads on a 2-core machine, for the same wall time when the machine was
    idle and 1.2-1.3 times it when loaded; 2026-12-04), and one thread makes the round-off of a
    vessel's numbers independent of the machine's core count. For the command line and the worker
    processes of ``jobs`` only, never for a caller's own process. Without threadpoolctl (a
    dependency) it does nothing."""
    try:
        from threadpoolctl import threadpool_limits
    except ImportError:  # pragma: no cover - a dependency; speed only, never results
        return
    threadpool_limits(1, user_api="blas")


def _checked_chunks(
    chunks: Iterator[Chunk], name: str, system: UnitSystem, jobs: int
) -> Iterator[tuple[int, list[dict[str, Any]]]]:
    """(first row, results) of each chunk in order: here, or in ``jobs`` worker processes with
    at most two chunks a worker in flight (memory stays bounded by the chunks in flight)."""
    if jobs <= 1:
        for chunk in chunks:
            yield chunk[0], checked_chunk(chunk, name, system)
        return
    from collections import deque
    from concurrent.futures import ProcessPoolExecutor

    pool = ProcessPoolExecutor(max_workers=jobs, initializer=one_blas_thread)
    try:
        pending: deque[tuple[int, Any]] = deque()
        for chunk in chunks:
            pending.append((chunk[0], pool.submit(checked_chunk, chunk, name, system)))
            while len(pending) >= 2 * jobs:
                first, fut = pending.popleft()
                yield first, fut.result()
        while pending:
            first, fut = pending.popleft()
            yield first, fut.result()
    finally:
        # a refusal or an abandoned stream does not wait for the chunks still queued
        pool.shutdown(wait=True, cancel_futures=True)
