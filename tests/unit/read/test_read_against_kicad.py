"""Cross-check against KiCad's own reader (``pcbnew``, KiCad 6 loads formats
up to 20211014). Skipped where pcbnew is not importable (it is not in CI)."""

from __future__ import annotations

import math

import pytest
from conftest import FORMATS

from auditor.read import read_board

pytestmark = pytest.mark.kicad
pcbnew = pytest.importorskip("pcbnew")

NM = 1e-6  # KiCad's internal unit is the nanometre


@pytest.mark.parametrize("key", ["v4", "v5", "v6"])
def test_fixture_loads_in_kicad_and_agrees(key: str) -> None:
    path = FORMATS / f"{key}.kicad_pcb"
    kicad = pcbnew.LoadBoard(str(path))
    ours = read_board(path)
    theirs = {}
    for fp in kicad.GetFootprints():
        for pad in fp.Pads():
            pos = pad.GetPosition()
            layer = pcbnew.F_Cu if pad.IsOnLayer(pcbnew.F_Cu) else pcbnew.B_Cu
            area = pad.GetEffectivePolygon().Area() * NM * NM if pad.IsOnLayer(layer) else 0.0
            theirs[(round(pos.x * NM, 4), round(pos.y * NM, 4), pad.GetNumber())] = area
    for pad in ours.pads:
        key_ = (round(pad.x_mm, 4), round(pad.y_mm, 4), pad.number)
        assert key_ in theirs
        if pad.copper and pad.copper[0].layer in ("F.Cu", "B.Cu"):
            assert pad.copper[0].geometry.area == pytest.approx(theirs[key_], rel=1e-2)
    their_length = math.fsum(t.GetLength() for t in kicad.GetTracks()
                             if t.GetClass() in ("PCB_TRACK", "PCB_ARC")) * NM
    assert math.fsum(t.length_mm for t in ours.tracks) == pytest.approx(their_length, rel=1e-6)
    for zone in kicad.Zones():
        if zone.GetIsRuleArea():
            continue
        for layer in zone.GetLayerSet().Seq():
            area = zone.GetFilledPolysList(layer).Area() * NM * NM
            name = kicad.GetLayerName(layer)
            mine = next(z for z in ours.zones if name in z.layers
                        and z.net == zone.GetNetname()).fill_on(name)
            assert (mine.area if mine is not None else 0.0) == pytest.approx(area, rel=1e-2,
                                                                              abs=1e-6)
