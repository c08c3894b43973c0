"""What a sense path runs beside: other nets on its layer, crossings on the
layers next to it, and other electrodes it passes under or beside.

Distances are edge to edge (copper to copper). A neighbour's *parallel
length* is how much of the track's centre line lies within
``neighbour_distance_mm`` (edge to edge) of that net's copper.
"""

from __future__ import annotations

from collections.abc import Collection, Sequence

from shapely import STRtree
from shapely.geometry import LineString, MultiLineString
from shapely.geometry.base import BaseGeometry
from shapely.ops import nearest_points

from auditor.model.board import Board
from auditor.model.geometry import Arc
from auditor.model.items import Track
from auditor.sensors import robust
from auditor.sensors.model import Neighbour, Sensor
from auditor.sensors.selection import SensorSelection, matches
from auditor.sensors.spatial import items_in_box, pieces_in


def centre_line(track: Track) -> LineString:
    """The track's centre line (an arc as a polyline)."""
    start, end = (track.start.x, track.start.y), (track.end.x, track.end.y)
    if track.mid is not None:
        try:
            return LineString(Arc(start, (track.mid.x, track.mid.y), end).points())
        except ValueError:  # collinear: a straight track written as an arc
            pass
    return LineString([start, end])


def neighbours_of_path(board: Board, tracks: Sequence[Track], skip_nets: Collection[str],
                       selection: SensorSelection) -> tuple[Neighbour, ...]:
    """Other nets beside or crossing ``tracks``, sorted by net name."""
    parallel: dict[str, float] = {}
    closest: dict[str, float] = {}
    where: dict[str, tuple[float, float, str]] = {}
    crossings: dict[str, int] = {}
    groups: dict[tuple[str, float], list[Track]] = {}
    for tr in tracks:
        groups.setdefault((tr.layer, round(tr.width_mm, 6)), []).append(tr)
    for (layer, width), group in sorted(groups.items()):
        for net, length, dist, (x, y) in _beside(board, layer, width, group, skip_nets,
                                                 selection):
            parallel[net] = parallel.get(net, 0.0) + length
            if dist < closest.get(net, float("inf")):
                closest[net], where[net] = dist, (x, y, layer)
    for tr in tracks:
        for net, count in _crossing(board, tr, centre_line(tr), skip_nets):
            crossings[net] = crossings.get(net, 0) + count
    nets = sorted(set(parallel) | set(crossings))
    return tuple(Neighbour(net, parallel.get(net, 0.0), closest.get(net, 0.0),
                           crossings.get(net, 0), matches(net, selection.noisy_nets),
                           *_place(where.get(net)))
                 for net in nets)


def _place(spot: tuple[float, float, str] | None) -> tuple[bool, float | None, float | None, str]:
    """``sense`` (set later by the caller) and the closest-approach place."""
    if spot is None:
        return False, None, None, ""
    x, y, layer = spot
    return False, round(x, 4), round(y, 4), layer


def _beside(board: Board, layer: str, width_mm: float, tracks: Sequence[Track],
            skip: Collection[str], selection: SensorSelection
            ) -> list[tuple[str, float, float, tuple[float, float]]]:
    """(net, parallel length, edge distance, closest point on the path) for
    tracks of one layer and width."""
    reach = selection.neighbour_distance_mm + width_mm / 2
    lines = MultiLineString([centre_line(t) for t in tracks])
    corridor = lines.buffer(reach + 1e-3)
    near: dict[str, list[BaseGeometry]] = {}
    for piece in pieces_in(board, layer, corridor, lambda it: it.net not in skip):
        near.setdefault(piece.item.net, []).append(piece.geometry)
    if not near:
        return []
    copper_of_path = robust.union([t.geometry for t in tracks])
    out = []
    for net, geoms in sorted(near.items()):
        copper = robust.union(geoms)
        if copper.is_empty:
            continue
        length = float(robust.intersection(lines, copper.buffer(reach, quad_segs=8)).length)
        on_path = nearest_points(copper_of_path, copper)[0]
        out.append((net, length, float(copper_of_path.distance(copper)),
                    (float(on_path.x), float(on_path.y))))
    return out


def _crossing(board: Board, tr: Track, line: LineString,
              skip: Collection[str]) -> list[tuple[str, int]]:
    counts: dict[str, int] = {}
    for layer in adjacent_layers(board, tr.layer):
        for item in items_in_box(board, layer, line.bounds,
                                 lambda it: it.source == "track" and it.net not in skip):
            if item.geometry.intersects(line):
                counts[item.net] = counts.get(item.net, 0) + 1
    return sorted(counts.items())


def adjacent_layers(board: Board, layer: str) -> tuple[str, ...]:
    """The copper layers directly above and below ``layer``."""
    names = board.copper_layers
    if layer not in names:
        return ()
    i = names.index(layer)
    return tuple(names[j] for j in (i - 1, i + 1) if 0 <= j < len(names))


def sensors_beside_path(board: Board, tracks: Sequence[Track], sensor: Sensor,
                        others: Sequence[Sensor], distance_mm: float) -> tuple[str, ...]:
    """Names of other electrodes the path passes under, over or beside."""
    candidates = [o for o in others if o.name != sensor.name and not set(o.nets) & set(sensor.nets)]
    if not candidates or not tracks:
        return ()
    tree = STRtree([o.geometry for o in candidates])
    hits: set[str] = set()
    for tr in tracks:
        for i in tree.query(tr.geometry, predicate="dwithin", distance=distance_mm):
            other = candidates[int(i)]
            if other.layer != tr.layer and not tr.geometry.intersects(other.geometry):
                continue
            hits.add(other.name)
    return tuple(sorted(hits))
