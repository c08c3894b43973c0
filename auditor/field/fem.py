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


#: Largest extra conductor (in nodes) handled by the capacitance-matrix
#: update; above it the system with the extra conductor is factorised on its
#: own. The update costs one solve per extra node, and SuperLU's solve with
#: many right-hand sides costs about as much as a factorisation once there
#: are some 8-10 of them (measured on the demo pads, bench_demo: a 10 mm
#: finger has 19 nodes at the default mesh; two factorisations took 25 %
#: less CPU).
UPDATE_MAX_NODES = 8
#: Meshes from this many nodes on are factorised in nested-dissection order,
#: and only they take a second factorisation for a large extra conductor;
#: on smaller ones (the Richardson coarse level, a plain round pad) SuperLU's
#: own ordering and the update were faster (measured: 42 against 50 ms for
#: the bench_field round pad).
LARGE_GRID_NODES = 8000


def capacitance_pair(stiffness: sp.csr_matrix, conductor_nodes: Sequence[IndexArray],
                     extra_nodes: IndexArray | None, grid_shape: tuple[int, int] | None = None,
                     ) -> tuple[FloatArray, FloatArray | None]:
    """Maxwell matrices without and with one extra conductor, on one mesh.

    Both are complete solves: the first with the extra conductor's nodes
    free (it is absent), the second with them fixed (a conductor). On a
    small mesh, or for a small extra conductor (at most
    :data:`UPDATE_MAX_NODES` nodes), the second reuses the first's LU: the extra nodes stay unknowns of the
    factorised system and their potential is imposed through their
    reactions lambda, found from the small dense system
    (E^T K^-1 E) lambda = u_F - E^T K^-1 r (a capacitance-matrix update,
    common practice in domain decomposition). Otherwise the system with the
    extra conductor is factorised on its own. Either way the result equals a
    separate solve with those nodes fixed, to rounding.

    ``grid_shape`` (the tensor mesh's node counts) selects, for a mesh of
    at least :data:`LARGE_GRID_NODES`, the :func:`nested_dissection`
    elimination order and the second factorisation; otherwise SuperLU
    orders and the update is used.
    """
    if grid_shape is not None and grid_shape[0] * grid_shape[1] < LARGE_GRID_NODES:
        grid_shape = None
    if (extra_nodes is not None and grid_shape is not None
            and len(extra_nodes) > UPDATE_MAX_NODES):
        base, _ = capacitance_pair(stiffness, conductor_nodes, None, grid_shape)
        if np.isin(extra_nodes, np.concatenate([*conductor_nodes, extra_nodes[:0]])).any():
            raise ValueError("the extra conductor touches another conductor")
        with_extra, _ = capacitance_pair(stiffness, (*conductor_nodes, extra_nodes), None,
                                         grid_shape)
        return base, with_extra
    n = stiffness.shape[0]
    boundary = np.zeros((n, len(conductor_nodes)))
    for k, nodes in enumerate(conductor_nodes):
        boundary[nodes, k] = 1.0
    free = np.flatnonzero(boundary.sum(axis=1) == 0)
    if extra_nodes is not None and boundary[extra_nodes].any():
        raise ValueError("the extra conductor touches another conductor")
    k_free_rows, lu = _factor(stiffness, free, grid_shape)
    solved = lu.solve(np.asfortranarray(-(k_free_rows @ boundary)))
    potentials = boundary.copy()
    potentials[free] = solved
    base = _energy_matrix(stiffness, potentials)
    if extra_nodes is None:
        return base, None
    extended = _with_extra_conductor(lu, free, boundary, solved, extra_nodes)
    return base, _energy_matrix(stiffness, extended)


def _with_extra_conductor(lu: Any, free: IndexArray, boundary: FloatArray,
                          solved: FloatArray, extra_nodes: IndexArray) -> FloatArray:
    """Potentials of every conductor's unit problem with the extra one added."""
    n, count = boundary.shape
    position = np.full(n, -1)
    position[free] = np.arange(len(free))
    local = position[extra_nodes]
    injection = np.zeros((len(free), len(local)), order="F")
    injection[local, np.arange(len(local))] = 1.0
    response = lu.solve(injection)  # K^-1 E
    targets = np.zeros((len(local), count + 1))
    targets[:, -1] = 1.0  # the extra conductor's own unit problem
    current = np.concatenate((solved, np.zeros((len(free), 1))), axis=1)
    reactions = np.linalg.solve(response[local], targets - current[local])
    extended = np.concatenate((boundary, np.zeros((n, 1))), axis=1)
    extended[free] = current + response @ reactions
    extended[extra_nodes] = targets
    return extended


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
