"""Per-sensor verdicts and sensitivity ranks from the field metrics."""

from __future__ import annotations

from collections.abc import Mapping

from auditor.rules.context import PadMetricsLike, ThresholdValue


def sensor_verdict(metrics: PadMetricsLike | None,
                   thresholds: Mapping[str, ThresholdValue]) -> str:
    """``unsolved`` without metrics; ``fail`` when ΔC is below the profile's
    ``min_delta_c_pf``; ``weak`` when ΔC/Cp is below ``min_delta_ratio`` or Cp
    above ``controller_max_cp_pf``; else ``ok``."""
    if metrics is None:
        return "unsolved"
    if metrics.delta_c_pf < float(thresholds.get("min_delta_c_pf", 0.0)):
        return "fail"
    too_high = metrics.cp_total_pf > float(thresholds.get("controller_max_cp_pf", float("inf")))
    if metrics.delta_ratio < float(thresholds.get("min_delta_ratio", 0.0)) or too_high:
        return "weak"
    return "ok"


def sensitivity_ranks(metrics: Mapping[str, PadMetricsLike]) -> dict[str, int]:
    """Rank 1 = largest ΔC/Cp; ties broken by name. Unsolved sensors get none."""
    ordered = sorted(metrics, key=lambda name: (-metrics[name].delta_ratio, name))
    return {name: rank for rank, name in enumerate(ordered, start=1)}
