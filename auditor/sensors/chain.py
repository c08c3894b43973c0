"""Resistive-interpolation sliders: segments joined by a resistor chain.

A slider read by two (or a few) controller pins may join its segments with
resistors, so only the end segments reach a pin and each middle segment's
net reaches two resistors and nothing else. Such nets fail the one-pin
structure test one by one; together, three or more large pieces on nets
linked by two-terminal parts, side by side within
:data:`~auditor.sensors.segments.SEGMENT_GAP_MM`, are one slider
(common practice, no source).
"""

from __future__ import annotations

from collections.abc import Sequence

from auditor.model.board import Board
from auditor.sensors.components import connected_components
from auditor.sensors.pieces import Piece, pads_by_net
from auditor.sensors.segments import SEGMENT_GAP_MM


def resistor_chains(board: Board, pieces: Sequence[Piece]) -> list[list[Piece]]:
    """Groups of ``pieces`` that form a resistive slider (three or more each)."""
    nets = {p.net for p in pieces}
    links: dict[str, set[str]] = {n: set() for n in nets}
    for net in sorted(nets):
        for other in _through_two_terminal(board, net):
            if other in nets:
                links[net].add(other)
                links[other].add(net)
    out = []
    for comp in connected_components(sorted(links), links.__getitem__):
        members = [p for p in pieces if p.net in comp]
        if len(comp) >= 3 and _side_by_side(members, links):
            out.append(members)
    return out


def _through_two_terminal(board: Board, net: str) -> set[str]:
    """Nets on the far side of two-terminal parts on ``net``."""
    found: set[str] = set()
    for pad in pads_by_net(board).get(net, ()):
        fp = board.footprint(pad.footprint_uid)
        copper = [p for p in fp.pads if p.kind != "np_thru_hole"]
        if len({p.number for p in copper}) == 2:
            found.update(p.net for p in copper if p.net and p.net != net)
    return found


def _side_by_side(members: Sequence[Piece], links: dict[str, set[str]]) -> bool:
    """Every resistor-linked pair of segments also lies side by side."""
    for a in members:
        for b in members:
            if b.net in links[a.net] and a.layer == b.layer \
                    and a.geometry.distance(b.geometry) > SEGMENT_GAP_MM:
                return False
    return True
