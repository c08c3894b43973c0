"""Capacitance matrix of zero-thickness conductors in a layered medium."""

from __future__ import annotations

from collections.abc import Collection, Iterator, Mapping, Sequence
from dataclasses import dataclass, replace

import numpy as np
import shapely
from numpy.typing import NDArray

from auditor.errors import UsageError
from auditor.field.matrix import CapacitanceMatrix
from auditor.field.precise.cells import CellGrid, grid_around
from auditor.field.precise.medium import LayeredMedium
from auditor.field.precise.mesh import LevelMesh, mesh_levels
from auditor.field.precise.system import PF_PER_KERNEL_UNIT, Variant, solve_batched

FloatArray = NDArray[np.float64]

#: CG tolerance of :func:`solve_variants`: with the variational estimate the
#: capacitances are then as close to converged as the plain charge sums at
#: 1e-6 (measured 1.6e-8 against 3.7e-8 relative on a demo pad), in 21 CG
#: iterations instead of 30.
VARIATIONAL_TOLERANCE = 1e-4

# Kept under its former name for scripts that convert kernel units themselves.
_PF_PER_KERNEL_UNIT = PF_PER_KERNEL_UNIT


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
    return solve_variants(conductors, [()], medium, cell_mm, window=window,
                          tolerance=tolerance, edge_correction=edge_correction)[0]


def solve_variants(fixed: Sequence[Conductor], variants: Sequence[Sequence[Conductor]],
                   medium: LayeredMedium, cell_mm: float, *,
                   window: shapely.Geometry | None = None,
                   tolerance: float = VARIATIONAL_TOLERANCE,
                   edge_correction: bool = True,
                   driven: Collection[str] | None = None,
                   tied: Mapping[str, str] | None = None) -> tuple[PreciseSolve, ...]:
    """Maxwell matrices of ``fixed`` plus each variant's conductors, in one batched solve.

    A variant is a set of further conductors (``()`` for none): a finger
    with and without, or at each step of a scan. The result for each variant
    is that of :func:`solve_precise` on ``[*fixed, *variant]`` (same grid:
    the one covering every conductor of every variant and ``window``), but
    the fixed conductors are meshed once and every variant is solved in one
    CG run on one operator, which is what makes many variants cheap. Variant
    conductors must lie on levels no fixed conductor uses (the finger on the
    touch face); a variant that does not is solved on its own.

    ``driven`` names the conductors whose Maxwell rows and columns are
    wanted (default: all); each result's matrix is then over those only,
    every other conductor held at 0 V, and the others cost no right-hand
    sides (a slider scan needs only the segments). ``tied`` maps conductor
    names to a node name: conductors of one node are connected (one net on
    several levels), share one right-hand side and appear as one row and
    column named after the node, after the untied conductors; ``driven``
    then names nodes.

    Capacitances are the variational estimates of
    :class:`auditor.field.precise.system.BatchedSolution`, second order in
    the CG error, so the default ``tolerance`` is looser than
    :func:`solve_precise`'s for the same accuracy (measured within 2e-8 of
    converged values on the demo's pads).

    Examples
    --------
    >>> from shapely.geometry import Point, box
    >>> pad = Conductor("pad", box(0, 0, 10, 10), 1)
    >>> finger = Conductor("finger", Point(5, 5).buffer(4), 0)
    >>> medium = LayeredMedium(((2.0, 3.0),))
    >>> without, with_finger = solve_variants([pad], [(), (finger,)], medium, 1.0)
    >>> with_finger.matrix.entry("pad", "pad") > without.matrix.entry("pad", "pad")
    True
    """
    if not variants:
        return ()
    if driven is not None and not driven:
        raise UsageError("no conductor to drive")
    tied = tied or {}
    for variant in variants:
        _check_conductors([*fixed, *variant], medium)
        missing = set(driven or ()) - {tied.get(c.name, c.name) for c in [*fixed, *variant]}
        if missing:
            raise UsageError(f"driven conductors not in the solve: {sorted(missing)}")
    fixed_levels = {c.level for c in fixed}
    joint = [list(v) for v in variants if not {c.level for c in v} & fixed_levels]
    alone = {n for n, v in enumerate(variants) if {c.level for c in v} & fixed_levels}
    geometries = [c.geometry for c in fixed] + [c.geometry for v in variants for c in v]
    grid = grid_around(geometries + ([window] if window is not None else []), cell_mm)
    fixed_meshes = _meshes(fixed, grid, edge_correction, 0)
    batched = [_variant([*fixed, *v], _meshes(v, grid, edge_correction, len(fixed)), driven,
                        tied) for v in joint]
    solved: Iterator[PreciseSolve] = iter(())
    if joint:
        batch = solve_batched(fixed_meshes, [b for b, _ in batched], grid, medium, tolerance,
                              edge_correction)
        solved = iter(_packed(names, totals, raw, cell_mm, batch.iterations, unknowns)
                      for (_, names), totals, raw, unknowns in zip(
                          batched, batch.totals, batch.raw, batch.unknowns, strict=True))
    return tuple(solve_variants([*fixed, *variants[n]], [()], medium, cell_mm, window=window,
                                tolerance=tolerance, edge_correction=edge_correction,
                                driven=driven, tied=tied)[0]
                 if n in alone else next(solved) for n in range(len(variants)))


def _variant(conductors: Sequence[Conductor], meshes: tuple[LevelMesh, ...],
             driven: Collection[str] | None, tied: Mapping[str, str]
             ) -> tuple[Variant, tuple[str, ...]]:
    """The batched variant and the names of its matrix rows (driven nodes)."""
    # Untied conductors keep their order; tied nodes follow them.
    node_names = ([c.name for c in conductors if c.name not in tied]
                  + list(dict.fromkeys(tied[c.name] for c in conductors if c.name in tied)))
    node_of = np.array([node_names.index(tied.get(c.name, c.name)) for c in conductors],
                       dtype=np.int64)
    rows = tuple(k for k, name in enumerate(node_names) if driven is None or name in driven)
    return Variant(meshes, node_of, rows), tuple(node_names[k] for k in rows)


def _meshes(conductors: Sequence[Conductor], grid: CellGrid, edge_correction: bool,
            first_index: int) -> tuple[LevelMesh, ...]:
    meshes = mesh_levels([c.geometry for c in conductors], [c.level for c in conductors],
                         [c.name for c in conductors], grid, edge_correction)
    return tuple(replace(m, owner=m.owner + first_index) for m in meshes)


def _packed(names: tuple[str, ...], totals: FloatArray, raw: FloatArray,
            cell_mm: float, iterations: int, unknowns: int) -> PreciseSolve:
    asymmetry = float(np.abs(raw - raw.T).max() / np.abs(raw).max())
    return PreciseSolve(CapacitanceMatrix.from_array(names, totals), cell_mm, iterations,
                        unknowns, asymmetry)


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
