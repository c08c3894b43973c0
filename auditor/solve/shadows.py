"""Other nets' copper on the other layers, ring by ring around an electrode.

The quick model is axisymmetric, so what it can take of a layer's copper is
its coverage as a function of the distance from the electrode's centroid:
the share of each ring (annulus) that lies over that copper's extent. For a
hatched pour the extent is the hatch with its openings closed (a closing by
just over half the hatch gap, as the sensors stage measures shadows), and
the hatch's own fill is kept apart (:attr:`LayerCopper.hatch_fill`).

Per layer the copper is told apart by what it is: the device ground, other
electrodes, other signals. All of it is held at the device ground in the
field models (a scanning controller grounds its idle inputs, a driven
signal is a low-impedance node), which the notes say.

What a ring profile cannot show is said as numbers the automatic mode
reads (:mod:`auditor.solve.route`): the share of the pad over the copper
and how far off the pad's centre that copper lies (:attr:`offset`).
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np
import shapely
from shapely.geometry import Point
from shapely.geometry.base import BaseGeometry

from auditor.model.board import Board
from auditor.model.items import HatchSettings
from auditor.sensors.model import LayerShadow, Sensor
from auditor.sensors.spatial import Piece, pieces_in
from auditor.sensors.surround import outline_points
from auditor.solve.traces import dielectric_between_mm

#: Rings at least this many times the depth of the copper wide: sparse copper
#: (a few traces) then stays sparse in the model, instead of becoming rings a
#: hatch pitch apart that screen like a plane (the old model's fault).
RING_DEPTHS = 0.5
#: ... and at least this share of the pad's equal-area radius.
RING_RADII = 1.0 / 6.0
#: Coverage steps (rounded so near-equal pads share one cached solve).
COVER_STEP = 0.05
#: A ring covered this much counts as whole: the closed extent of a hatched
#: pour keeps small openings at vias and track clearances, and a ring with a
#: tenth missing, rendered as a narrower annulus, moved the demo's button Cp
#: by 3-6 % against the whole plane while the 3-D solve moved less than 2 %.
WHOLE_COVER = 0.85
#: A ring covered less than this is left out of the profile: scattered
#: copper (a few traces, part pads) rendered as closed rings one ring apart
#: is a grating finer than its depth, which screens like a plane. Measured
#: on real 8.5 mm keys with traces under 5-15 % of each ring from the pad's
#: edge outwards (1.5 mm below): quick Cp 12-31 % over the 3-D solve with
#: the rings kept, 2.6-6.5 % under it with them left out (ΔC within 2 %
#: either way). Copper under the pad itself is judged by its share of the
#: pad (:mod:`auditor.solve.route`), not by this.
SPARSE_COVER = 0.2
CLASSES = ("ground", "electrodes", "signals")


@dataclass(frozen=True)
class LayerCopper:
    """Other nets' copper on one layer, as the quick model sees it.

    ``profile``: ``((outer_radius_mm, coverage), ...)`` from the centre;
    ``hatch_fill``: copper share inside the extent (1 for solid copper);
    ``pad_cover``: share of the pad's area over the copper's extent;
    ``offset``: distance from the pad's centroid to the centroid of the
    copper under the pad (grown by the depth), over the pad's radius (0 for
    copper centred on the pad); ``classes``: ``(class, share of the pad,
    nets)`` per class of :data:`CLASSES` present.
    """

    layer: str
    depth_mm: float
    in_front: bool
    profile: tuple[tuple[float, float], ...]
    hatch_fill: float
    pad_cover: float
    offset: float
    classes: tuple[tuple[str, float, tuple[str, ...]], ...]
    sparse_rings: int = 0

    @property
    def whole(self) -> bool:
        """True when every ring is fully covered (the plane of the old model)."""
        return bool(self.profile) and all(c >= 1.0 for _, c in self.profile)

    @property
    def empty(self) -> bool:
        return not any(c > 0 for _, c in self.profile)


def ring_edges(pad_radius_mm: float, depth_mm: float, outer_mm: float) -> tuple[float, ...]:
    """Outer radii of the profile's rings, the last one ``outer_mm``."""
    width = max(RING_DEPTHS * depth_mm, RING_RADII * pad_radius_mm, 0.5)
    count = max(1, round(outer_mm / width))
    return tuple(round(outer_mm * (k + 1) / count, 3) for k in range(count))


def radial_cover(copper: BaseGeometry, centre: Point, edges: tuple[float, ...]) -> tuple[float, ...]:
    """Share of each ring (0..edges[0], edges[0]..edges[1], ...) over ``copper``."""
    out, inner = [], 0.0
    for outer in edges:
        ring = centre.buffer(outer, quad_segs=32)
        if inner > 0:
            ring = ring.difference(centre.buffer(inner, quad_segs=32))
        out.append(min(1.0, float(copper.intersection(ring).area) / float(ring.area)))
        inner = outer
    return tuple(out)


def _stepped(value: float) -> float:
    if value < SPARSE_COVER:
        return 0.0
    return 1.0 if value >= WHOLE_COVER else round(round(value / COVER_STEP) * COVER_STEP, 4)


def _closing_mm(hatch: HatchSettings | None) -> float:
    return 0.75 if hatch is None else 0.5 * hatch.gap_mm * 1.05 + 1e-3


def _hatch_of(board: Board, piece: Piece, layer: str) -> HatchSettings | None | bool:
    """The hatch settings of the zone a piece comes from (False: not hatched)."""
    if piece.item.source != "zone":
        return False
    for zone in board.zones:
        if zone.fill == "hatched" and zone.net == piece.item.net and zone.fill_on(layer):
            return zone.hatch
    return False


def _extent(board: Board, pieces: list[Piece], layer: str) -> tuple[BaseGeometry, float | None]:
    """The copper with hatch openings closed, and the hatch fill (None: solid)."""
    solid, hatched, fill = [], [], None
    for piece in pieces:
        hatch = _hatch_of(board, piece, layer)
        if hatch is False:
            solid.append(piece.geometry)
        else:
            radius = _closing_mm(hatch if isinstance(hatch, HatchSettings) else None)
            hatched.append(piece.geometry.buffer(radius).buffer(-radius))
            if isinstance(hatch, HatchSettings):
                fill = hatch.fill_ratio
    return shapely.union_all(solid + hatched), fill if hatched else None


def _class(net: str, ground: str, electrode_nets: frozenset[str]) -> str:
    if net == ground:
        return "ground"
    return "electrodes" if net in electrode_nets else "signals"


def layer_copper(board: Board, sensor: Sensor, layer: str, outer_mm: float,
                 electrode_nets: frozenset[str] = frozenset(),
                 in_front: bool = False) -> LayerCopper:
    """Other nets' copper on ``layer`` within ``outer_mm`` of the pad's centroid."""
    centre = sensor.geometry.centroid
    depth = round(dielectric_between_mm(board, sensor.layer, layer), 3)
    own = set(sensor.nets)
    reach = centre.buffer(outer_mm, quad_segs=32)
    pieces = pieces_in(board, layer, reach, lambda it: it.net not in own)
    radius = math.sqrt(max(sensor.area_mm2, 1e-9) / math.pi)
    edges = ring_edges(radius, depth, outer_mm)
    if not pieces:
        return LayerCopper(layer, depth, in_front, tuple((e, 0.0) for e in edges), 1.0, 0.0,
                           0.0, ())
    ground = sensor.surroundings.ground_net if sensor.surroundings else ""
    extent, fill = _extent(board, pieces, layer)
    cover = radial_cover(extent, centre, edges)
    near = extent.intersection(sensor.geometry.buffer(depth))
    offset = (near.centroid.distance(centre) / radius) if near.area > 1e-9 else 0.0
    area = float(sensor.geometry.area)
    classes = []
    for name in CLASSES:
        part = [p for p in pieces if _class(p.item.net, ground, electrode_nets) == name]
        if part:
            share = float(_extent(board, part, layer)[0].intersection(sensor.geometry).area)
            classes.append((name, share / area, tuple(sorted({p.item.net for p in part}))))
    pad_cover = float(extent.intersection(sensor.geometry).area) / area
    profile = tuple((e, _stepped(c)) for e, c in zip(edges, cover, strict=True))
    sparse = sum(1 for c in cover if 0.0 < c < SPARSE_COVER)
    return LayerCopper(layer, depth, in_front, profile, 1.0 if fill is None else fill,
                       min(pad_cover, 1.0), offset, tuple(classes), sparse)


#: How far around the electrode coplanar copper is looked for (the sensors
#: stage's default gap search, :class:`auditor.sensors.selection.SensorSelection`).
COPLANAR_SEARCH_MM = 3.0


@dataclass(frozen=True)
class Coplanar:
    """Copper of other nets beside the electrode that the disk model leaves out
    (not the device ground, not another electrode): its typical gap (median
    along the outline, sample points with none within the search left out),
    and the share of the outline that has such copper within the search."""

    nets: tuple[str, ...]
    typical_gap_mm: float
    outline_share: float


def coplanar_unmodelled(board: Board, sensor: Sensor,
                        electrode_nets: frozenset[str]) -> Coplanar | None:
    """Signals or a driven shield beside the electrode on its own layer."""
    ground = sensor.surroundings.ground_net if sensor.surroundings else ""
    skip = {*sensor.nets, *electrode_nets, ground}
    pieces = pieces_in(board, sensor.layer, sensor.geometry.buffer(COPLANAR_SEARCH_MM),
                       lambda it: it.net not in skip)
    if not pieces:
        return None
    samples = outline_points(sensor.geometry)
    _, dists = shapely.STRtree([p.geometry for p in pieces]).query_nearest(
        samples, max_distance=COPLANAR_SEARCH_MM, return_distance=True, all_matches=False)
    if len(dists) == 0:
        return None
    return Coplanar(tuple(sorted({p.item.net for p in pieces})), float(np.median(dists)),
                    len(dists) / len(samples))


def measured_fill(shadows: tuple[LayerShadow, ...], copper: LayerCopper) -> float:
    """The fill under the pad as the sensors stage measured it (the local hatch
    figure, or 1 where a hatched net's copper is solid under the pad), else the
    hatch settings' closed form."""
    for shadow in shadows:
        if shadow.layer == copper.layer and shadow.fill == "hatched" and shadow.fill_ratio > 0:
            return shadow.fill_ratio
        if shadow.layer == copper.layer and shadow.fill == "solid":
            return 1.0
    return copper.hatch_fill


def describe(copper: LayerCopper) -> str:
    """One note: what lies on the layer, by class, and how it is modelled."""
    where = "in front of" if copper.in_front else "behind"
    parts = [f"{name} {'/'.join(nets[:3])}{'...' if len(nets) > 3 else ''} "
             + (f"under {share:.0%} of the pad" if share >= 0.005 else "beside the pad")
             for name, share, nets in copper.classes]
    rings = ", ".join(f"{c:g} to {r:g} mm" for r, c in copper.profile)
    sparse = (f"; {copper.sparse_rings} ring(s) under {SPARSE_COVER:.0%} copper left out "
              "(scattered copper)" if copper.sparse_rings else "")
    return (f"copper on {copper.layer} {where} the pad ({copper.depth_mm:g} mm): "
            f"{'; '.join(parts) or 'none'}; ring coverage {rings}{sparse}")
