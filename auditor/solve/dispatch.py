"""The field step of an audit, in one call: which solve answers each sensor.

:func:`solve_sensors` dispatches every sensor to the quick solve
(:mod:`auditor.solve.quick`), the 3-D solve (:mod:`auditor.solve.precise`)
or the mutual pair model (:mod:`auditor.solve.mutual`), and
:func:`unsolved_reasons` says why a sensor got no metrics. The audit entry
(:mod:`auditor.audit`) calls only this module of the stage.
"""

from __future__ import annotations

from collections.abc import Callable, Mapping
from dataclasses import replace

from auditor.config import Config
from auditor.errors import UsageError
from auditor.model.board import Board
from auditor.model.results import PadMetrics
from auditor.model.vocabulary import SELF_KINDS
from auditor.sensors.model import Sensor
from auditor.solve.lumped import with_lumped_parts
from auditor.solve.mutual import metrics_for_mutual, mutual_partner
from auditor.solve.quick import QuickSolves, metrics_from_quick
from auditor.solve.setup import FieldInput, pad_setup_for, quick_unfit_reason

Progress = Callable[[str, int, int], None]


class _InOrder:
    """Reports progress in sensor order as results become ready (parallel
    quick solves finish in any order)."""

    def __init__(self, sensors: tuple[Sensor, ...], progress: Progress | None) -> None:
        self._sensors, self._progress = sensors, progress
        self._finished: set[str] = set()
        self._reported = 0

    def finish(self, name: str) -> None:
        self._finished.add(name)
        while (self._reported < len(self._sensors)
               and self._sensors[self._reported].name in self._finished):
            self._reported += 1
            if self._progress is not None:
                self._progress(self._sensors[self._reported - 1].name, self._reported,
                               len(self._sensors))


def _precise_or_quick(sensor: Sensor, board: Board, config: Config, mapped: FieldInput,
                      sensors: tuple[Sensor, ...]) -> PadMetrics:
    """The precise metrics, or the quick ones with the reason when the 3-D
    model cannot take this electrode (e.g. a layer missing from the stackup)."""
    # Imported here for start-up speed only: the 3-D solver loads
    # scipy.interpolate, which a quick audit never needs.
    from auditor.solve.precise import metrics_from_precise

    try:
        return metrics_from_precise(sensor, board, config, mapped, sensors)
    except (UsageError, KeyError) as exc:
        quick = metrics_from_quick(mapped)
        return replace(quick, notes=(f"precise solve not possible ({exc}); quick "
                                     "estimate shown",) + quick.notes)


def unsolved_reasons(sensors: tuple[Sensor, ...], metrics: Mapping[str, PadMetrics],
                     precise: bool = False) -> dict[str, str]:
    """For each electrode the field step left without metrics, why."""
    reasons: dict[str, str] = {}
    for sensor in sensors:
        if sensor.name in metrics:
            continue
        reason = "" if precise else quick_unfit_reason(sensor)
        if not reason and sensor.kind == "mutual-tx":
            reason = "transmit electrode: its pair's receive electrode carries Cm"
        reasons[sensor.name] = reason or "no field model for this electrode"
    return reasons


def solve_sensors(board: Board, sensors: tuple[Sensor, ...], config: Config, *,
                  precise: bool = False, progress: Progress | None = None,
                  thresholds: Mapping[str, float | int | bool] | None = None,
                  quick: QuickSolves | None = None) -> dict[str, PadMetrics]:
    """Field metrics per sensor name (``method`` "quick" or "precise").

    Self-capacitance electrodes (button, slider, wheel, proximity) are
    solved; a mutual receive electrode gets the Cm of its pair; a
    transmit electrode, a loop the quick disk model cannot represent
    (:func:`quick_unfit_reason`), or a sensor that cannot be mapped, gets no
    entry (the report shows it unsolved; :func:`unsolved_reasons` says why)
    — nothing is made up. The quick solves run first, each distinct setup
    once; ``quick`` holds them when they were started while measuring.
    ``progress`` is called as ``progress(sensor_name, done, total)``, in
    sensor order.
    """
    limits = thresholds or {}
    in_order = _InOrder(sensors, progress)
    out: dict[str, PadMetrics] = {}
    if not precise:
        quick = quick or QuickSolves(board, config, limits)
        for sensor in sensors:
            quick.add(sensor)  # those added while measuring are not added again
        out = quick.metrics(in_order.finish)
    for sensor in sensors:
        if sensor.name in out:
            pass
        elif precise and sensor.kind in SELF_KINDS and sensor.area_mm2 > 0:
            mapped = pad_setup_for(sensor, board, config, limits)
            out[sensor.name] = _precise_or_quick(sensor, board, config, mapped, sensors)
        elif sensor.kind == "mutual-rx":
            tx = mutual_partner(sensor, sensors)
            if tx is not None:
                out[sensor.name] = metrics_for_mutual(sensor, tx, board, config, limits)
        in_order.finish(sensor.name)
    return with_lumped_parts(out, sensors, board, limits)


__all__ = ["Progress", "QuickSolves", "solve_sensors", "unsolved_reasons"]
