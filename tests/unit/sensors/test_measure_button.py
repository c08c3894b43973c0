"""Path and surroundings of one button, checked against hand computation.

The board (``button_board``): a 10 mm round pad E1 (net TOUCH1) at (15, 20);
a 0.2 mm track along y = 20 to R1's left pad at (39.5, 20); from R1's right
pad (40.5, 20) to U1 pin 1 at (67, 10) via (65, 20) and (65, 10). Solid GND
pours on both layers with 1.0 mm clearance; a PWM1 track at y = 21.5 from
x = 25 to 35; an SPI_CLK track on B.Cu crossing at x = 32; a net-less 1 mm
copper disc at (15, 28.5); LED D1 below the pad.
"""

from __future__ import annotations

import math
from pathlib import Path

import pytest
from sensor_boards import (
    controller,
    ground_via,
    new_board,
    pin_xy,
    round_button,
    wired_through_series,
    written,
)

from auditor.model.board import Board
from auditor.sensors import SensorSelection, find_sensors, measure
from auditor.sensors.model import Sensor

POUR = [(0.0, 0.0), (90.0, 0.0), (90.0, 50.0), (0.0, 50.0)]


@pytest.fixture(scope="module")
def button_board(tmp_path_factory: pytest.TempPathFactory) -> Board:
    board = new_board("button")
    round_button(board, "E1", (15.0, 20.0), 10.0, "TOUCH1")
    wired_through_series(board, (15.0, 20.0), "TOUCH1", "R1", (40.0, 20.0), pin=1)
    controller(board, ["TOUCH1_R"])
    board.segment((25.0, 21.5), (35.0, 21.5), 0.2, "F.Cu", "PWM1")
    board.segment((32.0, 15.0), (32.0, 25.0), 0.2, "B.Cu", "SPI_CLK")
    board.graphic("circle", "F.Cu", [(15.0, 28.5), (15.5, 28.5)], width_mm=0.0, filled=True)
    led = board.footprint("LED_SMD:LED_0603", "D1", "red", at=(15.0, 33.0))
    led.pad("1", "smd", "rect", (-1.0, 0.0), (1.0, 1.0), net="LED_K")
    led.pad("2", "smd", "rect", (1.0, 0.0), (1.0, 1.0), net="LED_A")
    ground_via(board, (5.0, 5.0))
    for layer in ("F.Cu", "B.Cu"):
        board.zone("GND", layer, POUR, clearance_mm=1.0)
    return written(board, tmp_path_factory.mktemp("button"), "button")


@pytest.fixture(scope="module")
def e1(button_board: Board) -> Sensor:
    sensors, _ = find_sensors(button_board, SensorSelection())
    assert [s.name for s in sensors] == ["TOUCH1"]
    return measure(button_board, sensors)[0]


def test_area_is_the_inscribed_polygon(e1: Sensor) -> None:
    # Closed form: a circle drawn as an inscribed 64-gon (model/geometry.py)
    # has area (n/2) r² sin(2π/n); within 0.2 % of π r² for r = 5 mm.
    n, r = 64, 5.0
    assert e1.area_mm2 == pytest.approx(n / 2 * r * r * math.sin(2 * math.pi / n), rel=1e-6)
    assert e1.equivalent_diameter_mm == pytest.approx(10.0, rel=2e-3)
    assert (e1.x_mm, e1.y_mm) == pytest.approx((15.0, 20.0), abs=1e-6)
    assert e1.exposed and not e1.pasted  # pad layers F.Cu + F.Mask only


def test_path_length_series_part_and_pin(e1: Sensor) -> None:
    # Hand computation: 39.5 - 15 = 24.5 mm to R1, then 65 - 40.5 = 24.5,
    # 20 - 10 = 10 and 67 - 65 = 2 mm to pin 1: 36.5 mm after R1, 61 mm in all.
    assert pin_xy(1) == (67.0, 10.0)
    path = e1.path
    assert path is not None and path.complete
    assert path.length_mm == pytest.approx(61.0, abs=1e-6)
    assert path.series_ref == "R1"
    assert path.series_to_pin_mm == pytest.approx(36.5, abs=1e-6)
    assert (path.controller_ref, path.controller_pin) == ("U1", "1")
    assert path.vias == 0 and path.layers == ("F.Cu",)
    assert [(r.layer, r.width_mm) for r in path.runs] == [("F.Cu", 0.2)]
    assert sum(r.length_mm for r in path.runs) == pytest.approx(61.0, abs=1e-6)


def test_parallel_run_and_crossing(e1: Sensor) -> None:
    assert e1.path is not None
    by_net = {n.net: n for n in e1.path.neighbours}
    pwm = by_net["PWM1"]
    # Hand computation: edge-to-edge 1.5 - 0.1 - 0.1 = 1.3 mm. Within 2 mm edge
    # to edge: the 10 mm straight part plus, at each round end, the stretch
    # where sqrt(dx² + 1.5²) <= 2.2, i.e. dx <= sqrt(2.2² - 1.5²) = 1.609 mm.
    assert pwm.min_distance_mm == pytest.approx(1.3, abs=0.01)
    assert pwm.parallel_mm == pytest.approx(10.0 + 2 * math.sqrt(2.2**2 - 1.5**2), abs=0.05)
    assert pwm.noisy  # matches the default noisy glob *PWM*
    assert by_net["SPI_CLK"].crossings == 1 and by_net["SPI_CLK"].parallel_mm == 0.0
    assert "GND" not in by_net  # the device ground is expected beside a sense trace


def test_gap_to_ground_pour(e1: Sensor) -> None:
    # The pour keeps its 1.0 mm clearance from the pad (the writer's fill);
    # polygon approximation of the round pad and hole moves it by < 0.01 mm.
    around = e1.surroundings
    assert around is not None and around.ground_net == "GND"
    assert around.min_gap_mm == pytest.approx(1.0, abs=0.01)
    assert around.typical_gap_mm == pytest.approx(1.0, abs=0.01)
    assert around.min_ground_gap_mm == pytest.approx(1.0, abs=0.01)
    assert around.typical_ground_gap_mm == pytest.approx(1.0, abs=0.01)


def test_ground_ring_coverage(e1: Sensor) -> None:
    # Hand computation: the ring from 1 to 4 mm outside the r = 5 pad has area
    # π(9² − 6²) = 141.37 mm². The pour is missing from (a) the track's 2.2 mm
    # wide clearance corridor, over the ring's 3 mm: 6.6 mm²; (b) the 1.5 mm
    # clearance disc around the floating disc at 8.5 mm from the pad centre,
    # where it overlaps the r = 9 circle: the circle-circle lens (closed form)
    # r²acos((d²+r²−R²)/2dr) + R²acos((d²+R²−r²)/2dR) − ½√(…) = 4.897 mm².
    assert e1.surroundings is not None
    ring = math.pi * (9**2 - 6**2)
    big, small, d = 9.0, 1.5, 8.5
    lens = (small**2 * math.acos((d * d + small**2 - big**2) / (2 * d * small))
            + big**2 * math.acos((d * d + big**2 - small**2) / (2 * d * big))
            - 0.5 * math.sqrt((-d + small + big) * (d + small - big) * (d - small + big)
                              * (d + small + big)))
    expected = (ring - 2.2 * 3 - lens) / ring
    assert e1.surroundings.ground_fill_ratio == pytest.approx(expected, abs=0.005)


def test_solid_ground_under_the_pad(e1: Sensor, button_board: Board) -> None:
    assert e1.surroundings is not None
    (back,) = e1.surroundings.shadows
    assert back.layer == "B.Cu" and back.fill == "solid" and back.nets == ("GND",)
    assert back.shadowed_fraction == pytest.approx(1.0, abs=1e-6)
    assert back.fill_ratio == pytest.approx(1.0, abs=1e-6)
    # A 1.6 mm two-layer board: the copper layers are 1.5-1.6 mm apart
    # (common practice, no source: 1.6 mm FR-4 minus copper).
    assert 1.45 < back.depth_mm < 1.6


def test_floating_disc_and_led(e1: Sensor) -> None:
    around = e1.surroundings
    assert around is not None
    # Hand computation: the disc's top (15, 28) is 28 − 25 = 3 mm below the pad.
    assert around.floating_copper and around.floating_copper[0] == pytest.approx(
        (15.0, 28.0, 3.0), abs=0.01)
    # D1's nearest pad corner (14.5, 32.5): sqrt(0.5² + 12.5²) − 5 = 7.510 mm.
    ((ref, dist),) = around.noisy_parts
    assert ref == "D1" and dist == pytest.approx(math.hypot(0.5, 12.5) - 5.0, abs=0.01)
    assert around.nearest_sensor == "" and around.nearest_sensor_mm is None


def test_ground_area_is_both_pours(e1: Sensor) -> None:
    # Hand estimate: two pours of about (90 − 1) × (50 − 1) = 4361 mm² each,
    # less the clearances around the pad, tracks and parts (< 10 %).
    assert e1.surroundings is not None
    assert 0.9 * 2 * 4361 < e1.surroundings.ground_area_mm2 < 2 * 4361


def test_demo_speed_guard(button_board: Board, tmp_path: Path) -> None:
    # Determinism: measuring twice gives equal records.
    sensors, _ = find_sensors(button_board)
    assert measure(button_board, sensors) == measure(button_board, sensors)
