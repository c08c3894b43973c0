"""The sense route past side parts (auditor/sensors/route.py), on the
generated field_parts boards (fixtures/make_field_parts_boards.py, invented):
TOUCH1 runs through R1 to U1 pin 1, with one more part on its net."""

from __future__ import annotations

from pathlib import Path

import pytest

from auditor.read import read_board
from auditor.sensors.reach import reach_of
from auditor.sensors.route import route_of
from auditor.sensors.selection import SensorSelection

FOLDER = Path(__file__).resolve().parents[3] / "fixtures" / "field_parts"


def _routes(case: str, net: str = "TOUCH1"):  # type: ignore[no-untyped-def]
    board = read_board(FOLDER / f"{case}.kicad_pcb")
    electrode = {fp.uid for fp in board.footprints if fp.ref == "E1"}
    selection = SensorSelection()
    return reach_of(board, net, electrode, selection), route_of(board, net, electrode,
                                                                 selection)


@pytest.mark.parametrize(("case", "side"), [("cap-to-ground", "C5"), ("cap-to-supply", "C6"),
                                            ("cap-between-pins", "C7")])
def test_route_found_past_a_side_capacitor(case: str, side: str) -> None:
    strict, route = _routes(case)
    assert route.ok and route.series_pad is not None and route.series_pad.ref == "R1"
    assert route.controller_pad is not None and route.controller_pad.ref == "U1"
    assert route.controller_pad.number == "1" and side in route.why
    # finding electrodes keeps the strict reading: nothing changes there
    assert not strict.ok


def test_plain_net_is_the_strict_answer() -> None:
    strict, route = _routes("plain")
    assert strict == route and route.ok


def test_series_capacitor_is_the_route() -> None:
    _strict, route = _routes("series-cap")
    assert route.ok and route.series_pad is not None and route.series_pad.ref == "C1"
