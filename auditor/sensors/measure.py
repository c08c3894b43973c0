"""Fill in each sensor's sense path and surroundings."""

from __future__ import annotations

from collections.abc import Iterator, Sequence
from dataclasses import replace

from auditor.model.board import Board
from auditor.sensors.find import ground_net
from auditor.sensors.model import Sensor
from auditor.sensors.path import sense_path
from auditor.sensors.selection import SensorSelection
from auditor.sensors.spatial import net_copper_area
from auditor.sensors.surround import surroundings_of


def measure(board: Board, sensors: Sequence[Sensor],
            selection: SensorSelection | None = None) -> tuple[Sensor, ...]:
    """Copies of ``sensors`` with ``path`` and ``surroundings`` measured.

    Examples
    --------
    ``measure(board, find_sensors(board)[0])``
    """
    return mark_sense_neighbours(list(measure_each(board, sensors, selection)))


def measure_each(board: Board, sensors: Sequence[Sensor],
                 selection: SensorSelection | None = None) -> Iterator[Sensor]:
    """Each sensor with ``path`` and ``surroundings`` measured, as soon as it is.

    What depends on all of them (which neighbours are other sense nets) is
    left to :func:`mark_sense_neighbours`; :func:`measure` does both. The
    audit starts each pad's field solve while the next is being measured.
    """
    sel = selection or SensorSelection()
    ground = ground_net(board, sel)
    ground_area = device_ground_area(board, ground)
    for sensor in sensors:
        path = sense_path(board, sensor, sensors, sel, ground)
        around = surroundings_of(board, sensor, sensors, sel, ground, ground_area)
        yield replace(sensor, path=path, surroundings=around)


def mark_sense_neighbours(sensors: Sequence[Sensor]) -> tuple[Sensor, ...]:
    """Mark the neighbours of each sense path that are other electrodes'
    nets or sense paths."""
    return tuple(_with_sense_neighbours(list(sensors)))


def _with_sense_neighbours(sensors: list[Sensor]) -> list[Sensor]:
    """Mark neighbours that are other electrodes' nets or sense paths."""
    sense_nets = {net for s in sensors for net in s.nets + (s.path.nets if s.path else ())}
    out = []
    for s in sensors:
        if s.path is None:
            out.append(s)
            continue
        marked = tuple(replace(n, sense=n.net in sense_nets) for n in s.path.neighbours)
        out.append(replace(s, path=replace(s.path, neighbours=marked)))
    return out


def device_ground_area(board: Board, ground: str) -> float:
    """Total copper area of ``ground`` over all copper layers (mm²)."""
    return net_copper_area(board, ground) if ground else 0.0
