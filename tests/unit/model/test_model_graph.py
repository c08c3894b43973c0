"""The per-net track graph: path lengths are exact sums of track lengths."""

from __future__ import annotations

import math

import pytest
from shapely.geometry import LineString
from shapely.geometry import Point as ShPoint

from auditor.model.graph import TrackGraph
from auditor.model.items import Point, Track, Via


def seg(x0: float, y0: float, x1: float, y1: float, layer: str = "F.Cu") -> Track:
    return Track(Point(x0, y0), Point(x1, y1), 0.2, layer, "N", math.hypot(x1 - x0, y1 - y0),
                 LineString([(x0, y0), (x1, y1)]).buffer(0.1))


def test_shortest_of_two_routes() -> None:
    g = TrackGraph("N", [seg(0, 0, 10, 0), seg(10, 0, 10, 10), seg(0, 0, 0, 30),
                         seg(0, 30, 10, 10)], [])
    assert g.path_length(Point(0, 0), Point(10, 10)) == pytest.approx(20.0)
    assert g.total_length_mm == pytest.approx(10 + 10 + 30 + math.hypot(10, 20))


def test_via_joins_layers_and_disconnected_is_inf() -> None:
    via = Via(10, 0, 0.6, 0.3, ("F.Cu", "In1.Cu", "B.Cu"), "N")
    g = TrackGraph("N", [seg(0, 0, 10, 0), seg(10, 0, 10, 7, "B.Cu"), seg(50, 50, 60, 50)],
                   [via])
    assert g.path_length(Point(0, 0), Point(10, 7), "F.Cu", "B.Cu") == pytest.approx(17.0)
    assert g.path_length(Point(0, 0), Point(60, 50)) == math.inf
    assert g.via_count == 1


def test_track_end_inside_via_pad_joins_it() -> None:
    # B.Cu track starts 0.2 mm off the via centre but inside its 0.3 mm radius
    via = Via(10, 0, 0.6, 0.3, ("F.Cu", "B.Cu"), "N")
    g = TrackGraph("N", [seg(0, 0, 10, 0), seg(10.2, 0, 20, 0, "B.Cu")], [via])
    assert g.path_length(Point(0, 0), Point(20, 0), "F.Cu", "B.Cu") == \
        pytest.approx(10 + 0.2 + 9.8)


def test_t_junction_splits_the_track() -> None:
    g = TrackGraph("N", [seg(0, 0, 10, 0), seg(4, 0, 4, 3)], [])
    assert g.path_length(Point(0, 0), Point(4, 3)) == pytest.approx(7.0)
    assert g.path_length(Point(10, 0), Point(4, 3)) == pytest.approx(9.0)


def test_pads_as_end_items() -> None:
    g = TrackGraph("N", [seg(0, 0, 10, 0), seg(10, 0, 10, 5)], [])
    pad_a = ShPoint(0, 0).buffer(0.5)
    pad_b = ShPoint(10, 5).buffer(0.5)
    assert g.shortest(g.nodes_in(pad_a, ["F.Cu"]), g.nodes_in(pad_b, ["F.Cu"])) == \
        pytest.approx(15.0)
    assert g.nodes_in(pad_a, ["B.Cu"]) == []
