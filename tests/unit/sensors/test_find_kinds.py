"""Kinds (mutual, wheel, proximity), configured selection and near misses.

Expected kinds and orders follow the documented rules in
``auditor/sensors/shaping.py`` (our own; common practice, no source):
wheels clockwise on screen from twelve o'clock, rings and large areas are
proximity electrodes, TX/RX naming makes mutual pairs.
"""

from __future__ import annotations

import math

import pytest
from sensor_boards import (
    controller,
    custom_ring,
    new_board,
    pin_xy,
    resistor,
    round_button,
    written,
)

from auditor.model.board import Board
from auditor.sensors import SensorSelection, find_sensors, measure, selection_from_mapping
from auditor.sensors.find import Rejected
from auditor.sensors.model import Sensor

WHEEL_CENTRE = (20.0, 20.0)
WHEEL = {"WHL_N": (0.0, -8.0), "WHL_E": (8.0, 0.0), "WHL_S": (0.0, 8.0), "WHL_W": (-8.0, 0.0)}


@pytest.fixture(scope="module")
def kinds_board(tmp_path_factory: pytest.TempPathFactory) -> Board:
    board = new_board("kinds", size=(120.0, 80.0))
    pins: list[str] = []
    for net, (dx, dy) in WHEEL.items():  # listed N, E, S, W; written in that order
        round_button(board, f"W{len(pins)}", (WHEEL_CENTRE[0] + dx, WHEEL_CENTRE[1] + dy),
                     6.0, net)
        pins.append(net)
    for i, net in enumerate(("TOUCH_TX0", "TOUCH_RX0")):
        round_button(board, f"M{i}", (45.0 + 10 * i, 10.0), 6.0, net)
        pins.append(net)
    custom_ring(board, "P1", (40.0, 50.0), "Net-(P1-Pad1)", outer_mm=40.0, inner_mm=36.0)
    resistor(board, "R1", (65.0, 50.0), "Net-(P1-Pad1)", "P1_R")
    board.segment((59.0, 50.0), (64.5, 50.0), 0.2, "F.Cu", "Net-(P1-Pad1)")
    pins.append("P1_R")
    board.route([(65.5, 50.0), (65.5, pin_xy(len(pins))[1]), pin_xy(len(pins))], 0.2, "F.Cu",
                "P1_R")
    # 15.9 mm² with no word for touch anywhere: a near miss
    round_button(board, "E9", (100.0, 60.0), 4.5, "Net-(E9-Pad1)", value="~")
    resistor(board, "R9", (100.0, 70.0), "Net-(E9-Pad1)", "E9_R")
    pins.append("E9_R")
    big = board.footprint("Connector:Pad_12mm", "J7", "pad", at=(100.0, 35.0))
    big.pad("1", "smd", "rect", (0.0, 0.0), (12.0, 12.0), net="Net-(J7-Pad1)", layers=("F.Cu",))
    resistor(board, "R7", (90.0, 45.0), "Net-(J7-Pad1)", "J7_A")
    resistor(board, "R8", (110.0, 45.0), "Net-(J7-Pad1)", "J7_B")
    pins += ["J7_A"]
    controller(board, pins)
    return written(board, tmp_path_factory.mktemp("kinds"), "kinds")


@pytest.fixture(scope="module")
def auto(kinds_board: Board) -> tuple[dict[str, Sensor], tuple[Rejected, ...]]:
    sensors, rejects = find_sensors(kinds_board, SensorSelection())
    return {s.name: s for s in sensors}, rejects


def test_wheel_segments_clockwise_from_twelve(auto: tuple[dict[str, Sensor], tuple[Rejected, ...]]
                                              ) -> None:
    wheel = sorted((s for s in auto[0].values() if s.kind == "wheel"), key=lambda s: s.index)
    assert [s.name for s in wheel] == ["WHL_N", "WHL_E", "WHL_S", "WHL_W"]
    assert {s.group for s in wheel} == {"WHL"}


def test_mutual_pair_by_naming(auto: tuple[dict[str, Sensor], tuple[Rejected, ...]]) -> None:
    sensors = auto[0]
    assert sensors["TOUCH_TX0"].kind == "mutual-tx"
    assert sensors["TOUCH_RX0"].kind == "mutual-rx"


def test_ring_is_a_proximity_loop(auto: tuple[dict[str, Sensor], tuple[Rejected, ...]],
                                  kinds_board: Board) -> None:
    ring = auto[0]["P1"]
    assert ring.kind == "proximity" and "custom pad" in ring.reason
    # Closed form: annulus π(20² − 18²) = 238.76 mm² plus the 1 mm anchor
    # disc, half of which sticks out of the 2 mm wide ring (< 0.2 %); the
    # polygonal circles lose < 0.2 %.
    assert ring.area_mm2 == pytest.approx(math.pi * (20**2 - 18**2), rel=0.01)
    (measured,) = measure(kinds_board, [ring])
    # Hand computation: 64.5 − 59 = 5.5 mm to R1; then 50 − 17.62 = 32.38 mm
    # up and 1.5 mm across to U1 pin 7 at (67, 17.62).
    assert measured.path is not None and measured.path.series_ref == "R1"
    assert measured.path.controller_pin == "7"
    assert measured.path.length_mm == pytest.approx(5.5 + (50 - pin_xy(7)[1]) + 1.5, abs=1e-6)
    assert measured.surroundings is not None and measured.surroundings.min_gap_mm is None


def test_near_misses_are_listed(auto: tuple[dict[str, Sensor], tuple[Rejected, ...]]) -> None:
    sensors, rejects = auto
    assert "E9" not in sensors and "J7" not in sensors
    why = {r.net: r.why for r in rejects}
    assert "below the 20 mm² needed" in why["Net-(E9-Pad1)"]
    assert "net reaches 2 parts (R7, R8)" in why["Net-(J7-Pad1)"]


def test_configured_refs_and_mutual_globs(kinds_board: Board) -> None:
    sel = selection_from_mapping({"refs": ["E9"], "mutual_tx": ["*TX*"], "mutual_rx": ["*RX*"]})
    sensors, _ = find_sensors(kinds_board, sel)
    by_name = {s.name: s for s in sensors}
    assert sorted(by_name) == ["E9", "TOUCH_RX0", "TOUCH_TX0"]  # automatic finding is off
    assert by_name["E9"].reason == "configured reference E9"
    assert by_name["TOUCH_TX0"].reason == "configured mutual transmit pattern '*TX*'"


def test_excluded_nets_are_skipped(kinds_board: Board) -> None:
    sensors, _ = find_sensors(kinds_board, SensorSelection(exclude_nets=("WHL_*",)))
    assert not [s for s in sensors if s.kind == "wheel"]
