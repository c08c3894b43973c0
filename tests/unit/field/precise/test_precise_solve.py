"""Moment-method capacitance against published values (physics.md sections 1.1-1.6, 5(c))."""

from __future__ import annotations

import numpy as np
import pytest
from scipy.constants import epsilon_0
from shapely.geometry import Point, box

from auditor.errors import UsageError
from auditor.field.precise import (
    Conductor,
    LayeredMedium,
    richardson,
    solve_capacitance,
    solve_precise,
)

PF = 1e12
RADIUS_MM = 5.0
DISK = Point(0.0, 0.0).buffer(RADIUS_MM, quad_segs=256)
EPS0_A_PF = epsilon_0 * RADIUS_MM * 1e-3 * PF


def self_pf(matrix) -> float:
    return matrix.values_pf[0][0]


def square_plate(cell_mm: float, medium: LayeredMedium | None = None):
    return solve_capacitance([Conductor("plate", box(0, 0, 10, 10))],
                             medium or LayeredMedium(), cell_mm)


def square_plate_solve(cell_mm: float):
    return solve_precise([Conductor("plate", box(0, 0, 10, 10))], LayeredMedium(), cell_mm)


def test_unit_square_plate_extrapolated_within_half_percent() -> None:
    """C = 0.3667874 x 4 pi eps0 L. Read, J. Comput. Phys. 133 (1997) 1-5 (physics.md 1.3)."""
    reference_pf = 0.3667874 * 4 * np.pi * epsilon_0 * 0.010 * PF
    extrapolated = richardson(square_plate_solve(10 / 16), square_plate_solve(10 / 32))
    assert self_pf(extrapolated) == pytest.approx(reference_pf, rel=0.005)
    # Tighter than the issue asks; measured -0.04 %.
    assert self_pf(extrapolated) == pytest.approx(reference_pf, rel=0.001)


def test_square_plate_converges_from_below_at_first_order() -> None:
    """Uniform piecewise-constant cells: O(h) from below (physics.md 1.1 measured
    -4.0/-2.1/-1.0 % at 8/16/32 cells per side)."""
    reference_pf = 0.3667874 * 4 * np.pi * epsilon_0 * 0.010 * PF
    errors = [self_pf(square_plate(10 / n)) / reference_pf - 1 for n in (8, 16, 32)]
    assert all(e < 0 for e in errors)
    assert errors[0] == pytest.approx(-0.040, abs=0.003)
    assert errors[2] == pytest.approx(-0.010, abs=0.002)
    for coarse, fine in zip(errors, errors[1:], strict=False):
        assert 1.8 < coarse / fine < 2.2


def test_plate_on_air_dielectric_interface_scales_by_mean_permittivity() -> None:
    """Conductor in the interface of two half-spaces: C = C_free (er1 + er2)/2, exact by
    symmetry (physics.md 1.6, 5(c) case 13)."""
    free = self_pf(square_plate(1.0))
    on_interface = self_pf(square_plate(1.0, LayeredMedium(below_er=4.4)))
    assert on_interface / free == pytest.approx((1 + 4.4) / 2, rel=1e-9)


def test_thin_disk_eight_eps0_a() -> None:
    """C = 8 eps0 a, exact (Jackson 1999 sec. 3.12; physics.md 1.1). a = 5 mm at 0.25 mm
    cells: measured -0.16 % with edge cells, -0.28 % with centre sampling."""
    for edge_correction in (True, False):
        matrix = solve_capacitance([Conductor("disk", DISK)], LayeredMedium(), 0.25,
                                   edge_correction=edge_correction)
        assert self_pf(matrix) == pytest.approx(8 * EPS0_A_PF, rel=0.005)


def test_edge_cells_follow_the_curve_at_coarse_cells() -> None:
    """Same disk at 1 mm cells (10 across): within 1.5 % of 8 eps0 a (exact, physics.md 1.1),
    and the sub-cell model keeps the charge inside the true outline."""
    matrix = solve_capacitance([Conductor("disk", DISK)], LayeredMedium(), 1.0)
    assert self_pf(matrix) == pytest.approx(8 * EPS0_A_PF, rel=0.015)
    assert self_pf(matrix) < 8 * EPS0_A_PF


@pytest.mark.parametrize(("separation", "c11", "c12"),
                         [(0.5, 13.19888, -8.23772), (1.0, 10.04797, -4.51831)])
def test_coaxial_disks_maxwell_matrix_love(separation, c11, c12) -> None:
    """Two equal coaxial disks, Maxwell entries in eps0 a units from Love's equation
    (Love 1949; physics.md 1.4 table). Measured -0.2 to -0.4 % at a/20 cells."""
    medium = LayeredMedium(((separation * RADIUS_MM, 1.0),))
    pair = [Conductor("top", DISK, 0), Conductor("bottom", DISK, 1)]
    values = solve_capacitance(pair, medium, 0.25).array() / EPS0_A_PF
    assert values[0, 0] == pytest.approx(c11, rel=0.005)
    assert values[0, 1] == pytest.approx(c12, rel=0.005)
    two_terminal = (values[0, 0] * values[1, 1] - values[0, 1] ** 2) / (values.sum())
    love = {0.5: 10.7182992, 1.0: 7.2831399}[separation]
    assert two_terminal == pytest.approx(love, rel=0.005)


def test_close_coaxial_disks_gap_of_two_cells() -> None:
    """d/a = 0.1 (gap 0.5 mm, two cells): two-terminal C = 36.9323219 eps0 a (Love 1949;
    physics.md 1.4; Kirchhoff + 3rd term agrees to 1.2e-4). Measured -0.66 % at 0.25 mm."""
    medium = LayeredMedium(((0.1 * RADIUS_MM, 1.0),))
    pair = [Conductor("top", DISK, 0), Conductor("bottom", DISK, 1)]
    values = solve_capacitance(pair, medium, 0.25).array() / EPS0_A_PF
    two_terminal = (values[0, 0] * values[1, 1] - values[0, 1] ** 2) / values.sum()
    assert two_terminal == pytest.approx(36.9323219, rel=0.01)


def test_disk_on_grounded_substrate() -> None:
    """Disk a = 5 mm on er 4.4, h = 0.5 mm over a plane: 158.37683 eps0 a (Love/Copson
    with slab images, physics.md 1.6; Chew & Kong 1980 within 0.26 %). Measured -0.53 %."""
    medium = LayeredMedium(((0.5, 4.4),), ground_below=True)
    matrix = solve_capacitance([Conductor("disk", DISK)], medium, 0.25)
    assert self_pf(matrix) / EPS0_A_PF == pytest.approx(158.37683, rel=0.01)


@pytest.fixture(scope="module")
def three_pads():
    medium = LayeredMedium(((1.0, 3.0), (1.6, 4.4)), ground_below=True)
    pads = [Conductor("a", box(0, 0, 6, 6), 1), Conductor("b", box(7, 0, 13, 6), 1),
            Conductor("finger", Point(3, 3).buffer(4, quad_segs=32), 0)]
    return solve_precise(pads, medium, 0.5), medium, pads


def test_matrix_symmetric_and_diagonally_dominant(three_pads) -> None:
    """Maxwell matrix: C_ij = C_ji (reciprocity), C_ij < 0 off the diagonal and
    C_ii > sum_j |C_ij| when a grounded plane is present (Smythe 1968 ch. 2)."""
    assert three_pads[0].asymmetry < 1e-5
    values = three_pads[0].matrix.array()
    off = values - np.diag(np.diag(values))
    assert np.all(off <= 0)
    assert np.all(np.diag(values) > np.abs(off).sum(axis=1))


def test_adding_a_conductor_never_lowers_self_capacitance(three_pads) -> None:
    """Thomson/Dirichlet monotonicity (physics.md 1.12, from memory)."""
    solve, medium, pads = three_pads
    alone = solve_capacitance(pads[:1], medium, 0.5)
    assert solve.matrix.values_pf[0][0] > alone.values_pf[0][0]


def test_floating_plate_in_mirror_plane_is_invisible() -> None:
    """Zero-thickness floater in the mid plane of +V/-V mirror conductors carries no
    charge (symmetry; physics.md 1.12 and 5(d)(i)). Checked through the Schur complement."""
    medium = LayeredMedium(((1.0, 1.0), (1.0, 1.0)))
    plates = [Conductor("top", DISK, 0), Conductor("bottom", DISK, 2)]
    floater = Conductor("floater", box(-3, -3, 3, 3), 1)
    without = solve_capacitance(plates, medium, 0.5).array()
    full = solve_capacitance(plates + [floater], medium, 0.5).array()
    reduced = full[:2, :2] - np.outer(full[:2, 2], full[2, :2]) / full[2, 2]

    def two_terminal(c):
        return (c[0, 0] * c[1, 1] - c[0, 1] ** 2) / c.sum()

    assert two_terminal(reduced) == pytest.approx(two_terminal(without), rel=1e-4)


def test_bad_input_is_a_usage_error() -> None:
    with pytest.raises(UsageError, match="level"):
        solve_capacitance([Conductor("x", DISK, 3)], LayeredMedium(), 0.5)
    with pytest.raises(UsageError, match="overlap"):
        solve_capacitance([Conductor("x", DISK), Conductor("y", DISK)], LayeredMedium(), 0.5)
    with pytest.raises(UsageError, match="distinct"):
        solve_capacitance([Conductor("x", DISK, 0), Conductor("x", DISK, 1)],
                          LayeredMedium(((1.0, 1.0),)), 0.5)


def test_round_touch_stack_agrees_with_axisymmetric_solve() -> None:
    """Pad r 5 mm, pour ring 6.5-12 mm on 1.6 mm FR-4 (er 4.4) over a plane, 2 mm overlay
    (er 3), finger disk r 4 mm on top: every Maxwell entry within 1 % of the independent
    axisymmetric finite-element solve (auditor.field.axisym, itself checked against
    8 eps0 a and Love's values). Measured at 0.25 mm cells: within 0.45 %."""
    from auditor.field.axisym import AxisymModel, DielectricSlab, Sheet, solve_axisym

    model = AxisymModel((Sheet("plane", 0.0, None), Sheet("pad", 1.6, 5.0),
                         Sheet("pour", 1.6, 12.0, 6.5), Sheet("finger", 3.6, 4.0)),
                        (DielectricSlab(0.0, 1.6, 4.4), DielectricSlab(1.6, 3.6, 3.0)))
    axisym = solve_axisym(model).matrix.array()[1:, 1:]
    ring = Point(0, 0).buffer(12, quad_segs=128).difference(Point(0, 0).buffer(6.5, quad_segs=128))
    conductors = [Conductor("pad", Point(0, 0).buffer(5, quad_segs=128), 1),
                  Conductor("pour", ring, 1),
                  Conductor("finger", Point(0, 0).buffer(4, quad_segs=128), 0)]
    medium = LayeredMedium(((2.0, 3.0), (1.6, 4.4)), ground_below=True)
    precise = solve_capacitance(conductors, medium, 0.25).array()
    assert np.allclose(precise, axisym, rtol=0.01, atol=0)
