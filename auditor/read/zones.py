"""Copper zones and rule areas (kicad-format.md §10).

Copper = union of the zone's ``filled_polygon`` entries per layer, each a
weakly simple "fractured" ring cleaned with make_valid (GEOS's "structure"
method, see :func:`auditor.model.geometry.clean`). Fills written without
``(filled_areas_thickness no)`` before 20250210 are stroked outlines whose
real copper is the polygon grown by ``min_thickness/2`` (§0.6). ``(hatch …)``
at zone level is only the outline's display style; hatched copper is
``(fill (mode hatch))`` (§0.7).
"""

from __future__ import annotations

from shapely.geometry import Polygon
from shapely.geometry.base import BaseGeometry

from auditor.model import geometry as geo
from auditor.model.items import FillMode, HatchSettings, Zone, ZoneFill
from auditor.read.context import ReadContext, children, find, flag, text_of
from auditor.read.sexpr import Node
from auditor.read.shapes import layers_of, points_of

#: From this format on fills are never stroked (§2: 20250210).
FINAL_FILLS_FROM = 20250210


def read_zone(node: Node, ctx: ReadContext, fp_uid: str = "") -> Zone | None:
    """A zone or rule area; ``None`` for zones with no copper layer at all."""
    keepout = find(node, "keepout")
    is_rule_area = keepout is not None or find(node, "placement") is not None
    layers = tuple(x for x in ctx.copper_layers if x in layers_of(node, ctx))
    if not layers and not is_rule_area:
        ctx.warn("zone-not-copper", "skipped a zone on non-copper layers", node)
        return None
    net = "" if is_rule_area else _net(node, ctx)
    min_thickness = ctx.value_of(node, "min_thickness")
    fills, grown = _fills(node, ctx, layers, min_thickness)
    fill_node = find(node, "fill")
    hatched = fill_node is not None and text_of(find(fill_node, "mode")) == "hatch"
    mode: FillMode = "none" if not fills else ("hatched" if hatched else "solid")
    name = text_of(find(node, "name"))
    if not fills and not is_rule_area:
        label = f" '{name}'" if name else ""
        ctx.warn("zone-unfilled", f"zone{label} of net '{net}' on {', '.join(layers)} has "
                 "no fill in the file; its copper is unknown (refill in KiCad)", node)
    if grown:
        ctx.warn("zone-stroked-fill", "legacy stroked zone fill grown by min_thickness/2",
                 node)
    line, column = ctx.place(node)
    return Zone(
        net=net, layers=layers, outline=_outline(node, ctx), fills=fills, fill=mode,
        name=name, priority=int(ctx.value_of(node, "priority")),
        is_rule_area=is_rule_area, keepouts=_keepouts(keepout),
        hatch=_hatch(fill_node, ctx) if hatched else None,
        min_thickness_mm=min_thickness, footprint_uid=fp_uid,
        source_line=line, source_column=column)


def _net(node: Node, ctx: ReadContext) -> str:
    # KiCad trusts the zone's net *name* and re-resolves the code (§6 [S4]).
    name = find(node, "net_name")
    if name is not None and len(name) > 1:
        return text_of(name)
    return ctx.net_of(find(node, "net"))


def _keepouts(keepout: Node | None) -> tuple[str, ...]:
    if keepout is None:
        return ()
    return tuple(sorted(str(c.head) for c in children(keepout)
                        if len(c) > 1 and c[1] == "not_allowed"))


def _hatch(fill: Node | None, ctx: ReadContext) -> HatchSettings | None:
    if fill is None:
        return None

    def value(key: str) -> float:
        found = find(fill, key)
        return ctx.num(found, 1, 0.0) if found is not None else 0.0

    return HatchSettings(value("hatch_thickness"), value("hatch_gap"),
                         value("hatch_orientation"))


def _outline(node: Node, ctx: ReadContext) -> BaseGeometry:
    rings = [points_of(find(p, "pts"), ctx) for p in children(node) if p.head == "polygon"]
    rings = [r for r in rings if len(r) >= 3]
    if not rings:
        return Polygon()
    return geo.clean(Polygon(rings[0], [r for r in rings[1:]]))


def _fills(node: Node, ctx: ReadContext, layers: tuple[str, ...],
           min_thickness: float) -> tuple[tuple[ZoneFill, ...], bool]:
    stroked = (ctx.version < FINAL_FILLS_FROM
               and not _flag_no(node, "filled_areas_thickness") and min_thickness > 0)
    per_layer: dict[str, list[BaseGeometry]] = {}
    islands: dict[str, int] = {}
    for child in children(node):
        if child.head == "fill_segments":
            ctx.warn("zone-fill-segments", "ignored a very old segment zone fill", child)
            continue
        if child.head != "filled_polygon":
            continue
        layer = text_of(find(child, "layer"), layers[0] if layers else "")
        if layer not in layers:
            continue
        ring = points_of(find(child, "pts"), ctx)
        if len(ring) < 3:
            continue
        area = geo.clean(Polygon(ring))
        if stroked:
            area = area.buffer(min_thickness / 2, quad_segs=geo.QUAD_SEGS)
        per_layer.setdefault(layer, []).append(area)
        if flag(child, "island"):
            islands[layer] = islands.get(layer, 0) + 1
    fills = tuple(ZoneFill(layer, _union(per_layer[layer]), islands.get(layer, 0))
                  for layer in layers if layer in per_layer)
    return fills, stroked and bool(fills)


def _union(parts: list[BaseGeometry]) -> BaseGeometry:
    return parts[0] if len(parts) == 1 else geo.union_of(parts)


def _flag_no(node: Node, key: str) -> bool:
    found = find(node, key)
    return found is not None and len(found) > 1 and found[1] == "no"
