"""Electrode-like copper: connected pieces of one net's area copper on an outer layer.

Real boards draw electrodes as plain or custom pads, zones, or net-less
footprint graphics around a small anchor pad (kicad-format.md §0.9, §14). A
*piece* is one connected polygon of a net's pads, zones and graphics on one
outer layer, with tracks and vias left out (they are the sense path), and with
net-less copper merged in wherever it touches a pad of exactly one net.
"""

from __future__ import annotations

from collections.abc import Collection
from dataclasses import dataclass

from shapely import STRtree
from shapely.geometry import MultiPolygon, Polygon
from shapely.geometry.base import BaseGeometry

from auditor.model.board import Board, CopperItem
from auditor.model.items import Pad, Zone
from auditor.sensors import robust

AREA_SOURCES = ("pad", "zone", "graphic")


@dataclass(frozen=True)
class Piece:
    """One connected piece of area copper of one net on one layer."""

    net: str
    layer: str
    geometry: BaseGeometry
    pads: tuple[Pad, ...]
    zones: tuple[Zone, ...]
    sources: tuple[str, ...]  # sorted kinds: pad, custom pad, zone, graphic, net-less copper
    #: Footprints whose copper graphics are part of the piece (no pad needed).
    graphic_owners: tuple[str, ...] = ()

    @property
    def area_mm2(self) -> float:
        """Copper area of the piece."""
        return float(self.geometry.area)

    @property
    def footprint_uids(self) -> tuple[str, ...]:
        """Footprints with a pad in the piece, sorted."""
        return tuple(sorted({p.footprint_uid for p in self.pads}))

    @property
    def owner_uids(self) -> tuple[str, ...]:
        """Footprints with a pad or a copper graphic in the piece, sorted."""
        return tuple(sorted(set(self.footprint_uids) | set(self.graphic_owners)))


def outer_layers(board: Board) -> tuple[str, ...]:
    """The outer copper layers (front first; one entry on a one-layer board)."""
    layers = board.copper_layers
    if not layers:
        return ()
    return (layers[0],) if len(layers) == 1 else (layers[0], layers[-1])


def pieces_on(board: Board, layer: str, nets: Collection[str]) -> tuple[Piece, ...]:
    """Area-copper pieces of ``nets`` on ``layer``, net-less copper merged in."""
    every = board.items_on(layer)
    items = [it for it in every if it.source in AREA_SOURCES]
    netted = [it for it in items if it.net in nets]
    extra = {net: geoms for net, geoms in _netless_by_net(board, layer, every).items()
             if net in nets}
    by_net: dict[str, list[CopperItem]] = {}
    for it in netted:
        by_net.setdefault(it.net, []).append(it)
    pieces: list[Piece] = []
    for net in sorted(set(by_net) | set(extra)):
        own = by_net.get(net, [])
        merged = extra.get(net, [])
        union = robust.union([it.geometry for it in own] + merged)
        for poly in _polygons(union):
            netless = any(g.intersects(poly) for g in merged)
            pieces.append(_piece(board, net, layer, poly,
                                 own + (_loose_items(board, layer) if netless else []), netless))
    return tuple(pieces)


def _loose_items(board: Board, layer: str) -> list[CopperItem]:
    return [it for it in board.items_on(layer) if it.net == "" and it.source in ("zone", "graphic")]


def _netless_by_net(board: Board, layer: str,
                    items: Collection[CopperItem]) -> dict[str, list[BaseGeometry]]:
    """Net-less copper components keyed by the one net whose pads, tracks or
    vias touch them (an electrode drawn as footprint art, fed by a via)."""
    loose = [it.geometry for it in items if it.net == "" and it.source in ("zone", "graphic")]
    if not loose:
        return {}
    pads = [it for it in items if it.source in ("pad", "track", "via") and it.net != ""]
    if not pads:
        return {}
    tree = STRtree([it.geometry for it in pads])
    out: dict[str, list[BaseGeometry]] = {}
    for comp in _polygons(robust.union(loose)):
        touched = {pads[i].net for i in tree.query(comp, predicate="intersects")}
        if len(touched) == 1:
            out.setdefault(touched.pop(), []).append(comp)
    return out


def _polygons(geom: BaseGeometry) -> list[Polygon]:
    if isinstance(geom, Polygon):
        return [] if geom.is_empty else [geom]
    if isinstance(geom, MultiPolygon):
        return sorted(geom.geoms, key=lambda p: (round(p.bounds[0], 6), round(p.bounds[1], 6)))
    parts = getattr(geom, "geoms", ())
    return [p for g in parts for p in _polygons(g)]


def _piece(board: Board, net: str, layer: str, poly: Polygon, own: list[CopperItem],
           netless: bool) -> Piece:
    probe = poly.buffer(1e-6)
    inside = [it for it in own if it.geometry.intersects(probe)]
    pads = tuple(p for p in _pads_of(board, net) if _touches(p.geometry_on(layer), probe))
    zones = tuple(z for z in _zones_of(board, net) if _touches(z.fill_on(layer), probe))
    sources = {("custom pad" if p.shape == "custom" else "pad") for p in pads}
    sources.update(it.source for it in inside if it.source != "pad")
    owners = tuple(sorted({it.owner for it in inside if it.source == "graphic" and it.owner}))
    if netless:
        sources.add("net-less copper")
    return Piece(net, layer, poly, pads, zones, tuple(sorted(sources)), owners)


def _pads_of(board: Board, net: str) -> tuple[Pad, ...]:
    return pads_by_net(board).get(net, ())


def _zones_of(board: Board, net: str) -> tuple[Zone, ...]:
    return tuple(z for z in board.zones if z.net == net and not z.is_rule_area)


def pads_by_net(board: Board) -> dict[str, tuple[Pad, ...]]:
    """Pads grouped by net name (built once per board)."""
    return board.derived("sensors.pads_by_net", lambda: _group_pads(board))


def _group_pads(board: Board) -> dict[str, tuple[Pad, ...]]:
    grouped: dict[str, list[Pad]] = {}
    for pad in board.pads:
        grouped.setdefault(pad.net, []).append(pad)
    return {net: tuple(pads) for net, pads in grouped.items()}


def _touches(geom: BaseGeometry | None, probe: BaseGeometry) -> bool:
    return geom is not None and not geom.is_empty and geom.intersects(probe)


#: Share of a back piece that front copper of its net must cover to be its twin.
TWIN_SHARE = 0.8


def without_far_side_twins(pieces: list[Piece], front_layer: str) -> list[Piece]:
    """Drop a back piece that is only the far side of the front copper: its pads
    are all pads of a front piece of the net (through-hole pads), or it lies
    under a front piece of the net (one pad drawn on both faces)."""
    front = [p for p in pieces if p.layer == front_layer]
    keys: dict[str, set[tuple[str, str]]] = {}
    for p in front:
        keys.setdefault(p.net, set()).update((q.footprint_uid, q.number) for q in p.pads)

    def twin(p: Piece) -> bool:
        pads = {(q.footprint_uid, q.number) for q in p.pads}
        if pads and set(p.sources) <= {"pad", "custom pad"} and pads <= keys.get(p.net, set()):
            return True
        return any(f.net == p.net and float(robust.intersection(f.geometry, p.geometry).area)
                   >= TWIN_SHARE * p.area_mm2 for f in front)

    return [p for p in pieces if p.layer == front_layer or not twin(p)]
