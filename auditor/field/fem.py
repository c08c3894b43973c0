"""Bilinear finite elements on a tensor-product mesh: assemble, constrain, solve.

Used by both quick solvers: the axisymmetric r-z pad model (weight 2 pi r)
and the planar x-y trace cross-section (weight 1). Every element is a
rectangle, so the element stiffness is a sum of Kronecker products of 1-D
matrices integrated exactly (the integrands are polynomials):

    K_e = eps * (A_x (x) M_y + M_x (x) A_y)

with A = integral of N_i' N_j' w and M = integral of N_i N_j w. Conductors are
Dirichlet node sets; the Maxwell capacitance matrix comes from the energy
form C_ij = u_i^T K u_j, which is symmetric by construction. One sparse LU
factorisation (``scipy.sparse.linalg.splu``, in a nested-dissection order of
the grid) serves every conductor.
"""

from __future__ import annotations

from collections.abc import Sequence
from dataclasses import dataclass
from functools import lru_cache
from typing import Any

import numpy as np
import scipy.sparse as sp
import scipy.sparse.linalg as spla
from numpy.typing import NDArray

FloatArray = NDArray[np.float64]
BoolArray = NDArray[np.bool_]
IndexArray = NDArray[np.int64]


@dataclass(frozen=True)
class TensorMesh:
    """Node lines ``x`` (r in the axisymmetric case) and ``y`` (z)."""

    x: FloatArray
    y: FloatArray
    axisymmetric: bool

    @property
    def shape(self) -> tuple[int, int]:
        return (len(self.x), len(self.y))

    @property
    def node_count(self) -> int:
        return len(self.x) * len(self.y)

    def node_index(self, ix: NDArray[np.int64], iy: NDArray[np.int64]) -> NDArray[np.int64]:
        out: NDArray[np.int64] = ix * len(self.y) + iy
        return out


def _one_d(nodes: FloatArray, weighted: bool) -> tuple[FloatArray, FloatArray]:
    """Per-element 1-D stiffness A and mass M (shape (n-1, 2, 2))."""
    h = np.diff(nodes)
    a0, a1 = nodes[:-1], nodes[1:]
    unit = np.array([[1.0, -1.0], [-1.0, 1.0]])
    if weighted:
        mid = 0.5 * (a0 + a1)
        stiffness = (mid / h)[:, None, None] * unit
        mass = np.empty((len(h), 2, 2))
        mass[:, 0, 0] = h * (3 * a0 + a1) / 12
        mass[:, 1, 1] = h * (a0 + 3 * a1) / 12
        mass[:, 0, 1] = mass[:, 1, 0] = h * (a0 + a1) / 12
    else:
        stiffness = (1.0 / h)[:, None, None] * unit
        mass = (h / 6.0)[:, None, None] * np.array([[2.0, 1.0], [1.0, 2.0]])
    return stiffness, mass


def assemble(mesh: TensorMesh, eps_cells: FloatArray,
             boundary_diagonal: FloatArray | None = None) -> sp.csr_matrix:
    """Global stiffness; eps_cells has shape (nx-1, ny-1).

    ``boundary_diagonal`` (one value per node) adds lumped boundary terms
    such as the far-field Robin condition.
    """
    ax, mx = _one_d(mesh.x, mesh.axisymmetric)
    ay, my = _one_d(mesh.y, False)
    if bool(np.all(eps_cells == eps_cells[:1])):
        return _assemble_layered(mesh, (ax, mx), (ay, my), eps_cells[0], boundary_diagonal)
    local = (np.einsum("ipk,jql->ijpqkl", ax, my) + np.einsum("ipk,jql->ijpqkl", mx, ay))
    local *= eps_cells[:, :, None, None, None, None]
    nex, ney = eps_cells.shape
    ix, iy = np.meshgrid(np.arange(nex), np.arange(ney), indexing="ij")
    corner = np.empty((nex, ney, 2, 2), dtype=np.int64)
    for p in (0, 1):
        for q in (0, 1):
            corner[:, :, p, q] = mesh.node_index(ix + p, iy + q)
    rows = np.broadcast_to(corner[:, :, :, :, None, None], local.shape).ravel()
    cols = np.broadcast_to(corner[:, :, None, None, :, :], local.shape).ravel()
    data = local.ravel()
    n = mesh.node_count
    if boundary_diagonal is not None:
        diagonal = np.arange(n)
        rows, cols = np.concatenate((rows, diagonal)), np.concatenate((cols, diagonal))
        data = np.concatenate((data, boundary_diagonal))
    return sp.csr_matrix((data, (rows, cols)), shape=(n, n))


def _one_d_global(element: FloatArray, weights: FloatArray | None = None) -> sp.csr_matrix:
    """A 1-D global matrix from per-element 2x2 blocks (times per-element weights)."""
    blocks = element if weights is None else element * weights[:, None, None]
    n = len(blocks) + 1
    main = np.zeros(n)
    main[:-1] += blocks[:, 0, 0]
    main[1:] += blocks[:, 1, 1]
    return sp.diags([blocks[:, 1, 0], main, blocks[:, 0, 1]], [-1, 0, 1], format="csr")


def _assemble_layered(mesh: TensorMesh, x_parts: tuple[FloatArray, FloatArray],
                      y_parts: tuple[FloatArray, FloatArray], eps_rows: FloatArray,
                      boundary_diagonal: FloatArray | None) -> sp.csr_matrix:
    """The stiffness when eps varies along y only (layered media: every
    model here), as Kronecker products of 1-D matrices,

        K = A_x (x) M_y(eps) + M_x (x) A_y(eps),

    the same matrix as the element-by-element sum, in a tenth of the time
    (the node numbering ix * ny + iy is Kronecker order).
    """
    (ax, mx), (ay, my) = x_parts, y_parts
    stiffness = (sp.kron(_one_d_global(ax), _one_d_global(my, eps_rows), format="csr")
                 + sp.kron(_one_d_global(mx), _one_d_global(ay, eps_rows), format="csr"))
    if boundary_diagonal is not None:
        stiffness = stiffness + sp.diags(boundary_diagonal, format="csr")
    out: sp.csr_matrix = stiffness.tocsr()
    out.sort_indices()
    return out


def edge_lumped(mesh: TensorMesh, side: str, alpha: FloatArray) -> FloatArray:
    """Lumped boundary term integral(alpha u v w ds) on one side, per node.

    ``side`` is "right", "top" or "bottom"; alpha is given per boundary segment.
    Row-sum lumping keeps the term consistent (it integrates constants exactly).
    """
    nx, ny = mesh.shape
    if side == "right":
        _, mass = _one_d(mesh.y, False)
        mass = mass * (mesh.x[-1] if mesh.axisymmetric else 1.0)
        nodes = mesh.node_index(np.full(ny, nx - 1), np.arange(ny))
    else:
        _, mass = _one_d(mesh.x, mesh.axisymmetric)
        iy = ny - 1 if side == "top" else 0
        nodes = mesh.node_index(np.arange(nx), np.full(nx, iy))
    per_segment = mass.sum(axis=2) * alpha[:, None]
    out = np.zeros(mesh.node_count)
    np.add.at(out, nodes[:-1], per_segment[:, 0])
    np.add.at(out, nodes[1:], per_segment[:, 1])
    return out


#: Largest block of a nested-dissection ordering left in natural order.
_DISSECTION_LEAF_NODES = 32


@lru_cache(maxsize=64)
def nested_dissection(shape: tuple[int, int],
                      leaf_nodes: int = _DISSECTION_LEAF_NODES) -> IndexArray:
    """A fill-reducing elimination order of a tensor mesh's nodes.

    George's nested dissection (A. George, SIAM J. Numer. Anal. 10, 1973):
    halve the grid along its longer side, order both halves recursively,
    then the separating grid line. Bilinear elements couple a node only to
    its eight neighbours, so one grid line separates. On the demo's pad
    meshes SuperLU factorises in this order about 1.5 times faster than in
    its own minimum-degree order, at about the same fill; with the time to
    compute the order, the pad solves take some 15 % less CPU (measured on
    the demo board's pads).
    """
    _, ny = shape
    parts: list[IndexArray] = []

    def order(x0: int, x1: int, y0: int, y1: int) -> None:
        width, height = x1 - x0, y1 - y0
        if width <= 0 or height <= 0:
            return
        if width * height <= leaf_nodes or (width < 3 and height < 3):
            parts.append((np.arange(x0, x1)[:, None] * ny + np.arange(y0, y1)).ravel())
        elif width >= height:
            middle = (x0 + x1) // 2
            order(x0, middle, y0, y1)
            order(middle + 1, x1, y0, y1)
            parts.append(middle * ny + np.arange(y0, y1))
        else:
            middle = (y0 + y1) // 2
            order(x0, x1, y0, middle)
            order(x0, x1, middle + 1, y1)
            parts.append(np.arange(x0, x1) * ny + middle)

    order(0, shape[0], 0, ny)
    return np.concatenate(parts).astype(np.int64)


class _PermutedLU:
    """SuperLU factors of P A P^T, solving A x = b in A's own numbering."""

    def __init__(self, matrix: sp.csc_matrix, permutation: IndexArray) -> None:
        self._permutation = permutation
        self._lu = spla.splu(matrix[permutation][:, permutation].tocsc(),
                             permc_spec="NATURAL", diag_pivot_thresh=0.0,
                             options={"SymmetricMode": True})

    def solve(self, rhs: FloatArray) -> FloatArray:
        out = np.empty_like(rhs, order="F")
        out[self._permutation] = self._lu.solve(np.asfortranarray(rhs[self._permutation]))
        return out


def _factor(stiffness: sp.csr_matrix, free: IndexArray,
            grid_shape: tuple[int, int] | None = None) -> tuple[sp.csr_matrix, Any]:
    k_free_rows = stiffness[free]
    k_free = k_free_rows[:, free].tocsc()
    if grid_shape is not None:
        # Nested dissection restricted to the free nodes, in their numbering.
        position = np.full(stiffness.shape[0], -1)
        position[free] = np.arange(len(free))
        ordered = position[nested_dissection(grid_shape)]
        return k_free_rows, _PermutedLU(k_free, ordered[ordered >= 0])
    # Symmetric positive definite: no pivoting, symmetric minimum-degree order
    # (measured fastest of SuperLU's orderings on these meshes, bench_field).
    lu = spla.splu(k_free, permc_spec="MMD_AT_PLUS_A",
                   diag_pivot_thresh=0.0, options={"SymmetricMode": True})
    return k_free_rows, lu


def _energy_matrix(stiffness: sp.csr_matrix, potentials: FloatArray) -> FloatArray:
    matrix = potentials.T @ (stiffness @ potentials)
    out: FloatArray = 0.5 * (matrix + matrix.T)
    return out


def capacitance_matrix(stiffness: sp.csr_matrix, conductor_nodes: Sequence[IndexArray],
                       grid_shape: tuple[int, int] | None = None) -> FloatArray:
    """Maxwell matrix (in units of the stiffness) for the given Dirichlet node sets.

    Each conductor in turn at 1, the others at 0; free nodes solved with one
    LU factorisation of the free-free block.
    """
    base, _ = capacitance_pair(stiffness, conductor_nodes, None, grid_shape)
    return base


def capacitance_pair(stiffness: sp.csr_matrix, conductor_nodes: Sequence[IndexArray],
                     extra_nodes: IndexArray | None, grid_shape: tuple[int, int] | None = None,
                     ) -> tuple[FloatArray, FloatArray | None]:
    """Maxwell matrices without and with one extra conductor, on one mesh.

    Both are complete solves: the first with the extra conductor's nodes
    free (it is absent), the second with them fixed (a conductor). One LU
    factorisation serves both: the free nodes are eliminated with the extra
    conductor's nodes last, so the trailing block of the factors is the
    Schur complement S of the rest (:func:`_trailing_schur`), and imposing a
    potential t on those nodes is one more solve with the right-hand side
    S (t - y0) in their rows, y0 being what they take when free (a
    capacitance-matrix update, common practice in domain decomposition).
    The result equals a separate solve with those nodes fixed, to rounding
    (checked against that in the tests). Should SuperLU reorder rows or
    columns despite the natural order asked for, the system with the extra
    conductor is factorised on its own instead.

    ``grid_shape`` (the tensor mesh's node counts) selects the
    :func:`nested_dissection` elimination order; without it SuperLU orders
    (and a pair is solved with two factorisations).
    """
    if extra_nodes is None:
        return _maxwell(stiffness, conductor_nodes, grid_shape), None
    if np.isin(extra_nodes, np.concatenate(conductor_nodes)).any():
        raise ValueError("the extra conductor touches another conductor")
    paired = _pair_one_factorisation(stiffness, conductor_nodes, extra_nodes, grid_shape)
    if paired is not None:
        return paired
    return (_maxwell(stiffness, conductor_nodes, grid_shape),
            _maxwell(stiffness, (*conductor_nodes, extra_nodes), grid_shape))


def _unit_problems(stiffness: sp.csr_matrix, conductor_nodes: Sequence[IndexArray]
                   ) -> tuple[FloatArray, IndexArray]:
    """Each conductor's unit boundary values (one column each) and the free nodes."""
    boundary = np.zeros((stiffness.shape[0], len(conductor_nodes)))
    for k, nodes in enumerate(conductor_nodes):
        boundary[nodes, k] = 1.0
    return boundary, np.flatnonzero(boundary.sum(axis=1) == 0)


#: Meshes from this many nodes on are factorised in nested-dissection order
#: when solved for one matrix; on smaller ones (the Richardson coarse level, a
#: plain round pad) SuperLU's own ordering was faster (measured: 42 against
#: 50 ms for the bench_field round pad).
LARGE_GRID_NODES = 8000


def _maxwell(stiffness: sp.csr_matrix, conductor_nodes: Sequence[IndexArray],
             grid_shape: tuple[int, int] | None) -> FloatArray:
    if grid_shape is not None and grid_shape[0] * grid_shape[1] < LARGE_GRID_NODES:
        grid_shape = None
    boundary, free = _unit_problems(stiffness, conductor_nodes)
    k_free_rows, lu = _factor(stiffness, free, grid_shape)
    potentials = boundary.copy()
    potentials[free] = lu.solve(np.asfortranarray(-(k_free_rows @ boundary)))
    return _energy_matrix(stiffness, potentials)


def _pair_one_factorisation(stiffness: sp.csr_matrix, conductor_nodes: Sequence[IndexArray],
                            extra_nodes: IndexArray, grid_shape: tuple[int, int] | None,
                            ) -> tuple[FloatArray, FloatArray] | None:
    """Both matrices of :func:`capacitance_pair` from one factorisation, or
    None when SuperLU did not keep the order asked for."""
    if grid_shape is None:
        return None
    boundary, free = _unit_problems(stiffness, conductor_nodes)
    position = np.full(stiffness.shape[0], -1)
    position[free] = np.arange(len(free))
    ordered = position[nested_dissection(grid_shape)]
    ordered = ordered[ordered >= 0]
    extra_local = position[extra_nodes]
    order = np.concatenate((ordered[~np.isin(ordered, extra_local)], extra_local))
    k_free_rows = stiffness[free]
    permuted = k_free_rows[:, free].tocsc()[order][:, order].tocsc()
    lu = spla.splu(permuted, permc_spec="NATURAL", diag_pivot_thresh=0.0,
                   options={"SymmetricMode": True})
    identity = np.arange(len(free))
    if not (np.array_equal(lu.perm_r, identity) and np.array_equal(lu.perm_c, identity)):
        return None
    rhs = np.asfortranarray(-(k_free_rows @ boundary)[order])
    base = _potentials(boundary, free, order, lu.solve(rhs))
    schur = _trailing_schur(lu, len(extra_nodes))
    with_extra = _extra_fixed(lu, rhs, schur, len(extra_nodes))
    extended = np.concatenate((boundary, np.zeros((len(boundary), 1))), axis=1)
    extended = _potentials(extended, free, order, with_extra)
    return _energy_matrix(stiffness, base), _energy_matrix(stiffness, extended)


def _potentials(boundary: FloatArray, free: IndexArray, order: IndexArray,
                solved: FloatArray) -> FloatArray:
    """Node potentials: the boundary values, with the free nodes' solution
    (given in elimination order) put back in the mesh's numbering."""
    out = boundary.copy()
    out[free[order]] = solved
    return out


def _trailing_schur(lu: Any, count: int) -> FloatArray:
    """The Schur complement of the leading block in the factorised matrix:
    the product of the factors' trailing ``count`` x ``count`` blocks."""
    # Each factor property is a fresh copy of the whole factor: take one
    # block, let that copy go, then the other, so the two never coexist
    # (they set the peak memory of a quick solve on a large pad).
    lower = lu.L[-count:, -count:].toarray()
    upper = lu.U[-count:, -count:].toarray()
    out: FloatArray = lower @ upper
    return out


def _extra_fixed(lu: Any, rhs: FloatArray, schur: FloatArray, count: int) -> FloatArray:
    """Solutions (in elimination order, the extra nodes last) of every
    conductor's unit problem with the extra nodes held at 0, and of the
    extra conductor's own unit problem (its nodes at 1, the rest at 0)."""
    problems = np.zeros((rhs.shape[0], rhs.shape[1] + 1), order="F")
    problems[:-count, :-1] = rhs[:-count]
    targets = np.zeros((count, problems.shape[1]))
    targets[:, -1] = 1.0
    free_response = lu.solve(problems)  # extra nodes free: y0 = -S^-1 A21 A11^-1 b
    problems[-count:] = schur @ (targets - free_response[-count:])
    solved: FloatArray = lu.solve(problems)
    solved[-count:] = targets  # exact values instead of their rounded copies
    return solved


def cell_centres(mesh: TensorMesh) -> tuple[FloatArray, FloatArray]:
    """Centres of the cells along x and y."""
    return 0.5 * (mesh.x[1:] + mesh.x[:-1]), 0.5 * (mesh.y[1:] + mesh.y[:-1])


def nodes_on_segment(mesh: TensorMesh, y_mm: float, x0_mm: float,
                     x1_mm: float) -> NDArray[np.int64]:
    """Indices of the nodes on the horizontal segment y = y_mm, x0 <= x <= x1."""
    iy = int(np.argmin(np.abs(mesh.y - y_mm)))
    tol = 1e-9 * max(1.0, float(np.max(np.abs(mesh.x))))
    ix = np.flatnonzero((mesh.x >= x0_mm - tol) & (mesh.x <= x1_mm + tol))
    return mesh.node_index(ix, np.full(len(ix), iy))


def nodes_in_box(mesh: TensorMesh, x0_mm: float, x1_mm: float, y0_mm: float,
                 y1_mm: float) -> NDArray[np.int64]:
    """Indices of the nodes inside a closed rectangle."""
    tol = 1e-9 * max(1.0, float(np.max(np.abs(mesh.x))), float(np.max(np.abs(mesh.y))))
    ix = np.flatnonzero((mesh.x >= x0_mm - tol) & (mesh.x <= x1_mm + tol))
    iy = np.flatnonzero((mesh.y >= y0_mm - tol) & (mesh.y <= y1_mm + tol))
    gx, gy = np.meshgrid(ix, iy, indexing="ij")
    return mesh.node_index(gx.ravel(), gy.ravel())
