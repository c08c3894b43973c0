"""The short report of a gate run (``padaudit hook run``): one line on a
pass; on a fail, the findings that fail it and then that line.

A passing pre-commit hook should not fill the terminal; a failing one shows
what blocks the commit and nothing the gate accepted (waived, baselined,
below ``fail_on``).
"""

from __future__ import annotations

from typing import TextIO

from auditor.decide.records import DecidedFinding, Report
from auditor.decide.summary import RunSummary
from auditor.report.summary_line import summary_line


def describe_failing(d: DecidedFinding) -> str:
    """``error ground-gap-tight BTN5: message (x 1.00 mm, y 2.00 mm, F.Cu, line 812)``."""
    f = d.finding
    where = [f"x {f.x_mm:.2f} mm, y {f.y_mm:.2f} mm"] if f.x_mm is not None and f.y_mm is not None else []
    where += [f.layer] if f.layer else []
    where += [f"line {f.source_line}"] if f.source_line is not None else []
    who = f" {f.sensor}" if f.sensor else ""
    return (f"{d.severity.label} {f.rule_id}{who}: {f.message}"
            + (f" ({', '.join(where)})" if where else ""))


def render_brief(report: Report, summary: RunSummary, stream: TextIO) -> None:
    """Write the gate's short report for one board to ``stream``."""
    label = report.info.board_path
    if summary.exit_code:
        blocking = [describe_failing(d) for d in report.failing]
        blocking += [f"rule {rid} crashed: {err}" for rid, err in report.rule_errors]
        stream.write(f"{label}: what fails the gate ({len(blocking)}):\n")
        stream.write("".join(f"  {line}\n" for line in blocking))
    stream.write(f"{label}: {summary_line(summary)}\n")
