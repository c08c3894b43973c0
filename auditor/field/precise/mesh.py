"""Cells of each conductor: which cells are kept, who owns them, their sub-cell masks."""

from __future__ import annotations

from collections.abc import Sequence
from dataclasses import dataclass
from itertools import combinations

import numpy as np
import shapely
from numpy.typing import NDArray

from auditor.errors import UsageError
from auditor.field.precise.cells import CellGrid, covered_subcells, rasterised
from auditor.field.precise.edges import SUBDIVISIONS, EdgeCells

IntArray = NDArray[np.int64]
FloatArray = NDArray[np.float64]
BoolArray = NDArray[np.bool_]


@dataclass(frozen=True)
class LevelMesh:
    """Active cells of one level: flat cell indices, owning conductor, sub-cell masks.

    ``owner`` indexes the conductor list given to :func:`mesh_levels`.
    """

    level: int
    cells: IntArray
    owner: IntArray
    edges: EdgeCells


def mesh_levels(conductors: Sequence[shapely.Geometry], levels_of: Sequence[int],
                names: Sequence[str], grid: CellGrid, edge_correction: bool
                ) -> tuple[LevelMesh, ...]:
    """Mesh every level carrying one of the conductors, in level order.

    With ``edge_correction`` a cell belongs to the conductor covering most of
    it (counted in sub-cell centres) and is kept if any of its sub-cell
    centres is inside; otherwise it belongs to the conductor holding its
    centre.
    """
    out = []
    for level in sorted(set(levels_of)):
        on_level = [i for i, lvl in enumerate(levels_of) if lvl == level]
        _check_disjoint([conductors[i] for i in on_level], [names[i] for i in on_level],
                        level)
        if edge_correction:
            cells, owner, occupied = _edge_mesh([conductors[i] for i in on_level], grid)
        else:
            cells, owner, occupied = _centre_mesh([conductors[i] for i in on_level], grid)
        owner = np.array(on_level, dtype=np.int64)[owner]
        for i in on_level:
            if not np.any(owner == i):
                raise UsageError(f"conductor {names[i]!r} is smaller than one "
                                 f"{grid.cell_mm} mm cell; use smaller cells")
        out.append(LevelMesh(level, cells, owner, EdgeCells(cells, occupied)))
    return tuple(out)


def _edge_mesh(geometries: list[shapely.Geometry], grid: CellGrid
               ) -> tuple[IntArray, IntArray, BoolArray]:
    size = SUBDIVISIONS * SUBDIVISIONS
    shares = np.zeros((len(geometries), grid.nx * grid.ny))
    sampled = []
    for n, geometry in enumerate(geometries):
        shares[n], mixed, masks = covered_subcells(geometry, grid, SUBDIVISIONS)
        sampled.append((mixed, masks))
    best = np.argmax(shares, axis=0)
    best_share = shares[best, np.arange(shares.shape[1])]
    cells = np.flatnonzero(best_share > 0.0).astype(np.int64)
    owner = best[cells].astype(np.int64)
    occupied = np.ones((cells.size, size), dtype=bool)
    for n, (mixed, masks) in enumerate(sampled):
        mine = np.isin(mixed, cells[owner == n])
        rows = np.searchsorted(cells, mixed[mine])
        occupied[rows] = masks[mine]
    return cells, owner, occupied


def _centre_mesh(geometries: list[shapely.Geometry], grid: CellGrid
                 ) -> tuple[IntArray, IntArray, BoolArray]:
    owner_of = np.full(grid.nx * grid.ny, -1, dtype=np.int64)
    for n, geometry in enumerate(geometries):
        owner_of[rasterised(geometry, grid)] = n
    cells = np.flatnonzero(owner_of >= 0).astype(np.int64)
    occupied = np.ones((cells.size, SUBDIVISIONS * SUBDIVISIONS), dtype=bool)
    return cells, owner_of[cells], occupied


def _check_disjoint(geometries: list[shapely.Geometry], names: list[str], level: int) -> None:
    for (first, a), (second, b) in combinations(zip(geometries, names, strict=True), 2):
        # intersects() is cheap and false for the usual gap between pad and pour;
        # the area of the intersection is only computed when it is not.
        if first.intersects(second) and shapely.intersection(first, second).area > 1e-9:
            raise UsageError(f"conductors {a!r} and {b!r} overlap on level {level}")
