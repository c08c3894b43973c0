"""Recognise unnamed slider and wheel segments by their layout.

Buttons sit several millimetres apart (physics.md §4.1: edge to edge at least
2-5 mm); slider and wheel segments sit about 0.5 mm apart. So electrodes found
as buttons that form a chain, each within :data:`SEGMENT_GAP_MM` of the next
on the same layer, are segments: an open chain of three or more is a slider, a
closed ring of three or more a wheel (three interleaved segments, each
touching both others, is the most common wheel). Configured and name-typed
electrodes are left as they are.

Large sliders are also drawn as alike strips side by side (a rhythm-game
slider of 15 mm wide pads 2 mm apart): three or more electrodes of one size
and shape, each at least :data:`STRIP_ASPECT` times as long as wide, in a
row across their width with gaps of at most :data:`ROW_GAP_SHARE` of that
width, form a slider too (common practice, no source).
"""

from __future__ import annotations

from collections.abc import Callable, Sequence
from dataclasses import replace

from shapely import STRtree

from auditor.model.vocabulary import SensorKind
from auditor.sensors.components import connected_components
from auditor.sensors.model import Sensor

#: Largest edge-to-edge gap between two segments of one slider or wheel (mm).
SEGMENT_GAP_MM = 1.0
#: Strips in a row: smallest length/width ratio, largest gap as a share of width.
STRIP_ASPECT = 1.5
ROW_GAP_SHARE = 0.25
#: Largest relative difference of area (and of each side) between alike strips.
ALIKE_TOLERANCE = 0.1


def grouped_by_layout(sensors: Sequence[Sensor], fixed: set[str]) -> list[Sensor]:
    """``sensors`` with chained buttons turned into slider or wheel segments.

    ``fixed`` names sensors to leave alone whatever their layout.
    """
    loose = [s for s in sensors if s.kind in ("button", "proximity") and s.name not in fixed]
    changed = _grouped(loose, _links(loose), lambda n, ring: (
        f"one of {n} electrodes {SEGMENT_GAP_MM:g} mm or less apart in a "
        f"{'ring' if ring else 'row'}"))
    rest = [s for s in loose if s.name not in changed]
    changed.update(_grouped(rest, _strip_links(rest), lambda n, ring: (
        f"one of {n} alike strips side by side in a row"), rings=False))
    return [changed.get(s.name, s) for s in sensors]


def _grouped(loose: Sequence[Sensor], links: list[set[int]],
             why: Callable[[int, bool], str], rings: bool = True) -> dict[str, Sensor]:
    """Chains of three or more linked electrodes as slider or wheel segments."""
    changed: dict[str, Sensor] = {}
    for chain in connected_components(range(len(loose)), links.__getitem__):
        degrees = [len(links[i]) for i in chain]
        if len(chain) < 3 or max(degrees) > 2:
            continue
        ring = rings and all(d == 2 for d in degrees)
        if not ring and degrees.count(1) != 2:
            continue
        group = min(loose[i].name for i in chain)
        kind: SensorKind = "wheel" if ring else "slider"
        for i in chain:
            s = loose[i]
            changed[s.name] = replace(s, kind=kind, group=group,
                                      reason=f"{s.reason}; {why(len(chain), ring)}")
    return changed


def _sides(s: Sensor) -> tuple[float, float]:
    x0, y0, x1, y1 = s.geometry.bounds
    return x1 - x0, y1 - y0


def _alike(a: Sensor, b: Sensor) -> bool:
    def close(u: float, v: float) -> bool:
        return abs(u - v) <= ALIKE_TOLERANCE * max(u, v)

    (aw, ah), (bw, bh) = _sides(a), _sides(b)
    return a.layer == b.layer and close(a.area_mm2, b.area_mm2) and close(aw, bw) \
        and close(ah, bh)


def _strip_links(sensors: Sequence[Sensor]) -> list[set[int]]:
    """Links between alike strips that sit side by side across their width."""
    links: list[set[int]] = [set() for _ in sensors]
    for i, a in enumerate(sensors):
        w, h = _sides(a)
        short, long_ = min(w, h), max(w, h)
        if short <= 0 or long_ < STRIP_ASPECT * short:
            continue
        across = 0 if w < h else 1  # the row runs along x for upright strips
        for j in range(i + 1, len(sensors)):
            b = sensors[j]
            if not _alike(a, b) or a.geometry.distance(b.geometry) > ROW_GAP_SHARE * short:
                continue
            offset = ((b.x_mm - a.x_mm), (b.y_mm - a.y_mm))
            if abs(offset[1 - across]) <= 0.1 * long_:
                links[i].add(j)
                links[j].add(i)
    return links


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
