"""Electrode coupling and a finger scanned along a slider, from Maxwell matrices.

The finger is a disk: grounded by default (the change of a segment's Maxwell
self capacitance ``C_ii``), or floating with a body network, reduced by
:func:`auditor.field.circuit.touch_network` like the quick solve.
"""

from __future__ import annotations

import math
from collections.abc import Sequence
from dataclasses import dataclass

import numpy as np
import shapely
from numpy.typing import NDArray
from shapely.geometry import LineString, Point, Polygon, box

from auditor.errors import UsageError
from auditor.field.circuit import touch_network
from auditor.field.matrix import CapacitanceMatrix
from auditor.field.precise.medium import LayeredMedium
from auditor.field.precise.solve import Conductor, solve_variants
from auditor.field.precise.windows import (
    SCAN_REACH_SEGMENTS,
    WHOLE_SOLVE_BUDGET,
    WINDOW_MARGIN_MM,
    is_split,
    scan_windows,
)

FINGER = "finger"


@dataclass(frozen=True)
class Coupling:
    """Crosstalk between electrodes: ``-C_ij`` in pF and as a fraction of ``C_ii``.

    ``C_ii`` is the Maxwell self term (all other conductors held at 0 V),
    the pad's Cp in this solve; row ``i`` gives what couples into pad ``i``.
    """

    names: tuple[str, ...]
    crosstalk_pf: tuple[tuple[float, ...], ...]
    fraction_of_cp: tuple[tuple[float, ...], ...]


def coupling_between(matrix: CapacitanceMatrix, electrodes: Sequence[str]) -> Coupling:
    """Coupling among ``electrodes`` (names in ``matrix``; others are ignored)."""
    index = [matrix.names.index(name) for name in electrodes]
    values = matrix.array()[np.ix_(index, index)]
    crosstalk = -values + np.diag(np.diag(values))
    fraction = crosstalk / np.diag(values)[:, None]
    return Coupling(tuple(electrodes), _rows(crosstalk), _rows(fraction))


@dataclass(frozen=True)
class SliderScan:
    """Response of slider segments to a finger stepped along a path.

    ``delta_pf[n][i]`` is segment ``i``'s change at ``positions_mm[n]`` (distance
    along the path); ``estimated_mm[n]`` the centroid-interpolated position,
    ``nan`` where the total response is below the dead-zone threshold.
    ``linearity_mm`` is the worst ``|estimated - true|`` between the first and
    last segment centres (anywhere, distances wrapped, on a wheel); ``dead_zones_mm`` the position intervals with too
    little response; ``reversals_mm`` positions where the estimate steps back.
    """

    segment_names: tuple[str, ...]
    segment_centres_mm: tuple[float, ...]
    positions_mm: tuple[float, ...]
    delta_pf: tuple[tuple[float, ...], ...]
    estimated_mm: tuple[float, ...]
    linearity_mm: float
    dead_zones_mm: tuple[tuple[float, float], ...]
    reversals_mm: tuple[float, ...]
    matrices: tuple[CapacitanceMatrix, ...]

    @property
    def monotonic(self) -> bool:
        """True when the estimated position never steps back along the path."""
        return not self.reversals_mm


@dataclass(frozen=True)
class Finger:
    """Finger tip as a zero-thickness disk on a medium level, grounded by default."""

    radius_mm: float
    level: int


@dataclass(frozen=True)
class BodyCoupling:
    """Floating finger: the network of :func:`auditor.field.circuit.touch_network`.

    ``device_ground`` names the conductor that is the device's ground (a meshed
    pour or plane), or None when the device ground is the solve's reference.
    A plane folded into the medium is part of that reference, so it implies a
    device ground tied to earth; mesh a finite plane as a conductor to model
    a small device-to-earth capacitance.
    """

    device_to_earth_pf: float
    body_to_earth_pf: float
    device_ground: str | None = None


def slider_scan(segments: Sequence[Conductor], finger: Finger, path: LineString,
                step_mm: float, medium: LayeredMedium, cell_mm: float, *,
                others: Sequence[Conductor] = (), dead_fraction: float = 0.1,
                body: BodyCoupling | None = None, budget: int = WHOLE_SOLVE_BUDGET,
                reach_segments: int = SCAN_REACH_SEGMENTS) -> SliderScan:
    """Step ``finger`` along ``path`` over ``segments`` and analyse the response.

    Parameters
    ----------
    segments:
        Slider segments in path order.
    finger:
        Disk radius and level (usually the top face of the overlay).
    path:
        Line the finger centre follows; positions are distances along it. A
        closed line is a wheel: positions wrap and the estimate is the
        response-weighted circular mean of the segment positions.
    step_mm:
        Scan step.
    others:
        Further conductors (ground pour, neighbouring pads) held at 0 V.
    dead_fraction:
        Total response below this fraction of its maximum counts as dead.
    body:
        If given, the finger floats with this body network and each
        segment's capacitance is the reduced one seen against the device
        ground (segments held at device ground); otherwise the finger is
        grounded and the change is that of the Maxwell ``C_ii``.
    budget, reach_segments:
        When the whole scan's grid cells times right-hand sides exceed
        ``budget``, it is solved in windows of
        :mod:`auditor.field.precise.windows`, each with ``reach_segments``
        segments beyond its block on each side (a segment outside a
        position's window takes no change there; ``matrices`` then hold the
        window's conductors only).
    """
    if not step_mm > 0.0 or path.length <= 0.0:
        raise UsageError("slider scan needs a path of some length and a step > 0 mm")
    period = path.length if path.is_closed else None
    positions = np.arange(0.0, path.length + (0.0 if period else 1e-9), step_mm)
    if period is not None and positions[-1] > period - 1e-9:
        positions = positions[:-1]
    disks = [Point(path.interpolate(s).coords[0]).buffer(finger.radius_mm, quad_segs=64)
             for s in positions]
    centres = np.array([path.project(c.geometry.centroid) for c in segments])
    fixed = list(segments) + list(others)
    x0, y0, x1, y1 = shapely.total_bounds([c.geometry for c in fixed] + disks)
    grid_cells = int((x1 - x0) * (y1 - y0) / (cell_mm * cell_mm))
    if is_split(grid_cells, len(segments) * (len(disks) + 1), budget):
        windows = scan_windows(centres, positions, period, reach=reach_segments)
        deltas, matrices = _windowed(segments, others, disks, windows, finger.level, medium,
                                     cell_mm, body, (x0, y0))
    else:
        deltas, matrices = _scanned(segments, others, disks, finger.level, medium, cell_mm,
                                    body)
    return _analysed([c.name for c in segments], centres, positions, deltas, dead_fraction,
                     matrices, period)


def _scanned(segments: Sequence[Conductor], others: Sequence[Conductor],
             disks: Sequence[shapely.Geometry], level: int, medium: LayeredMedium,
             cell_mm: float, body: BodyCoupling | None, corner: Point | None = None
             ) -> tuple[np.ndarray, list[CapacitanceMatrix]]:
    """Each segment's change with the finger on each disk, in one solve
    (``corner``: a point the grid must reach, to align it with another)."""
    fixed = list(segments) + list(others)
    window = shapely.union_all([c.geometry for c in fixed] + list(disks)
                               + ([corner] if corner is not None else [])).envelope
    names = [c.name for c in segments]
    # The baseline and every finger position in one batched solve: the segments
    # are meshed once and share one operator (docs/precise-mode.md, Speed).
    variants = [()] + [(Conductor(FINGER, disk, level),) for disk in disks]
    # A grounded finger needs only the segments' own columns; the body network
    # reduces the whole matrix.
    driven = names if body is None else None
    baseline, *touched = (s.matrix for s in solve_variants(fixed, variants, medium, cell_mm,
                                                           window=window, driven=driven))
    base_self = _segment_self_pf(baseline, names, body, touched=False)
    deltas = [_segment_self_pf(matrix, names, body, touched=True) - base_self
              for matrix in touched]
    return np.array(deltas).reshape(len(disks), len(names)), touched


def _windowed(segments: Sequence[Conductor], others: Sequence[Conductor],
              disks: Sequence[shapely.Geometry],
              windows: list[tuple[NDArray[np.int64], NDArray[np.int64]]], level: int,
              medium: LayeredMedium, cell_mm: float, body: BodyCoupling | None,
              origin: tuple[float, float]) -> tuple[np.ndarray, list[CapacitanceMatrix]]:
    """:func:`_scanned` per window: its segments solved, the copper around
    them (other segments included) clipped to the window and held at 0 V.
    Each window's grid starts on a line of the whole scan's grid (from
    ``origin``), so the copper is cut into the same cells as in one solve."""
    deltas = np.zeros((len(disks), len(segments)))
    matrices: list[CapacitanceMatrix | None] = [None] * len(disks)
    for taken, wanted in windows:
        own = [segments[i] for i in wanted]
        near = [disks[n] for n in taken]
        x0, y0, x1, y1 = shapely.total_bounds([c.geometry for c in own] + near)
        frame = box(x0 - WINDOW_MARGIN_MM, y0 - WINDOW_MARGIN_MM, x1 + WINDOW_MARGIN_MM,
                    y1 + WINDOW_MARGIN_MM)
        rest = [c for k, c in enumerate(segments) if k not in set(wanted.tolist())]
        held = _clipped([*rest, *others], frame)
        corner = Point(origin[0] + math.floor((x0 - WINDOW_MARGIN_MM - origin[0]) / cell_mm)
                       * cell_mm,
                       origin[1] + math.floor((y0 - WINDOW_MARGIN_MM - origin[1]) / cell_mm)
                       * cell_mm)
        part, touched = _scanned(own, held, near, level, medium, cell_mm, body, corner)
        deltas[np.ix_(taken, wanted)] = part
        for n, matrix in zip(taken, touched, strict=True):
            matrices[n] = matrix
    return deltas, [m for m in matrices if m is not None]


def _clipped(conductors: Sequence[Conductor], frame: Polygon) -> list[Conductor]:
    """The conductors' polygons inside ``frame`` (those with any)."""
    out = []
    for conductor in conductors:
        if not conductor.geometry.intersects(frame):
            continue
        parts = [g for g in shapely.get_parts(conductor.geometry.intersection(frame))
                 if g.geom_type == "Polygon" and g.area > 1e-9]
        if parts:
            out.append(Conductor(conductor.name, shapely.MultiPolygon(parts), conductor.level))
    return out


def _segment_self_pf(matrix: CapacitanceMatrix, names: list[str], body: BodyCoupling | None,
                     touched: bool) -> np.ndarray:
    if body is None:
        return np.array([matrix.entry(name, name) for name in names])
    reduced = touch_network(matrix, names, body.device_ground, FINGER if touched else None,
                            body.device_to_earth_pf, body.body_to_earth_pf)
    return np.diag(reduced.array())


def _analysed(names: list[str], centres: np.ndarray, positions: np.ndarray,
              deltas: np.ndarray, dead_fraction: float,
              matrices: list[CapacitanceMatrix], period: float | None = None) -> SliderScan:
    total = deltas.sum(axis=1)
    live = total >= dead_fraction * total.max()
    safe_total = np.where(total > 0, total, 1.0)
    if period is None:
        estimate = np.where(live, deltas @ centres / safe_total, np.nan)
        span = (positions >= centres.min()) & (positions <= centres.max()) & live
        error = estimate - positions
        steps = np.diff(estimate)
    else:
        estimate = np.where(live, _circular_mean(deltas, centres, period), np.nan)
        span = live
        error = _wrapped(estimate - positions, period)
        steps = _wrapped(np.diff(np.append(estimate, estimate[0])), period)
    linearity = float(np.max(np.abs(error[span]))) if span.any() else np.nan
    steps_back = (np.flatnonzero(steps < 0.0) + 1) % positions.size
    return SliderScan(tuple(names), tuple(float(c) for c in centres),
                      tuple(float(p) for p in positions), _rows(deltas),
                      tuple(float(e) for e in estimate), linearity,
                      _intervals(positions, ~live),
                      tuple(float(positions[i]) for i in steps_back), tuple(matrices))


def _circular_mean(deltas: np.ndarray, centres: np.ndarray, period: float) -> np.ndarray:
    """Wheel position: angle of the response-weighted sum of segment unit vectors."""
    angle = 2.0 * np.pi * centres / period
    mean = np.arctan2(deltas @ np.sin(angle), deltas @ np.cos(angle))
    return np.asarray(np.mod(mean, 2.0 * np.pi) * period / (2.0 * np.pi), dtype=float)


def _wrapped(distance: np.ndarray, period: float) -> np.ndarray:
    """Distances folded into ``[-period/2, period/2)``."""
    return np.asarray(np.mod(distance + 0.5 * period, period) - 0.5 * period, dtype=float)


def _intervals(positions: np.ndarray, flagged: np.ndarray) -> tuple[tuple[float, float], ...]:
    """Maximal runs of flagged positions as ``(first, last)`` pairs."""
    edges = np.diff(np.concatenate([[0], flagged.astype(int), [0]]))
    starts, ends = np.flatnonzero(edges == 1), np.flatnonzero(edges == -1) - 1
    return tuple((float(positions[a]), float(positions[b])) for a, b in zip(starts, ends,
                                                                             strict=True))


def _rows(values: np.ndarray) -> tuple[tuple[float, ...], ...]:
    return tuple(tuple(float(v) for v in row) for row in values)
