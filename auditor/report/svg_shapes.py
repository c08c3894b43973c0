"""Shapes as compact SVG paths, coordinates rounded to 0.01 mm.

A board's copper is thousands of small polygons; shapely's own ``.svg()``
writes each as an element of its own with every coordinate to 16 digits,
which made the demo's picture over a megabyte. Here one geometry is one
``<path>`` (rings joined, holes by the even-odd rule) and a coordinate has at
most two decimals: 0.01 mm is far below what a picture of a board shows.
"""

from __future__ import annotations

from collections.abc import Iterator, Sequence
from html import escape

from shapely.geometry import LinearRing, LineString, Polygon
from shapely.geometry.base import BaseGeometry

#: Decimals of every coordinate and length in the picture (0.01 mm).
DECIMALS = 2


def number(value: float) -> str:
    """``value`` to 0.01 without trailing zeros (``-0`` written ``0``).

    Examples
    --------
    >>> number(12.3456), number(2.0), number(-0.001)
    ('12.35', '2', '0')
    """
    text = f"{value:.{DECIMALS}f}".rstrip("0").rstrip(".")
    return "0" if text in ("-0", "") else text


def _lines(geometry: BaseGeometry) -> Iterator[tuple[Sequence[tuple[float, ...]], bool]]:
    """Every ring or line of ``geometry`` with whether it is closed."""
    if geometry.is_empty:
        return
    if hasattr(geometry, "geoms"):  # Multi* and collections
        for part in geometry.geoms:
            yield from _lines(part)
    elif isinstance(geometry, Polygon):
        yield geometry.exterior.coords, True
        for hole in geometry.interiors:
            yield hole.coords, True
    elif isinstance(geometry, LinearRing):
        yield geometry.coords, True
    elif isinstance(geometry, LineString):
        yield geometry.coords, False


def path_data(geometry: BaseGeometry) -> str:
    """The ``d`` attribute drawing ``geometry`` (points are left out),
    simplified within 0.01 mm.

    Examples
    --------
    >>> from shapely.geometry import box
    >>> path_data(box(0, 0, 1.004, 2))
    'M1 0 1 2 0 2 0 0Z'
    """
    parts = []
    # Points closer than the rounding to the line through their neighbours
    # add bytes, not shape (round track ends carry dozens of them).
    simplified = geometry.simplify(10.0 ** -DECIMALS) if not geometry.is_empty else geometry
    for coords, closed in _lines(simplified):
        points: list[str] = []
        for x, y, *_ in coords:
            point = f"{number(x)} {number(y)}"
            if not points or points[-1] != point:
                points.append(point)
        if closed and len(points) > 1 and points[-1] == points[0]:
            points.pop()
        if len(points) > 1:
            parts.append("M" + " ".join(points) + ("Z" if closed else ""))
    return "".join(parts)


def shape_path(geometry: BaseGeometry, *, fill: str = "none", stroke: str = "none",
               stroke_width: float = 0.0, opacity: float = 1.0, **attrs: str) -> str:
    """One ``<path>`` element for ``geometry``; empty text for nothing to draw."""
    d = path_data(geometry)
    if not d:
        return ""
    extra = "".join(f' {k.replace("_", "-")}="{escape(v)}"' for k, v in attrs.items())
    style = f' fill="{fill}"' + (' fill-rule="evenodd"' if fill != "none" else "")
    if stroke != "none":
        style += f' stroke="{stroke}" stroke-width="{number(stroke_width)}"'
    if opacity < 1.0:
        style += f' opacity="{number(opacity)}"'
    return f'<path d="{d}"{style}{extra}/>'
