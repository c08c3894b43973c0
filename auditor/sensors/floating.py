"""Floating copper near an electrode: net-less copper, and islands of a net's
zone that touch nothing else of that net (no pad, via, track or graphic).

Net-less copper already merged into an electrode (it touches the anchor pad)
is part of that electrode, not floating. Each find is reported at its point
nearest to the electrode, with the edge-to-edge distance.
"""

from __future__ import annotations

import math
from collections.abc import Sequence

from shapely.geometry.base import BaseGeometry
from shapely.ops import nearest_points

from auditor.model.board import Board
from auditor.sensors.model import Sensor
from auditor.sensors.shadow import depth_between
from auditor.sensors.spatial import grown, items_in_box, polygons, zone_islands


def floating_copper_near(board: Board, sensor: Sensor, others: Sequence[Sensor],
                         radius_mm: float) -> tuple[tuple[float, float, float], ...]:
    """(x, y, distance mm) of floating copper within ``radius_mm``, nearest first.

    One entry per floating item (a logo of many polygons is one piece of
    art, one cause), at its polygon nearest to the electrode. The distance
    is edge to edge in space: on another layer the board's thickness between
    the two layers (from the stackup) counts too, by Pythagoras."""
    bounds = grown(sensor.geometry.bounds, radius_mm)
    electrodes = [*others, sensor]
    candidates: list[tuple[object, str, BaseGeometry]] = []
    for layer in board.copper_layers:
        for item in items_in_box(board, layer, bounds,
                                 lambda it: it.net == "" and it.source != "pad"):
            # a footprint's art is one piece, however many shapes draw it
            key: object = (item.owner, layer) if item.owner else id(item)
            candidates += [(key, layer, p) for p in polygons(item.geometry)]
    candidates += [(id(isl), isl.layer, isl.geometry) for isl in zone_islands(board)]
    nearest: dict[object, tuple[float, float, float]] = {}
    for key, layer, piece in candidates:
        lateral = float(sensor.geometry.distance(piece))
        if lateral > radius_mm or _in_electrode(piece, layer, electrodes) \
                or _tied(board, layer, piece):
            continue
        x, y = _nearest_point(sensor.geometry, piece)
        spot = (x, y, round(math.hypot(lateral, depth_between(board, sensor.layer, layer)), 6))
        if spot[2] <= radius_mm and (key not in nearest or spot[2] < nearest[key][2]):
            nearest[key] = spot
    return tuple(sorted(set(nearest.values()), key=lambda f: (f[2], f[0], f[1])))


def _tied(board: Board, layer: str, piece: BaseGeometry) -> bool:
    """Net-less copper touching copper of a net is connected, not floating."""
    return any(item.geometry.intersects(piece) for item in items_in_box(
        board, layer, piece.bounds, lambda it: it.net != "" and it.source != "zone"))


def _in_electrode(piece: BaseGeometry, layer: str, electrodes: Sequence[Sensor]) -> bool:
    probe = piece.representative_point()
    return any(e.layer == layer and e.geometry.buffer(1e-6).contains(probe) for e in electrodes)


def _nearest_point(electrode: BaseGeometry, piece: BaseGeometry) -> tuple[float, float]:
    _, at = nearest_points(electrode, piece)
    return (round(at.x, 6), round(at.y, 6))
