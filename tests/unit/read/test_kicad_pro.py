"""Net classes from the KiCad project file.

Shapes of ``net_settings`` follow KiCad 6-9 project files as written by
KiCad (from memory: KiCad 6 lists ``nets`` inside each class; 7/8 use
``netclass_assignments`` net → class; 9 allows a list of classes per net;
``netclass_patterns`` entries are {netclass, pattern}).
"""

from __future__ import annotations

import json
from pathlib import Path

import pytest

from auditor.errors import ConfigError
from auditor.model.items import NetClass
from auditor.read.kicad_pro import parse_project_netclasses, read_project_netclasses


def test_absent_project_file_is_reported(tmp_path: Path) -> None:
    found = read_project_netclasses(tmp_path / "board.kicad_pcb")
    assert not found.found and found.path.endswith("board.kicad_pro")


def test_classes_assignments_and_patterns(tmp_path: Path) -> None:
    project = {"net_settings": {
        "classes": [{"name": "Default"}, {"name": "Touch", "nets": ["T0"]}],
        "netclass_assignments": {"T1": "Touch", "X": ["Power", "Touch"], "Y": None},
        "netclass_patterns": [{"netclass": "Touch", "pattern": "SLD*"}],
    }}
    (tmp_path / "b.kicad_pro").write_text(json.dumps(project), encoding="utf-8")
    found = read_project_netclasses(tmp_path / "b.kicad_pcb")
    assert found.found
    assert found.classes == (NetClass("Default"), NetClass("Power", ("X",)),
                             NetClass("Touch", ("T0", "T1", "X"), ("SLD*",)))


def test_malformed_json_gives_line_and_column() -> None:
    text = '{\n  "net_settings": {\n    "classes": [,]\n  }\n}\n'
    with pytest.raises(ConfigError) as err:
        parse_project_netclasses(text, "b.kicad_pro")
    # json.JSONDecodeError (Python standard library) puts the stray comma at 3:17.
    assert (err.value.line, err.value.column) == (3, 17)
    assert str(err.value).startswith("b.kicad_pro:3:17: invalid JSON")


def test_wrong_shape_is_a_config_error() -> None:
    with pytest.raises(ConfigError, match="netclass_patterns"):
        parse_project_netclasses('{"net_settings": {"netclass_patterns": [{"x": 1}]}}', "p")
