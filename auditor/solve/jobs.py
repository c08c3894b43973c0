"""Every 3-D solve of one audit as independent jobs over the cores.

The 3-D work of an audit is a handful of independent solves: each
electrode routed to 3-D, each mutual tx/rx pair (its 3-D solve, or its
disk-and-ring model) and, with ``--precise``, the coupling table and one
scan per slider or wheel. :class:`PreciseWork` collects them and runs them
together over this and forked helper processes
(:class:`auditor.field.fanout.Fanout`), longest first: the coupling table
(every electrode in one solve), then the scans (a solve per finger step),
then the electrodes and pairs by cell count, largest first, so the last job
to start is a short one and the cores finish together. Each result is kept
under its own job, so the metrics and the report are the same bits with
any number of processes.
"""

from __future__ import annotations

from collections.abc import Callable
from typing import Any, Literal

from auditor.config import Config
from auditor.field.fanout import Fanout
from auditor.model.board import Board
from auditor.model.results import PadMetrics, PreciseExtras
from auditor.sensors.model import Sensor

Job = Callable[[], Any]
#: What a queued job answers for: an electrode's metrics or a mutual pair's.
Kind = Literal["electrode", "pair"]


def _run(job: Job) -> Any:
    return job()


class PreciseWork:
    """The 3-D jobs of one audit, run together by :meth:`run`.

    Parameters
    ----------
    workers:
        Processes to run in, this one included (None: automatic, see
        :func:`auditor.field.fanout.process_count`).

    Examples
    --------
    >>> work = PreciseWork(workers=1)
    >>> work.run()
    >>> work.metrics(), work.pairs(), work.extras()
    ({}, {}, None)
    """

    def __init__(self, workers: int | None = None) -> None:
        self._fanout: Fanout[Job, Any] = Fanout(_run, workers)
        self._electrodes: list[tuple[float, str, Kind, Job]] = []
        self._extras: tuple[int, list[int], tuple[str, ...]] | None = None
        self._results: list[Any] | None = None
        self._names: list[tuple[Kind, str]] = []
        self._first_electrode = 0

    def add_extras(self, board: Board, sensors: tuple[Sensor, ...], config: Config) -> None:
        """Queue the coupling table and the slider and wheel scans."""
        # Imported here for start-up speed only: the scans load
        # scipy.interpolate, which only --precise needs.
        from auditor.solve.extras import coupling_table, extras_notes, scan_jobs

        coupling = self._fanout.add(lambda: coupling_table(board, sensors, config))
        scans = [self._fanout.add(job) for job in scan_jobs(board, sensors, config)]
        self._extras = (coupling, scans, extras_notes())
        self._first_electrode = len(scans) + 1

    def add_electrode(self, name: str, cells: float, job: Callable[[], PadMetrics]) -> None:
        """Queue one electrode's 3-D solve (``cells``: its size, to order the jobs)."""
        self._electrodes.append((cells, name, "electrode", job))

    def add_pair(self, name: str, cells: float, job: Job) -> None:
        """Queue one mutual pair's solve under its receive electrode's
        ``name`` (``cells``: its size, to order the jobs; its result, which
        must pickle, is in :meth:`pairs`)."""
        self._electrodes.append((cells, name, "pair", job))

    def run(self, finished: Callable[[str], None] | None = None) -> None:
        """Run every job; ``finished`` is called with each electrode's (or
        pair's receive electrode's) name as its result is ready."""
        ordered = sorted(self._electrodes, key=lambda e: (-e[0], e[1], e[2]))
        names = [(kind, name) for _, name, kind, _ in ordered]
        for _, _, _, job in ordered:
            self._fanout.add(job)
        first = self._first_electrode

        def done(index: int) -> None:
            if finished is not None and index >= first:
                finished(names[index - first][1])

        self._names = names
        self._results = self._fanout.results(done)

    def metrics(self) -> dict[str, PadMetrics]:
        """Each electrode's metrics, by name (after :meth:`run`)."""
        return self._of_kind("electrode")

    def pairs(self) -> dict[str, Any]:
        """Each queued pair's result, by its receive electrode's name (after :meth:`run`)."""
        return self._of_kind("pair")

    def _of_kind(self, wanted: Kind) -> dict[str, Any]:
        results = (self._results or [])[self._first_electrode:]
        return {name: result for (kind, name), result in zip(self._names, results, strict=True)
                if kind == wanted}

    def extras(self) -> PreciseExtras | None:
        """The coupling table and scans (None unless :meth:`add_extras` was called)."""
        if self._extras is None or self._results is None:
            return None
        coupling, scans, notes = self._extras
        return PreciseExtras(self._results[coupling], tuple(self._results[i] for i in scans),
                             notes)


__all__ = ["PreciseWork"]
