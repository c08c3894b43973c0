"""Each electrode's verdict, for every reporter alike.

The rule is :func:`auditor.decide.verdict.electrode_verdict` (the worst
decided finding on the electrode); this module only groups the report's
findings by electrode, so text, JSON, JUnit and Markdown cannot disagree.
It is read from the findings each time, so a baseline applied after the
audit (``--baseline``) is reflected.
"""

from __future__ import annotations

from auditor.decide.records import DecidedFinding, Report
from auditor.decide.verdict import electrode_verdict


def electrode_verdicts(report: Report) -> dict[str, str]:
    """Sensor name -> ``error``, ``warning``, ``waived``, ``unsolved`` or ``ok``.

    A finding belongs to the electrode its ``sensor`` names (findings about
    the whole board belong to none).
    """
    mine: dict[str, list[DecidedFinding]] = {r.sensor.name: [] for r in report.sensors}
    for d in report.findings:
        if d.finding.sensor in mine:
            mine[d.finding.sensor].append(d)
    return {r.sensor.name: electrode_verdict(mine[r.sensor.name], r.metrics is not None)
            for r in report.sensors}
