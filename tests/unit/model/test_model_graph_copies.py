"""The track graph with duplicated items (issue 16, item 4): copies of one
track are one path, not a path as long as all of them together, and do not
multiply the graph's edges. Expected lengths are plain geometry (a 3-4-5
triangle; common practice, no source)."""

from __future__ import annotations

from shapely.geometry import LineString

from auditor.model.graph import TrackGraph
from auditor.model.items import Point, Track, Via


def _track(x0: float, y0: float, x1: float, y1: float) -> Track:
    length = ((x1 - x0) ** 2 + (y1 - y0) ** 2) ** 0.5
    return Track(Point(x0, y0), Point(x1, y1), 0.2, "F.Cu", "N", length,
                 LineString([(x0, y0), (x1, y1)]).buffer(0.1))


def test_copies_of_a_track_are_one_path() -> None:
    graph = TrackGraph("N", [_track(0, 0, 3, 4)] * 500, [])
    assert graph.path_length(Point(0, 0), Point(3, 4)) == 5.0


def test_copies_do_not_multiply_edges() -> None:
    copies = [_track(0, 0, 3, 4)] * 2000 + [_track(3, 4, 3, 10)] * 2000
    vias = [Via(3.0, 4.0, 0.6, 0.3, ("F.Cu", "B.Cu"), "N", "through")] * 2000
    graph = TrackGraph("N", copies, vias)
    assert graph.path_length(Point(0, 0), Point(3, 10)) == 11.0
    assert graph.edge_count <= 10
