"""The slow tier's sample in the default run.

Tests marked ``slow`` are the full sweeps. The default run (``-m 'not slow'``, what CI runs) also
runs a fixed sample of them: one in ``SLOW_SAMPLE_EVERY`` of the parametrised cases, chosen by a
checksum of the test's id, so every run takes the same cases and every parametrised slow test
keeps at least one. A slow test that is not parametrised (a long hypothesis run, whose default
counterpart is a shorter run of the same property) is left to ``-m slow``.
``python -m pytest -m slow`` runs all of them.
"""

from __future__ import annotations

import zlib
from collections import defaultdict

import pytest

SLOW_SAMPLE_EVERY = 10
"""One slow case in this many runs by default (the same ones every time)."""


def _chosen(nodeid: str) -> bool:
    return zlib.crc32(nodeid.encode()) % SLOW_SAMPLE_EVERY == 0


@pytest.hookimpl(tryfirst=True)
def pytest_collection_modifyitems(config: pytest.Config, items: list[pytest.Item]) -> None:
    """Unmark the sampled slow cases so that the default ``-m 'not slow'`` keeps them."""
    if "not slow" not in (config.getoption("markexpr") or ""):
        return
    by_function: dict[str, list[pytest.Item]] = defaultdict(list)
    for item in items:
        if item.get_closest_marker("slow") is not None and "[" in item.nodeid:
            by_function[item.nodeid.split("[")[0]].append(item)
    for cases in by_function.values():
        chosen = [c for c in cases if _chosen(c.nodeid)] or cases[:1]
        for item in chosen:
            item.own_markers = [m for m in item.own_markers if m.name != "slow"]
            item.add_marker(pytest.mark.slow_sample)
