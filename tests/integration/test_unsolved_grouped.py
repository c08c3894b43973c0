"""electrode-unsolved on a board with the field solve: one finding per cause
(an unrouted board leaves every electrode unsolved for one reason). Board:
the invented judging fixture (fixtures/make_judging_boards.py). The paired
transmitter case is in tests/unit/rules/test_rule_records.py."""

from __future__ import annotations

from pathlib import Path

import pytest

from auditor.audit import AuditOptions, run_audit

FIXTURES = Path(__file__).resolve().parents[2] / "fixtures"


def unsolved(board: Path) -> list[str]:
    report = run_audit(board, AuditOptions(quick=True))
    return [d.finding.message for d in report.findings
            if d.finding.rule_id == "electrode-unsolved"]


@pytest.mark.slow
def test_unrouted_board_says_it_once() -> None:
    found = unsolved(FIXTURES / "judging" / "unrouted-electrodes.kicad_pcb")
    assert len(found) == 1
    assert found[0].startswith("2 electrodes have no field result (sense path not followed")
