"""The board: every item read from the file, plus derived data computed once.

A :class:`Board` is frozen. Derived views (per-layer copper per net, spatial
indexes, track graphs) are computed on first use and cached on the instance;
because the board never changes, the cache never goes stale.
"""

from __future__ import annotations

from collections.abc import Callable, Hashable
from dataclasses import dataclass
from functools import cached_property
from typing import TypeVar, cast

from shapely import STRtree
from shapely.geometry.base import BaseGeometry
from shapely.ops import unary_union

from auditor.model.graph import TrackGraph
from auditor.model.items import (
    CopperShape,
    Footprint,
    NetClass,
    Outline,
    Pad,
    ReadWarning,
    Stackup,
    Track,
    Via,
    Zone,
)

_T = TypeVar("_T")


@dataclass(frozen=True)
class CopperItem:
    """One piece of copper on one layer, for spatial queries.

    ``source`` is ``pad``, ``track``, ``via``, ``zone`` or ``graphic``;
    ``owner`` is the footprint uid (pads, footprint graphics) or ``""``.
    """

    layer: str
    net: str
    geometry: BaseGeometry
    source: str
    owner: str = ""


@dataclass(frozen=True)
class Board:
    """Everything padaudit knows about one board file.

    Attributes
    ----------
    path:
        The file it was read from (as given).
    version:
        The file's ``(version N)`` (format date, e.g. 20240108; 4 for KiCad 4).
    copper_layers:
        Copper layer names in stack order, front first.
    netclasses:
        The board's own net classes (KiCad 5) and those of the project file
        beside it (KiCad 6+), read by ``read_board``.
    project_file:
        The ``.kicad_pro`` those came from, or ``""`` when there was none.
    """

    path: str
    version: int
    generator: str
    copper_layers: tuple[str, ...]
    stackup: Stackup
    nets: tuple[str, ...]
    footprints: tuple[Footprint, ...]
    tracks: tuple[Track, ...]
    vias: tuple[Via, ...]
    zones: tuple[Zone, ...]
    graphics: tuple[CopperShape, ...]
    outline: Outline
    netclasses: tuple[NetClass, ...] = ()
    warnings: tuple[ReadWarning, ...] = ()
    project_file: str = ""

    def derived(self, key: Hashable, build: Callable[[], _T]) -> _T:
        """A view derived from the board, built once per ``key`` and kept on
        the board (which never changes, so the view never goes stale).

        Later stages keep their own indexes here instead of in module-level
        caches keyed by ``id(board)``.
        """
        cache = self._derived_cache
        if key not in cache:
            cache[key] = build()
        return cast(_T, cache[key])

    @cached_property
    def _derived_cache(self) -> dict[Hashable, object]:
        return {}

    @cached_property
    def pads(self) -> tuple[Pad, ...]:
        """All pads of all footprints, in file order."""
        return tuple(p for fp in self.footprints for p in fp.pads)

    @cached_property
    def all_graphics(self) -> tuple[CopperShape, ...]:
        """Board-level and footprint copper graphics together."""
        return self.graphics + tuple(g for fp in self.footprints for g in fp.graphics)

    def footprint(self, uid: str) -> Footprint:
        """The footprint with this uid (KeyError if none)."""
        return self._footprints_by_uid[uid]

    @cached_property
    def _footprints_by_uid(self) -> dict[str, Footprint]:
        return {fp.uid: fp for fp in self.footprints}

    @cached_property
    def copper_items(self) -> tuple[CopperItem, ...]:
        """Every piece of copper, one entry per item and layer."""
        items: list[CopperItem] = []
        for pad in self.pads:
            for shape in pad.copper:
                items.append(CopperItem(shape.layer, pad.net, shape.geometry, "pad",
                                        pad.footprint_uid))
        for tr in self.tracks:
            items.append(CopperItem(tr.layer, tr.net, tr.geometry, "track"))
        for via in self.vias:
            from shapely.geometry import Point as _P  # local: keeps import cost off start-up

            disk = _P(via.x_mm, via.y_mm).buffer(via.diameter_mm / 2, quad_segs=16)
            for layer in via.layers:
                items.append(CopperItem(layer, via.net, disk, "via"))
        for zone in self.zones:
            if zone.is_rule_area:
                continue
            for fill in zone.fills:
                items.append(CopperItem(fill.layer, zone.net, fill.geometry, "zone",
                                        zone.footprint_uid))
        for g in self.all_graphics:
            items.append(CopperItem(g.layer, g.net, g.geometry, "graphic", g.footprint_uid))
        return tuple(items)

    def items_on(self, layer: str) -> tuple[CopperItem, ...]:
        """Copper items on one layer."""
        return self._items_by_layer.get(layer, ())

    @cached_property
    def _items_by_layer(self) -> dict[str, tuple[CopperItem, ...]]:
        out: dict[str, list[CopperItem]] = {}
        for item in self.copper_items:
            out.setdefault(item.layer, []).append(item)
        return {k: tuple(v) for k, v in out.items()}

    def spatial_index(self, layer: str) -> STRtree:
        """An STRtree over ``items_on(layer)`` geometries (same order)."""
        cache = self._index_cache
        if layer not in cache:
            cache[layer] = STRtree([it.geometry for it in self.items_on(layer)])
        return cache[layer]

    @cached_property
    def _index_cache(self) -> dict[str, STRtree]:
        return {}

    def copper_of_net(self, layer: str, net: str) -> BaseGeometry:
        """Union of all copper of ``net`` on ``layer`` (cached)."""
        cache = self._union_cache
        key = (layer, net)
        if key not in cache:
            cache[key] = unary_union([it.geometry for it in self.items_on(layer)
                                      if it.net == net])
        return cache[key]

    @cached_property
    def _union_cache(self) -> dict[tuple[str, str], BaseGeometry]:
        return {}

    def attached_copper(self, pad: Pad) -> tuple[CopperItem, ...]:
        """Net-less copper graphics touching ``pad`` on its layers, directly or
        through other net-less graphics: in practice part of the pad's
        electrode (kicad-format.md §0.9, §11)."""
        found: list[CopperItem] = []
        for shape in pad.copper:
            items = self.items_on(shape.layer)
            tree = self.spatial_index(shape.layer)
            frontier = [shape.geometry]
            seen: set[int] = set()
            while frontier:
                geom = frontier.pop()
                for index in tree.query(geom, predicate="intersects"):
                    item = items[int(index)]
                    if int(index) in seen or item.net or item.source != "graphic":
                        continue
                    seen.add(int(index))
                    found.append(item)
                    frontier.append(item.geometry)
        return tuple(found)

    def track_graph(self, net: str) -> TrackGraph:
        """The net's track graph (path lengths along tracks and vias; cached)."""
        cache = self._graph_cache
        if net not in cache:
            tracks, vias = self._routing_by_net.get(net, ([], []))
            cache[net] = TrackGraph(net, tracks, vias)
        return cache[net]

    @cached_property
    def _routing_by_net(self) -> dict[str, tuple[list[Track], list[Via]]]:
        out: dict[str, tuple[list[Track], list[Via]]] = {}
        for tr in self.tracks:
            out.setdefault(tr.net, ([], []))[0].append(tr)
        for via in self.vias:
            out.setdefault(via.net, ([], []))[1].append(via)
        return out

    @cached_property
    def _graph_cache(self) -> dict[str, TrackGraph]:
        return {}

    def nets_on(self, layer: str) -> tuple[str, ...]:
        """Names of nets with copper on ``layer`` (sorted, "" included)."""
        return tuple(sorted({it.net for it in self.items_on(layer)}))
