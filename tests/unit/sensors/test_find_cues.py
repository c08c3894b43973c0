"""Finding electrodes by each cue, on one board with one electrode per cue.

Expected sets and reasons come from the cue definitions in
``auditor/sensors/find.py`` (our own rules; common practice, no source, for
which drawings count as electrodes: kicad-format.md §0.9 and §14 list the
ways real boards draw them).
"""

from __future__ import annotations

import json
from dataclasses import replace
from pathlib import Path

import pytest
from sensor_boards import controller, new_board, resistor, round_button, written

from auditor.model.board import Board
from auditor.model.items import NetClass
from auditor.sensors import SensorSelection, find_sensors, selection_from_mapping
from auditor.sensors.find import Rejected
from auditor.sensors.model import Sensor

PINS = ["TOUCH1_R", "Net-(E2-Pad1)", "E3_R", "Z4_R", "J5_R", "SLD_1", "SLD_2", "SLD_3",
        "SLIDER_A", "SLIDER_B", "SLIDER_C", "CAP_LED_R", "BTN_UP"]


def _cue_board(tmp_path: Path) -> Board:
    board = new_board("cues", size=(90.0, 60.0))
    # 1. strong name cue, through a series resistor
    round_button(board, "E1", (8.0, 8.0), 8.0, "TOUCH1")
    resistor(board, "R1", (20.0, 4.0), "TOUCH1", "TOUCH1_R")
    # 2. automatic net name, in the project's net class "TouchKeys", straight to U1
    round_button(board, "E2", (8.0, 20.0), 8.0, "Net-(E2-Pad1)")
    # 3. net-less 12 mm square around a 1 mm anchor pad, through R3
    anchor = board.footprint("Test:Square_12mm", "E3", "pad", at=(8.0, 36.0))
    anchor.pad("1", "smd", "circle", (0.0, 0.0), (1.0, 1.0), net="Net-(E3-Pad1)",
               layers=("F.Cu",))
    anchor.shape("poly", "F.Cu", [(-6, -6), (6, -6), (6, 6), (-6, 6)], width_mm=0.0,
                 filled=True)
    resistor(board, "R3", (20.0, 30.0), "Net-(E3-Pad1)", "E3_R")
    board.segment((8.0, 36.0), (19.5, 30.0), 0.2, "F.Cu", "Net-(E3-Pad1)")
    # 4. a named zone as the electrode, joined by a track to R4
    board.zone("Net-(R4-Pad1)", "F.Cu", [(24, 40), (38, 40), (38, 54), (24, 54)], name="knob")
    board.segment((31.0, 47.0), (41.5, 47.0), 0.2, "F.Cu", "Net-(R4-Pad1)")
    resistor(board, "R4", (42.0, 47.0), "Net-(R4-Pad1)", "Z4_R")
    # 5. a big plain pad of an unnamed net through R5
    big = board.footprint("Connector:Pad_12mm", "J5", "pad", at=(50.0, 50.0))
    big.pad("1", "smd", "rect", (0.0, 0.0), (12.0, 6.0), net="Net-(J5-Pad1)", layers=("F.Cu",))
    resistor(board, "R5", (62.0, 50.0), "Net-(J5-Pad1)", "J5_R")
    # 6. slider segments named with indices, placed out of order
    for x, net in ((30.0, "SLD_3"), (36.0, "SLD_1"), (42.0, "SLD_2")):
        seg = board.footprint("Test:Segment", f"S{net[-1]}", "seg", at=(x, 10.0))
        seg.pad("1", "smd", "rect", (0.0, 0.0), (5.0, 10.0), net=net, layers=("F.Cu",))
    # 7. slider segments without numbers: ordered by position (B, C, A)
    for x, net in ((42.0, "SLIDER_A"), (30.0, "SLIDER_B"), (36.0, "SLIDER_C")):
        seg = board.footprint("Test:Segment", f"T{net[-1]}", "seg", at=(x, 25.0))
        seg.pad("1", "smd", "rect", (0.0, 0.0), (5.0, 10.0), net=net, layers=("F.Cu",))
    # 8. false positives: an LED net with "CAP", a mechanical button with "BTN"
    led = board.footprint("LED_SMD:LED_0603", "D9", "led", at=(80.0, 40.0))
    led.pad("1", "smd", "rect", (-0.8, 0.0), (0.8, 0.8), net="CAP_LED")
    led.pad("2", "smd", "rect", (0.8, 0.0), (0.8, 0.8), net="GND")
    resistor(board, "R9", (80.0, 45.0), "CAP_LED", "CAP_LED_R")
    switch = board.footprint("Button_Switch_SMD:SW_SPST", "SW1", "sw", at=(80.0, 52.0))
    for i, (dx, dy) in enumerate(((-3, -2), (3, -2), (-3, 2), (3, 2)), start=1):
        switch.pad(str(i), "smd", "rect", (dx, dy), (1.0, 1.0),
                   net="BTN_UP" if i <= 2 else "GND")
    controller(board, PINS)
    path = tmp_path / "cues.kicad_pcb"
    project = {"net_settings": {"classes": [{"name": "Default"}, {"name": "TouchKeys"}],
                                "netclass_assignments": {"Net-(E2-Pad1)": "TouchKeys"}}}
    path.with_suffix(".kicad_pro").write_text(json.dumps(project, indent=2), encoding="utf-8")
    return written(board, tmp_path, "cues")


@pytest.fixture(scope="module")
def cue_board(tmp_path_factory: pytest.TempPathFactory) -> Board:
    return _cue_board(tmp_path_factory.mktemp("cues"))


@pytest.fixture(scope="module")
def found(cue_board: Board) -> tuple[dict[str, Sensor], tuple[Rejected, ...]]:
    sensors, rejects = find_sensors(cue_board, SensorSelection())
    return {s.name: s for s in sensors}, rejects


def test_every_cue_finds_its_electrode(found: tuple[dict[str, Sensor], tuple[Rejected, ...]]
                                       ) -> None:
    sensors, _ = found
    assert sorted(sensors) == ["E2", "E3", "J5", "SLD_1", "SLD_2", "SLD_3", "SLIDER_A",
                               "SLIDER_B", "SLIDER_C", "TOUCH1", "knob"]


def test_reasons_name_the_cue(found: tuple[dict[str, Sensor], tuple[Rejected, ...]]) -> None:
    sensors, _ = found
    assert sensors["TOUCH1"].reason == "net name has 'touch'"
    assert sensors["E2"].reason == "net class 'TouchKeys'"
    assert "net-less copper" in sensors["E3"].reason and "through R3 to U1" in sensors["E3"].reason
    assert "zone" in sensors["knob"].reason and "through R4 to U1" in sensors["knob"].reason
    assert "pad" in sensors["J5"].reason and "through R5 to U1" in sensors["J5"].reason


def test_netless_copper_is_merged_into_the_anchor_pad(
        found: tuple[dict[str, Sensor], tuple[Rejected, ...]]) -> None:
    # Hand computation: the 12 mm square (144 mm²) contains the 1 mm anchor pad.
    e3 = found[0]["E3"]
    assert e3.area_mm2 == pytest.approx(144.0, abs=1e-6)
    assert e3.refs == ("E3",) and e3.nets == ("Net-(E3-Pad1)",)


def test_zone_electrode_area(found: tuple[dict[str, Sensor], tuple[Rejected, ...]]) -> None:
    # Hand computation: the 14 mm square outline (196 mm²); the fill keeps all
    # of it apart from corner rounding of the 0.25 mm minimum width (< 1 %).
    knob = found[0]["knob"]
    assert knob.area_mm2 == pytest.approx(196.0, rel=0.01)
    assert knob.kind == "button" and knob.layer == "F.Cu"


def test_slider_order_by_name_and_by_position(
        found: tuple[dict[str, Sensor], tuple[Rejected, ...]]) -> None:
    sensors, _ = found
    named = sorted((s for s in sensors.values() if s.group == "SLD"), key=lambda s: s.index)
    assert [s.name for s in named] == ["SLD_1", "SLD_2", "SLD_3"]
    placed = sorted((s for s in sensors.values() if s.group == "SLIDER"), key=lambda s: s.index)
    assert [s.name for s in placed] == ["SLIDER_B", "SLIDER_C", "SLIDER_A"]
    assert {s.kind for s in named + placed} == {"slider"}


def test_false_positives_are_not_taken(
        found: tuple[dict[str, Sensor], tuple[Rejected, ...]]) -> None:
    sensors, rejects = found
    assert not {"CAP_LED", "BTN_UP", "GND"} & set(sensors)
    assert not {r.net for r in rejects} & {"CAP_LED", "BTN_UP", "GND"}


def test_configured_zone_and_library_id(cue_board: Board) -> None:
    sel = selection_from_mapping({"zones": ["kn*"], "lib_ids": ["Connector:*"]})
    sensors, _ = find_sensors(cue_board, sel)
    assert [(s.name, s.reason) for s in sensors] == [
        ("J5", "configured library id Connector:Pad_12mm"), ("knob", "configured zone 'knob'")]


def test_configured_property(cue_board: Board) -> None:
    e2 = next(fp for fp in cue_board.footprints if fp.ref == "E2")
    tagged = replace(e2, properties=e2.properties + (("Sensor", "yes"),))
    board = replace(cue_board, footprints=tuple(tagged if fp is e2 else fp
                                                for fp in cue_board.footprints))
    sensors, _ = find_sensors(board, selection_from_mapping({"properties": {"sensor": "y*"}}))
    assert [(s.name, s.reason) for s in sensors] == [("E2", "configured property sensor=yes")]


def test_board_net_classes_without_a_project_file(cue_board: Board) -> None:
    # KiCad 5 boards carry net classes inline; the reader puts them on Board.
    board = replace(cue_board, netclasses=(NetClass("TouchKeys", ("Net-(J5-Pad1)",)),))
    sensors, _ = find_sensors(board, SensorSelection(), netclasses=board.netclasses)
    j5 = next(s for s in sensors if s.name == "J5")
    assert j5.reason == "net class 'TouchKeys'"
    # Without the project file E2 is found by its footprint, whose value says
    # "electrode" (a footprint word is as strong a cue as a net name).
    e2 = next(s for s in sensors if s.name == "E2")
    assert e2.reason == "footprint E2 is 'Test:Pad_Round'"
