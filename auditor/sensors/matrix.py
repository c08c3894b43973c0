"""Key matrices of paired electrodes: mutual-capacitance keys and
electro-capacitive key switches.

A mutual-capacitance key is two interleaved pads of one footprint: a
transmit pad on a column net and a receive pad on a row net. Across a
keyboard the same row and column nets recur in many footprints, so the nets
split into two sides (rows and columns) with every key joining one of each.
When at least two keys share a net this way, the pads are a matrix: each key's
pair gets the footprint reference as its group (its two pads are close by
design) and the kinds ``mutual-rx``/``mutual-tx``.

Electro-capacitive key switches are drawn the same way (a sense and a strobe
pad under each key) but a mechanical key, not a finger, changes their
coupling: footprints named for switches and not for touch get the kind
``keyswitch``, which the touch rules leave alone. Word lists and thresholds
are our own judgement (common practice, no source).
"""

from __future__ import annotations

from collections.abc import Sequence
from dataclasses import replace

from shapely.geometry.base import BaseGeometry
from shapely.ops import unary_union

from auditor.model.board import Board
from auditor.model.items import Footprint
from auditor.model.vocabulary import SensorKind
from auditor.sensors.cues import is_ground_name, leaf, tokens
from auditor.sensors.model import Sensor
from auditor.sensors.roles import is_electrode_part

#: Largest edge-to-edge gap between the two pads of one key (mm).
PAIR_GAP_MM = 1.0
SWITCH_WORDS = ("switch", "keyswitch", "sw", "key")
RECEIVE_WORDS = frozenset({"r", "row", "rx", "y", "sense", "sns", "rcv"})
TRANSMIT_WORDS = frozenset({"c", "col", "column", "tx", "x", "drive", "drv", "strobe"})


def matrix_kinds(board: Board, sensors: Sequence[Sensor]) -> tuple[list[Sensor], set[str]]:
    """``sensors`` with matrix keys typed and grouped, and the names changed."""
    pairs = _key_pairs(sensors)
    sides = _two_sides([(sensors[a].nets[0], sensors[b].nets[0]) for a, b, _ in pairs])
    if sides is None:
        return list(sensors), set()
    rx_side = _receive_side(sides)
    out = list(sensors)
    for a, b, uid in pairs:
        fp = board.footprint(uid)
        switch = not is_electrode_part(fp) and _names_switch(fp.lib_id, fp.ref)
        for i in (a, b):
            kind: SensorKind = "keyswitch" if switch else (
                "mutual-rx" if sides[sensors[i].nets[0]] == rx_side else "mutual-tx")
            why = "key switch pad (a mechanical key moves it, not a finger)" if switch \
                else f"{'receive' if kind == 'mutual-rx' else 'transmit'} pad of the key"
            out[i] = replace(sensors[i], kind=kind, group=fp.ref,
                             reason=f"{sensors[i].reason}; {why}")
    return out, {out[i].name for a, b, _ in pairs for i in (a, b)}


def _key_pairs(sensors: Sequence[Sensor]) -> list[tuple[int, int, str]]:
    """Footprints holding exactly two close electrodes on two nets, as index pairs."""
    by_fp: dict[str, list[int]] = {}
    for i, s in enumerate(sensors):
        if len(s.footprint_uids) == 1:
            by_fp.setdefault(s.footprint_uids[0], []).append(i)
    pairs = []
    for uid, members in sorted(by_fp.items()):
        if len(members) != 2:
            continue
        a, b = members
        sa, sb = sensors[a], sensors[b]
        if sa.nets[0] != sb.nets[0] and sa.layer == sb.layer \
                and sa.geometry.distance(sb.geometry) <= PAIR_GAP_MM:
            pairs.append((a, b, uid))
    return pairs


def _two_sides(edges: list[tuple[str, str]]) -> dict[str, int] | None:
    """Nets coloured 0/1 so every key joins both colours; None when the keys
    do not form a matrix (fewer than two keys, no shared net, or no colouring)."""
    if len(edges) < 2 or len({n for e in edges for n in e}) >= 2 * len(edges):
        return None
    links: dict[str, set[str]] = {}
    for u, v in edges:
        links.setdefault(u, set()).add(v)
        links.setdefault(v, set()).add(u)
    side: dict[str, int] = {}
    for start in sorted(links):
        if start in side:
            continue
        side[start], stack = 0, [start]
        while stack:
            node = stack.pop()
            for other in sorted(links[node]):
                if other not in side:
                    side[other] = 1 - side[node]
                    stack.append(other)
                elif side[other] == side[node]:
                    return None
    return side


def _receive_side(sides: dict[str, int]) -> int:
    """The side whose names say receive (rows), else the side with fewer nets."""
    votes = [0, 0]
    for net, s in sides.items():
        toks = set(tokens(leaf(net)))
        votes[s] += len(toks & RECEIVE_WORDS) - len(toks & TRANSMIT_WORDS)
    if votes[0] != votes[1]:
        return 0 if votes[0] > votes[1] else 1
    counts = [sum(1 for v in sides.values() if v == k) for k in (0, 1)]
    return 0 if counts[0] <= counts[1] else 1


def _names_switch(lib_id: str, ref: str) -> bool:
    toks = tokens(lib_id.split(":")[-1])
    prefix = "".join(ch for ch in ref if ch.isalpha()).upper()
    return prefix in ("SW", "K", "S") or any(t.startswith(w) for t in toks
                                              for w in SWITCH_WORDS)


def key_footprints(board: Board, min_area_mm2: float) -> dict[str, str]:
    """Footprints holding one key of a matrix (two close pads of at least
    ``min_area_mm2`` on a row and a column net), as uid → the two nets joined.

    Found from the pads, before any electrode is taken, so that keys whose
    nets reach many keys (no single controller pin) are still found.
    """
    pairs: dict[str, tuple[str, str]] = {}
    for fp in board.footprints:
        pair = _pad_pair(fp, min_area_mm2)
        if pair is not None:
            pairs[fp.uid] = pair
    if _two_sides(list(pairs.values())) is None:
        return {}
    return {uid: f"{a}+{b}" for uid, (a, b) in sorted(pairs.items())}


def _pad_pair(fp: Footprint, min_area_mm2: float) -> tuple[str, str] | None:
    by_net: dict[str, list[BaseGeometry]] = {}
    for pad in fp.pads:
        for shape in pad.copper:
            if pad.net and not is_ground_name(pad.net):
                by_net.setdefault(pad.net, []).append(shape.geometry)
    if len(by_net) != 2:
        return None
    (net_a, geoms_a), (net_b, geoms_b) = sorted(by_net.items())
    a, b = unary_union(geoms_a), unary_union(geoms_b)
    if min(a.area, b.area) < min_area_mm2 or a.distance(b) > PAIR_GAP_MM:
        return None
    return net_a, net_b
