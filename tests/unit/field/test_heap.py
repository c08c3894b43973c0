"""Freed heap memory handed back to the system between solves
(auditor.field.heap) and the fan-out doing so after every item.

What is checked is the operating system's own account of the process
(``/proc/self/statm``, Linux; proc(5)), not anything padaudit computes.
"""

from __future__ import annotations

import sys

import pytest

from auditor.field import fanout as fanout_module
from auditor.field.fanout import Fanout
from auditor.field.heap import release_freed_memory

LINUX = sys.platform.startswith("linux")


def _resident_mb() -> float:
    with open("/proc/self/statm", encoding="ascii") as statm:
        return int(statm.read().split()[1]) * 4096 / 1e6


@pytest.mark.skipif(not LINUX, reason="/proc and glibc's malloc_trim are Linux's")
def test_freed_small_blocks_are_returned_to_the_system() -> None:
    if not release_freed_memory():
        pytest.skip("this C library has no malloc_trim")
    # 64 MB in 16 kB blocks: below the allocator's separate-mapping
    # threshold, so they come from the heap, which keeps them when freed
    # (glibc malloc(3), M_MMAP_THRESHOLD). Every other block is kept, so
    # the heap's top cannot simply shrink: only trimming returns the rest.
    blocks = [bytearray(16_384) for _ in range(4096)]
    kept = blocks[::2]
    del blocks
    before = _resident_mb()
    assert release_freed_memory()
    after = _resident_mb()
    assert len(kept) == 2048
    assert after < before - 16.0, (before, after)


def test_the_fanout_releases_memory_after_every_item(monkeypatch: pytest.MonkeyPatch) -> None:
    calls: list[int] = []
    monkeypatch.setattr(fanout_module, "release_freed_memory", lambda: calls.append(1) or True)
    squares = Fanout(lambda x: x * x, workers=1)
    for x in range(5):
        squares.add(x)
    assert squares.results() == [0, 1, 4, 9, 16]
    assert len(calls) == 5
