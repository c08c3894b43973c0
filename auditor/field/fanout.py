"""Independent jobs shared between this process and forked helper processes.

The field solves hold the GIL (assembly in numpy, SuperLU, the FFT operator
of the 3-D solver), so a second core helps only through a second process.
:class:`Fanout` runs one function over a list of independent items: the
items go into a queue in the order given (put the longest first), helper
processes forked from this one take them from the front, and when the
caller asks for the results this process takes its share from the same
queue. Each result is stored under its item's position, so the results are
the same whichever process computed them, and a function that gives the
same bits for the same input gives the same bits here with any number of
processes.

Helpers are forked, and only on Linux (see :func:`process_count`): the
function and the items queued before the fork are inherited, never
pickled, so they may hold anything (boards, geometry, closures); items
added after the helpers started, and every result, must pickle. Should a
helper fail or die, what it had not delivered is computed again in this
process, in the order added, so the error raised is the one a single
process would raise.
"""

from __future__ import annotations

import multiprocessing
import os
import pickle
import queue
import signal
import sys
from collections.abc import Callable
from multiprocessing.process import BaseProcess
from typing import Any, Generic, TypeVar

from auditor.field.heap import release_freed_memory

Item = TypeVar("Item")
Result = TypeVar("Result")

#: Never more processes than this, this one included (a shared build
#: machine should keep some cores for others).
MAX_WORKERS = 4
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
    quick solves: with one core mostly free, a second process halved the
    solve time; with other solver processes keeping both cores busy (load
    1.3-4) more processes were as often slower as faster, by up to 60 %.
    Work that competes for the cores gains nothing from more processes, so
    it then stays in this process.
    """
    try:
        return os.getloadavg()[0] >= cores - 0.5
    except OSError:  # load average unavailable
        return False


def process_count(requested: int | None) -> int:
    """Processes to work in, this one included.

    ``requested`` None: one per available core, at most
    :data:`MAX_WORKERS`, or only this one when the machine is busy
    (:func:`_busy`). Helpers are forked, and only on Linux: macOS offers
    ``fork`` but its system libraries (the BLAS numpy may use there among
    them) are not safe to use in a forked child, and Windows has no ``fork``.
    """
    if not sys.platform.startswith("linux") or "fork" not in multiprocessing.get_all_start_methods():
        return 1
    if requested is None:
        cores = available_cores()
        requested = 1 if _busy(cores) else min(cores, MAX_WORKERS)
    return max(1, requested)


def _released(run: Callable[[Any], Any], item: Any) -> Any:
    """``run(item)``, then the memory it freed handed back to the system
    (:mod:`auditor.field.heap`): with helpers, what each process keeps
    resident adds up."""
    try:
        return run(item)
    finally:
        release_freed_memory()


def _helper(run: Callable[[Any], Any], inherited: list[Any], tasks: Any, results: Any) -> None:
    """A helper's loop: run queued items until the stop mark (None).

    Ctrl-C reaches every process of the terminal's group: helpers ignore it
    (the parent stops them, and they print nothing), and SIGTERM ends them
    at once whatever handler the parent had when it forked them."""
    signal.signal(signal.SIGINT, signal.SIG_IGN)
    signal.signal(signal.SIGTERM, signal.SIG_DFL)
    while True:
        task = tasks.get()
        if task is None:
            return
        index, sent = task
        item = inherited[index] if sent is None else sent[0]
        try:
            # Pickled here, not in the queue's feeder thread, so a result
            # that cannot be sent is a failure this loop reports.
            results.put((index, pickle.dumps(_released(run, item), pickle.HIGHEST_PROTOCOL)))
        except Exception:  # noqa: BLE001 - run again by the caller, which raises it
            results.put((index, None))


class Fanout(Generic[Item, Result]):
    """``run`` over the items added, in this and forked helper processes.

    Parameters
    ----------
    run:
        The function; it must depend on its item alone (and on state it
        had when the helpers were forked), so that any process gives the
        same result.
    workers:
        Processes to work in, this one included (None: automatic, see
        :func:`process_count`; 1: everything here, in order).
    start_at:
        Fork the helpers as soon as this many items are queued (so they
        work while the caller produces more); None: only when
        :meth:`results` is called.

    Examples
    --------
    >>> squares = Fanout(lambda x: x * x, workers=1)
    >>> [squares.add(x) for x in (3, 4)]
    [0, 1]
    >>> squares.results()
    [9, 16]
    """

    def __init__(self, run: Callable[[Item], Result], workers: int | None = None,
                 start_at: int | None = None) -> None:
        self._run = run
        self._processes = process_count(workers)
        self._start_at = start_at
        self._items: list[Item] = []
        self._done: dict[int, Result] = {}
        self._helpers: list[BaseProcess] = []
        self._tasks: Any = None
        self._results: Any = None

    def add(self, item: Item) -> int:
        """Queue ``item``; returns its position in :meth:`results`."""
        index = len(self._items)
        self._items.append(item)
        if self._tasks is not None:
            self._tasks.put((index, (item,)))
        elif self._start_at is not None and len(self._items) >= self._start_at:
            self._start_helpers()
        return index

    def _start_helpers(self) -> None:
        if self._processes < 2 or len(self._items) < 2:
            return
        context = multiprocessing.get_context("fork")
        self._tasks, self._results = context.Queue(), context.Queue()
        # Work still in the pipe when the run ends (an interrupt, an error) is
        # dropped: without this the exit would wait for stopped helpers to read it.
        self._tasks.cancel_join_thread()
        # Started early, more items will come; started at the end, a helper
        # with nothing to take would only cost its fork.
        helpers = self._processes - 1 if self._start_at else min(self._processes,
                                                                  len(self._items)) - 1
        for _ in range(helpers):
            helper = context.Process(target=_helper, daemon=True, args=(
                self._run, self._items, self._tasks, self._results))
            helper.start()
            self._helpers.append(helper)
        for index in range(len(self._items)):  # inherited by the helpers
            self._tasks.put((index, None))

    def results(self, on_done: Callable[[int], None] | None = None) -> list[Result]:
        """Every item's result, in the order added; ``on_done`` is called
        with each item's position as its result is ready (in completion
        order, which varies between runs when helpers take part)."""
        if self._tasks is None:
            self._start_helpers()
        if self._helpers:
            try:
                self._share_the_rest(on_done)
            except BaseException:  # interrupted: stop the helpers, then go on unwinding
                self.stop()
                raise
        for index, item in enumerate(self._items):
            if index not in self._done:
                self._done[index] = _released(self._run, item)
                if on_done is not None:
                    on_done(index)
        return [self._done[index] for index in range(len(self._items))]

    def stop(self) -> None:
        """End the helper processes now (their queued work is dropped)."""
        for helper in self._helpers:
            helper.terminate()
        for helper in self._helpers:
            helper.join(timeout=1.0)
        self._helpers = []

    def _share_the_rest(self, on_done: Callable[[int], None] | None) -> None:
        """Run what is still queued here while the helpers do theirs; then
        collect their results. Whatever failed, here or in a helper, or a
        dead helper left, is run afterwards by :meth:`results` in the order
        added, so the error raised is the one a single process raises first."""
        claimed: set[int] = set()
        while True:
            try:
                index, _ = self._tasks.get(timeout=0.05)
            except queue.Empty:
                break
            claimed.add(index)
            try:
                self._done[index] = _released(self._run, self._items[index])  # caller's object
            except Exception:  # noqa: BLE001 - run again, in order, by results()
                continue
            if on_done is not None:
                on_done(index)
        for _ in self._helpers:
            self._tasks.put(None)
        self._collect(set(range(len(self._items))) - claimed, on_done)
        for helper in self._helpers:
            helper.join(timeout=1.0)
        self._helpers = []

    def _collect(self, waiting: set[int], on_done: Callable[[int], None] | None) -> None:
        while waiting:
            try:
                index, sent = self._results.get(timeout=_POLL_S)
            except queue.Empty:
                if not any(h.is_alive() for h in self._helpers):
                    return  # the rest is run in this process
                continue
            waiting.discard(index)
            if sent is not None:
                self._done[index] = pickle.loads(sent)
                if on_done is not None:
                    on_done(index)


__all__ = ["MAX_WORKERS", "Fanout", "available_cores", "process_count"]
