"""Electrode coupling and a finger scanned along a slider, from Maxwell matrices.

The finger is a disk: grounded by default (the change of a segment's Maxwell
self capacitance ``C_ii``), or floating with a body network, reduced by
:func:`auditor.field.circuit.touch_network` like the quick solve.
"""

from __future__ import annotations

from collections.abc import Sequence
from dataclasses import dataclass

import numpy as np
import shapely
from shapely.geometry import LineString, Point

from auditor.errors import UsageError
from auditor.field.circuit import touch_network
from auditor.field.matrix import CapacitanceMatrix
from auditor.field.precise.medium import LayeredMedium
from auditor.field.precise.solve import Conductor, solve_variants

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
                body: BodyCoupling | None = None) -> SliderScan:
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
    """
    if not step_mm > 0.0 or path.length <= 0.0:
        raise UsageError("slider scan needs a path of some length and a step > 0 mm")
    period = path.length if path.is_closed else None
    positions = np.arange(0.0, path.length + (0.0 if period else 1e-9), step_mm)
    if period is not None and positions[-1] > period - 1e-9:
        positions = positions[:-1]
    disks = [Point(path.interpolate(s).coords[0]).buffer(finger.radius_mm, quad_segs=64)
             for s in positions]
    fixed = list(segments) + list(others)
    window = shapely.union_all([c.geometry for c in fixed] + disks).envelope
    names = [c.name for c in segments]
    # The baseline and every finger position in one batched solve: the segments
    # are meshed once and share one operator (docs/precise-mode.md, Speed).
    variants = [()] + [(Conductor(FINGER, disk, finger.level),) for disk in disks]
    # A grounded finger needs only the segments' own columns; the body network
    # reduces the whole matrix.
    driven = names if body is None else None
    baseline, *touched = (s.matrix for s in solve_variants(fixed, variants, medium, cell_mm,
                                                           window=window, driven=driven))
    base_self = _segment_self_pf(baseline, names, body, touched=False)
    matrices = touched
    deltas = [_segment_self_pf(matrix, names, body, touched=True) - base_self
              for matrix in touched]
    centres = np.array([path.project(c.geometry.centroid) for c in segments])
    return _analysed(names, centres, positions, np.array(deltas), dead_fraction, matrices,
                     period)


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
