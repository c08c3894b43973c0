"""Electrode labels placed so that no label covers a marker or another label.

A greedy placement with collision boxes: electrodes are labelled one after
another (largest first, since a large pad has room inside); each label tries
a short list of places (inside the pad, centred, above or below its marker;
then above, below, left and right of the pad) and takes the first whose box
meets no marker, no label placed before it and, outside its own pad, no
other electrode. When every place collides it takes the one that overlaps
least. Text widths are estimated (0.66 em per character, generous for
sans-serif faces with capitals; common practice, no source).
"""

from __future__ import annotations

from collections.abc import Sequence
from dataclasses import dataclass

from shapely.geometry import Point, box
from shapely.geometry.base import BaseGeometry

Box = tuple[float, float, float, float]  # x0, y0, x1, y1
EM_WIDTH = 0.66  # character width of a sans-serif face, capitals included, in font sizes
LINE_HEIGHT = 1.15  # in font sizes


@dataclass(frozen=True)
class Label:
    """A block of lines to place next to (or inside) ``shape``."""

    lines: tuple[str, ...]
    shape: BaseGeometry
    size: float  # font size


@dataclass(frozen=True)
class Placed:
    """Where a label went: its box and the baseline-centre of each line."""

    label: Label
    box: Box
    lines: tuple[tuple[float, float, str], ...]


def text_size(lines: Sequence[str], size: float) -> tuple[float, float]:
    """Estimated ``(width, height)`` of a block of ``lines``."""
    width = max((len(line) for line in lines), default=0) * EM_WIDTH * size
    return width, len(lines) * LINE_HEIGHT * size


def _overlap(a: Box, b: Box) -> float:
    w = min(a[2], b[2]) - max(a[0], b[0])
    h = min(a[3], b[3]) - max(a[1], b[1])
    return w * h if w > 0 and h > 0 else 0.0


def _candidates(label: Label, marker: float) -> list[tuple[Box, bool]]:
    """Boxes to try, best first, each with whether it lies inside the pad."""
    w, h = text_size(label.lines, label.size)
    x0, y0, x1, y1 = label.shape.bounds
    cx, cy = (x0 + x1) / 2, (y0 + y1) / 2
    gap = label.size * 0.3
    if not label.shape.buffer(1e-6).contains(Point(cx, cy)):
        # A ring or loop: label it beside a point on its copper instead.
        on = label.shape.representative_point()
        x0 = x1 = cx = on.x
        y0 = y1 = cy = on.y
        gap += marker

    def at(x: float, y: float) -> Box:
        return (x - w / 2, y - h / 2, x + w / 2, y + h / 2)

    inside = [at(cx, cy), at(cx, cy - marker - h / 2), at(cx, cy + marker + h / 2)]
    outside = [at(cx, y0 - gap - h / 2), at(cx, y1 + gap + h / 2),
               at(x0 - gap - w / 2, cy), at(x1 + gap + w / 2, cy)]
    return ([(b, True) for b in inside if label.shape.contains(box(*b))]
            + [(b, False) for b in outside])


def _cost(candidate: Box, inside: bool, taken: Sequence[Box],
          others: Sequence[BaseGeometry], frame: Box) -> float:
    """Area the candidate covers of markers, placed labels, other pads (when
    outside its own) and of what lies outside the picture (weighted double)."""
    cost = sum(_overlap(candidate, b) for b in taken)
    if not inside:
        shape = box(*candidate)
        cost += sum(shape.intersection(o).area for o in others if shape.intersects(o))
    area = (candidate[2] - candidate[0]) * (candidate[3] - candidate[1])
    return cost + 2 * (area - _overlap(candidate, frame))


def place_labels(labels: Sequence[Label], markers: Sequence[Box], marker_radius: float,
                 frame: Box) -> list[Placed]:
    """Place every label (largest pad first) inside ``frame``; the result
    keeps that order."""
    order = sorted(labels, key=lambda lb: -lb.shape.area)
    taken: list[Box] = list(markers)
    placed: list[Placed] = []
    for index, label in enumerate(order):
        others = [lb.shape for i, lb in enumerate(order) if i != index]
        best: tuple[float, Box] | None = None
        margin = label.size * 0.2  # labels keep a little air between them
        for candidate, inside in _candidates(label, marker_radius):
            padded = (candidate[0] - margin, candidate[1], candidate[2] + margin, candidate[3])
            cost = _cost(padded, inside, taken, others, frame)
            if best is None or cost < best[0]:
                best = (cost, candidate)
            if cost == 0:
                break
        assert best is not None
        chosen = best[1]
        taken.append(chosen)
        line_h = LINE_HEIGHT * label.size
        centre_x = (chosen[0] + chosen[2]) / 2
        lines = tuple((centre_x, chosen[1] + line_h * (i + 0.5), text)
                      for i, text in enumerate(label.lines))
        placed.append(Placed(label, chosen, lines))
    return placed
