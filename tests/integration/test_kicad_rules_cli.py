"""``padaudit kicad-rules`` end to end: where it writes, what it refuses, exit
codes (contract in auditor/cli/main.py; common practice, no source)."""

from __future__ import annotations

import shutil
import sys
from pathlib import Path

import pytest

ROOT = Path(__file__).resolve().parents[2]
for extra in (ROOT / "tests" / "support", ROOT / "tests" / "unit" / "sensors"):
    if str(extra) not in sys.path:
        sys.path.insert(0, str(extra))

from dru_syntax import read_dru  # noqa: E402
from sensor_boards import new_board  # noqa: E402

from auditor.cli.main import main  # noqa: E402

PLANTED = ROOT / "fixtures" / "dru" / "planted.kicad_pcb"


@pytest.fixture()
def board(tmp_path: Path) -> Path:
    return Path(shutil.copy(PLANTED, tmp_path / "panel.kicad_pcb"))


def test_stdout(board: Path, capsys: pytest.CaptureFixture[str]) -> None:
    assert main(["kicad-rules", str(board)]) == 0
    out = capsys.readouterr().out
    assert out.startswith("(version 1)\n")
    assert len(read_dru(out)) == 4
    # Same board and options, same bytes (no time stamp, no absolute path).
    assert main(["kicad-rules", str(board)]) == 0
    assert capsys.readouterr().out == out
    assert str(board.parent) not in out


def test_writes_a_file_and_never_replaces_it_without_force(
        board: Path, capsys: pytest.CaptureFixture[str]) -> None:
    target = board.with_suffix(".kicad_dru")
    assert main(["kicad-rules", str(board), "-o", str(target)]) == 0
    first = target.read_text()
    assert len(read_dru(first)) == 4
    target.write_text("(version 1)\n# mine\n")
    capsys.readouterr()
    assert main(["kicad-rules", str(board), "-o", str(target)]) == 2
    err = capsys.readouterr().err
    assert err.count("\n") == 1 and "exists" in err and "--force" in err
    assert target.read_text() == "(version 1)\n# mine\n"
    assert main(["kicad-rules", str(board), "-o", str(target), "--force"]) == 0
    assert target.read_text() == first


def test_append_only_prints_rules_without_header(board: Path,
                                                 capsys: pytest.CaptureFixture[str]) -> None:
    assert main(["kicad-rules", str(board), "--append-only"]) == 0
    out = capsys.readouterr().out
    assert "(version 1)" not in out
    assert len(read_dru(out, header=False)) == 4


@pytest.mark.parametrize("suffix", [".kicad_pcb", ".kicad_pro"])
def test_never_writes_a_kicad_design_file(board: Path, suffix: str,
                                          capsys: pytest.CaptureFixture[str]) -> None:
    before = board.read_bytes()
    target = board if suffix == ".kicad_pcb" else board.with_suffix(suffix)
    assert main(["kicad-rules", str(board), "-o", str(target), "--force"]) == 2
    assert "never writes" in capsys.readouterr().err
    assert board.read_bytes() == before


def test_board_without_electrodes_exits_1(tmp_path: Path,
                                          capsys: pytest.CaptureFixture[str]) -> None:
    empty = new_board("dru-empty").write(tmp_path / "empty.kicad_pcb")
    assert main(["kicad-rules", str(empty)]) == 1
    captured = capsys.readouterr()
    assert captured.out == "" and "no sense electrodes" in captured.err


def test_bad_board_is_one_line_exit_2(tmp_path: Path, capsys: pytest.CaptureFixture[str]) -> None:
    bad = tmp_path / "bad.kicad_pcb"
    bad.write_text("(kicad_pcb (version 20211014)\n  (net 0 \"\")\n")
    assert main(["kicad-rules", str(bad)]) == 2
    err = capsys.readouterr().err
    assert err.count("\n") == 1 and "bad.kicad_pcb:" in err and "Traceback" not in err
