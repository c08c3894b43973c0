"""Small touch pads judged against their siblings, and touch footprints with no net.

A fixed area floor misses the electrodes of tiny devices (3-4 mm² pads at the
edge of a stick-sized board). Pads below the floor whose nets say touch are
still electrodes when at least one sibling on another touch-named net looks
alike (area within :data:`SIBLING_AREA_RATIO`) and they are not pads of a
controller, connector or module (common practice, no source).

Copper of a footprint named for touch that carries no net (a layout drawn
before the schematic) is never passed over in silence: it comes back as a
candidate that says so.
"""

from __future__ import annotations

from collections.abc import Sequence

from shapely.ops import unary_union

from auditor.model.board import Board
from auditor.sensors.pieces import Piece, outer_layers
from auditor.sensors.roles import is_electrode_part

#: Smallest copper (mm²) a touch-named pad may have to be judged against siblings.
SIBLING_FLOOR_MM2 = 1.5
#: Largest ratio of areas between two pads that count as alike.
SIBLING_AREA_RATIO = 1.3


def alike_siblings(small: Sequence[Piece]) -> list[tuple[Piece, int]]:
    """The pieces of ``small`` with an alike sibling on another net, each with
    the size of its family."""
    out = []
    for piece in small:
        family = [p for p in small if p.layer == piece.layer and
                  max(p.area_mm2, piece.area_mm2) <= SIBLING_AREA_RATIO * min(
                      p.area_mm2, piece.area_mm2)]
        if len({p.net for p in family}) >= 2:
            out.append((piece, len(family)))
    return out


def netless_touch_copper(board: Board) -> list[tuple[str, str, float, float, float]]:
    """Touch-named footprints whose copper has no net at all, as
    ``(ref, layer, area mm², x, y)``."""
    outer = set(outer_layers(board))
    found = []
    for fp in board.footprints:
        if not is_electrode_part(fp) or any(p.net for p in fp.pads):
            continue
        shapes = [(s.layer, s.geometry) for p in fp.pads for s in p.copper if s.layer in outer]
        shapes += [(g.layer, g.geometry) for g in fp.graphics if g.layer in outer and not g.net]
        if not shapes or _fed(board, fp.uid):
            continue
        layer = shapes[0][0]
        geom = unary_union([g for lay, g in shapes if lay == layer])
        c = geom.centroid
        found.append((fp.ref, layer, float(geom.area), float(c.x), float(c.y)))
    return found


def _fed(board: Board, uid: str) -> bool:
    """True when the footprint's net-less copper touches a netted item (it is
    then merged into that net's electrode)."""
    fp = board.footprint(uid)
    for g in fp.graphics:
        for item in board.items_on(g.layer):
            if item.net and item.geometry.intersects(g.geometry):
                return True
    return False
