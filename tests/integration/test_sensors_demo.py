"""The sensor stage on the bundled demo board, against the demo generator's
own record of what it drew (``fixtures/demo/planted.json``: per channel the
routed lengths it laid out point by point, vias, resistor, copper area).

That record comes from a separate program (the generator's routing, not the
sensor stage's copper graph), so agreement checks the path following.
"""

from __future__ import annotations

import json
from pathlib import Path

import pytest

from auditor.model.board import Board
from auditor.read import read_board
from auditor.sensors import find_sensors, measure, selection_from_mapping
from auditor.sensors.model import Sensor

ROOT = Path(__file__).resolve().parents[2]
DEMO = ROOT / "auditor" / "demo" / "front_panel.kicad_pcb"
RECORD = ROOT / "fixtures" / "demo" / "planted.json"

pytestmark = pytest.mark.skipif(not (DEMO.is_file() and RECORD.is_file()),
                                reason="demo board not generated yet")


@pytest.fixture(scope="module")
def demo() -> tuple[Board, dict[str, Sensor]]:
    board = read_board(DEMO)
    selection = selection_from_mapping({"controller_ref": "U1"})
    sensors, _ = find_sensors(board, selection)
    return board, {s.nets[0]: s for s in measure(board, sensors, selection)}


def _channels() -> list[dict[str, object]]:
    if not RECORD.is_file():
        return []
    channels: list[dict[str, object]] = json.loads(RECORD.read_text("utf-8"))["channels"]
    return channels


def test_every_channel_is_found(demo: tuple[Board, dict[str, Sensor]]) -> None:
    assert sorted(demo[1]) == sorted(str(c["net"]) for c in _channels())


@pytest.mark.parametrize("channel", _channels(), ids=lambda c: str(c["net"]))
def test_path_matches_what_the_generator_routed(
        demo: tuple[Board, dict[str, Sensor]], channel: dict[str, object]) -> None:
    sensor = demo[1][str(channel["net"])]
    path = sensor.path
    assert path is not None and path.complete
    assert path.series_ref == channel["resistor"]
    assert path.vias == channel["vias"]
    # The record rounds to 0.01 mm.
    to_pin = float(channel["resistor_to_pin_mm"])  # type: ignore[arg-type]
    to_resistor = float(channel["electrode_to_resistor_mm"])  # type: ignore[arg-type]
    assert path.series_to_pin_mm == pytest.approx(to_pin, abs=0.02)
    assert path.length_mm == pytest.approx(to_resistor + to_pin, abs=0.03)
    # The record's area is all of the net's front copper, so it also holds
    # the trace from the pad edge to the via (about 1 mm²); the electrode
    # leaves tracks out.
    area = float(channel["copper_area_mm2"])  # type: ignore[arg-type]
    assert area - 1.5 < sensor.area_mm2 < area
