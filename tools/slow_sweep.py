"""The 10,000-scenario safety-invariant sweep, in shards that add up across runs.

The slow properties of tests/test_safety_invariants.py draw 3000 + 2500 + 2000 + 2000 + 500
scenarios. Split into S shards, shard k runs every slow property with ⌈n/S⌉ examples and the
hypothesis seed k, so shards are separate draws and can run on different days or machines. Each
finished (property, shard) is appended as one JSON line to the log with the count hypothesis
reports ("N passing, M failing"), the exit status and a fingerprint of the code it ran on (a
SHA-256 over fillcheck/ and the invariants' test file). A tally only adds up shards of one
fingerprint: a change to the package or the properties starts the count again.

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


def fingerprint(root: Path = ROOT) -> str:
    """SHA-256 (first 16 hex digits) over the tracked files of the package and the invariants'
    test file, as they are in the working copy."""
    listed = subprocess.run(
        ["git", "ls-files", "-z", "fillcheck", TEST_FILE], cwd=root, capture_output=True, check=True
    ).stdout.decode()
    h = hashlib.sha256()
    for name in sorted(n for n in listed.split("\0") if n):
        h.update(name.encode())
        h.update((root / name).read_bytes())  # the working copy, so an edit is a new code
    return h.hexdigest()[:16]


def run_shard(prop: str, shard: int, shards: int) -> dict[str, object]:
    """Run one property's shard; the record to log."""
    env = dict(os.environ, FILLCHECK_SWEEP_SHARDS=str(shards), PYTHONPATH=str(ROOT))
    cmd = [
        sys.executable, "-m", "pytest", "-q", "-p", "no:cacheprovider", "-m", "slow", "-x",
        f"--hypothesis-seed={shard}", "--hypothesis-show-statistics", f"{TEST_FILE}::{prop}",
    ]  # fmt: skip
    t0 = time.time()
    out = subprocess.run(cmd, cwd=ROOT, env=env, capture_output=True, text=True)
    m = _COUNTS.search(out.stdout)
    record: dict[str, object] = {
        "utc": time.strftime("%Y-%m-%dT%H:%M:%SZ", time.gmtime()),
        "code": fingerprint(),
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


def tally(log: Path, code: str, shards: int) -> tuple[int, int, list[str]]:
    """(passing scenarios, failed runs, lines) over this code's records split into ``shards``
    (shard k of one split and of another draw from the same seed, so splits never add), one per
    (property, shard): a repeated run counts once, its last record."""
    seen: dict[tuple[object, ...], dict[str, object]] = {}
    for r in read_log(log):
        if r["code"] == code and r["shards"] == shards:
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
    code = fingerprint()
    todo = list(a.run)
    done = {
        (r["property"], r["shard"])
        for r in read_log(a.log)
        if r["code"] == code and r["shards"] == a.shards and r["rc"] == 0
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
        passing, failed, lines = tally(a.log, code, a.shards)
        print(f"code {code}, {a.shards} shards: {passing} scenarios passing of 10,000; "
              f"{failed} failed run(s)")  # fmt: skip
        print("\n".join(lines))
        return 1 if failed else 0
    return 0


if __name__ == "__main__":
    raise SystemExit(main())
