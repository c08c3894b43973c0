"""Board-level precise results: the electrode coupling table and slider scans.

* Coupling: one 3-D solve with every self-capacitance electrode, and the
  device ground within :data:`COUPLING_MARGIN_MM` of them, as conductors;
  crosstalk is ``-C_ij`` and its share of ``C_ii`` (every other conductor at
  0 V, the way a scanning controller holds the inactive inputs).
* Scans: per slider or wheel group, a grounded finger disk stepped along the
  line through the segment centroids (a slider's line extended by half a
  pitch at each end; a wheel's closed). The grounded finger gives the upper
  bound of each ΔC; what is judged is the response's shape (linearity, dead
  zones, reversals), which the body network scales but hardly reshapes.
"""

from __future__ import annotations

import math
from collections.abc import Callable
from functools import partial

import numpy as np
import shapely
from shapely.geometry import LineString, Point

from auditor.config import Config
from auditor.field.precise import (
    Conductor,
    Finger,
    slider_scan,
    solve_variants,
)
from auditor.field.precise.windows import (
    COUPLING_BLOCK_ELECTRODES,
    COUPLING_REACH_MM,
    WHOLE_SOLVE_BUDGET,
    coupling_blocks,
    is_split,
)
from auditor.model.board import Board
from auditor.model.results import CouplingTable, PreciseExtras, SegmentScan
from auditor.model.vocabulary import SELF_KINDS
from auditor.sensors.model import Sensor
from auditor.solve.precise import PreciseStack, ground_conductors, stack_for, window_around
from auditor.solve.setup import DEFAULT_FINGER_MM

COUPLING_MARGIN_MM = 5.0
COUPLING_CELL_MM = 0.5
SCAN_CELL_MM = 0.75
#: Finger steps per segment pitch along a scan.
STEPS_PER_PITCH = 3


def _electrodes(sensors: tuple[Sensor, ...], stack: PreciseStack) -> list[Conductor]:
    return [Conductor(s.name, s.geometry, stack.copper_levels[s.layer])
            for s in sorted(sensors, key=lambda s: s.name)]


def coupling_table(board: Board, sensors: tuple[Sensor, ...], config: Config,
                   cell_mm: float = COUPLING_CELL_MM, budget: int = WHOLE_SOLVE_BUDGET,
                   block: int = COUPLING_BLOCK_ELECTRODES,
                   reach_mm: float = COUPLING_REACH_MM) -> CouplingTable | None:
    """Crosstalk among the self-capacitance electrodes (None with fewer than two).

    One solve, or, when that is larger than ``budget`` allows
    (:func:`auditor.field.precise.windows.is_split`), one per ``block``
    neighbouring electrodes with those within ``reach_mm`` of them
    (:func:`auditor.field.precise.windows.coupling_blocks`), pairs farther
    apart taken as uncoupled.
    """
    pads = tuple(s for s in sensors if s.kind in SELF_KINDS and s.area_mm2 > 0)
    if len(pads) < 2:
        return None
    stack = stack_for(board, config)
    electrodes = _electrodes(pads, stack)
    ground_net = next((s.surroundings.ground_net for s in pads if s.surroundings), "")
    window = window_around(shapely.union_all([c.geometry for c in electrodes]),
                           COUPLING_MARGIN_MM)
    x0, y0, x1, y1 = window.bounds
    if not is_split(int((x1 - x0) * (y1 - y0) / cell_mm ** 2), len(electrodes), budget):
        values = _maxwell(board, stack, electrodes, [], ground_net, cell_mm, None)
    else:
        values = np.zeros((len(electrodes), len(electrodes)))
        for own, members in coupling_blocks([c.geometry for c in electrodes], block,
                                             reach_mm):
            solved = [electrodes[k] for k in members]
            # The electrodes next beyond the solved ones stay in, at 0 V: they
            # screen the outermost ones as in the whole solve.
            rest = [c for k, c in enumerate(electrodes) if k not in set(members.tolist())
                    and min(c.geometry.distance(e.geometry) for e in solved) <= reach_mm]
            part = _maxwell(board, stack, solved, rest, ground_net, cell_mm, (x0, y0))
            values[np.ix_(own, members)] = part[np.searchsorted(members, own)]
    self_pf = np.diag(values)
    crosstalk = np.diag(self_pf) - values
    return CouplingTable(tuple(c.name for c in electrodes), _rows(crosstalk),
                         _rows(crosstalk / self_pf[:, None]), cell_mm)


def _maxwell(board: Board, stack: PreciseStack, electrodes: list[Conductor],
             held: list[Conductor], ground_net: str, cell_mm: float,
             origin: tuple[float, float] | None) -> np.ndarray:
    """Maxwell matrix of ``electrodes`` (in their order) with the ``held``
    electrodes at 0 V and the device ground within the margin of both.
    ``origin``: a corner of a grid this one's cells must line up with."""
    union = shapely.union_all([c.geometry for c in [*electrodes, *held]])
    window = window_around(union, COUPLING_MARGIN_MM)
    near = union.buffer(COUPLING_MARGIN_MM).intersection(window)
    clear = {level: shapely.union_all([c.geometry for c in electrodes if c.level == level])
             for level in {c.level for c in electrodes}}
    layer_of = {level: layer for layer, level in stack.copper_levels.items()}
    others: dict[str, list[shapely.Geometry]] = {}
    for conductor in held:
        others.setdefault(layer_of[conductor.level], []).append(conductor.geometry)
    grounds = ground_conductors(board, stack, ground_net, near, others,
                                {layer_of[level]: copper for level, copper in clear.items()})
    names = [c.name for c in electrodes]
    corner = None
    if origin is not None:
        x0, y0 = window.bounds[:2]
        corner = Point(origin[0] + math.floor((x0 - origin[0]) / cell_mm) * cell_mm,
                       origin[1] + math.floor((y0 - origin[1]) / cell_mm) * cell_mm)
    (solved,) = solve_variants(electrodes + grounds, [()], stack.medium, cell_mm,
                               driven=names, window=corner)
    matrix = solved.matrix
    index = [matrix.index(name) for name in names]
    return matrix.array()[np.ix_(index, index)]


def _rows(values: np.ndarray) -> tuple[tuple[float, ...], ...]:
    return tuple(tuple(float(v) for v in row) for row in values)


def _groups(sensors: tuple[Sensor, ...]) -> dict[tuple[str, str], list[Sensor]]:
    groups: dict[tuple[str, str], list[Sensor]] = {}
    for s in sensors:
        if s.kind in ("slider", "wheel"):
            groups.setdefault((s.kind, s.group or s.kind), []).append(s)
    return {k: sorted(v, key=lambda s: (s.index, s.name)) for k, v in sorted(groups.items())
            if len(v) >= 2}


def scan_path(segments: list[Sensor], closed: bool) -> tuple[LineString, float]:
    """Line through the segment centroids (and the mean pitch along it)."""
    points = [(s.geometry.centroid.x, s.geometry.centroid.y) for s in segments]
    line = LineString(points)
    pitch = line.length / (len(points) - 1)
    if closed:
        return LineString(points + [points[0]]), LineString(points + [points[0]]).length / len(
            points)
    (x0, y0), (x1, y1) = points[0], points[1]
    (xa, ya), (xb, yb) = points[-2], points[-1]
    first = _extended((x1, y1), (x0, y0), 0.5 * pitch)
    last = _extended((xa, ya), (xb, yb), 0.5 * pitch)
    return LineString([first, *points, last]), pitch


def _extended(a: tuple[float, float], b: tuple[float, float],
              by_mm: float) -> tuple[float, float]:
    dx, dy = b[0] - a[0], b[1] - a[1]
    norm = (dx * dx + dy * dy) ** 0.5 or 1.0
    return (b[0] + by_mm * dx / norm, b[1] + by_mm * dy / norm)


def scan_group(board: Board, config: Config, kind: str, group: str, segments: list[Sensor],
               finger_mm: float, cell_mm: float = SCAN_CELL_MM) -> SegmentScan:
    """The finger stepped along one slider or wheel."""
    stack = stack_for(board, config)
    path, pitch = scan_path(segments, closed=kind == "wheel")
    conductors = _electrodes(tuple(segments), stack)
    conductors.sort(key=lambda c: [s.name for s in segments].index(c.name))
    union = shapely.union_all([s.geometry for s in segments])
    window = window_around(union.union(path.buffer(0.5 * finger_mm)), COUPLING_MARGIN_MM)
    ground_net = next((s.surroundings.ground_net for s in segments if s.surroundings), "")
    clear = {segments[0].layer: union}
    grounds = ground_conductors(board, stack, ground_net, window, {}, clear)
    step = pitch / STEPS_PER_PITCH
    result = slider_scan(conductors, Finger(0.5 * finger_mm, 0), path, step, stack.medium,
                         cell_mm, others=grounds)
    centre = union.centroid
    return SegmentScan(group, kind, result.segment_names, result.segment_centres_mm,
                       result.positions_mm, result.delta_pf, result.estimated_mm,
                       result.linearity_mm, result.dead_zones_mm, result.reversals_mm,
                       step, cell_mm, centre.x, centre.y)


def extras_notes(finger_mm: float = DEFAULT_FINGER_MM,
                 coupling_cell_mm: float = COUPLING_CELL_MM,
                 scan_cell_mm: float = SCAN_CELL_MM) -> tuple[str, ...]:
    """How the coupling table and the scans were solved, for the report."""
    return (f"coupling: {coupling_cell_mm:g} mm cells, ground within "
            f"{COUPLING_MARGIN_MM:g} mm of the electrodes",
            f"scans: grounded {finger_mm:g} mm finger, {STEPS_PER_PITCH} steps per pitch, "
            f"{scan_cell_mm:g} mm cells")


def scan_jobs(board: Board, sensors: tuple[Sensor, ...], config: Config,
              finger_mm: float = DEFAULT_FINGER_MM, scan_cell_mm: float = SCAN_CELL_MM
              ) -> list[Callable[[], SegmentScan]]:
    """One independent job per slider or wheel scan, in group order."""
    return [partial(scan_group, board, config, kind, group, segments, finger_mm, scan_cell_mm)
            for (kind, group), segments in _groups(sensors).items()]


def precise_extras(board: Board, sensors: tuple[Sensor, ...], config: Config, *,
                   finger_mm: float = DEFAULT_FINGER_MM, coupling_cell_mm: float =
                   COUPLING_CELL_MM, scan_cell_mm: float = SCAN_CELL_MM) -> PreciseExtras:
    """Coupling table and slider/wheel scans of one board, in this process
    (an audit runs them as separate jobs: :mod:`auditor.solve.jobs`)."""
    scans = tuple(job() for job in scan_jobs(board, sensors, config, finger_mm, scan_cell_mm))
    return PreciseExtras(coupling_table(board, sensors, config, coupling_cell_mm), scans,
                         extras_notes(finger_mm, coupling_cell_mm, scan_cell_mm))
