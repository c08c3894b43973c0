"""Cross-check against KiCad's own reader (``pcbnew``; KiCad 6 loads formats
up to 20211014). KiCad's Python module lives with the system interpreter
(Debian's ``kicad`` package), not in the project's venv, so it runs in a
subprocess; skipped where that interpreter cannot import it."""

from __future__ import annotations

import json
import math
import subprocess
from pathlib import Path

import pytest
from conftest import FORMATS

from auditor.read import read_board

pytestmark = pytest.mark.kicad

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
zones = []
for zone in board.Zones():
    if zone.GetIsRuleArea():
        continue
    for layer in zone.GetLayerSet().Seq():
        zones.append([zone.GetNetname(), board.GetLayerName(layer),
                      zone.GetFilledPolysList(layer).Area() * NM * NM])
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


@pytest.mark.xfail(strict=True, reason="zone fills disagree: ours 83.99 mm2, KiCad 6's "
                   "filled polygons 77.0 mm2 on the format fixtures; not yet explained")
@pytest.mark.parametrize("key", ["v4", "v5", "v6"])
def test_zone_fills_agree_with_kicad(key: str) -> None:
    path = FORMATS / f"{key}.kicad_pcb"
    kicad = _kicad_read(path)
    ours = read_board(path)
    for net, name, area in kicad["zones"]:
        mine = next(z for z in ours.zones if name in z.layers and z.net == net).fill_on(name)
        assert (mine.area if mine is not None else 0.0) == pytest.approx(area, rel=1e-2,
                                                                          abs=1e-6)
