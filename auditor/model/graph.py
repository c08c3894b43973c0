"""The track graph of one net: path lengths along tracks and vias.

Nodes are track end points per layer (snapped to :data:`SNAP_MM`) and via
centres per spanned layer; edges are tracks (their length, r·|θ| for arcs)
and via barrels (length 0: the board thickness is negligible next to routed
lengths and is not what a track-length rule measures). A track end inside a
via's pad joins the via; a track end landing on the middle of another
straight track of the same layer (a T-junction) splits it.
"""

from __future__ import annotations

import math
from collections.abc import Callable, Iterable, Sequence
from functools import cached_property

import numpy as np
import shapely
from scipy.sparse import coo_matrix, csr_matrix
from scipy.sparse.csgraph import dijkstra
from shapely.geometry.base import BaseGeometry

from auditor.model.items import Point, Track, Via

#: Grid on which end points are merged (KiCad's own grid is 1 nm).
SNAP_MM = 1e-4
#: How close a track end must be to another track's centre line to join it.
JOIN_MM = 1e-3

NodeKey = tuple[str, int, int]
_Edge = Callable[[int, int, float], None]
_ByLayer = dict[str, tuple[list[int], shapely.STRtree]]


def _key(layer: str, x: float, y: float) -> NodeKey:
    return layer, round(x / SNAP_MM), round(y / SNAP_MM)


class TrackGraph:
    """Shortest-path lengths along the copper of one net.

    Examples
    --------
    >>> from shapely.geometry import LineString
    >>> t = Track(Point(0, 0), Point(3, 4), 0.2, "F.Cu", "N", 5.0, LineString([(0, 0), (3, 4)]))
    >>> TrackGraph("N", [t], []).path_length(Point(0, 0), Point(3, 4))
    5.0
    """

    def __init__(self, net: str, tracks: Sequence[Track], vias: Sequence[Via]) -> None:
        self.net = net
        self.tracks = tuple(tracks)
        self.vias = tuple(vias)
        self._index: dict[NodeKey, int] = {}
        self._points: list[tuple[str, float, float]] = []
        #: Edges of the graph once built (pairs of nodes joined).
        self.edge_count = 0

    @cached_property
    def _matrix(self) -> csr_matrix:
        """The graph, built on the first path query (totals do not need it)."""
        # One entry per pair of nodes, the shortest: copies of a track are
        # one way, not a path as long as all of them (a sparse matrix would
        # add duplicate entries up), and a board of duplicated items keeps
        # as many edges as distinct ones.
        shortest: dict[tuple[int, int], float] = {}

        def edge(a: int, b: int, w: float) -> None:
            if a != b:
                key = (a, b) if a < b else (b, a)
                weight = max(w, 1e-12)  # csgraph drops explicit zeros
                shortest[key] = min(weight, shortest.get(key, weight))

        for tr in self._distinct_tracks:
            edge(self._node(tr.layer, tr.start), self._node(tr.layer, tr.end), tr.length_mm)
        for via in self._distinct_vias:
            ids = [self._node(layer, Point(via.x_mm, via.y_mm)) for layer in via.layers]
            for a, b in zip(ids, ids[1:], strict=False):
                edge(a, b, 0.0)
        by_layer = self._nodes_by_layer()
        self._join_via_pads(edge, by_layer)
        self._join_t_junctions(edge, by_layer)
        n = len(self._points)
        self.edge_count = len(shortest)
        pairs = np.asarray(list(shortest), dtype=int).reshape(-1, 2)
        weights = np.asarray(list(shortest.values()), dtype=float)
        return coo_matrix((weights, (pairs[:, 0], pairs[:, 1])), shape=(n, n)).tocsr()

    @cached_property
    def _distinct_tracks(self) -> tuple[Track, ...]:
        """The tracks less exact copies (same layer, ends, middle, width)."""
        seen: dict[tuple[object, ...], Track] = {}
        for tr in self.tracks:
            seen.setdefault((tr.layer, tr.start, tr.end, tr.mid, tr.width_mm), tr)
        return tuple(seen.values())

    @cached_property
    def _distinct_vias(self) -> tuple[Via, ...]:
        return tuple(dict.fromkeys(self.vias))

    def _node(self, layer: str, p: Point) -> int:
        key = _key(layer, p.x, p.y)
        found = self._index.get(key)
        if found is None:
            found = self._index[key] = len(self._points)
            self._points.append((layer, p.x, p.y))
        return found

    def _nodes_by_layer(self) -> _ByLayer:
        grouped: dict[str, list[int]] = {}
        for i, (layer, _, _) in enumerate(self._points):
            grouped.setdefault(layer, []).append(i)
        # shapely's tree, not scipy.spatial's: importing scipy.spatial costs
        # about 0.1 s of every run, and these are a few points per net.
        return {layer: (ids, shapely.STRtree(shapely.points([self._points[i][1:] for i in ids])))
                for layer, ids in grouped.items()}

    @staticmethod
    def _within(tree: shapely.STRtree, x: float, y: float, radius: float) -> list[int]:
        """Indexes of the tree's points at most ``radius`` from (x, y), ascending."""
        found = tree.query(shapely.Point(x, y), predicate="dwithin", distance=radius)
        return sorted(int(k) for k in found)

    def _join_via_pads(self, edge: _Edge, by_layer: _ByLayer) -> None:
        for via in self._distinct_vias:
            for layer in via.layers:
                ids, tree = by_layer[layer]
                centre = self._index[_key(layer, via.x_mm, via.y_mm)]
                for k in self._within(tree, via.x_mm, via.y_mm, via.diameter_mm / 2):
                    i = ids[k]
                    if i != centre:
                        _, x, y = self._points[i]
                        edge(centre, i, math.hypot(x - via.x_mm, y - via.y_mm))

    def _join_t_junctions(self, edge: _Edge, by_layer: _ByLayer) -> None:
        for tr in self._distinct_tracks:
            if tr.mid is not None or tr.length_mm <= 0:
                continue
            ids, tree = by_layer[tr.layer]
            a = self._index[_key(tr.layer, tr.start.x, tr.start.y)]
            b = self._index[_key(tr.layer, tr.end.x, tr.end.y)]
            dx, dy = tr.end.x - tr.start.x, tr.end.y - tr.start.y
            centre = ((tr.start.x + tr.end.x) / 2, (tr.start.y + tr.end.y) / 2)
            for k in self._within(tree, *centre, tr.length_mm / 2 + JOIN_MM):
                i = ids[k]
                if i in (a, b):
                    continue
                _, x, y = self._points[i]
                t = ((x - tr.start.x) * dx + (y - tr.start.y) * dy) / tr.length_mm ** 2
                off_line = abs((x - tr.start.x) * dy - (y - tr.start.y) * dx) / tr.length_mm
                if 0 < t < 1 and off_line <= JOIN_MM:
                    edge(a, i, t * tr.length_mm)
                    edge(i, b, (1 - t) * tr.length_mm)

    # -- queries -------------------------------------------------------------
    @property
    def total_length_mm(self) -> float:
        """Sum of the lengths of every track of the net."""
        return math.fsum(t.length_mm for t in self.tracks)

    @property
    def via_count(self) -> int:
        """Number of vias of the net."""
        return len(self.vias)

    def nodes_near(self, point: Point, layer: str | None = None) -> list[int]:
        """The node(s) closest to ``point`` (on ``layer`` if given)."""
        self._matrix  # noqa: B018 - builds the nodes
        best: list[int] = []
        best_d = math.inf
        for i, (lay, x, y) in enumerate(self._points):
            if layer is not None and lay != layer:
                continue
            d = math.hypot(x - point.x, y - point.y)
            if d < best_d - SNAP_MM:
                best, best_d = [i], d
            elif abs(d - best_d) <= SNAP_MM:
                best.append(i)
        return best

    def nodes_in(self, geometry: BaseGeometry, layers: Iterable[str]) -> list[int]:
        """Nodes lying in ``geometry`` (e.g. a pad's copper) on ``layers``."""
        self._matrix  # noqa: B018 - builds the nodes
        wanted = set(layers)
        grown = geometry.buffer(JOIN_MM)
        shapely.prepare(grown)
        return [i for i, (lay, x, y) in enumerate(self._points)
                if lay in wanted and shapely.contains_xy(grown, x, y)]

    def shortest(self, sources: Sequence[int], targets: Sequence[int]) -> float:
        """Shortest path length from any source node to any target node
        (``inf`` if they are not connected by tracks and vias)."""
        if not sources or not targets:
            return math.inf
        dist = dijkstra(self._matrix, directed=False, indices=list(sources), min_only=True)
        value = float(np.min(dist[list(targets)]))
        return 0.0 if value < 1e-9 else value

    def path_length(self, a: Point, b: Point, layer_a: str | None = None,
                    layer_b: str | None = None) -> float:
        """Track length between the nodes nearest to two points."""
        return self.shortest(self.nodes_near(a, layer_a), self.nodes_near(b, layer_b))
