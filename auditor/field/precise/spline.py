"""Cubic spline on equally spaced knots, flat at the first knot.

The Green's function tables need one kind of spline only: equally spaced
knots, zero slope at the axis (the remainder is even in the radius) and the
not-a-knot condition at the far end. Written out here (a tridiagonal system
for the knot slopes) because importing ``scipy.interpolate`` for it cost a
precise run more start-up time than all of its spline work.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np
from numpy.typing import NDArray

FloatArray = NDArray[np.float64]


@dataclass(frozen=True)
class UniformSpline:
    """Piecewise cubic Hermite form: knot values and slopes at ``start + i * step``.

    Outside the knots the end pieces are continued (as ``scipy.interpolate.
    CubicSpline`` does by default).
    """

    start: float
    step: float
    values: FloatArray
    slopes: FloatArray

    def __call__(self, points: FloatArray) -> FloatArray:
        """The spline at ``points``."""
        where = (np.asarray(points, dtype=float) - self.start) / self.step
        piece = np.clip(np.floor(where), 0, self.values.size - 2).astype(np.int64)
        t = (where - piece) * self.step
        left, right = self.values[piece], self.values[piece + 1]
        m0, m1 = self.slopes[piece], self.slopes[piece + 1]
        secant = (right - left) / self.step
        quadratic = (3.0 * secant - 2.0 * m0 - m1) / self.step
        cubic = (m0 + m1 - 2.0 * secant) / (self.step * self.step)
        result: FloatArray = left + t * (m0 + t * (quadratic + t * cubic))
        return result


def flat_start_spline(knots: FloatArray, values: FloatArray) -> UniformSpline:
    """Spline through ``values`` at equally spaced ``knots`` (at least 4),
    slope 0 at the first knot, not-a-knot at the last but one.

    Examples
    --------
    >>> import numpy as np
    >>> x = np.linspace(0.0, 2.0, 9)
    >>> spline = flat_start_spline(x, np.cos(x))
    >>> bool(abs(spline(np.array([1.3]))[0] - np.cos(1.3)) < 1e-3)
    True
    """
    step = float(knots[1] - knots[0])
    secants = np.diff(values) / step
    count = values.size
    # Slope equations m[i-1] + 4 m[i] + m[i+1] = 3 (s[i-1] + s[i]) inside;
    # m[0] = 0; not-a-knot (equal third derivatives either side of the last
    # but one knot) m[n-3] - m[n-1] = 2 (s[n-3] - s[n-2]), subtracted from
    # the last inner equation to keep the system tridiagonal.
    lower, diagonal, upper = np.ones(count), np.full(count, 4.0), np.ones(count)
    rhs = np.zeros(count)
    rhs[1:-1] = 3.0 * (secants[:-1] + secants[1:])
    diagonal[0], upper[0] = 1.0, 0.0
    lower[-1], diagonal[-1] = 4.0, 2.0
    rhs[-1] = 3.0 * (secants[-2] + secants[-1]) - 2.0 * (secants[-2] - secants[-1])
    return UniformSpline(float(knots[0]), step, np.asarray(values, dtype=float),
                         _tridiagonal_solve(lower, diagonal, upper, rhs))


def _tridiagonal_solve(lower: FloatArray, diagonal: FloatArray, upper: FloatArray,
                       rhs: FloatArray) -> FloatArray:
    """Thomas algorithm; ``lower[i]`` multiplies ``x[i-1]``, ``upper[i]`` ``x[i+1]``.

    The slope system is diagonally dominant except its last row, which the
    elimination leaves well conditioned, so no pivoting is needed.
    """
    count = diagonal.size
    c = np.empty(count)
    d = np.empty(count)
    c[0], d[0] = upper[0] / diagonal[0], rhs[0] / diagonal[0]
    for i in range(1, count):
        pivot = diagonal[i] - lower[i] * c[i - 1]
        c[i] = upper[i] / pivot
        d[i] = (rhs[i] - lower[i] * d[i - 1]) / pivot
    solution = np.empty(count)
    solution[-1] = d[-1]
    for i in range(count - 2, -1, -1):
        solution[i] = d[i] - c[i] * solution[i + 1]
    return solution
