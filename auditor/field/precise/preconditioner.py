"""Block-Jacobi preconditioner of the moment-method operator over square tiles."""

from __future__ import annotations

from collections.abc import Callable

import numpy as np
import scipy.sparse
from numpy.typing import NDArray

from auditor.field.precise.cells import CellGrid
from auditor.field.precise.operator import CellOperator

FloatArray = NDArray[np.float64]
IntArray = NDArray[np.int64]

_TILE_CELLS = 6
_TILES_PER_CHUNK = 256


def near_field_preconditioner(operator: CellOperator) -> Callable[[FloatArray], FloatArray]:
    """Block-Jacobi over square tiles of cells on each level.

    Each tile's dense self-interaction is inverted exactly; the blocks are
    symmetric positive definite, so the result suits preconditioned CG. The
    inverses are applied as one sparse matrix holding the occupied entries
    only: tiles on a conductor's edge are partly empty (on the demo about
    half the slots), and a sparse product is about twice as fast as a
    product of padded dense blocks.
    """
    rows: list[NDArray[np.int32]] = []
    cols: list[NDArray[np.int32]] = []
    values: list[FloatArray] = []
    for n, (a, cells) in enumerate(zip(operator.block_levels, operator.cells, strict=True)):
        local = _tile_members(operator.kernels.grid, cells)
        near = operator.near_correction[operator.starts[n]:operator.starts[n + 1],
                                        operator.starts[n]:operator.starts[n + 1]]
        # In chunks of tiles: the index and block arrays of a large pour's
        # thousands of tiles would otherwise set the solve's peak memory.
        for first in range(0, local.shape[0], _TILES_PER_CHUNK):
            chunk = local[first:first + _TILES_PER_CHUNK]
            valid = chunk >= 0
            blocks = _tile_blocks(operator.kernels.quadrants[a][a],
                                  cells[np.where(valid, chunk, 0)],
                                  operator.kernels.grid.ny, valid)
            _add_near_entries(blocks, chunk, near)
            inverses = np.asarray(np.linalg.inv(blocks), dtype=np.float64)
            pairs = valid[:, :, None] & valid[:, None, :]
            # 32-bit indices (what the sparse matrix keeps anyway): the
            # index lists are the larger part of the build's peak memory.
            members = (chunk + operator.starts[n]).astype(np.int32)
            rows.append(np.broadcast_to(members[:, :, None], pairs.shape)[pairs])
            cols.append(np.broadcast_to(members[:, None, :], pairs.shape)[pairs])
            values.append(inverses[pairs])
    matrix = _assembled(rows, cols, values, operator.size)

    def apply(residual: FloatArray) -> FloatArray:
        result: FloatArray = matrix @ residual
        return result

    return apply


def _assembled(rows: list[NDArray[np.int32]], cols: list[NDArray[np.int32]],
               values: list[FloatArray], size: int) -> scipy.sparse.csr_matrix:
    """One CSR matrix of the tiles' entries; the chunk lists are emptied as
    they are joined, so no chunk is held twice."""
    data = np.concatenate(values)
    values.clear()
    coordinates = (np.concatenate(rows), np.concatenate(cols))
    rows.clear()
    cols.clear()
    return scipy.sparse.csr_matrix((data, coordinates), shape=(size, size))


def _add_near_entries(blocks: FloatArray, members: IntArray,
                      near: scipy.sparse.csr_matrix) -> None:
    """Add the sparse edge correction to the tile blocks it falls in.

    ``members`` are the tiles' unknowns (-1 for padding) in ``near``'s
    numbering; entries between unknowns of different tiles, or of tiles not
    in ``members``, are left out.
    """
    if near.nnz == 0:
        return
    tile_of = np.full(near.shape[0], -1, dtype=np.int64)
    slot_of = np.zeros(near.shape[0], dtype=np.int64)
    tiles, slots = np.nonzero(members >= 0)
    tile_of[members[tiles, slots]] = tiles
    slot_of[members[tiles, slots]] = slots
    entries = near.tocoo()
    same = (tile_of[entries.row] == tile_of[entries.col]) & (tile_of[entries.row] >= 0)
    np.add.at(blocks, (tile_of[entries.row[same]], slot_of[entries.row[same]],
                       slot_of[entries.col[same]]), entries.data[same])


def _tile_members(grid: CellGrid, cells: IntArray) -> IntArray:
    """Local unknown indices per tile, padded with -1, shape ``(tiles, T*T)``."""
    ix, iy = cells // grid.ny, cells % grid.ny
    tiles_y = -(-grid.ny // _TILE_CELLS)
    tile = (ix // _TILE_CELLS) * tiles_y + iy // _TILE_CELLS
    order = np.argsort(tile, kind="stable")
    tile_sorted = tile[order]
    # Run starts of the sorted labels (np.unique hashes first: slower).
    starts = np.ones(tile_sorted.size, dtype=bool)
    starts[1:] = tile_sorted[1:] != tile_sorted[:-1]
    first = np.flatnonzero(starts)
    unique = tile_sorted[first]
    rank = np.arange(cells.size) - np.repeat(first, np.diff(np.append(first, cells.size)))
    members = np.full((unique.size, _TILE_CELLS * _TILE_CELLS), -1, dtype=np.int64)
    members[np.searchsorted(unique, tile_sorted), rank] = order
    return members


def _tile_blocks(quadrant: FloatArray, cells: IntArray, ny: int, valid: NDArray[np.bool_]
                 ) -> FloatArray:
    ix, iy = cells // ny, cells % ny
    dx = np.abs(ix[:, :, None] - ix[:, None, :])
    dy = np.abs(iy[:, :, None] - iy[:, None, :])
    block = quadrant[dx, dy]
    pair_valid = valid[:, :, None] & valid[:, None, :]
    identity = np.broadcast_to(np.eye(valid.shape[1]), block.shape)
    result: FloatArray = np.where(pair_valid, block, identity * quadrant[0, 0])
    return result
