"""Capacitance matrix of zero-thickness conductors in a layered medium."""

from __future__ import annotations

from collections.abc import Sequence
from dataclasses import dataclass
from itertools import combinations

import numpy as np
import shapely
from numpy.typing import NDArray
from scipy.constants import epsilon_0

from auditor.errors import UsageError
from auditor.field.matrix import CapacitanceMatrix
from auditor.field.precise.cells import CellGrid, covered_fractions, grid_around, rasterised
from auditor.field.precise.edges import (
    SUBDIVISIONS,
    EdgeCells,
    near_correction,
    occupied_subcells,
)
from auditor.field.precise.medium import LayeredMedium, high_k_coefficients
from auditor.field.precise.operator import (
    cell_operator,
    conjugate_gradient,
    level_kernels,
    near_field_preconditioner,
)

FloatArray = NDArray[np.float64]
IntArray = NDArray[np.int64]

# Charge in (V/mm) x mm^2 units to pF: 4 pi eps0 per mm, in pF.
_PF_PER_KERNEL_UNIT = 4.0 * np.pi * epsilon_0 * 1e-3 * 1e12


@dataclass(frozen=True)
class Conductor:
    """A named zero-thickness conductor on one level of the medium.

    Parameters
    ----------
    name:
        Label used in the capacitance matrix.
    geometry:
        Shapely polygon or multipolygon in mm.
    level:
        Interface index of the :class:`LayeredMedium` (0 = top face).
    """

    name: str
    geometry: shapely.Geometry
    level: int = 0


@dataclass(frozen=True)
class PreciseSolve:
    """A capacitance matrix with the discretisation it came from.

    ``asymmetry`` is ``max |C - C^T| / max |C|`` of the raw charges before
    ``matrix`` was symmetrised; reciprocity makes it as small as the CG
    tolerance, so it is a check on the solve.
    """

    matrix: CapacitanceMatrix
    cell_mm: float
    iterations: int
    unknowns: int
    asymmetry: float


def solve_capacitance(conductors: Sequence[Conductor], medium: LayeredMedium, cell_mm: float,
                      *, window: shapely.Geometry | None = None,
                      tolerance: float = 1e-6,
                      edge_correction: bool = True) -> CapacitanceMatrix:
    """Maxwell capacitance matrix (pF) of ``conductors``; see :func:`solve_precise`.

    Examples
    --------
    >>> from shapely.geometry import box
    >>> plate = Conductor("plate", box(0, 0, 10, 10))
    >>> c = solve_capacitance([plate], LayeredMedium(), cell_mm=1.25)
    >>> 0.38 < c.entry("plate", "plate") < 0.41
    True
    """
    return solve_precise(conductors, medium, cell_mm, window=window, tolerance=tolerance,
                         edge_correction=edge_correction).matrix


def solve_precise(conductors: Sequence[Conductor], medium: LayeredMedium, cell_mm: float,
                  *, window: shapely.Geometry | None = None,
                  tolerance: float = 1e-6, edge_correction: bool = True) -> PreciseSolve:
    """Maxwell capacitance matrix of ``conductors`` by the moment method.

    Parameters
    ----------
    conductors:
        Distinct names; conductors on the same level must not overlap.
    medium:
        The dielectric stack; a grounded plane in it is the reference.
    cell_mm:
        Side of the square cells.
    window:
        Optional geometry the grid must also cover (keeps the grid, and so
        the cached kernels, fixed while a conductor moves).
    tolerance:
        Relative residual at which CG stops.
    edge_correction:
        Keep partly covered edge cells with their charge on the covered
        sub-cells (:mod:`auditor.field.precise.edges`) instead of keeping the
        cells whose centre is inside.
    """
    _check_conductors(conductors, medium)
    geometries = [c.geometry for c in conductors] + ([window] if window is not None else [])
    grid = grid_around(geometries, cell_mm)
    levels = tuple(sorted({c.level for c in conductors}))
    cells, owner, edges = _mesh(conductors, grid, levels, edge_correction)
    kernels = level_kernels(medium, grid, levels)
    corrections = None
    if edge_correction:
        direct = high_k_coefficients(medium)
        corrections = tuple(near_correction(grid, edge_level, float(direct[level, level]))
                            for edge_level, level in zip(edges, levels, strict=True))
    operator = cell_operator(kernels, cells, corrections)
    rhs = (owner[:, None] == np.arange(len(conductors))[None, :]).astype(float)
    charge, iterations = conjugate_gradient(
        operator.apply, near_field_preconditioner(operator), rhs, tolerance,
        max_iterations=max(200, 4 * int(np.sqrt(operator.size))))
    totals = np.array([charge[owner == i].sum(axis=0) for i in range(len(conductors))])
    matrix = totals * cell_mm * cell_mm * _PF_PER_KERNEL_UNIT
    asymmetry = float(np.abs(matrix - matrix.T).max() / np.abs(matrix).max())
    names = tuple(c.name for c in conductors)
    return PreciseSolve(CapacitanceMatrix.from_array(names, matrix), cell_mm, iterations,
                        operator.size, asymmetry)


def richardson(coarse: PreciseSolve, fine: PreciseSolve, order: float = 1.0
               ) -> CapacitanceMatrix:
    """Extrapolate two solves to zero cell size, assuming error ``~ h^order``.

    Uniform piecewise-constant cells on zero-thickness plates converge as
    ``O(h)`` (edge singularity; physics.md section 1.1), hence ``order = 1``.
    That holds for grid-aligned straight edges; on curved edges the measured
    convergence is irregular (see docs/precise-mode.md), so prefer finer cells.
    """
    if coarse.matrix.names != fine.matrix.names:
        raise UsageError("richardson needs the same conductors in both solves")
    ratio = (coarse.cell_mm / fine.cell_mm) ** order
    if not ratio > 1.0:
        raise UsageError("richardson needs the second solve on the finer cells")
    values = (ratio * fine.matrix.array() - coarse.matrix.array()) / (ratio - 1.0)
    return CapacitanceMatrix.from_array(fine.matrix.names, values)


def _check_conductors(conductors: Sequence[Conductor], medium: LayeredMedium) -> None:
    if not conductors:
        raise UsageError("no conductors to solve")
    names = [c.name for c in conductors]
    if len(set(names)) != len(names):
        raise UsageError(f"conductor names must be distinct: {names}")
    for conductor in conductors:
        medium.check_level(conductor.level)
        if conductor.geometry.is_empty:
            raise UsageError(f"conductor {conductor.name!r} has no area")


def _mesh(conductors: Sequence[Conductor], grid: CellGrid, levels: tuple[int, ...],
          edge_correction: bool) -> tuple[tuple[IntArray, ...], IntArray, list[EdgeCells]]:
    """Active cells per level, the owning conductor per unknown and sub-cell masks.

    With ``edge_correction`` a cell belongs to the conductor covering most of
    it and is kept if any of its sub-cell centres is inside; otherwise it
    belongs to the conductor holding its centre.
    """
    cells_per_level: list[IntArray] = []
    owners: list[IntArray] = []
    edges: list[EdgeCells] = []
    for level in levels:
        on_level = [i for i, c in enumerate(conductors) if c.level == level]
        _check_disjoint([conductors[i] for i in on_level])
        cover = np.array([_coverage(conductors[i].geometry, grid, edge_correction)
                          for i in on_level])
        best = np.argmax(cover, axis=0)
        best_cover = cover[best, np.arange(cover.shape[1])]
        active = np.flatnonzero(best_cover >= (1e-12 if edge_correction else 0.5))
        owner = np.array(on_level)[best[active]]
        occupied = np.ones((active.size, SUBDIVISIONS * SUBDIVISIONS), dtype=bool)
        if edge_correction:
            for i in on_level:
                mine = owner == i
                occupied[mine] = occupied_subcells(conductors[i].geometry, grid, active[mine],
                                                   best_cover[active][mine] < 1.0)
            keep = occupied.any(axis=1)
            active, owner, occupied = active[keep], owner[keep], occupied[keep]
        for i in on_level:
            if not np.any(owner == i):
                raise UsageError(f"conductor {conductors[i].name!r} is smaller than one "
                                 f"{grid.cell_mm} mm cell; use smaller cells")
        cells_per_level.append(active.astype(np.int64))
        owners.append(owner)
        edges.append(EdgeCells(active.astype(np.int64), occupied))
    return tuple(cells_per_level), np.concatenate(owners), edges


def _coverage(geometry: shapely.Geometry, grid: CellGrid, edge_correction: bool) -> FloatArray:
    if edge_correction:
        return covered_fractions(geometry, grid)
    inside = np.zeros(grid.nx * grid.ny)
    inside[rasterised(geometry, grid)] = 1.0
    return inside


def _check_disjoint(on_level: Sequence[Conductor]) -> None:
    for first, second in combinations(on_level, 2):
        if shapely.intersection(first.geometry, second.geometry).area > 1e-9:
            raise UsageError(f"conductors {first.name!r} and {second.name!r} overlap "
                             f"on level {first.level}")
