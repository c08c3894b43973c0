"""The quick solves of an audit: each mapped pad on the axisymmetric model,
equal setups solved once, in helper processes while measuring goes on."""

from __future__ import annotations

from collections.abc import Callable, Mapping

from auditor.config import Config
from auditor.field.api import PadSetup, PadSolve, solve_pad
from auditor.field.batch import PadBatch
from auditor.model.board import Board
from auditor.model.results import PadMetrics
from auditor.model.vocabulary import SELF_KINDS
from auditor.sensors.model import Sensor
from auditor.solve.setup import FieldInput, pad_setup_for, quick_unfit_reason


def metrics_from_quick(mapped: FieldInput) -> PadMetrics:
    """Solve one mapped pad with the quick axisymmetric model."""
    return _quick_metrics(mapped, solve_pad(mapped.setup))


def _quick_metrics(mapped: FieldInput, solve: PadSolve) -> PadMetrics:
    return PadMetrics(solve.cp_pad_pf, solve.cp_trace_pf, solve.cp_total_pf,
                      solve.delta_c_pf, solve.delta_ratio, "quick",
                      mapped.notes + solve.notes)


class QuickSolves:
    """The quick solves of an audit, started while it is still measuring.

    :meth:`add` maps each measured sensor the disk model fits to its pad
    setup and queues the solve (:class:`auditor.field.batch.PadBatch`:
    helper processes start on it at once when a core is idle); equal setups
    are solved once. :meth:`metrics` waits for them all.
    """

    def __init__(self, board: Board, config: Config,
                 thresholds: Mapping[str, float | int | bool] | None = None,
                 workers: int | None = None,
                 electrode_nets: frozenset[str] = frozenset()) -> None:
        self._board, self._config, self._limits = board, config, thresholds or {}
        self._electrode_nets = electrode_nets
        self._batch = PadBatch(workers)
        self._mapped: dict[str, FieldInput] = {}

    def add(self, sensor: Sensor) -> None:
        """Map and queue one sensor (ignored unless the quick model fits it)."""
        if (sensor.kind not in SELF_KINDS or sensor.area_mm2 <= 0 or sensor.name in self._mapped
                or quick_unfit_reason(sensor)):
            return
        mapped = pad_setup_for(sensor, self._board, self._config, self._limits,
                               self._electrode_nets)
        self._mapped[sensor.name] = mapped
        self._batch.add(mapped.setup)

    def mapped(self, name: str) -> FieldInput | None:
        """The pad setup of an added sensor (None if it was not added)."""
        return self._mapped.get(name)

    def metrics(self, finished: Callable[[str], None] | None = None) -> dict[str, PadMetrics]:
        """Metrics of every sensor added, by name; ``finished`` is called
        with each sensor's name as its solve is done."""
        names: dict[PadSetup, list[str]] = {}
        for name, field_input in self._mapped.items():
            names.setdefault(field_input.setup, []).append(name)

        def solved(setup: PadSetup) -> None:
            for name in names[setup]:
                if finished is not None:
                    finished(name)

        solves = self._batch.results(solved)
        return {name: _quick_metrics(field_input, solves[field_input.setup])
                for name, field_input in self._mapped.items()}
