"""Measure what surrounds each electrode.

* gaps to same-layer copper of other nets (a driven shield's excepted): the minimum (edge to edge) and the
  typical one, the median over points spaced :data:`PERIMETER_STEP_MM` along
  the electrode's outline of the distance to the nearest such copper (points
  with none within ``gap_search_mm`` are left out);
* the coverage of the device ground in a ring ``ground_ring_mm`` wide that
  starts at the typical gap;
* per other copper layer, the copper under the electrode (see
  :mod:`auditor.sensors.shadow`);
* the nearest other electrode, noisy parts within ``parts_radius_mm``, floating
  copper within ``floating_radius_mm``, the device ground's total copper area.
"""

from __future__ import annotations

import statistics
from collections.abc import Callable, Sequence

import numpy as np
import shapely
import shapely.errors
from shapely import STRtree
from shapely.geometry.base import BaseGeometry

from auditor.model.board import Board
from auditor.sensors import robust
from auditor.sensors.floating import floating_copper_near
from auditor.sensors.model import Sensor, Surroundings
from auditor.sensors.noisy import is_shield_net
from auditor.sensors.parts import noisy_parts_near
from auditor.sensors.selection import SensorSelection
from auditor.sensors.shadow import shadows_of
from auditor.sensors.spatial import pieces_in

#: Spacing of the sample points along the outline for the typical gap.
PERIMETER_STEP_MM = 0.2
_MAX_SAMPLES = 2000


def surroundings_of(board: Board, sensor: Sensor, others: Sequence[Sensor],
                    selection: SensorSelection, ground: str,
                    ground_area_mm2: float) -> Surroundings:
    """Everything :class:`Surroundings` holds for one electrode."""
    # a driven shield carries the sense waveform: no field across that gap
    own = set(sensor.nets) | {net for net in board.nets if is_shield_net(net)}
    search = selection.gap_search_mm
    around = [p for p in pieces_in(board, sensor.layer, sensor.geometry.buffer(search),
                                   lambda it: it.net not in own)
              if not _part_of(sensor, p.item.net, p.geometry)]
    min_gap, typical_gap = gaps_between(sensor, [p.geometry for p in around], search)
    ground_gaps = gaps_between(sensor, [p.geometry for p in around if p.item.net == ground],
                               search)
    nearest, nearest_mm = nearest_sensor(sensor, others)
    return Surroundings(
        ground_net=ground,
        min_gap_mm=min_gap,
        typical_gap_mm=typical_gap,
        ground_fill_ratio=ground_fill_ratio(board, sensor, others, ground,
                                            typical_gap or 0.0, selection.ground_ring_mm),
        shadows=shadows_of(board, sensor),
        nearest_sensor=nearest,
        nearest_sensor_mm=nearest_mm,
        noisy_parts=noisy_parts_near(board, sensor, selection),
        floating_copper=floating_copper_near(board, sensor, others,
                                             selection.floating_radius_mm),
        ground_area_mm2=ground_area_mm2,
        min_ground_gap_mm=ground_gaps[0],
        typical_ground_gap_mm=ground_gaps[1],
    )


def _part_of(sensor: Sensor, net: str, piece: BaseGeometry) -> bool:
    """True for net-less copper merged into the electrode (artwork drawn as
    footprint graphics): it is the electrode, not copper around it. Copper of
    a net inside the electrode stays: that is a short, and it is reported."""
    return net == "" and sensor.geometry.buffer(1e-6).contains(piece.representative_point())


def copper_near(board: Board, layer: str, region: BaseGeometry,
                keep: Callable[[str], bool]) -> BaseGeometry:
    """Union of the copper on ``layer`` inside ``region`` of nets ``keep`` accepts."""
    pieces = pieces_in(board, layer, region, lambda it: keep(it.net))
    return robust.union([p.geometry for p in pieces])


def gaps_between(sensor: Sensor, geoms: Sequence[BaseGeometry],
                 search_mm: float) -> tuple[float | None, float | None]:
    """(minimum, typical) gap from the electrode to ``geoms`` (see module docs)."""
    if not geoms:
        return None, None
    min_gap = min(float(sensor.geometry.distance(g)) for g in geoms)
    if min_gap > search_mm:
        return None, None
    samples = outline_points(sensor.geometry)
    _, dists = STRtree(geoms).query_nearest(samples, max_distance=search_mm,
                                            return_distance=True, all_matches=False)
    near = [float(d) for d in dists]
    typical = statistics.median(near) if near else None
    return min_gap, typical


def outline_points(geom: BaseGeometry, step_mm: float = PERIMETER_STEP_MM) -> np.ndarray:
    """Points spaced about ``step_mm`` along every ring of ``geom``."""
    boundary = geom.boundary
    length = float(boundary.length)
    count = int(min(_MAX_SAMPLES, max(8, length / step_mm)))
    fractions = np.linspace(0.0, 1.0, count, endpoint=False)
    points: np.ndarray = shapely.line_interpolate_point(boundary, fractions, normalized=True)
    return points


def ground_fill_ratio(board: Board, sensor: Sensor, others: Sequence[Sensor], ground: str,
                      start_mm: float, ring_mm: float) -> float:
    """Share of a ring around the electrode that the device ground covers, 0..1."""
    if not ground or ring_mm <= 0:
        return 0.0
    inner = sensor.geometry.buffer(start_mm)
    ring = robust.difference(sensor.geometry.buffer(start_mm + ring_mm), inner)
    outer = start_mm + ring_mm
    same_layer = [o.geometry.buffer(start_mm) for o in others
                  if o.layer == sensor.layer and o.name != sensor.name
                  and o.geometry.distance(sensor.geometry) < outer + start_mm]
    if same_layer:
        ring = robust.difference(ring, robust.union(same_layer))
    outline = board.outline.polygon
    if outline is not None and not outline.is_empty:
        ring = robust.intersection(ring, outline)
    if ring.area <= 1e-9:
        return 0.0
    copper = copper_near(board, sensor.layer, ring, lambda net: net == ground)
    return min(1.0, float(robust.intersection(copper, ring).area / ring.area))


def nearest_sensor(sensor: Sensor, others: Sequence[Sensor]) -> tuple[str, float | None]:
    """The nearest other electrode on the same layer and the edge-to-edge
    distance (an electrode on another layer is not at a distance of zero)."""
    best: tuple[float, str] | None = None
    for other in others:
        if other.name == sensor.name or other.layer != sensor.layer:
            continue
        dist = float(sensor.geometry.distance(other.geometry))
        if best is None or (dist, other.name) < best:
            best = (dist, other.name)
    return ("", None) if best is None else (best[1], best[0])
