"""Edge cases of finding: unfilled zones, net-less copper touching two nets,
through-hole electrodes, no copper layers, determinism (our own rules;
common practice, no source)."""

from __future__ import annotations

from dataclasses import replace
from pathlib import Path

from sensor_boards import controller, new_board, resistor, written

from auditor.sensors import SensorSelection, find_sensors


def test_unfilled_zone_electrode_is_reported_not_dropped(tmp_path: Path) -> None:
    board = new_board("unfilled")
    board.zone("TOUCH_Z", "F.Cu", [(10, 10), (24, 10), (24, 24), (10, 24)], filled="none")
    resistor(board, "R1", (30.0, 17.0), "TOUCH_Z", "TZ_R")
    controller(board, ["TZ_R"])
    sensors, rejects = find_sensors(written(board, tmp_path, "unfilled"))
    assert sensors == ()
    (reject,) = [r for r in rejects if r.net == "TOUCH_Z"]
    assert "has no fill in the file" in reject.why
    assert reject.area_mm2 == 196.0  # the 14 mm square outline (hand computation)


def test_netless_copper_touching_two_nets_is_not_merged(tmp_path: Path) -> None:
    board = new_board("bridge")
    for ref, x, net in (("E1", 10.0, "Net-(E1-Pad1)"), ("E2", 22.0, "Net-(E2-Pad1)")):
        fp = board.footprint("Test:Anchor", ref, "pad", at=(x, 20.0))
        fp.pad("1", "smd", "circle", (0.0, 0.0), (1.0, 1.0), net=net, layers=("F.Cu",))
    # one 14 mm wide net-less plate touching both anchors
    board.graphic("poly", "F.Cu", [(9, 13), (23, 13), (23, 27), (9, 27)], width_mm=0.0,
                  filled=True)
    controller(board, ["Net-(E1-Pad1)", "Net-(E2-Pad1)"])
    sensors, _ = find_sensors(written(board, tmp_path, "bridge"))
    assert sensors == ()  # the 1 mm anchors alone are far below 20 mm²


def test_through_hole_pad_is_one_electrode_on_the_front(tmp_path: Path) -> None:
    board = new_board("tht")
    fp = board.footprint("Test:THT_Pad", "E1", "pad", at=(15.0, 20.0),
                         attributes=("through_hole",))
    fp.pad("1", "thru_hole", "circle", (0.0, 0.0), (10.0, 10.0), net="TOUCH1", drill_mm=1.0)
    controller(board, ["TOUCH1"])
    sensors, _ = find_sensors(written(board, tmp_path, "tht"))
    assert [(s.name, s.layer) for s in sensors] == [("TOUCH1", "F.Cu")]


def test_board_without_copper_layers_finds_nothing(tmp_path: Path) -> None:
    board = new_board("empty")
    controller(board, ["A"])
    model = written(board, tmp_path, "empty")
    assert find_sensors(replace(model, copper_layers=())) == ((), ())


def test_same_board_same_result(tmp_path: Path) -> None:
    board = new_board("twice")
    fp = board.footprint("Test:Pad", "E1", "pad", at=(15.0, 20.0))
    fp.pad("1", "smd", "rect", (0.0, 0.0), (8.0, 8.0), net="KEY1", layers=("F.Cu",))
    controller(board, ["KEY1"])
    first = written(board, tmp_path, "a")
    second = written(board, tmp_path, "b")
    strip = lambda result: [(s.name, s.reason, s.area_mm2, s.x_mm) for s in result[0]]  # noqa: E731
    assert strip(find_sensors(first, SensorSelection())) == strip(find_sensors(second))
    assert strip(find_sensors(first))[0][1] == "net name has 'key'"
