"""Zone fills written as "fractured" outlines (kicad-format.md §10): every hole
joined to the outside by a zero-width slit, so the ring touches itself. The
repair must keep each hole a hole (fixtures/make_fill_boards.py, areas by hand)
and give the copper the outline encloses (Gauss's shoelace formula, on the
fixtures and, when present, the real boards of ../shared/corpus).
"""

from __future__ import annotations

import math
import re
import subprocess
import sys
from collections.abc import Iterator
from pathlib import Path

import pytest
from conftest import FILL_KEYS, FILLS, ROOT, fills_gen

from auditor.read import read_board

#: Closed form of the fill by hand: the 30 × 20 rectangle less holes A, B
#: (4 × 4), the right triangle (legs 6√2: area 36), D (12 × 4), plus the
#: 4 × 2 island inside D.
FINAL_FILL_MM2 = 30 * 20 - 2 * 16 - 36 - 12 * 4 + 4 * 2


def test_committed_fill_fixtures_match_the_generator(tmp_path: Path) -> None:
    subprocess.run([sys.executable, str(ROOT / "fixtures" / "make_fill_boards.py"),
                    str(tmp_path)], check=True)
    for key in FILL_KEYS:
        name = f"{key}.kicad_pcb"
        assert (tmp_path / name).read_bytes() == (FILLS / name).read_bytes(), name


def test_fractured_fill_keeps_every_hole() -> None:
    board = read_board(FILLS / "fractured-v6.kicad_pcb")
    (zone,) = board.zones
    copper = zone.fill_on("F.Cu")
    assert copper is not None and copper.is_valid
    assert copper.area == pytest.approx(FINAL_FILL_MM2, abs=1e-9)
    pieces = sorted(getattr(copper, "geoms", [copper]), key=lambda p: -p.area)
    assert [len(p.interiors) for p in pieces] == [4, 0]  # the island sits in hole D
    assert zone.fills[0].islands == 1
    assert "zone-stroked-fill" not in [w.code for w in board.warnings]


def _inner_parallel_area(area: float, perimeter: float, angles_deg: list[float],
                         r: float) -> float:
    """Area of a convex polygon shrunk by ``r``: A − P·r + r²·Σ cot(θᵢ/2)
    (Steiner's formula for convex polygons, elementary geometry)."""
    return area - perimeter * r + r * r * sum(1 / math.tan(math.radians(a) / 2)
                                              for a in angles_deg)


def test_stroked_fractured_fill_is_the_polygon_grown_by_half_the_pen() -> None:
    """KiCad 5 strokes the same outline with a min_thickness pen (§0.6): the
    rectangle and island grow by r (perimeter·r + πr² each), each convex hole
    shrinks to its inner parallel polygon (Steiner's formula)."""
    r = fills_gen.MIN_THICKNESS_MM / 2
    rectangle = 600 + 100 * r + math.pi * r * r
    island = 8 + 12 * r + math.pi * r * r
    square = _inner_parallel_area(16, 16, [90] * 4, r)
    hole_d = _inner_parallel_area(48, 32, [90] * 4, r)
    triangle = _inner_parallel_area(36, 12 + 12 * math.sqrt(2), [90, 45, 45], r)
    expected = rectangle - 2 * square - hole_d - triangle + island
    board = read_board(FILLS / "fractured-v5.kicad_pcb")
    copper = board.zones[0].fill_on("F.Cu")
    assert copper is not None and copper.is_valid
    # The eight round corners are 64-gons, 1.6e-4 mm² short of true circles.
    assert copper.area == pytest.approx(expected, abs=5e-4)
    assert "zone-stroked-fill" in [w.code for w in board.warnings]


# -- shoelace cross-check, with its own minimal scan of the file --------------
_XY = re.compile(r"\(xy\s+(-?[\d.eE+-]+)\s+(-?[\d.eE+-]+)\s*\)")
_LAYER = re.compile(r'\(layer\s+"?([^\s")]+)"?\s*\)')


def _blocks(text: str, head: str, start: int = 0, end: int | None = None) -> Iterator[int]:
    """Start offsets of every ``(head`` list in ``text[start:end]``."""
    for found in re.finditer(r"\(" + re.escape(head) + r"[\s)]", text[start:end]):
        yield start + found.start()


def _closing(text: str, start: int) -> int:
    """Offset just past the list opening at ``start`` (strings skipped)."""
    depth, i, quoted = 0, start, False
    while True:
        ch = text[i]
        if quoted:
            quoted = ch != '"' or text[i - 1] == "\\"
        elif ch == '"':
            quoted = True
        elif ch in "()":
            depth += 1 if ch == "(" else -1
            if depth == 0:
                return i + 1
        i += 1


def _shoelace(points: list[tuple[float, float]]) -> float:
    return abs(sum(x0 * y1 - x1 * y0 for (x0, y0), (x1, y1)
                   in zip(points, points[1:] + points[:1], strict=True))) / 2


def _final_fill_areas(path: Path) -> dict[tuple[int, str], float]:
    """(zone line, layer) -> sum of the shoelace areas of its final fills."""
    text = path.read_text(encoding="utf-8")
    version = int(re.search(r"\(version\s+(\d+)", text).group(1))  # type: ignore[union-attr]
    areas: dict[tuple[int, str], float] = {}
    for start in _blocks(text, "zone"):
        end = _closing(text, start)
        zone = text[start:end]
        if "(filled_areas_thickness no)" not in zone and version < 20250210:
            continue  # stroked: the copper is more than the outline
        own_layer = _LAYER.search(zone)
        line = text.count("\n", 0, start) + 1
        for fill in _blocks(zone, "filled_polygon"):
            body = zone[fill:_closing(zone, fill)]
            assert "(arc" not in body  # fills are written as straight edges
            layer = _LAYER.search(body) or own_layer
            key = (line, layer.group(1) if layer else "")
            points = [(float(x), float(y)) for x, y in _XY.findall(body)]
            areas[key] = areas.get(key, 0.0) + _shoelace(points)
    return areas


def _corpus() -> list[Path]:
    for folder in (ROOT.parent / "shared" / "corpus", ROOT.parent.parent / "shared" / "corpus"):
        if folder.is_dir():
            return sorted(folder.glob("*.kicad_pcb"))
    return []


# Not the format fixtures: their hatched zone is two overlapping bars on purpose.
@pytest.mark.parametrize("path", [*sorted(FILLS.glob("*.kicad_pcb")), *_corpus()],
                         ids=lambda p: p.stem)
def test_final_fills_are_the_area_their_outlines_enclose(path: Path) -> None:
    """A fractured ring's slits are walked once each way, so its signed
    shoelace area is the outline's minus its holes' (Gauss's area formula);
    KiCad never writes overlapping fill outlines within a zone, so their sum
    is the zone's copper on that layer."""
    expected = _final_fill_areas(path)
    board = read_board(path)
    for zone in board.zones:
        for fill in zone.fills:
            key = (zone.source_line, fill.layer)
            if key in expected:
                assert fill.geometry.area == pytest.approx(expected.pop(key), rel=1e-9), key
    assert not expected  # every final fill in the file was read
