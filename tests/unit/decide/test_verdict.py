"""Per-electrode verdict: the worst decided finding on the electrode.

The ordering error > warning > waived > unsolved > ok is the project's own
definition (issue 14: a pad with two errors is not ``ok``); common practice,
no source.
"""

from __future__ import annotations

import pytest

from auditor.decide import ELECTRODE_VERDICTS, electrode_verdict
from auditor.decide.records import DecidedFinding
from auditor.rules.finding import Finding, Severity


def decided(severity: Severity, *, waived: str = "", in_baseline: bool = False
            ) -> DecidedFinding:
    raw = Finding("some-rule", severity, "message", sensor="BTN3")
    return DecidedFinding(raw, severity, waived=waived, in_baseline=in_baseline)


@pytest.mark.parametrize("findings, solved, expected", [
    ([decided(Severity.ERROR), decided(Severity.ERROR)], True, "error"),
    ([decided(Severity.WARNING), decided(Severity.ERROR)], True, "error"),
    ([decided(Severity.WARNING), decided(Severity.INFO)], True, "warning"),
    ([decided(Severity.ERROR, waived="reviewed"), decided(Severity.WARNING)], True, "warning"),
    ([decided(Severity.ERROR, waived="reviewed")], True, "waived"),
    ([decided(Severity.ERROR, in_baseline=True)], True, "waived"),
    ([decided(Severity.ERROR, in_baseline=True)], False, "waived"),
    ([decided(Severity.INFO)], True, "ok"),
    ([], True, "ok"),
    ([], False, "unsolved"),
    ([decided(Severity.WARNING)], False, "warning"),
])
def test_verdict_is_the_worst_open_finding(findings: list[DecidedFinding], solved: bool,
                                           expected: str) -> None:
    assert electrode_verdict(findings, solved) == expected
    assert expected in ELECTRODE_VERDICTS
