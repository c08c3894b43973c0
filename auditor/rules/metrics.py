"""Rules on the field-solve results (baseline Cp, touch signal ΔC, ratio).

They yield nothing for sensors without metrics (the field step did not run
or could not solve them; the report marks those sensors ``unsolved``).
"""

from __future__ import annotations

import math
from collections.abc import Iterator, Mapping

from auditor.rules.context import ThresholdValue
from auditor.rules.finding import Finding, Severity
from auditor.rules.groups import in_one_group
from auditor.rules.registry import RuleCall, board_rule, sensor_rule
from auditor.rules.repeated import one_for_all
from auditor.sensors.model import Sensor

#: The thresholds that set an electrode's Cp limit (:func:`cp_limit_pf`).
_CP_LIMITS = ("controller_max_cp_pf", "large_electrode_max_cp_pf", "pad_max_diameter_mm")


def cp_limit_pf(diameter_mm: float, limits: Mapping[str, ThresholdValue]) -> float:
    """The Cp an electrode of this equivalent diameter is held to.

    ``controller_max_cp_pf`` is the design target of a fingertip button (the
    trade's "<= 20-30 pF" sits beside its 8-15 mm pads: the pad itself is a
    few pF, the rest is layout). An electrode wider than
    ``pad_max_diameter_mm`` (a slider tile, a palm pad) carries more Cp in
    its own copper by design, and a fingertip under it adds more ΔC in step;
    it is held to the controller's input range, ``large_electrode_max_cp_pf``
    (physics.md §4.1, common practice, no source), never to less than the
    button target.

    >>> cp_limit_pf(10.0, {"controller_max_cp_pf": 30.0, "pad_max_diameter_mm": 20.0,
    ...                    "large_electrode_max_cp_pf": 50.0})
    30.0
    >>> cp_limit_pf(37.4, {"controller_max_cp_pf": 30.0, "pad_max_diameter_mm": 20.0,
    ...                    "large_electrode_max_cp_pf": 50.0})
    50.0
    """
    target = float(limits.get("controller_max_cp_pf", math.inf))
    if diameter_mm <= float(limits.get("pad_max_diameter_mm", math.inf)):
        return target
    return max(target, float(limits.get("large_electrode_max_cp_pf", target)))


@sensor_rule(
    "cp-too-high",
    title="Baseline capacitance above the controller's range",
    fix="Lower Cp: thinner or shorter trace, hatch instead of solid ground under and around "
        "the pad, wider ground gap, smaller pad.",
    severity=Severity.WARNING,
    thresholds=_CP_LIMITS,
)
def cp_too_high(sensor: Sensor, call: RuleCall) -> Iterator[Finding]:
    """A controller measures a touch as a change on top of the baseline; above
    its design range the baseline uses up the measurement range and the
    resolution left for the finger's change drops. A button is held to the
    design target; an electrode larger than a button, whose own copper puts
    it past that target by design, to the controller's input range (its
    ΔC/Cp is judged by ratio-low)."""
    metrics = call.board.metrics.get(sensor.name)
    if metrics is None:
        return
    declared = {name: call.limits[name] for name in _CP_LIMITS}
    limit = cp_limit_pf(sensor.equivalent_diameter_mm, declared)
    if metrics.cp_total_pf > limit + 1e-12:
        yield call.finding(
            f"baseline Cp {metrics.cp_total_pf:.1f} pF exceeds {limit:.1f} pF", sensor,
            (("cp_total_pf", metrics.cp_total_pf), ("max_pf", limit)))


@sensor_rule(
    "delta-c-low",
    title="Touch signal too small",
    fix="Grow the pad, thin the overlay (or use a higher-permittivity one), remove any air "
        "gap between cover and board.",
    severity=Severity.WARNING,
    thresholds=("min_delta_c_pf",),
)
def delta_c_low(sensor: Sensor, call: RuleCall) -> Iterator[Finding]:
    """The finger's added capacitance ΔC must stand clear of the noise; below
    the design minimum small changes of the environment look like touches."""
    metrics = call.board.metrics.get(sensor.name)
    if metrics is None:
        return
    limit = call.limits["min_delta_c_pf"]
    if metrics.delta_c_pf < limit - 1e-12:
        yield call.finding(
            f"touch signal ΔC {metrics.delta_c_pf:.3f} pF is below {limit:.3f} pF", sensor,
            (("delta_c_pf", metrics.delta_c_pf), ("min_pf", limit)))


@sensor_rule(
    "ratio-low",
    title="Touch signal small relative to the baseline",
    fix="Lower the baseline (see cp-too-high) or raise the signal (see delta-c-low).",
    severity=Severity.WARNING,
    thresholds=("min_delta_ratio",),
)
def ratio_low(sensor: Sensor, call: RuleCall) -> Iterator[Finding]:
    """Most sensing methods resolve a change relative to the baseline; a
    small ΔC/Cp leaves little margin over drift and noise."""
    metrics = call.board.metrics.get(sensor.name)
    if metrics is None:
        return
    limit = call.limits["min_delta_ratio"]
    if metrics.delta_ratio < limit - 1e-12:
        yield call.finding(
            f"ΔC/Cp is {100 * metrics.delta_ratio:.2f} %, below {100 * limit:.2f} %", sensor,
            (("delta_ratio", metrics.delta_ratio), ("min_ratio", limit)))


@board_rule(
    "electrode-unsolved",
    title="Electrode not covered by the field solve",
    fix="Run without --quick (the automatic mode solves loops, combs and other shapes far "
        "from a plate in 3-D) or with --precise; otherwise check the electrode's "
        "configuration (kind, nets) so the solver can model it.",
    severity=Severity.WARNING,
)
def electrode_unsolved(call: RuleCall) -> Iterator[Finding]:
    """The field step ran but has no Cp or ΔC for this electrode, so the
    rules on the touch signal could not judge it; an unjudged electrode must
    not let the board pass as if it had been checked. One cause, one
    finding: electrodes left unsolved for the same reason (every key of an
    unrouted board) are reported together. A transmit electrode paired with
    a receive electrode has no result of its own by design (the pair's
    mutual capacitance is the receive side's), so it is not reported."""
    by_reason: dict[str, list[Sensor]] = {}
    for sensor in call.board.touch_sensors:
        reason = call.board.unsolved.get(sensor.name)
        if reason and not _paired_transmitter(sensor, call):
            by_reason.setdefault(reason, []).append(sensor)
    for reason, sensors in sorted(by_reason.items()):
        yield one_for_all(call, sensors, f"no field result: {reason}",
                          f"electrodes have no field result ({reason})")


def _paired_transmitter(sensor: Sensor, call: RuleCall) -> bool:
    """True for a transmit electrode with a receive electrode in its group."""
    return sensor.kind == "mutual-tx" and any(
        other.kind == "mutual-rx" and in_one_group(sensor, other)
        for other in call.board.sensors)
