"""The moment-method operator: FFT convolution, near-field preconditioner, CG.

Cells on every level share one grid, so the interaction between two levels is
a block-Toeplitz convolution; it is applied with zero-padded real FFTs and
never stored as a matrix.
"""

from __future__ import annotations

from collections.abc import Callable
from dataclasses import dataclass
from functools import lru_cache

import numpy as np
import scipy.fft
import scipy.sparse
from numpy.typing import NDArray

from auditor.field.precise.cells import CellGrid
from auditor.field.precise.greens import tabulate_greens
from auditor.field.precise.kernels import cell_kernel, full_kernel
from auditor.field.precise.medium import LayeredMedium

FloatArray = NDArray[np.float64]
IntArray = NDArray[np.int64]
ComplexArray = NDArray[np.complex128]

_TILE_CELLS = 6
_FFT_WORKERS = 2


@dataclass(frozen=True)
class LevelKernels:
    """Cell kernels between the meshed levels of one grid and medium."""

    grid: CellGrid
    levels: tuple[int, ...]
    quadrants: tuple[tuple[FloatArray, ...], ...]
    spectra: ComplexArray
    fft_shape: tuple[int, int]


@lru_cache(maxsize=4)
def level_kernels(medium: LayeredMedium, grid: CellGrid, levels: tuple[int, ...]) -> LevelKernels:
    """Kernels and their FFTs for every pair of meshed levels (cached)."""
    diagonal_mm = grid.cell_mm * float(np.hypot(grid.nx, grid.ny)) + grid.cell_mm
    greens = tabulate_greens(medium, diagonal_mm)
    fft_shape = (scipy.fft.next_fast_len(2 * grid.nx - 1, real=True),
                 scipy.fft.next_fast_len(2 * grid.ny - 1, real=True))
    quadrants = []
    spectra = np.zeros((len(levels), len(levels), fft_shape[0], fft_shape[1] // 2 + 1),
                       dtype=complex)
    for a, target in enumerate(levels):
        row = []
        for b, source in enumerate(levels):
            quadrant = cell_kernel(greens, target, source, grid.cell_mm, (grid.nx, grid.ny))
            row.append(quadrant)
            spectra[a, b] = scipy.fft.rfft2(full_kernel(quadrant, fft_shape))
        quadrants.append(tuple(row))
    return LevelKernels(grid, levels, tuple(quadrants), spectra, fft_shape)


@dataclass(frozen=True)
class CellOperator:
    """Potential-from-charge operator on the active cells of each level.

    ``cells[a]`` holds the flat grid indices of level ``a``'s unknowns, stored
    consecutively from ``starts[a]``; ``near_correction`` (sparse) is added
    for the neighbours of partly covered edge cells.
    """

    kernels: LevelKernels
    cells: tuple[IntArray, ...]
    starts: tuple[int, ...]
    near_correction: scipy.sparse.csr_matrix

    @property
    def size(self) -> int:
        """Number of unknowns."""
        return self.starts[-1]

    def apply(self, charge: FloatArray) -> FloatArray:
        """Potentials for charge densities ``charge`` of shape ``(size, nrhs)``."""
        grid = self.kernels.grid
        nrhs = charge.shape[1]
        sheets = np.zeros((len(self.cells), nrhs, grid.nx * grid.ny))
        for a, cells in enumerate(self.cells):
            sheets[a][:, cells] = charge[self.starts[a]:self.starts[a + 1]].T
        sheets_2d = sheets.reshape(len(self.cells), nrhs, grid.nx, grid.ny)
        spectra = _padded_rfft2(sheets_2d, self.kernels.fft_shape)
        mixed = np.einsum("abij,bnij->anij", self.kernels.spectra, spectra)
        fields = _cropped_irfft2(mixed, self.kernels.fft_shape, (grid.nx, grid.ny))
        fields = fields.reshape(len(self.cells), nrhs, -1)
        potential = np.empty_like(charge)
        for a, cells in enumerate(self.cells):
            potential[self.starts[a]:self.starts[a + 1]] = fields[a][:, cells].T
        return np.asarray(potential + self.near_correction @ charge, dtype=float)

    def dense(self) -> FloatArray:
        """The same operator as a dense matrix (for small cross-checks only)."""
        ny = self.kernels.grid.ny
        blocks = []
        for a, rows in enumerate(self.cells):
            row_blocks = []
            for b, cols in enumerate(self.cells):
                dx = np.abs(rows[:, None] // ny - cols[None, :] // ny)
                dy = np.abs(rows[:, None] % ny - cols[None, :] % ny)
                row_blocks.append(self.kernels.quadrants[a][b][dx, dy])
            blocks.append(row_blocks)
        result: FloatArray = np.block(blocks) + self.near_correction.toarray()
        return result


def _padded_rfft2(values: FloatArray, shape: tuple[int, int]) -> ComplexArray:
    """``rfft2`` of zero-padded data; the all-zero padded rows are never transformed."""
    rows = scipy.fft.rfft(values, n=shape[1], axis=-1, workers=_FFT_WORKERS)
    return np.asarray(scipy.fft.fft(rows, n=shape[0], axis=-2, workers=_FFT_WORKERS))


def _cropped_irfft2(spectra: ComplexArray, shape: tuple[int, int],
                    keep: tuple[int, int]) -> FloatArray:
    """``irfft2`` cropped to ``keep``; only the kept rows get the last inverse pass."""
    rows = scipy.fft.ifft(spectra, axis=-2, workers=_FFT_WORKERS)[..., :keep[0], :]
    values = scipy.fft.irfft(rows, n=shape[1], axis=-1, workers=_FFT_WORKERS)
    return np.asarray(values[..., :keep[1]], dtype=float)


def cell_operator(kernels: LevelKernels, cells: tuple[IntArray, ...],
                  near_corrections: tuple[scipy.sparse.csr_matrix, ...] | None = None
                  ) -> CellOperator:
    """Operator over the given active cells, one index array per meshed level.

    ``near_corrections`` holds one sparse same-level correction per level.
    """
    starts = tuple(int(s) for s in np.concatenate([[0], np.cumsum([c.size for c in cells])]))
    if near_corrections is None:
        near = scipy.sparse.csr_matrix((starts[-1], starts[-1]))
    else:
        near = scipy.sparse.block_diag(near_corrections, format="csr")
    return CellOperator(kernels, cells, starts, near)


def near_field_preconditioner(operator: CellOperator) -> Callable[[FloatArray], FloatArray]:
    """Block-Jacobi over square tiles of cells on each level.

    Each tile's dense self-interaction is inverted exactly; the blocks are
    symmetric positive definite, so the result suits preconditioned CG.
    """
    members, blocks = [], []
    for a, cells in enumerate(operator.cells):
        local = _tile_members(operator.kernels.grid, cells)
        valid = local >= 0
        blocks.append(_tile_blocks(operator.kernels.quadrants[a][a],
                                   cells[np.where(valid, local, 0)],
                                   operator.kernels.grid.ny, valid))
        members.append(np.where(valid, local + operator.starts[a], -1))
    all_members = np.concatenate(members)
    all_blocks = np.concatenate(blocks)
    _add_near_entries(all_blocks, all_members, operator.near_correction)
    all_inverses = np.linalg.inv(all_blocks)
    valid = all_members >= 0
    gather = np.where(valid, all_members, operator.size)

    def apply(residual: FloatArray) -> FloatArray:
        padded = np.vstack([residual, np.zeros((1, residual.shape[1]))])
        solved = all_inverses @ padded[gather]
        result = np.empty_like(residual)
        result[all_members[valid]] = solved[valid]
        return result

    return apply


def _add_near_entries(blocks: FloatArray, members: IntArray,
                      near: scipy.sparse.csr_matrix) -> None:
    """Add the sparse edge correction to the tile blocks it falls in."""
    if near.nnz == 0:
        return
    tile_of = np.empty(near.shape[0], dtype=np.int64)
    slot_of = np.empty(near.shape[0], dtype=np.int64)
    tiles, slots = np.nonzero(members >= 0)
    tile_of[members[tiles, slots]] = tiles
    slot_of[members[tiles, slots]] = slots
    entries = near.tocoo()
    same = tile_of[entries.row] == tile_of[entries.col]
    np.add.at(blocks, (tile_of[entries.row[same]], slot_of[entries.row[same]],
                       slot_of[entries.col[same]]), entries.data[same])


def _tile_members(grid: CellGrid, cells: IntArray) -> IntArray:
    """Local unknown indices per tile, padded with -1, shape ``(tiles, T*T)``."""
    ix, iy = cells // grid.ny, cells % grid.ny
    tiles_y = -(-grid.ny // _TILE_CELLS)
    tile = (ix // _TILE_CELLS) * tiles_y + iy // _TILE_CELLS
    order = np.argsort(tile, kind="stable")
    tile_sorted = tile[order]
    unique, first = np.unique(tile_sorted, return_index=True)
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


def conjugate_gradient(apply_matrix: Callable[[FloatArray], FloatArray],
                       apply_preconditioner: Callable[[FloatArray], FloatArray],
                       rhs: FloatArray, tolerance: float, max_iterations: int
                       ) -> tuple[FloatArray, int]:
    """Preconditioned CG on every column of ``rhs`` at once.

    Returns the solution and the number of iterations; raises
    :class:`RuntimeError` if some column has not reached ``tolerance``
    (relative residual) within ``max_iterations``.
    """
    solution = np.zeros_like(rhs)
    residual = rhs.copy()
    rhs_norm = np.maximum(np.linalg.norm(rhs, axis=0), 1e-300)
    preconditioned = apply_preconditioner(residual)
    direction = preconditioned.copy()
    rz = np.sum(residual * preconditioned, axis=0)
    for iteration in range(1, max_iterations + 1):
        image = apply_matrix(direction)
        curvature = np.sum(direction * image, axis=0)
        step = np.divide(rz, curvature, out=np.zeros_like(rz), where=curvature != 0.0)
        solution += step * direction
        residual -= step * image
        if np.all(np.linalg.norm(residual, axis=0) <= tolerance * rhs_norm):
            return solution, iteration
        preconditioned = apply_preconditioner(residual)
        rz_new = np.sum(residual * preconditioned, axis=0)
        beta = np.divide(rz_new, rz, out=np.zeros_like(rz), where=rz != 0.0)
        direction = preconditioned + beta * direction
        rz = rz_new
    raise RuntimeError(f"CG did not reach {tolerance:g} in {max_iterations} iterations")
