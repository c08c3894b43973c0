"""Recognise unnamed slider and wheel segments by their layout.

Buttons sit several millimetres apart (physics.md §4.1: edge to edge at least
2-5 mm); slider and wheel segments sit about 0.5 mm apart. So electrodes found
as buttons that form a chain, each within :data:`SEGMENT_GAP_MM` of the next
on the same layer, are segments: an open chain of three or more is a slider, a
closed ring of four or more a wheel (common practice, no source). Configured
and name-typed electrodes are left as they are.
"""

from __future__ import annotations

from collections.abc import Sequence
from dataclasses import replace

from shapely import STRtree

from auditor.sensors.model import Sensor, SensorKind

#: Largest edge-to-edge gap between two segments of one slider or wheel (mm).
SEGMENT_GAP_MM = 1.0


def grouped_by_layout(sensors: Sequence[Sensor], fixed: set[str]) -> list[Sensor]:
    """``sensors`` with chained buttons turned into slider or wheel segments.

    ``fixed`` names sensors to leave alone whatever their layout.
    """
    loose = [s for s in sensors if s.kind == "button" and s.name not in fixed]
    links = _links(loose)
    changed: dict[str, Sensor] = {}
    for chain in _components(len(loose), links):
        degrees = [len(links[i]) for i in chain]
        if len(chain) < 3 or max(degrees) > 2:
            continue
        ring = len(chain) >= 4 and all(d == 2 for d in degrees)
        if not ring and degrees.count(1) != 2:
            continue
        group = min(loose[i].name for i in chain)
        kind: SensorKind = "wheel" if ring else "slider"
        for i in chain:
            s = loose[i]
            changed[s.name] = replace(s, kind=kind, group=group, reason=f"{s.reason}; one of "
                                      f"{len(chain)} electrodes {SEGMENT_GAP_MM:g} mm or less "
                                      f"apart in a {'ring' if ring else 'row'}")
    return [changed.get(s.name, s) for s in sensors]


def _links(sensors: Sequence[Sensor]) -> list[set[int]]:
    links: list[set[int]] = [set() for _ in sensors]
    if not sensors:
        return links
    tree = STRtree([s.geometry for s in sensors])
    for i, s in enumerate(sensors):
        for j in tree.query(s.geometry, predicate="dwithin", distance=SEGMENT_GAP_MM):
            j = int(j)
            if j != i and sensors[j].layer == s.layer:
                links[i].add(j)
                links[j].add(i)
    return links


def _components(size: int, links: list[set[int]]) -> list[list[int]]:
    seen: set[int] = set()
    out = []
    for start in range(size):
        if start in seen:
            continue
        stack, comp = [start], []
        seen.add(start)
        while stack:
            node = stack.pop()
            comp.append(node)
            for other in sorted(links[node] - seen):
                seen.add(other)
                stack.append(other)
        out.append(sorted(comp))
    return out
