"""KiCad's own checker runs the exported rules (issue 15, item 2).

KiCad 6's ``pcbnew`` module (Debian package ``kicad``) loads
``BOARD.kicad_dru`` from beside the board when
``pcbnew.WriteDRCReport(board, path, pcbnew.EDA_UNITS_MILLIMETRES, False)``
runs; no project file is needed. pcbnew lives in the system Python, not in a
virtual environment, so it runs in a subprocess of ``/usr/bin/python3``.
Skipped where that interpreter has no pcbnew.

Boards: fixtures/make_dru_boards.py (KiCad 6 format); the planted twins
carry the faults their manifest lists, each of which must be reported under
the name of the rule exported from the matching padaudit rule, and the clean
twin none.
"""

from __future__ import annotations

import functools
import json
import re
import shutil
import subprocess
from pathlib import Path

import pytest

from auditor.cli.main import main

pytestmark = pytest.mark.kicad

ROOT = Path(__file__).resolve().parents[2]
DRU = ROOT / "fixtures" / "dru"
SYSTEM_PYTHON = "/usr/bin/python3"
CHECK = """
import sys
import pcbnew
board = pcbnew.LoadBoard(sys.argv[1])
ok = pcbnew.WriteDRCReport(board, sys.argv[2], pcbnew.EDA_UNITS_MILLIMETRES, False)
print(pcbnew.Version(), ok)
"""


@functools.cache
def _kicad_version() -> str:
    if not Path(SYSTEM_PYTHON).exists():
        return ""
    done = subprocess.run([SYSTEM_PYTHON, "-c", "import pcbnew; print(pcbnew.Version())"],
                          capture_output=True, text=True, timeout=120)
    return done.stdout.strip() if done.returncode == 0 else ""


def _drc(board: Path) -> tuple[list[str], int]:
    """Names of the rules KiCad reports violated, and its violation count."""
    report = board.with_suffix(".rpt")
    done = subprocess.run([SYSTEM_PYTHON, "-c", CHECK, str(board), str(report)],
                          capture_output=True, text=True, timeout=300, cwd=board.parent)
    assert done.returncode == 0 and done.stdout.split()[-1] == "True", done.stderr
    text = report.read_text()
    count = re.search(r"\*\* Found (\d+) DRC violations \*\*", text)
    assert count is not None, text
    return re.findall(r"^\s+Rule: (.+?); Severity", text, re.MULTILINE), int(count.group(1))


def _exported(board: Path) -> dict[str, str]:
    """Write BOARD.kicad_dru beside the board; exported rule name -> padaudit rule id."""
    target = board.with_suffix(".kicad_dru")
    assert main(["kicad-rules", str(board), "-o", str(target)]) == 0
    names = re.findall(r'^# from padaudit rule ([a-z0-9-]+): .*\n\(rule "([^"]+)"',
                       target.read_text(), re.MULTILINE)
    return {name: rule_id for rule_id, name in names}


@pytest.fixture()
def kicad() -> str:
    version = _kicad_version()
    if not version:
        pytest.skip("KiCad's pcbnew module is not importable by /usr/bin/python3")
    return version


def _copy(name: str, tmp_path: Path) -> Path:
    return Path(shutil.copy(DRU / name, tmp_path / name))


@pytest.mark.parametrize("name", ["planted.kicad_pcb", "planted-no-courtyard.kicad_pcb"])
def test_planted_faults_trip_the_exported_rules(kicad: str, tmp_path: Path, name: str) -> None:
    # Without a courtyard the electrode gap rule picks E1's pad by its size
    # (A.Size_X); that this reaches the right pad is what KiCad checks here.
    manifest = json.loads((DRU / "manifest.json").read_text())
    board = _copy(name, tmp_path)
    exported = _exported(board)
    tripped, count = _drc(board)
    tripped_ids = {exported[rule] for rule in tripped if rule in exported}
    assert tripped_ids == set(manifest[name]["must_trip"]), (kicad, tripped)
    assert count == len(tripped) > 0


def test_clean_twin_trips_nothing(kicad: str, tmp_path: Path) -> None:
    board = _copy("clean.kicad_pcb", tmp_path)
    assert len(_exported(board)) == 4
    assert _drc(board) == ([], 0)


def test_without_the_rules_file_kicad_sees_none_of_the_faults(kicad: str, tmp_path: Path) -> None:
    # The control: KiCad's default rules alone pass the planted board, so the
    # violations above come from the exported file.
    board = _copy("planted.kicad_pcb", tmp_path)
    assert _drc(board) == ([], 0)
