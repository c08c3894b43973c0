"""The items collected while reading, before they are frozen into a Board."""

from __future__ import annotations

from array import array
from dataclasses import dataclass, field

from auditor.model import geometry as geo
from auditor.model.items import CopperShape, Footprint, NetClass, Track, Via, Zone
from auditor.read.sexpr import Node


@dataclass
class EdgePiece:
    """One Edge.Cuts drawing in board coordinates (a ring when ``closed``)."""

    path: geo.Coords
    closed: bool


@dataclass
class BoardParts:
    """Mutable bins the token handlers fill, in file order."""

    footprints: list[Footprint] = field(default_factory=list)
    tracks: list[Track | None] = field(default_factory=list)  # None until finished
    #: straight tracks waiting for their geometry: 5 numbers each, and names
    segment_numbers: array[float] = field(default_factory=lambda: array("d"))
    segment_names: list[tuple[str, str]] = field(default_factory=list)
    segment_places: list[tuple[int, int]] = field(default_factory=list)  # line, column
    vias: list[Via] = field(default_factory=list)
    zones: list[Zone] = field(default_factory=list)
    graphics: list[CopperShape] = field(default_factory=list)
    edges: list[EdgePiece] = field(default_factory=list)
    netclasses: list[NetClass] = field(default_factory=list)
    board_thickness_mm: float | None = None
    generator: str = ""
    _uids: dict[str, int] = field(default_factory=dict)
    copper_text: int = 0
    stackup_node: Node | None = None

    def unique_uid(self, ref: str) -> str:
        """``ref`` the first time, then ``ref#2``, ``ref#3`` … (``REF**`` and
        duplicated references must not collide, kicad-format.md §7)."""
        base = ref or "?"
        seen = self._uids.get(base, 0) + 1
        self._uids[base] = seen
        return base if seen == 1 else f"{base}#{seen}"
