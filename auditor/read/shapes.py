"""Graphic shapes (``gr_*``, ``fp_*`` and custom-pad primitives) read into a
frame-free :class:`ShapeSpec`, then placed and turned into copper.

kicad-format.md §11: widths come as ``(width w)`` (≤ 6) or
``(stroke (width w))`` (7+); fill as ``(fill solid|none|yes|no)``; without a
fill token polygons are filled except on Edge.Cuts and rectangles/circles are
filled iff their width is 0. Arcs are three-point from 20211014, before that
``start`` is the centre, ``end`` the arc's start and ``angle`` the sweep (§0.8).
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np
import shapely
from shapely.errors import GEOSException
from shapely.geometry import Polygon
from shapely.geometry.base import BaseGeometry

from auditor.model import geometry as geo
from auditor.read.context import ABSURD_MM, ReadContext, atoms, children, find
from auditor.read.sexpr import Node

#: First format with three-point arcs (§2 [S3]).
THREE_POINT_ARCS_FROM = 20211014

#: ``fill`` values that make a solid shape.
_SOLID = frozenset({"solid", "yes", "true"})


@dataclass(frozen=True)
class ShapeSpec:
    """A shape in its own (footprint-local or pad-local) frame.

    ``path`` is the drawn line (closed rings repeat no point; ``closed`` says
    so); ``filled`` shapes cover their inside too.
    """

    kind: str
    path: geo.Coords
    closed: bool
    filled: bool
    width_mm: float
    layers: tuple[str, ...]
    net_node: Node | None

    def geometry(self, angle_deg: float = 0.0, dx: float = 0.0,
                 dy: float = 0.0) -> BaseGeometry:
        """The shape's copper after rotating by ``angle_deg`` and moving."""
        pts = geo.place(self.path, angle_deg, dx, dy)
        if self.filled and self.closed and len(pts) >= 3:
            area = geo.polygon(pts)
            if self.width_mm > 0:
                area = area.buffer(self.width_mm / 2, quad_segs=geo.QUAD_SEGS)
            return area
        if self.width_mm <= 0:
            return Polygon()
        if self.closed:
            pts = np.vstack((pts, pts[:1]))
        return geo.stroke(pts, self.width_mm)

    def placed_path(self, angle_deg: float, dx: float, dy: float) -> geo.Coords:
        """The drawn line in board coordinates (for the Edge.Cuts outline)."""
        return geo.place(self.path, angle_deg, dx, dy)


def width_of(node: Node, ctx: ReadContext) -> float:
    """Stroke width from ``(width w)`` or ``(stroke (width w) …)``."""
    width = find(node, "width")
    if width is None:
        stroke = find(node, "stroke")
        width = find(stroke, "width") if stroke is not None else None
    if width is None:
        return 0.0
    if _filled(node) and _non_positive(width):
        # KiCad 8 and 9 write a filled shape without an outline as a pen of
        # -0.000001 mm (seen on real boards): no pen, and nothing lost.
        return 0.0
    return ctx.dimension(width, 1, node, zero_ok=True)


def _filled(node: Node) -> bool:
    fill = find(node, "fill")
    return fill is not None and len(fill) > 1 and fill[1] in ("solid", "yes")


def _non_positive(width: Node) -> bool:
    try:
        return len(width) > 1 and isinstance(width[1], str) and float(width[1]) <= 0
    except ValueError:
        return False


def layers_of(node: Node, ctx: ReadContext) -> tuple[str, ...]:
    """``(layer L)`` or ``(layers …)``, wildcards expanded."""
    layer = find(node, "layer")
    if layer is None:
        layer = find(node, "layers")
    return tuple(ctx.expand_layers(atoms(layer))) if layer is not None else ()


def points_of(pts: Node | None, ctx: ReadContext) -> geo.Coords:
    """Coordinates of a ``(pts (xy …) (arc (start)(mid)(end)) …)`` list."""
    if pts is None:
        return np.zeros((0, 2))
    fast = _plain_xy(pts)
    if fast is not None:
        return fast
    out: list[tuple[float, float]] = []
    for item in children(pts):
        if item.head == "xy":
            out.append(ctx.xy(item))
        elif item.head == "arc":
            arc = _three_point(item, ctx)
            if arc is not None:
                out.extend(map(tuple, arc.points()))
    return np.asarray(out, dtype=float).reshape(-1, 2)


def _plain_xy(pts: Node) -> geo.Coords | None:
    """All points of a ``pts`` list made only of ``(xy x y)`` entries with
    sane numbers, converted in one go; None for anything else (arcs, a
    malformed or out-of-range number), which the per-point path then reads
    and, where wrong, reports with its line and column. Zone fills are
    thousands of such points: this halves the demo board's read time.
    """
    rows = pts[1:]
    if not rows or any(not isinstance(r, Node) or len(r) != 3 or r[0] != "xy" for r in rows):
        return None
    try:
        coords = np.array([r[1:] for r in rows], dtype=float)
    except (ValueError, TypeError):
        return None
    if not np.isfinite(coords).all() or (np.abs(coords) > ABSURD_MM).any():
        return None
    return coords


def _three_point(node: Node, ctx: ReadContext) -> geo.Arc | None:
    start, mid, end = (find(node, k) for k in ("start", "mid", "end"))
    if start is None or mid is None or end is None:
        raise ctx.error(node, "arc needs start, mid and end")
    try:
        return geo.Arc(ctx.xy(start), ctx.xy(mid), ctx.xy(end))
    except ValueError:
        return None


def arc_of(node: Node, ctx: ReadContext) -> geo.Arc | None:
    """The arc of a ``gr_arc``/``fp_arc``/primitive, legacy or three-point.

    ``None`` for a degenerate arc (collinear or zero radius): it is then drawn
    as a straight stroke by the caller.
    """
    if find(node, "mid") is not None:
        return _three_point(node, ctx)
    start, end, angle = find(node, "start"), find(node, "end"), find(node, "angle")
    if start is None or end is None:
        raise ctx.error(node, "arc needs start and end")
    sweep = ctx.num(angle, 1, 0.0) if angle is not None else 0.0
    if sweep == 0.0:
        return None
    a, m, b = geo.legacy_arc(ctx.xy(start), ctx.xy(end), sweep)
    try:
        return geo.Arc(a, m, b) if abs(sweep) < 360 else _full_circle(ctx.xy(start), a)
    except ValueError:
        return None


def _full_circle(centre: tuple[float, float], start: tuple[float, float]) -> geo.Arc:
    opposite = (2 * centre[0] - start[0], 2 * centre[1] - start[1])
    return geo.Arc(start, opposite, start)


def _fill_of(node: Node, kind: str, width: float, layers: tuple[str, ...]) -> bool:
    fill = find(node, "fill")
    if fill is not None and len(fill) > 1:
        return fill[1] in _SOLID
    if kind == "poly":
        return "Edge.Cuts" not in layers
    if kind in ("rect", "circle"):
        return width == 0.0
    return False


def read_shape(node: Node, kind: str, ctx: ReadContext) -> ShapeSpec | None:
    """Read one shape node; ``None`` if it has no extent at all."""
    width = width_of(node, ctx)
    layers = layers_of(node, ctx)
    path, closed = _path_of(node, kind, ctx)
    if len(path) == 0:
        return None
    filled = _fill_of(node, kind, width, layers)
    return ShapeSpec(kind, path, closed, filled, width, layers, find(node, "net"))


def _path_of(node: Node, kind: str, ctx: ReadContext) -> tuple[geo.Coords, bool]:
    if kind == "line":
        return _two(node, ctx, "start", "end"), False
    if kind == "arc":
        arc = arc_of(node, ctx)
        if arc is None:
            return _two(node, ctx, "start", "end"), False
        return arc.points(), False
    if kind == "circle":
        centre, edge = _two(node, ctx, "center", "end")
        radius = math.hypot(*(edge - centre))
        if radius == 0:
            return np.zeros((0, 2)), True
        return geo.circle_coords(radius, centre[0], centre[1]), True
    if kind == "rect":
        (x0, y0), (x1, y1) = _two(node, ctx, "start", "end")
        return np.array([(x0, y0), (x1, y0), (x1, y1), (x0, y1)], dtype=float), True
    pts = points_of(find(node, "pts"), ctx)
    if kind == "curve":
        if len(pts) != 4:
            raise ctx.error(node, "a Bézier curve needs 4 points")
        p0, p1, p2, p3 = ((float(x), float(y)) for x, y in pts)
        return geo.bezier_points(p0, p1, p2, p3), False
    if len(pts) > 1 and np.allclose(pts[0], pts[-1]):
        pts = pts[:-1]
    return pts, True


def _two(node: Node, ctx: ReadContext, first: str, second: str) -> geo.Coords:
    a, b = find(node, first), find(node, second)
    if a is None or b is None:
        raise ctx.error(node, f"'{node.head}' needs ({first} …) and ({second} …)")
    return np.array([ctx.xy(a), ctx.xy(b)], dtype=float)


#: Shape keywords by family; ``gr_bbox``/``gr_vector`` are pad annotations, not copper.
SHAPE_KINDS = {
    "line": "line", "arc": "arc", "circle": "circle", "rect": "rect", "poly": "poly",
    "curve": "curve",
}


def kind_of(head: str) -> str | None:
    """``gr_line`` → ``line`` … (``None`` for non-shape keywords)."""
    _, _, tail = head.partition("_")
    return SHAPE_KINDS.get(tail)


def union(parts: list[BaseGeometry]) -> BaseGeometry:
    """Union of polygonal parts (empty polygon for none), repaired: real
    footprints hold self-crossing primitives (arcs approximated twice)."""
    parts = [geo.clean(p) for p in parts if not p.is_empty]
    if not parts:
        return Polygon()
    if len(parts) == 1:
        return parts[0]
    try:
        return geo.clean(shapely.union_all(parts))
    except GEOSException:  # nearly coincident edges: snap-round on a 0.1 µm grid
        return geo.clean(shapely.union_all(parts, grid_size=1e-4))
