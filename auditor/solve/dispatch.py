"""The field step of an audit, in one call: which solve answers each sensor.

:func:`solve_sensors` dispatches every sensor to the quick solve
(:mod:`auditor.solve.quick`), the 3-D solve (:mod:`auditor.solve.precise`)
or the mutual pair models (:mod:`auditor.solve.mutual_pairs`) — in the automatic
mode as :func:`auditor.solve.route.route_for` decides — and
:func:`unsolved_reasons` says why a sensor got no metrics. The audit entry
(:mod:`auditor.audit`) calls only this module of the stage.
"""

from __future__ import annotations

from collections.abc import Callable, Mapping
from dataclasses import replace
from functools import partial
from typing import Literal

from auditor.config import Config
from auditor.errors import UsageError
from auditor.model.board import Board
from auditor.model.results import PadMetrics
from auditor.model.vocabulary import SELF_KINDS
from auditor.sensors.model import Sensor
from auditor.solve.jobs import PreciseWork
from auditor.solve.lumped import with_lumped_parts
from auditor.solve.mutual_jobs import PairContext, pair_metrics, queue_pairs
from auditor.solve.mutual_pairs import plan_pairs
from auditor.solve.quick import QuickSolves, metrics_from_quick
from auditor.solve.route import Route, forced, route_for
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


Mode = Literal["auto", "quick", "precise"]
MODES: tuple[Mode, ...] = ("auto", "quick", "precise")


def _precise_or_quick(sensor: Sensor, board: Board, config: Config, mapped: FieldInput,
                      sensors: tuple[Sensor, ...], quick: PadMetrics | None) -> PadMetrics:
    """The precise metrics, or the quick ones with the reason when the 3-D
    model cannot take this electrode (e.g. a layer missing from the stackup)."""
    # Imported here for start-up speed only: the 3-D solver loads
    # scipy.interpolate, which a quick audit never needs.
    from auditor.solve.precise import metrics_from_precise

    try:
        return metrics_from_precise(sensor, board, config, mapped, sensors,
                                    quick_estimate=quick)
    except (UsageError, KeyError) as exc:
        fallback = quick or metrics_from_quick(mapped)
        return replace(fallback, notes=(f"precise solve not possible ({exc}); quick "
                                        "estimate shown",) + fallback.notes,
                       method_reason=f"3-D solve not possible ({exc})")


def unsolved_reasons(sensors: tuple[Sensor, ...], metrics: Mapping[str, PadMetrics],
                     precise: bool = False, mode: Mode | None = None) -> dict[str, str]:
    """For each electrode the field step left without metrics, why."""
    mode = mode or ("precise" if precise else "auto")
    reasons: dict[str, str] = {}
    for sensor in sensors:
        if sensor.name in metrics:
            continue
        reason = quick_unfit_reason(sensor) if mode == "quick" else ""
        if not reason and sensor.kind == "mutual-tx":
            reason = "transmit electrode: its pair's receive electrode carries Cm"
        reasons[sensor.name] = reason or "no field model for this electrode"
    return reasons


#: An electrode's pad setup, or (``--precise``) how to map it in its own job.
Mapped = FieldInput | Callable[[], FieldInput]


def _routes(sensors: tuple[Sensor, ...], quick: QuickSolves, board: Board, config: Config,
            limits: Mapping[str, float | int | bool], mode: Mode
            ) -> dict[str, tuple[Route, Mapped]]:
    """Model and pad setup of every self-capacitance electrode. With
    ``--precise`` every one goes 3-D whatever its setup, so the mapping is
    left to its 3-D job, which runs beside the others (:class:`PreciseWork`)."""
    nets = frozenset(n for s in sensors for n in s.nets)
    out: dict[str, tuple[Route, Mapped]] = {}
    for sensor in sensors:
        if sensor.kind not in SELF_KINDS or sensor.area_mm2 <= 0:
            continue
        if mode == "precise":
            out[sensor.name] = (forced(Route("precise", ""), mode),
                                partial(pad_setup_for, sensor, board, config, limits, nets))
            continue
        mapped = quick.mapped(sensor.name) or pad_setup_for(sensor, board, config, limits, nets)
        route = route_for(sensor, mapped)
        out[sensor.name] = (route if mode == "auto" else forced(route, mode), mapped)
    return out


def solve_sensors(board: Board, sensors: tuple[Sensor, ...], config: Config, *,
                  precise: bool = False, progress: Progress | None = None,
                  thresholds: Mapping[str, float | int | bool] | None = None,
                  quick: QuickSolves | None = None, mode: Mode | None = None,
                  workers: int | None = None, work: PreciseWork | None = None
                  ) -> dict[str, PadMetrics]:
    """Field metrics per sensor name (``method`` "quick" or "precise", and
    ``method_reason``).

    ``mode``: "auto" (the default; ``precise=True`` means "precise") gives
    each self-capacitance electrode the model :func:`route_for` picks;
    "quick" and "precise" force one model. A mutual receive electrode gets
    the Cm of its pair; a transmit electrode, a loop in the quick mode, or a
    sensor that cannot be mapped gets no entry (the report shows it
    unsolved; :func:`unsolved_reasons` says why) — nothing is made up. The
    quick solves run first, each distinct setup once; ``quick`` holds them
    when they were started while measuring. The electrodes routed to 3-D
    and the mutual pairs (:mod:`auditor.solve.mutual_jobs`) are solved
    after them, together, with the jobs ``work`` already holds (the
    coupling table and scans of ``--precise``; :class:`PreciseWork`).
    ``workers``: processes to solve in (None: automatic, see
    :func:`auditor.field.fanout.process_count`). ``progress`` is called as
    ``progress(sensor_name, done, total)``, in sensor order.
    """
    limits = thresholds or {}
    mode = mode or ("precise" if precise else "auto")
    in_order = _InOrder(sensors, progress)
    nets = frozenset(n for s in sensors for n in s.nets)
    quick = quick or QuickSolves(board, config, limits, workers, electrode_nets=nets)
    if mode != "precise":
        for sensor in sensors:
            quick.add(sensor)  # those added while measuring are not added again
    routes = _routes(sensors, quick, board, config, limits, mode)
    to_3d = {name for name, (route, _) in routes.items() if route.method == "precise"}
    out = quick.metrics(lambda name: None if name in to_3d else in_order.finish(name))
    work = work or PreciseWork(workers)
    context = PairContext(board, sensors, config, limits, mode)
    plans = plan_pairs(sensors, mode)
    queue_pairs(plans, work, context)
    out.update(_precise_all(sensors, to_3d, routes, out, board, config, work,
                            in_order.finish))
    pairs = pair_metrics(plans, work.pairs(), context)
    for sensor in sensors:
        if sensor.kind == "mutual-rx":
            if sensor.name in pairs:
                out[sensor.name] = pairs[sensor.name]
        elif sensor.name in routes and sensor.name in out and not out[sensor.name].method_reason:
            out[sensor.name] = replace(out[sensor.name],
                                       method_reason=routes[sensor.name][0].reason)
        in_order.finish(sensor.name)
    return with_lumped_parts(out, sensors, board, limits)


def _cells(sensor: Sensor) -> float:
    """Cells of the electrode's window: what its 3-D solve costs, roughly."""
    from auditor.solve.precise import WINDOW_MARGIN_MM, cell_for  # start-up speed, as above

    x0, y0, x1, y1 = sensor.geometry.bounds
    frame = 2.0 * WINDOW_MARGIN_MM
    return float((x1 - x0 + frame) * (y1 - y0 + frame) / cell_for(sensor) ** 2)


def _precise_job(sensor: Sensor, board: Board, config: Config, mapped: Mapped,
                 sensors: tuple[Sensor, ...], quick: PadMetrics | None) -> PadMetrics:
    field_input = mapped if isinstance(mapped, FieldInput) else mapped()
    return _precise_or_quick(sensor, board, config, field_input, sensors, quick)


def _precise_all(sensors: tuple[Sensor, ...], names: set[str],
                 routes: Mapping[str, tuple[Route, Mapped]],
                 quick: Mapping[str, PadMetrics], board: Board, config: Config,
                 work: PreciseWork, finished: Callable[[str], None]) -> dict[str, PadMetrics]:
    """The electrodes routed to 3-D on the shared stack, run with whatever
    else ``work`` holds (the mutual pairs among it; the quick estimate of
    each electrode, when there is one, goes in its notes)."""
    for sensor in sensors:
        if sensor.name in names:
            work.add_electrode(sensor.name, _cells(sensor), partial(
                _precise_job, sensor, board, config, routes[sensor.name][1], sensors,
                quick.get(sensor.name)))
    work.run(finished)
    return {name: metrics if metrics.method_reason else replace(
                metrics, method_reason=routes[name][0].reason)
            for name, metrics in work.metrics().items()}


__all__ = ["MODES", "Mode", "PreciseWork", "Progress", "QuickSolves", "solve_sensors", "unsolved_reasons"]
