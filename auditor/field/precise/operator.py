"""The moment-method operator: FFT convolution, near-field preconditioner, CG.

Cells on every level share one grid, so the interaction between two levels is
a block-Toeplitz convolution; it is applied with zero-padded real FFTs and
never stored as a matrix.
"""

from __future__ import annotations

from collections.abc import Callable
from dataclasses import dataclass
from functools import cached_property
from typing import Any

import numpy as np
import scipy.fft
import scipy.sparse
from numpy.typing import NDArray

from auditor.field.precise.cells import CellGrid
from auditor.field.precise.greens import greens_covering
from auditor.field.precise.kernels import cell_kernel, full_kernel
from auditor.field.precise.medium import LayeredMedium

FloatArray = NDArray[np.float64]
IntArray = NDArray[np.int64]
#: Spectra are double or, for the loose tolerances of the audits, single
#: precision (:func:`level_kernels`).
ComplexArray = NDArray[np.complexfloating[Any, Any]]
RealArray = NDArray[np.floating[Any]]
BoolArray = NDArray[np.bool_]

_FFT_WORKERS = 2
_APPLY_BYTES = 12 * 2**20


@dataclass(frozen=True)
class LevelKernels:
    """Cell kernels between the meshed levels of one grid and medium.

    Each kernel is even in both offsets, so its circular embedding is even
    and its discrete Fourier transform real; ``spectra[a][b]`` holds it with
    a zero imaginary part all the same (and is the same array as
    ``spectra[b][a]``): numpy multiplies a complex spectrum by a real array
    through a cast to complex on every call, which costs more than the
    storage (the products are bit for bit the same). Their precision
    (``complex128`` or ``complex64``) is the precision of every transform
    of :class:`CellOperator`.
    """

    grid: CellGrid
    levels: tuple[int, ...]
    quadrants: tuple[tuple[FloatArray, ...], ...]
    spectra: tuple[tuple[ComplexArray, ...], ...]
    fft_shape: tuple[int, int]


def level_kernels(medium: LayeredMedium, grid: CellGrid, levels: tuple[int, ...],
                  single: bool = False) -> LevelKernels:
    """Kernels and their FFTs for every pair of meshed levels.

    ``single``: transform in single precision. The operator then carries a
    relative error of about 1e-7 (measured: the demo's capacitances within
    3e-6 of double precision at the audits' CG tolerance of 1e-4), far
    below that tolerance, for about two thirds of the CPU: the transforms
    and the spectral products move half the bytes.

    Not cached: each 3-D job has a window (and so a grid) of its own, so a
    cache never hit (measured on the demo) and only kept the last jobs'
    spectra alive.

    Reciprocity (the layered Green's function is symmetric in the two
    levels) gives ``K_ab = K_ba``; each pair is computed once, which also
    keeps the operator exactly symmetric for CG.
    """
    diagonal_mm = grid.cell_mm * float(np.hypot(grid.nx, grid.ny)) + grid.cell_mm
    greens = greens_covering(medium, diagonal_mm)
    fft_shape = (scipy.fft.next_fast_len(2 * grid.nx - 1, real=True),
                 scipy.fft.next_fast_len(2 * grid.ny - 1, real=True))
    quadrants: list[list[FloatArray]] = [[] for _ in levels]
    spectra: list[list[ComplexArray]] = [[] for _ in levels]
    for a, target in enumerate(levels):
        for b, source in enumerate(levels):
            if b < a:
                quadrants[a].append(quadrants[b][a])
                spectra[a].append(spectra[b][a])
                continue
            quadrant = cell_kernel(greens, target, source, grid.cell_mm, (grid.nx, grid.ny))
            quadrants[a].append(quadrant)
            spectrum = scipy.fft.rfft2(full_kernel(quadrant, fft_shape)).real
            spectra[a].append(spectrum.astype(np.complex64 if single else np.complex128))
    return LevelKernels(grid, levels, tuple(tuple(row) for row in quadrants),
                        tuple(tuple(row) for row in spectra), fft_shape)


@dataclass(frozen=True)
class CellOperator:
    """Potential-from-charge operator on blocks of active cells.

    Block ``n`` holds the flat grid indices ``cells[n]`` of cells on level
    ``kernels.levels[block_levels[n]]``, stored consecutively from
    ``starts[n]``. Several blocks may lie on one level (alternative finger
    positions, say); a right-hand side then uses at most one of them, as
    given by the activity mask of :meth:`apply`. ``near_correction``
    (sparse, block diagonal) is added for the neighbours of partly covered
    edge cells.
    """

    kernels: LevelKernels
    cells: tuple[IntArray, ...]
    starts: tuple[int, ...]
    near_correction: scipy.sparse.csr_matrix
    block_levels: tuple[int, ...]

    @property
    def size(self) -> int:
        """Number of unknowns."""
        return self.starts[-1]

    def apply(self, charge: FloatArray, active: BoolArray | None = None) -> FloatArray:
        """Potentials for charge densities ``charge`` of shape ``(size, nrhs)``.

        ``active[n, j]`` says whether block ``n`` takes part in column ``j``
        (default: every block in every column); inactive blocks must carry no
        charge and get zero potential. Levels a column does not use are
        neither transformed nor transformed back.
        """
        if active is None:
            active = np.ones((len(self.cells), charge.shape[1]), dtype=bool)
        sheet_bytes = self._spectrum_type.itemsize * self.kernels.fft_shape[0] * (self.kernels.fft_shape[1] // 2 + 1)
        per_call = max(1, _APPLY_BYTES // (sheet_bytes * (len(self.kernels.levels) + 3)))
        if charge.shape[1] > per_call:
            # Columns in groups: the spectra of every level and column at once
            # would set the peak memory of a large window.
            return np.concatenate([self.apply(charge[:, first:first + per_call],
                                              active[:, first:first + per_call])
                                   for first in range(0, charge.shape[1], per_call)], axis=1)
        on_level = self._level_columns(active)
        spectra = [_padded_rfft2(self._sheets(charge, active, b, columns), self.kernels.fft_shape)
                   if columns.size else None for b, columns in enumerate(on_level)]
        # near_correction is block diagonal: inactive blocks carry no charge and
        # so get no potential from it either.
        potential = np.asarray(self.near_correction @ charge, dtype=float)
        for a, columns in enumerate(on_level):
            if columns.size:
                fields = self._fields(a, columns, on_level, spectra)
                for n in self._blocks_on(a):
                    rows = slice(self.starts[n], self.starts[n + 1])
                    used = active[n, columns]
                    potential[rows, columns[used]] += fields[used][:, self._padded_cells[n]].T
        return potential

    def _fields(self, target: int, columns: IntArray, on_level: list[IntArray],
                spectra: list[ComplexArray | None]) -> RealArray:
        """Potential sheets on level ``target`` for ``columns``, flat padded rows."""
        grid = self.kernels.grid
        mixed: ComplexArray | None = None
        scratch: ComplexArray | None = None
        for b, source_columns in enumerate(on_level):
            source = spectra[b]
            if source is None:
                continue
            kernel = self.kernels.spectra[target][b]
            if np.array_equal(source_columns, columns):
                # In place into one scratch array: the temporaries of
                # ``mixed += source * kernel`` cost as much as the product.
                if mixed is None:
                    mixed = np.multiply(source, kernel)
                    continue
                scratch = np.multiply(source, kernel, out=scratch)
                mixed += scratch
                continue
            if mixed is None:
                mixed = np.zeros((columns.size, *kernel.shape), dtype=kernel.dtype)
            # Only the columns that use both levels get a contribution.
            where = np.searchsorted(source_columns, columns)
            clipped = np.minimum(where, source_columns.size - 1)
            present = np.flatnonzero(source_columns[clipped] == columns)
            mixed[present] += source[clipped[present]] * kernel
        assert mixed is not None  # the target level is always among the sources
        fields = _cropped_irfft2(mixed, self.kernels.fft_shape, grid.nx)
        return fields.reshape(columns.size, -1)

    def _blocks_on(self, level_index: int) -> list[int]:
        return [n for n, a in enumerate(self.block_levels) if a == level_index]

    def _level_columns(self, active: BoolArray) -> list[IntArray]:
        """Per level, the columns in which some block on it is active."""
        out = []
        for a in range(len(self.kernels.levels)):
            blocks = self._blocks_on(a)
            used = active[blocks].any(axis=0) if blocks else np.zeros(active.shape[1], bool)
            out.append(np.flatnonzero(used))
        return out

    def _sheets(self, charge: FloatArray, active: BoolArray, level_index: int,
                columns: IntArray) -> RealArray:
        """Charge sheets of one level, already zero-padded to the FFT row length
        (``scipy.fft.rfft`` pads a short row much more slowly than it
        transforms a full one)."""
        grid = self.kernels.grid
        sheets = np.zeros((columns.size, grid.nx * self.kernels.fft_shape[1]),
                          dtype=self._real_type)
        for n in self._blocks_on(level_index):
            used = active[n, columns]
            block = charge[self.starts[n]:self.starts[n + 1], columns[used]]
            sheets[np.flatnonzero(used)[:, None], self._padded_cells[n][None, :]] = block.T
        return sheets.reshape(columns.size, grid.nx, self.kernels.fft_shape[1])

    @property
    def _spectrum_type(self) -> np.dtype[Any]:
        return self.kernels.spectra[0][0].dtype

    @property
    def _real_type(self) -> type[np.floating[Any]]:
        return np.float32 if self._spectrum_type == np.complex64 else np.float64

    @cached_property
    def _padded_cells(self) -> tuple[IntArray, ...]:
        """Each block's cells as flat indices into rows of the FFT row length."""
        ny, row = self.kernels.grid.ny, self.kernels.fft_shape[1]
        return tuple((cells // ny) * row + cells % ny for cells in self.cells)

    def dense(self) -> FloatArray:
        """The same operator as a dense matrix (for small cross-checks only)."""
        ny = self.kernels.grid.ny
        blocks = []
        for a, rows in zip(self.block_levels, self.cells, strict=True):
            row_blocks = []
            for b, cols in zip(self.block_levels, self.cells, strict=True):
                dx = np.abs(rows[:, None] // ny - cols[None, :] // ny)
                dy = np.abs(rows[:, None] % ny - cols[None, :] % ny)
                row_blocks.append(self.kernels.quadrants[a][b][dx, dy])
            blocks.append(row_blocks)
        result: FloatArray = np.block(blocks) + self.near_correction.toarray()
        return result


def _padded_rfft2(values: RealArray, shape: tuple[int, int]) -> ComplexArray:
    """``rfft2`` of data given at full row length ``shape[1]``, zero-padded to
    ``shape[0]`` rows; the all-zero padded rows are never transformed."""
    rows = scipy.fft.rfft(values, axis=-1, workers=_FFT_WORKERS)
    return np.asarray(scipy.fft.fft(rows, n=shape[0], axis=-2, workers=_FFT_WORKERS))


def _cropped_irfft2(spectra: ComplexArray, shape: tuple[int, int], keep_rows: int
                    ) -> RealArray:
    """``irfft2`` cropped to the first ``keep_rows`` rows (full row length);
    only those rows get the last inverse pass."""
    rows = scipy.fft.ifft(spectra, axis=-2, workers=_FFT_WORKERS)[..., :keep_rows, :]
    return np.asarray(scipy.fft.irfft(rows, n=shape[1], axis=-1, workers=_FFT_WORKERS))


def cell_operator(kernels: LevelKernels, cells: tuple[IntArray, ...],
                  near_corrections: tuple[scipy.sparse.csr_matrix, ...] | None = None,
                  block_levels: tuple[int, ...] | None = None) -> CellOperator:
    """Operator over the given blocks of active cells.

    ``block_levels`` gives each block's index into ``kernels.levels``
    (default: one block per meshed level, in order); ``near_corrections``
    holds one sparse same-level correction per block.
    """
    starts = tuple(int(s) for s in np.concatenate([[0], np.cumsum([c.size for c in cells])]))
    if near_corrections is None:
        near = scipy.sparse.csr_matrix((starts[-1], starts[-1]))
    else:
        near = scipy.sparse.block_diag(near_corrections, format="csr")
    levels = block_levels if block_levels is not None else tuple(range(len(cells)))
    return CellOperator(kernels, cells, starts, near, levels)


def conjugate_gradient(apply_matrix: Callable[[FloatArray, IntArray], FloatArray],
                       apply_preconditioner: Callable[[FloatArray], FloatArray],
                       rhs: FloatArray, tolerance: float, max_iterations: int,
                       initial: FloatArray | None = None
                       ) -> tuple[FloatArray, FloatArray, int]:
    """Preconditioned CG on every column of ``rhs`` at once.

    ``apply_matrix(values, columns)`` applies the operator to ``values``,
    the current directions of the still unconverged ``columns`` of ``rhs``:
    a column stops costing operator applications as soon as it has reached
    ``tolerance`` (relative residual, relative to ``rhs`` whatever the
    start). ``initial`` is the starting guess (default zero; one more
    operator application). Returns the solution, its residual
    ``rhs - A solution`` and the number of iterations of the slowest column;
    raises :class:`RuntimeError` if some column has not converged within
    ``max_iterations``.
    """
    rhs_norm = np.maximum(np.linalg.norm(rhs, axis=0), 1e-300)
    live = np.flatnonzero(np.linalg.norm(rhs, axis=0) > 0.0)
    solution = np.zeros_like(rhs)
    final_residual = rhs.copy()
    if initial is not None:
        solution[:, live] = initial[:, live]
        final_residual[:, live] -= apply_matrix(solution[:, live], live)
    residual = final_residual[:, live].copy()
    preconditioned = apply_preconditioner(residual)
    direction = preconditioned.copy()
    rz = np.sum(residual * preconditioned, axis=0)
    for iteration in range(1, max_iterations + 1):
        image = apply_matrix(direction, live)
        curvature = np.sum(direction * image, axis=0)
        step = np.divide(rz, curvature, out=np.zeros_like(rz), where=curvature != 0.0)
        solution[:, live] += step * direction
        residual -= step * image
        going = np.linalg.norm(residual, axis=0) > tolerance * rhs_norm[live]
        final_residual[:, live[~going]] = residual[:, ~going]
        if not going.any():
            return solution, final_residual, iteration
        live, residual, direction, rz = live[going], residual[:, going], direction[:, going], rz[going]
        preconditioned = apply_preconditioner(residual)
        rz_new = np.sum(residual * preconditioned, axis=0)
        beta = np.divide(rz_new, rz, out=np.zeros_like(rz), where=rz != 0.0)
        direction = preconditioned + beta * direction
        rz = rz_new
    raise RuntimeError(f"CG did not reach {tolerance:g} in {max_iterations} iterations")
