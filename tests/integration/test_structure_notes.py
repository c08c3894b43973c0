"""The notes ``padaudit sensors`` prints about a board's structures (key
switches found and left to no touch rule) reach the audit report too, in
every format that carries text: a user who only runs ``audit`` must learn
why those pads got no finding.

Boards: the invented structure fixtures (fixtures/make_structure_boards.py).
"""

from __future__ import annotations

import json
import xml.etree.ElementTree as ET
from pathlib import Path

import pytest

from auditor.cli.main import main
from auditor.report.as_json import load_schema

FIXTURES = Path(__file__).resolve().parents[2] / "fixtures" / "structures"
KEYS = FIXTURES / "keyswitch-matrix.kicad_pcb"
NO_KEYS = FIXTURES / "mutual-xy.kicad_pcb"


def audit(capsys: pytest.CaptureFixture[str], board: Path, fmt: str) -> str:
    main(["audit", str(board), "--no-solve", "--no-suggest", "--format", fmt,
          "--color", "never", "-q"])
    return capsys.readouterr().out


def sensors_notes(capsys: pytest.CaptureFixture[str], board: Path) -> list[str]:
    main(["sensors", str(board), "--json"])
    return [n for n in json.loads(capsys.readouterr().out)["notes"] if "key switch" in n]


def test_json_report_carries_the_key_switch_note(capsys: pytest.CaptureFixture[str]) -> None:
    import jsonschema

    doc = json.loads(audit(capsys, KEYS, "json"))
    jsonschema.validate(doc, load_schema())
    want = sensors_notes(capsys, KEYS)
    assert len(want) == 1
    assert doc["notes"] == want  # word for word what `padaudit sensors` says


def test_no_note_without_key_switches(capsys: pytest.CaptureFixture[str]) -> None:
    assert json.loads(audit(capsys, NO_KEYS, "json"))["notes"] == []


@pytest.mark.parametrize("fmt", ["text", "markdown"])
def test_text_formats_carry_the_note(capsys: pytest.CaptureFixture[str], fmt: str) -> None:
    out = " ".join(audit(capsys, KEYS, fmt).split())  # undo the line wrapping
    assert out.count("electro-capacitive key switch") == 1


def test_sarif_and_junit_carry_the_note(capsys: pytest.CaptureFixture[str]) -> None:
    sarif = json.loads(audit(capsys, KEYS, "sarif"))
    said = [n["message"]["text"]
            for n in sarif["runs"][0]["invocations"][0]["toolExecutionNotifications"]]
    assert sum("key switch" in s for s in said) == 1
    junit = ET.fromstring(audit(capsys, KEYS, "junit"))
    outs = " ".join(e.text or "" for e in junit.iter("system-out"))
    assert outs.count("NOTE: ") == 1 and "key switch" in outs
