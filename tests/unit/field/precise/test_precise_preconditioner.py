"""The tile preconditioner is the exact inverse of the operator's tile blocks.

Checked against the dense operator (``CellOperator.dense``) inverted tile by
tile with ``numpy.linalg.inv``; block Jacobi as in Saad 2003, *Iterative
Methods for Sparse Linear Systems*, sec. 10.2 (from memory).
"""

from __future__ import annotations

import numpy as np
from shapely.geometry import Point, box

from auditor.field.precise import LayeredMedium
from auditor.field.precise.cells import grid_around
from auditor.field.precise.edges import near_correction
from auditor.field.precise.medium import high_k_coefficients
from auditor.field.precise.mesh import mesh_levels
from auditor.field.precise.operator import cell_operator, level_kernels
from auditor.field.precise.preconditioner import near_field_preconditioner

MEDIUM = LayeredMedium(((1.0, 3.0), (1.6, 4.4)))


def test_tile_blocks_are_inverted_exactly_and_nothing_else_is_coupled() -> None:
    pad = Point(5, 5).buffer(3.2, quad_segs=32)  # curved edge: partly filled tiles
    conductors = [pad, box(0, 0, 11, 10).difference(Point(5, 5).buffer(4)), box(0, 0, 11, 10)]
    grid = grid_around(conductors, 0.5)
    meshes = mesh_levels(conductors, [1, 1, 2], ["pad", "pour", "plane"], grid, True)
    direct = high_k_coefficients(MEDIUM)
    corrections = tuple(near_correction(grid, m.edges, float(direct[m.level, m.level]))
                        for m in meshes)
    operator = cell_operator(level_kernels(MEDIUM, grid, (1, 2)), tuple(m.cells for m in meshes),
                             corrections, (0, 1))
    dense = operator.dense()
    applied = near_field_preconditioner(operator)(np.eye(operator.size))
    cells = np.concatenate(operator.cells)
    block = np.repeat(np.arange(len(operator.cells)), np.diff(operator.starts))
    tile = block * 10**6 + (cells // grid.ny // 6) * 1000 + (cells % grid.ny) // 6
    same = tile[:, None] == tile[None, :]
    assert np.all(applied[~same] == 0.0)
    assert np.allclose(applied, applied.T, rtol=0, atol=1e-12 * np.abs(applied).max())
    for label in np.unique(tile):
        members = np.flatnonzero(tile == label)
        expected = np.linalg.inv(dense[np.ix_(members, members)])
        assert np.allclose(applied[np.ix_(members, members)], expected, rtol=1e-9,
                           atol=1e-12 * np.abs(expected).max())
