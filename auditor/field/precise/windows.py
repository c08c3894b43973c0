"""Board-level solves split into neighbour windows, and the rule that decides when.

A coupling table or a slider scan over a few electrodes is one batched
solve. Over a long row of large electrodes (32 strips of 15 x 42 mm) that
one solve drives every electrode at every finger step over the whole row:
memory grows as (steps x electrodes) x cells, several gigabytes. Coupling
and a finger's effect fall off over a few electrode pitches (the other
electrodes, held at 0 V, screen them), so such solves are split into
windows, each with only the electrodes near its own part of the work:

* scan: the finger positions are taken in blocks of
  :data:`SCAN_BLOCK_SEGMENTS` segments (a position belongs to the block of
  its nearest segment); a block's solve has its segments and
  ``reach_segments`` more on each side, and a segment outside that window
  takes no change from the finger there;
* coupling: electrodes in blocks of :data:`COUPLING_BLOCK_ELECTRODES` along
  the row; a block's solve has its electrodes and every electrode within
  ``reach_mm`` of one of them, and pairs farther apart than that are taken
  as uncoupled.

Both criteria are checked against the whole solve in
``tests/unit/field/precise/test_precise_windows.py``.
"""

from __future__ import annotations

from collections.abc import Sequence

import numpy as np
import shapely
from numpy.typing import NDArray

#: A board-level solve is split when its grid cells times its right-hand
#: sides exceed this: about 16 MB per complex copy of every column's field,
#: where the demo's coupling table (0.42 million) and scan (0.21 million)
#: stay whole and a 32-strip slider's scan (130 million) and coupling table
#: (2.9 million) are split.
WHOLE_SOLVE_BUDGET = 1_000_000
#: Segments whose finger positions share one scan window.
SCAN_BLOCK_SEGMENTS = 3
#: Segments solved on each side of a scan block (measured on a 12-strip
#: row, no plane: changes within 0.05 % of the largest change of the whole
#: solve, 0.5 % with one segment; see the test of this module).
SCAN_REACH_SEGMENTS = 3
#: Copper kept around a window's segments and finger positions (mm), as the
#: audit keeps the ground within 5 mm of the electrodes for the whole solve.
WINDOW_MARGIN_MM = 5.0
#: Electrodes per coupling block.
COUPLING_BLOCK_ELECTRODES = 4
#: Electrodes farther apart than this (mm, copper to copper) are taken as
#: uncoupled. Measured on a real 32-strip row with no plane under it (the
#: worst case: coupling then falls off slowly): each dropped pair is under
#: 0.7 % of the nearest neighbour's coupling, but together they are up to
#: 7 % of a pad's total crosstalk; every kept pair is within 2.3 % of the
#: largest coupling of the whole solve. Tested on a fixture in
#: tests/unit/solve/test_precise.py.
COUPLING_REACH_MM = 40.0

IntArray = NDArray[np.int64]


def is_split(grid_cells: int, columns: int, budget: int = WHOLE_SOLVE_BUDGET) -> bool:
    """True when a solve of ``columns`` right-hand sides over ``grid_cells``
    is too large to run whole."""
    return grid_cells * columns > budget


def scan_windows(centres_mm: Sequence[float] | NDArray[np.float64],
                 positions_mm: Sequence[float] | NDArray[np.float64],
                 period_mm: float | None, block: int = SCAN_BLOCK_SEGMENTS,
                 reach: int = SCAN_REACH_SEGMENTS) -> list[tuple[IntArray, IntArray]]:
    """Finger positions and the segments of each scan window.

    Returns, per window, the indices of its positions and of its segments
    (sorted). ``period_mm`` is the length of a wheel's closed path (segment
    indices then wrap), None for a slider.
    """
    centres = np.asarray(centres_mm, dtype=float)
    positions = np.asarray(positions_mm, dtype=float)
    distance = np.abs(positions[:, None] - centres[None, :])
    if period_mm is not None:
        distance = np.minimum(distance, period_mm - distance)
    nearest = np.argmin(distance, axis=1) // block
    count = centres.size
    out = []
    for first in range(0, count, block):
        taken = np.flatnonzero(nearest == first // block).astype(np.int64)
        if not taken.size:
            continue
        wanted = np.arange(first - reach, min(first + block, count) + reach)
        wanted = wanted % count if period_mm is not None else wanted[(wanted >= 0)
                                                                     & (wanted < count)]
        out.append((taken, np.unique(wanted).astype(np.int64)))
    return out


def coupling_blocks(geometries: Sequence[shapely.Geometry],
                    block: int = COUPLING_BLOCK_ELECTRODES,
                    reach_mm: float = COUPLING_REACH_MM) -> list[tuple[IntArray, IntArray]]:
    """Blocks of electrodes along the row and the electrodes each block's solve holds.

    Electrodes are ordered by centroid along the longer side of their joint
    bounding box and cut into runs of ``block``; a block's solve holds it and
    every electrode within ``reach_mm`` of one of its electrodes. Returns,
    per block, its electrode indices and the solve's (sorted, the block's
    among them).
    """
    bounds = shapely.total_bounds(list(geometries))
    axis = 0 if bounds[2] - bounds[0] >= bounds[3] - bounds[1] else 1
    centroids = shapely.get_coordinates(shapely.centroid(list(geometries)))
    order = np.lexsort((centroids[:, 1 - axis], centroids[:, axis]))
    out = []
    for first in range(0, order.size, block):
        members = order[first:first + block]
        near = [k for k, geometry in enumerate(geometries)
                if min(shapely.distance(geometry, geometries[m]) for m in members) <= reach_mm]
        out.append((np.sort(members).astype(np.int64), np.array(near, dtype=np.int64)))
    return out
