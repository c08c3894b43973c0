"""One-dimensional graded node lines for tensor-product meshes.

A zero-thickness conductor edge carries a charge density that grows like
1/sqrt(distance); the potential near it behaves like sqrt(distance). Linear
elements recover their optimal convergence rate on such a field when the
nodes near the edge follow a "radical" grading, nodes at ``L (i/n)^beta``
with beta >= 2 for a singularity of order 1/2 (the classical graded-mesh
result of Babuska and co-workers, from memory). beta = 2.5 here: measured
slightly more accurate than 2 at the same cost (common practice, no source). Every
breakpoint of a line gets a spacing rule; the node line follows the smallest
rule everywhere, so grading meets grading smoothly. Outside the modelled
object the spacing grows geometrically towards the far boundary.
"""

from __future__ import annotations

from collections.abc import Sequence
from dataclasses import dataclass

import numpy as np
from numpy.typing import NDArray

#: Growth of the spacing away from a breakpoint, per unit of distance / L.
_GROWTH = 2.0
#: Spacing growth per unit distance, in units of eta, outside the object.
_FAR_GROWTH = 3.0
#: Grading exponent at conductor edges: nodes at L (i/n)^beta near the edge.
_BETA = 2.5
#: Samples per interval used to integrate and invert the node density.
_SAMPLES = 240


@dataclass(frozen=True)
class Breakpoint:
    """A coordinate the node line must contain.

    Parameters
    ----------
    position_mm:
        Where the node must sit.
    singular:
        True at a conductor edge (graded radically), False at a layer
        interface or domain end (uniform spacing nearby).
    """

    position_mm: float
    singular: bool
    #: Lower bound on the breakpoint's length scale (coarser spacing near it).
    min_scale_mm: float = 0.0


def _local_scales(points: NDArray[np.float64], floor_mm: float) -> NDArray[np.float64]:
    gaps = np.diff(points)
    left = np.concatenate(([np.inf], gaps))
    right = np.concatenate((gaps, [np.inf]))
    return np.maximum(np.minimum(left, right), floor_mm)


def _spacing(x: NDArray[np.float64], points: NDArray[np.float64],
             singular: NDArray[np.bool_], scales: NDArray[np.float64],
             eta: float) -> NDArray[np.float64]:
    """Target node spacing at each x: the minimum over all breakpoint rules."""
    d = np.abs(x[:, None] - points[None, :]) / scales[None, :]
    knee = _BETA ** (-_BETA / (_BETA - 1.0))
    # Linear growth everywhere first (smooth rule, and the radical rule past
    # its knee); the fractional power only where a sample is within the knee
    # of a singular point, a small share of the pairs (same values, less work).
    shift = np.where(singular, knee, 0.0)
    relative = 1.0 + _GROWTH * (d - shift[None, :])
    rows, cols = np.nonzero((d < knee) & singular[None, :])
    relative[rows, cols] = np.maximum(eta ** (_BETA - 1.0),
                                      _BETA * d[rows, cols] ** ((_BETA - 1.0) / _BETA))
    rule = relative * eta * scales[None, :]
    nearest: NDArray[np.float64] = rule.min(axis=1)
    # Outside the modelled object the field is a smooth multipole: let the
    # spacing grow faster there (still in proportion to eta).
    inner = points[1:-1] if len(points) > 2 else points
    outside = np.maximum(np.maximum(inner.min() - x, x - inner.max()), 0.0)
    out: NDArray[np.float64] = np.maximum(nearest, _FAR_GROWTH * eta * outside)
    return out


def graded_line(breakpoints: Sequence[Breakpoint], eta: float, floor_mm: float,
                feature_mm: float, cross_mm: float = np.inf) -> NDArray[np.float64]:
    """Node coordinates containing every breakpoint, graded as described above.

    Parameters
    ----------
    breakpoints:
        Coordinates to honour; the first and last are the domain ends.
    eta:
        Mesh size parameter (about 1 / nodes per feature); halving it halves
        every spacing.
    floor_mm:
        Smallest length scale considered (guards against near-coincident
        breakpoints).
    feature_mm:
        Largest length scale considered: the size of the modelled object, so
        that a breakpoint next to the far boundary is still graded finely.
    cross_mm:
        Smallest feature along the other axis; an edge's field varies on that
        scale too (two disks 0.02 apart need radial cells of that size at
        their rims), so singular breakpoints use it as an upper bound.

    Examples
    --------
    >>> line = graded_line([Breakpoint(0.0, False), Breakpoint(1.0, True),
    ...                     Breakpoint(10.0, False)], 0.25, 1e-3, 1.0)
    >>> bool(line[0] == 0.0 and 1.0 in line and line[-1] == 10.0)
    True
    """
    merged = _merged(breakpoints, floor_mm)
    points = np.array([b.position_mm for b in merged])
    singular = np.array([b.singular for b in merged])
    scales = np.minimum(_local_scales(points, floor_mm), feature_mm)
    scales = np.where(singular, np.minimum(scales, max(cross_mm, floor_mm)), scales)
    scales = np.maximum(scales, [b.min_scale_mm for b in merged])
    # Domain ends are no features: let the spacing grow into them freely.
    scales[0] = scales[-1] = np.inf if len(points) > 2 else scales[0]
    return _all_interval_nodes(points, singular, np.where(np.isinf(scales), 1e30, scales), eta)


def _merged(breakpoints: Sequence[Breakpoint], floor_mm: float) -> list[Breakpoint]:
    ordered = sorted(breakpoints, key=lambda b: b.position_mm)
    merged: list[Breakpoint] = []
    for point in ordered:
        if merged and point.position_mm - merged[-1].position_mm < 1e-9 + 1e-3 * floor_mm:
            last = merged[-1]
            merged[-1] = Breakpoint(last.position_mm, last.singular or point.singular,
                                    min(last.min_scale_mm, point.min_scale_mm))
        else:
            merged.append(point)
    return merged


def _all_interval_nodes(points: NDArray[np.float64], singular: NDArray[np.bool_],
                        scales: NDArray[np.float64], eta: float) -> NDArray[np.float64]:
    """Nodes of every interval: integrate the node density 1/spacing, invert it."""
    # Cosine-clustered samples resolve the small spacing at both ends.
    t = 0.5 * (1.0 - np.cos(np.pi * np.linspace(0.0, 1.0, _SAMPLES)))
    left, right = points[:-1], points[1:]
    x = left[:, None] + (right - left)[:, None] * t[None, :]
    density = 1.0 / _spacing(x.ravel(), points, singular, scales, eta).reshape(x.shape)
    steps = 0.5 * (density[:, 1:] + density[:, :-1]) * np.diff(x, axis=1)
    cumulative = np.concatenate((np.zeros((len(left), 1)), np.cumsum(steps, axis=1)), axis=1)
    pieces = [points[:1]]
    for row in range(len(left)):
        total = cumulative[row, -1]
        cells = max(1, int(np.ceil(total)))
        nodes = np.interp(np.linspace(0.0, total, cells + 1), cumulative[row], x[row])
        nodes[-1] = right[row]
        pieces.append(nodes[1:])
    return np.concatenate(pieces)


def smallest_feature_mm(breakpoints: Sequence[Breakpoint]) -> float:
    """Smallest distance between neighbouring singular breakpoints."""
    inner = sorted(b.position_mm for b in breakpoints if b.singular)
    gaps = [b - a for a, b in zip(inner[:-1], inner[1:], strict=True) if b - a > 1e-9]
    return min(gaps, default=float(np.inf))
