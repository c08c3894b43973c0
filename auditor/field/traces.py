"""Sense-trace and via contribution to Cp.

Each trace run is a cross-section solve (cached per distinct section) times
its length; vias add the Johnson & Graham estimate when a plane is present.
The cache key is the section rounded: width, height to the plane, coplanar
gap and board thickness to 0.1 µm, er to 1e-4, so runs of one track width
share a solve. The board measurement rounds more coarsely before that
(:mod:`auditor.solve.traces`: gaps to 0.01 mm below 1 mm and 0.1 mm above,
plane heights to 1 µm), which is what makes nearly equal traces share one.
Each distinct section is solved on its mirror-symmetric half
(:func:`auditor.field.crosssection.solve_cross_section`).
Stated simplifications: the trace lies on the board surface with air above
(an overlay over the trace is ignored, which underestimates by up to a few
tens of per cent under thick plastic); the board below the trace is one
dielectric whose er is the series (thickness-weighted harmonic) mean of the
layers; the finger's effect on the trace is not included in ΔC.
"""

from __future__ import annotations

from collections.abc import Sequence
from dataclasses import dataclass
from typing import TYPE_CHECKING

from auditor.errors import UsageError
from auditor.field.crosssection import TraceSection, trace_pf_per_mm, via_pf

if TYPE_CHECKING:
    from auditor.field.dielectric import BoardLayer

#: Return distance assumed for a trace with no plane and no coplanar ground
#: near it (common practice, no source: the device ground is somewhere within
#: about a centimetre on a small board).
FALLBACK_RETURN_MM = 10.0


@dataclass(frozen=True)
class TraceRunSpec:
    """One stretch of sense trace with a single cross-section (mm)."""

    width_mm: float
    length_mm: float
    height_to_plane_mm: float | None = None
    coplanar_gap_mm: float | None = None


def series_er(layers: Sequence[BoardLayer], depth_mm: float | None) -> float:
    """Thickness-weighted harmonic mean of er over the top ``depth_mm`` of the board."""
    remaining = depth_mm if depth_mm is not None else sum(x.thickness_mm for x in layers)
    thickness, resistance = 0.0, 0.0
    for layer in layers:
        part = min(layer.thickness_mm, remaining - thickness)
        if part <= 0:
            break
        thickness += part
        resistance += part / layer.er
    return thickness / resistance if resistance > 0 else 1.0


def traces_pf(runs: Sequence[TraceRunSpec], vias: int, layers: Sequence[BoardLayer],
              plane_depth_mm: float | None) -> tuple[float, list[str]]:
    """Total trace + via capacitance (pF) and the notes on how it was modelled."""
    notes: list[str] = []
    board_mm = sum(x.thickness_mm for x in layers) or 1.6
    total = 0.0
    for run in runs:
        if run.width_mm <= 0 or run.length_mm < 0:
            raise UsageError(f"trace run needs a positive width and length, got {run}")
        height, gap = run.height_to_plane_mm, run.coplanar_gap_mm
        if height is None and gap is None:
            height = FALLBACK_RETURN_MM
            notes.append(f"trace {run.width_mm:g} mm with no ground near: return assumed "
                         f"{FALLBACK_RETURN_MM:g} mm away")
        key = TraceSection(round(run.width_mm, 4), None if height is None else round(height, 4),
                           None if gap is None else round(gap, 4),
                           er_below=round(series_er(layers, height), 4),
                           board_mm=round(board_mm, 4))
        total += trace_pf_per_mm(key) * run.length_mm
    if vias:
        if plane_depth_mm is None:
            notes.append(f"{vias} via(s) not counted: the via formula assumes ground planes")
        else:
            er = series_er(layers, None)
            total += vias * via_pf(board_mm, er)
            notes.append(f"{vias} via(s) by Johnson & Graham (0.71 / 1.27 mm pad / antipad)")
    if runs:
        notes.append("trace: air above, finger effect on the trace not included")
    return total, notes
