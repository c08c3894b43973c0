"""The run's closing verdict: one record that the last line of every run
renders, decided from the same gate as the exit code so the two never differ.

``audit`` summarises its report; ``audit --against REV`` and ``diff`` fold
the comparison's verdict (pads that lost too much, new failing findings) into
the same record, so a run ends with one line, not two that disagree.
"""

from __future__ import annotations

from dataclasses import dataclass

from auditor.decide.diff import ReportDiff
from auditor.decide.records import DecidedFinding, Report
from auditor.rules.finding import Severity


@dataclass(frozen=True)
class FindingCounts:
    """Findings by how they were decided; each finding counts once.

    ``errors``, ``warnings`` and ``notes`` count findings neither waived nor
    baselined; ``stale`` counts waivers and baseline entries that matched
    nothing.
    """

    errors: int = 0
    warnings: int = 0
    notes: int = 0
    waived: int = 0
    baselined: int = 0
    stale: int = 0


@dataclass(frozen=True)
class RunSummary:
    """What the last line says.

    Attributes
    ----------
    exit_code:
        The run's exit code (0 pass, 1 fail), the same the process returns.
    counts:
        The findings of the audited board (of the new side for ``diff``).
    reasons:
        Why the run fails, one short clause each; empty on a pass.
    fail_on:
        The gate's severity, for "nothing at or above ...".
    incomplete:
        Items the reader skipped or guessed (a partly read board is never clean).
    electrodes:
        Electrodes found; ``None`` when not known (``diff``).
    """

    exit_code: int
    counts: FindingCounts
    reasons: tuple[str, ...]
    fail_on: Severity
    incomplete: int = 0
    electrodes: int | None = None
    new_only: bool = False  # counts are of the findings new in a comparison
    #: The bundled demo, which exits 0 whatever it finds (its problems are
    #: planted): the line then says what an audit would return.
    demo: bool = False


def count_findings(findings: tuple[DecidedFinding, ...], stale: int = 0) -> FindingCounts:
    """Findings by severity (active ones), waived and baselined."""
    active = [d for d in findings if d.counts_for_gate]
    return FindingCounts(
        errors=sum(1 for d in active if d.severity == Severity.ERROR),
        warnings=sum(1 for d in active if d.severity == Severity.WARNING),
        notes=sum(1 for d in active if d.severity == Severity.INFO),
        waived=sum(1 for d in findings if d.waived),
        baselined=sum(1 for d in findings if d.in_baseline and not d.waived),
        stale=stale)


def _plural(count: int, word: str) -> str:
    return f"{count} {word}{'' if count == 1 else 's'}"


def _audit_reasons(report: Report) -> list[str]:
    reasons = []
    if report.failing:
        reasons.append(f"{_plural(len(report.failing), 'finding')} at or above "
                       f"{report.info.fail_on.label}")
    if report.rule_errors:
        reasons.append(f"{_plural(len(report.rule_errors), 'rule')} crashed")
    return reasons


def _diff_reasons(diff: ReportDiff) -> list[str]:
    reasons = []
    if diff.losing:
        names = ", ".join(p.name for p in diff.losing)
        reasons.append(f"{names} lost more than {diff.max_ratio_loss * 100:.0f} % of "
                       "ΔC/Cp")
    if diff.new_failing:
        reasons.append(f"{_plural(len(diff.new_failing), 'new finding')} at or above "
                       f"{diff.fail_on.label}")
    return reasons


def summarize(report: Report, against: ReportDiff | None = None) -> RunSummary:
    """The closing verdict of an audit, with ``against``'s folded in.

    Examples
    --------
    >>> from auditor.decide.records import Report, RunInfo
    >>> info = RunInfo("a.kicad_pcb", 20240108, "0", "default", "", "front",
    ...                "battery", Severity.ERROR)
    >>> summarize(Report(info, (), (), ())).exit_code
    0
    """
    reasons = _audit_reasons(report) + (_diff_reasons(against) if against else [])
    code = max(report.exit_code, against.exit_code if against else 0)
    stale = len(report.stale_waivers) + len(report.stale_baseline)
    return RunSummary(code, count_findings(report.findings, stale), tuple(reasons),
                      report.info.fail_on, len(report.read_warnings), len(report.sensors))


def summarize_diff(diff: ReportDiff) -> RunSummary:
    """The closing verdict of ``padaudit diff`` (counts: the new findings)."""
    return RunSummary(diff.exit_code, count_findings(diff.new_findings),
                      tuple(_diff_reasons(diff)), diff.fail_on, new_only=True)
