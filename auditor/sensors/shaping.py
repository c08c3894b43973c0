"""Turn accepted copper pieces into named, typed and ordered :class:`Sensor` records.

Kinds come from configuration first, then from words in the net, net-class or
footprint names, then from shape: a ring (hole larger than its copper) or a
disk-equivalent diameter of ``proximity_diameter_mm`` or more is a proximity
electrode. Mutual transmit/receive kinds by naming need both sides present on
the board (``TX``/``DRIVE``/``X3`` against ``RX``/``Y3``/``SENSE``).

Slider and wheel segments are grouped by a shared footprint or a shared name
stem (``SLD_1``, ``SLD_2`` → ``SLD``) and ordered by the names' trailing
numbers when those are distinct, otherwise by geometry: along the segments'
principal axis (left to right, or top to bottom) for sliders; clockwise on
screen from twelve o'clock for wheels.
"""

from __future__ import annotations

import math
from collections.abc import Sequence
from dataclasses import dataclass, replace

import numpy as np

from auditor.model.board import Board
from auditor.model.vocabulary import SensorKind
from auditor.sensors.crossed import crossed_kinds
from auditor.sensors.cues import (
    PROXIMITY_WORDS,
    SLIDER_WORDS,
    WHEEL_WORDS,
    group_stem,
    has_word,
    is_auto_name,
    leaf,
    tokens,
    trailing_index,
)
from auditor.sensors.matrix import matrix_kinds
from auditor.sensors.model import Sensor, name_order
from auditor.sensors.pieces import Piece
from auditor.sensors.segments import grouped_by_layout
from auditor.sensors.selection import SensorSelection, matches

#: Share of the electrode's area a mask (paste) opening must reach to count.
EXPOSED_SHARE = 0.1


@dataclass(frozen=True)
class Candidate:
    """A piece of copper accepted as an electrode, with the cue that decided."""

    piece: Piece
    reason: str


def shaped_sensors(board: Board, sel: SensorSelection,
                   candidates: Sequence[Candidate]) -> tuple[Sensor, ...]:
    """Sensors for ``candidates``: unique names, kinds, groups and order, sorted by name."""
    names = _unique_names(board, candidates)
    sensors = [_sensor(board, c, names[i]) for i, c in enumerate(candidates)]
    sensors, fixed = _kinds(board, sel, candidates, sensors)
    sensors, keys = matrix_kinds(board, sensors)
    sensors, stacked = crossed_kinds(sensors, fixed | keys, (board.copper_layers or ("",))[0])
    sensors = grouped_by_layout(sensors, fixed | keys | stacked)
    sensors = _ordered_groups(sensors)
    return tuple(sorted(sensors, key=lambda s: name_order(s.name)))


def _base_name(board: Board, cand: Candidate) -> str:
    piece = cand.piece
    if not is_auto_name(piece.net):
        return leaf(piece.net)
    refs = sorted({board.footprint(u).ref for u in piece.owner_uids})
    named_zone = next((z.name for z in piece.zones if z.name), "")
    return "+".join(refs) or named_zone or piece.net


def _unique_names(board: Board, candidates: Sequence[Candidate]) -> list[str]:
    names = [_base_name(board, c) for c in candidates]
    for name in list(names):
        clash = [j for j, n in enumerate(names) if n == name]
        if len(clash) > 1 and len({candidates[j].piece.net for j in clash}) == len(clash):
            for j in clash:
                names[j] = candidates[j].piece.net
    final = list(names)
    for name in set(names):
        clash = [j for j, n in enumerate(names) if n == name]
        if len(clash) > 1:
            clash.sort(key=lambda j: _position_key(candidates[j].piece))
            for k, j in enumerate(clash, start=1):
                final[j] = f"{name}#{k}"
    return final


def _position_key(piece: Piece) -> tuple[str, float, float]:
    c = piece.geometry.centroid
    return piece.layer, round(c.y, 6), round(c.x, 6)


def _sensor(board: Board, cand: Candidate, name: str) -> Sensor:
    piece = cand.piece
    c = piece.geometry.centroid
    if not piece.geometry.contains(c):
        # A loop's centroid lies in its hole, often on another electrode;
        # findings and markers placed there would point at the wrong copper.
        c = piece.geometry.representative_point()
    refs = tuple(sorted({board.footprint(u).ref for u in piece.owner_uids}))
    front = piece.layer == board.copper_layers[0]
    line, column = _source(piece)
    return Sensor(name=name, kind="button", nets=(piece.net,), refs=refs, layer=piece.layer,
                  area_mm2=piece.area_mm2, x_mm=c.x, y_mm=c.y, reason=cand.reason,
                  geometry=piece.geometry, footprint_uids=piece.footprint_uids,
                  exposed=_opened(piece, "F.Mask" if front else "B.Mask", "mask"),
                  pasted=_opened(piece, "F.Paste" if front else "B.Paste", "paste"),
                  source_line=line, source_column=column)


def _source(piece: Piece) -> tuple[int | None, int | None]:
    """Line and column of the piece's first pad, else its first zone, in the file."""
    for items in (piece.pads, piece.zones):
        placed = sorted((i.source_line, i.source_column or 0) for i in items
                        if i.source_line is not None)
        if placed:
            return placed[0][0], placed[0][1] or None
    return None, None


def _opened(piece: Piece, layer: str, what: str) -> bool:
    wildcard = "*." + layer.split(".", 1)[1]
    area = 0.0
    for pad in piece.pads:
        layers = pad.mask_layers if what == "mask" else pad.paste_layers
        geom = pad.geometry_on(piece.layer)
        if geom is not None and (layer in layers or wildcard in layers):
            area += float(geom.area)
    return area >= EXPOSED_SHARE * piece.area_mm2 > 0


def _words(board: Board, cand: Candidate) -> str:
    fps = [board.footprint(u) for u in cand.piece.footprint_uids]
    return " ".join([leaf(cand.piece.net)] + [f"{fp.lib_id.split(':')[-1]} {fp.value}"
                                               for fp in fps])


def _kinds(board: Board, sel: SensorSelection, candidates: Sequence[Candidate],
           sensors: list[Sensor]) -> tuple[list[Sensor], set[str]]:
    """Sensors with kinds and groups, and the names typed by configuration or
    words (layout grouping leaves those alone)."""
    sides = [_mutual_side(c.piece.net) for c in candidates]
    naming_mutual = "tx" in sides and "rx" in sides
    out, fixed = [], set()
    areas = [c.piece.area_mm2 for c in candidates]
    for cand, sensor, side in zip(candidates, sensors, sides, strict=True):
        kind, group = _kind(board, sel, cand, side if naming_mutual else "")
        if kind == "button" and _looks_proximity(sel, cand.piece) \
                and _alike_count(cand.piece.area_mm2, areas) < 3:
            kind = "proximity"
        elif kind != "button":
            fixed.add(sensor.name)
        out.append(replace(sensor, kind=kind, group=group))
    return out, fixed


def _alike_count(area: float, areas: Sequence[float]) -> int:
    """How many electrodes (this one included) have about this area: a bank
    of alike large pads is keys or a slider, not proximity loops."""
    return sum(1 for a in areas if abs(a - area) <= 0.1 * max(a, area))


def _kind(board: Board, sel: SensorSelection, cand: Candidate,
          side: str) -> tuple[SensorKind, str]:
    net = cand.piece.net
    if matches(net, sel.mutual_tx):
        return "mutual-tx", "mutual"
    if matches(net, sel.mutual_rx):
        return "mutual-rx", "mutual"
    for kind, groups in (("slider", sel.sliders), ("wheel", sel.wheels)):
        for group, globs in groups:
            if matches(net, globs):
                return ("slider" if kind == "slider" else "wheel"), group
    if matches(net, sel.proximity):
        return "proximity", ""
    if side:
        return ("mutual-tx" if side == "tx" else "mutual-rx"), "mutual"
    words = _words(board, cand)
    if has_word(words, WHEEL_WORDS):
        return "wheel", _group_name(board, cand)
    if has_word(words, SLIDER_WORDS):
        return "slider", _group_name(board, cand)
    if has_word(words, PROXIMITY_WORDS):
        return "proximity", ""
    return "button", ""


def _group_name(board: Board, cand: Candidate) -> str:
    uids = cand.piece.footprint_uids
    if len(uids) == 1 and len(board.footprint(uids[0]).pads) > 2:
        return board.footprint(uids[0]).ref
    return group_stem(cand.piece.net if not is_auto_name(cand.piece.net) else
                      _base_name(board, cand))


def _looks_proximity(sel: SensorSelection, piece: Piece) -> bool:
    geom = piece.geometry
    holes = sum(abs(float(_area(ring))) for ring in getattr(geom, "interiors", ()))
    diameter = 2.0 * math.sqrt(max(geom.area, 0.0) / math.pi)
    return holes > geom.area or diameter >= sel.proximity_diameter_mm


def _area(ring: object) -> float:
    from shapely.geometry import Polygon

    return float(Polygon(ring).area)


def _mutual_side(net: str) -> str:
    toks = tokens(leaf(net))
    pairs = list(zip(toks, toks[1:] + ("",), strict=True))
    if any(t in ("tx", "drive", "drv") for t in toks) or any(
            t == "x" and n.isdigit() for t, n in pairs):
        return "tx"
    if any(t in ("rx", "sense", "sns") for t in toks) or any(
            t == "y" and n.isdigit() for t, n in pairs):
        return "rx"
    return ""


def _ordered_groups(sensors: list[Sensor]) -> list[Sensor]:
    groups: dict[tuple[str, str], list[int]] = {}
    for i, s in enumerate(sensors):
        if s.kind in ("slider", "wheel"):
            groups.setdefault((s.kind, s.group), []).append(i)
    out = list(sensors)
    for (kind, _), members in groups.items():
        for index, i in enumerate(_segment_order([sensors[i] for i in members], kind)):
            out[members[i]] = replace(sensors[members[i]], index=index)
    return out


def _segment_order(segments: list[Sensor], kind: str) -> list[int]:
    """Positions of ``segments`` (indices into the list) in segment order."""
    numbers = [trailing_index(s.nets[0]) if not is_auto_name(s.nets[0]) else None
               for s in segments]
    if None not in numbers and len(set(numbers)) == len(numbers):
        return sorted(range(len(segments)), key=lambda i: numbers[i] or 0)
    xy = np.array([[s.x_mm, s.y_mm] for s in segments])
    centre = xy.mean(axis=0)
    if kind == "wheel":
        # Rounded so a segment straight above the centre is at 0, not just under 2π.
        angles = [round(math.atan2(x - centre[0], -(y - centre[1])) % (2 * math.pi), 9)
                  % round(2 * math.pi, 9) for x, y in xy]
        return sorted(range(len(segments)), key=lambda i: angles[i])
    if len(segments) < 2:
        return [0]
    _, _, vt = np.linalg.svd(xy - centre)
    axis = vt[0]
    if abs(axis[0]) >= abs(axis[1]):
        axis = axis if axis[0] > 0 else -axis
    else:
        axis = axis if axis[1] > 0 else -axis
    proj = (xy - centre) @ axis
    return sorted(range(len(segments)), key=lambda i: float(proj[i]))
