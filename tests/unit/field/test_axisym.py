"""Axisymmetric solver against published capacitances (sources per test)."""

from __future__ import annotations

import math

import numpy as np
import pytest
from scipy.constants import epsilon_0

from auditor.field.axisym import AxisymModel, DielectricSlab, Sheet, solve_axisym
from auditor.field.circuit import reduced, two_terminal_pf

#: pF per eps0 * (1 mm): the unit the reference tables use (C / (eps0 a), a = 1 mm).
EPS0_A = epsilon_0 * 1e-3 * 1e12


def _disk_pair(separation: float) -> AxisymModel:
    return AxisymModel((Sheet("a", 0.0, 1.0), Sheet("b", separation, 1.0)))


def test_isolated_disk_is_8_eps0_a() -> None:
    # Exact: C = 8 eps0 a (Jackson, Classical Electrodynamics 3rd ed. 1999, sec. 3.13;
    # physics reference 1.1); a = 5 mm gives 0.354168 pF.
    matrix = solve_axisym(AxisymModel((Sheet("pad", 0.0, 5.0),))).matrix
    assert matrix.entry("pad", "pad") == pytest.approx(8 * epsilon_0 * 5e-3 * 1e12, rel=0.005)


@pytest.mark.parametrize(("separation", "c11", "c12"), [
    (0.1, 39.07585, -34.78879),
    (0.5, 13.19888, -8.23772),
    (1.0, 10.04797, -4.51831),
    (5.0, 8.12521, -1.00858),
])
def test_coaxial_disks_match_love_equation(separation: float, c11: float, c12: float) -> None:
    # Maxwell matrix of two equal coaxial disks: Love, Q. J. Mech. Appl. Math. 2 (1949)
    # 428-451, values from the Nystrom solution tabulated in physics reference 1.4.
    matrix = solve_axisym(_disk_pair(separation)).matrix
    assert matrix.entry("a", "a") / EPS0_A == pytest.approx(c11, rel=0.005)
    assert matrix.entry("a", "b") / EPS0_A == pytest.approx(c12, rel=0.005)


def test_close_disks_match_kirchhoff() -> None:
    # Kirchhoff 1877 (as quoted by Reichert & Ristivojevic, arXiv:2001.01142):
    # C/(eps0 a) = pi/k + ln(16 pi/k) - 1, within 0.06 % of Love at k = d/a = 0.02.
    kappa = 0.02
    kirchhoff = math.pi / kappa + math.log(16 * math.pi / kappa) - 1
    capacitor = two_terminal_pf(solve_axisym(_disk_pair(kappa)).matrix, "a", "b")
    assert capacitor / EPS0_A == pytest.approx(kirchhoff, rel=0.005)


@pytest.mark.parametrize(("height", "expected"), [(0.1, 41.4060980), (0.25, 21.4365984),
                                                  (1.0, 11.1042179)])
def test_disk_over_ground_plane_by_images(height: float, expected: float) -> None:
    # Image method: disk at h over ground = disk pair at 2h, C = 2 C_pair(2h/a)
    # (physics reference 1.5, Love's equation values).
    model = AxisymModel((Sheet("ground", -height, None), Sheet("pad", 0.0, 1.0)))
    over_plane = solve_axisym(model).matrix.entry("pad", "pad")
    assert over_plane / EPS0_A == pytest.approx(expected, rel=0.005)
    image_pair = two_terminal_pf(solve_axisym(_disk_pair(2 * height)).matrix, "a", "b")
    assert over_plane == pytest.approx(2 * image_pair, rel=0.005)


@pytest.mark.parametrize(("er", "height", "expected"), [(4.4, 0.1, 158.37683),
                                                        (4.4, 0.5, 46.51239),
                                                        (10.0, 0.1, 350.28588)])
def test_disk_on_grounded_substrate(er: float, height: float, expected: float) -> None:
    # Love/Copson equation with the grounded-slab image kernel (physics reference 1.6;
    # Chew & Kong, IEEE MTT-28 (1980) 98 agrees within 0.26 % at er 4.4, h/a 0.1).
    model = AxisymModel((Sheet("ground", -height, None), Sheet("pad", 0.0, 1.0)),
                        (DielectricSlab(-height, 0.0, er),))
    value = solve_axisym(model).matrix.entry("pad", "pad") / EPS0_A
    assert value == pytest.approx(expected, rel=0.01)


def test_disk_on_dielectric_interface_scales_by_mean_permittivity() -> None:
    # Exact symmetry result: a sheet in the interface of two half-spaces has
    # C = C_free (er1 + er2) / 2, so 4 eps0 a (1 + 4.4) (physics reference 1.6).
    model = AxisymModel((Sheet("pad", 0.0, 1.0),), (DielectricSlab(-1e4, 0.0, 4.4),))
    value = solve_axisym(model).matrix.entry("pad", "pad") / EPS0_A
    assert value == pytest.approx(4 * (1 + 4.4), rel=0.005)


def test_error_falls_as_eta_squared() -> None:
    # Radical grading at the sqrt edge singularity restores the optimal rate
    # for bilinear elements: energy (capacitance) error O(h^2) (Babuska-type
    # graded meshes; common practice). Reference 8 eps0 a, exact.
    exact = 8.0 * EPS0_A
    disk = AxisymModel((Sheet("pad", 0.0, 1.0),))
    errors = [solve_axisym(disk, eta=eta, extrapolate=False).matrix.values_pf[0][0] / exact - 1
              for eta in (0.32, 0.16, 0.08)]
    assert all(e > 0 for e in errors)  # conforming FEM bounds C from above (Dirichlet)
    orders = [math.log2(errors[i] / errors[i + 1]) for i in range(2)]
    assert all(1.7 < order < 2.4 for order in orders), orders


def test_far_boundary_is_not_a_grounded_box() -> None:
    # The far-field Robin condition makes the result nearly independent of the
    # box: even a box 10 radii out stays within 0.5 % of 8 eps0 a (exact), where a
    # grounded box there is about 10 % high (1/(1 - a/R) for a sphere-like field,
    # common practice, no source).
    disk = AxisymModel((Sheet("pad", 0.0, 5.0),))
    exact = 8 * epsilon_0 * 5e-3 * 1e12
    for far_factor in (10.0, 30.0, 100.0):
        value = solve_axisym(disk, far_factor=far_factor).matrix.values_pf[0][0]
        assert value == pytest.approx(exact, rel=0.005)


def test_matrix_is_symmetric_with_negative_mutual_terms() -> None:
    # Maxwell capacitance coefficients (Smythe 1968 ch. 2): symmetric,
    # positive diagonal, non-positive off-diagonal, non-negative row sums.
    model = AxisymModel((Sheet("pad", 0.0, 5.0), Sheet("ring", 0.0, 10.0, 6.0),
                         Sheet("finger", 2.0, 4.0)), (DielectricSlab(0.0, 2.0, 3.0),))
    values = solve_axisym(model).matrix.array()
    assert values == pytest.approx(values.T, rel=1e-12, abs=1e-15)
    assert (values.diagonal() > 0).all()
    off_diagonal = values[~np.eye(3, dtype=bool)]
    assert (off_diagonal < 0).all()
    assert (values.sum(axis=1) > 0).all()


def test_floating_disk_in_mirror_plane_is_invisible() -> None:
    # Symmetry: a zero-thickness floating conductor in the mirror plane of
    # conductors at +V and -V carries no charge (physics reference 1.12 and 5(d)15):
    # disks at 0 and 0.2 a with a floating disk at 0.1 a keep 20.70305 eps0 a (Love).
    plain = two_terminal_pf(solve_axisym(_disk_pair(0.2)).matrix, "a", "b")
    with_floater = AxisymModel((Sheet("a", 0.0, 1.0), Sheet("b", 0.2, 1.0),
                                Sheet("float", 0.1, 1.0)))
    matrix = reduced(solve_axisym(with_floater).matrix, None, ["a", "b"])
    floating = two_terminal_pf(matrix, "a", "b")
    assert floating == pytest.approx(plain, rel=2e-3)
    assert plain / EPS0_A == pytest.approx(20.7030490, rel=0.005)


def test_adding_a_floating_conductor_never_lowers_capacitance() -> None:
    # Thomson / Dirichlet principle (physics reference 1.12, from memory).
    alone = solve_axisym(AxisymModel((Sheet("pad", 0.0, 5.0),))).matrix.values_pf[0][0]
    for z_mm, radius in ((1.0, 8.0), (-0.5, 5.0), (3.0, 20.0)):
        model = AxisymModel((Sheet("pad", 0.0, 5.0), Sheet("float", z_mm, radius)))
        with_float = reduced(solve_axisym(model).matrix, None, ["pad"]).values_pf[0][0]
        assert with_float > alone


def test_pair_solve_equals_two_separate_solves() -> None:
    # The shared-factorisation update is exact algebra: same mesh, same answer.
    from auditor.field.axisym import solve_axisym_pair
    base = AxisymModel((Sheet("pad", 0.0, 5.0), Sheet("ground", 0.0, 12.0, 6.0),
                        Sheet("ground", -1.6, 12.0)), (DielectricSlab(-1.6, 0.0, 4.4),
                                                       DielectricSlab(0.0, 2.0, 2.8)))
    finger = Sheet("finger", 2.0, 5.0)
    plain, touched = solve_axisym_pair(base, finger)
    alone = solve_axisym(AxisymModel(base.sheets, base.layers, (finger,))).matrix
    together = solve_axisym(AxisymModel((*base.sheets, finger), base.layers)).matrix
    assert plain.matrix.array() == pytest.approx(alone.array(), rel=1e-9)
    assert touched.matrix.array() == pytest.approx(together.array(), rel=1e-9)
    assert touched.matrix.names == ("pad", "ground", "finger")
