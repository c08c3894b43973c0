"""The sensor stage reads nothing from disk and keeps its indexes on the board.

Net classes of a KiCad 6+ board live in the ``.kicad_pro`` beside it
(kicad-format.md §5); ``read_board`` puts them on the Board, so finding
electrodes after the project file is gone gives the same answer.
"""

from __future__ import annotations

import json
from pathlib import Path

from sensor_boards import controller, new_board, round_button, written

from auditor.read.reader import read_board
from auditor.sensors import find_sensors
from auditor.sensors.pieces import pads_by_net


def test_project_net_classes_are_read_with_the_board(tmp_path: Path) -> None:
    board = new_board("proj", size=(40.0, 30.0))
    round_button(board, "E1", (8.0, 8.0), 3.0, "Net-(E1-Pad1)", value="~")  # 7 mm², no cue
    controller(board, ["Net-(E1-Pad1)"])
    path = tmp_path / "proj.kicad_pcb"
    project = {"net_settings": {"classes": [{"name": "Default"}, {"name": "Touch"}],
                                "netclass_assignments": {"Net-(E1-Pad1)": "Touch"}}}
    path.with_suffix(".kicad_pro").write_text(json.dumps(project), encoding="utf-8")
    read = written(board, tmp_path, "proj")
    assert read.project_file.endswith("proj.kicad_pro")
    assert "Touch" in {c.name for c in read.netclasses}
    path.with_suffix(".kicad_pro").unlink()  # sensors must not need the file again
    sensors, _ = find_sensors(read)
    assert [(s.name, s.reason) for s in sensors] == [("E1", "net class 'Touch'")]
    assert read_board(path).project_file == ""


def test_derived_views_are_kept_per_board(tmp_path: Path) -> None:
    board = new_board("views", size=(40.0, 30.0))
    round_button(board, "E1", (8.0, 8.0), 8.0, "TOUCH1")
    controller(board, ["TOUCH1"])
    first, second = written(board, tmp_path, "a"), written(board, tmp_path, "b")
    assert pads_by_net(first) is pads_by_net(first)
    assert pads_by_net(first) is not pads_by_net(second)
    assert pads_by_net(first)["TOUCH1"][0].ref == "E1"
