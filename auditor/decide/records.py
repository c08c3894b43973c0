"""The decided result of one audit: findings after the policy, the gate, the
report object every back-end renders.

Built once per run by :func:`auditor.audit.run_audit` with ``decide``;
reporters (text, json, sarif, junit, markdown, svg) are interchangeable views
of it and never compute anything of their own beyond layout. The gate (what
fails, the exit code) is decided here: :attr:`Report.failing` and
:attr:`Report.exit_code`.
"""

from __future__ import annotations

from dataclasses import dataclass, field

from auditor.model.board import Board
from auditor.model.results import PadMetrics, PreciseExtras
from auditor.model.suggestions import Suggestion
from auditor.rules.finding import Finding, Severity
from auditor.sensors.model import Sensor
from auditor.sensors.notes import structure_notes


@dataclass(frozen=True)
class SensorResult:
    """A sensor with its metrics, rank (1 = most sensitive) and signal strength.

    The electrode's verdict (worst finding on it) is decided from the report's
    findings by :func:`auditor.report.verdicts.electrode_verdicts`."""

    sensor: Sensor
    metrics: PadMetrics | None
    rank: int
    strength: str  # "ok", "weak", "fail", "unsolved"


@dataclass(frozen=True)
class DecidedFinding:
    """A finding after profile, overrides, waivers and baseline.

    ``severity`` is the effective severity; ``waived`` carries the waiver's
    reason when a waiver matched; ``in_baseline`` marks findings already
    accepted in a baseline file (shown, never failing); ``suggestions``: the
    changes that fix it with their predicted effect (attached by the audit
    entry, :mod:`auditor.audit_suggest`).
    """

    finding: Finding
    severity: Severity
    waived: str = ""
    in_baseline: bool = False
    suggestions: tuple[Suggestion, ...] = ()

    @property
    def counts_for_gate(self) -> bool:
        """True when this finding may fail the run."""
        return not self.waived and not self.in_baseline


@dataclass(frozen=True)
class RuleInfo:
    """Metadata of a rule, for reporters that list rules (SARIF, JUnit)."""

    rule_id: str
    title: str
    rationale: str
    fix: str
    default_severity: Severity


@dataclass(frozen=True)
class RunInfo:
    """What was run on what: the header of every report."""

    board_path: str
    board_version: int
    tool_version: str
    profile: str
    overlay: str  # e.g. "2.0 mm acrylic (er 3.3)"
    touch_side: str
    power: str
    fail_on: Severity
    #: Largest allowed loss of a pad's ΔC/Cp ratio between two revisions, as a
    #: fraction (profile threshold ``max_ratio_loss``; 0.2 is common practice,
    #: no source). Read by ``padaudit diff`` and ``audit --against``.
    max_ratio_loss: float = 0.2
    #: The configuration file read, as shown (relative to the working folder
    #: when inside it); ``""`` when none was found.
    config_path: str = ""


@dataclass(frozen=True)
class Report:
    """Everything a reporter needs. Ordered deterministically by the audit."""

    info: RunInfo
    sensors: tuple[SensorResult, ...]
    findings: tuple[DecidedFinding, ...]
    rules: tuple[RuleInfo, ...]
    read_warnings: tuple[str, ...] = ()  # what the reader skipped or guessed
    stale_waivers: tuple[str, ...] = ()
    stale_baseline: tuple[str, ...] = ()
    rule_errors: tuple[tuple[str, str], ...] = ()  # (rule id, error) for crashed rules
    cautions: tuple[str, ...] = ()  # safety notes (mains etc.)
    #: (rule id, why) for rules that did not run: switched off by the profile
    #: or configuration, or needing the 3-D solve in a quick run.
    skipped_rules: tuple[tuple[str, str], ...] = ()
    #: The board itself, for the picture (``--svg``); not part of equality.
    board: Board | None = field(default=None, compare=False, repr=False)
    #: Precise-mode extras (coupling table, slider scans) when ``--precise`` ran.
    precise: PreciseExtras | None = None

    @property
    def notes(self) -> tuple[str, ...]:
        """What the board's structures need said once (key switches found
        and left to no touch rule ...): the same notes ``padaudit sensors``
        prints, derived from the sensors so the two cannot disagree."""
        return structure_notes(tuple(r.sensor for r in self.sensors))

    @property
    def failing(self) -> tuple[DecidedFinding, ...]:
        """Findings at or above ``fail_on`` that are neither waived nor baselined."""
        return tuple(f for f in self.findings
                     if f.counts_for_gate and f.severity >= self.info.fail_on)

    @property
    def exit_code(self) -> int:
        """0 clean, 1 failing findings (or a crashed rule), per the CLI contract."""
        return 1 if self.failing or self.rule_errors else 0
