"""What a sense path runs beside: other nets on its layer, crossings on the
layers next to it, and other electrodes it passes under or beside.

Distances are edge to edge (copper to copper) and only ever on one layer: a
net met on another layer is a crossing, counted and placed where it crosses,
never a distance of zero. A neighbour's *parallel length* is how much of the
track's centre line lies within ``neighbour_distance_mm`` (edge to edge) of
that net's copper.

Near the controller's own pins the sense trace cannot keep its distance from
the nets on the neighbouring pins, so the path inside the controller's *pin
field* (its pads grown by :data:`PIN_FIELD_PITCHES` times its pad pitch) is
left out of distances and parallel lengths.
"""

from __future__ import annotations

import math
from collections.abc import Collection, Sequence

from shapely import STRtree
from shapely.geometry import LineString, MultiLineString, Point
from shapely.geometry.base import BaseGeometry
from shapely.ops import nearest_points

from auditor.model.board import Board
from auditor.model.geometry import Arc
from auditor.model.items import Track
from auditor.sensors import robust
from auditor.sensors.model import Neighbour, Sensor, SourcePlace
from auditor.sensors.noisy import is_noisy_net
from auditor.sensors.selection import SensorSelection
from auditor.sensors.spatial import items_in_box, pieces_in

#: Radius of the controller's pin field in pad pitches: the fan-out of a
#: fine-pitch package (common practice, no source; value chosen by padaudit).
PIN_FIELD_PITCHES = 4.0
#: The pin field is never narrower than this (mm), whatever the pitch.
PIN_FIELD_MIN_MM = 1.0


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
                       selection: SensorSelection, controller_ref: str = ""
                       ) -> tuple[Neighbour, ...]:
    """Other nets beside or crossing ``tracks``, sorted by net name.

    ``controller_ref`` names the part the path ends on; its pin field is
    left out of the distances (see module docs).
    """
    field = pin_field(board, controller_ref)
    parallel: dict[str, float] = {}
    closest: dict[str, float] = {}
    where: dict[str, Spot] = {}
    groups: dict[tuple[str, float], list[Track]] = {}
    for tr in tracks:
        groups.setdefault((tr.layer, round(tr.width_mm, 6)), []).append(tr)
    for (layer, width), group in sorted(groups.items()):
        for net, length, dist, (x, y) in _beside(board, layer, width, group, skip_nets,
                                                 selection, field):
            parallel[net] = parallel.get(net, 0.0) + length
            if dist < closest.get(net, float("inf")):
                closest[net], where[net] = dist, (x, y, layer, _track_at(group, x, y))
    crossed = _crossings(board, tracks, skip_nets)
    nets = sorted(set(parallel) | set(crossed))
    return tuple(_neighbour(board, net, parallel.get(net, 0.0), closest.get(net),
                            where.get(net), crossed.get(net), selection)
                 for net in nets)


#: A place on the sense path: x, y (mm), layer, and the path's track there.
Spot = tuple[float, float, str, Track]
#: Crossings of one net: how many, and where the first one is.
Crossed = tuple[int, float, float, str, Track]


def _neighbour(board: Board, net: str, parallel_mm: float, closest_mm: float | None,
               spot: Spot | None, crossed: Crossed | None,
               selection: SensorSelection) -> Neighbour:
    """One neighbour record (``sense`` is set later by the caller)."""
    x, y, layer, track = spot if spot is not None else (None, None, "", None)
    count, cx, cy, clayer, crossing = crossed if crossed is not None else (
        0, None, None, "", None)
    return Neighbour(
        net, parallel_mm, closest_mm, count, is_noisy_net(board, net, selection), False,
        None if x is None else round(x, 4), None if y is None else round(y, 4), layer,
        None if cx is None else round(cx, 4), None if cy is None else round(cy, 4), clayer,
        place=SourcePlace.of(track) if track is not None else None,
        crossing_place=SourcePlace.of(crossing) if crossing is not None else None)


def _track_at(tracks: Sequence[Track], x: float, y: float) -> Track:
    """The track of ``tracks`` nearest to the point (x, y) on the path: the
    one a finding placed there is about (the first of equals, in path order)."""
    spot = Point(x, y)
    return min(tracks, key=lambda t: float(t.geometry.distance(spot)))


def pin_field(board: Board, ref: str) -> BaseGeometry | None:
    """The pads of part ``ref`` grown by its pin-field radius, or None."""
    fp = next((f for f in board.footprints if ref and f.ref == ref), None)
    if fp is None or len(fp.pads) < 2:
        return None
    centres = [(p.x_mm, p.y_mm) for p in fp.pads]
    pitch = min((math.dist(a, b) for i, a in enumerate(centres) for b in centres[i + 1:]
                 if math.dist(a, b) > 1e-3), default=0.0)
    radius = max(PIN_FIELD_MIN_MM, PIN_FIELD_PITCHES * pitch)
    copper = [s.geometry for p in fp.pads for s in p.copper]
    return robust.union(copper).buffer(radius, quad_segs=4) if copper else None


def _beside(board: Board, layer: str, width_mm: float, tracks: Sequence[Track],
            skip: Collection[str], selection: SensorSelection,
            field: BaseGeometry | None = None,
            ) -> list[tuple[str, float, float, tuple[float, float]]]:
    """(net, parallel length, edge distance, closest point on the path) for
    tracks of one layer and width, outside ``field``."""
    reach = selection.neighbour_distance_mm + width_mm / 2
    lines: BaseGeometry = MultiLineString([centre_line(t) for t in tracks])
    copper_of_path = whole_path = robust.union([t.geometry for t in tracks])
    if field is not None and field.intersects(copper_of_path):
        lines, copper_of_path = lines.difference(field), copper_of_path.difference(field)
        if copper_of_path.is_empty:
            return []
    corridor = lines.buffer(reach + 1e-3)
    near: dict[str, list[BaseGeometry]] = {}
    for piece in pieces_in(board, layer, corridor, lambda it: it.net not in skip):
        near.setdefault(piece.item.net, []).append(piece.geometry)
    if not near:
        return []
    out = []
    for net, geoms in sorted(near.items()):
        copper = robust.union(geoms)
        if copper.is_empty:
            continue
        length = float(robust.intersection(lines, copper.buffer(reach, quad_segs=8)).length)
        distance = float(copper_of_path.distance(copper))
        out.append((net, length, distance, _closest_point(whole_path, copper_of_path,
                                                          copper, field)))
    return out


def _closest_point(whole: BaseGeometry, clipped: BaseGeometry, copper: BaseGeometry,
                   field: BaseGeometry | None) -> tuple[float, float]:
    """Where on the path ``copper`` comes closest: on the whole path when that
    point lies outside the pin field (so a field changes no marker it need
    not), else on the path outside the field."""
    on_path = nearest_points(whole, copper)[0]
    if field is not None and clipped is not whole and field.contains(on_path):
        on_path = nearest_points(clipped, copper)[0]
    return float(on_path.x), float(on_path.y)


def _crossings(board: Board, tracks: Sequence[Track], skip: Collection[str]
               ) -> dict[str, Crossed]:
    """Per net: how often the path crosses its tracks on the adjacent layers,
    and where it does first (x, y, the other net's layer, the path's track)."""
    found: dict[str, Crossed] = {}
    for tr in tracks:
        line = centre_line(tr)
        for layer in adjacent_layers(board, tr.layer):
            for item in items_in_box(board, layer, line.bounds,
                                     lambda it: it.source == "track" and it.net not in skip):
                if not item.geometry.intersects(line):
                    continue
                at = line.intersection(item.geometry).centroid
                count, x, y, where, first = found.get(item.net, (0, at.x, at.y, layer, tr))
                found[item.net] = (count + 1, x, y, where, first)
    return found


def adjacent_layers(board: Board, layer: str) -> tuple[str, ...]:
    """The copper layers directly above and below ``layer``."""
    names = board.copper_layers
    if layer not in names:
        return ()
    i = names.index(layer)
    return tuple(names[j] for j in (i - 1, i + 1) if 0 <= j < len(names))


def tracks_beside_electrodes(board: Board, tracks: Sequence[Track], sensor: Sensor,
                             others: Sequence[Sensor], distance_mm: float
                             ) -> tuple[tuple[str, Track], ...]:
    """Other electrodes the path passes under, over or beside, by name, each
    with the first track of the path that does."""
    candidates = [o for o in others if o.name != sensor.name and not set(o.nets) & set(sensor.nets)]
    if not candidates or not tracks:
        return ()
    tree = STRtree([o.geometry for o in candidates])
    hits: dict[str, Track] = {}
    for tr in tracks:
        for i in tree.query(tr.geometry, predicate="dwithin", distance=distance_mm):
            other = candidates[int(i)]
            if other.layer != tr.layer and not tr.geometry.intersects(other.geometry):
                continue
            hits.setdefault(other.name, tr)
    return tuple(sorted(hits.items()))
