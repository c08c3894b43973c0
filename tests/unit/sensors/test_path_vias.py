"""A sense path that dives through vias and passes under another electrode.

Board: E1 (TOUCH1, 10 mm round) at (15, 20); its track runs right on F.Cu to
a via at (25, 20), on B.Cu to a via at (55, 20) (passing under E2, a 10 mm
pad at (40, 20)), then on F.Cu to R1 at (60, 20) and on to U1 pin 1.
"""

from __future__ import annotations

import pytest
from sensor_boards import controller, new_board, pin_xy, resistor, round_button, written

from auditor.model.board import Board
from auditor.sensors import find_sensors, measure
from auditor.sensors.model import Sensor


@pytest.fixture(scope="module")
def measured(tmp_path_factory: pytest.TempPathFactory) -> dict[str, Sensor]:
    board = new_board("vias")
    round_button(board, "E1", (15.0, 20.0), 10.0, "TOUCH1")
    round_button(board, "E2", (40.0, 20.0), 10.0, "TOUCH2")
    board.segment((15.0, 20.0), (25.0, 20.0), 0.15, "F.Cu", "TOUCH1")
    board.via((25.0, 20.0), "TOUCH1")
    board.segment((25.0, 20.0), (55.0, 20.0), 0.25, "B.Cu", "TOUCH1")
    board.via((55.0, 20.0), "TOUCH1")
    left, right = resistor(board, "R1", (60.0, 20.0), "TOUCH1", "TOUCH1_R")
    board.segment((55.0, 20.0), left, 0.15, "F.Cu", "TOUCH1")
    board.route([right, (65.0, 20.0), (65.0, pin_xy(1)[1]), pin_xy(1)], 0.15, "F.Cu",
                "TOUCH1_R")
    board.route([(40.0, 20.0), (40.0, 40.0), (66.0, 40.0), (66.0, pin_xy(2)[1]), pin_xy(2)],
                0.15, "F.Cu", "TOUCH2")
    controller(board, ["TOUCH1_R", "TOUCH2"])
    b: Board = written(board, tmp_path_factory.mktemp("vias"), "vias")
    sensors, _ = find_sensors(b)
    return {s.name: s for s in measure(b, sensors)}


def test_runs_vias_and_layers(measured: dict[str, Sensor]) -> None:
    path = measured["TOUCH1"].path
    assert path is not None and path.complete
    # Hand computation: 10 mm F.Cu (0.15), 30 mm B.Cu (0.25), 4.5 mm F.Cu to
    # R1 (0.15); after R1 4.5 + 10 + 2 = 16.5 mm F.Cu (0.15) to pin 1.
    assert path.vias == 2
    assert path.layers == ("F.Cu", "B.Cu")
    assert [(r.layer, r.width_mm, round(r.length_mm, 6)) for r in path.runs] == [
        ("F.Cu", 0.15, 10.0), ("B.Cu", 0.25, 30.0), ("F.Cu", 0.15, 21.0)]
    assert path.length_mm == pytest.approx(61.0, abs=1e-6)
    assert path.series_to_pin_mm == pytest.approx(16.5, abs=1e-6)


def test_passing_under_another_electrode(measured: dict[str, Sensor]) -> None:
    assert measured["TOUCH1"].path is not None
    assert measured["TOUCH1"].path.under_electrodes == ("TOUCH2",)
    assert measured["TOUCH2"].path is not None
    assert measured["TOUCH2"].path.under_electrodes == ()
    # TOUCH2 has no series part: it goes straight to pin 2.
    assert measured["TOUCH2"].path.series_ref == ""
    assert measured["TOUCH2"].path.controller_pin == "2"


def test_nearest_electrode(measured: dict[str, Sensor]) -> None:
    # Hand computation: centres 25 mm apart, radii 5 mm: 15 mm edge to edge
    # (both 64-gons have a vertex on the joining line).
    around = measured["TOUCH1"].surroundings
    assert around is not None
    assert around.nearest_sensor == "TOUCH2"
    assert around.nearest_sensor_mm == pytest.approx(15.0, abs=1e-6)


def test_path_nets_and_sense_neighbours(measured: dict[str, Sensor]) -> None:
    path = measured["TOUCH1"].path
    assert path is not None and path.nets == ("TOUCH1", "TOUCH1_R")
    by_net = {n.net: n for n in path.neighbours}
    # TOUCH2's trace runs down from its pad at x = 40 and crosses TOUCH1's
    # B.Cu stretch on the adjacent layer: one crossing, of a sense net.
    assert by_net["TOUCH2"].crossings == 1 and by_net["TOUCH2"].sense
