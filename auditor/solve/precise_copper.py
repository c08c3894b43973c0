"""What of the board's copper enters an electrode's 3-D solve, and as what.

Three choices of :mod:`auditor.solve.precise` that real boards need:

* net-less copper touching the electrode (footprint artwork drawn over or
  beside its pad) is galvanically part of it: it joins the electrode's
  conductor instead of being held at ground;
* a driven shield or guard net (:func:`auditor.sensors.noisy.is_shield_net`)
  carries the sense waveform: its copper is one conductor node held at the
  electrode's own potential, not at ground;
* ground pieces smaller than one cell are dropped (with a note): the mesh
  cannot hold them, and their charge is negligible beside the electrode's.
"""

from __future__ import annotations

from collections.abc import Sequence

import shapely
from shapely import STRtree

from auditor.field.precise import Conductor
from auditor.field.round_pad import SHIELD
from auditor.model.board import Board
from auditor.sensors.model import Sensor
from auditor.sensors.noisy import is_shield_net
from auditor.sensors.spatial import pieces_in


def touching_artwork(board: Board, sensor: Sensor, window: shapely.Geometry
                     ) -> tuple[shapely.Geometry, float]:
    """The electrode with the net-less copper on its layer that touches it
    (directly or through other such copper), and the area that added (mm²)."""
    loose = pieces_in(board, sensor.layer, window, lambda item: item.net == "")
    if not loose:
        return sensor.geometry, 0.0
    shapes = [piece.geometry for piece in loose]
    tree = STRtree(shapes)
    taken: set[int] = set()
    front = [sensor.geometry]
    while front:
        hits = {int(i) for g in front for i in tree.query(g, predicate="intersects")} - taken
        taken |= hits
        front = [shapes[i] for i in sorted(hits)]
    if not taken:
        return sensor.geometry, 0.0
    merged = shapely.union_all([sensor.geometry, *(shapes[i] for i in sorted(taken))])
    return merged, float(merged.area - sensor.geometry.area)


def shield_nets(board: Board) -> frozenset[str]:
    """The board's driven shield or guard nets."""
    return frozenset(net for net in board.nets if is_shield_net(net))


def shield_conductors(board: Board, copper_levels: dict[str, int], nets: frozenset[str],
                      window: shapely.Geometry, keep_clear: dict[str, shapely.Geometry]
                      ) -> list[Conductor]:
    """The shield nets' copper per layer in the window, named ``shield@<layer>``."""
    out = []
    for layer, level in copper_levels.items():
        pieces = pieces_in(board, layer, window, lambda item: item.net in nets)
        if not pieces:
            continue
        copper = shapely.union_all([piece.geometry for piece in pieces])
        if layer in keep_clear:
            copper = copper.difference(keep_clear[layer])
        parts = [g for g in shapely.get_parts(copper) if g.geom_type == "Polygon"
                 and g.area > 1e-6]
        if parts:
            out.append(Conductor(f"{SHIELD}@{layer}", shapely.MultiPolygon(parts), level))
    return out


def without_slivers(conductors: Sequence[Conductor], cell_mm: float, keep: Sequence[str]
                    ) -> tuple[list[Conductor], tuple[str, ...]]:
    """``conductors`` less the polygon pieces smaller than one cell, those
    named in ``keep`` (the electrode, the finger) excepted, and a note per
    conductor that lost some."""
    out, notes = [], []
    for conductor in conductors:
        if conductor.name in keep:
            out.append(conductor)
            continue
        parts = list(shapely.get_parts(conductor.geometry))
        kept = [g for g in parts if g.area >= cell_mm ** 2]
        if len(kept) < len(parts):
            dropped = sum(g.area for g in parts) - sum(g.area for g in kept)
            notes.append(f"{len(parts) - len(kept)} piece(s) of {conductor.name} "
                         f"({dropped:.2f} mm² in all) smaller than one {cell_mm:.3g} mm cell "
                         "left out")
        if kept:
            geometry = kept[0] if len(kept) == 1 else shapely.MultiPolygon(kept)
            out.append(Conductor(conductor.name, geometry, conductor.level))
    return out, tuple(notes)
