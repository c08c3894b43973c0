"""Bad configuration and profile values end to end: exit 2, one line naming
the file and line, no traceback (issue 16, item 2). The exit-code contract is
the project's own (README; common practice for linters, no source)."""

from __future__ import annotations

import shutil
import subprocess
import sys
from pathlib import Path

import pytest

from auditor.cli.main import main

FIXTURES = Path(__file__).resolve().parents[2] / "fixtures" / "rules"
BOARD = FIXTURES / "electrode-paste--good.kicad_pcb"


def board_with_config(folder: Path, config_text: str) -> Path:
    folder.mkdir(parents=True, exist_ok=True)
    (folder / "padaudit.toml").write_text(config_text, encoding="utf-8")
    return Path(shutil.copy(BOARD, folder / BOARD.name))


@pytest.mark.parametrize("text, line", [
    ("air_gap_mm = 1" + "0" * 399 + "\n", 1),        # was exit 3 (OverflowError)
    ('power = "usb"\nair_gap_mm = 1e300\n', 2),     # was killed at 21 GB
    ("[overlay]\nthickness_mm = 1e9\n", 2),         # was 87 s and 4.5 GB
    ('profile = "nonesuch"\n', 1),                  # once named no file or line
])
def test_bad_value_exits_2_with_one_located_line(tmp_path: Path, text: str, line: int) -> None:
    board = board_with_config(tmp_path, text)
    done = subprocess.run([sys.executable, "-m", "auditor", "audit", str(board), "--no-solve"],
                          capture_output=True, text=True, check=False, timeout=120)
    assert done.returncode == 2, done.stderr
    assert done.stdout == ""
    assert done.stderr.count("\n") == 1 and "Traceback" not in done.stderr
    assert done.stderr.startswith(f"padaudit: {tmp_path / 'padaudit.toml'}:{line}: ")


def test_profile_without_extends_runs_every_rule(tmp_path: Path,
                                                 capsys: pytest.CaptureFixture[str]) -> None:
    # Such a profile once crashed 21 rules (their thresholds were missing).
    board = board_with_config(tmp_path, 'profile = "bare.toml"\n')
    (tmp_path / "bare.toml").write_text("[thresholds]\ntrace_max_length_mm = 120\n",
                                        encoding="utf-8")
    code = main(["audit", str(board), "--no-solve", "--format", "json"])
    out, err = capsys.readouterr()
    assert code == 0, err
    assert '"rule_errors": []' in out


def test_unknown_profile_flag_names_the_option(capsys: pytest.CaptureFixture[str]) -> None:
    code = main(["audit", str(BOARD), "--no-solve", "--profile", "nonesuch"])
    _, err = capsys.readouterr()
    assert code == 2
    assert err.startswith("padaudit: --profile: unknown profile 'nonesuch'; choose one of: "
                          "default, ") and err.count("\n") == 1 and err.count("nonesuch") == 1


@pytest.mark.parametrize("command", [["rules"], ["rules", "trace-too-wide"],
                                     ["kicad-rules", str(BOARD)]])
def test_unknown_profile_is_one_line_everywhere(capsys: pytest.CaptureFixture[str],
                                                command: list[str]) -> None:
    """Every command taking --profile refuses an unknown one alike: exit 2,
    one line naming the option and the choices, the name said once."""
    code = main([*command, "--profile", "nonesuch"])
    out, err = capsys.readouterr()
    assert code == 2 and out == ""
    assert err == ("padaudit: --profile: unknown profile 'nonesuch'; choose one of: default, "
                   "mutual, proximity, strict, or a path to a .toml profile\n")
