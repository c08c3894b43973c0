"""One batched moment-method system: fixed conductors plus alternative variants.

The fixed conductors are meshed once; each variant (a finger at one place,
or nothing) adds its own blocks of cells on levels the fixed conductors do
not use. Every right-hand side (one per conductor and variant) sees the fixed
blocks and its own variant's blocks only, so one CG run on one operator
(one grid, one set of kernels, one preconditioner) solves all variants, and
levels a column does not use cost it no FFTs.
"""

from __future__ import annotations

from collections.abc import Sequence
from dataclasses import dataclass

import numpy as np
from numpy.typing import NDArray
from scipy.constants import epsilon_0

from auditor.field.precise.cells import CellGrid
from auditor.field.precise.edges import near_correction
from auditor.field.precise.guess import reused_columns, starting_guess
from auditor.field.precise.medium import LayeredMedium, high_k_coefficients
from auditor.field.precise.mesh import LevelMesh
from auditor.field.precise.operator import (
    CellOperator,
    cell_operator,
    conjugate_gradient,
    level_kernels,
)
from auditor.field.precise.preconditioner import near_field_preconditioner

FloatArray = NDArray[np.float64]
IntArray = NDArray[np.int64]
BoolArray = NDArray[np.bool_]

#: Charge in (V/mm) x mm^2 units to pF: 4 pi eps0 per mm, in pF.
PF_PER_KERNEL_UNIT = 4.0 * np.pi * epsilon_0 * 1e-3 * 1e12
#: From this CG tolerance on, the operator transforms in single precision
#: (:func:`auditor.field.precise.operator.level_kernels`): its relative
#: error, about 1e-7, stays a hundred times below the tolerance. Tighter
#: solves (the analytic cross-checks run at 1e-6) keep double precision.
SINGLE_PRECISION_FROM = 1e-5


@dataclass(frozen=True)
class BatchedSolution:
    """Capacitances per variant: ``totals[g][i, j]`` is the charge (pF at 1 V) on
    conductor ``i`` of variant ``g`` when conductor ``j`` is at 1 V, the rest at 0 V.

    ``totals`` are the variational estimates ``b_i.q_j + q_i.r_j`` (``b`` the
    right-hand sides, ``q`` the charges, ``r = b - A q`` the final residuals):
    for the symmetric positive definite operator their error is
    ``-(q_i - q_i*) A (q_j - q_j*)``, second order in the CG error, where the
    plain charge sums ``raw`` (``b_i.q_j``) are first order. Measured on the
    demo's pads: at relative residual 1e-4 the variational values are within
    2e-8 of converged ones, the plain sums within 7e-6 (at 1e-6: 4e-8).
    """

    totals: tuple[FloatArray, ...]
    raw: tuple[FloatArray, ...]
    unknowns: tuple[int, ...]
    iterations: int


@dataclass(frozen=True)
class Variant:
    """One variant of a batched solve.

    ``meshes``: its own meshed levels (conductor indices counting on from the
    fixed ones); ``node_of[i]``: the node (tied conductors share one) of
    conductor ``i``, fixed ones first; ``driven``: the nodes put at 1 V in
    turn, the rows and columns of its matrix (every other node at 0 V).
    """

    meshes: tuple[LevelMesh, ...]
    node_of: IntArray
    driven: tuple[int, ...]


def solve_batched(fixed: Sequence[LevelMesh], variants: Sequence[Variant], grid: CellGrid,
                  medium: LayeredMedium, tolerance: float, edge_correction: bool
                  ) -> BatchedSolution:
    """Solve the fixed meshes with each variant's meshes in one CG run."""
    meshes = list(fixed) + [m for v in variants for m in v.meshes]
    group_of = np.array([-1] * len(fixed) + [g for g, v in enumerate(variants)
                                             for _ in v.meshes])
    operator = _operator(meshes, grid, medium, edge_correction,
                         single=tolerance >= SINGLE_PRECISION_FROM)
    owner = np.concatenate([m.owner for m in meshes])
    block_of = np.repeat(np.arange(len(meshes)), np.diff(operator.starts))
    columns = [(g, j) for g, v in enumerate(variants) for j in v.driven]
    active = np.array([[group_of[n] in (-1, g) for g, _ in columns] for n in range(len(meshes))],
                      dtype=bool).reshape(len(meshes), len(columns))
    block_group = group_of[block_of]
    nodes = [_row_nodes(v.node_of, owner, (block_group == -1) | (block_group == g))
             for g, v in enumerate(variants)]
    rhs = np.stack([nodes[g] == j for g, j in columns], axis=1).astype(float)
    charge, residual, iterations = _solved(operator, active, rhs, tolerance, variants, columns)
    scale = grid.cell_mm * grid.cell_mm * PF_PER_KERNEL_UNIT
    totals, raw, unknowns = [], [], []
    for g, variant in enumerate(variants):
        mine = [c for c, (group, _) in enumerate(columns) if group == g]
        rows = nodes[g] >= 0
        indicator = nodes[g][rows][None, :] == np.array(variant.driven)[:, None]
        solved = charge[rows][:, mine]
        first_order = indicator.astype(float) @ solved
        raw.append(first_order * scale)
        totals.append((first_order + solved.T @ residual[rows][:, mine]) * scale)
        unknowns.append(int(rows.sum()))
    return BatchedSolution(tuple(totals), tuple(raw), tuple(unknowns), iterations)


def _solved(operator: CellOperator, active: BoolArray, rhs: FloatArray, tolerance: float,
            variants: Sequence[Variant], columns: list[tuple[int, int]]
            ) -> tuple[FloatArray, FloatArray, int]:
    """Charges and residuals of every column, and the iterations of the slowest chain.

    With a bare variant (no conductors of its own) the columns of the other
    variants that drive the same conductors are solved second, from the
    starting guess of :mod:`auditor.field.precise.guess`; the rest first.
    """
    preconditioner = near_field_preconditioner(operator)
    limit = max(200, 4 * int(np.sqrt(operator.size)))
    bare = next((g for g, v in enumerate(variants) if not v.meshes), None)
    members = [[frozenset(np.flatnonzero(v.node_of == j).tolist())
                for j in range(int(v.node_of.max()) + 1)] for v in variants]
    reused = {} if bare is None else reused_columns(members, columns, bare)

    def run(part: list[int], initial: FloatArray | None = None
            ) -> tuple[FloatArray, FloatArray, int]:
        mask = active[:, part]
        return conjugate_gradient(lambda values, live: operator.apply(values, mask[:, live]),
                                  preconditioner, rhs[:, part], tolerance, limit, initial)

    charge, residual = np.zeros_like(rhs), np.zeros_like(rhs)
    first = [c for c in range(len(columns)) if c not in reused]
    charge[:, first], residual[:, first], iterations = run(first)
    if reused:
        second = sorted(reused)
        guess = starting_guess(reused, columns, rhs, charge, residual)
        charge[:, second], residual[:, second], more = run(second, guess)
        iterations += more
    return charge, residual, iterations


def _row_nodes(node_of: IntArray, owner: IntArray, rows_active: BoolArray) -> IntArray:
    """Node of every unknown in one variant, -1 where the variant does not use it."""
    safe = np.minimum(owner, node_of.size - 1)
    return np.asarray(np.where(rows_active, node_of[safe], -1), dtype=np.int64)


def _operator(meshes: Sequence[LevelMesh], grid: CellGrid, medium: LayeredMedium,
              edge_correction: bool, single: bool) -> CellOperator:
    levels = tuple(sorted({m.level for m in meshes}))
    kernels = level_kernels(medium, grid, levels, single)
    corrections = None
    if edge_correction:
        direct = high_k_coefficients(medium)
        corrections = tuple(near_correction(grid, m.edges, float(direct[m.level, m.level]))
                            for m in meshes)
    return cell_operator(kernels, tuple(m.cells for m in meshes), corrections,
                         tuple(levels.index(m.level) for m in meshes))
