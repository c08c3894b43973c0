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
import re
from dataclasses import dataclass
from functools import lru_cache

import numpy as np
import shapely
from shapely.geometry import Point, Polygon, box
from shapely.ops import polylabel

from auditor.config import Config
from auditor.errors import UsageError
from auditor.field.api import solve_pad
from auditor.field.matrix import CapacitanceMatrix
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
from auditor.model.results import DRIVEN_SHIELD_NOTE, PadMetrics
from auditor.sensors.model import Sensor
from auditor.sensors.spatial import pieces_in
from auditor.solve.precise_copper import (
    shield_conductors,
    shield_nets,
    touching_artwork,
    without_slivers,
)
from auditor.solve.setup import MIN_OUTLINE_FILL, FieldInput
from auditor.solve.stack import overlay_with_mask, touch_mask

#: Copper beyond this distance from the pad's bounding box is left out; the
#: quick model's own ground reach is 10 mm (common practice, no source).
WINDOW_MARGIN_MM = 10.0
#: Cell side of the per-pad solves; 0.5 mm keeps a 5 mm disk within 0.6 %
#: of 8 eps0 a (docs/precise-mode.md, edge-cell table).
CELL_MM = 0.5
#: Finest cell a tight coplanar gap asks for.
MIN_GAP_CELL_MM = 0.25
#: An electrode fewer than this many cells wide gets finer cells: measured,
#: a 1 x 18 mm strip at 0.5 mm cells (2 across) read Cp 7 % and ΔC 4 % under
#: its 0.125 mm answer; the demo's 1.75 mm proximity loop (3.5 across) within
#: 0.5 % and 2.3 % of its 0.25 mm answer, at a third of the time.
MIN_CELLS_ACROSS = 3.0
#: ... then this many cells across its width (the strip: 0.2 mm cells, Cp and
#: ΔC within 2 % of the 0.125 mm answer) ...
NARROW_CELLS_ACROSS = 5.0
#: ... but no finer than this (mm) ...
MIN_WIDTH_CELL_MM = 0.15
#: ... nor more cells than this over all the solve's copper (time and memory).
MAX_CELLS = 60000
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
    """Where the finger goes: the centroid of the copper with its holes filled.

    A person presses a key in its middle whether or not copper lies there (a
    slot or hole for a reverse-mount LED). Only for a loop or comb, whose
    copper fills under :data:`~auditor.solve.setup.MIN_OUTLINE_FILL` of its
    convex hull and whose centre may be far from any copper, and whose
    centroid lies off the copper, the finger goes to the copper's pole of
    inaccessibility.
    """
    geometry = sensor.geometry
    parts = [g for g in shapely.get_parts(geometry) if g.geom_type == "Polygon"]
    filled = shapely.union_all([Polygon(g.exterior) for g in parts])
    centre = filled.centroid
    hull = geometry.convex_hull
    if geometry.contains(centre) or geometry.area >= MIN_OUTLINE_FILL * hull.area:
        return Point(centre.x, centre.y)
    largest = max(parts, key=lambda g: g.area)
    return Point(polylabel(largest, tolerance=0.05).coords[0])


def finger_disk(sensor: Sensor, diameter_mm: float) -> shapely.Geometry:
    """The finger contact disk at :func:`touch_point`."""
    return touch_point(sensor).buffer(0.5 * diameter_mm, quad_segs=32)


def cell_for(sensor: Sensor, copper_mm2: float = 0.0) -> float:
    """Cell side: :data:`CELL_MM`, finer for a tighter coplanar gap (down to
    :data:`MIN_GAP_CELL_MM`); for an electrode narrower than
    :data:`MIN_CELLS_ACROSS` cells, :data:`NARROW_CELLS_ACROSS` cells across
    its width (down to :data:`MIN_WIDTH_CELL_MM`), never so fine that
    ``copper_mm2`` (all the solve's copper) takes more than :data:`MAX_CELLS`."""
    surround = sensor.surroundings
    gap = (surround.min_gap_mm if surround else None) or CELL_MM
    cell = max(MIN_GAP_CELL_MM, min(CELL_MM, gap))
    width = electrode_width_mm(sensor)
    if width >= MIN_CELLS_ACROSS * cell:
        return cell
    narrow = max(MIN_WIDTH_CELL_MM, width / NARROW_CELLS_ACROSS,
                 math.sqrt(copper_mm2 / MAX_CELLS))
    return min(cell, narrow)


def electrode_width_mm(sensor: Sensor) -> float:
    """Width of the electrode: the diameter of the largest circle inside its
    largest piece of copper (a strip's width, a round pad's diameter)."""
    parts = [g for g in shapely.get_parts(sensor.geometry) if g.geom_type == "Polygon"]
    if not parts:
        return math.inf
    largest = max(parts, key=lambda g: g.area)
    centre = polylabel(largest, tolerance=0.01)
    return 2.0 * float(largest.boundary.distance(centre))


def pad_conductors(sensor: Sensor, board: Board, stack: PreciseStack,
                   others: tuple[Sensor, ...], margin_mm: float = WINDOW_MARGIN_MM
                   ) -> tuple[list[Conductor], tuple[str, ...]]:
    """The electrode (with the net-less copper touching it), a driven shield's
    copper and the grounded copper around it, clipped to the window; notes
    on what was merged or driven."""
    window = window_around(sensor.geometry, margin_mm)
    electrode, added_mm2 = touching_artwork(board, sensor, window)
    held: dict[str, list[shapely.Geometry]] = {}
    for other in others:
        if other.name != sensor.name and other.geometry.intersects(window):
            held.setdefault(other.layer, []).append(other.geometry)
    ground_net = sensor.surroundings.ground_net if sensor.surroundings else ""
    shields = shield_nets(board) - set(sensor.nets)
    own = {*sensor.nets, ground_net, *shields}
    for layer in stack.copper_levels:
        pieces = pieces_in(board, layer, window, lambda item: item.net not in own)
        held.setdefault(layer, []).extend(piece.geometry for piece in pieces)
    pad = Conductor(PAD, electrode, stack.copper_levels[sensor.layer])
    clear = {sensor.layer: electrode}
    shield = shield_conductors(board, stack.copper_levels, shields, window, clear)
    notes = []
    if added_mm2 > 1e-6:
        notes.append(f"net-less copper touching the electrode ({added_mm2:.1f} mm²) solved "
                     "as part of it")
    if shield:
        notes.append(f"{DRIVEN_SHIELD_NOTE}{'/'.join(sorted(shields))} held at the electrode's "
                     "potential; Cp counts the electrode's charge only")
    grounds = ground_conductors(board, stack, ground_net, window, held, clear)
    return [pad, *shield, *grounds], tuple(notes)


def metrics_from_precise(sensor: Sensor, board: Board, config: Config, mapped: FieldInput,
                         others: tuple[Sensor, ...] = (),
                         cell_mm: float | None = None,
                         quick_estimate: PadMetrics | None = None) -> PadMetrics:
    """One electrode's metrics from the 3-D solve, the quick estimate in the notes.

    ``cell_mm`` defaults to :func:`cell_for` (0.5 mm, finer for tight gaps
    and narrow electrodes); ``quick_estimate``: the quick metrics when
    already solved (else solved here).
    """
    setup = mapped.setup
    stack = stack_for(board, config)
    conductors, copper_notes = pad_conductors(sensor, board, stack, others)
    cell_mm = cell_mm or cell_for(sensor, sum(c.geometry.area for c in conductors))
    conductors, sliver_notes = without_slivers(conductors, cell_mm, (PAD,))
    finger = None
    if setup.finger_diameter_mm is not None:
        finger = Conductor(FINGER, finger_disk(sensor, setup.finger_diameter_mm), 0)
    baseline, touched, dropped = _solved_pair(conductors, stack, finger, cell_mm)
    sliver_notes += dropped
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
             *copper_notes, *sliver_notes, *stack.notes, *mapped.notes, *trace_notes)
    return PadMetrics(cp_pad, cp_trace, total, delta, delta / total, "precise", notes,
                      quick_cp_pad_pf=quick.cp_pad_pf, quick_cp_total_pf=quick.cp_total_pf,
                      quick_delta_c_pf=quick.delta_c_pf)


def _solved_pair(conductors: list[Conductor], stack: PreciseStack, finger: Conductor | None,
                 cell_mm: float) -> tuple[CapacitanceMatrix, CapacitanceMatrix | None,
                                          tuple[str, ...]]:
    """:func:`solve_pair`, less any held conductor the mesh leaves without a
    cell (thin slivers beside bigger copper), with a note for each."""
    notes: tuple[str, ...] = ()
    while True:
        try:
            baseline, touched = solve_pair(conductors, stack.medium, finger, cell_mm)
            return baseline, touched, notes
        except UsageError as exc:
            lost = _SUB_CELL.search(str(exc))
            if lost is None or lost.group(1) in (PAD, FINGER):
                raise
            conductors = [c for c in conductors if c.name != lost.group(1)]
            notes += (f"{lost.group(1)} left out: no {cell_mm:g} mm cell of its own "
                      "(slivers beside other copper)",)


_SUB_CELL = re.compile(r"conductor '([^']+)' is smaller than one")


#: The quick estimate shown beside each precise answer: equal pads (slider
#: segments, a row of buttons) have equal setups and share one solve.
_quick_estimate = lru_cache(maxsize=64)(solve_pad)


def _cell_notes(sensor: Sensor, cell_mm: float) -> tuple[str, ...]:
    notes = []
    gap = sensor.surroundings.min_gap_mm if sensor.surroundings else None
    if gap is not None and gap < cell_mm:
        notes.append(f"gap {gap:.2f} mm narrower than the {cell_mm:g} mm cells: the precise "
                     "Cp is underestimated there")
    width = electrode_width_mm(sensor)
    if width < MIN_CELLS_ACROSS * CELL_MM:
        notes.append(f"electrode {width:.2f} mm wide: {cell_mm:g} mm cells "
                     f"({width / cell_mm:.1f} across)")
    point = touch_point(sensor)
    if not sensor.geometry.contains(point):
        notes.append(f"finger centred at ({point.x:.1f}, {point.y:.1f}) mm over a slot or hole "
                     "in the copper (where a person presses the key)")
    elif not sensor.geometry.contains(sensor.geometry.centroid):
        notes.append(f"finger placed on the copper at ({point.x:.1f}, {point.y:.1f}) mm, "
                     "the centroid of a loop or comb lies outside it")
    return tuple(notes)


def _versus(label: str, precise: float, quick: float) -> str:
    change = (precise / quick - 1.0) * 100.0 if quick else math.nan
    return (f"{label}: precise {precise:.3f} pF, quick estimate {quick:.3f} pF "
            f"({change:+.1f} %)")


