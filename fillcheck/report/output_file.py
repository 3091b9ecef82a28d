"""Writing an output file the user named: never over a device, a folder, a link or the input,
never over an existing file without ``--force``, and atomically (a temporary file in the same
folder, renamed when complete), so a refused or failed run leaves nothing behind."""

from __future__ import annotations

import os
import stat
import tempfile
from collections.abc import Iterator
from contextlib import contextmanager
from pathlib import Path
from typing import TextIO


def destination_problem(
    path: Path, force: bool, source: Path | None = None, kind_of_file: str = ".html file"
) -> str | None:
    """Why the report may not be written to ``path`` (one sentence), or None if it may.

    Only a new file, or with ``force`` an existing regular file, is written: never a device
    (``/dev/null``), a pipe, a folder or a symbolic link, and never the input file ``source``.
    """
    path = Path(path)
    try:
        st = os.lstat(path)
    except FileNotFoundError:
        st = None
    except OSError as exc:
        return f"{path}: cannot be written ({exc.strerror}); choose another path"
    if st is not None:
        if stat.S_ISLNK(st.st_mode):
            kind = "a symbolic link"
        elif stat.S_ISDIR(st.st_mode):
            kind = "a folder"
        elif not stat.S_ISREG(st.st_mode):
            kind = "a device, a pipe or a socket"
        else:
            kind = None
        if kind is not None:
            return f"{path}: is {kind}, not a regular file; give the path of a new {kind_of_file}"
        if source is not None and _same_file(path, Path(source)):
            return f"{path}: is the input file itself; give the {kind_of_file} another name"
        if not force:
            return f"{path}: the file exists; give --force to replace it, or another name"
    folder = path.parent if str(path.parent) else Path(".")
    if not folder.is_dir():
        return f"{path}: the folder {folder} does not exist; create it first"
    return None


def _same_file(a: Path, b: Path) -> bool:
    try:
        return os.path.samefile(a, b)
    except OSError:
        return False


@contextmanager
def replacing(path: Path, suffix: str) -> Iterator[TextIO]:
    """A text file to write ``path`` through: a temporary file beside it, given the permissions
    a new file gets and renamed over ``path`` when the block completes; removed if it fails.
    The caller has checked the destination (:func:`destination_problem`)."""
    folder = path.parent if str(path.parent) else Path(".")
    fd, tmp = tempfile.mkstemp(prefix=".fillcheck-", suffix=suffix, dir=folder)
    try:
        with os.fdopen(fd, "w", encoding="utf-8") as fh:
            yield fh
        umask = os.umask(0)
        os.umask(umask)
        os.chmod(tmp, 0o666 & ~umask)
        os.replace(tmp, path)
    except BaseException:
        Path(tmp).unlink(missing_ok=True)
        raise
