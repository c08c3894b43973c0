"""What the audit and ``padaudit estimate`` call: describe a pad, get Cp and ΔC.

Frame of the axisymmetric model: z = 0 is the pad's copper plane, +z points
to the touch side (the overlay and the finger), radii from the pad centre.

* Pad: an equivalent disk with the pad's area. Area is kept, perimeter is
  not (a square's perimeter is 13 % longer than its equal-area disk's), so
  the edge fringing of elongated or square pads is somewhat underestimated.
* Device ground: a coplanar annulus from pad radius + gap out to
  ``ground_outer_mm`` and, if given, a plane of the same radius at
  ``plane_depth_mm`` below the pad. A hatched plane (fill < 1) becomes
  concentric rings of pitch ``plane_hatch_pitch_mm`` covering the same
  fraction of each pitch; this keeps the grid's fill and pitch and lets the
  field leak through the openings, but a 2-D grid of square holes screens a
  little more than rings of the same fill (stated approximation).
* Finger: a conductive disk on the overlay (or hovering above it), floating,
  tied to earth through the body; the device ground to earth by the power
  preset (see :mod:`auditor.field.circuit` for the earth node).
* Baseline and touch are two separate field solves: the no-finger matrix is
  never a sub-block of the finger matrix (the finger would absorb flux).
"""

from __future__ import annotations

from collections.abc import Sequence
from dataclasses import dataclass

from auditor.field.axisym import AxisymModel, Sheet
from auditor.field.circuit import DEVICE_TO_EARTH
from auditor.field.dielectric import BoardLayer
from auditor.field.matrix import CapacitanceMatrix
from auditor.field.mutual import MutualSetup, MutualSolve, solve_mutual
from auditor.field.pad_model import (
    PadSetup,
    check_setup,
    dielectrics,
    field_matrices,
    finger_sheet,
    ground_sheets,
    left_out_films,
    plane_sheets,
    reduced_network,
)
from auditor.field.traces import TraceRunSpec, traces_pf

__all__ = ["BoardLayer", "PadSetup", "PadSolve", "TraceRunSpec", "MutualSetup",
           "MutualSolve", "plane_sheets", "solve_pad", "solve_mutual", "rank"]


@dataclass(frozen=True)
class PadSolve:
    """Result for one pad; capacitances in pF.

    ``cp_pad_pf``: pad to device ground, no finger (circuit step applied);
    ``cp_trace_pf``: sense trace and vias; ``cp_total_pf``: their sum, what
    the controller sees; ``cp_touched_pf``: the same with the finger;
    ``delta_c_pf`` = touched - baseline; ``delta_ratio`` = ΔC / Cp total.
    ``matrix`` and ``matrix_with_finger`` are the field solves' Maxwell
    matrices (referenced to infinity = earth), conductor names included.
    """

    cp_pad_pf: float
    cp_trace_pf: float
    cp_total_pf: float
    cp_touched_pf: float
    delta_c_pf: float
    delta_ratio: float
    matrix: CapacitanceMatrix
    matrix_with_finger: CapacitanceMatrix | None
    notes: tuple[str, ...]


def _notes(setup: PadSetup, has_ground: bool) -> list[str]:
    notes = [f"pad as an equal-area disk of radius {setup.pad_radius_mm:.3f} mm "
             "(area kept, perimeter not)"]
    if not has_ground:
        notes.append("no modelled ground: device ground taken as a large far-away ground "
                     "(earth), the power preset does not apply")
    else:
        value, origin = DEVICE_TO_EARTH[setup.power]
        notes.append(f"device ground to earth {value:g} pF ({setup.power}; {origin})")
    if setup.gap_mm is not None and setup.ground_fill < 1.0:
        notes.append(f"hatched coplanar ground (fill {setup.ground_fill:g}) as a solid border "
                     f"and concentric rings of pitch {setup.plane_hatch_pitch_mm:g} mm")
    if setup.plane_depth_mm is not None and 0.0 < setup.plane_fill < 1.0:
        notes.append(f"hatched plane (fill {setup.plane_fill:g}) as concentric rings of "
                     f"pitch {setup.plane_hatch_pitch_mm:g} mm")
    films = [setup.board_layers[i] for i in left_out_films(setup)]
    if films:
        thin = ", ".join(f"{1000 * f.thickness_mm:.0f} µm" for f in films)
        notes.append(f"thin film(s) far behind the pad left out ({thin}; Cp changed by "
                     "0.3 % at most on the demo's pads, measured with the film meshed)")
    if setup.finger_diameter_mm is not None:
        notes.append(f"finger: {setup.finger_diameter_mm:g} mm disk, floating, "
                     f"{setup.body_to_earth_pf:g} pF body to earth")
    return notes


def solve_pad(setup: PadSetup) -> PadSolve:
    """Baseline Cp and the change under a finger for one pad.

    Examples
    --------
    A 10 mm round pad alone, no overlay and no finger: the isolated disk,
    8 eps0 a = 0.354 pF (Jackson 1999 sec. 3.13):

    >>> import math
    >>> solve = solve_pad(PadSetup(pad_area_mm2=math.pi * 25, gap_mm=None,
    ...                            overlay_mm=0.0, board_layers=(), finger_diameter_mm=None))
    >>> abs(solve.cp_pad_pf / 0.354168 - 1) < 0.005
    True
    """
    check_setup(setup)
    radius = setup.pad_radius_mm
    layers, surface = dielectrics(setup)
    base_sheets = (Sheet("pad", 0.0, radius),
                   *ground_sheets(setup, radius + (setup.gap_mm or 0.0)))
    has_ground = any(s.conductor == "ground" for s in base_sheets)
    finger = finger_sheet(setup, surface)
    baseline, touched = field_matrices(AxisymModel(base_sheets, layers), finger)
    cp_pad = reduced_network(baseline, ["pad"], setup, with_finger=False).values_pf[0][0]
    notes = _notes(setup, has_ground)
    cp_trace, trace_notes = traces_pf(setup.traces, setup.vias, setup.board_layers,
                                      setup.plane_depth_mm)
    notes += trace_notes
    cp_touched = cp_pad
    if touched is not None:
        cp_touched = reduced_network(touched, ["pad"], setup, with_finger=True).values_pf[0][0]
    total = cp_pad + cp_trace
    delta = cp_touched - cp_pad
    return PadSolve(cp_pad, cp_trace, total, cp_touched + cp_trace, delta, delta / total,
                    baseline, touched, tuple(notes))


def rank(solves: Sequence[PadSolve]) -> tuple[int, ...]:
    """Sensitivity rank per solve, 1 = largest ΔC (ties broken by ΔC/Cp, then order).

    >>> a = PadSolve(1, 0, 1, 1.2, 0.2, 0.2, CapacitanceMatrix((), ()), None, ())
    >>> b = PadSolve(1, 0, 1, 1.5, 0.5, 0.5, CapacitanceMatrix((), ()), None, ())
    >>> rank([a, b])
    (2, 1)
    """
    order = sorted(range(len(solves)),
                   key=lambda i: (-solves[i].delta_c_pf, -solves[i].delta_ratio, i))
    ranks = [0] * len(solves)
    for position, index in enumerate(order, start=1):
        ranks[index] = position
    return tuple(ranks)
