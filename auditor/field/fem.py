"""Bilinear finite elements on a tensor-product mesh: assemble, constrain, solve.

Used by both quick solvers: the axisymmetric r-z pad model (weight 2 pi r)
and the planar x-y trace cross-section (weight 1). Every element is a
rectangle, so the element stiffness is a sum of Kronecker products of 1-D
matrices integrated exactly (the integrands are polynomials):

    K_e = eps * (A_x (x) M_y + M_x (x) A_y)

with A = integral of N_i' N_j' w and M = integral of N_i N_j w. Conductors are
Dirichlet node sets; the Maxwell capacitance matrix comes from the energy
form C_ij = u_i^T K u_j, which is symmetric by construction. One sparse LU
factorisation (``scipy.sparse.linalg.splu``) serves every conductor.
"""

from __future__ import annotations

from collections.abc import Sequence
from dataclasses import dataclass
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


def _factor(stiffness: sp.csr_matrix, free: IndexArray) -> tuple[sp.csr_matrix, Any]:
    k_free_rows = stiffness[free]
    # Symmetric positive definite: no pivoting, symmetric minimum-degree order
    # (measured fastest of SuperLU's orderings on these meshes, bench_field).
    lu = spla.splu(k_free_rows[:, free].tocsc(), permc_spec="MMD_AT_PLUS_A",
                   diag_pivot_thresh=0.0, options={"SymmetricMode": True})
    return k_free_rows, lu


def _energy_matrix(stiffness: sp.csr_matrix, potentials: FloatArray) -> FloatArray:
    matrix = potentials.T @ (stiffness @ potentials)
    out: FloatArray = 0.5 * (matrix + matrix.T)
    return out


def capacitance_matrix(stiffness: sp.csr_matrix,
                       conductor_nodes: Sequence[IndexArray]) -> FloatArray:
    """Maxwell matrix (in units of the stiffness) for the given Dirichlet node sets.

    Each conductor in turn at 1, the others at 0; free nodes solved with one
    LU factorisation of the free-free block.
    """
    base, _ = capacitance_pair(stiffness, conductor_nodes, None)
    return base


def capacitance_pair(stiffness: sp.csr_matrix, conductor_nodes: Sequence[IndexArray],
                     extra_nodes: IndexArray | None) -> tuple[FloatArray, FloatArray | None]:
    """Maxwell matrices without and with one extra conductor, from one LU.

    The extra conductor's nodes stay unknowns of the factorised system; its
    potential is imposed through their reactions lambda, found from the small
    dense system (E^T K^-1 E) lambda = u_F - E^T K^-1 r (a capacitance-matrix
    update, common practice in domain decomposition). The result equals a
    separate solve with those nodes fixed, to rounding.
    """
    n = stiffness.shape[0]
    boundary = np.zeros((n, len(conductor_nodes)))
    for k, nodes in enumerate(conductor_nodes):
        boundary[nodes, k] = 1.0
    free = np.flatnonzero(boundary.sum(axis=1) == 0)
    if extra_nodes is not None and boundary[extra_nodes].any():
        raise ValueError("the extra conductor touches another conductor")
    k_free_rows, lu = _factor(stiffness, free)
    solved = lu.solve(np.asarray(-(k_free_rows @ boundary)))
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
    injection = np.zeros((len(free), len(local)))
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
