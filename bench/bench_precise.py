"""Benchmark of the precise (planar moment-method) field solve.

Prints, in one run: the 30 x 30 mm window at 0.25 mm cells with three
conductors (time, peak traced memory), a 16-electrode coupling matrix, and the
FFT + CG solve against a dense direct solve of the same discretisation on
growing cases (time ratio and crossover). Goals from issue 7: <= 1.5 s and
<= 150 MB, <= 30 s on two cores. Run: ``python bench/bench_precise.py``.
"""

from __future__ import annotations

import os
import resource
import time
import tracemalloc
from collections.abc import Callable
from functools import partial
from typing import TypeVar

import numpy as np
import shapely
from shapely.geometry import Point, box

from auditor.field.precise import Conductor, LayeredMedium, solve_capacitance, solve_precise
from auditor.field.precise.cells import grid_around
from auditor.field.precise.operator import CellOperator, cell_operator, level_kernels

T = TypeVar("T")

# Overlay 2 mm (er 3) over 1.6 mm FR-4 (er 4.4) over a solid plane (folded in).
TOUCH_STACK = LayeredMedium(((2.0, 3.0), (1.6, 4.4)), ground_below=True)


def window_case() -> None:
    """Pad, surrounding pour and finger in a 30 x 30 mm window."""
    pad = Point(15, 15).buffer(6.0, quad_segs=64)
    pour = box(0, 0, 30, 30).difference(Point(15, 15).buffer(7.0, quad_segs=64))
    conductors = [Conductor("pad", pad, 1), Conductor("pour", pour, 1),
                  Conductor("finger", Point(15, 15).buffer(5.0, quad_segs=64), 0)]
    level_kernels.cache_clear()
    rss_before = resource.getrusage(resource.RUSAGE_SELF).ru_maxrss
    tracemalloc.start()
    start, cpu_start = time.perf_counter(), time.process_time()
    solve = solve_precise(conductors, TOUCH_STACK, 0.25)
    matrix = solve.matrix
    elapsed, cpu = time.perf_counter() - start, time.process_time() - cpu_start
    _, peak = tracemalloc.get_traced_memory()
    tracemalloc.stop()
    rss_growth = resource.getrusage(resource.RUSAGE_SELF).ru_maxrss - rss_before
    warm = []
    for _ in range(3):
        start = time.perf_counter()
        solve_precise(conductors, TOUCH_STACK, 0.25)
        warm.append(time.perf_counter() - start)
    print("30x30 mm window, 0.25 mm cells, 3 conductors (cold: tables + kernels + solve)")
    print(f"  {solve.unknowns} unknowns, {solve.iterations} CG iterations")
    print(f"  wall {elapsed:.2f} s (goal 1.5 s, ratio {elapsed / 1.5:.2f}), process CPU {cpu:.2f} s;"
          f" warm (kernels cached) best of 3: {min(warm):.2f} s")
    print(f"  peak traced memory {peak / 2**20:.1f} MB (goal 150 MB, ratio {peak / 2**20 / 150:.2f});"
          f" max RSS growth {rss_growth / 1024:.1f} MB")
    print("  C [pF]:", np.array2string(matrix.array(), precision=4))


def sixteen_electrodes() -> None:
    """4 x 4 pads 8 mm square at 10 mm pitch inside a pour, 44 x 44 mm, 0.25 mm cells."""
    pads = [box(2 + 10 * i, 2 + 10 * j, 10 + 10 * i, 10 + 10 * j)
            for i in range(4) for j in range(4)]
    clearance = shapely.union_all([p.buffer(1.0, join_style="mitre") for p in pads])
    pour = box(-2, -2, 42, 42).difference(clearance)
    conductors = [Conductor(f"pad{n:02d}", p, 1) for n, p in enumerate(pads)]
    conductors.append(Conductor("pour", pour, 1))
    level_kernels.cache_clear()
    start, cpu_start = time.perf_counter(), time.process_time()
    solve = solve_precise(conductors, TOUCH_STACK, 0.25)
    matrix = solve.matrix
    elapsed, cpu = time.perf_counter() - start, time.process_time() - cpu_start
    values = matrix.array()
    print(f"16 electrodes + pour, 44 x 44 mm, 0.25 mm cells, full Maxwell matrix, "
          f"{solve.unknowns} unknowns")
    print(f"  wall {elapsed:.2f} s (goal 30 s, ratio {elapsed / 30:.3f}), process CPU {cpu:.2f} s, "
          f"{solve.iterations} CG iterations")
    print(f"  Cp of a corner pad {values[0, 0]:.4f} pF, neighbour coupling "
          f"{-values[0, 1]:.4f} pF ({-values[0, 1] / values[0, 0]:.1%} of Cp), "
          f"raw asymmetry max |C-C^T|/max|C| {solve.asymmetry:.1e}")


def dense_against_fft() -> None:
    """Same discretisation solved both ways: square plate on the touch stack.

    Both timings (best of three) start from the same cached kernels; dense
    includes assembling the matrix, FFT + CG includes meshing and the
    preconditioner.
    """
    print("dense numpy.linalg.solve vs FFT + preconditioned CG, plate on the touch stack")
    print("  unknowns  dense_s  fft_cg_s  dense/fft  C_dense/C_fft-1")
    sizes, ratios = [], []
    for cells_per_side in (3, 5, 8, 12, 20, 32, 48, 64):
        cell_mm = 10.0 / cells_per_side
        plate = [Conductor("plate", box(0, 0, 10, 10), 1)]
        kernels = level_kernels(TOUCH_STACK, grid_around([plate[0].geometry], cell_mm), (1,))
        operator = cell_operator(kernels, (np.arange(cells_per_side ** 2, dtype=np.int64),))
        fft_s, fft_matrix = _best_of_three(partial(
            solve_capacitance, plate, TOUCH_STACK, cell_mm, edge_correction=False))
        dense_s, dense_charge = _best_of_three(partial(_dense_solve, operator))
        dense_pf = dense_charge.sum() * cell_mm ** 2 * _pf_per_unit()
        sizes.append(operator.size)
        ratios.append(dense_s / fft_s)
        print(f"  {operator.size:8d}  {dense_s:7.3f}  {fft_s:8.3f}  {ratios[-1]:9.2f}  "
              f"{dense_pf / fft_matrix.values_pf[0][0] - 1:+.1e}")
    slower = [n for n, r in zip(sizes, ratios, strict=True) if r <= 1.0]
    after = [n for n in sizes if not slower or n > max(slower)]
    print(f"  FFT + CG faster at every size from {after[0]} unknowns up"
          f" (dense faster at {slower[-1] if slower else 'none'})" if after
          else "  dense faster at every size tried")


def _dense_solve(operator: CellOperator) -> np.ndarray:
    return np.linalg.solve(operator.dense(), np.ones(operator.size))


def _best_of_three(run: Callable[[], T]) -> tuple[float, T]:
    best, result = np.inf, None
    for _ in range(3):
        start = time.perf_counter()
        result = run()
        best = min(best, time.perf_counter() - start)
    assert result is not None
    return best, result


def _pf_per_unit() -> float:
    from auditor.field.precise.solve import _PF_PER_KERNEL_UNIT
    return float(_PF_PER_KERNEL_UNIT)


if __name__ == "__main__":
    print(f"load average before the run: {os.getloadavg()[0]:.2f} on {os.cpu_count()} CPUs "
          "(other work on the machine inflates wall times)")
    window_case()
    sixteen_electrodes()
    dense_against_fft()
