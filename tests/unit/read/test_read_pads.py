"""Pads: areas against closed forms, placement against hand-worked
coordinates, layers, nets (fixtures from fixtures/make_format_boards.py).

Round shapes are inscribed polygons with n = 4·QUAD_SEGS sides, so the area
of a circle of radius r is exactly (n/2)·r²·sin(2π/n) (regular polygon area,
elementary geometry); each check also states the exact closed form of the
true shape and how far the polygon may be from it.
"""

from __future__ import annotations

import math

import pytest
from conftest import VERSION_KEYS

from auditor.model.board import Board
from auditor.model.geometry import QUAD_SEGS
from auditor.model.items import Pad

N = 4 * QUAD_SEGS


def poly_circle(r: float) -> float:
    """Area of the inscribed regular N-gon (what the model draws)."""
    return N / 2 * r * r * math.sin(2 * math.pi / N)


def roundrect_true(w: float, h: float, r: float) -> float:
    """Rounded rectangle: W·H − (4 − π)·r² (four square corners minus quarter discs)."""
    return w * h - (4 - math.pi) * r * r


def roundrect_poly(w: float, h: float, r: float) -> float:
    return w * h - 4 * r * r + poly_circle(r)


def pad(board: Board, ref: str, number: str) -> Pad:
    found = [p for p in board.footprint(ref).pads if p.number == number]
    assert len(found) == 1
    return found[0]


# number -> (polygon area as drawn, true closed-form area)
R4, R6, C6 = 0.25, 0.2, 0.4
AREAS = {
    "1": (poly_circle(0.5), math.pi * 0.25),                      # circle Ø1
    "2": (2.0, 2.0),                                              # rect 1×2
    "3": (roundrect_poly(2, 1, 0.5), roundrect_true(2, 1, 0.5)),  # stadium 2×1
    "4": (roundrect_poly(2, 1, R4), roundrect_true(2, 1, R4)),    # rratio 0.25 of 1
    "5": (2.0, 2.0),                                              # trapezoid: W·H
    # chamfered 2×2: two corners cut by c²/2, two rounded with r = 0.1·2
    "6": (4 - C6 * C6 - 2 * (R6 * R6 - poly_circle(R6) / 4),
          4 - C6 * C6 - 2 * (4 - math.pi) / 4 * R6 * R6),
    "11": (0.5, 0.5),
}


@pytest.mark.parametrize("key", VERSION_KEYS)
@pytest.mark.parametrize("ref", ["U1", "U2", "U3", "U4", "U5"])
def test_pad_areas_closed_form_every_rotation(boards: dict[str, Board], key: str,
                                              ref: str) -> None:
    board = boards[key]
    numbers = {p.number for p in board.footprint(ref).pads}
    for number, (drawn, exact) in AREAS.items():
        if number not in numbers:
            assert number == "6" and board.version < 20190331  # chamfers from 20190331
            continue
        area = pad(board, ref, number).copper[0].geometry.area
        assert area == pytest.approx(drawn, rel=1e-9, abs=1e-9)
        # polygon vs true shape: an inscribed 64-gon loses < 0.17 % of a disc
        assert area == pytest.approx(exact, rel=2e-3)


@pytest.mark.parametrize("key", [k for k in VERSION_KEYS if k != "v4"])
def test_custom_pad_is_anchor_union_primitives(boards: dict[str, Board], key: str) -> None:
    p = pad(boards[key], "U2", "7")
    assert p.shape == "custom" and p.copper_layers == ("F.Cu",)
    # square 2×2 + anchor disc r 0.2 + ring of mean radius 1, width 0.2:
    # π·(1.1² − 0.9²) = 0.4π (disjoint parts)
    exact = 4 + math.pi * 0.04 + 0.4 * math.pi
    assert p.copper[0].geometry.area == pytest.approx(exact, rel=5e-3)
    # U2 is at (50, 20) rotated 90°; pad at local (8, 0) -> R(90)(8,0) = (0, -8)
    # -> centre (50, 12). The pad angle 90 maps local (x, y) to (y, -x):
    # square x 0.5..2.5 -> y 12-2.5 .. 12-0.5 = 9.5 .. 11.5; ring (centre x -2,
    # outer radius 1.1) x -3.1..-0.9 -> y 12.9 .. 15.1, and its y ±1.1 -> x 48.9 .. 51.1.
    x0, y0, x1, y1 = p.copper[0].geometry.bounds
    assert (p.x_mm, p.y_mm) == pytest.approx((50.0, 12.0))
    assert (y0, y1) == pytest.approx((9.5, 15.1), abs=1e-3)
    assert (x0, x1) == pytest.approx((48.9, 51.1), abs=1e-3)


# Hand-worked placements, KiCad rotation R(a)(x,y) = (x cos a + y sin a,
# -x sin a + y cos a) (kicad-format.md §7):
#   U2 (50,20) 90°:  pad 1 (-6,0) -> (0, 6)  -> (50, 26)
#   U3 (80,20) 180°: pad 1 (-6,0) -> (6, 0)  -> (86, 20)
#   U4 (20,50) 270°: pad 1 (-6,0) -> (0, -6) -> (20, 44)
#   U5 (50,50) 33°:  pad 1 (-6,0) -> (-6 cos33, 6 sin33) -> (44.967979, 53.267765)
PLACED = {"U1": (14.0, 20.0), "U2": (50.0, 26.0), "U3": (86.0, 20.0), "U4": (20.0, 44.0),
          "U5": (50 - 6 * math.cos(math.radians(33)), 50 + 6 * math.sin(math.radians(33)))}


@pytest.mark.parametrize("key", VERSION_KEYS)
def test_pad_placement_hand_worked(boards: dict[str, Board], key: str) -> None:
    for ref, (x, y) in PLACED.items():
        p = pad(boards[key], ref, "1")
        assert (p.x_mm, p.y_mm) == pytest.approx((x, y), abs=1e-9)
        c = p.copper[0].geometry.centroid
        assert (c.x, c.y) == pytest.approx((x, y), abs=1e-9)


@pytest.mark.parametrize("key", VERSION_KEYS)
def test_pad_angle_is_absolute_not_added_twice(boards: dict[str, Board], key: str) -> None:
    # U2 pad 2 is a 1 × 2 rect; file angle 90 (footprint 90 + local 0) turns it to
    # 2 wide × 1 tall about its centre R(90)(-4,0) + (50,20) = (50, 24).
    x0, y0, x1, y1 = pad(boards[key], "U2", "2").copper[0].geometry.bounds
    assert (x0, y0, x1, y1) == pytest.approx((49.0, 23.5, 51.0, 24.5), abs=1e-9)
    # U1 pad 11 (file angle 30): its long axis points along R(30)(1,0) = (cos30, -sin30)
    geom = pad(boards[key], "U1", "11").copper[0].geometry
    from shapely import Point
    along = Point(26 + 0.45 * math.cos(math.radians(30)), 23 - 0.45 * math.sin(math.radians(30)))
    mirrored = Point(26 + 0.45 * math.cos(math.radians(30)),
                     23 + 0.45 * math.sin(math.radians(30)))
    assert geom.contains(along) and not geom.contains(mirrored)


@pytest.mark.parametrize("key", VERSION_KEYS)
def test_drill_offset_moves_copper_rotated_with_pad(boards: dict[str, Board], key: str) -> None:
    # U2 pad 9 at local (3,3): R(90)(3,3) = (3, -3) -> (53, 17); offset (0.5, 0)
    # turned by the pad angle 90 -> (0, -0.5): copper centre (53, 16.5).
    p = pad(boards[key], "U2", "9")
    assert (p.x_mm, p.y_mm) == pytest.approx((53.0, 17.0))
    for shape in p.copper:
        c = shape.geometry.centroid
        assert (c.x, c.y) == pytest.approx((53.0, 16.5), abs=1e-9)


@pytest.mark.parametrize("key", VERSION_KEYS)
def test_back_side_not_mirrored_again(boards: dict[str, Board], key: str) -> None:
    board = boards[key]
    # U6 (80,50) 0°: stored mirrored local (-2, 1) -> (78, 51), B.Cu only
    u6 = pad(board, "U6", "1")
    assert board.footprint("U6").side == "back"
    assert u6.copper_layers == ("B.Cu",)
    assert u6.copper[0].geometry.bounds == pytest.approx((77.0, 50.5, 79.0, 51.5))
    # U7 (80,35) 90°: R(90)(-2,1) = (1, 2) -> (81, 37); 2×1 turned 90 -> 1 wide, 2 tall
    u7 = pad(board, "U7", "1")
    assert u7.copper[0].geometry.bounds == pytest.approx((80.5, 36.0, 81.5, 38.0), abs=1e-9)


@pytest.mark.parametrize("key", VERSION_KEYS)
def test_layers_nets_and_hole_kinds(boards: dict[str, Board], key: str) -> None:
    board = boards[key]
    pth = pad(board, "U1", "8")
    assert pth.copper_layers == board.copper_layers == ("F.Cu", "In1.Cu", "In2.Cu", "B.Cu")
    assert all(s.geometry.area == pytest.approx(poly_circle(0.8)) for s in pth.copper)
    assert pth.net == "GND" and pth.drill_mm == 0.8
    assert pth.mask_layers == ("F.Mask", "B.Mask")
    paste_only = pad(board, "U1", "")
    assert paste_only.copper == () and paste_only.paste_layers == ("F.Paste",)
    npth = pad(board, "U1", "12")
    assert npth.copper == () and npth.net == ""
    assert pad(board, "U1", "1").net == "TOUCH1"


def test_kicad9_padstack_per_layer_sizes(boards: dict[str, Board]) -> None:
    for key in ("v9", "v10"):
        p = pad(boards[key], "U1", "13")
        areas = {s.layer: s.geometry.area for s in p.copper}
        assert areas["F.Cu"] == pytest.approx(poly_circle(0.6))
        assert areas["In1.Cu"] == areas["In2.Cu"] == pytest.approx(poly_circle(0.5))
        assert areas["B.Cu"] == pytest.approx(poly_circle(1.0))


@pytest.mark.parametrize("key", VERSION_KEYS)
def test_unannotated_references_get_unique_uids(boards: dict[str, Board], key: str) -> None:
    board = boards[key]
    uids = [fp.uid for fp in board.footprints]
    assert len(set(uids)) == len(uids)
    assert [fp.uid for fp in board.footprints if fp.ref == "REF**"] == ["REF**", "REF**#2"]
    ring = board.footprint("REF**#2")
    # 8 mm ring (radius 4, pen 0.5): π(4.25² − 3.75²) = 4π, net-less footprint copper
    (shape,) = ring.graphics
    assert shape.net == "" and shape.layer == "F.Cu"
    assert shape.geometry.area == pytest.approx(4 * math.pi, rel=3e-3)
    # anchor pad at local (4,0), footprint 45°: R(45)(4,0) = (2√2, -2√2) -> (37.828, 37.172)
    anchor = ring.pads[0]
    assert (anchor.x_mm, anchor.y_mm) == pytest.approx((35 + 2 * math.sqrt(2),
                                                        40 - 2 * math.sqrt(2)))


@pytest.mark.parametrize("key", ["v5", "v8", "v10"])
def test_netless_ring_belongs_to_its_anchor_pad(boards: dict[str, Board], key: str) -> None:
    board = boards[key]
    anchor = board.footprint("REF**").pads[0]
    (ring,) = board.attached_copper(anchor)
    assert ring.owner == "REF**" and ring.geometry.area == pytest.approx(4 * math.pi, rel=3e-3)
    assert board.attached_copper(pad(board, "U1", "2")) == ()
