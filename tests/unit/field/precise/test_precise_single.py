"""Single-precision transforms at the audits' CG tolerance.

From a tolerance of ``SINGLE_PRECISION_FROM`` on, the 3-D operator
transforms in single precision. Checked here: the operator against its own
dense double-precision matrix, and a thin disk solved that way against the
exact ``C = 8 eps0 a`` (Jackson 1999, *Classical Electrodynamics*, sec.
3.12; physics.md 1.1) and against the double-precision solve.
"""

from __future__ import annotations

import numpy as np
import pytest
from scipy.constants import epsilon_0
from shapely.geometry import Point, box

from auditor.field.precise import Conductor, LayeredMedium
from auditor.field.precise.cells import grid_around
from auditor.field.precise.mesh import mesh_levels
from auditor.field.precise.operator import cell_operator, level_kernels
from auditor.field.precise.solve import VARIATIONAL_TOLERANCE, solve_variants
from auditor.field.precise.system import SINGLE_PRECISION_FROM

MEDIUM = LayeredMedium(((1.0, 3.0), (1.6, 4.4)))
RADIUS_MM = 5.0
DISK = Point(0.0, 0.0).buffer(RADIUS_MM, quad_segs=256)


def test_single_precision_operator_matches_the_dense_matrix() -> None:
    conductors = [Point(5, 5).buffer(3.2), box(0, 0, 11, 10)]
    grid = grid_around(conductors, 0.5)
    meshes = mesh_levels(conductors, [1, 2], ["pad", "plane"], grid, False)
    cells = tuple(m.cells for m in meshes)
    single = cell_operator(level_kernels(MEDIUM, grid, (1, 2), single=True), cells)
    double = cell_operator(level_kernels(MEDIUM, grid, (1, 2)), cells)
    assert single.kernels.spectra[0][0].dtype == np.complex64
    assert double.kernels.spectra[0][0].dtype == np.complex128
    charge = np.random.default_rng(5).standard_normal((single.size, 3))
    exact = double.dense() @ charge
    error = np.abs(single.apply(charge) - exact).max() / np.abs(exact).max()
    assert error < 1e-5  # common practice, no source: single precision's 6e-8, times log N
    assert error > 1e-12  # and it did transform in single precision
    assert np.abs(double.apply(charge) - exact).max() / np.abs(exact).max() < 1e-12


def test_disk_at_the_audit_tolerance_is_as_good_as_double_precision() -> None:
    assert VARIATIONAL_TOLERANCE >= SINGLE_PRECISION_FROM  # the audits do use it
    exact_pf = 8 * epsilon_0 * RADIUS_MM * 1e-3 * 1e12
    (single,) = solve_variants([Conductor("disk", DISK)], [()], LayeredMedium(), 0.25)
    (double,) = solve_variants([Conductor("disk", DISK)], [()], LayeredMedium(), 0.25,
                               tolerance=1e-6)
    single_pf = single.matrix.entry("disk", "disk")
    assert single_pf == pytest.approx(exact_pf, rel=0.005)
    assert single_pf == pytest.approx(double.matrix.entry("disk", "disk"), rel=1e-5)
