"""Many pads at once: each distinct setup solved once, over worker processes.

A board repeats pads (slider segments, equal buttons), so equal setups share
one solve. The distinct solves are independent; on a machine with more than
one core that is not already busy they run in forked worker processes (the
solver's modules are already imported, so a worker starts in milliseconds),
else, or with ``workers=1``, one after the other. The solves hold the GIL
(assembly in numpy, SuperLU), so processes, not threads; without the
``fork`` start method (Windows) the solves stay in this process.
A worker computes exactly what :func:`auditor.field.api.solve_pad` computes
in this process: the results are the same bits either way (checked in
``tests/unit/field/test_fast_path.py``).
"""

from __future__ import annotations

import multiprocessing
import os
from collections.abc import Callable, Sequence
from concurrent.futures import Future, ProcessPoolExecutor, as_completed

from auditor.field.api import PadSetup, PadSolve, solve_pad
from auditor.field.pad_model import check_setup

#: Never more workers than this (the solves are memory-light, but a shared
#: build machine should keep some cores for others).
MAX_WORKERS = 4
#: Fewer distinct solves than this run in this process: forking and
#: collecting cost more than they save.
MIN_PARALLEL_SOLVES = 3


def available_cores() -> int:
    """Cores this process may run on."""
    try:
        return len(os.sched_getaffinity(0))
    except AttributeError:  # not on Linux
        return os.cpu_count() or 1


def _busy(cores: int) -> bool:
    """True unless about one core is idle (1-minute load below cores - 0.5).

    Measured on a shared 2-core machine with the demo board's 11 distinct
    solves (worker start-up about 40 ms): once, with one core mostly free,
    two workers halved the wall time; with other solver processes keeping
    both cores busy (load 1.3-4) two workers were as often slower as faster
    than one, by up to 60 %. Work that competes for the cores gains nothing
    from more processes, so the solves then stay in this process.
    """
    try:
        return os.getloadavg()[0] >= cores - 0.5
    except OSError:  # load average unavailable
        return False


def _worker_count(requested: int | None, distinct: int) -> int:
    if distinct < MIN_PARALLEL_SOLVES or "fork" not in multiprocessing.get_all_start_methods():
        return 1
    if requested is None:
        cores = available_cores()
        requested = 1 if _busy(cores) else min(cores, MAX_WORKERS)
    return max(1, min(requested, distinct))


def solve_pads(setups: Sequence[PadSetup], workers: int | None = None,
               on_solved: Callable[[PadSetup], None] | None = None) -> tuple[PadSolve, ...]:
    """:func:`auditor.field.api.solve_pad` of every setup, in the given order.

    Parameters
    ----------
    setups:
        Pads to solve; equal setups are solved once.
    workers:
        Worker processes (None: one per available core, at most
        :data:`MAX_WORKERS`, or none when the machine is already busy; 1:
        solve here, one after the other).
    on_solved:
        Called with each distinct setup as its solve finishes (in completion
        order, which varies between runs when solving in parallel).

    Raises
    ------
    UsageError
        For a setup no pad can have (checked here, before any solve).
    """
    distinct = list(dict.fromkeys(setups))
    for setup in distinct:
        check_setup(setup)
    count = _worker_count(workers, len(distinct))
    solved: dict[PadSetup, PadSolve] = {}
    if count == 1:
        for setup in distinct:
            solved[setup] = solve_pad(setup)
            if on_solved is not None:
                on_solved(setup)
    else:
        context = multiprocessing.get_context("fork")
        with ProcessPoolExecutor(count, mp_context=context) as pool:
            pending: dict[Future[PadSolve], PadSetup] = {
                pool.submit(solve_pad, setup): setup for setup in distinct}
            for future in as_completed(pending):
                solved[pending[future]] = future.result()
                if on_solved is not None:
                    on_solved(pending[future])
    return tuple(solved[setup] for setup in setups)
