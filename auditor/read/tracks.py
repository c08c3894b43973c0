"""Tracks (``segment``, three-point ``arc``) and ``via`` (kicad-format.md §9).

A track's copper is the sweep of a disc of its width (round caps). A through
via spans every copper layer; ``blind``/``buried``/``micro`` vias span the
stack between their two listed end layers.
"""

from __future__ import annotations

import math
from array import array

import numpy as np

from auditor.model import geometry as geo
from auditor.model.items import Point, Track, Via
from auditor.read.context import ReadContext, atoms, find
from auditor.read.parts import BoardParts
from auditor.read.sexpr import Node
from auditor.read.shapes import layers_of


def _track_layer(node: Node, ctx: ReadContext) -> str | None:
    # 9+ tracks may say (layers "F.Cu" "F.Mask"): the copper one counts.
    for layer in layers_of(node, ctx):
        if ctx.is_copper(layer):
            return ctx.canonical(layer)
    return None


def _ends(node: Node, ctx: ReadContext) -> tuple[tuple[float, float], tuple[float, float]]:
    start, end = find(node, "start"), find(node, "end")
    if start is None or end is None:
        raise ctx.error(node, f"'{node.head}' needs (start …) and (end …)")
    return ctx.xy(start), ctx.xy(end)


def read_segment(node: Node, ctx: ReadContext, parts: BoardParts) -> None:
    """A straight track."""
    layer = _track_layer(node, ctx)
    if layer is None:
        ctx.warn("track-not-copper", "skipped a track on a non-copper layer", node)
        return
    (x0, y0), (x1, y1) = _ends(node, ctx)
    width = ctx.size_of(node, "width")
    # geometry for all straight tracks is built at once by finish_segments;
    # until then they wait as compact numbers (peak memory)
    parts.segment_numbers.extend((x0, y0, x1, y1, width))
    parts.segment_names.append((layer, ctx.canonical(ctx.net_of(find(node, "net")))))
    parts.segment_places.append(ctx.place(node))
    parts.tracks.append(None)


#: Tracks per vectorised batch (keeps peak memory small on big boards).
_BATCH = 1024


def finish_segments(parts: BoardParts) -> None:
    """Give every straight track its copper (vectorised, see geometry.stadiums)."""
    if not parts.segment_names:
        return
    numbers = np.frombuffer(parts.segment_numbers, dtype=float).reshape(-1, 5)
    wide = numbers[:, 4] > 0
    shapes = np.empty(len(numbers), dtype=object)
    rows = np.flatnonzero(wide)
    for first in range(0, len(rows), _BATCH):  # batches bound the temporary arrays
        batch = rows[first:first + _BATCH]
        shapes[batch] = geo.stadiums(numbers[batch, :4], numbers[batch, 4])
    slots = (i for i, track in enumerate(parts.tracks) if track is None)
    places = parts.segment_places
    for k, (index, (layer, net)) in enumerate(zip(slots, parts.segment_names, strict=False)):
        x0, y0, x1, y1, width = (float(v) for v in numbers[k])
        geometry = shapes[k] if wide[k] else geo.stroke(np.array([(x0, y0), (x1, y1)]), 0.0)
        line, column = places[k] if k < len(places) else (None, None)
        parts.tracks[index] = Track(Point(x0, y0), Point(x1, y1), width, layer, net,
                                    math.hypot(x1 - x0, y1 - y0), geometry,
                                    source_line=line, source_column=column)
    parts.segment_names.clear()
    parts.segment_places.clear()
    del numbers
    parts.segment_numbers = array("d")


def read_arc(node: Node, ctx: ReadContext, parts: BoardParts) -> None:
    """A three-point arc track; its length is r·|θ|."""
    layer = _track_layer(node, ctx)
    if layer is None:
        ctx.warn("track-not-copper", "skipped a track on a non-copper layer", node)
        return
    start, end = _ends(node, ctx)
    mid_node = find(node, "mid")
    if mid_node is None:
        raise ctx.error(node, "arc track needs (mid …)")
    mid = ctx.xy(mid_node)
    width = ctx.size_of(node, "width")
    net = ctx.net_of(find(node, "net"))
    try:
        arc = geo.Arc(start, mid, end)
    except ValueError:  # collinear: KiCad draws it straight
        pts = np.array([start, end])
        length = math.dist(start, end)
    else:
        pts, length = arc.points(), arc.length_mm
    line, column = ctx.place(node)
    parts.tracks.append(Track(Point(*start), Point(*end), width, layer, net, length,
                              geo.stroke(pts, width, geo.TRACK_QUAD_SEGS), mid=Point(*mid),
                              source_line=line, source_column=column))


def read_via(node: Node, ctx: ReadContext, parts: BoardParts) -> None:
    """A via with the copper layers it spans, in stack order."""
    at = find(node, "at")
    if at is None:
        raise ctx.error(node, "via has no (at …)")
    x, y = ctx.xy(at)
    flags = set(atoms(node))
    kind = next((k for k in ("micro", "blind", "buried") if k in flags), "through")
    ends = [x for x in layers_of(node, ctx) if ctx.is_copper(x)]
    stack = ctx.copper_layers
    if kind == "through" or len(ends) < 2:
        span = stack
    else:
        i, j = sorted(stack.index(e) for e in ends[:2])
        span = stack[i:j + 1]
        if kind == "blind" and i > 0 and j < len(stack) - 1:
            kind = "buried"  # ≤ 9 writes "blind" for both (§9)
    line, column = ctx.place(node)
    parts.vias.append(Via(x, y, ctx.size_of(node, "size"), ctx.value_of(node, "drill"),
                          tuple(span), ctx.net_of(find(node, "net")), kind,
                          source_line=line, source_column=column))
