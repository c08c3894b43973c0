"""``padaudit sensors`` end to end: exit codes, listing, JSON (exit-code
contract from auditor/cli/main.py; common practice, no source)."""

from __future__ import annotations

import json
import sys
from pathlib import Path

import pytest

ROOT = Path(__file__).resolve().parents[2]
for extra in (ROOT, ROOT / "tests" / "unit" / "sensors"):
    if str(extra) not in sys.path:
        sys.path.insert(0, str(extra))

from sensor_boards import (  # noqa: E402
    controller,
    new_board,
    resistor,
    round_button,
    wired_through_series,
)

from auditor.cli.main import main  # noqa: E402

REQUIRED = {"name", "kind", "nets", "refs", "layer", "area_mm2", "x_mm", "y_mm", "reason"}


@pytest.fixture(scope="module")
def two_buttons(tmp_path_factory: pytest.TempPathFactory) -> Path:
    board = new_board("cli")
    round_button(board, "E1", (15.0, 20.0), 10.0, "TOUCH1")
    wired_through_series(board, (15.0, 20.0), "TOUCH1", "R1", (40.0, 20.0), pin=1)
    round_button(board, "E2", (15.0, 38.0), 10.0, "Net-(E2-Pad1)")
    controller(board, ["TOUCH1_R", "Net-(E2-Pad1)"])
    return board.write(tmp_path_factory.mktemp("cli") / "two.kicad_pcb")


@pytest.fixture(scope="module")
def no_sensors(tmp_path_factory: pytest.TempPathFactory) -> Path:
    board = new_board("none")
    resistor(board, "R1", (20.0, 20.0), "A", "B")
    controller(board, ["A"])
    return board.write(tmp_path_factory.mktemp("none") / "none.kicad_pcb")


def test_lists_sensors_and_cues(two_buttons: Path, capsys: pytest.CaptureFixture[str]) -> None:
    assert main(["sensors", str(two_buttons)]) == 0
    out = capsys.readouterr().out
    assert "2 sense electrode(s)" in out
    assert "picked because: net name has 'touch'" in out
    assert "no project file" in out  # net classes: says the project file is absent


def test_json_has_the_contract_keys_and_is_deterministic(
        two_buttons: Path, capsys: pytest.CaptureFixture[str]) -> None:
    assert main(["sensors", str(two_buttons), "--json"]) == 0
    first = capsys.readouterr().out
    assert main(["sensors", str(two_buttons), "--json"]) == 0
    assert capsys.readouterr().out == first
    doc = json.loads(first)
    names = [s["name"] for s in doc["sensors"]]
    assert names == ["E2", "TOUCH1"]
    for sensor in doc["sensors"]:
        assert set(sensor) >= REQUIRED
    touch = doc["sensors"][1]
    assert touch["path"]["series_ref"] == "R1" and touch["path"]["controller"] == "U1.1"
    assert touch["area_mm2"] == round(touch["area_mm2"], 4)


def test_nothing_found_exits_1_with_a_hint(no_sensors: Path,
                                           capsys: pytest.CaptureFixture[str]) -> None:
    assert main(["sensors", str(no_sensors)]) == 1
    captured = capsys.readouterr()
    assert "0 sense electrode(s)" in captured.out
    assert "no sense electrodes found" in captured.err
    assert "[tool.padaudit.sensors]" in captured.err and 'nets = ["TOUCH*"]' in captured.err


def test_net_override_selects_by_glob(no_sensors: Path,
                                      capsys: pytest.CaptureFixture[str]) -> None:
    # R1's pad on net B is tiny, but configuration is taken at its word
    # unless the only copper is a part's pad: then it is listed as rejected.
    assert main(["sensors", str(no_sensors), "--net", "B", "--json"]) == 1
    doc = json.loads(capsys.readouterr().out)
    assert doc["sensors"] == [] and doc["rejected"][0]["net"] == "B"


def test_missing_board_is_exit_2(tmp_path: Path, capsys: pytest.CaptureFixture[str]) -> None:
    assert main(["sensors", str(tmp_path / "absent.kicad_pcb")]) == 2
    err = capsys.readouterr().err
    assert err.startswith("padaudit: ") and err.count("\n") == 1


def test_configuration_beside_the_board_selects(two_buttons: Path, tmp_path: Path,
                                                capsys: pytest.CaptureFixture[str]) -> None:
    board = tmp_path / "two.kicad_pcb"
    board.write_bytes(two_buttons.read_bytes())
    (tmp_path / "padaudit.toml").write_text('[sensors]\nnets = ["Net-(E2*"]\n', encoding="utf-8")
    assert main(["sensors", str(board), "--json"]) == 0
    doc = json.loads(capsys.readouterr().out)
    assert [s["name"] for s in doc["sensors"]] == ["E2"]
    assert doc["sensors"][0]["reason"] == "configured net pattern 'Net-(E2*'"


def test_malformed_project_file_is_exit_2_with_position(
        two_buttons: Path, tmp_path: Path, capsys: pytest.CaptureFixture[str]) -> None:
    board = tmp_path / "two.kicad_pcb"
    board.write_bytes(two_buttons.read_bytes())
    (tmp_path / "two.kicad_pro").write_text('{\n  "net_settings": [,\n}\n', encoding="utf-8")
    assert main(["sensors", str(board)]) == 2
    err = capsys.readouterr().err
    # json.JSONDecodeError (Python standard library) puts the stray comma at 2:20.
    assert f"{tmp_path / 'two.kicad_pro'}:2:20: invalid JSON" in err and err.count("\n") == 1
