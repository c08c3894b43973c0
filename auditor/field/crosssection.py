"""Planar x-y cross-section solve: capacitance per unit length of traces.

Same machinery as the pad model (bilinear elements on a graded tensor mesh,
one LU per cross-section) with weight 1. Conductors are zero-thickness strips
(or rectangles, for tests); one of them is the reference (the ground net).
The outer box, far away, carries a natural (zero normal field) condition:
in two dimensions a net line charge has a logarithmic potential that never
settles, so the meaningful per-unit-length problem is the one with zero
total charge, which is exactly what that condition imposes.

Trace sections are cached (``functools.lru_cache`` on a frozen key) so a
board with many runs of the same width costs one solve per distinct section.
A section that is its own mirror image in x = 0 (every trace section is) is
meshed on its x >= 0 half only, with the natural condition on the symmetry
line: half the unknowns, more than twice as fast, and within 0.005 % of the
full-domain solve on the demo's sections (the test in
tests/unit/field/test_fast_path.py allows 0.05 %).
Vias use the simple closed form of Johnson & Graham (below).
"""

from __future__ import annotations

import math
from dataclasses import dataclass
from functools import lru_cache

import numpy as np
import scipy.constants as const

from auditor.field import fem
from auditor.field.dielectric import DielectricSlab
from auditor.field.grading import Breakpoint, graded_line
from auditor.field.matrix import CapacitanceMatrix

DEFAULT_ETA = 0.1
DEFAULT_FAR_FACTOR = 30.0
#: pF/mm per unit of the unweighted stiffness (eps0 in pF/mm).
_PF_PER_MM = const.epsilon_0 * 1e12 * 1e-3


@dataclass(frozen=True)
class Strip:
    """Conductor region: a strip (y0 == y1) or a rectangle; x may be infinite."""

    conductor: str
    x0_mm: float
    x1_mm: float
    y0_mm: float
    y1_mm: float | None = None

    @property
    def top_mm(self) -> float:
        return self.y0_mm if self.y1_mm is None else self.y1_mm

    @property
    def full_width(self) -> bool:
        return math.isinf(self.x0_mm) and math.isinf(self.x1_mm)


@dataclass(frozen=True)
class CrossSection:
    """Strips, slabs and the name of the reference (ground) conductor."""

    strips: tuple[Strip, ...]
    reference: str
    slabs: tuple[DielectricSlab, ...] = ()

    @property
    def conductor_names(self) -> tuple[str, ...]:
        names: list[str] = []
        for strip in self.strips:
            if strip.conductor not in names:
                names.append(strip.conductor)
        return tuple(names)


def _extent(section: CrossSection) -> tuple[float, float, float]:
    xs = [abs(v) for s in section.strips for v in (s.x0_mm, s.x1_mm) if not math.isinf(v)]
    ys = [v for s in section.strips for v in (s.y0_mm, s.top_mm)]
    ys += [v for slab in section.slabs for v in (slab.bottom_mm, slab.top_mm)
           if math.isfinite(v)]
    size = max(max(xs, default=1.0), 0.5 * (max(ys) - min(ys)), 1e-3)
    return size, min(ys), max(ys)


def is_mirror_symmetric(section: CrossSection) -> bool:
    """True when every conductor is the same mirrored in x = 0 (slabs always are)."""
    strips = set(section.strips)
    return all(Strip(s.conductor, -s.x1_mm, -s.x0_mm, s.y0_mm, s.y1_mm) in strips
               for s in strips)


def _mirror_half(line: fem.FloatArray) -> fem.FloatArray:
    """The x >= 0 half of a (mirror-symmetric) node line, starting at 0.

    A first node within 30 % of the next spacing from 0 is dropped rather
    than kept as a sliver cell.
    """
    tol = 1e-12 * float(np.max(np.abs(line)))
    right = line[line > tol]
    if len(right) > 1 and right[0] < 0.3 * (right[1] - right[0]):
        right = right[1:]
    return np.concatenate(([0.0], right))


def _mesh(section: CrossSection, eta: float, far: float,
          mirror: bool = False) -> fem.TensorMesh:
    size, y_min, y_max = _extent(section)
    centre = 0.5 * (y_min + y_max)
    floors = [s.y0_mm for s in section.strips if s.full_width]
    y_low = y_min if floors and min(floors) == y_min else centre - far * size
    y_high = y_max if floors and max(floors) == y_max else centre + far * size
    x_points = [Breakpoint(-far * size, False), Breakpoint(far * size, False)]
    y_points = [Breakpoint(y_low, False), Breakpoint(y_high, False)]
    for s in section.strips:
        x_points += [Breakpoint(v, True) for v in (s.x0_mm, s.x1_mm) if not math.isinf(v)]
        y_points += [Breakpoint(v, not s.full_width) for v in (s.y0_mm, s.top_mm)]
    for slab in section.slabs:
        y_points += [Breakpoint(v, False) for v in (slab.bottom_mm, slab.top_mm)
                     if y_low <= v <= y_high and math.isfinite(v)]
    floor_mm = 1e-4 * size
    x_line = graded_line(x_points, eta, floor_mm, size)
    return fem.TensorMesh(_mirror_half(x_line) if mirror else x_line,
                          graded_line(y_points, eta, floor_mm, size), axisymmetric=False)


def _single_solve(section: CrossSection, eta: float, far: float,
                  mirror: bool = False) -> fem.FloatArray:
    """Energy-form Maxwell matrix; with ``mirror`` only the x >= 0 half is
    meshed (its x = 0 side keeps the natural, zero normal field, condition
    that symmetry imposes there) and the half's energy doubled."""
    mesh = _mesh(section, eta, far, mirror)
    _, yc = fem.cell_centres(mesh)
    er = np.ones(len(yc))
    for slab in section.slabs:
        er[(yc > slab.bottom_mm) & (yc < slab.top_mm)] = slab.er
    eps = np.broadcast_to(er[None, :], (len(mesh.x) - 1, len(yc))).copy()
    stiffness = fem.assemble(mesh, eps)
    nodes = []
    for name in section.conductor_names:
        parts = [fem.nodes_in_box(mesh, s.x0_mm, s.x1_mm, s.y0_mm, s.top_mm)
                 for s in section.strips if s.conductor == name]
        nodes.append(np.unique(np.concatenate(parts)))
    values = fem.capacitance_matrix(stiffness, nodes, mesh.shape)
    return 2.0 * values if mirror else values


def solve_cross_section(section: CrossSection, eta: float = DEFAULT_ETA,
                        far_factor: float = DEFAULT_FAR_FACTOR,
                        extrapolate: bool = True) -> CapacitanceMatrix:
    """Maxwell matrix per unit length (pF/mm) among the non-reference conductors.

    Examples
    --------
    Coplanar strips of width 1 and gap 1 in air: C' = eps0 K(k')/K(k),
    k = 1/3, 13.842654 pF/m (conformal mapping, Simons 2001 ch. 2):

    >>> cps = CrossSection((Strip("a", -1.5, -0.5, 0.0), Strip("b", 0.5, 1.5, 0.0)), "b")
    >>> abs(solve_cross_section(cps).entry("a", "a") / 0.013842654 - 1) < 0.005
    True
    """
    if section.reference not in section.conductor_names:
        raise ValueError(f"reference {section.reference!r} is not a conductor")
    mirror = is_mirror_symmetric(section)
    values = _single_solve(section, eta, far_factor, mirror)
    if extrapolate:
        values = (4.0 * values - _single_solve(section, 2.0 * eta, far_factor, mirror)) / 3.0
    names = section.conductor_names
    keep = [i for i, n in enumerate(names) if n != section.reference]
    block = values[np.ix_(keep, keep)] * _PF_PER_MM
    return CapacitanceMatrix.from_array(tuple(names[i] for i in keep), block)


@dataclass(frozen=True)
class TraceSection:
    """A sense trace's cross-section (the cache key).

    The trace (zero thickness) lies on the board surface; below it a
    dielectric of ``er_below`` reaches the plane at ``height_below_mm`` (or
    ``board_mm`` of board without a plane); above it ``er_above`` (air, or an
    overlay treated as a half-space). Coplanar ground, if any, is a pour of
    ``pour_width_mm`` on both sides at ``coplanar_gap_mm``.
    """

    width_mm: float
    height_below_mm: float | None
    coplanar_gap_mm: float | None
    er_below: float = 4.4
    er_above: float = 1.0
    board_mm: float = 1.6
    height_above_mm: float | None = None
    pour_width_mm: float = 5.0


def _trace_geometry(key: TraceSection) -> CrossSection:
    half = 0.5 * key.width_mm
    strips = [Strip("trace", -half, half, 0.0)]
    depth = key.height_below_mm if key.height_below_mm is not None else key.board_mm
    slabs = [DielectricSlab(-depth, 0.0, key.er_below)]
    if key.height_below_mm is not None:
        strips.append(Strip("ground", -math.inf, math.inf, -key.height_below_mm))
    if key.height_above_mm is not None:
        strips.append(Strip("ground", -math.inf, math.inf, key.height_above_mm))
        slabs.append(DielectricSlab(0.0, key.height_above_mm, key.er_above))
    elif key.er_above != 1.0:
        slabs.append(DielectricSlab(0.0, math.inf, key.er_above))
    if key.coplanar_gap_mm is not None:
        inner = half + key.coplanar_gap_mm
        strips += [Strip("ground", inner, inner + key.pour_width_mm, 0.0),
                   Strip("ground", -inner - key.pour_width_mm, -inner, 0.0)]
    return CrossSection(tuple(strips), "ground", tuple(slabs))


@lru_cache(maxsize=512)
def trace_pf_per_mm(key: TraceSection) -> float:
    """Trace-to-ground capacitance per unit length (pF/mm), cached by section.

    Raises ValueError when the section has no ground at all (no plane above
    or below and no coplanar pour): the per-length value is then undefined.
    """
    section = _trace_geometry(key)
    if len(section.conductor_names) < 2:
        raise ValueError("a trace cross-section needs a plane or a coplanar ground")
    return solve_cross_section(section).entry("trace", "trace")


def via_pf(board_mm: float, er: float, pad_diameter_mm: float = 0.71,
           antipad_diameter_mm: float = 1.27) -> float:
    """Via capacitance by Johnson & Graham's formula.

    C[pF] = 1.41 er T D1 / (D2 - D1), T, D1 (pad) and D2 (antipad) in inches
    [pub, from memory: H. Johnson & M. Graham, *High-Speed Digital Design*,
    1993]. Meant for a via passing ground planes; 1.6 mm, 0.71 / 1.27 mm,
    er 4.4 gives 0.50 pF.

    >>> round(via_pf(1.6, 4.4), 2)
    0.5
    """
    inch = 25.4
    return (1.41 * er * (board_mm / inch) * (pad_diameter_mm / inch)
            / ((antipad_diameter_mm - pad_diameter_mm) / inch))
