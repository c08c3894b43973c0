"""Edge-cell correction: partly covered cells on curved or oblique edges.

Centre sampling moves a curved edge by up to half a cell, irregularly from
one cell size to the next, which defeats extrapolation. Here every cell that
the conductor covers at all is kept; a partly covered cell carries its charge
uniformly over the sub-cells (``S x S`` per cell) whose centres lie inside the
conductor, and its potential is matched at their centroid. Only the
interactions with neighbours within ``_REACH`` cells on the same level change;
they are computed from the closed-form rectangle integral and stored as a
sparse, symmetrised correction to the FFT operator.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np
import scipy.sparse
from numpy.typing import NDArray

from auditor.field.precise.cells import CellGrid, subcell_centres
from auditor.field.precise.kernels import (
    lattice_differences,
    rectangle_inverse_distance,
    rectangle_primitive,
)

FloatArray = NDArray[np.float64]
IntArray = NDArray[np.int64]
BoolArray = NDArray[np.bool_]

SUBDIVISIONS = 4
_REACH = 1
_PAIRS_PER_CHUNK = 4096


@dataclass(frozen=True)
class EdgeCells:
    """Sub-cell occupancy of the active cells of one level.

    ``occupied[n]`` is the ``S*S`` mask of unknown ``n``'s sub-cells inside
    its conductor; all True for fully covered cells.
    """

    cells: IntArray
    occupied: BoolArray


def near_correction(grid: CellGrid, level: EdgeCells, direct_coefficient: float
                    ) -> scipy.sparse.csr_matrix:
    """Sparse change of the same-level interaction caused by partly covered cells.

    ``direct_coefficient`` is ``A_ll`` of the level (the ``1/r`` weight of the
    layered Green's function); the smooth remainder is left at cell centres.
    """
    targets, sources = _near_pairs(grid, level)
    size = level.cells.size
    if targets.size == 0:
        return scipy.sparse.csr_matrix((size, size))
    centroid_x, centroid_y = _centroids(grid, level)
    centre_x, centre_y = _centres(grid, level.cells)
    exact = _subcell_potential(grid, level, sources, centroid_x[targets], centroid_y[targets])
    nominal = _cell_potential(grid, centre_x[sources], centre_y[sources],
                              centre_x[targets], centre_y[targets])
    change = 2.0 * direct_coefficient * (exact - nominal)
    matrix = scipy.sparse.csr_matrix((change, (targets, sources)), shape=(size, size))
    return (0.5 * (matrix + matrix.T)).tocsr()


def _near_pairs(grid: CellGrid, level: EdgeCells) -> tuple[IntArray, IntArray]:
    """Pairs (target, source) within reach where either cell is partly covered."""
    lookup = np.full(grid.nx * grid.ny, -1, dtype=np.int64)
    lookup[level.cells] = np.arange(level.cells.size)
    partial = np.flatnonzero(~level.occupied.all(axis=1))
    ix, iy = level.cells[partial] // grid.ny, level.cells[partial] % grid.ny
    shifts = np.arange(-_REACH, _REACH + 1)
    jx = ix[:, None, None] + shifts[None, :, None]
    jy = iy[:, None, None] + shifts[None, None, :]
    inside = (jx >= 0) & (jx < grid.nx) & (jy >= 0) & (jy < grid.ny)
    neighbour = np.where(inside, lookup[np.clip(jx * grid.ny + jy, 0, lookup.size - 1)], -1)
    edge = np.broadcast_to(partial[:, None, None], neighbour.shape)
    keep = neighbour >= 0
    first, second = edge[keep], neighbour[keep]
    size = np.int64(level.cells.size)
    keys = np.sort(np.concatenate([first * size + second, second * size + first]))
    # Sorted and deduplicated by hand: numpy 2's np.unique hashes first and
    # was ten times slower here.
    new = np.ones(keys.size, dtype=bool)
    new[1:] = keys[1:] != keys[:-1]
    keys = keys[new]
    return keys // size, keys % size


def _centres(grid: CellGrid, cells: IntArray) -> tuple[FloatArray, FloatArray]:
    x = grid.x0_mm + (cells // grid.ny + 0.5) * grid.cell_mm
    y = grid.y0_mm + (cells % grid.ny + 0.5) * grid.cell_mm
    return np.asarray(x, dtype=float), np.asarray(y, dtype=float)


def _centroids(grid: CellGrid, level: EdgeCells) -> tuple[FloatArray, FloatArray]:
    x, y = subcell_centres(grid, level.cells, SUBDIVISIONS)
    count = level.occupied.sum(axis=1)
    return (np.where(level.occupied, x, 0.0).sum(axis=1) / count,
            np.where(level.occupied, y, 0.0).sum(axis=1) / count)


def _subcell_potential(grid: CellGrid, level: EdgeCells, sources: IntArray,
                       at_x: FloatArray, at_y: FloatArray) -> FloatArray:
    """``int dA / r`` at the points from the source cells' charge spread over their
    occupied sub-cells, scaled to the charge a full uniform cell would carry.

    A fully covered source is one rectangle; partly covered ones are summed
    over their sub-cells in chunks, which bounds the temporary arrays.
    """
    occupied = level.occupied[sources]
    full = occupied.all(axis=1)
    centre_x, centre_y = _centres(grid, level.cells[sources[full]])
    values = np.empty(sources.size)
    values[full] = _cell_potential(grid, centre_x, centre_y, at_x[full], at_y[full])
    partial = np.flatnonzero(~full)
    for first in range(0, partial.size, _PAIRS_PER_CHUNK):
        chunk = partial[first:first + _PAIRS_PER_CHUNK]
        cells = level.cells[sources[chunk]]
        steps = np.arange(SUBDIVISIONS + 1) * (grid.cell_mm / SUBDIVISIONS)
        x = grid.x0_mm + (cells // grid.ny) * grid.cell_mm - at_x[chunk]
        y = grid.y0_mm + (cells % grid.ny) * grid.cell_mm - at_y[chunk]
        corners = rectangle_primitive((x[:, None] + steps)[:, :, None],
                                      (y[:, None] + steps)[:, None, :], 0.0)
        # sub-cell (i, j) is mask column i * S + j, as in subcell_centres
        parts = lattice_differences(corners).reshape(chunk.size, -1)
        mask = occupied[chunk]
        values[chunk] = (np.where(mask, parts, 0.0).sum(axis=1)
                         * (SUBDIVISIONS * SUBDIVISIONS) / mask.sum(axis=1))
    return values


def _cell_potential(grid: CellGrid, source_x: FloatArray, source_y: FloatArray,
                    at_x: FloatArray, at_y: FloatArray) -> FloatArray:
    half = 0.5 * grid.cell_mm
    dx, dy = source_x - at_x, source_y - at_y
    return rectangle_inverse_distance(dx - half, dx + half, dy - half, dy + half, 0.0)
