"""Unnamed segments recognised by layout (segments ~0.5 mm apart, buttons
further: physics.md §4.1 rules of thumb, common practice, no source)."""

from __future__ import annotations

import math
from pathlib import Path

from sensor_boards import controller, new_board, written

from auditor.sensors import find_sensors


def test_row_of_close_pads_is_a_slider_and_a_ring_is_a_wheel(tmp_path: Path) -> None:
    board = new_board("layout", size=(90.0, 50.0))
    nets: list[str] = []
    for i, x in enumerate((21.0, 10.0, 15.5)):  # 5 mm wide pads, 0.5 mm gaps, out of order
        ref = f"S{i + 1}"
        fp = board.footprint("Test:Seg", ref, "seg", at=(x, 15.0))
        fp.pad("1", "smd", "rect", (0.0, 0.0), (5.0, 10.0), net=f"Net-({ref}-Pad1)",
               layers=("F.Cu",))
        nets.append(f"Net-({ref}-Pad1)")
    # six 6 mm discs on a 6.5 mm radius: neighbours 6.5 mm apart centre to
    # centre (0.5 mm gaps), the next ones 11.26 mm (5.26 mm gaps)
    for k in range(6):
        ref = f"W{k + 1}"
        angle = math.radians(60 * k)
        at = (50.0 + 6.5 * math.sin(angle), 25.0 - 6.5 * math.cos(angle))
        fp = board.footprint("Test:Disc", ref, "seg", at=at)
        fp.pad("1", "smd", "circle", (0.0, 0.0), (6.0, 6.0), net=f"Net-({ref}-Pad1)",
               layers=("F.Cu",))
        nets.append(f"Net-({ref}-Pad1)")
    fp = board.footprint("Test:Disc", "B1", "button", at=(15.0, 40.0))
    fp.pad("1", "smd", "circle", (0.0, 0.0), (8.0, 8.0), net="Net-(B1-Pad1)", layers=("F.Cu",))
    nets.append("Net-(B1-Pad1)")
    controller(board, nets)
    sensors = {s.name: s for s in find_sensors(written(board, tmp_path, "layout"))[0]}
    slider = sorted((s for s in sensors.values() if s.kind == "slider"), key=lambda s: s.index)
    assert [s.name for s in slider] == ["S2", "S3", "S1"]  # left to right
    wheel = sorted((s for s in sensors.values() if s.kind == "wheel"), key=lambda s: s.index)
    assert [s.name for s in wheel] == ["W1", "W2", "W3", "W4", "W5", "W6"]  # clockwise from top
    assert sensors["B1"].kind == "button"
    assert "one of 3 electrodes 1 mm or less apart in a row" in slider[0].reason
