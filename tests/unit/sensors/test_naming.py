"""Name cues and name-derived order (our own word lists; common practice, no source)."""

from __future__ import annotations

import pytest

from auditor.sensors.cues import group_stem, is_ground_name, name_cue, trailing_index
from auditor.sensors.shaping import _mutual_side


@pytest.mark.parametrize(("name", "word", "strong"), [
    ("TOUCH1", "touch", True), ("/ui/Slider_3", "slider", True), ("Net-(U1-TOUCH3)", "touch", True),
    ("CSENSE0", "sense", True), ("BTN2", "btn", False), ("KEY_5", "key", False),
    ("TP4", "tp", False), ("PROX", "prox", True),
])
def test_cue_words(name: str, word: str, strong: bool) -> None:
    cue = name_cue(name)
    assert cue is not None and (cue.word, cue.strong) == (word, strong)


@pytest.mark.parametrize("name", ["CAP_LED", "BTN_RESET", "Net-(TP1-Pad1)", "KEY_PWR", "VSENSE",
                                  "GND", "SDA", "KEYBOARD_EN"])
def test_not_cues(name: str) -> None:
    assert name_cue(name) is None


@pytest.mark.parametrize(("net", "side"), [
    ("TOUCH_TX0", "tx"), ("TOUCH_RX3", "rx"), ("X2", "tx"), ("Y0", "rx"), ("DRIVE1", "tx"),
    ("SENSE1", "rx"), ("TOUCH1", ""), ("XY", ""),
])
def test_mutual_sides(net: str, side: str) -> None:
    assert _mutual_side(net) == side


def test_ground_names_and_stems() -> None:
    assert [is_ground_name(n) for n in ("GND", "AGND", "/p/GNDA", "VSS", "GND_ISO", "VSENSE")] == \
        [True, True, True, True, True, False]
    assert (group_stem("SLD_10"), trailing_index("SLD_10")) == ("SLD", 10)
    assert (group_stem("WHL_N"), trailing_index("WHL_N")) == ("WHL", None)
