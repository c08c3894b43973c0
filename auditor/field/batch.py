"""Many pads at once: each distinct setup solved once, shared with helper processes.

A board repeats pads (slider segments, equal buttons), so equal setups share
one solve. The distinct solves are independent. :class:`PadBatch` takes them
one at a time as the caller produces them (the audit hands over each sensor
as soon as it is measured, so solving overlaps measuring) and, on a machine
with a core to spare, a forked helper process starts on them at once. When
the caller asks for the results it works through whatever is still queued
itself, beside the helpers, then collects theirs. The solves hold the GIL
(assembly in numpy, SuperLU), so processes, not threads; off Linux (see
:func:`_process_count`), or with ``workers=1``, everything is solved in
this process.

A helper computes exactly what :func:`auditor.field.api.solve_pad` computes
in this process: the results are the same bits either way (checked in
``tests/unit/field/test_fast_path.py``). Should a helper fail or die, what it
had not delivered is solved here, so an error is raised as it would be
without helpers.
"""

from __future__ import annotations

import multiprocessing
import os
import queue
import signal
import sys
from collections.abc import Callable, Sequence
from multiprocessing.process import BaseProcess
from typing import Any

from auditor.field.api import PadSetup, PadSolve, solve_pad
from auditor.field.pad_model import check_setup

#: Never more processes than this, this one included (the solves are
#: memory-light, but a shared build machine should keep some cores for others).
MAX_WORKERS = 4
#: Helpers start with this many distinct setups queued: forking for a board
#: with a single pad costs more than it saves.
MIN_PARALLEL_SOLVES = 2
#: Seconds between checks that the helpers are still alive while waiting.
_POLL_S = 0.5


def available_cores() -> int:
    """Cores this process may run on."""
    try:
        return len(os.sched_getaffinity(0))
    except AttributeError:  # not on Linux
        return os.cpu_count() or 1


def _busy(cores: int) -> bool:
    """True unless about one core is idle (1-minute load below cores - 0.5).

    Measured on a shared 2-core machine with the demo board's 11 distinct
    solves: with one core mostly free, a second process halved the solve
    time; with other solver processes keeping both cores busy (load 1.3-4)
    more processes were as often slower as faster, by up to 60 %. Work that
    competes for the cores gains nothing from more processes, so the solves
    then stay in this process.
    """
    try:
        return os.getloadavg()[0] >= cores - 0.5
    except OSError:  # load average unavailable
        return False


def _process_count(requested: int | None) -> int:
    """Processes to solve in, this one included.

    Helpers are forked, and only on Linux: macOS offers ``fork`` but its
    system libraries (the BLAS numpy may use there among them) are not safe
    to use in a forked child, and Windows has no ``fork``.
    """
    if not sys.platform.startswith("linux") or "fork" not in multiprocessing.get_all_start_methods():
        return 1
    if requested is None:
        cores = available_cores()
        requested = 1 if _busy(cores) else min(cores, MAX_WORKERS)
    return max(1, requested)


def _helper(tasks: Any, results: Any) -> None:
    """A helper's loop: solve queued setups until the stop mark (None).

    Ctrl-C reaches every process of the terminal's group: helpers ignore it
    (the parent stops them, and they print nothing), and SIGTERM ends them
    at once whatever handler the parent had when it forked them."""
    signal.signal(signal.SIGINT, signal.SIG_IGN)
    signal.signal(signal.SIGTERM, signal.SIG_DFL)
    while True:
        item = tasks.get()
        if item is None:
            return
        index, setup = item
        try:
            results.put((index, solve_pad(setup)))
        except Exception:  # noqa: BLE001 - re-solved by the caller, which raises it
            results.put((index, None))


class PadBatch:
    """Distinct pad setups solved as they come, over this and helper processes.

    Parameters
    ----------
    workers:
        Processes to solve in, this one included (None: one per available
        core, at most :data:`MAX_WORKERS`, or only this one when the machine
        is already busy; 1: everything here, one after the other).

    Examples
    --------
    >>> batch = PadBatch(workers=1)
    >>> batch.add(PadSetup(pad_area_mm2=50.0, gap_mm=1.0))
    >>> batch.add(PadSetup(pad_area_mm2=50.0, gap_mm=1.0))  # the same: solved once
    >>> len(batch.results())
    1
    """

    def __init__(self, workers: int | None = None) -> None:
        self._processes = _process_count(workers)
        self._order: list[PadSetup] = []
        self._index: dict[PadSetup, int] = {}
        self._solved: dict[int, PadSolve] = {}
        self._helpers: list[BaseProcess] = []
        self._tasks: Any = None
        self._results: Any = None

    def add(self, setup: PadSetup) -> None:
        """Queue ``setup`` (a repeat of one already queued is not solved again).

        Raises
        ------
        UsageError
            For a setup no pad can have (checked here, before any solve).
        """
        if setup in self._index:
            return
        check_setup(setup)
        index = len(self._order)
        self._index[setup] = index
        self._order.append(setup)
        if self._tasks is not None:
            self._tasks.put((index, setup))
        elif self._processes > 1 and len(self._order) >= MIN_PARALLEL_SOLVES:
            self._start_helpers()

    def _start_helpers(self) -> None:
        context = multiprocessing.get_context("fork")
        self._tasks, self._results = context.Queue(), context.Queue()
        # Work still in the pipe when the run ends (an interrupt, an error) is
        # dropped: without this the exit would wait for stopped helpers to read it.
        self._tasks.cancel_join_thread()
        for _ in range(self._processes - 1):
            helper = context.Process(target=_helper, args=(self._tasks, self._results),
                                     daemon=True)
            helper.start()
            self._helpers.append(helper)
        for index, setup in enumerate(self._order):  # those queued before the helpers
            self._tasks.put((index, setup))

    def results(self, on_solved: Callable[[PadSetup], None] | None = None
                ) -> dict[PadSetup, PadSolve]:
        """Every queued setup's solve; ``on_solved`` is called with each
        setup as its solve is done (in completion order, which varies
        between runs when helpers take part)."""
        if self._helpers:
            try:
                self._share_the_rest(on_solved)
            except BaseException:  # interrupted: stop the helpers, then go on unwinding
                self.stop()
                raise
        for index, setup in enumerate(self._order):
            if index not in self._solved:
                self._solved[index] = solve_pad(setup)
                if on_solved is not None:
                    on_solved(setup)
        return {setup: self._solved[i] for i, setup in enumerate(self._order)}

    def stop(self) -> None:
        """End the helper processes now (their queued work is dropped)."""
        for helper in self._helpers:
            helper.terminate()
        for helper in self._helpers:
            helper.join(timeout=1.0)
        self._helpers = []

    def _share_the_rest(self, on_solved: Callable[[PadSetup], None] | None) -> None:
        """Solve what is still queued here while the helpers do theirs; then
        collect their results. Whatever a failed or dead helper left is
        solved afterwards by :meth:`results`."""
        claimed: set[int] = set()
        while True:
            try:
                index, _ = self._tasks.get(timeout=0.05)
            except queue.Empty:
                break
            claimed.add(index)
            setup = self._order[index]  # the caller's object, not the queue's copy
            self._solved[index] = solve_pad(setup)
            if on_solved is not None:
                on_solved(setup)
        for _ in self._helpers:
            self._tasks.put(None)
        self._collect(set(range(len(self._order))) - claimed, on_solved)
        for helper in self._helpers:
            helper.join(timeout=1.0)
        self._helpers = []

    def _collect(self, waiting: set[int], on_solved: Callable[[PadSetup], None] | None) -> None:
        while waiting:
            try:
                index, solve = self._results.get(timeout=_POLL_S)
            except queue.Empty:
                if not any(h.is_alive() for h in self._helpers):
                    return  # the rest is solved in this process
                continue
            waiting.discard(index)
            if solve is not None:
                self._solved[index] = solve
                if on_solved is not None:
                    on_solved(self._order[index])


def solve_pads(setups: Sequence[PadSetup], workers: int | None = None,
               on_solved: Callable[[PadSetup], None] | None = None) -> tuple[PadSolve, ...]:
    """:func:`auditor.field.api.solve_pad` of every setup, in the given order.

    Parameters
    ----------
    setups:
        Pads to solve; equal setups are solved once.
    workers, on_solved:
        As for :class:`PadBatch` and :meth:`PadBatch.results`.

    Raises
    ------
    UsageError
        For a setup no pad can have (checked before any solve).
    """
    for setup in setups:
        check_setup(setup)
    batch = PadBatch(workers)
    for setup in setups:
        batch.add(setup)
    solved = batch.results(on_solved)
    return tuple(solved[setup] for setup in setups)
