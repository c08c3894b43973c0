"""Per-electrode verdicts, signal strengths and sensitivity ranks.

Two separate answers per electrode: the *signal strength* (from the field
metrics against the profile's limits: ``ok``, ``weak``, ``fail``,
``unsolved``) and the *verdict* (the worst decided finding on the electrode:
``error``, ``warning``, ``waived``, ``unsolved``, ``ok``). A pad with a strong
signal and two errors on its trace is an ``error``, not ``ok``.
"""

from __future__ import annotations

from collections.abc import Iterable, Mapping
from typing import Protocol

from auditor.rules.context import PadMetricsLike, ThresholdValue
from auditor.rules.finding import Severity
from auditor.rules.metrics import cp_limit_pf

#: Every verdict, worst first.
ELECTRODE_VERDICTS: tuple[str, ...] = ("error", "warning", "waived", "unsolved", "ok")


class DecidedLike(Protocol):
    """What a verdict needs of a decided finding (structural, so decide does
    not depend on where the record lives)."""

    @property
    def severity(self) -> Severity: ...  # noqa: D102 - a protocol member

    @property
    def waived(self) -> str: ...  # noqa: D102

    @property
    def in_baseline(self) -> bool: ...  # noqa: D102


def sensor_strength(metrics: PadMetricsLike | None,
                    thresholds: Mapping[str, ThresholdValue], diameter_mm: float = 0.0) -> str:
    """The signal strength: ``unsolved`` without metrics; ``fail`` when ΔC is
    below the profile's ``min_delta_c_pf``; ``weak`` when ΔC/Cp is below
    ``min_delta_ratio`` or Cp above the limit for an electrode of
    ``diameter_mm`` (equivalent diameter; see
    :func:`auditor.rules.metrics.cp_limit_pf`); else ``ok``."""
    if metrics is None:
        return "unsolved"
    if metrics.delta_c_pf < float(thresholds.get("min_delta_c_pf", 0.0)):
        return "fail"
    too_high = metrics.cp_total_pf > cp_limit_pf(diameter_mm, thresholds)
    if metrics.delta_ratio < float(thresholds.get("min_delta_ratio", 0.0)) or too_high:
        return "weak"
    return "ok"


def electrode_verdict(findings: Iterable[DecidedLike], solved: bool) -> str:
    """The worst decided finding on one electrode.

    ``error`` or ``warning`` for the worst finding that still counts (neither
    waived nor in the baseline; info findings do not count); ``waived`` when
    every such finding is waived or baselined; ``unsolved`` when there is no
    finding and no field result; else ``ok``.

    Examples
    --------
    >>> electrode_verdict([], solved=False)
    'unsolved'
    """
    counted = [d for d in findings if d.severity >= Severity.WARNING]
    open_ = [d.severity for d in counted if not d.waived and not d.in_baseline]
    if open_:
        return max(open_).label
    if counted:
        return "waived"
    return "ok" if solved else "unsolved"


def sensitivity_ranks(metrics: Mapping[str, PadMetricsLike]) -> dict[str, int]:
    """Rank 1 = largest ΔC/Cp; ties broken by name. Unsolved sensors get none."""
    ordered = sorted(metrics, key=lambda name: (-metrics[name].delta_ratio, name))
    return {name: rank for rank, name in enumerate(ordered, start=1)}
