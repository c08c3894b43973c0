"""Compare two reports of the same board: per-pad change and finding churn.

Pads are matched by sensor name (stable across re-saves), findings by their
key (rule, sensor, nets, references) counted as a multiset, so a second
finding with the same key is still "new". The gate: a pad whose ΔC/Cp ratio
falls by more than ``max_ratio_loss`` of its old value, or a new finding at or
above ``fail_on`` that is neither waived nor baselined, fails (exit 1).
"""

from __future__ import annotations

from collections import Counter
from dataclasses import dataclass

from auditor.decide.records import DecidedFinding, Report
from auditor.model.results import PadMetrics
from auditor.rules.finding import Severity


def percent_change(old: float, new: float) -> float | None:
    """``(new - old) / old`` in percent; ``None`` when ``old`` is zero.

    Examples
    --------
    >>> percent_change(10.0, 12.0)
    20.0
    """
    if old == 0:
        return None
    return (new - old) / old * 100.0


@dataclass(frozen=True)
class PadChange:
    """One sensor in the old and the new report (``None`` where absent or unsolved)."""

    name: str
    old: PadMetrics | None
    new: PadMetrics | None
    present_before: bool = True
    present_after: bool = True

    @property
    def status(self) -> str:
        """``added``, ``removed``, ``unsolved`` (on either side) or ``compared``."""
        if not self.present_before:
            return "added"
        if not self.present_after:
            return "removed"
        return "compared" if self.old and self.new else "unsolved"

    def change_pct(self, field: str) -> float | None:
        """Percent change of a :class:`PadMetrics` field, e.g. ``cp_total_pf``."""
        if self.old is None or self.new is None:
            return None
        return percent_change(getattr(self.old, field), getattr(self.new, field))

    @property
    def ratio_loss(self) -> float:
        """Fraction of the old ΔC/Cp ratio lost (0.3 = 30 % lower; negative = gained)."""
        if self.old is None or self.new is None or self.old.delta_ratio <= 0:
            return 0.0
        return (self.old.delta_ratio - self.new.delta_ratio) / self.old.delta_ratio


@dataclass(frozen=True)
class ReportDiff:
    """What changed from ``old`` to ``new``."""

    old_label: str
    new_label: str
    pads: tuple[PadChange, ...]
    new_findings: tuple[DecidedFinding, ...]
    fixed_findings: tuple[DecidedFinding, ...]
    max_ratio_loss: float
    fail_on: Severity

    @property
    def losing(self) -> tuple[PadChange, ...]:
        """Pads that lost more than ``max_ratio_loss`` of their ratio."""
        return tuple(p for p in self.pads if p.ratio_loss > self.max_ratio_loss)

    @property
    def new_failing(self) -> tuple[DecidedFinding, ...]:
        """New findings that count for the gate."""
        return tuple(d for d in self.new_findings
                     if d.counts_for_gate and d.severity >= self.fail_on)

    @property
    def exit_code(self) -> int:
        """1 when a pad lost too much or a failing finding is new, else 0."""
        return 1 if self.losing or self.new_failing else 0


def _unmatched(findings: tuple[DecidedFinding, ...],
               others: tuple[DecidedFinding, ...]) -> tuple[DecidedFinding, ...]:
    available = Counter(d.finding.key for d in others)
    out = []
    for d in findings:
        if available[d.finding.key] > 0:
            available[d.finding.key] -= 1
        else:
            out.append(d)
    return tuple(out)


def compare_reports(old: Report, new: Report, max_ratio_loss: float | None = None) -> ReportDiff:
    """Compare two reports; ``max_ratio_loss`` defaults to the new report's."""
    before = {r.sensor.name: r for r in old.sensors}
    after = {r.sensor.name: r for r in new.sensors}
    names = [r.sensor.name for r in new.sensors]
    names += [n for n in sorted(before) if n not in after]
    pads = tuple(PadChange(n, before[n].metrics if n in before else None,
                           after[n].metrics if n in after else None,
                           n in before, n in after) for n in names)
    limit = new.info.max_ratio_loss if max_ratio_loss is None else max_ratio_loss
    return ReportDiff(old.info.board_path, new.info.board_path, pads,
                      _unmatched(new.findings, old.findings),
                      _unmatched(old.findings, new.findings), limit, new.info.fail_on)
