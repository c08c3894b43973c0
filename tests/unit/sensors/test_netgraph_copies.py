"""The net graph on a board of duplicated items (issue 16, item 4).

Copies of one track all touch one another, so an intersection graph of them
is complete: 8000 copies made 32 million edges and took 30 s. Copies are
interchangeable for the walk, so the graph keeps one of them; every copy is
still reachable, and the walk is as long as one copy (plain geometry, common
practice, no source)."""

from __future__ import annotations

from auditor.read import read_board_text
from auditor.sensors.netgraph import NetGraph

HEAD = ('(kicad_pcb (version 20240108) (generator "pcbnew")\n'
        ' (layers (0 "F.Cu" signal) (31 "B.Cu" signal))\n'
        ' (net 0 "") (net 1 "TOUCH1")\n'
        ' (footprint "x" (layer "F.Cu") (at 0 0) (pad "1" smd rect (at 0 0) (size 1 1)'
        ' (layers "F.Cu") (net 1 "TOUCH1")))\n')
COPY = ' (segment (start 0 0) (end 3 4) (width 0.2) (layer "F.Cu") (net 1))\n'
TAIL = ' (segment (start 3 4) (end 3 10) (width 0.2) (layer "F.Cu") (net 1))\n)\n'


def test_copies_keep_the_graph_small_and_reachable() -> None:
    board = read_board_text(HEAD + COPY * 3000 + TAIL)
    pad = board.footprints[0].pads[0]
    graph = NetGraph(board, "TOUCH1", (pad.copper[0].layer, pad.copper[0].geometry))
    assert graph.edge_count <= 10
    assert len(graph.reachable()) == len(graph.nodes) == 1 + 3001 + 1
    last = len(graph.nodes) - 1  # the pad node comes after the tracks
    walk = graph.walk_to(last - 1)  # the far track
    assert walk is not None
    assert walk.length_mm == 5.0 + 6.0
