"""The one place that decides what is shown and what fails.

Order of precedence for a rule's level: its registered default, then the
profile's ``[rules]`` table, then the configuration's ``severity`` table
(``off`` disables). Waivers then mark matching findings (a waiver matching
nothing is *stale* and reported). Baseline matching is a separate step
(:func:`mark_baseline`; file handling in :mod:`auditor.decide.baseline`).
"""

from __future__ import annotations

from collections import Counter
from collections.abc import Iterable, Mapping, Sequence
from dataclasses import dataclass, field, replace

from auditor.config.model import Waiver
from auditor.config.profiles import severity_of_level
from auditor.decide.records import DecidedFinding
from auditor.model.vocabulary import FindingKey
from auditor.rules.finding import Finding, Severity
from auditor.rules.registry import RuleSpec


@dataclass(frozen=True)
class Policy:
    """What the profile and the configuration say about each rule."""

    rules: tuple[RuleSpec, ...]
    profile_levels: Mapping[str, str] = field(default_factory=dict)
    overrides: Mapping[str, str] = field(default_factory=dict)
    waivers: tuple[Waiver, ...] = ()

    def level(self, rule_id: str) -> Severity | None:
        """Effective severity of a rule, ``None`` when it is off."""
        chosen = self.overrides.get(rule_id) or self.profile_levels.get(rule_id)
        if chosen is not None:
            return severity_of_level(chosen)
        return self._defaults[rule_id]

    @property
    def _defaults(self) -> dict[str, Severity | None]:
        return {spec.rule_id: spec.severity for spec in self.rules}

    def active_rule_ids(self) -> tuple[str, ...]:
        """Ids of the rules that are not off, sorted."""
        return tuple(sorted(s.rule_id for s in self.rules if self.level(s.rule_id) is not None))


@dataclass(frozen=True)
class Decision:
    """Decided findings (sorted) and the waivers that matched nothing."""

    findings: tuple[DecidedFinding, ...]
    stale_waivers: tuple[str, ...] = ()


def finding_order(decided: DecidedFinding) -> tuple[object, ...]:
    """Sort key: worst first, then rule, sensor, nets, refs, message, place."""
    f = decided.finding
    return (-int(decided.severity), f.rule_id, f.sensor, f.nets, f.refs, f.message,
            f.layer, f.x_mm if f.x_mm is not None else -1e18,
            f.y_mm if f.y_mm is not None else -1e18)


def decide(findings: Iterable[Finding], policy: Policy,
           baseline: Mapping[FindingKey, int] | None = None) -> Decision:
    """Apply levels and waivers (and a baseline, if given) to raw findings.

    Findings of rules that are off are dropped here and nowhere else.
    """
    decided: list[DecidedFinding] = []
    used: set[int] = set()
    known = {spec.rule_id for spec in policy.rules}
    for finding in findings:
        level = policy.level(finding.rule_id) if finding.rule_id in known else finding.severity
        if level is None:
            continue
        reason = ""
        for index, waiver in enumerate(policy.waivers):
            if waiver.matches(finding):
                used.add(index)
                reason = reason or waiver.reason
        decided.append(DecidedFinding(finding, level, waived=reason))
    decided.sort(key=finding_order)
    stale = tuple(w.describe() for i, w in enumerate(policy.waivers) if i not in used)
    result = Decision(tuple(decided), stale)
    if baseline is not None:
        result = replace(result, findings=mark_baseline(result.findings, baseline)[0])
    return result


def mark_baseline(findings: tuple[DecidedFinding, ...], baseline: Mapping[FindingKey, int]
                  ) -> tuple[tuple[DecidedFinding, ...], tuple[FindingKey, ...]]:
    """The baseline seam: mark findings whose key the baseline holds (each
    entry accepts as many findings as its count); returns the marked findings
    and the keys left unmatched (stale).

    Findings that are not waived take the entries first. A waived finding
    is not marked (its waiver already decides it), but it still uses up an
    entry left over for its key: the finding is there, so the entry is not
    stale (a finding baselined and waived later is neither new nor gone).
    """
    remaining = Counter(dict(baseline))
    marked: list[DecidedFinding] = []
    for d in findings:
        key = d.finding.key
        if not d.waived and remaining[key] > 0:
            remaining[key] -= 1
            d = replace(d, in_baseline=True)
        marked.append(d)
    left = baseline_leftovers(marked, baseline)
    return tuple(marked), tuple(k for k, n in sorted(left.items()) if n > 0)


def baseline_leftovers(marked: Sequence[DecidedFinding], baseline: Mapping[FindingKey, int]
                       ) -> Counter[FindingKey]:
    """What each baseline entry's count has left once ``marked`` (the
    output of :func:`mark_baseline`) used it: one per finding marked, then
    one per waived finding of that key while any is left."""
    left = Counter(dict(baseline))
    for d in marked:
        if d.in_baseline:
            left[d.finding.key] -= 1
    for d in marked:
        if d.waived and left[d.finding.key] > 0:
            left[d.finding.key] -= 1
    return left
