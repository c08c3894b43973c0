"""Starting guesses of the batched solve, and CG from a starting guess.

Checked against dense direct solves (``numpy.linalg.solve``) of the same
matrices. The Galerkin property used (the error of the best combination in
a subspace is A-orthogonal to that subspace) is the standard projection
argument, e.g. Saad 2003, *Iterative Methods for Sparse Linear Systems*,
sec. 5.2 (from memory).
"""

from __future__ import annotations

import numpy as np
from shapely.geometry import Point, box

from auditor.field.precise import LayeredMedium
from auditor.field.precise.cells import grid_around
from auditor.field.precise.guess import reused_columns, starting_guess
from auditor.field.precise.mesh import mesh_levels
from auditor.field.precise.operator import cell_operator, conjugate_gradient, level_kernels


def test_columns_are_matched_by_their_conductors_not_their_node_numbers() -> None:
    # bare: pad (0), ground tied from pieces 1 and 2; touched: pad, finger (3), ground
    members = [[frozenset({0}), frozenset({1, 2})],
               [frozenset({0}), frozenset({3}), frozenset({1, 2})]]
    columns = [(0, 0), (0, 1), (1, 0), (1, 1), (1, 2)]
    assert reused_columns(members, columns, bare=0) == {2: 0, 4: 1}


def _spd(size: int, seed: int) -> np.ndarray:
    rng = np.random.default_rng(seed)
    factor = rng.standard_normal((size, size))
    return factor @ factor.T + size * np.eye(size)


def test_galerkin_correction_leaves_a_residual_orthogonal_to_the_companions() -> None:
    """With exact companion solves, ``X_F^T (b - A x0) = 0``."""
    matrix = _spd(12, 1)
    rhs = np.zeros((12, 3))
    rhs[:5, 0] = rhs[:5, 2] = 1.0  # column 2 drives what the bare column 0 drives
    rhs[9:, 1] = 1.0               # column 1: the variant's own conductor
    bare = np.linalg.solve(matrix[:9, :9], rhs[:9, 0])
    charge = np.zeros((12, 3))
    charge[:9, 0] = bare
    charge[:, 1] = np.linalg.solve(matrix, rhs[:, 1])
    residual = rhs - matrix @ charge
    residual[:, 0] = 0.0  # the bare column is solved on its own cells
    guess = starting_guess({2: 0}, [(0, 0), (1, 1), (1, 0)], rhs, charge, residual)
    left = rhs[:, 2] - matrix @ guess[:, 0]
    assert abs(charge[:, 1] @ left) < 1e-12 * np.abs(rhs).sum()
    exact = np.linalg.solve(matrix, rhs[:, 2])
    error = guess[:, 0] - exact
    plain = charge[:, 0] - exact
    assert error @ matrix @ error < plain @ matrix @ plain  # better than the bare charges


def test_cg_from_a_starting_guess_reaches_the_direct_solution() -> None:
    matrix = _spd(40, 2)
    rhs = np.random.default_rng(3).standard_normal((40, 2))
    start = np.linalg.solve(matrix, rhs) + 0.1 * np.random.default_rng(4).standard_normal((40, 2))
    solution, residual, _ = conjugate_gradient(lambda values, live: matrix @ values,
                                               lambda values: values / np.diag(matrix)[:, None],
                                               rhs, 1e-10, 200, initial=start)
    assert np.allclose(solution, np.linalg.solve(matrix, rhs), rtol=0, atol=1e-8)
    assert np.allclose(residual, rhs - matrix @ solution, rtol=0, atol=1e-8)


def test_touched_pad_starts_close_to_its_solution() -> None:
    """Pad over a plane, finger above: the baseline charges corrected by the
    finger's own solution leave a fraction of the baseline charges' residual."""
    medium = LayeredMedium(((1.5, 3.0), (1.6, 4.4)))
    pad = Point(6, 6).buffer(3, quad_segs=32)
    conductors = [pad, box(0, 0, 12, 12).difference(Point(6, 6).buffer(4)), box(0, 0, 12, 12),
                  Point(6, 6).buffer(3.5, quad_segs=32)]
    levels = [1, 1, 2, 0]
    grid = grid_around(conductors, 0.5)
    meshes = mesh_levels(conductors, levels, ["pad", "pour", "plane", "finger"], grid, False)
    kernels = level_kernels(medium, grid, (0, 1, 2))
    operator = cell_operator(kernels, tuple(m.cells for m in meshes))
    dense = operator.dense()
    owner = np.concatenate([m.owner for m in meshes])
    fixed = owner != 3
    rhs = np.stack([owner == 0, owner == 3, owner == 0], axis=1).astype(float)
    charge = np.zeros_like(rhs)
    charge[fixed, 0] = np.linalg.solve(dense[np.ix_(fixed, fixed)], rhs[fixed, 0])
    charge[:, 1] = np.linalg.solve(dense, rhs[:, 1])
    residual = np.zeros_like(rhs)
    guess = starting_guess({2: 0}, [(0, 0), (1, 1), (1, 0)], rhs, charge, residual)
    left = np.linalg.norm(rhs[:, 2] - dense @ guess[:, 0]) / np.linalg.norm(rhs[:, 2])
    bare_only = np.linalg.norm(rhs[:, 2] - dense @ charge[:, 0]) / np.linalg.norm(rhs[:, 2])
    assert left < 0.25 * bare_only  # measured 0.16 against 0.67
