"""Static Green's function of a layered medium, tabulated in the radius.

The potential on level ``i`` of a point charge ``q`` on level ``j`` is

    Phi = q / (2 pi eps0) * [A_ij / sqrt(rho^2 + d_ij^2) + R_ij(rho)]

where ``A_ij exp(-k d_ij)`` is the large-``k`` limit of the spectral potential
(handled in closed form, so the singular part is exact) and
``R_ij(rho) = int_0^inf J0(k rho) (g_ij(k) - A_ij exp(-k d_ij)) dk`` is a smooth
remainder, computed by composite Gauss-Legendre quadrature and tabulated on a
grid dense near the axis (Sommerfeld integral; physics.md section 1.11).
"""

from __future__ import annotations

import math
from dataclasses import dataclass
from functools import lru_cache

import numpy as np
from numpy.typing import NDArray
from scipy.special import j0

from auditor.field.precise.medium import (
    LayeredMedium,
    high_k_coefficients,
    level_separations_mm,
    spectral_potential,
)
from auditor.field.precise.spline import UniformSpline, flat_start_spline

FloatArray = NDArray[np.float64]

_GAUSS_ORDER = 16
_TABLE_POINTS = 320
_RADII_PER_CHUNK = 32
# exp(-38) ~ 3e-17: the remainder below this is under double precision.
_DECAY_EXPONENT = 38.0


@dataclass(frozen=True)
class LayeredGreens:
    """Tabulated Green's function for all level pairs of one medium.

    Build with :func:`tabulate_greens`. ``remainder`` evaluates ``R_ij``.
    """

    medium: LayeredMedium
    direct: FloatArray
    separations_mm: FloatArray
    max_radius_mm: float
    splines: tuple[tuple[UniformSpline | None, ...], ...]
    radius_scale_mm: float

    def remainder(self, target: int, source: int, radius_mm: FloatArray) -> FloatArray:
        """``R_ij(rho)`` in 1/mm; zero where the medium has no layers."""
        spline = self.splines[target][source]
        if spline is None:
            return np.zeros_like(radius_mm)
        u = np.arcsinh(np.asarray(radius_mm) / self.radius_scale_mm)
        values: FloatArray = spline(u)
        return values

    def potential(self, target: int, source: int, radius_mm: FloatArray) -> FloatArray:
        """``4 pi eps0 Phi / q`` in 1/mm for a point charge (zero radius excluded)."""
        rho = np.asarray(radius_mm, dtype=float)
        direct = self.direct[target, source] / np.hypot(rho, self.separations_mm[target, source])
        result: FloatArray = 2.0 * (direct + self.remainder(target, source, rho))
        return result


def greens_covering(medium: LayeredMedium, radius_mm: float) -> LayeredGreens:
    """A table good to at least ``radius_mm``, shared between solves (cached).

    The radius is rounded up to a power of ``sqrt 2``, so the solves of one
    board (every pad's window, the scans) reuse a few tables, and the table
    a solve gets depends only on its own size, never on what was solved
    before it.
    """
    steps = math.ceil(2.0 * math.log2(max(radius_mm, 1e-3)) - 1e-9)
    return _cached_table(medium, 2.0 ** (0.5 * steps))


@lru_cache(maxsize=8)
def _cached_table(medium: LayeredMedium, radius_mm: float) -> LayeredGreens:
    return tabulate_greens(medium, radius_mm)


def tabulate_greens(medium: LayeredMedium, max_radius_mm: float) -> LayeredGreens:
    """Tabulate ``R_ij`` for ``0 <= rho <= max_radius_mm`` on every level pair."""
    direct = high_k_coefficients(medium)
    separations = level_separations_mm(medium)
    scale = medium.shortest_layer_mm()
    count = medium.level_count
    if not medium.layers:
        empty = tuple(tuple(None for _ in range(count)) for _ in range(count))
        return LayeredGreens(medium, direct, separations, max_radius_mm, empty, scale)
    u_grid = np.linspace(0.0, np.arcsinh(max_radius_mm / scale), _TABLE_POINTS)
    radii = scale * np.sinh(u_grid)
    k, weights = _wavenumber_quadrature(medium, max_radius_mm)
    spectral = spectral_potential(medium, k)
    remainder_k = spectral - direct[None] * np.exp(-k[:, None, None] * separations[None])
    values = np.empty((radii.size, count, count))
    # A few radii at a time: the J0 table of a large window (10^4 wavenumbers
    # by 320 radii) would otherwise be the largest array of the whole solve.
    for first in range(0, radii.size, _RADII_PER_CHUNK):
        chunk = slice(first, first + _RADII_PER_CHUNK)
        bessel_weights = j0(np.outer(radii[chunk], k)) * weights
        values[chunk] = np.einsum("rk,kij->rij", bessel_weights, remainder_k)
    rows: list[tuple[UniformSpline | None, ...]] = []
    for target in range(count):
        row: list[UniformSpline | None] = []
        for source in range(count):
            row.append(flat_start_spline(u_grid, values[:, target, source]))
        rows.append(tuple(row))
    return LayeredGreens(medium, direct, separations, max_radius_mm, tuple(rows), scale)


def _wavenumber_quadrature(medium: LayeredMedium,
                           max_radius_mm: float) -> tuple[FloatArray, FloatArray]:
    """Composite Gauss-Legendre nodes on ``0 < k < k_max``.

    Panels are narrow enough for a few J0 oscillations at the largest radius and
    for the poles of coth at ``k = i pi m / t`` of the thickest layer.
    """
    k_max = _DECAY_EXPONENT / (2.0 * medium.shortest_layer_mm())
    width = min(4.0 / max(max_radius_mm, 1e-9), 1.0 / medium.thickest_layer_mm())
    panels = max(int(np.ceil(k_max / width)), 1)
    edges = np.linspace(0.0, k_max, panels + 1)
    nodes, weights = np.polynomial.legendre.leggauss(_GAUSS_ORDER)
    half = 0.5 * (edges[1:] - edges[:-1])
    mid = 0.5 * (edges[1:] + edges[:-1])
    k = (mid[:, None] + half[:, None] * nodes[None, :]).ravel()
    w = (half[:, None] * weights[None, :]).ravel()
    return k, w
