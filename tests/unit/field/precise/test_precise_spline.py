"""The tables' spline against the reference library's cubic spline.

Reference: ``scipy.interpolate.CubicSpline`` with the same end conditions
(first derivative 0 at the start, not-a-knot at the end; de Boor, *A
Practical Guide to Splines*, 1978, ch. IV, from memory).
"""

from __future__ import annotations

import numpy as np
import pytest
from scipy.interpolate import CubicSpline

from auditor.field.precise.spline import flat_start_spline


@pytest.mark.parametrize("count", [4, 5, 17, 320])
def test_same_spline_as_the_reference_library(count: int) -> None:
    knots = np.linspace(0.0, 5.7, count)
    values = np.random.default_rng(count).standard_normal(count)
    reference = CubicSpline(knots, values, bc_type=((1, 0.0), "not-a-knot"))
    points = np.linspace(-0.3, 6.0, 997)  # both ends continued beyond the knots
    expected = reference(points)
    ours = flat_start_spline(knots, values)(points)
    assert np.allclose(ours, expected, rtol=0, atol=1e-13 * np.abs(expected).max())


def test_reproduces_a_cubic_with_zero_start_slope_exactly() -> None:
    """A cubic with p'(0) = 0 satisfies both end conditions, so it is its own spline."""
    knots = np.linspace(0.0, 3.0, 12)
    cubic = lambda x: 2.0 - 0.5 * x**2 + 0.25 * x**3  # noqa: E731
    points = np.linspace(0.0, 3.0, 101)
    assert np.allclose(flat_start_spline(knots, cubic(knots))(points), cubic(points),
                       rtol=0, atol=1e-12)
