"""Many pads at once: each distinct setup solved once, shared with helper processes.

A board repeats pads (slider segments, equal buttons), so equal setups share
one solve. The distinct solves are independent. :class:`PadBatch` takes them
one at a time as the caller produces them (the audit hands over each sensor
as soon as it is measured, so solving overlaps measuring) and, on a machine
with a core to spare, forked helper processes (:class:`auditor.field.fanout.Fanout`)
start on them at once. When the caller asks for the results it works through
whatever is still queued itself, beside the helpers, then collects theirs.

A helper computes exactly what :func:`auditor.field.api.solve_pad` computes
in this process: the results are the same bits either way (checked in
``tests/unit/field/test_fast_path.py``). Should a helper fail or die, what it
had not delivered is solved here, so an error is raised as it would be
without helpers.
"""

from __future__ import annotations

from collections.abc import Callable, Sequence

from auditor.field.api import PadSetup, PadSolve, solve_pad
from auditor.field.fanout import MAX_WORKERS, Fanout, available_cores, process_count
from auditor.field.pad_model import check_setup

#: Helpers start with this many distinct setups queued: forking for a board
#: with a single pad costs more than it saves.
MIN_PARALLEL_SOLVES = 2


def _solved(setup: PadSetup) -> PadSolve:
    # Looked up at call time, so a test can stand in for the solver.
    return solve_pad(setup)


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
        self._fanout: Fanout[PadSetup, PadSolve] = Fanout(_solved, workers,
                                                          start_at=MIN_PARALLEL_SOLVES)
        self._order: list[PadSetup] = []
        self._index: dict[PadSetup, int] = {}

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
        self._index[setup] = self._fanout.add(setup)
        self._order.append(setup)

    def results(self, on_solved: Callable[[PadSetup], None] | None = None
                ) -> dict[PadSetup, PadSolve]:
        """Every queued setup's solve; ``on_solved`` is called with each
        setup as its solve is done (in completion order, which varies
        between runs when helpers take part)."""
        solves = self._fanout.results(
            None if on_solved is None else lambda index: on_solved(self._order[index]))
        return dict(zip(self._order, solves, strict=True))

    def stop(self) -> None:
        """End the helper processes now (their queued work is dropped)."""
        self._fanout.stop()


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


__all__ = ["MAX_WORKERS", "MIN_PARALLEL_SOLVES", "PadBatch", "available_cores",
           "process_count", "solve_pads"]
