"""The board model: frozen, geometric, in millimetres (see ``items`` for the
conventions)."""

from auditor.model.board import Board, CopperItem
from auditor.model.items import (
    CopperShape,
    Footprint,
    HatchSettings,
    NetClass,
    Outline,
    Pad,
    PadShape,
    Point,
    ReadWarning,
    Stackup,
    StackupLayer,
    Track,
    Via,
    Zone,
    ZoneFill,
)

__all__ = [
    "Board", "CopperItem", "CopperShape", "Footprint", "HatchSettings", "NetClass", "Outline",
    "Pad", "PadShape", "Point", "ReadWarning", "Stackup", "StackupLayer", "Track", "Via", "Zone",
    "ZoneFill",
]
