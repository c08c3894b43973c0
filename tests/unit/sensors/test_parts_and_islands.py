"""Noisy parts by reference, library and value; zone islands as floating copper.

Which parts count as noisy is our own list (physics.md §4.1: LEDs, switching
regulators, crystals near pads; common practice, no source).
"""

from __future__ import annotations

import pytest
from sensor_boards import controller, new_board, round_button, written

from auditor.model.board import Board
from auditor.sensors import SensorSelection, find_sensors, measure
from auditor.sensors.parts import is_noisy_part


@pytest.fixture(scope="module")
def parts_board(tmp_path_factory: pytest.TempPathFactory) -> Board:
    board = new_board("parts")
    round_button(board, "E1", (20.0, 20.0), 10.0, "TOUCH1")
    placed = (("Y1", "Crystal:Crystal_SMD_3225", "16MHz", (32.0, 20.0)),
              ("U2", "Package_TO_SOT_SMD:SOT-23-5", "AP2112K-3.3", (20.0, 32.0)),
              ("U3", "Package_TO_SOT_SMD:SOT-23-6", "XYZ123", (8.0, 32.0)),
              ("L1", "Inductor_SMD:L_1008", "4u7", (5.0, 36.0)),
              ("U4", "Package_SO:SOIC-8", "24LC02", (8.0, 8.0)),
              ("Q1", "Package_TO_SOT_SMD:SOT-23", "AO3400 LDO", (32.0, 8.0)))
    for ref, lib, value, at in placed:
        fp = board.footprint(lib, ref, value, at=at)
        fp.pad("1", "smd", "rect", (-0.8, 0.0), (0.8, 0.8), net=f"{ref}_1")
        fp.pad("2", "smd", "rect", (0.8, 0.0), (0.8, 0.8), net=f"{ref}_2")
    # an unconnected GND patch (kept island) 2 mm right of the pad
    board.zone("GND", "F.Cu", [(27, 14), (29, 14), (29, 16), (27, 16)], remove_islands=False,
               clearance_mm=0.2)
    controller(board, ["TOUCH1"])
    return written(board, tmp_path_factory.mktemp("parts"), "parts")


def test_noisy_parts_by_prefix_library_value_and_inductor(parts_board: Board) -> None:
    sel = SensorSelection()
    noisy = {fp.ref for fp in parts_board.footprints if is_noisy_part(parts_board, fp, sel)}
    # Y1 by prefix, L1 by prefix, U3 by its inductor within 5 mm, Q1 by "LDO" in
    # its value; U2's value names no regulator word and U4 is an EEPROM.
    assert noisy == {"Y1", "L1", "U3", "Q1"}


def test_parts_within_radius_sorted_by_distance(parts_board: Board) -> None:
    sensors, _ = find_sensors(parts_board)
    (e1,) = measure(parts_board, sensors)
    assert e1.surroundings is not None
    refs = [ref for ref, _ in e1.surroundings.noisy_parts]
    # Hand computation: Y1's near pad edge at x = 32 − 1.2 = 30.8 on y = 20 is
    # 30.8 − 25 = 5.8 mm from the pad; L1's nearest corner (4.6, 35.6) is
    # √(15.4² + 15.6²) − 5 = 16.9 mm away, beyond the 10 mm radius.
    assert refs[0] == "Y1"
    assert e1.surroundings.noisy_parts[0][1] == pytest.approx(5.8, abs=0.01)
    assert "L1" not in refs


def test_kept_zone_island_is_floating_copper(parts_board: Board) -> None:
    sensors, _ = find_sensors(parts_board)
    (e1,) = measure(parts_board, sensors)
    assert e1.surroundings is not None
    # Hand computation: the island's corner nearest the pad is (27, 16), at
    # √(7² + 4²) − 5 = 3.062 mm from the r = 5 pad centred at (20, 20).
    (x, y, dist) = e1.surroundings.floating_copper[0]
    assert (x, y) == pytest.approx((27.0, 16.0), abs=1e-3)
    assert dist == pytest.approx(65**0.5 - 5.0, abs=0.01)
