"""The quick model's round pad, ring and plane solved in 3-D, and the steps
every per-pad 3-D solve shares (ground pieces merged, baseline and touch).

Pure field code: a :class:`~auditor.field.api.PadSetup` in, a
:class:`~auditor.field.api.PadSolve` out (``padaudit estimate --precise``).
The audit's precise mode (:mod:`auditor.solve.precise`) builds its
conductors from the board's copper and uses :func:`solve_pair` and
:func:`merged_ground` from here.
"""

from __future__ import annotations

import math

import numpy as np
import shapely
from shapely.geometry import Point, box

from auditor.field.api import PadSetup, PadSolve
from auditor.field.matrix import CapacitanceMatrix
from auditor.field.pad_model import check_setup, ground_outer_mm, reduced_network
from auditor.field.precise import Conductor, LayeredMedium, solve_capacitance, solve_variants
from auditor.field.traces import traces_pf

#: Thickness of the thin air layer put under the finger when nothing else
#: separates it from copper (no overlay, no mask).
CONTACT_AIR_MM = 0.05

GROUND = "ground"
PAD = "pad"
FINGER = "finger"
#: A driven shield's pieces (``shield@<layer>``) tie into this node, held at
#: the pad's potential.
SHIELD = "shield"


def merged_ground(matrix: CapacitanceMatrix, prefix: str = GROUND + "@",
                  node: str = GROUND) -> CapacitanceMatrix:
    """One ``node`` from its pieces (named ``prefix``...) on several levels
    (they are one net).

    Conductors tied together: their rows and columns add (charge adds, the
    potential is shared).
    """
    names = list(matrix.names)
    pieces = [i for i, n in enumerate(names) if n.startswith(prefix)]
    if not pieces:
        return matrix
    rest = [i for i in range(len(names)) if i not in pieces]
    join = np.zeros((len(names), len(rest) + 1))
    for column, i in enumerate(rest):
        join[i, column] = 1.0
    join[pieces, -1] = 1.0
    values = join.T @ matrix.array() @ join
    return CapacitanceMatrix.from_array(tuple(names[i] for i in rest) + (node,), values)


def solve_pair(conductors: list[Conductor], medium: LayeredMedium, finger: Conductor | None,
               cell_mm: float) -> tuple[CapacitanceMatrix, CapacitanceMatrix | None]:
    """Baseline and (with a finger) touched matrices, ground pieces merged."""
    # The joint bounding box; a union of large pours only to take its
    # envelope cost half a second per demo pad.
    window = box(*shapely.total_bounds([c.geometry for c in conductors]))
    if finger is None:
        matrix = merged_ground(solve_capacitance(conductors, medium, cell_mm, window=window))
        return merged_ground(matrix, SHIELD + "@", SHIELD), None
    # One batched solve: same mesh and operator with and without the finger,
    # the ground's (and a shield's) pieces on each layer tied into one node
    # (one right-hand side).
    tied = {c.name: node for c in conductors for node in (GROUND, SHIELD)
            if c.name.startswith(node + "@")}
    baseline, touched = solve_variants(conductors, [(), (finger,)], medium, cell_mm,
                                       window=window, tied=tied)
    return baseline.matrix, touched.matrix


def pad_capacitances(baseline: CapacitanceMatrix, touched: CapacitanceMatrix | None,
                     setup: PadSetup) -> tuple[float, float]:
    """Cp of the pad (conductor ``PAD``) to device ground without and with the
    finger, through the setup's body and earth network (pF).

    A ``SHIELD`` node in the matrices is driven with the pad: both held at
    the same potential, the controller sees the pad's charge only, the sum
    of the pad's row over pad and shield after the reduction (C_pp + C_ps;
    Maxwell's coefficients, Smythe 1968 ch. 2).
    """
    cp_pad = _driven_pf(baseline, setup, with_finger=False)
    cp_touched = cp_pad if touched is None else _driven_pf(touched, setup, with_finger=True)
    return cp_pad, cp_touched


def _driven_pf(matrix: CapacitanceMatrix, setup: PadSetup, with_finger: bool) -> float:
    keep = [PAD, SHIELD] if SHIELD in matrix.names else [PAD]
    return float(sum(reduced_network(matrix, keep, setup, with_finger).values_pf[0]))


def estimate_precise(setup: PadSetup, cell_mm: float = 0.25) -> PadSolve:
    """The quick model's round pad, ring and plane as polygons, solved in 3-D.

    For ``padaudit estimate --precise``. A hatched plane (fill < 1) is meshed
    as a square grid of lines of the same fill and the model's hatch pitch
    (what a board has), not as rings. Returns a :class:`PadSolve` like the
    quick solve; ``notes`` name the discretisation.
    """
    check_setup(setup)
    medium, pad_level, surface_level = _estimate_medium(setup)
    radius = setup.pad_radius_mm
    disk = Point(0, 0).buffer(radius, quad_segs=64)
    conductors = [Conductor(PAD, disk, pad_level)]
    conductors += ground_polygons(setup, radius, pad_level)
    finger = None
    if setup.finger_diameter_mm is not None:
        finger = Conductor(FINGER, Point(0, 0).buffer(0.5 * setup.finger_diameter_mm,
                                                      quad_segs=64), surface_level)
    baseline, touched = solve_pair(conductors, medium, finger, cell_mm)
    cp_pad, cp_touched = pad_capacitances(baseline, touched, setup)
    cp_trace, notes = traces_pf(setup.traces, setup.vias, setup.board_layers,
                                setup.plane_depth_mm)
    total = cp_pad + cp_trace
    delta = cp_touched - cp_pad
    notes = [f"precise: 3-D moment method, {cell_mm:g} mm cells, round pad as a 256-gon",
             *notes]
    return PadSolve(cp_pad, cp_trace, total, cp_touched + cp_trace, delta, delta / total,
                    baseline, touched, tuple(notes))



def ground_polygons(setup: PadSetup, electrode_radius_mm: float,
                    pad_level: int) -> list[Conductor]:
    """The quick model's coplanar ground ring (from ``electrode_radius_mm``
    plus the gap out to the model's reach) and the plane below, as 256-gons
    (the same geometry for a round pad and a disk-and-ring pair)."""
    out: list[Conductor] = []
    outer = ground_outer_mm(setup)
    if setup.gap_mm is not None:
        ring = Point(0, 0).buffer(outer, quad_segs=64).difference(
            Point(0, 0).buffer(electrode_radius_mm + setup.gap_mm, quad_segs=64))
        out.append(Conductor(f"{GROUND}@ring", ring, pad_level))
    if setup.plane_depth_mm is not None:
        plane = _plane_polygon(outer, setup.plane_fill, setup.plane_hatch_pitch_mm)
        if not plane.is_empty:
            out.append(Conductor(f"{GROUND}@plane", plane, _plane_level(setup, pad_level)))
    return out

def _estimate_medium(setup: PadSetup) -> tuple[LayeredMedium, int, int]:
    """Medium of the estimate's stack, the pad's level and the finger's level."""
    above: list[tuple[float, float]] = []
    if setup.overlay_mm > 0:
        above.append((setup.overlay_mm, setup.overlay_er))
    if setup.air_gap_mm > 0:
        above.append((setup.air_gap_mm, 1.0))
    board = [(b.thickness_mm, b.er) for b in setup.board_layers]
    if setup.pad_side == "far":
        above += board
        board = []
    if not above and setup.finger_diameter_mm is not None:
        above.append((CONTACT_AIR_MM, 1.0))
    if setup.finger_height_mm > 0:
        above.insert(0, (setup.finger_height_mm, 1.0))
    return LayeredMedium(tuple(above + board)), len(above), 0


def _plane_level(setup: PadSetup, pad_level: int) -> int:
    """Level of the plane: the board interface at the plane's depth below the pad."""
    depth, level = 0.0, pad_level
    for layer in setup.board_layers:
        if depth >= setup.plane_depth_mm - 1e-9:  # type: ignore[operator]
            break
        depth += layer.thickness_mm
        level += 1
    if abs(depth - (setup.plane_depth_mm or 0.0)) > 1e-6:
        raise ValueError(f"plane depth {setup.plane_depth_mm} mm is not at a layer interface "
                         "of the board (precise mode puts copper on interfaces only)")
    return level


def _plane_polygon(outer_mm: float, fill: float, pitch_mm: float) -> shapely.Geometry:
    """A disk of radius ``outer_mm``: solid, or a square hatch of the same fill."""
    disk = Point(0, 0).buffer(outer_mm, quad_segs=64)
    if fill >= 1.0:
        return disk
    if fill <= 0.0:
        return shapely.Polygon()
    # square grid of lines: fill = 1 - (1 - w/p)^2  ->  w = p (1 - sqrt(1 - fill))
    width = pitch_mm * (1.0 - math.sqrt(1.0 - fill))
    count = int(math.ceil(outer_mm / pitch_mm)) + 1
    lines = []
    for k in range(-count, count + 1):
        c = k * pitch_mm
        lines.append(box(c - 0.5 * width, -outer_mm, c + 0.5 * width, outer_mm))
        lines.append(box(-outer_mm, c - 0.5 * width, outer_mm, c + 0.5 * width))
    return shapely.union_all(lines).intersection(disk)
