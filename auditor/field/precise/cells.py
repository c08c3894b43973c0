"""Uniform square cells shared by every level of one solve."""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np
import shapely
from numpy.typing import NDArray

from auditor.errors import UsageError

IntArray = NDArray[np.int64]
FloatArray = NDArray[np.float64]
BoolArray = NDArray[np.bool_]


@dataclass(frozen=True)
class CellGrid:
    """``nx`` by ``ny`` square cells of side ``cell_mm`` from ``(x0_mm, y0_mm)``."""

    x0_mm: float
    y0_mm: float
    cell_mm: float
    nx: int
    ny: int

    def centres(self) -> tuple[FloatArray, FloatArray]:
        """Cell-centre coordinates, arrays of shape ``(nx, ny)``."""
        x = self.x0_mm + (np.arange(self.nx) + 0.5) * self.cell_mm
        y = self.y0_mm + (np.arange(self.ny) + 0.5) * self.cell_mm
        gx, gy = np.meshgrid(x, y, indexing="ij")
        return gx, gy


def grid_around(geometries: list[shapely.Geometry], cell_mm: float) -> CellGrid:
    """Smallest grid of ``cell_mm`` cells covering all geometries.

    The grid starts at the lower-left corner of the joint bounding box, so a
    rectangle whose sides are multiples of ``cell_mm`` is meshed exactly.
    """
    if not cell_mm > 0.0:
        raise UsageError(f"cell size must be > 0 mm, got {cell_mm}")
    bounds = np.array([g.bounds for g in geometries])
    x0, y0 = bounds[:, 0].min(), bounds[:, 1].min()
    width, height = bounds[:, 2].max() - x0, bounds[:, 3].max() - y0
    nx = max(math.ceil(width / cell_mm - 1e-9), 1)
    ny = max(math.ceil(height / cell_mm - 1e-9), 1)
    return CellGrid(float(x0), float(y0), cell_mm, nx, ny)


def rasterised(geometry: shapely.Geometry, grid: CellGrid) -> IntArray:
    """Flat indices of the cells whose centre lies inside ``geometry``.

    Centre sampling follows a curved edge with stair-steps; the resulting
    error on disks is measured in the tests and the bench.
    """
    gx, gy = grid.centres()
    inside = shapely.contains_xy(geometry, gx.ravel(), gy.ravel())
    result: IntArray = np.flatnonzero(inside).astype(np.int64)
    return result


def covered_subcells(geometry: shapely.Geometry, grid: CellGrid, subdivisions: int
                     ) -> tuple[FloatArray, IntArray, BoolArray]:
    """Share of each cell inside ``geometry`` and the sub-cell masks of the mixed cells.

    Returns the flat share per cell (``nx * ny``), the flat indices of the
    cells whose corners disagree and, for those, the ``subdivisions**2`` mask
    of sub-cell centres inside. A cell's share is its fraction of sub-cell
    centres inside: cells whose four corners agree are taken as fully inside
    or outside, and, like centre sampling, holes or slivers narrower than a
    sub-cell that touch no corner are missed. Sampling points rather than
    intersecting each mixed cell with the polygon keeps the cost at one
    point-in-polygon test per point, not one pass over a large pour's
    vertices per cell.
    """
    corners = _corners_inside(geometry, grid)
    count = corners[:-1, :-1] + corners[1:, :-1] + corners[:-1, 1:] + corners[1:, 1:]
    shares = (count == 4).astype(float).ravel()
    mixed = np.flatnonzero(((count > 0) & (count < 4)).ravel()).astype(np.int64)
    sub_x, sub_y = subcell_centres(grid, mixed, subdivisions)
    masks = np.asarray(shapely.contains_xy(geometry, sub_x.ravel(), sub_y.ravel()),
                       dtype=bool).reshape(sub_x.shape)
    shares[mixed] = masks.mean(axis=1) if mixed.size else 0.0
    return np.asarray(shares, dtype=float), mixed, masks


def _corners_inside(geometry: shapely.Geometry, grid: CellGrid) -> NDArray[np.int8]:
    """1 where a cell corner lies inside ``geometry``, shape ``(nx + 1, ny + 1)``.

    Only the corners within the geometry's bounding box are tested: a pad's
    few hundred instead of the whole window's tens of thousands.
    """
    corners = np.zeros((grid.nx + 1, grid.ny + 1), dtype=np.int8)
    x_min, y_min, x_max, y_max = geometry.bounds
    first_x = max(math.floor((x_min - grid.x0_mm) / grid.cell_mm), 0)
    first_y = max(math.floor((y_min - grid.y0_mm) / grid.cell_mm), 0)
    last_x = min(math.ceil((x_max - grid.x0_mm) / grid.cell_mm), grid.nx)
    last_y = min(math.ceil((y_max - grid.y0_mm) / grid.cell_mm), grid.ny)
    if last_x < first_x or last_y < first_y:
        return corners
    x = grid.x0_mm + np.arange(first_x, last_x + 1) * grid.cell_mm
    y = grid.y0_mm + np.arange(first_y, last_y + 1) * grid.cell_mm
    corner_x, corner_y = np.meshgrid(x, y, indexing="ij")
    shapely.prepare(geometry)
    inside = shapely.contains_xy(geometry, corner_x.ravel(), corner_y.ravel())
    corners[first_x:last_x + 1, first_y:last_y + 1] = inside.reshape(corner_x.shape)
    return corners


def subcell_centres(grid: CellGrid, cells: IntArray, subdivisions: int
                    ) -> tuple[FloatArray, FloatArray]:
    """Centres of the ``subdivisions**2`` sub-cells of each cell, shape ``(cells, S*S)``."""
    step = grid.cell_mm / subdivisions
    offsets = (np.arange(subdivisions) + 0.5) * step
    sub_x = np.repeat(offsets, subdivisions)
    sub_y = np.tile(offsets, subdivisions)
    x0 = grid.x0_mm + (cells // grid.ny) * grid.cell_mm
    y0 = grid.y0_mm + (cells % grid.ny) * grid.cell_mm
    return (np.asarray(x0[:, None] + sub_x[None, :], dtype=float),
            np.asarray(y0[:, None] + sub_y[None, :], dtype=float))
