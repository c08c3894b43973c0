"""Axisymmetric r-z electrostatics: zero-thickness conductor sheets in a
layered dielectric, open boundary, Maxwell matrix out.

Geometry: every conductor is one or more horizontal annular sheets
(r_inner..r_outer at height z); dielectric layers are horizontal slabs of
unbounded radius. A sheet with ``r_outer_mm=None`` is an infinite plane and
becomes the floor of the domain (only the lowest sheet may be infinite).

Open boundary: the tensor mesh is graded out to a box ``far_factor`` times
the model's size; on its sides a Robin condition makes the solution behave
like the leading multipole seen from the model's centre,

    d u / d n = -(m + 1) u (x - c).n / |x - c|^2,

with m = 0 (monopole, free space) or m = 1 (dipole about the floor when an
infinite grounded plane is present). This is exact for that multipole on
any surface, so the residual truncation error is of higher order and
measured in the tests (well under 1e-4 at the default box).
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np
import scipy.constants as const

from auditor.field import fem
from auditor.field.dielectric import DielectricSlab
from auditor.field.grading import Breakpoint, graded_line, smallest_feature_mm
from auditor.field.matrix import CapacitanceMatrix

#: Default mesh size parameter (about 1 / nodes per feature); see grading.
DEFAULT_ETA = 0.15
#: Box size in units of the model size.
DEFAULT_FAR_FACTOR = 30.0
#: pF per (relative permittivity x mm) of the 2 pi r weighted stiffness.
_PF_PER_UNIT = 2.0 * np.pi * const.epsilon_0 * 1e-3 * 1e12


@dataclass(frozen=True)
class Sheet:
    """A zero-thickness annulus belonging to a named conductor."""

    conductor: str
    z_mm: float
    r_outer_mm: float | None
    r_inner_mm: float = 0.0
    #: None: grade the mesh radically at the edges. A length: plain spacing of
    #: about eta times that length there instead, for the many small edges of
    #: a hatched plane, whose own edge charge matters little to the pad.
    edge_scale_mm: float | None = None


@dataclass(frozen=True)
class AxisymModel:
    """Conductors (by sheets) and dielectric layers; background is vacuum."""

    sheets: tuple[Sheet, ...]
    layers: tuple[DielectricSlab, ...] = ()
    #: Sheets that shape the mesh but are not conductors. Giving the baseline
    #: solve the finger as a hint puts both solves on the same mesh, so their
    #: discretisation errors cancel in the difference (small ΔC stays clean).
    mesh_hints: tuple[Sheet, ...] = ()

    @property
    def geometry_sheets(self) -> tuple[Sheet, ...]:
        return self.sheets + self.mesh_hints

    @property
    def conductor_names(self) -> tuple[str, ...]:
        names: list[str] = []
        for sheet in self.sheets:
            if sheet.conductor not in names:
                names.append(sheet.conductor)
        return tuple(names)

    @property
    def floor(self) -> Sheet | None:
        infinite = [s for s in self.sheets if s.r_outer_mm is None]
        return infinite[0] if infinite else None


@dataclass(frozen=True)
class AxisymResult:
    """Matrix plus total node count of the solves, for benchmarks."""

    matrix: CapacitanceMatrix
    node_count: int


def _validate(model: AxisymModel) -> None:
    infinite = [s for s in model.sheets if s.r_outer_mm is None]
    if len(infinite) > 1:
        raise ValueError("at most one infinite plane is supported")
    if infinite and any(s.z_mm < infinite[0].z_mm for s in model.sheets):
        raise ValueError("an infinite plane must be the lowest sheet")
    if any(s.r_outer_mm is None for s in model.mesh_hints):
        raise ValueError("mesh hints must be finite sheets")
    for sheet in model.geometry_sheets:
        if sheet.r_outer_mm is not None and sheet.r_outer_mm <= sheet.r_inner_mm:
            raise ValueError(f"sheet of {sheet.conductor!r} has no area")


def _size_mm(model: AxisymModel) -> tuple[float, float]:
    """Model size and centre height; far-away layer faces count as infinite."""
    radii = [s.r_outer_mm for s in model.geometry_sheets if s.r_outer_mm is not None]
    sheet_z = [s.z_mm for s in model.geometry_sheets]
    reach = 10.0 * max(max(radii, default=1.0), max(sheet_z) - min(sheet_z), 1e-3)
    heights = sheet_z + [v for v in _layer_faces(model)
                         if min(sheet_z) - reach <= v <= max(sheet_z) + reach]
    centre = 0.5 * (max(heights) + min(heights))
    size = max(max(radii, default=1.0), 0.5 * (max(heights) - min(heights)), 1e-3)
    return size, centre


def _layer_faces(model: AxisymModel) -> list[float]:
    return [v for layer in model.layers for v in (layer.bottom_mm, layer.top_mm)
            if np.isfinite(v)]


def build_mesh(model: AxisymModel, eta: float, far_factor: float) -> fem.TensorMesh:
    """Graded r and z node lines for the model (edges radical, interfaces smooth)."""
    size, centre = _size_mm(model)
    floor = model.floor
    r_points = [Breakpoint(0.0, False), Breakpoint(far_factor * size, False)]
    for sheet in model.geometry_sheets:
        graded = sheet.edge_scale_mm is None
        scale = sheet.edge_scale_mm or 0.0
        if sheet.r_outer_mm is not None:
            r_points.append(Breakpoint(sheet.r_outer_mm, graded, scale))
        if sheet.r_inner_mm > 0:
            r_points.append(Breakpoint(sheet.r_inner_mm, graded, scale))
    z_low = floor.z_mm if floor is not None else centre - far_factor * size
    z_points = [Breakpoint(z_low, False), Breakpoint(centre + far_factor * size, False)]
    z_points += [Breakpoint(s.z_mm, True) for s in model.geometry_sheets if s is not floor]
    z_high = centre + far_factor * size
    z_points += [Breakpoint(v, False) for v in _layer_faces(model)]
    z_points = [p for p in z_points if z_low <= p.position_mm <= z_high]
    floor_mm = 1e-4 * size
    r_small, z_small = smallest_feature_mm(r_points), smallest_feature_mm(z_points)
    return fem.TensorMesh(graded_line(r_points, eta, floor_mm, size, z_small),
                          graded_line(z_points, eta, floor_mm, size, r_small), axisymmetric=True)


def _cell_permittivity(model: AxisymModel, mesh: fem.TensorMesh) -> fem.FloatArray:
    _, zc = fem.cell_centres(mesh)
    er = np.ones(len(zc))
    for layer in model.layers:
        er[(zc > layer.bottom_mm) & (zc < layer.top_mm)] = layer.er
    return np.broadcast_to(er[None, :], (len(mesh.x) - 1, len(zc))).copy()


def _far_field_terms(model: AxisymModel, mesh: fem.TensorMesh,
                     eps: fem.FloatArray) -> fem.FloatArray:
    _, centre = _size_mm(model)
    floor = model.floor
    order_factor = 2.0 if floor is not None else 1.0
    z0 = floor.z_mm if floor is not None else centre
    rc, zc = fem.cell_centres(mesh)
    r_box, z_top, z_bottom = mesh.x[-1], mesh.y[-1] - z0, mesh.y[0] - z0
    right = order_factor * eps[-1, :] * r_box / (r_box ** 2 + (zc - z0) ** 2)
    top = order_factor * eps[:, -1] * z_top / (rc ** 2 + z_top ** 2)
    terms = fem.edge_lumped(mesh, "right", right) + fem.edge_lumped(mesh, "top", top)
    if floor is None:
        bottom = order_factor * eps[:, 0] * (-z_bottom) / (rc ** 2 + z_bottom ** 2)
        terms = terms + fem.edge_lumped(mesh, "bottom", bottom)
    return terms


def _conductor_nodes(model: AxisymModel, mesh: fem.TensorMesh) -> list[fem.IndexArray]:
    nodes = []
    for name in model.conductor_names:
        parts = [fem.nodes_on_segment(mesh, s.z_mm, s.r_inner_mm,
                                      s.r_outer_mm if s.r_outer_mm is not None else np.inf)
                 for s in model.sheets if s.conductor == name]
        nodes.append(np.unique(np.concatenate(parts)))
    return nodes


def solve_axisym(model: AxisymModel, eta: float = DEFAULT_ETA,
                 far_factor: float = DEFAULT_FAR_FACTOR,
                 extrapolate: bool = True) -> AxisymResult:
    """Maxwell matrix (pF) among the model's conductors, referenced to infinity.

    The error of one solve falls as eta^2 (measured in the tests); with
    ``extrapolate`` a second solve at 2 eta (a quarter of the nodes) gives
    the Richardson estimate (4 C(eta) - C(2 eta)) / 3 [pub: L. F. Richardson
    1911; the same device F. H. Read 1997 used for the square plate].

    With an infinite plane present, the plane is one of the conductors and
    the reference is the plane's potential at infinity (the same thing).

    Examples
    --------
    Isolated disk of radius 5 mm, exact 8 eps0 a = 0.354168 pF (Jackson 1999
    sec. 3.13):

    >>> disk = AxisymModel((Sheet("pad", 0.0, 5.0),))
    >>> abs(solve_axisym(disk).matrix.entry("pad", "pad") / 0.354168 - 1) < 0.01
    True
    """
    _validate(model)
    values, nodes = _single_solve(model, eta, far_factor)
    if extrapolate:
        coarse, coarse_nodes = _single_solve(model, 2.0 * eta, far_factor)
        values = (4.0 * values - coarse) / 3.0
        nodes += coarse_nodes
    matrix = CapacitanceMatrix.from_array(model.conductor_names, values * _PF_PER_UNIT)
    return AxisymResult(matrix, nodes)


def _single_solve(model: AxisymModel, eta: float,
                  far_factor: float) -> tuple[fem.FloatArray, int]:
    mesh = build_mesh(model, eta, far_factor)
    eps = _cell_permittivity(model, mesh)
    stiffness = fem.assemble(mesh, eps, _far_field_terms(model, mesh, eps))
    values = fem.capacitance_matrix(stiffness, _conductor_nodes(model, mesh), mesh.shape)
    return values, mesh.node_count


def solve_axisym_pair(model: AxisymModel, extra: Sheet, eta: float = DEFAULT_ETA,
                      far_factor: float = DEFAULT_FAR_FACTOR,
                      extrapolate: bool = True) -> tuple[AxisymResult, AxisymResult]:
    """The model's matrix without and with one extra conductor sheet.

    Both on the same mesh (the extra sheet shapes it in both cases), one
    assembly per level (:func:`auditor.field.fem.capacitance_pair` decides
    whether the second solve reuses the first's factorisation); equal to two
    :func:`solve_axisym` calls with ``mesh_hints=(extra,)`` on the first, to
    rounding.
    """
    hinted = AxisymModel(model.sheets, model.layers, (*model.mesh_hints, extra))
    _validate(hinted)
    base, with_extra, nodes = _pair_solve(hinted, extra, eta, far_factor)
    if extrapolate:
        coarse_base, coarse_extra, coarse_nodes = _pair_solve(hinted, extra, 2 * eta,
                                                              far_factor)
        base = (4.0 * base - coarse_base) / 3.0
        with_extra = (4.0 * with_extra - coarse_extra) / 3.0
        nodes += coarse_nodes
    names = model.conductor_names
    return (AxisymResult(CapacitanceMatrix.from_array(names, base * _PF_PER_UNIT), nodes),
            AxisymResult(CapacitanceMatrix.from_array((*names, extra.conductor),
                                                      with_extra * _PF_PER_UNIT), nodes))


def _pair_solve(model: AxisymModel, extra: Sheet, eta: float,
                far_factor: float) -> tuple[fem.FloatArray, fem.FloatArray, int]:
    mesh = build_mesh(model, eta, far_factor)
    eps = _cell_permittivity(model, mesh)
    stiffness = fem.assemble(mesh, eps, _far_field_terms(model, mesh, eps))
    extra_nodes = fem.nodes_on_segment(mesh, extra.z_mm, extra.r_inner_mm,
                                       extra.r_outer_mm if extra.r_outer_mm is not None
                                       else np.inf)
    base, with_extra = fem.capacitance_pair(stiffness, _conductor_nodes(model, mesh),
                                            extra_nodes, mesh.shape)
    assert with_extra is not None
    return base, with_extra, mesh.node_count
