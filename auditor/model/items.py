"""Frozen records for the items on a board.

Conventions, stated once for the whole model:

* lengths in millimetres, areas in mm², angles in degrees;
* the file's own frame: origin at the page's top-left, **Y grows downward**,
  positive angles turn counter-clockwise as seen on screen (KiCad's frame, so
  users can find every item in KiCad at the coordinates we print);
* geometry is shapely, already transformed to board coordinates;
* nets are identified by **name** (codes are renumbered on every save);
  ``""`` is "no net".
"""

from __future__ import annotations

from dataclasses import dataclass
from typing import Literal

from shapely.geometry.base import BaseGeometry

Side = Literal["front", "back"]
FillMode = Literal["solid", "hatched", "none"]


@dataclass(frozen=True, slots=True)
class Point:
    """A point on the board in mm (Y down)."""

    x: float
    y: float


@dataclass(frozen=True, slots=True)
class PadShape:
    """One copper layer's shape of a pad (padstacks may differ per layer)."""

    layer: str
    shape: str  # circle, rect, oval, roundrect, chamfered, trapezoid, custom
    geometry: BaseGeometry


@dataclass(frozen=True)
class Pad:
    """A footprint pad in board coordinates.

    ``x_mm``/``y_mm`` is the pad's anchor (its ``at``); the copper may be
    displaced from it by a drill offset. ``copper`` holds one entry per copper
    layer the pad is on, front first in stack order.
    """

    footprint_uid: str
    ref: str
    number: str
    kind: str  # thru_hole, smd, connect, np_thru_hole
    shape: str
    x_mm: float
    y_mm: float
    angle_deg: float
    width_mm: float
    height_mm: float
    net: str
    copper: tuple[PadShape, ...]
    drill_mm: float = 0.0
    mask_layers: tuple[str, ...] = ()
    paste_layers: tuple[str, ...] = ()
    pin_function: str = ""
    #: Where the item starts in the board file (1-based line and column), for
    #: annotations that point at it; ``None`` when not read from a file.
    source_line: int | None = None
    source_column: int | None = None

    @property
    def copper_layers(self) -> tuple[str, ...]:
        """Names of the copper layers the pad has copper on."""
        return tuple(s.layer for s in self.copper)

    def geometry_on(self, layer: str) -> BaseGeometry | None:
        """The pad's copper on ``layer``, or ``None`` if it has none there."""
        for s in self.copper:
            if s.layer == layer:
                return s.geometry
        return None


@dataclass(frozen=True)
class CopperShape:
    """A graphic item on a copper layer (``gr_*`` or ``fp_*``), as copper.

    ``footprint_uid`` is empty for board-level graphics.
    """

    layer: str
    net: str
    geometry: BaseGeometry
    kind: str  # line, arc, circle, rect, poly, curve, text
    footprint_uid: str = ""


@dataclass(frozen=True)
class Footprint:
    """A placed footprint.

    ``uid`` is unique on the board even where references repeat or are
    unannotated (``REF**``): the reference, and ``#n`` where needed.
    """

    uid: str
    ref: str
    value: str
    lib_id: str
    x_mm: float
    y_mm: float
    angle_deg: float
    side: Side
    attributes: tuple[str, ...] = ()
    properties: tuple[tuple[str, str], ...] = ()
    pads: tuple[Pad, ...] = ()
    graphics: tuple[CopperShape, ...] = ()
    #: Where the item starts in the board file (1-based line and column), for
    #: annotations that point at it; ``None`` when not read from a file.
    source_line: int | None = None
    source_column: int | None = None

    def property(self, name: str) -> str | None:
        """The value of a footprint property by case-insensitive name."""
        for key, value in self.properties:
            if key.lower() == name.lower():
                return value
        return None


@dataclass(frozen=True, slots=True)
class Track:
    """A straight segment or a three-point arc of track."""

    start: Point
    end: Point
    width_mm: float
    layer: str
    net: str
    length_mm: float
    geometry: BaseGeometry
    mid: Point | None = None  # set for arcs
    #: Where the item starts in the board file (1-based line and column), for
    #: annotations that point at it; ``None`` when not read from a file.
    source_line: int | None = None
    source_column: int | None = None


@dataclass(frozen=True, slots=True)
class Via:
    """A via; ``layers`` lists every copper layer it spans, in stack order."""

    x_mm: float
    y_mm: float
    diameter_mm: float
    drill_mm: float
    layers: tuple[str, ...]
    net: str
    kind: str = "through"  # through, blind, buried, micro
    #: Where the item starts in the board file (1-based line and column), for
    #: annotations that point at it; ``None`` when not read from a file.
    source_line: int | None = None
    source_column: int | None = None


@dataclass(frozen=True)
class HatchSettings:
    """Settings of a hatched zone fill (KiCad's ``fill (mode hatch)``)."""

    thickness_mm: float
    gap_mm: float
    orientation_deg: float

    @property
    def fill_ratio(self) -> float:
        """Copper coverage of an infinite hatch: 1 - (gap / pitch)²."""
        pitch = self.thickness_mm + self.gap_mm
        if pitch <= 0:
            return 1.0
        return 1.0 - (self.gap_mm / pitch) ** 2


@dataclass(frozen=True)
class ZoneFill:
    """A zone's filled copper on one layer (union of its filled polygons)."""

    layer: str
    geometry: BaseGeometry
    islands: int = 0


@dataclass(frozen=True)
class Zone:
    """A copper zone or a rule (keep-out) area.

    ``fill`` is ``"none"`` when the file carries no filled polygons: the zone's
    copper is then unknown and later stages must say so.
    """

    net: str
    layers: tuple[str, ...]
    outline: BaseGeometry
    fills: tuple[ZoneFill, ...]
    fill: FillMode
    name: str = ""
    priority: int = 0
    is_rule_area: bool = False
    keepouts: tuple[str, ...] = ()  # e.g. ("copperpour", "tracks") not allowed
    hatch: HatchSettings | None = None
    min_thickness_mm: float = 0.0
    footprint_uid: str = ""
    #: Where the item starts in the board file (1-based line and column), for
    #: annotations that point at it; ``None`` when not read from a file.
    source_line: int | None = None
    source_column: int | None = None

    def fill_on(self, layer: str) -> BaseGeometry | None:
        """Filled copper on ``layer``, or ``None``."""
        for f in self.fills:
            if f.layer == layer:
                return f.geometry
        return None


@dataclass(frozen=True)
class StackupLayer:
    """One physical layer, top to bottom.

    ``kind`` is ``copper``, ``dielectric``, ``mask``, ``silk`` or ``paste``.
    A dielectric row split into sub-layers appears as several entries with the
    same ``name``.
    """

    name: str
    kind: str
    thickness_mm: float
    material: str = ""
    epsilon_r: float = 1.0


@dataclass(frozen=True)
class Stackup:
    """The board's physical stack, top (front) first.

    ``from_file`` is False when the file has no stackup and the default was
    built; ``origin`` then says where the numbers come from.
    """

    layers: tuple[StackupLayer, ...]
    board_thickness_mm: float
    from_file: bool
    origin: str = ""

    def copper_names(self) -> tuple[str, ...]:
        """Copper layer names, top to bottom."""
        return tuple(lay.name for lay in self.layers if lay.kind == "copper")

    def depth_of(self, copper_layer: str) -> float:
        """Distance in mm from the board's top copper surface down to the top
        of ``copper_layer`` (0 for F.Cu)."""
        depth = 0.0
        started = False
        for lay in self.layers:
            if lay.kind == "copper" and not started:
                started = True
            if not started:
                continue
            if lay.kind == "copper" and lay.name == copper_layer:
                return depth
            if lay.kind in ("copper", "dielectric"):
                depth += lay.thickness_mm
        raise KeyError(copper_layer)


@dataclass(frozen=True)
class Outline:
    """The Edge.Cuts outline: the largest closed loop and the cut-outs.

    ``polygon`` is ``None`` when the board has no closed outline (allowed).
    """

    polygon: BaseGeometry | None
    cutouts: tuple[BaseGeometry, ...] = ()
    open_ends: int = 0

    @property
    def bbox_mm(self) -> tuple[float, float, float, float] | None:
        """``(x, y, width, height)`` of the outline, or ``None``."""
        if self.polygon is None or self.polygon.is_empty:
            return None
        x0, y0, x1, y1 = self.polygon.bounds
        return (x0, y0, x1 - x0, y1 - y0)


@dataclass(frozen=True)
class NetClass:
    """A net class: its name and the nets or patterns assigned to it."""

    name: str
    nets: tuple[str, ...] = ()
    patterns: tuple[str, ...] = ()


@dataclass(frozen=True)
class ReadWarning:
    """Something the reader skipped, guessed or only partly understood.

    ``code`` is a stable slug (``unknown-token``, ``zone-unfilled``,
    ``no-stackup``, ``newer-version`` ...) so tests and reports can key on it.
    """

    code: str
    message: str
    line: int | None = None
    column: int | None = None


__all__ = [
    "CopperShape", "FillMode", "Footprint", "HatchSettings", "NetClass", "Outline", "Pad",
    "PadShape", "Point", "ReadWarning", "Side", "Stackup", "StackupLayer", "Track", "Via",
    "Zone", "ZoneFill",
]
