"""Mutual-capacitance pairs in the axisymmetric model: Cm and its drop under a finger."""

from __future__ import annotations

import math
from dataclasses import dataclass, replace
from typing import Literal

from auditor.errors import UsageError
from auditor.field.axisym import AxisymModel, Sheet
from auditor.field.matrix import CapacitanceMatrix
from auditor.field.pad_model import (
    PadSetup,
    check_setup,
    dielectrics,
    field_matrices,
    finger_sheet,
    ground_sheets,
    reduced_network,
)


@dataclass(frozen=True)
class MutualSetup:
    """A mutual-capacitance pair: inner disk and a concentric outer ring.

    The axisymmetric model stands in for interleaved or side-by-side
    electrodes (stated approximation); ``inner_role`` says which is driven.
    ``stack`` gives ground, board, overlay, finger and power as in PadSetup
    (its pad area is not used).
    """

    inner_diameter_mm: float = 6.0
    electrode_gap_mm: float = 1.0
    outer_width_mm: float = 2.0
    inner_role: Literal["tx", "rx"] = "tx"
    stack: PadSetup = PadSetup(pad_area_mm2=1.0)


@dataclass(frozen=True)
class MutualSolve:
    """Cm (pF) without and with the finger; the finger lowers Cm."""

    cm_pf: float
    cm_touched_pf: float
    delta_cm_pf: float
    delta_ratio: float
    matrix: CapacitanceMatrix
    matrix_with_finger: CapacitanceMatrix | None


def pair_radii(setup: MutualSetup) -> tuple[float, float, float]:
    """Inner disk radius and the ring's inner and outer radii (mm), after
    checking the stack and that diameter, gap and width are positive.

    Raises
    ------
    UsageError
        For a setup no pair can have.
    """
    check_setup(setup.stack)
    inner = 0.5 * setup.inner_diameter_mm
    ring_in = inner + setup.electrode_gap_mm
    ring_out = ring_in + setup.outer_width_mm
    if min(inner, setup.electrode_gap_mm, setup.outer_width_mm) <= 0:
        raise UsageError("mutual electrodes need positive diameter, gap and width")
    return inner, ring_in, ring_out


def solve_mutual(setup: MutualSetup) -> MutualSolve:
    """Mutual capacitance between the pair and its drop under the finger."""
    stack = setup.stack
    inner, ring_in, ring_out = pair_radii(setup)
    inner_name, outer_name = ("tx", "rx") if setup.inner_role == "tx" else ("rx", "tx")
    ground_setup = replace(stack, pad_area_mm2=math.pi * ring_out ** 2)
    layers, surface = dielectrics(stack)
    sheets = (Sheet(inner_name, 0.0, inner), Sheet(outer_name, 0.0, ring_out, ring_in),
              *ground_sheets(ground_setup, ring_out + (stack.gap_mm or 0.0)))
    finger = finger_sheet(stack, surface)
    baseline, touched = field_matrices(AxisymModel(sheets, layers), finger)
    cm = -reduced_network(baseline, ["tx", "rx"], stack, with_finger=False).entry("tx", "rx")
    cm_touched = cm
    if touched is not None:
        cm_touched = -reduced_network(touched, ["tx", "rx"], stack, True).entry("tx", "rx")
    delta = cm - cm_touched
    return MutualSolve(cm, cm_touched, delta, delta / cm, baseline, touched)
