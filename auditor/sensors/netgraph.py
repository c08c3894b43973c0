"""Connectivity of one net's copper, for following a sense path.

Nodes are the net's tracks, vias, pads and zone fills, plus one node for the
electrode itself; two nodes are joined when their copper touches on a layer
they share. Walking a track costs its length; pads, vias and zones cost
nothing, so the shortest walk is the routed length a designer would measure
(a junction's stub beyond the branch point is counted whole: the model keeps
tracks as whole segments).
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np
import shapely
from scipy.sparse import coo_matrix
from scipy.sparse.csgraph import dijkstra
from shapely import STRtree
from shapely.geometry.base import BaseGeometry

from auditor.model.board import Board
from auditor.model.items import Pad, Track, Via
from auditor.sensors.pieces import pads_by_net

#: Stand-in for "free" edges: scipy drops explicit zeros from sparse graphs.
_FREE = 1e-9


@dataclass(frozen=True)
class Node:
    """One item of copper in the net graph."""

    kind: str  # electrode, track, via, pad, zone
    layers: tuple[str, ...]
    geometry: BaseGeometry
    length_mm: float = 0.0
    track: Track | None = None
    via: Via | None = None
    pad: Pad | None = None


@dataclass(frozen=True)
class Walk:
    """The nodes from a start node to a goal node, in order."""

    nodes: tuple[Node, ...]

    @property
    def length_mm(self) -> float:
        """Sum of the track lengths walked."""
        return sum(n.length_mm for n in self.nodes)

    @property
    def tracks(self) -> tuple[Track, ...]:
        """The tracks walked, in order."""
        return tuple(n.track for n in self.nodes if n.track is not None)

    @property
    def via_count(self) -> int:
        """Vias walked through."""
        return sum(1 for n in self.nodes if n.kind == "via")


class NetGraph:
    """The copper of one net as a graph; node 0 is the ``start`` geometry when given."""

    def __init__(self, board: Board, net: str, start: tuple[str, BaseGeometry] | None = None):
        self.nodes: list[Node] = []
        self._rep: np.ndarray = np.zeros(0, dtype=int)
        #: Pairs of touching nodes in the graph (copies of an item count once).
        self.edge_count = 0
        if start is not None:
            self.nodes.append(Node("electrode", (start[0],), start[1]))
        self._add_items(board, net)
        self._dist, self._pred = self._solve()

    def _add_items(self, board: Board, net: str) -> None:
        for tr in board.tracks:
            if tr.net == net:
                self.nodes.append(Node("track", (tr.layer,), tr.geometry, tr.length_mm, track=tr))
        for via in board.vias:
            if via.net == net:
                disk = _disk(via.x_mm, via.y_mm, via.diameter_mm / 2)
                self.nodes.append(Node("via", via.layers, disk, via=via))
        for pad in pads_by_net(board).get(net, ()):
            for shape in pad.copper:
                self.nodes.append(Node("pad", (shape.layer,), shape.geometry, pad=pad))
        for zone in board.zones:
            if zone.net == net and not zone.is_rule_area:
                for fill in zone.fills:
                    self.nodes.append(Node("zone", (fill.layer,), fill.geometry))

    def _representatives(self) -> np.ndarray:
        """For each node, the first node of the same kind with the same layers
        and the same copper (duplicated items), else itself.

        Copies of one item touch each other, so their intersection graph is
        complete: thousands of copies would make millions of edges. They are
        interchangeable for the walk, so only the first of them enters the
        graph. Pads and the electrode stay themselves (their identity is
        asked for).
        """
        rep = np.arange(len(self.nodes))
        if not self.nodes:
            return rep
        shapes = shapely.to_wkb(np.asarray([n.geometry for n in self.nodes], dtype=object))
        first: dict[tuple[str, tuple[str, ...], bytes], int] = {}
        for i, (node, shape) in enumerate(zip(self.nodes, shapes, strict=True)):
            if node.kind in ("track", "via", "zone"):
                rep[i] = first.setdefault((node.kind, node.layers, bytes(shape)), i)
        return rep

    def _edges(self, rep: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
        """Pairs of distinct graph nodes whose copper touches on a shared
        layer, found with one bulk spatial-index query per layer."""
        kept = np.flatnonzero(rep == np.arange(len(self.nodes)))
        rows: list[np.ndarray] = []
        cols: list[np.ndarray] = []
        for layer in sorted({lay for i in kept.tolist() for lay in self.nodes[i].layers}):
            idx = np.asarray([i for i in kept.tolist() if layer in self.nodes[i].layers])
            geoms = np.asarray([self.nodes[i].geometry for i in idx.tolist()], dtype=object)
            left, right = STRtree(geoms).query(geoms, predicate="intersects")
            upper = left < right
            rows.append(idx[left[upper]])
            cols.append(idx[right[upper]])
        # A pad's shapes on several layers are one piece of copper (plated hole).
        by_pad: dict[int, list[int]] = {}
        for i, n in enumerate(self.nodes):
            if n.pad is not None:
                by_pad.setdefault(id(n.pad), []).append(i)
        for members in by_pad.values():
            rows.append(np.asarray(members[:-1], dtype=int))
            cols.append(np.asarray(members[1:], dtype=int))
        if not rows:
            return np.zeros(0, dtype=int), np.zeros(0, dtype=int)
        return np.concatenate(rows).astype(int), np.concatenate(cols).astype(int)

    def _solve(self) -> tuple[np.ndarray, np.ndarray]:
        self._rep = self._representatives()
        size = len(self.nodes)
        if size == 0:
            return np.zeros((0,)), np.zeros((0,), dtype=int)
        rows, cols = self._edges(self._rep)
        self.edge_count = len(rows)
        cost = np.array([max(n.length_mm, 0.0) for n in self.nodes])
        weights = (cost[rows] + cost[cols]) / 2 + _FREE
        graph = coo_matrix((weights, (rows, cols)), shape=(size, size)).tocsr()
        dist, pred = dijkstra(graph, directed=False, indices=0, return_predecessors=True)
        return dist[self._rep], pred

    def walk_to(self, goal: int) -> Walk | None:
        """The cheapest walk from node 0 to ``goal``, or ``None`` if unconnected."""
        if goal >= len(self.nodes) or not math.isfinite(float(self._dist[goal])):
            return None
        order = [int(self._rep[goal])]
        while order[-1] != 0:
            order.append(int(self._pred[order[-1]]))
        # a duplicated goal is reached through its first copy, and ends the walk
        return Walk(tuple(self.nodes[i] for i in reversed(order[1:])) + (self.nodes[goal],))

    def reachable(self) -> tuple[Node, ...]:
        """Every node connected to node 0."""
        return tuple(n for i, n in enumerate(self.nodes) if math.isfinite(float(self._dist[i])))

    def pad_node(self, pad: Pad) -> int | None:
        """Index of the nearest (cheapest) node of ``pad``, or ``None``."""
        found = [i for i, n in enumerate(self.nodes) if n.pad is pad]
        if not found:
            return None
        return min(found, key=lambda i: float(self._dist[i]))


def rooted_at_pad(board: Board, pad: Pad) -> NetGraph:
    """A graph of ``pad``'s net whose node 0 is that pad (all its layers)."""
    shape = pad.copper[0]
    return NetGraph(board, pad.net, (shape.layer, shape.geometry))


def _disk(x: float, y: float, radius: float) -> BaseGeometry:
    from shapely.geometry import Point

    return Point(x, y).buffer(radius, quad_segs=16)
