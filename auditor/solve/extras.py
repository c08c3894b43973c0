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

from collections.abc import Callable
from functools import partial

import shapely
from shapely.geometry import LineString

from auditor.config import Config
from auditor.field.precise import (
    Conductor,
    Finger,
    coupling_between,
    slider_scan,
    solve_variants,
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
                   cell_mm: float = COUPLING_CELL_MM) -> CouplingTable | None:
    """Crosstalk among the self-capacitance electrodes (None with fewer than two)."""
    pads = tuple(s for s in sensors if s.kind in SELF_KINDS and s.area_mm2 > 0)
    if len(pads) < 2:
        return None
    stack = stack_for(board, config)
    electrodes = _electrodes(pads, stack)
    union = shapely.union_all([s.geometry for s in pads])
    window = window_around(union, COUPLING_MARGIN_MM)
    near = union.buffer(COUPLING_MARGIN_MM).intersection(window)
    ground_net = next((s.surroundings.ground_net for s in pads if s.surroundings), "")
    clear = {layer: shapely.union_all([s.geometry for s in pads if s.layer == layer])
             for layer in {s.layer for s in pads}}
    grounds = ground_conductors(board, stack, ground_net, near, {}, clear)
    names = [c.name for c in electrodes]
    (solved,) = solve_variants(electrodes + grounds, [()], stack.medium, cell_mm, driven=names)
    coupling = coupling_between(solved.matrix, names)
    return CouplingTable(coupling.names, coupling.crosstalk_pf, coupling.fraction_of_cp,
                         cell_mm)


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
