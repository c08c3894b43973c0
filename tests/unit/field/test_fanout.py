"""Independent jobs over forked helpers (:mod:`auditor.field.fanout`).

The contract (common practice, no source): the results are those of running
the function in this process, in the order added, whatever the process
count; a helper that fails or dies loses nothing (its work is redone here,
so an error is raised as without helpers).
"""

from __future__ import annotations

import os
import sys
import time

import numpy as np
import pytest

from auditor.field.fanout import Fanout, process_count

PARENT = os.getpid()
linux_only = pytest.mark.skipif(not sys.platform.startswith("linux"),
                                reason="helpers are forked on Linux only")


def _solved(seed: int) -> tuple[int, bytes]:
    """A floating-point result worth comparing bit for bit, and who computed it."""
    time.sleep(0.05)  # long enough that the helper takes its share
    rng = np.random.default_rng(seed)
    matrix = rng.random((40, 40)) + 40 * np.eye(40)
    return os.getpid(), np.linalg.solve(matrix, rng.random(40)).tobytes()


def _all(items: list[int], workers: int, start_at: int | None = None) -> list[tuple[int, bytes]]:
    fanout: Fanout[int, tuple[int, bytes]] = Fanout(_solved, workers, start_at)
    for item in items:
        fanout.add(item)
    return fanout.results()


@linux_only
@pytest.mark.parametrize("start_at", [None, 2])
def test_two_processes_give_the_same_bits_as_one(start_at: int | None) -> None:
    items = list(range(12))
    one, two = _all(items, 1), _all(items, 2, start_at)
    assert [bits for _, bits in two] == [bits for _, bits in one]
    assert {pid for pid, _ in one} == {PARENT}
    assert len({pid for pid, _ in two}) == 2  # the helper took part


@linux_only
def test_items_added_after_the_helpers_started_are_sent() -> None:
    done: list[int] = []
    fanout: Fanout[int, tuple[int, bytes]] = Fanout(_solved, 2, start_at=2)
    for item in range(6):
        fanout.add(item)
        if item == 1:
            assert fanout._helpers  # forked at the second item
    results = fanout.results(done.append)
    assert sorted(done) == list(range(6))
    assert [bits for _, bits in results] == [_solved(i)[1] for i in range(6)]


def _failing_in_helpers(item: int) -> int:
    if os.getpid() != PARENT:
        raise RuntimeError("helper failure")
    return 10 * item


def _dying_in_helpers(item: int) -> int:
    if os.getpid() != PARENT:
        os._exit(3)  # as if killed
    time.sleep(0.02)
    return 10 * item


@linux_only
@pytest.mark.parametrize("run", [_failing_in_helpers, _dying_in_helpers])
def test_work_a_helper_failed_on_or_left_is_done_here(run) -> None:  # type: ignore[no-untyped-def]
    fanout: Fanout[int, int] = Fanout(run, 2)
    for item in range(8):
        fanout.add(item)
    assert fanout.results() == [10 * item for item in range(8)]
    assert not fanout._helpers  # joined


def _always_failing(item: int) -> int:
    raise ValueError(f"bad item {item}")


@linux_only
def test_an_error_is_raised_as_without_helpers() -> None:
    # Whichever process meets an error first, the one raised is the first
    # item's, as in one process.
    for _ in range(3):
        fanout: Fanout[int, int] = Fanout(_always_failing, 2)
        for item in range(4):
            fanout.add(item)
        with pytest.raises(ValueError, match="bad item 0"):
            fanout.results()


def test_one_process_forks_nothing() -> None:
    assert process_count(1) == 1
    fanout: Fanout[int, int] = Fanout(lambda x: x + 1, 1, start_at=1)
    for item in range(3):
        fanout.add(item)
    assert fanout.results() == [1, 2, 3] and not fanout._helpers
