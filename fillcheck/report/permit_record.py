"""The permit-file record: what every printout carries so that it can be filed and signed.

Every printout (`check` as text, HTML and JSON, `stop-table`, `reading`) carries the same
header: a report id, the date and time with its UTC offset, the input file as given with the
SHA-256 of the bytes fillcheck read, the fillcheck version and one SHA-256 over the gas-data
files the check used; then the scenario's optional site, permit number and prepared-by. A
printout ends with the sign-off block.

The time is the local time of the machine with its offset; where the environment sets
``SOURCE_DATE_EPOCH`` (seconds since 1970 UTC, the reproducible-builds.org convention) that time
is used instead, in UTC, so that a printout can be reproduced byte for byte. The report id is
derived from the time and the input's digest: ``FC-20261202T133005Z-3f2a9c1b``.
"""

from __future__ import annotations

import datetime as _dt
import hashlib
import os
from dataclasses import dataclass
from pathlib import Path
from typing import TYPE_CHECKING

from fillcheck import __version__

if TYPE_CHECKING:
    from fillcheck.scenario.resolve import Scenario

DATA_DIR = Path(__file__).resolve().parents[1] / "fluids" / "data"
"""Where the gas data live (catalog, reference equations, mixture parameters, accuracy)."""

SIGN_OFF = ("Prepared by", "Checked by", "Permit number", "Date", "Signature")
"""The sign-off block's lines, in order."""


@dataclass(frozen=True)
class Record:
    """The record of one printout (text only: it is printed as it stands)."""

    report_id: str
    generated_at: str
    """ISO 8601 date and time with its UTC offset, to the second."""
    input_file: str
    """The input file as the user gave it."""
    input_sha256: str | None
    """Hex SHA-256 of the input's bytes (None where the input was not read from a file)."""
    fillcheck_version: str
    gas_data_sha256: str
    """Hex SHA-256 over the gas-data files used (their names and bytes, in name order)."""
    gas_data_files: tuple[str, ...]
    """Those files, relative to the data folder."""
    site: str | None = None
    permit_number: str | None = None
    prepared_by: str | None = None


def generated_now() -> _dt.datetime:
    """Now, with its UTC offset: the local time, or SOURCE_DATE_EPOCH in UTC where it is set."""
    epoch = os.environ.get("SOURCE_DATE_EPOCH", "").strip()
    if epoch.isdigit():
        return _dt.datetime.fromtimestamp(int(epoch), tz=_dt.UTC)
    return _dt.datetime.now().astimezone().replace(microsecond=0)


def gas_data_files(scenario: Scenario) -> tuple[str, ...]:
    """The gas-data files a scenario's check reads, relative to DATA_DIR, in name order.

    Always the catalog and the measured cubic accuracies; the reference-equation file of every
    gas (and mixture component) that has one; both mixture-parameter files where the scenario
    holds a mixture."""
    names = {"catalog.toml", "cubic_accuracy.json"}
    for v in scenario.vessels:
        f = v.fluid
        if getattr(f, "is_mixture", False):
            names |= {"mixtures/multifluid_pairs.json", "mixtures/cubic_kij.json"}
            gases = list(f.component_names)
        else:
            gases = [f.name]
        for g in gases:
            ref = f"reference/{g.replace(' ', '_')}.json"
            if (DATA_DIR / ref).is_file():
                names.add(ref)
    return tuple(sorted(names))


def files_digest(files: tuple[str, ...], folder: Path = DATA_DIR) -> str:
    """Hex SHA-256 over ``files`` (each file's name, a zero byte, its length and its bytes)."""
    h = hashlib.sha256()
    for name in files:
        data = (folder / name).read_bytes()
        h.update(name.encode("utf-8") + b"\0" + str(len(data)).encode("ascii") + b"\0")
        h.update(data)
    return h.hexdigest()


def make_record(
    scenario: Scenario, input_file: str | Path, now: _dt.datetime | None = None
) -> Record:
    """The record of a printout of ``scenario`` read from ``input_file``."""
    when = (now or generated_now()).replace(microsecond=0)
    if when.tzinfo is None:
        when = when.astimezone()
    stamp = when.astimezone(_dt.UTC).strftime("%Y%m%dT%H%M%SZ")
    digest = scenario.input_sha256
    files = gas_data_files(scenario)
    return Record(
        report_id=f"FC-{stamp}-{(digest or '0' * 8)[:8]}",
        generated_at=when.isoformat(),
        input_file=str(input_file),
        input_sha256=digest,
        fillcheck_version=__version__,
        gas_data_sha256=files_digest(files),
        gas_data_files=files,
        site=scenario.site,
        permit_number=scenario.permit_number,
        prepared_by=scenario.prepared_by,
    )


def record_rows(r: Record) -> list[tuple[str, str]]:
    """The header rows of a printout, label and value."""
    rows = [
        ("report id", r.report_id),
        ("generated", r.generated_at),
        ("input file", Path(r.input_file).name),
    ]
    if Path(r.input_file).name != r.input_file:
        rows.append(("input file as given", r.input_file))
    rows += [
        ("input SHA-256", r.input_sha256 or "— (not read from a file)"),
        ("tool", f"fillcheck {r.fillcheck_version}"),
        ("gas data SHA-256", f"{r.gas_data_sha256} ({len(r.gas_data_files)} files)"),
    ]
    for label, value in (
        ("site", r.site),
        ("permit number", r.permit_number),
        ("prepared by", r.prepared_by),
    ):
        if value:
            rows.append((label, value))
    return rows


def sign_off_rows(r: Record | None) -> list[tuple[str, str]]:
    """The sign-off block: each line with what the scenario already gives, else blank."""
    given = {
        "Prepared by": None if r is None else r.prepared_by,
        "Permit number": None if r is None else r.permit_number,
    }
    return [(label, given.get(label) or "") for label in SIGN_OFF]


def record_json(r: Record) -> dict[str, object]:
    """The record's JSON keys (INTERFACES.md §5 and extensions)."""
    return {
        "report_id": r.report_id,
        "generated_at": r.generated_at,
        "input_file": r.input_file,
        "input_sha256": r.input_sha256,
        "gas_data_sha256": r.gas_data_sha256,
        "gas_data_files": list(r.gas_data_files),
        "site": r.site,
        "permit_number": r.permit_number,
        "prepared_by": r.prepared_by,
    }
