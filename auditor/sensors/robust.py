"""Overlay operations that survive odd real copper.

GEOS's overlay can stop with "Unable to determine overlay result geometry
dimension" (or a topology exception) on valid but nearly coincident edges,
which real boards have: pads drawn over pours, arcs approximated twice. A
failed operation is retried with snap-rounding on a 0.1 µm grid (far below
any copper feature), then on repaired inputs (``make_valid``, zero buffer),
so one awkward polygon never stops a run.
"""

from __future__ import annotations

from collections.abc import Callable, Sequence

import shapely
from shapely.errors import GEOSException
from shapely.geometry import Polygon
from shapely.geometry.base import BaseGeometry

#: Snap-rounding grid for retried overlays (mm).
GRID_MM = 1e-4

Binary = Callable[..., BaseGeometry]


def _binary(op: Binary, a: BaseGeometry, b: BaseGeometry) -> BaseGeometry:
    try:
        return op(a, b)
    except GEOSException:
        pass
    try:
        return op(a, b, grid_size=GRID_MM)
    except GEOSException:
        pass
    try:
        return op(repaired(a), repaired(b), grid_size=GRID_MM)
    except GEOSException:
        return Polygon()


def intersection(a: BaseGeometry, b: BaseGeometry) -> BaseGeometry:
    """``a ∩ b``, retried on a snap grid and then on repaired inputs."""
    return _binary(shapely.intersection, a, b)


def difference(a: BaseGeometry, b: BaseGeometry) -> BaseGeometry:
    """``a − b``, retried as :func:`intersection` is."""
    return _binary(shapely.difference, a, b)


def union(parts: Sequence[BaseGeometry]) -> BaseGeometry:
    """The union of ``parts``, retried on a snap grid and then on repaired parts."""
    try:
        return shapely.union_all(list(parts))
    except GEOSException:
        pass
    try:
        return shapely.union_all(list(parts), grid_size=GRID_MM)
    except GEOSException:
        return shapely.union_all([repaired(p) for p in parts], grid_size=GRID_MM)


def repaired(geom: BaseGeometry) -> BaseGeometry:
    """A valid version of ``geom``: ``make_valid``, then a zero buffer for what is left."""
    if geom.is_valid:
        return geom
    fixed = shapely.make_valid(geom)
    return fixed if fixed.is_valid else fixed.buffer(0)
