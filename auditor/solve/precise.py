"""Precise mode of the audit: the real copper of each electrode in 3-D.

Per electrode the conductors are its own copper, the device ground's copper
(every copper layer) and the other electrodes within a window of the pad's
bounding box plus :data:`WINDOW_MARGIN_MM`, clipped to it, and for the touch
solve the finger disk over the electrode's centroid on the touch surface.
Other electrodes and every other net's copper in the window (signals on
any layer) are held at device-ground potential (a self-capacitance
controller grounds or shields the inactive inputs, a driven signal is a
low-impedance node; stated choice). The dielectric stack is the board's
stackup from the touch side plus air gap and overlay
(:class:`auditor.field.precise.LayeredMedium`, air half-spaces above and
below). Baseline and touch are separate solves, reduced by the same circuit
step as the quick solve (:func:`auditor.field.pad_model.reduced_network`).
The trace's share of Cp is the quick cross-section model's.
"""

from __future__ import annotations

import math
from dataclasses import dataclass
from functools import lru_cache

import numpy as np
import shapely
from shapely.geometry import Point, box
from shapely.ops import polylabel

from auditor.config import Config
from auditor.field.api import solve_pad
from auditor.field.precise import Conductor, LayeredMedium
from auditor.field.round_pad import (
    CONTACT_AIR_MM,
    FINGER,
    GROUND,
    PAD,
    pad_capacitances,
    solve_pair,
)
from auditor.field.traces import traces_pf
from auditor.model.board import Board
from auditor.model.results import PadMetrics
from auditor.sensors.model import Sensor
from auditor.sensors.spatial import pieces_in
from auditor.solve.setup import FieldInput
from auditor.solve.stack import overlay_with_mask, touch_mask

#: Copper beyond this distance from the pad's bounding box is left out; the
#: quick model's own ground reach is 10 mm (common practice, no source).
WINDOW_MARGIN_MM = 10.0
#: Cell side of the per-pad solves; 0.5 mm keeps a 5 mm disk within 0.6 %
#: of 8 eps0 a (docs/precise-mode.md, edge-cell table).
CELL_MM = 0.5
@dataclass(frozen=True)
class PreciseStack:
    """The layered medium and the level of each copper layer (level 0: touch face)."""

    medium: LayeredMedium
    copper_levels: dict[str, int]
    notes: tuple[str, ...] = ()


def stack_for(board: Board, config: Config) -> PreciseStack:
    """Overlay, air gap and the stackup from the touch side down, with copper levels.

    Solder mask is folded in as in the quick model: the touch-side mask in
    series under the overlay, the far-side mask (facing away from the
    finger) left out. Layers of 10-25 µm would otherwise set the scale of
    the Green's function tabulation and cost far more than they change.
    """
    layers: list[tuple[float, float]] = []
    cover_mm, cover_er = overlay_with_mask(config, touch_mask(board, config))
    if cover_mm > 0:
        layers.append((cover_mm, max(cover_er, 1.0)))
    if config.air_gap_mm > 0:
        layers.append((config.air_gap_mm, 1.0))
    physical = board.stackup.layers
    physical = physical if config.touch_side == "front" else tuple(reversed(physical))
    notes: list[str] = ["solder mask: touch side in series with the overlay, far side "
                        "left out"]
    if not layers:
        layers.append((CONTACT_AIR_MM, 1.0))
        notes.append(f"no overlay: finger {CONTACT_AIR_MM} mm above the copper")
    levels: dict[str, int] = {}
    for lay in physical:
        if lay.kind == "copper":
            levels[lay.name] = len(layers)
        elif lay.kind == "dielectric" and lay.thickness_mm > 0 and levels:
            er = lay.epsilon_r if lay.epsilon_r > 1.0 else 4.4
            layers.append((lay.thickness_mm, er))
    return PreciseStack(LayeredMedium(tuple(layers)), levels, tuple(notes))


def window_around(geometry: shapely.Geometry, margin_mm: float) -> shapely.Geometry:
    """The pad's bounding box grown by ``margin_mm``."""
    x0, y0, x1, y1 = geometry.bounds
    return box(x0 - margin_mm, y0 - margin_mm, x1 + margin_mm, y1 + margin_mm)


def ground_conductors(board: Board, stack: PreciseStack, ground_net: str,
                      window: shapely.Geometry, held: dict[str, list[shapely.Geometry]],
                      keep_clear: dict[str, shapely.Geometry]) -> list[Conductor]:
    """Device ground per copper layer in the window, with held electrodes merged in.

    ``held`` lists further copper (other electrodes) tied to device ground;
    ``keep_clear`` is copper of solved electrodes that must not overlap.
    """
    out = []
    for layer, level in stack.copper_levels.items():
        pieces = list(held.get(layer, []))
        if ground_net:
            pieces.append(board.copper_of_net(layer, ground_net))
        if not pieces:
            continue
        copper = shapely.union_all(_clipped(pieces, window.bounds))
        if window.area < _box_area(window.bounds) * (1.0 - 1e-12):
            copper = copper.intersection(window)
        if layer in keep_clear:
            copper = copper.difference(keep_clear[layer])
        copper = _polygons_only(copper)
        if copper.area > 1e-6:
            out.append(Conductor(f"{GROUND}@{layer}", copper, level))
    return out


def _clipped(pieces: list[shapely.Geometry], bounds: tuple[float, float, float, float]
             ) -> list[shapely.Geometry]:
    """Each piece cut to the window's bounding box.

    Cut first, so that the union handles only the window's share of a
    board-wide pour. The rectangle clip is several times faster than a
    general intersection but may return an invalid polygon in degenerate
    cases; a piece whose clip is invalid takes the general intersection.
    """
    clipped = shapely.clip_by_rect(pieces, *bounds)
    bad = ~shapely.is_valid(clipped)
    if bad.any():
        frame = box(*bounds)
        clipped[bad] = [shapely.intersection(p, frame) for p in np.asarray(pieces)[bad]]
    return list(clipped)


def _box_area(bounds: tuple[float, float, float, float]) -> float:
    return (bounds[2] - bounds[0]) * (bounds[3] - bounds[1])


def _polygons_only(geometry: shapely.Geometry) -> shapely.Geometry:
    parts = [g for g in shapely.get_parts(geometry) if g.geom_type == "Polygon"
             and g.area > 1e-6]
    return shapely.MultiPolygon(parts) if parts else shapely.Polygon()


def touch_point(sensor: Sensor) -> Point:
    """Where the finger goes: the centroid, or for a ring or loop (centroid
    outside the copper) the copper's pole of inaccessibility."""
    centre = sensor.geometry.centroid
    if sensor.geometry.contains(centre):
        return Point(centre.x, centre.y)
    parts = [g for g in shapely.get_parts(sensor.geometry) if g.geom_type == "Polygon"]
    largest = max(parts, key=lambda g: g.area)
    return Point(polylabel(largest, tolerance=0.05).coords[0])


def finger_disk(sensor: Sensor, diameter_mm: float) -> shapely.Geometry:
    """The finger contact disk at :func:`touch_point`."""
    return touch_point(sensor).buffer(0.5 * diameter_mm, quad_segs=32)


def cell_for(sensor: Sensor) -> float:
    """Cell side: :data:`CELL_MM`, down to 0.25 mm for a tighter coplanar gap."""
    surround = sensor.surroundings
    gap = (surround.min_gap_mm if surround else None) or CELL_MM
    return max(0.25, min(CELL_MM, gap))


def pad_conductors(sensor: Sensor, board: Board, stack: PreciseStack,
                   others: tuple[Sensor, ...], margin_mm: float = WINDOW_MARGIN_MM
                   ) -> list[Conductor]:
    """The electrode and the grounded copper around it, clipped to the window."""
    window = window_around(sensor.geometry, margin_mm)
    held: dict[str, list[shapely.Geometry]] = {}
    for other in others:
        if other.name != sensor.name and other.geometry.intersects(window):
            held.setdefault(other.layer, []).append(other.geometry)
    ground_net = sensor.surroundings.ground_net if sensor.surroundings else ""
    own = {*sensor.nets, ground_net}
    for layer in stack.copper_levels:
        pieces = pieces_in(board, layer, window, lambda item: item.net not in own)
        held.setdefault(layer, []).extend(piece.geometry for piece in pieces)
    pad = Conductor(PAD, sensor.geometry, stack.copper_levels[sensor.layer])
    clear = {sensor.layer: sensor.geometry}
    return [pad, *ground_conductors(board, stack, ground_net, window, held, clear)]


def metrics_from_precise(sensor: Sensor, board: Board, config: Config, mapped: FieldInput,
                         others: tuple[Sensor, ...] = (),
                         cell_mm: float | None = None,
                         quick_estimate: PadMetrics | None = None) -> PadMetrics:
    """One electrode's metrics from the 3-D solve, the quick estimate in the notes.

    ``cell_mm`` defaults to :func:`cell_for` (0.5 mm, finer for tight gaps);
    ``quick_estimate``: the quick metrics when already solved (else solved here).
    """
    setup = mapped.setup
    cell_mm = cell_mm or cell_for(sensor)
    stack = stack_for(board, config)
    conductors = pad_conductors(sensor, board, stack, others)
    finger = None
    if setup.finger_diameter_mm is not None:
        finger = Conductor(FINGER, finger_disk(sensor, setup.finger_diameter_mm), 0)
    baseline, touched = solve_pair(conductors, stack.medium, finger, cell_mm)
    cp_pad, cp_touched = pad_capacitances(baseline, touched, setup)
    cp_trace, trace_notes = traces_pf(setup.traces, setup.vias, setup.board_layers,
                                      setup.plane_depth_mm)
    total = cp_pad + cp_trace
    delta = cp_touched - cp_pad
    quick = quick_estimate or _quick_estimate(setup)
    notes = (f"precise: real copper, {cell_mm:g} mm cells, window pad + "
             f"{WINDOW_MARGIN_MM:g} mm; other electrodes and other nets' copper held at "
             "ground",
             _versus("Cp pad", cp_pad, quick.cp_pad_pf),
             _versus("ΔC", delta, quick.delta_c_pf), *_cell_notes(sensor, cell_mm),
             *stack.notes, *mapped.notes, *trace_notes)
    return PadMetrics(cp_pad, cp_trace, total, delta, delta / total, "precise", notes,
                      quick_cp_pad_pf=quick.cp_pad_pf, quick_cp_total_pf=quick.cp_total_pf,
                      quick_delta_c_pf=quick.delta_c_pf)


#: The quick estimate shown beside each precise answer: equal pads (slider
#: segments, a row of buttons) have equal setups and share one solve.
_quick_estimate = lru_cache(maxsize=64)(solve_pad)


def _cell_notes(sensor: Sensor, cell_mm: float) -> tuple[str, ...]:
    notes = []
    gap = sensor.surroundings.min_gap_mm if sensor.surroundings else None
    if gap is not None and gap < cell_mm:
        notes.append(f"gap {gap:.2f} mm narrower than the {cell_mm:g} mm cells: the precise "
                     "Cp is underestimated there")
    if not sensor.geometry.contains(sensor.geometry.centroid):
        point = touch_point(sensor)
        notes.append(f"finger placed on the copper at ({point.x:.1f}, {point.y:.1f}) mm, "
                     "the centroid lies outside it")
    return tuple(notes)


def _versus(label: str, precise: float, quick: float) -> str:
    change = (precise / quick - 1.0) * 100.0 if quick else math.nan
    return (f"{label}: precise {precise:.3f} pF, quick estimate {quick:.3f} pF "
            f"({change:+.1f} %)")


