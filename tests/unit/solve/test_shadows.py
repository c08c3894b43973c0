"""Radial coverage of other layers' copper (auditor.solve.shadows)."""

from __future__ import annotations

import math

import pytest
from shapely.geometry import Point, box

from auditor.solve.shadows import radial_cover, ring_edges


def test_half_plane_covers_half_of_every_ring() -> None:
    """Closed form: a half-plane through the centre covers half of any annulus."""
    cover = radial_cover(box(0, -50, 50, 50), Point(0, 0), (2.0, 5.0, 9.0))
    assert cover == pytest.approx((0.5, 0.5, 0.5), abs=2e-3)


def test_centred_disk_fills_the_rings_inside_it() -> None:
    cover = radial_cover(Point(0, 0).buffer(5.0, quad_segs=64), Point(0, 0), (2.5, 5.0, 7.5))
    assert cover[0] == pytest.approx(1.0, abs=1e-3)
    assert cover[1] == pytest.approx(1.0, abs=5e-3)
    assert cover[2] == pytest.approx(0.0, abs=1e-3)


def test_strip_covers_its_width_over_the_circumference() -> None:
    """A strip of width w through the centre covers about 2w / (2 pi r) of a thin
    ring at radius r (two crossings of the circle); geometry, no source needed."""
    cover = radial_cover(box(-0.25, -50, 0.25, 50), Point(0, 0), (5.9, 6.1))
    assert cover[1] == pytest.approx(2 * 0.5 / (2 * math.pi * 6.0), rel=0.02)


def test_rings_are_wider_than_shallow_copper_and_end_at_the_reach() -> None:
    edges = ring_edges(pad_radius_mm=6.0, depth_mm=1.5, outer_mm=17.0)
    assert edges[-1] == 17.0
    widths = [b - a for a, b in zip((0.0, *edges[:-1]), edges, strict=True)]
    assert min(widths) >= 0.75 and max(widths) - min(widths) < 1e-2
