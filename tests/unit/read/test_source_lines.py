"""Board items keep where they start in the file (line and column), so
reports can point annotations at them (SARIF regions)."""

from __future__ import annotations

from pathlib import Path

from auditor.demo import demo_board_path
from auditor.read import read_board

BOARD = """(kicad_pcb (version 20240108) (generator pcbnew)
  (layers (0 "F.Cu" signal) (31 "B.Cu" signal))
  (net 0 "") (net 1 "A")
  (footprint "x:y" (layer "F.Cu") (at 10 10)
    (property "Reference" "E1")
    (pad "1" smd circle (at 0 0) (size 5 5) (layers "F.Cu") (net 1 "A")))
  (segment (start 10 10) (end 20 10) (width 0.2) (layer "F.Cu") (net 1))
  (arc (start 20 10) (mid 21 11) (end 22 10) (width 0.2) (layer "F.Cu") (net 1))
     (via (at 22 10) (size 0.6) (drill 0.3) (layers "F.Cu" "B.Cu") (net 1))
  (zone (net 0) (net_name "") (layer "B.Cu")
    (polygon (pts (xy 0 0) (xy 30 0) (xy 30 30) (xy 0 30)))
    (filled_polygon (layer "B.Cu") (pts (xy 0 0) (xy 30 0) (xy 30 30) (xy 0 30))))
)
"""


def test_each_item_knows_its_line_and_column(tmp_path: Path) -> None:
    path = tmp_path / "lines.kicad_pcb"
    path.write_text(BOARD, encoding="utf-8")
    board = read_board(path)
    # Expected positions counted by hand in BOARD above (1-based).
    footprint = board.footprints[0]
    assert (footprint.source_line, footprint.source_column) == (4, 3)
    assert (footprint.pads[0].source_line, footprint.pads[0].source_column) == (6, 5)
    assert [(t.source_line, t.source_column) for t in board.tracks] == [(7, 3), (8, 3)]
    assert (board.vias[0].source_line, board.vias[0].source_column) == (9, 6)
    assert (board.zones[0].source_line, board.zones[0].source_column) == (10, 3)


def test_every_line_on_the_demo_board_opens_its_item() -> None:
    """On a real-size board each pad's and track's line starts its token."""
    path = demo_board_path()
    lines = path.read_text(encoding="utf-8").splitlines()
    board = read_board(path)
    items = [(p, "(pad") for fp in board.footprints for p in fp.pads]
    items += [(t, "(arc" if t.mid is not None else "(segment") for t in board.tracks]
    items += [(z, "(zone") for z in board.zones]
    assert len(items) > 50
    for item, token in items:
        assert item.source_line is not None and item.source_column is not None
        line = lines[item.source_line - 1]
        assert line[item.source_column - 1:].startswith(token), (item, line)
