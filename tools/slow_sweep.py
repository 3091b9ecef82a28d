"""The 10,000-scenario safety-invariant sweep, in shards that add up across runs.

The slow properties of tests/test_safety_invariants.py draw 3000 + 2500 + 2000 + 2000 + 500
scenarios. Split into S shards, shard k runs every slow property with ⌈n/S⌉ examples and the
hypothesis seed k, so shards are separate draws and can run on different days or machines. Each
finished (property, shard) is appended as one JSON line to the log with the count hypothesis
reports ("N passing, M failing"), the exit status and a fingerprint of the code it ran on: a
SHA-256 over the package's source files the run imported (tools/sweep_modules.py lists them), the
package's data files and the invariants' test file. A tally adds up the shards whose fingerprint,
recomputed over their own files in the working copy, is unchanged: a change to any code a shard
ran, to the data or to the properties starts the count again; a change to a module no shard
imported (the command line, the terminal report) does not.

    python tools/slow_sweep.py --shards 20 --run 0 1 2     # shards 0-2 of 20
    python tools/slow_sweep.py --shards 20 --next 3        # the next three not yet in the log
    python tools/slow_sweep.py --tally                     # what the log holds for this code

Run from the repository root with this checkout importable (``PYTHONPATH=.``).
"""

from __future__ import annotations

import argparse
import hashlib
import json
import os
import re
import subprocess
import sys
import tempfile
import time
from pathlib import Path

ROOT = Path(__file__).resolve().parents[1]
TEST_FILE = "tests/test_safety_invariants.py"
#: The slow properties and their share of the 10,000 scenarios (the test file's ``_slow(n)``).
PROPERTIES = {
    "test_pass_is_safe_slow": 3000,
    "test_plan_passes_slow": 2500,
    "test_plan_monotone_slow": 2000,
    "test_no_passing_charge_above_plan_slow": 2000,
    "test_batch_independent_slow": 500,
}
DEFAULT_LOG = ROOT / "docs" / "slow_sweep.jsonl"
_COUNTS = re.compile(r"(\d+) passing, (\d+) failing, and (\d+) invalid")


def _tracked(root: Path) -> list[str]:
    listed = subprocess.run(
        ["git", "ls-files", "-z", "fillcheck", TEST_FILE], cwd=root, capture_output=True, check=True
    ).stdout.decode()
    return sorted(n for n in listed.split("\0") if n)


def fingerprint(root: Path = ROOT, sources: list[str] | None = None) -> str:
    """SHA-256 (first 16 hex digits) over the package's tracked files as they are in the working
    copy: every data file, the invariants' test file and the Python sources in ``sources`` (all
    of them when None). A listed source that is gone counts as changed."""
    names = _tracked(root)
    keep = set(sources) if sources is not None else None
    h = hashlib.sha256()
    for name in names:
        if keep is not None and name.endswith(".py") and name != TEST_FILE and name not in keep:
            continue
        h.update(name.encode())
        h.update((root / name).read_bytes())  # the working copy, so an edit is a new code
    if keep is not None:
        for gone in sorted(keep - set(names)):
            h.update(b"missing:" + gone.encode())
    return h.hexdigest()[:16]


def current(record: dict[str, object], cache: dict[tuple[str, ...], str]) -> bool:
    """Whether a log record ran on the code now in the working copy."""
    files = record.get("files")
    key = tuple(files) if isinstance(files, list) else ("*",)
    if key not in cache:
        cache[key] = fingerprint(sources=list(files)) if isinstance(files, list) else fingerprint()
    return record["code"] == cache[key]


def run_shard(prop: str, shard: int, shards: int) -> dict[str, object]:
    """Run one property's shard; the record to log."""
    with tempfile.TemporaryDirectory() as tmp:
        listing = Path(tmp) / "modules.txt"
        env = dict(
            os.environ,
            FILLCHECK_SWEEP_SHARDS=str(shards),
            FILLCHECK_SWEEP_MODULES=str(listing),
            PYTHONPATH=os.pathsep.join([str(ROOT), str(ROOT / "tools")]),
        )
        cmd = [
            sys.executable, "-m", "pytest", "-q", "-p", "no:cacheprovider", "-p", "sweep_modules",
            "-m", "slow", "-x", f"--hypothesis-seed={shard}", "--hypothesis-show-statistics",
            f"{TEST_FILE}::{prop}",
        ]  # fmt: skip
        t0 = time.time()
        out = subprocess.run(cmd, cwd=ROOT, env=env, capture_output=True, text=True)
        files = listing.read_text().split() if listing.exists() else None
    m = _COUNTS.search(out.stdout)
    record: dict[str, object] = {
        "utc": time.strftime("%Y-%m-%dT%H:%M:%SZ", time.gmtime()),
        "code": fingerprint(sources=files),
        "files": files if files is not None else "*",
        "property": prop,
        "shard": shard,
        "shards": shards,
        "passing": int(m.group(1)) if m else 0,
        "failing": int(m.group(2)) if m else None,
        "invalid": int(m.group(3)) if m else None,
        "rc": out.returncode,
        "seconds": round(time.time() - t0, 1),
    }
    if out.returncode != 0:
        record["tail"] = out.stdout[-3000:]
    return record


def read_log(log: Path) -> list[dict[str, object]]:
    if not log.exists():
        return []
    return [json.loads(line) for line in log.read_text().splitlines() if line.strip()]


def tally(log: Path, shards: int) -> tuple[int, int, list[str]]:
    """(passing scenarios, failed runs, lines) over this code's records split into ``shards``
    (shard k of one split and of another draw from the same seed, so splits never add), one per
    (property, shard): a repeated run counts once, its last record."""
    seen: dict[tuple[object, ...], dict[str, object]] = {}
    cache: dict[tuple[str, ...], str] = {}
    for r in read_log(log):
        if r["shards"] == shards and current(r, cache):
            seen[(r["property"], r["shard"])] = r
    lines, passing, failed = [], 0, 0
    for prop, share in PROPERTIES.items():
        rs = [r for k, r in seen.items() if k[0] == prop]
        ok = sum(int(r["passing"]) for r in rs if r["rc"] == 0)
        bad = sum(1 for r in rs if r["rc"] != 0)
        passing += ok
        failed += bad
        lines.append(f"{prop:42s} {ok:6d} of {share:5d} passing   {bad} failed run(s)")
    return passing, failed, lines


def main(argv: list[str] | None = None) -> int:
    ap = argparse.ArgumentParser(description=__doc__, formatter_class=argparse.RawTextHelpFormatter)
    ap.add_argument("--shards", type=int, default=20, help="shards the 10,000 are split into")
    ap.add_argument("--run", type=int, nargs="*", default=[], help="shard numbers to run")
    ap.add_argument("--next", type=int, default=0, help="run this many shards not yet logged")
    ap.add_argument("--tally", action="store_true", help="print the tally for this code")
    ap.add_argument("--log", type=Path, default=DEFAULT_LOG, help="JSON-lines log (appended)")
    a = ap.parse_args(argv)
    todo = list(a.run)
    cache: dict[tuple[str, ...], str] = {}
    done = {
        (r["property"], r["shard"])
        for r in read_log(a.log)
        if r["shards"] == a.shards and r["rc"] == 0 and current(r, cache)
    }
    if a.next:
        free = [k for k in range(a.shards) if any((p, k) not in done for p in PROPERTIES)]
        todo += free[: a.next]
    for k in todo:
        for prop in PROPERTIES:
            if (prop, k) in done:
                continue
            rec = run_shard(prop, k, a.shards)
            with a.log.open("a") as fh:
                fh.write(json.dumps(rec) + "\n")
            print(f"shard {k}/{a.shards} {prop}: {rec['passing']} passing, rc={rec['rc']}, "
                  f"{rec['seconds']} s", flush=True)  # fmt: skip
    if a.tally or not todo:
        passing, failed, lines = tally(a.log, a.shards)
        print(f"{a.shards} shards, on the present code: {passing} scenarios passing of 10,000; "
              f"{failed} failed run(s)")  # fmt: skip
        print("\n".join(lines))
        return 1 if failed else 0
    return 0


if __name__ == "__main__":
    raise SystemExit(main())
