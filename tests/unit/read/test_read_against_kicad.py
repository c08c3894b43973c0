"""Cross-check against KiCad's own reader (``pcbnew``; KiCad 6 loads formats
up to 20211014). KiCad's Python module lives with the system interpreter
(Debian's ``kicad`` package), not in the project's venv, so it runs in a
subprocess; skipped where that interpreter cannot import it.

Zone copper is compared with what KiCad 6 plots and checks as copper,
``ZONE.TransformSolidAreasShapesToPolygon`` united per net and layer, not
with ``GetFilledPolysList``: for a fill KiCad 6 strokes with a
``min_thickness`` pen (``GetFilledPolysUseThickness()``: KiCad 4/5 files and
6 files without ``(filled_areas_thickness no)``) that list is the pen's
centre-line polygon, ``min_thickness/2`` inside the copper edge (77.0 mm²
instead of about 84 on the format fixtures), and its ``Area()`` adds up
outlines without uniting overlaps.
"""

from __future__ import annotations

import json
import math
import subprocess
from pathlib import Path

import pytest
import shapely
from conftest import FILL_KEYS, FILLS, FORMATS, ROOT
from shapely.geometry import Polygon
from shapely.geometry.base import BaseGeometry

from auditor.model.board import Board
from auditor.read import read_board

pytestmark = pytest.mark.kicad

#: ../shared/corpus of real boards beside the repository (or the worktrees' folder).
CORPUS = next((p for p in (ROOT.parent / "shared" / "corpus",
                           ROOT.parent.parent / "shared" / "corpus") if p.is_dir()),
              ROOT.parent / "shared" / "corpus")
CORPUS_BOARDS = sorted(CORPUS.glob("*.kicad_pcb")) if CORPUS.is_dir() else [
    pytest.param(CORPUS / "absent.kicad_pcb", marks=pytest.mark.skip("no corpus beside the repo"))]

SYSTEM_PYTHON = "/usr/bin/python3"
#: KiCad's largest chord error for arcs in pad polygons (its ARC_HIGH_DEF,
#: 0.005 mm; from memory).
ARC_ERROR_MM = 0.005

#: What KiCad reads from a board, printed as JSON (mm, mm²).
_KICAD_READ = r"""
import json, sys
import pcbnew
NM = 1e-6  # KiCad's internal unit is the nanometre
board = pcbnew.LoadBoard(sys.argv[1])
pads = []
for fp in board.GetFootprints():
    for pad in fp.Pads():
        pos = pad.GetPosition()
        layer = pcbnew.F_Cu if pad.IsOnLayer(pcbnew.F_Cu) else pcbnew.B_Cu
        area = pad.GetEffectivePolygon().Area() * NM * NM if pad.IsOnLayer(layer) else 0.0
        pads.append([round(pos.x * NM, 4), round(pos.y * NM, 4), pad.GetNumber(), area])
length = sum(t.GetLength() for t in board.GetTracks()
             if t.GetClass() in ("PCB_TRACK", "PCB_ARC")) * NM
copper = {}  # (net, layer) -> [copper KiCad 6 plots and checks, centre-line list, pen?]
for zone in board.Zones():
    if zone.GetIsRuleArea():
        continue
    for layer in zone.GetLayerSet().Seq():
        key = (zone.GetNetname(), board.GetLayerName(layer))
        solid, raw, pen = copper.setdefault(key, [pcbnew.SHAPE_POLY_SET(), 0.0, False])
        zone.TransformSolidAreasShapesToPolygon(layer, solid)
        raw += zone.GetFilledPolysList(layer).Area() * NM * NM
        copper[key][1:] = [raw, pen or zone.GetFilledPolysUseThickness()]
zones = []
for (net, layer), (solid, raw, pen) in sorted(copper.items()):
    solid.Simplify(pcbnew.SHAPE_POLY_SET.PM_STRICTLY_SIMPLE)  # unite overlaps
    zones.append([net, layer, solid.Area() * NM * NM, raw, pen])
print(json.dumps({"pads": pads, "track_length_mm": length, "zones": zones}))
"""


def _kicad_read(path: Path) -> dict:  # type: ignore[type-arg]
    try:
        done = subprocess.run([SYSTEM_PYTHON, "-c", _KICAD_READ, str(path)],
                              capture_output=True, text=True, timeout=120)
    except FileNotFoundError:
        pytest.skip(f"{SYSTEM_PYTHON} not found")
    if done.returncode != 0 and "No module named 'pcbnew'" in done.stderr:
        pytest.skip("KiCad's pcbnew module is not installed")
    assert done.returncode == 0, done.stderr[-2000:]
    result: dict = json.loads(done.stdout.strip().splitlines()[-1])  # type: ignore[type-arg]
    return result


@pytest.mark.parametrize("key", ["v4", "v5", "v6"])
def test_pads_and_tracks_agree_with_kicad(key: str) -> None:
    path = FORMATS / f"{key}.kicad_pcb"
    kicad = _kicad_read(path)
    ours = read_board(path)
    theirs = {(x, y, number): area for x, y, number, area in kicad["pads"]}
    for pad in ours.pads:
        if not pad.copper:  # a copper-less hole: KiCad numbers it its own way
            continue
        key_ = (round(pad.x_mm, 4), round(pad.y_mm, 4), pad.number)
        assert key_ in theirs
        if pad.copper[0].layer in ("F.Cu", "B.Cu"):
            # KiCad's pad polygon draws curves as chords up to ARC_ERROR_MM
            # inside them, so its area is smaller by at most that band along
            # the outline; ours follows the curve more closely.
            geometry = pad.copper[0].geometry
            band = geometry.length * ARC_ERROR_MM
            assert theirs[key_] - 1e-6 <= geometry.area <= theirs[key_] + band
    assert math.fsum(t.length_mm for t in ours.tracks) == pytest.approx(
        kicad["track_length_mm"], rel=1e-6)


def _zone_copper(board: Board) -> dict[tuple[str, str], BaseGeometry]:
    """Our zone copper per (net, layer), as KiCad's list is grouped."""
    parts: dict[tuple[str, str], list[BaseGeometry]] = {}
    for zone in board.zones:
        for fill in zone.fills:
            parts.setdefault((zone.net, fill.layer), []).append(fill.geometry)
    return {key: shapely.union_all(found) for key, found in parts.items()}


def _assert_zones_agree(path: Path) -> list[list[object]]:
    kicad = _kicad_read(path)["zones"]
    ours = _zone_copper(read_board(path))
    assert {(n, layer) for n, layer, area, *_ in kicad if area > 0} == set(ours)
    for net, layer, area, _raw, pen in kicad:
        mine = ours.get((net, layer), Polygon())
        # A pen-stroked fill's round ends are chords in both readers, KiCad's
        # up to ARC_ERROR_MM inside the circle, ours closer; final fills are
        # the same straight-edged polygons in both.
        band = mine.length * ARC_ERROR_MM if pen else 1e-9 * max(area, 1.0)
        assert area - 1e-9 <= mine.area <= area + band, (net, layer)
    return kicad  # type: ignore[no-any-return]


@pytest.mark.parametrize("path", [FORMATS / f"{key}.kicad_pcb" for key in ("v4", "v5", "v6")]
                         + [FILLS / f"{key}.kicad_pcb" for key in FILL_KEYS],
                         ids=lambda p: p.stem)
def test_zone_fills_agree_with_kicad(path: Path) -> None:
    _assert_zones_agree(path)


def test_pen_stroked_kicad6_fill_agrees_with_kicad(tmp_path: Path) -> None:
    # A KiCad 6 file without (filled_areas_thickness no) is stroked in KiCad 6 too.
    text = (FORMATS / "v6.kicad_pcb").read_text().replace("(filled_areas_thickness no)", "")
    path = tmp_path / "v6-stroked.kicad_pcb"
    path.write_text(text, encoding="utf-8")
    assert all(pen for *_, pen in _assert_zones_agree(path))


def test_kicad_centre_line_list_is_the_pen_path() -> None:
    """What the old comparison read: on the stroked legacy B.Cu fill KiCad's
    ``GetFilledPolysList`` is the file's polygon as written, the 9.75 mm square
    minus the 4.25 mm hole = 77.0 mm² (fixture constants, by hand), while the
    copper is that grown by min_thickness/2 = 0.125 mm on every side."""
    kicad = _kicad_read(FORMATS / "v5.kicad_pcb")["zones"]
    net, layer, solid, raw, pen = next(z for z in kicad if z[:2] == ["GND", "B.Cu"])
    assert pen and raw == pytest.approx(9.75**2 - 4.25**2, abs=1e-9)
    assert solid == pytest.approx(84 - (4 - math.pi) * 0.125**2, abs=5e-3)


#: KiCad 6 refuses boards written after its own format (20211014).
KICAD6_NEWEST = 20211014


@pytest.mark.parametrize("path", CORPUS_BOARDS, ids=lambda p: p.stem)
def test_corpus_zone_fills_agree_with_kicad(path: Path) -> None:
    """Optional: real boards beside the repository (never copied into it)."""
    version = read_board(path).version
    if version > KICAD6_NEWEST:
        pytest.skip(f"format {version} is newer than KiCad 6 reads")
    _assert_zones_agree(path)
