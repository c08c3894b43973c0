"""How the mutual pairs' solves run (auditor/solve/mutual_jobs.py), on the
mutual fixtures (fixtures/make_mutual_boards.py): the disk-and-ring model
only where its answer is used or shown, the 3-D solves inside the audit's
one run of 3-D jobs. The numbers themselves are checked in
test_mutual_pairs.py and test_mutual_precise.py; what is checked here is the
automatic mode's contract of issue 13 (a number the report shows was
computed, and one not computed is said to be so; common practice, no source).
"""

from __future__ import annotations

from pathlib import Path

import pytest

import auditor.solve.mutual as quick_pairs
import auditor.solve.mutual_precise as precise_pairs
from auditor.audit import AuditOptions, run_audit
from auditor.field.mutual import MutualSetup, MutualSolve
from auditor.model.results import PadMetrics
from auditor.solve.jobs import PreciseWork

MUTUAL = Path(__file__).resolve().parents[3] / "fixtures" / "mutual"

#: Every test here solves a fixture board (seconds): not in the quick loop.
pytestmark = pytest.mark.slow


def _receive_metrics(case: str, options: AuditOptions) -> dict[str, PadMetrics]:
    report = run_audit(MUTUAL / f"{case}.kicad_pcb", options)
    return {r.sensor.name: r.metrics for r in report.sensors
            if r.sensor.kind == "mutual-rx" and r.metrics is not None}


@pytest.mark.parametrize(("case", "precise", "solves"), [
    ("comb-keys", False, 0),  # three comb pairs sent to 3-D: no disk and ring needed
    ("comb-keys", True, 3),   # --precise shows each pair's own estimate beside 3-D
    ("ring-keys", False, 2),  # the disk and ring answers both ring keys
])
def test_disk_and_ring_is_solved_only_where_it_is_used(
        monkeypatch: pytest.MonkeyPatch, case: str, precise: bool, solves: int) -> None:
    calls: list[MutualSetup] = []
    real = quick_pairs.solve_mutual

    def counted(setup: MutualSetup) -> MutualSolve:
        calls.append(setup)
        return real(setup)

    monkeypatch.setattr(quick_pairs, "solve_mutual", counted)
    metrics = _receive_metrics(case, AuditOptions(precise=precise, workers=1))
    assert len(calls) == solves
    assert len(metrics) in (2, 3)
    for m in metrics.values():  # a 3-D answer has the estimate beside it with --precise only
        if m.method == "precise":
            assert (m.quick_cp_pad_pf is None) == (not precise)


def test_a_3d_pair_says_its_estimate_was_not_computed() -> None:
    """The automatic mode's 3-D pairs (the first solved, the others sharing
    its solve) show no disk-and-ring number, and say why."""
    metrics = _receive_metrics("comb-keys", AuditOptions(workers=1))
    assert sorted(metrics) == ["ROW0#1", "ROW0#2", "ROW0#3"]
    for m in metrics.values():
        assert m.method == "precise"
        assert m.quick_cp_total_pf is None and m.quick_delta_c_pf is None
        assert m.quick_missing.startswith("not computed, the automatic mode sent the pair to 3-D")
        assert f"disk-and-ring estimate: {m.quick_missing}" in m.notes
        assert not any("disk-and-ring estimate" in note and "pF" in note for note in m.notes)


def test_pair_solves_run_inside_the_3d_job_run(monkeypatch: pytest.MonkeyPatch) -> None:
    """The comb keys' one 3-D solve (the three keys are equal) happens while
    the audit's :class:`PreciseWork` runs, not after it."""
    running: list[bool] = []
    inside: list[bool] = []
    real_run, real_solve = PreciseWork.run, precise_pairs.solve_pair_on_board

    def run(self: PreciseWork, finished: object = None) -> None:
        running.append(True)
        try:
            real_run(self, finished)  # type: ignore[arg-type]
        finally:
            running.pop()

    def solve(*args: object) -> object:
        inside.append(bool(running))
        return real_solve(*args)  # type: ignore[arg-type]

    monkeypatch.setattr(PreciseWork, "run", run)
    monkeypatch.setattr(precise_pairs, "solve_pair_on_board", solve)
    metrics = _receive_metrics("comb-keys", AuditOptions(workers=1))
    assert inside == [True]
    assert {m.method for m in metrics.values()} == {"precise"}
