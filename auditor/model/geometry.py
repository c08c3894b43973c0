"""Geometry builders in KiCad's frame (mm, Y down), pure and small.

Rotation follows KiCad's ``RotatePoint`` (kicad-format.md §7 [S7]): with Y
pointing down, a positive angle ``a`` maps ``(x, y)`` to
``(x·cos a + y·sin a, −x·sin a + y·cos a)``, i.e. counter-clockwise as seen
on screen. Round shapes are approximated by inscribed polygons with
:data:`QUAD_SEGS` segments per quarter turn, so an exact circle's area is
``(n/2)·r²·sin(2π/n)`` with ``n = 4·QUAD_SEGS``.
"""

from __future__ import annotations

import math
from collections.abc import Iterable, Sequence

import numpy as np
import shapely
from numpy.typing import NDArray
from shapely.geometry import LineString, Polygon
from shapely.geometry.base import BaseGeometry

#: Segments per quarter circle for every round shape.
QUAD_SEGS = 16
#: Segments per quarter circle on the round ends of tracks: there are many
#: tracks and their ends are small. With q segments per quarter the inscribed
#: polygon's vertices are π/(2q) apart and its edges come within
#: r·(1 − cos(π/(4q))) of the true circle: 1.9 % of the half-width for q = 4
#: (2.4 µm on a 0.25 mm track), elementary geometry.
TRACK_QUAD_SEGS = 4

Coords = NDArray[np.float64]
XY = tuple[float, float]


def rotate_xy(x: float, y: float, angle_deg: float) -> XY:
    """Rotate a point about the origin the way KiCad does (Y down).

    >>> tuple(round(v, 9) for v in rotate_xy(1.0, 0.0, 90.0))
    (0.0, -1.0)
    """
    if angle_deg == 0.0:
        return x, y
    a = math.radians(angle_deg)
    c, s = math.cos(a), math.sin(a)
    return x * c + y * s, -x * s + y * c


def place(coords: Coords, angle_deg: float, dx: float, dy: float) -> Coords:
    """Rotate ``coords`` (N×2) by ``angle_deg`` (KiCad sense) and move by (dx, dy)."""
    if angle_deg % 360.0 == 0.0:
        return coords + (dx, dy)
    a = math.radians(angle_deg)
    c, s = math.cos(a), math.sin(a)
    x, y = coords[:, 0], coords[:, 1]
    return np.column_stack((x * c + y * s + dx, -x * s + y * c + dy))


def circle_coords(radius: float, cx: float = 0.0, cy: float = 0.0) -> Coords:
    """Vertices of the inscribed ``4·QUAD_SEGS``-gon of a circle."""
    t = np.linspace(0.0, 2 * math.pi, 4 * QUAD_SEGS, endpoint=False)
    return np.column_stack((cx + radius * np.cos(t), cy + radius * np.sin(t)))


#: Corners in traversal order with the start angle of their rounding arc and
#: the unit steps (arrive, leave) along the two adjacent edges, Y down.
_CORNERS = (
    ("top_left", (-1, -1), math.pi, (0, 1), (1, 0)),
    ("top_right", (1, -1), 1.5 * math.pi, (-1, 0), (0, 1)),
    ("bottom_right", (1, 1), 0.0, (0, -1), (-1, 0)),
    ("bottom_left", (-1, 1), 0.5 * math.pi, (1, 0), (0, -1)),
)


def roundrect_coords(width: float, height: float, radius: float,
                     chamfer_mm: float = 0.0, chamfered: Iterable[str] = ()) -> Coords:
    """Outline of a centred rectangle with rounded and/or chamfered corners.

    ``radius`` rounds every corner not listed in ``chamfered``; the listed
    ones are cut at 45° by ``chamfer_mm`` along each edge.
    """
    hw, hh = width / 2, height / 2
    radius = max(0.0, min(radius, hw, hh))
    chamfer_mm = max(0.0, min(chamfer_mm, hw * 2, hh * 2))
    cut = set(chamfered)
    pts: list[XY] = []
    steps = np.linspace(0.0, math.pi / 2, QUAD_SEGS + 1)
    for name, (sx, sy), start, arrive, leave in _CORNERS:
        cx, cy = sx * hw, sy * hh
        if name in cut and chamfer_mm > 0:
            pts.append((cx + chamfer_mm * arrive[0], cy + chamfer_mm * arrive[1]))
            pts.append((cx + chamfer_mm * leave[0], cy + chamfer_mm * leave[1]))
        elif radius > 0:
            ox, oy = cx - sx * radius, cy - sy * radius
            pts.extend((ox + radius * math.cos(start + t), oy + radius * math.sin(start + t))
                       for t in steps)
        else:
            pts.append((cx, cy))
    return _dedupe(pts)


def _dedupe(pts: Sequence[XY]) -> Coords:
    arr = np.asarray(pts, dtype=float)
    keep = np.ones(len(arr), dtype=bool)
    keep[1:] = np.any(np.abs(np.diff(arr, axis=0)) > 1e-12, axis=1)
    if len(arr) > 1 and np.all(np.abs(arr[-1] - arr[0]) <= 1e-12):
        keep[-1] = False
    return arr[keep]


def rect_coords(width: float, height: float) -> Coords:
    """Corners of a centred rectangle."""
    hw, hh = width / 2, height / 2
    return np.array([(-hw, -hh), (hw, -hh), (hw, hh), (-hw, hh)], dtype=float)


def trapezoid_coords(width: float, height: float, delta_x: float, delta_y: float) -> Coords:
    """Corners of KiCad's trapezoid pad (kicad-format.md §8 [S12]): half of each
    ``rect_delta`` component widens one side and narrows the opposite one."""
    hw, hh, dx, dy = width / 2, height / 2, delta_x / 2, delta_y / 2
    return np.array([(-hw - dy, hh + dx), (hw + dy, hh - dx),
                     (hw - dy, -hh + dx), (-hw + dy, -hh - dx)], dtype=float)


def polygon(coords: Coords) -> BaseGeometry:
    """A valid polygonal geometry from a ring of coordinates."""
    if len(coords) < 3:
        return Polygon()
    return clean(Polygon(coords))


def clean(geom: BaseGeometry) -> BaseGeometry:
    """Repair self-touching or inverted rings, keep only the areal parts.

    GEOS's "structure" repair (shells unioned, holes subtracted) rather than
    the default "linework" one: on KiCad's fractured zone fills (one ring
    running out to every hole and back along zero-width bridges) both give
    the same copper, to the last bit of area, on the demo and every fixture
    board, and "structure" is about 3 times faster on the demo's large
    hatched fills; it returns polygons directly, and unlike ``buffer(0)`` it
    keeps both lobes of a self-crossing (bow-tie) ring.
    """
    if geom.is_valid:
        return geom
    fixed = shapely.make_valid(geom, method="structure", keep_collapsed=False)
    if fixed.geom_type in ("Polygon", "MultiPolygon"):
        return fixed
    parts = [g for g in getattr(fixed, "geoms", [fixed])
             if g.geom_type in ("Polygon", "MultiPolygon")]
    return shapely.union_all(parts) if parts else Polygon()


def union_of(parts: Sequence[BaseGeometry]) -> BaseGeometry:
    """The union of valid polygonal ``parts``, without the union when they
    are apart.

    A zone's fill pieces on one layer never meet (each is one connected
    piece of copper), and uniting them, or two zones' fills, costs time in
    proportion to their many hatch holes (0.1 s on the demo board). When no
    two parts even touch, the multi-polygon of their pieces is already
    valid and has the same copper; otherwise they are united.
    """
    pieces = [p for part in parts for p in getattr(part, "geoms", [part])
              if p.geom_type == "Polygon" and not p.is_empty]
    if len(pieces) <= 1:
        return pieces[0] if pieces else Polygon()
    tree = shapely.STRtree(pieces)
    left, right = tree.query(pieces, predicate="intersects")
    if bool(np.all(left == right)):
        return shapely.MultiPolygon(pieces)
    return shapely.union_all(pieces)


def stroke(points: Coords, width: float, quad_segs: int = QUAD_SEGS) -> BaseGeometry:
    """Copper of a polyline drawn with a round pen of ``width`` (round caps)."""
    half = max(width, 0.0) / 2
    if len(points) == 1 or (len(points) == 2 and points[0][0] == points[1][0]
                            and points[0][1] == points[1][1]):
        return shapely.Point(points[0]).buffer(half, quad_segs=quad_segs) if half else Polygon()
    if half == 0:
        return LineString(points)
    return LineString(points).buffer(half, quad_segs=quad_segs)


def stadiums(segments: Coords, widths: Coords) -> NDArray[np.object_]:
    """Copper of many straight tracks at once: ``segments`` is N×4
    (x0, y0, x1, y1), ``widths`` N. Each is the polygon :func:`stroke`
    gives with ``quad_segs=TRACK_QUAD_SEGS``, built with numpy instead of one
    buffer call per track."""
    x0, y0, x1, y1 = (segments[:, i:i + 1] for i in range(4))
    heading = np.arctan2(y1 - y0, x1 - x0)
    half = widths.reshape(-1, 1) / 2
    steps = np.linspace(0.0, math.pi, 2 * TRACK_QUAD_SEGS + 1)[None, :]
    end_cap = heading - math.pi / 2 + steps
    start_cap = heading + math.pi / 2 + steps
    xs = np.hstack((x1 + half * np.cos(end_cap), x0 + half * np.cos(start_cap)))
    ys = np.hstack((y1 + half * np.sin(end_cap), y0 + half * np.sin(start_cap)))
    return np.asarray(shapely.polygons(np.stack((xs, ys), axis=-1)))


class Arc:
    """A circular arc through three points, as KiCad stores it (≥ 20211014).

    ``sweep_rad`` is signed in raw (Y-down) ``atan2`` terms, going from the
    start through the mid point to the end.
    """

    __slots__ = ("cx", "cy", "radius", "start_rad", "sweep_rad")

    def __init__(self, start: XY, mid: XY, end: XY) -> None:
        centre = _circumcentre(start, mid, end)
        if centre is None:
            raise ValueError("collinear arc points")
        self.cx, self.cy = centre
        self.radius = math.hypot(start[0] - self.cx, start[1] - self.cy)
        a_s = math.atan2(start[1] - self.cy, start[0] - self.cx)
        a_m = math.atan2(mid[1] - self.cy, mid[0] - self.cx)
        a_e = math.atan2(end[1] - self.cy, end[0] - self.cx)
        ccw = (a_e - a_s) % (2 * math.pi)
        to_mid = (a_m - a_s) % (2 * math.pi)
        self.start_rad = a_s
        self.sweep_rad = ccw if to_mid <= ccw else ccw - 2 * math.pi
        if ccw == 0.0:  # start == end: a full circle through mid
            self.sweep_rad = 2 * math.pi

    @property
    def length_mm(self) -> float:
        """Arc length r·|θ|."""
        return self.radius * abs(self.sweep_rad)

    def points(self) -> Coords:
        """Start, intermediate and end points (QUAD_SEGS per quarter turn)."""
        n = max(2, math.ceil(abs(self.sweep_rad) / (math.pi / 2) * QUAD_SEGS))
        t = self.start_rad + np.linspace(0.0, self.sweep_rad, n + 1)
        return np.column_stack((self.cx + self.radius * np.cos(t),
                                self.cy + self.radius * np.sin(t)))


def _circumcentre(a: XY, b: XY, c: XY) -> XY | None:
    ax, ay = a
    bx, by = b[0] - ax, b[1] - ay
    cx, cy = c[0] - ax, c[1] - ay
    d = 2 * (bx * cy - by * cx)
    if abs(d) < 1e-18:
        if (bx, by) != (0.0, 0.0) and (cx, cy) == (0.0, 0.0):  # full circle: mid opposite
            return ax + bx / 2, ay + by / 2
        return None
    b2, c2 = bx * bx + by * by, cx * cx + cy * cy
    return ax + (cy * b2 - by * c2) / d, ay + (bx * c2 - cx * b2) / d


def legacy_arc(centre: XY, start: XY, angle_deg: float) -> tuple[XY, XY, XY]:
    """Start, mid and end of a KiCad ≤ 5 arc (kicad-format.md §0.8, §13 [S8]):
    the end is the start turned by +angle about the centre with the standard
    rotation in raw Y-down coordinates."""
    def turned(deg: float) -> XY:
        a = math.radians(deg)
        x, y = start[0] - centre[0], start[1] - centre[1]
        return (centre[0] + x * math.cos(a) - y * math.sin(a),
                centre[1] + x * math.sin(a) + y * math.cos(a))
    return start, turned(angle_deg / 2), turned(angle_deg)


def bezier_points(p0: XY, p1: XY, p2: XY, p3: XY, segments: int = 32) -> Coords:
    """Points along a cubic Bézier curve."""
    t = np.linspace(0.0, 1.0, segments + 1)[:, None]
    ctrl = np.array([p0, p1, p2, p3], dtype=float)
    curve: Coords = (((1 - t) ** 3) * ctrl[0] + 3 * ((1 - t) ** 2) * t * ctrl[1]
                     + 3 * (1 - t) * t * t * ctrl[2] + (t ** 3) * ctrl[3])
    return curve
