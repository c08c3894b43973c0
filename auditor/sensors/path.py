"""Follow each sense path from the electrode to the controller pin.

The path runs along the electrode net's tracks and vias, through the series
part when there is one (:mod:`auditor.sensors.reach`), and ends on the
controller's pad. When the net reaches no controller, the path is what the
electrode's copper connects to, marked ``complete=False``.
"""

from __future__ import annotations

from collections.abc import Sequence

from auditor.model.board import Board
from auditor.model.items import Pad, Track
from auditor.sensors.model import SensePath, Sensor, SourcePlace, TraceRun
from auditor.sensors.nearby import neighbours_of_path, tracks_beside_electrodes
from auditor.sensors.netgraph import NetGraph, Walk, rooted_at_pad
from auditor.sensors.reach import Reach, is_controller, reach_of
from auditor.sensors.selection import SensorSelection


def sense_path(board: Board, sensor: Sensor, others: Sequence[Sensor],
               selection: SensorSelection, ground: str = "") -> SensePath:
    """The measured sense path of ``sensor`` (``others`` are the other electrodes)."""
    net = sensor.nets[0]
    uids = sensor.footprint_uids
    reach = reach_of(board, net, uids, selection)
    graph = NetGraph(board, net, (sensor.layer, sensor.geometry))
    target = reach.series_pad or reach.controller_pad or _any_controller_pad(
        board, net, uids, selection)
    first = graph.walk_to(graph.pad_node(target) or -1) if target is not None else None
    if first is None:
        return _incomplete(board, sensor, others, selection, graph, ground)
    tracks = list(first.tracks)
    vias = first.via_count
    series_mm: float | None = None
    if reach.series_far_pad is not None and reach.controller_pad is not None:
        second = _walk_between(board, reach.series_far_pad, reach.controller_pad)
        if second is None:
            return _incomplete(board, sensor, others, selection, graph, ground)
        tracks += second.tracks
        vias += second.via_count
        series_mm = second.length_mm
    ctrl = reach.controller_pad or target
    if ctrl is None:
        return _incomplete(board, sensor, others, selection, graph, ground)
    return _path(board, sensor, others, selection, ground, tracks, vias,
                 (ctrl.ref, ctrl.number), reach, series_mm)


def _path(board: Board, sensor: Sensor, others: Sequence[Sensor], sel: SensorSelection,
          ground: str, tracks: list[Track], vias: int, pin: tuple[str, str], reach: Reach,
          series_mm: float | None, complete: bool = True) -> SensePath:
    own = set(sensor.nets) | {p.net for p in (reach.series_far_pad,) if p is not None}
    skip = own | {ground, ""}
    beside = tracks_beside_electrodes(board, tracks, sensor, others, sel.neighbour_distance_mm)
    return SensePath(
        length_mm=sum(t.length_mm for t in tracks),
        runs=runs_of(tracks),
        vias=vias,
        layers=tuple(dict.fromkeys(t.layer for t in tracks)),
        controller_ref=pin[0],
        controller_pin=pin[1],
        series_ref=reach.series_pad.ref if reach.series_pad is not None else "",
        series_to_pin_mm=series_mm,
        series_x_mm=reach.series_pad.x_mm if reach.series_pad is not None else None,
        series_y_mm=reach.series_pad.y_mm if reach.series_pad is not None else None,
        series_layer=(reach.series_pad.copper_layers[0] if reach.series_pad is not None
                      and reach.series_pad.copper_layers else ""),
        neighbours=neighbours_of_path(board, tracks, skip, sel, pin[0]),
        under_electrodes=tuple(name for name, _ in beside),
        under_places=tuple((name, place) for name, tr in beside
                           if (place := SourcePlace.of(tr)) is not None),
        complete=complete,
        off_board=reach.off_board,
        nets=tuple(dict.fromkeys(t.net for t in tracks)) or sensor.nets,
    )


def _incomplete(board: Board, sensor: Sensor, others: Sequence[Sensor],
                sel: SensorSelection, graph: NetGraph, ground: str) -> SensePath:
    reached = graph.reachable()
    tracks = [n.track for n in reached if n.track is not None]
    vias = sum(1 for n in reached if n.kind == "via")
    return _path(board, sensor, others, sel, ground, tracks, vias, ("", ""),
                 Reach(False, ""), None, complete=False)


def _walk_between(board: Board, start: Pad, goal: Pad) -> Walk | None:
    graph = rooted_at_pad(board, start)
    node = graph.pad_node(goal)
    return graph.walk_to(node) if node is not None else None


def _any_controller_pad(board: Board, net: str, skip: Sequence[str],
                        sel: SensorSelection) -> Pad | None:
    for pad in sorted(board.pads, key=lambda p: (p.ref, p.number)):
        if pad.net == net and pad.footprint_uid not in skip \
                and is_controller(board.footprint(pad.footprint_uid), sel):
            return pad
    return None


def runs_of(tracks: Sequence[Track]) -> tuple[TraceRun, ...]:
    """Consecutive tracks with one layer and width merged into runs, each
    placed at its first track.

    >>> from shapely.geometry import Point as P
    >>> from auditor.model.items import Point, Track
    >>> t = Track(Point(0, 0), Point(3, 0), 0.2, "F.Cu", "A", 3.0, P(0, 0))
    >>> runs_of([t, t])
    (TraceRun(layer='F.Cu', width_mm=0.2, length_mm=6.0),)
    """
    runs: list[TraceRun] = []
    for tr in tracks:
        if runs and runs[-1].layer == tr.layer and abs(runs[-1].width_mm - tr.width_mm) < 1e-6:
            last = runs[-1]
            runs[-1] = TraceRun(last.layer, last.width_mm, last.length_mm + tr.length_mm,
                                last.place)
        else:
            runs.append(TraceRun(tr.layer, tr.width_mm, tr.length_mm, SourcePlace.of(tr)))
    return tuple(runs)
