"""Footprint pads: shapes, placement, layers, nets, KiCad 9 padstacks.

Placement (kicad-format.md §0.1, §8): the pad centre is the footprint
transform of the pad's ``(at x y)``; the copper is the pad shape shifted by
the drill ``offset`` and then turned by the file's pad angle **as is** (it
already includes the footprint's rotation).
"""

from __future__ import annotations

from dataclasses import dataclass, replace

import numpy as np
import shapely
from shapely.geometry import Polygon
from shapely.geometry.base import BaseGeometry

from auditor.model import geometry as geo
from auditor.model.items import Pad, PadShape
from auditor.read.context import ReadContext, atoms, children, find, text_of
from auditor.read.sexpr import Node
from auditor.read.shapes import kind_of, read_shape, union


@dataclass(frozen=True)
class ShapeParams:
    """The shape part of a pad (or of one padstack layer), pad-local."""

    shape: str
    width_mm: float
    height_mm: float
    offset: tuple[float, float] = (0.0, 0.0)
    rratio: float = 0.0
    chamfer_ratio: float = 0.0
    chamfered: tuple[str, ...] = ()
    delta: tuple[float, float] = (0.0, 0.0)
    anchor: str = "circle"
    primitives: Node | None = None

    @property
    def label(self) -> str:
        """Shape name as reported (``chamfered`` for a chamfered roundrect)."""
        if self.shape in ("roundrect", "rect") and self.chamfer_ratio > 0 and self.chamfered:
            return "chamfered"
        return self.shape


def _shape_params(node: Node, ctx: ReadContext, base: ShapeParams | None) -> ShapeParams:
    shape = find(node, "shape")
    size = find(node, "size")
    params = base or ShapeParams(text_of(shape, "circle"), 0.0, 0.0)
    if shape is not None:
        params = replace(params, shape=text_of(shape))
    if size is not None:
        w = ctx.dimension(size, 1, node)
        h = ctx.dimension(size, 2, node, default=w) if w > 0 else w
        params = replace(params, width_mm=w, height_mm=h)
    updates: dict[str, object] = {}
    for child in children(node):
        head = child.head
        if head == "offset":
            updates["offset"] = ctx.xy(child)
        elif head == "roundrect_rratio":
            updates["rratio"] = min(max(ctx.num(child, 1), 0.0), 0.5)
        elif head == "chamfer_ratio":
            updates["chamfer_ratio"] = min(max(ctx.num(child, 1), 0.0), 0.5)
        elif head == "chamfer":
            updates["chamfered"] = tuple(atoms(child))
        elif head == "rect_delta":
            updates["delta"] = ctx.xy(child)
        elif head == "options":
            anchor = find(child, "anchor")
            updates["anchor"] = text_of(anchor, "circle")
        elif head == "primitives":
            updates["primitives"] = child
    return replace(params, **updates)  # type: ignore[arg-type]


def local_outline(params: ShapeParams, ctx: ReadContext) -> BaseGeometry:
    """The pad's copper in its own frame, before the drill offset and angle."""
    w, h = params.width_mm, params.height_mm
    shape = params.shape
    if w <= 0 and shape != "custom":
        return Polygon()
    if shape == "circle":
        return geo.polygon(geo.circle_coords(w / 2))
    if shape == "rect" and not params.chamfered:
        return geo.polygon(geo.rect_coords(w, h))
    if shape == "oval":
        return geo.polygon(geo.roundrect_coords(w, h, min(w, h) / 2))
    if shape in ("roundrect", "rect"):
        radius = min(w, h) * params.rratio if shape == "roundrect" else 0.0
        chamfer = min(w, h) * params.chamfer_ratio
        return geo.polygon(geo.roundrect_coords(w, h, radius, chamfer, params.chamfered))
    if shape == "trapezoid":
        return geo.polygon(geo.trapezoid_coords(w, h, *params.delta))
    if shape == "custom":
        return _custom(params, ctx)
    raise ctx.error(None, f"unknown pad shape {shape!r}")


def _custom(params: ShapeParams, ctx: ReadContext) -> BaseGeometry:
    # copper = anchor ∪ primitives (§8 [S6 MergePrimitivesAsPolygon])
    w, h = params.width_mm, params.height_mm
    parts: list[BaseGeometry] = []
    if w > 0:
        anchor = geo.rect_coords(w, h) if params.anchor == "rect" else geo.circle_coords(w / 2)
        parts.append(geo.polygon(anchor))
    if params.primitives is not None:
        for prim in children(params.primitives):
            kind = kind_of(prim.head)
            if kind is None:
                if prim.head not in ("gr_bbox", "gr_vector"):
                    ctx.skipped("pad primitives", prim)
                continue
            spec = read_shape(prim, kind, ctx)
            if spec is None:
                continue
            if kind == "poly":
                spec = replace(spec, filled=True)
            parts.append(spec.geometry())
    return union(parts)


def placed(params: ShapeParams, ctx: ReadContext, angle_deg: float,
           cx: float, cy: float) -> BaseGeometry:
    """Board copper of a pad shape centred (before offset) at (cx, cy)."""
    ring = _cached_ring(params, ctx) if params.primitives is None else None
    if ring is not None:
        return Polygon(geo.place(ring, angle_deg, cx, cy))
    local = local_outline(params, ctx)
    if local.is_empty:
        return local
    ox, oy = params.offset

    def move(coords: geo.Coords) -> geo.Coords:
        return geo.place(coords + (ox, oy), angle_deg, cx, cy)

    # Rotating a custom outline can make nearly touching edges cross: repair.
    return geo.clean(shapely.transform(local, move))


def _cached_ring(params: ShapeParams, ctx: ReadContext) -> geo.Coords | None:
    """The offset outline ring of a plain (non-custom) shape, built once per
    distinct shape on the board; ``None`` when the shape is not one ring."""
    cache = ctx.shape_cache
    if params not in cache:
        local = local_outline(params, ctx)
        simple = local.geom_type == "Polygon" and not local.is_empty and not local.interiors
        cache[params] = (np.asarray(local.exterior.coords)[:-1] + params.offset
                         if simple else None)
    ring: geo.Coords | None = cache[params]  # type: ignore[assignment]
    return ring


def read_pad(node: Node, ctx: ReadContext, fp_uid: str, ref: str,
             fp_at: tuple[float, float, float]) -> Pad:
    """One ``(pad …)`` of a footprint placed at ``fp_at`` = (x, y, angle)."""
    number = node[1] if len(node) > 1 and isinstance(node[1], str) else ""
    kind = node[2] if len(node) > 2 and isinstance(node[2], str) else "smd"
    at = find(node, "at")
    if at is None:
        raise ctx.error(node, "pad has no (at …)")
    lx, ly = ctx.xy(at)
    angle = ctx.num(at, 3, 0.0)
    rx, ry = geo.rotate_xy(lx, ly, fp_at[2])
    cx, cy = fp_at[0] + rx, fp_at[1] + ry
    shape_name = node[3] if len(node) > 3 and isinstance(node[3], str) else "circle"
    params = _shape_params(node, ctx, ShapeParams(shape_name, 0.0, 0.0))
    drill = _drill(node, ctx, params)
    params = replace(params, offset=drill[1])
    layers = ctx.expand_layers(atoms(find(node, "layers") or Node()))
    copper_names = _copper_layers(kind, layers, ctx, params, drill[0])
    stack = _padstack(node, ctx, params)
    copper = tuple(PadShape(layer, stack.get(layer, params).label,
                            placed(stack.get(layer, params), ctx, angle, cx, cy))
                   for layer in copper_names)
    net = ctx.net_of(find(node, "net")) if kind != "np_thru_hole" else ""
    return Pad(
        footprint_uid=fp_uid, ref=ref, number=number, kind=kind, shape=params.label,
        x_mm=cx, y_mm=cy, angle_deg=angle, width_mm=params.width_mm,
        height_mm=params.height_mm, net=net, copper=copper, drill_mm=drill[0],
        mask_layers=tuple(x for x in layers if x.endswith(".Mask")),
        paste_layers=tuple(x for x in layers if x.endswith(".Paste")),
        pin_function=text_of(find(node, "pinfunction")),
        **_source(node, ctx),
    )


def _source(node: Node, ctx: ReadContext) -> dict[str, int]:
    line, column = ctx.place(node)
    return {"source_line": line, "source_column": column}


def _drill(node: Node, ctx: ReadContext,
           params: ShapeParams) -> tuple[float, tuple[float, float]]:
    drill = find(node, "drill")
    if drill is None:
        return 0.0, params.offset
    first = 2 if len(drill) > 1 and drill[1] == "oval" else 1
    diameter = ctx.num(drill, first, 0.0) if isinstance(_at(drill, first), str) else 0.0
    offset = find(drill, "offset")
    return diameter, ctx.xy(offset) if offset is not None else params.offset


def _copper_layers(kind: str, layers: list[str], ctx: ReadContext,
                   params: ShapeParams, drill_mm: float) -> tuple[str, ...]:
    if kind == "thru_hole":  # plated holes span every copper layer (§8)
        return ctx.copper_layers
    listed = [x for x in layers if ctx.is_copper(x)]
    if kind == "np_thru_hole" and max(params.width_mm, params.height_mm) <= drill_mm:
        return ()
    return tuple(x for x in ctx.copper_layers if x in listed)


def _padstack(node: Node, ctx: ReadContext, base: ShapeParams) -> dict[str, ShapeParams]:
    """Per-layer overrides of a KiCad 9 ``(padstack …)``; the pad's own shape
    is F.Cu's (and every layer's in normal mode)."""
    stack = find(node, "padstack")
    if stack is None:
        return {}
    out: dict[str, ShapeParams] = {}
    inner = ctx.copper_layers[1:-1]
    for layer in children(stack):
        if layer.head != "layer":
            continue
        name = text_of(layer)
        params = _shape_params(layer, ctx, base)
        targets = inner if name == "Inner" else (name,)
        for target in targets:
            out[target] = params
    return out


def _at(node: Node, index: int) -> object:
    return node[index] if index < len(node) else None
