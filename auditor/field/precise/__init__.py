"""Precise field solve: planar moment method on the real copper in a layered medium.

Conductors are zero-thickness shapely polygons on the interfaces of a
:class:`LayeredMedium`; :func:`solve_capacitance` returns their Maxwell
capacitance matrix (:class:`auditor.field.matrix.CapacitanceMatrix`, the type
the circuit reduction in :mod:`auditor.field.circuit` takes). :func:`slider_scan` and :func:`coupling_between` build the
slider response and the crosstalk table on it. See ``docs/precise-mode.md``.
"""

from auditor.field.precise.medium import LayeredMedium
from auditor.field.precise.scan import (
    BodyCoupling,
    Coupling,
    Finger,
    SliderScan,
    coupling_between,
    slider_scan,
)
from auditor.field.precise.solve import (
    Conductor,
    PreciseSolve,
    richardson,
    solve_capacitance,
    solve_precise,
    solve_variants,
)

__all__ = [
    "BodyCoupling",
    "Conductor",
    "Coupling",
    "Finger",
    "LayeredMedium",
    "PreciseSolve",
    "SliderScan",
    "coupling_between",
    "richardson",
    "slider_scan",
    "solve_capacitance",
    "solve_precise",
    "solve_variants",
]
