"""A mutual tx/rx pair of the audit solved in 3-D on its real copper.

The conductors are the two electrodes, the device ground's copper on every
layer and every other net's copper (other electrodes, signals) within the
pair's bounding box plus :data:`auditor.solve.precise.WINDOW_MARGIN_MM`,
held at device ground as in the self-capacitance precise mode (a receive
input is a virtual ground, an idle transmit electrode is driven low or held;
stated choice). The finger is a floating disk on the touch face over the
pair's centroid, tied to earth through the body
(:mod:`auditor.field.mutual_precise` does the circuit step).

Cells: the window is solved at :data:`WINDOW_CELL_MM`; the pair's own gaps,
often 0.5 mm or less between 0.3 mm wide lines, need finer cells. Their
share is measured on the pair alone at the window's cells and at
:func:`pair_cell_mm`, extrapolated to zero cell size (order 1, edge
singularity; checked against the coplanar-strip closed form in
tests/unit/solve/test_mutual_precise.py) and added (a two-grid correction).
"""

from __future__ import annotations

import shapely

from auditor.config import Config
from auditor.field.mutual_precise import RX, TX, PairSolve, gap_share_pf, solve_pair_3d
from auditor.field.precise import Conductor
from auditor.field.round_pad import FINGER
from auditor.model.board import Board
from auditor.model.results import PadMetrics
from auditor.sensors.model import Sensor
from auditor.sensors.spatial import pieces_in
from auditor.solve.precise import (
    WINDOW_MARGIN_MM,
    PreciseStack,
    ground_conductors,
    stack_for,
    window_around,
)
from auditor.solve.setup import FieldInput

#: Cells of the whole window (ground, neighbours, finger): the precise
#: mode's finest per-pad cells. ΔCm of a board-03-like key changed by 1.2 %
#: from 0.25 to 0.1 mm cells (measured), Cm by 5 % (hence the gap correction).
WINDOW_CELL_MM = 0.25
#: Bounds of the pair's own cells: about 2.5 cells across the narrowest
#: line or gap (common practice for moment methods, no source), never finer
#: than 0.1 mm (cost) nor coarser than half the window's cells.
PAIR_CELL_RANGE_MM = (0.1, 0.125)


def pair_cell_mm(rx: Sensor, tx: Sensor) -> float:
    """Cells for the pair's own gaps: 2.5 across the narrowest line or gap."""
    gap = rx.geometry.distance(tx.geometry)
    # 2 area / perimeter is a strip's width (a wide plate's is larger).
    widths = [2.0 * s.geometry.area / s.geometry.length for s in (rx, tx) if s.geometry.length]
    feature = min([w for w in (gap, *widths) if w > 0], default=1.0)
    low, high = PAIR_CELL_RANGE_MM
    return max(low, min(high, feature / 2.5))


def pair_conductors(rx: Sensor, tx: Sensor, board: Board, stack: PreciseStack,
                    others: tuple[Sensor, ...]) -> list[Conductor]:
    """tx, rx and the device-ground copper (other nets held) in the pair's window."""
    pair = shapely.union_all([rx.geometry, tx.geometry])
    window = window_around(pair, WINDOW_MARGIN_MM)
    held: dict[str, list[shapely.Geometry]] = {}
    for other in others:
        if other.name not in (rx.name, tx.name) and other.geometry.intersects(window):
            held.setdefault(other.layer, []).append(other.geometry)
    ground_net = rx.surroundings.ground_net if rx.surroundings else ""
    own = {*rx.nets, *tx.nets, ground_net}
    for layer in stack.copper_levels:
        pieces = pieces_in(board, layer, window, lambda item: item.net not in own)
        held.setdefault(layer, []).extend(piece.geometry for piece in pieces)
    clear: dict[str, shapely.Geometry] = {}
    for sensor in (rx, tx):
        clear[sensor.layer] = shapely.union_all([clear.get(sensor.layer, shapely.Polygon()),
                                                 sensor.geometry])
    electrodes = [Conductor(TX, tx.geometry, stack.copper_levels[tx.layer]),
                  Conductor(RX, rx.geometry, stack.copper_levels[rx.layer])]
    return [*electrodes, *ground_conductors(board, stack, ground_net, window, held, clear)]


def solve_pair_on_board(rx: Sensor, tx: Sensor, board: Board, config: Config,
                        mapped: FieldInput, others: tuple[Sensor, ...]
                        ) -> tuple[PairSolve, float, float]:
    """The 3-D solve of one pair: the window's solve, the gap share (pF) and
    the pair's cell (mm)."""
    stack = stack_for(board, config)
    conductors = pair_conductors(rx, tx, board, stack, others)
    setup = mapped.setup
    finger = None
    if setup.finger_diameter_mm is not None:
        centre = shapely.union_all([rx.geometry, tx.geometry]).centroid
        finger = Conductor(FINGER, centre.buffer(0.5 * setup.finger_diameter_mm, quad_segs=32),
                           0)
    solved = solve_pair_3d(conductors, stack.medium, finger, setup, WINDOW_CELL_MM)
    fine = pair_cell_mm(rx, tx)
    tx_copper, rx_copper = conductors[:2]  # pair_conductors puts tx, rx first
    return solved, gap_share_pf(tx_copper, rx_copper, stack.medium, WINDOW_CELL_MM, fine), fine


#: Why a 3-D pair shows no disk-and-ring estimate: the model was tried and
#: cannot take the pair, or (automatic mode) it was not computed, as its
#: answer would not be used.
NOT_MAPPED = "none, the pair does not map onto the disk-and-ring model"
NOT_COMPUTED = ("not computed, the automatic mode sent the pair to 3-D (--precise computes "
                "it beside the 3-D answer)")


def metrics_for_mutual_precise(rx: Sensor, tx: Sensor, board: Board, config: Config,
                               mapped: FieldInput, others: tuple[Sensor, ...],
                               quick: PadMetrics | None, no_quick: str = NOT_MAPPED
                               ) -> PadMetrics:
    """Cm and its drop under the finger from the 3-D solve, in the PadMetrics
    slots as the quick pair model fills them (``cp_pad_pf`` is Cm); ``quick``:
    the disk-and-ring answer beside it, or None and ``no_quick`` says why
    (not computed, or the pair does not map onto it)."""
    solved, gap_share, fine = solve_pair_on_board(rx, tx, board, config, mapped, others)
    cm = solved.cm_pf + gap_share
    delta = solved.delta_cm_pf
    notes = (f"mutual pair {tx.name} -> {rx.name}: cp_pad_pf is Cm, delta_c_pf the drop of "
             "Cm under the finger",
             f"precise: real copper of the pair, {WINDOW_CELL_MM:g} mm cells, window pair + "
             f"{WINDOW_MARGIN_MM:g} mm, other electrodes and nets held at ground; the pair's "
             f"gaps refined ({fine:.3g} mm cells, extrapolated: {gap_share:+.3f} pF of Cm)",
             f"finger floating on the touch face over the pair's centre, "
             f"{mapped.setup.body_to_earth_pf:g} pF body to earth",
             *_versus(cm, delta, quick, no_quick))
    return PadMetrics(cm, 0.0, cm, delta, delta / cm if cm else 0.0, "precise", notes,
                      quick_cp_pad_pf=quick.cp_pad_pf if quick else None,
                      quick_cp_total_pf=quick.cp_total_pf if quick else None,
                      quick_delta_c_pf=quick.delta_c_pf if quick else None,
                      quick_missing="" if quick else no_quick)


def _versus(cm: float, delta: float, quick: PadMetrics | None,
            no_quick: str) -> tuple[str, ...]:
    if quick is None:
        return (f"disk-and-ring estimate: {no_quick}",)
    return tuple(_versus_one(label, precise, estimate) for label, precise, estimate in
                 (("Cm", cm, quick.cp_pad_pf), ("ΔCm", delta, quick.delta_c_pf)))


def _versus_one(label: str, precise: float, quick: float) -> str:
    change = f"{(precise / quick - 1.0) * 100.0:+.0f} %" if quick else "n/a"
    return (f"{label}: precise {precise:.3f} pF, disk-and-ring estimate {quick:.3f} pF "
            f"({change})")
