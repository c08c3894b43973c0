"""Chain Edge.Cuts drawings into the board outline (kicad-format.md §11).

Endpoints closer than :data:`ENDPOINT_TOLERANCE_MM` are merged (real files do
not always close their loops exactly); closed shapes are loops already. The
largest loop is the outline, every other loop a cut-out; a board with no
closed loop simply has no outline.
"""

from __future__ import annotations

import numpy as np
import shapely
from scipy.sparse import coo_matrix
from scipy.sparse.csgraph import connected_components
from shapely.geometry import LineString, Polygon
from shapely.geometry.base import BaseGeometry

from auditor.model.items import Outline
from auditor.read.parts import EdgePiece

#: Endpoint gap still treated as closed (common practice, no source: KiCad's
#: own outline builder uses a comparable chaining epsilon).
ENDPOINT_TOLERANCE_MM = 0.01


def build_outline(edges: list[EdgePiece]) -> Outline:
    """The outline and cut-outs from every Edge.Cuts piece."""
    loops: list[BaseGeometry] = []
    for path in _distinct([p.path for p in edges if p.closed and len(p.path) >= 3]):
        ring = Polygon(path)
        loops.append(ring if ring.is_valid else shapely.make_valid(ring))
    open_paths = _distinct([p.path for p in edges if not p.closed and len(p.path) >= 2])
    open_ends = 0
    if open_paths:
        chained, open_ends = _chain(open_paths)
        loops.extend(chained)
    loops = [g for g in loops if g.area > 0]
    if not loops:
        return Outline(None, (), open_ends)
    loops.sort(key=lambda g: -g.area)
    outer, rest = loops[0], tuple(loops[1:])
    inside = [c for c in rest if outer.contains(c.representative_point())]
    polygon = outer.difference(shapely.union_all(inside)) if inside else outer
    return Outline(polygon, rest, open_ends)


def _distinct(paths: list[np.ndarray]) -> list[np.ndarray]:
    """``paths`` less repeats (either direction): a line drawn twice is one
    edge, and thousands of copies would make noding and snapping quadratic."""
    seen: set[bytes] = set()
    out = []
    for path in paths:
        forward, backward = path.tobytes(), path[::-1].tobytes()
        if forward not in seen and backward not in seen:
            seen.add(forward)
            out.append(path)
    return out


def _chain(paths: list[np.ndarray]) -> tuple[list[BaseGeometry], int]:
    snapped = _snap_endpoints(paths)
    noded = shapely.union_all([LineString(p) for p in snapped])
    polygons, cuts, dangles, invalid = shapely.polygonize_full([noded])
    loops = [Polygon(face.exterior) for face in getattr(polygons, "geoms", [])]
    loose = sum(len(getattr(g, "geoms", [])) for g in (cuts, dangles, invalid))
    return loops, 2 * loose


def _snap_endpoints(paths: list[np.ndarray]) -> list[np.ndarray]:
    ends = np.array([p[i] for p in paths for i in (0, -1)], dtype=float)
    # shapely's tree, not scipy.spatial's (whose import costs ~0.1 s a run).
    tree = shapely.STRtree(shapely.points(ends))
    pairs = tree.query(shapely.points(ends), predicate="dwithin",
                       distance=ENDPOINT_TOLERANCE_MM).T
    n = len(ends)
    graph = coo_matrix((np.ones(len(pairs)), (pairs[:, 0], pairs[:, 1])), shape=(n, n))
    _, label = connected_components(graph, directed=False)
    first: dict[int, np.ndarray] = {}
    for i, lab in enumerate(label):
        first.setdefault(int(lab), ends[i])
    out = []
    for k, path in enumerate(paths):
        path = path.copy()
        path[0] = first[int(label[2 * k])]
        path[-1] = first[int(label[2 * k + 1])]
        out.append(path)
    return out
