"""The audit's run of 3-D jobs (auditor/solve/jobs.py): electrodes and
mutual pairs in one run, longest first, each result under its own job, the
same with one process or two (the project's own contract, stated in the
module; common practice for job queues, no source)."""

from __future__ import annotations

from collections.abc import Callable

import pytest

from auditor.solve.jobs import PreciseWork

#: (kind, name, cells): what the test queues.
QUEUED = (("electrode", "pad-small", 10.0), ("pair", "rx-comb", 900.0),
          ("pair", "rx-ring", 0.0), ("electrode", "pad-large", 50.0))


def _queue(work: PreciseWork, ran: list[str]) -> None:
    for kind, name, cells in QUEUED:
        def job(name: str = name) -> str:
            ran.append(name)
            return f"result of {name}"
        add: Callable[..., None] = work.add_pair if kind == "pair" else work.add_electrode
        add(name, cells, job)


def test_pairs_and_electrodes_run_together_longest_first() -> None:
    work, ran, finished = PreciseWork(workers=1), [], []  # type: ignore[var-annotated]
    _queue(work, ran)
    work.run(finished.append)
    assert ran == ["rx-comb", "pad-large", "pad-small", "rx-ring"]
    assert finished == ran
    assert work.metrics() == {"pad-large": "result of pad-large",
                              "pad-small": "result of pad-small"}
    assert work.pairs() == {"rx-comb": "result of rx-comb", "rx-ring": "result of rx-ring"}


@pytest.mark.parametrize("workers", [1, 2])
def test_results_are_kept_by_job_whatever_the_processes(workers: int) -> None:
    work = PreciseWork(workers=workers)
    _queue(work, [])
    finished: list[str] = []
    work.run(finished.append)
    assert sorted(finished) == sorted(name for _, name, _ in QUEUED)
    assert work.pairs() == {"rx-comb": "result of rx-comb", "rx-ring": "result of rx-ring"}
    assert sorted(work.metrics()) == ["pad-large", "pad-small"]
