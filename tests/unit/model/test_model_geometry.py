"""Geometry builders against closed forms (elementary geometry)."""

from __future__ import annotations

import math

import numpy as np
import pytest

from auditor.model import geometry as geo

N = 4 * geo.QUAD_SEGS


def test_rotation_matches_kicad_rotatepoint() -> None:
    # kicad-format.md §7 [S7]: R(a)(x,y) = (x cos a + y sin a, -x sin a + y cos a):
    # +90° takes +x to -y (up on screen, i.e. counter-clockwise as seen).
    assert geo.rotate_xy(1, 0, 90) == pytest.approx((0, -1))
    assert geo.rotate_xy(0, 1, 90) == pytest.approx((1, 0))
    assert geo.rotate_xy(2, 1, 180) == pytest.approx((-2, -1))
    pts = geo.place(np.array([[1.0, 0.0], [0.0, 2.0]]), 270, 10, 20)
    assert pts == pytest.approx(np.array([[10, 21], [8, 20]]))


def test_three_point_arc_length_is_r_theta() -> None:
    # quarter circle r = 5 centred at the origin
    s = math.sqrt(0.5) * 5
    arc = geo.Arc((5, 0), (s, s), (0, 5))
    assert (arc.cx, arc.cy, arc.radius) == pytest.approx((0, 0, 5))
    assert arc.length_mm == pytest.approx(5 * math.pi / 2)
    # same ends, mid on the other side: the 270° arc
    other = geo.Arc((5, 0), (-s, -s), (0, 5))
    assert other.length_mm == pytest.approx(5 * 3 * math.pi / 2)
    pts = arc.points()
    assert pts[0] == pytest.approx((5, 0)) and pts[-1] == pytest.approx((0, 5))
    assert np.hypot(pts[:, 0], pts[:, 1]) == pytest.approx(np.full(len(pts), 5.0))


def test_collinear_arc_is_rejected() -> None:
    with pytest.raises(ValueError):
        geo.Arc((0, 0), (1, 0), (2, 0))


def test_legacy_arc_end_point() -> None:
    # kicad-format.md §13: end = centre + standard rotation by +A of (start - centre).
    # centre (95, 75), start (100, 75), A = 90: (5, 0) -> (0, 5) -> end (95, 80).
    start, mid, end = geo.legacy_arc((95, 75), (100, 75), 90)
    assert start == (100, 75) and end == pytest.approx((95, 80))
    assert mid == pytest.approx((95 + 5 * math.sqrt(0.5), 75 + 5 * math.sqrt(0.5)))


@pytest.mark.parametrize(("w", "h", "r"), [(2, 1, 0.25), (3, 3, 1.5), (4, 1, 0.5), (1, 2, 0)])
def test_roundrect_area(w: float, h: float, r: float) -> None:
    area = geo.polygon(geo.roundrect_coords(w, h, r)).area
    drawn = w * h - 4 * r * r + N / 2 * r * r * math.sin(2 * math.pi / N)
    assert area == pytest.approx(drawn, rel=1e-12)
    assert area == pytest.approx(w * h - (4 - math.pi) * r * r, rel=2e-3)


def test_chamfer_all_corners() -> None:
    area = geo.polygon(geo.roundrect_coords(2, 2, 0, 0.5, ["top_left", "top_right",
                                                           "bottom_left", "bottom_right"])).area
    assert area == pytest.approx(4 - 4 * 0.5 ** 2 / 2)  # four right triangles c²/2


def test_chamfer_corner_positions_y_down() -> None:
    # top_left is (-w/2, -h/2) in KiCad's frame (Y down)
    ring = geo.roundrect_coords(2, 2, 0, 0.5, ["top_left"])
    assert not any(np.allclose(p, (-1, -1)) for p in ring)
    assert any(np.allclose(p, (1, 1)) for p in ring)


@pytest.mark.parametrize(("dx", "dy"), [(0.4, 0), (0, 0.4), (-0.3, 0)])
def test_trapezoid_area_is_wh(dx: float, dy: float) -> None:
    # each delta widens one side and narrows the other by the same amount
    assert geo.polygon(geo.trapezoid_coords(2, 1, dx, dy)).area == pytest.approx(2.0)


def test_trapezoid_corners() -> None:
    # kicad-format.md §8: (-W/2-Δy/2, +H/2+Δx/2), (+W/2+Δy/2, +H/2-Δx/2), ...
    c = geo.trapezoid_coords(2, 1, 0.4, 0)
    assert c.ravel().tolist() == pytest.approx([-1, 0.7, 1, 0.3, 1, -0.3, -1, -0.7])


def test_stroke_is_stadium() -> None:
    line = geo.stroke(np.array([[0, 0], [10, 0]]), 0.5)
    r = 0.25
    assert line.area == pytest.approx(10 * 0.5 + N / 2 * r * r * math.sin(2 * math.pi / N))


def test_clean_repairs_fractured_ring() -> None:
    # square 0..10 with hole 3..7 joined by a slit (KiCad's fractured fill, §10)
    ring = [(0, 0), (10, 0), (10, 10), (0, 10), (0, 5), (3, 5), (3, 7), (7, 7), (7, 3),
            (3, 3), (3, 5), (0, 5)]
    fixed = geo.polygon(np.array(ring, dtype=float))
    assert fixed.is_valid and fixed.area == pytest.approx(84)


def test_bezier_end_points() -> None:
    pts = geo.bezier_points((0, 0), (1, 2), (3, 2), (4, 0))
    assert pts[0] == pytest.approx((0, 0)) and pts[-1] == pytest.approx((4, 0))
    assert pts[len(pts) // 2] == pytest.approx((2, 1.5))  # B(1/2) = (P0+3P1+3P2+P3)/8
