"""Copper under an electrode: shadowed fraction and hatch fill ratio.

Closed form for an unbounded square hatch of line width t and gap g: the
copper share is 1 − (g/(g+t))² (one g×g opening per (g+t)² cell). A window
whose sides lie on multiples of the pitch (the writer anchors the grid at the
origin, lines centred on multiples of the pitch) holds whole cells, so the
local coverage equals the closed form exactly.
"""

from __future__ import annotations

from pathlib import Path

import pytest
from sensor_boards import (
    controller,
    ground_via,
    hatch_standard,
    new_board,
    square_button,
    written,
)

from auditor.model.board import Board
from auditor.sensors import SensorSelection, find_sensors, measure
from auditor.sensors.model import LayerShadow, Sensor

PITCH = 1.85  # 0.25 mm lines + 1.6 mm gaps
SIDE = 7 * PITCH  # 12.95 mm: seven whole hatch cells
CENTRE = (10 * PITCH + SIDE / 2, 10 * PITCH + SIDE / 2)


def _board(tmp_path: Path, name: str, back_pour: str, side_mm: float = SIDE) -> Board:
    board = new_board(name, size=(80.0, 50.0))
    square_button(board, "E1", CENTRE, side_mm, "TOUCH1")
    board.segment(CENTRE, (66.0, CENTRE[1]), 0.2, "F.Cu", "TOUCH1")
    board.segment((66.0, CENTRE[1]), (67.0, 10.0), 0.2, "F.Cu", "TOUCH1")
    controller(board, ["TOUCH1"])
    ground_via(board, (2 * PITCH, 2 * PITCH))  # on a hatch crossing, so it joins the pour
    whole = [(0.0, 0.0), (80.0, 0.0), (80.0, 50.0), (0.0, 50.0)]
    if back_pour in ("hatched", "patch"):
        board.zone("GND", "B.Cu", whole, hatch=hatch_standard())
    if back_pour == "patch":  # a solid square of the same net over the pad's area
        x0, y0 = CENTRE[0] - SIDE / 2 - 1, CENTRE[1] - SIDE / 2 - 1
        x1, y1 = x0 + SIDE + 2, y0 + SIDE + 2
        board.zone("GND", "B.Cu", [(x0, y0), (x1, y0), (x1, y1), (x0, y1)], priority=1)
        ground_via(board, (x0 + 0.5, y0 + 0.5))  # keeps the patch from being an island
    elif back_pour == "half":  # solid, only left of the pad's centre line
        board.zone("GND", "B.Cu", [(0.0, 0.0), (CENTRE[0], 0.0), (CENTRE[0], 50.0), (0.0, 50.0)],
                   edge_clearance_mm=0.0)
    return written(board, tmp_path, name)


def _shadow(board: Board) -> tuple[Sensor, LayerShadow]:
    sensors, _ = find_sensors(board, SensorSelection())
    (sensor,) = measure(board, sensors)
    assert sensor.surroundings is not None
    (shadow,) = sensor.surroundings.shadows
    return sensor, shadow


@pytest.mark.slow
def test_hatched_ground_under_the_whole_pad(tmp_path: Path) -> None:
    sensor, shadow = _shadow(_board(tmp_path, "hatched", "hatched"))
    assert sensor.area_mm2 == pytest.approx(SIDE * SIDE, rel=1e-9)
    assert shadow.fill == "hatched" and shadow.nets == ("GND",)
    assert shadow.shadowed_fraction == pytest.approx(1.0, abs=1e-3)
    closed_form = 1.0 - (1.6 / 1.85) ** 2  # 0.25197
    assert shadow.fill_ratio == pytest.approx(closed_form, abs=2e-3)


def test_solid_ground_under_half_the_pad(tmp_path: Path) -> None:
    # Hand computation: the pour's edge runs through the pad's centre line,
    # minus the writer's 0.5 mm clearance to the via-less side: exactly half.
    _, shadow = _shadow(_board(tmp_path, "half", "half"))
    assert shadow.fill == "solid"
    assert shadow.shadowed_fraction == pytest.approx(0.5, abs=1e-3)
    assert shadow.fill_ratio == pytest.approx(1.0, abs=1e-6)


@pytest.mark.slow
def test_solid_patch_inside_a_hatched_pour_is_solid(tmp_path: Path) -> None:
    _, shadow = _shadow(_board(tmp_path, "patch", "patch"))
    assert shadow.fill == "solid"
    assert shadow.shadowed_fraction == pytest.approx(1.0, abs=1e-6)
    assert shadow.fill_ratio == pytest.approx(1.0, abs=1e-6)


@pytest.mark.slow
def test_small_pad_takes_the_hatch_settings(tmp_path: Path) -> None:
    # A 3 mm pad covers 9 mm², fewer than four 1.85 mm cells (13.7 mm²): the
    # local coverage would depend on where the grid falls, so the closed form
    # of the zone's own settings is reported, exactly.
    _, shadow = _shadow(_board(tmp_path, "small", "hatched", side_mm=3.0))
    assert shadow.fill == "hatched" and shadow.shadowed_fraction == pytest.approx(1.0, abs=1e-3)
    assert shadow.fill_ratio == pytest.approx(1.0 - (1.6 / 1.85) ** 2, rel=1e-12)
