"""Mutual-capacitance pairs in 3-D: Cm and its drop under a floating finger.

Pure field code on the planar moment-method solver
(:mod:`auditor.field.precise`). A pair is two named conductors ``tx`` and
``rx``; device ground's pieces are tied into one ``ground`` node; the
finger is a separate conductor of the touch solve. The circuit step is the
quick model's (:func:`auditor.field.pad_model.reduced_network`): the field
matrix is referenced to earth, the finger floats and reaches earth through
the body, device ground reaches earth by the power preset, and tx and rx
keep imposed potentials referenced to device ground. Cm is minus the tx-rx
entry of that reduced matrix: tx driven, rx held at device ground (a
controller's receive input is a virtual ground), every other conductor at
device ground or floating as above [pub: Maxwell coefficients, Smythe 1968
ch. 2]. The finger is never grounded by shortcut: its potential follows
from the network.
"""

from __future__ import annotations

import math
from collections.abc import Sequence
from dataclasses import dataclass, replace

import shapely
from shapely.geometry import Point

from auditor.errors import UsageError
from auditor.field.matrix import CapacitanceMatrix
from auditor.field.mutual import MutualSetup, MutualSolve, pair_radii
from auditor.field.pad_model import PadSetup, reduced_network
from auditor.field.precise import Conductor, LayeredMedium, richardson, solve_precise
from auditor.field.round_pad import (
    FINGER,
    _estimate_medium,
    ground_polygons,
    solve_pair,
)

TX = "tx"
RX = "rx"


@dataclass(frozen=True)
class PairSolve:
    """Cm (pF) without and with the finger, and the field matrices it came from."""

    cm_pf: float
    cm_touched_pf: float
    matrix: CapacitanceMatrix
    matrix_with_finger: CapacitanceMatrix | None

    @property
    def delta_cm_pf(self) -> float:
        """The drop of Cm under the finger (positive when the finger lowers Cm)."""
        return self.cm_pf - self.cm_touched_pf


def transfer_pf(matrix: CapacitanceMatrix, setup: PadSetup, with_finger: bool) -> float:
    """Cm: minus the tx-rx entry after the circuit step (finger floating)."""
    reduced = reduced_network(matrix, [TX, RX], setup, with_finger=with_finger)
    return -reduced.entry(TX, RX)


def solve_pair_3d(conductors: Sequence[Conductor], medium: LayeredMedium,
                  finger: Conductor | None, setup: PadSetup, cell_mm: float) -> PairSolve:
    """Cm and touched Cm of the conductors ``tx`` and ``rx`` among the others.

    ``conductors`` must include ``tx`` and ``rx``; pieces named
    ``ground@...`` are one device-ground node. ``setup`` gives the power
    preset and the body's capacitance to earth for the circuit step.
    """
    names = {c.name for c in conductors}
    if not {TX, RX} <= names:
        raise UsageError("a mutual pair needs conductors named 'tx' and 'rx'")
    baseline, touched = solve_pair(list(conductors), medium, finger, cell_mm)
    cm = transfer_pf(baseline, setup, with_finger=False)
    cm_touched = cm if touched is None else transfer_pf(touched, setup, with_finger=True)
    return PairSolve(cm, cm_touched, baseline, touched)


def gap_share_pf(tx: Conductor, rx: Conductor, medium: LayeredMedium,
                 coarse_mm: float, fine_mm: float) -> float:
    """What resolving the pair's gaps adds to Cm (pF) over ``coarse_mm`` cells.

    The cell error of Cm sits in the narrow gaps between the two
    electrodes, so it is measured on the pair alone (no ground, no finger:
    small and fast) at ``coarse_mm`` and ``fine_mm`` and extrapolated to
    zero cell size (order 1, the edge singularity; :func:`richardson`).
    Added to a coarse solve of the whole window it is a two-grid
    correction: the surroundings, far from the gaps, are resolved well
    enough by the coarse cells.
    """
    if not fine_mm < coarse_mm:
        raise UsageError(f"the pair's cells ({fine_mm} mm) must be finer than {coarse_mm} mm")
    coarse = solve_precise([tx, rx], medium, coarse_mm)
    fine = solve_precise([tx, rx], medium, fine_mm)
    return coarse.matrix.entry(TX, RX) - richardson(coarse, fine).entry(TX, RX)


def estimate_mutual_precise(setup: MutualSetup, cell_mm: float = 0.25) -> MutualSolve:
    """The quick model's disk and ring pair, with its ground, solved in 3-D.

    The same geometry as :func:`auditor.field.mutual.solve_mutual` (inner
    disk, concentric ring, coplanar ground ring and the plane below, the
    finger disk on the touch face) as 256-gons, for checking one model
    against the other.
    """
    stack = setup.stack
    inner, ring_in, ring_out = pair_radii(setup)
    medium, pad_level, surface_level = _estimate_medium(stack)
    inner_name, outer_name = (TX, RX) if setup.inner_role == "tx" else (RX, TX)
    conductors = [Conductor(inner_name, _disk(inner), pad_level),
                  Conductor(outer_name, _disk(ring_out).difference(_disk(ring_in)), pad_level)]
    ground_setup = replace(stack, pad_area_mm2=math.pi * ring_out ** 2)
    conductors += ground_polygons(ground_setup, ring_out, pad_level)
    finger = None
    if stack.finger_diameter_mm is not None:
        finger = Conductor(FINGER, _disk(0.5 * stack.finger_diameter_mm), surface_level)
    solved = solve_pair_3d(conductors, medium, finger, stack, cell_mm)
    delta = solved.delta_cm_pf
    return MutualSolve(solved.cm_pf, solved.cm_touched_pf, delta, delta / solved.cm_pf,
                       solved.matrix, solved.matrix_with_finger)


def _disk(radius_mm: float) -> shapely.Geometry:
    return Point(0, 0).buffer(radius_mm, quad_segs=64)

