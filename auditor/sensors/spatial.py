"""Fast local views of a board's copper.

Hatched pours are single polygons with thousands of holes; testing or
cutting them against a small region costs time proportional to their size.
So queries here go by bounding box first, filter by net, and cut big
polygons with ``clip_by_rect`` (a linear-time rectangle clip) before any
exact operation. Results that do not depend on the electrode (which zone
pieces are islands) are computed once per board.
"""

from __future__ import annotations

from collections.abc import Callable, Sequence
from dataclasses import dataclass

import numpy as np
import shapely
from shapely import STRtree
from shapely.geometry import MultiPolygon, Polygon
from shapely.geometry.base import BaseGeometry

from auditor.model.board import Board, CopperItem
from auditor.sensors import robust

Bounds = tuple[float, float, float, float]


#: Items with more vertices than this are cut into tiles for local queries.
TILE_VERTICES = 400
#: Tiles are not cut smaller than this (mm): a few hatch pitches.
TILE_MM = 4.0


@dataclass(frozen=True)
class Piece:
    """A copper item, or one tile of a big one (same net, source and layer)."""

    item: CopperItem
    geometry: BaseGeometry


def tiled(board: Board, layer: str) -> tuple[tuple[Piece, ...], STRtree]:
    """The layer's copper with big items cut into ``TILE_MM`` tiles, and an index
    (built once per board and layer)."""
    return board.derived(("sensors.tiled", layer), lambda: _tiled(board, layer))


def _tiled(board: Board, layer: str) -> tuple[tuple[Piece, ...], STRtree]:
    pieces: list[Piece] = []
    for item in _distinct(board.items_on(layer)):
        if shapely.get_num_coordinates(item.geometry) <= TILE_VERTICES:
            pieces.append(Piece(item, item.geometry))
            continue
        pieces += [Piece(item, tile) for tile in _tiles_of(item.geometry)]
    return tuple(pieces), STRtree([p.geometry for p in pieces])


def _distinct(items: Sequence[CopperItem]) -> list[CopperItem]:
    """``items`` less exact copies (same net, kind and copper) of an earlier
    one: copies add no copper, and a board made by duplicating one track
    thousands of times would otherwise cost every local query that many
    intersections and unions."""
    if not items:
        return []
    shapes = shapely.to_wkb(np.asarray([it.geometry for it in items], dtype=object))
    seen: set[tuple[str, str, str, bytes]] = set()
    out = []
    for item, shape in zip(items, shapes, strict=True):
        key = (item.net, item.source, item.owner, bytes(shape))
        if key not in seen:
            seen.add(key)
            out.append(item)
    return out


def _tiles_of(geom: BaseGeometry) -> list[BaseGeometry]:
    """Halve along the longer side until each part is small (O(n log n) clipping)."""
    if geom.is_empty or geom.area <= 0:
        return []
    x0, y0, x1, y1 = geom.bounds
    small = max(x1 - x0, y1 - y0) <= TILE_MM
    if small or shapely.get_num_coordinates(geom) <= TILE_VERTICES:
        return [geom]
    if x1 - x0 >= y1 - y0:
        xm = (x0 + x1) / 2
        halves = ((x0, y0, xm, y1), (xm, y0, x1, y1))
    else:
        ym = (y0 + y1) / 2
        halves = ((x0, y0, x1, ym), (x0, ym, x1, y1))
    return [t for box in halves for t in _tiles_of(shapely.clip_by_rect(geom, *box))]


def pieces_in(board: Board, layer: str, region: BaseGeometry,
              keep: Callable[[CopperItem], bool]) -> list[Piece]:
    """Copper pieces on ``layer`` that meet ``region``, cut to it, of items ``keep`` accepts."""
    pieces, tree = tiled(board, layer)
    if not pieces:
        return []
    shapely.prepare(region)
    found = []
    for i in sorted(int(k) for k in tree.query(region)):
        piece = pieces[i]
        if not keep(piece.item) or not region.intersects(piece.geometry):
            continue
        if region.contains(piece.geometry):
            found.append(piece)
            continue
        cut = robust.intersection(piece.geometry, region)
        if not cut.is_empty:
            found.append(Piece(piece.item, cut))
    return found


def items_in_box(board: Board, layer: str, bounds: Bounds,
                 keep: Callable[[CopperItem], bool]) -> list[CopperItem]:
    """Items on ``layer`` whose boxes meet ``bounds`` and that ``keep`` accepts."""
    items = board.items_on(layer)
    if not items:
        return []
    box = shapely.box(*bounds)
    return [items[int(i)] for i in sorted(board.spatial_index(layer).query(box))
            if keep(items[int(i)])]


def clipped(geometry: BaseGeometry, bounds: Bounds) -> BaseGeometry:
    """``geometry`` cut to the rectangle ``bounds`` (cheap for big polygons)."""
    return shapely.clip_by_rect(geometry, *bounds)


def grown(bounds: Bounds, margin: float) -> Bounds:
    """``bounds`` grown by ``margin`` on every side."""
    return bounds[0] - margin, bounds[1] - margin, bounds[2] + margin, bounds[3] + margin


def polygons(geom: BaseGeometry) -> list[Polygon]:
    """The polygons in any geometry."""
    if isinstance(geom, Polygon):
        return [] if geom.is_empty else [geom]
    if isinstance(geom, MultiPolygon):
        return list(geom.geoms)
    return [p for part in getattr(geom, "geoms", ()) for p in polygons(part)]


@dataclass(frozen=True)
class Island:
    """A piece of a zone's fill that touches no other copper of its net."""

    layer: str
    net: str
    geometry: Polygon


def zone_islands(board: Board) -> tuple[Island, ...]:
    """Zone fill pieces with no pad, via, track or graphic of their net on them
    (found once per board)."""
    return board.derived("sensors.zone_islands", lambda: _zone_islands(board))


def _zone_islands(board: Board) -> tuple[Island, ...]:
    found: list[Island] = []
    for zone in board.zones:
        if zone.is_rule_area or not zone.net:
            continue
        for fill in zone.fills:
            for piece in polygons(fill.geometry):
                if not _connected(board, fill.layer, zone.net, piece):
                    found.append(Island(fill.layer, zone.net, piece))
    return tuple(found)


def _connected(board: Board, layer: str, net: str, piece: Polygon) -> bool:
    shapely.prepare(piece)
    for item in items_in_box(board, layer, piece.bounds,
                             lambda it: it.net == net and it.source != "zone"):
        if piece.intersects(item.geometry):
            return True
    return False


def _fills_area(board: Board, layer: str, net: str, pieces: tuple[Piece, ...]) -> float:
    """Area of the union of ``net``'s zone fills on ``layer``: their areas
    less what each two of them share, found tile by tile (uniting two
    hatched pours whole took 0.1 s on the demo board). Copper that three
    or more fills share is subtracted once too often: overlapping pours of
    one net are rare, and a few mm² do not matter to a ground's area."""
    fills = [f.geometry for z in board.zones if z.net == net and not z.is_rule_area
             for f in z.fills if f.layer == layer]
    total = sum(float(f.area) for f in fills)
    if len(fills) < 2:
        return total
    mine = [p for p in pieces if p.item.source == "zone" and p.item.net == net]
    geometries = [p.geometry for p in mine]
    left, right = STRtree(geometries).query(geometries, predicate="intersects")
    for a, b in zip(left.tolist(), right.tolist(), strict=True):
        if a < b and mine[a].item is not mine[b].item:
            total -= float(robust.intersection(mine[a].geometry, mine[b].geometry).area)
    return total


def _outside_fills_area(board: Board, layer: str, net: str, pieces: tuple[Piece, ...],
                        tree: STRtree) -> float:
    """Area of ``net``'s other copper on ``layer`` (pads, tracks, vias,
    graphics) outside its zone fills, item by item."""
    items = [it for it in board.items_on(layer) if it.net == net and it.source != "zone"]
    if not items:
        return 0.0
    geometries = [it.geometry for it in items]
    owner, index = tree.query(geometries)
    keep = [k for k, i in enumerate(index.tolist())
            if pieces[i].item.source == "zone" and pieces[i].item.net == net]
    covered = np.zeros(len(items))
    if keep:
        firsts, parts = owner[keep], index[keep]
        shared = shapely.area(shapely.intersection(
            np.asarray(geometries, dtype=object)[firsts],
            np.asarray([pieces[i].geometry for i in parts.tolist()], dtype=object)))
        np.add.at(covered, firsts, shared)
    own = shapely.area(np.asarray(geometries, dtype=object))
    return float(np.maximum(own - covered, 0.0).sum())


def net_copper_area(board: Board, net: str) -> float:
    """Copper area of ``net`` over all layers (mm²).

    Zone fills count whole (their union per layer when several zones share
    one, :func:`_fills_area`);
    other items count for the part outside the fills. Overlaps between
    non-zone items (a track end on its pad) are counted twice: a few mm² on
    a ground of thousands, well inside what a pad-to-ground ratio needs.
    """
    return board.derived(("sensors.net_copper_area", net), lambda: _net_copper_area(board, net))


def _net_copper_area(board: Board, net: str) -> float:
    total = 0.0
    for layer in board.copper_layers:
        pieces, tree = tiled(board, layer)
        total += _fills_area(board, layer, net, pieces)
        total += _outside_fills_area(board, layer, net, pieces, tree)
    return total
