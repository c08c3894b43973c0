"""Interaction of uniformly charged square cells through the layered medium.

Entry ``K_ab[p, q]`` is ``4 pi eps0`` times the potential at the centre of a
cell on level ``a`` due to unit surface charge on the cell offset by
``(p, q)`` cells on level ``b`` (collocation at cell centres). The
``1/sqrt(rho^2 + d^2)`` part is integrated in closed form over the square,
which makes the singular self term exact; the smooth layered remainder is
integrated with tensor Gauss-Legendre points.

Self term: for ``d = 0`` the closed form gives
``int int dA / r = 4 h asinh(1) = 4 h ln(1 + sqrt 2)`` over a square of side
``h`` seen from its centre, so the centre potential of unit surface charge is
``h ln(1 + sqrt 2) / (pi eps0)`` [pub: e.g. R. F. Harrington, *Field
Computation by Moment Methods*, 1968, sec. 3.2, from memory; rederived here
from the rectangle primitive below].
"""

from __future__ import annotations

import numpy as np
from numpy.typing import NDArray

from auditor.field.precise.greens import LayeredGreens

FloatArray = NDArray[np.float64]

# Offsets (in cells) at which the smooth remainder gets the dense rule.
_NEAR_CELLS = 2


def rectangle_primitive(x: FloatArray, y: FloatArray, height: float) -> FloatArray:
    """``F(x, y)`` with ``d2F/dxdy = 1/sqrt(x^2 + y^2 + height^2)``; see
    :func:`rectangle_inverse_distance`."""
    z = height
    with np.errstate(divide="ignore", invalid="ignore"):
        term_x = np.where(x == 0.0, 0.0, x * np.arcsinh(y / np.sqrt(x * x + z * z)))
        term_y = np.where(y == 0.0, 0.0, y * np.arcsinh(x / np.sqrt(y * y + z * z)))
    # r only enters the height term (the same level's edge cells have none).
    term_z = z * np.arctan2(x * y, z * np.sqrt(x * x + y * y + z * z)) if z > 0.0 else 0.0
    value: FloatArray = term_x + term_y - term_z
    return value


def rectangle_inverse_distance(x1: FloatArray, x2: FloatArray, y1: FloatArray,
                               y2: FloatArray, height: float) -> FloatArray:
    """``int_{x1}^{x2} int_{y1}^{y2} dx dy / sqrt(x^2 + y^2 + height^2)``.

    Closed-form primitive ``F = x asinh(y/sqrt(x^2+z^2)) + y asinh(x/sqrt(y^2+z^2))
    - z atan(x y / (z r))`` [pub: classical potential of a uniformly charged
    rectangle, e.g. E. Durand, *Electrostatique* I (1964); from memory,
    derivative checked by hand: d2F/dxdy = 1/r].
    """
    result: FloatArray = (rectangle_primitive(x2, y2, height) - rectangle_primitive(x1, y2, height)
                          - rectangle_primitive(x2, y1, height)
                          + rectangle_primitive(x1, y1, height))
    return result


def lattice_differences(corners: FloatArray) -> FloatArray:
    """Rectangle integrals from the primitive on a lattice of corners (last two axes).

    Neighbouring rectangles share corners, so ``(n+1) x (m+1)`` primitive
    values give all ``n x m`` integrals (a quarter of the evaluations).
    """
    result: FloatArray = (corners[..., 1:, 1:] - corners[..., :-1, 1:]
                          - corners[..., 1:, :-1] + corners[..., :-1, :-1])
    return result


def cell_kernel(greens: LayeredGreens, target: int, source: int, cell_mm: float,
                shape: tuple[int, int]) -> FloatArray:
    """Kernel for all offsets ``0 <= p < nx, 0 <= q < ny`` (one quadrant).

    The kernel is even in ``p`` and ``q``, so one quadrant defines it.
    """
    p = np.arange(shape[0], dtype=float)[:, None] * cell_mm
    q = np.arange(shape[1], dtype=float)[None, :] * cell_mm
    p, q = np.broadcast_arrays(p, q)
    edge_x = (np.arange(shape[0] + 1, dtype=float)[:, None] - 0.5) * cell_mm
    edge_y = (np.arange(shape[1] + 1, dtype=float)[None, :] - 0.5) * cell_mm
    singular = 2.0 * greens.direct[target, source] * lattice_differences(rectangle_primitive(
        edge_x, edge_y, float(greens.separations_mm[target, source])))
    if greens.splines[target][source] is None:
        return np.asarray(singular, dtype=float)
    smooth = _smooth_part(greens, target, source, cell_mm, p, q)
    result: FloatArray = singular + smooth
    return result


def _smooth_part(greens: LayeredGreens, target: int, source: int, cell_mm: float,
                 p: FloatArray, q: FloatArray) -> FloatArray:
    far = _gauss_cell_integral(greens, target, source, cell_mm, p, q, order=3)
    near_order = int(np.clip(np.ceil(4.0 * cell_mm / greens.radius_scale_mm), 4, 24))
    near = slice(0, _NEAR_CELLS + 1)
    far[near, near] = _gauss_cell_integral(
        greens, target, source, cell_mm, p[near, near], q[near, near], order=near_order)
    return far


def _gauss_cell_integral(greens: LayeredGreens, target: int, source: int, cell_mm: float,
                         p: FloatArray, q: FloatArray, order: int) -> FloatArray:
    nodes, weights = np.polynomial.legendre.leggauss(order)
    offsets = 0.5 * cell_mm * nodes
    w2 = np.outer(weights, weights).ravel() * (0.5 * cell_mm) ** 2
    dx = np.repeat(offsets, order)
    dy = np.tile(offsets, order)
    radius = np.hypot(p[..., None] + dx, q[..., None] + dy)
    values = greens.remainder(target, source, radius.ravel()).reshape(radius.shape)
    result: FloatArray = 2.0 * (values @ w2)
    return result


def full_kernel(quadrant: FloatArray, fft_shape: tuple[int, int]) -> FloatArray:
    """Place an even quadrant kernel on a circular grid of ``fft_shape``.

    Offset ``(p, q)`` lands at index ``(p mod M1, q mod M2)``; with
    ``M >= 2 n - 1`` the circular convolution equals the linear one on the
    ``n`` cells of interest.
    """
    nx, ny = quadrant.shape
    grid = np.zeros(fft_shape)
    grid[:nx, :ny] = quadrant
    if nx > 1:
        grid[-(nx - 1):, :ny] = quadrant[1:][::-1]
    if ny > 1:
        grid[:nx, -(ny - 1):] = quadrant[:, 1:][:, ::-1]
    if nx > 1 and ny > 1:
        grid[-(nx - 1):, -(ny - 1):] = quadrant[1:, 1:][::-1, ::-1]
    return grid
