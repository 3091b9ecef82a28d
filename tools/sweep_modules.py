"""pytest plugin of tools/slow_sweep.py: at the end of a run, list the package's source files
the run imported (one repository-relative path a line) in the file named by
``FILLCHECK_SWEEP_MODULES``. A source file no run imported cannot have changed that run's
outcome, so the sweep's fingerprint covers only these, the package's data files and the
invariants' test file."""

from __future__ import annotations

import os
import sys
from pathlib import Path

ROOT = Path(__file__).resolve().parents[1]


def imported_sources(root: Path = ROOT) -> list[str]:
    """Repository-relative paths of the loaded modules of the ``fillcheck`` package."""
    pkg = (root / "fillcheck").resolve()
    out = set()
    for name, mod in list(sys.modules.items()):
        f = getattr(mod, "__file__", None)
        if not (name == "fillcheck" or name.startswith("fillcheck.")) or not f:
            continue
        p = Path(f).resolve()
        if pkg in p.parents:
            out.add(p.relative_to(root.resolve()).as_posix())
    return sorted(out)


def pytest_sessionfinish(session, exitstatus) -> None:
    target = os.environ.get("FILLCHECK_SWEEP_MODULES")
    if target:
        Path(target).write_text("\n".join(imported_sources()) + "\n")
