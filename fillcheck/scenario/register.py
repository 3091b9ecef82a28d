"""A register of vessels (CSV): one vessel a row, the columns of INTERFACES.md §2 and §5.

Cells are the same quantity strings as in a scenario file; an empty cell is an absent value; an
unknown column is refused by name; errors name the row and the column. A mixture's gas cell
lists its gases with their mole fractions joined by "+", e.g.
``argon 82 % + carbon dioxide 18 %`` or ``nitrogen 0.7 + carbon dioxide 0.3``; a blend's
order (INTERFACES.md §7) lists the components in the order they go in joined by ">", e.g.
``carbon dioxide > nitrogen``, with the blend temperature in its own column.
"""

from __future__ import annotations

import csv
import dataclasses
import io
import os
import re
import stat
from collections.abc import Iterable, Iterator
from pathlib import Path
from typing import Any

from fillcheck.errors import InputError
from fillcheck.scenario.area_input import AreaInput
from fillcheck.scenario.bounds import TEXT_CHARS_MAX
from fillcheck.scenario.resolve import Scenario, scenario_from_dict
from fillcheck.scenario.source import _FLAGS, _reason, read_input_with_digest
from fillcheck.scenario.text import neutralise

COLUMNS: dict[str, str] = {
    "id": "id",
    "gas": "gas",
    "water_capacity": "water_capacity",
    "fill_pressure": "fill.pressure",
    "fill_mass": "fill.mass",
    "filling_ratio": "fill.filling_ratio",
    "settled_pressure": "fill.settled_pressure",
    "fill_temperature": "fill.temperature",
    "max_temperature": "storage.max_temperature",
    "min_temperature": "storage.min_temperature",
    "allowable_pressure": "limits.allowable_pressure",
    "relief_set_pressure": "limits.relief_set_pressure",
    "relief_device": "limits.relief_device",
    "max_filling_ratio": "limits.max_filling_ratio",
    "max_filling_density": "limits.max_filling_density",
    "working_pressure": "marking.working_pressure",
    "service_pressure": "marking.service_pressure",
    "test_pressure": "marking.test_pressure",
    "tare_mass": "marking.tare_mass",
    "area": "area",
    "composition_basis": "composition_basis",
    "blend_order": "blend.order",
    "blend_temperature": "blend.temperature",
}
"""Register column -> scenario field path."""
REQUIRED = ("id", "gas", "water_capacity", "max_temperature", "allowable_pressure")
FIELDS = {v: k for k, v in COLUMNS.items()}
"""Scenario field path -> register column (for messages)."""


def load_register(
    path: str | Path, title: str | None = None, areas: tuple[AreaInput, ...] = ()
) -> Scenario:
    """Read and validate a CSV register of vessels (``areas``: the storage areas its column
    ``area`` may name, read with :func:`load_areas`)."""
    p = Path(path)
    text, digest = read_input_with_digest(path, "register (.csv)", "save the register as UTF-8 CSV")
    return dataclasses.replace(register_from_text(text, p.name, title, areas), input_sha256=digest)


def load_areas(path: str | Path) -> tuple[AreaInput, ...]:
    """The ``[[area]]`` tables of a TOML file (a register's ``--areas``), validated; the file
    holds areas only."""
    import tomllib

    from pydantic import BaseModel, ConfigDict, Field, ValidationError

    from fillcheck.scenario.area_input import AreaSpec, resolve_areas

    class _Areas(BaseModel):
        model_config = ConfigDict(extra="forbid", frozen=True)
        area: list[AreaSpec] = Field(min_length=1)

    name = neutralise(Path(path).name)
    text, _ = read_input_with_digest(path, "areas file (.toml)", "save the areas as UTF-8 TOML")
    try:
        raw = tomllib.loads(text)
    except tomllib.TOMLDecodeError as exc:
        raise InputError(
            f"{name}: is not valid TOML ({exc}); check quotes and brackets near that line"
        ) from None
    try:
        spec = _Areas.model_validate(raw)
    except ValidationError as exc:
        err = exc.errors()[0]
        loc = list(err["loc"])
        at = ""
        if len(loc) >= 2 and loc[0] == "area" and isinstance(loc[1], int):
            tables = raw.get("area") if isinstance(raw.get("area"), list) else []
            aid = tables[loc[1]].get("id") if isinstance(tables[loc[1]], dict) else None
            at = (
                f"area '{neutralise(str(aid))}', "
                if aid is not None
                else f"area number {loc[1] + 1}, "
            )
            loc = loc[2:]
        field = ".".join(str(p) for p in loc) or "area"
        what = {
            "missing": "is required but missing",
            "extra_forbidden": (
                "is not a key of an [[area]] table (an areas file holds [[area]] tables only)"
            ),
        }.get(err["type"], neutralise(err["msg"]).lower())
        raise InputError(f"{name}: {at}field '{neutralise(field)}': {what}") from None
    return resolve_areas(spec.area, name, InputError)


LINE_BYTES_MAX = 65_536
"""A line of a register read as a stream holds at most this many bytes [-]: a row of every
column at TEXT_CHARS_MAX characters, quoted, needs about 12,000; a longer line is refused by its
number before it is held in memory."""


def stream_rows(path: str | Path, digest: Any = None) -> Iterator[list[str]]:
    """The rows of a CSV register (header first), cells stripped and neutralised, read from the
    file as they are used: for ``--jsonl`` and the streamed ``--json`` (fillcheck.records),
    whose memory is bounded by a chunk of vessels whatever the register's length, so no size
    limit applies. The file is opened and checked (a regular file, not a folder or a device) at
    the call; a line that is not UTF-8 or is over-long, bad CSV or an over-long cell is refused
    naming its line or row when the stream reaches it (the streamed outputs are written only
    once complete, so a refusal leaves nothing). ``digest`` (a ``hashlib`` object), when given,
    is fed every byte read, so that once the stream is exhausted it holds the hash of exactly
    the bytes the rows came from (the permit-file record's input hash)."""
    p = Path(path)
    name = neutralise(p.name)
    fh = _open_register(p)

    def rows() -> Iterator[list[str]]:
        with fh:
            yield from _records(_text_lines(fh, name, digest), name)

    return rows()


def _records(lines: Iterable[str], name: str) -> Iterator[list[str]]:
    """The CSV records of ``lines``, each checked as it is read (_check_cells), so that the
    first problem of a file is the one refused, whichever reader reads it; text that is not CSV
    is refused naming its row."""
    reader = csv.reader(lines)
    header: list[str] = []
    id_at: int | None = None
    n = 0
    while True:
        try:
            row = next(reader)
        except StopIteration:
            return
        except csv.Error as exc:
            raise InputError(
                f"{name}: row {n + 1}: is not valid CSV ({neutralise(str(exc))}); "
                "check the quotes in that row"
            ) from None
        n += 1
        if n == 1:
            header = [h.strip() if len(h) <= TEXT_CHARS_MAX else "" for h in row]
            id_at = header.index("id") if "id" in header else None
        _check_cells(row, n, header, id_at, name)
        yield row


def _open_register(p: Path) -> io.BufferedReader:
    """The register at ``p`` opened for reading bytes, or an InputError: no such file, a folder,
    or not a regular file (nothing is read from those)."""
    give = "give the path of a register (.csv) file"
    try:
        fd = os.open(p, _FLAGS)
    except (FileNotFoundError, NotADirectoryError):
        raise InputError(f"{neutralise(str(p))}: no such file; {give}") from None
    except IsADirectoryError:
        raise InputError(f"{neutralise(str(p))}: is a folder; {give}") from None
    except (OSError, ValueError) as exc:
        raise InputError(f"{neutralise(p.name)}: cannot be read ({_reason(exc)}); {give}") from None
    st = os.fstat(fd)
    if not stat.S_ISREG(st.st_mode):
        os.close(fd)
        what = (
            "is a folder"
            if stat.S_ISDIR(st.st_mode)
            else ("is not a regular file (a device, a pipe or a socket)")
        )
        raise InputError(f"{neutralise(str(p))}: {what}; {give}")
    return open(fd, "rb")  # closed by stream_rows


def _text_lines(fh: io.BufferedReader, name: str, digest: Any = None) -> Iterator[str]:
    """The lines of ``fh`` decoded as UTF-8 (leading byte-order marks dropped, as the whole-file
    reader does), one at a time; a line longer than LINE_BYTES_MAX is refused before it is held
    whole, and a line that is not UTF-8 is refused by its number."""
    n = 0
    while True:
        raw = fh.readline(LINE_BYTES_MAX + 1)
        if not raw:
            return
        if digest is not None:
            digest.update(raw)
        n += 1
        if len(raw) > LINE_BYTES_MAX:
            raise InputError(
                f"{name}: line {n}: is longer than {LINE_BYTES_MAX:,} bytes, more than any "
                "register row needs; check the file"
            )
        try:
            line = raw.decode("utf-8")
        except UnicodeDecodeError:
            raise InputError(
                f"{name}: line {n}: is not UTF-8 text; save the register as UTF-8 CSV"
            ) from None
        if n == 1:
            line = line.lstrip("\ufeff")
            if not line:  # a file of byte-order marks only is empty
                continue
        yield line


def _rows(text: str, name: str) -> list[list[str]]:
    """The CSV records of ``text``, every cell stripped and neutralised; a cell longer than
    TEXT_CHARS_MAX, or text that is not CSV, is refused naming the row (and the column)."""
    # the module-wide field limit is lifted while reading (a cell can be no longer than the
    # text), so that a long cell is refused by its row and column, not by the csv module
    old = csv.field_size_limit()
    csv.field_size_limit(max(old, len(text) + 1))
    try:
        return list(_records(io.StringIO(text), neutralise(name)))
    finally:
        csv.field_size_limit(old)


def _check_cells(row: list[str], n: int, header: list[str], id_at: int | None, name: str) -> None:
    """Refuse a cell of row ``n`` longer than TEXT_CHARS_MAX (naming the row, the vessel and
    the column), then strip and neutralise every cell in place."""
    for i, cell in enumerate(row):
        if len(cell) > TEXT_CHARS_MAX:
            col = f"column {i + 1}"
            if n > 1 and i < len(header) and header[i]:
                col = f"column '{neutralise(header[i])}'"
            at = f"row {n}"
            vid = row[id_at].strip() if id_at is not None and id_at < len(row) else ""
            if n > 1 and vid and len(vid) <= 60:
                at += f" (vessel '{neutralise(vid)}')"
            raise InputError(
                f"{name}: {at}, {col}: the cell holds {len(cell):,} characters, more "
                f"than the {TEXT_CHARS_MAX} a register cell may hold; check the file"
            )
    row[:] = [neutralise(cell.strip()) for cell in row]


def register_from_text(
    text: str, name: str, title: str | None = None, areas: tuple[AreaInput, ...] = ()
) -> Scenario:
    """Validate a register given as CSV text (``areas``: those its column ``area`` may name)."""
    rows = _rows(text.lstrip("\ufeff"), name)
    name = neutralise(name)
    if not rows:
        raise InputError(f"{name}: is empty; the first row must name the columns")
    header, records = rows[0], rows[1:]
    check_columns(header, name)
    vessels = [row_vessel(header, row, name, n) for n, row in checked_rows(header, records, name)]
    if not vessels:
        raise InputError(f"{name}: has a header but no vessels; add one vessel a row")
    return scenario_from_dict(
        {"title": title, "vessel": vessels} if title else {"vessel": vessels},
        name,
        FIELDS,
        areas=areas,
    )


def checked_rows(header: list[str], records: Iterable[list[str]], name: str):  # type: ignore[no-untyped-def]
    """(row number, cells) of each record, refusing an empty row or one whose cell count
    differs from the header's; row 1 is the header."""
    for n, row in enumerate(records, start=2):
        if not any(row):
            raise InputError(f"{name}: row {n} is empty; remove it")
        if len(row) != len(header):
            raise InputError(
                f"{name}: row {n} has {len(row)} cells but the header has {len(header)} columns"
            )
        yield n, row


def check_columns(header: list[str], name: str) -> None:
    """Refuse an unknown, repeated or missing required column, in one sentence."""
    for col in header:
        if col not in COLUMNS:
            raise InputError(
                f"{name}: column '{col}' is not a register column; the columns are "
                f"{', '.join(COLUMNS)}"
            )
    if len(set(header)) != len(header):
        twice = next(h for h in header if header.count(h) > 1)
        raise InputError(f"{name}: column '{twice}' appears twice; give each column once")
    for col in REQUIRED:
        if col not in header:
            raise InputError(f"{name}: the required column '{col}' is missing")


def row_vessel(header: list[str], row: list[str], name: str, n: int) -> dict[str, object]:
    """One register row (cells already stripped) as a ``[[vessel]]`` table; empty cells are
    absent values."""
    vessel: dict[str, object] = {}
    for col, cell in zip(header, row, strict=True):
        if not cell:
            continue
        path = COLUMNS[col].split(".")
        target = vessel
        for key in path[:-1]:
            target = target.setdefault(key, {})  # type: ignore[assignment]
        target[path[-1]] = cell  # type: ignore[index]
    if isinstance(vessel.get("gas"), str) and "+" in str(vessel["gas"]):
        vessel["gas"] = _mixture_cell(str(vessel["gas"]), name, n)
    elif isinstance(vessel.get("gas"), str):
        _single_gas_row(header, row, str(vessel["gas"]), name, n)
    blend = vessel.get("blend")
    if isinstance(blend, dict) and "order" in blend:
        blend["order"] = _order_cell(str(blend["order"]), name, n)
    for table in ("fill", "storage", "limits"):
        vessel.setdefault(table, {})
    return vessel


_MIXTURE_ONLY = ("composition_basis", "blend_order", "blend_temperature")


def _single_gas_row(header: list[str], row: list[str], gas: str, name: str, n: int) -> None:
    """Refuse, in the register's own terms, the columns that go with a mixture only on a row
    whose gas cell names one gas."""
    given = [c for c, cell in zip(header, row, strict=True) if cell and c in _MIXTURE_ONLY]
    if given:
        vid = next((cell for c, cell in zip(header, row, strict=True) if c == "id"), "")
        who = f" (vessel '{vid}')" if vid else ""
        raise InputError(
            f"{name}: row {n}{who}, column '{given[0]}': goes with a mixture only, but the gas "
            f"cell names one gas, '{gas}'; leave the cell empty, or give the mixture in the gas "
            "cell, e.g. 'nitrogen 70 % + carbon dioxide 30 %'"
        )


def _order_cell(cell: str, name: str, row: int) -> list[str]:
    """A blend order cell, the components in the order they go in joined by ">", as a list."""
    parts = [p.strip() for p in cell.split(">")]
    if len(parts) < 2 or not all(parts):
        raise InputError(
            f"{name}: row {row}, column 'blend_order': '{cell}' is not an order of components; "
            "write the components in the order they go in joined by '>', e.g. "
            "'carbon dioxide > nitrogen'"
        )
    return parts


_PART = re.compile(r"^(?P<gas>.+?)\s+(?P<fraction>[0-9.eE+-]+\s*%?)$")


def _mixture_cell(cell: str, name: str, row: int) -> dict[str, str]:
    """A mixture's gas cell as the scenario's gas table: name -> fraction text."""
    out: dict[str, str] = {}
    for part in cell.split("+"):
        m = _PART.match(part.strip())
        if m is None:
            raise InputError(
                f"{name}: row {row}, column 'gas': '{part.strip()}' is not a gas with its "
                "mole fraction; write a mixture as e.g. 'argon 82 % + carbon dioxide 18 %'"
            )
        out[m.group("gas").strip()] = m.group("fraction").replace(" ", " ")
    return out
