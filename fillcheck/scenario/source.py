"""Reading an input file: only a regular file of bounded size, as UTF-8 text.

A device (``/dev/zero``), a pipe, a socket or a folder is refused before a byte is read, and no
more than :data:`~fillcheck.scenario.bounds.INPUT_BYTES_MAX` bytes are ever read, so a wrong
path can neither hang the command nor exhaust memory.
"""

from __future__ import annotations

import hashlib
import os
import stat
from pathlib import Path

from fillcheck.errors import InputError
from fillcheck.scenario.bounds import INPUT_BYTES_MAX

_FLAGS = os.O_RDONLY | getattr(os, "O_NONBLOCK", 0) | getattr(os, "O_NOCTTY", 0)
_FLAGS |= getattr(os, "O_BINARY", 0)


def read_input(path: str | Path, what: str, save_as: str) -> str:
    """The text of an input file (see :func:`read_input_with_digest`)."""
    return read_input_with_digest(path, what, save_as)[0]


def read_input_with_digest(path: str | Path, what: str, save_as: str) -> tuple[str, str]:
    """The text of the input file at ``path``, or an InputError naming it.

    Parameters
    ----------
    path : str or Path
        The file as the user gave it.
    what : str
        What the file should be, for messages, e.g. ``"scenario (.toml)"``.
    save_as : str
        How to save it right, e.g. ``"save the scenario as UTF-8 TOML"``.

    Returns
    -------
    (str, str)
        The decoded text, without a leading byte-order mark, and the hex SHA-256 of the bytes
        read (the record of the input, report.permit_record).
    """
    p = Path(path)
    give = f"give the path of a {what} file"
    try:
        st = p.stat()
    except (FileNotFoundError, NotADirectoryError):
        raise InputError(f"{path}: no such file; {give}") from None
    except (OSError, ValueError) as exc:
        raise InputError(f"{path}: cannot be read ({_reason(exc)}); {give}") from None
    if stat.S_ISDIR(st.st_mode):
        raise InputError(f"{path}: is a folder; {give}")
    if not stat.S_ISREG(st.st_mode):
        raise InputError(f"{path}: is not a regular file (a device, a pipe or a socket); {give}")
    if st.st_size > INPUT_BYTES_MAX:
        raise _too_large(p, what)
    try:
        fd = os.open(p, _FLAGS)
    except OSError as exc:
        raise InputError(f"{p.name}: cannot be read ({_reason(exc)}); {give}") from None
    try:
        st = os.fstat(fd)  # the file opened, which a race may have swapped for another
        if not stat.S_ISREG(st.st_mode):
            raise InputError(
                f"{path}: is not a regular file (a device, a pipe or a socket); {give}"
            )
        with os.fdopen(fd, "rb", closefd=False) as fh:
            data = fh.read(INPUT_BYTES_MAX + 1)
    except OSError as exc:
        raise InputError(f"{p.name}: cannot be read ({_reason(exc)}); {give}") from None
    finally:
        os.close(fd)
    if len(data) > INPUT_BYTES_MAX:
        raise _too_large(p, what)
    try:
        text = data.decode("utf-8")
    except UnicodeDecodeError:
        raise InputError(f"{p.name}: is not a UTF-8 text file; {save_as}") from None
    return text.lstrip("\ufeff"), hashlib.sha256(data).hexdigest()


def _too_large(p: Path, what: str) -> InputError:
    return InputError(
        f"{p.name}: is larger than {INPUT_BYTES_MAX // (1024 * 1024)} MB, more than any {what} "
        "file needs; check the path, or split the file"
    )


def _reason(exc: Exception) -> str:
    return (exc.strerror if isinstance(exc, OSError) and exc.strerror else str(exc)) or "error"
