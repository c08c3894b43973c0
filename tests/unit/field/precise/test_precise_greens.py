"""Layered-medium Green's function against closed forms (physics.md section 1.11)."""

from __future__ import annotations

import numpy as np
import pytest

from auditor.field.precise.greens import tabulate_greens
from auditor.field.precise.medium import (
    LayeredMedium,
    high_k_coefficients,
    level_separations_mm,
    spectral_potential,
)

ER = 4.4
THICKNESS_MM = 1.0
MIRROR = (ER - 1.0) / (ER + 1.0)


def grounded_slab_series(rho: float) -> float:
    """4 pi eps0 rho Phi / q on top of a grounded slab, image series.

    Source: physics.md 1.11 (Silvester & Benedek 1972; Farrar & Adams 1972).
    """
    n = np.arange(1, 400_001)
    images = (1 + MIRROR) * np.sum((-MIRROR) ** (n - 1) / np.hypot(rho, 2 * n * THICKNESS_MM))
    return float(2.0 / (1.0 + ER) * (1.0 - rho * images))


def free_slab_series(rho: float) -> float:
    """Same on one face of a free slab in air, image series (physics.md 1.11)."""
    n = np.arange(1, 4001)
    images = (1 + MIRROR) * np.sum(MIRROR ** (2 * n - 1) / np.hypot(rho, 2 * n * THICKNESS_MM))
    return float(2.0 / (1.0 + ER) * (1.0 + rho * images))


# Tabulated values of 4 pi eps0 rho Phi / q, er = 4.4, t = 1 (physics.md 1.11 table,
# Sommerfeld integral and image series agreeing to 1e-10 there).
TABLE = [(0.1, 0.3469986103, 0.3945452718), (1.0, 0.1657568555, 0.5910209022),
         (3.0, 0.0242260425, 0.8160602258)]


@pytest.fixture(scope="module")
def grounded() -> object:
    return tabulate_greens(LayeredMedium(((THICKNESS_MM, ER),), ground_below=True), 45.0)


@pytest.fixture(scope="module")
def free() -> object:
    return tabulate_greens(LayeredMedium(((THICKNESS_MM, ER),)), 45.0)


@pytest.mark.parametrize(("rho", "grounded_value", "free_value"), TABLE)
def test_table_values_to_1e_6(grounded, free, rho, grounded_value, free_value) -> None:
    assert rho * grounded.potential(0, 0, np.array(rho)) == pytest.approx(grounded_value, rel=1e-6)
    assert rho * free.potential(0, 0, np.array(rho)) == pytest.approx(free_value, rel=1e-6)


@pytest.mark.parametrize("rho", [0.03, 0.5, 2.0, 7.5, 20.0])
def test_image_series_between_table_points(grounded, free, rho) -> None:
    assert rho * grounded.potential(0, 0, np.array(rho)) == pytest.approx(
        grounded_slab_series(rho), rel=1e-6)
    assert rho * free.potential(0, 0, np.array(rho)) == pytest.approx(
        free_slab_series(rho), rel=1e-6)


def test_single_interface_factor_two_over_one_plus_er() -> None:
    """Charge on an air/er interface: Phi = 2/(1+er) q/(4 pi eps0 r). Jackson 1999 eq. 4.45."""
    greens = tabulate_greens(LayeredMedium(below_er=ER), 10.0)
    rho = np.array([0.01, 1.0, 9.0])
    assert np.allclose(rho * greens.potential(0, 0, rho), 2.0 / (1.0 + ER), rtol=1e-14)


def test_charge_above_half_space_seen_at_height() -> None:
    """Point charge at height d over er: potential at the interface below it is
    q''/(4 pi eps2 R) = 2/(1+er) q/(4 pi eps0 d). Jackson 1999 eq. 4.45."""
    d = 2.0
    greens = tabulate_greens(LayeredMedium(((d, 1.0),), below_er=ER), 10.0)
    assert d * greens.potential(1, 0, np.array(0.0)) == pytest.approx(2 / (1 + ER), rel=1e-6)
    rho = 3.0
    expected = 2.0 / (1.0 + ER) / np.hypot(rho, d)
    assert greens.potential(0, 1, np.array(rho)) == pytest.approx(expected, rel=1e-6)


def test_high_k_limit_matches_spectral_function() -> None:
    """Direct-ray coefficients equal g_ij(k) exp(k d_ij) at large k (common practice, no
    source: leading-order check of the closed form against the network solve)."""
    medium = LayeredMedium(((0.7, 3.0), (1.2, 4.4), (0.5, 2.0)), below_er=6.0)
    k = np.array([60.0])
    spectral = spectral_potential(medium, k)[0]
    expected = high_k_coefficients(medium) * np.exp(-k[0] * level_separations_mm(medium))
    assert np.allclose(spectral, expected, rtol=1e-9, atol=0)


def test_spectral_function_is_symmetric_reciprocity() -> None:
    """Reciprocity (Green's reciprocation theorem, any text): g_ij = g_ji."""
    medium = LayeredMedium(((0.7, 3.0), (1.2, 4.4)), ground_below=True)
    g = spectral_potential(medium, np.array([0.01, 0.3, 4.0]))
    assert np.allclose(g, np.transpose(g, (0, 2, 1)), rtol=1e-12)
