"""Non-positive or non-finite widths, sizes and radii (issue 16, item 7).

KiCad never writes them (its board editor refuses a track width, via size or
pad size of zero or less; kicad-format.md §9-10), so such a value is corrupt
or hand-edited data. The copper it describes cannot be modelled; that must be
a reader warning, so the audit reports ``read-incomplete`` and the board is
never reported clean with copper silently gone. A trial with ``(width -5)``
on a sense trace lost the electrode's neighbours and exited 0.
"""

from __future__ import annotations

import pytest

from auditor.read import read_board_text

HEAD = ('(kicad_pcb (version 20240108) (generator "pcbnew")\n'
        ' (layers (0 "F.Cu" signal) (31 "B.Cu" signal))\n'
        ' (net 0 "") (net 1 "TOUCH1")\n')


def _warnings(item: str) -> list[tuple[str, int | None]]:
    board = read_board_text(HEAD + " " + item + "\n)\n", "sane.kicad_pcb")
    return [(w.code, w.line) for w in board.warnings if w.code != "no-stackup"]


@pytest.mark.parametrize("item", [
    '(segment (start 0 0) (end 5 0) (width -5) (layer "F.Cu") (net 1))',
    '(segment (start 0 0) (end 5 0) (width 0) (layer "F.Cu") (net 1))',
    '(segment (start 0 0) (end 5 0) (width nan) (layer "F.Cu") (net 1))',
    '(segment (start 0 0) (end 5 0) (width inf) (layer "F.Cu") (net 1))',
    '(arc (start 0 0) (mid 1 1) (end 2 0) (width -0.2) (layer "F.Cu") (net 1))',
    '(via (at 1 1) (size 0) (drill 0.3) (layers "F.Cu" "B.Cu") (net 1))',
    '(via (at 1 1) (size -0.6) (drill 0.3) (layers "F.Cu" "B.Cu") (net 1))',
    '(footprint "x" (layer "F.Cu") (at 0 0) (pad "1" smd rect (at 0 0) (size -1 2) '
    '(layers "F.Cu") (net 1 "TOUCH1")))',
    '(footprint "x" (layer "F.Cu") (at 0 0) (pad "1" smd circle (at 0 0) (size 0 0) '
    '(layers "F.Cu") (net 1 "TOUCH1")))',
    '(gr_line (start 0 0) (end 5 0) (stroke (width -1)) (layer "F.Cu") (net 1))',
    # an outline-only polygon has no copper but its pen
    '(gr_poly (pts (xy 0 0) (xy 1 0) (xy 1 1)) (stroke (width -0.000001)) (fill none) '
    '(layer "F.Cu") (net 1))',
])
def test_bad_size_is_a_located_warning(item: str) -> None:
    assert _warnings(item) == [("bad-size", 4)]


@pytest.mark.parametrize("item", [
    '(segment (start 0 0) (end 5 0) (width 0.2) (layer "F.Cu") (net 1))',
    '(via (at 1 1) (size 0.6) (drill 0.3) (layers "F.Cu" "B.Cu") (net 1))',
    # a filled polygon drawn with a zero-width pen is ordinary (kicad-format.md §11)
    '(gr_poly (pts (xy 0 0) (xy 1 0) (xy 1 1)) (stroke (width 0)) (fill solid) '
    '(layer "F.Cu") (net 1))',
    # KiCad 8 and 9 write a filled shape with no outline as a pen of -0.000001
    # mm (seen on real boards from both versions); the fill is the copper
    '(gr_poly (pts (xy 0 0) (xy 1 0) (xy 1 1)) (stroke (width -0.000001) (type solid)) '
    '(fill solid) (layer "F.Cu") (net 1))',
])
def test_ordinary_sizes_warn_nothing(item: str) -> None:
    assert _warnings(item) == []
